/**
 * `report` and `--figures` through the command path (run(argv, io)). The figures must draw the
 * numbers of predict's JSON output: read back from the SVG vega wrote (the aria labels vega gives
 * every mark, 12 significant digits) for every sample, and from the SVG embedded in the report.
 * Expected values are predict's own JSON (its numbers are checked against references in
 * test/counts); here we check that drawing neither loses nor changes them. Tolerance: relative
 * 1e-10 (the labels keep 12 significant digits).
 */
import { describe, expect, test } from 'vitest';
import { existsSync, readFileSync, readdirSync, writeFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from './helpers.js';
import { tempDir } from '../support/temp.js';

const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml'));
const tmp = () => tempDir('skytally-report-');
const num = (s: string) => Number(s.replace(/\u2212/g, '-').replace(/,/g, ''));
const close = (a: number, b: number) => Math.abs(a - b) <= 1e-10 * Math.max(Math.abs(a), Math.abs(b), 1e-300);

/** "key: value; key: value" of each mark with the given role description, in document order. */
function marks(svg: string, role: string): Record<string, string>[] {
  const re = new RegExp(`aria-label="([^"]*)" role="graphics-symbol" aria-roledescription="${role}"`, 'g');
  return [...svg.matchAll(re)].map((m) =>
    Object.fromEntries(
      m[1]!.split('; ').map((kv) => {
        const i = kv.lastIndexOf(': ');
        return [kv.slice(0, i), kv.slice(i + 2)];
      }),
    ),
  );
}

/** The <svg> of one figure inside the report. */
function figureInHtml(html: string, name: string): string {
  const start = html.indexOf(`<figure id="figure-${name}"`);
  expect(start, name).toBeGreaterThanOrEqual(0);
  const svg0 = html.indexOf('<svg', start);
  return html.slice(svg0, html.indexOf('</svg>', svg0) + 6);
}

interface Slice {
  z_min: number;
  z_max: number;
  count: number;
  limit_at_center: number;
  histogram: { edges: number[]; counts: number[] };
  uncertainty?: { total_fraction: number };
}

describe.each(SAMPLES)('%s: figures draw the numbers of predict --format json', (sample) => {
  const dir = tmp();
  const figDir = join(dir, 'figures');
  const out = join(dir, 'report.html');
  let p: { title: string; slices: Slice[]; populations: { slices: Slice[] }[] };
  let html = '';

  test('report --out and --figures succeed; predict JSON read', async () => {
    const r = await runCli(['report', `samples/${sample}`, '--out', out, '--figures', figDir]);
    expect(r.stderr.replace(/^skytally: PNG not written.*\n/m, '')).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    html = readFileSync(out, 'utf8');
    const j = await runCli(['predict', `samples/${sample}`, '--format', 'json']);
    expect(j.code).toBe(0);
    p = JSON.parse(j.stdout);
  });

  test('counts: each bar is a slice (z_min, z_max, count); error bars are count (1 -/+ total_fraction)', () => {
    for (const svg of [readFileSync(join(figDir, 'counts.svg'), 'utf8'), figureInHtml(html, 'counts')]) {
      const bars = marks(svg, 'bar');
      expect(bars).toHaveLength(p.slices.length);
      p.slices.forEach((s, i) => {
        expect(close(num(bars[i]!.z_min!), s.z_min)).toBe(true);
        expect(close(num(bars[i]!.z_max!), s.z_max)).toBe(true);
        expect(close(num(bars[i]!['expected count per slice']!), s.count), `slice ${i + 1} count`).toBe(true);
      });
      const errs = marks(svg, 'errorbar');
      const withU = p.slices.filter((s) => s.uncertainty);
      expect(errs).toHaveLength(withU.length);
      withU.forEach((s, i) => {
        expect(close(num(errs[i]!.low!), Math.max(0, s.count * (1 - s.uncertainty!.total_fraction)))).toBe(true);
        expect(close(num(errs[i]!.high!), s.count * (1 + s.uncertainty!.total_fraction))).toBe(true);
      });
    }
  });

  test('histograms: the bars, panel by panel, are every slice histogram bin (edges and counts)', () => {
    for (const svg of [readFileSync(join(figDir, 'histograms.svg'), 'utf8'), figureInHtml(html, 'histograms')]) {
      const bars = marks(svg, 'bar');
      const expected = p.slices.flatMap((s) => s.histogram.counts.map((c, k) => ({ lo: s.histogram.edges[k]!, hi: s.histogram.edges[k + 1]!, c })));
      expect(bars).toHaveLength(expected.length);
      bars.forEach((b, k) => {
        const xKey = Object.keys(b)[0]!; // the x axis title, e.g. "apparent AB magnitude [mag]"
        expect(close(num(b[xKey]!), expected[k]!.lo)).toBe(true);
        expect(close(num(b.hi!), expected[k]!.hi)).toBe(true);
        expect(close(num(b['count per bin']!), expected[k]!.c), `bin ${k}`).toBe(true);
      });
    }
  });

  test('luminosity function: one panel per slice; its dashed rule is the slice limit_at_center', () => {
    // With several populations there is one figure per population (luminosity-function-1.svg, ...);
    // the first is the first population over its own slices.
    const single = existsSync(join(figDir, 'luminosity-function.svg'));
    const svg = readFileSync(join(figDir, single ? 'luminosity-function.svg' : 'luminosity-function-1.svg'), 'utf8');
    const slices = single ? p.slices : p.populations[0]!.slices;
    expect(marks(svg, 'line mark').length).toBe(slices.length);
    // rules in order: per panel the limit then the knee
    const rules = marks(svg, 'rule mark').map((r) => num(r.x!));
    expect(rules).toHaveLength(2 * slices.length);
    slices.forEach((s, i) => expect(close(rules[2 * i]!, s.limit_at_center), `slice ${i + 1} limit`).toBe(true));
  });

  test('the report states the assumed model and its warning, and shows the file as written', () => {
    expect(html).toContain('A forecast is only as good as the luminosity function assumed');
    expect(html).toContain('<section class="assumption" id="model">');
    const text = readFileSync(`samples/${sample}`, 'utf8');
    const pre = /<pre class="survey">([\s\S]*?)<\/pre>/.exec(html)![1]!;
    const unescaped = pre.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');
    expect(unescaped).toBe(text);
    expect(html).not.toMatch(/NaN|Infinity/);
  });
});

describe('report: units follow the population', () => {
  test('a threshold sample in stellar mass labels its limit and L* with the quantity, never erg/s', async () => {
    const r = await runCli(['report', 'samples/mass-limited.yaml']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('log₁₀ stellar mass [Msun]');
    expect(r.stdout).toContain('log₁₀ characteristic stellar mass [Msun]');
    expect(r.stdout).not.toContain('erg');
  });
});

describe('report: user text is escaped, through the command', () => {
  test('a title holding HTML and script is written as text', async () => {
    const dir = tmp();
    const input = join(dir, 'hostile.yaml');
    const title = `<script>alert(1)</script> "><img src=x onerror=alert(2)> & </svg>`;
    const text = readFileSync('samples/halpha-narrowband.yaml', 'utf8').replace(/^title:.*$/m, `title: '${title}'`);
    writeFileSync(input, text);
    const r = await runCli(['report', input, '--out', join(dir, 'r.html')]);
    expect(r.code).toBe(0);
    const html = readFileSync(join(dir, 'r.html'), 'utf8');
    expect(html).not.toContain('<script');
    expect(html).not.toContain('<img');
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt; &quot;&gt;&lt;img src=x onerror=alert(2)&gt; &amp; &lt;/svg&gt;');
  });
});

describe('report and --figures: files and refusals', () => {
  test('without --out the HTML goes to stdout', async () => {
    const r = await runCli(['report', 'samples/halpha-narrowband.yaml']);
    expect(r.code).toBe(0);
    expect(r.stdout.startsWith('<!DOCTYPE html>')).toBe(true);
  });

  test('predict --figures writes one SVG per figure and prints the same output as without', async () => {
    const dir = join(tmp(), 'new', 'figs');
    const r = await runCli(['predict', 'samples/mass-limited.yaml', '--format', 'json', '--figures', dir]);
    expect(r.code).toBe(0);
    const plain = await runCli(['predict', 'samples/mass-limited.yaml', '--format', 'json']);
    expect(r.stdout).toBe(plain.stdout);
    for (const name of ['counts', 'histograms', 'luminosity-function']) {
      const svg = readFileSync(join(dir, `${name}.svg`), 'utf8');
      expect(svg.startsWith('<svg')).toBe(true);
      expect(svg.endsWith('</svg>')).toBe(true);
    }
    // PNG beside each SVG when the rasteriser loads (it is a dependency; it loads here)
    expect(existsSync(join(dir, 'counts.png'))).toBe(true);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp') || f.includes('.tmp-'))).toEqual([]);
  });

  test.each([
    ['predict', []],
    ['report', ['--out', 'OUT']],
  ])('%s --figures naming an existing regular file: exit 2, one sentence, nothing written', async (command, extra) => {
    const dir = tmp();
    const file = join(dir, 'taken.txt');
    writeFileSync(file, 'keep me');
    const outPath = join(dir, 'r.html');
    const r = await runCli([command, 'samples/halpha-narrowband.yaml', '--figures', file, ...extra.map((a) => (a === 'OUT' ? outPath : a))]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr.trim()).toMatch(/--figures: .* is not a directory; .*\.$/);
    expect(readFileSync(file, 'utf8')).toBe('keep me');
    expect(existsSync(outPath)).toBe(false);
  });

  test('report --out naming the survey file: exit 2, the file untouched', async () => {
    const dir = tmp();
    const input = join(dir, 's.yaml');
    const text = readFileSync('samples/halpha-narrowband.yaml', 'utf8');
    writeFileSync(input, text);
    const before = statSync(input).mtimeMs;
    const r = await runCli(['report', input, '--out', input]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--out/);
    expect(readFileSync(input, 'utf8')).toBe(text);
    expect(statSync(input).mtimeMs).toBe(before);
  });

  test('bad survey: exit 2 and no report written', async () => {
    const dir = tmp();
    const input = join(dir, 'bad.yaml');
    writeFileSync(input, readFileSync('samples/halpha-narrowband.yaml', 'utf8').replace(/^area:.*$/m, 'area: -3'));
    const r = await runCli(['report', input, '--out', join(dir, 'r.html')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/area/);
    expect(existsSync(join(dir, 'r.html'))).toBe(false);
  });
});
