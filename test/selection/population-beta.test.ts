/**
 * A population's own spectral slope `beta` (docs/survey-file.md, "magnitude": each population's own
 * beta) replaces detection.beta in that population's k-correction, and only there.
 *
 * Where the expected values come from:
 * - the published power-law K(z) = 5 log10(D_L / 10 pc) - 2.5 log10(1 + z)
 *   - 2.5 (beta + 2) log10(band / ((1 + z) rest)) (Hogg et al. 2002, arXiv:astro-ph/0210394, the
 *   K-correction of a power-law spectrum), with 5 log10(D_L / 10 pc) read from astropy's
 *   FlatLambdaCDM distance modulus (test/reference/distances.json, made by
 *   test/reference/generate/distances.py), not from the program's cosmology;
 * - the same arithmetic: a population giving its own beta is counted exactly as a file of that
 *   population alone with detection.beta set to it (1e-12 relative: same nodes, same sums);
 * - the band-averaged Madau 1995 transmission of `bandAveragedMadau1995`, itself checked against
 *   scipy in test/selection/igm.test.ts, weighted by the population's own beta;
 * - the docs' worked example (docs/survey-file.md quotes its counts).
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { bandAveragedMadau1995, loadSurveyText, predict } from '../../src/index.js';
import { forecast } from '../../src/forecast/forecast.js';
import { readTransmissionFile } from '../../src/survey/transmission-file.js';
import { parseSurveyObject } from '../../src/survey/load.js';
import { parseYaml } from '../../src/survey/yaml.js';
import { exploreControls, settingsObject, settingsText } from '../../src/library/explore/settings.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { errorOf } from '../support/survey-error.js';
import { rel, kOfFormula, alone, expectSameCounts, forecastNumbers } from '../support/two-populations.js';

/** Two populations in one band: A takes detection.beta, B may give its own (a line of YAML, or ''). */
function twoPopulations(o: {
  detBeta: number;
  bBeta?: number;
  igm?: string;
  band?: string;
  window?: string;
  slices?: string;
}): string {
  return `format: 1
title: two colours
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: ${o.window ?? '{min: 0.4, max: 1.2}'}
detection:
  kind: magnitude
  limit: 24.5
  ${o.band ?? 'band: 7700'}
  beta: ${o.detBeta}
  igm: ${o.igm ?? 'none'}
  completeness: {model: logistic, half: 24.2, width: 0.2}
populations:
  - name: A
    variable: magnitude
    rest_wavelength: 1600
    phi_star: 1.5e-3
    m_star: -20.8
    alpha: -1.6
  - name: B
    variable: magnitude
    rest_wavelength: 4400
${o.bBeta === undefined ? '' : `    beta: ${o.bBeta}\n`}    phi_star: 3.0e-3
    m_star: -20.6
    alpha: -1.2
slices: ${o.slices ?? '{edges: [0.4, 0.6, 0.8, 1.2]}'}
histogram: {width: 0.25}
`;
}

