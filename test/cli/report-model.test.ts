/**
 * `report --draws N --seed S` and the forecast section's sigmas across the model.
 * - Reference: the `forecast --model-draws N --seed S --format json` output for the same file (its
 *   numbers are checked against the Python Monte Carlo reference in test/forecast/model-spread.test.ts).
 *   The report's JSON holds exactly that model_spread block (deep equality: the same draws, seed and
 *   Fisher matrices); the HTML shows each sigma and its p16-p84 to 3 significant digits, so each
 *   number shown is the JSON value written with the report's formatter (formatNumber, 3 digits) and,
 *   read back, within half a unit of its third significant digit of the JSON value.
 * - The prediction inside the report makes the same draws as `predict --draws N --seed S`.
 * - The same seed gives a byte-identical HTML report; another seed other ranges.
 * - Without model_uncertainty, --draws is refused (there is nothing to draw: exit 2, one sentence,
 *   nothing written) and --seed changes nothing (the same report, no spread shown, and a note).
 * - A bad --draws is bad input: exit 2, one sentence, nothing written.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runCli } from './helpers.js';
import { tempDir } from '../support/temp.js';
import { sampleReport } from '../support/sample-reports.js';
import { formatNumber } from '../../src/render/format.js';
import type { Json } from '../support/json.js';

const WITH_MODEL = 'samples/mass-limited.yaml';
const WITHOUT_MODEL = 'samples/deep-continuum.yaml';
const DRAWS = '150';
const SEED = '5';
const T = 240_000;

interface Pct {
  p16: number;
  p50: number;
  p84: number;
}

/** The "σ(name) = a (b–c across the model)" lines of the report, by parameter, as written. */
function spreadLines(html: string): Record<string, [string, string, string]> {
  const start = html.indexOf('<div id="forecast-model-spread">');
  if (start < 0) return {};
  const block = html.slice(start, html.indexOf('</div>', start));
  const out: Record<string, [string, string, string]> = {};
  const re = /<li>σ\(<span class="key">([^<]+)<\/span>\) = ([^ ]+) \(([^–]+)–([^ ]+) across the model\)<\/li>/g;
  for (const m of block.matchAll(re)) out[m[1]!] = [m[2]!, m[3]!, m[4]!];
  return out;
}

/** Within half a unit of the third significant digit of `want`. */
function agreesTo3(shown: string, want: number): boolean {
  const x = Number(shown);
  const unit = 10 ** (Math.floor(Math.log10(Math.abs(want))) - 2);
  return Math.abs(x - want) <= 0.5 * unit * (1 + 1e-9);
}

