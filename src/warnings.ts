/**
 * Warnings: what the reader of an output should know although nothing stopped the work (bad
 * input stops it: src/errors.ts). Every warning has a stable `code` (tests and scripts match
 * codes, never wording) and a one-line `message` naming what it is about and what to do.
 *
 * Every JSON output carries them as `"warnings": [{"code", "message"}]` (the `warning`
 * definition of each schema in specs/ lists the codes below; a test keeps them equal), and the
 * command line prints each on stderr as one line, `skytally: warning: <message>`.
 *
 * To add a warning: add its code and a one-line meaning to WARNING_CODES, build it with
 * `warning(code, message)` where it is detected, add the code to the `warning` definition of every
 * output schema, and add a test that makes a file trigger it (and checks no bundled sample does).
 */
import { printable } from './errors.js';

export const WARNING_CODES = {
  no_detections: 'fewer than one source is expected in the survey, or from one of its populations',
  implausible_luminosity:
    "a population's characteristic luminosity or magnitude is implausible for its kind (e.g. a log10 given as a linear value)",
  optimum_at_grid_edge:
    "the plan's best design sits at the shortest or longest exposure of its grid: the optimum may lie beyond the grid",
  bias_at_mass_bound:
    'abundance matching held the halo mass at a bound of the Sheth-Tormen haloes it searches (the bias is that of the bound)',
  band_blueward_of_lyman_alpha:
    'the band lies blueward of rest-frame Lyman alpha for part of a window (counts depend on the intergalactic attenuation assumed)',
  population_outside_slices:
    "a population's window lies outside the explicit slice edges, so it counts 0 in the slices",
  rest_wavelength_default_far_from_band:
    'a magnitude survey leaves rest_wavelength at its 1500 Angstrom default while the band seen at rest lies more than 30 % from it somewhere in the window',
  window_beyond_valid_redshift:
    "a population's window reaches beyond valid_redshift, where its luminosity function was measured",
  igm_not_stated:
    'the band lies within 1.3 times Lyman alpha (1 + z) somewhere in the window and the file does not state detection.igm',
  blend_ratio_through_filter:
    "a line search through a filter gives a population's blend_ratio, which takes the blended lines at the line's own transmission: blended_lines places each at its own wavelength",
  phi_star_per_dex:
    'a per-dex normalisation (phi_star_dex forms) was given: says the ln 10 convention used, which papers label inconsistently',
  implausible_density:
    "a population's phi* is above 0.5 Mpc^-3, far above any galaxy population's (e.g. a linear value under a log10 key)",
  completeness_vanishes_before_limit:
    'the completeness curve is below 1 % at the detection limit: the counts follow the curve, and a fainter limit adds almost nothing',
  completeness_rises_to_faint:
    'a completeness table is higher at its faintest row than at its brightest: a completeness falls toward faint sources (e.g. fractions listed in the reverse order)',
  line_below_lyman_limit:
    "a population's line is shorter than the Lyman limit (912 Angstrom), where no galaxy's line is seen (e.g. a wavelength in nm written as a plain number)",
  rest_wavelength_below_lyman_limit:
    "a magnitude population's rest_wavelength is shorter than the Lyman limit (912 Angstrom), where no galaxy's luminosity function is measured (e.g. a wavelength in nm written as a plain number)",
  radio_spectrum_steep:
    'a magnitude survey in a radio band (1 mm or longer) has beta above -1, a spectrum steeper than f_nu ~ nu^-1 (e.g. a spectral index -0.7 written as beta, which is -1.3)',
  redshift_integral_unconverged:
    "a slice's redshift integral did not converge even after its pieces were halved: its count may be off by more than the precision promised",
} as const;

export type WarningCode = keyof typeof WARNING_CODES;

export interface Warning {
  code: WarningCode;
  /** One line, no line break. */
  message: string;
}

/** A warning; its message is kept to one line (line breaks and runs of spaces become one space). */
export function warning(code: WarningCode, message: string): Warning {
  if (!(code in WARNING_CODES)) throw new Error(`internal: unknown warning code "${code}"`);
  return { code, message: message.replace(/\s+/g, ' ').trim() };
}

/** Add `w` to `list` unless the same code and message are already there. */
export function addWarning(list: Warning[], w: Warning): void {
  if (!list.some((x) => x.code === w.code && x.message === w.message)) list.push(w);
}

/** The warnings of several lists, in order, each once. */
export function mergeWarnings(...lists: readonly (readonly Warning[] | undefined)[]): Warning[] {
  const out: Warning[] = [];
  for (const l of lists) for (const w of l ?? []) addWarning(out, w);
  return out;
}

/** The lines the command line prints on stderr, one per warning. */
export function warningLines(ws: readonly Warning[]): string {
  return ws.map((w) => `skytally: warning: ${printable(w.message)}\n`).join('');
}
