/**
 * A population's own rest-frame spectrum `sed: {file}` (docs/survey-file.md, "magnitude": each
 * population's own spectrum) replaces detection.sed or the power law in that population's
 * k-correction, and only there.
 *
 * Where the expected values come from:
 * - the same arithmetic: a population giving its own spectrum is counted exactly as a file of that
 *   population alone with detection.sed set to that spectrum (1e-12 relative: same nodes, same sums),
 *   and a population on the power law as a file of it alone with the power law;
 * - the published power-law K(z) = 5 log10(D_L / 10 pc) - 2.5 log10(1 + z)
 *   - 2.5 (beta + 2) log10(band / ((1 + z) rest)) (Hogg et al. 2002, arXiv:astro-ph/0210394, the
 *   K-correction of a power-law spectrum), with 5 log10(D_L / 10 pc) read from astropy's
 *   FlatLambdaCDM distance modulus (test/reference/distances.json, made by
 *   test/reference/generate/distances.py): a pure power law f_lambda ~ lambda^1 written as a file
 *   (test/fixtures/spectra/power-law-beta1.csv, linear in lambda, so read exactly) through a
 *   1 Angstrom band (the narrowest a band may be), as test/selection/kcorrection.test.ts checks
 *   synthetic photometry against the power-law colour term, to its tolerance there, 1e-9 mag
 *   (measured 7.3e-13);
 * - the docs' worked example (docs/survey-file.md quotes its counts).
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';
import { forecast } from '../../src/forecast/forecast.js';
import { parseSurveyObject } from '../../src/survey/load.js';
import { parseYaml } from '../../src/survey/yaml.js';
import { exploreControls, settingsObject, settingsText } from '../../src/library/explore/settings.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { errorOf } from '../support/survey-error.js';
import { rel, kOfFormula, alone, expectSameCounts, forecastNumbers } from '../support/two-populations.js';

/** A folder holding the spectra and the band file the files below name. */
const dir = tempDir('skytally-pop-sed-');
mkdirSync(join(dir, 'spectra'));
mkdirSync(join(dir, 'bands'));
copyFileSync(
  'samples/spectra/invented-passive-4000a-break.csv',
  join(dir, 'spectra', 'invented-passive-4000a-break.csv'),
);
copyFileSync('test/fixtures/spectra/power-law-beta1.csv', join(dir, 'spectra', 'power-law-beta1.csv'));
copyFileSync('test/reference/surveys-selection/spectra/invented-starburst.csv', join(dir, 'spectra', 'starburst.csv'));
copyFileSync('test/reference/surveys-selection/bands/invented-red-band.csv', join(dir, 'bands', 'red.csv'));
const PASSIVE = 'spectra/invented-passive-4000a-break.csv';
const POWER_LAW = 'spectra/power-law-beta1.csv';
const STARBURST = 'spectra/starburst.csv';

/**
 * Two populations in one band: A on the detection's k-correction (the power law, or detection.sed
 * when `detSed`), B with its own spectrum when `bSed` (the band then a shape, `band`).
 */
function twoPopulations(o: {
  band?: string;
  bSed?: string;
  bBeta?: number;
  detSed?: string;
  igm?: string;
  window?: string;
  slices?: string;
}): string {
  return `format: 1
title: dropouts and passive interlopers
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: ${o.window ?? '{min: 0.4, max: 1.2}'}
detection:
  kind: magnitude
  limit: 24.5
  ${o.band ?? 'band: {center: 7700, fwhm: 1500}'}
${o.detSed ? `  sed: {file: ${o.detSed}}\n` : '  beta: -2\n'}  igm: ${o.igm ?? 'none'}
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
${o.bSed ? `    sed: {file: ${o.bSed}}\n` : ''}${o.bBeta !== undefined ? `    beta: ${o.bBeta}\n` : ''}    phi_star: 3.0e-3
    m_star: -20.6
    alpha: -1.2
slices: ${o.slices ?? '{edges: [0.4, 0.6, 0.8, 1.2]}'}
histogram: {width: 0.25}
`;
}

const load = (text: string, name: string) => loadSurveyText(text, join(dir, name));

