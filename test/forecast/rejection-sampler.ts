/**
 * The rejection sampler the mocks used before the inverse tables of src/forecast/sampler.ts (kept
 * here as the reference the tables are tested against): t = ln u drawn exactly from
 * u^(alpha+1) exp(-u) c(t) on [t_lim, t_max] by rejection (von Neumann 1951; Devroye 1986, section
 * II.3) under a piecewise-constant envelope on cells of width <= 0.02, each 1.05 times the largest
 * of f at its ends and middle; a draw above the envelope is counted in `envelopeMisses`.
 */
import { completenessOfGrid } from '../../src/forecast/sampler.js';
import type { CompletenessFn } from '../../src/selection/completeness.js';
import type { DensityGrid } from '../../src/forecast/grid.js';

const CELL = 0.02;
const ENVELOPE_MARGIN = 1.05;
const LN10 = Math.LN10;

export interface RejectionTables {
  /** Cells of node j: cellStart[j] .. cellStart[j+1]-1; cumulative envelope mass within the node. */
  cellStart: Int32Array;
  cellCum: Float64Array;
  /** Envelope value of each cell (f scaled by exp(-nodeShift)). */
  cellEnv: Float64Array;
  nodeCellWidth: Float64Array;
  /** ln f is shifted by this per node to keep values near 1. */
  nodeShift: Float64Array;
}

/** ln of the unnormalised density in t at node j: (alpha+1) t - e^t + ln c. */
function logF(grid: DensityGrid, cfn: CompletenessFn | undefined, j: number, t: number): number {
  const base = grid.nodeA1[j]! * t - Math.exp(t);
  if (!cfn) return base;
  const c = cfn(grid.nodeObsA[j]! + (grid.slope * t) / LN10);
  return c > 0 ? base + Math.log(c) : -Infinity;
}

/** The tables of every node, or only of the nodes in `only` (the others get no cells and cannot be drawn at). */
export function buildRejectionTables(grid: DensityGrid, only?: ReadonlySet<number>): RejectionTables {
  const cfn = completenessOfGrid(grid);
  const nNodes = grid.nodeZ.length;
  const cellStart = [0];
  const cellCum: number[] = [];
  const cellEnv: number[] = [];
  const nodeCellWidth = new Float64Array(nNodes);
  const nodeShift = new Float64Array(nNodes);
  for (let j = 0; j < nNodes; j++) {
    if (only && !only.has(j)) {
      cellStart.push(cellCum.length);
      continue;
    }
    const t0 = grid.nodeTLim[j]!;
    const t1 = grid.nodeTMax[j]!;
    const nCells = Math.max(1, Math.ceil((t1 - t0) / CELL));
    const h = (t1 - t0) / nCells;
    nodeCellWidth[j] = h;
    // values of ln f at cell ends and middles
    const ends: number[] = [];
    const mids: number[] = [];
    let maxLog = -Infinity;
    for (let k = 0; k <= nCells; k++) {
      const v = logF(grid, cfn, j, t0 + k * h);
      ends.push(v);
      if (v > maxLog) maxLog = v;
      if (k < nCells) {
        const m = logF(grid, cfn, j, t0 + (k + 0.5) * h);
        mids.push(m);
        if (m > maxLog) maxLog = m;
      }
    }
    nodeShift[j] = Number.isFinite(maxLog) ? maxLog : 0;
    let cum = 0;
    const first = cellCum.length;
    for (let k = 0; k < nCells; k++) {
      const env = ENVELOPE_MARGIN * Math.exp(Math.max(ends[k]!, ends[k + 1]!, mids[k]!) - nodeShift[j]!);
      cellEnv.push(env);
      cum += env * h;
      cellCum.push(cum);
    }
    for (let k = first; k < cellCum.length; k++) cellCum[k] = cum > 0 ? cellCum[k]! / cum : 1;
    cellCum[cellCum.length - 1] = 1;
    cellStart.push(cellCum.length);
  }
  return {
    cellStart: Int32Array.from(cellStart),
    cellCum: Float64Array.from(cellCum),
    cellEnv: Float64Array.from(cellEnv),
    nodeCellWidth,
    nodeShift,
  };
}

/** First index i in [lo, hi) with cum[i] > x (cum ascending, last = 1). */
function search(cum: Float64Array, lo: number, hi: number, x: number): number {
  let a = lo;
  let b = hi - 1;
  while (a < b) {
    const m = (a + b) >>> 1;
    if (cum[m]! > x) b = m;
    else a = m + 1;
  }
  return a;
}

export class RejectionSampler {
  /** Draws that landed above the envelope (should stay 0). */
  envelopeMisses = 0;
  private readonly cfn: CompletenessFn | undefined;

  constructor(
    readonly grid: DensityGrid,
    readonly tables: RejectionTables,
  ) {
    this.cfn = completenessOfGrid(grid);
  }

  /** One exact draw of t at node j by rejection under the cell envelope. */
  drawT(j: number, rand: () => number): number {
    const { grid, tables } = this;
    const c0 = tables.cellStart[j]!;
    const c1 = tables.cellStart[j + 1]!;
    const h = tables.nodeCellWidth[j]!;
    const shift = tables.nodeShift[j]!;
    const tLim = grid.nodeTLim[j]!;
    for (;;) {
      const k = search(tables.cellCum, c0, c1, rand());
      const t = tLim + (k - c0 + rand()) * h;
      const f = Math.exp(logF(grid, this.cfn, j, t) - shift);
      const env = tables.cellEnv[k]!;
      if (f > env) this.envelopeMisses++;
      if (rand() * env < f) return t;
    }
  }
}
