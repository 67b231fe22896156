/** Human table and CSV for a Prediction (predict command). */
import Table from 'cli-table3';
import type {
  ModelSpread,
  Prediction,
  PredictionSlice,
  PredictionTotals,
  UncertaintyBlock,
} from '../model/outputs/prediction.js';
import { uncertaintySources } from './sources.js';
export { cosmologyLine, photoZLine, predictionHeader } from './prediction-header.js';
import { predictionHeader } from './prediction-header.js';

export { detectionLine, fluxDensityText, frequencyText } from './detection-text.js';
import { sig, zText } from './format.js';
import { csvText, type CsvCell } from './csv.js';

const LIMIT_HEADINGS: Record<string, string> = {
  log10_luminosity: 'limit log10 L [erg/s]',
  log10_quantity: 'limit log10 quantity',
  absolute_magnitude: 'limit M [AB]',
};

export const FORECAST_CAVEAT = 'These numbers are only as good as the luminosity function assumed above.';

/** Observed-value headings of the interloper table (and CSV column stems). */
const OBSERVED_HEADINGS: Record<string, string> = {
  log10_line_flux: 'log10 line flux [erg/s/cm^2]',
  apparent_magnitude: 'apparent AB magnitude',
  log10_quantity: 'log10 quantity',
  absolute_magnitude: 'absolute AB magnitude',
};

const pm = (count: number, u: { total_fraction: number } | undefined) => (u ? sig(count * u.total_fraction, 3) : '-');
/** The model's 68 % range of a count (p16 - p84 over its draws). */
const modelRange = (m: ModelSpread | undefined) => (m ? `${sig(m.p16, 3)} - ${sig(m.p84, 3)}` : '-');
const MODEL_HEADING = 'model p16 - p84';

/** One sentence on the three sources of a count's uncertainty, naming the one that dominates. */
export function sourcesSentence(
  what: string,
  count: number,
  u: Parameters<typeof uncertaintySources>[0],
  m: ModelSpread | undefined,
): string | undefined {
  const s = uncertaintySources(u, m);
  if (!s || !m) return undefined;
  const pc = percentText;
  return (
    `${what} ${sig(count, 4)}: Poisson noise ${pc(s.poisson)}, cosmic variance ${pc(s.cosmicVariance)}, the model ${pc(s.model)} ` +
    `(${sig(m.p16, 3)} to ${sig(m.p84, 3)} over ${m.draws} draws of its uncertainty); ${s.dominant} dominates.`
  );
}

/**
 * The limit columns of the top-level slices of several populations: one (the slices' own
 * `limit_at_center`, every population's) where their limits read the same at every slice, one per
 * population, named, where they differ (another rest wavelength, spectral slope, blend or
 * attenuation moves a population's limit in its own variable).
 */
function limitColumns(p: Prediction, slices: PredictionSlice[]): { name: string; at: (i: number) => number | null }[] {
  const heading = LIMIT_HEADINGS[p.limit_variable] ?? 'limit';
  const shared = [{ name: heading, at: (i: number) => slices[i]!.limit_at_center }];
  if (p.populations.length < 2) return shared;
  const differ = p.populations.some((q) =>
    q.slices.some((s, i) => limitCell(s.limit_at_center) !== limitCell(slices[i]!.limit_at_center)),
  );
  if (!differ) return shared;
  return p.populations.map((q) => ({ name: `${heading} ${q.name}`, at: (i: number) => q.slices[i]!.limit_at_center }));
}

/** A slice's limit in the table: "-" where it is null (the filter passes none of the population's lines there). */
function limitCell(limit: number | null): string {
  return limit === null ? '-' : sig(limit, 4);
}

