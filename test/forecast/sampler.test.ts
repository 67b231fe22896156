/**
 * The mock sampler's inverse tables (src/forecast/sampler.ts) against two references, on every
 * survey of test/reference/fisher.json and every bundled sample a forecast accepts:
 *
 * 1. The exact distribution: at every cell boundary of the nodes checked, the table's cumulative
 *    probability equals the integral of f(t) = u^(alpha+1) e^(-u) c(t) from t_lim, normalised,
 *    computed independently by composite Simpson on 8 sub-intervals per cell, within 1e-5 (the
 *    bound the sampler's header states). Simpson's own error is far below that bound: against 64
 *    sub-intervals per cell the normalised cumulative differs by at most 9e-9 on these grids (where a
 *    completeness table has kinks or a logistic is narrow; 6e-14 where the integrand is smooth),
 *    while the tables differ from the integral by 3e-7 to 4e-6.
 * 2. The rejection sampler the mocks used before (test/forecast/rejection-sampler.ts, exact draws):
 *    at the node of largest expected count in each slice (about 60 nodes in all), 40,000 draws of
 *    each sampler (fixed seeds, so deterministic) pass the two-sample Kolmogorov-Smirnov test at
 *    the 1e-5 level per node (6e-4 for all of them, Bonferroni): D < c sqrt(2 / 40000) = 0.0175
 *    with the asymptotic c(1e-5) = sqrt(ln(2 / 1e-5) / 2) = 2.471 (e.g. Press et al., Numerical
 *    Recipes, 3rd ed., section 14.3.3). A wrong slope, a wrong alias or a cell off by one moves D
 *    far beyond that; the cumulative distribution itself is bounded far tighter by check 1.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import mt19937 from '@stdlib/random-base-mt19937';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { buildDensityGrid, sliceCount, type DensityGrid } from '../../src/forecast/grid.js';
import {
  buildSamplingTables,
  CatalogueSampler,
  completenessOfGrid,
  type SamplingTables,
} from '../../src/forecast/sampler.js';
import { choosePopulation, surveyForPopulation } from '../../src/model/select.js';
import { loadSurveyFile } from '../../src/survey/index.js';
import { SurveyError } from '../../src/errors.js';
import { buildRejectionTables, RejectionSampler } from './rejection-sampler.js';
import { surveyFromSpec, type SurveySpec } from './helpers.js';

const ref = JSON.parse(readFileSync(new URL('../reference/fisher.json', import.meta.url), 'utf8')) as {
  cases: { survey: SurveySpec }[];
};
const samplesDir = new URL('../../samples/', import.meta.url).pathname;

function grids(): [string, DensityGrid][] {
  const out: [string, DensityGrid][] = [];
  for (const c of ref.cases) {
    const sv = surveyFromSpec(c.survey);
    out.push([
      `reference ${c.survey.name}`,
      buildDensityGrid(sv, sv.populations[0]!, new FlatCosmology(sv.cosmology), sv.sliceEdges),
    ]);
  }
  for (const f of readdirSync(samplesDir)
    .filter((x) => x.endsWith('.yaml'))
    .sort()) {
    const file = loadSurveyFile(join(samplesDir, f));
    // every sample a forecast accepts (one Schechter function, sources counted by true redshift)
    let population;
    try {
      population = choosePopulation(file, undefined);
    } catch (e) {
      if (e instanceof SurveyError) continue;
      throw e;
    }
    const sv = surveyForPopulation(file, population);
    out.push([`sample ${f}`, buildDensityGrid(sv, population, new FlatCosmology(sv.cosmology), sv.sliceEdges)]);
  }
  return out;
}

const all = grids();

/** Each grid's tables, built once for both checks. */
const built = new Map<DensityGrid, SamplingTables>();
function tablesOf(grid: DensityGrid): SamplingTables {
  let t = built.get(grid);
  if (!t) built.set(grid, (t = buildSamplingTables(grid)));
  return t;
}

