/**
 * The photometry keys of the magnitude kind (docs/survey-file.md, "Spectra and magnitude systems"):
 * detection.sed (a rest-frame spectrum replacing the power-law colour term), the observed band as
 * an object {center, fwhm, profile} or band_file, the population's rest_band, and the magnitude
 * systems (system: ab | vega with vega_to_ab, m_AB = m_Vega + vega_to_ab) of the detection (its
 * limit and completeness) and of the population (its m_star). Everything is converted to AB here,
 * once; the model keeps how each was given for the outputs' statement.
 */
import { excerpt, inputError } from '../errors.js';
import type { Filter } from '../model/detection.js';
import type { InputFile } from '../model/survey.js';
import {
  abMagnitudeOfJy,
  jyOfAbMagnitude,
  type FluxDensityUnit,
  type MagnitudeSystemGiven,
  type RestFrame,
  type SedPhotometry,
} from '../model/photometry.js';
import { RANGES, describeRange, inRange } from '../model/limits.js';
import { SPEED_OF_LIGHT_M_S } from '../cosmology/constants.js';
import { isPlainNumberString, parseQuantity, parseQuantityOneOf } from './units.js';
import { readTransmissionFile } from './transmission-file.js';
import { readSpectrumFile } from './spectrum-file.js';
import { bandSupport, checkSpectrumCoverage, tableFwhm, tableMeanWavelength } from '../selection/filter.js';
import { fmt } from './zparam.js';

type Q = number | string;

export interface RawBand {
  center?: Q;
  fwhm?: Q;
  profile?: 'tophat' | 'gaussian';
  file?: string;
}

export interface RawPhotometryDetection {
  band?: Q | RawBand;
  band_file?: string;
  beta?: number;
  sed?: { file?: string };
  system?: 'ab' | 'vega';
  vega_to_ab?: number;
}

export interface RawPhotometryPopulation {
  rest_wavelength?: Q;
  rest_band?: RawBand;
  beta?: number;
  sed?: { file?: string };
  system?: 'ab' | 'vega';
  vega_to_ab?: number;
}

/** The largest Vega-to-AB offset accepted, mag (the common broad bands lie within 2 mag). */
export const MAX_VEGA_TO_AB = 5;

function wavelength(v: Q, file: string, path: string): number {
  return checkWavelength(parseQuantity(v, 'wavelength', file, path), file, path);
}

function checkWavelength(x: number, file: string, path: string): number {
  if (!(x > 0) || !inRange(x, RANGES.wavelength)) {
    throw inputError(
      'out_of_range',
      file,
      path,
      `is ${fmt(x)} Angstrom, outside its physical range (${describeRange(RANGES.wavelength)})`,
      'give a positive wavelength in that range',
    );
  }
  return x;
}

/** The number a refused rest_wavelength is shown as an example: the usual 1500 Angstrom of UV functions (an observed band's is 15000). */
export const REST_WAVELENGTH_EXAMPLE = 1500;

/**
 * detection.band (or a population's rest_wavelength) as one value: a wavelength (Angstrom, or with
 * a unit) or a frequency with its unit ("1.4 GHz", "345 GHz"), whose wavelength is lambda = c / nu
 * with c = 299,792,458 m/s exactly (SI).
 */
export function wavelengthOrFrequency(
  v: Q,
  file: string,
  path: string,
  what: string,
  example = 15000,
): { angstrom: number; hz?: number } {
  const q = parseQuantityOneOf(
    v,
    ['wavelength', 'frequency'],
    file,
    path,
    `give ${what} in Angstrom as a number, or a wavelength or a frequency with its unit, e.g. ${example}, "850 um" or "1.4 GHz"`,
  );
  if (q.kind === 'wavelength') return { angstrom: checkWavelength(q.value, file, path) };
  const hz = q.value;
  const angstrom = (SPEED_OF_LIGHT_M_S / hz) * 1e10;
  if (!(hz > 0) || !inRange(angstrom, RANGES.wavelength)) {
    throw inputError(
      'out_of_range',
      file,
      path,
      hz > 0
        ? `is ${fmt(hz)} Hz, a wavelength c / nu of ${fmt(angstrom)} Angstrom, outside its physical range (${describeRange(RANGES.wavelength)})`
        : `is ${fmt(hz)} Hz, but a frequency must be above 0`,
      hz > 0 ? 'give a frequency whose wavelength lies in that range' : 'give a positive frequency',
    );
  }
  return { angstrom, hz };
}

