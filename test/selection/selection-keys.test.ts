/**
 * The selection keys in the loader (src/survey/selection-keys.ts), their statement in every model
 * block and in check, and the warnings about common traps (src/selection/warnings.ts): each fires
 * on a file made to trigger it, and no bundled sample raises any.
 */
import { describe, expect, test } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parse } from 'yaml';
import { loadSurveyFile, parseSurveyObject } from '../../src/survey/load.js';
import { describeSurvey } from '../../src/survey/describe.js';
import { surveyWarnings } from '../../src/population/warnings.js';
import { predict } from '../../src/counts/predict.js';
import { forecast } from '../../src/forecast/forecast.js';
import { clone, LINE_YAML, MAGNITUDE_YAML, setPath, toYaml } from '../survey/fixtures.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { errorOf } from '../support/survey-error.js';

const FILE = 'selection-test.yaml';
const line = parse(LINE_YAML) as Record<string, unknown>;
const magnitude = parse(MAGNITUDE_YAML) as Record<string, unknown>;

function withKeys(base: Record<string, unknown>, keys: Record<string, unknown>): Record<string, unknown> {
  const obj = clone(base);
  for (const [k, v] of Object.entries(keys)) setPath(obj, k, v);
  return obj;
}

const codes = (obj: Record<string, unknown>) => surveyWarnings(parseSurveyObject(obj, FILE)).map((w) => w.code);

describe('the loader reads the selection keys', () => {
  test('every key, with units, tables and expressions', () => {
    const s = parseSurveyObject(
      withKeys(line, {
        'detection.redshift_selection': {
          table: [
            [0.8, 0.5],
            [0.9, 0.7],
          ],
        },
        'detection.equivalent_width_cut': { observed: '3 nm' },
        'population.blend_ratio': 0.3,
        'population.attenuation': '0.8 + 0.1*z',
        'population.equivalent_widths': { model: 'lognormal', median: '50 Angstrom', sigma_dex: 0.25 },
        'population.valid_redshift': { min: 0.5, max: 1.2 },
      }),
      FILE,
    );
    expect(s.detection.equivalentWidthCut).toEqual({ frame: 'observed', angstrom: 30 });
    expect(s.detection.redshiftSelection!.at(0.85)).toBeCloseTo(0.6, 14);
    const p = s.populations[0]!;
    expect(p.blendRatio?.source).toBe(0.3);
    expect(p.blendRatio?.at(1.2)).toBe(0.3);
    expect(p.attenuation!.at(1)).toBeCloseTo(0.9, 14);
    expect(p.equivalentWidths).toEqual({ model: 'lognormal', medianAngstrom: 50, sigmaDex: 0.25 });
    expect(p.validRedshift).toEqual({ min: 0.5, max: 1.2 });
    // check states them, and so does every model block
    const view = describeSurvey(s);
    expect(view.populations[0]!.selection.effects).toEqual([
      'redshift_selection',
      'blend_ratio',
      'attenuation',
      'equivalent_width_cut',
    ]);
    expect(view.populations[0]!.selection.attenuation_applied).toBe(true);
    const pred = predict(s, { noUncertainty: true });
    expect(pred.models[0]!.selection.redshift_selection!.from).toBe('detection');
    expect(pred.models[0]!.selection.equivalent_width_cut!.frame).toBe('observed');
  });

  test('without any, the statement says none and no attenuation', () => {
    const s = parseSurveyObject(clone(line), FILE);
    expect(describeSurvey(s).populations[0]!.selection).toEqual({ effects: [], attenuation_applied: false });
    expect(predict(s, { noUncertainty: true }).models[0]!.selection).toEqual({
      effects: [],
      attenuation_applied: false,
    });
  });

  test.each([
    ['a fraction above 1', { 'detection.redshift_selection': 1.2 }, 'out_of_range', 'detection.redshift_selection'],
    [
      'an expression going negative',
      { 'population.redshift_selection': '0.5 - z' },
      'out_of_range',
      'population.redshift_selection',
    ],
    [
      'blend_ratio on a magnitude survey',
      { 'population.blend_ratio': 0.3 },
      'kind_mismatch',
      'population.blend_ratio',
      magnitude,
    ],
    ['a negative blend_ratio', { 'population.blend_ratio': -0.1 }, 'out_of_range', 'population.blend_ratio'],
    ['a negative attenuation', { 'population.attenuation': -1 }, 'out_of_range', 'population.attenuation'],
    [
      'an equivalent-width cut without a distribution',
      { 'detection.equivalent_width_cut': { rest: 20 } },
      'missing_key',
      'population.equivalent_widths',
    ],
    // read and ignored before (failed before: the file was accepted and the counts held every width)
    [
      'a distribution of equivalent widths without a cut',
      { 'population.equivalent_widths': { model: 'exponential', scale: 50 } },
      'missing_key',
      'detection.equivalent_width_cut',
    ],
    [
      'an equivalent-width cut on a magnitude survey',
      { 'detection.equivalent_width_cut': { rest: 20 } },
      'kind_mismatch',
      'detection.equivalent_width_cut',
      magnitude,
    ],
    [
      'a lognormal without sigma_dex',
      { 'population.equivalent_widths': { model: 'lognormal', median: 40 } },
      'missing_key',
      'population.equivalent_widths.sigma_dex',
    ],
    [
      'a table of fractions that grows',
      {
        'population.equivalent_widths': {
          model: 'table',
          table: [
            [0, 0.5],
            [10, 0.6],
          ],
        },
      },
      'bad_table',
      'population.equivalent_widths.table[1]',
    ],
    [
      'valid_redshift with max below min',
      { 'population.valid_redshift': { min: 2, max: 1 } },
      'out_of_range',
      'population.valid_redshift.max',
    ],
  ] as [string, Record<string, unknown>, string, string, Record<string, unknown>?][])(
    '%s is refused',
    (_what, keys, code, key, base) => {
      const e = errorOf(() => parseSurveyObject(withKeys(base ?? line, keys), FILE));
      expect(e.code).toBe(code);
      expect(e.keyPath).toBe(key);
      expect(e.message.split('\n')).toHaveLength(1);
    },
  );

  test('a table row outside the range is named as the file writes it (failed before: "the fraction kept is 1.00114 at z = 1.67047", where the line between two rows first crosses 1)', () => {
    const obj = withKeys(line, {
      'detection.redshift_selection': {
        table: [
          [1.0, 0.8],
          [2.0, 1.1],
        ],
      },
      redshift: { min: 0.9, max: 2.5 },
    });
    setPath(obj, 'detection.filter', undefined);
    const e = errorOf(() => parseSurveyObject(obj, FILE));
    expect({ code: e.code, keyPath: e.keyPath }).toEqual({
      code: 'out_of_range',
      keyPath: 'detection.redshift_selection',
    });
    expect(e.message).toContain('the fraction kept is 1.1 at z = 2, outside its physical range (from 0 to 1)');
  });
});

