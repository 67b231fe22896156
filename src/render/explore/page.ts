/**
 * The explore page as one HTML document: the controls, the live parts (src/render/explore/view.ts)
 * in their first state, the data the page starts from (a JSON block, never executed), the style
 * sheet and the bundled engine as one inline script. The Content-Security-Policy allows exactly
 * that script and that style sheet (by their SHA-256 hashes) and nothing from anywhere else, so
 * the page works from file:// and makes no request.
 */
import { createHash } from 'node:crypto';
import type { ControlSpec, ExploreResult } from '../../model/explore.js';
import { sig } from '../format.js';
import { escapeHtml } from './figures.js';
import {
  assumedHtml,
  figuresHtml,
  fisherHtml,
  outputsHtml,
  sliderValueText,
  slicesHtml,
  warningsHtml,
} from './view.js';

export interface ExplorePageInput {
  title: string;
  /** The survey file's name, for the page and the written-back file's name. */
  fileName: string;
  controls: ControlSpec[];
  result: ExploreResult;
  /** The JSON the page script reads at start (ExplorePageData of src/explore/browser/main.ts). */
  data: unknown;
  /** The bundled page script. */
  script: string;
}

const STYLE = `
body { font-family: system-ui, sans-serif; margin: 0 auto; max-width: 1200px; padding: 1rem; color: #111; background: #fff; }
h1 { font-size: 1.4rem; } h2 { font-size: 1.1rem; margin-top: 1.2rem; }
.layout { display: grid; grid-template-columns: minmax(280px, 1fr) 2fr; gap: 1.5rem; }
.control { margin: 0.6rem 0; } .control label { display: block; font-weight: 600; }
.control input[type=range] { width: 100%; } .control input[type=number] { width: 12em; }
.range-note { color: #555; font-size: 0.85em; }
dl div { display: flex; justify-content: space-between; border-bottom: 1px solid #ddd; padding: 0.2rem 0; }
dt { color: #333; } dd { margin: 0; font-variant-numeric: tabular-nums; font-weight: 600; }
table { border-collapse: collapse; margin: 0.5rem 0; } caption { text-align: left; font-weight: 600; }
th, td { border-bottom: 1px solid #ddd; padding: 0.2rem 0.6rem; text-align: right; font-variant-numeric: tabular-nums; }
figure { display: inline-block; margin: 0.3rem; } svg { max-width: 100%; height: auto; }
.error { color: #a00; font-weight: 600; } pre { background: #f4f4f4; padding: 0.6rem; overflow: auto; max-height: 20rem; }
button { font-size: 1rem; padding: 0.3rem 0.8rem; }
:focus-visible { outline: 3px solid #1f5fbf; outline-offset: 2px; }
@media (max-width: 800px) { .layout { grid-template-columns: 1fr; } }
`;

const hash = (s: string) => `'sha256-${createHash('sha256').update(s, 'utf8').digest('base64')}'`;

/** JSON safe inside a <script> element: no "<" at all. */
export function scriptJson(value: unknown): string {
  return JSON.stringify(value)
    .replace(/</g, '\\u003c')
    .replace(/\u2028/g, '\\u2028')
    .replace(/\u2029/g, '\\u2029');
}

function controlHtml(c: ControlSpec, i: number): string {
  const unit = c.unit ? ` <span class="unit">[${escapeHtml(c.unit)}]</span>` : '';
  const sliderMin = c.scale === 'log' ? Math.log10(c.min) : c.min;
  const sliderMax = c.scale === 'log' ? Math.log10(c.max) : c.max;
  const sliderValue = c.scale === 'log' ? Math.log10(c.value) : c.value;
  const note = `${sig(c.min, 4)} to ${sig(c.max, 4)}${c.range === 'model_uncertainty' ? ' (3 sigma of the model uncertainty)' : ''}; the file gives ${sig(c.value, 6)}`;
  return `<div class="control">
<label for="control-${i}">${escapeHtml(c.label)}${unit} <code>${escapeHtml(c.key)}</code></label>
<input type="range" id="slider-${i}" data-slider-for="${escapeHtml(c.key)}" aria-label="${escapeHtml(c.label)} slider${c.scale === 'log' ? ' (log10 scale)' : ''}" min="${sliderMin}" max="${sliderMax}" step="${(sliderMax - sliderMin) / 1000}" value="${sliderValue}" aria-valuetext="${escapeHtml(sliderValueText(c, c.value))}">
<input type="number" id="control-${i}" data-key="${escapeHtml(c.key)}" min="${c.min}" max="${c.max}" step="${c.step}" value="${Number(c.value.toPrecision(12))}" aria-describedby="note-${i}">
<div class="range-note" id="note-${i}">${escapeHtml(note)}</div>
</div>`;
}

export function explorePageHtml(p: ExplorePageInput): string {
  if (p.script.includes('</script')) throw new Error('the page script holds "</script": it cannot be inlined');
  const csp = `default-src 'none'; script-src ${hash(p.script)}; style-src ${hash(STYLE)}; img-src data:; base-uri 'none'; form-action 'none'`;
  const r = p.result;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${csp}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(p.title)}: explore</title>
<style>${STYLE}</style>
</head>
<body data-updates="0">
<header><h1>${escapeHtml(p.title)}</h1><p>Move a control (or type a number in the unit shown) and every number below follows, computed in this page as <code>skytally predict</code> and <code>skytally forecast</code> compute them on the survey file the button writes. A forecast is only as good as the luminosity function assumed.</p></header>
<div class="layout">
<section aria-labelledby="controls-h"><h2 id="controls-h">Settings</h2>
<form id="controls" novalidate>
${p.controls.map(controlHtml).join('\n')}
</form>
<p><button type="button" id="write-survey">Write the survey file</button> <a id="download" hidden download="${escapeHtml(p.fileName.replace(/\.ya?ml$/i, ''))}-explored.yaml">download</a></p>
<p id="status" role="status" aria-live="polite"></p>
<details id="survey-panel"><summary>The survey file with these settings</summary><pre id="survey-yaml" tabindex="0">${escapeHtml(r.text)}</pre></details>
</section>
<section aria-labelledby="outputs-h"><h2 id="outputs-h">Results</h2>
<div id="outputs" aria-live="polite" aria-atomic="true">${outputsHtml(r)}</div>
<div id="warnings">${warningsHtml(r)}</div>
<div id="assumed" class="note" data-part="assumed-model">${assumedHtml(r)}</div>
<h2>Slices</h2><div id="slices">${slicesHtml(r)}</div>
<h2>Forecast</h2><div id="fisher">${fisherHtml(r)}</div>
<h2>Figures</h2><div id="figures">${figuresHtml(r)}</div>
</section>
</div>
<script type="application/json" id="explore-data">${scriptJson(p.data)}</script>
<script>${p.script}</script>
</body>
</html>
`;
}