/** Redshift slices (the top level's, or one population's own) with a total row. */
function slicesTable(
  p: Prediction,
  slices: PredictionSlice[],
  totals: PredictionTotals,
  columns: { name: string; slice: (s: PredictionSlice) => number; total: number }[],
  limits: { name: string; at: (i: number) => number | null }[] = [
    { name: LIMIT_HEADINGS[p.limit_variable] ?? 'limit', at: (i) => slices[i]!.limit_at_center },
  ],
): string {
  const model = totals.model !== undefined;
  const head = [
    'slice z',
    'volume [Mpc^3]',
    ...limits.map((l) => l.name),
    ...columns.map((c) => c.name),
    'count',
    '+/- (1 sigma)',
    ...(model ? [MODEL_HEADING] : []),
    'per deg^2',
    'cumulative',
  ];
  const table = new Table({ head, style: { head: [], border: [] } });
  slices.forEach((s, i) => {
    table.push([
      `${zText(s.z_min)} - ${zText(s.z_max)}`,
      sig(s.volume_mpc3, 3),
      ...limits.map((l) => limitCell(l.at(i))),
      ...columns.map((c) => sig(c.slice(s), 4)),
      sig(s.count, 4),
      pm(s.count, s.uncertainty),
      ...(model ? [modelRange(s.model)] : []),
      sig(s.per_deg2, 4),
      sig(s.cumulative_count, 4),
    ]);
  });
  table.push([
    'total',
    sig(totals.volume_mpc3, 3),
    ...limits.map(() => ''),
    ...columns.map((c) => sig(c.total, 4)),
    sig(totals.count, 4),
    pm(totals.count, totals.uncertainty),
    ...(model ? [modelRange(totals.model)] : []),
    sig(totals.per_deg2, 4),
    '',
  ]);
  const unseen = slices.some((_, i) => limits.some((l) => l.at(i) === null));
  return unseen ? `${table.toString()}\n${NO_LIMIT_NOTE}` : table.toString();
}

const NO_LIMIT_NOTE =
  "A limit '-': the filter passes none of the population's lines where the slice's limit is taken " +
  "(its middle, or the population's window's nearer end for a slice beyond it): between a line's window and a blended line's, " +
  'or where a tabulated filter is 0. Nothing is detected there; a count is that of the rest of the slice.';

/**
 * A fraction as a percentage for the sentence: one decimal from 0.1 % up, two significant figures
 * below (a full-sky survey's 0.013 % must not read 0.0 %), three significant figures from 10,000 %
 * up (a survey expecting 1e-27 sources must not print its Poisson term to 17 digits).
 */
function percentText(f: number): string {
  const p = 100 * f;
  if (Math.abs(p) >= 1e4) return `${sig(p, 3)} %`;
  return `${Math.abs(p) >= 0.1 || p === 0 ? p.toFixed(1) : p.toPrecision(2)} %`;
}

/** Which term dominates, in words, for the table. */
function dominantTerm(u: UncertaintyBlock): string {
  const ratio = u.cosmic_variance_fraction / u.poisson_fraction;
  if (ratio > 1)
    return `cosmic variance dominates the total's uncertainty (${percentText(u.cosmic_variance_fraction)} against ${percentText(u.poisson_fraction)} Poisson)`;
  return `Poisson noise dominates the total's uncertainty (${percentText(u.poisson_fraction)} against ${percentText(u.cosmic_variance_fraction)} cosmic variance)`;
}

/** The sentence on the total's uncertainty: the terms, the effective bias and where it applies. */
export function uncertaintyNote(totals: PredictionTotals, what = "the total's"): string | undefined {
  const u = totals.uncertainty;
  if (!u) return undefined;
  const halo = u.halo_mass_min_msun ? `; haloes above ${sig(u.halo_mass_min_msun, 3)} Msun have it` : '';
  const depth = u.effective_depth_mpc ? `, effective depth ${sig(u.effective_depth_mpc, 3)} Mpc` : '';
  return (
    `Uncertainty: +/- is Poisson noise and cosmic variance in quadrature; ${dominantTerm(u).replace("the total's", what)}; ` +
    `bias ${sig(u.bias, 3)} (count-weighted over the detected sources${halo}), sigma_matter ${sig(u.sigma_matter, 3)}` +
    `${depth}, detected sources at a mean z = ${zText(totals.mean_redshift ?? 0)}.`
  );
}

