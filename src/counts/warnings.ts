/**
 * The warnings a survey file earns before anything is counted (predict gives them with its
 * results, check with the file): kept apart from predict.ts so that check reads them without
 * loading the count engine.
 */
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { bandRedEdgeAngstrom, LYMAN_ALPHA_ANGSTROM, LYMAN_LIMIT_ANGSTROM } from '../selection/igm.js';
import { warning, type Warning } from '../warnings.js';
import { precise } from '../render/format.js';
import { completenessFunction } from '../selection/completeness.js';
import { MIN_SLICE_WIDTH } from '../model/limits.js';

const fmtNum = (x: number): string => precise(x, 4);

/**
 * Warnings about the band and the slices (the magnitude kind's Lyman-alpha check; populations
 * outside the slices), for the given populations (default: all).
 */
export function predictionWarnings(survey: Survey, populations: readonly Population[] = survey.populations): Warning[] {
  const out: Warning[] = [];
  const d = survey.detection;
  if (d.kind === 'magnitude') {
    for (const p of populations) {
      // the spectrum in use: the population's own, else detection.sed
      const sed = p.sed ?? d.sed;
      // A spectrum's band: a top-hat's red end, a gaussian's center + fwhm (1/16 of its peak), a table's last row above 0.
      // (a band's shape beside a population's own sed: the power-law populations see all of it too)
      const sedBand = sed?.band ?? d.spectrumBand;
      const red =
        sedBand && sedBand.profile !== 'table'
          ? sedBand.centerAngstrom + (sedBand.profile === 'tophat' ? 0.5 : 1) * sedBand.fwhmAngstrom
          : bandRedEdgeAngstrom(d.bandAngstrom, d.bandTable);
      const zb = red / LYMAN_ALPHA_ANGSTROM - 1;
      if (zb < p.window.max) {
        const from = Math.max(zb, p.window.min);
        const what =
          d.bandTable || sedBand
            ? 'the whole band (to its red edge at ' + fmtNum(red) + ' A)'
            : 'the band (effective wavelength ' + fmtNum(red) + ' A)';
        // a band observed below the Lyman limit, where no survey of galaxies observes: most likely
        // wavelengths in um or nm read as Angstrom, which no intergalactic attenuation would mend
        const below = `${d.bandTable || sedBand ? 'its red edge' : 'it'} lies below the Lyman limit (${LYMAN_LIMIT_ANGSTROM} A) even at z = 0, where no survey of galaxies observes: `;
        const advice =
          red < LYMAN_LIMIT_ANGSTROM
            ? below +
              (d.bandTable
                ? "the band file's wavelengths are read in Angstrom unless its header names the unit; if they are in um or nm, name it in a header line (wavelength_um, transmission or wavelength_nm, transmission)"
                : sedBand
                  ? `the band's center and fwhm written as plain numbers are in Angstrom; give a wavelength in um or nm with its unit (center: "${fmtNum(sedBand.centerAngstrom)} nm")`
                  : `a plain number is a wavelength in Angstrom; give a wavelength in um or nm with its unit (band: "${fmtNum(d.bandAngstrom)} um")`)
            : d.igm === 'madau1995'
              ? sed
                ? 'the counts there include the Madau 1995 mean intergalactic transmission, applied to the spectrum inside the band'
                : 'the counts there include the Madau 1995 mean intergalactic transmission, and the power-law spectrum is extrapolated below 1216 A'
              : sed
                ? "no intergalactic attenuation is applied there (detection.igm is none; the spectrum's own features are all that dims it), so those counts are too high; consider igm: madau1995"
                : 'no intergalactic attenuation is applied there (detection.igm is none), so those counts are too high; consider igm: madau1995';
        out.push(
          warning(
            'band_blueward_of_lyman_alpha',
            `${p.name}: at z > ${fmtNum(from)} (its window is z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)}) ${what} lies blueward of rest-frame Lyman alpha (1216 A); ${advice}`,
          ),
        );
      }
    }
  }
  const faint = completenessAtLimit(survey, populations);
  if (faint) out.push(faint);
  const rises = completenessRisesToFaint(survey);
  if (rises) out.push(rises);
  for (const p of populations) {
    // Only explicit edges can leave a population's own slices outside its window.
    const lo = p.sliceEdges[0]!;
    const hi = p.sliceEdges[p.sliceEdges.length - 1]!;
    if (p.window.max <= lo || p.window.min >= hi) {
      out.push(
        warning(
          'population_outside_slices',
          `${p.name}: its window z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)} lies outside the slice edges (z = ${fmtNum(lo)} to ${fmtNum(hi)}), so it counts 0; give slice edges that reach it, or a slices count or width`,
        ),
      );
    }
  }
  return out;
}

