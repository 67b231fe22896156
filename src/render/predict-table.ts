/** Human table and CSV for a Prediction (predict command). */
import Table from 'cli-table3';
import type { Prediction } from '../counts/predict.js';
import { sig, zText } from './format.js';
import { csvText, type CsvCell } from './csv.js';
import { dominantTerm } from '../uncertainty/prediction.js';

const LIMIT_HEADINGS: Record<string, string> = {
  log10_luminosity: 'limit log10 L [erg/s]',
  log10_quantity: 'limit log10 quantity',
  absolute_magnitude: 'limit M [AB]',
};

export function cosmologyLine(c: Prediction['cosmology']): string {
  const base = `flat Lambda-CDM, H0 = ${sig(c.h0)} km/s/Mpc, Omega_m = ${sig(c.omega_m)}, Omega_Lambda = ${sig(c.omega_lambda, 6)}, T_cmb = ${sig(c.t_cmb)} K`;
  return c.preset ? `${base} (preset ${c.preset}: ${c.preset_source})` : base;
}

export function detectionLine(p: Prediction): string {
  const d = p.detection;
  if (d.kind === 'line_flux') {
    const f = d.filter as { center_angstrom: number; fwhm_angstrom: number; profile: string } | undefined;
    const filter = f ? `, ${f.profile} filter at ${sig(f.center_angstrom)} A (FWHM ${sig(f.fwhm_angstrom)} A)` : '';
    return `line flux limit ${sig(d.limit_cgs as number)} erg/s/cm^2${filter}`;
  }
  if (d.kind === 'magnitude') {
    return `AB magnitude limit ${sig(d.limit_ab_mag as number)} in a band at ${sig(d.band_angstrom as number)} A (spectral slope beta = ${sig(d.beta as number)})`;
  }
  const q = p.models[0]?.quantity ?? (p.limit_variable === 'absolute_magnitude' ? 'absolute AB magnitude' : 'the quantity');
  const lim = d.limit as number | string | { table: [number, number][] };
  const text = typeof lim === 'number' ? sig(lim) : typeof lim === 'string' ? `"${lim}"` : `table ${JSON.stringify(lim.table)}`;
  return `threshold on ${p.limit_variable === 'absolute_magnitude' ? q : `log10 ${q}`}: ${text}`;
}

export function predictionHeader(p: Prediction): string[] {
  const lines = [
    p.title,
    `Survey: ${sig(p.area_deg2)} deg^2, z = ${zText(p.redshift.min)} to ${zText(p.redshift.max)}, ${detectionLine(p)}${p.detection.completeness ? ', with completeness' : ''}`,
    `Cosmology: ${cosmologyLine(p.cosmology)}`,
  ];
  for (const m of p.models) lines.push(`Assumed model: ${m.summary}`);
  return lines;
}

export const FORECAST_CAVEAT = 'These numbers are only as good as the luminosity function assumed above.';

export function predictionTable(p: Prediction): string {
  const multi = p.populations.length > 1;
  const head = [
    'slice z',
    'volume [Mpc^3]',
    LIMIT_HEADINGS[p.limit_variable] ?? 'limit',
    ...(multi ? p.populations.map((q) => `${q.name}`) : []),
    'count',
    '+/- (1 sigma)',
    'per deg^2',
    'cumulative',
  ];
  const pm = (count: number, u: { total_fraction: number } | undefined) => (u ? sig(count * u.total_fraction, 3) : '-');
  const table = new Table({ head, style: { head: [], border: [] } });
  p.slices.forEach((s) => {
    table.push([
      `${zText(s.z_min)} - ${zText(s.z_max)}`,
      sig(s.volume_mpc3, 3),
      sig(s.limit_at_center, 4),
      ...(multi ? p.populations.map((q) => sig(s.population_counts?.[q.name] ?? 0, 4)) : []),
      sig(s.count, 4),
      pm(s.count, s.uncertainty),
      sig(s.per_deg2, 4),
      sig(s.cumulative_count, 4),
    ]);
  });
  table.push([
    'total',
    sig(p.totals.volume_mpc3, 3),
    '',
    ...(multi ? p.populations.map((q) => sig(p.slices.reduce((a, s) => a + (s.population_counts?.[q.name] ?? 0), 0), 4)) : []),
    sig(p.totals.count, 4),
    pm(p.totals.count, p.totals.uncertainty),
    sig(p.totals.per_deg2, 4),
    '',
  ]);
  const notes: string[] = [];
  const u = p.totals.uncertainty;
  if (u) {
    notes.push(
      `Uncertainty: +/- is Poisson noise and cosmic variance in quadrature; ${dominantTerm(u)}; ` +
        `bias ${sig(u.bias, 3)}${u.halo_mass_min_msun ? ` (haloes above ${sig(u.halo_mass_min_msun, 3)} Msun, abundance matching)` : ''}, ` +
        `sigma_matter ${sig(u.sigma_matter, 3)} at z = ${zText(p.totals.mean_redshift ?? 0)}.`,
    );
  }
  return [...predictionHeader(p), table.toString(), ...notes, ...populationSummary(p), ...densitySummary(p), FORECAST_CAVEAT, ''].join('\n');
}

