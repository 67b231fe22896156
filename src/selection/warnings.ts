/**
 * Warnings about how a survey selects its sources that need no counting: inputs that pass every
 * check but are common traps (docs/outputs.md, "Warnings").
 *
 *  - rest_wavelength_default_far_from_band: a magnitude survey leaves rest_wavelength at its
 *    1500 Angstrom default while the band seen at rest, band / (1 + z), lies more than 30 % from it
 *    somewhere in the window: the power-law colour term then extrapolates far (an optical r band at
 *    z < 0.6 sees 4000-6000 Angstrom at rest, and a UV luminosity function there overpredicts);
 *  - window_beyond_valid_redshift: the window reaches beyond where the luminosity function was
 *    measured (valid_redshift);
 *  - igm_not_stated: the band lies within 1.3 times Lyman alpha (1 + z) somewhere in the window and
 *    the file does not say `igm` (none or madau1995), so whether the forest was meant to dim the
 *    counts is unstated (not said again where band_blueward_of_lyman_alpha already fires);
 *  - phi_star_per_dex: a per-dex normalisation was given; papers label the ln 10 convention
 *    inconsistently, so the conversion used is said once;
 *  - line_below_lyman_limit: a line search's line is shorter than the Lyman limit (912 Angstrom),
 *    where no galaxy's line is seen: most likely a wavelength in nm written as a plain number,
 *    read in Angstrom ("line: 656.3" through a 1.2-1.9 um grism is seen at z = 17 to 28); likewise
 *    each line of blended_lines (one warning per line, naming it: "blended_lines: [{line: 654.8}]",
 *    [NII] in nm, would add its flux, and find sources by it alone, at z = 17 to 28);
 *  - rest_wavelength_below_lyman_limit: a magnitude survey's population has its rest_wavelength
 *    below the Lyman limit, where no galaxy's luminosity function is measured: most likely nm or um
 *    written as a plain number (rest_wavelength: 150 for 150 nm, read as 150 Angstrom, puts M* a
 *    decade blueward of where it was measured: with beta = -1.7 the limit moves by 0.75 mag);
 *  - blend_ratio_through_filter: a line search through a filter with a population's blend_ratio,
 *    which takes the blended lines at the line's own transmission, where blended_lines places each
 *    at its own wavelength (a HiZELS-like top hat counts 6-12 % more with the ratio:
 *    docs/survey-file.md, test/published/selection-effects-surveys.test.ts);
 *  - radio_spectrum_steep: a magnitude survey in a radio band (1 mm or longer) with beta above -1
 *    (detection.beta where a population takes it, or a population's own beta, naming it; not where a
 *    population has its own spectrum, sed),
 *    i.e. f_nu ~ nu^a with a = -(2 + beta) below -1, steeper than galaxies' synchrotron spectra
 *    (a about -0.7, beta = -1.3; common practice): most likely a spectral index written as beta
 *    (beta: -0.7 counts 19 % fewer than beta: -1.3 in docs/survey-file.md's radio example).
 */
import type { Survey } from '../model/survey.js';
import { warning, type Warning } from '../warnings.js';
import { precise } from '../render/format.js';
import { bandRedEdgeAngstrom, LYMAN_ALPHA_ANGSTROM } from './igm.js';
import { filterRedshiftWindow } from './filter.js';
import { populationPath } from '../model/select.js';

/** How far (relative) the rest-frame band may lie from a defaulted rest wavelength. */
export const REST_WAVELENGTH_TOLERANCE = 0.3;
/** A band within this factor of Lyman alpha (1 + z) asks for an explicit igm. */
export const IGM_NEAR_FACTOR = 1.3;

/** Bands from this wavelength [Angstrom] on (1 mm, 300 GHz) are radio bands, where galaxies' spectra are synchrotron. */
export const RADIO_BAND_ANGSTROM = 1e7;

/** The Lyman limit (911.75 Angstrom, common practice), rounded: no galaxy's line is seen shortward of it. */
export const LYMAN_LIMIT_ANGSTROM = 912;

const fmt = (x: number): string => precise(x, 4);