describe("a population's own spectrum counts as a file of it alone with detection.sed (the same arithmetic, 1e-12)", () => {
  test('A on the power law, B with its own passive spectrum: each as its one-population file', () => {
    const multi = predict(load(twoPopulations({ bSed: PASSIVE }), 'two.yaml'));
    // B alone with detection.sed at its spectrum, through the same band
    const bAlone = predict(load(alone(twoPopulations({ detSed: PASSIVE }), 1), 'b.yaml'));
    // A alone on the power law: the band's effective wavelength is the shape's center
    const aAlone = predict(load(alone(twoPopulations({ band: 'band: 7700' }), 0), 'a.yaml'));
    expect(multi.populations[1]!.totals.count).toBeGreaterThan(10);
    expectSameCounts(multi, 1, bAlone, 1e-12);
    expectSameCounts(multi, 0, aAlone, 1e-12);
    // and not as B on the power law: the 4000 A break moves it
    const bPowerLaw = predict(load(alone(twoPopulations({ band: 'band: 7700' }), 1), 'b2.yaml'));
    expect(rel(multi.populations[1]!.totals.count, bPowerLaw.totals.count)).toBeGreaterThan(0.01);
  });

  test('with igm madau1995 over a band_file at z 3.6-4.6: the same (the spectrum carries the transmission inside its integral)', () => {
    const o = {
      band: 'band_file: bands/red.csv',
      igm: 'madau1995',
      window: '{min: 3.6, max: 4.6}',
      slices: '{count: 4}',
    };
    const multi = predict(load(twoPopulations({ ...o, bSed: PASSIVE }), 'i.yaml'));
    const bAlone = predict(load(alone(twoPopulations({ ...o, detSed: PASSIVE }), 1), 'ib.yaml'));
    const aAlone = predict(load(alone(twoPopulations(o), 0), 'ia.yaml'));
    expectSameCounts(multi, 1, bAlone, 1e-12);
    expectSameCounts(multi, 0, aAlone, 1e-12);
  });

  test('with a rest_band, which its own spectrum allows without detection.sed: the same', () => {
    const rb = (t: string) => t.replace('    rest_wavelength: 4400\n', '    rest_band: {center: 4400, fwhm: 900}\n');
    const multi = predict(load(rb(twoPopulations({ bSed: PASSIVE })), 'rb.yaml'));
    const bAlone = predict(load(alone(rb(twoPopulations({ detSed: PASSIVE })), 1), 'rbb.yaml'));
    expect(multi.models[1]!.rest_band).toMatchObject({ profile: 'tophat', center_angstrom: 4400 });
    expectSameCounts(multi, 1, bAlone, 1e-12);
  });

  test("beside detection.sed its own wins: B as B alone with its spectrum, A with the detection's", () => {
    const multi = predict(load(twoPopulations({ detSed: STARBURST, bSed: PASSIVE }), 's.yaml'));
    const bAlone = predict(load(alone(twoPopulations({ detSed: PASSIVE }), 1), 'sb.yaml'));
    const aAlone = predict(load(alone(twoPopulations({ detSed: STARBURST }), 0), 'sa.yaml'));
    expectSameCounts(multi, 1, bAlone, 1e-12);
    expectSameCounts(multi, 0, aAlone, 1e-12);
    expect(multi.models[1]!.summary).toContain(
      `at rest 4400 A, k-corrected with its own spectrum ${PASSIVE} in place of the spectrum ${STARBURST}`,
    );
    expect(multi.models[0]!.k_correction).toEqual({ method: 'spectrum', spectrum_file: STARBURST });
    expect(multi.models[1]!.k_correction).toEqual({
      method: 'spectrum',
      spectrum_file: PASSIVE,
      spectrum_from: 'population',
    });
  });

  test('the forecast of B (--population B) is the forecast of B alone with detection.sed, mocks too (1e-9)', async () => {
    const got = await forecast(load(twoPopulations({ bSed: PASSIVE }), 'f.yaml'), {
      population: 'B',
      mocks: 20,
      seed: 3,
    });
    const want = await forecast(load(alone(twoPopulations({ detSed: PASSIVE }), 1), 'fb.yaml'), { mocks: 20, seed: 3 });
    const a = forecastNumbers(got);
    const b = forecastNumbers(want);
    expect(a.length).toBe(b.length);
    expect(a.length).toBeGreaterThan(20);
    a.forEach((x, i) => expect(rel(x, b[i]!), `number ${i}: ${x} against ${b[i]}`).toBeLessThanOrEqual(1e-9));
  });
});

