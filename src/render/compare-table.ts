/** Human table and CSV for compare. */
import Table from 'cli-table3';
import { limitText, parameterWords, sig, wrapWords, zText } from './format.js';
import { csvText, type CsvCell } from './csv.js';
import { givenUnitLimitText } from './detection-text.js';
import { cosmologyLine } from './predict-table.js';
import type { ComparedSurvey, Comparison } from '../model/outputs/compare.js';

interface RowDef {
  key: string;
  label: string;
  value: (s: ComparedSurvey) => string;
  raw: (s: ComparedSurvey) => number | string | undefined;
}

function compareRows(c: Comparison): RowDef[] {
  const rows: RowDef[] = [
    { key: 'area_deg2', label: 'area (deg^2)', value: (s) => sig(s.area_deg2, 4), raw: (s) => s.area_deg2 },
    {
      key: 'window',
      label: 'window',
      value: (s) => `z = ${zText(s.redshift.min)} to ${zText(s.redshift.max)}`,
      raw: (s) => `${s.redshift.min}-${s.redshift.max}`,
    },
    {
      key: 'limit',
      label: 'limit',
      value: (s) =>
        typeof s.limit !== 'number'
          ? limitText(s.limit_variable, s.limit)
          : s.limit_jy_km_s !== undefined
            ? `${sig(s.limit_jy_km_s, 3)} Jy km/s (${limitText(s.limit_variable, s.limit)})`
            : givenUnitLimitText(s.limit, limitText(s.limit_variable, s.limit), s.limit_unit),
      raw: (s) => s.limit,
    },
    { key: 'count', label: 'expected count', value: (s) => sig(s.count, 5), raw: (s) => s.count },
    { key: 'per_deg2', label: 'per deg^2', value: (s) => sig(s.per_deg2, 5), raw: (s) => s.per_deg2 },
    {
      key: 'faint_count',
      label: 'fainter than L* / M*',
      value: (s) => sig(s.faint_count, 5),
      raw: (s) => s.faint_count,
    },
    {
      key: 'poisson_fraction',
      label: 'Poisson fraction',
      value: (s) => sig(s.poisson_fraction, 3),
      raw: (s) => s.poisson_fraction,
    },
    {
      key: 'cosmic_variance_fraction',
      label: 'cosmic-variance fraction',
      value: (s) => sig(s.cosmic_variance_fraction, 3),
      raw: (s) => s.cosmic_variance_fraction,
    },
  ];
  if (c.surveys.some((s) => s.model_fraction !== undefined)) {
    rows.push({
      key: 'model_fraction',
      label: 'model fraction',
      value: (s) => (s.model_fraction === undefined ? '-' : sig(s.model_fraction, 3)),
      raw: (s) => s.model_fraction,
    });
  }
  const names = [...new Set(c.surveys.flatMap((s) => Object.keys(s.sigma)))];
  for (const n of names)
    rows.push({
      key: `sigma.${n}`,
      label: `sigma of ${parameterWords(n)}`,
      value: (s) => (s.sigma[n] === undefined ? '-' : sig(s.sigma[n], 3)),
      raw: (s) => s.sigma[n],
    });
  if (c.surveys.some((s) => s.exposure_hours !== undefined)) {
    rows.push({
      key: 'exposure_hours',
      label: 'time (hours)',
      value: (s) => (s.exposure_hours === undefined ? '-' : sig(s.exposure_hours, 4)),
      raw: (s) => s.exposure_hours,
    });
    rows.push({
      key: 'count_per_hour',
      label: 'count per hour',
      value: (s) => (s.count_per_hour === undefined ? '-' : sig(s.count_per_hour, 4)),
      raw: (s) => s.count_per_hour,
    });
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
  const lines = [
    t.toString(),
    '* best value in the row, on every value that ties for it (larger area, deeper limit, more sources, smaller fractions and sigmas, less time).',
  ];
  c.surveys.forEach((s, i) => lines.push(`[${i + 1}] ${s.file || s.title}: ${s.model.summary}`));
  // the cosmology once when every file assumes the same, else each file's
  const cosmologies = new Set(c.surveys.map((s) => JSON.stringify(s.cosmology)));
  if (cosmologies.size === 1 && c.surveys.length > 0)
    lines.push(`Cosmology: ${cosmologyLine(c.surveys[0]!.cosmology)}`);
  else c.surveys.forEach((s, i) => lines.push(`[${i + 1}] cosmology: ${cosmologyLine(s.cosmology)}`));
  if (c.surveys.some((s) => Object.keys(s.sigma).length > 0))
    lines.push(
      c.cosmic_variance
        ? 'Sigmas: Fisher matrix with one cosmic-variance normalisation per slice, correlated between the slices, marginalised.'
        : 'Sigmas: Fisher matrix, Poisson only.',
    );
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
