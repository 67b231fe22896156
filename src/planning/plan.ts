/**
 * plan: a survey, the population of interest and its plan (the `plan:` section of a plan file,
 * read by the loader: src/survey/plan-section.ts) in, the designs that spend the time budget and
 * the best of them out (the JSON of specs/plan.schema.json). The library's `plan(survey)`
 * (src/library/plan.ts) reads the section and calls `planDesigns`.
 */
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { describeModel } from '../population/describe.js';
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import type { Plan, PlanDesign } from '../model/outputs/plan.js';
import { inputError } from '../errors.js';
import type { PlanSpec } from '../model/plan.js';
import { parameterNames } from '../model/population.js';
import { frameCount, makeDepthModel } from './depth.js';
import { precise } from '../render/format.js';
import { assertCounts, buildDesignModel, sigmasOf, type DesignModel } from './model.js';
import {
  better,
  combine,
  logGrid,
  maximises,
  nearBest,
  pointingsFor,
  searchSingleTier,
  searchTiers,
  NEAR_BEST_TOLERANCE,
  type Budget,
  type Evaluated,
} from './search.js';
import { warning, mergeWarnings, type Warning } from '../warnings.js';
import { drawAgreement, robustGoals, ROBUST_DRAWS, type RobustResult } from './robust.js';
import { surveyWarnings } from '../population/warnings.js';
import { predictionWarnings } from '../counts/predict.js';
import { quadratureWarnings } from '../forecast/grid.js';
import { refuseScatteredRedshifts, surveyForPopulation } from '../model/select.js';
import { removingSelectionHint } from '../selection/describe.js';
import { assertConvergent } from '../counts/engine.js';

/**
 * The optimum is called flat when the designs within NEAR_BEST_TOLERANCE of the best span this
 * factor or more in area (from about 0.85 to 1.2 times the best's): a property of the optimum,
 * whatever the exposure grid. (The share of the grid's designs within it, used before, depended on
 * how wide a grid was asked for: the same optimum was flat on a narrow grid and sharp on a wide one.)
 */
const FLAT_AREA_SPAN = Math.SQRT2;

export const PLAN_CAVEAT =
  'A plan is only as good as the luminosity function assumed: the counts and uncertainties hold if the population follows the model given; a different faint-end slope or knee changes which design is best.';

export interface PlanOptions {
  population?: string;
  /** Cosmic variance in the sigma goal (default true). */
  cosmicVariance?: boolean;
  /** Worker threads for the depth tables (default: chosen by the amount of work, see model.ts). */
  workers?: number;
  onProgress?: (stage: string, done: number, total: number) => void;
  /** plan.robust: the model draws the designs are ranked over (default ROBUST_DRAWS) and their seed (default 1). */
  robustDraws?: number;
  robustSeed?: number;
  /** plan.robust: how each draw's sums are computed (src/planning/robust.ts; default 'auto'; the results agree to 1e-8). */
  robustSums?: 'auto' | 'exact' | 'series';
}

function finite(x: number, what: string): number {
  if (!Number.isFinite(x)) throw new Error(`internal: ${what} is not finite`);
  return x;
}

function designJson(e: Evaluated, names: string[], goal: PlanSpec['goal'], robust?: RobustResult): PlanDesign {
  const deepest = e.tiers.reduce((a, t) => (t.hours > a.hours ? t : a), e.tiers[0]!);
  const d: PlanDesign = {
    exposure_hours_per_pointing: deepest.hours,
    pointings: e.tiers.reduce((a, t) => a + t.pointings, 0),
    area_deg2: e.tiers.reduce((a, t) => a + t.areaDeg2, 0),
    limit: deepest.limit,
    count: e.count,
    faint_count: e.faintCount,
    goal_value: finite(e.goal ?? NaN, 'a goal value'),
    hours_used: e.hoursUsed,
    meets_minimum_count: e.feasible,
  };
  const pessimistic = robust?.value(e);
  if (pessimistic !== undefined) d.goal_value_pessimistic = pessimistic;
  if (goal.kind === 'sigma') {
    const s = sigmasOf(e.fisher);
    if (s) {
      d.sigma = {};
      names.forEach((n, i) => (d.sigma![n] = s[i]!));
    }
  }
  if (e.tiers.length > 1) {
    d.tiers = e.tiers.map((t, i) => ({
      budget_fraction: e.fractions[i]!,
      exposure_hours_per_pointing: t.hours,
      pointings: t.pointings,
      area_deg2: t.areaDeg2,
      limit: t.limit,
      count: t.count,
    }));
  }
  return d;
}

