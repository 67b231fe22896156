/**
 * The `plan:` section of a plan file (a survey file plus this section), read into plain numbers.
 * The survey loader keeps the section as an opaque object (survey.raw.plan); this module checks
 * every key (the same rules as specs/plan-section.schema.json, written out by hand so that each
 * problem becomes one sentence naming the file, the key path and the fix).
 *
 *   plan:
 *     field_of_view: "0.05 deg^2"        area per pointing (deg^2, or with a unit)
 *     reference: {limit: 26.5, exposure_hours: 1.0}
 *     overhead_hours: 0.2                per pointing (default 0)
 *     depth_law: background              background | source | {table: [[hours, limit], ...]}
 *                                        | {noise: {sky_to_source, read_to_source, frame_hours}}
 *     budget_hours: 60
 *     fixed: {area: ...} or {limit: ...} optional
 *     goal: count                        count | faint_count | {sigma: PARAMETER}
 *     minimum_count: 0                   optional
 *     exposure_grid: {min_hours: 0.05, max_hours: 50, count: 200}
 *     tiers: 1                           1 to 3
 *     robust: false                      true: rank by the goal at the model's pessimistic case (needs model_uncertainty)
 */
import { excerpt, inputError } from '../errors.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import type { FluxDensityUnit } from '../model/photometry.js';
import { lineFluxOfVelocityFlux, parseQuantity, parseQuantityOneOf } from './units.js';
import { FULL_SKY_DEG2 } from '../model/sky.js';
import { suggest } from './schema.js';
import { CAPS, RANGES, describeRange, inRange } from '../model/limits.js';
import {
  MAX_NOISE_FRAMES,
  depthOfLimit,
  type DepthLaw,
  type LimitKind,
  type PlanGoal,
  type PlanSpec,
} from '../model/plan.js';
import { otherKneeHint, parameterNames } from '../model/population.js';
import { fluxDensityMagnitude, isFluxDensityText } from './photometry.js';

const KEYS = [
  'field_of_view',
  'reference',
  'overhead_hours',
  'depth_law',
  'budget_hours',
  'fixed',
  'goal',
  'minimum_count',
  'exposure_grid',
  'tiers',
  'robust',
];
export const DEFAULT_GRID = { min_hours: 0.05, max_hours: 50, count: 200 };
/** Most exposures on the grid of a one-tier plan (a second or so per thousand). */
export const MAX_GRID_COUNT = 20_000;
/** Most exposures on the grid of a plan of 2 or 3 tiers (each budget share's row of tiers is kept as numbers: 20,000 exposures and 3 tiers peak near 180 MB). */
export const MAX_TIER_GRID_COUNT = 20_000;
/** Longest time any plan value may give, hours (over 11 years of continuous observing). */
export const MAX_PLAN_HOURS = 100_000;
/** Largest sky or read variance relative to the source's the noise law accepts. */
export const MAX_VARIANCE_RATIO = 1e6;
/** Most rows of a depth_law table. */
export const MAX_DEPTH_ROWS = CAPS.tableRows;

type Obj = Record<string, unknown>;

function isObj(v: unknown): v is Obj {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function checkKeys(o: Obj, allowed: string[], file: string, at: string): void {
  for (const k of Object.keys(o)) {
    if (allowed.includes(k)) continue;
    const near = suggest(k, allowed);
    throw inputError(
      'unknown_key',
      file,
      `${at}.${k}`,
      `unknown key "${k}"${near ? ` (did you mean ${near}?)` : ''}`,
      near ? 'rename or remove it' : `remove it; the keys allowed here are ${allowed.join(', ')}`,
    );
  }
}

function num(
  v: unknown,
  file: string,
  at: string,
  what: string,
  { min = -Infinity, exclusiveMin = false, integer = false, max = Infinity } = {},
): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    throw inputError(
      'wrong_type',
      file,
      at,
      `is ${v === undefined ? 'missing' : shown(v)} but must be ${what}`,
      `give ${what}`,
    );
  }
  if (integer && !Number.isInteger(v))
    throw inputError('wrong_type', file, at, `is ${v} but must be a whole number`, `give ${what}`);
  if (exclusiveMin ? v <= min : v < min)
    throw inputError(
      'out_of_range',
      file,
      at,
      `is ${v} but must be ${exclusiveMin ? 'above' : 'at least'} ${min}`,
      `give ${what}`,
    );
  if (v > max) throw inputError('out_of_range', file, at, `is ${v} but must be at most ${max}`, `give ${what}`);
  return v;
}

