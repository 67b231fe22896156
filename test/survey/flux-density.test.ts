/**
 * The magnitude kind's limit and completeness half given as a flux density ("2 uJy"), and its band
 * as a frequency ("1.4 GHz") (docs/survey-file.md, "Flux densities and frequencies"): the AB
 * conversion against Oke & Gunn 1983's definition, the band against lambda = c / nu, the refusals,
 * and a prediction from a flux density equal to the one from the same limit as an AB magnitude.
 */
import { describe, expect, test } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseSurveyObject } from '../../src/survey/load.js';
import { parseQuantity } from '../../src/survey/units.js';
import { predict } from '../../src/counts/predict.js';
import { AB_ZERO_POINT_JY, abMagnitudeOfJy, jyOfAbMagnitude } from '../../src/model/photometry.js';
import { SPEED_OF_LIGHT_M_S } from '../../src/cosmology/constants.js';
import type { Detection } from '../../src/model/detection.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { errorOf } from '../support/survey-error.js';

const FILE = 'demo/radio.yaml';
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** An invented 1.4 GHz continuum survey (a demo, not a published one). */
function radio(detection: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    format: 1,
    title: 'radio continuum (demo)',
    cosmology: { h0: 70, omega_m: 0.3 },
    area: 2,
    redshift: { min: 0.1, max: 3 },
    detection: { kind: 'magnitude', limit: '50 uJy', band: '1.4 GHz', beta: -1.3, ...detection },
    population: { variable: 'magnitude', rest_wavelength: '21.4 cm', phi_star: 1e-3, m_star: -22, alpha: -1.3 },
    slices: { count: 3 },
  };
}

function magnitudeDetection(obj: Record<string, unknown>): Extract<Detection, { kind: 'magnitude' }> {
  const d = parseSurveyObject(obj, FILE).detection;
  if (d.kind !== 'magnitude') throw new Error('not a magnitude detection');
  return d;
}

describe('flux density to AB magnitude: m = -2.5 log10(f_nu / 3631 Jy)', () => {
  test('3631 Jy is AB 0 exactly (the zero point; common practice)', () => {
    expect(AB_ZERO_POINT_JY).toBe(3631);
    expect(abMagnitudeOfJy(3631)).toBe(-0);
  });
  test('1 uJy is AB 23.90 and 1 mJy is AB 16.40 (common practice, to 0.0005 mag)', () => {
    expect(Math.abs(abMagnitudeOfJy(1e-6) - 23.9)).toBeLessThan(5e-4);
    expect(Math.abs(abMagnitudeOfJy(1e-3) - 16.4)).toBeLessThan(5e-4);
    expect(Math.abs(abMagnitudeOfJy(1) - 8.9)).toBeLessThan(5e-4);
  });
  test('Oke & Gunn 1983 (ApJ 266, 713): m_AB = -2.5 log10 f_nu[erg s^-1 cm^-2 Hz^-1] - 48.60, to 1e-4 mag', () => {
    // 48.60 is a zero point of 10^(-19.44) erg s^-1 cm^-2 Hz^-1 = 3630.78 Jy: 6.6e-5 mag from 3631 Jy at every flux
    for (const jy of [3631, 1, 1e-3, 2e-6, 25e-9, 3.6e-13]) {
      const cgs = jy * 1e-23; // 1 Jy = 1e-23 erg s^-1 cm^-2 Hz^-1 (definition)
      const okeGunn = -2.5 * Math.log10(cgs) - 48.6;
      expect(Math.abs(abMagnitudeOfJy(jy) - okeGunn - 6.6e-5), String(jy)).toBeLessThan(1e-6);
      expect(Math.abs(abMagnitudeOfJy(jy) - okeGunn), String(jy)).toBeLessThan(1e-4);
    }
  });
  test('jyOfAbMagnitude inverts it (to 1e-13 mag)', () => {
    for (const m of [0, 8.9, 16.4, 23.9, 31.4, 40])
      expect(Math.abs(abMagnitudeOfJy(jyOfAbMagnitude(m)) - m)).toBeLessThan(1e-13);
  });
});

