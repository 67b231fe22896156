/**
 * The robust ranking (src/planning/robust.ts) builds its coarser density grid with the design
 * model's node-order counts (DesignModel.hardCounts: the hard-limit count by z that chooses the
 * redshift nodes, the same for any panel width). That grid equals one built afresh exactly:
 * tolerance 0, every array of the grid, on the robust plan sample (magnitude) and the H-alpha
 * layers (line flux); and the counts kept are those a fresh search makes, z for z.
 */
import { describe, expect, test } from 'vitest';
import { readPlanSection } from '../../src/survey/plan-section.js';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel } from '../../src/planning/model.js';
import { logGrid } from '../../src/planning/search.js';
import { buildDensityGrid, type DensityGrid } from '../../src/forecast/grid.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { surveyForPopulation } from '../../src/model/select.js';
import { sample } from './helpers.js';

const ARRAYS = [
  'sliceNodeStart',
  'nodeZ',
  'nodeA1',
  'nodeObsA',
  'nodeLogV',
  'nodeTLim',
  'nodeTMax',
  'nodePointStart',
  'pointT',
  'pointExpT',
  'pointLogW',
  'pointA1',
] as const;

describe.each(['plan-robust-uv-slope.yaml', 'plan-halpha-layers.yaml'])('%s', (name) => {
  test('the 2 pi grid with the design model node-order counts equals the grid made afresh', async () => {
    const s = sample(name);
    const population = s.populations[0]!;
    const spec = readPlanSection(s, population);
    const survey = surveyForPopulation(s, population);
    const exposures = logGrid(spec.grid.minHours, spec.grid.maxHours, spec.grid.count);
    const model = await buildDesignModel(
      survey,
      population,
      { ...spec, depth: makeDepthModel(spec.limitKind, spec.depthLaw) },
      [exposures[0]!, exposures[exposures.length - 1]!],
      [1, 100],
      { workers: 1 },
    );
    const ref = model.reference;
    const kept = new Map(model.hardCounts);
    expect(kept.size).toBeGreaterThan(0);
    const grid = (counts?: Map<number, number>): DensityGrid =>
      buildDensityGrid(ref, population, new FlatCosmology(ref.cosmology), ref.sliceEdges, 2 * Math.PI, counts);
    const shared = grid(model.hardCounts);
    const freshCounts = new Map<number, number>();
    const fresh = grid(freshCounts);
    for (const key of ARRAYS) expect(shared[key], key).toEqual(fresh[key]);
    expect(shared.shift).toBe(fresh.shift);
    expect(shared.slope).toBe(fresh.slope);
    // the coarser grid asked for no redshift the design model's search had not met, and the counts agree
    expect(model.hardCounts.size).toBe(kept.size);
    for (const [z, n] of freshCounts) expect(kept.get(z), `z = ${z}`).toBe(n);
  });
});