function hours(v: unknown, file: string, at: string, positive: boolean): number {
  if (typeof v !== 'number' && typeof v !== 'string') {
    throw inputError(
      'wrong_type',
      file,
      at,
      `is ${v === undefined ? 'missing' : shown(v)} but must be a time`,
      'give hours as a number, or with a unit such as "90 min"',
    );
  }
  const h = parseQuantity(v, 'time', file, at);
  return num(
    h,
    file,
    at,
    positive ? `a time above 0 and at most ${MAX_PLAN_HOURS} hours` : `a time from 0 to ${MAX_PLAN_HOURS} hours`,
    { min: 0, exclusiveMin: positive, max: MAX_PLAN_HOURS },
  );
}

/**
 * The rest wavelength a line-flux limit written in Jy km/s is converted at, as detection.limit is:
 * detection.line, when every population counts that line; undefined otherwise.
 */
function velocityFluxLine(survey: Survey): number | undefined {
  const d = survey.detection;
  if (d.kind !== 'line_flux' || d.lineAngstrom === undefined) return undefined;
  return survey.populations.every((p) => p.lineAngstrom === d.lineAngstrom) ? d.lineAngstrom : undefined;
}

function limitValue(
  v: unknown,
  kind: LimitKind,
  file: string,
  at: string,
  units: FluxDensityUnit[],
  line: number | undefined,
): number {
  const range = kind === 'magnitude' ? RANGES.apparentMagnitude : RANGES.lineFlux;
  let x: number;
  // a flux density with its unit is its AB magnitude, as detection.limit reads it (its unit kept
  // for the outputs to quote the plan's limits in)
  if (kind === 'magnitude' && isFluxDensityText(v)) {
    const flux = fluxDensityMagnitude(v, file, at);
    x = flux.abMag;
    units?.push(flux.unit);
  } else if (kind === 'magnitude')
    x = num(v, file, at, 'an AB magnitude (a number), or a flux density with its unit such as "4 mJy"');
  else {
    if (typeof v !== 'number' && typeof v !== 'string') {
      throw inputError(
        'wrong_type',
        file,
        at,
        `is ${v === undefined ? 'missing' : shown(v)} but must be a line flux`,
        'give erg/s/cm^2 as a number, or with a unit such as "5e-17 erg/s/cm^2"',
      );
    }
    // a radio line's velocity-integrated flux ("0.7 Jy km/s") at detection.line's rest frequency
    const q = parseQuantityOneOf(
      v,
      ['flux', 'velocityFlux'],
      file,
      at,
      'give erg/s/cm^2 as a number, or with a unit such as "5e-17 erg/s/cm^2" (a radio line\'s as "0.7 Jy km/s")',
    );
    if (q.kind === 'velocityFlux' && line === undefined) {
      throw inputError(
        'missing_key',
        file,
        at,
        `${shown(v)} is a velocity-integrated flux, converted at the rest frequency of detection.line, which the file does not give for every population`,
        'give detection.line and count that line, or the limit in erg/s/cm^2',
      );
    }
    const cgs = q.kind === 'velocityFlux' ? lineFluxOfVelocityFlux(q.value, line!) : q.value;
    x = num(cgs, file, at, 'a line flux above 0', { min: 0, exclusiveMin: true });
  }
  if (!inRange(x, range)) {
    throw inputError(
      'out_of_range',
      file,
      at,
      `is ${x}${range.unit ? ` ${range.unit}` : ''}, outside its physical range (${describeRange(range)})`,
      'give a limit in that range',
    );
  }
  return x;
}

/** A limit for a message: as written when a flux density ("2 mJy", AB 16.15), else its value. */
function shownLimit(v: unknown, x: number, kind: LimitKind): string {
  return kind === 'magnitude' && isFluxDensityText(v) ? `${shown(v)}, AB ${Number(x.toPrecision(4))}` : String(x);
}

/** A value read from the file, for a message: JSON, cut short and escaped. */
function shown(v: unknown): string {
  return excerpt(JSON.stringify(v) ?? String(v));
}

