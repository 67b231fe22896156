/**
 * Command-line input that used to be taken loosely or reported as an internal failure: every
 * case is exit 2 with one sentence naming the option or key (or a correct, finite output).
 * Ranges and caps are the ones stated in README.md ("Limits") and src/model/limits.ts.
 */
import { tempDir } from '../support/temp.js';
import fc from 'fast-check';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runCli, type Captured } from './helpers.js';

function refused(r: Captured, name: string): void {
  expect(r.code, r.stderr).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.trim().split('\n');
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(/^skytally: .+\.$/);
  expect(lines[0]).toContain(name);
  expect(r.stderr).not.toContain('internal failure');
}

/**
 * A refusal of an option in the form of the parser's own refusals (src/cli/refusals.ts), which
 * name the command: "skytally: report --format: ...".
 */
function refusedOption(r: Captured, command: string, option: string): void {
  refused(r, option);
  expect(r.stderr).toMatch(new RegExp(`^skytally: ${command} ${option}: `));
}

function finiteEverywhere(v: unknown): boolean {
  if (typeof v === 'number') return Number.isFinite(v);
  if (Array.isArray(v)) return v.every(finiteEverywhere);
  if (v !== null && typeof v === 'object') return Object.values(v).every(finiteEverywhere);
  return true;
}

const dir = tempDir('skytally-options-');
function surveyWith(from: string, to: string, sample = 'samples/halpha-narrowband.yaml'): string {
  const text = readFileSync(sample, 'utf8');
  expect(text).toContain(from);
  const path = join(dir, `s${Math.random().toString(36).slice(2)}.yaml`);
  writeFileSync(path, text.replace(from, to));
  return path;
}

describe('numeric options are decimal numbers, strictly', () => {
  test.each([
    [['forecast', 'samples/halpha-narrowband.yaml', '--seed', ''], '--seed'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--seed', ' 1'], '--seed'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--mocks', '0x10'], '--mocks'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--mocks', '0b11'], '--mocks'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--mocks', '10001'], '--mocks'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--workers', '0x1'], '--workers'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--target', 'alpha=0x1'], '--target'],
    [['report', 'samples/halpha-narrowband.yaml', '--mocks', '1000000'], '--mocks'],
    [['plan', 'samples/plan-uv-deep-wide.yaml', '--workers', ''], '--workers'],
    [['distances', '--z', '0x10'], '--z'],
    [['distances', '--z', '1,,2'], '--z'],
    [['distances', '--z', 'Infinity'], '--z'],
    [['distances', '--z', '1', '--h0', '0x46'], '--h0'],
    [['distances', '--z', '1', '--omega-m', ''], '--omega-m'],
    [['clustering', '--z', '1', '--sigma8', '0b1'], '--sigma8'],
    [['predict', 'samples/halpha-narrowband.yaml', '--draws', '0'], '--draws'],
    [['report', 'samples/halpha-narrowband.yaml', '--draws', '1.5', '--format', 'json'], '--draws'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--target', 'beta=0.1'], '--target'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--model-draws', '0'], '--model-draws'],
    [['predict', 'samples/halpha-narrowband.yaml', '--out', ''], '--out'],
    [['predict', 'samples/halpha-narrowband.yaml', '--figures', ''], '--figures'],
  ])('%j', async (argv, name) => {
    // the command's own checks name the command as the parser's refusals do (failed before: "skytally: --seed: ...")
    refusedOption(await runCli(argv), argv[0]!, name);
  });
});

describe('an option refused for what a file holds names the command, the option, then the file', () => {
  test.each([
    [
      ['forecast', 'samples/halpha-narrowband.yaml', '--model-draws', '10'],
      '--model-draws',
      'has no model_uncertainty',
    ],
    [['forecast', 'samples/halpha-narrowband.yaml', '--population', 'nope'], '--population', 'no population named'],
  ])('%j', async (argv, name, what) => {
    const r = await runCli(argv);
    refusedOption(r, argv[0]!, name);
    // failed before: "skytally: /path/halpha-narrowband.yaml: --model-draws: ..."
    expect(r.stderr).toMatch(new RegExp(`^skytally: ${argv[0]} ${name}: \\S*halpha-narrowband\\.yaml: .*${what}`));
  });
});

describe('compare needs at least two files', () => {
  test('none: one sentence, exit 2', async () => {
    refused(await runCli(['compare']), 'compare');
  });
  test('one: one sentence, exit 2', async () => {
    refused(await runCli(['compare', 'samples/halpha-narrowband.yaml']), 'compare');
  });
});

