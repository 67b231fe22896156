/**
 * The command-line program through run(argv, io), plus a few real subprocess runs of the built
 * bin (bin/skytally.js). Expected values are the library's own results (the numbers themselves
 * are checked against references in test/counts and test/cosmology); here we check plumbing:
 * formats, --out, exit codes and error sentences.
 */
import { describe, expect, test } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from './helpers.js';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { parseCsvStrict } from '../render/csv-helpers.js';
import { tempDir } from '../support/temp.js';
import { sig } from '../../src/render/format.js';
import { sampleCommand } from '../support/sample-commands.js';

const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml') && !f.startsWith('plan'));

describe('predict', () => {
  test.each(SAMPLES)('%s runs in every format', async (f) => {
    // the runs on a sample are shared with the files that read them too (test/support/sample-commands.ts)
    const json = await sampleCommand(['predict', `samples/${f}`, '--format', 'json']);
    expect(json.stderr).toBe('');
    expect(json.code).toBe(0);
    const p = JSON.parse(json.stdout);
    expect(p.format).toBe(1);
    expect(p.totals.count).toBeGreaterThan(0);
    expect(json.stdout).not.toMatch(/NaN|Infinity|null/);
    const table = await sampleCommand(['predict', `samples/${f}`]);
    expect(table.code).toBe(0);
    expect(table.stdout).toContain('Assumed model');
    expect(table.stdout).toContain('only as good as the luminosity function assumed');
    const csv = await sampleCommand(['predict', `samples/${f}`, '--format', 'csv']);
    expect(csv.code).toBe(0);
    // one row per top-level slice, or per observed bin when the populations' windows differ
    const rows = p.breakdown === 'observed' ? p.observed_bins.bins.length : p.slices!.length;
    expect(parseCsvStrict(csv.stdout).rows.length).toBe(rows);
  });

  test.each([
    ...SAMPLES.filter((f) => /model_uncertainty:/.test(readFileSync(`samples/${f}`, 'utf8'))),
    'plan-robust-uv-slope.yaml',
  ])(
    "%s: the table's and CSV's model columns are the JSON's, drawn without the histograms' and densities' draws",
    async (f) => {
      // the table and the CSV ask predict for the counts' draws only (model: {counts: true}); the
      // numbers they show must be the full run's bit for bit (the CSV writes them in full)
      const p = JSON.parse((await sampleCommand(['predict', `samples/${f}`, '--format', 'json'])).stdout);
      expect(p.totals.model).toBeDefined();
      const csv = parseCsvStrict((await sampleCommand(['predict', `samples/${f}`, '--format', 'csv'])).stdout);
      const slices = p.slices as { model: Record<string, number> }[];
      expect(csv.records.length).toBe(slices.length);
      csv.records.forEach((r, j) => {
        for (const k of ['p16', 'p50', 'p84', 'fraction'])
          expect(Number(r[`model_${k}`]), `${f} ${j} ${k}`).toBe(slices[j]!.model[k]);
      });
      const table = (await sampleCommand(['predict', `samples/${f}`])).stdout;
      const m = p.totals.model as Record<string, number>;
      expect(table).toContain(`${sig(m.p16!, 3)} - ${sig(m.p84!, 3)}`);
    },
  );

  test('JSON equals the library result', async () => {
    const f = `samples/${SAMPLES[0]}`;
    const out = await sampleCommand(['predict', f, '--format', 'json']);
    expect(out.code).toBe(0);
    const lib = predict(loadSurveyFile(f));
    expect(JSON.parse(out.stdout)).toEqual(JSON.parse(JSON.stringify(lib)));
  });

  test('--out writes the file and nothing to stdout; refuses to overwrite the input', async () => {
    const dir = tempDir('skytally-');
    const out = join(dir, 'p.json');
    const r = await runCli(['predict', `samples/${SAMPLES[0]}`, '--format', 'json', '--out', out]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    expect(JSON.parse(readFileSync(out, 'utf8')).format).toBe(1);
    const input = join(dir, 's.yaml');
    writeFileSync(input, readFileSync(`samples/${SAMPLES[0]}`));
    const bad = await runCli(['predict', input, '--out', input]);
    expect(bad.code).toBe(2);
    expect(readFileSync(input, 'utf8')).toBe(readFileSync(`samples/${SAMPLES[0]}`, 'utf8'));
  });

  test('bad input: exit 2, one sentence naming the file and key, no output written', async () => {
    const dir = tempDir('skytally-');
    const input = join(dir, 'bad.yaml');
    writeFileSync(input, readFileSync(`samples/${SAMPLES[0]}`, 'utf8').replace(/^area:.*$/m, 'area: -3'));
    const out = join(dir, 'never.json');
    const r = await runCli(['predict', input, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('bad.yaml');
    expect(r.stderr).toContain('area');
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(existsSync(out)).toBe(false);
  });

  test('unknown option and unknown command exit 2', async () => {
    expect((await runCli(['predict', `samples/${SAMPLES[0]}`, '--colour', 'red'])).code).toBe(2);
    expect((await runCli(['forecastt'])).code).toBe(2);
    expect((await runCli(['predict', `samples/${SAMPLES[0]}`, '--format', 'xml'])).code).toBe(2);
  });

  test('the parser\'s refusals read like every other: one line starting "skytally: " naming the command and the option, and what to write (failed before: "error: ...", the suggestion on a second line, then commander\'s words)', async () => {
    const cases: [string[], string][] = [
      [
        ['predict', `samples/${SAMPLES[0]}`, '--colour', 'red'],
        'skytally: predict: --colour is not an option of predict; leave it out or write one of its options (skytally predict --help lists its options).\n',
      ],
      [
        ['predikt'],
        'skytally: "predikt" is not a command of skytally; write skytally predict instead (skytally --help lists the commands).\n',
      ],
      [['predict'], 'skytally: predict: needs a survey file; write skytally predict <survey> [options].\n'],
      [
        ['predict', `samples/${SAMPLES[0]}`, '--format', 'xml'],
        'skytally: predict --format: "xml" is not one of its choices; write --format table, --format json or --format csv.\n',
      ],
    ];
    for (const [argv, stderr] of cases) {
      const r = await runCli(argv);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(stderr);
      expect(r.stdout).toBe('');
    }
  });
});

describe('distances', () => {
  test('JSON rows with every key of docs/outputs.md', async () => {
    const r = await runCli(['distances', '--z', '0.5,1,2', '--h0', '70', '--omega-m', '0.3', '--format', 'json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(Object.keys(j.cosmology)).toEqual(
      expect.arrayContaining(['h0', 'omega_m', 'omega_lambda', 'omega_r', 't_cmb']),
    );
    expect(j.rows).toHaveLength(3);
    for (const row of j.rows) {
      for (const k of [
        'z',
        'comoving_distance_mpc',
        'luminosity_distance_mpc',
        'angular_diameter_distance_mpc',
        'distance_modulus',
        'volume_element_mpc3_sr',
        'comoving_volume_gpc3',
        'lookback_time_gyr',
        'age_gyr',
      ]) {
        expect(row[k], k).toBeTypeOf('number');
      }
    }
    // D_L = (1+z)^2 D_A exactly (Hogg 1999: D_L = (1+z) D_M, D_A = D_M/(1+z)), here at z = 1
    expect(j.rows[1].luminosity_distance_mpc / (4 * j.rows[1].angular_diameter_distance_mpc)).toBeCloseTo(1, 12);
  });

  test('bad redshift list exits 2', async () => {
    const r = await runCli(['distances', '--z', '0.5,abc']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--z');
  });

  test('--survey takes the cosmology of a survey file', async () => {
    const r = await runCli(['distances', '--z', '1', '--survey', 'samples/deep-continuum.yaml', '--format', 'json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).cosmology.h0).toBe(67.66);
  });
});

describe('check', () => {
  test('prints the normalised survey', async () => {
    const r = await runCli(['check', `samples/${SAMPLES[0]}`, '--format', 'json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout)).toBeTypeOf('object');
  });
  test('the text prints each population one key per line, as the other sections (failed before: one line of JSON)', async () => {
    const r = await runCli(['check', 'samples/narrowband-interlopers.yaml']);
    expect(r.code, r.stderr).toBe(0);
    const lines = r.stdout.split('\n');
    // values as samples/narrowband-interlopers.yaml writes them (names, alpha, SFR conversions, lines)
    for (const line of [
      '  populations[0].name = H-alpha',
      '  populations[0].alpha = -1.35',
      '  populations[0].sfr_conversion.name = halpha',
      '  populations[1].name = [OIII]',
      '  populations[1].line_angstrom = 5006.8',
      '  populations[2].name = [OII]',
      '  populations[2].sfr_conversion.name = oii',
      '  populations[2].alpha = -1.3',
      // no selection effect: a list of words, empty
      '  populations[2].selection.effects = none',
    ])
      expect(lines).toContain(line);
    expect(r.stdout).not.toMatch(/\[\{|\{"/);
    // every value of the JSON's populations on a line of its own, the same value (lists of numbers as JSON)
    const json = JSON.parse(
      (await runCli(['check', 'samples/narrowband-interlopers.yaml', '--format', 'json'])).stdout,
    );
    const leaves: [string, unknown][] = [];
    const walk = (v: unknown, key: string): void => {
      if (Array.isArray(v) && v.some((x) => typeof x === 'object' && x !== null && !Array.isArray(x)))
        v.forEach((x, i) => walk(x, `${key}[${i}]`));
      else if (typeof v === 'object' && v !== null && !Array.isArray(v))
        for (const [k, x] of Object.entries(v)) walk(x, `${key}.${k}`);
      else leaves.push([key, v]);
    };
    walk(json.populations, 'populations');
    expect(leaves.length).toBeGreaterThan(40);
    const text = new Map(
      lines.filter((l) => l.startsWith('  populations')).map((l) => l.trim().split(' = ') as [string, string]),
    );
    expect(text.size).toBe(leaves.length);
    // the value, then (for a dimensional one) its unit after a space: numbers and lists of numbers
    // are JSON without spaces, and the JSON of a string is the string itself
    for (const [key, v] of leaves) {
      const shown = text.get(key)!;
      if (typeof v === 'string') expect(shown === v || shown.startsWith(`${v} (as `), key).toBe(true);
      else if (Array.isArray(v) && v.length === 0) expect(shown, key).toBe('none');
      else expect(JSON.parse(shown.split(' ')[0]!), key).toEqual(v);
    }
    // a model's uncertainty: its parameters as words (samples/plan-robust-uv-slope.yaml), sigmas one per line
    const robust = (await runCli(['check', 'samples/plan-robust-uv-slope.yaml'])).stdout.split('\n');
    expect(robust).toContain('  populations[0].model_uncertainty.parameters = log10_phi_star, m_star, alpha');
    expect(robust).toContain('  populations[0].model_uncertainty.sigmas.m_star = 0.18 mag');
  });
  test("the text gives each dimensional value the unit it is in (failed before: l_star, h0 and the completeness's x printed bare)", async () => {
    const lines = async (sample: string) => {
      const r = await runCli(['check', `samples/${sample}`]);
      expect(r.code, r.stderr).toBe(0);
      return r.stdout.split('\n');
    };
    // the units are docs/outputs.md's (the cosmology block, the model table, the detection block);
    // the values are those of each sample as written (the check of their values is the JSON's, above)
    const halpha = await lines('halpha-narrowband.yaml');
    for (const line of [
      '  cosmology.h0 = 70 km/s/Mpc',
      '  cosmology.t_cmb = 0 K',
      '  detection.limit_cgs = 4e-17 erg/s/cm^2',
      // a completeness's half for a line flux is -log10 of the flux (half: 5e-17 -> 16.30103)
      '  detection.completeness.half = 16.30102999566398 -log10 erg/s/cm^2',
      '  detection.completeness.width = 0.08 dex',
      '  populations[0].l_star = 1.9952623149688666e+42 erg/s',
      '  histogram_width = 0.1 dex',
      // without a unit: a name that states it, a redshift, a slope
      '  area_deg2 = 2.1',
      '  populations[0].alpha = -1.45',
    ])
      expect(halpha, line).toContain(line);
    // a threshold survey: L* and the limit in the unit of the file's quantity, stellar mass [Msun]
    const mass = await lines('mass-limited.yaml');
    for (const line of [
      '  populations[0].l_star = 70794578438.41373 Msun',
      '  detection.limit.at_window_min = 9.1 log10 Msun',
      '  detection.limit.as_written.table = [[0.3,9.1],[0.9,9.6],[1.5,10.1]] (z, log10 Msun)',
      // the file writes log10_phi_star as an expression: it is shown in that form, with that unit
      '  populations[0].phi_star_mpc3.as_written = -3.112215688699463 - 0.15*z (as log10_phi_star: log10 Mpc^-3)',
      '  populations[0].model_uncertainty.sigmas.log10_l_star = 0.05 dex',
    ])
      expect(mass, line).toContain(line);
    // magnitudes: M* absolute AB, the limit apparent AB
    const dropout = await lines('dropout-field.yaml');
    for (const line of [
      '  detection.limit_mag = 27.2 AB mag',
      '  populations[0].m_star.at_window_min = -21.02 absolute AB mag',
      '  populations[0].m_star.as_written = -20.95 + 0.1*(z - 4) (as m_star: absolute AB mag)',
      '  histogram_width = 0.25 mag',
    ])
      expect(dropout, line).toContain(line);
    // an L* written as log10_l_star in z is as written a log10, its values in erg/s
    const slitless = (await lines('slitless-halpha.yaml')).filter((l) => l.includes('.l_star'));
    expect(slitless).toContain('  populations[0].l_star.as_written = 41.95 + 0.3*z (as log10_l_star: log10 erg/s)');
    expect(slitless.filter((l) => l.includes('at_window')).every((l) => l.endsWith(' erg/s'))).toBe(true);
  });
  test('checks the plan section as plan and report read it: a mistyped or impossible plan key is refused', async () => {
    const dir = tempDir('skytally-check-plan-');
    const text = readFileSync('samples/plan-uv-deep-wide.yaml', 'utf8');
    expect(text).toContain('  budget_hours: 150\n');
    const cases: [string, string, RegExp][] = [
      [
        'typo.yaml',
        text.replace('  budget_hours: 150', '  budget_hour: 150'),
        /plan\.budget_hour: unknown key "budget_hour" \(did you mean budget_hours\?\)/,
      ],
      [
        'nested.yaml',
        text.replace('  exposure_grid: {min_hours:', '  exposure_grid: {mn_hours:'),
        /plan\.exposure_grid\.mn_hours: unknown key "mn_hours" \(did you mean min_hours\?\)/,
      ],
      [
        'budget.yaml',
        text.replace('  budget_hours: 150', '  budget_hours: 0.05'),
        /plan\.exposure_grid\.min_hours: .*raise budget_hours/,
      ],
    ];
    for (const [name, body, message] of cases) {
      const file = join(dir, name);
      writeFileSync(file, body);
      // check said "valid survey file" (exit 0) while plan and report refused the same file
      const checked = await runCli(['check', file]);
      expect(checked.code, name).toBe(2);
      expect(checked.stdout, name).toBe('');
      expect(checked.stderr.trim().split('\n'), name).toHaveLength(1);
      expect(checked.stderr, name).toMatch(message);
      const planned = await runCli(['plan', file]);
      expect([planned.code, planned.stderr], name).toEqual([2, checked.stderr]);
      // every other command that reads the file refuses it the same way (failed before: predict,
      // forecast, compare, distances --survey and clustering --survey read past the plan, exit 0)
      for (const argv of [
        ['predict', file],
        ['forecast', file],
        ['compare', file, 'samples/deep-continuum.yaml'],
        ['report', file, '--format', 'json'],
        ['distances', '--z', '1', '--survey', file],
        ['clustering', '--z', '1', '--survey', file],
      ]) {
        const r = await runCli(argv);
        expect([r.code, r.stdout, r.stderr], `${name}: ${argv.join(' ')}`).toEqual([2, '', checked.stderr]);
      }
      // explore reads the plan for its exposure control: the same refusal, no page (failed before:
      // a page without the control, exit 0)
      const page = join(dir, `${name}.html`);
      const explored = await runCli(['explore', file, '--out', page]);
      expect([explored.code, explored.stderr], name).toEqual([2, checked.stderr]);
      expect(existsSync(page), name).toBe(false);
    }
    // the sample itself, and a threshold survey's plan (which report leaves out), pass
    expect((await runCli(['check', 'samples/plan-uv-deep-wide.yaml'])).code).toBe(0);
    const mass = readFileSync('samples/mass-limited.yaml', 'utf8');
    const withPlan = join(dir, 'mass-plan.yaml');
    writeFileSync(withPlan, `${mass}\nplan: {field_of_view: 0.05, budget_hours: 10, goal: count}\n`);
    const massChecked = await runCli(['check', withPlan]);
    expect(massChecked.code, massChecked.stderr).toBe(0);
  });
});

describe('the built program as a subprocess', () => {
  const bin = 'bin/skytally.js';
  test('predict --format json', () => {
    if (!existsSync('dist/cli/skytally.cjs')) execFileSync('npm', ['run', 'build'], { stdio: 'ignore' });
    const out = execFileSync(process.execPath, [bin, 'predict', `samples/${SAMPLES[0]}`, '--format', 'json'], {
      encoding: 'utf8',
    });
    expect(JSON.parse(out).totals.count).toBeGreaterThan(0);
  }, 300_000); // builds dist/ first when it is absent (a fresh clone): a minute or more on a loaded machine
  test('bad input exits with status 2 and one line on stderr', () => {
    const r = spawnSync(process.execPath, [bin, 'predict', 'samples/does-not-exist.yaml'], { encoding: 'utf8' });
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });
  test('--help lists the commands', () => {
    const r = spawnSync(process.execPath, [bin, '--help'], { encoding: 'utf8' });
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('predict');
    expect(r.stdout).toContain('distances');
  });
});