/**
 * The designs of `spec` for `population` of the survey `file` (a single Schechter population:
 * see choosePopulation in src/forecast/forecast.ts).
 */
export async function planDesigns(
  file: Survey,
  population: Population,
  spec: PlanSpec,
  opts: PlanOptions = {},
): Promise<Plan> {
  refuseScatteredRedshifts(file);
  // The population's own window and slices, as a file holding it alone.
  const survey = surveyForPopulation(file, population);
  // a count that diverges at z = 0 is refused as predict refuses it, with or without cosmic variance
  assertConvergent(survey, population, survey.sliceEdges);
  const depth = makeDepthModel(spec.limitKind, spec.depthLaw);
  const names: string[] = parameterNames(population);
  const parameterIndex = spec.goal.kind === 'sigma' ? names.indexOf(spec.goal.parameter) : 0;
  const budget: Budget = {
    budgetHours: spec.budgetHours,
    overheadHours: spec.overheadHours,
    minimumCount: spec.minimumCount,
  };
  const useCv = opts.cosmicVariance !== false;
  const workers = opts.workers;
  const progress = (stage: string) =>
    opts.onProgress ? (d: number, t: number) => opts.onProgress!(stage, d, t) : undefined;
  const notes: string[] = [];

  // The exposures the plan can use, and the pointings they give.
  let exposures: number[];
  let fixedDesign: { hours: number; pointings: number } | undefined;
  if (spec.fixed) {
    if ('areaDeg2' in spec.fixed) {
      const p = Math.ceil(spec.fixed.areaDeg2 / spec.fieldOfViewDeg2 - 1e-9);
      fixedDesign = { hours: spec.budgetHours / p - spec.overheadHours, pointings: p };
      notes.push(
        `The area is fixed: ${p} whole pointings cover at least ${spec.fixed.areaDeg2} deg^2, each exposed for the rest of the budget.`,
      );
    } else {
      const h = depth.hoursFor(spec.fixed.limit);
      if (!(h > 0) || !Number.isFinite(h) || h + spec.overheadHours > spec.budgetHours) {
        throw inputError(
          'out_of_range',
          survey.file,
          'plan.fixed.limit',
          `needs ${h.toPrecision(4)} h per pointing, more than budget_hours (${spec.budgetHours} h) allows for one pointing`,
          'choose a brighter limit or raise budget_hours',
        );
      }
      fixedDesign = { hours: h, pointings: 0 };
      notes.push(
        `The limit is fixed: ${h.toPrecision(4)} h per pointing reaches it; the budget buys as many whole pointings as fit.`,
      );
    }
    exposures = [fixedDesign.hours];
  } else {
    exposures = logGrid(spec.grid.minHours, spec.grid.maxHours, spec.grid.count);
  }
  const hMin = exposures[0]!;
  const hMax = exposures[exposures.length - 1]!;
  const maxP = Math.max(1, Math.floor(spec.budgetHours / (hMin + spec.overheadHours) + 1e-9));
  const minP = Math.max(1, Math.floor(((spec.budgetHours / spec.tiers) * 0.1) / (hMax + spec.overheadHours)));

  const model: DesignModel = await buildDesignModel(
    survey,
    population,
    { ...spec, depth },
    [hMin, hMax],
    [Math.min(minP, maxP), maxP],
    {
      cosmicVariance: useCv,
      ...(workers ? { workers } : {}),
      ...(progress('depth tables') ? { onProgress: progress('depth tables')! } : {}),
    },
  );
  assertCounts(model, survey.file, removingSelectionHint(file, [population]));

  let designs: Evaluated[];
  let best: Evaluated;
  let gridBest: Evaluated;
  let neighbours: Evaluated[] = [];
  let improved = false;
  let method: string;
  if (fixedDesign) {
    const p =
      fixedDesign.pointings > 0
        ? Math.min(model.maxPointings, fixedDesign.pointings)
        : pointingsFor(model, spec.budgetHours, fixedDesign.hours, spec.overheadHours);
    const e = combine(spec.goal, parameterIndex, budget, [model.tier(fixedDesign.hours, p)], [1]);
    designs = [e];
    best = gridBest = e;
    method = 'none: the fixed area or limit leaves one design';
  } else {
    // With tiers only the single tier's best designs are wanted: its grid is not kept.
    const single = searchSingleTier(
      model,
      spec.goal,
      parameterIndex,
      budget,
      exposures,
      progress('designs'),
      spec.tiers === 1,
    );
    if (single.gridBestIndex < 0) throw noFeasible(survey, spec, single.mostCount);
    gridBest = single.design(single.gridBestIndex);
    best = single.best;
    improved = single.refined;
    neighbours = [];
    for (let i = Math.max(0, single.gridBestIndex - 2); i < Math.min(single.size, single.gridBestIndex + 3); i++)
      neighbours.push(single.design(i));
    designs = spec.tiers === 1 ? single.designs() : [];
    method =
      'log-spaced grid of exposure per pointing, then golden-section search on the number of pointings (each exposed for the whole remaining budget) between the grid neighbours of the best, whole pointings enforced';
    if (spec.tiers > 1) {
      const tiered = searchTiers(model, spec.goal, parameterIndex, budget, exposures, spec.tiers, progress('tiers'));
      method += `; ${spec.tiers} tiers: every split of the budget in tenths, coordinate descent over each tier's grid exposure`;
      designs = tiered.designs;
      neighbours = [];
      const singleBest = best;
      const tb = tiered.designs.reduce<Evaluated | undefined>(
        (a, d) => (d.feasible && (!a || (maximises(spec.goal) ? d.goal! > a.goal! : d.goal! < a.goal!)) ? d : a),
        undefined,
      );
      if (tb && (maximises(spec.goal) ? tb.goal! > singleBest.goal! : tb.goal! < singleBest.goal!)) {
        best = tb;
        gridBest = tb;
        improved = false;
      } else {
        notes.push(
          `No split into ${spec.tiers} tiers beats the best single-tier design for this goal, so the best design is a single tier.`,
        );
        designs = [...tiered.designs, singleBest];
      }
    }
  }
  if (!best.feasible)
    throw noFeasible(
      survey,
      spec,
      designs.reduce((a, d) => Math.max(a, d.count), 0),
    );

  // plan.robust: every design's goal at the model's pessimistic case, and the best by it
  let robust: RobustResult | undefined;
  const assumedBest = best;
  if (spec.robust) {
    robust = robustGoals(
      {
        file,
        population,
        model,
        goal: spec.goal,
        parameterIndex,
        draws: opts.robustDraws ?? ROBUST_DRAWS,
        seed: opts.robustSeed ?? 1,
        ...(opts.robustSums ? { sums: opts.robustSums } : {}),
      },
      [...designs, best, gridBest, ...neighbours],
    );
    const r = robust;
    best = [...designs, assumedBest].reduce((a, d) => {
      const v = r.value(d);
      const va = r.value(a);
      if (!d.feasible || v === undefined) return a;
      return va === undefined || better(spec.goal, v, va) ? d : a;
    }, assumedBest);
  }

  const bestValue = assumedBest.goal!;
  const edge = fixedDesign ? undefined : gridEdgeWarning(assumedBest, exposures, spec);
  const within = nearBest(spec.goal, designs, bestValue);
  const areaOf = (d: Evaluated) => d.tiers.reduce((a, t) => a + t.areaDeg2, 0);
  // the best design is within the tolerance of itself: the range holds it even when it was found
  // off the grid, by the refinement
  const order = [...within.map((i) => designs[i]!), assumedBest].sort((a, b) => areaOf(a) - areaOf(b));
  const from = order[0] ?? assumedBest;
  const to = order[order.length - 1] ?? assumedBest;
  const contiguous = within.length > 0 && within[within.length - 1]! - within[0]! + 1 === within.length;
  const limitedByBudget = !fixedDesign && assumedBest.tiers.some((_, i) => budgetLimited(assumedBest, i, spec));
  if (designs.length > 1 && within.length > 0) {
    const head = `${within.length} of ${designs.length} designs ${within.length === 1 ? 'is' : 'are'} within ${NEAR_BEST_TOLERANCE * 100} % of the best goal value${contiguous ? '' : ' (not one contiguous run of the grid)'}`;
    // At the grid's edge, or at the budget's (one pointing taking all of it), the goal may keep
    // improving beyond it: how flat the optimum is cannot be told. (A layer of several taking its
    // share in one pointing is not at such an edge: the search moves the shares.)
    notes.push(
      edge
        ? `${head}; the best design sits at the edge of the exposure grid, so this grid cannot tell how flat the optimum is.`
        : limitedByBudget && assumedBest.tiers.length === 1
          ? `${head}; the best design is as deep as the budget allows, so how flat the optimum is cannot be told.`
          : `${head}: the optimum is ${areaOf(to) >= FLAT_AREA_SPAN * areaOf(from) ? 'flat' : 'sharp'}.`,
    );
  }
  if (limitedByBudget) {
    const who =
      assumedBest.tiers.length > 1 ? 'A layer of the best design spends its share' : 'The best design spends all';
    notes.push(
      `${who} of the budget on one pointing: its depth is limited by budget_hours, not by the exposure grid, and only a larger budget would go deeper.`,
    );
  }
  if (spec.minimumCount > 0) {
    const excluded = designs.filter((d) => d.goal !== undefined && !d.feasible).length;
    if (excluded > 0)
      notes.push(
        `${excluded} design${excluded === 1 ? '' : 's'} ${excluded === 1 ? 'expects' : 'expect'} fewer than minimum_count (${spec.minimumCount}) sources and cannot be the best.`,
      );
  }
  if (designs.some((d) => d.tiers.some((t) => t.areaDeg2 >= model.maxPointings * spec.fieldOfViewDeg2 - 1e-9))) {
    notes.push('Some designs reach the whole sky; their pointings are capped there.');
  }

  const law = spec.depthLaw;
  const out: Plan = {
    format: 1,
    title: survey.title,
    cosmology: cosmologyJsonOf(survey.cosmology),
    population: population.name,
    model: describeModel(survey, population),
    caveat: PLAN_CAVEAT,
    goal: spec.goal.kind === 'sigma' ? { sigma: spec.goal.parameter } : spec.goal.kind,
    goal_direction: maximises(spec.goal) ? 'maximise' : 'minimise',
    budget_hours: spec.budgetHours,
    overhead_hours: spec.overheadHours,
    field_of_view_deg2: spec.fieldOfViewDeg2,
    limit_variable: spec.limitKind === 'magnitude' ? 'apparent_magnitude' : 'line_flux_cgs',
    ...(spec.limitUnit ? { limit_unit: spec.limitUnit } : {}),
    depth_law:
      law.kind === 'table'
        ? { kind: 'table', table: law.hours.map((h, i) => [h, law.limits[i]!] as [number, number]) }
        : law.kind === 'noise'
          ? {
              kind: 'noise',
              reference_limit: law.referenceLimit,
              reference_exposure_hours: law.referenceHours,
              sky_to_source: law.skyToSource,
              read_to_source: law.readToSource,
              frame_hours: law.frameHours,
              reference_frames: frameCount(law.referenceHours, law.frameHours),
            }
          : { kind: law.kind, reference_limit: law.referenceLimit, reference_exposure_hours: law.referenceHours },
    cosmic_variance: useCv,
    minimum_count: spec.minimumCount,
    exposure_grid: { min_hours: spec.grid.minHours, max_hours: spec.grid.maxHours, count: spec.grid.count },
    tiers: spec.tiers,
    designs: designs.filter((d) => d.goal !== undefined).map((d) => designJson(d, names, spec.goal, robust)),
    best: designJson(best, names, spec.goal, robust),
    neighbours: neighbours.filter((d) => d.goal !== undefined).map((d) => designJson(d, names, spec.goal, robust)),
    near_best: {
      tolerance: NEAR_BEST_TOLERANCE,
      from: designJson(from, names, spec.goal, robust),
      to: designJson(to, names, spec.goal, robust),
      designs_within: within.length,
      contiguous,
    },
    refinement: { method, grid_best: designJson(gridBest, names, spec.goal, robust), improved },
    notes,
    warnings: mergeWarnings(
      surveyWarnings(survey),
      predictionWarnings(survey, [population]),
      edge ? [edge] : [],
      quadratureWarnings(population.name, model.reference.sliceEdges, model.grid.quadratureMissed),
    ),
  };
  if (spec.fixed)
    out.fixed = 'areaDeg2' in spec.fixed ? { area_deg2: spec.fixed.areaDeg2 } : { limit: spec.fixed.limit };
  if (robust) {
    const same = best === assumedBest;
    // the designs the robust ranking chose among, each draw's ranking of them
    const ranked = [...designs, assumedBest].filter((d) => d.feasible && robust.value(d) !== undefined);
    const agreement = drawAgreement(robust, maximises(spec.goal), best, ranked, NEAR_BEST_TOLERANCE);
    const pct = (f: number) => `${precise(100 * f, 3)} %`;
    const what = spec.goal.kind === 'sigma' ? 'the 84th percentile of the sigma' : 'the 16th percentile of the count';
    out.robust = {
      draws: robust.draws,
      seed: opts.robustSeed ?? 1,
      source: robust.source,
      percentile: robust.percentile,
      best_assumed: designJson(assumedBest, names, spec.goal, robust),
      best_robust: designJson(best, names, spec.goal, robust),
      same_design: same,
      agreement,
      notes: [
        `Designs ranked by the goal at the model's pessimistic case: ${what} over ${robust.draws} ${robust.source === 'draws_file' ? 'rows of the draws file' : 'draws of model_uncertainty'}; best is the best design so ranked, among the designs listed and the refined best under the assumed values.`,
        same
          ? 'The same design is best under the assumed values and across the model.'
          : 'The best design across the model differs from the best under the assumed values; near_best, neighbours and refinement describe the search under the assumed values.',
        `Draw by draw, the best design across the model is the best of the designs ranked in ${pct(agreement.best_fraction)} of the ${agreement.draws_ranked} draws that rank them, and within ${NEAR_BEST_TOLERANCE * 100} % of that draw's best in ${pct(agreement.near_best_fraction)}.`,
      ],
    };
  }
  if (spec.tiers > 1) out.budget_fractions = designs.filter((d) => d.tiers.length > 1).map((d) => d.fractions);
  return out;
}

