/** Human table and CSV for a Forecast (forecast command). */
import Table from 'cli-table3';
import { digitsBeside, sig, zText } from './format.js';
import { csvText, type CsvCell } from './csv.js';
import { givenUnitLimitText } from './detection-text.js';
import { cosmologyLine } from './predict-table.js';
import type { Forecast } from '../model/outputs/forecast.js';

/** A value beside its spread, with digitsBeside's digits (at least 5). */
function sigBeside(x: number, spread: number): string {
  return sig(x, digitsBeside(x, spread, 5));
}

export function forecastTable(f: Forecast): string {
  const lines: string[] = [
    f.title,
    `Survey: ${sig(f.area_deg2)} deg^2, z = ${zText(f.redshift.min)} to ${zText(f.redshift.max)}, ${sig(f.count, 5)} sources expected`,
    `Cosmology: ${cosmologyLine(f.cosmology)}`,
    `Assumed model: ${f.model.summary}`,
    `Parameters: constant offsets at every z to ${f.parameters.join(', ')} (input values at z = ${zText(0.5 * (f.model.window.min + f.model.window.max))})`,
    f.cosmic_variance
      ? 'Fisher: unbinned Poisson likelihood, one cosmic-variance normalisation per slice, correlated between the slices, marginalised'
      : 'Fisher: unbinned Poisson likelihood, cosmic variance switched off',
  ];
  const head = ['parameter', 'input', 'sigma (Fisher)', 'sigma (Poisson only)'];
  const m = f.mocks;
  // "mock offset": the mean of the mock fits minus the input (not the galaxy bias), in standard errors of that mean
  if (m) head.push('mock mean', 'mock std', 'p16', 'p50', 'p84', 'mock offset [s.e.]');
  const table = new Table({ head, style: { head: [], border: [] } });
  for (const n of f.parameters) {
    const row = [
      n,
      sigBeside(f.center[n]!, f.fisher.sigma[n]!),
      sig(f.fisher.sigma[n]!, 3),
      sig(f.fisher_poisson_only.sigma[n]!, 3),
    ];
    if (m) {
      const s = m.parameters[n];
      if (s)
        row.push(
          sigBeside(s.mean, s.std),
          sig(s.std, 3),
          sigBeside(s.p16, s.std),
          sigBeside(s.p50, s.std),
          sigBeside(s.p84, s.std),
          sig(s.bias_in_standard_errors, 2),
        );
      else row.push('not constrained', '', '', '', '', '');
    }
    table.push(row);
  }
  lines.push(table.toString());
  lines.push(
    `Correlations (Fisher): ${f.parameters
      .map((a, i) =>
        f.parameters
          .slice(i + 1)
          .map((b, k) => `${a}-${b} ${sig(f.fisher.correlation[i]![i + 1 + k]!, 3)}`)
          .join(', '),
      )
      .filter((s) => s)
      .join(', ')}`,
  );
  const ms = f.model_spread;
  if (ms) {
    lines.push(
      `Across the model (${ms.draws} ${ms.source === 'draws_file' ? 'rows of its draws file' : `draws of its model_uncertainty, seed ${ms.seed}`}; p16-p84 of the sigmas):`,
    );
    for (const n of f.parameters) {
      const q = ms.sigma[n];
      if (q)
        lines.push(
          `  sigma(${n}) = ${sig(f.fisher.sigma[n]!, 3)} (${sig(q.p16, 3)}-${sig(q.p84, 3)} across the model)`,
        );
    }
    for (const note of ms.notes) lines.push(`  ${note}`);
  }
  if (m) {
    lines.push(
      `Mocks: ${m.count} surveys (seed ${m.seed}, ${m.estimator === 'sty' ? 'STY shape-only estimator' : 'extended maximum likelihood'}), ${sig(m.mean_sources, 5)} sources on average, ${m.failed_fits} failed fits`,
    );
    lines.push(
      '  mock offset: the mean of the mock fits minus the input value, in standard errors of that mean (an estimator bias, not the galaxy bias)',
    );
    for (const note of m.notes) lines.push(`  ${note}`);
  }
  const r = f.requirement;
  if (r) {
    // the limit as compare and plan write it: AB for an apparent magnitude, M = for an absolute one
    const limitWords = (x: number): string =>
      r.limit_variable === 'line_flux_cgs'
        ? r.limit_jy_km_s_per_cgs !== undefined
          ? `${sig(x * r.limit_jy_km_s_per_cgs, 4)} Jy km/s (${sig(x, 4)} erg/s/cm^2)`
          : `${sig(x, 4)} erg/s/cm^2`
        : r.limit_variable === 'log10_quantity'
          ? `${sig(x, 4)} (log10 quantity)`
          : r.limit_variable === 'absolute_magnitude'
            ? `M = ${sig(x, 4)}`
            : givenUnitLimitText(x, `${sig(x, 4)} AB`, r.limit_unit);
    lines.push('To reach the target:');
    for (const [n, e] of Object.entries(r.by_parameter)) {
      const area = e.area_deg2 !== null ? `${sig(e.area_deg2, 3)} deg^2 at this depth` : 'no area at this depth';
      const limit = e.limit !== null ? `a limit of ${limitWords(e.limit)} at this area` : 'no limit at this area';
      lines.push(`  sigma(${n}) = ${sig(e.target)}: ${area}; ${limit}`);
      for (const note of e.notes) lines.push(`    ${note}`);
    }
    // notes of the whole requirement (what every limit assumes), beside each parameter's own
    const own = new Set(Object.values(r.by_parameter).flatMap((e) => e.notes));
    for (const note of r.notes) if (!own.has(note)) lines.push(`  ${note}`);
    if (r.model) {
      const cases = [
        ["at the model's median (p50)", r.model.p50],
        ["at the model's pessimistic case (p84: met in 84% of the draws)", r.model.p84],
      ] as const;
      for (const [label, at] of cases) {
        lines.push(`  ${label}:`);
        for (const [n, e] of Object.entries(at.by_parameter)) {
          const area = e.area_deg2 !== null ? `${sig(e.area_deg2, 3)} deg^2 at this depth` : 'no area at this depth';
          const limit = e.limit !== null ? `a limit of ${limitWords(e.limit)} at this area` : 'no limit at this area';
          lines.push(`    sigma(${n}) = ${sig(e.target)}: ${area}; ${limit}`);
          for (const note of e.notes) lines.push(`      ${note}`);
        }
      }
    }
  }
  lines.push(f.caveat, '');
  return lines.join('\n');
}