/** The node of largest expected count in each slice. */
function mainNodes(grid: DensityGrid): number[] {
  const tables = tablesOf(grid);
  const nodes: number[] = [];
  for (let s = 0; s < sliceCount(grid); s++) {
    let best = -1;
    let bestP = -1;
    for (let j = grid.sliceNodeStart[s]!; j < grid.sliceNodeStart[s + 1]!; j++) {
      const p = tables.nodeCum[j]! - (j > grid.sliceNodeStart[s]! ? tables.nodeCum[j - 1]! : 0);
      if (p > bestP) {
        bestP = p;
        best = j;
      }
    }
    if (best >= 0) nodes.push(best);
  }
  return nodes;
}

describe('inverse tables: the cumulative distribution within 1e-5 of the exact integral', () => {
  test.each(all)('%s', (_name, grid) => {
    const tables = tablesOf(grid);
    const cfn = completenessOfGrid(grid);
    let worst = 0;
    // every tenth node and the main ones: the whole range of redshifts
    const nodes = new Set([
      ...mainNodes(grid),
      ...Array.from({ length: grid.nodeZ.length }, (_, j) => j).filter((j) => j % 10 === 0),
    ]);
    for (const j of nodes) {
      const c0 = tables.cellStart[j]!;
      const c1 = tables.cellStart[j + 1]!;
      const h = tables.nodeCellWidth[j]!;
      const t0 = grid.nodeTLim[j]!;
      // scaled by the largest u^(alpha+1) e^-u on the node's range so that nothing underflows
      let shift = -Infinity;
      for (let k = 0; k <= c1 - c0; k++) shift = Math.max(shift, grid.nodeA1[j]! * (t0 + k * h) - Math.exp(t0 + k * h));
      const f = (t: number) => {
        const c = cfn ? cfn(grid.nodeObsA[j]! + (grid.slope * t) / Math.LN10) : 1;
        return Math.exp(grid.nodeA1[j]! * t - Math.exp(t) - shift) * c;
      };
      const cum = [0];
      const m = 8;
      for (let k = 0; k < c1 - c0; k++) {
        const a = t0 + k * h;
        const d = h / m;
        let s = f(a) + f(a + h);
        for (let i = 1; i < m; i++) s += (i % 2 ? 4 : 2) * f(a + i * d);
        cum.push(cum[k]! + (s * d) / 3);
      }
      const total = cum[cum.length - 1]!;
      expect(total).toBeGreaterThan(0);
      for (let k = 0; k < c1 - c0; k++)
        worst = Math.max(worst, Math.abs(tables.cellCum[c0 + k]! - cum[k + 1]! / total));
    }
    expect(worst).toBeLessThan(1e-5);
  });
});

describe('inverse tables against the rejection sampler: two-sample KS at the main node of each slice', () => {
  test.each(all)('%s', (_name, grid) => {
    const n = 40_000;
    const crit = Math.sqrt(Math.log(2 / 1e-5) / 2) * Math.sqrt(2 / n);
    const table = new CatalogueSampler(grid, tablesOf(grid));
    const main = mainNodes(grid);
    // the rejection sampler's envelope only where it is drawn from
    const rejection = new RejectionSampler(grid, buildRejectionTables(grid, new Set(main)));
    const r1 = (mt19937.factory({ seed: 7 }) as unknown as { normalized: () => number }).normalized;
    const r2 = (mt19937.factory({ seed: 8 }) as unknown as { normalized: () => number }).normalized;
    for (const j of main) {
      const a = new Float64Array(n);
      const b = new Float64Array(n);
      for (let i = 0; i < n; i++) a[i] = table.drawT(j, r1);
      for (let i = 0; i < n; i++) b[i] = rejection.drawT(j, r2);
      a.sort();
      b.sort();
      let i = 0;
      let k = 0;
      let d = 0;
      while (i < n && k < n) {
        if (a[i]! <= b[k]!) i++;
        else k++;
        d = Math.max(d, Math.abs(i - k) / n);
      }
      expect(d, `node ${j}`).toBeLessThan(crit);
      for (const t of [a[0]!, a[n - 1]!]) {
        expect(t).toBeGreaterThanOrEqual(grid.nodeTLim[j]!);
        expect(t).toBeLessThanOrEqual(grid.nodeTMax[j]!);
      }
    }
    expect(rejection.envelopeMisses).toBe(0);
  });
});