/** The total's uncertainty note and its sources of uncertainty, where there are any. */
function pushTotalNotes(out: string[], p: Prediction): void {
  const note = uncertaintyNote(p.totals);
  if (note) out.push(note);
  const sources = sourcesSentence(
    'Sources of uncertainty of the total',
    p.totals.count,
    p.totals.uncertainty,
    p.totals.model,
  );
  if (sources) out.push(sources);
}

export function predictionTable(p: Prediction): string {
  const multi = p.populations.length > 1;
  const out = [...predictionHeader(p)];
  if (p.breakdown === 'redshift') {
    const columns = multi
      ? p.populations.map((q) => ({
          name: q.name,
          slice: (s: PredictionSlice) => s.population_counts?.[q.name] ?? 0,
          total: q.totals.count,
        }))
      : [];
    if (p.photo_z) {
      const trueTotal = p.slices.reduce((a, s) => a + (s.count_true_redshift ?? 0), 0);
      columns.push({
        name: 'true-z count',
        slice: (s: PredictionSlice) => s.count_true_redshift ?? 0,
        total: trueTotal,
      });
    }
    out.push(slicesTable(p, p.slices, p.totals, columns, limitColumns(p, p.slices)));
    pushTotalNotes(out, p);
  } else {
    out.push('Every population over its own window (the survey detects them all):');
    out.push(populationsTable(p));
    pushTotalNotes(out, p);
    out.push(
      `Detections per bin of ${OBSERVED_HEADINGS[p.observed_bins.variable] ?? p.observed_bins.variable}, every population over its own window ` +
        `(share: the interloper fraction; bins with under ${100 * OBSERVED_TABLE_FLOOR}% of the detections at either end are left out here, not in the JSON or CSV):`,
    );
    out.push(observedTable(p));
    for (const q of p.populations) {
      out.push(`${q.name}, its own redshift slices:`);
      out.push(slicesTable(p, q.slices, q.totals, []));
    }
  }
  return [...out, ...populationSummary(p), ...densitySummary(p), FORECAST_CAVEAT, ''].join('\n');
}

/** One row per population (its window, count, +/-, per deg^2 and share of all detections) and the total. */
function populationsTable(p: Prediction): string {
  const all = p.totals.count;
  const model = p.totals.model !== undefined;
  const table = new Table({
    head: [
      'population',
      'window z',
      'volume [Mpc^3]',
      'count',
      '+/- (1 sigma)',
      ...(model ? [MODEL_HEADING] : []),
      'per deg^2',
      'share',
    ],
    style: { head: [], border: [] },
  });
  for (const q of p.populations) {
    table.push([
      q.name,
      `${zText(q.window.min)} - ${zText(q.window.max)}`,
      sig(q.totals.volume_mpc3, 3),
      sig(q.totals.count, 4),
      pm(q.totals.count, q.totals.uncertainty),
      ...(model ? [modelRange(q.totals.model)] : []),
      sig(q.totals.per_deg2, 4),
      all > 0 ? pct(q.totals.count / all) : '0%',
    ]);
  }
  table.push([
    'total',
    '',
    sig(p.totals.volume_mpc3, 3),
    sig(all, 4),
    pm(all, p.totals.uncertainty),
    ...(model ? [modelRange(p.totals.model)] : []),
    sig(p.totals.per_deg2, 4),
    all > 0 ? '100%' : '0%',
  ]);
  return table.toString();
}

/** A bin holding less than this fraction of all detections is left out of the table at either end. */
const OBSERVED_TABLE_FLOOR = 1e-4;

/** The observed bins without the nearly empty ones at either end (the JSON and CSV keep every bin). */
export function observedTableBins(p: Prediction): Prediction['observed_bins']['bins'] {
  const bins = p.observed_bins.bins;
  const floor = OBSERVED_TABLE_FLOOR * p.totals.count;
  let a = 0;
  let b = bins.length;
  while (a < b && !(bins[a]!.count >= floor)) a++;
  while (b > a && !(bins[b - 1]!.count >= floor)) b--;
  return bins.slice(a, b);
}

