/**
 * The depth tables and the design model, grouped by where the expected value comes from:
 * - consistency with the forecast: the tabulated (shifted, interpolated) counts and Fisher sums
 *   equal those of the forecast's own density grid rebuilt at the design's limit and area
 *   (src/forecast/fisher.ts fisherParts), to 1e-6 relative;
 * - closed form: without completeness, the count fainter than L* per redshift node is
 *   V [Gamma(alpha+1, u_lim) - Gamma(alpha+1, 1)] (upper incomplete gamma; the Schechter integral),
 *   to 1e-6 relative;
 * - consistency: cosmic-variance fractions and sigmas of the model agree with the forecast run on
 *   the design's survey with predict's cosmic-variance fractions (interpolated tables: 2e-3 relative).
 */
import { describe, expect, test } from 'vitest';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { buildDensityGrid, sliceCount } from '../../src/forecast/grid.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { forecast } from '../../src/forecast/forecast.js';
import { upperGamma } from '../../src/numerics/gamma.js';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel, sigmasOf, surveyAtLimit } from '../../src/planning/model.js';
import { faintCount } from '../../src/planning/tables.js';
import { sample } from './helpers.js';

const halpha = sample('plan-halpha-layers.yaml');
const uv = sample('plan-uv-deep-wide.yaml');

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);
}

describe.each([
  ['line_flux with gaussian filter and logistic completeness', halpha, 'line_flux' as const, 6e-17, 0.2],
  ['magnitude with evolving model and logistic completeness', uv, 'magnitude' as const, 28, 9.5 / 3600],
])('%s: tabulated numbers equal the forecast grid rebuilt at the limit', (_n, survey, kind, refLimit, fov) => {
  const depth = makeDepthModel(kind, { kind: 'background', referenceLimit: refLimit, referenceHours: 1 });
  const modelP = buildDesignModel(
    survey,
    survey.populations[0]!,
    { limitKind: kind, depth, fieldOfViewDeg2: fov },
    [0.1, 30],
    [1, 500],
    { cosmicVariance: false },
  );
  test.each([0.1, 0.1234, 0.77, 3.1, 17.7, 30])(
    'at %s h per pointing: count and every Fisher element to 1e-6',
    async (h) => {
      const model = await modelP;
      const v = model.tier(h, 7);
      const s = surveyAtLimit(survey, depth.limitAt(h), 7 * fov);
      const parts = fisherParts(buildDensityGrid(s, s.populations[0]!, new FlatCosmology(s.cosmology), s.sliceEdges));
      expect(rel(v.count, parts.count)).toBeLessThan(1e-6);
      for (let j = 0; j < 3; j++)
        for (let k = 0; k < 3; k++)
          expect(rel(v.fisher[j]![k]!, parts.matrix[j]![k]!), `F[${j}][${k}]`).toBeLessThan(1e-6);
      expect(v.areaDeg2).toBeCloseTo(7 * fov, 12);
    },
  );
});

describe('closed form: count fainter than L* without completeness (upper incomplete gamma)', () => {
  const plain = sample('plan-halpha-layers.yaml', (t) => t.replace(/^\s+completeness:.*$/m, ''));
  const p = plain.populations[0]!;
  const grid = buildDensityGrid(plain, p, new FlatCosmology(plain.cosmology), plain.sliceEdges);
  test.each([0, 0.3, 1.1, 2.5])('shift %s in ln u: every slice to 1e-6 relative', (delta) => {
    for (let sl = 0; sl < sliceCount(grid); sl++) {
      let expected = 0;
      for (let j = grid.sliceNodeStart[sl]!; j < grid.sliceNodeStart[sl + 1]!; j++) {
        const uLim = Math.exp(grid.nodeTLim[j]! + delta);
        if (uLim < 1)
          expected +=
            Math.exp(grid.nodeLogV[j]!) * (upperGamma(grid.nodeA1[j]!, uLim) - upperGamma(grid.nodeA1[j]!, 1));
      }
      const got = faintCount(grid, sl, delta).count;
      if (expected === 0) expect(got).toBe(0);
      else expect(rel(got, expected), `slice ${sl}`).toBeLessThan(1e-6);
    }
  });
  test('the derivative in the shift matches a central difference (1e-5 relative)', () => {
    const h = 1e-4;
    const d = faintCount(grid, 2, 0.5).derivative;
    const fd = (faintCount(grid, 2, 0.5 + h).count - faintCount(grid, 2, 0.5 - h).count) / (2 * h);
    expect(rel(d, fd)).toBeLessThan(1e-5);
  });
});

describe('consistency with the forecast, cosmic variance included', () => {
  test.each([
    [0.3, 40],
    [2.2, 12],
    [9, 3],
  ])('H-alpha at %s h x %s pointings: sigmas to 2e-3 relative', async (h, n) => {
    const depth = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 6e-17, referenceHours: 1 });
    const model = await buildDesignModel(
      halpha,
      halpha.populations[0]!,
      { limitKind: 'line_flux', depth, fieldOfViewDeg2: 0.2 },
      [0.2, 40],
      [1, 400],
    );
    const s = surveyAtLimit(halpha, depth.limitAt(h), n * 0.2);
    const f = await forecast(s);
    const sig = sigmasOf(model.tier(h, n).fisher)!;
    ['log10_phi_star', 'log10_l_star', 'alpha'].forEach((name, i) =>
      expect(rel(sig[i]!, f.fisher.sigma[name]!), name).toBeLessThan(2e-3),
    );
  });
});
