/**
 * faintCounter (src/planning/tables.ts), which keeps the pieces of each node's range that the shift
 * Delta does not move, equals the faint count that made every panel afresh
 * (test/planning/faint-panels.ts, the code it replaced) exactly: tolerance 0, the same terms summed
 * in the same order, count and derivative, for every slice of the plan samples' grids (logistic
 * completeness, line flux and magnitude), a tabulated completeness with several break points and
 * none at all, at Delta on the depth tables' knots and between them, in ascending, descending
 * and repeated order (the kept pieces must not depend on which Delta came first).
 */
import { describe, expect, test } from 'vitest';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { buildDensityGrid, sliceCount, type DensityGrid } from '../../src/forecast/grid.js';
import { faintCount, faintCounter, KNOT_STEP } from '../../src/planning/tables.js';
import { faintCountWithPanels } from './faint-panels.js';
import { sample } from './helpers.js';
import type { Survey } from '../../src/model/survey.js';

function gridOf(survey: Survey): DensityGrid {
  return buildDensityGrid(survey, survey.populations[0]!, new FlatCosmology(survey.cosmology), survey.sliceEdges);
}

const surveys: [string, () => Survey][] = [
  ['H-alpha layers (line flux, logistic)', () => sample('plan-halpha-layers.yaml')],
  ['UV deep and wide (magnitude, logistic)', () => sample('plan-uv-deep-wide.yaml')],
  ['robust UV (magnitude, logistic)', () => sample('plan-robust-uv-slope.yaml')],
  [
    'H-alpha layers with a tabulated completeness',
    () =>
      sample('plan-halpha-layers.yaml', (t) =>
        t.replace(
          /^\s+completeness:.*$/m,
          '  completeness: {model: table, table: [[3.16e-17, 0.1], [3.98e-17, 0.3], [6.31e-17, 0.8], [1.0e-16, 0.97], [2e-16, 1]]}',
        ),
      ),
  ],
  [
    'UV deep and wide with a tabulated completeness',
    () =>
      sample('plan-uv-deep-wide.yaml', (t) =>
        t.replace(
          /^\s+completeness:.*$/m,
          '  completeness: {model: table, table: [[27.5, 1.0], [28.5, 0.9], [29.0, 0.5], [29.6, 0.05]]}',
        ),
      ),
  ],
  [
    'H-alpha layers without completeness',
    () => sample('plan-halpha-layers.yaml', (t) => t.replace(/^\s+completeness:.*$/m, '')),
  ],
];

const knots = Array.from({ length: 80 }, (_, k) => k * KNOT_STEP);
const between = [0.013, 0.377, 1.2345, 2.71, 3.99, 6.5];
const orders: [string, number[]][] = [
  ['ascending knots', knots],
  ['descending knots', [...knots].reverse()],
  ['between knots, repeated', [...between, ...[...between].reverse(), 0]],
];

describe.each(surveys)('%s', (_name, make) => {
  const grid = gridOf(make());
  test.each(orders)('%s: every slice bit for bit', (_o, deltas) => {
    const faint = faintCounter(grid);
    const out = new Float64Array(2);
    let compared = 0;
    for (const delta of deltas)
      for (let sl = 0; sl < sliceCount(grid); sl++) {
        const want = faintCountWithPanels(grid, sl, delta);
        faint(sl, delta, out, 0);
        expect(out[0], `count, slice ${sl}, Delta ${delta}`).toBe(want.count);
        expect(out[1], `derivative, slice ${sl}, Delta ${delta}`).toBe(want.derivative);
        if (want.count > 0) compared++;
      }
    expect(compared).toBeGreaterThan(deltas.length);
  });
  test('faintCount (one Delta) equals it too', () => {
    for (let sl = 0; sl < sliceCount(grid); sl++)
      expect(faintCount(grid, sl, 0.42)).toEqual(faintCountWithPanels(grid, sl, 0.42));
  });
});
