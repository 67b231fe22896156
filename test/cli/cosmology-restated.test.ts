/**
 * forecast, compare and plan restate the cosmology they used (docs/outputs.md, "cosmology": every output
 * that uses a cosmology restates it). Both depend on it (volumes, distances, cosmic variance) but
 * said nothing of it, so that two files of different cosmologies were compared side by side without
 * a word (found by a trial user). Expected values: the planck2018 preset's H0 = 67.66 km/s/Mpc and
 * Omega_m = 0.3111 (Planck Collaboration 2020, A&A 641, A6, Table 2), and the sample's own
 * h0: 70, omega_m: 0.3 as written; the block is the one predict gives for the same file.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { runCli } from './helpers.js';
import { tempDir } from '../support/temp.js';

const ajv = new Ajv2020({ strict: false });
const forecastSchema = ajv.compile(JSON.parse(readFileSync('specs/forecast.schema.json', 'utf8')));
const compareSchema = ajv.compile(JSON.parse(readFileSync('specs/compare.schema.json', 'utf8')));
const planSchema = ajv.compile(JSON.parse(readFileSync('specs/plan.schema.json', 'utf8')));

const SAMPLE = 'samples/halpha-narrowband.yaml';

/** The H-alpha sample with the planck2018 preset in place of its h0: 70, omega_m: 0.3. */
function planckVariant(): string {
  const text = readFileSync(SAMPLE, 'utf8');
  const edited = text.replace(/cosmology:\n {2}h0: 70\n {2}omega_m: 0\.3\n/, 'cosmology: {preset: planck2018}\n');
  expect(edited).not.toBe(text);
  const path = join(tempDir('skytally-cosmology-restated-'), 'halpha-planck.yaml');
  writeFileSync(path, edited);
  return path;
}

async function json(argv: string[]): Promise<Record<string, unknown>> {
  const r = await runCli([...argv, '--format', 'json']);
  expect(r.code, r.stderr).toBe(0);
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

describe('forecast restates the cosmology', () => {
  test("its JSON holds predict's cosmology block, its table the cosmology line", async () => {
    const planck = planckVariant();
    for (const [file, h0, omegaM] of [
      [SAMPLE, 70, 0.3],
      [planck, 67.66, 0.3111],
    ] as const) {
      const f = await json(['forecast', file]);
      expect(forecastSchema(f), JSON.stringify(forecastSchema.errors)).toBe(true);
      const p = await json(['predict', file]);
      expect(f.cosmology).toEqual(p.cosmology);
      expect(f.cosmology).toMatchObject({ h0, omega_m: omegaM });
      const table = (await runCli(['forecast', file])).stdout;
      expect(table).toMatch(new RegExp(`^Cosmology: flat Lambda-CDM, H0 = ${h0} km/s/Mpc, Omega_m = ${omegaM},`, 'm'));
    }
  });
});

describe("compare restates each file's cosmology and says when they differ", () => {
  test('two files of one cosmology: one line, no note', async () => {
    const c = await json(['compare', SAMPLE, SAMPLE]);
    expect(compareSchema(c), JSON.stringify(compareSchema.errors)).toBe(true);
    const surveys = c.surveys as { cosmology: Record<string, unknown> }[];
    expect(surveys.map((s) => s.cosmology)).toEqual([surveys[0]!.cosmology, surveys[0]!.cosmology]);
    expect(surveys[0]!.cosmology).toMatchObject({ h0: 70, omega_m: 0.3 });
    expect((c.notes as string[]).filter((n) => /cosmolog/.test(n))).toEqual([]);
    const table = (await runCli(['compare', SAMPLE, SAMPLE])).stdout;
    expect(table.match(/^Cosmology: flat Lambda-CDM, H0 = 70 km\/s\/Mpc/gm)).toHaveLength(1);
  });

  test('files of different cosmologies: each one named, and a note', async () => {
    const planck = planckVariant();
    const c = await json(['compare', SAMPLE, planck]);
    expect(compareSchema(c), JSON.stringify(compareSchema.errors)).toBe(true);
    const surveys = c.surveys as { cosmology: Record<string, unknown> }[];
    expect(surveys[0]!.cosmology).toMatchObject({ h0: 70, omega_m: 0.3 });
    expect(surveys[1]!.cosmology).toMatchObject({ h0: 67.66, omega_m: 0.3111, preset: 'planck2018' });
    const note = (c.notes as string[]).find((n) => /different cosmologies/.test(n));
    expect(note).toMatch(/\[1\] H0 = 70, Omega_m = 0\.3,/);
    expect(note).toMatch(/\[2\] H0 = 67\.66, Omega_m = 0\.3111,.*\(preset planck2018\)/);
    const table = (await runCli(['compare', SAMPLE, planck])).stdout;
    expect(table).toMatch(/^\[1\] cosmology: flat Lambda-CDM, H0 = 70 km\/s\/Mpc/m);
    expect(table).toMatch(/^\[2\] cosmology: flat Lambda-CDM, H0 = 67\.66 km\/s\/Mpc/m);
    expect(table).toMatch(/^Note: The files assume different cosmologies/m);
  });
});

describe('plan restates the cosmology', () => {
  test("its JSON holds predict's block (the planck2018 preset of the sample), its table the line", async () => {
    const file = 'samples/plan-uv-deep-wide.yaml';
    const pl = await json(['plan', file]);
    expect(planSchema(pl), JSON.stringify(planSchema.errors)).toBe(true);
    const p = await json(['predict', file]);
    expect(pl.cosmology).toEqual(p.cosmology);
    expect(pl.cosmology).toMatchObject({ h0: 67.66, omega_m: 0.3111, preset: 'planck2018' });
    const table = (await runCli(['plan', file])).stdout;
    expect(table).toMatch(/^Cosmology: flat Lambda-CDM, H0 = 67\.66 km\/s\/Mpc, Omega_m = 0\.3111,/m);
  });
});