describe('report with model_uncertainty: the forecast sigmas across the model', () => {
  test(
    'the report JSON and HTML show forecast --model-draws with the same seed',
    async () => {
      const fc = await runCli(['forecast', WITH_MODEL, '--model-draws', DRAWS, '--seed', SEED, '--format', 'json']);
      expect(fc.code, fc.stderr).toBe(0);
      const f = JSON.parse(fc.stdout) as {
        parameters: string[];
        fisher: { sigma: Record<string, number> };
        model_spread: { draws: number; seed: number; sigma: Record<string, Pct> };
      };
      expect(f.model_spread.draws).toBe(Number(DRAWS));
      expect(f.model_spread.seed).toBe(Number(SEED));

      const rj = await runCli(['report', WITH_MODEL, '--format', 'json', '--draws', DRAWS, '--seed', SEED]);
      expect(rj.code, rj.stderr).toBe(0);
      const r = JSON.parse(rj.stdout) as {
        forecast: { model_spread: Json; fisher: Json };
        prediction: { totals: { model?: { draws: number; p50: number } } };
      };
      expect(r.forecast.model_spread).toEqual(f.model_spread);
      expect(r.forecast.fisher).toEqual(f.fisher);

      // the prediction inside the report: predict --draws N --seed S
      const pj = await runCli(['predict', WITH_MODEL, '--draws', DRAWS, '--seed', SEED, '--format', 'json']);
      expect(pj.code, pj.stderr).toBe(0);
      const p = JSON.parse(pj.stdout) as { totals: { model: Json } };
      expect(r.prediction.totals.model).toEqual(p.totals.model);
      expect(r.prediction.totals.model!.draws).toBe(Number(DRAWS));

      const dir = tempDir('skytally-report-model-');
      const a = join(dir, 'a.html');
      const b = join(dir, 'b.html');
      for (const out of [a, b]) {
        const rh = await runCli(['report', WITH_MODEL, '--out', out, '--draws', DRAWS, '--seed', SEED]);
        expect(rh.code, rh.stderr).toBe(0);
      }
      const html = readFileSync(a, 'utf8');
      // same seed: the same document, byte for byte
      expect(readFileSync(b, 'utf8')).toBe(html);
      expect(html).toContain(`${DRAWS} draws of its model_uncertainty (seed ${SEED})`);

      const lines = spreadLines(html);
      expect(Object.keys(lines)).toEqual(f.parameters);
      for (const n of f.parameters) {
        const [sigma, p16, p84] = lines[n]!;
        const q = f.model_spread.sigma[n]!;
        const want: [string, number][] = [
          [sigma, f.fisher.sigma[n]!],
          [p16, q.p16],
          [p84, q.p84],
        ];
        for (const [shown, value] of want) {
          expect(shown, n).toBe(formatNumber(value, 3));
          expect(agreesTo3(shown, value), `${n}: ${shown} vs ${value}`).toBe(true);
        }
        expect(Number(p16)).toBeLessThanOrEqual(Number(p84));
      }
    },
    T,
  );

  test(
    'another seed gives other ranges',
    async () => {
      const dir = tempDir('skytally-report-model-');
      const one = join(dir, 'one.html');
      const two = join(dir, 'two.html');
      expect((await runCli(['report', WITH_MODEL, '--out', one, '--draws', '60', '--seed', '1'])).code).toBe(0);
      expect((await runCli(['report', WITH_MODEL, '--out', two, '--draws', '60', '--seed', '2'])).code).toBe(0);
      const a = spreadLines(readFileSync(one, 'utf8'));
      const b = spreadLines(readFileSync(two, 'utf8'));
      expect(Object.keys(a).length).toBe(3);
      expect(JSON.stringify(a)).not.toBe(JSON.stringify(b));
    },
    T,
  );
});

describe('report without model_uncertainty', () => {
  test(
    '--seed changes nothing (with a note), --draws is refused, and no spread is shown',
    async () => {
      const dir = tempDir('skytally-report-model-');
      const seeded = join(dir, 'seeded.html');
      // the report without --draws and --seed: `report samples/deep-continuum.yaml --out ...`, made
      // once per run (test/support/sample-reports.ts)
      const plain = await sampleReport('deep-continuum.yaml');
      expect(plain.result.code).toBe(0);
      const r = await runCli(['report', WITHOUT_MODEL, '--out', seeded, '--seed', '9']);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stderr).toContain('skytally: note: report --seed: nothing is drawn at random');
      const html = readFileSync(plain.html, 'utf8');
      expect(html).not.toContain('forecast-model-spread');
      expect(html).not.toContain('across the model');
      expect(readFileSync(seeded, 'utf8')).toBe(html);
      // failed before: exit 0, --draws ignored
      const drawn = join(dir, 'drawn.html');
      const rd = await runCli(['report', WITHOUT_MODEL, '--out', drawn, '--draws', '40', '--seed', '9']);
      expect(rd.code).toBe(2);
      expect(rd.stderr.trim().split('\n')).toHaveLength(1);
      expect(rd.stderr).toMatch(
        /^skytally: report --draws: \S*deep-continuum\.yaml: no population has a model_uncertainty block/,
      );
      expect(existsSync(drawn)).toBe(false);
      const rj = await runCli(['report', WITHOUT_MODEL, '--format', 'json']);
      expect(rj.code).toBe(0);
      expect(rj.stdout).not.toContain('model_spread');
    },
    T,
  );
});

describe('report --draws: bad input', () => {
  test.each([['0'], ['-3'], ['1.5'], ['many'], ['100001']])('--draws %s', async (v) => {
    const dir = tempDir('skytally-report-model-');
    const out = join(dir, 'r.html');
    const r = await runCli(['report', WITH_MODEL, '--out', out, '--draws', v]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--draws');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(out)).toBe(false);
  });
});