/** Below this completeness at the limit, the curve rather than the limit decides the counts. */
export const COMPLETENESS_AT_LIMIT_MIN = 0.01;

/**
 * A completeness curve that has fallen below 1 % before the detection limit: the sources near the
 * limit are hardly counted, so the counts follow the curve and a fainter limit adds almost nothing
 * (predict and compare keep the curve where the file puts it; plan and forecast --target move it
 * with the limit). The lowest completeness a counted source gets is the one at the limit (the
 * brightest limit of a threshold that varies with z, over the window's ends and middle).
 */
function completenessAtLimit(survey: Survey, populations: readonly Population[]): Warning | undefined {
  const d = survey.detection;
  if (!d.completeness || populations.length === 0) return undefined;
  const c = completenessFunction(d.completeness, d.kind, populations[0]!.variable);
  let at: number;
  let limit: string;
  if (d.kind === 'line_flux') {
    at = c(Math.log10(d.limitCgs));
    limit = `${fmtNum(d.limitCgs)} erg/s/cm^2`;
  } else if (d.kind === 'magnitude') {
    at = c(d.limitMag);
    limit = `${fmtNum(d.limitMag)} AB`;
  } else {
    const zs = populations.flatMap((p) => [p.window.min, 0.5 * (p.window.min + p.window.max), p.window.max]);
    const values = zs.map((z) => d.limit.at(z));
    const fractions = values.map((v) => c(v));
    at = Math.max(...fractions);
    const v = values[fractions.indexOf(at)]!;
    limit = `${fmtNum(v)} ${populations[0]!.variable === 'magnitude' ? 'AB (absolute)' : 'in log10 of the quantity'}`;
  }
  if (!(at < COMPLETENESS_AT_LIMIT_MIN)) return undefined;
  return warning(
    'completeness_vanishes_before_limit',
    `the completeness at the detection limit (${limit}) is ${at === 0 ? '0' : precise(100 * at, 2)} %, so sources near the limit are hardly counted: the counts follow the completeness curve, and a fainter limit adds almost nothing; ` +
      'if the curve was measured for another depth, move it with the limit (a curve usually reaches 50 % near the limit; common practice), otherwise ignore this',
  );
}

/** How much more complete a table's faintest row may be than its brightest before it is warned about. */
export const COMPLETENESS_RISE_MIN = 0.2;

/**
 * A completeness table of a line-flux or magnitude survey that is more complete at its faintest row
 * than at its brightest (by COMPLETENESS_RISE_MIN or more): a completeness falls toward faint
 * sources (docs/survey-file.md, "Completeness"), so the fractions were most likely listed in the
 * reverse order of their fluxes or magnitudes; the counts would follow the curve as written.
 */