describe('an option that takes a value is given once', () => {
  test.each([
    // commander kept the last and dropped the first without a word (failed before: exit 0)
    [
      ['forecast', 'samples/halpha-narrowband.yaml', '--target', 'alpha=0.05', '--target', 'log10_l_star=0.05'],
      '--target',
    ],
    [['predict', 'samples/halpha-narrowband.yaml', '--seed', '1', '--seed=2'], '--seed'],
    [['predict', 'samples/halpha-narrowband.yaml', '--format', 'json', '--format', 'csv'], '--format'],
    [['distances', '--z', '0.5', '--z', '1'], '--z'],
  ])('%j', async (argv, name) => {
    const r = await runCli(argv);
    refused(r, `${name}: is given twice; give it once`);
    refusedOption(r, argv[0]!, name);
  });

  test('several targets go in one list, and a flag given twice is harmless', async () => {
    const r = await runCli([
      'forecast',
      'samples/halpha-narrowband.yaml',
      '--target',
      'alpha=0.05',
      '--target',
      'alpha=0.1',
    ]);
    refused(r, '--target alpha=0.05,log10_phi_star=0.1');
    const both = await runCli([
      'forecast',
      'samples/halpha-narrowband.yaml',
      '--target',
      'alpha=0.05,log10_l_star=0.05',
      '--format',
      'json',
    ]);
    expect(both.code, both.stderr).toBe(0);
    expect(Object.keys(JSON.parse(both.stdout).requirement.target).sort()).toEqual(['alpha', 'log10_l_star']);
    const twice = await runCli([
      'forecast',
      'samples/halpha-narrowband.yaml',
      '--no-cosmic-variance',
      '--no-cosmic-variance',
    ]);
    expect(twice.code, twice.stderr).toBe(0);
  });
});

