/** Human tables and CSV for plan and compare. */
import Table from 'cli-table3';
import { goalWords, parameterWords, sig, wrapWords, zText } from './format.js';
import { csvText, type CsvCell } from './csv.js';
import type { Plan, PlanDesign } from '../model/outputs/plan.js';
import type { ComparedSurvey, Comparison } from '../model/outputs/compare.js';

function limitText(v: string, x: number | string): string {
  if (typeof x === 'string') return x;
  if (v === 'apparent_magnitude') return `${x.toFixed(2)} AB`;
  if (v === 'absolute_magnitude') return `M = ${x.toFixed(2)}`;
  if (v === 'line_flux_cgs') return `${sig(x, 3)} erg/s/cm^2`;
  return `log10 = ${sig(x, 4)}`;
}

function goalText(p: Plan): string {
  if (typeof p.goal === 'object') return `smallest ${goalWords(p.goal)} (Fisher matrix${p.cosmic_variance ? ', with cosmic variance' : ', Poisson only'})`;
  return p.goal === 'count' ? 'most sources' : 'most sources fainter than the characteristic luminosity';
}

function designRow(p: Plan, d: PlanDesign, mark = ''): string[] {
  return [
    mark,
    d.tiers ? d.tiers.map((t) => `${Math.round(t.budget_fraction * 100)} %`).join(' + ') : '100 %',
    d.tiers ? d.tiers.map((t) => sig(t.exposure_hours_per_pointing, 3)).join(' + ') : sig(d.exposure_hours_per_pointing, 4),
    d.tiers ? d.tiers.map((t) => String(t.pointings)).join(' + ') : String(d.pointings),
    sig(d.area_deg2, 4),
    d.tiers ? d.tiers.map((t) => limitText(p.limit_variable, t.limit)).join(' + ') : limitText(p.limit_variable, d.limit),
    sig(d.count, 5),
    sig(d.faint_count, 5),
    sig(d.goal_value, 4),
    d.meets_minimum_count ? '' : 'below minimum_count',
  ];
}

export function planTable(p: Plan): string {
  const lines: string[] = [
    p.title,
    `Goal: ${goalText(p)}; budget ${sig(p.budget_hours)} h, ${sig(p.overhead_hours)} h overhead per pointing, ${sig(p.field_of_view_deg2, 4)} deg^2 per pointing`,
    `Depth law: ${p.depth_law.kind === 'table' ? `table of ${p.depth_law.table.length} rows (interpolated in log hours)` : `${p.depth_law.kind}-limited from ${limitText(p.limit_variable, p.depth_law.reference_limit)} in ${sig(p.depth_law.reference_exposure_hours)} h`}`,
    `Assumed model: ${p.model.summary}`,
  ];
  const head = ['', 'budget', 'hours per pointing', 'pointings', 'area deg^2', 'limit', 'count', 'fainter than knee', 'goal value', ''];
  const b = p.best;
  lines.push(`Best design (* below): ${b.tiers ? `${b.tiers.length} tiers, ` : ''}${b.pointings} pointings (${sig(b.area_deg2, 4)} deg^2)${b.tiers ? '' : ` of ${sig(b.exposure_hours_per_pointing, 4)} h to ${limitText(p.limit_variable, b.limit)}`}, ${sig(b.count, 5)} sources, goal value ${sig(b.goal_value, 4)}${b.sigma ? ` (sigma of ${Object.entries(b.sigma).map(([k, v]) => `${parameterWords(k)} ${sig(v, 3)}`).join(', ')})` : ''}`);
  const t = new Table({ head, style: { head: [], border: [] } });
  t.push(designRow(p, b, '*'));
  for (const d of p.neighbours) t.push(designRow(p, d, 'grid'));
  lines.push(t.toString());
  const nb = p.near_best;
  lines.push(
    `Within ${nb.tolerance * 100} % of the best: ${nb.designs_within} designs, from ${sig(nb.from.area_deg2, 4)} deg^2 (limit ${limitText(p.limit_variable, nb.from.limit)}) to ${sig(nb.to.area_deg2, 4)} deg^2 (limit ${limitText(p.limit_variable, nb.to.limit)})${nb.contiguous ? '' : ' (not contiguous)'}`,
  );
  // A sample of the designs (every k-th, at most 20 rows; the CSV and JSON hold all of them).
  const step = Math.max(1, Math.ceil(p.designs.length / 20));
  const g = new Table({ head, style: { head: [], border: [] } });
  p.designs.forEach((d, i) => {
    if (i % step === 0 || i === p.designs.length - 1) g.push(designRow(p, d));
  });
  lines.push(`Designs (${p.designs.length}${step > 1 ? `, every ${step}th shown` : ''}):`);
  lines.push(g.toString());
  lines.push(`Refinement: ${p.refinement.method}${p.refinement.improved ? ' (improved on the grid)' : ''}`);
  for (const n of p.notes) lines.push(`Note: ${n}`);
  lines.push(p.caveat);
  return lines.join('\n') + '\n';
}

