/**
 * `skytally explore` without a browser: the page builds for every bundled sample, holds its
 * script and style sheet under the hashes its Content-Security-Policy names and refers to nothing
 * outside itself; its first numbers equal `predict` and `forecast` on the file (1e-9 relative;
 * expected values: the commands' own JSON); the settings written back as YAML and as a parsed
 * object give the same survey; the ranges of the controls. The page in a browser:
 * test/explore/browser.test.ts.
 */
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { useExploreScript } from '../support/explore-script.js';
import { sampleExplorePage } from '../support/sample-explore.js';
import { expectedOutputs, expectSameOutputs } from './expected.js';
import { loadSurveyText, parseSurveyObject } from '../../src/survey/load.js';
import { parseYaml } from '../../src/survey/yaml.js';
import {
  EXPOSURE_KEY,
  controlSettings,
  exploreControls,
  exposureDesign,
  settingsObject,
  settingsText,
} from '../../src/library/explore/settings.js';
import { predict } from '../../src/counts/predict.js';
import { surveyAtLimit } from '../../src/planning/model.js';
import { sampleControls } from '../support/sample-controls.js';

const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml'));
const dir = tempDir('skytally-explore-page-');

beforeAll(async () => {
  await useExploreScript();
});

const sha = (s: string) => `'sha256-${createHash('sha256').update(s, 'utf8').digest('base64')}'`;

describe.each(SAMPLES)('%s', (sample) => {
  test('the page builds, is self-contained under its CSP and opens on the numbers of predict and forecast', async () => {
    const r = await sampleExplorePage(sample);
    expect(r.code, r.stderr).toBe(0);
    const html = readFileSync(r.out, 'utf8');
    const csp = /<meta http-equiv="Content-Security-Policy" content="([^"]+)">/.exec(html)![1]!;
    const scripts = [...html.matchAll(/<script>([\s\S]*?)<\/script>/g)].map((m) => m[1]!);
    const styles = [...html.matchAll(/<style>([\s\S]*?)<\/style>/g)].map((m) => m[1]!);
    expect(scripts.length).toBe(1);
    expect(styles.length).toBe(1);
    expect(csp).toContain(`script-src ${sha(scripts[0]!)};`);
    expect(csp).toContain(`style-src ${sha(styles[0]!)};`);
    expect(csp).toContain("default-src 'none'");
    // nothing loaded from elsewhere: no src or href attribute, no style attribute (the CSP forbids them)
    expect(html.replace(/<script>[\s\S]*?<\/script>/g, '')).not.toMatch(/\s(src|href|style)=/);
    const body = html.replace(/<script>[\s\S]*?<\/script>/g, '');
    expect(body).toContain('data-key="area"');
    // a limit written as a number or a quantity is a control (the mass-limited samples give a table in z)
    const det = (parseYaml(readFileSync(`samples/${sample}`, 'utf8'), sample) as { detection: { limit: unknown } })
      .detection;
    if (typeof det.limit !== 'object') expect(body).toContain('data-key="detection.limit"');
    const shown = new Map<string, number>();
    for (const m of body.matchAll(/data-output="([^"]+)" data-value="([^"]+)"/g)) shown.set(m[1]!, Number(m[2]));
    expectSameOutputs(shown, await expectedOutputs(`samples/${sample}`), sample);
  });

  test('settings written as YAML and as a parsed object give the same prediction; values read back exactly', () => {
    const path = `samples/${sample}`;
    const { text, raw, controls } = sampleControls(path);
    expect(controls.length).toBeGreaterThanOrEqual(2);
    const values = new Map<string, number>();
    for (const c of controls) {
      expect(c.min).toBeLessThan(c.max);
      expect(c.value).toBeGreaterThanOrEqual(c.min);
      expect(c.value).toBeLessThanOrEqual(c.max);
      // a value no decimal writes short: the text must carry every digit
      values.set(c.key, c.min + (c.max - c.min) * (0.4 + Math.PI / 100));
    }
    const written = settingsText(text, controls, values);
    const fromText = loadSurveyText(written, path);
    const fromObject = parseSurveyObject(settingsObject(raw, controls, values), path);
    expect(JSON.stringify(predict(fromObject))).toBe(JSON.stringify(predict(fromText)));
    expect(fromText.areaDeg2).toBe(values.get('area'));
    const d = fromText.detection;
    const limit = d.kind === 'line_flux' ? d.limitCgs : d.kind === 'magnitude' ? d.limitMag : undefined;
    if (limit !== undefined) expect(limit).toBe(values.get('detection.limit'));
    // comments and the keys not set stay as written
    for (const line of text.split('\n').filter((l) => l.trimStart().startsWith('#')))
      expect(written).toContain(line.trim());
  });

  test('the file written with one value set is the file as written but for that value (flow collections keep their spacing, comments their alignment)', () => {
    // docs/outputs.md: "the file as written, comments kept, only the changed values replaced by
    // plain numbers". Writing the whole document out again padded every flow collection
    // ({min: 4} became { min: 4 }, tables [ [ 27.5, 0.98 ] ]) and closed up the spaces before
    // end-of-line comments.
    const { text, controls } = sampleControls(`samples/${sample}`);
    const written = settingsText(text, controls, new Map([['area', 0.5]]));
    const area = /^area:\s*("[^"]*"|[^\s#]+)/m.exec(text)!;
    expect(written).toBe(text.replace(area[0], 'area: 0.5'));
  });
});

