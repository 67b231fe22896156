/** The detection of a prediction in words (no table library: the report reads it too). */
import type { Prediction } from '../model/outputs/prediction.js';
import { sig } from './format.js';
import { fluxDensityOfAbMagnitude, UNITS_PER_JY, type FluxDensityUnit } from '../model/photometry.js';

/** A flux density in Jy as Jy, mJy, uJy or nJy, whichever puts it at 1 or above (nJy below). */
export function fluxDensityText(jy: number): string {
  const [scale, unit] = jy >= 1 ? [1, 'Jy'] : jy >= 1e-3 ? [1e3, 'mJy'] : jy >= 1e-6 ? [1e6, 'uJy'] : [1e9, 'nJy'];
  return `${sig(jy * scale)} ${unit}`;
}

/**
 * An AB magnitude limit as the flux density in the unit the file wrote its limit in, then the AB
 * text as the output writes it otherwise: "1.55 mJy (15.93 AB)". Without a unit, the AB text alone.
 */
export function givenUnitLimitText(ab: number, abText: string, unit: FluxDensityUnit | undefined): string {
  return unit ? `${sig(fluxDensityOfAbMagnitude(ab, unit), 3)} ${unit} (${abText})` : abText;
}

/** A frequency in GHz as THz, GHz or MHz, whichever puts it at 1 or above (MHz below). */
export function frequencyText(ghz: number): string {
  const [scale, unit] = ghz >= 1e3 ? [1e-3, 'THz'] : ghz >= 1 ? [1, 'GHz'] : [1e3, 'MHz'];
  return `${sig(ghz * scale)} ${unit}`;
}

/**
 * The power-law colour term in words: "spectral slope beta = -2"; with the populations that give
 * their own beta, "spectral slope beta = -2, and for interlopers its own beta = 1"; when every
 * population gives its own, "each population's own spectral slope beta: LBG -2.2, interlopers 1".
 */
function slopeWords(beta: number, models: Prediction['models'] | undefined): string {
  const own = (models ?? []).filter((m) => m.k_correction?.beta_from === 'population');
  const spectra = ownSpectra(models);
  const ownText = own.map((m) => `${m.name} ${sig(m.k_correction!.beta!)}`);
  if (own.length === 0 && spectra.length === 0) return `spectral slope beta = ${sig(beta)}`;
  if (spectra.length === 0 && own.length === models!.length)
    return `each population's own spectral slope beta: ${ownText.join(', ')}`;
  const each = [
    ...own.map((m) => `for ${m.name} its own beta = ${sig(m.k_correction!.beta!)}`),
    ...spectra.map((m) => `for ${m.name} its own spectrum ${m.k_correction!.spectrum_file!}`),
  ];
  // every population k-corrected with its own slope or spectrum: detection.beta plays no part
  if (own.length + spectra.length === models!.length) return each.join(', ');
  return `spectral slope beta = ${sig(beta)}, and ${each.join(', ')}`;
}

/** The populations giving their own spectrum (sed), which replaces the detection's k-correction for them. */
function ownSpectra(models: Prediction['models'] | undefined): NonNullable<Prediction['models']> {
  return (models ?? []).filter((m) => m.k_correction?.spectrum_from === 'population');
}

/**
 * The detection in words: the kind, its limit (and what the file gave, a flux density or a Vega
 * magnitude), the band or filter. The predict table's survey line and the report's summary.
 */
export function detectionLine(
  p: Pick<Prediction, 'detection'> & Partial<Pick<Prediction, 'models' | 'limit_variable'>>,
): string {
  const d = p.detection;
  if (d.kind === 'line_flux') {
    const f = d.filter;
    const filter = f ? `, ${f.profile} filter at ${sig(f.center_angstrom)} A (FWHM ${sig(f.fwhm_angstrom)} A)` : '';
    const given = d.limit_jy_km_s !== undefined ? ` (given as ${sig(d.limit_jy_km_s, 4)} Jy km/s)` : '';
    return `line flux limit ${sig(d.limit_cgs)} erg/s/cm^2${given}${filter}`;
  }
  if (d.kind === 'magnitude') {
    const given =
      d.limit_jy !== undefined
        ? ` (given as ${d.limit_unit ? `${sig(d.limit_jy * UNITS_PER_JY[d.limit_unit], 4)} ${d.limit_unit}` : fluxDensityText(d.limit_jy)})`
        : d.system === 'vega'
          ? ` (given in Vega, AB = Vega ${d.vega_to_ab! < 0 ? '-' : '+'} ${sig(Math.abs(d.vega_to_ab!))})`
          : '';
    if (d.sed_file) {
      const b = d.band;
      const band =
        b && b.profile !== 'table'
          ? `a ${b.profile} band at ${sig(b.center_angstrom)} A (fwhm ${sig(b.fwhm_angstrom)} A)`
          : `the band ${d.band_file ?? ''}`.trimEnd();
      const spectra = ownSpectra(p.models).map(
        (m) => `, and for ${m.name} its own spectrum ${m.k_correction!.spectrum_file!}`,
      );
      return `AB magnitude limit ${sig(d.limit_ab_mag)}${given} in ${band}, k-corrected with the spectrum ${d.sed_file}${spectra.join('')}`;
    }
    const at =
      d.band_ghz !== undefined
        ? `${frequencyText(d.band_ghz)} (${sig(d.band_angstrom)} A)`
        : `${sig(d.band_angstrom)} A`;
    // a band's shape without detection.sed: the one the populations' own spectra go through
    const b = d.band;
    const band = !b
      ? `a band at ${at}`
      : b.profile !== 'table'
        ? `a ${b.profile} band at ${sig(b.center_angstrom)} A (fwhm ${sig(b.fwhm_angstrom)} A)`
        : `the band ${d.band_file ?? ''} at ${at}`;
    return `AB magnitude limit ${sig(d.limit_ab_mag)}${given} in ${band} (${slopeWords(d.beta, p.models)})`;
  }
  const q =
    p.models?.[0]?.quantity ?? (p.limit_variable === 'absolute_magnitude' ? 'absolute AB magnitude' : 'the quantity');
  const lim = d.limit;
  const text =
    typeof lim === 'number' ? sig(lim) : typeof lim === 'string' ? `"${lim}"` : `table ${JSON.stringify(lim.table)}`;
  return `threshold on ${p.limit_variable === 'absolute_magnitude' ? q : `log10 ${q}`}: ${text}`;
}
