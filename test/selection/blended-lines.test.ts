/**
 * `blended_lines`: lines blended with a population's line, each at its own rest wavelength and
 * filter transmission (docs/survey-file.md, "Selection effects"). The measured flux is
 * L (T(lambda_0 (1 + z)) + sum_i r_i T(lambda_i (1 + z))) 10^(-0.4 A) / (4 pi D_L^2), the window
 * every redshift where one of the lines is inside the filter, and an equivalent-width cut sees the
 * blend at z. Sources of the expected values:
 * - counts through a gaussian filter, through a top hat with an observed equivalent-width cut,
 *   through a gaussian with a tabulated width distribution and through a tabulated filter: an independent scipy integration with
 *   the lines placed one by one (test/reference/generate/selection_published_counts.py, scipy 1.10.1),
 *   to 1e-6 relative;
 * - without a filter every line has T = 1, so the blend is 1 + sum_i r_i everywhere and every number
 *   of predict, forecast and the explore page equals that of `blend_ratio: sum_i r_i` (definition),
 *   to 1e-12 relative;
 * - the window of a top hat is where any line is inside it (definition).
 */
import { describe, expect, test } from 'vitest';
import { fileURLToPath } from 'node:url';
import { forecast, loadSurveyText, predict } from '../../src/index.js';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { errorOf } from '../support/survey-error.js';

const rel = (a: number, b: number) => Math.abs(a / b - 1);

/** A HiZELS-like narrow-band H-alpha survey with [NII] 6583.45 and 6548.05 at 3 : 1 of the blend b. */
function narrowBand(o: {
  center: string;
  fwhm: string;
  profile: string;
  area: number;
  limit: string;
  logPhi: number;
  logL: number;
  alpha: number;
  b: number;
  cut?: string;
  widths?: string;
}): string {
  return `format: 1
title: narrow-band H-alpha with [NII] at its own wavelengths
cosmology: {h0: 70, omega_m: 0.3}
area: ${o.area}
detection:
  kind: line_flux
  limit: "${o.limit} erg/s/cm^2"
  line: "6562.8 Angstrom"
  filter: {center: "${o.center}", fwhm: "${o.fwhm}", profile: ${o.profile}}
${o.cut ? `  equivalent_width_cut: ${o.cut}\n` : ''}population:
  name: H-alpha emitters
  variable: luminosity
  log10_phi_star: ${o.logPhi}
  log10_l_star: ${o.logL}
  alpha: ${o.alpha}
  attenuation: 1.0
  blended_lines: [{line: 6583.45, ratio: ${0.75 * o.b}}, {line: "6548.05 Angstrom", ratio: ${0.25 * o.b}}]
${o.widths ? `  equivalent_widths: ${o.widths}\n` : ''}slices: {count: 1}
`;
}

const Z223 = { center: '2.121 um', fwhm: '210 Angstrom', area: 0.6, limit: '1e-16', logPhi: -2.78, logL: 42.87 };
const Z084 = { center: '1.211 um', fwhm: '150 Angstrom', area: 1.3, limit: '8e-17', logPhi: -2.47, logL: 42.25 };
const count = (text: string) => predict(loadSurveyText(text, 'blend.yaml'), { noUncertainty: true }).totals.count;

