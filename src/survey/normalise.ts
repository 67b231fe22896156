/**
 * From parsed survey data (plain JavaScript values, as YAML gives them) to the normalised
 * `Survey` of plain numbers in documented units (src/model/).
 *
 * Order: plain-data check, JSON Schema (specs/survey.schema.json), then the rules that tie keys
 * together (docs/survey-file.md), each failing with one SurveyError (code, file, key path, fix).
 */
import { excerpt, inputError } from '../errors.js';
import { compact } from '../render/format.js';
import { resolveCosmology } from '../cosmology/parameters.js';
import type { Completeness, Detection, DetectionKind, Filter, FilterProfile, IgmModel } from '../model/detection.js';
import type { InputFile, Survey } from '../model/survey.js';
import type { Population, SfrConversion, PopulationVariable } from '../model/population.js';
import type { BiasSource, ZParam } from '../model/zparam.js';
import { schemaError } from './schema.js';
import { lineNameHint } from './line-names.js';
import {
  isPlainNumberString,
  lineFluxOfVelocityFlux,
  parseQuantity,
  parseQuantityOneOf,
  plainNumberText,
} from './units.js';
import { FULL_SKY_DEG2, MIN_AREA_DEG2, SR_PER_DEG2 } from '../model/sky.js';
import { checkParam, fmt, growthBiasParam, makeZParam, mapParam, paramExtremes, type ZTable } from './zparam.js';
import { readTransmissionFile } from './transmission-file.js';
import { parseModelUncertainty } from './model-uncertainty.js';
import type { ModelParameter } from '../model/model-uncertainty.js';
import { photoZTrueRange, readPhotoZ, type RawPhotoZ } from './photo-z.js';
import {
  fluxDensityMagnitude,
  isFluxDensityText,
  readDetectionPhotometry,
  readPopulationPhotometry,
  REST_WAVELENGTH_EXAMPLE,
  wavelengthOrFrequency,
  type RawBand,
} from './photometry.js';
import {
  readDetectionSelection,
  readPopulationSelection,
  type RawDetectionSelection,
  type RawPopulationSelection,
} from './selection-keys.js';
import { filterRedshiftWindow, tableFwhm, tableMeanWavelength } from '../selection/filter.js';
import type { BlendedLine } from '../model/selection.js';
import { dirname } from 'node:path';
import { CAPS, MAX_REDSHIFT, MIN_SLICE_WIDTH, RANGES, describeRange, inRange, type Range } from '../model/limits.js';

type Q = number | string;
type ZRaw = number | string | ZTable;
/** A population's bias as the file writes it: "auto", a parameter in z, or {over_growth: B}. */
type BiasRaw = ZRaw | { over_growth: number };

interface RawPopulation extends RawPopulationSelection {
  name?: string;
  shape?: 'schechter' | 'double_schechter';
  variable: PopulationVariable;
  quantity?: string;
  phi_star?: ZRaw;
  log10_phi_star?: ZRaw;
  phi_star_dex?: ZRaw;
  log10_phi_star_dex?: ZRaw;
  l_star?: ZRaw;
  log10_l_star?: ZRaw;
  m_star?: ZRaw;
  alpha?: ZRaw;
  alpha_1?: ZRaw;
  alpha_2?: ZRaw;
  [normalisation: `${string}phi_star${string}`]: ZRaw | undefined;
  sfr_conversion?: 'halpha' | 'oii' | 'uv' | number;
  line?: Q;
  rest_wavelength?: Q;
  rest_band?: RawBand;
  sed?: { file?: string };
  system?: 'ab' | 'vega';
  vega_to_ab?: number;
  bias?: BiasRaw;
  occupation?: number;
  model_uncertainty?: unknown;
}

interface RawSurvey {
  format?: 1;
  title?: string;
  cosmology: {
    preset?: string;
    h0?: number;
    omega_m?: number;
    t_cmb?: number;
    omega_b?: number;
    sigma8?: number;
    n_s?: number;
  };
  area: Q;
  redshift?: { min: number; max: number };
  field?: { aspect?: number; count?: number };
  detection: RawDetectionSelection & {
    kind: DetectionKind;
    limit: number | string | ZTable;
    line?: Q;
    band?: Q | RawBand;
    beta?: number;
    igm?: IgmModel;
    band_file?: string;
    sed?: { file?: string };
    system?: 'ab' | 'vega';
    vega_to_ab?: number;
    filter?: { center?: Q; fwhm?: Q; profile?: FilterProfile; file?: string };
    completeness?: { model?: 'logistic' | 'table'; half?: Q; width?: number; table?: [number, number][] };
    photo_z?: RawPhotoZ;
  };
  population?: RawPopulation;
  populations?: RawPopulation[];
  slices?: { count?: number; width?: number; edges?: number[] };
  histogram?: { width?: number };
  exposure?: Q;
  plan?: Record<string, unknown>;
}

/** Most slices a survey may ask for. */
export const MAX_SLICES = CAPS.slices;
/** A remainder of the window shorter than this (the narrowest slice) is not made into a slice of its own. */
export const SLICE_REMAINDER = MIN_SLICE_WIDTH;
/** Default population name. */
export const DEFAULT_POPULATION_NAME = 'population';

const DETECTION_KEYS: Record<DetectionKind, string[]> = {
  line_flux: ['kind', 'limit', 'line', 'filter', 'completeness', 'redshift_selection', 'equivalent_width_cut'],
  magnitude: [
    'kind',
    'limit',
    'band',
    'band_file',
    'beta',
    'igm',
    'sed',
    'system',
    'vega_to_ab',
    'completeness',
    'redshift_selection',
    'photo_z',
  ],
  threshold: ['kind', 'limit', 'completeness', 'redshift_selection', 'photo_z'],
};

type Window = { min: number; max: number };

function isPlainObject(v: unknown): v is Record<string, unknown> {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) return false;
  const proto = Object.getPrototypeOf(v) as unknown;
  return proto === Object.prototype || proto === null;
}

/** Reject anything YAML can produce that is not plain data, and numbers that are not finite. */
function checkPlain(v: unknown, file: string, path: string): void {
  if (typeof v === 'string' && v.length > CAPS.textLength) {
    throw inputError(
      'too_large',
      file,
      path,
      `is a text of ${v.length} characters, more than the ${CAPS.textLength} allowed`,
      'shorten it',
    );
  }
  if (v === null || typeof v === 'string' || typeof v === 'boolean') return;
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) {
      throw inputError(
        'not_finite',
        file,
        path,
        `is ${Number.isNaN(v) ? 'not a number (.nan)' : 'infinite'}`,
        'write an ordinary finite number',
      );
    }
    return;
  }
  if (Array.isArray(v)) {
    v.forEach((x, i) => checkPlain(x, file, `${path}[${i}]`));
    return;
  }
  if (isPlainObject(v)) {
    for (const [k, x] of Object.entries(v)) checkPlain(x, file, path ? `${path}.${k}` : k);
    return;
  }
  throw inputError(
    'wrong_type',
    file,
    path,
    'holds a value that is not plain text, a number, a list or a mapping',
    'write the value as plain YAML',
  );
}

function outOfRange(file: string, path: string, what: string, fix: string): never {
  throw inputError('out_of_range', file, path, what, fix);
}

/** Refuse a value outside its physical range (src/model/limits.ts), naming the key. */
function checkRange(v: number, range: Range, file: string, path: string, what = ''): number {
  if (!inRange(v, range)) {
    outOfRange(
      file,
      path,
      `${what ? what + ' ' : ''}is ${fmt(v)}${range.unit ? ` ${range.unit}` : ''}, outside its physical range (${describeRange(range)})`,
      'give a value in that range',
    );
  }
  return v;
}

/** A key that holds a plain number in its unit only (no unit string accepted beyond a bare number). */
function plainNumber(v: Q, file: string, path: string, what: string): number {
  if (typeof v === 'number') return v;
  if (isPlainNumberString(v)) return Number(plainNumberText(v));
  throw inputError(
    'bad_unit',
    file,
    path,
    `"${excerpt(v)}" is not a plain number`,
    `give ${what} as a number without a unit`,
  );
}

