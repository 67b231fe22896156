/**
 * The explore page's settings: which survey-file keys the page lets an observer move (docs/outputs.md,
 * "explore"), each with its value in the unit docs/survey-file.md gives the key, a range and a step;
 * and the settings written back into the survey file's own YAML (comments and layout kept), so that
 * the page and `skytally predict` read the same text.
 */
import { isScalar, parseDocument, stringify } from 'yaml';
import type { Survey } from '../../model/survey.js';
import { FULL_SKY_DEG2 } from '../../model/sky.js';
import { RANGES } from '../../model/limits.js';
import type { ControlSpec, ExposureControl, MovedCompleteness } from '../../model/explore.js';
import { readPlanSection } from '../../survey/plan-section.js';
import { makeDepthModel } from '../../planning/depth.js';
import { checkSurvey } from '../../model/arguments.js';

export type { ControlSpec };

type Raw = Record<string, unknown>;

const WAVELENGTH_MAX = RANGES.wavelength.max;

const isRecord = (v: unknown): v is Raw => typeof v === 'object' && v !== null && !Array.isArray(v);
/** A value the page may replace by a plain number: a number, or a quantity string such as "2.1 deg^2". */
const isScalarValue = (v: unknown): boolean =>
  typeof v === 'number' || (typeof v === 'string' && /^\s*[+-]?(\d|\.\d)/.test(v));

/** The key path as messages and data-key attributes write it. */
export function keyPathText(path: readonly (string | number)[]): string {
  return path.map((p, i) => (typeof p === 'number' ? `[${p}]` : i === 0 ? p : `.${p}`)).join('');
}

/** A decimal step about a hundredth of the value's size: 2.1 -> 0.01, 4e-17 -> 1e-19. */
function stepFor(value: number): number {
  const v = Math.abs(value);
  if (!(v > 0)) return 0.01;
  return Number((10 ** (Math.floor(Math.log10(v)) - 2)).toPrecision(1));
}

function logControl(
  path: (string | number)[],
  label: string,
  unit: string,
  value: number,
  lo: number,
  hi: number,
): ControlSpec {
  return {
    key: keyPathText(path),
    path,
    label,
    unit,
    value,
    min: Math.max(lo, value / 10),
    max: Math.min(hi, value * 10),
    step: stepFor(value),
    scale: 'log',
    range: 'default',
  };
}

function linearControl(
  path: (string | number)[],
  label: string,
  unit: string,
  value: number,
  span: number,
  lo: number,
  hi: number,
  step = 0.01,
): ControlSpec {
  return {
    key: keyPathText(path),
    path,
    label,
    unit,
    value,
    min: Math.max(lo, value - span),
    max: Math.min(hi, value + span),
    step,
    scale: 'linear',
    range: 'default',
  };
}

/**
 * The unit of a threshold limit, the population's own variable (docs/survey-file.md, "threshold: a
 * limit in the population's own variable"): log10 of its quantity for a luminosity variable (when
 * the file names one quantity), absolute AB magnitude for a magnitude variable; none otherwise.
 */
function thresholdUnit(file: Raw): string {
  const pops = isRecord(file.population) ? [file.population] : Array.isArray(file.populations) ? file.populations : [];
  const records = pops.filter(isRecord);
  if (records.length === 0 || records.length !== pops.length) return '';
  if (records.every((p) => p.variable === 'magnitude')) return 'absolute AB mag';
  const quantities = new Set(records.map((p) => (typeof p.quantity === 'string' ? p.quantity.trim() : '')));
  const [only] = [...quantities];
  return quantities.size === 1 && only && records.every((p) => p.variable !== 'magnitude') ? `log10 ${only}` : '';
}

/**
 * m_AB - m_Vega of a magnitude survey whose file gives its limit in Vega (`detection.system: vega`),
 * else undefined: the page's limit is then a Vega magnitude, as the file reads it
 * (docs/survey-file.md, "detection.system").
 */
function writtenVegaToAb(survey: Survey): number | undefined {
  const d = survey.detection;
  return d.kind === 'magnitude' && d.magnitudeSystem?.system === 'vega' ? d.magnitudeSystem.vegaToAb : undefined;
}

