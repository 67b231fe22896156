/**
 * Radio lines (docs/survey-file.md, "Radio lines: HI 21 cm"): a line's rest wavelength given as a
 * frequency ("1420.405752 MHz", lambda = c / nu as for a band), and a line_flux limit or
 * completeness half given as a velocity-integrated flux density ("0.7 Jy km/s"), converted once at
 * detection.line's rest frequency, F = S nu / c. References: the definitions of the jansky
 * (1e-23 erg s^-1 cm^-2 Hz^-1) and of c (SI), and test/reference/generate/radio_line_counts.py
 * (scipy) for the counts.
 */
import { describe, expect, test } from 'vitest';
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { parseSurveyObject } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { predictionTable } from '../../src/render/predict-table.js';
import { describeSurvey } from '../../src/survey/describe.js';
import { checkText } from '../../src/render/check-text.js';
import { readPlanSection } from '../../src/survey/plan-section.js';
import { compare } from '../../src/planning/compare.js';
import { loadSurveyFile } from '../../src/survey/load.js';
import { SPEED_OF_LIGHT_M_S } from '../../src/cosmology/constants.js';
import type { Detection } from '../../src/model/detection.js';
import { errorOf } from '../support/survey-error.js';

const FILE = 'demo/hi.yaml';
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
/** The HI line's rest frequency, Hz (common practice: 1420.405751768 MHz). */
const NU_HI = 1420.405751768e6;

/** The object without its keys set to undefined (a key to leave out). */
const defined = (o: Record<string, unknown>) =>
  Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined));

/** An ALFALFA-like blind HI survey (the population as in test/published/radio-surveys.test.ts). */
function hi(
  detection: Record<string, unknown> = {},
  population: Record<string, unknown> = {},
): Record<string, unknown> {
  return {
    format: 1,
    title: 'blind HI survey (demo)',
    cosmology: { h0: 70, omega_m: 0.3 },
    area: 7000,
    redshift: { min: 0, max: 0.06 },
    detection: defined({ kind: 'line_flux', limit: '0.7 Jy km/s', line: '1420.405751768 MHz', ...detection }),
    population: defined({
      variable: 'luminosity',
      phi_star: 4.5e-3,
      log10_l_star: '9.94 + log10(2.406176e25)',
      alpha: -1.25,
      ...population,
    }),
    slices: { count: 6 },
  };
}

function lineDetection(obj: Record<string, unknown>): Extract<Detection, { kind: 'line_flux' }> {
  const d = parseSurveyObject(obj, FILE).detection;
  if (d.kind !== 'line_flux') throw new Error('not a line_flux detection');
  return d;
}

describe('a line given as a frequency: lambda = c / nu (c = 299,792,458 m/s exactly, SI)', () => {
  test('HI at 1420.405751768 MHz is 21.106114 cm (common practice), to 1e-15 of c / nu', () => {
    const d = lineDetection(hi());
    expect(rel(d.lineAngstrom!, (SPEED_OF_LIGHT_M_S / NU_HI) * 1e10)).toBeLessThan(1e-15);
    expect(d.lineAngstrom! / 1e8).toBeCloseTo(21.106114, 6);
  });
  test("a population's own line may be a frequency too, and a wavelength stays one", () => {
    const s = parseSurveyObject(hi({ limit: 3e-20, line: undefined }, { line: '1420.405751768 MHz' }), FILE);
    expect(s.populations[0]!.lineAngstrom).toBe((SPEED_OF_LIGHT_M_S / NU_HI) * 1e10);
    expect(lineDetection(hi({ line: '21.106114 cm' })).lineAngstrom).toBe(2110611400);
  });
  test('a line that is neither a length nor a frequency is refused naming the key', () => {
    const e = errorOf(() => parseSurveyObject(hi({ line: '2 mJy' }), FILE));
    expect([e.code, e.keyPath]).toEqual(['bad_unit', 'detection.line']);
    expect(e.message).toContain('frequency');
  });
});