function positiveQuantity(
  v: Q,
  kind: 'area' | 'wavelength' | 'flux' | 'time',
  file: string,
  path: string,
  unit: string,
): number {
  const x = parseQuantity(v, kind, file, path);
  if (!(x > 0)) outOfRange(file, path, `is ${fmt(x)} ${unit}`, 'give a positive value');
  return x;
}

/** A wavelength (Angstrom, or with a unit) inside its physical range. */
function wavelength(v: Q, file: string, path: string): number {
  return checkRange(positiveQuantity(v, 'wavelength', file, path, 'Angstrom'), RANGES.wavelength, file, path);
}

/**
 * A line's rest wavelength (Angstrom, or with a unit), or its rest frequency with its unit
 * ("1420.405752 MHz" for HI 21 cm: lambda = c / nu, as a band's); a line written as a name
 * ("[OII]") is answered with the number to write.
 */
function lineWavelength(v: Q, file: string, path: string): number {
  const hint = typeof v === 'string' ? lineNameHint(v) : undefined;
  if (hint)
    throw inputError('bad_unit', file, path, hint.slice(0, hint.indexOf(': ')), hint.slice(hint.indexOf(': ') + 2));
  return wavelengthOrFrequency(v, file, path, "the line's rest wavelength", 6562.8).angstrom;
}

/** The line-flux keys' context for a velocity-integrated flux: the line it is converted at. */
interface LineFluxContext {
  /** detection.line in Angstrom, if given. */
  lineAngstrom: number | undefined;
  /** The rest wavelengths of every population's line (each its own, else detection.line). */
  lines: readonly (number | undefined)[];
}

/**
 * A line-flux key (detection.limit, completeness.half) as one flux in erg/s/cm^2: a number in
 * erg/s/cm^2, a flux with its unit ("5e-20 W/m^2"), or a velocity-integrated flux density
 * S = int S_nu dv with its unit ("0.7 Jy km/s"), converted once, here, at the rest frequency
 * nu = c / lambda of detection.line: F = S nu / c, i.e. v = c (1 - nu_obs / nu) (the radio
 * convention; lineFluxOfVelocityFlux). `jyKms` is the value as given (only then).
 */
function lineFlux(v: Q, context: LineFluxContext, file: string, path: string): { cgs: number; jyKms?: number } {
  const q = parseQuantityOneOf(
    v,
    ['flux', 'velocityFlux'],
    file,
    path,
    'write a line flux in erg/s/cm^2 as a number, or with a unit, e.g. 5e-17, "5e-17 erg/s/cm^2" or "5e-20 W/m^2"; a radio line\'s velocity-integrated flux as e.g. "0.7 Jy km/s"',
  );
  if (!(q.value > 0))
    outOfRange(
      file,
      path,
      `is ${fmt(q.value)} ${q.kind === 'flux' ? 'erg/s/cm^2' : 'Jy km/s'}`,
      'give a positive value',
    );
  if (q.kind === 'flux') return { cgs: checkRange(q.value, RANGES.lineFlux, file, path) };
  const line = context.lineAngstrom;
  const shown = typeof v === 'string' ? excerpt(v, 40) : String(v);
  if (line === undefined) {
    throw inputError(
      'missing_key',
      file,
      path,
      `"${shown}" is a velocity-integrated flux, converted to erg/s/cm^2 at the rest frequency of detection.line, which the file does not give`,
      'give detection.line (e.g. "1420.405752 MHz" for HI 21 cm), or the value in erg/s/cm^2',
    );
  }
  if (context.lines.some((l) => l !== line)) {
    throw inputError(
      'conflict',
      file,
      path,
      `"${shown}" is a velocity-integrated flux, converted at the rest frequency of detection.line, but a population counts another line, whose flux in Jy km/s is another line flux`,
      'give the value in erg/s/cm^2, or count one line',
    );
  }
  const cgs = lineFluxOfVelocityFlux(q.value, line);
  if (!inRange(cgs, RANGES.lineFlux)) {
    outOfRange(
      file,
      path,
      `"${shown}" is ${fmt(cgs)} erg/s/cm^2 at the line's rest frequency, outside its physical range (${describeRange(RANGES.lineFlux)})`,
      'give a velocity-integrated flux in that range',
    );
  }
  return { cgs, jyKms: q.value };
}

function intersect(a: Window, b: Window): Window {
  return { min: Math.max(a.min, b.min), max: Math.min(a.max, b.max) };
}

/**
 * Redshift window of a line seen through a filter: tophat center +- fwhm/2, gaussian center +- 1.5 fwhm,
 * table where the curve is above 0.
 */
export function filterWindow(filter: Filter, lineAngstrom: number): Window {
  const w = filterRedshiftWindow(filter, lineAngstrom);
  return { min: Math.max(0, w.min), max: w.max };
}

/** Slice edges over `w` from {count} | {width} | {edges}; the first and last edges are w's ends. */
export function sliceEdges(raw: RawSurvey['slices'], w: Window, file: string): number[] {
  const s = raw ?? { count: 10 };
  if (s.count !== undefined) {
    const n = s.count;
    if (!(n >= 1 && n <= MAX_SLICES)) {
      throw inputError('bad_slices', file, 'slices.count', `is ${n}`, `give a whole number from 1 to ${MAX_SLICES}`);
    }
    if ((w.max - w.min) / n < MIN_SLICE_WIDTH) {
      throw inputError(
        'bad_slices',
        file,
        'slices.count',
        `makes slices ${fmt((w.max - w.min) / n)} wide in redshift, narrower than ${MIN_SLICE_WIDTH}`,
        'ask for fewer slices',
      );
    }
    const edges: number[] = [w.min];
    for (let i = 1; i < n; i++) edges.push(w.min + ((w.max - w.min) * i) / n);
    edges.push(w.max);
    return edges;
  }
  if (s.width !== undefined) {
    const dz = s.width;
    if (!(dz >= MIN_SLICE_WIDTH))
      throw inputError(
        'bad_slices',
        file,
        'slices.width',
        `is ${fmt(dz)}`,
        `give a redshift width of at least ${MIN_SLICE_WIDTH} (e.g. 0.1)`,
      );
    const count = (w.max - w.min) / dz;
    if (count > MAX_SLICES) {
      throw inputError(
        'bad_slices',
        file,
        'slices.width',
        `makes ${Math.ceil(count)} slices, more than ${MAX_SLICES}`,
        'give a wider slice',
      );
    }
    const edges: number[] = [w.min];
    for (let k = 1; ; k++) {
      const e = w.min + k * dz;
      if (!(e < w.max - SLICE_REMAINDER)) break;
      edges.push(e);
    }
    edges.push(w.max);
    return edges;
  }
  const edges = [...(s.edges ?? [])];
  if (edges.length > MAX_SLICES + 1) {
    throw inputError(
      'bad_slices',
      file,
      'slices.edges',
      `lists ${edges.length} edges, more than the ${MAX_SLICES + 1} of ${MAX_SLICES} slices`,
      'give fewer edges',
    );
  }
  for (let i = 1; i < edges.length; i++) {
    if (!(edges[i]! > edges[i - 1]!)) {
      throw inputError(
        'bad_slices',
        file,
        `slices.edges[${i}]`,
        `${fmt(edges[i]!)} does not follow ${fmt(edges[i - 1]!)} upward`,
        'list the edges in increasing order without repeats',
      );
    }
    if (edges[i]! - edges[i - 1]! < MIN_SLICE_WIDTH) {
      throw inputError(
        'bad_slices',
        file,
        `slices.edges[${i}]`,
        `${fmt(edges[i]!)} lies less than ${MIN_SLICE_WIDTH} above ${fmt(edges[i - 1]!)}`,
        `make each slice at least ${MIN_SLICE_WIDTH} wide in redshift`,
      );
    }
  }
  const tol = 1e-9;
  edges.forEach((e, i) => {
    if (e < w.min - tol || e > w.max + tol) {
      throw inputError(
        'bad_slices',
        file,
        `slices.edges[${i}]`,
        `${fmt(e)} lies outside the redshift window ${fmt(w.min)} to ${fmt(w.max)}`,
        'give edges inside the window',
      );
    }
  });
  edges[0] = Math.max(edges[0]!, w.min);
  edges[edges.length - 1] = Math.min(edges[edges.length - 1]!, w.max);
  return edges;
}

