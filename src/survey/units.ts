/**
 * Quantities with units at the edge of the program: a survey key holds either a plain number in
 * the key's documented unit or a string such as "900 arcmin^2". Everything is turned into plain
 * numbers in one unit per kind of quantity (below); a string with no unit, an unknown unit or a
 * unit of the wrong dimension is an error naming the key, never a guess.
 *
 * Conversions are done by mathjs (loaded only when a string with a unit actually appears).
 */
import { excerpt, inputError } from '../errors.js';
import type * as MathJsModule from 'mathjs';
import { getUnits } from './mathjs.js';

export type QuantityKind = 'area' | 'wavelength' | 'flux' | 'time' | 'fluxDensity' | 'frequency' | 'velocityFlux';

interface KindInfo {
  /** mathjs unit the plain number is in. */
  unit: string;
  /** How the unit is written in messages. */
  label: string;
  /** What the quantity is, for messages ("an area"). */
  what: string;
  examples: string;
}

export const QUANTITY_KINDS: Record<QuantityKind, KindInfo> = {
  area: { unit: 'deg^2', label: 'deg^2', what: 'an area', examples: '2.5, "900 arcmin^2" or "0.01 sr"' },
  wavelength: { unit: 'angstrom', label: 'Angstrom', what: 'a wavelength', examples: '6563, "656.3 nm" or "2.1 um"' },
  flux: {
    unit: 'erg/s/cm^2',
    label: 'erg/s/cm^2',
    what: 'a line flux',
    examples: '5e-17, "5e-17 erg/s/cm^2" or "5e-20 W/m^2"',
  },
  time: { unit: 'h', label: 'hours', what: 'a time', examples: '3, "3 h" or "90 min"' },
  // A flux density and a frequency are always written with a unit: a plain number at their keys
  // is an AB magnitude (detection.limit) or a wavelength (detection.band).
  fluxDensity: {
    unit: 'Jy',
    label: 'Jy',
    what: 'a flux density',
    examples: '"0.1 mJy", "2 uJy" or "1e-29 erg s^-1 cm^-2 Hz^-1"',
  },
  frequency: { unit: 'Hz', label: 'Hz', what: 'a frequency', examples: '"1.4 GHz" or "345 GHz"' },
  // A velocity-integrated flux density (a radio line's flux, S = int S_nu dv), always with its
  // unit: the line-flux keys convert it once at the line's rest frequency (src/survey/normalise.ts).
  velocityFlux: {
    unit: 'Jy km/s',
    label: 'Jy km/s',
    what: 'a velocity-integrated flux',
    examples: '"0.7 Jy km/s" or "150 mJy km/s"',
  },
};

/**
 * A velocity-integrated flux density S [Jy km/s] of a line of rest wavelength lambda [Angstrom] as
 * a line flux [erg s^-1 cm^-2]: F = S nu / c (radio velocities, v = c (1 - nu_obs / nu)) =
 * S 1e-23 x 1e5 x 1e8 / lambda (1 Jy = 1e-23 erg s^-1 cm^-2 Hz^-1, 1 km/s = 1e5 cm/s,
 * 1 Angstrom = 1e-8 cm): 4.738e-20 erg s^-1 cm^-2 per Jy km/s at HI 21 cm.
 */
export function lineFluxOfVelocityFlux(jyKms: number, lineAngstrom: number): number {
  return (jyKms * 1e-10) / lineAngstrom;
}

/** Longest quantity string read ("2.1 deg^2" is 9 characters). */
export const MAX_QUANTITY_LENGTH = 100;

const PLAIN_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const LEADING_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*\S/;

/**
 * Spellings mathjs does not know, mapped to ones it does. Only names that cannot be confused
 * with another unit are matched without regard to case ("A" alone stays the ampere, and is then
 * rejected as not a wavelength).
 */