function pct(x: number): string {
  return `${sig(100 * x, 3)}%`;
}

/** Several populations: their own totals, and each one's share of all detections (the interloper summary). */
export function populationSummary(p: Prediction): string[] {
  if (p.populations.length < 2) return [];
  const all = p.all_populations.count;
  const lines = [
    `All populations over their own windows: ${sig(all, 4)} detections (${sig(p.all_populations.per_deg2, 4)} per deg^2); the table counts those inside its slices.`,
  ];
  const parts = p.populations.map(
    (q) => `${q.name} ${sig(q.totals.count, 4)} (${all > 0 ? pct(q.totals.count / all) : '0%'}, z = ${zText(q.window.min)}-${zText(q.window.max)})`,
  );
  lines.push(`Share of all detections: ${parts.join('; ')}.`);
  return lines;
}

function densityText(ld: NonNullable<Prediction['totals']['luminosity_density']>): string {
  return ld.total !== undefined
    ? `detected ${sig(ld.detected, 4)} of ${sig(ld.total, 4)} ${ld.unit} (${pct(ld.fraction ?? 0)})`
    : `detected ${sig(ld.detected, 4)} ${ld.unit}; ${ld.note ?? 'no total'}`;
}

/** Luminosity and star-formation-rate densities over each population's window. */
export function densitySummary(p: Prediction): string[] {
  const lines: string[] = [];
  for (const q of p.populations) {
    const ld = q.totals.luminosity_density;
    if (!ld) continue;
    const who = p.populations.length > 1 ? `${q.name}: ` : '';
    let line = `${who}luminosity density ${densityText(ld)}`;
    const sfr = q.totals.sfr_density_msun_yr_mpc3;
    if (sfr) line += `; star-formation-rate density ${sig(sfr.detected, 4)}${sfr.total !== undefined ? ` of ${sig(sfr.total, 4)}` : ''} Msun/yr/Mpc^3`;
    lines.push(line);
  }
  return lines;
}

export function predictionCsv(p: Prediction): string {
  const multi = p.populations.length > 1;
  const header = [
    'z_min',
    'z_max',
    'volume_mpc3',
    `limit_at_center_${p.limit_variable}`,
    ...(multi ? p.populations.map((q) => `count_${q.name}`) : []),
    'count',
    'poisson_fraction',
    'cosmic_variance_fraction',
    'total_fraction',
    'bias',
    'per_deg2',
    'cumulative_count',
  ];
  const rows = p.slices.map((s): CsvCell[] => [
      s.z_min,
      s.z_max,
      s.volume_mpc3,
      s.limit_at_center,
      ...(multi ? p.populations.map((q) => s.population_counts?.[q.name] ?? 0) : []),
      s.count,
      s.uncertainty?.poisson_fraction ?? '',
      s.uncertainty?.cosmic_variance_fraction ?? '',
      s.uncertainty?.total_fraction ?? '',
      s.uncertainty?.bias ?? '',
      s.per_deg2,
      s.cumulative_count,
    ]);
  return csvText(header, rows);
}