describe('blended lines at their own wavelengths against the lines placed one by one (scipy, 1e-6)', () => {
  test('a gaussian NB_K at z = 2.23: each line at its own transmission, cut at 1.5 fwhm', () => {
    const n = count(narrowBand({ ...Z223, profile: 'gaussian', alpha: -1.59, b: 0.2 }));
    // scipy (selection_published_counts.py, blended_lines gaussian z2.23): 35.78405805571919
    expect(rel(n, 35.78405805571919)).toBeLessThan(1e-6);
  });

  test('a top-hat NB_J at z = 0.84 with an observed-frame width cut of 50 A: the cut sees the blend at z', () => {
    const n = count(
      narrowBand({
        ...Z084,
        profile: 'tophat',
        alpha: -1.56,
        b: 0.33,
        cut: '{observed: 50}',
        widths: '{model: exponential, scale: 30}',
      }),
    );
    // scipy (blended_lines ew z0.84): 383.8195356928802; the blend B(z) jumps where a line leaves
    // the filter, and the count cut only at H-alpha's own edges was 4.4e-3 high
    expect(rel(n, 383.8195356928802)).toBeLessThan(1e-6);
  });

  test('a gaussian NB_J with a rest-frame cut of 20 A and a table of widths: kinks where 20 / B(z) crosses a row', () => {
    const n = count(
      narrowBand({
        ...Z084,
        profile: 'gaussian',
        alpha: -1.56,
        b: 0.33,
        cut: '{rest: 20}',
        widths: '{model: table, table: [[0, 1], [10, 0.8], [20, 0.5], [40, 0.2], [80, 0.05]]}',
      }),
    );
    // scipy (blended_lines gaussian table ew z0.84): 472.05453263270607
    expect(rel(n, 472.05453263270607)).toBeLessThan(1e-6);
  });

  test('a tabulated filter (samples/filters/nb-9200-invented.csv): cut where each line crosses each row', () => {
    const text = `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1.5
detection: {kind: line_flux, limit: 3e-17, line: 6562.8, filter: {profile: table, file: filters/nb-9200-invented.csv}}
population:
  variable: luminosity
  log10_phi_star: -2.8
  log10_l_star: 41.9
  alpha: -1.35
  blended_lines: [{line: 6583.45, ratio: 0.225}, {line: 6548.05, ratio: 0.075}]
slices: {count: 3}
`;
    const samples = fileURLToPath(new URL('../../samples', import.meta.url));
    const p = predict(loadSurveyText(text, 'table.yaml', samples), { noUncertainty: true });
    // scipy (blended_lines table nb920): 1138.9146630950902
    expect(rel(p.totals.count, 1138.9146630950902)).toBeLessThan(1e-6);
  });

  test("a top hat's window is every redshift where one of the lines is inside it", () => {
    const p = predict(loadSurveyText(narrowBand({ ...Z084, profile: 'tophat', alpha: -1.56, b: 0.33 }), 'w.yaml'), {
      noUncertainty: true,
    });
    // definition: from where [NII] 6583.45 enters at 12035 A to where [NII] 6548.05 leaves at 12185 A
    expect(p.slices![0]!.z_min).toBeCloseTo(12035 / 6583.45 - 1, 12);
    expect(p.slices![0]!.z_max).toBeCloseTo(12185 / 6548.05 - 1, 12);
    const model = p.models[0]!;
    expect(model.selection.effects).toEqual(['blended_lines', 'attenuation']);
    expect(model.selection.blended_lines).toEqual([
      { line_angstrom: 6583.45, ratio: 0.75 * 0.33 },
      { line_angstrom: 6548.05, ratio: 0.25 * 0.33 },
    ]);
    expect(model.selection.blend_ratio).toBeUndefined();
    expect(model.summary).toContain(
      'blended lines at 6583.45 A (0.2475 of the line flux) and 6548.05 A (0.0825 of the line flux), each at its own filter transmission',
    );
  });
});

/** A slitless H-alpha survey (no filter) with the blend given either way; completeness, dust, an observed width cut. */
function slitless(blend: string): string {
  return `format: 1
title: slitless H-alpha
cosmology: {h0: 70, omega_m: 0.3}
area: "1.2 deg^2"
redshift: {min: 0.9, max: 1.6}
detection:
  kind: line_flux
  limit: "2.5e-16 erg/s/cm^2"
  line: "6562.8 Angstrom"
  completeness: {model: logistic, half: "3e-16 erg/s/cm^2", width: 0.1}
  equivalent_width_cut: {observed: "40 Angstrom"}
population:
  variable: luminosity
  log10_phi_star: -2.6
  log10_l_star: "42.0 + 0.25*z"
  alpha: -1.35
  ${blend}
  attenuation: 1.0
  equivalent_widths: {model: table, table: [[0, 1], [20, 0.7], [50, 0.3], [120, 0.05]]}
  bias: 1.5
slices: {count: 3}
`;
}