describe('a velocity-integrated flux: F = S nu / c at detection.line', () => {
  test('1 Jy km/s of HI is 4.7380e-20 erg/s/cm^2 (about 4.74e-20, from memory; 1e-23 x nu x 1e5 / c, to 1e-14)', () => {
    const d = lineDetection(hi({ limit: '1 Jy km/s' }));
    const want = (1e-23 * NU_HI * 1e5) / (SPEED_OF_LIGHT_M_S * 100); // Jy -> cgs, km/s -> cm/s, c in cm/s
    expect(rel(d.limitCgs, want)).toBeLessThan(1e-14);
    expect(rel(d.limitCgs, 4.7379635940274384e-20)).toBeLessThan(1e-12); // radio_line_counts.py
    expect(Math.abs(d.limitCgs - 4.74e-20) / 4.74e-20).toBeLessThan(1e-3);
    expect(d.limitGivenJyKms).toBe(1);
  });
  test('mJy km/s, Jy km s^-1 and Jy m/s are the same flux written otherwise (to 1e-14)', () => {
    const base = lineDetection(hi()).limitCgs;
    for (const limit of ['700 mJy km/s', '0.7 Jy km s^-1', '700 Jy m/s'])
      expect(rel(lineDetection(hi({ limit })).limitCgs, base), limit).toBeLessThan(1e-14);
  });
  test('a prediction from 0.7 Jy km/s equals, count for count, the same file with its line flux as a number', () => {
    const given = parseSurveyObject(hi(), FILE);
    const d = given.detection as Extract<Detection, { kind: 'line_flux' }>;
    const plain = parseSurveyObject(hi({ limit: d.limitCgs }), FILE);
    const a = predict(given, { noUncertainty: true });
    const b = predict(plain, { noUncertainty: true });
    expect(a.totals.count).toBe(b.totals.count);
    expect(a.breakdown === 'redshift' && a.slices.map((s) => s.count)).toEqual(
      b.breakdown === 'redshift' && b.slices.map((s) => s.count),
    );
  });
  test('the counts match an independent scipy integration (radio_line_counts.py) to 1e-7', () => {
    const p = predict(parseSurveyObject(hi(), FILE), { noUncertainty: true });
    const want = [
      1562.743092647075, 4632.653587982863, 6007.416471749667, 5800.559301371916, 4690.927968183718, 3314.2714000221945,
    ];
    if (p.breakdown !== 'redshift') throw new Error('expected redshift slices');
    p.slices.forEach((s, i) => expect(rel(s.count, want[i]!), String(i)).toBeLessThan(1e-7));
    expect(rel(p.totals.count, 26008.571821957434)).toBeLessThan(1e-7);
  });
  test('the outputs say what the file gave: limit_jy_km_s in the JSON and check, "(given as 0.7 Jy km/s)" in the table', () => {
    const s = parseSurveyObject(hi(), FILE);
    const p = predict(s, { noUncertainty: true });
    expect(p.detection).toMatchObject({ kind: 'line_flux', limit_jy_km_s: 0.7 });
    expect(describeSurvey(s).detection).toMatchObject({ kind: 'line_flux', limit_jy_km_s: 0.7 });
    expect(checkText(FILE, s, describeSurvey(s)).split('\n')).toContain('  detection.limit_jy_km_s = 0.7 Jy km/s');
    expect(predictionTable(p)).toContain('line flux limit 3.317e-20 erg/s/cm^2 (given as 0.7 Jy km/s)');
    const plain = predict(parseSurveyObject(hi({ limit: 3e-20 }), FILE), { noUncertainty: true });
    expect(plain.detection).not.toHaveProperty('limit_jy_km_s');
  });
  test('completeness.half may be a velocity-integrated flux too', () => {
    const d = lineDetection(hi({ completeness: { half: '1 Jy km/s', width: 0.1 } }));
    const one = lineDetection(hi({ limit: '1 Jy km/s' })).limitCgs;
    expect(d.completeness).toEqual({ model: 'logistic', half: -Math.log10(one), width: 0.1 });
  });
  test.each([
    ['no detection.line', { line: undefined }, { line: '1420.405751768 MHz' }, 'missing_key', 'detection.limit'],
    ['a population counting another line', {}, { line: '6562.8 Angstrom' }, 'conflict', 'detection.limit'],
    ['a flux density, not integrated over velocity', { limit: '0.7 Jy' }, {}, 'bad_unit', 'detection.limit'],
    ['a negative flux', { limit: '-0.7 Jy km/s' }, {}, 'out_of_range', 'detection.limit'],
    ['a flux beyond the line-flux range', { limit: '1e20 Jy km/s' }, {}, 'out_of_range', 'detection.limit'],
  ])('refused: %s', (_what, det, pop, code, key) => {
    const e = errorOf(() => parseSurveyObject(hi(det, pop), FILE));
    expect([e.code, e.keyPath]).toEqual([code, key]);
  });
});