describe('input once reported as an internal failure', () => {
  test.each([
    ['omega_b equal to omega_m', 'omega_m: 0.3', 'omega_m: 0.3\n  omega_b: 0.3', 'cosmology.omega_b'],
    ['t_cmb 1e6 K', 'omega_m: 0.3', 'omega_m: 0.3\n  t_cmb: 1e6', 'cosmology.t_cmb'],
    ['preset __proto__', '  h0: 70\n  omega_m: 0.3', '  preset: __proto__', 'cosmology.preset'],
    ['preset constructor', '  h0: 70\n  omega_m: 0.3', '  preset: constructor', 'cosmology.preset'],
    ['preset toString', '  h0: 70\n  omega_m: 0.3', '  preset: toString', 'cosmology.preset'],
    ['completeness width 1e9', 'width: 0.08', 'width: 1e9', 'detection.completeness.width'],
    ['completeness width 1e-300', 'width: 0.08', 'width: 1e-300', 'detection.completeness.width'],
    [
      'slice edges 1.2 and 1.2000000000000002',
      'slices: {count: 5}',
      'redshift: {min: 0.7, max: 1.3}\nslices: {edges: [1.2, 1.2000000000000002]}',
      'slices.edges[1]',
    ],
    [
      'a window 1 to 1.000000000000001',
      'slices: {count: 5}',
      'redshift: {min: 1, max: 1.000000000000001}\nslices: {count: 5}',
      'redshift.max',
    ],
    ['a histogram of width 1e-9', 'histogram: {width: 0.1}', 'histogram: {width: 1e-9}', 'histogram.width'],
    ['alpha -1.8e26', 'alpha: -1.45', 'alpha: -1.8e26', 'population.alpha'],
  ])('predict: %s', async (_name, from, to, key) => {
    const file = surveyWith(from, to);
    refused(await runCli(['predict', file, '--format', 'json']), key);
  });

  test('a self-referring alias (a: &a [*a])', async () => {
    const file = join(dir, 'alias.yaml');
    writeFileSync(file, 'a: &a [*a]\n');
    refused(await runCli(['predict', file]), 'alias');
  });

  test.each([
    [
      'plan.reference.limit 1e300',
      'reference: {limit: 28.0, exposure_hours: 1.0}',
      'reference: {limit: 1e300, exposure_hours: 1.0}',
      'plan.reference.limit',
    ],
    [
      'plan.exposure_grid.max_hours 1e300',
      /exposure_grid: \{[^}]*\}/,
      'exposure_grid: {min_hours: 0.05, max_hours: 1e300, count: 100}',
      'plan.exposure_grid.max_hours',
    ],
    [
      'a 3-tier grid of 100,000 exposures',
      /exposure_grid: \{[^}]*\}/,
      'exposure_grid: {min_hours: 0.05, max_hours: 50, count: 100000}\n  tiers: 3',
      'plan.exposure_grid.count',
    ],
    [
      'a 1-tier grid of 1e6 exposures',
      /exposure_grid: \{[^}]*\}/,
      'exposure_grid: {min_hours: 0.05, max_hours: 50, count: 1000000}',
      'plan.exposure_grid.count',
    ],
    ['budget_hours 1e300', /budget_hours: [0-9.]+/, 'budget_hours: 1e300', 'plan.budget_hours'],
  ])('plan: %s', async (_name, from, to, key) => {
    const text = readFileSync('samples/plan-uv-deep-wide.yaml', 'utf8');
    const untiered = text.replace(/\n\s*tiers: \d+/, '');
    const edited = untiered.replace(from, to);
    expect(edited).not.toBe(untiered);
    const file = join(dir, `plan-${key}.yaml`);
    writeFileSync(file, edited);
    refused(await runCli(['plan', file, '--format', 'json']), key);
  });

  test.each([
    [['distances', '--z', '1e308'], '--z'],
    [['distances', '--z', '1', '--preset', '__proto__'], '--preset'],
    [['distances', '--z', '1', '--preset', 'constructor'], '--preset'],
    [['distances', '--z', '1', '--preset', 'toString'], '--preset'],
    [['distances', '--z', '1', '--t-cmb', '100'], '--t-cmb'],
    [['clustering', '--z', '0', '--radius-mpc', '1e-300'], '--radius-mpc'],
    [['clustering', '--z', '0', '--mass-msun', '1e300'], '--mass-msun'],
    [['clustering', '--z', '1e6'], '--z'],
    [['clustering', '--z', '0', '--omega-b', '0.3'], '--omega-b'],
    // a survey's cosmology with any cosmology flag: refused, for the background and the power spectrum's flags alike
    [['clustering', '--z', '1', '--survey', 'samples/deep-continuum.yaml', '--sigma8', '0.8'], '--survey'],
    [['clustering', '--z', '1', '--survey', 'samples/deep-continuum.yaml', '--h0', '70'], '--survey'],
  ])('%j', async (argv, name) => {
    refused(await runCli(argv), name);
  });

  test('a list value out of range gives the range as README.md states it (failed before: "from 1000 to 1000000000000000000")', async () => {
    // README.md, Limits: clustering masses 1e3 to 1e18 Msun, radii 0.001 to 10,000 Mpc
    const mass = await runCli(['clustering', '--z', '0', '--mass-msun', '1e20']);
    refusedOption(mass, 'clustering', '--mass-msun');
    expect(mass.stderr).toBe(
      'skytally: clustering --mass-msun: 1e20 is outside the allowed range; give values from 1000 to 1e18.\n',
    );
    const radius = await runCli(['clustering', '--z', '0', '--radius-mpc', '0']);
    expect(radius.stderr).toContain('give values from 0.001 to 10000.');
  });

  test('distances: every redshift and cosmology inside the ranges gives finite values (property)', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.double({ min: 0, max: 10_000, noNaN: true }), { minLength: 1, maxLength: 5 }),
        fc.double({ min: 20, max: 200, noNaN: true }),
        fc.double({ min: 0.01, max: 0.99, noNaN: true }),
        fc.constantFrom('0', '2.7255', '10'),
        async (zs, h0, omegaM, tCmb) => {
          const r = await runCli([
            'distances',
            '--z',
            zs.map((z) => z.toExponential()).join(','),
            '--h0',
            h0.toExponential(),
            '--omega-m',
            omegaM.toExponential(),
            '--t-cmb',
            tCmb,
            '--format',
            'json',
          ]);
          if (r.code === 2) {
            // only radiation beyond the critical density (a low h0 with t_cmb 10 K) may be refused
            expect(r.stderr).toContain('--t-cmb');
            expect(tCmb).toBe('10');
            return;
          }
          expect(r.code, r.stderr).toBe(0);
          expect(finiteEverywhere(JSON.parse(r.stdout))).toBe(true);
        },
      ),
      { numRuns: 60, seed: 5 },
    );
  });

  test('clustering: every redshift, radius and mass inside the ranges gives finite values (property)', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.double({ min: 0, max: 100, noNaN: true }),
        fc.double({ min: -3, max: 4, noNaN: true }),
        fc.double({ min: 3, max: 18, noNaN: true }),
        async (z, logR, logM) => {
          const r = await runCli([
            'clustering',
            '--z',
            z.toExponential(),
            '--radius-mpc',
            (10 ** logR).toExponential(),
            '--mass-msun',
            (10 ** logM).toExponential(),
            '--format',
            'json',
          ]);
          expect(r.code, r.stderr).toBe(0);
          expect(finiteEverywhere(JSON.parse(r.stdout))).toBe(true);
        },
      ),
      { numRuns: 40, seed: 9 },
    );
  });
});

