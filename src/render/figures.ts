/**
 * Figures: vega-lite specifications built from result objects, drawn to SVG in Node.
 *
 * Each `*Spec` function is pure and synchronous (result object in, vega-lite spec out, or null
 * when the piece it draws is absent). Each `*Figure` function renders its spec to SVG and
 * returns {name, title, spec, svg}. vega and vega-lite are loaded on first render only
 * (dynamic import), so commands that draw nothing never load them.
 *
 * Drawing never touches the network or the disk: data are inline values, and the vega loader
 * handed to the view refuses every URL, file and image it is asked for.
 */
import type {
  Figure,
  ForecastView,
  LuminosityFunctionCurve,
  ModelAsWritten,
  PlanView,
  PredictionView,
  SliceView,
} from './types.js';
import type { ObservedBins } from '../model/outputs/prediction.js';
import { formatRange, goalWords, precise, wrapWords } from './format.js';

export { formatRange };

type Spec = Record<string, unknown>;

/**
 * Colours, chosen for this project (not taken from a published palette): one blue/orange pair,
 * which stays distinct for red-green colour deficiency, plus a near-black ink and a pale blue,
 * spaced in CIE L* lightness (17, 42, 65, 87) so that every pair also differs in greyscale print.
 * test/render/figures.test.ts recomputes L* (CIE 15 / sRGB IEC 61966-2-1 formulas) and checks
 * the spacing.
 */
export const PALETTE = {
  /** Text, error bars, limits, fiducial point. */
  ink: '#1b2a4a',
  /** Main data: bars, curves, 1-sigma region, plan curve. */
  blue: '#2b65a8',
  /** Highlights: knee, best design, mock fits. */
  orange: '#de8a2a',
  /** Fills: detected part, near-best band. */
  pale: '#c7dbf0',
} as const;

/** Fonts named in the SVG; none is fetched (these are installed or fall back to sans-serif). */
export const FONT = 'DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif';

/** Shared look: sizes that stay readable when printed at column width. */
const CONFIG: Spec = {
  font: FONT,
  background: 'white',
  padding: 10,
  view: { stroke: '#9aa3b0' },
  title: {
    fontSize: 15,
    fontWeight: 'bold',
    subtitleFontSize: 12,
    subtitleColor: '#333333',
    anchor: 'start',
    color: PALETTE.ink,
    offset: 10,
  },
  axis: {
    labelFontSize: 12,
    titleFontSize: 13,
    titleFontWeight: 'normal',
    labelColor: '#222222',
    titleColor: '#111111',
    gridColor: '#e4e7ec',
    domainColor: '#555555',
    tickColor: '#555555',
  },
  header: { labelFontSize: 12, titleFontSize: 13 },
  legend: { labelFontSize: 12, titleFontSize: 12 },
  concat: { spacing: 18 },
};

/**
 * Delta chi-square of the joint 2-parameter regions drawn as "1 sigma" and "2 sigma": the
 * chi-square (2 degrees of freedom) quantiles at the normal 1- and 2-sigma probabilities,
 * Delta chi2 = -2 ln(1 - p) with p = erf(k / sqrt 2). Closed form for 2 degrees of freedom;
 * the values 2.30 and 6.17 are tabulated by Coe (2009), arXiv:0906.4123, table 1.
 */
export const DELTA_CHI2_2D = {
  one: -2 * Math.log(1 - 0.6826894921370859),
  two: -2 * Math.log(1 - 0.9544997361036416),
} as const;

// ---------------------------------------------------------------------------------------------
// Small helpers

const finite = (...xs: unknown[]): boolean => xs.every((x) => typeof x === 'number' && Number.isFinite(x));

function withTitle(surveyTitle: string | undefined, what: string): string {
  const t = (surveyTitle ?? '').trim();
  return t ? `${t}: ${what}` : what;
}

/**
 * Average width of a character of the title [px] (15 px bold DejaVu Sans, the figures' first
 * font, measured on the drawn PNGs: 65 characters span about 565 px), and of the subtitle (12 px).
 */
export const TITLE_CHAR_PX = { title: 9, subtitle: 7 } as const;

/**
 * Title block: the survey title first, what the figure shows next, notes (how to read it) as
 * subtitle lines. Every line is wrapped at word boundaries to the figure's drawn width
 * `widthPx`, never cut, so a long survey title neither widens the figure nor loses words. The
 * whole title, on one line, goes to usermeta.title.
 */
function titleBlock(
  surveyTitle: string | undefined,
  what: string,
  notes: string[],
  widthPx: number,
): { title: Spec; usermeta: Spec } {
  const t = (surveyTitle ?? '').trim();
  const titleChars = Math.max(30, Math.floor(widthPx / TITLE_CHAR_PX.title));
  const noteChars = Math.max(36, Math.floor(widthPx / TITLE_CHAR_PX.subtitle));
  const lines = [...(t ? wrapWords(t, titleChars) : []), ...wrapWords(what, titleChars)];
  return {
    title: { text: lines, subtitle: notes.flatMap((n) => wrapWords(n, noteChars)), subtitlePadding: 4 },
    usermeta: { title: withTitle(surveyTitle, what) },
  };
}

/** Width drawn by small multiples of `columns` panels of `panelPx` (axis and spacing included). */
function multiplesWidth(columns: number, panelPx: number): number {
  return columns * (panelPx + 80);
}

function models(m: ModelAsWritten | ModelAsWritten[] | undefined): ModelAsWritten[] {
  if (!m) return [];
  return Array.isArray(m) ? m : [m];
}

/** True when the population variable is absolute magnitude (brighter = smaller). */
function isMagnitude(model: ModelAsWritten | undefined, curve?: LuminosityFunctionCurve): boolean {
  if (model?.variable === 'magnitude') return true;
  if (model?.variable === 'luminosity') return false;
  const label = curve?.x_label ?? '';
  return /magnitude|\bmag\b|^M\b/i.test(label);
}

const histogramLabels: Record<string, string> = {
  apparent_magnitude: 'apparent AB magnitude [mag]',
  log10_line_flux: 'log₁₀ line flux [erg s⁻¹ cm⁻²]',
};

function histogramAxisLabel(variable: string, model: ModelAsWritten | undefined): string {
  const known = histogramLabels[variable];
  if (known) return known;
  if (variable === 'log10_quantity') {
    const q = typeof model?.quantity === 'string' && model.quantity.trim() ? model.quantity.trim() : 'quantity';
    return `log₁₀ ${q}`;
  }
  return variable;
}

// ---------------------------------------------------------------------------------------------
// 1. Counts per redshift slice

export interface CountRow {
  slice: number;
  z_min: number;
  z_max: number;
  z_mid: number;
  count: number;
  per_deg2: number;
  /** count * (1 - total_fraction), present with an uncertainty. */
  low?: number;
  high?: number;
  /** Under the model's own uncertainty: its p16, p50 and p84 (predict's model block), drawn as a band beside the error bar from band_x1 to band_x2. */
  model_p16?: number;
  model_p50?: number;
  model_p84?: number;
  model_draws?: number;
  band_x1?: number;
  band_x2?: number;
}

/** Where the model band sits in a slice: this span of the slice's width to the right of its middle (the error bar's place). */
export const MODEL_BAND_SPAN: readonly [number, number] = [0.1, 0.3];