/** Numbers of two outputs that differ beyond `tol` relative (paths), skipping the model statement's selection and summary. */
function differences(a: unknown, b: unknown, tol: number, path = '', out: string[] = []): string[] {
  if (typeof a === 'number' && typeof b === 'number') {
    if (!(a === b || Math.abs(a - b) <= tol * Math.max(Math.abs(a), Math.abs(b)))) out.push(`${path}: ${a} vs ${b}`);
  } else if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${path}: length ${a.length} vs ${b.length}`);
    else a.forEach((x, i) => differences(x, b[i], tol, `${path}[${i}]`, out));
  } else if (a && b && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a).filter((k) => k !== 'selection' && k !== 'summary' && k !== 'raw');
    const kb = Object.keys(b).filter((k) => k !== 'selection' && k !== 'summary' && k !== 'raw');
    if (ka.join() !== kb.join()) out.push(`${path}: keys ${ka.join()} vs ${kb.join()}`);
    else for (const k of ka) differences((a as never)[k], (b as never)[k], tol, `${path}.${k}`, out);
  } else if (a !== b) out.push(`${path}: ${String(a)} vs ${String(b)}`);
  return out;
}

describe('without a filter blended_lines is blend_ratio of their sum (definition, 1e-12)', () => {
  const lines = slitless('blended_lines: [{line: 6583.45, ratio: 0.225}, {line: 6548.05, ratio: 0.075}]');
  const ratio = slitless('blend_ratio: 0.3');

  test('predict: counts, slices, histograms, densities, uncertainties', () => {
    const a = predict(loadSurveyText(lines, 'lines.yaml'));
    const b = predict(loadSurveyText(ratio, 'ratio.yaml'));
    expect(a.totals.count).toBeGreaterThan(0);
    expect(differences(a, b, 1e-12).filter((d) => !d.startsWith('.file') && !d.startsWith('.title'))).toEqual([]);
    expect(a.models[0]!.selection.effects).toEqual(['blended_lines', 'attenuation', 'equivalent_width_cut']);
    // the width cut sees the same blend: the kept fraction at the window's middle
    expect(a.models[0]!.selection.equivalent_width_cut!.kept_at_window_middle).toBeCloseTo(
      b.models[0]!.selection.equivalent_width_cut!.kept_at_window_middle,
      12,
    );
  });

  test('forecast: the Fisher sigmas and the mocks', async () => {
    const opts = { mocks: 20, seed: 3 };
    const a = await forecast(loadSurveyText(lines, 'lines.yaml'), opts);
    const b = await forecast(loadSurveyText(ratio, 'ratio.yaml'), opts);
    expect(differences(a, b, 1e-12).filter((d) => !d.startsWith('.file') && !d.startsWith('.title'))).toEqual([]);
  });

  test('the explore page: every number it shows', async () => {
    const a = await exploreCompute({ text: lines }, 'lines.yaml', '.');
    const b = await exploreCompute({ text: ratio }, 'ratio.yaml', '.');
    expect(a.error).toBeUndefined();
    // the page's own copy of the file's text differs, and its statement of the model (the blend in words); its numbers do not
    const strip = (r: typeof a) => ({ ...r, text: '' });
    expect(differences(strip(a), strip(b), 1e-12).filter((d) => !/\.text|summary|selection|assumed/.test(d))).toEqual(
      [],
    );
  });
});

describe('blended_lines refused in one sentence naming the key and the fix', () => {
  const base = (pop: string, det = 'kind: line_flux, limit: 1e-16, line: 6562.8') => `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 1, max: 1.5}
