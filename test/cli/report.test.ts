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
import { hostileTitleReport, sampleReport } from '../support/sample-reports.js';
import { sampleCommand } from '../support/sample-commands.js';
import type { ValidateFunction } from 'ajv/dist/2020.js';
import { unescapeHtml } from '../support/html.js';

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
  /** The --figures folder of the sample's report (test/support/sample-reports.ts). */
  let figDir = '';
  let p: {
    title: string;
    breakdown: 'redshift' | 'observed';
    slices?: Slice[];
    populations: { name: string; slices: Slice[] }[];
    totals: { count: number };
    observed_bins: {
      bins: {
        min: number;
        max: number;
        count: number;
        populations: Record<string, { count: number; share: number }>;
      }[];
    };
  };
  let html = '';

  test('report --out and --figures succeed; predict JSON read', async () => {
    // `report samples/<sample> --out DIR/report.html --figures DIR/figures`, made once per run and
    // shared with the browser test (test/render/samples-browser.test.ts)
    const made = await sampleReport(sample);
    const r = made.result;
    expect(r.stderr.replace(/^skytally: PNG not written.*\n/m, '')).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    figDir = made.figures;
    html = readFileSync(made.html, 'utf8');
    const j = await sampleCommand(['predict', `samples/${sample}`, '--format', 'json']);
    expect(j.code).toBe(0);
    p = JSON.parse(j.stdout);
  });

  /** The counts figures: the top-level slices, or each population's own when their windows differ. */
  const countsFigures = (): [string, Slice[]][] =>
    p.breakdown === 'observed' ? p.populations.map((q, k) => [`counts-${k + 1}`, q.slices]) : [['counts', p.slices!]];

  test('counts: each bar is a slice (z_min, z_max, count); error bars are count (1 -/+ total_fraction)', () => {
    for (const [name, slices] of countsFigures())
      for (const svg of [readFileSync(join(figDir, `${name}.svg`), 'utf8'), figureInHtml(html, name)]) {
        const bars = marks(svg, 'bar');
        expect(bars).toHaveLength(slices.length);
        slices.forEach((s, i) => {
          expect(close(num(bars[i]!.z_min!), s.z_min)).toBe(true);
          expect(close(num(bars[i]!.z_max!), s.z_max)).toBe(true);
          expect(close(num(bars[i]!['expected count per slice']!), s.count), `slice ${i + 1} count`).toBe(true);
        });
        const errs = marks(svg, 'errorbar');
        const withU = slices.filter((s) => s.uncertainty);
        expect(errs).toHaveLength(withU.length);
        withU.forEach((s, i) => {
          expect(close(num(errs[i]!.low!), Math.max(0, s.count * (1 - s.uncertainty!.total_fraction)))).toBe(true);
          expect(close(num(errs[i]!.high!), s.count * (1 + s.uncertainty!.total_fraction))).toBe(true);
        });
      }
  });

  test('histograms: the bars, panel by panel, are the slice histogram bins (edges and counts) but the negligible ends', () => {
    // The figure leaves out, at either end, the bins holding together at most 1e-3 of the slice's
    // count (the stated rule, re-applied here to predict's JSON); everything between is drawn.
    const kept = (counts: number[]) => {
      const total = counts.reduce((a, c) => a + c, 0);
      let lo = 0;
      let tail = 0;
      while (lo < counts.length - 1 && tail + counts[lo]! <= 1e-3 * total) tail += counts[lo++]!;
      let hi = counts.length - 1;
      tail = 0;
      while (hi > lo && tail + counts[hi]! <= 1e-3 * total) tail += counts[hi--]!;
      return [lo, hi] as const;
    };
    if (p.breakdown === 'observed') {
      // no top-level redshift slices: the shares figure shows the observed values instead
      expect(existsSync(join(figDir, 'histograms.svg'))).toBe(false);
      return;
    }
    const expected = p.slices!.flatMap((s) => {
      const [lo, hi] = kept(s.histogram.counts);
      const left = s.histogram.counts.filter((_, k) => k < lo || k > hi).reduce((a, c) => a + c, 0);
      expect(left).toBeLessThanOrEqual(2e-3 * s.count);
      return s.histogram.counts
        .slice(lo, hi + 1)
        .map((c, k) => ({ lo: s.histogram.edges[lo + k]!, hi: s.histogram.edges[lo + k + 1]!, c }));
    });
    const width = Number((p.slices![0]!.histogram.edges[1]! - p.slices![0]!.histogram.edges[0]!).toPrecision(6));
    const yTitle = new RegExp(`^count per ${width} (mag|dex) bin$`);
    for (const svg of [readFileSync(join(figDir, 'histograms.svg'), 'utf8'), figureInHtml(html, 'histograms')]) {
      const bars = marks(svg, 'bar');
      expect(bars).toHaveLength(expected.length);
      // every bar checked, those that differ collected for one expect (an expect per number costs
      // more than the comparison)
      const differ: string[] = [];
      bars.forEach((b, k) => {
        const xKey = Object.keys(b)[0]!; // the x axis title, e.g. "apparent AB magnitude [mag]"
        if (!close(num(b[xKey]!), expected[k]!.lo)) differ.push(`bin ${k}: ${xKey} ${b[xKey]}`);
        if (!close(num(b.hi!), expected[k]!.hi)) differ.push(`bin ${k}: hi ${b.hi}`);
        // the count axis names the bin width: "count per 0.25 mag bin"
        const yKey = Object.keys(b).find((key) => key.startsWith('count per '));
        if (yKey === undefined || !yTitle.test(yKey)) differ.push(`bin ${k}: count axis ${yKey}`);
        else if (!close(num(b[yKey]!), expected[k]!.c)) differ.push(`bin ${k}: count ${b[yKey]}`);
      });
      expect(differ).toEqual([]);
    }
  });

  test('luminosity function: one panel per slice; its dashed rule is the slice limit_at_center', () => {
    // With several populations there is one figure per population (luminosity-function-1.svg, ...);
    // the first is the first population over its own slices.
    const single = existsSync(join(figDir, 'luminosity-function.svg'));
    const svg = readFileSync(join(figDir, single ? 'luminosity-function.svg' : 'luminosity-function-1.svg'), 'utf8');
    const slices = single ? p.slices! : p.populations[0]!.slices;
    expect(marks(svg, 'line mark').length).toBe(slices.length);
    // rules in order: per panel the limit then the knee
    const rules = marks(svg, 'rule mark').map((r) => num(r.x!));
    expect(rules).toHaveLength(2 * slices.length);
    slices.forEach((s, i) => expect(close(rules[2 * i]!, s.limit_at_center), `slice ${i + 1} limit`).toBe(true));
  });

  test('shares (several populations): stacked bars and share points are observed_bins, bin by bin', () => {
    if (p.populations.length < 2) {
      expect(existsSync(join(figDir, 'shares.svg'))).toBe(false);
      return;
    }
    // the figure leaves out the bins at either end holding under 1e-4 of all detections
    const kept = p.observed_bins.bins.filter((b, i, all) => {
      const floor = 1e-4 * all.reduce((a, x) => a + x.count, 0);
      return all.slice(0, i + 1).some((x) => x.count >= floor) && all.slice(i).some((x) => x.count >= floor);
    });
    const names = p.populations.map((q) => q.name);
    for (const svg of [readFileSync(join(figDir, 'shares.svg'), 'utf8'), figureInHtml(html, 'shares')]) {
      const bars = marks(svg, 'bar');
      const points = marks(svg, 'point');
      expect(bars).toHaveLength(kept.length * names.length);
      expect(points).toHaveLength(kept.length * names.length);
      // marks found by population and bin (vega may draw them in another order)
      const at = (list: Record<string, string>[], n: string, key: string, x: number) => {
        const found = list.filter((m) => m.population === n && close(num(m[key]!), x));
        expect(found, `${n} at ${x}`).toHaveLength(1);
        return found[0]!;
      };
      for (const b of kept) {
        let below = 0;
        for (const n of names) {
          const bar = at(bars, n, 'min', b.min);
          expect(close(num(bar.below!), below)).toBe(true);
          expect(
            close(num(bar['expected detections per bin']!), below + b.populations[n]!.count),
            `bin ${b.min} ${n}`,
          ).toBe(true);
          below += b.populations[n]!.count;
          at(points, n, 'bin middle', 0.5 * (b.min + b.max));
        }
      }
    }
  });

  test('the report states the assumed model and its warning, and shows the file as written', () => {
    expect(html).toContain('A forecast is only as good as the luminosity function assumed');
    expect(html).toContain('<section class="assumption" id="model">');
    const text = readFileSync(`samples/${sample}`, 'utf8');
    const pre = /<pre class="survey">([\s\S]*?)<\/pre>/.exec(html)![1]!;
    const unescaped = pre
      .replace(/&lt;/g, '<')
      .replace(/&gt;/g, '>')
      .replace(/&quot;/g, '"')
      .replace(/&#39;/g, "'")
      .replace(/&amp;/g, '&');
    expect(unescaped).toBe(text);
    expect(html).not.toMatch(/NaN|Infinity/);
  });

  test("the summary states the detection as predict's survey line does (failed before: the limit appeared only in the file as written)", async () => {
    const t = await sampleCommand(['predict', `samples/${sample}`]);
    expect(t.code).toBe(0);
    const line = t.stdout.split('\n').find((l) => l.startsWith('Survey: '))!;
    // the survey line after its area and window: the detection, with its limit
    const detection = line
      .slice(line.search(/ to [^,]+(?: \(each population over its own window\))?, /))
      .replace(/^ to [^,]+(?: \(each population over its own window\))?, /, '');
    expect(detection).toMatch(/limit|threshold/);
    const summary = /<p class="summary">(.*?)<\/p>/
      .exec(html)![1]!
      .replace(/&quot;/g, '"')
      .replace(/&amp;/g, '&');
    expect(summary).toContain(`; ${detection};`);
  });

  test('the model table is in words: no value as raw JSON or [object Object], no label that only repeats its key (failed before: valid_redshift {"min":0.7,"max":2}, "values used values_used")', () => {
    const section = /<section class="assumption" id="model">([\s\S]*?)<\/section>/.exec(html)![1]!;
    const text = unescapeHtml(section);
    expect(text).not.toContain('{"');
    expect(text).not.toContain('":');
    expect(text).not.toContain('[object');
    expect(text).not.toMatch(/NaN|Infinity|undefined/);
    const heads = [...section.matchAll(/<th scope="row">(.*?)<\/th>/g)].map((m) => m[1]!);
    expect(heads.length).toBeGreaterThan(0);
    const repeated = heads.filter((h) => {
      const key = /<span class="key">([^<]*)<\/span>/.exec(h)?.[1];
      const label = unescapeHtml(h.replace(/<span class="key">[^<]*<\/span>/, '')).trim();
      // a label that is the key with spaces for underscores says nothing more than the key
      return key !== undefined && label.toLowerCase() === unescapeHtml(key).replace(/_/g, ' ').toLowerCase();
    });
    expect(repeated).toEqual([]);
    // each row has a label in words, and the keys of the file beside them (values used is not a key)
    const bare = heads.filter((h) => h.startsWith('<span class="key">'));
    expect(bare).toEqual([]);
    if (sample === 'slitless-halpha.yaml') {
      // samples/slitless-halpha.yaml as written: equivalent_widths {model: lognormal, median: 55 Angstrom,
      // sigma_dex: 0.35}, valid_redshift {min: 0.7, max: 2}, attenuation {table: [[0.9, 1.0], [1.8, 0.9]]}
      expect(text).toContain('equivalent_widths</span></th><td>log-normal, median 55 Angstrom, 0.35 dex</td>');
      expect(text).toContain('valid_redshift</span></th><td>0.7 to 2</td>');
      expect(text).toContain('<td>table in z, interpolated linearly: z = 0.9: 1; z = 1.8: 0.9</td>');
      expect(text).toContain('<th scope="row">values used</th>');
    }
  });

  test('"Schechter" is capitalised and plan goals are in words (failed before: "schechter function", "sigma_alpha")', () => {
    // outside the survey file as written (which may say shape: schechter), every Schechter is capitalised
    const shown = html.replace(/<pre class="survey">[\s\S]*?<\/pre>/, '');
    expect(shown).not.toMatch(/\bschechter function|double_schechter function/);
    expect(shown).toMatch(/Schechter function/);
    if (html.includes('id="plan-table"')) {
      expect(shown).toMatch(/Goal: sigma of /);
      expect(shown).not.toMatch(/sigma_(alpha|log10)/);
    }
  });
});

