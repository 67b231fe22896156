/**
 * The forecast and plan in the report, and `--figures` on `forecast` and `plan`, through the
 * command path (run(argv, io)). Expected values are the JSON the `forecast` and `plan` commands
 * print (their numbers are checked against references in test/forecast and test/planning); here
 * we check that the figures draw exactly those numbers, read back from the SVG vega wrote: the
 * aria label vega gives every mark (12 significant digits, so relative 1e-10), and for the
 * ellipses the drawn path in pixels mapped back through the axis domain.
 */
import { describe, expect, test } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { runCli } from './helpers.js';
import { tempDir } from '../support/temp.js';
import { sampleReport } from '../support/sample-reports.js';
import { sampleCommand } from '../support/sample-commands.js';
import type { Json } from '../support/json.js';

type Any = Json;

const tmp = () => tempDir('skytally-report-fp-');
const num = (s: string) => Number(s.replace(/\u2212/g, '-').replace(/,/g, ''));
const close = (a: number, b: number, rel = 1e-10) =>
  Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b), 1e-300);
const PLAN_SAMPLES = ['plan-uv-deep-wide.yaml', 'plan-halpha-layers.yaml'];

/**
 * Delta chi2 of the 1-sigma joint region of two parameters, from scipy 1.10.1
 * (test/reference/chi2-2dof.json, generator test/reference/generate/chi2_2dof.py).
 */
const DCHI2_1SIGMA = (
  JSON.parse(readFileSync('test/reference/chi2-2dof.json', 'utf8')) as {
    rows: { k_sigma: number; delta_chi2: number }[];
  }
).rows.find((r) => r.k_sigma === 1)!.delta_chi2;

interface Mark {
  role: string;
  label: Record<string, string>;
  /** translate(x, y) of the mark, when it has one (points). */
  at?: [number, number];
  /** the path, when it is drawn in place (lines). */
  d?: string;
}

/** Every mark vega labelled, in document order. */
function allMarks(svg: string): Mark[] {
  const re = /<path aria-label="([^"]*)" role="graphics-symbol" aria-roledescription="([^"]*)"([^>]*)>/g;
  return [...svg.matchAll(re)].map((m) => {
    const label = Object.fromEntries(
      m[1]!.split('; ').map((kv) => {
        const i = kv.lastIndexOf(': ');
        return [kv.slice(0, i), kv.slice(i + 2)];
      }),
    );
    const t = /transform="translate\(([-\d.e]+),([-\d.e]+)\)"/.exec(m[3]!);
    const d = /\bd="([^"]*)"/.exec(m[3]!);
    const out: Mark = { role: m[2]!, label };
    if (t) out.at = [Number(t[1]), Number(t[2])];
    if (d) out.d = d[1]!;
    return out;
  });
}

/** The <svg> of one figure inside the report. */
function figureInHtml(html: string, name: string): string {
  const start = html.indexOf(`<figure id="figure-${name}"`);
  expect(start, name).toBeGreaterThanOrEqual(0);
  const svg0 = html.indexOf('<svg', start);
  return html.slice(svg0, html.indexOf('</svg>', svg0) + 6);
}

/** The forecast figure read back: mock dots (before the ellipses), the cross (after), the 1-sigma path. */
function readForecastFigure(svg: string) {
  const ms = allMarks(svg);
  const firstLine = ms.findIndex((m) => m.role === 'line mark');
  expect(firstLine).toBeGreaterThanOrEqual(0);
  const dots = ms.slice(0, firstLine).filter((m) => m.role === 'point');
  const after = ms.slice(firstLine).filter((m) => m.role === 'point');
  expect(after).toHaveLength(1);
  const oneSigma = ms.find((m) => m.role === 'line mark' && m.label.region === '1σ (68.3%)');
  expect(oneSigma).toBeDefined();
  return { dots, cross: after[0]!, oneSigma: oneSigma! };
}