/** Population parameters the page varies, with their unit, span and range (docs/survey-file.md, "Limits"). */
const PARAMETERS: { key: string; label: string; unit: string; log?: boolean; span: number; lo: number; hi: number }[] =
  [
    { key: 'log10_phi_star', label: 'log10 phi*', unit: 'log10 Mpc^-3', span: 1, lo: -30, hi: 3 },
    { key: 'log10_phi_star_dex', label: 'log10 phi* (per dex)', unit: 'log10 Mpc^-3 dex^-1', span: 1, lo: -30, hi: 3 },
    { key: 'phi_star', label: 'phi*', unit: 'Mpc^-3', log: true, span: 0, lo: 1e-30, hi: 1000 },
    { key: 'phi_star_dex', label: 'phi* (per dex)', unit: 'Mpc^-3 dex^-1', log: true, span: 0, lo: 1e-30, hi: 1000 },
    { key: 'log10_l_star', label: 'log10 L*', unit: 'log10 erg/s', span: 1, lo: -30, hi: 60 },
    { key: 'l_star', label: 'L*', unit: 'erg/s', log: true, span: 0, lo: 1e-30, hi: 1e60 },
    { key: 'm_star', label: 'M*', unit: 'AB mag', span: 1.5, lo: -40, hi: 10 },
    { key: 'alpha', label: 'alpha', unit: '', span: 0.5, lo: -4, hi: 4 },
  ];

/**
 * The unit a parameter is read in. For the threshold kind L* is in the population's own quantity
 * (docs/survey-file.md, "threshold: a limit in the population's own variable"; a stellar mass
 * function's L* is in Msun), not erg/s: the label names that quantity, or claims no unit when the
 * file names none.
 */
function parameterUnit(key: string, unit: string, pop: Raw, kind: string): string {
  // a population's m_star given in Vega (system: vega) is read, and varied, in Vega
  if (key === 'm_star' && pop.system === 'vega') return 'Vega mag';
  if (kind !== 'threshold' || (key !== 'log10_l_star' && key !== 'l_star')) return unit;
  const quantity = typeof pop.quantity === 'string' && pop.quantity.trim() !== '' ? pop.quantity.trim() : undefined;
  if (!quantity) return '';
  return key === 'l_star' ? quantity : `log10 ${quantity}`;
}

/**
 * The range a population's model_uncertainty gives a parameter: 3 sigma either side of the value
 * (docs/survey-file.md, "model_uncertainty": sigmas of log10_phi_star and log10_l_star in dex also
 * when phi* or L* is written linearly, of m_star in mag, of alpha plain).
 */
function uncertaintyRange(pop: Raw, key: string, value: number): [number, number] | undefined {
  const mu = pop.model_uncertainty;
  if (!isRecord(mu)) return undefined;
  const name =
    key.startsWith('log10_phi_star') || key.startsWith('phi_star')
      ? 'log10_phi_star'
      : key === 'l_star'
        ? 'log10_l_star'
        : key;
  const sigma = mu[name];
  if (typeof sigma !== 'number' || !(sigma > 0)) return undefined;
  if (key === 'phi_star' || key === 'phi_star_dex' || key === 'l_star')
    return [value * 10 ** (-3 * sigma), value * 10 ** (3 * sigma)];
  return [value - 3 * sigma, value + 3 * sigma];
}

/**
 * The controls of the page for a survey file: its parsed YAML (`raw`) and the survey the loader
 * made of it (values converted to each key's unit). Only keys the file gives as a number or a
 * quantity are controls: a parameter written as a table or an expression in z stays as written.
 */
