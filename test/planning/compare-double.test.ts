/**
 * compare on a double Schechter population (a forecast varies a single Schechter function, so such
 * a file has no sigmas; every other row holds):
 * - exit 0, the JSON valid against specs/compare.schema.json, the counts those of predict (exact:
 *   the same function), the model fraction present, no sigma and a note saying why;
 * - the count fainter than L*, added component by component, against predict's counts (the count
 *   engine, checked against test/reference/double_schechter.json elsewhere): for a constant mass
 *   limit below L*, fainter than L* = count above the limit - count above L* (1e-6 relative: two
 *   quadratures of the same integral, the density grid's and the engine's).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { predict } from '../../src/counts/predict.js';
import { compare } from '../../src/planning/compare.js';
import { runCli } from '../cli/helpers.js';
import { sample, sampleText } from './helpers.js';
import { tempDir } from '../support/temp.js';

const ajv = new Ajv2020({ strict: false });
const compareSchema = ajv.compile(JSON.parse(readFileSync('specs/compare.schema.json', 'utf8')));

/** The double Schechter sample with a constant first normalisation (a variant to compare with). */
const variant = (t: string) => t.replace('log10_phi_star_1: "-2.8122156886994634 - 0.2*z"', 'log10_phi_star_1: -2.9');

describe('compare on a double Schechter population', () => {
  test('exit 0 with the counts of predict, the model fraction, no sigmas and a note', async () => {
    const dir = tempDir('skytally-compare-double-');
    const b = join(dir, 'variant.yaml');
    const text = sampleText('double-schechter-mass.yaml');
    expect(variant(text)).not.toBe(text);
    writeFileSync(b, variant(text));
    const r = await runCli(['compare', 'samples/double-schechter-mass.yaml', b, '--format', 'json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const c = JSON.parse(r.stdout);
    expect(compareSchema(c), JSON.stringify(compareSchema.errors)).toBe(true);
    const surveys = [sample('double-schechter-mass.yaml'), sample('double-schechter-mass.yaml', variant)];
    surveys.forEach((s, i) => {
      const p = predict(s);
      const row = c.surveys[i];
      expect(row.count).toBe(p.totals.count);
      expect(row.per_deg2).toBe(p.totals.per_deg2);
      expect(row.poisson_fraction).toBe(p.totals.uncertainty!.poisson_fraction);
      expect(row.model_fraction).toBeGreaterThan(0);
      expect(row.sigma).toEqual({});
      expect(row.faint_count).toBeGreaterThan(0);
      expect(row.faint_count).toBeLessThan(row.count);
    });
    // phi*_1 = 10^-2.9 is above the sample's 10^(-2.81 - 0.2 z) for z > 0.44: more sources
    expect(c.best.count).toEqual([1]);
    expect(c.notes.filter((n: string) => n.includes('double Schechter'))).toHaveLength(2);
    const t = await runCli(['compare', 'samples/double-schechter-mass.yaml', b]);
    expect(t.code).toBe(0);
    expect(t.stdout).toContain('model fraction');
    expect(t.stdout).not.toContain('sigma of');
  }, 120_000);

  test('the count fainter than L*, component by component, against predict (1e-6)', async () => {
    const fixed = (limit: number) => (t: string) =>
      t
        .replace(/limit: \{table: [^\n]*\n/, `limit: ${limit}\n`)
        .replace(/ {2}model_uncertainty:[\s\S]*?correlation: [^\n]*\n/, '');
    const below = sample('double-schechter-mass.yaml', fixed(9.0));
    const atKnee = sample('double-schechter-mass.yaml', fixed(10.7)); // log10 L* of the sample
    const other = sample('double-schechter-mass.yaml', (t) => fixed(9.3)(variant(t)));
    const c = await compare([below, other]);
    const expected = predict(below).totals.count - predict(atKnee).totals.count;
    expect(c.surveys[0]!.faint_count).toBeGreaterThan(0);
    expect(Math.abs(c.surveys[0]!.faint_count / expected - 1)).toBeLessThan(1e-6);
    expect(c.best.limit).toEqual([0]);
  }, 120_000);
});