describe('a power law written as a file gives the power-law K(z) (Hogg et al. 2002; D_L from astropy; 1e-9 mag)', () => {
  // a 1 Angstrom band (the narrowest a band may be), as test/selection/kcorrection.test.ts's check
  // of synthetic photometry against the power-law colour term (1e-9 mag there)
  const narrow = 'band: {center: 7700, fwhm: 1}';
  const multi = predict(load(twoPopulations({ band: narrow, bSed: POWER_LAW }), 'pl.yaml'));

  test("B's absolute-magnitude limit at each slice middle is limit - K(z) of beta = +1", () => {
    // the slice middles 0.5, 0.7 and 1.0 are rows of the astropy fixture
    const slices = multi.populations[1]!.slices;
    expect(slices.map((s) => (s.z_min + s.z_max) / 2)).toEqual([0.5, 0.7, 1.0]);
    for (const s of slices) {
      const z = (s.z_min + s.z_max) / 2;
      expect(Math.abs(s.limit_at_center! - (24.5 - kOfFormula(z, 7700, 4400, 1)))).toBeLessThan(1e-9);
    }
    // A keeps the detection's power law, beta = -2
    for (const s of multi.populations[0]!.slices) {
      const z = (s.z_min + s.z_max) / 2;
      expect(Math.abs(s.limit_at_center! - (24.5 - kOfFormula(z, 7700, 1600, -2)))).toBeLessThan(1e-9);
    }
  });

  test("and B's counts are those of B with its own beta: 1 at the band's wavelength (1e-8; measured 1.7e-9)", () => {
    const withBeta = predict(load(twoPopulations({ band: 'band: 7700', bBeta: 1 }), 'plb.yaml'));
    multi.populations[1]!.slices.forEach((s, i) =>
      expect(rel(s.count, withBeta.populations[1]!.slices[i]!.count)).toBeLessThan(1e-8),
    );
  });
});

