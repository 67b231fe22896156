/**
 * The forecast's density grid as src/forecast/grid.ts built it before its panels in t = ln u were
 * allowed 0.6 wide beyond 8 logistic widths of the completeness's half point: every panel no
 * wider than one logistic width over the whole range. Kept as the reference the faster grid is
 * checked against (test/forecast/grid-panels.test.ts).
 */
import type { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import type { Population } from '../../src/model/population.js';
import type { Survey } from '../../src/model/survey.js';
import { featureBreaks, filterBreaks, igmBreaks, piecewiseRedshiftNodes } from '../../src/counts/engine.js';
import { upperGamma } from '../../src/numerics/gamma.js';
import { keptBreaks, panelNodes, type PanelNodes } from '../../src/numerics/quadrature.js';
import { makeObserver } from '../../src/selection/observe.js';
import { selectionEffects } from '../../src/selection/effects.js';
import { completenessBreaks, completenessFunction } from '../../src/selection/completeness.js';
import { populationAt } from '../../src/population/model.js';
import { characteristicShift } from '../../src/forecast/parameters.js';
import type { DensityGrid } from '../../src/forecast/grid.js';

const LN10 = Math.LN10;
const PANEL_POINTS = 8;
const MAX_PANEL_T = 0.6;
const U_BRIGHT_SPAN = 40;

/** The grid as built before the panels widened away from a logistic completeness's half point (every panel no wider than one logistic width). */
export function buildFineDensityGrid(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  edges: readonly number[],
): DensityGrid {
  const observer = makeObserver(survey.detection, population, cosmo);
  // The redshift selection and the equivalent-width cut multiply the density like a completeness.
  const effects = selectionEffects(survey.detection, population);
  const comp = survey.detection.completeness;
  const cfn = comp ? completenessFunction(comp, survey.detection.kind, population.variable) : undefined;
  const breaks = comp ? completenessBreaks(comp, survey.detection.kind, population.variable) : undefined;
  const slope = observer.slope;
  const maxStep = Math.min(
    MAX_PANEL_T,
    breaks && Number.isFinite(breaks.scale) ? (breaks.scale * LN10) / Math.abs(slope) : MAX_PANEL_T,
  );
  const panels: PanelNodes = { x: new Float64Array(256), w: new Float64Array(256), count: 0 };

  const sliceNodeStart: number[] = [0];
  const nodeZ: number[] = [];
  const nodeA1: number[] = [];
  const nodeObsA: number[] = [];
  const nodeLogV: number[] = [];
  const nodeTLim: number[] = [];
  const nodeTMax: number[] = [];
  const nodePointStart: number[] = [0];
  const pointT: number[] = [];
  const pointLogW: number[] = [];
  const pointA1: number[] = [];

  for (let s = 0; s + 1 < edges.length; s++) {
    const lo = Math.max(edges[s]!, population.window.min);
    const hi = Math.min(edges[s + 1]!, population.window.max);
    if (hi > lo) {
      // The count engine's redshift nodes (the order chosen by convergence of the hard-limit count).
      // Model and observation at z, cached: the chosen nodes are among those the order search visits.
      const cache = new Map<number, { p: ReturnType<typeof populationAt>; obs: ReturnType<typeof observer.at> }>();
      const at = (zi: number) => {
        let hit = cache.get(zi);
        if (!hit) {
          const p = populationAt(population, zi);
          hit = { p, obs: observer.at(zi, p.characteristic) };
          cache.set(zi, hit);
        }
        return hit;
      };
      const hardCount = (zi: number): number => {
        const { p, obs } = at(zi);
        if (!Number.isFinite(obs.log10ULimit)) return 0;
        const u = 10 ** obs.log10ULimit;
        let n = 0;
        for (const c of p.components) n += c.phiStar * upperGamma(c.alpha + 1, u);
        return cosmo.volumeElementMpc3Sr(zi) * n * effects.weight(zi);
      };
      // the redshift nodes of src/forecast/grid.ts (its cuts: the selection's, a parameter's narrow
      // features, a tabulated filter's rows, the intergalactic transmission's jumps and kinks)
      const extra = [
        ...featureBreaks(survey, population, lo, hi),
        ...filterBreaks(survey, population, lo, hi),
        ...igmBreaks(survey, lo, hi),
      ];
      const cuts =
        extra.length > 0 ? keptBreaks([...effects.breaks(lo, hi), ...extra], lo, hi) : effects.breaks(lo, hi);
      const { z, w } = piecewiseRedshiftNodes([lo, ...cuts, hi], hardCount);
      for (let i = 0; i < z.length; i++) {
        const zi = z[i]!;
        const { p, obs } = at(zi);
        const kept = effects.weight(zi);
        if (!Number.isFinite(obs.log10ULimit) || !(kept > 0)) continue;
        const c0 = p.components[0]!;
        const tLim = LN10 * obs.log10ULimit;
        const uLim = Math.exp(tLim);
        const tMax = Math.log((uLim > 1 ? uLim : 1) + U_BRIGHT_SPAN);
        const logV = Math.log(survey.areaSr * cosmo.volumeElementMpc3Sr(zi) * w[i]! * c0.phiStar * kept);
        const a1 = c0.alpha + 1;
        // Panel cuts: the ends and completeness break points in between.
        const cuts = [tLim, tMax];
        if (breaks) {
          for (const bp of breaks.points) {
            const t = (LN10 * (bp - obs.a)) / slope;
            if (t > tLim && t < tMax) cuts.push(t);
          }
        }
        const pn = panelNodes(cuts, maxStep, PANEL_POINTS, panels);
        for (let q = 0; q < pn.count; q++) {
          const t = pn.x[q]!;
          const c = cfn ? cfn(obs.a + (slope * t) / LN10) : 1;
          if (!(c > 0)) continue;
          pointT.push(t);
          pointLogW.push(logV + Math.log(pn.w[q]! * c));
          pointA1.push(a1);
        }
        nodeZ.push(zi);
        nodeA1.push(a1);
        nodeObsA.push(obs.a);
        nodeLogV.push(logV);
        nodeTLim.push(tLim);
        nodeTMax.push(tMax);
        nodePointStart.push(pointT.length);
      }
    }
    sliceNodeStart.push(nodeZ.length);
  }
  const grid: DensityGrid = {
    shift: characteristicShift(population),
    slope,
    edges: [...edges],
    sliceNodeStart: Int32Array.from(sliceNodeStart),
    nodeZ: Float64Array.from(nodeZ),
    nodeA1: Float64Array.from(nodeA1),
    nodeObsA: Float64Array.from(nodeObsA),
    nodeLogV: Float64Array.from(nodeLogV),
    nodeTLim: Float64Array.from(nodeTLim),
    nodeTMax: Float64Array.from(nodeTMax),
    nodePointStart: Int32Array.from(nodePointStart),
    pointT: new Float64Array(pointT),
    pointExpT: expOf(pointT),
    pointLogW: new Float64Array(pointLogW),
    pointA1: new Float64Array(pointA1),
    kind: survey.detection.kind,
    variable: population.variable,
  };
  if (comp) grid.completeness = comp;
  return grid;
}

function expOf(xs: number[]): Float64Array {
  const out = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) out[i] = Math.exp(xs[i]!);
  return out;
}