function normaliseUnitNames(s: string): string {
  return (
    s
      .replace(/Å/g, ' angstrom')
      .replace(/\bangstroms?\b/gi, 'angstrom')
      .replace(/\bmicrons?\b/gi, 'micron')
      .replace(/[µμ](m|Jy)\b/g, 'u$1')
      // "deg2", "arcmin2", "arcsec2": the squared angles as catalogues and papers often write them
      // (mathjs reads "cm2" and "m2" as areas itself, but knows no "deg2")
      .replace(/\b(deg|arcmin|arcsec)2\b/g, '$1^2')
      // superscript powers as typeset ("deg²", "erg s⁻¹ cm⁻²"): written as ^2, ^-1
      .replace(/[⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+/g, (p) => `^${[...p].map((c) => SUPERSCRIPTS[c]).join('')}`)
  );
}

/** The superscript characters of a typeset power and the ASCII they stand for. */
const SUPERSCRIPTS: Record<string, string> = Object.fromEntries(
  [...'⁻⁺⁰¹²³⁴⁵⁶⁷⁸⁹'].map((c, i) => [c, '-+0123456789'[i]!]),
);

/** True when `s` is a plain decimal number (e.g. "2.5", "-3e-2"). */
export function isPlainNumberString(s: string): boolean {
  return PLAIN_NUMBER.test(plainNumberText(s));
}

/** A bare number string as Number reads it: trimmed, the typeset minus sign (U+2212) a minus. */
export function plainNumberText(s: string): string {
  return s.trim().replace(/\u2212/g, '-');
}

/**
 * Turn a number or a string with a unit into a plain number in the kind's unit
 * (deg^2, Angstrom, erg/s/cm^2, hours, Jy, Hz or Jy km/s). A bare number string ("2.5") is read in that unit.
 * Throws SurveyError bad_unit otherwise.
 */
export function parseQuantity(value: number | string, kind: QuantityKind, file: string, keyPath: string): number {
  return parseQuantityOneOf(value, [kind], file, keyPath).value;
}

/**
 * A number or a string with a unit of one of `kinds` (a band may be a wavelength or a frequency):
 * the kind the unit is of and the value in that kind's unit. A plain number (or a bare number
 * string) is read as the first kind. `fix` replaces the default fix of the messages.
 */
export function parseQuantityOneOf<K extends QuantityKind>(
  value: number | string,
  kinds: readonly [K, ...K[]],
  file: string,
  keyPath: string,
  fixText?: string,
): { kind: K; value: number } {
  const infos = kinds.map((k) => QUANTITY_KINDS[k]);
  const what = infos.map((i) => i.what).join(' or ');
  const label = infos.map((i) => i.label).join(' or ');
  if (typeof value === 'number') return { kind: kinds[0], value };
  // (the typeset minus sign, U+2212, of a number pasted from a paper is a minus)
  const text = value.trim().replace(/\u2212/g, '-');
  const fix =
    fixText ?? `write ${what} in ${label} as a number, or with a unit, e.g. ${infos.map((i) => i.examples).join('; ')}`;
  if (PLAIN_NUMBER.test(text)) {
    const v = Number(text);
    if (!Number.isFinite(v))
      throw inputError('not_finite', file, keyPath, `"${excerpt(text)}" is not a finite number`, fix);
    return { kind: kinds[0], value: v };
  }
  if (text.length > MAX_QUANTITY_LENGTH) {
    throw inputError(
      'bad_unit',
      file,
      keyPath,
      `"${excerpt(text)}" is longer than the ${MAX_QUANTITY_LENGTH} characters a quantity may have`,
      fix,
    );
  }
  const shown = excerpt(text, 60);
  if (!LEADING_NUMBER.test(text)) {
    throw inputError('bad_unit', file, keyPath, `"${shown}" does not start with a number`, fix);
  }
  const normalised = normaliseUnitNames(text);
  for (const kind of kinds) {
    const quick = commonQuantity(normalised, kind);
    if (quick !== undefined) {
      if (!Number.isFinite(quick))
        throw inputError('not_finite', file, keyPath, `"${shown}" is not a finite quantity`, fix);
      return { kind, value: quick };
    }
  }
  const math = getUnits();
  let u: MathJsModule.Unit;
  try {
    u = math.unit(normalised);
  } catch {
    throw inputError('bad_unit', file, keyPath, `"${shown}" is not a number with a unit this tool knows`, fix);
  }
  if ((u as unknown as { value: unknown }).value === null) {
    throw inputError('bad_unit', file, keyPath, `"${shown}" has no number`, fix);
  }
  const kind = kinds.find((k) => u.equalBase(math.unit(QUANTITY_KINDS[k].unit)));
  if (kind === undefined) {
    // "6563 A", "15 A": astronomers' shorthand for Angstrom is the ampere's symbol
    const amperes = /^(.*?\d\.?)\s*A$/.exec(text);
    if (amperes && (kinds as readonly QuantityKind[]).includes('wavelength')) {
      throw inputError(
        'bad_unit',
        file,
        keyPath,
        `"${shown}" is a current: "A" is the ampere, not the Angstrom`,
        `write "${excerpt(amperes[1]!, 40)} Angstrom" or "${excerpt(amperes[1]!, 40)} Å"`,
      );
    }
    throw inputError('bad_unit', file, keyPath, `"${shown}" is not ${what} (expected a unit like ${label})`, fix);
  }
  // Rounded to 15 significant digits: removes the last-bit noise of going through SI base units
  // (e.g. "1.19 um" -> 11900, not 11899.999999999998); far below any physical precision.
  const v = Number(u.toNumber(QUANTITY_KINDS[kind].unit).toPrecision(15));
  if (!Number.isFinite(v)) {
    throw inputError('not_finite', file, keyPath, `"${shown}" is not a finite quantity`, fix);
  }
  return { kind, value: v };
}

// ---------------------------------------------------------------------------------------------
// The common units without building mathjs's unit system (which costs over 100 ms, a tenth of a
// whole report): a number followed by a product of the units below, each with an optional integer
// power, joined by "/", "*" or spaces, as mathjs reads them. The arithmetic is mathjs's own, step
// for step (mathjs 15, Unit.parse, _normalize and toNumeric): the value times
// (unit value x prefix value)^power for each unit written, divided by the same for each unit of
// the target, then rounded to 15 digits; so the number is bit for bit the one mathjs gives
// (test/survey/units-quick.test.ts compares the two over many values and every unit here).
// Anything else (another unit, parentheses, a fractional power, a wrong dimension) goes to mathjs,
// which also writes the error messages.

/** Dimensions: length, mass, time, angle. */
type Dims = readonly [number, number, number, number];

interface QuickUnit {
  /** mathjs's unit value and the value of the prefix it reads in the name. */
  value: number;
  prefix: number;
  dims: Dims;
}

const ANGLE: Dims = [0, 0, 0, 1];
const LENGTH: Dims = [1, 0, 0, 0];
const TIME: Dims = [0, 0, 1, 0];
const ENERGY: Dims = [2, 1, -2, 0];
const POWER: Dims = [2, 1, -3, 0];
const FREQUENCY: Dims = [0, 0, -1, 0];
/** W m^-2 Hz^-1 = kg s^-2. */
const FLUX_DENSITY: Dims = [0, 1, -2, 0];

/** Values as mathjs 15 defines them (Unit.js: UNITS, PREFIXES, calculateAngleValues; sr, micron and Jy as getUnits creates them). */
const QUICK_UNITS: Record<string, QuickUnit> = {
  deg: { value: Math.PI / 180, prefix: 1, dims: ANGLE },
  arcmin: { value: Math.PI / 10800, prefix: 1, dims: ANGLE },
  arcsec: { value: Math.PI / 648000, prefix: 1, dims: ANGLE },
  rad: { value: 1, prefix: 1, dims: ANGLE },
  sr: { value: 1, prefix: 1, dims: [0, 0, 0, 2] },
  angstrom: { value: 1e-10, prefix: 1, dims: LENGTH },
  micron: { value: 1e-6, prefix: 1, dims: LENGTH },
  m: { value: 1, prefix: 1, dims: LENGTH },
  cm: { value: 1, prefix: 1e-2, dims: LENGTH },
  km: { value: 1, prefix: 1e3, dims: LENGTH },
  mm: { value: 1, prefix: 1e-3, dims: LENGTH },
  um: { value: 1, prefix: 1e-6, dims: LENGTH },
  nm: { value: 1, prefix: 1e-9, dims: LENGTH },
  erg: { value: 1e-7, prefix: 1, dims: ENERGY },
  J: { value: 1, prefix: 1, dims: ENERGY },
  W: { value: 1, prefix: 1, dims: POWER },
  s: { value: 1, prefix: 1, dims: TIME },
  min: { value: 60, prefix: 1, dims: TIME },
  minute: { value: 60, prefix: 1, dims: TIME },
  h: { value: 3600, prefix: 1, dims: TIME },
  hour: { value: 3600, prefix: 1, dims: TIME },
  Hz: { value: 1, prefix: 1, dims: FREQUENCY },
  kHz: { value: 1, prefix: 1e3, dims: FREQUENCY },
  MHz: { value: 1, prefix: 1e6, dims: FREQUENCY },
  GHz: { value: 1, prefix: 1e9, dims: FREQUENCY },
  THz: { value: 1, prefix: 1e12, dims: FREQUENCY },
  // the jansky as getUnits creates it (1 Jy = 1e-26 W m^-2 Hz^-1, with mathjs's short prefixes)
  Jy: { value: 1e-26, prefix: 1, dims: FLUX_DENSITY },
  mJy: { value: 1e-26, prefix: 1e-3, dims: FLUX_DENSITY },
  uJy: { value: 1e-26, prefix: 1e-6, dims: FLUX_DENSITY },
  nJy: { value: 1e-26, prefix: 1e-9, dims: FLUX_DENSITY },
};

/** The kinds' units (QUANTITY_KINDS[kind].unit) as lists of [unit, power]. */
const QUICK_TARGETS: Record<QuantityKind, [QuickUnit, number][]> = {
  area: [[QUICK_UNITS.deg!, 2]],
  wavelength: [[QUICK_UNITS.angstrom!, 1]],
  flux: [
    [QUICK_UNITS.erg!, 1],
    [QUICK_UNITS.s!, -1],
    [QUICK_UNITS.cm!, -2],
  ],
  time: [[QUICK_UNITS.h!, 1]],
  fluxDensity: [[QUICK_UNITS.Jy!, 1]],
  frequency: [[QUICK_UNITS.Hz!, 1]],
  velocityFlux: [
    [QUICK_UNITS.Jy!, 1],
    [QUICK_UNITS.km!, 1],
    [QUICK_UNITS.s!, -1],
  ],
};

// (mathjs skips only spaces and tabs between the parts)
const QUICK_NUMBER = /^[ \t]*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)[ \t]*/y;
const QUICK_TERM = /([A-Za-z]+)[ \t]*(?:\^[ \t]*([+-]?\d+))?[ \t]*(?:([*/])[ \t]*)?/y;