/** Axis domain [from, to] of the X or Y axis (vega's aria label: "values from A to B"). */
function axisDomain(svg: string, axis: 'X' | 'Y'): [number, number] {
  const m = new RegExp(
    `aria-label="${axis}-axis titled '[^']*' for a linear scale with values from ([-\\d.,e\\u2212]+) to ([-\\d.,e\\u2212]+)"`,
  ).exec(svg);
  expect(m, `${axis} axis`).not.toBeNull();
  return [num(m![1]!), num(m![2]!)];
}

/** The plot area's size in pixels (the frame vega draws around a single view). */
function viewSize(svg: string): [number, number] {
  const m = /class="background" aria-hidden="true" d="M0\.5,0\.5h([\d.]+)v([\d.]+)h/.exec(svg);
  expect(m).not.toBeNull();
  return [Number(m![1]), Number(m![2])];
}

function pathPoints(d: string): [number, number][] {
  return [...d.matchAll(/[ML]([-\d.e]+),([-\d.e]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
}

describe('forecast --figures: the Fisher ellipses drawn from the JSON forecast prints', () => {
  test.each(['halpha-narrowband.yaml', 'deep-continuum.yaml'])('%s', async (sample) => {
    const dir = join(tmp(), 'figs');
    const r = await runCli(['forecast', `samples/${sample}`, '--format', 'json', '--figures', dir, '--no-png']);
    expect(r.stderr.replace(/^skytally: PNG not written.*\n/m, '')).toBe('');
    expect(r.code).toBe(0);
    // drawing changes nothing printed: the same JSON as without --figures, and no mock fits listed
    // (the plain run is shared with the other files that compare with it: test/support/sample-commands.ts)
    const plain = await sampleCommand(['forecast', `samples/${sample}`, '--format', 'json']);
    expect(plain.code).toBe(0);
    expect(r.stdout).toBe(plain.stdout);
    const f = JSON.parse(r.stdout) as Any;
    const y = f.parameters.includes('m_star') ? 'm_star' : 'log10_l_star';
    const svg = readFileSync(join(dir, 'forecast.svg'), 'utf8');
    expect(existsSync(join(dir, 'forecast.png'))).toBe(false); // --no-png
    const { dots, cross, oneSigma } = readForecastFigure(svg);
    expect(dots).toHaveLength(0); // no --mocks, no dots

    // the cross is the input values (aria label, 12 significant digits)
    expect(close(num(cross.label.x!), f.center.alpha)).toBe(true);
    expect(close(num(cross.label.y!), f.center[y])).toBe(true);

    // pixel <-> value through the axis domains; the cross sits where the domains put the centre
    const [W, H] = viewSize(svg);
    const [x0, x1] = axisDomain(svg, 'X');
    const [y0, y1] = axisDomain(svg, 'Y');
    const pxPerX = W / (x1 - x0);
    const pxPerY = H / (y1 - y0);
    expect(cross.at![0]).toBeCloseTo((f.center.alpha - x0) * pxPerX, 6);
    expect(cross.at![1]).toBeCloseTo((y1 - f.center[y]) * pxPerY, 6);

    // The Delta chi2 = 2.30 contour of a 2-d Gaussian spans exactly sqrt(2.30) marginal sigmas
    // on each side of the centre in each parameter (closed form: the projection of the ellipse
    // x^T C^-1 x = k onto an axis is +-sqrt(k C_ii)). Tolerance: relative 1e-3 (the path holds 120
    // points, so a sampled extreme falls short by at most 1 - cos(pi/120) = 3.4e-4; pixels are
    // written to 1e-3 px).
    const pts = pathPoints(oneSigma.d!);
    expect(pts.length).toBeGreaterThan(100);
    const xs = pts.map((p) => p[0]);
    const ys = pts.map((p) => p[1]);
    const halfX = (Math.max(...xs) - Math.min(...xs)) / 2 / pxPerX;
    const halfY = (Math.max(...ys) - Math.min(...ys)) / 2 / pxPerY;
    expect(close(halfX, Math.sqrt(DCHI2_1SIGMA) * f.fisher.sigma.alpha, 1e-3), `alpha: ${halfX}`).toBe(true);
    expect(close(halfY, Math.sqrt(DCHI2_1SIGMA) * f.fisher.sigma[y], 1e-3), `${y}: ${halfY}`).toBe(true);
    // and centred on the cross
    expect(Math.abs((Math.max(...xs) + Math.min(...xs)) / 2 - cross.at![0])).toBeLessThan(
      0.01 * (Math.max(...xs) - Math.min(...xs)),
    );
  });

  test('--list-mock-fits lists the converged mock fits (schema-valid); without it the JSON has none', async () => {
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(
      JSON.parse(readFileSync('specs/forecast.schema.json', 'utf8')),
    );
    const kept = await runCli([
      'forecast',
      'samples/halpha-narrowband.yaml',
      '--format',
      'json',
      '--mocks',
      '6',
      '--seed',
      '5',
      '--list-mock-fits',
    ]);
    expect(kept.code).toBe(0);
    const k = JSON.parse(kept.stdout) as Any;
    expect(validate(k), JSON.stringify(validate.errors)).toBe(true);
    expect(k.mocks.fits).toHaveLength(k.mocks.count - k.mocks.failed_fits);
    // the summary is made of those very fits: their mean is the reported mean
    k.parameters.forEach((n: string, j: number) => {
      const mean = k.mocks.fits.reduce((a: number, r: number[]) => a + r[j]!, 0) / k.mocks.fits.length;
      expect(close(mean, k.mocks.parameters[n].mean, 1e-12), n).toBe(true);
    });
    // the old name, read as the FITS file format, is gone (exit 2, commander's one-line message)
    expect((await runCli(['forecast', 'samples/halpha-narrowband.yaml', '--mocks', '6', '--keep-fits'])).code).toBe(2);
    const plain = await runCli([
      'forecast',
      'samples/halpha-narrowband.yaml',
      '--format',
      'json',
      '--mocks',
      '6',
      '--seed',
      '5',
    ]);
    const p = JSON.parse(plain.stdout) as Any;
    expect(p.mocks.fits).toBeUndefined();
    const { fits: _f, ...rest } = k.mocks;
    expect(p.mocks).toEqual(rest);
  });

  test('--figures naming an existing regular file: exit 2, one sentence, refused before the survey is even read', async () => {
    for (const [cmd, sample] of [
      ['forecast', 'halpha-narrowband.yaml'],
      ['plan', 'plan-uv-deep-wide.yaml'],
    ]) {
      const dir = tmp();
      const file = join(dir, 'taken.txt');
      writeFileSync(file, 'keep me');
      const out = join(dir, 'o.json');
      const r = await runCli([cmd!, `samples/${sample}`, '--figures', file, '--format', 'json', '--out', out]);
      expect(r.code).toBe(2);
      // with a survey file that does not exist, the directory is still what is refused: it is checked first
      const first = await runCli([cmd!, join(dir, 'missing.yaml'), '--figures', file]);
      expect(first.code).toBe(2);
      expect(first.stderr).toMatch(/--figures/);
      expect(r.stdout).toBe('');
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr.trim()).toMatch(/--figures: .* is not a directory; .*\.$/);
      expect(readFileSync(file, 'utf8')).toBe('keep me');
      expect(existsSync(out)).toBe(false);
    }
  });
});

describe('plan --figures: the best design marked where the JSON puts it', () => {
  test('plan-uv-deep-wide: plan.svg, its diamond at best.exposure_hours_per_pointing and best.goal_value', async () => {
    const dir = join(tmp(), 'figs');
    const r = await runCli([
      'plan',
      'samples/plan-uv-deep-wide.yaml',
      '--format',
      'json',
      '--figures',
      dir,
      '--no-png',
    ]);
    expect(r.code).toBe(0);
    // drawing changes nothing printed: the same JSON as without --figures (that run shared: test/support/sample-commands.ts)
    expect(r.stdout).toBe((await sampleCommand(['plan', 'samples/plan-uv-deep-wide.yaml', '--format', 'json'])).stdout);
    const p = JSON.parse(r.stdout) as Any;
    const svg = readFileSync(join(dir, 'plan.svg'), 'utf8');
    expect(existsSync(join(dir, 'plan.png'))).toBe(false); // --no-png
    const ms = allMarks(svg);
    // the designs: one dot per design, in exposure order
    const dots = ms.filter((m) => m.role === 'point' && 'pointings' in m.label);
    expect(dots).toHaveLength(p.designs.length);
    const byExposure = [...p.designs].sort(
      (a: Any, b: Any) => a.exposure_hours_per_pointing - b.exposure_hours_per_pointing,
    );
    dots.forEach((m, i) => {
      expect(close(num(m.label.exposure_hours_per_pointing!), byExposure[i].exposure_hours_per_pointing)).toBe(true);
      expect(num(m.label.pointings!)).toBe(byExposure[i].pointings);
    });
    // the best: a point with only its position in the label (the diamond), and its caption
    const best = ms.filter((m) => m.role === 'point' && !('pointings' in m.label));
    expect(best).toHaveLength(1);
    expect(close(num(best[0]!.label.exposure_hours_per_pointing!), p.best.exposure_hours_per_pointing)).toBe(true);
    expect(close(num(best[0]!.label.goal_value!), p.best.goal_value)).toBe(true);
    expect(svg).toContain(`× ${p.best.pointings} pointings`);
    // the near-best band spans near_best.from to near_best.to (hours per pointing)
    const band = ms.find((m) => m.role === 'rect mark')!;
    // (near_best.from and .to are the designs at either end; the band runs from the shorter exposure)
    const ends = [p.near_best.from.exposure_hours_per_pointing, p.near_best.to.exposure_hours_per_pointing];
    expect(close(num(band.label.from!), Math.min(...ends))).toBe(true);
    expect(close(num(band.label.to!), Math.max(...ends))).toBe(true);
  });
});

describe.each(PLAN_SAMPLES)('report of %s: plan and forecast', (sample) => {
  test('plan table and figure, forecast table and figure, drawn from the plan and forecast JSON', async () => {
    // `report samples/<sample> --out ... --figures ...`, made once per run and shared with
    // test/cli/report.test.ts and the browser test (test/support/sample-reports.ts); its only
    // possible note is the one --figures gives when the PNG rasteriser cannot load
    const made = await sampleReport(sample);
    const r = made.result;
    expect(r.stderr.replace(/^skytally: PNG not written.*\n/m, '')).toBe('');
    expect(r.code).toBe(0);
    const html = readFileSync(made.html, 'utf8');
    for (const id of ['id="plan-table"', 'id="figure-plan"', 'id="forecast-table"', 'id="figure-forecast"'])
      expect(html).toContain(id);
    expect(html).not.toContain('class="omitted"');
    expect(html).not.toMatch(/NaN|Infinity/);

    const plan = await sampleCommand(['plan', `samples/${sample}`, '--format', 'json']);
    expect(plan.code, plan.stderr).toBe(0);
    const p = JSON.parse(plan.stdout) as Any;
    const planMarks = allMarks(figureInHtml(html, 'plan'));
    const best = planMarks.filter((m) => m.role === 'point' && !('pointings' in m.label));
    expect(best).toHaveLength(1);
    expect(close(num(best[0]!.label.exposure_hours_per_pointing!), p.best.exposure_hours_per_pointing)).toBe(true);
    expect(close(num(best[0]!.label.goal_value!), p.best.goal_value)).toBe(true);
    // the table marks the same design as best (also when refining put it between grid designs)
    const bestRows = [...html.matchAll(/<tr class="best">(.*?)<\/tr>/g)];
    expect(bestRows).toHaveLength(1);
    expect(bestRows[0]![1]).toContain(`<td>${p.best.pointings}</td><td>`);

    const fc = await sampleCommand(['forecast', `samples/${sample}`, '--format', 'json']);
    expect(fc.code, fc.stderr).toBe(0);
    const f = JSON.parse(fc.stdout) as Any;
    const { cross } = readForecastFigure(figureInHtml(html, 'forecast'));
    const y = f.parameters.includes('m_star') ? 'm_star' : 'log10_l_star';
    expect(close(num(cross.label.x!), f.center.alpha)).toBe(true);
    expect(close(num(cross.label.y!), f.center[y])).toBe(true);
  });
});

describe('report --mocks N --seed S', () => {
  test('the forecast figure scatters every converged fit, equal to those forecast --list-mock-fits lists', async () => {
    const dir = tmp();
    const out = join(dir, 'r.html');
    const r = await runCli(['report', 'samples/halpha-narrowband.yaml', '--mocks', '20', '--seed', '3', '--out', out]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    const f = JSON.parse(
      (
        await runCli([
          'forecast',
          'samples/halpha-narrowband.yaml',
          '--mocks',
          '20',
          '--seed',
          '3',
          '--list-mock-fits',
          '--format',
          'json',
        ])
      ).stdout,
    ) as Any;
    const fits = f.mocks.fits as number[][];
    expect(fits).toHaveLength(20 - f.mocks.failed_fits);
    expect(fits.length).toBeGreaterThan(15);
    const jx = f.parameters.indexOf('alpha');
    const jy = f.parameters.indexOf('log10_l_star');
    const { dots } = readForecastFigure(figureInHtml(html, 'forecast'));
    expect(dots).toHaveLength(fits.length);
    dots.forEach((d, i) => {
      expect(close(num(d.label.x!), fits[i]![jx]!), `fit ${i} alpha`).toBe(true);
      expect(close(num(d.label.y!), fits[i]![jy]!), `fit ${i} log10 L*`).toBe(true);
    });
    expect(html).toContain(`mean of ${fits.length} mock fits`);
    // another seed draws other mocks
    const other = await runCli(['report', 'samples/halpha-narrowband.yaml', '--mocks', '20', '--seed', '4']);
    const otherDots = readForecastFigure(figureInHtml(other.stdout, 'forecast')).dots;
    expect(otherDots.map((d) => d.label.x)).not.toEqual(dots.map((d) => d.label.x));
  });

  test.each([
    ['--mocks', '0'],
    ['--mocks', 'many'],
    ['--seed', '-1'],
    ['--seed', '4294967296'],
  ])('%s %s: exit 2 with the sentence forecast gives, nothing written', async (opt, value) => {
    const dir = tmp();
    const out = join(dir, 'r.html');
    const r = await runCli(['report', 'samples/halpha-narrowband.yaml', opt, value, '--out', out]);
    const f = await runCli(['forecast', 'samples/halpha-narrowband.yaml', opt, value]);
    expect(r.code).toBe(2);
    expect(f.code).toBe(2);
    expect(r.stderr).toBe(f.stderr.replace(/^skytally: forecast /, 'skytally: report '));
    expect(r.stderr).toContain(`skytally: report ${opt}: `);
    expect(existsSync(out)).toBe(false);
  });
});

describe('sections that cannot be computed: a sentence, not a failure', () => {
  test('double Schechter: the report says why there is no forecast', async () => {
    // `report samples/double-schechter-mass.yaml --out ... --figures ...`, made once per run
    // (test/support/sample-reports.ts); its only possible note is the one --figures gives when
    // the PNG rasteriser cannot load
    const made = await sampleReport('double-schechter-mass.yaml');
    expect(made.result.code).toBe(0);
    expect(made.result.stderr.replace(/^skytally: PNG not written.*\n/m, '')).toBe('');
    const html = readFileSync(made.html, 'utf8');
    const m = /<p class="omitted" id="forecast-omitted">([^<]*)<\/p>/.exec(html);
    expect(m).not.toBeNull();
    expect(m![1]).toMatch(/^No forecast: .*single Schechter function.* is a double Schechter function\.$/);
    expect(html).not.toContain('id="figure-forecast"');
    expect(html).not.toContain('id="forecast-table"');
  });

  const massWithPlan = (plan: string) => `${readFileSync('samples/mass-limited.yaml', 'utf8')}plan:\n${plan}`;
  const GOOD_PLAN =
    '  field_of_view: "0.05 deg^2"\n  reference: {limit: 26.5, exposure_hours: 1.0}\n  budget_hours: 60\n  goal: count\n';

  test('a threshold survey with a plan section: the report says why there is no plan; the forecast stays', async () => {
    const dir = tmp();
    const input = join(dir, 'mass-plan.yaml');
    writeFileSync(input, massWithPlan(GOOD_PLAN));
    // the plan command refuses it (exit 2) ...
    const plan = await runCli(['plan', input]);
    expect(plan.code).toBe(2);
    // ... the report states why and carries on
    const r = await runCli(['report', input, '--out', join(dir, 'r.html')]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const html = readFileSync(join(dir, 'r.html'), 'utf8');
    expect(html).toMatch(/<p class="omitted" id="plan-omitted">No plan: [^<]*threshold[^<]*\.<\/p>/);
    expect(html).not.toContain('id="figure-plan"');
    expect(html).toContain('id="figure-forecast"');
  });

  test('a well-formed plan no design can satisfy: a sentence naming the key', async () => {
    const dir = tmp();
    const input = join(dir, 'p.yaml');
    writeFileSync(
      input,
      readFileSync('samples/plan-uv-deep-wide.yaml', 'utf8').replace(/minimum_count: 200/, 'minimum_count: 1.0e12'),
    );
    expect((await runCli(['plan', input])).code).toBe(2);
    const r = await runCli(['report', input]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(
      /<p class="omitted" id="plan-omitted">No plan: it cannot be computed for this survey \([^<]*plan\.minimum_count[^<]*\)\.<\/p>/,
    );
  });

  test.each([
    [
      'a misspelt key',
      'samples/plan-uv-deep-wide.yaml',
      (t: string) => t.replace('budget_hours: 150', 'budget_hour: 150'),
      /plan\.budget_hour/,
    ],
    [
      'a wrong type',
      'samples/plan-uv-deep-wide.yaml',
      (t: string) => t.replace('budget_hours: 150', 'budget_hours: lots'),
      /plan\.budget_hours/,
    ],
    [
      'a misspelt key in a threshold survey',
      'samples/mass-limited.yaml',
      (t: string) => `${t}plan:\n${GOOD_PLAN}  tier: 2\n`,
      /plan\.tier/,
    ],
  ])(
    'a malformed plan section (%s) is bad input: exit 2, one sentence, nothing written',
    async (_what, base, edit, key) => {
      const dir = tmp();
      const input = join(dir, 'bad.yaml');
      writeFileSync(input, edit(readFileSync(base, 'utf8')));
      const out = join(dir, 'r.html');
      const r = await runCli(['report', input, '--out', out]);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(key);
      expect(existsSync(out)).toBe(false);
    },
  );
});

describe("report --format json: the forecast part is the forecast command's own, bit for bit", () => {
  // The report's prediction runs first in the same process; the forecast takes its cosmic-variance
  // fractions from its own density grid's counts as the `forecast` command does, so nothing of the
  // prediction may reach it: the same numbers to the last bit (JSON.parse gives each number's exact
  // double). mass-limited has model_uncertainty: the report's forecast draws the model 1000 times
  // with seed 1 (its --draws and --seed defaults), as `forecast --model-draws 1000` does.
  test.each([
    ['dropout-field.yaml', []],
    ['mass-limited.yaml', ['--model-draws', '1000']],
  ])('%s', async (sample, extra) => {
    const rep = await runCli(['report', `samples/${sample}`, '--format', 'json']);
    expect(rep.code, rep.stderr).toBe(0);
    const fc = await sampleCommand(['forecast', `samples/${sample}`, '--format', 'json', ...extra]);
    expect(fc.code, fc.stderr).toBe(0);
    const report = JSON.parse(rep.stdout) as { forecast: Any };
    const own = JSON.parse(fc.stdout) as Any;
    expect(report.forecast.slices.length).toBeGreaterThan(0);
    expect(report.forecast).toEqual(own);
  });
});