export function selectionWarnings(survey: Survey): Warning[] {
  const out: Warning[] = [];
  const d = survey.detection;
  if (d.kind === 'magnitude' && !d.sed && d.bandAngstrom >= RADIO_BAND_ANGSTROM) {
    const band = d.bandGivenHz !== undefined ? `${fmt(d.bandGivenHz / 1e9)} GHz` : `${fmt(d.bandAngstrom)} A`;
    const steep = (who: string, beta: number): Warning =>
      warning(
        'radio_spectrum_steep',
        `${who} = ${fmt(beta)} in a radio band (${band}) is a spectrum f_nu ~ nu^${fmt(-(2 + beta))}, steeper than nu^-1, where galaxies' synchrotron spectra are about nu^-0.7; ` +
          `beta is the slope of f_lambda ~ lambda^beta, and a spectral index a of f_nu ~ nu^a is beta = -(2 + a): a = ${fmt(beta)} is beta: ${fmt(-(2 + beta))}`,
      );
    // detection.beta where a population takes it (neither its own beta nor its own sed); a
    // population's own beta, naming the population
    if (d.beta > -1 && survey.populations.some((p) => p.beta === undefined && !p.sed))
      out.push(steep('detection.beta', d.beta));
    for (const p of survey.populations)
      if (p.beta !== undefined && p.beta > -1) out.push(steep(`${p.name}: its own beta`, p.beta));
  }
  for (const p of survey.populations) {
    const { min, max } = p.window;
    // a rest wavelength below the Lyman limit, where no luminosity function is measured: most likely
    // nm or um written as a plain number (rest_wavelength: 150 for 150 nm is read as 150 Angstrom)
    if (d.kind === 'magnitude' && !p.restBand && p.restWavelengthAngstrom < LYMAN_LIMIT_ANGSTROM) {
      const l = precise(p.restWavelengthAngstrom, 6);
      out.push(
        warning(
          'rest_wavelength_below_lyman_limit',
          `${p.name}: rest_wavelength, ${l} A, lies below the Lyman limit (${LYMAN_LIMIT_ANGSTROM} A), where no galaxy's luminosity function is measured, so M* is read as a magnitude at ${l} A and the k-correction is taken from there; ` +
            `a plain number is a wavelength in Angstrom: a wavelength in nm needs its unit (rest_wavelength: "${l} nm")`,
        ),
      );
    }
    // (a rest_band states where M* is defined, so the default rest wavelength is then not used)
    if (d.kind === 'magnitude' && p.restWavelengthDefault && !p.restBand) {
      const rest = p.restWavelengthAngstrom;
      // band / (1 + z) falls with z: its extremes are at the window's ends
      const atMin = d.bandAngstrom / (1 + min);
      const atMax = d.bandAngstrom / (1 + max);
      const worst =
        Math.abs(atMin / rest - 1) >= Math.abs(atMax / rest - 1) ? { z: min, l: atMin } : { z: max, l: atMax };
      if (Math.abs(worst.l / rest - 1) > REST_WAVELENGTH_TOLERANCE) {
        out.push(
          warning(
            'rest_wavelength_default_far_from_band',
            `${p.name}: rest_wavelength is left at its default ${fmt(rest)} A, but the band (${fmt(d.bandAngstrom)} A) sees ${fmt(worst.l)} A at rest at z = ${fmt(worst.z)}, ` +
              `more than ${Math.round(REST_WAVELENGTH_TOLERANCE * 100)} % away, ` +
              ((p.sed ?? d.sed)
                ? `so M* is read as a ${fmt(rest)} A magnitude and the spectrum carries it far (counts can be many times off); give rest_wavelength or rest_band where the luminosity function's magnitudes are defined`
                : ((p.beta ?? d.beta) === -2
                    ? 'so M* is taken where the band does not look (with beta = -2 the colour term vanishes; with any other spectrum counts can be many times off); '
                    : 'so the colour term extrapolates far (counts can be many times off); ') +
                  `give rest_wavelength where the luminosity function's magnitudes are defined`),
          ),
        );
      }
    }
    const v = p.validRedshift;
    if (v && (min < v.min || max > v.max)) {
      out.push(
        warning(
          'window_beyond_valid_redshift',
          `${p.name}: the window z = ${fmt(min)} to ${fmt(max)} reaches beyond z = ${fmt(v.min)} to ${fmt(v.max)}, where its luminosity function was measured (valid_redshift); ` +
            'the counts there extrapolate it',
        ),
      );
    }
    if (d.kind === 'magnitude' && !d.igmStated) {
      const zNear = d.bandAngstrom / (IGM_NEAR_FACTOR * LYMAN_ALPHA_ANGSTROM) - 1;
      // where the band is blueward of Lyman alpha, band_blueward_of_lyman_alpha already says it
      // the band's red edge as band_blueward_of_lyman_alpha takes it (a shape's too: a spectrum's band)
      const shape = d.spectrumBand;
      const red =
        shape && shape.profile !== 'table'
          ? shape.centerAngstrom + (shape.profile === 'tophat' ? 0.5 : 1) * shape.fwhmAngstrom
          : bandRedEdgeAngstrom(d.bandAngstrom, d.bandTable);
      const blueward = red / LYMAN_ALPHA_ANGSTROM - 1 < max;
      if (zNear < max && !blueward) {
        out.push(
          warning(
            'igm_not_stated',
            `${p.name}: at z > ${fmt(Math.max(zNear, min))} the band (${fmt(d.bandAngstrom)} A) lies within ${IGM_NEAR_FACTOR} times Lyman alpha (1 + z) and the file does not say igm; ` +
              'state detection.igm: madau1995 to dim the counts by the intergalactic forest, or igm: none to keep them as they are',
          ),
        );
      }
    }
    if (d.kind === 'line_flux' && p.lineAngstrom !== undefined && p.lineAngstrom < LYMAN_LIMIT_ANGSTROM) {
      const l = precise(p.lineAngstrom, 6);
      out.push(
        warning(
          'line_below_lyman_limit',
          `${p.name}: the line at ${l} A lies below the Lyman limit (${LYMAN_LIMIT_ANGSTROM} A), where no galaxy's line is seen, so it is counted at z = ${fmt(min)} to ${fmt(max)}; ` +
            `a plain number is a wavelength in Angstrom: a wavelength in nm needs its unit (line: "${l} nm")`,
        ),
      );
    }
    if (d.kind === 'line_flux') {
      for (const [i, b] of (p.blendedLines ?? []).entries()) {
        if (!(b.restAngstrom < LYMAN_LIMIT_ANGSTROM)) continue;
        const l = precise(b.restAngstrom, 6);
        // where it adds its flux: where the filter sees it (the window reaches there), or the whole window
        const seen = d.filter ? filterRedshiftWindow(d.filter, b.restAngstrom) : { min, max };
        const from = Math.max(seen.min, min);
        const to = Math.min(seen.max, max);
        const where =
          from < to
            ? `so it adds its flux at z = ${fmt(from)} to ${fmt(to)}`
            : 'so the filter sees it nowhere in the window';
        out.push(
          warning(
            'line_below_lyman_limit',
            `${p.name}: blended_lines[${i}], the line at ${l} A, lies below the Lyman limit (${LYMAN_LIMIT_ANGSTROM} A), where no galaxy's line is seen, ${where}; ` +
              `a plain number is a wavelength in Angstrom: a wavelength in nm needs its unit (blended_lines: [{line: "${l} nm", ratio: ${precise(b.ratio, 6)}}])`,
          ),
        );
      }
    }
    // a blend given as one ratio through a filter: the blended lines lie at their own wavelengths
    if (d.kind === 'line_flux' && d.filter && p.blendRatio !== undefined) {
      out.push(
        warning(
          'blend_ratio_through_filter',
          `${p.name}: ${populationPath(survey, p)}.blend_ratio through a filter counts the blended lines at the line's own transmission, but they lie at their own wavelengths ` +
            '(for H-alpha, [NII] 6548 and 6584 at 15 and 21 (1 + z) A from it) and leave or enter the filter at other redshifts: near the edges it adds flux the filter does not pass, and it misses sources seen by a blended line alone ' +
            '(a HiZELS-like top hat counts 6-12 % more with the whole ratio, about 1 % with the ratio averaged over the filter, and misses the rest: docs/survey-file.md); give them as blended_lines, each line with its own ratio',
        ),
      );
    }
    const key = p.normalisationKey;
    if (key?.endsWith('_dex')) {
      out.push(
        warning(
          'phi_star_per_dex',
          `${p.name}: ${key} is read as the prefactor of the per-dex form, phi(log10 L) = ln 10 phi* (L/L*)^(alpha+1) exp(-L/L*), and divided by ln 10; ` +
            'papers label this convention inconsistently: check that the source quotes this prefactor (else give phi_star or log10_phi_star)',
        ),
      );
    }
  }
  return out;
}