describe('flux densities and frequencies with their units (definitions; relative 1e-14)', () => {
  test.each<[string, 'fluxDensity' | 'frequency', number, string]>([
    ['1 Jy', 'fluxDensity', 1, 'Jy'],
    ['0.1 mJy', 'fluxDensity', 1e-4, '1 mJy = 1e-3 Jy (SI prefix)'],
    ['25 nJy', 'fluxDensity', 2.5e-8, '1 nJy = 1e-9 Jy'],
    ['2 uJy', 'fluxDensity', 2e-6, '1 uJy = 1e-6 Jy'],
    ['2 µJy', 'fluxDensity', 2e-6, 'micro sign, as typeset'],
    ['2 μJy', 'fluxDensity', 2e-6, 'Greek mu, as typeset'],
    ['1e-29 erg s^-1 cm^-2 Hz^-1', 'fluxDensity', 1e-6, '1 Jy = 1e-23 erg s^-1 cm^-2 Hz^-1 (IAU Style Manual)'],
    ['1e-29 erg s⁻¹ cm⁻² Hz⁻¹', 'fluxDensity', 1e-6, 'typeset powers'],
    ['1e-32 W m^-2 Hz^-1', 'fluxDensity', 1e-6, '1 Jy = 1e-26 W m^-2 Hz^-1'],
    ['1.4 GHz', 'frequency', 1.4e9, '1 GHz = 1e9 Hz'],
    ['345 GHz', 'frequency', 3.45e11, 'GHz'],
    ['100 MHz', 'frequency', 1e8, '1 MHz = 1e6 Hz'],
  ])('%s -> %d (%s)', (text, kind, expected) => {
    expect(rel(parseQuantity(text, kind, FILE, 'k'), expected)).toBeLessThan(1e-14);
  });
});

describe('detection.limit and completeness.half as a flux density', () => {
  test('the limit is its AB magnitude, and the flux density is kept for the outputs', () => {
    const d = magnitudeDetection(radio({ limit: '2 uJy' }));
    expect(d.limitMag).toBe(abMagnitudeOfJy(2e-6));
    expect(d.limitGivenJy).toBe(2e-6);
    expect(magnitudeDetection(radio({ limit: '1e-29 erg s^-1 cm^-2 Hz^-1' })).limitMag).toBe(abMagnitudeOfJy(1e-6));
    // a plain number stays an AB magnitude, without a flux density
    const plain = magnitudeDetection(radio({ limit: 23.9 }));
    expect(plain.limitMag).toBe(23.9);
    expect(plain.limitGivenJy).toBeUndefined();
    expect(magnitudeDetection(radio({ limit: '23.9' })).limitMag).toBe(23.9);
  });
  test('the completeness half: a flux density becomes its AB magnitude, a number stays AB', () => {
    const c = magnitudeDetection(radio({ completeness: { half: '0.1 mJy', width: 0.2 } })).completeness;
    expect(c).toEqual({ model: 'logistic', half: abMagnitudeOfJy(1e-4), width: 0.2 });
    const n = magnitudeDetection(radio({ completeness: { half: 19, width: 0.2 } })).completeness;
    expect(n).toEqual({ model: 'logistic', half: 19, width: 0.2 });
  });
});

describe('detection.band as a frequency: lambda = c / nu, c = 299,792,458 m/s exactly (SI)', () => {
  test.each([
    ['1.4 GHz', 1.4e9],
    ['345 GHz', 3.45e11],
    ['100 MHz', 1e8],
    ['12.5 THz', 1.25e13],
  ])('%s', (band, hz) => {
    const d = magnitudeDetection(radio({ band }));
    expect(rel(d.bandAngstrom, (SPEED_OF_LIGHT_M_S / hz) * 1e10)).toBeLessThan(1e-15);
    expect(d.bandGivenHz).toBe(hz);
  });
  test('1.4 GHz is 21.41 cm and 345 GHz is 869 um (common practice)', () => {
    expect(magnitudeDetection(radio({ band: '1.4 GHz' })).bandAngstrom / 1e8).toBeCloseTo(21.41, 2);
    expect(magnitudeDetection(radio({ band: '345 GHz' })).bandAngstrom / 1e4).toBeCloseTo(869.0, 0);
  });
  test("a population's rest_wavelength may be a frequency too", () => {
    const obj = radio();
    (obj.population as Record<string, unknown>).rest_wavelength = '1.4 GHz';
    const s = parseSurveyObject(obj, FILE);
    expect(s.populations[0]!.restWavelengthAngstrom).toBe((SPEED_OF_LIGHT_M_S / 1.4e9) * 1e10);
    expect(s.populations[0]!.restWavelengthAngstrom).toBe(s.detection.kind === 'magnitude' && s.detection.bandAngstrom);
    (obj.population as Record<string, unknown>).rest_wavelength = '2 mJy';
    expect(errorOf(() => parseSurveyObject(obj, FILE)).keyPath).toBe('population.rest_wavelength');
  });
  test('a wavelength stays a wavelength', () => {
    const d = magnitudeDetection(radio({ band: '850 um' }));
    expect(d.bandAngstrom).toBe(8.5e6);
    expect(d.bandGivenHz).toBeUndefined();
  });
});

