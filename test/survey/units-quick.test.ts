/**
 * The common units are converted without building mathjs's unit system (commonQuantity in
 * src/survey/units.ts). Reference: mathjs 15 itself (the library the conversions were made with
 * before): for every unit expression the quick path reads, and many values, the number must be
 * bit for bit mathjs's (tolerance 0). Expressions it does not read must be left to mathjs
 * (undefined), so that their numbers and error messages are mathjs's.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { getUnits } from '../../src/survey/mathjs.js';
import { commonQuantity, QUANTITY_KINDS, type QuantityKind } from '../../src/survey/units.js';

/** What parseQuantity computed with mathjs for a string with a unit (the reference). */
function viaMathjs(text: string, kind: QuantityKind): number | 'error' {
  const math = getUnits();
  try {
    const u = math.unit(text);
    if (!u.equalBase(math.unit(QUANTITY_KINDS[kind].unit))) return 'error';
    return Number(u.toNumber(QUANTITY_KINDS[kind].unit).toPrecision(15));
  } catch {
    return 'error';
  }
}

const EXPRESSIONS: Record<QuantityKind, string[]> = {
  area: [
    'deg^2',
    'arcmin^2',
    'arcsec^2',
    'sr',
    'rad^2',
    'deg ^ 2',
    'deg*deg',
    'deg deg',
    'arcmin*arcsec',
    'deg arcmin',
    'sr^1',
  ],
  wavelength: ['angstrom', 'nm', 'um', 'micron', 'm', 'cm', 'mm', 'um^1', 'm^2/m', 'cm/m*m'],
  flux: [
    'erg/s/cm^2',
    'W/m^2',
    'erg s^-1 cm^-2',
    'erg / s / cm^2',
    'J/s/m^2',
    'W m^-2',
    'erg/s/cm/cm',
    'W/cm^2',
    'erg/cm^2/s',
    'erg*s^-1*cm^-2',
  ],
  time: ['h', 'hour', 'min', 'minute', 's', 'h^1', 's^2/s'],
  fluxDensity: [
    'Jy',
    'mJy',
    'uJy',
    'nJy',
    'erg s^-1 cm^-2 Hz^-1',
    'erg/s/cm^2/Hz',
    'W m^-2 Hz^-1',
    'W/m^2/Hz',
    'Jy^1',
    'mJy*GHz/GHz',
  ],
  frequency: ['Hz', 'kHz', 'MHz', 'GHz', 'THz', 'GHz^1', 'MHz*s/s'],
  velocityFlux: ['Jy km/s', 'mJy km/s', 'uJy km/s', 'Jy km s^-1', 'Jy*km/s', 'mJy km / s', 'Jy m/s', 'Jy cm/s'],
};

/** Decimal strings as people write them: a few significant digits, any exponent. */
const decimal = fc
  .tuple(
    fc.integer({ min: 1, max: 999999999 }),
    fc.integer({ min: -3, max: 9 }),
    fc.integer({ min: -25, max: 25 }),
    fc.boolean(),
  )
  .map(([m, point, exp, sci]) => {
    const digits = String(m);
    const at = Math.max(1, Math.min(digits.length, digits.length - point));
    const mantissa = point > 0 && at < digits.length ? `${digits.slice(0, at)}.${digits.slice(at)}` : digits;
    return sci ? `${mantissa}e${exp}` : mantissa;
  });

describe('quick unit conversions equal mathjs bit for bit (tolerance 0)', () => {
  for (const kind of Object.keys(EXPRESSIONS) as QuantityKind[]) {
    for (const expr of EXPRESSIONS[kind]) {
      test(`${kind}: "${expr}"`, () => {
        fc.assert(
          fc.property(decimal, fc.constantFrom('', ' ', '  '), (num, gap) => {
            const text = `${num}${gap}${expr}`;
            const quick = commonQuantity(text, kind);
            // a plain check per value (fast-check reports the failing text): expect's toBe, Object.is
            const want = viaMathjs(text, kind);
            if (quick === undefined || !Object.is(quick, want))
              throw new Error(`${text}: quick path ${String(quick)}, mathjs ${String(want)}`);
          }),
          { numRuns: 300 },
        );
      });
    }
  }

  test("the samples' quantities", () => {
    const cases: [string, QuantityKind][] = [
      ['2.1 deg^2', 'area'],
      ['4e-17 erg/s/cm^2', 'flux'],
      ['6562.8 angstrom', 'wavelength'],
      ['1.19 um', 'wavelength'],
      ['130 angstrom', 'wavelength'],
      ['0.01 sr', 'area'],
      ['900 arcmin^2', 'area'],
      ['90 min', 'time'],
      ['5e-20 W/m^2', 'flux'],
      ['0.1 mJy', 'fluxDensity'],
      ['25 nJy', 'fluxDensity'],
      ['2 uJy', 'fluxDensity'],
      ['1e-29 erg s^-1 cm^-2 Hz^-1', 'fluxDensity'],
      ['1.4 GHz', 'frequency'],
      ['345 GHz', 'frequency'],
      ['100 MHz', 'frequency'],
      ['0.7 Jy km/s', 'velocityFlux'],
    ];
    for (const [text, kind] of cases) expect(commonQuantity(text, kind), text).toBe(viaMathjs(text, kind));
  });
});

describe('what the quick path leaves to mathjs', () => {
  const left: [string, QuantityKind][] = [
    ['2 deg^2', 'wavelength'], // wrong dimension: mathjs's error
    ['2 deg', 'area'],
    ['2 erg/s', 'flux'],
    ['2 deg^2.0', 'area'], // non-integer power
    ['2 (deg)^2', 'area'], // parentheses
    ['2 deg^2/', 'area'], // trailing slash
    ['2 /deg^2', 'area'],
    ['2 mi^2', 'area'], // a unit it does not know
    ['2 Deg^2', 'area'],
    ['2 deg2', 'area'],
    ['2\ndeg^2', 'area'], // mathjs skips only spaces and tabs
    ['2', 'area'], // no unit
    ['deg^2', 'area'], // no number
    ['2 kJ/s/m^2', 'flux'], // prefixed names other than the listed lengths
    ['2 kJy', 'fluxDensity'], // prefixes other than m, u, n on Jy
    ['2 mHz', 'frequency'], // (millihertz) prefixes other than k, M, G, T on Hz
    ['2 Jy', 'flux'], // wrong dimension
    ['2 GHz', 'wavelength'],
    ['2 constructor', 'area'],
  ];
  for (const [text, kind] of left) {
    test(JSON.stringify(text), () => expect(commonQuantity(text, kind)).toBeUndefined());
  }
});