describe('report: units follow the population', () => {
  test('a threshold sample in stellar mass labels its limit and L* with the quantity, never erg/s', async () => {
    // `report samples/mass-limited.yaml --out ...`, made once per run (test/support/sample-reports.ts)
    const made = await sampleReport('mass-limited.yaml');
    expect(made.result.code).toBe(0);
    const html = readFileSync(made.html, 'utf8');
    expect(html).toContain('log₁₀ stellar mass [Msun]');
    expect(html).toContain('log₁₀ characteristic stellar mass [Msun]');
    expect(html).not.toContain('erg');
  });
});

describe('report: user text is escaped, through the command', () => {
  test('a title holding HTML and script is written as text', async () => {
    // `report FILE --out DIR/report.html` on the sample with HOSTILE_TITLE, made once per run and
    // shared with the browser test, which opens it (test/support/sample-reports.ts)
    const made = await hostileTitleReport();
    expect(made.result.code).toBe(0);
    const html = readFileSync(made.html, 'utf8');
    expect(html).not.toContain('<script');
    expect(html).not.toContain('<img');
    expect(html).toContain(
      'Field &lt;script&gt;window.__pwned = 1&lt;/script&gt; &quot;&gt;&lt;img src=x onerror=&quot;window.__pwned=2&quot;&gt; &amp; &lt;/svg&gt;&lt;script&gt;window.__pwned=3&lt;/script&gt;',
    );
  });
});