/** plan.depth_law.noise: {sky_to_source, read_to_source (default 0), frame_hours (required with read noise)}. */
function readNoise(v: unknown, file: string): { skyToSource: number; readToSource: number; frameHours: number } {
  const at = 'plan.depth_law.noise';
  if (!isObj(v))
    throw inputError(
      'wrong_type',
      file,
      at,
      `is ${shown(v)} but must be a mapping`,
      'write it as {sky_to_source: 4, read_to_source: 0.3, frame_hours: 0.5}',
    );
  checkKeys(v, ['sky_to_source', 'read_to_source', 'frame_hours'], file, at);
  if (v.sky_to_source === undefined)
    throw inputError(
      'missing_key',
      file,
      `${at}.sky_to_source`,
      'is missing',
      "give the sky variance relative to the source's at the reference limit, e.g. 4",
    );
  const ratio = `a variance ratio from 0 to ${MAX_VARIANCE_RATIO}`;
  const skyToSource = num(v.sky_to_source, file, `${at}.sky_to_source`, ratio, { min: 0, max: MAX_VARIANCE_RATIO });
  const readToSource =
    v.read_to_source === undefined
      ? 0
      : num(v.read_to_source, file, `${at}.read_to_source`, ratio, { min: 0, max: MAX_VARIANCE_RATIO });
  if (v.frame_hours === undefined && readToSource > 0) {
    throw inputError(
      'missing_key',
      file,
      `${at}.frame_hours`,
      'is missing, but read noise grows with the number of frames',
      'give the longest single frame in hours, e.g. frame_hours: 0.5',
    );
  }
  const frameHours =
    v.frame_hours === undefined ? MAX_PLAN_HOURS : hours(v.frame_hours, file, `${at}.frame_hours`, true);
  return { skyToSource, readToSource, frameHours };
}

