/**
 * A limit brighter than every galaxy (a user's typo: a flux density written as a plain number is a
 * magnitude, "2e-29" reads as 0 mag; or a limit of 3 mag) with a model_uncertainty: the model's
 * draws tabulate the histograms (src/counts/model-draws-histograms.ts) with a quadrature rule whose
 * panels grow with u = L / L* at the limit, and at a limit of 3 mag (u near 1e9) that rule asked for
 * 1.7e8 points and V8 stopped the process ("invalid size", exit 133). Expected: a prediction of 0
 * everywhere, as the engine's exact answer: e^-u with u above 1e4 is 0 in double precision (common
 * practice), so every count, percentile and histogram bin is exactly 0 and finite.
 */
import { describe, expect, test } from 'vitest';
import { parseSurveyObject } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';

function survey(limit: number | string, completeness: boolean) {
  return parseSurveyObject(
    {
      format: 1,
      cosmology: { h0: 70, omega_m: 0.3 },
      area: 1.77,
      redshift: { min: 3.5, max: 4.5 },
      detection: {
        kind: 'magnitude',
        limit,
        band: 7700,
        igm: 'madau1995',
        ...(completeness ? { completeness: { half: Number(limit) + 0.2, width: 0.15 } } : {}),
      },
      population: {
        variable: 'magnitude',
        phi_star: 1.97e-3,
        m_star: -20.88,
        alpha: -1.64,
        model_uncertainty: { log10_phi_star: 0.1, m_star: 0.08, alpha: 0.04 },
      },
      slices: { count: 4 },
      histogram: { width: 0.25 },
    },
    'bright-limit.yaml',
  );
}

describe('a magnitude limit brighter than every galaxy, with the model drawn', () => {
  for (const limit of [0, 0.5, 3, 12])
    for (const completeness of [false, true])
      test(`limit ${limit} mag${completeness ? ', logistic completeness' : ''}: every count and histogram bin 0`, () => {
        const p = predict(survey(limit, completeness), { model: { draws: 200, seed: 1 } });
        expect(p.totals.count).toBe(0);
        expect(p.warnings.map((w) => w.code)).toContain('no_detections');
        const slices = p.breakdown === 'redshift' ? p.slices : [];
        expect(slices.length).toBe(4);
        for (const s of slices) {
          expect(s.count).toBe(0);
          expect([s.model!.p2_5, s.model!.p16, s.model!.p50, s.model!.p84, s.model!.p97_5]).toEqual([0, 0, 0, 0, 0]);
          const h = s.histogram;
          expect(h.counts.length).toBeGreaterThan(0);
          expect(h.model!.draws).toBe(100);
          expect(s.model!.draws).toBe(200);
          for (const v of [...h.counts, ...h.model!.p16, ...h.model!.p84]) expect(v).toBe(0);
        }
      });
});

describe('the no_detections warning names a flux density written without its unit', () => {
  const message = (limit: number | string) =>
    predict(survey(limit, false), { model: { draws: 0 } })
      .warnings.filter((w) => w.code === 'no_detections')
      .map((w) => w.message)
      .join(' ');
  test('"2e-29" (a flux density in erg/s/cm^2/Hz without its unit) reads as 2e-29 AB: the message says so', () => {
    expect(message(2e-29)).toMatch(/the limit, 2e-29 AB, is brighter than any survey's: a flux density needs its unit/);
    expect(message(3)).toMatch(/the limit, 3 AB, is brighter/);
  });
  test('a limit of 12 AB, or a flux density given with its unit, gets the plain sentence', () => {
    expect(message(12)).toMatch(/fewer than one source/);
    expect(message(12)).not.toMatch(/needs its unit/);
    // 3000 Jy is 0.04 AB, but written with its unit
    expect(message('3000 Jy')).toMatch(/fewer than one source/);
    expect(message('3000 Jy')).not.toMatch(/needs its unit/);
  });
});
