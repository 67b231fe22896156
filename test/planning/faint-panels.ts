/**
 * The faint count as src/planning/tables.ts computed it before faintCounter kept the pieces of each
 * node's range that the shift does not move: every node's cuts and Gauss-Legendre panels made
 * afresh at every Delta (panelNodes). The reference faintCounter is tested against, bit for bit
 * (test/planning/faint-counter.test.ts).
 */
import type { DensityGrid } from '../../src/forecast/grid.js';
import { panelNodes, type PanelNodes } from '../../src/numerics/quadrature.js';
import { completenessBreaks, completenessFunction } from '../../src/selection/completeness.js';

const LN10 = Math.LN10;
const PANEL_POINTS = 8;
const MAX_PANEL = 0.3;
const panels: PanelNodes = { x: new Float64Array(256), w: new Float64Array(256), count: 0 };

/**
 * Count of slice `sl` fainter than the characteristic value (u < 1) at Delta, and its derivative
 * in Delta: per redshift node, integral over s from s_lim to -Delta of exp(a1 (s+Delta) - e^(s+Delta))
 * c(obs(s)) ds (Gauss-Legendre panels no wider than 0.3, split at completeness break points, as
 * in the density grid); d/dDelta adds the integral of the integrand times (a1 - u) and subtracts
 * the integrand at the upper end (u = 1).
 */
export function faintCountWithPanels(
  grid: DensityGrid,
  sl: number,
  delta: number,
): { count: number; derivative: number } {
  const comp = grid.completeness;
  const cfn = comp ? completenessFunction(comp, grid.kind, grid.variable) : undefined;
  const breaks = comp ? completenessBreaks(comp, grid.kind) : undefined;
  const slope = grid.slope;
  const maxStep = Math.min(
    MAX_PANEL,
    breaks && Number.isFinite(breaks.scale) ? (breaks.scale * LN10) / Math.abs(slope) : MAX_PANEL,
  );
  let count = 0;
  let derivative = 0;
  const upper = -delta;
  for (let j = grid.sliceNodeStart[sl]!; j < grid.sliceNodeStart[sl + 1]!; j++) {
    const sLim = grid.nodeTLim[j]!;
    if (!(upper > sLim)) continue;
    const a1 = grid.nodeA1[j]!;
    const obsA = grid.nodeObsA[j]!;
    const v = Math.exp(grid.nodeLogV[j]!);
    const cuts = [sLim, upper];
    if (breaks) {
      for (const bp of breaks.points) {
        const t = (LN10 * (bp - obsA)) / slope;
        if (t > sLim && t < upper) cuts.push(t);
      }
    }
    let c = 0;
    let d = 0;
    const { x, w: wq, count: nq } = panelNodes(cuts, maxStep, PANEL_POINTS, panels);
    for (let i = 0; i < nq; i++) {
      const sv = x[i]!;
      const cv = cfn ? cfn(obsA + (slope * sv) / LN10) : 1;
      if (!(cv > 0)) continue;
      const t = sv + delta;
      const u = Math.exp(t);
      const w = wq[i]! * cv * Math.exp(a1 * t - u);
      c += w;
      d += w * (a1 - u);
    }
    const cEnd = cfn ? cfn(obsA + (slope * upper) / LN10) : 1;
    d -= Math.exp(-1) * cEnd;
    count += v * c;
    derivative += v * d;
  }
  return { count, derivative };
}
