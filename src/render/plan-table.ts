/** Human table and CSV for a plan (plan command). */
import Table from 'cli-table3';
import { goalWords, limitText, ordinal, parameterWords, precise, sig } from './format.js';
import { csvText, type CsvCell } from './csv.js';
import { givenUnitLimitText } from './detection-text.js';
import { cosmologyLine } from './predict-table.js';
import type { Plan, PlanDesign } from '../model/outputs/plan.js';

function goalText(p: Plan): string {
  if (typeof p.goal === 'object')
    return `smallest ${goalWords(p.goal)} (Fisher matrix${p.cosmic_variance ? ', with cosmic variance' : ', Poisson only'})`;
  return p.goal === 'count' ? 'most sources' : 'most sources fainter than the characteristic luminosity';
}

/** A design's limit, or each tier's in the order of the tiers (a tiered design's own `limit` is its deepest tier's). */
function designLimits(p: Plan, d: PlanDesign): string {
  return d.tiers ? d.tiers.map((t) => planLimitText(p, t.limit)).join(' + ') : planLimitText(p, d.limit);
}

/** A limit as the plan's other outputs write it: AB (or erg/s/cm^2), after the flux density in the file's unit when it gave one. */
function planLimitText(p: Plan, x: number): string {
  return givenUnitLimitText(x, limitText(p.limit_variable, x), p.limit_unit);
}

const limitWord = (d: PlanDesign): string => (d.tiers ? 'limits' : 'limit');

function designRow(p: Plan, d: PlanDesign, mark = ''): string[] {
  return [
    mark,
    d.tiers ? d.tiers.map((t) => `${Math.round(t.budget_fraction * 100)} %`).join(' + ') : '100 %',
    d.tiers
      ? d.tiers.map((t) => sig(t.exposure_hours_per_pointing, 3)).join(' + ')
      : sig(d.exposure_hours_per_pointing, 4),
    d.tiers ? d.tiers.map((t) => String(t.pointings)).join(' + ') : String(d.pointings),
    sig(d.hours_used, 4),
    sig(d.area_deg2, 4),
    designLimits(p, d),
    sig(d.count, 5),
    sig(d.faint_count, 5),
    sig(d.goal_value, 4),
    ...(p.robust ? [d.goal_value_pessimistic === undefined ? '-' : sig(d.goal_value_pessimistic, 4)] : []),
    ...(withNotes(p) ? [d.meets_minimum_count ? '' : 'below minimum_count'] : []),
  ];
}

/** A last column, "note", only when some design falls below minimum_count (it was there, empty and unlabelled, in every table). */
function withNotes(p: Plan): boolean {
  return (
    !p.best.meets_minimum_count ||
    p.designs.some((d) => !d.meets_minimum_count) ||
    p.neighbours.some((d) => !d.meets_minimum_count)
  );
}

