/**
 * `skytally forecast` through run(argv, io): formats, --out, the JSON schema
 * (specs/forecast.schema.json, checked with ajv), and bad options (exit 2, one sentence, nothing
 * written). Plumbing only: the numbers are checked against references in fisher.test.ts and mocks.test.ts.
 */
import { describe, expect, test } from 'vitest';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { runCli } from '../cli/helpers.js';
import { run } from '../../src/cli/index.js';
import { loadSurveyFile } from '../../src/survey/load.js';
import { forecast } from '../../src/forecast/forecast.js';
import { predict } from '../../src/counts/predict.js';
import { parseCsvStrict } from '../render/csv-helpers.js';
import { tempDir } from '../support/temp.js';
import { sampleCommand } from '../support/sample-commands.js';

// Forecasts vary a single Schechter function: double Schechter samples are refused (tested below).
const ALL = readdirSync('samples').filter((f) => f.endsWith('.yaml') && !f.startsWith('plan'));
const isDouble = (f: string) => readFileSync(`samples/${f}`, 'utf8').includes('double_schechter');
// Forecasts count by true redshift: samples with photometric-redshift scatter are refused (tested below).
const isPhotoZ = (f: string) => /photo_z: \{sigma: 0\.0*[1-9]/.test(readFileSync(`samples/${f}`, 'utf8'));
const SAMPLES = ALL.filter((f) => !isDouble(f) && !isPhotoZ(f));
const schema = JSON.parse(readFileSync('specs/forecast.schema.json', 'utf8'));
const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema);

