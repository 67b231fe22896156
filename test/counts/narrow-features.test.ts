/**
 * Expressions in z with a narrow feature (a dip, a spike or a step about 1e-3 of the window wide):
 * the redshift quadrature cuts around it (src/survey/zparam.ts featureCuts, read through a ZParam's
 * `features` by src/counts/engine.ts and src/selection/effects.ts, and by the forecast's density
 * grid, src/forecast/grid.ts). Before, the rule's 8 to 256
 * nodes per piece could step over such a feature: the counts were up to 3.9e-3 off and nothing said so.
 *
 * Sources:
 * - test/reference/narrow_features.json (test/reference/generate/narrow_features.py: counts.py's model
 *   with astropy 5.2.1 and mpmath 1.2.1, the outer integral by scipy 1.10.1 quad at epsrel 1e-10 with
 *   `points=` at each feature): a feature in the redshift selection, log10_phi_star, m_star, alpha, an
 *   attenuation and a threshold limit, a spike between a phi* table's rows, and a coarse tabulated
 *   filter with sharp steps between its rows (filter_table_steps, test/reference/narrow-features/
 *   coarse-steps.csv, quad cut at each row's redshift). Tolerance 1e-7 relative (the docs promise 1e-6; the quadrature's
 *   own target per piece is 1e-8).
 * - test/reference/narrow_features.json's bias_cases (the same generator: the totals' bias-weighted
 *   integrals by quad with `points=` at the bias's feature or rows, the growth from power.py): a
 *   bias with a spike of width 3e-3 and a bias table with a step 0.002 wide inside a slice. The
 *   total's count-weighted bias, mean redshift and effective depth to 1e-7 relative, and its cosmic
 *   variance fraction to 1e-7 of <b D> sigma_0(L) / sqrt(fields) from the reference's <b D> and L
 *   with the program's box sigma (checked on its own in test/uncertainty). Before the count's nodes
 *   cut where the bias does, the spike's total bias was 5.9e-3 off and the table's 1.3e-3.
 * - The narrowing property: a dip 1 - 0.9 exp(-((z - c)/w)^2) in the selection removes
 *   0.9 sqrt(pi) w g(c) + O(w^3) sources, g = dN/dz without the dip (the gaussian integral; common
 *   practice), so as w narrows the count tends to N0 linearly in w. g(c) is the count of the slice
 *   c +- 1e-3 over its width (its error, g'' (1e-3)^2 / 6, moves the expected dip by < 1e-9 of N0).
 *   Tolerance 1e-7 of N0, which the dip itself exceeds for every w above 7e-8 (a rule that misses it
 *   fails).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { forecast } from '../../src/forecast/forecast.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { uncertaintyContext } from '../../src/uncertainty/prediction.js';
import { sliceMatterSigma } from '../../src/uncertainty/cosmic-variance.js';

const FAST = { noUncertainty: true, model: { draws: 0 } };

interface Case {
  name: string;
  yaml: string;
  features: [number, number][];
  slices: { z_min: number; z_max: number; count: number }[];
  feature_slice: { z_min: number; z_max: number; bins: { lo: number; hi: number; count: number }[] };
}
interface BiasCase {
  name: string;
  yaml: string;
  total: { count: number; bias: number; mean_redshift: number; bias_growth: number; effective_depth_mpc: number };
}
const REF = JSON.parse(readFileSync(new URL('../reference/narrow_features.json', import.meta.url), 'utf8')) as {
  cases: Case[];
  bias_cases: BiasCase[];
};

const rel = (a: number, b: number) => Math.abs(a / b - 1);
/** A case's survey file as if it lay beside the fixture (its filter table's path is relative to test/reference/). */
const caseFile = (name: string) => fileURLToPath(new URL(`../reference/${name}.yaml`, import.meta.url));

function sliceCounts(text: string, file: string): number[] {
  const p = predict(loadSurveyText(text, file), FAST);
  if (p.breakdown !== 'redshift') throw new Error('expected slices in redshift');
  return p.slices.map((s) => s.count);
}

describe('a narrow feature of an expression in z, against scipy quad cut at the feature', () => {
  test('the fixture holds a case for every place an expression can stand', () => {
    expect(REF.cases.map((c) => c.name)).toEqual([
      'selection_dip',
      'phi_star_spike',
      'm_star_step',
      'alpha_dip',
      'attenuation_spike',
      'threshold_limit_spike',
      'phi_star_table_spike',
      'filter_table_steps',
    ]);
  });

  test.each(REF.cases.map((c) => [c.name, c] as const))('%s: every slice to 1e-7', (name, c) => {
    const counts = sliceCounts(c.yaml, caseFile(name));
    expect(counts.length).toBe(c.slices.length);
    const off = counts.map((n, i) => rel(n, c.slices[i]!.count)).filter((r) => !(r < 1e-7));
    expect(off).toEqual([]);
  });
});