function completenessRisesToFaint(survey: Survey): Warning | undefined {
  const d = survey.detection;
  const c = d.completeness;
  if (!c || c.model !== 'table' || (d.kind !== 'line_flux' && d.kind !== 'magnitude')) return undefined;
  // x ascends toward faint sources in both kinds: -log10 of the line flux, or the AB magnitude
  const bright = c.fraction[0]!;
  const faint = c.fraction[c.fraction.length - 1]!;
  if (!(faint - bright >= COMPLETENESS_RISE_MIN)) return undefined;
  const at = (x: number) => (d.kind === 'line_flux' ? `${fmtNum(10 ** -x)} erg/s/cm^2` : `${fmtNum(x)} AB`);
  return warning(
    'completeness_rises_to_faint',
    `detection.completeness.table is ${fmtNum(faint)} at its faintest row (${at(c.x[c.x.length - 1]!)}) and ${fmtNum(bright)} at its brightest (${at(c.x[0]!)}), ` +
      'more complete for faint sources than for bright ones, where a completeness falls toward faint sources; the counts follow the table as written: ' +
      (d.kind === 'line_flux'
        ? 'check that each fraction is beside its own flux (rows run from the faintest flux up)'
        : 'check that each fraction is beside its own magnitude (rows run from the brightest magnitude down)'),
  );
}

/**
 * The warning for a population some of whose slices' integrals over redshift did not converge
 * (src/counts/engine.ts chooseRedshiftNodes: still unconverged after halving its pieces, the last
 * two orders apart by more than `threshold` of the slice's integral), or undefined when none did.
 */
export function unconvergedWarning(
  population: string,
  slices: readonly { zMin: number; zMax: number; quadratureMissed?: { share: number; z: number } }[],
  threshold: number,
  halvings: number,
): Warning | undefined {
  const bad = slices.filter((s) => s.quadratureMissed && s.quadratureMissed.share > threshold);
  if (bad.length === 0) return undefined;
  let worst = bad[0]!;
  for (const s of bad) if (s.quadratureMissed!.share > worst.quadratureMissed!.share) worst = s;
  const { share, z } = worst.quadratureMissed!;
  const ranges = bad.map((s) => `${fmtNum(s.zMin)}-${fmtNum(s.zMax)}`).join(', ');
  const one = bad.length === 1;
  // At a window's start at z = 0, closer than any slice edge may be put: a flux or magnitude limit
  // reaches ever fainter sources as z falls to 0, and a steep faint end makes the integrand grow
  // there as z^(2 alpha + 4), which no edge can cut (alpha = -2.45 from z = 0 counted 0.12 % low,
  // -2.49 27 % low, against test/reference/generate/steep_faint_end.py; 4 % and 53 % before the
  // comoving distance below z = 1e-5 was its series; found by a trial user)
  if (worst.zMin === 0 && z < MIN_SLICE_WIDTH)
    return warning(
      'redshift_integral_unconverged',
      `${population}: the integral over redshift of ${one ? 'the slice' : 'the slices'} ${ranges} did not converge near z = 0 ` +
        `(after ${halvings} halvings of its pieces the quadrature's last two orders still differ by ${precise(share, 2)} of ${one ? 'its' : "a slice's"} count): ` +
        'a flux or magnitude limit reaches ever fainter sources as z falls to 0, and a faint-end slope alpha below about -2.35 makes the count there grow as z^(2 alpha + 4), faster than the quadrature follows, ' +
        `so ${one ? 'its count' : 'their counts'} may be too low by far more than that (0.1 % with alpha = -2.45, a quarter with -2.49); ` +
        'start the redshift window a little above 0 (redshift.min: 0.0001 leaves out only sources within about 0.4 Mpc), or assume a flatter faint end',
    );
  return warning(
    'redshift_integral_unconverged',
    `${population}: the integral over redshift of ${one ? 'the slice' : 'the slices'} ${ranges} did not converge ` +
      `(after ${halvings} halvings of its pieces the quadrature's last two orders still differ by ` +
      `${precise(share, 2)} of ${one ? 'its' : "a slice's"} count, the most near z = ${fmtNum(z)}), so ` +
      `${one ? 'its count' : 'their counts'} may be off by more than the 1e-6 promised: something in the survey ` +
      `changes there faster than the quadrature follows; put slice edges around z = ${fmtNum(z)} ` +
      `(slices: {edges: [...]}), or make what changes there smoother`,
  );
}