describe('refusals: one sentence naming the file, the key and the fix', () => {
  test.each<[string, Record<string, unknown>, string, RegExp]>([
    ['zero flux density', { limit: '0 mJy' }, 'detection.limit', /above 0/],
    ['negative flux density', { limit: '-2 uJy' }, 'detection.limit', /above 0/],
    ['a flux density that underflows to 0', { limit: '1e-400 Jy' }, 'detection.limit', /above 0/],
    ['a flux density that overflows', { limit: '1e400 Jy' }, 'detection.limit', /finite/],
    ['brighter than AB 0', { limit: '1e5 Jy' }, 'detection.limit', /outside its physical range/],
    ['fainter than AB 40', { limit: '1e-20 Jy' }, 'detection.limit', /outside its physical range/],
    ['a line flux, not a flux density', { limit: '2e-17 erg/s/cm^2' }, 'detection.limit', /not a flux density/],
    ['an unknown unit', { limit: '25 furlongs' }, 'detection.limit', /unit this tool knows/],
    // a magnitude written with its name (failed before: "not a number with a unit this tool knows")
    [
      'a magnitude with "mag"',
      { limit: '25 mag' },
      'detection.limit',
      /a magnitude written with a unit; write the magnitude as a number alone: 25\.$/,
    ],
    ['a magnitude with "AB"', { limit: '27.2 AB' }, 'detection.limit', /number alone: 27\.2\.$/],
    [
      'a completeness half with "mag"',
      { completeness: { half: '26.9 mag', width: 0.2 } },
      'detection.completeness.half',
      /number alone: 26\.9\.$/,
    ],
    // a map's unit, written out of habit: the number stands without it
    ['a flux density per beam', { limit: '4 mJy/beam' }, 'detection.limit', /per beam, .*write "4 mJy"/],
    [
      'a completeness half per beam',
      { completeness: { half: '5 uJy / Beam', width: 0.2 } },
      'detection.completeness.half',
      /per beam, .*write "5 uJy"/,
    ],
    ['a frequency as a limit', { limit: '2 GHz' }, 'detection.limit', /not a flux density/],
    [
      'a completeness half that is not a flux density',
      { completeness: { half: '3 h', width: 0.2 } },
      'detection.completeness.half',
      /not a flux density/,
    ],
    [
      'a zero completeness half',
      { completeness: { half: '0 uJy', width: 0.2 } },
      'detection.completeness.half',
      /above 0/,
    ],
    [
      'a band that is neither a length nor a frequency',
      { band: '2 h' },
      'detection.band',
      /not a wavelength or a frequency/,
    ],
    ['a flux density as a band', { band: '2 mJy' }, 'detection.band', /not a wavelength or a frequency/],
    ['a zero frequency', { band: '0 GHz' }, 'detection.band', /above 0/],
    ['a frequency beyond 10 m', { band: '10 MHz' }, 'detection.band', /outside its physical range/],
    [
      'a flux density with Vega magnitudes',
      { limit: '2 uJy', system: 'vega', vega_to_ab: 0.2 },
      'detection.limit',
      /system is vega/,
    ],
    [
      'a flux-density half with Vega magnitudes',
      { limit: 20, system: 'vega', vega_to_ab: 0.2, completeness: { half: '2 uJy', width: 0.2 } },
      'detection.completeness.half',
      /system is vega/,
    ],
  ])('%s', (_name, detection, key, what) => {
    const e = errorOf(() => parseSurveyObject(radio(detection), FILE));
    expect(e.keyPath).toBe(key);
    expect(e.message).toMatch(what);
    expect(e.message.startsWith(`${FILE}: ${key}: `), e.message).toBe(true);
    expect(e.message.endsWith('.')).toBe(true);
    // eslint-disable-next-line no-control-regex -- one line, no escape characters
    expect(e.message).not.toMatch(/[\n\r\u001b]|\bNaN\b|Infinity/);
  });

  test('an L* given to a magnitude population (a far-infrared or radio function quoted in L) says how to write M*', () => {
    const obj = radio();
    const pop = obj.population as Record<string, unknown>;
    delete pop.m_star;
    pop.log10_l_star = 29.4;
    const e = errorOf(() => parseSurveyObject(obj, FILE));
    expect([e.code, e.keyPath]).toEqual(['kind_mismatch', 'population.log10_l_star']);
    expect(e.message).toMatch(/give m_star instead, .*M\* = -2\.5 log10\(L_nu \/ 4\.3445e20 erg s\^-1 Hz\^-1\)\.$/);
    // the constant is 4 pi (10 pc)^2 x 3631 Jy, the AB zero point at 10 pc (common practice)
    expect(rel(4 * Math.PI * (10 * 3.085677581e18) ** 2 * AB_ZERO_POINT_JY * 1e-23, 4.3445e20)).toBeLessThan(1e-4);
  });

  test('the program exits 2 with one line and writes nothing', async () => {
    const dir = tempDir('flux-density-');
    const file = join(dir, 'radio.yaml');
    writeFileSync(file, JSON.stringify(radio({ limit: '-2 uJy' })));
    const out = join(dir, 'out.json');
    const r = await runCli(['predict', file, '--format', 'json', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain('detection.limit');
    expect(() => writeFileSync(join(dir, 'probe'), '')).not.toThrow();
    const { existsSync } = await import('node:fs');
    expect(existsSync(out)).toBe(false);
  });
});

describe('a prediction from a flux density equals the one from its AB magnitude (bit for bit)', () => {
  test('limit "2 uJy" and completeness half "3 uJy" against the same file in AB magnitudes', () => {
    const flux = predict(
      parseSurveyObject(radio({ limit: '2 uJy', completeness: { half: '3 uJy', width: 0.15 } }), FILE),
    );
    // the AB magnitudes as JavaScript writes them: the shortest text that reads back as the same number
    const ab = predict(
      parseSurveyObject(
        radio({
          limit: String(abMagnitudeOfJy(2e-6)),
          completeness: { half: abMagnitudeOfJy(3e-6), width: 0.15 },
        }),
        FILE,
      ),
    );
    expect(flux.detection).toMatchObject({ kind: 'magnitude', limit_jy: 2e-6, band_ghz: 1.4 });
    const { limit_jy, limit_unit, ...detection } = flux.detection as typeof flux.detection & {
      limit_jy?: number;
      limit_unit?: string;
    };
    expect(limit_jy).toBe(2e-6);
    expect(limit_unit).toBe('uJy');
    expect(JSON.stringify({ ...flux, detection })).toBe(JSON.stringify(ab));
    expect(flux.totals.count).toBeGreaterThan(0);
  });
});

describe('the outputs show what the file gave', () => {
  test('predict: the header line and the JSON block; check: the JSON block', async () => {
    const dir = tempDir('flux-density-');
    const file = join(dir, 'radio.yaml');
    writeFileSync(file, JSON.stringify(radio({ limit: '50 uJy' })));
    const table = await runCli(['predict', file]);
    expect(table.code).toBe(0);
    expect(table.stdout).toContain(
      `AB magnitude limit 19.65 (given as 50 uJy) in a band at 1.4 GHz (2.141e9 A) (spectral slope beta = -1.3)`,
    );
    const json = await runCli(['predict', file, '--format', 'json']);
    const d = (JSON.parse(json.stdout) as { detection: Record<string, unknown> }).detection;
    expect(d).toMatchObject({ limit_ab_mag: abMagnitudeOfJy(5e-5), limit_jy: 5e-5, band_ghz: 1.4 });
    const check = await runCli(['check', file, '--format', 'json']);
    const c = (JSON.parse(check.stdout) as { detection: Record<string, unknown> }).detection;
    expect(c).toMatchObject({ limit_mag: abMagnitudeOfJy(5e-5), limit_jy: 5e-5, band_ghz: 1.4 });
    // a limit given as a magnitude shows no flux density
    writeFileSync(file, JSON.stringify(radio({ limit: 19.5, band: '21 cm' })));
    const plain = JSON.parse((await runCli(['predict', file, '--format', 'json'])).stdout) as {
      detection: Record<string, unknown>;
    };
    expect(plain.detection.limit_jy).toBeUndefined();
    expect(plain.detection.band_ghz).toBeUndefined();
  });
});
