/**
 * The live parts of the explore page as HTML text, for one result of the engine: the summary
 * numbers, the slice table, the Fisher sigmas, the figures and the warnings. Every number a test
 * or a script may read carries `data-output` (its name, docs/outputs.md "explore") and
 * `data-value` (the number as JavaScript writes it: every digit that tells it apart).
 */
import type { ExploreOutput, ExploreResult, ExploreSliceRow } from '../../model/explore.js';
import { formatRange, percent, sig } from '../format.js';
import { countsSvg, escapeHtml, lfSvg } from './figures.js';

function shown(o: Pick<ExploreOutput, 'kind' | 'value'>): string {
  return o.kind === 'fraction' ? percent(o.value) : sig(o.value, 4);
}

/**
 * What a control's slider says to a screen reader (its aria-valuetext): the value and its unit as
 * the number field holds them (4 significant digits), not the slider's own position, which for a
 * log-scale slider is log10 of the value ("-0.778" for an area of 0.1667 deg^2).
 */
export function sliderValueText(c: { unit: string }, value: number): string {
  return `${sig(value, 4)}${c.unit ? ` ${c.unit}` : ''}`;
}

/** A number still to come: its name, no value, marked busy for screen readers (docs/outputs.md, "explore"). */
const PENDING = 'data-pending="true" aria-busy="true">pending';

function cell(name: string, value: number | undefined, kind: ExploreOutput['kind'], pending = false): string {
  if (pending) return `<td data-output="${name}" ${PENDING}</td>`;
  if (value === undefined) return '<td></td>';
  return `<td data-output="${name}" data-value="${String(value)}">${escapeHtml(shown({ kind, value }))}</td>`;
}

/** The summary: one labelled number per output. */
export function outputsHtml(r: ExploreResult): string {
  if (r.error) return `<p class="error" role="alert">${escapeHtml(r.error)}</p>`;
  return `<dl>${r.outputs
    .map(
      (o) =>
        `<div><dt>${escapeHtml(o.label)}</dt>${o.pending ? `<dd data-output="${o.name}" ${PENDING}</dd>` : `<dd data-output="${o.name}" data-value="${String(o.value)}">${escapeHtml(shown(o))}</dd>`}</div>`,
    )
    .join('')}</dl>`;
}

/** The slice table: count and fractional uncertainties per slice (rows counted from 1). */
export function slicesHtml(r: ExploreResult): string {
  if (r.error) return '';
  const byPopulation = r.rows.some((x) => x.population !== undefined);
  const model = r.rows.some((x) => x.model !== undefined || x.modelPending);
  const head = `<tr>${byPopulation ? '<th scope="col">population</th>' : ''}<th scope="col">z</th><th scope="col">count</th><th scope="col">Poisson</th><th scope="col">cosmic variance</th><th scope="col">total</th>${model ? '<th scope="col">model</th>' : ''}</tr>`;
  const rows = r.rows.map((x: ExploreSliceRow, i) => {
    const k = i + 1;
    return `<tr>${byPopulation ? `<td>${escapeHtml(x.population ?? '')}</td>` : ''}<th scope="row">${formatRange(x.zMin, x.zMax)}</th>${cell(`slice-${k}-count`, x.count, 'count')}${cell(`slice-${k}-poisson`, x.poisson, 'fraction')}${cell(`slice-${k}-cosmic-variance`, x.cosmicVariance, 'fraction')}${cell(`slice-${k}-uncertainty`, x.total, 'fraction')}${model ? cell(`slice-${k}-model`, x.model, 'fraction', x.modelPending) : ''}</tr>`;
  });
  return `<table><caption>Expected counts per slice with 1-sigma fractional uncertainties</caption><thead>${head}</thead><tbody>${rows.join('')}</tbody></table>${clusteringNote(r)}`;
}

/** What the cosmic variance assumed, in one sentence under the slice table (absent without it). */
function clusteringNote(r: ExploreResult): string {
  const c = r.clustering;
  if (!c) return '';
  const ns = c.nS !== undefined ? `, n_s = ${sig(c.nS, 4)}` : '';
  const halo = c.haloMassMin !== undefined ? `; haloes above ${sig(c.haloMassMin, 3)} Msun have it` : '';
  const given = c.biasGiven !== undefined ? `; given as ${c.biasGiven}` : '';
  const depth = c.effectiveDepth !== undefined ? `, effective depth ${sig(c.effectiveDepth, 3)} Mpc` : '';
  return `<p class="note" data-part="cosmic-variance-assumed">${escapeHtml(
    `Cosmic variance from the linear power spectrum (sigma8 = ${sig(c.sigma8, 4)}${ns}): bias ${sig(c.bias, 3)} ` +
      `(count-weighted over the detected sources${given}${halo}), sigma of the matter ${sig(c.sigmaMatter, 3)}${depth}.`,
  )}</p>`;
}

/** The Fisher sigmas of the first population, with and without the cosmic-variance nuisances. */
export function fisherHtml(r: ExploreResult): string {
  if (r.error) return '';
  if (!r.fisher) return `<p>${escapeHtml(r.fisherNote ?? 'No Fisher matrix.')}</p>`;
  const f = r.fisher;
  const rows = f.names.map(
    (n, i) =>
      `<tr><th scope="row">${escapeHtml(n)}</th><td>${sig(f.sigma[i]!, 4)}</td>${cell(`sigma-poisson-${n}`, f.sigmaPoisson[i], 'plain')}</tr>`,
  );
  return `<table><caption>Fisher 1-sigma uncertainties of ${escapeHtml(f.population)} (marginalised)</caption><thead><tr><th scope="col">parameter</th><th scope="col">with cosmic variance</th><th scope="col">Poisson only</th></tr></thead><tbody>${rows.join('')}</tbody></table>`;
}

/** The figures one by one (each a <figure> element): counts per slice, then the luminosity functions. */
export function figureParts(r: ExploreResult): string[] {
  if (r.error) return [];
  return [...r.counts.map(countsSvg), ...r.lf.map(lfSvg)].map((svg) => `<figure>${svg}</figure>`);
}

/** The figures: counts per slice, then the luminosity functions. */
export function figuresHtml(r: ExploreResult): string {
  return figureParts(r).join('');
}

/** What the numbers assume (the survey, the cosmology, each population's model), as predict's table states it. */
export function assumedHtml(r: ExploreResult): string {
  if (r.error || !r.assumed) return '';
  return r.assumed.map((line) => `<p>${escapeHtml(line)}</p>`).join('');
}

export function warningsHtml(r: ExploreResult): string {
  return r.warnings.length === 0 ? '' : `<ul>${r.warnings.map((w) => `<li>${escapeHtml(w)}</li>`).join('')}</ul>`;
}