describe("a population's beta against the published power-law K(z) (Hogg et al. 2002; D_L from astropy)", () => {
  const text = twoPopulations({ detBeta: -2, bBeta: 1 });
  const multi = predict(loadSurveyText(text, 'two.yaml'));

  test('B (beta +1) counts as a file of B alone with detection.beta = +1, A (inheriting -2) as A alone with -2 (1e-12)', () => {
    const bAlone = predict(loadSurveyText(alone(twoPopulations({ detBeta: 1 }), 1), 'b.yaml'));
    const aAlone = predict(loadSurveyText(alone(twoPopulations({ detBeta: -2 }), 0), 'a.yaml'));
    expect(multi.populations[1]!.totals.count).toBeGreaterThan(10);
    expectSameCounts(multi, 1, bAlone, 1e-12);
    expectSameCounts(multi, 0, aAlone, 1e-12);
    // and not as B with the detection's beta: the colour term moves it
    const bAtDetection = predict(loadSurveyText(alone(twoPopulations({ detBeta: -2 }), 1), 'b2.yaml'));
    expect(rel(multi.populations[1]!.totals.count, bAtDetection.totals.count)).toBeGreaterThan(0.01);
  });

  test("B's absolute-magnitude limit at each slice middle is limit - K(z) with its own beta (1e-9)", () => {
    // the slice middles 0.5, 0.7 and 1.0 are rows of the astropy fixture
    const slices = multi.populations[1]!.slices;
    expect(slices.map((s) => (s.z_min + s.z_max) / 2)).toEqual([0.5, 0.7, 1.0]);
    for (const s of slices) {
      const z = (s.z_min + s.z_max) / 2;
      expect(Math.abs(s.limit_at_center! - (24.5 - kOfFormula(z, 7700, 4400, 1)))).toBeLessThan(1e-9);
    }
    // A keeps detection.beta = -2 (its colour term vanishes)
    for (const s of multi.populations[0]!.slices) {
      const z = (s.z_min + s.z_max) / 2;
      expect(Math.abs(s.limit_at_center! - (24.5 - kOfFormula(z, 7700, 1600, -2)))).toBeLessThan(1e-9);
    }
  });

  test("with igm madau1995 over a band_file, the band average is weighted by the population's own beta (1e-9 mag)", () => {
    const band = 'band_file: bands/invented-red-band.csv';
    const window = '{min: 3.6, max: 4.6}';
    const slices = '{count: 4}';
    const base = 'test/reference/surveys-selection';
    const withIgm = (bBeta?: number, detBeta = -2) =>
      predict(
        loadSurveyText(twoPopulations({ detBeta, bBeta, igm: 'madau1995', band, window, slices }), 'i.yaml', base),
      );
    const noIgm = predict(
      loadSurveyText(twoPopulations({ detBeta: -2, bBeta: 1, igm: 'none', band, window, slices }), 'n.yaml', base),
    );
    const got = withIgm(1);
    const table = readTransmissionFile('bands/invented-red-band.csv', 'i.yaml', 'detection.band_file', base);
    // M_lim = limit - K, K holding -2.5 log10 <T>: the difference with and without the IGM is 2.5 log10 <T>(z, beta)
    got.populations[1]!.slices.forEach((s, i) => {
      const z = (s.z_min + s.z_max) / 2;
      const dM = s.limit_at_center! - noIgm.populations[1]!.slices[i]!.limit_at_center!;
      expect(Math.abs(dM - 2.5 * Math.log10(bandAveragedMadau1995(table, z, 1)))).toBeLessThan(1e-9);
      // a weighting by detection.beta would differ here, where Lyman alpha is inside the band
      expect(Math.abs(dM - 2.5 * Math.log10(bandAveragedMadau1995(table, z, -2)))).toBeGreaterThan(1e-4);
    });
    // and every number of B is that of B alone with detection.beta = 1 (1e-12)
    const bAlone = predict(
      loadSurveyText(alone(twoPopulations({ detBeta: 1, igm: 'madau1995', band, window, slices }), 1), 'ib.yaml', base),
    );
    expectSameCounts(got, 1, bAlone, 1e-12);
  });

  test('the forecast of B (--population B) is the forecast of B alone with detection.beta = +1, mocks too (1e-9)', async () => {
    const multiSurvey = loadSurveyText(text, 'two.yaml');
    const single = loadSurveyText(alone(twoPopulations({ detBeta: 1 }), 1), 'b.yaml');
    const got = await forecast(multiSurvey, { population: 'B', mocks: 20, seed: 3 });
    const want = await forecast(single, { mocks: 20, seed: 3 });
    const a = forecastNumbers(got);
    const b = forecastNumbers(want);
    expect(a.length).toBe(b.length);
    expect(a.length).toBeGreaterThan(20);
    a.forEach((x, i) => expect(rel(x, b[i]!), `number ${i}: ${x} against ${b[i]}`).toBeLessThanOrEqual(1e-9));
  });
});

describe('a redder population is brighter where the band is redder than its rest wavelength, fainter where bluer (sign from the formula)', () => {
  // K's colour term is -2.5 (beta + 2) log10(band / ((1 + z) rest)): raising beta from -2 to +1
  // moves m by dK = -7.5 log10(band / ((1 + z) rest)); dK < 0 (brighter) means more sources above
  // the limit, dK > 0 fewer. The expected sign is computed here, not assumed.
  test.each([
    ['rest 3000 A, band 7700 A at z 0.4-0.9 (band redder than the rest wavelength)', 3000],
    ['rest 6500 A, band 7700 A at z 0.4-0.9 (band bluer than the rest wavelength)', 6500],
  ])('%s', (_label, rest) => {
    const at = (bBeta: number) =>
      predict(
        loadSurveyText(
          twoPopulations({ detBeta: -2, bBeta, window: '{min: 0.4, max: 0.9}', slices: '{count: 5}' }).replace(
            'rest_wavelength: 4400',
            `rest_wavelength: ${rest}`,
          ),
          'dir.yaml',
        ),
      ).populations[1]!;
    const red = at(1);
    const flat = at(-2);
    red.slices.forEach((s, i) => {
      const z = (s.z_min + s.z_max) / 2;
      const dK = -2.5 * (1 - -2) * Math.log10(7700 / ((1 + z) * rest));
      const expected = -Math.sign(dK); // brighter -> more counts
      expect(expected).not.toBe(0);
      expect(Math.sign(s.count - flat.slices[i]!.count), `slice at z = ${z}`).toBe(expected);
      // the limit in M moves by -dK exactly
      expect(Math.abs(s.limit_at_center! - flat.slices[i]!.limit_at_center! + dK)).toBeLessThan(1e-9);
    });
  });
});

