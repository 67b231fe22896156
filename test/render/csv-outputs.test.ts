/**
 * Every command's CSV, read back by a strict RFC 4180 reader (csv-parse, nothing relaxed; see
 * csv-helpers.ts): one header, then exactly one record per row of the command's JSON, each with
 * the header's number of fields, no blank line anywhere, and the numbers equal to the JSON's
 * (the CSV writes numbers in full, so the comparison is exact).
 */
import { tempDir } from '../support/temp.js';
import { describe, expect, test } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../cli/helpers.js';
import { csvNumber, parseCsvStrict } from './csv-helpers.js';
import { csvText } from '../../src/render/csv.js';
import type { Json } from '../support/json.js';

async function both(argv: string[]): Promise<{ csv: ReturnType<typeof parseCsvStrict>; json: Json; text: string }> {
  const c = await runCli([...argv, '--format', 'csv']);
  expect(c.code, c.stderr).toBe(0);
  const j = await runCli([...argv, '--format', 'json']);
  expect(j.code, j.stderr).toBe(0);
  return { csv: parseCsvStrict(c.stdout), json: JSON.parse(j.stdout), text: c.stdout };
}

describe('CSV of every command, read strictly', () => {
  test('predict: one record per slice, numbers equal to the JSON', async () => {
    const { csv, json, text } = await both(['predict', 'samples/halpha-narrowband.yaml']);
    expect(text).not.toMatch(/\n\n/);
    expect(csv.rows.length).toBe(json.slices.length);
    csv.records.forEach((r, i) => {
      expect(csvNumber(r.z_min)).toBe(json.slices[i].z_min);
      expect(csvNumber(r.count)).toBe(json.slices[i].count);
    });
  });

  test('check: one record per key of the normalised survey', async () => {
    const c = await runCli(['check', 'samples/deep-continuum.yaml', '--format', 'csv']);
    expect(c.code).toBe(0);
    const csv = parseCsvStrict(c.stdout);
    expect(csv.header).toEqual(['key', 'value']);
    expect(csvNumber(csv.records.find((r) => r.key === 'area_deg2')?.value)).toBeCloseTo(80 / 3600, 12);
    // a title with commas is quoted and comes back whole
    expect(csv.records.find((r) => r.key === 'title')?.value).toContain(',');
  });

  test('distances and clustering', async () => {
    const d = await both(['distances', '--z', '0.5,1,2']);
    expect(d.csv.rows.length).toBe(3);
    expect(csvNumber(d.csv.records[1]!.luminosity_distance_mpc)).toBe(d.json.rows[1].luminosity_distance_mpc);
    const k = await both(['clustering', '--z', '0,1', '--radius-mpc', '8,20']);
    expect(k.csv.rows.length).toBe(2);
    expect(csvNumber(k.csv.records[1]!.sigma_r_20)).toBe(k.json.rows[1].sigma_r['20']);
  });

  test('forecast: one record per parameter', async () => {
    const { csv, json } = await both(['forecast', 'samples/halpha-narrowband.yaml', '--no-cosmic-variance']);
    expect(csv.rows.length).toBe(json.parameters.length);
    csv.records.forEach((r, i) => expect(csvNumber(r.sigma_fisher)).toBe(json.fisher.sigma[json.parameters[i]]));
  });

  test('compare: one record per row, no blank line between them (failed before: every row was followed by a blank line)', async () => {
    const files = ['samples/halpha-narrowband.yaml', 'samples/deep-continuum.yaml'];
    const { csv, json, text } = await both(['compare', ...files, '--no-cosmic-variance']);
    expect(text).not.toMatch(/\n\n/);
    expect(csv.header[0]).toBe('row');
    const area = csv.records.find((r) => r.row === 'area_deg2')!;
    expect(csvNumber(area[csv.header[1]!])).toBe(json.surveys[0].area_deg2);
    expect(csvNumber(area[csv.header[2]!])).toBe(json.surveys[1].area_deg2);
    // every row of the table is a record
    expect(csv.rows.length).toBeGreaterThanOrEqual(8 + Object.keys(json.surveys[0].sigma).length);
  }, 60_000);

  test('plan: one record per design (and per tier), no blank line (failed before, as compare)', async () => {
    // the layered sample on a coarser grid (quicker; still two tiers, so tier records too)
    const dir = tempDir('skytally-csv-');
    const file = join(dir, 'plan.yaml');
    writeFileSync(file, readFileSync('samples/plan-halpha-layers.yaml', 'utf8').replace('count: 120}', 'count: 30}'));
    const { csv, json, text } = await both(['plan', file]);
    expect(csv.records.some((r) => r.tier === '1')).toBe(true);
    expect(text).not.toMatch(/\n\n/);
    const all = csv.records.filter((r) => r.tier === 'all');
    expect(all.length).toBeGreaterThanOrEqual(json.designs.length);
    all
      .slice(0, json.designs.length)
      .forEach((r, i) => expect(csvNumber(r.goal_value)).toBe(json.designs[i].goal_value));
    expect(csv.records.filter((r) => r.best === '*').length).toBeGreaterThanOrEqual(1);
  }, 60_000);
});

describe('csvText (the one CSV writer)', () => {
  test('quotes what needs quoting (RFC 4180) and reads back exactly', () => {
    const rows = [
      ['a, with comma', 'say "hi"', 'two\nlines', -1.5e-17, 0],
      ['plain', '', ' spaced ', 42, 1e300],
    ];
    const text = csvText(['x', 'y', 'z', 'n', 'm'], rows);
    const back = parseCsvStrict(text);
    expect(back.rows).toEqual(rows.map((r) => r.map(String)));
  });

  test('refuses a row of another length and a number that is not finite (internal errors, never written)', () => {
    expect(() => csvText(['a', 'b'], [[1]])).toThrow(/internal/);
    expect(() => csvText(['a'], [[Number.NaN]])).toThrow(/internal/);
    expect(() => csvText(['a'], [[Infinity]])).toThrow(/internal/);
  });
});