export function exploreControls(raw: unknown, survey: Survey): ControlSpec[] {
  checkSurvey(survey, 'exploreControls');
  const file = isRecord(raw) ? raw : {};
  const controls: ControlSpec[] = [];
  if (isScalarValue(file.area))
    controls.push(logControl(['area'], 'Area', 'deg^2', survey.areaDeg2, 1e-6, FULL_SKY_DEG2));
  const det = isRecord(file.detection) ? file.detection : {};
  const d = survey.detection;
  if (isScalarValue(det.limit)) {
    if (d.kind === 'line_flux')
      controls.push(logControl(['detection', 'limit'], 'Line-flux limit', 'erg/s/cm^2', d.limitCgs, 1e-30, 1e-5));
    else if (d.kind === 'magnitude') {
      // in the file's own system: a file with system: vega reads its limit as a Vega magnitude
      const vega = writtenVegaToAb(survey);
      controls.push(
        linearControl(
          ['detection', 'limit'],
          'Magnitude limit',
          vega === undefined ? 'AB mag' : 'Vega mag',
          d.limitMag - (vega ?? 0),
          2,
          0 - (vega ?? 0),
          40 - (vega ?? 0),
        ),
      );
    } else if (typeof det.limit === 'number')
      controls.push(linearControl(['detection', 'limit'], 'Threshold', thresholdUnit(file), det.limit, 2, -40, 60));
  }
  const z = file.redshift;
  // Slice edges written out fix the counted range: the window then stays as written.
  const edges = isRecord(file.slices) && file.slices.edges !== undefined;
  if (edges) {
    // nothing: see above
  } else if (isRecord(z) && typeof z.min === 'number' && typeof z.max === 'number') {
    const w = z.max - z.min;
    controls.push(linearControl(['redshift', 'min'], 'Redshift from', '', z.min, w / 2, 0, 30, 0.001));
    controls.push(linearControl(['redshift', 'max'], 'Redshift to', '', z.max, w / 2, 0, 30, 0.001));
    const [lo, hi] = controls.slice(-2);
    lo!.min = Math.max(0, z.min - w);
    lo!.max = z.min + w / 2 - 1e-3;
    hi!.min = z.max - w / 2 + 1e-3;
    hi!.max = Math.min(30, z.max + w);
  } else {
    const f = isRecord(det.filter) ? det.filter : undefined;
    const filter = d.kind === 'line_flux' ? d.filter : undefined;
    if (f && filter && filter.profile !== 'table' && isScalarValue(f.center) && isScalarValue(f.fwhm)) {
      const c = filter.centerAngstrom;
      controls.push(
        linearControl(
          ['detection', 'filter', 'center'],
          'Filter centre',
          'Angstrom',
          c,
          0.05 * c,
          1,
          WAVELENGTH_MAX,
          1,
        ),
      );
      controls.push(
        logControl(
          ['detection', 'filter', 'fwhm'],
          'Filter width (FWHM)',
          'Angstrom',
          filter.fwhmAngstrom,
          1,
          WAVELENGTH_MAX,
        ),
      );
      controls[controls.length - 1]!.min = Math.max(1, filter.fwhmAngstrom / 4);
      controls[controls.length - 1]!.max = filter.fwhmAngstrom * 4;
      controls[controls.length - 1]!.step = 1;
    }
  }
  const exposure = exposureControl(file, survey);
  if (exposure) controls.push(exposure);
  const entries: [unknown, (string | number)[]][] = isRecord(file.population)
    ? [[file.population, ['population']]]
    : Array.isArray(file.populations)
      ? file.populations.map((p, i) => [p, ['populations', i]])
      : [];
  for (const [pop, base] of entries) {
    if (!isRecord(pop) || pop.shape === 'double_schechter') continue;
    const name = typeof pop.name === 'string' && entries.length > 1 ? ` (${pop.name})` : '';
    for (const p of PARAMETERS) {
      const v = pop[p.key];
      if (typeof v !== 'number') continue;
      const path = [...base, p.key];
      const unit = parameterUnit(p.key, p.unit, pop, d.kind);
      const c = p.log
        ? logControl(path, p.label + name, unit, v, p.lo, p.hi)
        : linearControl(path, p.label + name, unit, v, p.span, p.lo, p.hi);
      const r = uncertaintyRange(pop, p.key, v);
      if (r) {
        c.min = Math.max(p.lo, r[0]);
        c.max = Math.min(p.hi, r[1]);
        c.range = 'model_uncertainty';
      }
      controls.push(c);
    }
  }
  return controls;
}

/** The key of the exposure-per-pointing control (a page control, not a key of the file). */
export const EXPOSURE_KEY = 'plan.exposure_per_pointing';

/**
 * A plan file's exposure per pointing, from the grid's shortest exposure to its longest that
 * leaves one pointing in the budget; none when the plan fixes the area or the depth, or the file's
 * plan section is not one `plan` accepts.
 */