describe('refused: one sentence naming the file and the key, exit 2, nothing written', () => {
  const dir = tempDir('skytally-pop-beta-');
  mkdirSync(join(dir, 'bands'));
  mkdirSync(join(dir, 'spectra'));
  copyFileSync(
    'test/reference/surveys-selection/bands/invented-red-band.csv',
    join(dir, 'bands', 'invented-red-band.csv'),
  );
  copyFileSync(
    'test/reference/surveys-selection/spectra/invented-starburst.csv',
    join(dir, 'spectra', 'invented-starburst.csv'),
  );
  const magnitude = twoPopulations({ detBeta: -2, bBeta: 1 });
  const lineFlux = `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.8, max: 1.2}
detection: {kind: line_flux, limit: 2e-17, line: 6563}
populations:
  - {name: H-alpha, variable: luminosity, phi_star: 1e-3, l_star: 1e42, alpha: -1.4}
  - {name: other, variable: luminosity, phi_star: 1e-3, l_star: 1e42, alpha: -1.4, beta: 1}
`;
  const threshold = `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.2, max: 0.6}
detection: {kind: threshold, limit: 10}
population:
  variable: luminosity
  quantity: stellar mass in Msun
  phi_star: 1e-3
  l_star: 1e11
  alpha: -1.2
  beta: 0
`;
  const withSed = readFileSync('test/reference/surveys-selection/vega-restband-sed.yaml', 'utf8').replace(
    '  alpha: -1.2\n',
    '  alpha: -1.2\n  beta: 0.5\n',
  );
  test.each([
    ['on a line_flux survey', lineFlux, 'populations[1].beta', 'kind_mismatch', /magnitude survey.*line_flux/],
    ['on a threshold survey', threshold, 'population.beta', 'kind_mismatch', /threshold/],
    ['beside detection.sed', withSed, 'population.beta', 'conflict', /detection\.sed/],
    [
      'out of range',
      magnitude.replace('    beta: 1\n', '    beta: 7\n'),
      'populations[1].beta',
      'out_of_range',
      /-5 to 5/,
    ],
    ['not a number', magnitude.replace('    beta: 1\n', '    beta: red\n'), 'populations[1].beta', '', /number/],
  ])('%s', async (_label, yaml, key, code, words) => {
    const file = join(dir, `${key.replace(/\W/g, '-')}-${code || 'type'}.yaml`);
    writeFileSync(file, yaml);
    const out = join(dir, 'never.json');
    const r = await runCli(['predict', file, '--format', 'json', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(file);
    expect(r.stderr).toContain(key);
    expect(r.stderr).toMatch(words);
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(existsSync(out)).toBe(false);
    if (code) expect(errorOf(() => loadSurveyText(yaml, file)).code).toBe(code);
  });
});

describe("the outputs state each population's slope", () => {
  const text = twoPopulations({ detBeta: -2, bBeta: 1 });
  const p = predict(loadSurveyText(text, 'two.yaml'));

  test("the detection block keeps detection.beta; the population's model block has its own, with beta_from", () => {
    expect(p.detection).toMatchObject({ kind: 'magnitude', beta: -2 });
    expect(p.models[0]!.k_correction).toEqual({ method: 'power_law', beta: -2 });
    expect(p.models[1]!.k_correction).toEqual({ method: 'power_law', beta: 1, beta_from: 'population' });
    expect(p.models[1]!.summary).toContain(
      'M* = -20.6 AB (k-corrected with its own spectral slope beta = 1 in place of detection.beta = -2)',
    );
    expect(p.models[0]!.summary).not.toContain('spectral slope');
  });

  test("predict's table says both slopes; check's populations give their own", async () => {
    const dir = tempDir('skytally-pop-beta-out-');
    const file = join(dir, 'two.yaml');
    writeFileSync(file, text);
    const table = await runCli(['predict', file]);
    expect(table.code, table.stderr).toBe(0);
    expect(table.stdout).toContain('in a band at 7700 A (spectral slope beta = -2, and for B its own beta = 1)');
    const check = await runCli(['check', file, '--format', 'json']);
    expect(check.code, check.stderr).toBe(0);
    const c = JSON.parse(check.stdout) as {
      detection: { beta: number };
      populations: { k_correction: Record<string, unknown> }[];
    };
    expect(c.detection.beta).toBe(-2);
    expect(c.populations.map((x) => x.k_correction)).toEqual([
      { method: 'power_law', beta: -2 },
      { method: 'power_law', beta: 1, beta_from: 'population' },
    ]);
  });

  test('a radio band warns on the population whose own beta is steep, naming it, and not on a detection.beta no population takes', () => {
    const radio = (detBeta: number, aBeta: string, bBeta: number) =>
      predict(
        loadSurveyText(
          twoPopulations({
            detBeta,
            bBeta,
            band: 'band: "1.4 GHz"',
            window: '{min: 0.1, max: 1.0}',
            slices: '{count: 3}',
          })
            .replace('    rest_wavelength: 1600\n', `    rest_wavelength: "1.4 GHz"\n${aBeta}`)
            .replace('    rest_wavelength: 4400\n', '    rest_wavelength: "1.4 GHz"\n')
            .replace('limit: 24.5', 'limit: "50 uJy"')
            .replace('half: 24.2', 'half: "60 uJy"'),
          'radio.yaml',
        ),
      ).warnings.filter((w) => w.code === 'radio_spectrum_steep');
    // A takes detection.beta = -1.3 (fine), B's own -0.7 is steep: one warning naming B
    const one = radio(-1.3, '', -0.7);
    expect(one).toHaveLength(1);
    expect(one[0]!.message).toMatch(/^B: its own beta = -0\.7 in a radio band/);
    // both give their own sound slopes: a steep detection.beta that no population takes is not judged
    expect(radio(-0.7, '    beta: -1.3\n', -1.3)).toEqual([]);
    // A takes a steep detection.beta: the warning names detection.beta, as before
    const det = radio(-0.7, '', -1.3);
    expect(det).toHaveLength(1);
    expect(det[0]!.message).toMatch(/^detection\.beta = -0\.7/);
  });
});

describe('the explore page writes a population beta back as written', () => {
  test('settings written as YAML and as a parsed object keep populations[1].beta and give the same prediction', () => {
    const text = twoPopulations({ detBeta: -2, bBeta: 1 });
    const survey = loadSurveyText(text, 'two.yaml');
    const raw = parseYaml(text, 'two.yaml');
    const controls = exploreControls(raw, survey);
    const values = new Map<string, number>([
      ['area', 0.75],
      ['detection.limit', 24.25],
    ]);
    expect(controls.map((c) => c.key)).toEqual(expect.arrayContaining([...values.keys()]));
    const written = settingsText(text, controls, values);
    expect(written).toContain('    beta: 1\n');
    const fromText = loadSurveyText(written, 'two.yaml');
    const fromObject = parseSurveyObject(settingsObject(raw, controls, values), 'two.yaml');
    expect(fromText.populations.map((p) => p.beta)).toEqual([undefined, 1]);
    expect(fromObject.populations.map((p) => p.beta)).toEqual([undefined, 1]);
    expect(JSON.stringify(predict(fromObject))).toBe(JSON.stringify(predict(fromText)));
    // and the moved file counts B with its own beta: as B alone with detection.beta = 1 at the moved settings
    const bAlone = loadSurveyText(
      alone(twoPopulations({ detBeta: 1 }), 1)
        .replace('area: 0.5', 'area: 0.75')
        .replace('limit: 24.5', 'limit: 24.25'),
      'b.yaml',
    );
    expectSameCounts(predict(fromText), 1, predict(bAlone), 1e-12);
  });
});

describe("docs/survey-file.md's dropout example with red interlopers", () => {
  const doc = readFileSync('docs/survey-file.md', 'utf8');
  const example = [...doc.matchAll(/```yaml\n([\s\S]*?)```/g)]
    .map((m) => m[1]!)
    .find((t) => t.includes('title: Invented B-dropout field with red low-redshift interlopers'))!;

  test("counts what the page says: 839.4 LBG, 58.03 interlopers, 49.65 with the detection's beta", () => {
    const p = predict(loadSurveyText(example, 'doc.yaml'));
    const counts = p.populations.map((x) => x.totals.count);
    expect(counts[0]!.toPrecision(4)).toBe('839.4');
    expect(counts[1]!.toPrecision(4)).toBe('58.03');
    const flat = predict(loadSurveyText(example.replace(/\n {4}beta: 1\.0[^\n]*/, ''), 'doc2.yaml'));
    expect(flat.populations[1]!.totals.count.toPrecision(4)).toBe('49.65');
    expect(doc).toContain('It counts 839.4 Lyman-break galaxies and 58.03 interlopers');
  });
});