export function planCsv(p: Plan): string {
  const header = ['design', 'tier', 'budget_fraction', 'exposure_hours_per_pointing', 'pointings', 'area_deg2', 'limit', 'count', 'faint_count', 'goal_value', 'hours_used', 'meets_minimum_count', 'best'];
  const rows: CsvCell[][] = [];
  const same = (a: PlanDesign, b: PlanDesign) => a.pointings === b.pointings && a.exposure_hours_per_pointing === b.exposure_hours_per_pointing && a.goal_value === b.goal_value;
  p.designs.forEach((d, i) => {
    const mark = same(d, p.best) ? '*' : '';
    rows.push([i, 'all', 1, d.exposure_hours_per_pointing, d.pointings, d.area_deg2, d.limit, d.count, d.faint_count, d.goal_value, d.hours_used, String(d.meets_minimum_count), mark]);
    d.tiers?.forEach((t, k) => rows.push([i, k + 1, t.budget_fraction, t.exposure_hours_per_pointing, t.pointings, t.area_deg2, t.limit, t.count, '', '', '', '', '']));
  });
  if (!p.designs.some((d) => same(d, p.best))) {
    const d = p.best;
    rows.push(['refined', 'all', 1, d.exposure_hours_per_pointing, d.pointings, d.area_deg2, d.limit, d.count, d.faint_count, d.goal_value, d.hours_used, String(d.meets_minimum_count), '*']);
  }
  return csvText(header, rows);
}

interface RowDef {
  key: string;
  label: string;
  value: (s: ComparedSurvey) => string;
  raw: (s: ComparedSurvey) => number | string | undefined;
}

function compareRows(c: Comparison): RowDef[] {
  const rows: RowDef[] = [
    { key: 'area_deg2', label: 'area (deg^2)', value: (s) => sig(s.area_deg2, 4), raw: (s) => s.area_deg2 },
    { key: 'window', label: 'window', value: (s) => `z = ${zText(s.redshift.min)} to ${zText(s.redshift.max)}`, raw: (s) => `${s.redshift.min}-${s.redshift.max}` },
    { key: 'limit', label: 'limit', value: (s) => limitText(s.limit_variable, s.limit), raw: (s) => s.limit },
    { key: 'count', label: 'expected count', value: (s) => sig(s.count, 5), raw: (s) => s.count },
    { key: 'per_deg2', label: 'per deg^2', value: (s) => sig(s.per_deg2, 5), raw: (s) => s.per_deg2 },
    { key: 'faint_count', label: 'fainter than L* / M*', value: (s) => sig(s.faint_count, 5), raw: (s) => s.faint_count },
    { key: 'poisson_fraction', label: 'Poisson fraction', value: (s) => sig(s.poisson_fraction, 3), raw: (s) => s.poisson_fraction },
    { key: 'cosmic_variance_fraction', label: 'cosmic-variance fraction', value: (s) => sig(s.cosmic_variance_fraction, 3), raw: (s) => s.cosmic_variance_fraction },
  ];
  const names = [...new Set(c.surveys.flatMap((s) => Object.keys(s.sigma)))];
  for (const n of names) rows.push({ key: `sigma.${n}`, label: `sigma of ${parameterWords(n)}`, value: (s) => (s.sigma[n] === undefined ? '-' : sig(s.sigma[n]!, 3)), raw: (s) => s.sigma[n] });
  if (c.surveys.some((s) => s.exposure_hours !== undefined)) {
    rows.push({ key: 'exposure_hours', label: 'time (hours)', value: (s) => (s.exposure_hours === undefined ? '-' : sig(s.exposure_hours, 4)), raw: (s) => s.exposure_hours });
    rows.push({ key: 'count_per_hour', label: 'count per hour', value: (s) => (s.count_per_hour === undefined ? '-' : sig(s.count_per_hour, 4)), raw: (s) => s.count_per_hour });
  }
  return rows;
}

export function compareTable(c: Comparison): string {
  // Long titles are wrapped over lines in the column head, never cut.
  const head = ['', ...c.surveys.map((s, i) => wrapWords(`[${i + 1}] ${s.title}`, 32).join('\n'))];
  const t = new Table({ head, style: { head: [], border: [] } });
  for (const r of compareRows(c)) {
    t.push([r.label, ...c.surveys.map((s, i) => `${r.value(s)}${c.best[r.key]?.includes(i) ? ' *' : ''}`)]);
  }
  const lines = [t.toString(), '* best value in the row, on every value that ties for it (larger area, deeper limit, more sources, smaller fractions and sigmas, less time).'];
  c.surveys.forEach((s, i) => lines.push(`[${i + 1}] ${s.file || s.title}: ${s.model.summary}`));
  lines.push(c.cosmic_variance ? 'Sigmas: Fisher matrix with one cosmic-variance normalisation per slice marginalised.' : 'Sigmas: Fisher matrix, Poisson only.');
  for (const n of c.notes) lines.push(`Note: ${n}`);
  lines.push(c.caveat);
  return lines.join('\n') + '\n';
}

export function compareCsv(c: Comparison): string {
  const rows = compareRows(c).map((r): CsvCell[] => [
    r.key,
    ...c.surveys.map((s) => r.raw(s) ?? ''),
    // the columns [n] holding the best value, separated by spaces when several tie
    (c.best[r.key] ?? []).map((i) => i + 1).join(' '),
  ]);
  // Columns are named "[n] title" (as in the table): unique even when two files share a title.
  return csvText(['row', ...c.surveys.map((s, i) => `[${i + 1}] ${s.title}`), 'best'], rows);
}