/** True when a magnitude key holds a text that is not a plain number: a flux density with its unit. */
export function isFluxDensityText(v: unknown): v is string {
  return typeof v === 'string' && !isPlainNumberString(v);
}

/**
 * A magnitude key (the magnitude kind's limit or completeness half) given as a flux density with
 * its unit ("0.1 mJy", "25 nJy", "1e-29 erg s^-1 cm^-2 Hz^-1"): the value in Jy and its AB
 * magnitude m = -2.5 log10(f_nu / 3631 Jy), inside the apparent-magnitude range.
 */
export function fluxDensityMagnitude(
  text: string,
  file: string,
  path: string,
): { jy: number; abMag: number; unit: FluxDensityUnit } {
  const fix = 'give an AB magnitude as a number, or a flux density with its unit, e.g. 24.5, "0.1 mJy" or "2 uJy"';
  // "4 mJy/beam": a map's unit, which a submillimetre or radio observer writes out of habit; a point
  // source's flux density is its peak in it, so the number stands without "/beam"
  const perBeam = /^(.*\S)\s*\/\s*beam$/i.exec(text.trim());
  if (perBeam) {
    throw inputError(
      'bad_unit',
      file,
      path,
      `"${excerpt(text, 60)}" is per beam, the unit of a map`,
      `a point source's flux density is its peak in that unit: write "${excerpt(perBeam[1]!, 50)}"`,
    );
  }
  // "27.2 mag", "27.2 AB": a magnitude written with its name, where the key takes it as a number
  const magnitude =
    /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(?:mag|mags|magnitudes?|AB|AB\s*mag|mag\s*AB)\s*$/i.exec(text);
  if (magnitude) {
    throw inputError(
      'bad_unit',
      file,
      path,
      `"${excerpt(text, 60)}" is a magnitude written with a unit`,
      `write the magnitude as a number alone: ${magnitude[1]}`,
    );
  }
  const jy = parseQuantityOneOf(text, ['fluxDensity'], file, path, fix).value;
  const shown = excerpt(text, 60);
  if (!(jy > 0)) {
    throw inputError(
      'out_of_range',
      file,
      path,
      `"${shown}" is ${fmt(jy)} Jy, but a flux density has an AB magnitude only above 0`,
      'give a positive flux density',
    );
  }
  const abMag = abMagnitudeOfJy(jy);
  if (!inRange(abMag, RANGES.apparentMagnitude)) {
    const r = RANGES.apparentMagnitude;
    throw inputError(
      'out_of_range',
      file,
      path,
      `"${shown}" is ${fmt(jy)} Jy, AB magnitude ${fmt(abMag)}, outside its physical range (${describeRange(r)}: ${fmt(jyOfAbMagnitude(r.min))} Jy down to ${fmt(jyOfAbMagnitude(r.max))} Jy)`,
      'give a flux density in that range',
    );
  }
  return { jy, abMag, unit: fluxDensityUnitOf(text, jy) };
}

/**
 * The unit a flux density was written in, for the outputs to quote limits in: Jy, mJy, uJy (or
 * µJy) or nJy after the number; erg or W per Hz as cgs or SI; any other way of writing it (a
 * product of units, another prefix) the jansky prefix that puts its value at 1 or above.
 */
function fluxDensityUnitOf(text: string, jy: number): FluxDensityUnit {
  const t = text.trim().replace(/[µμ]Jy$/, 'uJy');
  const jansky = /^[-+0-9.eE\s]*\s*([mun]?Jy)$/.exec(t);
  if (jansky) return jansky[1] as FluxDensityUnit;
  if (/^[-+0-9.eE\s]*\s*erg\b/.test(t)) return 'erg/s/cm^2/Hz';
  if (/^[-+0-9.eE\s]*\s*W\b/.test(t)) return 'W/m^2/Hz';
  return jy >= 1 ? 'Jy' : jy >= 1e-3 ? 'mJy' : jy >= 1e-6 ? 'uJy' : 'nJy';
}

