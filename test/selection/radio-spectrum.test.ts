/**
 * A radio spectral index written as beta (docs/survey-file.md, "A power-law spectrum f_nu ~ nu^a"):
 * beta is the slope of f_lambda ~ lambda^beta, and an index a of f_nu ~ nu^a is beta = -(2 + a)
 * (f_lambda = f_nu c / lambda^2; common practice), so a synchrotron a = -0.7 is beta = -1.3. In a
 * radio band a beta above -1 (a spectrum steeper than nu^-1) warns radio_spectrum_steep, and a key
 * named for the index (spectral_index) is refused with the beta to write.
 */
import { describe, expect, test } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parseSurveyObject, loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { errorOf } from '../support/survey-error.js';

const FILE = 'demo/radio.yaml';

/** The invented 1.4 GHz field of docs/survey-file.md. */
function radio(detection: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    format: 1,
    title: 'radio continuum (demo)',
    cosmology: { h0: 70, omega_m: 0.3 },
    area: 1.5,
    redshift: { min: 0.1, max: 3 },
    detection: { kind: 'magnitude', limit: '50 uJy', band: '1.4 GHz', beta: -1.3, ...detection },
    population: { variable: 'magnitude', rest_wavelength: '1.4 GHz', phi_star: 1e-3, m_star: -22, alpha: -1.3 },
    slices: { count: 3 },
  };
}

const codes = (obj: Record<string, unknown>) =>
  predict(parseSurveyObject(obj, FILE), { noUncertainty: true }).warnings.map((w) => w.code);

describe('radio_spectrum_steep', () => {
  test('beta: -0.7 (an index written as beta) warns, naming beta: -1.3; beta: -1.3 and flat -2 do not', () => {
    const p = predict(parseSurveyObject(radio({ beta: -0.7 }), FILE), { noUncertainty: true });
    const w = p.warnings.find((x) => x.code === 'radio_spectrum_steep');
    expect(w?.message).toContain('f_nu ~ nu^-1.3');
    expect(w?.message).toContain('a = -0.7 is beta: -1.3');
    expect(codes(radio({ beta: 0.7 }))).toContain('radio_spectrum_steep');
    for (const beta of [-1.3, -2, -1])
      expect(codes(radio({ beta })), String(beta)).not.toContain('radio_spectrum_steep');
  });
  test('only in radio bands (1 mm or longer): an optical or near-infrared band with beta -0.7 is a red galaxy, not a slip', () => {
    expect(codes(radio({ beta: -0.7, band: '1 mm' }))).toContain('radio_spectrum_steep');
    expect(codes(radio({ beta: -0.7, band: '0.99 mm' }))).not.toContain('radio_spectrum_steep');
    expect(codes(radio({ beta: -0.7, band: '2.2 um', limit: 24 }))).not.toContain('radio_spectrum_steep');
  });
  test('the beta the docs give for a = -0.7 counts what the index means: beta -0.7 counts 19 % fewer in the docs example', () => {
    const count = (beta: number) =>
      predict(parseSurveyObject(radio({ beta, completeness: { half: '60 uJy', width: 0.2 } }), FILE), {
        noUncertainty: true,
      }).totals.count;
    expect(count(-0.7) / count(-1.3)).toBeCloseTo(0.807, 3);
  });
  test('no bundled sample raises it', () => {
    for (const f of readdirSync('samples').filter((n) => n.endsWith('.yaml'))) {
      const s = loadSurveyText(readFileSync(`samples/${f}`, 'utf8'), `samples/${f}`);
      expect(
        predict(s, { noUncertainty: true }).warnings.map((w) => w.code),
        f,
      ).not.toContain('radio_spectrum_steep');
    }
  });
});

describe('a spectral index under its own name is refused with the beta to write', () => {
  test.each([
    ['spectral_index', -0.7, 'for a = -0.7, write beta: -1.3'],
    ['spectral_index', '-0.8', 'a synchrotron a = -0.7 is beta: -1.3'],
    ['alpha_radio', -0.7, 'for a = -0.7, write beta: -1.3'],
  ])('detection.%s: %s', (key, value, says) => {
    const obj = radio();
    const det = obj.detection as Record<string, unknown>;
    delete det.beta;
    det[key] = value;
    const e = errorOf(() => parseSurveyObject(obj, FILE));
    expect([e.code, e.keyPath]).toEqual(['unknown_key', `detection.${key}`]);
    expect(e.message).toContain(says);
  });
});