describe('controls', () => {
  const text = readFileSync('samples/halpha-narrowband.yaml', 'utf8');
  const survey = loadSurveyText(text, 'halpha-narrowband.yaml');

  test('keys in the unit of docs/survey-file.md: area deg^2, line-flux limit erg/s/cm^2, filter in Angstrom, model parameters', () => {
    const c = new Map(exploreControls(parseYaml(text, 'x'), survey).map((x) => [x.key, x]));
    expect(c.get('area')!.value).toBe(2.1);
    expect(c.get('detection.limit')!.value).toBe(4e-17);
    // 1.19 um = 11,900 Angstrom (SI prefixes; 1 um = 1e4 Angstrom)
    expect(c.get('detection.filter.center')!.value).toBeCloseTo(11900, 9);
    expect(c.get('detection.filter.fwhm')!.value).toBeCloseTo(130, 9);
    expect([...c.keys()]).toEqual(
      expect.arrayContaining(['population.log10_phi_star', 'population.log10_l_star', 'population.alpha']),
    );
    expect(c.get('population.alpha')!.range).toBe('default');
  });

  test("the threshold kind: L* and the limit in the population's own quantity, not erg/s (docs/survey-file.md, threshold kind)", () => {
    const mass = readFileSync('samples/mass-limited.yaml', 'utf8');
    const raw = parseYaml(mass, 'm') as { detection: Record<string, unknown>; population: Record<string, unknown> };
    raw.detection.limit = 9.5;
    const c = new Map(exploreControls(raw, loadSurveyText(mass, 'mass-limited.yaml')).map((x) => [x.key, x]));
    expect(c.get('population.log10_l_star')!.unit).toBe('log10 stellar mass [Msun]');
    expect(c.get('detection.limit')!.unit).toBe('log10 stellar mass [Msun]');
    raw.population.l_star = 10 ** 10.85;
    delete raw.population.log10_l_star;
    delete raw.population.quantity;
    const d = new Map(exploreControls(raw, loadSurveyText(mass, 'mass-limited.yaml')).map((x) => [x.key, x]));
    // no quantity named: no unit claimed (the describe line names none either)
    expect(d.get('population.l_star')!.unit).toBe('');
    expect(d.get('detection.limit')!.unit).toBe('');
    // a line-flux survey's L* stays in erg/s
    const h = new Map(exploreControls(parseYaml(text, 'x'), survey).map((x) => [x.key, x]));
    expect(h.get('population.log10_l_star')!.unit).toBe('log10 erg/s');
  });

  test('a model_uncertainty block sets the parameter ranges to 3 sigma (phi* and L* in dex also when written linearly)', () => {
    const raw = parseYaml(text, 'x') as { population: Record<string, unknown> };
    raw.population.model_uncertainty = { log10_phi_star: 0.08, log10_l_star: 0.05, alpha: 0.1 };
    const c = new Map(exploreControls(raw, survey).map((x) => [x.key, x]));
    const a = c.get('population.alpha')!;
    expect(a.range).toBe('model_uncertainty');
    expect(a.min).toBeCloseTo(-1.45 - 0.3, 12);
    expect(a.max).toBeCloseTo(-1.45 + 0.3, 12);
    expect(c.get('population.log10_l_star')!.min).toBeCloseTo(42.3 - 0.15, 12);
    raw.population.phi_star = 10 ** -2.6;
    delete raw.population.log10_phi_star;
    const p = exploreControls(raw, survey).find((x) => x.key === 'population.phi_star')!;
    expect(p.min / p.value).toBeCloseTo(10 ** -0.24, 12);
  });

  test("a plan file: the exposure per pointing buys whole pointings and reaches the depth law's limit", () => {
    const plan = readFileSync('samples/plan-halpha-layers.yaml', 'utf8');
    const c = exploreControls(parseYaml(plan, 'p'), loadSurveyText(plan, 'samples/plan-halpha-layers.yaml')).find(
      (x) => x.key === EXPOSURE_KEY,
    )!;
    expect(c.plan).toBeDefined();
    // the grid of the file: 0.03 to 40 h
    expect(c.min).toBe(0.03);
    expect(c.max).toBe(40);
    // 80 h budget, 0.1 h overhead, 0.2 deg^2 per pointing: 4 h buys floor(80 / 4.1) = 19 pointings;
    // background-limited depth: flux limit proportional to t^-1/2 (common practice), so 4 h
    // reaches half the reference's 6e-17 at 1 h
    const d = exposureDesign(c.plan!, 4);
    expect(d.pointings).toBe(19);
    expect(d.area).toBeCloseTo(19 * 0.2, 12);
    expect(d.limit / 3e-17).toBeCloseTo(1, 12);
    // the file's own limit (4e-17) is reached after (6/4)^2 = 2.25 h
    expect(c.value).toBeCloseTo(2.25, 10);
  });

  test('a plan file: the exposure per pointing moves the completeness curve with the limit, as plan designs do', () => {
    const text = readFileSync('samples/plan-halpha-layers.yaml', 'utf8');
    const survey = loadSurveyText(text, 'samples/plan-halpha-layers.yaml');
    const raw = parseYaml(text, 'p');
    const controls = exploreControls(raw, survey);
    const c = controls.find((x) => x.key === EXPOSURE_KEY)!;
    const values = new Map<string, number>([[EXPOSURE_KEY, 4], ...controlSettings(c, 4)]);
    const written = settingsText(text, controls, values);
    // half 5e-17 at the file's limit 4e-17; at 4 h the limit is 3e-17 (above), so the half moves
    // to 5e-17 x 3 / 4 = 3.75e-17 (docs/survey-file.md, "Completeness": in a plan the curve keeps
    // its distance from its own limit)
    const half = /completeness: \{model: logistic, half: ([^,]+), width: 0.08\}/.exec(written)![1]!;
    expect(Number(half) / 3.75e-17).toBeCloseTo(1, 12);
    const moved = surveyAtLimit(survey, exposureDesign(c.plan!, 4).limit, exposureDesign(c.plan!, 4).area);
    for (const s of [
      loadSurveyText(written, 'samples/plan-halpha-layers.yaml'),
      parseSurveyObject(settingsObject(raw, controls, values), 'samples/plan-halpha-layers.yaml'),
    ]) {
      const got = s.detection.completeness!;
      const want = moved.detection.completeness!;
      expect(got.model === 'logistic' && want.model === 'logistic').toBe(true);
      if (got.model === 'logistic' && want.model === 'logistic') expect(got.half - want.half).toBeCloseTo(0, 12);
    }
    // the limit set by hand (no exposure among the values): the curve stays where the file puts it
    const byHand = settingsText(text, controls, new Map([['detection.limit', 3e-17]]));
    expect(byHand).toContain('completeness: {model: logistic, half: 5e-17, width: 0.08}');
  });

  test('the library builds the same page as the command', async () => {
    const { explorePage } = await import('../../src/index.js');
    // the page `explore samples/halpha-narrowband.yaml --out FILE` writes (the run the sample's own test reads)
    const r = await sampleExplorePage('halpha-narrowband.yaml');
    expect(r.code, r.stderr).toBe(0);
    expect(await explorePage('samples/halpha-narrowband.yaml')).toBe(readFileSync(r.out, 'utf8'));
  });

  test('a bad survey file: exit 2, one sentence naming the file, nothing written', async () => {
    const out = join(dir, 'bad.html');
    const bad = join(dir, 'bad.yaml');
    const { writeFileSync } = await import('node:fs');
    writeFileSync(bad, text.replace('area: "2.1 deg^2"', 'area: -3'));
    const r = await runCli(['explore', bad, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('bad.yaml');
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(existsSync(out)).toBe(false);
  });
});

describe('a limit given as a flux density (docs/survey-file.md, "Flux densities and frequencies")', () => {
  const text = [
    'format: 1',
    'title: radio (demo)',
    'cosmology: {h0: 70, omega_m: 0.3}',
    'area: 2',
    'redshift: {min: 0.1, max: 3}',
    'detection:',
    '  kind: magnitude',
    '  limit: "50 uJy"   # 5 sigma',
    '  band: "1.4 GHz"',
    '  beta: -1.3',
    'population: {variable: magnitude, rest_wavelength: "1.4 GHz", phi_star: 1.0e-3, m_star: -22, alpha: -1.3}',
    'slices: {count: 3}',
    '',
  ].join('\n');
  const survey = loadSurveyText(text, 'radio.yaml');

  test('the control is in AB mag, and the file written once it is moved gives the AB magnitude', () => {
    const controls = exploreControls(parseYaml(text, 'radio.yaml'), survey);
    const c = controls.find((x) => x.key === 'detection.limit')!;
    expect(c.unit).toBe('AB mag');
    // m = -2.5 log10(5e-5 Jy / 3631 Jy): the loader's own conversion
    expect(c.value).toBe(survey.detection.kind === 'magnitude' ? survey.detection.limitMag : NaN);
    expect(c.value).toBeCloseTo(19.6526, 4);
    const written = settingsText(text, controls, new Map([['detection.limit', 20.25]]));
    expect(written).toBe(text.replace('"50 uJy"', '20.25'));
    const d = loadSurveyText(written, 'radio.yaml').detection;
    expect(d.kind === 'magnitude' && d.limitMag).toBe(20.25);
    expect(d.kind === 'magnitude' && d.limitGivenJy).toBeUndefined();
    // nothing moved: the file as written
    expect(settingsText(text, controls, new Map())).toBe(text);
  });
});

describe('a file in Vega magnitudes (docs/survey-file.md, "detection.system": m_AB = m_Vega + vega_to_ab)', () => {
  // An invented K-band file: the limit and the population's M* written in Vega.
  const text = [
    'format: 1',
    'title: K-band field in Vega magnitudes (demo)',
    'cosmology: {h0: 70, omega_m: 0.3}',
    'area: 1',
    'redshift: {min: 0.5, max: 1.5}',
    'detection:',
    '  kind: magnitude',
    '  limit: 22.0',
    '  band: "2.2 um"',
    '  system: vega',
    '  vega_to_ab: 1.85',
    'population:',
    '  variable: magnitude',
    '  rest_wavelength: 15000',
    '  phi_star: 3.0e-3',
    '  m_star: -22.5',
    '  system: vega',
    '  vega_to_ab: 1.4',
    '  alpha: -1.0',
    'slices: {count: 2}',
    '',
  ].join('\n');
  const survey = loadSurveyText(text, 'k.yaml');
  const limitMag = (t: string) => {
    const d = loadSurveyText(t, 'k.yaml').detection;
    return d.kind === 'magnitude' ? d.limitMag : NaN;
  };

  test("the limit control is in Vega, as the file reads it: moved to 23, the file says 23 and the loader's AB is 24.85", () => {
    const raw = parseYaml(text, 'k.yaml');
    const controls = exploreControls(raw, survey);
    const c = controls.find((x) => x.key === 'detection.limit')!;
    // (failed before: 'AB mag' and 23.85, which the file written back read as Vega 23.85, AB 25.70)
    expect(c.unit).toBe('Vega mag');
    expect(c.value).toBe(22);
    expect([c.min, c.max]).toEqual([20, 24]);
    // unmoved, the value written back is the file's own: the same limit
    expect(limitMag(settingsText(text, controls, new Map([['detection.limit', c.value]])))).toBe(limitMag(text));
    const written = settingsText(text, controls, new Map([['detection.limit', 23]]));
    expect(written).toBe(text.replace('limit: 22.0', 'limit: 23'));
    expect(limitMag(written)).toBeCloseTo(23 + 1.85, 12);
    const object = parseSurveyObject(settingsObject(raw, controls, new Map([['detection.limit', 23]])), 'k.yaml');
    expect(object.detection.kind === 'magnitude' && object.detection.limitMag).toBe(limitMag(written));
    // the population's M* is varied in its own system too, and said so
    const m = controls.find((x) => x.key === 'population.m_star')!;
    expect(m.unit).toBe('Vega mag');
    expect(m.value).toBe(-22.5);
  });

  test("a plan file in Vega: the exposure per pointing writes the depth law's AB limit as the Vega magnitude that reads back as it", () => {
    const plan = `${text.replace('  vega_to_ab: 1.85\n', '  vega_to_ab: 1.85\n  completeness: {table: [[21.5, 1], [22.5, 0.5]]}\n')}plan:
  field_of_view: "9.5 arcmin^2"
  reference: {limit: 24.0, exposure_hours: 1.0}
  overhead_hours: 0.25
  depth_law: background
  budget_hours: 100
  goal: {sigma: alpha}
  exposure_grid: {min_hours: 0.1, max_hours: 20, count: 50}
`;
    const controls = exploreControls(parseYaml(plan, 'kp.yaml'), loadSurveyText(plan, 'kp.yaml'));
    const c = controls.find((x) => x.key === EXPOSURE_KEY)!;
    expect(c.plan!.writtenVegaToAb).toBe(1.85);
    // background-limited: the limit deepens by 1.25 log10(t / t0) mag (common practice), so 4 h
    // reach AB 24 + 1.25 log10 4 = 24.753; the file is written in Vega, 1.85 brighter
    const ab = exposureDesign(c.plan!, 4).limit;
    expect(ab).toBeCloseTo(24 + 1.25 * Math.log10(4), 10);
    const limits = controlSettings(c, 4);
    expect(limits.find(([k]) => k === 'detection.limit')![1]).toBeCloseTo(ab - 1.85, 12);
    const values = new Map(limits);
    expect(limitMag(settingsText(plan, controls, values))).toBeCloseTo(ab, 12);
    // with the exposure among the values the completeness table moves too, by the limit's
    // difference (its rows written in Vega, as the file reads them)
    values.set(EXPOSURE_KEY, 4);
    const written = settingsText(plan, controls, values);
    const shift = ab - 1.85 - 22;
    const rows = /table: \[\[([^,]+), 1\], \[([^,]+), 0\.5\]\]/.exec(written)!;
    expect(Number(rows[1]) - (21.5 + shift)).toBeCloseTo(0, 12);
    expect(Number(rows[2]) - (22.5 + shift)).toBeCloseTo(0, 12);
    // the file's own AB limit, 23.85, is reached after 10^((23.85 - 24) / 1.25) h
    expect(c.value).toBeCloseTo(10 ** ((23.85 - 24) / 1.25), 10);
  });
});