describe('a survey the selection leaves empty says so (failed before: only "check detection.limit, the area and the luminosity function", and forecast "choose a fainter limit or a larger area")', () => {
  test('predict names the selection keys beside the limit; a file without any keeps its message', () => {
    const empty = withKeys(line, { 'detection.redshift_selection': 0, 'population.attenuation': 1 });
    const w = predict(parseSurveyObject(empty, FILE)).warnings.find((x) => x.code === 'no_detections');
    expect(w?.message).toContain(
      'the luminosity function (a log10 given under a linear key such as l_star gives none), or the selection (detection.redshift_selection, population.attenuation)',
    );
    const plain = withKeys(line, { 'detection.limit': 1e-5 });
    const v = predict(parseSurveyObject(plain, FILE)).warnings.find((x) => x.code === 'no_detections');
    expect(v?.message).toBeDefined();
    expect(v?.message).not.toContain('selection');
  });
  test('a filter table whose header says nm over Angstrom values: the warning names the filter and the redshifts it gives the line (failed before: only the limit, the area and the luminosity function)', () => {
    // rows 9150-9250 read as nm put H-alpha 6562.8 A at (91500 to 92500) / 6562.8 - 1 = 12.94 to 13.09
    const dir = tempDir('skytally-nm-filter-');
    writeFileSync(join(dir, 'nb.csv'), 'wavelength_nm,transmission\n9150,0\n9160,0.5\n9200,0.9\n9240,0.5\n9250,0\n');
    const text = `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
detection: {kind: line_flux, limit: 1e-17, line: 6562.8, filter: {profile: table, file: nb.csv}}
population: {variable: luminosity, log10_phi_star: -2.5, log10_l_star: 42.3, alpha: -1.4}
`;
    writeFileSync(join(dir, 'nm.yaml'), text);
    const w = predict(loadSurveyFile(join(dir, 'nm.yaml'))).warnings.find((x) => x.code === 'no_detections');
    expect(w?.message).toContain(
      `or detection.filter, which puts the line at z = ${(91500 / 6562.8 - 1).toFixed(2)} to ${(92500 / 6562.8 - 1).toFixed(2)} (a table in Angstrom under a wavelength_nm header reads ten times redder)`,
    );
    // a top hat (1.19 um, 100 A: H-alpha at z = 0.8056 to 0.8208) gives its redshifts without the
    // table's unit words
    const plain = withKeys(line, { 'detection.limit': 1e-5 });
    const v = predict(parseSurveyObject(plain, FILE)).warnings.find((x) => x.code === 'no_detections')?.message;
    expect(v).toContain('or detection.filter, which puts the line at z = 0.8056 to 0.8208');
    expect(v).not.toContain('wavelength_nm');
  });
  test('forecast names them in its fix', async () => {
    const empty = withKeys(line, { 'population.redshift_selection': 0 });
    const e = await forecast(parseSurveyObject(empty, FILE), { cosmicVariance: false }).then(
      () => undefined,
      (err: unknown) => err as { code?: string; message?: string },
    );
    expect(e?.code).toBe('no_sources');
    expect(e?.message).toContain(
      'choose a fainter limit or a larger area, or check the selection (population.redshift_selection).',
    );
  });
});

