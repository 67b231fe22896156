/**
 * Quantities with units at the edge of the program: a survey key holds either a plain number in
 * the key's documented unit or a string such as "900 arcmin^2". Everything is turned into plain
 * numbers in one unit per kind of quantity (below); a string with no unit, an unknown unit or a
 * unit of the wrong dimension is an error naming the key, never a guess.
 *
 * Conversions are done by mathjs (loaded only when a string with a unit actually appears).
 */
import { inputError } from '../errors.js';
import type * as MathJsModule from 'mathjs';
import { getUnits } from './mathjs.js';

export type QuantityKind = 'area' | 'wavelength' | 'flux' | 'time';

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
};

const PLAIN_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const LEADING_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*\S/;

/**
 * Spellings mathjs does not know, mapped to ones it does. Only names that cannot be confused
 * with another unit are matched without regard to case ("A" alone stays the ampere, and is then
 * rejected as not a wavelength).
 */
function normaliseUnitNames(s: string): string {
  return s
    .replace(/Å/g, ' angstrom')
    .replace(/\bangstroms?\b/gi, 'angstrom')
    .replace(/\bmicrons?\b/gi, 'micron')
    .replace(/[µμ]m\b/g, 'um');
}

/** True when `s` is a plain decimal number (e.g. "2.5", "-3e-2"). */
export function isPlainNumberString(s: string): boolean {
  return PLAIN_NUMBER.test(s.trim());
}

/**
 * Turn a number or a string with a unit into a plain number in the kind's unit
 * (deg^2, Angstrom, erg/s/cm^2 or hours). A bare number string ("2.5") is read in that unit.
 * Throws SurveyError bad_unit otherwise.
 */
export function parseQuantity(value: number | string, kind: QuantityKind, file: string, keyPath: string): number {
  const info = QUANTITY_KINDS[kind];
  if (typeof value === 'number') return value;
  const text = value.trim();
  if (PLAIN_NUMBER.test(text)) return Number(text);
  const fix = `write ${info.what} in ${info.label} as a number, or with a unit, e.g. ${info.examples}`;
  if (!LEADING_NUMBER.test(text)) {
    throw inputError('bad_unit', file, keyPath, `"${value}" does not start with a number`, fix);
  }
  const math = getUnits();
  let u: MathJsModule.Unit;
  try {
    u = math.unit(normaliseUnitNames(text));
  } catch {
    throw inputError('bad_unit', file, keyPath, `"${value}" is not a number with a unit this tool knows`, fix);
  }
  if ((u as unknown as { value: unknown }).value === null) {
    throw inputError('bad_unit', file, keyPath, `"${value}" has no number`, fix);
  }
  if (!u.equalBase(math.unit(info.unit))) {
    throw inputError('bad_unit', file, keyPath, `"${value}" is not ${info.what} (expected a unit like ${info.label})`, fix);
  }
  // Rounded to 15 significant digits: removes the last-bit noise of going through SI base units
  // (e.g. "1.19 um" -> 11900, not 11899.999999999998); far below any physical precision.
  const v = Number(u.toNumber(info.unit).toPrecision(15));
  if (!Number.isFinite(v)) {
    throw inputError('not_finite', file, keyPath, `"${value}" is not a finite quantity`, fix);
  }
  return v;
}

/** Square degrees in the whole sky: 4 pi sr times (180/pi)^2 deg^2/sr. */
export const FULL_SKY_DEG2 = 4 * Math.PI * (180 / Math.PI) ** 2;

/** Steradians per square degree, (pi/180)^2. */
export const SR_PER_DEG2 = (Math.PI / 180) ** 2;