/** A band {center, fwhm, profile} or {file} at `path` (file relative to the survey file). */
function readBand(raw: RawBand, path: string, file: string, base: string, inputs: InputFile[]): Filter {
  if (raw.file !== undefined) {
    for (const k of ['center', 'fwhm', 'profile'] as const) {
      if (raw[k] !== undefined)
        throw inputError(
          'conflict',
          file,
          `${path}.${k}`,
          `${k} is given with a band file, which sets its own shape`,
          `remove ${k}`,
        );
    }
    const table = readTransmissionFile(raw.file, file, `${path}.file`, base, (input) => inputs.push(input));
    return { profile: 'table', centerAngstrom: tableMeanWavelength(table), fwhmAngstrom: tableFwhm(table), table };
  }
  for (const k of ['center', 'fwhm'] as const) {
    if (raw[k] === undefined)
      throw inputError(
        'missing_key',
        file,
        `${path}.${k}`,
        'is missing',
        `give the band's ${k} (Angstrom or with a unit), or a file`,
      );
  }
  const centerAngstrom = wavelength(raw.center!, file, `${path}.center`);
  const fwhmAngstrom = wavelength(raw.fwhm!, file, `${path}.fwhm`);
  const half = (raw.profile === 'gaussian' ? 3 : 0.5) * fwhmAngstrom;
  if (!(centerAngstrom - half > 0)) {
    throw inputError(
      'out_of_range',
      file,
      `${path}.fwhm`,
      `reaches below 0 Angstrom (the band is integrated over center +- ${raw.profile === 'gaussian' ? '3 fwhm' : 'fwhm/2'})`,
      'give a narrower band',
    );
  }
  return { profile: raw.profile ?? 'tophat', centerAngstrom, fwhmAngstrom };
}

/** system / vega_to_ab at `path`: undefined for AB (the default). */
function readSystem(
  raw: { system?: 'ab' | 'vega'; vega_to_ab?: number },
  path: string,
  file: string,
  what: string,
): MagnitudeSystemGiven | undefined {
  if (raw.system !== 'vega') {
    if (raw.vega_to_ab !== undefined) {
      throw inputError(
        'conflict',
        file,
        `${path}.vega_to_ab`,
        `is given but ${path}.system is ${raw.system ?? 'ab (the default)'}`,
        `set ${path}.system: vega, or remove vega_to_ab`,
      );
    }
    return undefined;
  }
  if (raw.vega_to_ab === undefined) {
    throw inputError(
      'missing_key',
      file,
      `${path}.vega_to_ab`,
      `is missing, but ${what} is in Vega magnitudes`,
      'give m_AB - m_Vega in the band, e.g. vega_to_ab: 0.2',
    );
  }
  const o = raw.vega_to_ab;
  if (!(Math.abs(o) <= MAX_VEGA_TO_AB)) {
    throw inputError(
      'out_of_range',
      file,
      `${path}.vega_to_ab`,
      `is ${fmt(o)} mag, beyond the ${MAX_VEGA_TO_AB} mag any band's offset stays within`,
      'give m_AB - m_Vega in the band, in magnitudes',
    );
  }
  return { system: 'vega', vegaToAb: o };
}

/** What the magnitude kind's photometry keys give the detection. */
export interface DetectionPhotometry {
  bandAngstrom: number;
  /** detection.band given as a frequency, Hz. */
  bandGivenHz?: number;
  bandTable?: Filter['table'];
  sed?: SedPhotometry;
  /** The band's shape: detection.sed's band, or (without it) the band a population's own sed needs. */
  spectrumBand?: Filter;
  magnitudeSystem?: MagnitudeSystemGiven;
  /** Added to every magnitude the detection gives (limit, completeness) to make it AB. */
  toAb: number;
}

/**
 * The band, spectrum and magnitude system of a magnitude detection. `populationSed` names the first
 * population giving its own sed (e.g. "populations[1].sed"): without detection.sed the band must
 * then be a shape ({center, fwhm, profile} or band_file), which its synthetic photometry needs.
 */
