/**
 * The warnings a survey file earns before anything is counted (predict gives them with its
 * results, check with the file): kept apart from predict.ts so that check reads them without
 * loading the count engine.
 */
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { bandRedEdgeAngstrom, LYMAN_ALPHA_ANGSTROM } from '../selection/igm.js';
import { warning, type Warning } from '../warnings.js';
import { precise } from '../render/format.js';

const fmtNum = (x: number): string => precise(x, 4);

/**
 * Warnings about the band and the slices (the magnitude kind's Lyman-alpha check; populations
 * outside the slices), for the given populations (default: all).
 */
export function predictionWarnings(survey: Survey, populations: readonly Population[] = survey.populations): Warning[] {
  const out: Warning[] = [];
  const d = survey.detection;
  if (d.kind === 'magnitude') {
    // A spectrum's band: a top-hat's red end, a gaussian's center + fwhm (1/16 of its peak), a table's last row above 0.
    const sedBand = d.sed?.band;
    const red =
      sedBand && sedBand.profile !== 'table'
        ? sedBand.centerAngstrom + (sedBand.profile === 'tophat' ? 0.5 : 1) * sedBand.fwhmAngstrom
        : bandRedEdgeAngstrom(d.bandAngstrom, d.bandTable);
    for (const p of populations) {
      const zb = red / LYMAN_ALPHA_ANGSTROM - 1;
      if (zb < p.window.max) {
        const from = Math.max(zb, p.window.min);
        const what =
          d.bandTable || sedBand
            ? 'the whole band (to its red edge at ' + fmtNum(red) + ' A)'
            : 'the band (effective wavelength ' + fmtNum(red) + ' A)';
        out.push(
          warning(
            'band_blueward_of_lyman_alpha',
            `${p.name}: at z > ${fmtNum(from)} (its window is z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)}) ${what} lies blueward of rest-frame Lyman alpha (1216 A); ` +
              (d.igm === 'madau1995'
                ? d.sed
                  ? 'the counts there include the Madau 1995 mean intergalactic transmission, applied to the spectrum inside the band'
                  : 'the counts there include the Madau 1995 mean intergalactic transmission, and the power-law spectrum is extrapolated below 1216 A'
                : d.sed
                  ? "no intergalactic attenuation is applied there (detection.igm is none; the spectrum's own features are all that dims it), so those counts are too high; consider igm: madau1995"
                  : 'no intergalactic attenuation is applied there (detection.igm is none), so those counts are too high; consider igm: madau1995'),
          ),
        );
      }
    }
  }
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