/** The range of the observed (limit) variable of a detection kind. */
function observedRange(kind: DetectionKind, variable: PopulationVariable): Range {
  if (kind === 'line_flux') return RANGES.lineFlux;
  if (kind === 'magnitude') return RANGES.apparentMagnitude;
  return variable === 'magnitude' ? RANGES.absoluteMagnitude : RANGES.log10Quantity;
}

function parseCompleteness(
  raw: NonNullable<RawSurvey['detection']['completeness']>,
  kind: DetectionKind,
  variable: PopulationVariable,
  lineContext: LineFluxContext,
  file: string,
): Completeness {
  const p = 'detection.completeness';
  const model = raw.model ?? (raw.table !== undefined ? 'table' : 'logistic');
  if (model === 'logistic') {
    if (raw.table !== undefined) {
      throw inputError(
        'conflict',
        file,
        `${p}.table`,
        'a table is given with model logistic',
        'remove the table, or remove half, width and model',
      );
    }
    if (raw.half === undefined)
      throw inputError('missing_key', file, `${p}.half`, 'is missing', 'give where the completeness is 0.5');
    if (raw.width === undefined)
      throw inputError('missing_key', file, `${p}.width`, 'is missing', 'give the width of the logistic fall-off');
    if (!(raw.width > 0)) outOfRange(file, `${p}.width`, `is ${fmt(raw.width)}`, 'give a positive width');
    checkRange(raw.width, RANGES.completenessWidth, file, `${p}.width`);
    const half =
      kind === 'line_flux'
        ? -Math.log10(lineFlux(raw.half, lineContext, file, `${p}.half`).cgs)
        : kind === 'magnitude' && isFluxDensityText(raw.half)
          ? fluxDensityMagnitude(raw.half, file, `${p}.half`).abMag
          : checkRange(
              plainNumber(
                raw.half,
                file,
                `${p}.half`,
                kind === 'magnitude'
                  ? 'an AB magnitude (or a flux density with its unit)'
                  : 'a value of the population variable',
              ),
              observedRange(kind, variable),
              file,
              `${p}.half`,
            );
    return { model: 'logistic', half, width: raw.width };
  }
  for (const k of ['half', 'width'] as const) {
    if (raw[k] !== undefined) {
      throw inputError(
        'conflict',
        file,
        `${p}.${k}`,
        `${k} belongs to the logistic model but a table is used`,
        `remove ${k}`,
      );
    }
  }
  const rows = raw.table;
  if (rows === undefined) throw inputError('missing_key', file, `${p}.table`, 'is missing', 'give rows [x, fraction]');
  if (rows.length > CAPS.tableRows) {
    throw inputError(
      'too_large',
      file,
      `${p}.table`,
      `has ${rows.length} rows, more than the ${CAPS.tableRows} a table may have`,
      'resample it to fewer rows',
    );
  }
  let x = rows.map((r) => r[0]);
  let fraction = rows.map((r) => r[1]);
  for (let i = 0; i < rows.length; i++) {
    const f = fraction[i]!;
    if (!(f >= 0 && f <= 1))
      outOfRange(file, `${p}.table[${i}]`, `the fraction ${fmt(f)} is outside 0 to 1`, 'give fractions from 0 to 1');
    if (kind === 'line_flux' && !(x[i]! > 0)) {
      outOfRange(
        file,
        `${p}.table[${i}]`,
        `the flux ${fmt(x[i]!)} is not positive`,
        'give line fluxes in erg/s/cm^2 above 0',
      );
    }
    checkRange(x[i]!, observedRange(kind, variable), file, `${p}.table[${i}]`, 'x');
    if (i > 0 && !(x[i]! > x[i - 1]!)) {
      throw inputError(
        'bad_table',
        file,
        `${p}.table[${i}]`,
        `${fmt(x[i]!)} does not follow ${fmt(x[i - 1]!)} upward`,
        'list the rows in increasing x without repeats',
      );
    }
  }
  if (kind === 'line_flux') {
    // Stored in x = -log10(flux), ascending: reverse the (ascending-flux) rows.
    x = x.map((f) => -Math.log10(f)).reverse();
    fraction = fraction.reverse();
  }
  return { model: 'table', x, fraction };
}

/** The four ways to give a normalisation; suffix '' (single shape), '_1' or '_2' (double shape). */
function normalisationKeys(suffix: string): string[] {
  return [`phi_star${suffix}`, `log10_phi_star${suffix}`, `phi_star${suffix}_dex`, `log10_phi_star${suffix}_dex`];
}
const SINGLE_KEYS = [...normalisationKeys(''), 'alpha'];
const DOUBLE_KEYS = [...normalisationKeys('_1'), ...normalisationKeys('_2'), 'alpha_1', 'alpha_2'];

/**
 * Keys of the other shape are a kind_mismatch, said before the schema would call the shape's own
 * keys missing.
 */
function checkShapeKeys(obj: Record<string, unknown>, file: string): void {
  const pops: [unknown, string][] = [];
  if (isPlainObject(obj.population)) pops.push([obj.population, 'population']);
  if (Array.isArray(obj.populations)) obj.populations.forEach((p, i) => pops.push([p, `populations[${i}]`]));
  for (const [p, path] of pops) {
    if (!isPlainObject(p)) continue;
    const double = p.shape === 'double_schechter';
    const wrong = (double ? SINGLE_KEYS : DOUBLE_KEYS).find((k) => p[k] !== undefined);
    if (wrong === undefined) continue;
    throw double
      ? inputError(
          'kind_mismatch',
          file,
          `${path}.${wrong}`,
          `${wrong} belongs to the single Schechter shape but shape is double_schechter`,
          'give phi_star_1, alpha_1, phi_star_2 and alpha_2 instead (or their log10_ and _dex forms)',
        )
      : inputError(
          'kind_mismatch',
          file,
          `${path}.${wrong}`,
          `${wrong} belongs to the double Schechter shape`,
          'set shape: double_schechter, or give phi_star and alpha',
        );
  }
}

/** One normalisation: the key given (exactly one of the four forms) and its value in Mpc^-3. */
function parseNormalisation(
  raw: RawPopulation,
  suffix: string,
  path: string,
  file: string,
): { phiStar: ZParam; phiKey: string } {
  const keys = normalisationKeys(suffix);
  const given = keys.filter((k) => raw[k as `phi_star`] !== undefined);
  if (given.length === 0) {
    throw inputError('missing_key', file, `${path}.${keys[0]}`, 'is missing', `give one of ${keys.join(', ')}`);
  }
  if (given.length > 1) {
    throw inputError(
      'conflict',
      file,
      `${path}.${given[1]}`,
      `${given.join(' and ')} are both given`,
      'keep only one normalisation',
    );
  }
  const phiKey = given[0]!;
  const base = makeZParam(raw[phiKey as 'phi_star']!, file, `${path}.${phiKey}`);
  const isLog = phiKey.startsWith('log10_');
  const isDex = phiKey.endsWith('_dex');
  const phiStar = !isLog && !isDex ? base : mapParam(base, (v) => (isLog ? 10 ** v : v) / (isDex ? Math.LN10 : 1));
  return { phiStar, phiKey };
}

interface ParsedComponent {
  phiStar: ZParam;
  phiKey: string;
  alpha: ZParam;
  alphaKey: string;
}