export function readDetectionPhotometry(
  det: RawPhotometryDetection,
  file: string,
  base: string,
  inputs: InputFile[],
  populationSed?: string,
): DetectionPhotometry {
  const magnitudeSystem = readSystem(det, 'detection', file, 'the limit');
  const toAb = magnitudeSystem?.vegaToAb ?? 0;
  const bandObject = typeof det.band === 'object' ? det.band : undefined;
  if (bandObject && det.band_file !== undefined) {
    throw inputError(
      'conflict',
      file,
      'detection.band_file',
      'is given together with a band {center, fwhm}',
      'keep one of them',
    );
  }
  if (bandObject?.file !== undefined) {
    throw inputError(
      'conflict',
      file,
      'detection.band.file',
      'a band file is given as detection.band_file',
      'move the file to detection.band_file',
    );
  }
  const bandTable =
    det.band_file !== undefined
      ? readTransmissionFile(det.band_file, file, 'detection.band_file', base, (input) => inputs.push(input))
      : undefined;
  if (det.sed === undefined) {
    if (bandObject && populationSed === undefined) {
      throw inputError(
        'wrong_type',
        file,
        'detection.band',
        "is a band {center, fwhm}, which only a spectrum (detection.sed, or a population's sed) uses",
        'give the effective wavelength of the band, or add detection.sed',
      );
    }
    if (det.band === undefined && !bandTable) {
      throw inputError(
        'missing_key',
        file,
        'detection.band',
        'is missing',
        'give the effective wavelength of the band (Angstrom or with a unit), or a band_file',
      );
    }
    if (populationSed !== undefined) {
      // a population's own spectrum integrates through the band: its shape, as detection.sed needs
      if (!bandTable && !bandObject) {
        throw inputError(
          'wrong_type',
          file,
          'detection.band',
          `is the wavelength "${excerpt(typeof det.band === 'object' ? '' : String(det.band))}", but the synthetic photometry of ${populationSed} needs the band's shape`,
          'give band: {center, fwhm, profile: tophat | gaussian}, or a band_file',
        );
      }
      const shape: Filter = bandTable
        ? {
            profile: 'table',
            centerAngstrom: tableMeanWavelength(bandTable),
            fwhmAngstrom: tableFwhm(bandTable),
            table: bandTable,
          }
        : readBand(bandObject!, 'detection.band', file, base, inputs);
      const out: DetectionPhotometry = { bandAngstrom: shape.centerAngstrom, spectrumBand: shape, toAb };
      if (bandTable) out.bandTable = bandTable;
      if (magnitudeSystem) out.magnitudeSystem = magnitudeSystem;
      return out;
    }
    const band =
      det.band !== undefined
        ? wavelengthOrFrequency(det.band as Q, file, 'detection.band', 'the effective wavelength of the band')
        : undefined;
    const out: DetectionPhotometry = { bandAngstrom: band ? band.angstrom : tableMeanWavelength(bandTable!), toAb };
    if (band?.hz !== undefined) out.bandGivenHz = band.hz;
    if (bandTable) out.bandTable = bandTable;
    if (magnitudeSystem) out.magnitudeSystem = magnitudeSystem;
    return out;
  }
  if (det.beta !== undefined) {
    throw inputError(
      'conflict',
      file,
      'detection.beta',
      'is the power-law colour term, which the spectrum detection.sed replaces',
      'remove beta, or remove sed',
    );
  }
  if (det.sed.file === undefined)
    throw inputError(
      'missing_key',
      file,
      'detection.sed.file',
      'is missing',
      'give the CSV of rest-frame wavelength (Angstrom), f_lambda',
    );
  let band: Filter;
  if (bandTable)
    band = {
      profile: 'table',
      centerAngstrom: tableMeanWavelength(bandTable),
      fwhmAngstrom: tableFwhm(bandTable),
      table: bandTable,
    };
  else if (bandObject) band = readBand(bandObject, 'detection.band', file, base, inputs);
  else {
    throw inputError(
      det.band === undefined ? 'missing_key' : 'wrong_type',
      file,
      'detection.band',
      det.band === undefined
        ? 'is missing'
        : `is the wavelength "${excerpt(typeof det.band === 'object' ? '' : String(det.band))}", but synthetic photometry needs the band's shape`,
      'give band: {center, fwhm, profile: tophat | gaussian}, or a band_file',
    );
  }
  const spectrum = readSpectrumFile(det.sed.file, file, 'detection.sed.file', base, (input) => inputs.push(input));
  const out: DetectionPhotometry = {
    bandAngstrom: band.centerAngstrom,
    sed: { spectrum, band, surveyFile: file },
    spectrumBand: band,
    toAb,
  };
  if (bandTable) out.bandTable = bandTable;
  if (magnitudeSystem) out.magnitudeSystem = magnitudeSystem;
  return out;
}