describe('refused: one sentence naming the file and the key, exit 2, nothing written', () => {
  const magnitude = twoPopulations({ bSed: PASSIVE });
  const lineFlux = `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.8, max: 1.2}
detection: {kind: line_flux, limit: 2e-17, line: 6563}
populations:
  - {name: H-alpha, variable: luminosity, phi_star: 1e-3, l_star: 1e42, alpha: -1.4}
  - {name: other, variable: luminosity, phi_star: 1e-3, l_star: 1e42, alpha: -1.4, sed: {file: ${PASSIVE}}}
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
  sed: {file: ${PASSIVE}}
`;
  test.each([
    ['on a line_flux survey', lineFlux, 'populations[1].sed', 'kind_mismatch', /magnitude survey.*line_flux/],
    ['on a threshold survey', threshold, 'population.sed', 'kind_mismatch', /threshold/],
    [
      "beside the population's own beta",
      twoPopulations({ bSed: PASSIVE, bBeta: 1 }),
      'populations[1].beta',
      'conflict',
      /keep one of them: beta or sed/,
    ],
    [
      'a missing file',
      magnitude.replace(PASSIVE, 'spectra/no-such.csv'),
      'populations[1].sed.file',
      'file_unreadable',
      /does not exist/,
    ],
    ['an unreadable file (a folder)', magnitude.replace(PASSIVE, 'spectra'), 'populations[1].sed.file', '', /folder/],
    [
      'no file given',
      magnitude.replace(`sed: {file: ${PASSIVE}}`, 'sed: {}'),
      'populations[1].sed.file',
      '',
      /is missing; add file/,
    ],
    [
      'the band a wavelength, not a shape',
      twoPopulations({ band: 'band: 7700', bSed: PASSIVE }),
      'detection.band',
      'wrong_type',
      /populations\[1\]\.sed needs the band's shape.*band_file/,
    ],
    [
      "a window beyond the spectrum's coverage",
      twoPopulations({ bSed: PASSIVE, window: '{min: 0.4, max: 9}', slices: '{count: 2}' }),
      'populations[1].sed',
      'out_of_range',
      /covers rest-frame 900 to 30000 Angstrom.*or a narrower redshift range\.$/m,
    ],
    [
      'a rest wavelength beyond the spectrum, which no window mends',
      twoPopulations({ bSed: PASSIVE }).replace('rest_wavelength: 4400', 'rest_wavelength: 40000'),
      'populations[1].sed',
      'out_of_range',
      /the rest wavelength 40000 Angstrom lies outside it at every redshift, so a narrower redshift range cannot help/,
    ],
  ])('%s', async (_label, yaml, key, code, words) => {
    const file = join(dir, `refused-${key.replace(/\W/g, '-')}-${code || 'type'}.yaml`);
    writeFileSync(file, yaml);
    const out = join(dir, 'never.json');
    const r = await runCli(['predict', file, '--format', 'json', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(file);
    expect(r.stderr).toContain(`${key}:`);
    expect(r.stderr).toMatch(words);
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(existsSync(out)).toBe(false);
    if (code) expect(errorOf(() => loadSurveyText(yaml, file)).code).toBe(code);
  });
});

describe("the outputs state each population's spectrum", () => {
  const text = twoPopulations({ bSed: PASSIVE });
  const p = predict(load(text, 'two.yaml'));

  test("the detection block keeps beta and shows the band's shape; B's model block names its own spectrum", () => {
    expect(p.detection).toMatchObject({
      kind: 'magnitude',
      beta: -2,
      band: { profile: 'tophat', center_angstrom: 7700, fwhm_angstrom: 1500 },
    });
    expect((p.detection as { sed_file?: string }).sed_file).toBeUndefined();
    expect(p.models[0]!.k_correction).toEqual({ method: 'power_law', beta: -2 });
    expect(p.models[1]!.k_correction).toEqual({
      method: 'spectrum',
      spectrum_file: PASSIVE,
      spectrum_from: 'population',
    });
    expect(p.models[1]!.summary).toContain(
      `M* = -20.6 AB at rest 4400 A, k-corrected with its own spectrum ${PASSIVE} in place of detection.beta = -2`,
    );
  });

  test('the table says it in the survey line and check gives the same k_correction', async () => {
    const file = join(dir, 'out-two.yaml');
    writeFileSync(file, text);
    const table = await runCli(['predict', file]);
    expect(table.code).toBe(0);
    expect(table.stdout).toContain(
      `in a tophat band at 7700 A (fwhm 1500 A) (spectral slope beta = -2, and for B its own spectrum ${PASSIVE})`,
    );
    const check = await runCli(['check', file, '--format', 'json']);
    expect(check.code).toBe(0);
    const c = JSON.parse(check.stdout) as { populations: { k_correction?: unknown }[] };
    expect(c.populations.map((x) => x.k_correction)).toEqual([
      { method: 'power_law', beta: -2 },
      { method: 'spectrum', spectrum_file: PASSIVE, spectrum_from: 'population' },
    ]);
  });
});

describe("the Lyman-alpha warnings see the whole band beside a population's own spectrum", () => {
  // the band 6950-8450 A (a top-hat, 7700 +- 750): Lyman alpha reaches its center at z = 5.33 and its
  // red edge at z = 5.95, so over a window to 5.5 the band is only partly in the forest: no
  // band_blueward_of_lyman_alpha, and without a stated igm the file must hear igm_not_stated (it heard
  // neither while that check took the band's center for its red edge)
  test('a window to z = 5.5 without igm: igm_not_stated, not band_blueward_of_lyman_alpha', () => {
    // a limit deep enough to detect dropouts there (the helper's 24.5 detects none)
    const text = twoPopulations({ bSed: PASSIVE, window: '{min: 3.5, max: 5.5}', slices: '{count: 2}' })
      .replace('  igm: none\n', '')
      .replace('limit: 24.5', 'limit: 27.5')
      .replace('half: 24.2', 'half: 27.2');
    expect(text).not.toContain('igm:');
    const codes = predict(loadSurveyText(text, join(dir, 'lyman-warnings.yaml'))).warnings.map((w) => w.code);
    // once per population: the power law A and B with its spectrum alike lack the forest
    expect(codes).toEqual(['igm_not_stated', 'igm_not_stated']);
    // beyond the red edge (z = 5.95) the whole band is blueward: that warning instead
    const far = text.replace('{min: 3.5, max: 5.5}', '{min: 3.5, max: 6.2}');
    const farCodes = predict(loadSurveyText(far, join(dir, 'lyman-warnings-far.yaml'))).warnings.map((w) => w.code);
    expect(farCodes).toContain('band_blueward_of_lyman_alpha');
    expect(farCodes).not.toContain('igm_not_stated');
  });
});

describe("the explore page writes a population's sed back as written", () => {
  test('settings written as YAML and as a parsed object keep populations[1].sed and give the same prediction', () => {
    const text = twoPopulations({ bSed: PASSIVE });
    const file = join(dir, 'explore.yaml');
    const survey = loadSurveyText(text, file);
    const raw = parseYaml(text, file);
    const controls = exploreControls(raw, survey);
    const values = new Map<string, number>([
      ['area', 0.75],
      ['detection.limit', 24.25],
    ]);
    expect(controls.map((c) => c.key)).toEqual(expect.arrayContaining([...values.keys()]));
    const written = settingsText(text, controls, values);
    expect(written).toContain(`    sed: {file: ${PASSIVE}}\n`);
    const fromText = loadSurveyText(written, file);
    const fromObject = parseSurveyObject(settingsObject(raw, controls, values), file);
    expect(fromText.populations.map((x) => x.sed?.spectrum.file)).toEqual([undefined, PASSIVE]);
    expect(fromObject.populations.map((x) => x.sed?.spectrum.file)).toEqual([undefined, PASSIVE]);
    expect(JSON.stringify(predict(fromObject))).toBe(JSON.stringify(predict(fromText)));
    // and the moved file counts B with its own spectrum: as B alone with detection.sed at the moved settings
    const bAlone = load(
      alone(twoPopulations({ detSed: PASSIVE }), 1)
        .replace('area: 0.5', 'area: 0.75')
        .replace('limit: 24.5', 'limit: 24.25'),
      'explore-b.yaml',
    );
    expectSameCounts(predict(fromText), 1, predict(bAlone), 1e-12);
  });
});

describe("docs/survey-file.md's dropout example with passive interlopers", () => {
  const doc = readFileSync('docs/survey-file.md', 'utf8');
  const example = [...doc.matchAll(/```yaml\n([\s\S]*?)```/g)]
    .map((m) => m[1]!)
    .find((t) => t.includes('title: Invented B-dropout field with passive low-redshift interlopers'))!;

  test("counts what the page says: 839.4 LBG (as with the band's wavelength alone), 59.63 interlopers", () => {
    expect(example).toContain('sed: {file: spectra/invented-passive-4000a-break.csv}');
    // the spectrum is samples/spectra/invented-passive-4000a-break.csv: the example runs saved in samples/
    const p = predict(loadSurveyText(example, 'doc.yaml', 'samples'));
    expect(p.populations.map((x) => Number(x.totals.count.toPrecision(4)))).toEqual([839.4, 59.63]);
    // the LBGs as in the beta example above it (band "7700 Angstrom"), the interlopers with beta 1.0 and -2
    const asWavelength = example.replace(
      /band: \{center: "7700 Angstrom", fwhm: "1500 Angstrom"\}[^\n]*/,
      'band: "7700 Angstrom"',
    );
    const withBeta = predict(loadSurveyText(asWavelength.replace(/ {4}sed: [^\n]*/, '    beta: 1.0'), 'doc-b.yaml'));
    const flat = predict(loadSurveyText(asWavelength.replace(/\n {4}sed: [^\n]*/, ''), 'doc-f.yaml'));
    expect(Number(withBeta.populations[0]!.totals.count.toPrecision(4))).toBe(839.4);
    expect(rel(withBeta.populations[0]!.totals.count, p.populations[0]!.totals.count)).toBeLessThan(1e-12);
    expect(Number(withBeta.populations[1]!.totals.count.toPrecision(4))).toBe(58.03);
    expect(Number(flat.populations[1]!.totals.count.toPrecision(4))).toBe(49.65);
  });
});