/** Build the population's parameters; windows and values are checked by the caller. */
function parsePopulationParams(
  raw: RawPopulation,
  path: string,
  file: string,
): { components: ParsedComponent[]; lStar?: ZParam; lKey?: 'l_star' | 'log10_l_star'; mStar?: ZParam } {
  const suffixes = raw.shape === 'double_schechter' ? ['_1', '_2'] : [''];
  const components = suffixes.map((sfx) => {
    const alphaKey = `alpha${sfx}` as 'alpha' | 'alpha_1' | 'alpha_2';
    const a = raw[alphaKey];
    if (a === undefined)
      throw inputError('missing_key', file, `${path}.${alphaKey}`, 'is missing', 'give the faint-end slope');
    return { ...parseNormalisation(raw, sfx, path, file), alpha: makeZParam(a, file, `${path}.${alphaKey}`), alphaKey };
  });
  if (raw.variable === 'luminosity') {
    if (raw.m_star !== undefined) {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.m_star`,
        'm_star belongs to the magnitude variable but variable is luminosity',
        'give l_star or log10_l_star instead',
      );
    }
    if (raw.l_star !== undefined && raw.log10_l_star !== undefined) {
      throw inputError(
        'conflict',
        file,
        `${path}.log10_l_star`,
        'l_star and log10_l_star are both given',
        'keep only one',
      );
    }
    if (raw.l_star === undefined && raw.log10_l_star === undefined) {
      throw inputError('missing_key', file, `${path}.l_star`, 'is missing', 'give l_star or log10_l_star');
    }
    const lKey = raw.l_star !== undefined ? 'l_star' : 'log10_l_star';
    const given = raw.log10_l_star;
    if (typeof given === 'number' && !(given >= -30 && given <= 60)) {
      // L* from 1e-30 to 1e60 (the physical range) is a log10 from -30 to 60: a larger number is
      // a linear L* under the log10 key (10^4.57e42 would read as infinite). The codes are those
      // the check of L* itself gave: not_finite where 10^value overflows, out_of_range otherwise.
      throw inputError(
        Number.isFinite(10 ** given) ? 'out_of_range' : 'not_finite',
        file,
        `${path}.log10_l_star`,
        `is ${compact(given)}, not a log10 of L* (from -30 to 60)`,
        given >= 1e3
          ? `it looks like a linear value: write l_star: ${compact(given)} (or log10_l_star: ${compact(Math.log10(given))})`
          : 'give log10 of L* in erg/s (or of the quantity), e.g. 42.3',
      );
    }
    const l = makeZParam((raw.l_star ?? raw.log10_l_star)!, file, `${path}.${lKey}`);
    return { components, lStar: lKey === 'l_star' ? l : mapParam(l, (v) => 10 ** v), lKey };
  }
  for (const k of ['l_star', 'log10_l_star'] as const) {
    if (raw[k] !== undefined) {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.${k}`,
        `${k} belongs to the luminosity variable but variable is magnitude`,
        // a far-infrared or radio function is often quoted in L: say how to turn it into M*
        'give m_star instead, the absolute AB magnitude of L*: from its luminosity density L_nu at the rest wavelength, M* = -2.5 log10(L_nu / 4.3445e20 erg s^-1 Hz^-1)',
      );
    }
  }
  if (raw.m_star === undefined)
    throw inputError(
      'missing_key',
      file,
      `${path}.m_star`,
      'is missing',
      'give m_star, the characteristic absolute AB magnitude',
    );
  return { components, mStar: makeZParam(raw.m_star, file, `${path}.m_star`) };
}

/** The survey's mapping once it has passed the plain-data check and the schema. */
function checkedRaw(obj: unknown, file: string): RawSurvey {
  if (!isPlainObject(obj)) {
    throw inputError(
      'wrong_type',
      file,
      '',
      'does not hold a mapping of survey keys',
      'start from one of the sample surveys',
    );
  }
  checkPlain(obj, file, '');
  checkShapeKeys(obj, file);
  const invalid = schemaError(obj, file);
  if (invalid) throw invalid;
  return obj as unknown as RawSurvey;
}

/** The area in deg^2: positive, at least the smallest field, at most the whole sky. */
function readArea(raw: RawSurvey, file: string): number {
  const areaDeg2 = parseQuantity(raw.area, 'area', file, 'area');
  if (!(areaDeg2 > 0)) outOfRange(file, 'area', `is ${fmt(areaDeg2)} deg^2`, 'give a positive area');
  if (areaDeg2 < MIN_AREA_DEG2)
    outOfRange(
      file,
      'area',
      `is ${fmt(areaDeg2)} deg^2, less than the ${MIN_AREA_DEG2} deg^2 (${fmt(MIN_AREA_DEG2 * 3600)} arcmin^2) of the smallest field`,
      'give a larger area',
    );
  if (areaDeg2 > FULL_SKY_DEG2 * (1 + 1e-12)) {
    outOfRange(
      file,
      'area',
      `is ${fmt(areaDeg2)} deg^2, more than the whole sky (${fmt(FULL_SKY_DEG2)} deg^2)`,
      'give at most the full sky',
    );
  }
  return areaDeg2;
}

/** How the area is split into fields (their aspect ratio and number). */
function readField(raw: RawSurvey, file: string): Survey['field'] {
  const field = { aspect: raw.field?.aspect ?? 1, count: raw.field?.count ?? 1 };
  if (!(field.aspect > 0))
    outOfRange(file, 'field.aspect', `is ${fmt(field.aspect)}`, 'give a positive aspect ratio (1 for a square field)');
  if (!(field.count >= 1)) outOfRange(file, 'field.count', `is ${field.count}`, 'give at least 1 field');
  checkRange(field.aspect, RANGES.fieldAspect, file, 'field.aspect');
  checkRange(field.count, RANGES.fieldCount, file, 'field.count');
  return field;
}

/** The exposure time of the whole survey, hours, when given. */
function readExposure(raw: RawSurvey, file: string): number | undefined {
  if (raw.exposure === undefined) return undefined;
  return checkRange(
    positiveQuantity(raw.exposure, 'time', file, 'exposure', 'h'),
    RANGES.exposureHours,
    file,
    'exposure',
  );
}

/** Detection keys that do not belong to the kind. */
function checkDetectionKeys(det: RawSurvey['detection'], file: string): void {
  const kind = det.kind;
  for (const k of Object.keys(det)) {
    if (!DETECTION_KEYS[kind].includes(k)) {
      throw inputError(
        'kind_mismatch',
        file,
        `detection.${k}`,
        `${k} does not apply to the ${kind} kind`,
        `remove it, or change detection.kind`,
      );
    }
  }
}

type RawPopulations = { raw: RawPopulation; path: string }[];

/** The populations as listed (`population:` or `populations:`), at most CAPS.populations. */
function populationList(raw: RawSurvey, file: string): RawPopulations {
  const rawPops: RawPopulations = raw.population
    ? [{ raw: raw.population, path: 'population' }]
    : (raw.populations ?? []).map((p, i) => ({ raw: p, path: `populations[${i}]` }));
  if (rawPops.length > CAPS.populations) {
    throw inputError(
      'too_large',
      file,
      'populations',
      `lists ${rawPops.length} populations, more than the ${CAPS.populations} a survey may have`,
      'split the survey into several files',
    );
  }
  return rawPops;
}

/**
 * Each population's variable against the detection kind, its name (unique), and its line's rest
 * wavelength (line_flux kind: its own line, or detection.line).
 */
