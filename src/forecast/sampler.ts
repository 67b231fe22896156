/**
 * Drawing mock catalogues from the tabulated density (src/forecast/grid.ts).
 *
 * A source of slice s is placed at one of the slice's redshift nodes, chosen with probability
 * proportional to the node's expected count (the same quadrature the Fisher matrix and the fits
 * use, so the mock world and the model agree exactly), and given t = ln u drawn EXACTLY from
 * u^(alpha+1) exp(-u) c(t) on [t_lim, t_max] by rejection (von Neumann 1951; e.g. Devroye 1986,
 * Non-Uniform Random Variate Generation, section II.3) under a piecewise-constant envelope on
 * cells of width <= 0.02: the envelope of a cell is 1.05 times the largest of f at its ends and
 * middle (the log of f changes by well under 5 % inside such a cell; a draw above the envelope
 * is counted in `envelopeMisses`, which the tests require to stay at zero).
 * Completeness acts as the detection probability through c(t).
 *
 * A catalogue is kept only as the sufficient statistics of the likelihoods (src/forecast/fit.ts):
 * per slice the count, per node the count, and the sums of t, of alpha+1 and of e^t.
 */
import { completenessFunction, type CompletenessFn } from '../selection/completeness.js';
import type { DensityGrid } from './grid.js';
import { sliceCount } from './grid.js';

const CELL = 0.02;
const ENVELOPE_MARGIN = 1.05;
const LN10 = Math.LN10;

export interface SamplingTables {
  /** Cumulative node probabilities within each slice (last node of a slice = 1). */
  nodeCum: Float64Array;
  /** Expected count per slice at the input parameters. */
  sliceExpected: Float64Array;
  /** Cells of node j: cellStart[j] .. cellStart[j+1]-1; cumulative envelope mass within the node. */
  cellStart: Int32Array;
  cellCum: Float64Array;
  /** Envelope value of each cell (f scaled by exp(-nodeShift)). */
  cellEnv: Float64Array;
  nodeCellWidth: Float64Array;
  /** ln f is shifted by this per node to keep values near 1. */
  nodeShift: Float64Array;
}

export function completenessOfGrid(grid: DensityGrid): CompletenessFn | undefined {
  return grid.completeness ? completenessFunction(grid.completeness, grid.kind, grid.variable) : undefined;
}

/** ln of the unnormalised density in t at node j: (alpha+1) t - e^t + ln c. */
function logF(grid: DensityGrid, cfn: CompletenessFn | undefined, j: number, t: number): number {
  const base = grid.nodeA1[j]! * t - Math.exp(t);
  if (!cfn) return base;
  const c = cfn(grid.nodeObsA[j]! + (grid.slope * t) / LN10);
  return c > 0 ? base + Math.log(c) : -Infinity;
}

export function buildSamplingTables(grid: DensityGrid): SamplingTables {
  const cfn = completenessOfGrid(grid);
  const nNodes = grid.nodeZ.length;
  const nodeMass = new Float64Array(nNodes);
  for (let j = 0; j < nNodes; j++) {
    let m = 0;
    for (let q = grid.nodePointStart[j]!; q < grid.nodePointStart[j + 1]!; q++) {
      m += Math.exp(grid.pointLogW[q]! + grid.pointA1[q]! * grid.pointT[q]! - grid.pointExpT[q]!);
    }
    nodeMass[j] = m;
  }
  const nS = sliceCount(grid);
  const nodeCum = new Float64Array(nNodes);
  const sliceExpected = new Float64Array(nS);
  for (let s = 0; s < nS; s++) {
    let tot = 0;
    for (let j = grid.sliceNodeStart[s]!; j < grid.sliceNodeStart[s + 1]!; j++) tot += nodeMass[j]!;
    sliceExpected[s] = tot;
    let c = 0;
    for (let j = grid.sliceNodeStart[s]!; j < grid.sliceNodeStart[s + 1]!; j++) {
      c += nodeMass[j]!;
      nodeCum[j] = tot > 0 ? c / tot : 1;
    }
    if (grid.sliceNodeStart[s + 1]! > grid.sliceNodeStart[s]!) nodeCum[grid.sliceNodeStart[s + 1]! - 1] = 1;
  }
  const cellStart = [0];
  const cellCum: number[] = [];
  const cellEnv: number[] = [];
  const nodeCellWidth = new Float64Array(nNodes);
  const nodeShift = new Float64Array(nNodes);
  for (let j = 0; j < nNodes; j++) {
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
    nodeCum,
    sliceExpected,
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

/** Sufficient statistics of one mock catalogue. */
export interface CatalogueStats {
  /** Sources per slice. */
  sliceN: Int32Array;
  /** Sources per redshift node. */
  nodeN: Int32Array;
  /** Sum of t = ln u (u at the input parameters). */
  sumT: number;
  /** Sum of alpha(z)+1 at the sources' redshifts. */
  sumA1: number;
  /** Sum of e^t = u. */
  sumU: number;
  total: number;
}

export class CatalogueSampler {
  /** Draws that landed above the envelope (should stay 0). */
  envelopeMisses = 0;
  private readonly cfn: CompletenessFn | undefined;

  constructor(
    readonly grid: DensityGrid,
    readonly tables: SamplingTables,
  ) {
    this.cfn = completenessOfGrid(grid);
  }

  /** Draw `counts[s]` sources in each slice s with the uniform generator `rand` on [0, 1). */
  draw(counts: ArrayLike<number>, rand: () => number): CatalogueStats {
    const { grid, tables } = this;
    const nS = sliceCount(grid);
    const sliceN = new Int32Array(nS);
    const nodeN = new Int32Array(grid.nodeZ.length);
    let sumT = 0;
    let sumA1 = 0;
    let sumU = 0;
    let total = 0;
    for (let s = 0; s < nS; s++) {
      const n = counts[s]!;
      const j0 = grid.sliceNodeStart[s]!;
      const j1 = grid.sliceNodeStart[s + 1]!;
      if (n <= 0 || j1 === j0) continue;
      sliceN[s] = n;
      for (let i = 0; i < n; i++) {
        const j = search(tables.nodeCum, j0, j1, rand());
        const t = this.drawT(j, rand);
        nodeN[j]!++;
        sumT += t;
        sumA1 += grid.nodeA1[j]!;
        sumU += Math.exp(t);
        total++;
      }
    }
    return { sliceN, nodeN, sumT, sumA1, sumU, total };
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