export function countRows(p: PredictionView): CountRow[] {
  return p.slices
    .map((s, i) => {
      const row: CountRow = {
        slice: i + 1,
        z_min: s.z_min,
        z_max: s.z_max,
        z_mid: (s.z_min + s.z_max) / 2,
        count: s.count,
        per_deg2: s.per_deg2,
      };
      const f = s.uncertainty?.total_fraction;
      if (finite(f)) {
        row.low = Math.max(0, s.count * (1 - (f as number)));
        row.high = s.count * (1 + (f as number));
      }
      const m = s.model;
      if (m && finite(m.p16, m.p50, m.p84)) {
        row.model_p16 = m.p16;
        row.model_p50 = m.p50;
        row.model_p84 = m.p84;
        row.model_draws = m.draws;
        const w = s.z_max - s.z_min;
        row.band_x1 = row.z_mid + MODEL_BAND_SPAN[0] * w;
        row.band_x2 = row.z_mid + MODEL_BAND_SPAN[1] * w;
      }
      return row;
    })
    .filter((r) => finite(r.z_min, r.z_max, r.count));
}

/** Counts spanning more than this factor (largest over smallest above 0) are drawn on a log axis. */
export const COUNTS_LOG_SPAN = 10;
/** Decades a log count axis shows below the largest count (smaller counts sit on its floor). */
export const COUNTS_LOG_DECADES = 6;

/**
 * The count axis: linear from 0, or logarithmic when the counts span more than COUNTS_LOG_SPAN;
 * then bars rise from `floor`, the power of ten at or below the smallest count and error-bar
 * end drawn (but at most COUNTS_LOG_DECADES decades below the largest count), and the axis ends
 * at `top`, the power of ten at or above the highest error-bar end.
 */
export function countsAxis(
  rows: readonly CountRow[],
): { log: false } | { log: true; floor: number; top: number; span: number } {
  const positive = rows.map((r) => r.count).filter((c) => c > 0);
  if (positive.length < 2) return { log: false };
  const max = Math.max(...positive);
  const min = Math.min(...positive);
  if (!(max / min > COUNTS_LOG_SPAN)) return { log: false };
  const lows = rows.flatMap((r) => [r.low, r.model_p16]).filter((l): l is number => l !== undefined && l > 0);
  const lowest = Math.max(Math.min(min, ...lows), max * 10 ** -COUNTS_LOG_DECADES);
  const highs = rows.map((r) => Math.max(r.high ?? r.count, r.model_p84 ?? 0));
  return {
    log: true,
    floor: 10 ** Math.floor(Math.log10(lowest)),
    top: 10 ** Math.ceil(Math.log10(Math.max(...highs))),
    span: max / min,
  };
}

/** A row of a log count axis, its error bar and model band cut at the axis's floor. */
function aboveFloor(r: CountRow, floor: number): CountRow {
  const { low, high, model_p16, model_p50, model_p84, band_x1, band_x2, ...rest } = r;
  const out: CountRow = { ...rest };
  if (low !== undefined && high !== undefined && high >= floor) {
    out.low = Math.max(low, floor);
    out.high = high;
  }
  if (model_p16 !== undefined && model_p84 !== undefined && model_p84 >= floor) {
    out.model_p16 = Math.max(model_p16, floor);
    if (model_p50 !== undefined && model_p50 >= floor) out.model_p50 = model_p50;
    out.model_p84 = model_p84;
    if (band_x1 !== undefined) out.band_x1 = band_x1;
    if (band_x2 !== undefined) out.band_x2 = band_x2;
  }
  return out;
}

export function countsSpec(p: PredictionView): Spec | null {
  const all = countRows(p);
  if (all.length === 0) return null;
  const axis = countsAxis(all);
  // On a log axis a slice without sources has no bar, and an error bar reaching 0 stops at the floor.
  // An error bar or a model band wholly below the floor is not drawn (it would hang below the
  // axis, over the legend), and a p50 below it has no line.
  const rows = axis.log ? all.filter((r) => r.count > 0).map((r) => aboveFloor(r, axis.floor)) : all;
  const withErrors = rows.some((r) => r.low !== undefined);
  const withModel = rows.some((r) => r.model_p16 !== undefined);
  const draws = rows.find((r) => r.model_draws !== undefined)?.model_draws;
  const errorLabel = '1σ: Poisson and cosmic variance';
  const modelLabel = `the model: p16–p84 of ${draws ?? ''} draws`;
  // with the model band, a legend names the error bars and the band
  const colour = (label: string) =>
    withModel
      ? {
          color: {
            datum: label,
            scale: {
              domain: withErrors ? [errorLabel, modelLabel] : [modelLabel],
              range: withErrors ? [PALETTE.ink, PALETTE.orange] : [PALETTE.orange],
            },
            legend: { title: null, orient: 'bottom', direction: 'horizontal', symbolType: 'square', labelLimit: 600 },
          },
        }
      : {};
  const yScale = axis.log ? { type: 'log', domain: [axis.floor, axis.top], nice: false } : {};
  const layers: Spec[] = [
    {
      mark: { type: 'bar', fill: PALETTE.blue, stroke: 'white', strokeWidth: 1, clip: true },
      encoding: {
        x: {
          field: 'z_min',
          type: 'quantitative',
          // photometric redshifts: the slices hold the sources measured in them
          title: p.measured_redshift ? 'measured (photometric) redshift z' : 'redshift z',
          scale: { zero: false, nice: false },
        },
        x2: { field: 'z_max' },
        y: {
          field: 'count',
          type: 'quantitative',
          title: 'expected count per slice',
          scale: yScale,
          ...(axis.log ? { axis: powerOfTenAxis(axis.floor, axis.top) } : {}),
        },
        y2: { datum: axis.log ? axis.floor : 0 },
        tooltip: [
          { field: 'slice', type: 'ordinal' },
          { field: 'z_min', type: 'quantitative' },
          { field: 'z_max', type: 'quantitative' },
          { field: 'count', type: 'quantitative', format: '.6~g' },
        ],
      },
    },
  ];
  if (withErrors) {
    layers.push({
      transform: [{ filter: 'isValid(datum.low)' }],
      mark: {
        type: 'errorbar',
        ticks: { color: PALETTE.ink, size: 8 },
        rule: { color: PALETTE.ink, strokeWidth: 1.5 },
      },
      encoding: {
        x: { field: 'z_mid', type: 'quantitative' },
        y: { field: 'low', type: 'quantitative', title: 'expected count per slice', scale: yScale },
        y2: { field: 'high' },
        ...colour(errorLabel),
      },
    });
  }
  if (withModel) {
    layers.push(
      {
        transform: [{ filter: 'isValid(datum.model_p16)' }],
        mark: { type: 'rect', opacity: 0.9, stroke: '#7a4300', strokeWidth: 0.75 },
        encoding: {
          x: { field: 'band_x1', type: 'quantitative' },
          x2: { field: 'band_x2' },
          y: { field: 'model_p16', type: 'quantitative', title: 'expected count per slice', scale: yScale },
          y2: { field: 'model_p84' },
          ...colour(modelLabel),
          tooltip: [
            { field: 'slice', type: 'ordinal' },
            { field: 'model_p16', type: 'quantitative', format: '.6~g' },
            { field: 'model_p50', type: 'quantitative', format: '.6~g' },
            { field: 'model_p84', type: 'quantitative', format: '.6~g' },
          ],
        },
      },
      {
        transform: [{ filter: 'isValid(datum.model_p50)' }],
        mark: { type: 'rule', color: '#7a4300', strokeWidth: 1.5 },
        encoding: {
          x: { field: 'band_x1', type: 'quantitative' },
          x2: { field: 'band_x2' },
          y: { field: 'model_p50', type: 'quantitative', title: 'expected count per slice', scale: yScale },
        },
      },
    );
  }
  const scaleNote = axis.log ? `; logarithmic axis (the counts span a factor of ${spanText(axis.span)})` : '';
  const empty = all.length - rows.length;
  const emptyNote = empty > 0 ? `; ${empty} slice${empty > 1 ? 's' : ''} without sources not drawn` : '';
  const notes = [`${all.length} slice${all.length === 1 ? '' : 's'}; bars: expected count${scaleNote}${emptyNote}`];
  if (withErrors) notes.push('error bars: 1σ, Poisson and cosmic variance combined');
  if (withModel)
    notes.push(
      `orange band beside them: the luminosity function's own uncertainty, p16–p84 (line: p50) of ${draws} draws`,
    );
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...titleBlock(p.title, 'Expected count per redshift slice', notes, 560 + 90),
    width: 560,
    height: 300,
    data: { values: rows },
    layer: layers,
    config: CONFIG,
  };
}