function populationLines(
  rawPops: RawPopulations,
  det: RawSurvey['detection'],
  detLine: number | undefined,
  file: string,
): (number | undefined)[] {
  const kind = det.kind;
  const names = new Set<string>();
  const lines: (number | undefined)[] = [];
  rawPops.forEach(({ raw: p, path }, i) => {
    if (kind === 'line_flux' && p.variable !== 'luminosity') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.variable`,
        'a line_flux detection counts line luminosities but variable is magnitude',
        'set variable: luminosity, or use detection kind magnitude',
      );
    }
    if (kind === 'magnitude' && p.variable !== 'magnitude') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.variable`,
        'a magnitude detection counts absolute magnitudes but variable is luminosity',
        'set variable: magnitude, or use detection kind line_flux or threshold',
      );
    }
    if (p.line !== undefined && kind !== 'line_flux') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.line`,
        `line applies to the line_flux kind only, not ${kind}`,
        'remove it',
      );
    }
    const name = p.name ?? (rawPops.length === 1 ? DEFAULT_POPULATION_NAME : `${DEFAULT_POPULATION_NAME} ${i + 1}`);
    if (names.has(name))
      throw inputError(
        'conflict',
        file,
        `${path}.name`,
        `the name "${excerpt(name)}" is used by another population`,
        'give each population its own name',
      );
    names.add(name);
    let line: number | undefined;
    if (kind === 'line_flux') {
      line = p.line !== undefined ? lineWavelength(p.line, file, `${path}.line`) : detLine;
      if (line === undefined) {
        throw inputError(
          'missing_key',
          file,
          'detection.line',
          'is missing',
          `give the rest wavelength of the line (Angstrom or with a unit) as detection.line or ${path}.line`,
        );
      }
    }
    lines.push(line);
  });
  return lines;
}

/** The redshift key, when given: within 0 to MAX_REDSHIFT and at least MIN_SLICE_WIDTH wide. */
function readRedshift(raw: RawSurvey, file: string): Window | undefined {
  let given: Window | undefined;
  if (raw.redshift) {
    given = { min: raw.redshift.min, max: raw.redshift.max };
    if (!(given.min >= 0))
      throw inputError('bad_window', file, 'redshift.min', `is ${fmt(given.min)}`, 'give a redshift of 0 or more');
    if (!(given.max > given.min)) {
      throw inputError(
        'bad_window',
        file,
        'redshift.max',
        `is ${fmt(given.max)}, not above min (${fmt(given.min)})`,
        'give max larger than min',
      );
    }
    if (given.max > MAX_REDSHIFT) {
      throw inputError(
        'bad_window',
        file,
        'redshift.max',
        `is ${fmt(given.max)}, beyond z = ${MAX_REDSHIFT}, before galaxies formed`,
        `give a window within z = 0 to ${MAX_REDSHIFT}`,
      );
    }
    if (given.max - given.min < MIN_SLICE_WIDTH) {
      throw inputError(
        'bad_window',
        file,
        'redshift.max',
        `makes a window ${fmt(given.max - given.min)} wide in redshift, narrower than ${MIN_SLICE_WIDTH}`,
        `give a window at least ${MIN_SLICE_WIDTH} wide`,
      );
    }
  }
  return given;
}

/** The filter of a line_flux survey, when given: a profile with its centre and width, or a transmission table (read and recorded in `inputs`). */
function readFilter(det: RawSurvey['detection'], file: string, base: string, inputs: InputFile[]): Filter | undefined {
  let filter: Filter | undefined;
  if (det.filter) {
    const f = det.filter;
    if (f.profile === 'table' || f.file !== undefined) {
      if (f.profile !== undefined && f.profile !== 'table') {
        throw inputError(
          'conflict',
          file,
          'detection.filter.file',
          `a transmission file is given with profile ${f.profile}`,
          'set profile: table, or remove file',
        );
      }
      for (const k of ['center', 'fwhm'] as const) {
        if (f[k] !== undefined) {
          throw inputError(
            'conflict',
            file,
            `detection.filter.${k}`,
            `${k} is given with a tabulated profile, which sets its own`,
            `remove ${k}`,
          );
        }
      }
      if (f.file === undefined)
        throw inputError(
          'missing_key',
          file,
          'detection.filter.file',
          'is missing',
          'give the CSV of wavelength, transmission (path relative to the survey file)',
        );
      const table = readTransmissionFile(f.file, file, 'detection.filter.file', base, (input) => inputs.push(input));
      filter = { centerAngstrom: tableMeanWavelength(table), fwhmAngstrom: tableFwhm(table), profile: 'table', table };
    } else {
      for (const k of ['center', 'fwhm'] as const) {
        if (f[k] === undefined)
          throw inputError(
            'missing_key',
            file,
            `detection.filter.${k}`,
            'is missing',
            `give the filter's ${k} (Angstrom or with a unit), or profile: table with a file`,
          );
      }
      filter = {
        centerAngstrom: wavelength(f.center!, file, 'detection.filter.center'),
        fwhmAngstrom: wavelength(f.fwhm!, file, 'detection.filter.fwhm'),
        profile: f.profile ?? 'tophat',
      };
    }
  }
  return filter;
}

/**
 * A population's blended_lines (line_flux only, never with blend_ratio): each line's rest wavelength
 * read as detection.line is, and its flux ratio to the population's line, above 0 and at most 10.
 */
function readBlendedLines(p: RawPopulation, path: string, kind: string, file: string): BlendedLine[] | undefined {
  const raw = p.blended_lines;
  if (raw === undefined) return undefined;
  const key = `${path}.blended_lines`;
  if (kind !== 'line_flux')
    throw inputError(
      'kind_mismatch',
      file,
      key,
      `blended_lines applies to line searches (line_flux), not ${kind}`,
      'remove it',
    );
  if (p.blend_ratio !== undefined)
    throw inputError(
      'conflict',
      file,
      key,
      `and ${path}.blend_ratio both give the lines blended with the population's line`,
      'keep blended_lines (each line at its own wavelength and filter transmission) and remove blend_ratio, or the reverse',
    );
  return raw.map((b, k) => {
    const restAngstrom = lineWavelength(b.line, file, `${key}[${k}].line`);
    const ratio = b.ratio;
    if (!(ratio > 0) || !inRange(ratio, RANGES.blendRatio))
      throw inputError(
        'out_of_range',
        file,
        `${key}[${k}].ratio`,
        `is ${fmt(ratio)}, outside its range (above 0, at most ${RANGES.blendRatio.max})`,
        "give the line's flux relative to the population's line, or leave the line out",
      );
    return { restAngstrom, ratio };
  });
}

/**
 * Each population's whole window: the redshift key cut by where the filter sees its line, or with
 * blended lines at their own wavelengths where it sees any of them (a blend is found by its
 * blended flux even where the line itself has left the filter).
 */
function populationWindows(
  rawPops: RawPopulations,
  lines: (number | undefined)[],
  given: Window | undefined,
  filter: Filter | undefined,
  file: string,
  blends: (BlendedLine[] | undefined)[] = [],
): Window[] {
  if (!given && !filter) {
    throw inputError(
      'missing_key',
      file,
      'redshift',
      'is missing',
      'give redshift: {min, max}, or a detection.filter that sets the window',
    );
  }
  const windows: Window[] = rawPops.map((_, i) => {
    if (!filter) return given!;
    let w = filterWindow(filter, lines[i]!);
    for (const b of blends[i] ?? []) {
      const wb = filterWindow(filter, b.restAngstrom);
      w = { min: Math.min(w.min, wb.min), max: Math.max(w.max, wb.max) };
    }
    const cut = given ? intersect(w, given) : w;
    if (cut.max > MAX_REDSHIFT && cut.max > cut.min) {
      throw inputError(
        'bad_window',
        file,
        'detection.filter',
        `the filter sees the line at ${fmt(lines[i]!)} Angstrom up to z = ${fmt(cut.max)}, beyond z = ${MAX_REDSHIFT}, before galaxies formed`,
        'check the filter center and fwhm and the line, or give a redshift window to cut it',
      );
    }
    if (cut.max > cut.min && cut.max - cut.min < MIN_SLICE_WIDTH) {
      throw inputError(
        'bad_window',
        file,
        'detection.filter',
        `the filter sees the line at ${fmt(lines[i]!)} Angstrom over a redshift range only ${fmt(cut.max - cut.min)} wide, narrower than ${MIN_SLICE_WIDTH}`,
        'check the filter fwhm and the redshift window',
      );
    }
    if (!(cut.max > cut.min)) {
      const seen = w.max > w.min ? `z = ${fmt(w.min)} to ${fmt(w.max)}` : 'no redshift of 0 or more';
      throw inputError(
        'bad_window',
        file,
        'detection.filter',
        `the filter sees ${rawPops.length > 1 ? `${populationName(rawPops[i]!.raw, i, rawPops.length)}'s line` : 'the line'} at ${fmt(lines[i]!)} Angstrom at ${seen}${given ? `, which does not overlap redshift ${fmt(given.min)} to ${fmt(given.max)}` : ''}`,
        given && w.max > w.min && rawPops.length > 1
          ? // several lines through one filter: the redshift key cuts every population's window
            `every population must be seen inside the redshift window: widen redshift to reach z = ${fmt(w.min)} to ${fmt(w.max)}, leave redshift out (the filter sets each population's window), or remove that population`
          : filter.table &&
              !(w.max > w.min) &&
              filter.table.wavelengthAngstrom[filter.table.wavelengthAngstrom.length - 1]! < lines[i]!
            ? // a filter file in um or nm without its header, read in Angstrom, lies blueward of every line
              `check the filter file: its wavelengths, read as ${fmt(filter.table.wavelengthAngstrom[0]!)} to ${fmt(filter.table.wavelengthAngstrom[filter.table.wavelengthAngstrom.length - 1]!)} Angstrom, all lie blueward of the line; a table without a unit in its header is read in Angstrom: if its wavelengths are in um or nm, name the unit in a header line (wavelength_um, transmission or wavelength_nm, transmission)`
            : 'check the filter center and fwhm, the line and the redshift window',
      );
    }
    return cut;
  });
  return windows;
}