describe('an HI mass function given in solar masses is answered with the line luminosity to write', () => {
  test('log10_l_star: 9.94 (Msun) warns implausible_luminosity naming log10_l_star: 35.32 (2.406e25 erg/s per Msun, the docs)', () => {
    const p = predict(parseSurveyObject(hi({}, { log10_l_star: 9.94 }), FILE), { noUncertainty: true });
    const w = p.warnings.find((x) => x.code === 'implausible_luminosity');
    expect(w?.message).toContain('HI mass in Msun');
    expect(w?.message).toContain('log10_l_star: 35.32');
    // another line keeps the general advice
    const other = predict(parseSurveyObject(hi({ limit: 3e-20, line: 6562.8 }, { log10_l_star: 9.94 }), FILE), {
      noUncertainty: true,
    });
    const v = other.warnings.find((x) => x.code === 'implausible_luminosity');
    expect(v?.message).toContain('give l_star in erg/s or log10_l_star');
    expect(v?.message).not.toContain('HI mass');
  });
});

describe("a plan's line-flux limits in Jy km/s, read as detection.limit reads them", () => {
  const planned = (
    planSection: Record<string, unknown>,
    det: Record<string, unknown> = {},
    pop: Record<string, unknown> = {},
  ) => {
    const s = parseSurveyObject(
      {
        ...hi(det, pop),
        plan: { field_of_view: 0.01, budget_hours: 100, goal: 'count', ...planSection },
      },
      FILE,
    );
    return readPlanSection(s, s.populations[0]!);
  };
  test('reference.limit, fixed.limit and depth_law rows in Jy km/s are their line fluxes at detection.line (to 1e-15)', () => {
    const f = (jyKms: number) => (jyKms * 1e-23 * NU_HI * 1e5) / (SPEED_OF_LIGHT_M_S * 100);
    const given = planned({ reference: { limit: '0.7 Jy km/s', exposure_hours: 1 }, fixed: { limit: '0.5 Jy km/s' } });
    expect(given.depthLaw.kind).toBe('background');
    expect(rel((given.depthLaw as { referenceLimit: number }).referenceLimit, f(0.7))).toBeLessThan(1e-15);
    expect(rel((given.fixed as { limit: number }).limit, f(0.5))).toBeLessThan(1e-15);
    const table = planned({
      exposure_grid: { min_hours: 1, max_hours: 10, count: 5 },
      depth_law: {
        table: [
          [1, '1 Jy km/s'],
          [10, '300 mJy km/s'],
        ],
      },
    });
    const limits = (table.depthLaw as { limits: number[] }).limits;
    [1, 0.3].forEach((s, i) => expect(rel(limits[i]!, f(s))).toBeLessThan(1e-15));
  });
  test('without detection.line for every population, a plan limit in Jy km/s is refused naming the key', () => {
    const e = errorOf(() =>
      planned(
        { reference: { limit: '0.7 Jy km/s', exposure_hours: 1 } },
        { limit: 3e-20, line: undefined },
        { line: '1420.405751768 MHz' },
      ),
    );
    expect([e.code, e.keyPath]).toEqual(['missing_key', 'plan.reference.limit']);
  });
});