// ---------------------------------------------------------------------------------------------
// 2. Histogram of each slice, as small multiples

export interface HistogramRow {
  lo: number;
  hi: number;
  count: number;
}

export function histogramRows(s: SliceView): HistogramRow[] {
  const h = s.histogram;
  if (!h || !Array.isArray(h.edges) || !Array.isArray(h.counts)) return [];
  const rows: HistogramRow[] = [];
  for (let i = 0; i < h.counts.length && i + 1 < h.edges.length; i++) {
    const lo = h.edges[i]!;
    const hi = h.edges[i + 1]!;
    const count = h.counts[i]!;
    if (finite(lo, hi, count)) rows.push({ lo, hi, count });
  }
  return rows;
}

/** Header of a small-multiple panel: the slice's redshift range. */
function panelLabel(s: SliceView): string {
  return `z ${formatRange(s.z_min, s.z_max)}`;
}

/**
 * The facet over slices shared by the small multiples: one panel per slice, in slice order,
 * labelled with its redshift range. One faceted view (one dataset, one template) instead of a
 * concatenation of per-slice views: vega builds and draws it several times faster.
 */
function sliceFacet(): Spec {
  return {
    field: 'panel',
    type: 'ordinal',
    sort: { field: 'slice', op: 'min' },
    header: { title: null, labelAnchor: 'start', labelFontSize: 12, labelColor: PALETTE.ink, labelPadding: 6 },
  };
}

/**
 * Bins at either end of a histogram that together hold at most this fraction of its count are not
 * drawn: the bright tail runs over many bins of e^-40-small counts, which would stretch the axis
 * over empty magnitudes.
 */
export const HISTOGRAM_TAIL_FRACTION = 1e-3;

/**
 * The bins drawn: from each end, the bins whose running sum (from that end) stays within
 * HISTOGRAM_TAIL_FRACTION of the histogram's count are left out.
 */
export function drawnBins(rows: readonly HistogramRow[]): HistogramRow[] {
  const total = rows.reduce((a, r) => a + r.count, 0);
  const allowed = HISTOGRAM_TAIL_FRACTION * total;
  let lo = 0;
  let tail = 0;
  while (lo < rows.length - 1 && tail + rows[lo]!.count <= allowed) tail += rows[lo++]!.count;
  let hi = rows.length - 1;
  tail = 0;
  while (hi > lo && tail + rows[hi]!.count <= allowed) tail += rows[hi--]!.count;
  return rows.slice(lo, hi + 1);
}

/** One row per drawn histogram bin (drawnBins), for every slice: {slice (1-based), panel, lo, hi, count}. */
export function histogramPanelRows(p: PredictionView): (HistogramRow & { slice: number; panel: string })[] {
  return p.slices.flatMap((s, i) =>
    drawnBins(histogramRows(s)).map((r) => ({ slice: i + 1, panel: panelLabel(s), ...r })),
  );
}

/** "0.25 mag" or "0.1 dex": the bin width of the histograms, from their edges. */
function binWidthText(p: PredictionView, variable: string): string | undefined {
  const h = p.slices.find((s) => (s.histogram?.edges.length ?? 0) >= 2)?.histogram;
  if (!h) return undefined;
  const w = Number((h.edges[1]! - h.edges[0]!).toPrecision(6));
  if (!(w > 0)) return undefined;
  return `${w} ${variable === 'apparent_magnitude' ? 'mag' : variable.startsWith('log10_') ? 'dex' : ''}`.trim();
}

/**
 * A vega expression labelling a count tick below 1e-3 as 4×10⁻¹⁴ and 1e-8 as 10⁻⁸ (a slice far
 * beyond the limit holds such counts; the default labels wrote 0.00000000000004), every other
 * tick as vega does.
 */
export const SMALL_COUNT_LABEL = (() => {
  const digits = `['⁰','¹','²','³','⁴','⁵','⁶','⁷','⁸','⁹']`;
  const k = 'floor(log(datum.value) / LN10 + 1e-9)';
  const mantissa = `format(datum.value / pow(10, ${k}), '.2~g')`;
  const power = `(${k} < 0 ? '⁻' : '') + (abs(${k}) >= 10 ? ${digits}[floor(abs(${k}) / 10)] : '') + ${digits}[abs(${k}) % 10]`;
  const small = `(${mantissa} === '1' ? '' : ${mantissa} + '×') + '10' + ${power}`;
  // (a zero beside such ticks is written 0, not 0.000000000; beside ticks of 1e-3 or more as vega writes it)
  return `datum.value > 0 && datum.value < 1e-3 ? ${small} : datum.value === 0 && length(datum.label) > 5 ? '0' : datum.label`;
})();

/**
 * A count as SMALL_COUNT_LABEL writes its tick: below 1e-3 as 4×10⁻¹⁴ (10⁻⁸ for 1e-8), a zero
 * vega wrote with more than five characters as 0, any other value as vega wrote it (`text`).
 */
export function smallCountText(value: number, text: string): string {
  if (value > 0 && value < 1e-3) {
    const k = Math.floor(Math.log(value) / Math.LN10 + 1e-9);
    const mantissa = String(Number((value / 10 ** k).toPrecision(2)));
    return (mantissa === '1' ? '' : `${mantissa}×`) + powerOfTen(k);
  }
  return value === 0 && text.length > 5 ? '0' : text;
}

/**
 * The count axes' descriptions read aloud ("Y-axis titled 'count per bin' for a linear scale with
 * values from 0 to 4×10⁻¹⁴") with the counts written as their tick labels are: vega writes the
 * range in its default format (0.00000000000004), whatever the labels say.
 */
export function shortCountAxisCaptions(svg: string): string {
  return svg.replace(
    /(aria-label="Y-axis titled 'count per[^'"]*' for a linear scale with values from )([0-9.]+) to ([0-9.]+)"/g,
    (_all, head: string, lo: string, hi: string) =>
      `${head}${smallCountText(Number(lo), lo)} to ${smallCountText(Number(hi), hi)}"`,
  );
}

