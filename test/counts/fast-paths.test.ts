/**
 * The per-cosmology tables (power spectrum, halo abundance, growth) and the completeness
 * quadrature in observed value give the same numbers as the code before them: every count,
 * histogram bin, luminosity density, uncertainty fraction, bias and matched halo mass of every
 * bundled sample (and of variants and the count-reference surveys), and the halo and box-variance
 * functions on a grid, to 1e-9 relative. Source: test/fixtures/predictions-before-tables.json,
 * recorded by test/fixtures/record-predictions.ts on the earlier code (commit in its header).
 */
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { haloAndBoxRecords, recordedCases } from '../fixtures/record-predictions.js';

const fixture = JSON.parse(readFileSync('test/fixtures/predictions-before-tables.json', 'utf8')) as {
  header: { commit: string };
  predictions: Record<string, unknown>;
  functions: Record<string, unknown>;
};
const REL = 1e-9;

/** Every place where `got` differs from `want` (numbers beyond REL relative, anything else at all). */
function differences(got: unknown, want: unknown, path: string, out: string[]): void {
  if (typeof want === 'string' && typeof got === 'number' && String(got) === want) return; // NaN recorded as a string
  if (typeof want === 'number' && typeof got === 'number') {
    const scale = Math.max(Math.abs(want), Math.abs(got));
    if (!(Math.abs(got - want) <= REL * scale)) out.push(`${path}: ${got} against ${want} (${((got - want) / want).toExponential(2)})`);
    return;
  }
  if (Array.isArray(want) && Array.isArray(got)) {
    if (got.length !== want.length) out.push(`${path}: length ${got.length} against ${want.length}`);
    else want.forEach((w, i) => differences(got[i], w, `${path}[${i}]`, out));
    return;
  }
  if (want && typeof want === 'object' && got && typeof got === 'object') {
    const gk = Object.keys(got).sort();
    const wk = Object.keys(want).sort();
    if (gk.join() !== wk.join()) out.push(`${path}: keys ${gk.join()} against ${wk.join()}`);
    for (const k of wk) differences((got as Record<string, unknown>)[k], (want as Record<string, unknown>)[k], `${path}.${k}`, out);
    return;
  }
  if (got !== want) out.push(`${path}: ${JSON.stringify(got)} against ${JSON.stringify(want)}`);
}

describe(`fast paths equal the earlier code (fixture from ${fixture.header.commit.slice(0, 12)}) to 1e-9 relative`, () => {
  const cases = recordedCases();
  test('the fixture holds every case the recorder lists', () => {
    expect(Object.keys(fixture.predictions).sort()).toEqual(cases.map((c) => c.name).sort());
  });
  test.each(cases.map((c) => [c.name, c] as const))('predict %s: counts, histograms, densities, uncertainties', (name, c) => {
    const got = JSON.parse(JSON.stringify(predict(loadSurveyText(c.text, c.file, dirname(c.file)))));
    const out: string[] = [];
    differences(got, fixture.predictions[name], name, out);
    expect(out.slice(0, 20)).toEqual([]);
  });
  test('halo abundance above a mass, effective bias, abundance matching and box variance on a grid', () => {
    const got = JSON.parse(JSON.stringify(haloAndBoxRecords(), (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v)));
    const out: string[] = [];
    differences(got, fixture.functions, 'functions', out);
    expect(out.slice(0, 20)).toEqual([]);
  });
});