/**
 * The survey's slice edges (the first population's window, or the explicit edges) and each
 * population's own (the same rule over its own window, or the same edges).
 */
function readSlices(
  raw: RawSurvey,
  windows: Window[],
  file: string,
): { window: Window; edges: number[]; own: number[][] } {
  // Every population window together: explicit edges may lie anywhere inside it.
  const hull = hullOf(windows);
  // The survey's slices follow the first population's window (or the explicit edges); each
  // population's own result applies the same rule to its own window (or uses the same edges).
  let window: Window = windows[0]!;
  let sliceEdgesZ: number[];
  let ownEdges: number[][];
  if (raw.slices?.edges) {
    sliceEdgesZ = sliceEdges(raw.slices, hull, file);
    window = { min: sliceEdgesZ[0]!, max: sliceEdgesZ[sliceEdgesZ.length - 1]! };
    ownEdges = windows.map((w) => edgesInWindow(sliceEdgesZ, w));
  } else {
    sliceEdgesZ = sliceEdges(raw.slices, window, file);
    ownEdges = windows.map((w, i) => (i === 0 ? sliceEdgesZ : sliceEdges(raw.slices, w, file)));
  }
  const sliceResults =
    ownEdges.reduce((n, e) => n + (e.length - 1), 0) +
    (windows.length > 1 ? windows.length * (sliceEdgesZ.length - 1) : 0);
  if (sliceResults > CAPS.sliceResults) {
    throw inputError(
      'bad_slices',
      file,
      'slices',
      `asks for ${sliceResults} counts (each population over every slice), more than the ${CAPS.sliceResults} one survey may ask for`,
      'give fewer slices or fewer populations',
    );
  }
  return { window, edges: sliceEdgesZ, own: ownEdges };
}

/**
 * A population's own slices on the file's explicit edges: those edges cut at the ends of its
 * window, so that a slice the window covers only in part (several lines through one filter, the
 * edges spanning every window) is that part, with its own volume, limit and cosmic-variance box,
 * as a file holding the population alone would give (its edges must lie inside its window), and
 * slices wholly outside are left out. An inner edge within SLICE_REMAINDER of a cut end is dropped
 * (its sliver joins the next slice). A window wholly outside the edges keeps them all (it counts
 * 0 and is warned about: population_outside_slices).
 */
function edgesInWindow(edges: number[], w: Window): number[] {
  const lo = Math.max(edges[0]!, w.min);
  const hi = Math.min(edges[edges.length - 1]!, w.max);
  if (!(hi > lo)) return edges;
  if (lo === edges[0] && hi === edges[edges.length - 1]) return edges;
  const inner = edges.filter((e) => e > lo + SLICE_REMAINDER && e < hi - SLICE_REMAINDER);
  return [lo, ...inner, hi];
}

/** The smallest window holding every window. */
function hullOf(windows: Window[]): Window {
  return { min: Math.min(...windows.map((w) => w.min)), max: Math.max(...windows.map((w) => w.max)) };
}

/** The detection: the limit in its kind's unit, the band or filter, the completeness. */
function readDetection(
  det: RawSurvey['detection'],
  rawPops: RawPopulations,
  detLine: number | undefined,
  lines: readonly (number | undefined)[],
  filter: Filter | undefined,
  hull: Window,
  file: string,
  base: string,
  inputs: InputFile[],
): Detection {
  const kind = det.kind;
  let detection: Detection;
  const lineContext: LineFluxContext = { lineAngstrom: detLine, lines };
  const thresholdVariable: PopulationVariable = rawPops.every((p) => p.raw.variable === 'magnitude')
    ? 'magnitude'
    : 'luminosity';
  const completeness = det.completeness
    ? parseCompleteness(det.completeness, kind, thresholdVariable, lineContext, file)
    : undefined;
  let completenessAb = completeness;
  if (kind === 'line_flux') {
    if (typeof det.limit === 'object') {
      throw inputError(
        'wrong_type',
        file,
        'detection.limit',
        'is a table but a line_flux limit is one flux',
        'give the flux limit in erg/s/cm^2 or with a unit',
      );
    }
    const limit = lineFlux(det.limit, lineContext, file, 'detection.limit');
    detection = { kind, limitCgs: limit.cgs };
    if (limit.jyKms !== undefined) detection.limitGivenJyKms = limit.jyKms;
    if (detLine !== undefined) detection.lineAngstrom = detLine;
    if (filter) detection.filter = filter;
  } else if (kind === 'magnitude') {
    if (typeof det.limit === 'object') {
      throw inputError(
        'wrong_type',
        file,
        'detection.limit',
        'is a table but a magnitude limit is one AB magnitude',
        'give the limiting apparent AB magnitude as a number',
      );
    }
    // A flux density ("0.1 mJy") is AB by definition: its AB magnitude once, here.
    const flux = isFluxDensityText(det.limit) ? fluxDensityMagnitude(det.limit, file, 'detection.limit') : undefined;
    const given =
      flux?.abMag ??
      checkRange(
        plainNumber(det.limit, file, 'detection.limit', 'the limiting apparent magnitude'),
        RANGES.apparentMagnitude,
        file,
        'detection.limit',
      );
    // the first population giving its own spectrum, whose synthetic photometry needs the band's shape
    const ownSed = rawPops.find((p) => p.raw.sed !== undefined);
    const phot = readDetectionPhotometry(det, file, base, inputs, ownSed && `${ownSed.path}.sed`);
    if (phot.toAb !== 0 || phot.magnitudeSystem) {
      const key = flux
        ? 'detection.limit'
        : isFluxDensityText(det.completeness?.half)
          ? 'detection.completeness.half'
          : '';
      if (key) {
        throw inputError(
          'conflict',
          file,
          key,
          'is a flux density, which has an AB magnitude of its own, but detection.system is vega',
          'give it as a Vega magnitude, or give every magnitude in AB and remove system and vega_to_ab',
        );
      }
    }
    const beta = checkRange(det.beta ?? -2, RANGES.beta, file, 'detection.beta');
    // Vega magnitudes become AB once, here: the limit and the completeness (src/survey/photometry.ts).
    detection = { kind, limitMag: given + phot.toAb, bandAngstrom: phot.bandAngstrom, beta, igm: det.igm ?? 'none' };
    if (flux) {
      detection.limitGivenJy = flux.jy;
      detection.limitGivenUnit = flux.unit;
    }
    if (phot.bandGivenHz !== undefined) detection.bandGivenHz = phot.bandGivenHz;
    if (det.igm !== undefined) detection.igmStated = true;
    if (phot.bandTable) detection.bandTable = phot.bandTable;
    if (phot.sed) detection.sed = phot.sed;
    if (phot.spectrumBand) detection.spectrumBand = phot.spectrumBand;
    if (phot.magnitudeSystem) detection.magnitudeSystem = phot.magnitudeSystem;
    if (completeness && phot.toAb !== 0) {
      completenessAb =
        completeness.model === 'logistic'
          ? { ...completeness, half: completeness.half + phot.toAb }
          : { ...completeness, x: completeness.x.map((x) => x + phot.toAb) };
    }
  } else {
    refuseLinearThreshold(det.limit, thresholdVariable, file);
    const limit = makeZParam(det.limit, file, 'detection.limit');
    checkParam(limit, hull, file, 'detection.limit', {
      what: 'the limit',
      range: observedRange(kind, thresholdVariable),
    });
    detection = { kind, limit };
  }
  if (completenessAb) detection.completeness = completenessAb;
  Object.assign(detection, readDetectionSelection(det, hull, file));
  return detection;
}