describe('the histogram of the slice holding the feature, against scipy', () => {
  // before: 3.2e-3 off (selection), 4.2e-3 (phi*), 1.9e-3 (a threshold limit's spike; 1.9e-4 after
  // the counts were cut at the feature, until the limit's bin-edge crossings inside it were found)
  test.each(REF.cases.map((c) => [c.name, c] as const))('%s: four bins near the limit to 1e-7', (name, c) => {
    const p = predict(loadSurveyText(c.yaml, caseFile(name)), FAST);
    if (p.breakdown !== 'redshift') throw new Error('expected slices in redshift');
    const slice = p.slices.find((s) => s.z_min === c.feature_slice.z_min)!;
    const { edges, counts } = slice.histogram;
    const off = c.feature_slice.bins
      .map((b) => {
        const i = edges.findIndex((e) => Math.abs(e - b.lo) < 1e-9);
        return { bin: b.lo, r: i < 0 ? NaN : rel(counts[i]!, b.count) };
      })
      .filter((x) => !(x.r < 1e-7));
    expect(off).toEqual([]);
  });
});

describe("a forecast's slices (its own density grid in z) follow the same features", () => {
  // before: the grid cut only where the selection effects do: the log10_phi_star spike's slice was
  // 3.9e-3 high, the threshold limit's 2e-5 low; and the spike between a phi* table's rows, where
  // the grid does not cut, 2.7e-3 low, its 256 nodes not converged and nothing said (now its
  // pieces are halved until they converge: src/counts/engine.ts chooseRedshiftNodes); and the
  // coarse filter table's slices, where the grid did not cut at the rows as the engine does,
  // 1.09e-5 and 6.8e-6 low (its Fisher covariance 1.6e-5 off)
  test.each(REF.cases.map((c) => [c.name, c] as const))('%s: every slice to 1e-7', async (name, c) => {
    const f = await forecast(loadSurveyText(c.yaml, caseFile(name)), { cosmicVariance: false, mocks: 0 });
    const off = f.slices.map((s, i) => rel(s.count, c.slices[i]!.count)).filter((r) => !(r < 1e-7));
    expect(off).toEqual([]);
  });
});

describe("a bias with a narrow feature or a table's rows: the total's uncertainty against scipy", () => {
  test('the fixture holds a bias expression and a bias table', () => {
    expect(REF.bias_cases.map((c) => c.name)).toEqual(['bias_spike', 'bias_table']);
  });

  test.each(REF.bias_cases.map((c) => [c.name, c] as const))(
    '%s: bias, mean redshift, depth and cosmic variance to 1e-7',
    (name, c) => {
      const survey = loadSurveyText(c.yaml, `${name}.yaml`);
      const p = predict(survey, { model: { draws: 0 } });
      const t = p.totals;
      const u = t.uncertainty!;
      const r = c.total;
      const ctx = uncertaintyContext(survey, new FlatCosmology(survey.cosmology));
      const sigma0 = sliceMatterSigma(ctx.power, {
        areaSr: survey.areaSr,
        aspect: survey.field.aspect,
        fieldCount: survey.field.count,
        transverseDistanceMpc: ctx.cosmo.transverseComovingDistanceMpc(r.mean_redshift),
        radialDepthMpc: r.effective_depth_mpc,
        zMid: 0,
      });
      const cv = (r.bias_growth * sigma0) / Math.sqrt(survey.field.count);
      const off = {
        count: rel(t.count, r.count),
        bias: rel(u.bias, r.bias),
        mean_redshift: Math.abs(t.mean_redshift! - r.mean_redshift),
        effective_depth: rel(u.effective_depth_mpc!, r.effective_depth_mpc),
        cosmic_variance: rel(u.cosmic_variance_fraction, cv),
      };
      expect(Object.entries(off).filter(([, v]) => !(v < 1e-7))).toEqual([]);
    },
  );
});

describe('a dip narrower and narrower', () => {
  const survey = (selection: string, edges: number[]) => `
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
redshift: {min: 0.8, max: 1.8}
detection:
  kind: line_flux
  limit: 2e-17
  line: 6563
  redshift_selection: "${selection}"
population: {variable: luminosity, phi_star: 1.5e-3, log10_l_star: 42.5, alpha: -1.4}
slices: {edges: [${edges.join(', ')}]}
`;
  const whole = [0.8, 1.8];
  const n0 = sliceCounts(survey('1', whole), 'plain.yaml')[0]!;

  test('removes 0.9 sqrt(pi) w g(c) for every width w from 3e-3 down to 1e-9 (to 1e-7 of the count)', () => {
    const failures: string[] = [];
    fc.assert(
      fc.property(
        fc.double({ min: 0.9, max: 1.7, noNaN: true }),
        fc.double({ min: -9, max: Math.log10(3e-3), noNaN: true }),
        (c, logW) => {
          const w = 10 ** logW;
          const g = sliceCounts(survey('1', [0.8, c - 1e-3, c + 1e-3, 1.8]), 'g.yaml')[1]! / 2e-3;
          const n = sliceCounts(survey(`1 - 0.9*exp(-((z - ${c})/${w})^2)`, whole), 'dip.yaml')[0]!;
          const expected = n0 - 0.9 * Math.sqrt(Math.PI) * w * g;
          const off = Math.abs(n - expected) / n0;
          if (!(off < 1e-7)) failures.push(`c = ${c}, w = ${w}: ${off.toExponential(2)} of N0`);
        },
      ),
      { numRuns: 24, seed: 13 },
    );
    expect(failures).toEqual([]);
  });
});