/** What a population's photometry keys give it. */
export interface PopulationPhotometry {
  restWavelengthAngstrom: number;
  restBand?: Filter;
  magnitudeSystem?: MagnitudeSystemGiven;
  /** Added to m_star to make it AB. */
  toAb: number;
  /** The population's own spectral slope (its beta key), replacing detection.beta for it. */
  beta?: number;
  /** The population's own spectrum (its sed key), replacing detection.sed or the power law for it. */
  sed?: SedPhotometry;
}

/**
 * A population's own rest-frame spectrum (sed: {file}): only for a magnitude survey, not beside the
 * population's own beta, through the band's shape (`band`, which the detection read as the
 * population asked: absent only when the detection is of another kind).
 */
function populationSed(
  p: RawPhotometryPopulation,
  path: string,
  kind: string,
  band: Filter | undefined,
  file: string,
  base: string,
  inputs: InputFile[],
): SedPhotometry {
  if (kind !== 'magnitude') {
    throw inputError(
      'kind_mismatch',
      file,
      `${path}.sed`,
      `is the rest-frame spectrum of a magnitude survey's k-correction, but detection.kind is ${kind}, which has none`,
      'remove it',
    );
  }
  if (p.beta !== undefined) {
    throw inputError(
      'conflict',
      file,
      `${path}.beta`,
      "is a power-law colour term, which the population's own spectrum (sed) replaces",
      'keep one of them: beta or sed',
    );
  }
  if (p.sed!.file === undefined)
    throw inputError(
      'missing_key',
      file,
      `${path}.sed.file`,
      'is missing',
      'give the CSV of rest-frame wavelength (Angstrom), f_lambda',
    );
  if (!band) {
    throw inputError(
      'wrong_type',
      file,
      'detection.band',
      `is not a band's shape, which the synthetic photometry of ${path}.sed needs`,
      'give band: {center, fwhm, profile: tophat | gaussian}, or a band_file',
    );
  }
  const spectrum = readSpectrumFile(p.sed!.file, file, `${path}.sed.file`, base, (input) => inputs.push(input));
  return { spectrum, band, surveyFile: file, key: `${path}.sed` };
}

/**
 * A population's own spectral slope beta (f_lambda ~ lambda^beta): only for a magnitude survey's
 * power-law k-correction (a line_flux or threshold survey has none, and detection.sed replaces it),
 * in detection.beta's range.
 */
function populationBeta(
  beta: number,
  path: string,
  kind: string,
  sed: SedPhotometry | undefined,
  file: string,
): number {
  if (kind !== 'magnitude') {
    throw inputError(
      'kind_mismatch',
      file,
      `${path}.beta`,
      `is the spectral slope of a magnitude survey's k-correction, but detection.kind is ${kind}, which has none`,
      'remove it',
    );
  }
  if (sed) {
    throw inputError(
      'conflict',
      file,
      `${path}.beta`,
      'is a power-law colour term, which the spectrum detection.sed replaces',
      "remove the population's beta, or remove detection.sed",
    );
  }
  if (!inRange(beta, RANGES.beta)) {
    throw inputError(
      'out_of_range',
      file,
      `${path}.beta`,
      `is ${fmt(beta)}, outside its physical range (${describeRange(RANGES.beta)})`,
      'give a value in that range',
    );
  }
  return beta;
}

/** Default rest wavelength of absolute magnitudes, Angstrom. */
export const DEFAULT_REST_WAVELENGTH = 1500;