function dimsOf(terms: [QuickUnit, number][]): number[] {
  const d = [0, 0, 0, 0];
  for (const [u, p] of terms) for (let i = 0; i < 4; i++) d[i]! += u.dims[i]! * p;
  return d;
}

/** `text` (unit names already normalised) in the kind's unit, as mathjs gives it; undefined when not one of the common forms. */
export function commonQuantity(text: string, kind: QuantityKind): number | undefined {
  QUICK_NUMBER.lastIndex = 0;
  const num = QUICK_NUMBER.exec(text);
  if (!num) return undefined;
  let at = QUICK_NUMBER.lastIndex;
  const terms: [QuickUnit, number][] = [];
  let sign = 1;
  let expecting = true;
  while (at < text.length) {
    QUICK_TERM.lastIndex = at;
    const t = QUICK_TERM.exec(text);
    if (!t || !Object.prototype.hasOwnProperty.call(QUICK_UNITS, t[1]!)) return undefined;
    terms.push([QUICK_UNITS[t[1]!]!, sign * (t[2] === undefined ? 1 : Number(t[2]))]);
    sign = t[3] === '/' ? -1 : 1;
    expecting = t[3] !== undefined;
    at = QUICK_TERM.lastIndex;
  }
  if (expecting || terms.length === 0) return undefined;
  const target = QUICK_TARGETS[kind];
  const have = dimsOf(terms);
  const want = dimsOf(target);
  if (have.some((x, i) => x !== want[i])) return undefined;
  let v = parseFloat(num[1]!);
  for (const [u, p] of terms) v = v * Math.pow(u.value * u.prefix, p);
  for (const [u, p] of target) v = v / Math.pow(u.value * u.prefix, p);
  return Number(v.toPrecision(15));
}