/** One row per parameter. */
export function forecastCsv(f: Forecast): string {
  const m = f.mocks;
  const r = f.requirement;
  const head = ['parameter', 'input', 'sigma_fisher', 'sigma_poisson_only'];
  if (m)
    head.push(
      'mock_mean',
      'mock_std',
      'mock_p16',
      'mock_p50',
      'mock_p84',
      'mock_offset',
      'mock_offset_in_standard_errors',
    );
  const ms = f.model_spread;
  if (ms) head.push('sigma_model_p16', 'sigma_model_p50', 'sigma_model_p84');
  if (r) head.push('target', 'area_deg2_needed', `limit_needed_${r.limit_variable}`);
  if (r?.model)
    head.push(
      'area_deg2_needed_model_p50',
      `limit_needed_model_p50_${r.limit_variable}`,
      'area_deg2_needed_model_p84',
      `limit_needed_model_p84_${r.limit_variable}`,
    );
  const rows = f.parameters.map((n) => {
    const row: CsvCell[] = [n, f.center[n]!, f.fisher.sigma[n]!, f.fisher_poisson_only.sigma[n]!];
    if (m) {
      const s = m.parameters[n];
      row.push(
        ...(s ? [s.mean, s.std, s.p16, s.p50, s.p84, s.bias, s.bias_in_standard_errors] : ['', '', '', '', '', '', '']),
      );
    }
    if (ms) {
      const q = ms.sigma[n];
      row.push(q?.p16 ?? '', q?.p50 ?? '', q?.p84 ?? '');
    }
    if (r) {
      const e = r.by_parameter[n];
      row.push(e ? e.target : '', e?.area_deg2 ?? '', e?.limit ?? '');
    }
    if (r?.model) {
      const a = r.model.p50.by_parameter[n];
      const b = r.model.p84.by_parameter[n];
      row.push(a?.area_deg2 ?? '', a?.limit ?? '', b?.area_deg2 ?? '', b?.limit ?? '');
    }
    return row;
  });
  return csvText(head, rows);
}