/** One line on a design: its shape, count and goal (and its goal at the model's pessimistic case). */
function designLine(p: Plan, b: PlanDesign): string {
  return `${b.tiers ? `${b.tiers.length} tiers, ` : ''}${b.pointings} pointing${b.pointings === 1 ? '' : 's'} (${sig(b.area_deg2, 4)} deg^2)${b.tiers ? '' : ` of ${sig(b.exposure_hours_per_pointing, 4)} h to ${planLimitText(p, b.limit)}`}, ${sig(b.count, 5)} sources, goal value ${sig(b.goal_value, 4)}${b.goal_value_pessimistic !== undefined ? ` (${sig(b.goal_value_pessimistic, 4)} at the model's pessimistic case)` : ''}`;
}

function depthLawText(p: Plan): string {
  const law = p.depth_law;
  if (law.kind === 'table') return `table of ${law.table.length} rows (interpolated in log hours)`;
  const from = `${planLimitText(p, law.reference_limit)} in ${sig(law.reference_exposure_hours)} h`;
  if (law.kind !== 'noise') return `${law.kind}-limited from ${from}`;
  return `noise budget from ${from} (variance source : sky : read = 1 : ${sig(law.sky_to_source, 3)} : ${sig(law.read_to_source, 3)}, ${law.reference_frames} frames of at most ${sig(law.frame_hours, 3)} h)`;
}

export function planTable(p: Plan): string {
  const lines: string[] = [
    p.title,
    `Goal: ${goalText(p)}; budget ${sig(p.budget_hours)} h, ${sig(p.overhead_hours)} h overhead per pointing, ${sig(p.field_of_view_deg2, 4)} deg^2 per pointing`,
    `Depth law: ${depthLawText(p)}`,
    `Cosmology: ${cosmologyLine(p.cosmology)}`,
    `Assumed model: ${p.model.summary}`,
  ];
  const head = [
    '',
    'budget',
    'hours per pointing',
    'pointings',
    'hours used',
    'area deg^2',
    'limit',
    'count',
    'fainter than knee',
    'goal value',
    ...(p.robust ? [`goal at model p${Math.round(p.robust.percentile * 100)}`] : []),
    ...(withNotes(p) ? ['note'] : []),
  ];
  const b = p.best;
  lines.push(
    `Best design (* below): ${b.tiers ? `${b.tiers.length} tiers, ` : ''}${b.pointings} pointing${b.pointings === 1 ? '' : 's'} (${sig(b.area_deg2, 4)} deg^2)${b.tiers ? '' : ` of ${sig(b.exposure_hours_per_pointing, 4)} h to ${planLimitText(p, b.limit)}`}, ${sig(b.count, 5)} sources, goal value ${sig(b.goal_value, 4)}${
      b.sigma
        ? ` (sigma of ${Object.entries(b.sigma)
            .map(([k, v]) => `${parameterWords(k)} ${sig(v, 3)}`)
            .join(', ')})`
        : ''
    }`,
  );
  const t = new Table({ head, style: { head: [], border: [] } });
  const r = p.robust;
  if (r) {
    const what = r.percentile > 0.5 ? `the 84th percentile of the sigma` : `the 16th percentile of the count`;
    lines.push(
      `Ranked across the model (robust): by ${what} over ${r.draws} ${r.source === 'draws_file' ? 'rows of the draws file' : 'draws of model_uncertainty'}.`,
      `  Best across the model: ${designLine(p, r.best_robust)}`,
      `  Best under the assumed values: ${designLine(p, r.best_assumed)}${r.same_design ? ' (the same design)' : ''}`,
      `  Draw by draw: the best across the model is the best design in ${precise(100 * r.agreement.best_fraction, 3)} % of ${r.agreement.draws_ranked} draws, within ${p.near_best.tolerance * 100} % of the best in ${precise(100 * r.agreement.near_best_fraction, 3)} %`,
    );
  }
  t.push(designRow(p, b, '*'));
  for (const d of p.neighbours) t.push(designRow(p, d, 'grid'));
  lines.push(t.toString());
  const nb = p.near_best;
  lines.push(
    `Within ${nb.tolerance * 100} % of the best: ${nb.designs_within} design${nb.designs_within === 1 ? '' : 's'}, from ${sig(nb.from.area_deg2, 4)} deg^2 (${limitWord(nb.from)} ${designLimits(p, nb.from)}) to ${sig(nb.to.area_deg2, 4)} deg^2 (${limitWord(nb.to)} ${designLimits(p, nb.to)})${nb.contiguous ? '' : ' (not contiguous)'}`,
  );
  // A sample of the designs (every k-th, at most 20 rows; the CSV and JSON hold all of them).
  const step = Math.max(1, Math.ceil(p.designs.length / 20));
  const g = new Table({ head, style: { head: [], border: [] } });
  p.designs.forEach((d, i) => {
    if (i % step === 0 || i === p.designs.length - 1) g.push(designRow(p, d));
  });
  lines.push(`Designs (${p.designs.length}${step > 1 ? `, every ${ordinal(step)} shown` : ''}):`);
  lines.push(g.toString());
  lines.push(`Refinement: ${p.refinement.method}${p.refinement.improved ? ' (improved on the grid)' : ''}`);
  for (const n of p.notes) lines.push(`Note: ${n}`);
  lines.push(p.caveat);
  return lines.join('\n') + '\n';
}

export function planCsv(p: Plan): string {
  const header = [
    'design',
    'tier',
    'budget_fraction',
    'exposure_hours_per_pointing',
    'pointings',
    'area_deg2',
    'limit',
    'count',
    'faint_count',
    'goal_value',
    ...(p.robust ? ['goal_value_pessimistic'] : []),
    'hours_used',
    'meets_minimum_count',
    'best',
  ];
  const rows: CsvCell[][] = [];
  const same = (a: PlanDesign, b: PlanDesign) =>
    a.pointings === b.pointings &&
    a.exposure_hours_per_pointing === b.exposure_hours_per_pointing &&
    a.goal_value === b.goal_value;
  const designRow = (id: CsvCell, d: PlanDesign, mark: string): CsvCell[] => [
    id,
    'all',
    1,
    d.exposure_hours_per_pointing,
    d.pointings,
    d.area_deg2,
    d.limit,
    d.count,
    d.faint_count,
    d.goal_value,
    ...(p.robust ? [d.goal_value_pessimistic ?? ''] : []),
    d.hours_used,
    String(d.meets_minimum_count),
    mark,
  ];
  p.designs.forEach((d, i) => {
    rows.push(designRow(i, d, same(d, p.best) ? '*' : ''));
    d.tiers?.forEach((t, k) =>
      rows.push([
        i,
        k + 1,
        t.budget_fraction,
        t.exposure_hours_per_pointing,
        t.pointings,
        t.area_deg2,
        t.limit,
        t.count,
        '',
        '',
        ...(p.robust ? [''] : []),
        '',
        '',
        '',
      ]),
    );
  });
  if (!p.designs.some((d) => same(d, p.best))) {
    rows.push(designRow('refined', p.best, '*'));
  }
  return csvText(header, rows);
}