/**
 * A population's rest frame and magnitude system. `kind` is the detection kind; `detectionSed` the
 * detection's spectrum, `spectrumBand` the band's shape (for the population's own sed). The
 * spectrum in use (its own, else the detection's) is checked to cover the band over `window` and
 * the rest frame.
 */
export function readPopulationPhotometry(
  p: RawPhotometryPopulation,
  path: string,
  kind: string,
  detectionSed: SedPhotometry | undefined,
  window: { min: number; max: number },
  file: string,
  base: string,
  inputs: InputFile[],
  spectrumBand?: Filter,
): PopulationPhotometry {
  for (const k of ['rest_band', 'system', 'vega_to_ab'] as const) {
    if (p[k] !== undefined && kind !== 'magnitude') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.${k}`,
        `${k} applies to the magnitude kind only, not ${kind}`,
        'remove it',
      );
    }
  }
  const magnitudeSystem = readSystem(p, path, file, 'm_star');
  const out: PopulationPhotometry = {
    restWavelengthAngstrom: DEFAULT_REST_WAVELENGTH,
    toAb: magnitudeSystem?.vegaToAb ?? 0,
  };
  if (magnitudeSystem) out.magnitudeSystem = magnitudeSystem;
  // its own spectrum wins over detection.sed; with it, no beta of its own
  if (p.sed !== undefined) out.sed = populationSed(p, path, kind, spectrumBand, file, base, inputs);
  if (p.beta !== undefined) out.beta = populationBeta(p.beta, path, kind, detectionSed, file);
  const sed = out.sed ?? detectionSed;
  if (p.rest_band !== undefined) {
    if (p.rest_wavelength !== undefined) {
      throw inputError(
        'conflict',
        file,
        `${path}.rest_band`,
        'is given together with rest_wavelength',
        'keep one: a rest band, or one rest wavelength',
      );
    }
    if (!sed) {
      throw inputError(
        'conflict',
        file,
        `${path}.rest_band`,
        "needs a spectrum to integrate over the band, but neither detection.sed nor the population's sed is given",
        "add detection.sed or the population's sed, or give rest_wavelength instead",
      );
    }
    out.restBand = readBand(p.rest_band, `${path}.rest_band`, file, base, inputs);
    out.restWavelengthAngstrom = out.restBand.centerAngstrom;
  } else if (p.rest_wavelength !== undefined) {
    out.restWavelengthAngstrom = wavelengthOrFrequency(
      p.rest_wavelength,
      file,
      `${path}.rest_wavelength`,
      'the rest wavelength of the absolute magnitudes',
      REST_WAVELENGTH_EXAMPLE,
    ).angstrom;
  }
  if (sed) {
    const rest: RestFrame = out.restBand
      ? { kind: 'band', band: out.restBand }
      : { kind: 'wavelength', angstrom: out.restWavelengthAngstrom };
    checkSpectrumCoverage(sed, rest, window.min, window.max);
    const w = sed.spectrum.wavelengthAngstrom;
    const f = sed.spectrum.fLambda;
    const key = out.restBand
      ? `${path}.rest_band`
      : p.rest_wavelength !== undefined
        ? `${path}.rest_wavelength`
        : (sed.key ?? 'detection.sed');
    // f_lambda must be above 0 at the rest wavelength (somewhere in the rest band), else no absolute magnitude is defined.
    let lit = false;
    if (out.restBand) {
      const [a, b] = bandSupport(out.restBand);
      for (let i = 0; i + 1 < w.length && !lit; i++)
        if (!(w[i + 1]! < a || w[i]! > b)) lit = f[i]! > 0 || f[i + 1]! > 0;
    } else {
      const l = out.restWavelengthAngstrom;
      const i = Math.max(0, Math.min(w.length - 2, w.findIndex((x) => x > l) - 1));
      lit = f[i]! + ((l - w[i]!) / (w[i + 1]! - w[i]!)) * (f[i + 1]! - f[i]!) > 0;
    }
    if (!lit) {
      throw inputError(
        'out_of_range',
        file,
        key,
        `falls where the spectrum "${excerpt(sed.spectrum.file)}" has f_lambda 0, so no absolute magnitude is defined there`,
        'give a rest frame where the spectrum has flux',
      );
    }
  }
  return out;
}