function exposureControl(file: Raw, survey: Survey): ControlSpec | undefined {
  if (!isRecord(file.plan) || survey.detection.kind === 'threshold') return undefined;
  let spec;
  try {
    spec = readPlanSection(survey, survey.populations[0]!);
  } catch {
    return undefined;
  }
  if (spec.fixed) return undefined;
  const plan: ExposureControl = {
    fieldOfViewDeg2: spec.fieldOfViewDeg2,
    overheadHours: spec.overheadHours,
    budgetHours: spec.budgetHours,
    maxPointings: Math.max(1, Math.floor(FULL_SKY_DEG2 / spec.fieldOfViewDeg2 + 1e-9)),
    limitKind: spec.limitKind,
    law: spec.depthLaw,
  };
  const vega = writtenVegaToAb(survey);
  if (vega !== undefined) plan.writtenVegaToAb = vega;
  const moved = completenessEntries(file, survey);
  if (moved) plan.completeness = moved;
  const min = spec.grid.minHours;
  const max = Math.min(spec.grid.maxHours, spec.budgetHours - spec.overheadHours);
  if (!(max > min)) return undefined;
  const d = survey.detection;
  const limit = d.kind === 'magnitude' ? d.limitMag : d.kind === 'line_flux' ? d.limitCgs : NaN;
  const value = Math.min(max, Math.max(min, makeDepthModel(plan.limitKind, plan.law).hoursFor(limit)));
  return {
    key: EXPOSURE_KEY,
    path: [],
    label: 'Exposure per pointing (sets the area and the limit)',
    unit: 'hours',
    value,
    min,
    max,
    step: stepFor(value),
    scale: 'log',
    range: 'default',
    plan,
  };
}

/**
 * The file's completeness curve as the exposure control moves it (ExposureControl.completeness):
 * a logistic `half`, or each row's x of a table, as a plain number in the unit a plain number of
 * that key is read in (a half given with a unit, such as "60 uJy", becomes its AB magnitude or its
 * flux in erg/s/cm^2, as the loader read it).
 */
function completenessEntries(file: Raw, survey: Survey): MovedCompleteness | undefined {
  const d = survey.detection;
  if (d.kind === 'threshold' || !d.completeness) return undefined;
  const det = isRecord(file.detection) ? file.detection : {};
  const c = isRecord(det.completeness) ? det.completeness : undefined;
  if (!c) return undefined;
  const vega = writtenVegaToAb(survey) ?? 0;
  const fileLimit = d.kind === 'magnitude' ? d.limitMag - vega : d.limitCgs;
  const entries: MovedCompleteness['entries'] = [];
  if (d.completeness.model === 'logistic') {
    // the loader's half: an AB magnitude, or -log10 of the flux (src/model/detection.ts)
    const half = d.kind === 'magnitude' ? d.completeness.half - vega : 10 ** -d.completeness.half;
    entries.push({ path: ['detection', 'completeness', 'half'], value: typeof c.half === 'number' ? c.half : half });
  } else {
    if (!Array.isArray(c.table)) return undefined;
    c.table.forEach((row, i) => {
      if (Array.isArray(row) && typeof row[0] === 'number')
        entries.push({ path: ['detection', 'completeness', 'table', i, 0], value: row[0] });
    });
  }
  return { kind: d.kind, fileLimit, entries };
}

/**
 * The completeness curve moved with the limit the exposure control set (`limit`, as written), as
 * a plan design moves it (src/planning/model.ts, surveyAtLimit): a magnitude curve by the limit's
 * difference, a line-flux curve by the limits' ratio. Key paths and values.
 */
export function movedCompleteness(m: MovedCompleteness, limit: number): [(string | number)[], number][] {
  return m.entries.map((e) => [
    e.path,
    m.kind === 'magnitude' ? e.value + (limit - m.fileLimit) : e.value * (limit / m.fileLimit),
  ]);
}

/** The completeness edits of the settings: the curve moved with the limit when the exposure control set it. */
function completenessEdits(
  controls: readonly ControlSpec[],
  values: ReadonlyMap<string, number>,
): [(string | number)[], number][] {
  const c = controls.find((x) => x.plan?.completeness);
  const limit = values.get('detection.limit');
  if (!c || values.get(c.key) === undefined || limit === undefined || !Number.isFinite(limit)) return [];
  return movedCompleteness(c.plan!.completeness!, limit);
}