export function histogramsSpec(p: PredictionView, model?: ModelAsWritten): Spec | null {
  const m = model ?? models(p.model)[0];
  const rows = histogramPanelRows(p);
  if (rows.length === 0) return null;
  const variable = p.slices[rows[0]!.slice - 1]!.histogram!.variable;
  const panels = new Set(rows.map((r) => r.slice)).size;
  const what =
    variable === 'apparent_magnitude'
      ? 'Apparent magnitudes of the detected sources, per slice'
      : variable === 'log10_line_flux'
        ? 'Line fluxes of the detected sources, per slice'
        : 'Detected sources per bin, per slice';
  const width = binWidthText(p, variable);
  const notes = [
    'expected count in each bin; each panel spans its own range',
    `bins at either end holding together under ${HISTOGRAM_TAIL_FRACTION * 100}% of a slice's count are not drawn`,
  ];
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...titleBlock(p.title, what, notes, multiplesWidth(Math.min(4, panels), 170)),
    data: { values: rows },
    facet: sliceFacet(),
    columns: Math.min(4, panels),
    spec: {
      width: 170,
      height: 120,
      mark: { type: 'bar', fill: PALETTE.blue, stroke: 'white', strokeWidth: 0.5 },
      encoding: {
        x: {
          field: 'lo',
          type: 'quantitative',
          title: histogramAxisLabel(variable, m),
          scale: { zero: false, nice: false },
          axis: { tickCount: 5 },
        },
        x2: { field: 'hi' },
        // the bin width in the count axis's title, as counts per magnitude bin are usually labelled
        // (two short lines: the title stays within the panel's height and the panels close together)
        y: {
          field: 'count',
          type: 'quantitative',
          title: width ? `count per ${width} bin` : 'count per bin',
          axis: {
            tickCount: 4,
            labelExpr: SMALL_COUNT_LABEL,
            ...(width ? { title: ['count per', `${width} bin`] } : {}),
          },
        },
        y2: { datum: 0 },
      },
    },
    // each panel on its own range of the variable: slices at different redshifts see different magnitudes
    resolve: { scale: { x: 'independent', y: 'independent' }, axis: { x: 'independent', y: 'independent' } },
    config: CONFIG,
  };
}

// ---------------------------------------------------------------------------------------------
// 3. The assumed luminosity function at each slice's middle redshift

/** Decades of number density shown below the highest value. */
export const LF_DECADES = 6;

/**
 * The part of a curve on the detected side of `limit` (x >= limit in log10 L, x <= limit in
 * magnitude), starting exactly at the limit: the point there is interpolated linearly in
 * log10 phi between its neighbours. Rows must be sorted by x (either direction).
 */
export function detectedPart(
  rows: { x: number; phi: number }[],
  limit: number,
  magnitude: boolean,
): { x: number; phi: number }[] {
  const inside = (x: number) => (magnitude ? x <= limit : x >= limit);
  const out: { x: number; phi: number }[] = [];
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i]!;
    const prev = rows[i - 1];
    if (prev && inside(r.x) !== inside(prev.x) && r.x !== limit && prev.x !== limit) {
      const t = (limit - prev.x) / (r.x - prev.x);
      const lp = Math.log10(prev.phi) + t * (Math.log10(r.phi) - Math.log10(prev.phi));
      out.push({ x: limit, phi: 10 ** lp });
    }
    if (inside(r.x)) out.push(r);
  }
  return out;
}

/** A row of the luminosity-function figure; `kind` says which layer draws it. */
export interface LuminosityFunctionRow {
  slice: number;
  panel: string;
  kind: 'curve' | 'detected' | 'limit' | 'knee' | 'band';
  x: number;
  phi?: number;
  /** Lower edge of the shaded detected part (the bottom of the y axis). */
  floor?: number;
  label?: string;
  /** The model band (kind 'band'): p16 (held at the bottom of the y axis) and p84 of phi over the model's draws. */
  lo?: number;
  hi?: number;
}

/**
 * Rows of every panel: the curve (points with phi > 0 within LF_DECADES of the highest density),
 * its detected part, the limit and the knee. Null when no slice has a curve to draw.
 */
export function luminosityFunctionRows(
  p: PredictionView,
  model?: ModelAsWritten,
): { rows: LuminosityFunctionRow[]; magnitude: boolean; xLabel: string; panels: number; bandDraws?: number } | null {
  const m = model ?? models(p.model)[0];
  interface Panel {
    i: number;
    s: SliceView;
    c: LuminosityFunctionCurve;
    rows: { x: number; phi: number; k: number }[];
  }
  const panels: Panel[] = [];
  p.slices.forEach((s, i) => {
    const c = s.luminosity_function;
    if (!c || !Array.isArray(c.x) || !Array.isArray(c.phi)) return;
    const rows: { x: number; phi: number; k: number }[] = [];
    for (let k = 0; k < Math.min(c.x.length, c.phi.length); k++) {
      const x = c.x[k]!;
      const phi = c.phi[k]!;
      if (finite(x, phi) && phi > 0) rows.push({ x, phi, k });
    }
    if (rows.length >= 2) panels.push({ i, s, c, rows });
  });
  // Keep LF_DECADES decades below the highest density: the exponential cut-off otherwise
  // stretches the log axis over many empty decades.
  const top = Math.max(...panels.flatMap((q) => q.rows.map((r) => r.phi)));
  for (const q of panels) q.rows = q.rows.filter((r) => r.phi >= top * 10 ** -LF_DECADES);
  const drawn = panels.filter((q) => q.rows.length >= 2);
  if (drawn.length === 0) return null;
  const magnitude = isMagnitude(m, drawn[0]!.c);
  // the bottom of the y axis: the whole decade at or below the lowest density drawn (the log
  // scale is niced to whole decades), down to which the detected part and the model band reach
  const floor = 10 ** Math.floor(Math.log10(Math.min(...drawn.flatMap((q) => q.rows.map((r) => r.phi)))));
  const xLabel = drawn[0]!.c.x_label || (magnitude ? 'absolute AB magnitude M [mag]' : 'log₁₀ L [erg s⁻¹]');
  const kneeName = magnitude ? 'M*' : 'L*';
  const out: LuminosityFunctionRow[] = [];
  let bandDraws: number | undefined;
  for (const { i, s, c, rows } of drawn) {
    const base = { slice: i + 1, panel: `${panelLabel(s)} (at z = ${((s.z_min + s.z_max) / 2).toFixed(3)})` };
    // the model band over the same points as the curve (p16 held at the bottom of the y axis)
    const b = c.band;
    if (b && Array.isArray(b.p16) && Array.isArray(b.p84))
      for (const r of rows) {
        const lo = Number(b.p16[r.k]);
        const hi = Number(b.p84[r.k]);
        if (!finite(lo, hi) || !(hi > floor)) continue;
        out.push({ ...base, kind: 'band', x: r.x, lo: Math.max(lo, floor), hi });
        bandDraws = b.draws;
      }
    for (const r of rows) out.push({ ...base, kind: 'curve', x: r.x, phi: r.phi });
    // (no limit where the filter passes none of the lines at this redshift: nothing is detected)
    if (c.limit !== null && finite(c.limit)) {
      const detected = detectedPart(rows, c.limit, magnitude);
      if (detected.length >= 2)
        for (const r of detected) out.push({ ...base, kind: 'detected', x: r.x, phi: r.phi, floor });
      out.push({ ...base, kind: 'limit', x: c.limit });
    }
    if (finite(c.knee)) out.push({ ...base, kind: 'knee', x: c.knee, label: kneeName });
  }
  return { rows: out, magnitude, xLabel, panels: drawn.length, ...(bandDraws ? { bandDraws } : {}) };
}

