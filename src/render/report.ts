/**
 * The HTML report: ONE self-contained document (inline CSS and SVG; no script, no web font,
 * no URL of any kind), readable offline and printable. Everything the user wrote (the survey
 * text, titles, keys, expressions) is escaped; the figures' SVG is checked before it is
 * embedded. A Content-Security-Policy in the document forbids scripts and fetches as a second
 * line of defence.
 *
 * This module does not import vega: figures arrive already drawn (see figures.ts).
 */
import type {
  Figure,
  ForecastView,
  ModelAsWritten,
  PlanDesignView,
  PlanView,
  PredictionView,
  SliceView,
} from './types.js';
import {
  digitsBeside,
  formatFixed,
  formatNumber,
  formatScientific,
  formatWritten,
  formatZ,
  goalWords,
  percent,
  shapeWords,
  uncertaintyPercent,
} from './format.js';
import { uncertaintySources } from './sources.js';
import { fluxDensityOfAbMagnitude } from '../model/photometry.js';

export interface ReportInput {
  /** The survey file exactly as written. */
  surveyText: string;
  surveyTitle: string;
  /** Name of the survey file, shown beside its text (optional). */
  surveyFile?: string;
  prediction: PredictionView;
  forecast?: ForecastView;
  plan?: PlanView;
  /** Why the report holds no forecast (one sentence), when it cannot be made for this survey. */
  forecastOmitted?: string;
  /** Why the report holds no plan (one sentence), when the file asks for one that cannot be made. */
  planOmitted?: string;
  /** The assumed population(s); defaults to prediction.model. */
  model?: ModelAsWritten | ModelAsWritten[];
  /** What the reader should know (src/warnings.ts): shown near the top when there are any. */
  warnings?: readonly { code: string; message: string }[];
  figures: Figure[];
}

// ---------------------------------------------------------------------------------------------
// Escaping and checks

const HTML_ESCAPES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/** Escape text for HTML element content and quoted attribute values. */
export function escapeHtml(value: unknown): string {
  return String(value).replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]!);
}

/** Elements vega's SVG renderer writes; anything else is refused. */
const SVG_ELEMENTS = new Set([
  'svg',
  'g',
  'path',
  'rect',
  'line',
  'text',
  'tspan',
  'circle',
  'ellipse',
  'polyline',
  'polygon',
  'defs',
  'clippath',
  'lineargradient',
  'radialgradient',
  'stop',
  'title',
  'desc',
]);
/** Attributes whose value may hold a paint or reference: only url(#local-id) is allowed there. */
const PAINT_ATTRIBUTES = /^(fill|stroke|clip-path|mask|filter|style|marker-start|marker-mid|marker-end|cursor)$/i;

/**
 * Throw unless `svg` is one plain <svg> element with nothing active in it: only drawing
 * elements (no script, foreign object, image, link, use, style), no event-handler or link
 * attribute, no url() other than a reference inside the figure, no comment or declaration,
 * and nothing after its closing tag. vega escapes the text it draws; this checks that it did.
 */