detection: {${det}}
population: {variable: luminosity, log10_phi_star: -2.6, log10_l_star: 42.5, alpha: -1.4, ${pop}}
`;
  test('with blend_ratio: both named, and which to keep', () => {
    const e = errorOf(() =>
      loadSurveyText(base('blend_ratio: 0.3, blended_lines: [{line: 6583.45, ratio: 0.3}]'), 'both.yaml'),
    );
    expect(e.code).toBe('conflict');
    expect(e.message).toContain('population.blended_lines');
    expect(e.message).toContain('population.blend_ratio');
    expect(e.message).toContain('remove blend_ratio');
  });
  test('on a magnitude survey', () => {
    const e = errorOf(() =>
      loadSurveyText(
        base('blended_lines: [{line: 6583.45, ratio: 0.3}]', 'kind: magnitude, limit: 24, band: 8000')
          .replace('log10_l_star: 42.5', 'm_star: -21')
          .replace('variable: luminosity', 'variable: magnitude'),
        'mag.yaml',
      ),
    );
    expect(e.code).toBe('kind_mismatch');
    expect(e.message).toContain('population.blended_lines');
  });
  test.each([
    ['a ratio of 0', 'ratio: 0', 'population.blended_lines[0].ratio'],
    ['a ratio above 10', 'ratio: 11', 'population.blended_lines[0].ratio'],
  ])('%s', (_, r, key) => {
    const e = errorOf(() => loadSurveyText(base(`blended_lines: [{line: 6583.45, ${r}}]`), 'r.yaml'));
    expect(e.code).toBe('out_of_range');
    expect(e.message).toContain(key);
  });
  test('a line given by name', () => {
    const e = errorOf(() => loadSurveyText(base('blended_lines: [{line: "[NII]", ratio: 0.3}]'), 'n.yaml'));
    expect(e.message).toContain('population.blended_lines[0].line');
  });
  test('a line without its ratio (the schema)', () => {
    const e = errorOf(() => loadSurveyText(base('blended_lines: [{line: 6583.45}]'), 'm.yaml'));
    expect(e.message).toContain('ratio');
  });
});

describe('blend_ratio through a filter is warned about (blend_ratio_through_filter), blended_lines and a slitless ratio are not', () => {
  const nb = (
    blend: string,
    filter = 'filter: {center: "12110 Angstrom", fwhm: "150 Angstrom", profile: tophat}',
  ) => `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1.3
detection: {kind: line_flux, limit: "8e-17 erg/s/cm^2", line: "6562.8 Angstrom", ${filter}}
population: {name: H-alpha emitters, variable: luminosity, log10_phi_star: -2.47, log10_l_star: 42.25, alpha: -1.56, ${blend}}
${filter ? '' : 'redshift: {min: 0.8, max: 0.9}\n'}`;
  const codes = (text: string) =>
    predict(loadSurveyText(text, 'w.yaml'), { noUncertainty: true }).warnings.map((w) => w.code);

  test('through a top hat: warned, naming the key and what to give', () => {
    const p = predict(loadSurveyText(nb('blend_ratio: 0.33'), 'w.yaml'), { noUncertainty: true });
    const w = p.warnings.filter((x) => x.code === 'blend_ratio_through_filter');
    expect(w).toHaveLength(1);
    // led by the population's name, as the other warnings about a population are (its key after it)
    expect(w[0]!.message).toMatch(/^H-alpha emitters: population\.blend_ratio through a filter/);
    expect(w[0]!.message).toContain('give them as blended_lines');
  });
  test('blended_lines through the same filter: not warned', () => {
    expect(codes(nb('blended_lines: [{line: 6583.45, ratio: 0.2475}, {line: 6548.05, ratio: 0.0825}]'))).not.toContain(
      'blend_ratio_through_filter',
    );
  });
  test('a slitless ratio (no filter): not warned', () => {
    expect(codes(nb('blend_ratio: 0.33', ''))).not.toContain('blend_ratio_through_filter');
  });
});