export function luminosityFunctionSpec(p: PredictionView, model?: ModelAsWritten): Spec | null {
  const m = model ?? models(p.model)[0];
  const r = luminosityFunctionRows(p, m);
  if (!r) return null;
  const yLabel = r.magnitude ? 'φ [Mpc⁻³ mag⁻¹]' : 'φ [Mpc⁻³ dex⁻¹]';
  const kneeName = r.magnitude ? 'M*' : 'L*';
  const only = (kind: LuminosityFunctionRow['kind']) => [{ filter: `datum.kind === '${kind}'` }];
  const x = { field: 'x', type: 'quantitative' };
  const name = typeof m?.name === 'string' && m.name ? ` (${m.name})` : '';
  const phis = r.rows.filter((row) => row.kind === 'curve').map((row) => row.phi!);
  // the log scale is niced to whole decades: label every decade it can show as 10⁻ⁿ
  const yAxis = powerOfTenAxis(
    10 ** Math.floor(Math.log10(Math.min(...phis))),
    10 ** Math.ceil(Math.log10(Math.max(...phis))),
    4,
  );
  const withBand = r.bandDraws !== undefined;
  const assumedLabel = 'assumed values';
  const bandLabel = `the model: p16–p84 of ${r.bandDraws} draws`;
  // with the band, a legend names the curve and the band
  const colour = (label: string) =>
    withBand
      ? {
          color: {
            datum: label,
            scale: { domain: [assumedLabel, bandLabel], range: [PALETTE.blue, PALETTE.orange] },
            legend: { title: null, orient: 'bottom', direction: 'horizontal', symbolType: 'square', labelLimit: 600 },
          },
        }
      : {};
  const bandLayer = withBand
    ? [
        {
          transform: only('band'),
          mark: { type: 'area', opacity: 0.6 },
          encoding: {
            x,
            y: { field: 'hi', type: 'quantitative', title: yLabel },
            y2: { field: 'lo' },
            ...colour(bandLabel),
          },
        },
      ]
    : [];
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...titleBlock(
      p.title,
      `Assumed luminosity function${name} at each slice's middle redshift`,
      [
        `shaded: detected part; dashed line: limit; orange line: knee (${kneeName})`,
        ...(withBand
          ? [`orange band: the luminosity function's own uncertainty, p16–p84 of φ over ${r.bandDraws} draws`]
          : []),
      ],
      multiplesWidth(Math.min(4, r.panels), 200),
    ),
    data: { values: r.rows },
    facet: sliceFacet(),
    columns: Math.min(4, r.panels),
    spec: {
      width: 200,
      height: 140,
      layer: [
        {
          transform: only('detected'),
          mark: { type: 'area', color: PALETTE.pale, opacity: 1 },
          encoding: { x, y: { field: 'phi', type: 'quantitative' }, y2: { field: 'floor' } },
        },
        ...bandLayer,
        {
          transform: only('curve'),
          mark: { type: 'line', color: PALETTE.blue, strokeWidth: 2 },
          encoding: {
            x: { ...x, title: r.xLabel, scale: { zero: false, nice: false } },
            y: { field: 'phi', type: 'quantitative', title: yLabel, scale: { type: 'log' }, axis: yAxis },
            ...colour(assumedLabel),
          },
        },
        {
          transform: only('limit'),
          mark: { type: 'rule', color: PALETTE.ink, strokeDash: [5, 3], strokeWidth: 1.5 },
          encoding: { x },
        },
        {
          transform: only('knee'),
          mark: { type: 'rule', color: PALETTE.orange, strokeWidth: 2.5 },
          encoding: { x },
        },
        {
          transform: only('knee'),
          mark: {
            type: 'text',
            color: '#7a4300',
            fontWeight: 'bold',
            fontSize: 12,
            align: 'left',
            dx: 4,
            dy: 2,
            baseline: 'top',
            y: 0,
          },
          encoding: { x, text: { field: 'label' } },
        },
      ],
    },
    resolve: { scale: { x: 'shared', y: 'shared' }, axis: { x: 'independent', y: 'independent' } },
    config: CONFIG,
  };
}

// ---------------------------------------------------------------------------------------------
// 4. Forecast: Fisher ellipses with mock fits

/** 2x2 covariance [[a, b], [b, c]]. */
export type Cov2 = [[number, number], [number, number]];

/**
 * Points on the ellipse (p - c)^T C^-1 (p - c) = deltaChi2, via the Cholesky factor of C
 * (p = c + sqrt(deltaChi2) L [cos t, sin t]). Closed (last point = first). Returns [] unless C is
 * positive definite.
 */
export function ellipsePoints(
  cx: number,
  cy: number,
  cov: Cov2,
  deltaChi2: number,
  n = 120,
): { x: number; y: number }[] {
  const a = cov[0][0];
  const b = cov[0][1];
  const c = cov[1][1];
  if (!finite(a, b, c, cx, cy, deltaChi2) || a <= 0) return [];
  const l11 = Math.sqrt(a);
  const l21 = b / l11;
  const d = c - l21 * l21;
  if (!(d > 0)) return [];
  const l22 = Math.sqrt(d);
  const r = Math.sqrt(deltaChi2);
  const pts: { x: number; y: number }[] = [];
  for (let i = 0; i <= n; i++) {
    const t = (2 * Math.PI * (i % n)) / n;
    const u = r * Math.cos(t);
    const v = r * Math.sin(t);
    pts.push({ x: cx + l11 * u, y: cy + l21 * u + l22 * v });
  }
  return pts;
}

/** The two parameters drawn and how to read them from a forecast. */
export interface EllipseAxes {
  x: { name: string; label: string };
  y: { name: string; label: string };
  center: [number, number];
  cov: Cov2;
}

/**
 * alpha against log10 L* (or M*): centre and marginal 2x2 covariance, built from the marginal
 * sigmas and their correlation. Null when either parameter is missing or the numbers do not make
 * a covariance.
 */
export function ellipseAxes(f: ForecastView): EllipseAxes | null {
  const names: readonly string[] = f.parameters;
  const ix = names.indexOf('alpha');
  const yName = (['log10_l_star', 'm_star'] as const).find((n) => names.includes(n));
  if (ix < 0 || !yName) return null;
  const iy = names.indexOf(yName);
  const sx = f.fisher.sigma.alpha;
  const sy = f.fisher.sigma[yName];
  const rho = f.fisher.correlation[ix]?.[iy];
  const cx = f.center.alpha;
  const cy = f.center[yName];
  if (!finite(sx, sy, rho, cx, cy)) return null;
  const sxn = sx!;
  const syn = sy!;
  const r = rho!;
  if (!(sxn > 0 && syn > 0 && Math.abs(r) < 1)) return null;
  const quantity = f.model?.quantity?.trim();
  return {
    x: { name: 'alpha', label: 'faint-end slope α' },
    y: {
      name: yName,
      label: yName === 'm_star' ? 'M* [AB mag]' : quantity ? `log₁₀ characteristic ${quantity}` : 'log₁₀ L* [erg s⁻¹]',
    },
    center: [cx!, cy!],
    cov: [
      [sxn * sxn, r * sxn * syn],
      [r * sxn * syn, syn * syn],
    ],
  };
}