/** The observed bins: each population's count and share, and the bin's count. */
function observedTable(p: Prediction): string {
  const o = p.observed_bins;
  const names = p.populations.map((q) => q.name);
  const table = new Table({
    head: [
      OBSERVED_HEADINGS[o.variable] ?? o.variable,
      ...names,
      'count',
      'per deg^2',
      ...names.map((n) => `${n} share`),
    ],
    style: { head: [], border: [] },
  });
  for (const b of observedTableBins(p)) {
    table.push([
      `${sig(b.min, 4)} - ${sig(b.max, 4)}`,
      ...names.map((n) => sig(b.populations[n]!.count, 4)),
      sig(b.count, 4),
      sig(b.per_deg2, 4),
      ...names.map((n) => (b.count > 0 ? pct(b.populations[n]!.share) : '-')),
    ]);
  }
  return table.toString();
}

/** A share in per cent, 3 significant figures. */
function pct(x: number): string {
  return `${sig(100 * x, 3)}%`;
}

/** Several populations: each one's share of all detections, over its own window. */
export function populationSummary(p: Prediction): string[] {
  if (p.populations.length < 2) return [];
  const all = p.totals.count;
  const parts = p.populations.map(
    (q) =>
      `${q.name} ${sig(q.totals.count, 4)} (${all > 0 ? pct(q.totals.count / all) : '0%'}, z = ${zText(q.window.min)}-${zText(q.window.max)})`,
  );
  return [`Share of all ${sig(all, 4)} detections (${sig(p.totals.per_deg2, 4)} per deg^2): ${parts.join('; ')}.`];
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
    if (sfr)
      line += `; star-formation-rate density ${sig(sfr.detected, 4)}${sfr.total !== undefined ? ` of ${sig(sfr.total, 4)}` : ''} Msun/yr/Mpc^3`;
    lines.push(line);
  }
  return lines;
}

/**
 * CSV of the top-level breakdown: one row per redshift slice (breakdown "redshift"; with several
 * populations a count column for each), or one row per bin of the observed value (breakdown
 * "observed": each population's count and share, the bin's count and per deg^2). The JSON holds
 * everything else (each population's own slices).
 */
export function predictionCsv(p: Prediction): string {
  const multi = p.populations.length > 1;
  const names = p.populations.map((q) => q.name);
  if (p.breakdown === 'observed') {
    const o = p.observed_bins;
    const header = [
      `${o.variable}_min`,
      `${o.variable}_max`,
      ...names.map((n) => `count_${n}`),
      'count',
      'per_deg2',
      ...names.map((n) => `share_${n}`),
    ];
    const rows = o.bins.map((b): CsvCell[] => [
      b.min,
      b.max,
      ...names.map((n) => b.populations[n]!.count),
      b.count,
      b.per_deg2,
      ...names.map((n) => b.populations[n]!.share),
    ]);
    return csvText(header, rows);
  }
  const model = p.totals.model !== undefined;
  const header = [
    'z_min',
    'z_max',
    'volume_mpc3',
    `limit_at_center_${p.limit_variable}`,
    ...(multi ? names.map((n) => `count_${n}`) : []),
    ...(p.photo_z ? ['count_true_redshift'] : []),
    'count',
    'poisson_fraction',
    'cosmic_variance_fraction',
    'total_fraction',
    'bias',
    ...(model ? ['model_p16', 'model_p50', 'model_p84', 'model_fraction'] : []),
    'per_deg2',
    'cumulative_count',
  ];
  const rows = p.slices.map((s): CsvCell[] => [
    s.z_min,
    s.z_max,
    s.volume_mpc3,
    s.limit_at_center ?? '',
    ...(multi ? names.map((n) => s.population_counts?.[n] ?? 0) : []),
    ...(p.photo_z ? [s.count_true_redshift ?? 0] : []),
    s.count,
    s.uncertainty?.poisson_fraction ?? '',
    s.uncertainty?.cosmic_variance_fraction ?? '',
    s.uncertainty?.total_fraction ?? '',
    s.uncertainty?.bias ?? '',
    ...(model ? [s.model?.p16 ?? '', s.model?.p50 ?? '', s.model?.p84 ?? '', s.model?.fraction ?? ''] : []),
    s.per_deg2,
    s.cumulative_count,
  ]);
  return csvText(header, rows);
}