describe('the outputs of an HI file match their schemas (specs/)', () => {
  const ajv = new Ajv2020({ allErrors: true, strict: false });
  for (const f of readdirSync('specs'))
    if (f.endsWith('.schema.json')) ajv.addSchema(JSON.parse(readFileSync(`specs/${f}`, 'utf8')), f);
  const valid = (schema: string, doc: unknown) => {
    const v = ajv.getSchema(schema)!;
    return v(doc) ? 'valid' : JSON.stringify(v.errors);
  };
  test('check, predict, forecast, compare and plan, with limit_jy_km_s where the schema gives it', async () => {
    const dir = tempDir('skytally-hi-');
    const path = join(dir, 'hi.yaml');
    const text = `format: 1
title: blind HI survey (demo)
cosmology: {h0: 70, omega_m: 0.3}
area: 7000
redshift: {min: 0, max: 0.06}
detection: {kind: line_flux, limit: "0.7 Jy km/s", line: "1420.405751768 MHz"}
population: {variable: luminosity, phi_star: 4.5e-3, log10_l_star: "9.94 + log10(2.406176e25)", alpha: -1.25}
slices: {count: 3}
plan:
  field_of_view: 0.01
  reference: {limit: "0.7 Jy km/s", exposure_hours: 1}
  budget_hours: 1000
  goal: count
  exposure_grid: {min_hours: 0.1, max_hours: 10, count: 20}
`;
    writeFileSync(path, text);
    const json = async (args: string[]) => {
      const r = await runCli([...args, '--format', 'json']);
      expect(r.code, r.stderr).toBe(0);
      return JSON.parse(r.stdout) as Record<string, unknown>;
    };
    const check = await json(['check', path]);
    expect(valid('check.schema.json', check)).toBe('valid');
    expect((check.detection as Record<string, unknown>).limit_jy_km_s).toBe(0.7);
    const p = await json(['predict', path]);
    expect(valid('prediction.schema.json', p)).toBe('valid');
    expect((p.detection as Record<string, unknown>).limit_jy_km_s).toBe(0.7);
    const f = await json(['forecast', path, '--target', 'alpha=0.02']);
    expect(valid('forecast.schema.json', f)).toBe('valid');
    // Jy km/s per erg/s/cm^2 at HI: c / nu = 1e10 lambda [Angstrom] = 2.1106e19 (to 1e-15)
    const perCgs = (f.requirement as Record<string, number>).limit_jy_km_s_per_cgs!;
    expect(rel(perCgs, (SPEED_OF_LIGHT_M_S / NU_HI) * 1e20)).toBeLessThan(1e-15);
    const limit = (f.requirement as Record<string, number>).limit!;
    const words = (await runCli(['forecast', path, '--target', 'alpha=0.02'])).stdout;
    expect(words).toContain(`a limit of ${Number((limit * perCgs).toPrecision(4))} Jy km/s (`);
    const c = await json(['compare', path, path]);
    expect(valid('compare.schema.json', c)).toBe('valid');
    expect((c.surveys as Record<string, unknown>[])[0]!.limit_jy_km_s).toBe(0.7);
    const table = await runCli(['compare', path, path]);
    expect(table.stdout).toContain('0.7 Jy km/s (3.32e-20 erg/s/cm^2)');
    expect(valid('plan.schema.json', await json(['plan', path]))).toBe('valid');
  });
});

describe('compare: line-flux limits of different lines', () => {
  test('HI against H-alpha: the faintest line flux is marked with a note that it need not be the deepest for the population (failed before: marked without a word); the same line: no note', async () => {
    const h = parseSurveyObject(hi(), FILE);
    const halpha = loadSurveyFile('samples/halpha-narrowband.yaml');
    const c = await compare([h, halpha], { cosmicVariance: false });
    expect(c.best.limit).toEqual([0]);
    expect(c.notes.filter((n) => /different lines/.test(n))).toEqual([
      'The limits are fluxes of different lines ([1] 2.1106e9 A, [2] 6562.8 A): the faintest is marked, which is the faintest line flux, not necessarily the deepest for the population; compare the counts and sigmas instead.',
    ]);
    const same = await compare([halpha, loadSurveyFile('samples/slitless-halpha.yaml')], { cosmicVariance: false });
    expect(same.notes.filter((n) => /different lines/.test(n))).toEqual([]);
  }, 60_000);
});