export function forecastSpec(f: ForecastView, surveyTitle?: string): Spec | null {
  const axes = ellipseAxes(f);
  if (!axes) return null;
  const [cx, cy] = axes.center;
  const contours = [
    { label: '1σ (68.3%)', dchi2: DELTA_CHI2_2D.one, dash: [] as number[], width: 2.5 },
    { label: '2σ (95.4%)', dchi2: DELTA_CHI2_2D.two, dash: [7, 4], width: 2 },
  ];
  const lines = contours.flatMap((k) =>
    ellipsePoints(cx, cy, axes.cov, k.dchi2).map((pt, i) => ({ ...pt, order: i, region: k.label })),
  );
  if (lines.length === 0) return null;

  // Mock fits, columns in the order of parameters.
  const cols: readonly string[] = f.parameters;
  const jx = cols.indexOf(axes.x.name);
  const jy = cols.indexOf(axes.y.name);
  const mocks: { x: number; y: number }[] = [];
  if (f.mocks?.fits && jx >= 0 && jy >= 0) {
    for (const row of f.mocks.fits) {
      const x = row[jx];
      const y = row[jy];
      if (typeof x === 'number' && typeof y === 'number' && finite(x, y)) mocks.push({ x, y });
    }
  }
  const layer: Spec[] = [];
  if (mocks.length > 0) {
    layer.push({
      data: { values: mocks },
      mark: { type: 'point', shape: 'circle', filled: true, size: 14, color: PALETTE.orange, opacity: 0.55 },
      encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } },
    });
  }
  layer.push({
    data: { values: lines },
    mark: { type: 'line', color: PALETTE.blue, strokeWidth: 2.2 },
    encoding: {
      x: { field: 'x', type: 'quantitative', title: axes.x.label, scale: { zero: false } },
      y: { field: 'y', type: 'quantitative', title: axes.y.label, scale: { zero: false } },
      order: { field: 'order', type: 'quantitative' },
      detail: { field: 'region', type: 'nominal' },
      strokeDash: {
        field: 'region',
        type: 'nominal',
        title: 'Fisher region',
        scale: { domain: contours.map((k) => k.label), range: contours.map((k) => k.dash) },
        legend: { orient: 'right', symbolStrokeColor: PALETTE.blue, symbolStrokeWidth: 2 },
      },
    },
  });
  layer.push({
    data: { values: [{ x: cx, y: cy }] },
    mark: { type: 'point', shape: 'cross', filled: true, size: 90, color: PALETTE.ink },
    encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } },
  });
  const notes = [
    'lines: joint regions of the two parameters from the Fisher matrix (Δχ² = 2.30, 6.18)',
    mocks.length > 0 ? `dots: ${mocks.length} mock fits; cross: assumed values` : 'cross: assumed values',
  ];
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...titleBlock(
      surveyTitle,
      `Forecast constraints on α and ${axes.y.name === 'm_star' ? 'M*' : 'L*'}`,
      notes,
      440 + 200,
    ),
    width: 440,
    height: 360,
    layer,
    config: CONFIG,
  };
}

// ---------------------------------------------------------------------------------------------
// 5. Plan: goal against exposure per pointing

/** The goal in words ("sigma of alpha", "expected count"), never its key. */
function goalLabel(goal: PlanView['goal']): string {
  return goalWords(goal);
}

/** Width and height of the plan figure's plot [px]. */
const PLAN_SIZE = { width: 520, height: 300 } as const;

export function planSpec(plan: PlanView, surveyTitle?: string): Spec | null {
  const rows = (plan.designs ?? [])
    .filter((d) => finite(d.exposure_hours_per_pointing, d.goal_value) && d.exposure_hours_per_pointing > 0)
    .map((d) => ({ ...d }))
    .sort((a, b) => a.exposure_hours_per_pointing - b.exposure_hours_per_pointing);
  if (rows.length === 0) return null;
  const yTitle = `goal: ${goalLabel(plan.goal)}`;
  const hours = rows.map((d) => d.exposure_hours_per_pointing);
  const layer: Spec[] = [];
  const nb = plan.near_best && {
    from: plan.near_best.from.exposure_hours_per_pointing,
    to: plan.near_best.to.exposure_hours_per_pointing,
  };
  if (nb && finite(nb.from, nb.to) && nb.from > 0 && nb.to > 0) {
    layer.push({
      data: { values: [{ from: Math.min(nb.from, nb.to), to: Math.max(nb.from, nb.to) }] },
      mark: { type: 'rect', color: PALETTE.pale, opacity: 0.9 },
      encoding: { x: { field: 'from', type: 'quantitative' }, x2: { field: 'to' } },
    });
  }
  layer.push({
    data: { values: rows },
    mark: { type: 'line', color: PALETTE.blue, strokeWidth: 2, point: { color: PALETTE.blue, size: 36, filled: true } },
    encoding: {
      x: {
        field: 'exposure_hours_per_pointing',
        type: 'quantitative',
        title: rows.some((d) => d.tiers)
          ? 'exposure per pointing of the deepest tier [hours]'
          : 'exposure per pointing [hours]',
        scale: { type: 'log', nice: false, padding: 16 },
        axis: { format: '~g' },
      },
      y: { field: 'goal_value', type: 'quantitative', title: yTitle, scale: { zero: false, padding: 24 } },
      tooltip: [
        { field: 'exposure_hours_per_pointing', type: 'quantitative' },
        { field: 'pointings', type: 'quantitative' },
        { field: 'goal_value', type: 'quantitative', format: '.6~g' },
      ],
    },
  });
  const best = plan.best;
  if (best && finite(best.exposure_hours_per_pointing, best.goal_value) && best.exposure_hours_per_pointing > 0) {
    // a design of several tiers: each tier's exposure and pointings (the x of its point is the
    // deepest tier's exposure, its pointings the total: "2.8 h × 358 pointings" was no design)
    const label = best.tiers
      ? `best: ${best.tiers.map((t) => `${fmtShort(t.exposure_hours_per_pointing)} h × ${fmtShort(t.pointings)}`).join(' + ')} pointings`
      : `best: ${fmtShort(best.exposure_hours_per_pointing)} h × ${fmtShort(best.pointings)} pointing${best.pointings === 1 ? '' : 's'}`;
    // The label stands above the plot, over the best design, joined to its diamond by a dotted
    // rule: no design is drawn there, so it never covers a point. It reads away from the
    // nearer side of the plot so that it stays inside the figure.
    const lo = Math.log(Math.min(...hours, best.exposure_hours_per_pointing));
    const hi = Math.log(Math.max(...hours, best.exposure_hours_per_pointing));
    const at = hi > lo ? (Math.log(best.exposure_hours_per_pointing) - lo) / (hi - lo) : 0.5;
    const align = at > 0.6 ? 'right' : at < 0.4 ? 'left' : 'center';
    const x = { field: 'exposure_hours_per_pointing', type: 'quantitative' };
    layer.push({
      data: { values: [{ ...best, label }] },
      layer: [
        {
          mark: { type: 'rule', color: PALETTE.ink, strokeDash: [2, 3], strokeWidth: 1 },
          encoding: { x, y: { field: 'goal_value', type: 'quantitative' }, y2: { value: 0 } },
        },
        {
          mark: {
            type: 'point',
            shape: 'diamond',
            filled: true,
            size: 220,
            color: PALETTE.orange,
            stroke: PALETTE.ink,
            strokeWidth: 1.5,
            opacity: 1,
          },
          encoding: { x, y: { field: 'goal_value', type: 'quantitative' } },
        },
        {
          mark: {
            type: 'text',
            color: PALETTE.ink,
            fontSize: 12,
            fontWeight: 'bold',
            align,
            baseline: 'bottom',
            dy: -4,
          },
          encoding: { x, y: { value: 0 }, text: { field: 'label' } },
        },
      ],
    });
  }
  // Ranked across the model (robust: true): the goal at the pessimistic case the best was chosen by.
  const robust = plan.robust;
  const pessimistic = robust ? rows.filter((d) => finite(d.goal_value_pessimistic ?? NaN)) : [];
  if (robust && pessimistic.length > 0) {
    layer.push({
      data: { values: pessimistic },
      mark: { type: 'line', color: PALETTE.orange, strokeDash: [6, 4], strokeWidth: 2 },
      encoding: {
        x: { field: 'exposure_hours_per_pointing', type: 'quantitative' },
        y: { field: 'goal_value_pessimistic', type: 'quantitative' },
        tooltip: [
          { field: 'exposure_hours_per_pointing', type: 'quantitative' },
          { field: 'pointings', type: 'quantitative' },
          { field: 'goal_value_pessimistic', type: 'quantitative', format: '.6~g' },
        ],
      },
    });
  }
  const parts = [`budget ${fmtShort(plan.budget_hours)} hours`, 'dots: designs compared'];
  if (robust && pessimistic.length > 0)
    parts.push(`dashed: at the model's p${Math.round(robust.percentile * 100)}, by which the best is ranked`);
  if (best) parts.push('diamond: best');
  if (nb) parts.push('shaded: near-best range');
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...titleBlock(
      surveyTitle,
      `${capitalise(goalLabel(plan.goal))} against exposure per pointing`,
      [parts.join('; ')],
      PLAN_SIZE.width + 90,
    ),
    width: PLAN_SIZE.width,
    height: PLAN_SIZE.height,
    layer,
    config: CONFIG,
  };
}