describe('report and --figures: files and refusals', () => {
  test('without --out the HTML goes to stdout: the document --out writes', async () => {
    const r = await runCli(['report', 'samples/halpha-narrowband.yaml']);
    expect(r.code).toBe(0);
    expect(r.stdout.startsWith('<!DOCTYPE html>')).toBe(true);
    // the same document as `report samples/halpha-narrowband.yaml --out FILE` (test/support/sample-reports.ts)
    expect(r.stdout).toBe(readFileSync((await sampleReport('halpha-narrowband.yaml')).html, 'utf8'));
  });

  test('predict --figures writes one SVG per figure and prints the same output as without', async () => {
    const dir = join(tmp(), 'new', 'figs');
    const r = await runCli(['predict', 'samples/mass-limited.yaml', '--format', 'json', '--figures', dir]);
    expect(r.code).toBe(0);
    const plain = await sampleCommand(['predict', 'samples/mass-limited.yaml', '--format', 'json']);
    expect(r.stdout).toBe(plain.stdout);
    for (const name of ['counts', 'histograms', 'luminosity-function']) {
      const svg = readFileSync(join(dir, `${name}.svg`), 'utf8');
      expect(svg.startsWith('<svg')).toBe(true);
      expect(svg.endsWith('</svg>')).toBe(true);
    }
    // PNG beside each SVG when the rasteriser loads (it is a dependency; it loads here)
    expect(existsSync(join(dir, 'counts.png'))).toBe(true);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp') || f.includes('.tmp-'))).toEqual([]);
    // --no-png: the same SVG files, byte for byte, and no PNG
    const svgOnly = join(tmp(), 'svg-only');
    const s = await runCli([
      'predict',
      'samples/mass-limited.yaml',
      '--format',
      'json',
      '--figures',
      svgOnly,
      '--no-png',
    ]);
    expect(s.code).toBe(0);
    expect(s.stdout).toBe(plain.stdout);
    const svgs = readdirSync(dir).filter((f) => f.endsWith('.svg'));
    expect(readdirSync(svgOnly).sort()).toEqual(svgs.sort());
    // (vega numbers its clip paths by a counter across one process: clip1 in one run is clip2 in the next)
    const same = (svg: string) => svg.replace(/clip\d+/g, 'clip');
    for (const f of svgs)
      expect(same(readFileSync(join(svgOnly, f), 'utf8'))).toBe(same(readFileSync(join(dir, f), 'utf8')));
  });

  test.each([
    ['predict', []],
    ['report', ['--out', 'OUT']],
  ])('%s --figures naming an existing regular file: exit 2, one sentence, nothing written', async (command, extra) => {
    const dir = tmp();
    const file = join(dir, 'taken.txt');
    writeFileSync(file, 'keep me');
    const outPath = join(dir, 'r.html');
    const r = await runCli([
      command,
      'samples/halpha-narrowband.yaml',
      '--figures',
      file,
      ...extra.map((a) => (a === 'OUT' ? outPath : a)),
    ]);
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

describe('report --format json: the results of every section in one document (specs/report.schema.json)', () => {
  // Compiled once for the tests below (the schemas in specs/ do not change during a run).
  let compiled: Promise<ValidateFunction> | undefined;
  const ajvAll = () =>
    (compiled ??= (async () => {
      const { Ajv2020 } = await import('ajv/dist/2020.js');
      const ajv = new Ajv2020({ allErrors: true, strict: false });
      for (const f of readdirSync('specs'))
        if (f.endsWith('.schema.json')) ajv.addSchema(JSON.parse(readFileSync(`specs/${f}`, 'utf8')), f);
      return ajv.getSchema('report.schema.json')!;
    })());

  test('valid against the schema; prediction and forecast equal to what predict and forecast print (failed before: report refused --format)', async () => {
    const validate = await ajvAll();
    const dir = tmp();
    const r = await runCli([
      'report',
      'samples/halpha-narrowband.yaml',
      '--format',
      'json',
      '--mocks',
      '4',
      '--figures',
      dir,
      // SVG only: PNG beside each SVG is checked by the predict --figures test above
      '--no-png',
    ]);
    expect(r.code, r.stderr).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.survey_file).toBe('halpha-narrowband.yaml');
    expect(doc.plan).toBeUndefined();
    const p = JSON.parse(
      (await sampleCommand(['predict', 'samples/halpha-narrowband.yaml', '--format', 'json'])).stdout,
    );
    expect(doc.prediction).toEqual(p);
    const f = JSON.parse(
      (await runCli(['forecast', 'samples/halpha-narrowband.yaml', '--format', 'json', '--mocks', '4'])).stdout,
    );
    expect(doc.forecast).toEqual(f);
    expect(doc.warnings).toEqual([]);
    // --figures still draws every figure
    expect(existsSync(join(dir, 'counts.svg'))).toBe(true);
    expect(existsSync(join(dir, 'forecast.svg'))).toBe(true);
  });

  test('a section that cannot be made is {omitted: sentence}', async () => {
    const validate = await ajvAll();
    const r = await runCli(['report', 'samples/double-schechter-mass.yaml', '--format', 'json']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.forecast.omitted).toMatch(/^No forecast: .*double Schechter/);
  });

  test('csv is refused: exit 2, nothing on stdout', async () => {
    const r = await runCli(['report', 'samples/halpha-narrowband.yaml', '--format', 'csv']);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/--format/);
  });
});