/**
 * A threshold limit of a luminosity variable is log10 of the quantity (from -30 to 60): a number
 * of 1e3 or more is the quantity itself ("limit: 1e9" for a mass of 1e9 Msun), refused saying so
 * with the log10 to write instead (the range check would only say it is above 60).
 */
function refuseLinearThreshold(limit: unknown, variable: PopulationVariable, file: string): void {
  if (variable !== 'luminosity' || typeof limit !== 'number' || !(limit >= 1e3) || !Number.isFinite(limit)) return;
  throw inputError(
    'out_of_range',
    file,
    'detection.limit',
    `is ${compact(limit)}, not a log10 of the quantity (from -30 to 60)`,
    `a threshold survey's limit is log10 of the quantity: it looks like a linear value, write limit: ${compact(Math.log10(limit), 6)}`,
  );
}

/**
 * A population's bias: "auto" (abundance matching), or a given bias (a number, a table, an expression
 * in z, or {over_growth: B}, b(z) = B / D(z) with D the growth of the file's cosmology) checked over
 * the window (0.001 to 100 at every z).
 */
function readBias(
  raw: BiasRaw | undefined,
  path: string,
  w: Window,
  omegaM: number,
  file: string,
): 'auto' | ZParam<BiasSource> {
  if (raw === undefined || raw === 'auto') return 'auto';
  let bias: ZParam<BiasSource>;
  if (typeof raw === 'object' && 'over_growth' in raw) {
    const b = raw.over_growth;
    if (!(Number.isFinite(b) && b > 0))
      outOfRange(
        file,
        `${path}.bias.over_growth`,
        `is ${fmt(b)} but must be a number above 0 (B of the bias b(z) = B / D(z), the bias at z = 0)`,
        'give the bias at z = 0, e.g. over_growth: 0.84',
      );
    bias = growthBiasParam(b, omegaM);
  } else bias = makeZParam(raw, file, `${path}.bias`);
  checkParam(bias, w, file, `${path}.bias`, {
    what: typeof bias.source === 'object' && 'over_growth' in bias.source ? 'the bias B / D(z)' : 'the bias',
    positive: true,
    range: RANGES.bias,
  });
  return bias;
}

/** One population: its parameters checked over its window, bias, occupation, rest wavelength, window and slice edges. */
function buildPopulation(
  p: RawPopulation,
  path: string,
  i: number,
  count: number,
  w: Window,
  edges: number[],
  line: number | undefined,
  file: string,
  files: { base: string; inputs: InputFile[] },
  omegaM: number,
): Population {
  const params = parsePopulationParams(p, path, file);
  for (const c of params.components) {
    checkParam(c.phiStar, w, file, `${path}.${c.phiKey}`, {
      what: c.phiKey === 'phi_star' ? 'phi_star' : `phi_star (from ${c.phiKey})`,
      positive: true,
      range: RANGES.phiStar,
      unitLabel: 'Mpc^-3',
    });
    checkParam(c.alpha, w, file, `${path}.${c.alphaKey}`, { what: c.alphaKey, range: RANGES.alpha });
  }
  if (params.lStar)
    checkParam(params.lStar, w, file, `${path}.${params.lKey}`, {
      what: 'l_star',
      positive: true,
      range: RANGES.lStar,
    });
  if (params.mStar)
    checkParam(params.mStar, w, file, `${path}.m_star`, { what: 'm_star', range: RANGES.mStar, unitLabel: 'AB mag' });
  const sfrConversion = parseSfrConversion(p, path, file);
  const bias = readBias(p.bias, path, w, omegaM, file);
  const occupation = p.occupation ?? 1;
  if (!(occupation > 0 && occupation <= 1))
    outOfRange(file, `${path}.occupation`, `is ${fmt(occupation)}`, 'give a fraction above 0 and at most 1');
  // occupation enters only abundance matching; beside a given bias it would be read and ignored
  if (bias !== 'auto' && occupation !== 1)
    throw inputError(
      'conflict',
      file,
      `${path}.occupation`,
      `is ${fmt(occupation)}, but it only enters bias: auto (the share of matched haloes that host a detected galaxy) and this population gives its bias`,
      'remove occupation, or set bias: auto to match the bias to haloes',
    );
  const restWavelengthAngstrom =
    p.rest_wavelength !== undefined
      ? wavelengthOrFrequency(
          p.rest_wavelength,
          file,
          `${path}.rest_wavelength`,
          'the rest wavelength of the absolute magnitudes',
          REST_WAVELENGTH_EXAMPLE,
        ).angstrom
      : 1500;
  const pop: Population = {
    name: populationName(p, i, count),
    shape: p.shape ?? 'schechter',
    variable: p.variable,
    phiStar: params.components[0]!.phiStar,
    alpha: params.components[0]!.alpha,
    components: params.components.map((c) => ({ phiStar: c.phiStar, alpha: c.alpha, phiKey: c.phiKey })),
    restWavelengthAngstrom,
    bias,
    occupation,
    window: { min: w.min, max: w.max },
    sliceEdges: edges,
  };
  if (sfrConversion) pop.sfrConversion = sfrConversion;
  if (p.quantity !== undefined) pop.quantity = p.quantity;
  if (params.lStar) pop.lStar = params.lStar;
  if (params.lKey) pop.lStarKey = params.lKey;
  if (params.mStar) pop.mStar = params.mStar;
  if (line !== undefined) pop.lineAngstrom = line;
  if (p.rest_wavelength === undefined) pop.restWavelengthDefault = true;
  pop.normalisationKey = params.components[0]!.phiKey;
  if (p.model_uncertainty !== undefined) {
    // Draws are values at the window's middle, in the form the file writes the parameter.
    const zMid = 0.5 * (w.min + w.max);
    const assumed = (name: ModelParameter): number => {
      if (name === 'm_star') return params.mStar!.at(zMid);
      if (name === 'log10_l_star') return Math.log10(params.lStar!.at(zMid));
      const c = params.components[name.endsWith('_2') ? 1 : 0]!;
      if (name.startsWith('alpha')) return c.alpha.at(zMid);
      return Math.log10(c.phiStar.at(zMid)) + (c.phiKey.endsWith('_dex') ? Math.log10(Math.LN10) : 0);
    };
    pop.modelUncertainty = parseModelUncertainty(p.model_uncertainty, {
      file,
      path: `${path}.model_uncertainty`,
      shape: pop.shape,
      variable: pop.variable,
      assumed,
      baseDir: files.base,
      inputs: files.inputs,
    });
  }
  return pop;
}

/** A population's name: as given, or "population" (one) or "population N" (several). */
function populationName(p: RawPopulation, i: number, count: number): string {
  return p.name ?? (count === 1 ? DEFAULT_POPULATION_NAME : `${DEFAULT_POPULATION_NAME} ${i + 1}`);
}

/** The histogram bin width: 0.25 mag for magnitudes, 0.1 dex otherwise, unless given. */
function readHistogramWidth(
  raw: RawSurvey,
  rawPops: RawPopulations,
  detection: Detection,
  hull: Window,
  file: string,
): number {
  const kind = detection.kind;
  const defaultWidth =
    kind === 'magnitude' || (kind === 'threshold' && rawPops.every((p) => p.raw.variable === 'magnitude')) ? 0.25 : 0.1;
  const histogramWidth = raw.histogram?.width ?? defaultWidth;
  if (!(histogramWidth > 0))
    outOfRange(file, 'histogram.width', `is ${fmt(histogramWidth)}`, 'give a positive bin width');
  checkRange(histogramWidth, RANGES.histogramWidth, file, 'histogram.width');
  if (detection.kind === 'threshold' && !detection.limit.constant)
    checkLimitSpan(detection.limit, hull, histogramWidth, file);
  return histogramWidth;
}