const SUPERSCRIPT: Record<string, string> = {
  '-': '⁻',
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
};

/** 10 to the power k as people write it: powerOfTen(-2) = "10⁻²", powerOfTen(3) = "10³". */
export function powerOfTen(k: number): string {
  return `10${String(Math.round(k)).replace(/[-0-9]/g, (c) => SUPERSCRIPT[c]!)}`;
}

/**
 * A log axis labelled at powers of ten written as 10⁻² (not 1e-2): labelled ticks at every decade
 * from `lo` to `hi` (every second or third when there are more than `most`); over at most three
 * decades also unlabelled ticks at 2, 3, ... 9 times each decade, to read values between them.
 */
export function powerOfTenAxis(lo: number, hi: number, most = 6): Spec {
  const k0 = Math.ceil(Math.log10(lo) - 1e-9);
  const k1 = Math.floor(Math.log10(hi) + 1e-9);
  const step = Math.max(1, Math.ceil((k1 - k0 + 1) / most));
  const ks: number[] = [];
  for (let k = k0; k <= k1; k += step) ks.push(k);
  if (ks.length === 0) ks.push(Math.round(Math.log10(lo)));
  const values = ks.map((k) => 10 ** k);
  if (k1 - k0 <= 3) {
    for (let k = k0 - 1; k <= k1; k++) {
      for (let m = 2; m <= 9; m++) {
        const v = m * 10 ** k;
        if (v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9)) values.push(v);
      }
    }
    values.sort((a, b) => a - b);
  }
  // label a tick only when it is a labelled decade (log10 of the value a whole number in ks)
  const decade = 'log(datum.value) / LN10';
  const labelExpr = ks.reduceRight((rest, k) => `abs(${decade} - ${k}) < 1e-6 ? '${powerOfTen(k)}' : ${rest}`, "''");
  return { values, labelExpr, grid: true };
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** A factor as a title writes it: 214 below 1e5, 2.14 × 10¹⁴ from there (not 214000000000000). */
export function spanText(x: number): string {
  if (!(x >= 1e5) || !Number.isFinite(x)) return fmtShort(x);
  const k = Math.floor(Math.log10(x));
  const m = Number((x / 10 ** k).toPrecision(3));
  // (rounding may carry the mantissa to 10)
  return m >= 10 ? `${powerOfTen(k + 1)}` : m === 1 ? powerOfTen(k) : `${m} × ${powerOfTen(k)}`;
}

function fmtShort(x: unknown): string {
  return typeof x === 'number' && Number.isFinite(x) ? precise(x, 3) : '?';
}

// ---------------------------------------------------------------------------------------------
// 6. Share of each population per bin of observed flux or magnitude (several populations)

/** Line colours of the populations, in order (the palette first, then two of the same family). */
const SHARE_COLOURS = [PALETTE.blue, PALETTE.orange, PALETTE.ink, '#7fa7d6', '#9c5b14', '#5f6b7a'];
/** Dash patterns, so that the lines stay apart in greyscale print. */
const SHARE_DASHES = [
  [1, 0],
  [7, 3],
  [2, 2],
  [10, 3, 2, 3],
  [4, 4],
  [1, 3],
];
/** Bins at either end holding less than this fraction of all detections are not drawn. */
export const SHARE_FLOOR = 1e-4;

export interface ObservedShareRow {
  population: string;
  /** The population's place in the file (legend and stacking order). */
  order: number;
  min: number;
  max: number;
  mid: number;
  count: number;
  share: number;
  /** The bar's bottom and top in the stack of the bin (populations in file order). */
  below: number;
  above: number;
}

/**
 * One row per population and bin of the observed value, without the nearly empty bins at either
 * end (under SHARE_FLOOR of all detections). Empty when there are fewer than two populations.
 */
export function observedShareRows(o: ObservedBins): ObservedShareRow[] {
  const bins = (o.bins ?? []).filter((b) => finite(b.min, b.max, b.count));
  const names = bins.length > 0 ? Object.keys(bins[0]!.populations ?? {}) : [];
  if (names.length < 2) return [];
  const total = bins.reduce((a, b) => a + b.count, 0);
  let a = 0;
  let z = bins.length;
  while (a < z && !(bins[a]!.count >= SHARE_FLOOR * total)) a++;
  while (z > a && !(bins[z - 1]!.count >= SHARE_FLOOR * total)) z--;
  const rows: ObservedShareRow[] = [];
  for (const b of bins.slice(a, z)) {
    let below = 0;
    names.forEach((name, order) => {
      const q = b.populations[name];
      if (!q || !finite(q.count, q.share)) return;
      rows.push({
        population: name,
        order,
        min: b.min,
        max: b.max,
        mid: 0.5 * (b.min + b.max),
        count: q.count,
        share: q.share,
        below,
        above: below + q.count,
      });
      below += q.count;
    });
  }
  return rows;
}