describe('warnings about selection traps', () => {
  test('rest_wavelength_default_far_from_band: an r-band survey at z < 0.6 with the default 1500 A', () => {
    const r = withKeys(magnitude, {
      redshift: { min: 0.05, max: 0.6 },
      'detection.band': '6200 Angstrom',
      'population.rest_wavelength': undefined,
    });
    expect(codes(r)).toContain('rest_wavelength_default_far_from_band');
    // the same band with rest_wavelength stated, or a UV survey whose band sees about 1500 A: none
    expect(codes(withKeys(r, { 'population.rest_wavelength': 5000 }))).not.toContain(
      'rest_wavelength_default_far_from_band',
    );
    // a rest-frame band states where M* is defined: no warning either
    const banded = withKeys(r, {
      'detection.sed': { file: 'spectra/invented-starburst.csv' },
      'detection.band': { center: '6200 Angstrom', fwhm: '1400 Angstrom' },
      'population.rest_band': { center: '6200 Angstrom', fwhm: '1400 Angstrom' },
    });
    expect(
      surveyWarnings(parseSurveyObject(banded, FILE, 'test/reference/surveys-selection')).map((w) => w.code),
    ).not.toContain('rest_wavelength_default_far_from_band');
    const uv = withKeys(magnitude, {
      'detection.band': '7500 Angstrom',
      redshift: { min: 3.8, max: 4.2 },
      'population.rest_wavelength': undefined,
    });
    expect(codes(uv)).not.toContain('rest_wavelength_default_far_from_band');
  });

  test('window_beyond_valid_redshift', () => {
    expect(codes(withKeys(magnitude, { 'population.valid_redshift': { min: 3, max: 4.5 } }))).toContain(
      'window_beyond_valid_redshift',
    );
    expect(codes(withKeys(magnitude, { 'population.valid_redshift': { min: 2.5, max: 5.5 } }))).not.toContain(
      'window_beyond_valid_redshift',
    );
  });

  test('igm_not_stated: a band within 1.3 Lyman alpha (1 + z) and no igm key; stating either value silences it', () => {
    // 1.5 um / (1.3 x 1216 A) - 1 = 8.5: the window 3-5 is far; an 8000 A band reaches it at z > 4.06
    expect(codes(clone(magnitude))).not.toContain('igm_not_stated');
    const near = withKeys(magnitude, { 'detection.band': '8000 Angstrom' });
    expect(codes(near)).toContain('igm_not_stated');
    expect(codes(withKeys(near, { 'detection.igm': 'none' }))).not.toContain('igm_not_stated');
    expect(codes(withKeys(near, { 'detection.igm': 'madau1995' }))).not.toContain('igm_not_stated');
  });

  test('phi_star_per_dex: once per population given a per-dex normalisation', () => {
    const dex = withKeys(line, { 'population.phi_star': undefined, 'population.log10_phi_star_dex': -2.6 });
    expect(codes(dex)).toEqual(['phi_star_per_dex']);
    expect(codes(clone(line))).not.toContain('phi_star_per_dex');
  });

  // failed before: "line: 656.3" (nm without its unit) was read as 656.3 Angstrom and counted at
  // z = 17 to 28 through a 1.2-1.9 um filter with no word; the Lyman limit 912 Angstrom (911.75,
  // common practice) is the shortest rest wavelength a galaxy's line is seen at
  test('line_below_lyman_limit: a line shorter than 912 Angstrom, named with the nm form to write', () => {
    const grism = { center: '1.55 um', fwhm: '0.7 um', profile: 'tophat' };
    const nm = withKeys(line, { 'detection.line': 656.3, 'detection.filter': grism });
    const s = parseSurveyObject(nm, FILE);
    const w = surveyWarnings(s).filter((x) => x.code === 'line_below_lyman_limit');
    expect(w).toHaveLength(1);
    expect(s.populations[0]!.window.min).toBeCloseTo(12000 / 656.3 - 1, 10);
    expect(w[0]!.message).toContain('the line at 656.3 A lies below the Lyman limit (912 A)');
    expect(w[0]!.message).toContain('counted at z = 17.28 to 27.95');
    expect(w[0]!.message).toContain('a wavelength in nm needs its unit (line: "656.3 nm")');
    // Lyman alpha itself, and the line written with its unit, raise nothing
    expect(codes(withKeys(line, { 'detection.line': 1215.67, 'detection.filter': grism }))).not.toContain(
      'line_below_lyman_limit',
    );
    expect(codes(withKeys(line, { 'detection.line': '656.3 nm', 'detection.filter': grism }))).not.toContain(
      'line_below_lyman_limit',
    );
  });

  // failed before: a line of blended_lines below the Lyman limit raised nothing, though [NII] 654.8
  // written in nm without its unit, read as 654.8 Angstrom, widens the window to where the grism
  // sees it (z = 12000 / 654.8 - 1 = 17.33 to 19000 / 654.8 - 1 = 28.02) and finds sources by it alone
  test('line_below_lyman_limit: each line of blended_lines shorter than 912 Angstrom, named, with where it adds flux and the form to write', () => {
    const grism = { center: '1.55 um', fwhm: '0.7 um', profile: 'tophat' };
    const blended = (lines: unknown[], filter: unknown = grism) =>
      withKeys(line, {
        'detection.line': 6562.8,
        'detection.filter': filter,
        'population.blended_lines': lines,
      });
    const nii = { line: 6583.45, ratio: 0.15 };
    const s = parseSurveyObject(blended([nii, { line: 654.8, ratio: 0.05 }]), FILE);
    const w = surveyWarnings(s).filter((x) => x.code === 'line_below_lyman_limit');
    expect(w.map((x) => x.message)).toEqual([
      `${s.populations[0]!.name}: blended_lines[1], the line at 654.8 A, lies below the Lyman limit (912 A), where no galaxy's line is seen, ` +
        `so it adds its flux at z = 17.33 to 28.02; a plain number is a wavelength in Angstrom: a wavelength in nm needs its unit ` +
        `(blended_lines: [{line: "654.8 nm", ratio: 0.05}])`,
    ]);
    // the window indeed reaches there (the loader's window: where any of the lines is in the filter)
    expect(s.populations[0]!.window.max).toBeCloseTo(19000 / 654.8 - 1, 10);
    // one warning per such line, each naming its own; without a filter, the whole window
    const two = parseSurveyObject(
      withKeys(
        blended([
          { line: 658.3, ratio: 0.15 },
          { line: 654.8, ratio: 0.05 },
        ]),
        {
          'detection.filter': undefined,
          redshift: { min: 0.8, max: 1.6 },
        },
      ),
      FILE,
    );
    const w2 = surveyWarnings(two).filter((x) => x.code === 'line_below_lyman_limit');
    expect(w2.map((x) => /blended_lines\[(\d)\], the line at ([\d.]+) A/.exec(x.message)?.slice(1))).toEqual([
      ['0', '658.3'],
      ['1', '654.8'],
    ]);
    expect(w2[0]!.message).toContain('so it adds its flux at z = 0.8 to 1.6;');
    // real [NII] lines, and the line written with its unit, raise nothing
    expect(codes(blended([nii, { line: 6548.05, ratio: 0.05 }]))).not.toContain('line_below_lyman_limit');
    expect(codes(blended([nii, { line: '654.8 nm', ratio: 0.05 }]))).not.toContain('line_below_lyman_limit');
  });

  test('through the program: one line on stderr and the code in the JSON of check and predict', async () => {
    const path = join(tempDir('skytally-selection-'), 'near-lya.yaml');
    writeFileSync(path, toYaml(withKeys(magnitude, { 'detection.band': '8000 Angstrom' })));
    for (const cmd of ['check', 'predict']) {
      const r = await runCli([cmd, path, '--format', 'json']);
      expect(r.code).toBe(0);
      const out = JSON.parse(r.stdout) as {
        warnings: { code: string }[];
        populations: { selection?: unknown; model?: { selection: unknown } }[];
      };
      expect(out.warnings.map((w) => w.code)).toContain('igm_not_stated');
      expect(r.stderr).toMatch(/^skytally: warning: .*does not say igm/m);
      // and the statement that no attenuation was applied
      const sel = cmd === 'check' ? out.populations[0]!.selection : out.populations[0]!.model!.selection;
      expect(sel).toEqual({ effects: [], attenuation_applied: false });
    }
  });

  test('no bundled sample raises any of them', () => {
    for (const f of readdirSync('samples').filter((x) => x.endsWith('.yaml'))) {
      expect(surveyWarnings(loadSurveyFile(`samples/${f}`)), f).toEqual([]);
    }
  });

  test('the sample files are what the test reads', () => {
    expect(readFileSync('samples/mass-limited.yaml', 'utf8')).not.toMatch(/_dex:/);
  });
});
