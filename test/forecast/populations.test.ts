/**
 * A population of a several-population file is forecast, compared and planned exactly as a file
 * holding that population alone (same filter, same limit, same slices rule) would be.
 *
 * Origin of the expected values: the single-population files written here from the bundled
 * sample samples/narrowband-interlopers.yaml (three lines through one tabulated filter); the
 * identity is exact by construction, checked to 1e-9 relative (the issue's tolerance) for every
 * number of the forecast, with and without cosmic variance.
 */
import { tempDir } from '../support/temp.js';
import { copyFileSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { parse, stringify } from 'yaml';
import { loadSurveyFile } from '../../src/survey/load.js';
import { forecast } from '../../src/forecast/forecast.js';
import { compare } from '../../src/planning/compare.js';
import { plan } from '../../src/library/plan.js';
import { runCli } from '../cli/helpers.js';

const SAMPLE = 'samples/narrowband-interlopers.yaml';
const dir = tempDir('skytally-pops-');
mkdirSync(join(dir, 'filters'));
copyFileSync('samples/filters/nb-9200-invented.csv', join(dir, 'filters', 'nb-9200-invented.csv'));
const doc = parse(readFileSync(SAMPLE, 'utf8')) as Record<string, unknown>;
const names = (doc.populations as { name: string }[]).map((p) => p.name);

/** The sample with only population `k` (as `population:`), plus `extra` keys; returns its path. */
function alone(k: number, extra: Record<string, unknown> = {}): string {
  const { populations, ...rest } = doc as { populations: unknown[] };
  const file = join(dir, `alone-${k}-${Object.keys(extra).join('-') || 'plain'}.yaml`);
  writeFileSync(file, stringify({ ...rest, population: populations[k], ...extra }));
  return file;
}

/** The sample with every population, plus `extra` keys; returns its path. */
function together(extra: Record<string, unknown> = {}): string {
  const file = join(dir, `together-${Object.keys(extra).join('-') || 'plain'}.yaml`);
  writeFileSync(file, stringify({ ...doc, ...extra }));
  return file;
}

/** Every number of a and b agrees to `tol` relative (absolute below 1e-300); strings and shapes equal. */
function expectClose(a: unknown, b: unknown, tol: number, path = ''): void {
  if (typeof a === 'number' && typeof b === 'number') {
    const scale = Math.max(Math.abs(a), Math.abs(b));
    if (scale > 1e-300) expect(Math.abs(a - b) / scale, `${path}: ${a} against ${b}`).toBeLessThanOrEqual(tol);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    expect(a.length, path).toBe(b.length);
    a.forEach((x, i) => expectClose(x, b[i], tol, `${path}[${i}]`));
    return;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    expect(Object.keys(a).sort(), path).toEqual(Object.keys(b).sort());
    for (const k of Object.keys(a))
      expectClose((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], tol, `${path}.${k}`);
    return;
  }
  expect(a, path).toEqual(b);
}

describe('forecast --population NAME = the forecast of a file holding NAME alone (1e-9)', () => {
  const multi = loadSurveyFile(together());
  test.each(names.map((n, k) => [n, k] as const))('%s, Poisson only', async (name, k) => {
    const single = loadSurveyFile(alone(k));
    // the requirement search (targets, the slow part) is checked for the last line
    const targets = k < names.length - 1 ? {} : { targets: { alpha: 0.05 } };
    const got = await forecast(multi, { population: name, cosmicVariance: false, ...targets });
    const want = await forecast(single, { cosmicVariance: false, ...targets });
    expect(got.count).toBeGreaterThan(10);
    expectClose(got, want, 1e-9);
  });

  test('with cosmic variance too (an interloper)', async () => {
    const got = await forecast(multi, { population: names[1]! });
    const want = await forecast(loadSurveyFile(alone(1)));
    expectClose(got, want, 1e-9);
  });

  test('the command runs for an interloper (exit 0) and reports its own window', async () => {
    const r = await runCli(['forecast', SAMPLE, '--population', '[OII]', '--format', 'json']);
    expect(r.code, r.stderr).toBe(0);
    const f = JSON.parse(r.stdout) as { redshift: { min: number; max: number }; count: number };
    expect(f.redshift.min).toBeGreaterThan(1.4);
    expect(f.count).toBeGreaterThan(100);
  });

  test('without --population the table says only the first population is forecast and names the others (failed before: not a word)', async () => {
    const r = await runCli(['forecast', SAMPLE, '--no-cosmic-variance']);
    expect(r.code, r.stderr).toBe(0);
    const lines = r.stdout.split('\n');
    const at = lines.findIndex((l) => l.startsWith('Assumed model: H-alpha:'));
    expect(lines[at + 1]).toBe(
      'Population: the file holds 3; only the first, "H-alpha", is forecast (counted over its own window), without "[OIII]", "[OII]"; choose one with --population NAME.',
    );
    // named, or a file of one population: no such line
    const named = await runCli(['forecast', SAMPLE, '--no-cosmic-variance', '--population', 'H-alpha']);
    expect(named.stdout).not.toContain('Population: the file holds');
    expect(r.stdout.replace(`${lines[at + 1]}\n`, '')).toBe(named.stdout);
  });

  test('without --population the JSON names the populations left out, and the report says so (failed before: the JSON had no word of them)', async () => {
    const r = await runCli(['forecast', SAMPLE, '--no-cosmic-variance', '--format', 'json']);
    expect(r.code, r.stderr).toBe(0);
    const f = JSON.parse(r.stdout) as { model: { name: string }; populations_left_out?: string[] };
    expect(f.model.name).toBe('H-alpha');
    expect(f.populations_left_out).toEqual(['[OIII]', '[OII]']);
    // named: none left out, and otherwise the same document
    const named = await runCli([
      'forecast',
      SAMPLE,
      '--no-cosmic-variance',
      '--format',
      'json',
      '--population',
      'H-alpha',
    ]);
    const g = JSON.parse(named.stdout) as Record<string, unknown>;
    expect(g.populations_left_out).toBeUndefined();
    const { populations_left_out: _left, ...rest } = f;
    expect(rest).toEqual(g);
    // the library: the same without a population, nothing when one is named or the file holds one
    const multi = loadSurveyFile(together());
    expect((await forecast(multi, { cosmicVariance: false })).populations_left_out).toEqual(['[OIII]', '[OII]']);
    expect(
      (await forecast(multi, { cosmicVariance: false, population: '[OII]' })).populations_left_out,
    ).toBeUndefined();
    expect((await forecast(loadSurveyFile(alone(0)), { cosmicVariance: false })).populations_left_out).toBeUndefined();
    // the report's forecast section names them too
    const html = await runCli(['report', SAMPLE, '--out', '-']);
    expect(html.code, html.stderr).toBe(0);
    expect(html.stdout).toMatch(
      /<p class="note" id="forecast-population">The forecast is of the file's first population, “H-alpha”, counted over its own window; “\[OIII\]”, “\[OII\]” are not forecast/,
    );
  });
});

describe('compare and plan pick a population the same way (1e-9)', () => {
  test("compare --population: the row equals the single-population file's (an interloper)", async () => {
    const multi = loadSurveyFile(together());
    const single = loadSurveyFile(alone(2));
    const got = await compare([multi, single], { population: names[2]! });
    const want = await compare([single, single]);
    const { file: _a, ...row } = got.surveys[0]!;
    const { file: _b, ...ref } = want.surveys[0]!;
    expectClose(row, ref, 1e-9);
  });

  test('plan --population: the same designs as the single-population file', async () => {
    const section = {
      field_of_view: '0.1 deg^2',
      reference: { limit: '4e-17 erg/s/cm^2', exposure_hours: 1 },
      overhead_hours: 0.1,
      budget_hours: 20,
      goal: { sigma: 'alpha' },
      exposure_grid: { min_hours: 0.2, max_hours: 10, count: 12 },
    };
    const multi = loadSurveyFile(together({ plan: section }));
    const single = loadSurveyFile(alone(1, { plan: section }));
    const got = await plan(multi, { population: names[1]! });
    const want = await plan(single);
    expectClose(got, want, 1e-9);
  });
});