describe('nothing read is echoed unescaped', () => {
  test('a path with control characters and a line break comes out as one escaped line', async () => {
    const r = await runCli(['predict', join(dir, 'no\u001b[31mred\nsecond.yaml')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).not.toContain('\u001b');
    expect(r.stderr).toContain('\\x1b[31m');
  });

  test('a population name with control characters: warnings are escaped too', async () => {
    const file = join(dir, 'warned.yaml');
    // a band at 0.6 um lies blueward of Lyman alpha above z = 3.9: a warning naming the population
    const text = readFileSync('samples/deep-continuum.yaml', 'utf8')
      .replace('name: UV-selected galaxies', 'name: "UV\\e[2J\\nselected"')
      .replace('band: "1.5 um"', 'band: "0.6 um"');
    writeFileSync(file, text);
    const r = await runCli(['predict', file]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('warning');
    // the escape is shown escaped; the line break becomes a space (a warning is one line)
    expect(r.stderr).toContain('UV\\x1b[2J selected');
    expect(r.stderr).not.toContain('\u001b');
  });
});

describe("the other variable's knee named as a parameter says which this population has", () => {
  test("forecast --target, the library's targets and plan's goal (failed before: 'not a parameter', or 'did you mean log10_phi_star?' for log10_l_star)", async () => {
    // a luminosity population's parameters are log10_phi_star, log10_l_star, alpha; a magnitude
    // population's log10_phi_star, m_star, alpha (src/model/population.ts, parameterNames)
    const line = await runCli(['forecast', 'samples/halpha-narrowband.yaml', '--target', 'm_star=0.1']);
    refusedOption(line, 'forecast', '--target');
    expect(line.stderr).toContain(
      `"m_star" is not a parameter of this population (a luminosity population's knee is log10_l_star); use one of log10_phi_star, log10_l_star, alpha.`,
    );
    const uv = await runCli(['forecast', 'samples/dropout-field.yaml', '--target', 'log10_l_star=0.1']);
    refusedOption(uv, 'forecast', '--target');
    expect(uv.stderr).toContain("(a magnitude population's knee is m_star)");
    const { forecast, loadSurveyFile } = await import('../../src/index.js');
    await expect(
      forecast(loadSurveyFile('samples/halpha-narrowband.yaml'), { targets: { m_star: 0.1 } }),
    ).rejects.toMatchObject({ code: 'bad_option', keyPath: 'targets.m_star' });
    await expect(
      forecast(loadSurveyFile('samples/halpha-narrowband.yaml'), { targets: { m_star: 0.1 } }),
    ).rejects.toThrow("(a luminosity population's knee is log10_l_star)");
    // plan: the sample's goal, sigma of alpha, written as the knee of the luminosity variable
    const dir = tempDir('skytally-knee-');
    const file = join(dir, 'plan.yaml');
    const text = readFileSync('samples/plan-uv-deep-wide.yaml', 'utf8');
    expect(text).toContain('goal: {sigma: alpha}');
    writeFileSync(file, text.replace('goal: {sigma: alpha}', 'goal: {sigma: log10_l_star}'));
    const plan = await runCli(['plan', file]);
    refused(plan, 'plan.goal.sigma');
    expect(plan.stderr).toContain(
      `but must name a parameter of "UV-selected galaxies" (a magnitude population's knee is m_star); use one of log10_phi_star, m_star, alpha.`,
    );
    expect(plan.stderr).not.toContain('did you mean');
  });
});

describe('options of the mock fits without mocks', () => {
  test.each<[string[]]>([[['--list-mock-fits']], [['--estimator', 'sty']], [['--estimator', 'ml']]])(
    'forecast %j without --mocks is refused naming it (failed before: exit 0, the option ignored)',
    async (flag) => {
      const r = await runCli(['forecast', 'samples/halpha-narrowband.yaml', ...flag]);
      refusedOption(r, 'forecast', flag[0]!);
      expect(r.stderr).toContain('applies to the fits of mock surveys, but none are drawn; add --mocks N');
    },
  );
});

describe('options that would change nothing for the file or the other options', () => {
  // An option asking for something the run cannot give is refused (as forecast --model-draws is on
  // a file without model_uncertainty); one that only fixes how work not done would be done (a seed
  // where nothing is drawn, --no-png without --figures) leaves the output as it is, with a note.
  test.each([
    [['predict', 'samples/halpha-narrowband.yaml', '--draws', '100'], 'no population has a model_uncertainty block'],
    [
      ['report', 'samples/halpha-narrowband.yaml', '--draws', '100', '--format', 'json'],
      'no population has a model_uncertainty block',
    ],
    [
      ['predict', 'test/reference/surveys-model/narrowband-draws-file.yaml', '--draws', '100'],
      "every population's model_uncertainty is a draws_file, whose rows are each drawn once",
    ],
  ])('%j is refused naming the option and the file (failed before: exit 0, --draws ignored)', async (argv, what) => {
    const out = join(dir, `draws-${argv[0]}.json`);
    const r = await runCli([...argv, '--out', out]);
    refusedOption(r, argv[0]!, '--draws');
    expect(r.stderr).toMatch(new RegExp(`^skytally: ${argv[0]} --draws: \\S*\\.yaml: `));
    expect(r.stderr).toContain(what);
    expect(existsSync(out)).toBe(false);
  });

  test('predict --draws on a file with model_uncertainty is taken (no note, no refusal)', async () => {
    const r = await runCli([
      'predict',
      'samples/mass-limited.yaml',
      '--draws',
      '50',
      '--seed',
      '2',
      '--format',
      'json',
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).not.toContain('note:');
    expect(
      (JSON.parse(r.stdout) as { totals: { luminosity_density: { model: { draws: number } } } }).totals
        .luminosity_density.model.draws,
    ).toBe(50);
  });

  test.each([
    [
      ['predict', 'samples/halpha-narrowband.yaml', '--seed', '7'],
      '--seed',
      'no population has a model_uncertainty block',
    ],
    [
      ['predict', 'test/reference/surveys-model/narrowband-draws-file.yaml', '--seed', '7'],
      '--seed',
      'draws_file, read row by row',
    ],
    [['forecast', 'samples/halpha-narrowband.yaml', '--seed', '7'], '--seed', 'no --mocks, and no --model-draws'],
    [
      ['forecast', 'test/reference/surveys-model/narrowband-draws-file.yaml', '--model-draws', '5', '--seed', '7'],
      '--seed',
      'the rows of the draws_file',
    ],
    [['report', 'samples/halpha-narrowband.yaml', '--seed', '7', '--format', 'json'], '--seed', 'no --mocks'],
    [['predict', 'samples/halpha-narrowband.yaml', '--no-png'], '--no-png', 'without --figures DIR'],
    [['forecast', 'samples/halpha-narrowband.yaml', '--no-png'], '--no-png', 'without --figures DIR'],
    [['plan', 'samples/plan-halpha-layers.yaml', '--no-png'], '--no-png', 'without --figures DIR'],
    [['report', 'samples/halpha-narrowband.yaml', '--no-png', '--format', 'json'], '--no-png', 'without --figures DIR'],
    // a count goal: cosmic variance enters a plan only through a sigma goal (failed before: no word)
    [
      [
        'plan',
        surveyWith('goal: {sigma: log10_l_star}', 'goal: count', 'samples/plan-halpha-layers.yaml'),
        '--no-cosmic-variance',
      ],
      '--no-cosmic-variance',
      'the goal is the count, which cosmic variance does not enter',
    ],
  ])(
    '%j gives the output it gives without the option, and one note naming it (failed before: no word)',
    async (argv, flag, why) => {
      const i = argv.indexOf(flag);
      const without = argv.filter((_, k) => k !== i && !(flag === '--seed' && k === i + 1));
      const [r, plain] = [await runCli(argv), await runCli(without)];
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toBe(plain.stdout);
      const notes = r.stderr.split('\n').filter((l) => l.startsWith('skytally: note:'));
      expect(notes).toHaveLength(1);
      expect(notes[0]).toMatch(new RegExp(`^skytally: note: ${argv[0]} ${flag}: .*, so it changes nothing\\.$`));
      expect(notes[0]).toContain(why);
      expect(plain.stderr).not.toContain('note:');
    },
  );

  test.each([
    [['predict', 'samples/mass-limited.yaml', '--seed', '7', '--format', 'json']],
    [['forecast', 'samples/halpha-narrowband.yaml', '--mocks', '3', '--seed', '7', '--format', 'json']],
    [['report', 'samples/mass-limited.yaml', '--seed', '7', '--format', 'json']],
    [['plan', 'samples/plan-halpha-layers.yaml', '--no-cosmic-variance', '--format', 'json']],
  ])('%j: the option changes the output, so there is no note', async (argv) => {
    const r = await runCli(argv);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).not.toContain('note:');
  });
});