export function assertSafeSvg(svg: string, name = 'figure'): void {
  const s = svg.trim();
  const fail = (why: string): never => {
    throw new Error(`figure "${name}" cannot be embedded: ${why}`);
  };
  if (!s.startsWith('<svg')) fail('it does not start with <svg');
  if (!s.endsWith('</svg>')) fail('it does not end with </svg>');
  if (s.indexOf('</svg') !== s.length - 6) fail('it closes <svg> more than once');
  for (const m of s.matchAll(/<([^>]*)>/g)) {
    const tag = m[1]!;
    const el = /^\/?\s*([A-Za-z][\w:-]*)/.exec(tag);
    if (!el) fail(`it holds a comment, declaration or stray "<"`);
    const elName = el![1]!.toLowerCase();
    if (!SVG_ELEMENTS.has(elName)) fail(`it holds a <${elName}> element`);
    // attribute names (values blanked), then the values of paint attributes (unquoted only for
    // those: a figure has thousands of attributes, few of them paints)
    for (const a of tag.slice(el![0].length).matchAll(/([^\s=/]+)\s*(?:=\s*("[^"]*"|'[^']*'|[^\s>]+))?/g)) {
      const attr = a[1]!.toLowerCase();
      if (attr.startsWith('on')) fail(`it holds an event-handler attribute (${attr})`);
      if (/(^|:)(href|src)$/.test(attr)) fail(`it holds a link attribute (${attr})`);
      if (!PAINT_ATTRIBUTES.test(attr)) continue;
      const value = (a[2] ?? '').replace(/^["']|["']$/g, '');
      if (/url\s*\(\s*(?!['"]?#)/i.test(value) || /javascript:|expression\s*\(/i.test(value))
        fail(`it holds a URL in ${attr}`);
    }
  }
}

/**
 * The SVG as embedded in HTML: the root's namespace declarations are dropped (the HTML parser
 * puts <svg> in the SVG namespace by itself), so the report holds no URL at all.
 */
export function svgForHtml(svg: string): string {
  return svg.trim().replace(/^<svg\b[^>]*>/, (root) => root.replace(/\s+xmlns(:\w+)?="[^"]*"/g, ''));
}

// ---------------------------------------------------------------------------------------------
// Numbers

// ---------------------------------------------------------------------------------------------
// Model

/** The Schechter parameters by symbol, as the model table and its uncertainty row write them. */
const PARAM_SYMBOLS: Record<string, string> = {
  phi_star: 'φ*',
  log10_phi_star: 'log₁₀ φ*',
  phi_star_dex: 'φ* per dex',
  log10_phi_star_dex: 'log₁₀ φ* per dex',
  l_star: 'L*',
  log10_l_star: 'log₁₀ L*',
  m_star: 'M*',
  alpha: 'α',
  phi_star_1: 'φ₁*',
  log10_phi_star_1: 'log₁₀ φ₁*',
  phi_star_1_dex: 'φ₁* per dex',
  log10_phi_star_1_dex: 'log₁₀ φ₁* per dex',
  alpha_1: 'α₁',
  phi_star_2: 'φ₂*',
  log10_phi_star_2: 'log₁₀ φ₂*',
  phi_star_2_dex: 'φ₂* per dex',
  log10_phi_star_2_dex: 'log₁₀ φ₂* per dex',
  alpha_2: 'α₂',
};

/**
 * A short label for each key of a population as written (specs/survey.schema.json, $defs/population;
 * test/render/report.test.ts checks that every key there has one): what the key means, in the
 * words and units of the trade.
 */
const PARAM_LABELS: Record<string, string> = {
  quantity: 'quantity counted',
  phi_star: 'φ* [Mpc⁻³]',
  log10_phi_star: 'log₁₀ φ* [Mpc⁻³]',
  phi_star_dex: 'φ* per dex [Mpc⁻³ dex⁻¹]',
  log10_phi_star_dex: 'log₁₀ φ* per dex [Mpc⁻³ dex⁻¹]',
  l_star: 'L* [erg s⁻¹]',
  log10_l_star: 'log₁₀ L* [erg s⁻¹]',
  m_star: 'M* [AB mag]',
  alpha: 'α (faint-end slope)',
  phi_star_1: 'φ₁* [Mpc⁻³]',
  log10_phi_star_1: 'log₁₀ φ₁* [Mpc⁻³]',
  phi_star_1_dex: 'φ₁* per dex [Mpc⁻³ dex⁻¹]',
  log10_phi_star_1_dex: 'log₁₀ φ₁* per dex [Mpc⁻³ dex⁻¹]',
  alpha_1: 'α₁ (faint-end slope of the first component)',
  phi_star_2: 'φ₂* [Mpc⁻³]',
  log10_phi_star_2: 'log₁₀ φ₂* [Mpc⁻³]',
  phi_star_2_dex: 'φ₂* per dex [Mpc⁻³ dex⁻¹]',
  log10_phi_star_2_dex: 'log₁₀ φ₂* per dex [Mpc⁻³ dex⁻¹]',
  alpha_2: 'α₂ (faint-end slope of the second component)',
  line: 'rest wavelength of the line',
  rest_wavelength: 'rest wavelength of M*',
  rest_band: 'rest-frame band of M*',
  beta: 'its own spectral slope β of f_λ ∝ λ^β (the k-correction)',
  sed: 'its own rest-frame spectrum (the k-correction)',
  system: 'magnitude system of M*',
  vega_to_ab: 'M_AB − M_Vega',
  bias: 'galaxy bias',
  occupation: 'fraction of matched haloes hosting a detected galaxy',
  model_uncertainty: 'uncertainty of the luminosity function (1σ)',
  redshift_selection: 'fraction kept by the redshift selection',
  blend_ratio: 'unresolved neighbouring lines, flux relative to the line',
  blended_lines: 'lines blended at their own wavelengths, flux relative to the line',
  attenuation: 'dust attenuation [mag]',
  equivalent_widths: 'rest-frame equivalent widths',
  valid_redshift: 'redshifts where the luminosity function was measured',
  sfr_conversion: 'star-formation rate per unit luminosity',
  values_used: 'values used',
};

/** Rows computed for the reader, not keys of the survey file: shown by their label alone. */
const NOT_KEYS = new Set(['values_used']);

/** Labels for a population counted in a free quantity (threshold detection): no erg/s. */
function paramLabel(key: string, quantity: string | undefined): string | undefined {
  if (quantity) {
    if (key === 'l_star') return `characteristic ${quantity}`;
    if (key === 'log10_l_star') return `log₁₀ characteristic ${quantity}`;
  }
  return PARAM_LABELS[key];
}

function quantityOf(m: ModelAsWritten | undefined): string | undefined {
  const q = m?.quantity;
  return typeof q === 'string' && q.trim() ? q.trim() : undefined;
}

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/**
 * A number as the model table writes it (formatWritten: from 1,000 up every digit the file wrote, so
 * a line at 6562.8 Å is not 6,563 Å; below, 6 significant digits), anything else as escaped text.
 */
function numberHtml(v: unknown): string {
  return typeof v === 'number' ? formatWritten(v) : escapeHtml(v);
}

/** A quantity as written: a number in the key's unit ("1,500 Å", "6,562.8 Å"), or the string with its unit. */
function quantityHtml(v: unknown, unit: string): string {
  return typeof v === 'number' ? `${formatWritten(v)} ${unit}` : wordsHtml(v);
}

/** A parameter in z: a number, an expression in z, or a table interpolated linearly. */
function zparamHtml(v: unknown): string {
  if (typeof v === 'string') return `<code>${escapeHtml(v)}</code>`;
  if (isRecord(v) && Array.isArray(v.table))
    return `table in z, interpolated linearly: ${pairsHtml(v.table, 'z = ', '')}`;
  return wordsHtml(v);
}

/** Rows [x, y] as "z = 0.9: 1; z = 1.8: 0.9" (with the given lead and unit of x). */
function pairsHtml(rows: unknown[], lead: string, unit: string): string {
  return rows
    .map((r) =>
      Array.isArray(r) && r.length === 2 ? `${lead}${numberHtml(r[0])}${unit}: ${numberHtml(r[1])}` : wordsHtml(r),
    )
    .join('; ');
}

/**
 * Any value in words, never as JSON: numbers formatted, strings escaped, lists joined by "; ", an
 * object as "key value, key value" (for a key the table has no words of its own for).
 */
function wordsHtml(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return numberHtml(v);
  if (Array.isArray(v)) return v.map(wordsHtml).join('; ');
  if (isRecord(v))
    return Object.entries(v)
      .map(([k, x]) => `<span class="key">${escapeHtml(k)}</span> ${wordsHtml(x)}`)
      .join(', ');
  return escapeHtml(v);
}

/** A parameter's symbol ("log₁₀ φ*"), or its key as written. */
function symbolHtml(name: string): string {
  const s = PARAM_SYMBOLS[name];
  return s ? escapeHtml(s) : `<span class="key">${escapeHtml(name)}</span>`;
}

/** model_uncertainty in words: "log₁₀ φ* 0.06 dex, α 0.06; correlation of log₁₀ φ* and α −0.4". */
function modelUncertaintyHtml(v: unknown): string {
  if (!isRecord(v)) return wordsHtml(v);
  if (typeof v.draws_file === 'string') return `draws read from <code>${escapeHtml(v.draws_file)}</code>`;
  const sigmas = Object.entries(v)
    .filter(([k]) => k !== 'correlation')
    .map(([k, s]) => {
      const unit = k === 'm_star' ? ' mag' : k.startsWith('log10_') ? ' dex' : '';
      return `${symbolHtml(k)} ${numberHtml(s)}${typeof s === 'number' ? unit : ''}`;
    });
  const pairs = isRecord(v.correlation)
    ? Object.entries(v.correlation).map(([pair, r]) => {
        const [a, b, ...rest] = pair.split('-');
        const names = a && b && rest.length === 0 ? `${symbolHtml(a)} and ${symbolHtml(b)}` : escapeHtml(pair);
        return `${names} ${numberHtml(r)}`;
      })
    : [];
  return sigmas.join(', ') + (pairs.length > 0 ? `; correlation of ${pairs.join(', of ')}` : '');
}

/** equivalent_widths in words: "log-normal, median 55 Angstrom, 0.35 dex". */
function equivalentWidthsHtml(v: unknown): string {
  if (!isRecord(v)) return wordsHtml(v);
  if (v.model === 'exponential') return `exponential, scale ${quantityHtml(v.scale, 'Å')}`;
  if (v.model === 'lognormal')
    return `log-normal, median ${quantityHtml(v.median, 'Å')}, ${numberHtml(v.sigma_dex)} dex`;
  if (v.model === 'table' && Array.isArray(v.table))
    return `fraction above W, interpolated linearly: ${pairsHtml(v.table, 'W = ', ' Å')}`;
  return wordsHtml(v);
}

/** blended_lines in words: "6,583.45 Å at 0.15 of the line's flux; 6,548.05 Å at 0.05 of the line's flux". */
function blendedLinesHtml(v: unknown): string {
  if (!Array.isArray(v)) return wordsHtml(v);
  return v
    .map((b) =>
      isRecord(b) ? `${quantityHtml(b.line, 'Å')} at ${numberHtml(b.ratio)} of the line's flux` : wordsHtml(b),
    )
    .join('; ');
}

/** rest_band in words: "top-hat band centred at 1500 Å, FWHM 300 Å", or its transmission file. */
function bandHtml(v: unknown): string {
  if (!isRecord(v)) return wordsHtml(v);
  if (typeof v.file === 'string') return `transmission from <code>${escapeHtml(v.file)}</code>`;
  if (v.center !== undefined && v.fwhm !== undefined)
    return `${v.profile === 'gaussian' ? 'Gaussian' : 'top-hat'} band centred at ${quantityHtml(v.center, 'Å')}, FWHM ${quantityHtml(v.fwhm, 'Å')}`;
  return wordsHtml(v);
}

const SFR_CALIBRATIONS: Record<string, string> = {
  halpha: 'Kennicutt (1998), from H-alpha',
  oii: 'Kennicutt (1998), from [OII]',
  uv: 'Kennicutt (1998), from the UV continuum',
};

/** The value of one key of a population as written, in words and units (HTML). */
function modelValueHtml(key: string, v: unknown, m: ModelAsWritten): string {
  switch (key) {
    case 'values_used':
    case 'quantity':
      return wordsHtml(v);
    case 'line':
    case 'rest_wavelength':
      return quantityHtml(v, 'Å');
    case 'rest_band':
      return bandHtml(v);
    case 'system':
      return v === 'ab' ? 'AB' : v === 'vega' ? 'Vega' : wordsHtml(v);
    case 'vega_to_ab':
      return quantityHtml(v, 'mag');
    case 'bias':
      if (v === 'auto') return 'auto: from the haloes of the same number density (abundance matching)';
      if (isRecord(v) && typeof v.over_growth === 'number' && Object.keys(v).length === 1)
        return `${numberHtml(v.over_growth)} / D(z) (D the linear growth factor of the cosmology, 1 at z = 0)`;
      return zparamHtml(v);
    case 'occupation':
    case 'beta':
      return wordsHtml(v);
    case 'sed':
      return isRecord(v) && typeof v.file === 'string' ? escapeHtml(v.file) : wordsHtml(v);
    case 'blend_ratio':
      return typeof v === 'number' ? wordsHtml(v) : zparamHtml(v);
    case 'model_uncertainty':
      return modelUncertaintyHtml(v);
    case 'equivalent_widths':
      return equivalentWidthsHtml(v);
    case 'blended_lines':
      return blendedLinesHtml(v);
    case 'valid_redshift':
      return isRecord(v) && typeof v.min === 'number' && typeof v.max === 'number'
        ? `${numberHtml(v.min)} to ${numberHtml(v.max)}`
        : wordsHtml(v);
    case 'sfr_conversion':
      if (typeof v === 'string' && SFR_CALIBRATIONS[v]) return SFR_CALIBRATIONS[v];
      return typeof v === 'number'
        ? `${numberHtml(v)} M☉ yr⁻¹ per erg s⁻¹${m.variable === 'magnitude' ? ' Hz⁻¹' : ''}`
        : wordsHtml(v);
    default:
      return zparamHtml(v);
  }
}

/** Whether a label says no more than its key ("bias" and bias): then it is shown once. */
function sameWords(label: string, key: string): boolean {
  return label.trim().toLowerCase() === key.replace(/_/g, ' ').trim().toLowerCase();
}

/** The head of one row: a short label and the key as written, or either alone. */
function modelRowHead(key: string, m: ModelAsWritten): string {
  const label = paramLabel(key, quantityOf(m));
  const keyHtml = `<span class="key">${escapeHtml(key)}</span>`;
  if (!label || sameWords(label, key)) return NOT_KEYS.has(key) ? escapeHtml(label ?? key) : keyHtml;
  return NOT_KEYS.has(key) ? escapeHtml(label) : `${escapeHtml(label)} ${keyHtml}`;
}

function modelHtml(models: ModelAsWritten[]): string {
  const blocks = models.map((m) => {
    const head = [
      m.name,
      typeof m.shape === 'string' && m.shape ? shapeWords(m.shape) : '',
      m.variable ? `in ${m.variable}` : '',
    ]
      .filter((s) => typeof s === 'string' && s.length > 0)
      .map(escapeHtml)
      .join(', ');
    const rows = Object.entries(m)
      .filter(([k, v]) => !['name', 'shape', 'variable'].includes(k) && v !== undefined && v !== null)
      .map(([k, v]) => `<tr><th scope="row">${modelRowHead(k, m)}</th><td>${modelValueHtml(k, v, m)}</td></tr>`)
      .join('\n');
    return `<div class="population"><p class="population-name">${head || 'population'}</p><table class="params">${rows}</table></div>`;
  });
  return blocks.join('\n');
}

function modelVariable(models: ModelAsWritten[]): string | undefined {
  const v = models[0]?.variable;
  return typeof v === 'string' ? v : undefined;
}

// ---------------------------------------------------------------------------------------------
// Tables

function predictTable(
  p: PredictionView,
  variable: string | undefined,
  quantity?: string,
  id = 'predict-table',
  limitOf?: string,
): string {
  const withU = p.slices.some((s) => typeof s.uncertainty?.total_fraction === 'number');
  const withParts = p.slices.some(
    (s) =>
      typeof s.uncertainty?.poisson_fraction === 'number' ||
      typeof s.uncertainty?.cosmic_variance_fraction === 'number',
  );
  const limitHead = quantity
    ? `limit at centre<br><span class="unit">log₁₀ ${escapeHtml(quantity)}</span>`
    : variable === 'magnitude'
      ? 'limit at centre<br><span class="unit">M [AB mag]</span>'
      : variable === 'luminosity'
        ? 'limit at centre<br><span class="unit">log₁₀ L [erg s⁻¹]</span>'
        : 'limit at centre';
  // several populations in one table: the limit column is the first population's, named
  const limitHeadNamed = limitOf ? `${limitHead}<br><span class="unit">of ${escapeHtml(limitOf)}</span>` : limitHead;
  const heads = [
    'slice',
    'window<br><span class="unit">z</span>',
    'volume<br><span class="unit">Mpc³</span>',
    limitHeadNamed,
    'count',
    'per deg²',
    'cumulative count',
  ];
  const withModel = p.slices.some((s) => s.model !== undefined);
  if (withU) heads.push('± 1σ<br><span class="unit">count</span>');
  if (withParts) heads.push('Poisson', 'cosmic variance');
  if (withModel) heads.push('model<br><span class="unit">p16–p84</span>');
  const modelRange = (m: SliceView['model']) => (m ? `${formatNumber(m.p16, 3)}–${formatNumber(m.p84, 3)}` : '');
  let cum = 0;
  const body = p.slices
    .map((s: SliceView, i) => {
      cum += s.count;
      const u = s.uncertainty;
      const cells = [
        String(i + 1),
        `${formatZ(s.z_min)}–${formatZ(s.z_max)}`,
        formatScientific(s.volume_mpc3),
        s.limit_at_center === null ? '—' : formatFixed(s.limit_at_center),
        formatNumber(s.count),
        formatNumber(s.per_deg2),
        formatNumber(cum),
      ];
      if (withU)
        cells.push(typeof u?.total_fraction === 'number' ? `± ${formatNumber(s.count * u.total_fraction, 3)}` : '');
      if (withParts)
        cells.push(uncertaintyPercent(u?.poisson_fraction), uncertaintyPercent(u?.cosmic_variance_fraction));
      if (withModel) cells.push(modelRange(s.model));
      return `<tr>${cells.map((c) => `<td>${c}</td>`).join('')}</tr>`;
    })
    .join('\n');
  const t = p.totals;
  const tu = t.uncertainty;
  const total = [
    'all',
    p.redshift ? `${formatZ(p.redshift.min)}–${formatZ(p.redshift.max)}` : '',
    formatScientific(t.volume_mpc3),
    '',
    formatNumber(t.count),
    formatNumber(t.per_deg2),
    formatNumber(t.count),
  ];
  if (withU)
    total.push(typeof tu?.total_fraction === 'number' ? `± ${formatNumber(t.count * tu.total_fraction, 3)}` : '');
  if (withParts) total.push(uncertaintyPercent(tu?.poisson_fraction), uncertaintyPercent(tu?.cosmic_variance_fraction));
  if (withModel) total.push(modelRange(t.model));
  const sentence = sourcesSentence(t.count, tu, t.model);
  return `<table class="numbers" id="${id}">
<thead><tr>${heads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead>
<tbody>
${body}
</tbody>
<tfoot><tr>${total.map((c) => `<td>${c}</td>`).join('')}</tr></tfoot>
</table>${sentence ? `\n<p class="sources" id="${id}-sources">${sentence}</p>` : ''}`;
}

/**
 * The three sources of the total's uncertainty in one sentence (with the model's own uncertainty
 * only): "Of the total 2,825 ± 524, Poisson 1.9%, cosmic variance 18.5%, model 7.2%: cosmic
 * variance dominates." (± the 1σ of Poisson noise and cosmic variance combined; the model's share is
 * (p84 - p16) / (2 p50) over its draws).
 */
function sourcesSentence(
  count: number,
  u: PredictionView['totals']['uncertainty'],
  m: PredictionView['totals']['model'],
): string | undefined {
  const s = uncertaintySources(u, m);
  if (!s || !u || !m) return undefined;
  return (
    `Of the total ${formatNumber(count)} ± ${formatNumber(count * u.total_fraction, 3)}, Poisson ${uncertaintyPercent(s.poisson)}, ` +
    `cosmic variance ${uncertaintyPercent(s.cosmicVariance)}, model ${uncertaintyPercent(s.model)}: ${s.dominant} dominates.`
  );
}

/** A bin holding less than this fraction of all detections is left out at either end (as in the text table). */
const OBSERVED_FLOOR = 1e-4;

/**
 * The populations' windows differ (breakdown "observed"): one row per population over its own
 * window and the total; the detections per bin of the observed value with each population's share
 * (the interloper fraction); then each population's own redshift slices.
 */
function populationsTables(p: PredictionView, variable: string | undefined, quantity?: string): string {
  const pops = p.populations ?? [];
  const all = p.totals.count;
  const share = (n: number) => (all > 0 ? percent(n / all) : '');
  const pm = (n: number, u: { total_fraction: number } | undefined) =>
    typeof u?.total_fraction === 'number' ? `± ${formatNumber(n * u.total_fraction, 3)}` : '';
  const rows = pops
    .map((q) => {
      const cells = [
        escapeHtml(q.name),
        `${formatZ(q.window.min)}–${formatZ(q.window.max)}`,
        formatScientific(q.totals.volume_mpc3),
        formatNumber(q.totals.count),
        pm(q.totals.count, q.totals.uncertainty),
        formatNumber(q.totals.per_deg2),
        share(q.totals.count),
      ];
      return `<tr>${cells.map((c) => `<td>${c}</td>`).join('')}</tr>`;
    })
    .join('\n');
  const total = [
    'all',
    '',
    formatScientific(p.totals.volume_mpc3),
    formatNumber(all),
    pm(all, p.totals.uncertainty),
    formatNumber(p.totals.per_deg2),
    all > 0 ? '100.0%' : '',
  ];
  const heads = [
    'population',
    'window<br><span class="unit">z</span>',
    'volume<br><span class="unit">Mpc³</span>',
    'count',
    '± 1σ<br><span class="unit">count</span>',
    'per deg²',
    'share',
  ];
  let out = `<table class="numbers" id="populations-table">
<thead><tr>${heads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead>
<tbody>
${rows}
</tbody>
<tfoot><tr>${total.map((c) => `<td>${c}</td>`).join('')}</tr></tfoot>
</table>`;
  const o = p.observed_bins;
  if (o && o.bins.length > 0) {
    const names = pops.map((q) => q.name);
    let a = 0;
    let z = o.bins.length;
    while (a < z && !(o.bins[a]!.count >= OBSERVED_FLOOR * all)) a++;
    while (z > a && !(o.bins[z - 1]!.count >= OBSERVED_FLOOR * all)) z--;
    const label =
      o.variable === 'log10_line_flux'
        ? 'log₁₀ line flux<br><span class="unit">erg s⁻¹ cm⁻²</span>'
        : o.variable === 'apparent_magnitude'
          ? 'apparent magnitude<br><span class="unit">AB mag</span>'
          : escapeHtml(o.variable);
    const binRows = o.bins
      .slice(a, z)
      .map((b) => {
        const cells = [
          `${formatFixed(b.min, 2)} to ${formatFixed(b.max, 2)}`,
          ...names.map((n) => formatNumber(b.populations[n]?.count ?? 0)),
          formatNumber(b.count),
          ...names.map((n) => (b.count > 0 ? percent(b.populations[n]?.share) : '')),
        ];
        return `<tr>${cells.map((c) => `<td>${c}</td>`).join('')}</tr>`;
      })
      .join('\n');
    const binHeads = [
      label,
      ...names.map((n) => escapeHtml(n)),
      'all',
      ...names.map((n) => `share of ${escapeHtml(n)}`),
    ];
    out += `
<h3>Detections per bin of the observed value: the interloper fraction</h3>
<table class="numbers" id="observed-table">
<thead><tr>${binHeads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead>
<tbody>
${binRows}
</tbody></table>
<p class="note">Every population over its own redshift window; bins holding less than ${100 * OBSERVED_FLOOR}% of the detections at either end are left out.</p>`;
  }
  pops.forEach((q, k) => {
    out += `\n<h3>${escapeHtml(q.name)}: its own redshift slices</h3>\n${predictTable({ ...p, redshift: q.window, totals: q.totals, slices: q.slices }, variable, quantity, `predict-table-${k + 1}`)}`;
  });
  return out;
}

function forecastTables(f: ForecastView): string {
  const names: readonly string[] = f.parameters;
  const cols = names;
  const fits = f.mocks?.fits ?? [];
  const mockStats = (name: string): [string, string] => {
    const j = cols.indexOf(name);
    if (j < 0 || fits.length < 2) return ['', ''];
    const xs = fits.map((r) => r?.[j]).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
    if (xs.length < 2) return ['', ''];
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    const sd = Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (xs.length - 1));
    return [formatNumber(mean, digitsBeside(mean, sd, 5)), formatNumber(sd, 3)];
  };
  // Without the fits themselves, the summary the forecast gives (mean and spread per parameter).
  const summary: Record<string, { mean?: number; std?: number } | undefined> | undefined = f.mocks?.parameters;
  const summaryCount = f.mocks?.count;
  const fromSummary = fits.length < 2 && !!summary && Object.keys(summary).length > 0;
  const summaryStats = (name: string): [string, string] => {
    const v = summary?.[name];
    return [
      typeof v?.mean === 'number' ? formatNumber(v.mean, digitsBeside(v.mean, v.std, 5)) : '',
      typeof v?.std === 'number' ? formatNumber(v.std, 3) : '',
    ];
  };
  const withMocks = fits.length >= 2 || fromSummary;
  const nMocks = fits.length >= 2 ? fits.length : (summaryCount ?? 0);
  const heads = ['parameter', 'assumed value', 'σ from the Fisher matrix'];
  if (withMocks) heads.push(`mean of ${nMocks} mock fits`, 'spread of mock fits (σ)');
  const rows = names
    .map((n) => {
      const cells = [
        `<span class="key">${escapeHtml(n)}</span>`,
        typeof f.center[n] === 'number'
          ? formatNumber(f.center[n], digitsBeside(f.center[n], f.fisher.sigma[n], 6))
          : '',
        typeof f.fisher.sigma[n] === 'number' ? formatNumber(f.fisher.sigma[n], 3) : '',
      ];
      if (withMocks) cells.push(...(fromSummary ? summaryStats(n) : mockStats(n)));
      return `<tr>${cells.map((c) => `<td>${c}</td>`).join('')}</tr>`;
    })
    .join('\n');
  let corr = '';
  const c = f.fisher.correlation;
  if (Array.isArray(c) && c.length === names.length) {
    corr = `<h3>Correlation of the parameters (Fisher matrix)</h3>
<table class="numbers" id="correlation-table">
<thead><tr><th></th>${names.map((n) => `<th scope="col" class="key">${escapeHtml(n)}</th>`).join('')}</tr></thead>
<tbody>
${names
  .map(
    (n, i) =>
      `<tr><th scope="row" class="key">${escapeHtml(n)}</th>${names
        .map((_, j) => `<td>${typeof c[i]?.[j] === 'number' ? c[i][j].toFixed(3) : ''}</td>`)
        .join('')}</tr>`,
  )
  .join('\n')}
</tbody></table>`;
  }
  const left = f.populations_left_out;
  const which =
    left && left.length > 0
      ? `<p class="note" id="forecast-population">The forecast is of the file's first population${f.model?.name ? `, “${escapeHtml(f.model.name)}”` : ''}, counted over its own window; ${left.map((n) => `“${escapeHtml(n)}”`).join(', ')} ${left.length === 1 ? 'is' : 'are'} not forecast (skytally forecast --population NAME forecasts another).</p>\n`
      : '';
  return `${which}<table class="numbers" id="forecast-table">
<thead><tr>${heads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead>
<tbody>
${rows}
</tbody></table>
${modelSpread(f)}${corr}`;
}

/**
 * How the Fisher sigmas vary across the model's own uncertainty (forecast --model-draws): one line
 * per parameter, "σ(alpha) = 0.047 (0.041–0.055 across the model)", the p16 and p84 of the sigma
 * over the draws, with the forecast's notes; nothing without a model_spread block.
 */
function modelSpread(f: ForecastView): string {
  const ms = f.model_spread;
  if (!ms) return '';
  const lines = f.parameters
    .filter((n) => ms.sigma[n] !== undefined && typeof f.fisher.sigma[n] === 'number')
    .map((n) => {
      const q = ms.sigma[n]!;
      return `<li>σ(<span class="key">${escapeHtml(n)}</span>) = ${formatNumber(f.fisher.sigma[n]!, 3)} (${formatNumber(q.p16, 3)}–${formatNumber(q.p84, 3)} across the model)</li>`;
    })
    .join('\n');
  const what =
    ms.source === 'draws_file'
      ? `the ${ms.draws} rows of its draws file`
      : `${ms.draws} draws of its model_uncertainty (seed ${ms.seed})`;
  const notes = ms.notes.map((n) => `<p class="note">${escapeHtml(n)}</p>`).join('\n');
  return `<div id="forecast-model-spread">
<p>The sigmas across the model: the Fisher matrix recomputed at ${what}; the range is the 16th to 84th percentile of each sigma.</p>
<ul>
${lines}
</ul>
${notes}${notes ? '\n' : ''}</div>
`;
}

/** How often the robust best wins draw by draw, as a sentence (with a leading space), or nothing. */
function agreementWords(a: NonNullable<PlanView['robust']>['agreement']): string {
  if (!a) return '';
  return ` Draw by draw, it is the best of the designs in ${formatNumber(100 * a.best_fraction)} % of ${formatNumber(a.draws_ranked)} draws and within 5 % of the best in ${formatNumber(100 * a.near_best_fraction)} %.`;
}

function planTable(plan: PlanView): string {
  const same = (a: PlanDesignView, b: PlanDesignView | undefined) =>
    !!b && a.exposure_hours_per_pointing === b.exposure_hours_per_pointing && a.pointings === b.pointings;
  const nb = plan.near_best && {
    from: plan.near_best.from.exposure_hours_per_pointing,
    to: plan.near_best.to.exposure_hours_per_pointing,
  };
  const lo = nb ? Math.min(nb.from, nb.to) : NaN;
  const hi = nb ? Math.max(nb.from, nb.to) : NaN;
  const robust = plan.robust;
  // Near best: the goal value within the tolerance of the best under the assumed values, as plan's
  // near_best counts them; a run that is not contiguous has designs between its ends that are not.
  const tolerance = plan.near_best?.tolerance;
  const bestValue = (robust ? robust.best_assumed : plan.best)?.goal_value;
  const within = (d: PlanDesignView): boolean =>
    tolerance === undefined || bestValue === undefined || plan.goal_direction === undefined
      ? true
      : d.meets_minimum_count !== false &&
        (plan.goal_direction === 'maximise'
          ? d.goal_value >= (1 - tolerance) * bestValue
          : d.goal_value <= (1 + tolerance) * bestValue);
  // The best design may come from refining between grid designs: it is listed with them (and,
  // ranked across the model, the best under the assumed values too).
  const listed = [...(plan.designs ?? [])];
  if (plan.best && !listed.some((d) => same(d, plan.best))) listed.push(plan.best);
  if (robust && !listed.some((d) => same(d, robust.best_assumed))) listed.push(robust.best_assumed);
  // a limit the file wrote as a flux density: in its unit, then AB ("1.55 mJy (15.93 AB)")
  const unit = plan.limit_unit;
  // a line flux (5e-17 erg/s/cm^2) in powers of ten: two decimals wrote every one as 0.00
  const lineFlux = plan.limit_variable === 'line_flux_cgs';
  const limitCell = (x: number): string =>
    unit
      ? `${formatNumber(fluxDensityOfAbMagnitude(x, unit), 3)} ${escapeHtml(unit)} (${formatFixed(x)} AB)`
      : lineFlux
        ? formatNumber(x, 3)
        : formatFixed(x);
  const designs = listed.sort((a, b) => a.exposure_hours_per_pointing - b.exposure_hours_per_pointing);
  const rows = designs
    .map((d) => {
      const best = same(d, plan.best);
      const near = nb && d.exposure_hours_per_pointing >= lo && d.exposure_hours_per_pointing <= hi && within(d);
      const cls = best ? ' class="best"' : near ? ' class="near"' : '';
      const assumed = robust && !robust.same_design && same(d, robust.best_assumed);
      const note = [best ? 'best' : near ? 'near best' : '', assumed ? 'best under the assumed values' : '']
        .filter((x) => x)
        .join('; ');
      const cells = [
        formatNumber(d.exposure_hours_per_pointing),
        formatNumber(d.pointings),
        formatNumber(d.area_deg2),
        limitCell(d.limit),
        formatNumber(d.count),
        formatNumber(d.goal_value),
        ...(robust ? [d.goal_value_pessimistic === undefined ? '–' : formatNumber(d.goal_value_pessimistic)] : []),
        note,
      ];
      return `<tr${cls}>${cells.map((c) => `<td>${c}</td>`).join('')}</tr>`;
    })
    .join('\n');
  const heads = [
    'exposure per pointing<br><span class="unit">hours</span>',
    'pointings',
    'area<br><span class="unit">deg²</span>',
    lineFlux ? 'limit<br><span class="unit">erg s⁻¹ cm⁻²</span>' : 'limit',
    'count',
    `goal value<br><span class="unit">${escapeHtml(goalWords(plan.goal))}</span>`,
    ...(robust
      ? [`goal at model p${Math.round(robust.percentile * 100)}<br><span class="unit">pessimistic case</span>`]
      : []),
    '',
  ];
  const range = nb
    ? ` Designs from ${formatNumber(lo)} to ${formatNumber(hi)} hours per pointing come close to the best${plan.near_best?.contiguous === false ? ' (not all of those between: the table marks which)' : ''}.`
    : '';
  const ranked = robust
    ? `<p id="plan-robust">Ranked across the model (<code>robust: true</code>): the best design is the one with the best goal at the model's pessimistic case, the ${Math.round(robust.percentile * 100)}th percentile over ${formatNumber(robust.draws)} ${robust.source === 'draws_file' ? 'rows of the draws file' : 'draws of model_uncertainty'}; ${robust.same_design ? 'it is also the best under the assumed values.' : `under the assumed values the best is ${formatNumber(robust.best_assumed.pointings)} pointings of ${formatNumber(robust.best_assumed.exposure_hours_per_pointing)} hours.`}${agreementWords(robust.agreement)}</p>
`
    : '';
  return `<p>Goal: ${escapeHtml(goalWords(plan.goal))}; time available: ${formatNumber(plan.budget_hours)} hours.${range}</p>
${ranked}
<table class="numbers" id="plan-table">
<thead><tr>${heads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead>
<tbody>
${rows}
</tbody></table>`;
}

// ---------------------------------------------------------------------------------------------
// The document

const CSS = `
:root { color-scheme: light; }
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif; color: #1b1f24;
  background: #fff; margin: 0 auto; max-width: 1180px; padding: 24px 28px 48px; line-height: 1.45; font-size: 15px; }
h1 { font-size: 1.6em; margin: 0 0 4px; color: #1b2a4a; overflow-wrap: anywhere; }
h2 { font-size: 1.25em; margin: 32px 0 10px; border-bottom: 2px solid #c7dbf0; padding-bottom: 4px; color: #1b2a4a; }
h3 { font-size: 1.05em; margin: 20px 0 8px; }
.summary { color: #333; margin: 0 0 16px; }
.assumption { border: 2px solid #de8a2a; background: #fdf4e8; padding: 12px 16px; margin: 16px 0 8px; border-radius: 4px; }
.assumption .warning { font-weight: bold; margin: 0 0 8px; }
.population-name { font-weight: bold; margin: 6px 0 4px; }
table { border-collapse: collapse; margin: 6px 0 10px; }
table.params th { text-align: left; font-weight: normal; padding: 2px 14px 2px 0; vertical-align: top; }
table.params td { padding: 2px 0; }
table.numbers { font-variant-numeric: tabular-nums; font-size: 0.93em; }
table.numbers th, table.numbers td { padding: 4px 10px; border-bottom: 1px solid #dde3ea; text-align: right; }
table.numbers thead th { border-bottom: 2px solid #1b2a4a; vertical-align: bottom; }
table.numbers tfoot td { border-top: 2px solid #1b2a4a; font-weight: bold; }
table.numbers tr.best td { background: #fbe3c6; font-weight: bold; }
table.numbers tr.near td { background: #eaf2fb; }
#forecast-table td:first-child, #correlation-table th[scope='row'] { text-align: left; }
.unit { font-weight: normal; color: #555; font-size: 0.9em; }
.key { font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 0.92em; }
sup { line-height: 0; font-size: 0.75em; }
code { font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; background: #f1f3f6; padding: 0 3px; }
pre.survey { background: #f6f7f9; border: 1px solid #dde3ea; padding: 12px 14px; overflow-x: auto;
  font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 13px; line-height: 1.4; white-space: pre; }
figure { margin: 18px 0 26px; break-inside: avoid; page-break-inside: avoid; }
figure svg { max-width: 100%; height: auto; display: block; }
figcaption { font-size: 0.9em; color: #444; margin-top: 4px; }
.note { color: #555; font-size: 0.9em; }
.omitted { border-left: 4px solid #de8a2a; background: #fdf4e8; padding: 8px 12px; }
.warnings { border-left: 4px solid #b3261e; background: #fbeceb; padding: 8px 12px; margin: 12px 0; }
.warnings h2 { margin: 0 0 6px; border: none; font-size: 1.1em; color: #7a1711; }
.warnings ul { margin: 0; padding-left: 20px; }
@media print { body { max-width: none; padding: 0; font-size: 11pt; } h2 { break-after: avoid; } }
`;

/** A forecast or plan section: its tables, or the sentence saying why there are none, or nothing. */
function section(id: string, heading: string, body: string | undefined, omitted: string | undefined): string {
  if (body !== undefined) return `<section id="${id}">\n<h2>${heading}</h2>\n${body}\n</section>`;
  if (omitted)
    return `<section id="${id}">\n<h2>${heading}</h2>\n<p class="omitted" id="${id}-omitted">${escapeHtml(omitted)}</p>\n</section>`;
  return '';
}

/**
 * The ids of the figures' clip paths and gradients (`clip7`, `gradient_3`), numbered again in the
 * order they first appear in the document. The SVG renderer numbers them with a counter that lives
 * as long as the process, so the same figures drawn twice in one process would otherwise differ;
 * renumbered over the whole document they stay unique across its inline figures (which share one
 * id namespace) and the same input gives the same document.
 */
function definitionIds(): (svg: string) => string {
  const seen = new Map<string, number>();
  const next = { clip: 0, gradient_: 0 };
  return (svg) =>
    svg.replace(
      /(id="|url\(#)(clip|gradient_)(\d+)(?=[")])/g,
      (_m, lead: string, kind: 'clip' | 'gradient_', n: string) => {
        const key = `${kind}${n}`;
        let k = seen.get(key);
        if (k === undefined) {
          k = ++next[kind];
          seen.set(key, k);
        }
        return `${lead}${kind}${k}`;
      },
    );
}

/**
 * What the cosmic variance assumed, under the table of slices: the total's bias (count-weighted,
 * with the halo mass abundance matching gave it), the matter's sigma in the survey's box and the
 * box's effective depth, as the text table's footer gives them.
 */
function clusteringNote(p: PredictionView): string {
  const u = p.totals.uncertainty;
  if (!u || typeof u.bias !== 'number' || typeof u.sigma_matter !== 'number') return '';
  const halo = u.halo_mass_min_msun ? `; haloes above ${formatScientific(u.halo_mass_min_msun)} M☉ have it` : '';
  const depth = u.effective_depth_mpc
    ? `, in a box of effective depth ${formatNumber(u.effective_depth_mpc, 3)} Mpc`
    : '';
  return (
    `\n<p class="note" id="cosmic-variance-assumed">Cosmic variance from the linear power spectrum: galaxy bias ` +
    `${formatNumber(u.bias, 3)} (count-weighted over the detected sources${halo}), σ of the matter ` +
    `${formatNumber(u.sigma_matter, 3)}${depth}.</p>`
  );
}

/** Build the report. Pure: same input, same document. */
export function renderReport(input: ReportInput): string {
  const p = input.prediction;
  const models = ((): ModelAsWritten[] => {
    const m = input.model ?? p.model;
    return !m ? [] : Array.isArray(m) ? m : [m];
  })();
  for (const f of input.figures) assertSafeSvg(f.svg, f.name);

  const title = escapeHtml(input.surveyTitle);
  const c = p.cosmology;
  const cosmo = c
    ? `flat ΛCDM with H₀ = ${formatNumber(c.h0)} km s⁻¹ Mpc⁻¹, Ωₘ = ${formatNumber(c.omega_m)}` +
      (typeof c.t_cmb === 'number' && c.t_cmb > 0 ? `, T_CMB = ${formatNumber(c.t_cmb, 6)} K` : '') +
      // (the linear power spectrum's parameters, which the cosmic variance rests on)
      (typeof c.sigma8 === 'number' ? `, σ₈ = ${formatNumber(c.sigma8)}` : '') +
      (typeof c.omega_b === 'number' ? `, Ω_b = ${formatNumber(c.omega_b)}` : '') +
      (typeof c.n_s === 'number' ? `, n_s = ${formatNumber(c.n_s)}` : '')
    : '';
  const window = p.redshift ? `redshift ${formatZ(p.redshift.min)}–${formatZ(p.redshift.max)}` : '';
  const observed = p.breakdown === 'observed';
  // several populations over one window share the slices; the limit column is the first one's
  const firstOfSeveral = !observed && (p.populations?.length ?? 0) > 1 ? p.populations![0]!.name : undefined;
  const layout = observed
    ? `${(p.populations ?? []).length} populations, each in its own redshift window`
    : `${p.slices.length} slice${p.slices.length === 1 ? '' : 's'}`;
  const detection = p.detection_text ? escapeHtml(p.detection_text) : '';
  const summary = [`area ${formatNumber(p.area_deg2)} deg²`, window, detection, layout, cosmo]
    .filter((s) => s)
    .join('; ');
  const totalU = p.totals.uncertainty?.total_fraction;
  const headline =
    `Expected count: <strong>${formatNumber(p.totals.count)}</strong>` +
    (typeof totalU === 'number'
      ? ` ± ${formatNumber(p.totals.count * totalU, 3)} (1σ, Poisson and cosmic variance)`
      : '') +
    `, or ${formatNumber(p.totals.per_deg2)} per deg².`;

  const modelSection = `<section class="assumption" id="model">
<p class="warning">Every number in this report follows from the assumed population below. A forecast is only as good as the luminosity function assumed: change it and the counts, errors and best design change with it.</p>
${models.length > 0 ? modelHtml(models) : '<p>The results given did not describe the population.</p>'}
</section>`;

  const prefix = `${input.surveyTitle.trim()}: `;
  const renumber = definitionIds();
  const figures = input.figures
    .map((f, i) => {
      const what = f.title.startsWith(prefix) ? f.title.slice(prefix.length) : f.title;
      return `<figure id="figure-${escapeHtml(f.name)}" class="figure">
${renumber(svgForHtml(f.svg))}
<figcaption>Figure ${i + 1}. ${escapeHtml(what)}</figcaption>
</figure>`;
    })
    .join('\n');

  const warnings = input.warnings ?? [];
  const warningSection =
    warnings.length === 0
      ? ''
      : `<section class="warnings" id="warnings">
<h2>${warnings.length === 1 ? 'Warning' : `Warnings (${warnings.length})`}</h2>
<ul>
${warnings.map((w) => `<li data-code="${escapeHtml(w.code)}">${escapeHtml(w.message)}</li>`).join('\n')}
</ul>
</section>\n`;

  const fileLabel = input.surveyFile ? ` <span class="key">${escapeHtml(input.surveyFile)}</span>` : '';
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="skytally">
<title>${title}</title>
<style>${CSS}</style>
</head>
<body>
<header>
<h1 id="survey-title">${title}</h1>
<p class="summary">${summary}</p>
<p class="summary">${headline}</p>
</header>
${warningSection}${modelSection}
<section id="survey">
<h2>The survey file${fileLabel}</h2>
<pre class="survey">${escapeHtml(input.surveyText)}</pre>
</section>
<section id="predict">
<h2>${observed ? 'Expected counts of every population' : 'Expected counts per redshift slice'}</h2>
${observed ? populationsTables(p, modelVariable(models), quantityOf(models[0])) : predictTable(p, modelVariable(models), quantityOf(models[0]), undefined, firstOfSeveral)}
<p class="note">Counts are expected numbers of detected sources, not rounded. The limit is given at each slice's middle redshift${firstOfSeveral ? `, for ${escapeHtml(firstOfSeveral)}, the first population (each population's own limits are in predict's table and JSON)` : ''}.</p>${clusteringNote(p)}
</section>
${section('forecast', 'Forecast', input.forecast ? forecastTables(input.forecast) : undefined, input.forecastOmitted)}
${section('plan', 'Plan', input.plan ? planTable(input.plan) : undefined, input.planOmitted)}
${input.figures.length > 0 ? `<section id="figures">\n<h2>Figures</h2>\n${figures}\n</section>` : ''}
</body>
</html>
`;
}