/**
 * The design an exposure per pointing gives: as many whole pointings as the budget buys (at
 * most the whole sky), and the limit the depth law reaches (docs/survey-file.md, "The plan section").
 */
export function exposureDesign(
  plan: ExposureControl,
  hours: number,
): { area: number; limit: number; pointings: number } {
  const pointings = Math.max(
    1,
    Math.min(plan.maxPointings, Math.floor(plan.budgetHours / (hours + plan.overheadHours) + 1e-9)),
  );
  return {
    pointings,
    area: pointings * plan.fieldOfViewDeg2,
    limit: makeDepthModel(plan.limitKind, plan.law).limitAt(hours),
  };
}

/** The survey-file keys a control sets at `v`: its own key, or, for the exposure per pointing, the area and the limit. */
export function controlSettings(c: ControlSpec, v: number): [string, number][] {
  if (!c.plan) return [[c.key, v]];
  const d = exposureDesign(c.plan, v);
  // the depth law's limit is AB; a file with system: vega reads its limit in Vega
  return [
    ['area', d.area],
    ['detection.limit', d.limit - (c.plan.writtenVegaToAb ?? 0)],
  ];
}

/**
 * The parsed survey file with the given settings: a copy of `raw` (the file as the loader's YAML
 * reader gives it) with those values replaced. The loader reads it exactly as it reads
 * `settingsText` of the same settings (a number is written as JavaScript writes it, the shortest
 * text that reads back as the same number), without writing and parsing YAML on every change.
 */
export function settingsObject(
  raw: unknown,
  controls: readonly ControlSpec[],
  values: ReadonlyMap<string, number>,
): unknown {
  if (values.size === 0) return raw;
  const copy = structuredClone(raw) as Raw;
  const put = (path: readonly (string | number)[], v: number): void => {
    let node: unknown = copy;
    for (const step of path.slice(0, -1)) node = (node as Record<string | number, unknown>)[step];
    (node as Record<string | number, unknown>)[path[path.length - 1]!] = v;
  };
  for (const c of controls) {
    const v = values.get(c.key);
    if (v === undefined || !Number.isFinite(v) || c.plan) continue;
    put(c.path, v);
  }
  for (const [path, v] of completenessEdits(controls, values)) put(path, v);
  return copy;
}

/** The YAML parse options of the loader (src/survey/yaml.ts). */
const YAML_OPTIONS = { uniqueKeys: false, merge: false } as const;

/**
 * The survey file as written with the given settings (key -> plain number in the key's unit):
 * the original text with only those values replaced, comments and layout kept. Each value is
 * replaced where it stands in the text (the parsed scalar's source range), so every other
 * character stays as written: flow collections keep their spacing, comments their alignment.
 * Should a value not be a scalar of the text (it always is for the controls exploreControls
 * makes), the document is written out whole instead.
 */
export function settingsText(
  original: string,
  controls: readonly ControlSpec[],
  values: ReadonlyMap<string, number>,
): string {
  if (values.size === 0) return original;
  const text = original.replace(/^\uFEFF/, '');
  const doc = parseDocument(text, YAML_OPTIONS);
  const edits: { from: number; to: number; value: number }[] = [];
  let whole = false;
  const put = (path: readonly (string | number)[], v: number): void => {
    const node = doc.getIn(path, true);
    if (isScalar(node) && node.range) edits.push({ from: node.range[0], to: node.range[1], value: v });
    else whole = true;
    doc.setIn(path, v);
  };
  for (const c of controls) {
    const v = values.get(c.key);
    if (v === undefined || !Number.isFinite(v) || c.plan) continue;
    put(c.path, v);
  }
  for (const [path, v] of completenessEdits(controls, values)) put(path, v);
  if (whole) return doc.toString({ lineWidth: 0 });
  // (a number as the document would write it: YAML's own form of a plain number)
  let out = text;
  for (const e of edits.sort((a, b) => b.from - a.from))
    out = out.slice(0, e.from) + stringify(e.value, { lineWidth: 0 }).trimEnd() + out.slice(e.to);
  return out;
}