/** Read and check survey.raw.plan; `population` is the population of interest. */
export function readPlanSection(survey: Survey, population: Population): PlanSpec {
  const file = survey.file;
  const raw = isObj(survey.raw) ? survey.raw.plan : undefined;
  if (!isObj(raw)) {
    throw inputError(
      'missing_key',
      file,
      'plan',
      raw === undefined ? 'is missing, so there is nothing to plan' : 'must be a mapping of keys',
      'add a plan section with field_of_view, reference, budget_hours and goal (see the plan-file format)',
    );
  }
  checkKeys(raw, KEYS, file, 'plan');
  const givenUnits: FluxDensityUnit[] = [];
  const kind = survey.detection.kind;
  if (kind === 'threshold') {
    throw inputError(
      'kind_mismatch',
      file,
      'detection.kind',
      'is threshold, but a plan turns exposure time into a detection limit',
      'plan a magnitude or line_flux survey',
    );
  }
  const limitKind: LimitKind = kind;
  const line = velocityFluxLine(survey);

  if (raw.field_of_view === undefined)
    throw inputError(
      'missing_key',
      file,
      'plan.field_of_view',
      'is missing',
      'give the area of one pointing, e.g. "0.05 deg^2"',
    );
  if (typeof raw.field_of_view !== 'number' && typeof raw.field_of_view !== 'string') {
    throw inputError(
      'wrong_type',
      file,
      'plan.field_of_view',
      'must be an area',
      'give deg^2 as a number, or with a unit such as "180 arcmin^2"',
    );
  }
  const fov = num(
    parseQuantity(raw.field_of_view, 'area', file, 'plan.field_of_view'),
    file,
    'plan.field_of_view',
    'an area above 0 and at most the full sky',
    { min: 0, exclusiveMin: true, max: FULL_SKY_DEG2 },
  );

  if (raw.budget_hours === undefined)
    throw inputError('missing_key', file, 'plan.budget_hours', 'is missing', 'give the total time to spend, in hours');
  const budget = hours(raw.budget_hours, file, 'plan.budget_hours', true);
  const overhead = raw.overhead_hours === undefined ? 0 : hours(raw.overhead_hours, file, 'plan.overhead_hours', false);

  // Depth law and reference.
  const lawRaw = raw.depth_law ?? 'background';
  const readReference = (): { referenceLimit: number; referenceHours: number } => {
    if (!isObj(raw.reference)) {
      throw inputError(
        raw.reference === undefined ? 'missing_key' : 'wrong_type',
        file,
        'plan.reference',
        raw.reference === undefined ? 'is missing' : 'must be a mapping',
        `give the depth reached at a reference exposure, e.g. reference: {limit: ${kind === 'magnitude' ? '26.5' : '5e-17'}, exposure_hours: 1}`,
      );
    }
    checkKeys(raw.reference, ['limit', 'exposure_hours'], file, 'plan.reference');
    const referenceLimit = limitValue(raw.reference.limit, limitKind, file, 'plan.reference.limit', givenUnits, line);
    const referenceHours = hours(raw.reference.exposure_hours, file, 'plan.reference.exposure_hours', true);
    return { referenceLimit, referenceHours };
  };
  let law: DepthLaw;
  if (lawRaw === 'background' || lawRaw === 'source') {
    law = { kind: lawRaw, ...readReference() };
  } else if (isObj(lawRaw) && lawRaw.noise !== undefined) {
    checkKeys(lawRaw, ['noise'], file, 'plan.depth_law');
    law = { kind: 'noise', ...readReference(), ...readNoise(lawRaw.noise, file) };
  } else if (isObj(lawRaw)) {
    checkKeys(lawRaw, ['table', 'noise'], file, 'plan.depth_law');
    const t = lawRaw.table;
    if (!Array.isArray(t) || t.length < 2) {
      throw inputError(
        'bad_table',
        file,
        'plan.depth_law.table',
        'must be a list of at least two [hours, limit] rows',
        'write it as [[hours, limit], ...]',
      );
    }
    if (t.length > MAX_DEPTH_ROWS) {
      throw inputError(
        'too_large',
        file,
        'plan.depth_law.table',
        `has ${t.length} rows, more than the ${MAX_DEPTH_ROWS} a table may have`,
        'resample it to fewer rows',
      );
    }
    if (raw.reference !== undefined) {
      throw inputError(
        'conflict',
        file,
        'plan.reference',
        'is given together with a depth_law table',
        'keep one of them: the table already says how deep each exposure goes',
      );
    }
    const hs: number[] = [];
    const ls: number[] = [];
    t.forEach((row, i) => {
      const at = `plan.depth_law.table[${i}]`;
      if (!Array.isArray(row) || row.length !== 2)
        throw inputError(
          'bad_table',
          file,
          at,
          'must be a row of exactly two values',
          'write each row as [hours, limit]',
        );
      const h = hours(row[0], file, `${at}[0]`, true);
      const l = limitValue(row[1], limitKind, file, `${at}[1]`, givenUnits, line);
      if (i > 0 && !(h > hs[i - 1]!))
        throw inputError(
          'bad_table',
          file,
          `${at}[0]`,
          `is ${h} h, not longer than the row before (${hs[i - 1]} h)`,
          'list the rows by increasing exposure',
        );
      if (i > 0 && !(depthOfLimit(limitKind, l) > depthOfLimit(limitKind, ls[i - 1]!))) {
        throw inputError(
          'bad_table',
          file,
          `${at}[1]`,
          `is not deeper than the row before (${shownLimit((t[i - 1] as unknown[])[1], ls[i - 1]!, limitKind)})`,
          'give limits that deepen as the exposure grows',
        );
      }
      hs.push(h);
      ls.push(l);
    });
    law = { kind: 'table', hours: hs, limits: ls };
  } else {
    throw inputError(
      'out_of_range',
      file,
      'plan.depth_law',
      `is ${shown(lawRaw)} but must be background, source, {noise: {...}} or {table: [[hours, limit], ...]}`,
      'use one of those forms',
    );
  }

  // Goal.
  let goal: PlanGoal;
  const g = raw.goal;
  if (g === undefined)
    throw inputError('missing_key', file, 'plan.goal', 'is missing', 'give count, faint_count or {sigma: PARAMETER}');
  if (g === 'count' || g === 'faint_count') goal = { kind: g };
  else if (isObj(g)) {
    checkKeys(g, ['sigma'], file, 'plan.goal');
    const names: string[] = parameterNames(population);
    if (typeof g.sigma !== 'string' || !names.includes(g.sigma)) {
      const knee = typeof g.sigma === 'string' ? otherKneeHint(g.sigma, names) : '';
      const near = typeof g.sigma === 'string' && !knee ? suggest(g.sigma, names) : undefined;
      throw inputError(
        'out_of_range',
        file,
        'plan.goal.sigma',
        `is ${shown(g.sigma)} but must name a parameter of "${population.name}"${knee}${near ? ` (did you mean ${near}?)` : ''}`,
        `use one of ${names.join(', ')}`,
      );
    }
    goal = { kind: 'sigma', parameter: g.sigma };
  } else {
    const near = typeof g === 'string' ? suggest(g, ['count', 'faint_count']) : undefined;
    throw inputError(
      'out_of_range',
      file,
      'plan.goal',
      `is ${shown(g)} but must be count, faint_count or {sigma: PARAMETER}${near ? ` (did you mean ${near}?)` : ''}`,
      'use one of those forms',
    );
  }

  const minimumCount =
    raw.minimum_count === undefined
      ? 0
      : num(raw.minimum_count, file, 'plan.minimum_count', 'a count from 0 to 1e12', { min: 0, max: 1e12 });
  const tiers =
    raw.tiers === undefined
      ? 1
      : (num(raw.tiers, file, 'plan.tiers', 'a whole number from 1 to 3', { min: 1, max: 3, integer: true }) as
          1 | 2 | 3);

  // Robust ranking: by the goal at the pessimistic case of the model's own uncertainty.
  if (raw.robust !== undefined && typeof raw.robust !== 'boolean') {
    throw inputError(
      'wrong_type',
      file,
      'plan.robust',
      `is ${shown(raw.robust)} but must be true or false`,
      'write robust: true to rank the designs at the pessimistic case of the model, or leave it out',
    );
  }
  const robust = raw.robust === true;
  if (robust && !population.modelUncertainty) {
    throw inputError(
      'missing_key',
      file,
      'plan.robust',
      `ranks the designs across the model's own uncertainty, but "${population.name}" has no model_uncertainty block`,
      'add model_uncertainty to the population (docs/survey-file.md) or remove robust',
    );
  }
  if (robust && goal.kind === 'faint_count') {
    throw inputError(
      'conflict',
      file,
      'plan.robust',
      'ranks by the count or a sigma across the model, not by the count fainter than the knee (goal: faint_count)',
      'choose goal: count or {sigma: PARAMETER}, or remove robust',
    );
  }

  // Exposure grid.
  const gridRaw = raw.exposure_grid ?? {};
  if (!isObj(gridRaw))
    throw inputError(
      'wrong_type',
      file,
      'plan.exposure_grid',
      'must be a mapping',
      'write it as {min_hours: 0.05, max_hours: 50, count: 200}',
    );
  checkKeys(gridRaw, ['min_hours', 'max_hours', 'count'], file, 'plan.exposure_grid');
  const minHours =
    gridRaw.min_hours === undefined
      ? DEFAULT_GRID.min_hours
      : hours(gridRaw.min_hours, file, 'plan.exposure_grid.min_hours', true);
  const maxHours =
    gridRaw.max_hours === undefined
      ? Math.max(minHours * 2, Math.min(DEFAULT_GRID.max_hours, budget - overhead))
      : hours(gridRaw.max_hours, file, 'plan.exposure_grid.max_hours', true);
  if (!(maxHours > minHours)) {
    throw inputError(
      'out_of_range',
      file,
      'plan.exposure_grid.max_hours',
      `is ${maxHours} h, not above min_hours (${minHours} h)`,
      'give max_hours above min_hours',
    );
  }
  const maxCount = tiers > 1 ? MAX_TIER_GRID_COUNT : MAX_GRID_COUNT;
  const count =
    gridRaw.count === undefined
      ? Math.min(DEFAULT_GRID.count, maxCount)
      : num(
          gridRaw.count,
          file,
          'plan.exposure_grid.count',
          `a whole number from 2 to ${maxCount}${tiers > 1 ? ` (with ${tiers} tiers)` : ''}`,
          { min: 2, max: maxCount, integer: true },
        );
  if (minHours + overhead > budget) {
    throw inputError(
      'out_of_range',
      file,
      'plan.exposure_grid.min_hours',
      `plus the overhead (${minHours + overhead} h) exceeds budget_hours (${budget} h), so not one pointing fits`,
      'lower min_hours or overhead_hours, or raise budget_hours',
    );
  }
  if (law.kind === 'table') {
    const lo = law.hours[0]!;
    const hi = law.hours[law.hours.length - 1]!;
    if (minHours < lo * (1 - 1e-12))
      throw inputError(
        'out_of_range',
        file,
        'plan.exposure_grid.min_hours',
        `is ${minHours} h, shorter than the depth_law table's first row (${lo} h)`,
        'raise min_hours or extend the table',
      );
    if (maxHours > hi * (1 + 1e-12))
      throw inputError(
        'out_of_range',
        file,
        'plan.exposure_grid.max_hours',
        `is ${maxHours} h, longer than the depth_law table's last row (${hi} h)`,
        'lower max_hours or extend the table',
      );
  }

  if (law.kind === 'noise' && maxHours / law.frameHours > MAX_NOISE_FRAMES) {
    throw inputError(
      'out_of_range',
      file,
      'plan.depth_law.noise.frame_hours',
      `is ${law.frameHours} h, so the longest exposure tried (${maxHours} h) would be more than ${MAX_NOISE_FRAMES} frames`,
      `give frame_hours of at least ${maxHours / MAX_NOISE_FRAMES} h, or lower exposure_grid.max_hours`,
    );
  }

  // Fixed area or limit.
  let fixed: PlanSpec['fixed'];
  if (raw.fixed !== undefined) {
    if (!isObj(raw.fixed))
      throw inputError(
        'wrong_type',
        file,
        'plan.fixed',
        'must be a mapping',
        'write it as {area: ...} or {limit: ...}',
      );
    checkKeys(raw.fixed, ['area', 'limit'], file, 'plan.fixed');
    const hasArea = raw.fixed.area !== undefined;
    const hasLimit = raw.fixed.limit !== undefined;
    if (hasArea === hasLimit) {
      throw inputError(
        hasArea ? 'conflict' : 'missing_key',
        file,
        hasArea ? 'plan.fixed.limit' : 'plan.fixed',
        hasArea ? 'is given together with plan.fixed.area' : 'holds neither area nor limit',
        'fix one of area or limit, not both',
      );
    }
    if (tiers > 1)
      throw inputError(
        'conflict',
        file,
        'plan.fixed',
        `cannot be combined with tiers: ${tiers}`,
        'remove fixed or set tiers: 1',
      );
    if (hasArea) {
      const a = raw.fixed.area;
      if (typeof a !== 'number' && typeof a !== 'string')
        throw inputError(
          'wrong_type',
          file,
          'plan.fixed.area',
          'must be an area',
          'give deg^2 as a number, or with a unit',
        );
      const areaDeg2 = num(
        parseQuantity(a, 'area', file, 'plan.fixed.area'),
        file,
        'plan.fixed.area',
        'an area above 0 and at most the full sky',
        { min: 0, exclusiveMin: true, max: FULL_SKY_DEG2 },
      );
      const pointings = Math.ceil(areaDeg2 / fov - 1e-9);
      if (budget / pointings - overhead <= 0) {
        throw inputError(
          'out_of_range',
          file,
          'plan.fixed.area',
          `needs ${pointings} pointings, whose overheads alone (${(pointings * overhead).toPrecision(4)} h) use up budget_hours (${budget} h)`,
          'lower the area or raise budget_hours',
        );
      }
      fixed = { areaDeg2 };
    } else {
      const limit = limitValue(raw.fixed.limit, limitKind, file, 'plan.fixed.limit', givenUnits, line);
      if (
        law.kind === 'table' &&
        (depthOfLimit(limitKind, limit) < depthOfLimit(limitKind, law.limits[0]!) ||
          depthOfLimit(limitKind, limit) > depthOfLimit(limitKind, law.limits[law.limits.length - 1]!))
      ) {
        throw inputError(
          'out_of_range',
          file,
          'plan.fixed.limit',
          `is ${shownLimit(raw.fixed.limit, limit, limitKind)}, outside the depth_law table`,
          "give a limit between the table's first and last rows",
        );
      }
      // Whether one pointing of the exposure that reaches it fits the budget is checked by the plan (src/planning/plan.ts).
      fixed = { limit };
    }
  }

  const spec: PlanSpec = {
    file,
    limitKind,
    fieldOfViewDeg2: fov,
    overheadHours: overhead,
    budgetHours: budget,
    depthLaw: law,
    goal,
    minimumCount,
    grid: { minHours, maxHours, count },
    tiers,
  };
  if (fixed) spec.fixed = fixed;
  if (robust) spec.robust = true;
  // the unit of the plan's first flux-density limit, else of the survey's detection.limit
  const det = survey.detection;
  const limitUnit = givenUnits[0] ?? (det.kind === 'magnitude' ? det.limitGivenUnit : undefined);
  if (limitUnit) spec.limitUnit = limitUnit;
  return spec;
}
