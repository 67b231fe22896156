/**
 * The explore page's figures as SVG text, drawn by hand so that a redraw costs well under a
 * millisecond (vega, which draws the report's figures, takes tens of milliseconds per figure):
 * the counts per slice with their 1-sigma uncertainty, and the luminosity function at each
 * slice's middle redshift with the limit there marked. Colours and lines are SVG attributes
 * (no style attributes: the page's Content-Security-Policy allows only its own style sheet).
 */
import type { CountsFigureData, LfFigureData } from '../../model/explore.js';
import { sig } from '../format.js';

const W = 460;
const H = 260;
const M = { left: 64, right: 14, top: 26, bottom: 40 };
const COLOURS = [
  '#1f77b4',
  '#d62728',
  '#2ca02c',
  '#9467bd',
  '#ff7f0e',
  '#8c564b',
  '#e377c2',
  '#7f7f7f',
  '#bcbd22',
  '#17becf',
];

export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** Round "nice" ticks covering [lo, hi]. */
function ticks(lo: number, hi: number, n = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / n;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((f) => f * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + 1e-9 * step; t += step) out.push(Number(t.toPrecision(12)));
  return out;
}

const f1 = (x: number) => x.toFixed(1);

function frame(
  title: string,
  xLabel: string,
  yLabel: string,
  xs: number[],
  ys: number[],
  x: (v: number) => number,
  y: (v: number) => number,
  body: string,
): string {
  const axes = [
    `<line x1="${M.left}" y1="${H - M.bottom}" x2="${W - M.right}" y2="${H - M.bottom}" stroke="#333"/>`,
    `<line x1="${M.left}" y1="${M.top}" x2="${M.left}" y2="${H - M.bottom}" stroke="#333"/>`,
    ...xs.map(
      (t) => `<text x="${f1(x(t))}" y="${H - M.bottom + 14}" text-anchor="middle" font-size="10">${sig(t, 3)}</text>`,
    ),
    ...ys.map(
      (t) => `<text x="${M.left - 4}" y="${f1(y(t) + 3)}" text-anchor="end" font-size="10">${sig(t, 3)}</text>`,
    ),
    `<text x="${(M.left + W - M.right) / 2}" y="${H - 6}" text-anchor="middle" font-size="11">${escapeHtml(xLabel)}</text>`,
    `<text transform="translate(12 ${(M.top + H - M.bottom) / 2}) rotate(-90)" text-anchor="middle" font-size="11">${escapeHtml(yLabel)}</text>`,
    `<text x="${M.left}" y="16" font-size="12" font-weight="bold">${escapeHtml(title)}</text>`,
  ];
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeHtml(title)}">${axes.join('')}${body}</svg>`;
}

/** Bars of the expected count per slice with 1-sigma error bars (Poisson and cosmic variance). */
export function countsSvg(f: CountsFigureData): string {
  const zLo = Math.min(...f.slices.map((s) => s.zMin));
  const zHi = Math.max(...f.slices.map((s) => s.zMax));
  const top = Math.max(1e-300, ...f.slices.map((s) => s.count * (1 + s.fraction))) * 1.05;
  const x = (z: number) => M.left + ((z - zLo) / (zHi - zLo || 1)) * (W - M.left - M.right);
  const y = (n: number) => H - M.bottom - (n / top) * (H - M.top - M.bottom);
  const body = f.slices
    .map((s) => {
      const x0 = x(s.zMin);
      const x1 = x(s.zMax);
      const mid = 0.5 * (x0 + x1);
      const bar = `<rect x="${f1(x0 + 1)}" y="${f1(y(s.count))}" width="${f1(Math.max(0.5, x1 - x0 - 2))}" height="${f1(y(0) - y(s.count))}" fill="#7aa6d6"><title>z ${sig(s.zMin, 4)} to ${sig(s.zMax, 4)}: ${sig(s.count, 4)}</title></rect>`;
      const err =
        s.fraction > 0
          ? `<line x1="${f1(mid)}" x2="${f1(mid)}" y1="${f1(y(s.count * (1 - s.fraction)))}" y2="${f1(y(s.count * (1 + s.fraction)))}" stroke="#222"/>`
          : '';
      return bar + err;
    })
    .join('');
  return frame(f.title, 'redshift z', 'expected count', ticks(zLo, zHi), ticks(0, top), x, y, body);
}

/** The luminosity function at each slice's middle redshift (log scale), the limit as a dashed line. */
export function lfSvg(f: LfFigureData): string {
  const pts = f.curves.flatMap((c) => c.x.map((x, i) => [x, c.phi[i]!] as const)).filter(([, p]) => p > 0);
  const xLo = Math.min(...pts.map((p) => p[0]));
  const xHi = Math.max(...pts.map((p) => p[0]));
  const yHi = Math.ceil(Math.log10(Math.max(...pts.map((p) => p[1]))));
  const yLo = Math.max(yHi - 8, Math.floor(Math.log10(Math.min(...pts.map((p) => p[1])))));
  // Magnitudes: bright (small M) on the right, as the luminosity axis runs.
  const x = (v: number) => M.left + ((f.magnitude ? xHi - v : v - xLo) / (xHi - xLo || 1)) * (W - M.left - M.right);
  const y = (v: number) => H - M.bottom - ((v - yLo) / (yHi - yLo || 1)) * (H - M.top - M.bottom);
  const body = f.curves
    .map((c, k) => {
      const colour = COLOURS[k % COLOURS.length]!;
      const d = c.x
        .map((xv, i) => [xv, c.phi[i]!] as const)
        .filter(([, p]) => p > 0 && Math.log10(p) >= yLo)
        .map(([xv, p], i) => `${i === 0 ? 'M' : 'L'}${f1(x(xv))} ${f1(y(Math.log10(p)))}`)
        .join('');
      const lim =
        c.limit !== null && c.limit >= Math.min(xLo, xHi) && c.limit <= Math.max(xLo, xHi)
          ? `<line x1="${f1(x(c.limit))}" x2="${f1(x(c.limit))}" y1="${M.top}" y2="${H - M.bottom}" stroke="${colour}" stroke-dasharray="4 3"/>`
          : '';
      return `<path d="${d}" fill="none" stroke="${colour}" stroke-width="1.5"><title>z = ${sig(c.z, 4)}</title></path>${lim}`;
    })
    .join('');
  const yLabel = f.magnitude ? 'log10 phi [Mpc^-3 mag^-1]' : 'log10 phi [Mpc^-3 dex^-1]';
  return frame(f.title, f.xLabel, yLabel, ticks(Math.min(xLo, xHi), Math.max(xLo, xHi)), ticks(yLo, yHi), x, y, body);
}
