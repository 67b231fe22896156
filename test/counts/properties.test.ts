/**
 * Invariants of the count engine (the mathematics checked against itself; common practice), with fast-check:
 * counts are linear in area, never fall as the limit gets fainter, slices sum to the total,
 * histogram counts sum to their slice, and every number is finite. Common practice; the
 * tolerances are floating-point round-off (1e-9 relative). The first two look at counts alone and
 * skip the Poisson and cosmic-variance blocks (`noUncertainty`: the same counts bit for bit, which
 * the third checks).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { parseSurveyObject } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';

type Kind = 'line_flux' | 'magnitude' | 'threshold';

function surveyObject(
  kind: Kind,
  area: number,
  limit: number,
  alpha: number,
  zmin: number,
  dz: number,
  slices: number,
) {
  const base = {
    format: 1,
    title: 'property test',
    cosmology: { h0: 70, omega_m: 0.3 },
    area,
    redshift: { min: zmin, max: zmin + dz },
    slices: { count: slices },
  };
  if (kind === 'line_flux') {
    return {
      ...base,
      detection: { kind, limit: 10 ** -limit, line: 6563 },
      population: { variable: 'luminosity', phi_star: 2.2e-3, l_star: 1e42, alpha },
    };
  }
  if (kind === 'magnitude') {
    return {
      ...base,
      detection: { kind, limit, band: 8000, beta: -2 },
      population: { variable: 'magnitude', phi_star: 2.2e-3, m_star: -21, alpha },
    };
  }
  return {
    ...base,
    detection: { kind, limit },
    population: {
      variable: 'luminosity',
      quantity: 'stellar mass [Msun]',
      phi_star: 2.2e-3,
      log10_l_star: 10.8,
      alpha,
    },
  };
}

const kindArb = fc.constantFrom<Kind>('line_flux', 'magnitude', 'threshold');
function limitFor(kind: Kind, t: number): number {
  // t in [0, 1] -> a sensible limit for each kind
  return kind === 'line_flux' ? 16 + 2 * t : kind === 'magnitude' ? 22 + 6 * t : 11 - 3 * t;
}
const args = fc.record({
  kind: kindArb,
  area: fc.double({ min: 0.01, max: 100, noNaN: true }),
  t: fc.double({ min: 0, max: 1, noNaN: true }),
  alpha: fc.double({ min: -2.3, max: -0.3, noNaN: true }),
  zmin: fc.double({ min: 0.05, max: 3, noNaN: true }),
  dz: fc.double({ min: 0.05, max: 2, noNaN: true }),
  slices: fc.integer({ min: 1, max: 6 }),
});

/** Counts only: no uncertainty blocks (the counts do not depend on them). */
const FAST = { noUncertainty: true };

describe('count engine invariants (fast-check)', () => {
  test('count is linear in area (1e-9)', () => {
    fc.assert(
      fc.property(args, fc.double({ min: 1.5, max: 20, noNaN: true }), (a, factor) => {
        const p1 = predict(
          parseSurveyObject(
            surveyObject(a.kind, a.area, limitFor(a.kind, a.t), a.alpha, a.zmin, a.dz, a.slices),
            'p.yaml',
          ),
          FAST,
        );
        const p2 = predict(
          parseSurveyObject(
            surveyObject(
              a.kind,
              Math.min(a.area * factor, 41000),
              limitFor(a.kind, a.t),
              a.alpha,
              a.zmin,
              a.dz,
              a.slices,
            ),
            'p.yaml',
          ),
          FAST,
        );
        const ratio = Math.min(a.area * factor, 41000) / a.area;
        expect(Math.abs(p2.totals.count - p1.totals.count * ratio)).toBeLessThanOrEqual(
          1e-9 * p2.totals.count + 1e-300,
        );
      }),
      { numRuns: 40 },
    );
  });

  test('a fainter limit never lowers a count, slice by slice', () => {
    fc.assert(
      fc.property(args, fc.double({ min: 0.01, max: 0.5, noNaN: true }), (a, step) => {
        const t2 = Math.min(1, a.t + step);
        const p1 = predict(
          parseSurveyObject(
            surveyObject(a.kind, a.area, limitFor(a.kind, a.t), a.alpha, a.zmin, a.dz, a.slices),
            'p.yaml',
          ),
          FAST,
        );
        const p2 = predict(
          parseSurveyObject(
            surveyObject(a.kind, a.area, limitFor(a.kind, t2), a.alpha, a.zmin, a.dz, a.slices),
            'p.yaml',
          ),
          FAST,
        );
        p1.slices!.forEach((s, i) => expect(p2.slices![i]!.count).toBeGreaterThanOrEqual(s.count * (1 - 1e-12)));
      }),
      { numRuns: 40 },
    );
  });

  test('slices sum to the total; histograms sum to their slice; everything finite', () => {
    fc.assert(
      fc.property(args, (a) => {
        const p = predict(
          parseSurveyObject(
            surveyObject(a.kind, a.area, limitFor(a.kind, a.t), a.alpha, a.zmin, a.dz, a.slices),
            'p.yaml',
          ),
        );
        const sum = p.slices!.reduce((x, s) => x + s.count, 0);
        expect(Math.abs(sum - p.totals.count)).toBeLessThanOrEqual(1e-12 * Math.max(1, p.totals.count));
        for (const s of p.slices!) {
          const h = s.histogram.counts.reduce((x, c) => x + c, 0);
          expect(Math.abs(h - s.count)).toBeLessThanOrEqual(1e-9 * Math.max(1e-300, s.count));
          expect(s.histogram.edges.length).toBe(s.histogram.counts.length + 1);
          // every edge on the bin grid (one expect: the edges off it listed)
          const step = a.kind === 'magnitude' ? 0.25 : 0.1;
          expect(s.histogram.edges.filter((e) => !(Math.abs(e / step - Math.round(e / step)) < 1e-6))).toEqual([]);
        }
        const text = JSON.stringify(p);
        expect(text).not.toMatch(/null|NaN|Infinity/);
        // the counts without the uncertainty blocks (the two checks above) are these, bit for bit
        const fast = predict(
          parseSurveyObject(
            surveyObject(a.kind, a.area, limitFor(a.kind, a.t), a.alpha, a.zmin, a.dz, a.slices),
            'p.yaml',
          ),
          FAST,
        );
        expect(fast.slices!.map((s) => s.count)).toEqual(p.slices!.map((s) => s.count));
        expect(fast.totals.count).toBe(p.totals.count);
      }),
      { numRuns: 60 },
    );
  });
});