/** Validate and normalise already-parsed survey data. Throws exactly one SurveyError on bad input. */
export function normaliseSurvey(obj: unknown, file: string, baseDir?: string): Survey {
  const base = baseDir ?? dirname(file);
  const raw = checkedRaw(obj, file);
  /** Files read on the way (transmission tables), with their identity. */
  const inputs: InputFile[] = [];
  const c = raw.cosmology;
  const cosmology = resolveCosmology(
    { preset: c.preset, h0: c.h0, omegaM: c.omega_m, tCmb: c.t_cmb, omegaB: c.omega_b, sigma8: c.sigma8, nS: c.n_s },
    { kind: 'file', file },
  );
  const areaDeg2 = readArea(raw, file);
  const field = readField(raw, file);
  const exposureHours = readExposure(raw, file);
  const det = raw.detection;
  checkDetectionKeys(det, file);
  const rawPops = populationList(raw, file);
  const detLine = det.line !== undefined ? lineWavelength(det.line, file, 'detection.line') : undefined;
  const lines = populationLines(rawPops, det, detLine, file);
  const given = readRedshift(raw, file);
  const filter = readFilter(det, file, base, inputs);
  const blends = rawPops.map(({ raw: p, path }) => readBlendedLines(p, path, det.kind, file));
  const windows = populationWindows(rawPops, lines, given, filter, file, blends);
  const hull = hullOf(windows);
  const slices = readSlices(raw, windows, file);
  // Photometric redshifts: every value in z must make sense over the whole true range integrated.
  const photoZ =
    det.photo_z && det.kind !== 'line_flux' ? readPhotoZ(det.photo_z, hull, slices.edges, file) : undefined;
  const checkHull = photoZ ? photoZTrueRange(hull, photoZ) : hull;
  const detection = readDetection(det, rawPops, detLine, lines, filter, checkHull, file, base, inputs);
  if (photoZ && detection.kind !== 'line_flux') detection.photoZ = photoZ;
  const checkWindow = (i: number): Window => (photoZ ? photoZTrueRange(windows[i]!, photoZ) : windows[i]!);
  const populations = rawPops.map(({ raw: p, path }, i) => {
    // rest_wavelength places absolute magnitudes; a luminosity population would read it and ignore it.
    if (p.variable === 'luminosity' && p.rest_wavelength !== undefined)
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.rest_wavelength`,
        det.kind === 'line_flux'
          ? 'rest_wavelength says where absolute magnitudes are defined (variable: magnitude), but this population is a line luminosity function, whose rest wavelength is its line'
          : 'rest_wavelength says where absolute magnitudes are defined (variable: magnitude), but this population has variable: luminosity',
        det.kind === 'line_flux' ? "remove it (the line is detection.line or the population's line)" : 'remove it',
      );
    const pop = buildPopulation(
      p,
      path,
      i,
      rawPops.length,
      checkWindow(i),
      slices.own[i]!,
      lines[i],
      file,
      { base, inputs },
      cosmology.omegaM,
    );
    if (photoZ && pop.modelUncertainty) {
      // the model's draws redo the count on the plain prediction's redshift nodes, which photometric redshifts redistribute
      throw inputError(
        'conflict',
        file,
        `${path}.model_uncertainty`,
        'cannot yet be combined with detection.photo_z',
        'leave one of them out',
      );
    }
    if (photoZ) pop.window = { min: windows[i]!.min, max: windows[i]!.max };
    const sed = detection.kind === 'magnitude' ? detection.sed : undefined;
    const band = detection.kind === 'magnitude' ? detection.spectrumBand : undefined;
    const phot = readPopulationPhotometry(p, path, detection.kind, sed, checkWindow(i), file, base, inputs, band);
    pop.restWavelengthAngstrom = phot.restWavelengthAngstrom;
    if (phot.beta !== undefined) pop.beta = phot.beta;
    if (phot.sed) pop.sed = phot.sed;
    if (phot.restBand) {
      pop.restBand = phot.restBand;
      delete pop.restWavelengthDefault;
    }
    if (phot.magnitudeSystem) {
      pop.magnitudeSystem = phot.magnitudeSystem;
      if (pop.mStar) pop.mStar = mapParam(pop.mStar, (m) => m + phot.toAb);
    }
    return pop;
  });
  populations.forEach((pop, i) => {
    Object.assign(
      pop,
      readPopulationSelection(
        rawPops[i]!.raw,
        rawPops[i]!.path,
        detection.kind,
        detection.equivalentWidthCut !== undefined,
        checkWindow(i),
        file,
      ),
    );
    if (blends[i]) pop.blendedLines = blends[i];
  });
  const histogramWidth = readHistogramWidth(raw, rawPops, detection, checkHull, file);

  const survey: Survey = {
    format: 1,
    file,
    title: raw.title ?? defaultTitle(file),
    cosmology,
    areaDeg2,
    areaSr: areaDeg2 * SR_PER_DEG2,
    redshift: slices.window,
    field,
    detection,
    populations,
    sliceEdges: slices.edges,
    histogramWidth,
    raw: obj,
    inputs,
  };
  if (exposureHours !== undefined) survey.exposureHours = exposureHours;
  return survey;
}

/**
 * Kennicutt 1998 (ARA&A 36, 189) calibrations, Msun/yr per erg/s (lines) or per erg/s/Hz (UV continuum):
 * eq. (1) UV 1.4e-28, eq. (2) H-alpha 7.9e-42, eq. (3) [OII] 1.4e-41 (equation numbers from memory).
 */
export const KENNICUTT1998 = { uv: 1.4e-28, halpha: 7.9e-42, oii: 1.4e-41 } as const;

function parseSfrConversion(p: RawPopulation, path: string, file: string): SfrConversion | undefined {
  const v = p.sfr_conversion;
  if (v === undefined) return undefined;
  const key = `${path}.sfr_conversion`;
  if (typeof v === 'number') {
    if (!(v > 0))
      outOfRange(
        file,
        key,
        `is ${fmt(v)}`,
        'give a positive factor in Msun/yr per erg/s (per erg/s/Hz for a magnitude variable)',
      );
    checkRange(v, RANGES.sfrFactor, file, key);
    return { name: 'factor', factor: v };
  }
  if (v === 'uv' && p.variable !== 'magnitude') {
    throw inputError(
      'kind_mismatch',
      file,
      key,
      'uv converts a continuum luminosity per Hz, which needs variable magnitude',
      'use halpha or oii for a line luminosity, or give a factor',
    );
  }
  if ((v === 'halpha' || v === 'oii') && p.variable !== 'luminosity') {
    throw inputError(
      'kind_mismatch',
      file,
      key,
      `${v} converts a line luminosity, which needs variable luminosity`,
      'use uv for absolute magnitudes, or give a factor',
    );
  }
  return { name: v, factor: KENNICUTT1998[v] };
}

/**
 * A threshold limit that varies with z is counted piecewise between the redshifts where it
 * crosses a histogram bin edge: refuse a limit that crosses more edges than a slice may have bins.
 * An expression's least and greatest values are found at every z of the window (to 1e-6 of a bin),
 * not only at the sampled points, so a narrow spike cannot pass the cap.
 */
function checkLimitSpan(limit: ZParam, w: Window, width: number, file: string): void {
  const { min, minZ, max, maxZ } = paramExtremes(limit, w, 1e-6 * width);
  const crossings = (max - min) / width;
  if (crossings > CAPS.histogramBins) {
    throw inputError(
      'too_large',
      file,
      'detection.limit',
      `changes by ${fmt(max - min)} over the redshift window (from ${fmt(min)} at z = ${fmt(minZ)} to ${fmt(max)} at z = ${fmt(maxZ)}), ${Math.ceil(crossings)} histogram bins of ${fmt(width)}, more than the ${CAPS.histogramBins} a slice may have`,
      'check the limit, or give a wider histogram.width',
    );
  }
}

function defaultTitle(file: string): string {
  const base = file.split(/[\\/]/).pop() ?? '';
  const stem = base.replace(/\.(ya?ml|json)$/i, '');
  return stem || 'Untitled survey';
}