/**
 * Two panels over the observed value: the expected detections per bin, stacked by population,
 * and each population's share of the bin (the interloper fraction a follow-up faces). Null with
 * fewer than two populations.
 */
/** Width of the shares figure's panels, px. */
const SHARES_WIDTH_PX = 560;

export function observedSharesSpec(o: ObservedBins, surveyTitle?: string): Spec | null {
  const rows = observedShareRows(o);
  if (rows.length === 0) return null;
  const names = [...new Set(rows.map((r) => r.population))];
  const colour = {
    field: 'population',
    type: 'nominal',
    sort: names,
    scale: { domain: names, range: names.map((_, i) => SHARE_COLOURS[i % SHARE_COLOURS.length]) },
    legend: {
      title: null,
      orient: 'top',
      direction: 'horizontal',
      symbolType: 'stroke',
      symbolStrokeWidth: 3,
      symbolSize: 400,
    },
  };
  const xTitle = histogramAxisLabel(o.variable, undefined);
  const what =
    o.variable === 'apparent_magnitude'
      ? 'Share of each population per bin of apparent magnitude'
      : o.variable === 'log10_line_flux'
        ? 'Share of each population per bin of line flux'
        : 'Share of each population per bin of the observed value';
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...titleBlock(
      surveyTitle,
      what,
      [
        'top: expected detections per bin, stacked by population',
        "bottom: each population's share of the bin (the interloper fraction)",
        'every population over its own redshift window',
      ],
      SHARES_WIDTH_PX,
    ),
    data: { values: rows },
    vconcat: [
      {
        width: SHARES_WIDTH_PX,
        height: 200,
        mark: { type: 'bar', stroke: 'white', strokeWidth: 0.5 },
        encoding: {
          x: { field: 'min', type: 'quantitative', title: xTitle, scale: { zero: false, nice: false } },
          x2: { field: 'max' },
          y: { field: 'above', type: 'quantitative', title: 'expected detections per bin' },
          y2: { field: 'below' },
          color: colour,
          tooltip: [
            { field: 'population', type: 'nominal' },
            { field: 'min', type: 'quantitative' },
            { field: 'max', type: 'quantitative' },
            { field: 'count', type: 'quantitative', format: '.4~g' },
          ],
        },
      },
      {
        width: SHARES_WIDTH_PX,
        height: 200,
        mark: { type: 'line', strokeWidth: 2, point: { size: 28, filled: true } },
        encoding: {
          x: { field: 'mid', type: 'quantitative', title: xTitle, scale: { zero: false, nice: false } },
          y: {
            field: 'share',
            type: 'quantitative',
            title: 'share of the bin',
            scale: { domain: [0, 1] },
            axis: { format: '.0%' },
          },
          color: colour,
          strokeDash: {
            field: 'population',
            type: 'nominal',
            sort: names,
            scale: { domain: names, range: names.map((_, i) => SHARE_DASHES[i % SHARE_DASHES.length]) },
            legend: colour.legend,
          },
          tooltip: [
            { field: 'population', type: 'nominal' },
            { field: 'mid', type: 'quantitative', title: 'bin middle' },
            { field: 'share', type: 'quantitative', format: '.1%' },
          ],
        },
      },
    ],
    resolve: { scale: { x: 'shared' } },
    config: CONFIG,
  };
}

export const observedSharesFigure = (o: ObservedBins, surveyTitle?: string) =>
  figure('shares', observedSharesSpec(o, surveyTitle));

// ---------------------------------------------------------------------------------------------
// Rendering

type VegaModule = typeof import('vega');
type VegaLiteModule = typeof import('vega-lite');
let libs: Promise<[VegaModule, VegaLiteModule]> | undefined;

function loadLibs(): Promise<[VegaModule, VegaLiteModule]> {
  libs ??= Promise.all([import('vega'), import('vega-lite')]);
  return libs;
}

/**
 * A vega loader that refuses every request: figures draw only the values they are handed.
 * vega logs a failed load and carries on, so each refusal is also recorded in `refused` and
 * renderSvg fails afterwards.
 */
function refusingLoader(vega: VegaModule, refused: string[]): ReturnType<VegaModule['loader']> {
  const refuse =
    (what: string) =>
    (uri: string): Promise<never> => {
      const msg = `figures fetch nothing: refused to ${what} ${JSON.stringify(String(uri))}`;
      refused.push(msg);
      return Promise.reject(new Error(msg));
    };
  const base = vega.loader();
  return Object.assign(base, {
    load: refuse('load'),
    sanitize: refuse('link to'),
    http: refuse('request'),
    file: refuse('read'),
  });
}

/** Compile a vega-lite spec and draw it to an SVG string (no browser, no network). */
export async function renderSvg(spec: Spec): Promise<string> {
  const [vega, vl] = await loadLibs();
  const compiled = vl.compile(spec as unknown as Parameters<VegaLiteModule['compile']>[0]).spec;
  const refused: string[] = [];
  const view = new vega.View(vega.parse(compiled), {
    renderer: 'none',
    loader: refusingLoader(vega, refused),
    logLevel: vega.None,
  });
  try {
    const svg = await view.toSVG();
    if (refused.length > 0) throw new Error(refused[0]);
    return svg;
  } finally {
    view.finalize();
  }
}

async function figure(
  name: string,
  spec: Spec | null,
  finish: (svg: string) => string = (svg) => svg,
): Promise<Figure | null> {
  if (!spec) return null;
  const title = String((spec.usermeta as { title?: string } | undefined)?.title ?? name);
  return { name, title, spec, svg: finish(await renderSvg(spec)) };
}

export const countsFigure = (p: PredictionView) => figure('counts', countsSpec(p));
export const histogramsFigure = (p: PredictionView, model?: ModelAsWritten) =>
  figure('histograms', histogramsSpec(p, model), shortCountAxisCaptions);
export const luminosityFunctionFigure = (p: PredictionView, model?: ModelAsWritten) =>
  figure('luminosity-function', luminosityFunctionSpec(p, model));
export const forecastFigure = (f: ForecastView, surveyTitle?: string) =>
  figure('forecast', forecastSpec(f, surveyTitle));
export const planFigure = (plan: PlanView, surveyTitle?: string) => figure('plan', planSpec(plan, surveyTitle));

export interface FigureInput {
  prediction?: PredictionView;
  forecast?: ForecastView;
  plan?: PlanView;
  /** The population drawn; defaults to prediction.model. */
  model?: ModelAsWritten;
  /** Title for the forecast and plan figures; defaults to prediction.title. */
  surveyTitle?: string;
}

/** Every figure the given results allow, in a fixed order; absent pieces give no figure. */
export async function buildFigures(input: FigureInput): Promise<Figure[]> {
  const title = input.surveyTitle ?? input.prediction?.title;
  const p = input.prediction;
  const all = await Promise.all([
    p ? countsFigure(p) : null,
    p ? histogramsFigure(p, input.model) : null,
    p ? luminosityFunctionFigure(p, input.model) : null,
    input.forecast ? forecastFigure(input.forecast, title) : null,
    input.plan ? planFigure(input.plan, title) : null,
  ]);
  return all.filter((f): f is Figure => f !== null);
}