describe('forecast command', () => {
  test.each(SAMPLES)('%s: json (valid against the schema), table and csv', async (f) => {
    const json = await runCli([
      'forecast',
      `samples/${f}`,
      '--no-cosmic-variance',
      '--format',
      'json',
      '--mocks',
      '8',
      '--target',
      'alpha=0.02',
    ]);
    expect(json.stderr).toBe('');
    expect(json.code).toBe(0);
    const doc = JSON.parse(json.stdout);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(json.stdout).not.toMatch(/NaN|Infinity/);
    expect(doc.cosmic_variance).toBe(false);
    expect(doc.fisher.sigma).toEqual(doc.fisher_poisson_only.sigma);
    expect(doc.mocks.count).toBe(8);
    expect(Object.keys(doc.requirement.target)).toEqual(['alpha']);
    const table = await runCli(['forecast', `samples/${f}`, '--no-cosmic-variance']);
    expect(table.code).toBe(0);
    expect(table.stdout).toContain('Assumed model');
    expect(table.stdout).toContain('only as good as the luminosity function assumed');
    const csv = await runCli(['forecast', `samples/${f}`, '--no-cosmic-variance', '--format', 'csv']);
    expect(csv.code).toBe(0);
    const parsed = parseCsvStrict(csv.stdout);
    expect(parsed.rows.length).toBe(3);
    expect(parsed.header.slice(0, 4)).toEqual(['parameter', 'input', 'sigma_fisher', 'sigma_poisson_only']);
  });

  test('the mock column is "mock offset", never read as galaxy bias (failed before: "bias [s.e.]")', async () => {
    const f = `samples/${SAMPLES[0]}`;
    const table = await runCli(['forecast', f, '--no-cosmic-variance', '--mocks', '4']);
    expect(table.stdout).toContain('mock offset [s.e.]');
    expect(table.stdout).not.toContain('bias [s.e.]');
    const csv = parseCsvStrict(
      (await runCli(['forecast', f, '--no-cosmic-variance', '--mocks', '4', '--format', 'csv'])).stdout,
    );
    expect(csv.header).toContain('mock_offset_in_standard_errors');
    expect(csv.header.some((h) => h.includes('bias'))).toBe(false);
  });

  test('JSON equals the library result', async () => {
    const f = `samples/${SAMPLES[0]}`;
    const out = await runCli(['forecast', f, '--no-cosmic-variance', '--format', 'json']);
    const lib = await forecast(loadSurveyFile(f), { cosmicVariance: false });
    expect(JSON.parse(out.stdout)).toEqual(JSON.parse(JSON.stringify(lib)));
  });

  test('--out writes the file and nothing to stdout', async () => {
    const dir = tempDir('skytally-');
    const out = join(dir, 'f.json');
    const r = await runCli([
      'forecast',
      `samples/${SAMPLES[0]}`,
      '--no-cosmic-variance',
      '--format',
      'json',
      '--out',
      out,
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    expect(validate(JSON.parse(readFileSync(out, 'utf8')))).toBe(true);
  });

  test.each([
    ['unknown parameter name', 'beta=0.1', /"beta" is not a parameter/],
    ['non-positive value', 'alpha=0', /must be a positive number/],
    ['negative value', 'alpha=-0.1', /must be a positive number/],
    ['not a number', 'alpha=abc', /must be a positive number/],
    ['no equals sign', 'alpha', /not of the form name=sigma/],
    ['given twice', 'alpha=0.1,alpha=0.2', /given twice/],
  ])('bad --target (%s): exit 2, one sentence, nothing written', async (_what, target, message) => {
    const dir = tempDir('skytally-');
    const out = join(dir, 'f.json');
    const r = await runCli([
      'forecast',
      `samples/${SAMPLES[0]}`,
      '--no-cosmic-variance',
      '--target',
      target,
      '--out',
      out,
    ]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(message);
    expect(r.stderr).toMatch(/--target/);
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(r.stderr.trim()).toMatch(/\.$/);
    expect(existsSync(out)).toBe(false);
  });

  test.each([
    ['--mocks', '0'],
    ['--mocks', '2.5'],
    ['--seed', '-1'],
    ['--workers', '0'],
    ['--workers', '100000'],
    ['--population', 'no such population'],
  ])('bad %s %s: exit 2 with one sentence', async (opt, value) => {
    const r = await runCli(['forecast', `samples/${SAMPLES[0]}`, '--no-cosmic-variance', opt, value]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(opt);
    expect(r.stderr.trim().split('\n').length).toBe(1);
  });

  test("--workers above the machine's cores is a cap, not refused: the same JSON as --workers 1 (docs/outputs.md)", async () => {
    // (failed before on a 2-core machine: "not a whole number from 1 to 2")
    const args = ['forecast', `samples/${SAMPLES[0]}`, '--no-cosmic-variance', '--mocks', '8', '--format', 'json'];
    const many = await runCli([...args, '--workers', '256']);
    const one = await runCli([...args, '--workers', '1']);
    expect(many.code, many.stderr).toBe(0);
    expect(many.stdout).toBe(one.stdout);
    const tooMany = await runCli([...args, '--workers', '257']);
    expect(tooMany.code).toBe(2);
    expect(tooMany.stderr).toContain('from 1 to 256');
  });

  test.each(ALL.filter(isDouble))(
    '%s: a double Schechter population is refused with one sentence (exit 2)',
    async (f) => {
      const r = await sampleCommand(['forecast', `samples/${f}`, '--format', 'json']);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toContain('population.shape');
      expect(r.stderr.trim().split('\n').length).toBe(1);
    },
  );

  test('a double Schechter population listed second is named by its own key, populations[1].shape (failed before: population.shape, a key the file does not have)', async () => {
    const text = [
      'format: 1',
      'cosmology: {h0: 70, omega_m: 0.3}',
      'area: 2.0',
      'redshift: {min: 0.2, max: 1.0}',
      'detection: {kind: threshold, limit: 9.5}',
      'populations:',
      '  - {name: single, variable: luminosity, log10_phi_star: -3, log10_l_star: 10.7, alpha: -1.2}',
      '  - {name: double, shape: double_schechter, variable: luminosity, log10_l_star: 10.7, log10_phi_star_1: -2.8, alpha_1: -0.45, log10_phi_star_2: -3.4, alpha_2: -1.5}',
      '',
    ].join('\n');
    const path = join(tempDir('skytally-double-second-'), 'two.yaml');
    writeFileSync(path, text);
    const r = await runCli(['forecast', path, '--population', 'double', '--no-cosmic-variance']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('populations[1].shape');
    expect(r.stderr.trim().split('\n').length).toBe(1);
  });

  test.each(ALL.filter(isPhotoZ))(
    '%s: photometric-redshift scatter is refused with one sentence (exit 2)',
    async (f) => {
      const r = await sampleCommand(['forecast', `samples/${f}`, '--format', 'json']);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toContain('detection.photo_z');
      expect(r.stderr.trim().split('\n').length).toBe(1);
    },
  );

  test('progress bar on stderr only when stderr is a terminal', async () => {
    let err = '';
    let out = '';
    const io = {
      stdout: (t: string) => (out += t),
      stderr: (t: string) => (err += t),
      cwd: process.cwd(),
      stderrIsTTY: true,
    };
    const code = await run(
      ['forecast', `samples/${SAMPLES[1]}`, '--no-cosmic-variance', '--mocks', '5', '--format', 'json'],
      io,
    );
    expect(code).toBe(0);
    expect(err).toMatch(/mock surveys {3}\[#+\] 5\/5 {2}in .+ s *\n$/);
    expect(JSON.parse(out).mocks.count).toBe(5);
    const piped = await runCli([
      'forecast',
      `samples/${SAMPLES[1]}`,
      '--no-cosmic-variance',
      '--mocks',
      '5',
      '--format',
      'json',
    ]);
    expect(piped.stderr).toBe('');
  });

  test.each(SAMPLES)(
    '%s: with cosmic variance (default), the slice fractions are those predict reports (1e-9) and widen the Fisher sigmas',
    async (f) => {
      // shared with the files that read the same run (test/support/sample-commands.ts)
      const r = await sampleCommand(['forecast', `samples/${f}`, '--format', 'json']);
      expect(r.stderr).toBe('');
      expect(r.code).toBe(0);
      const doc = JSON.parse(r.stdout);
      expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
      expect(doc.cosmic_variance).toBe(true);
      const pred = predict(loadSurveyFile(`samples/${f}`));
      // 1e-9 relative: the forecast's fractions take its density grid's slice counts, predict's the
      // count engine's, different quadratures of the same integral (test/forecast/cosmic-variance-input.test.ts)
      doc.slices.forEach((s: { cosmic_variance_fraction: number }, i: number) => {
        const expected = pred.populations[0]!.slices[i]!.uncertainty!.cosmic_variance_fraction;
        expect(Math.abs(s.cosmic_variance_fraction - expected)).toBeLessThanOrEqual(1e-9 * expected);
      });
      for (const n of doc.parameters)
        expect(doc.fisher.sigma[n]).toBeGreaterThanOrEqual(doc.fisher_poisson_only.sigma[n] * (1 - 1e-12));
      expect(doc.fisher.sigma.log10_phi_star).toBeGreaterThan(doc.fisher_poisson_only.sigma.log10_phi_star);
    },
  );
});