/**
 * A warning when a layer of the best design uses an exposure in the first or last interval of the
 * exposure grid (the refinement of a single tier moves only between grid neighbours): the
 * optimum may lie beyond the grid. Undefined otherwise.
 */
export function gridEdgeWarning(best: Evaluated, exposures: readonly number[], spec: PlanSpec): Warning | undefined {
  if (exposures.length < 3) return undefined;
  const low = exposures[1]!;
  const high = exposures[exposures.length - 2]!;
  const fmt = (x: number) => precise(x, 3);
  for (const [i, t] of best.tiers.entries()) {
    const end = t.hours < low ? 'shortest' : t.hours > high ? 'longest' : undefined;
    if (!end) continue;
    // One pointing already exposed for its whole share of the budget: a longer exposure buys no
    // pointing, so a wider grid cannot hold a better design (budgetLimited says so in a note).
    if (end === 'longest' && budgetLimited(best, i, spec)) continue;
    const layer = best.tiers.length > 1 ? 'a layer of the best design uses' : 'the best design uses';
    const widen =
      end === 'shortest'
        ? `a smaller exposure_grid.min_hours than ${fmt(spec.grid.minHours)}`
        : `a larger exposure_grid.max_hours than ${fmt(spec.grid.maxHours)}`;
    return warning(
      'optimum_at_grid_edge',
      `${layer} ${fmt(t.hours)} h per pointing, at the ${end} end of the exposure grid (${fmt(spec.grid.minHours)} to ${fmt(spec.grid.maxHours)} h): a better design may lie beyond it; plan again with ${widen}`,
    );
  }
  return undefined;
}

/**
 * True when tier i of a design is one pointing whose exposure already takes the whole of its share
 * of the budget (less the overhead) and the grid reaches that long: no longer exposure is possible.
 */
export function budgetLimited(design: Evaluated, i: number, spec: PlanSpec): boolean {
  const t = design.tiers[i]!;
  const longest = spec.budgetHours * (design.fractions[i] ?? 1) - spec.overheadHours;
  return t.pointings === 1 && spec.grid.maxHours >= longest * (1 - 1e-9);
}

/** The error when no design is feasible; `most` is the largest count of any design. */
function noFeasible(survey: Survey, spec: PlanSpec, most: number): Error {
  if (spec.minimumCount > 0 && most < spec.minimumCount) {
    return inputError(
      'out_of_range',
      survey.file,
      'plan.minimum_count',
      `is ${spec.minimumCount} but no design expects that many sources (the most is ${most.toPrecision(4)})`,
      'lower minimum_count or raise budget_hours',
    );
  }
  return inputError(
    'singular_fisher',
    survey.file,
    'plan.goal',
    'cannot be computed for any design (too few sources for a Fisher matrix)',
    'raise budget_hours or choose the count goal',
  );
}
