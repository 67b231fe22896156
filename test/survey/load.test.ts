import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { parse } from 'yaml';
import { SurveyError } from '../../src/errors.js';
import { describeSurvey, loadSurveyFile, loadSurveyText, parseSurveyObject } from '../../src/survey/index.js';
import { LINE_YAML, MAGNITUDE_YAML, THRESHOLD_YAML, clone, setPath, toYaml } from './fixtures.js';
import { tempDir } from '../support/temp.js';

const FILE = 'demo/survey.yaml';

function errorOf(f: () => unknown): SurveyError {
  try {
    f();
  } catch (e) {
    if (e instanceof SurveyError) return e;
    throw e;
  }
  throw new Error('expected a SurveyError, got a survey');
}

function expectOneSentence(e: SurveyError, file = FILE): void {
  expect(e.message.startsWith(`${file}:`), e.message).toBe(true);
  expect(e.message).not.toMatch(/\n/);
  expect(e.message.endsWith('.'), e.message).toBe(true);
  expect(e.message).not.toMatch(/\b(undefined|NaN)\b/);
}

describe('valid surveys (closed-form expectations)', () => {
  test('line search through a tophat filter: window from center +- fwhm/2 (docs/survey-file.md)', () => {
    const s = loadSurveyText(LINE_YAML, FILE);
    // 900 arcmin^2 = 0.25 deg^2 (1 deg = 60 arcmin, by definition).
    expect(s.areaDeg2).toBeCloseTo(0.25, 14);
    expect(s.areaSr).toBeCloseTo(0.25 * (Math.PI / 180) ** 2, 18);
    // 1.19 um = 11900 Angstrom; tophat: z from (11900 - 50)/6563 - 1 to (11900 + 50)/6563 - 1.
    expect(s.redshift.min).toBeCloseTo(11850 / 6563 - 1, 13);
    expect(s.redshift.max).toBeCloseTo(11950 / 6563 - 1, 13);
    expect(s.sliceEdges).toHaveLength(5);
    expect(s.sliceEdges[0]).toBe(s.redshift.min);
    expect(s.sliceEdges[4]).toBe(s.redshift.max);
    const p = s.populations[0]!;
    expect(p.name).toBe('population');
    expect(p.lineAngstrom).toBe(6563);
    // log10_l_star = 41.9 + 0.2 z -> l_star = 10^(41.9 + 0.2 z).
    expect(p.lStar!.at(0.8)).toBeCloseTo(10 ** (41.9 + 0.16), -28);
    expect(p.lStar!.at(0.8) / 10 ** (41.9 + 0.16)).toBeCloseTo(1, 12);
    expect(p.phiStar.at(1)).toBe(1.2e-3);
    expect(s.histogramWidth).toBe(0.1); // docs/survey-file.md: default 0.1 dex for line_flux
    expect(s.detection).toMatchObject({
      kind: 'line_flux',
      limitCgs: 5e-17,
      filter: { profile: 'tophat', centerAngstrom: 11900, fwhmAngstrom: 100 },
    });
    expect(s.cosmology).toMatchObject({ h0: 70, omegaM: 0.3, omegaLambda: 0.7, omegaR: 0, tCmb: 0 });
    expect(s.title).toBe('Narrow-band line search in an invented field');
  });

  test('gaussian filter: window from center +- 1.5 fwhm, intersected with redshift (docs/survey-file.md)', () => {
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj, 'detection.filter.profile', 'gaussian');
    setPath(obj, 'redshift', { min: 0.8, max: 2 });
    const s = parseSurveyObject(obj, FILE);
    expect(s.redshift.min).toBe(0.8); // 0.8 > (11900 - 150)/6563 - 1 = 0.7903
    expect(s.redshift.max).toBeCloseTo((11900 + 150) / 6563 - 1, 13);
  });

  test('magnitude survey: preset, table and expression parameters, width slices, units', () => {
    const s = loadSurveyText(MAGNITUDE_YAML, FILE);
    expect(s.cosmology.preset).toBe('planck2018');
    expect(s.detection).toMatchObject({ kind: 'magnitude', limitMag: 27.5, bandAngstrom: 15000, beta: -2 });
    expect(s.detection.completeness).toEqual({ model: 'logistic', half: 27.2, width: 0.15 });
    const p = s.populations[0]!;
    expect(p.restWavelengthAngstrom).toBe(1500); // 150 nm
    // log10 table interpolated in the log: at z = 4, log10 phi* = -3.1.
    expect(p.phiStar.at(4) / 10 ** -3.1).toBeCloseTo(1, 12);
    expect(p.phiStar.at(2) / 10 ** -2.8).toBeCloseTo(1, 12); // end values held
    expect(p.mStar!.at(4)).toBeCloseTo(-20.8, 12);
    // width 0.3 over [3, 5]: 3, 3.3, ..., 4.8, 5 (the last slice 0.2 wide).
    expect(s.sliceEdges).toHaveLength(8);
    expect(s.sliceEdges[6]).toBeCloseTo(4.8, 12);
    expect(s.sliceEdges[7]).toBe(5);
    expect(s.histogramWidth).toBe(0.5);
    expect(s.exposureHours).toBe(40);
  });

  test('threshold survey: two populations, per-dex normalisations divided by ln 10, edges set the window', () => {
    const s = loadSurveyText(THRESHOLD_YAML, FILE);
    expect(s.populations.map((p) => p.name)).toEqual(['quiescent', 'star-forming']);
    const [q, sf] = s.populations as [NonNullable<(typeof s.populations)[0]>, NonNullable<(typeof s.populations)[0]>];
    expect(q.phiStar.at(1)).toBeCloseTo(2.0e-3 / Math.LN10, 15);
    expect(sf.phiStar.at(1) / (10 ** -2.9 / Math.LN10)).toBeCloseTo(1, 12);
    expect(q.lStar!.at(1) / 10 ** 10.9).toBeCloseTo(1, 12);
    expect(q.bias !== 'auto' && q.bias.at(1)).toBe(1.8);
    expect(sf.bias).toBe('auto');
    expect(q.occupation).toBe(1);
    expect(sf.occupation).toBe(0.7);
    // Edges [0.6, 0.8, 1.0, 1.4] lie inside [0.5, 1.5]; the slices then cover [0.6, 1.4].
    expect(s.sliceEdges).toEqual([0.6, 0.8, 1.0, 1.4]);
    expect(s.redshift).toEqual({ min: 0.6, max: 1.4 });
    // A population's window is its whole window: explicit edges do not cut it; its own
    // result uses the same edges.
    expect(q.window).toEqual({ min: 0.5, max: 1.5 });
    expect(q.sliceEdges).toEqual([0.6, 0.8, 1.0, 1.4]);
    expect(sf.sliceEdges).toEqual([0.6, 0.8, 1.0, 1.4]);
    expect(s.field).toEqual({ aspect: 2, count: 4 });
    // 1 sr = (180/pi)^2 deg^2 (definition of the radian).
    expect(s.areaDeg2 / (0.001 * (180 / Math.PI) ** 2)).toBeCloseTo(1, 13);
    expect(s.histogramWidth).toBe(0.1);
    expect(s.detection.kind === 'threshold' && s.detection.limit.at(1)).toBeCloseTo(9.75, 12);
    expect(s.title).toBe('survey'); // no title: the file name without its extension
    expect(s.cosmology.omegaR).toBeGreaterThan(0);
    expect((s.raw as { plan: unknown }).plan).toEqual({ budget_hours: 100 });
  });

  test('line_flux completeness given in flux is stored in -log10(flux), table re-sorted ascending', () => {
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj, 'detection.completeness', {
      table: [
        [2e-17, 0.1],
        [5e-17, 0.6],
        [1e-16, 0.95],
      ],
    });
    const s = parseSurveyObject(obj, FILE);
    const c = s.detection.completeness!;
    expect(c.model).toBe('table');
    if (c.model === 'table') {
      expect(c.x.map((x) => Number(x.toFixed(12)))).toEqual(
        [16, -Math.log10(5e-17), -Math.log10(2e-17)].map((x) => Number(x.toFixed(12))),
      );
      expect(c.fraction).toEqual([0.95, 0.6, 0.1]);
    }
    setPath(obj, 'detection.completeness', { model: 'logistic', half: '1e-19 W/m^2', width: 0.1 });
    const s2 = parseSurveyObject(obj, FILE);
    // 1e-19 W/m^2 = 1e-16 erg/s/cm^2 -> x = 16.
    expect(s2.detection.completeness).toEqual({ model: 'logistic', half: 16, width: 0.1 });
  });

  test('two lines through one filter: each population has its own window, the survey follows the first', () => {
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    const pop = obj.population as Record<string, unknown>;
    delete obj.population;
    obj.populations = [
      { ...pop, name: 'red line' },
      { ...pop, line: '500.7 nm' },
    ];
    const s = parseSurveyObject(obj, FILE);
    const [a, b] = s.populations;
    // tophat windows (docs/survey-file.md): (11900 -+ 50)/line - 1.
    expect(a!.window.min).toBeCloseTo(11850 / 6563 - 1, 13);
    expect(b!.window.min).toBeCloseTo(11850 / 5007 - 1, 13);
    expect(b!.name).toBe('population 2');
    // Issue 7: the survey's slices follow the first population's window; each population's own
    // slices apply the same rule ({count: N} here or the default) to its own window.
    expect(s.redshift).toEqual(a!.window);
    expect(a!.sliceEdges).toEqual(s.sliceEdges);
    expect(b!.sliceEdges[0]).toBe(b!.window.min);
    expect(b!.sliceEdges[b!.sliceEdges.length - 1]).toBe(b!.window.max);
    expect(b!.sliceEdges.length).toBe(s.sliceEdges.length);
  });

  test('describeSurvey gives plain finite JSON with units in the names', () => {
    for (const y of [LINE_YAML, MAGNITUDE_YAML, THRESHOLD_YAML]) {
      const d = describeSurvey(loadSurveyText(y, FILE));
      const text = JSON.stringify(d);
      expect(JSON.parse(text)).toEqual(d);
      expect(text).not.toMatch(/null|NaN|Infinity/);
      expect(d).toHaveProperty('area_deg2');
      expect(d).toHaveProperty('window');
    }
    const d = describeSurvey(loadSurveyText(LINE_YAML, FILE)) as { detection: Record<string, unknown> };
    expect(d.detection).toMatchObject({ limit_cgs: 5e-17, line_angstrom: 6563 });
  });

  test('loadSurveyFile reads a file and names it in the survey', () => {
    const dir = tempDir('skytally-load-');
    const path = join(dir, 'line.yaml');
    writeFileSync(path, LINE_YAML);
    const s = loadSurveyFile(path);
    expect(s.file).toBe(path);
    expect(s.raw).toEqual(parse(LINE_YAML));
  });
});

type Case = [name: string, base: string, edit: Record<string, unknown>, code: string, keyPath: string];

const L = LINE_YAML;
const M = MAGNITUDE_YAML;
const T = THRESHOLD_YAML;
const DEL = undefined;

const cases: Case[] = [
  // schema: unknown keys, missing keys, types, conflicts
  ['unknown top-level key', L, { aera: 2 }, 'unknown_key', 'aera'],
  ['misspelt population key', L, { 'population.aplha': -1 }, 'unknown_key', 'population.aplha'],
  [
    'misspelt table key',
    L,
    {
      'population.phi_star': {
        tabel: [
          [0, 1],
          [1, 2],
        ],
      },
    },
    'unknown_key',
    'population.phi_star.tabel',
  ],
  ['missing detection', L, { detection: DEL }, 'missing_key', 'detection'],
  ['missing cosmology', L, { cosmology: DEL }, 'missing_key', 'cosmology'],
  ['missing population', L, { population: DEL }, 'missing_key', 'population'],
  [
    'population and populations',
    L,
    { populations: [{ variable: 'luminosity', phi_star: 2.2e-3, l_star: 1e42, alpha: -1 }] },
    'conflict',
    'populations',
  ],
  ['two normalisations', L, { 'population.log10_phi_star': -2.65 }, 'conflict', 'population.log10_phi_star'],
  ['no normalisation', L, { 'population.phi_star': DEL }, 'missing_key', 'population.phi_star'],
  ['missing alpha', L, { 'population.alpha': DEL }, 'missing_key', 'population.alpha'],
  ['area a list', L, { area: [1, 2] }, 'wrong_type', 'area'],
  ['h0 as text', L, { 'cosmology.h0': true }, 'wrong_type', 'cosmology.h0'],
  ['phi_star a boolean', L, { 'population.phi_star': false }, 'wrong_type', 'population.phi_star'],
  ['unknown kind', L, { 'detection.kind': 'lineflux' }, 'out_of_range', 'detection.kind'],
  ['unknown profile', L, { 'detection.filter.profile': 'box' }, 'out_of_range', 'detection.filter.profile'],
  ['format 2', L, { format: 2 }, 'out_of_range', 'format'],
  ['fractional slice count', L, { slices: { count: 2.5 } }, 'wrong_type', 'slices.count'],
  ['two slice forms', L, { slices: { count: 3, width: 0.1 } }, 'conflict', 'slices.width'],
  // a value that is not a mapping passes each `required` branch of a oneOf vacuously: it is a wrong
  // type, not two keys given (failed before: "count and width are both given", code conflict)
  ['slices a number', L, { slices: 5 }, 'wrong_type', 'slices'],
  ['slices empty', L, { slices: null }, 'wrong_type', 'slices'],
  [
    'equivalent-width cut a number',
    L,
    { 'detection.equivalent_width_cut': 40 },
    'wrong_type',
    'detection.equivalent_width_cut',
  ],
  ['a population a number', L, { population: DEL, populations: [5] }, 'wrong_type', 'populations[0]'],
  [
    'table row of three',
    L,
    {
      'population.alpha': {
        table: [
          [0, 1],
          [1, 2, 3],
        ],
      },
    },
    'bad_table',
    'population.alpha.table[1]',
  ],
  ['table of one row', L, { 'population.alpha': { table: [[0, 1]] } }, 'bad_table', 'population.alpha.table'],
  [
    'table z not increasing',
    L,
    {
      'population.alpha': {
        table: [
          [1, -1],
          [1, -1.2],
        ],
      },
    },
    'bad_table',
    'population.alpha.table[1]',
  ],
  ['one slice edge', T, { slices: { edges: [0.7] } }, 'bad_slices', 'slices.edges'],
  ['infinite area', L, { area: Infinity }, 'not_finite', 'area'],
  // units
  ['area in degrees, not square degrees', L, { area: '2.5 deg' }, 'bad_unit', 'area'],
  ['area in an unknown unit', L, { area: '2.5 furlongs' }, 'bad_unit', 'area'],
  ['area with no number', L, { area: 'arcmin^2' }, 'bad_unit', 'area'],
  ['area as bare words', L, { area: 'big' }, 'bad_unit', 'area'],
  ['line in amperes (A is not Angstrom)', L, { 'detection.line': '6563 A' }, 'bad_unit', 'detection.line'],
  ['flux limit in watts', L, { 'detection.limit': '5e-20 W' }, 'bad_unit', 'detection.limit'],
  ['exposure in metres', L, { exposure: '3 m' }, 'bad_unit', 'exposure'],
  ['magnitude limit with a unit', M, { 'detection.limit': '27 mag' }, 'bad_unit', 'detection.limit'],
  ['filter center in seconds', L, { 'detection.filter.center': '3 s' }, 'bad_unit', 'detection.filter.center'],
  // ranges and windows
  ['zero area', L, { area: 0 }, 'out_of_range', 'area'],
  ['more than the whole sky', L, { area: 41253 }, 'out_of_range', 'area'],
  ['more than 4 pi sr', L, { area: '12.6 sr' }, 'out_of_range', 'area'],
  ['negative redshift', M, { redshift: { min: -0.1, max: 1 } }, 'bad_window', 'redshift.min'],
  ['empty redshift window', M, { redshift: { min: 2, max: 2 } }, 'bad_window', 'redshift.max'],
  ['filter misses the redshift window', L, { redshift: { min: 2, max: 3 } }, 'bad_window', 'detection.filter'],
  ['filter bluer than the line', L, { 'detection.filter.center': 5000 }, 'bad_window', 'detection.filter'],
  ['zero filter width', L, { 'detection.filter.fwhm': 0 }, 'out_of_range', 'detection.filter.fwhm'],
  ['no redshift and no filter', L, { 'detection.filter': DEL }, 'missing_key', 'redshift'],
  ['zero slices', M, { slices: { count: 0 } }, 'bad_slices', 'slices.count'],
  ['negative slice width', M, { slices: { width: -0.1 } }, 'bad_slices', 'slices.width'],
  ['slice width making too many slices', M, { slices: { width: 1e-7 } }, 'bad_slices', 'slices.width'],
  ['edge outside the window', T, { slices: { edges: [0.4, 1.0] } }, 'bad_slices', 'slices.edges[0]'],
  ['edges not increasing', T, { slices: { edges: [0.6, 1.0, 0.9] } }, 'bad_slices', 'slices.edges[2]'],
  ['zero histogram width', L, { histogram: { width: 0 } }, 'out_of_range', 'histogram.width'],
  ['negative flux limit', L, { 'detection.limit': -5e-17 }, 'out_of_range', 'detection.limit'],
  [
    'table as a flux limit',
    L,
    {
      'detection.limit': {
        table: [
          [0, 1],
          [1, 2],
        ],
      },
    },
    'wrong_type',
    'detection.limit',
  ],
  ['negative exposure', L, { exposure: -3 }, 'out_of_range', 'exposure'],
  ['zero field aspect', L, { field: { aspect: 0 } }, 'out_of_range', 'field.aspect'],
  ['zero fields', L, { field: { count: 0 } }, 'out_of_range', 'field.count'],
  // kinds
  [
    'magnitude kind with a luminosity population',
    M,
    { 'population.variable': 'luminosity' },
    'kind_mismatch',
    'population.variable',
  ],
  [
    'line_flux kind with a magnitude population',
    L,
    { 'population.variable': 'magnitude' },
    'kind_mismatch',
    'population.variable',
  ],
  ['band on a line_flux detection', L, { 'detection.band': 5000 }, 'kind_mismatch', 'detection.band'],
  [
    'filter on a magnitude detection',
    M,
    { 'detection.filter': { center: 5000, fwhm: 50 } },
    'kind_mismatch',
    'detection.filter',
  ],
  ['population line with the magnitude kind', M, { 'population.line': 1216 }, 'kind_mismatch', 'population.line'],
  ['m_star for a luminosity variable', L, { 'population.m_star': -20 }, 'kind_mismatch', 'population.m_star'],
  ['l_star for a magnitude variable', M, { 'population.l_star': 1e42 }, 'kind_mismatch', 'population.l_star'],
  ['l_star and log10_l_star', L, { 'population.l_star': 1e42 }, 'conflict', 'population.log10_l_star'],
  ['no l_star', L, { 'population.log10_l_star': DEL }, 'missing_key', 'population.l_star'],
  ['no m_star', M, { 'population.m_star': DEL }, 'missing_key', 'population.m_star'],
  ['no line', L, { 'detection.line': DEL }, 'missing_key', 'detection.line'],
  ['no band', M, { 'detection.band': DEL }, 'missing_key', 'detection.band'],
  // completeness
  ['zero completeness width', M, { 'detection.completeness.width': 0 }, 'out_of_range', 'detection.completeness.width'],
  ['missing half', M, { 'detection.completeness.half': DEL }, 'missing_key', 'detection.completeness.half'],
  [
    'table and half',
    M,
    {
      'detection.completeness': {
        half: 27,
        table: [
          [26, 1],
          [28, 0],
        ],
      },
    },
    'conflict',
    'detection.completeness.half',
  ],
  [
    'logistic with a table',
    M,
    {
      'detection.completeness': {
        model: 'logistic',
        half: 27,
        width: 0.2,
        table: [
          [26, 1],
          [28, 0],
        ],
      },
    },
    'conflict',
    'detection.completeness.table',
  ],
  [
    'fraction above 1',
    M,
    {
      'detection.completeness': {
        table: [
          [26, 1],
          [28, 1.5],
        ],
      },
    },
    'out_of_range',
    'detection.completeness.table[1]',
  ],
  [
    'completeness x not increasing',
    M,
    {
      'detection.completeness': {
        table: [
          [28, 1],
          [26, 0],
        ],
      },
    },
    'bad_table',
    'detection.completeness.table[1]',
  ],
  [
    'negative flux in a completeness table',
    L,
    {
      'detection.completeness': {
        table: [
          [-1e-17, 0],
          [1e-16, 1],
        ],
      },
    },
    'out_of_range',
    'detection.completeness.table[0]',
  ],
  // parameter values
  ['negative phi_star', L, { 'population.phi_star': -2.2e-3 }, 'out_of_range', 'population.phi_star'],
  [
    'phi_star expression negative inside the window',
    M,
    { 'population.log10_phi_star': DEL, 'population.phi_star': '2.2e-3 * (4 - z)' },
    'out_of_range',
    'population.phi_star',
  ],
  [
    'phi_star table negative inside the window',
    M,
    {
      'population.log10_phi_star': DEL,
      'population.phi_star': {
        table: [
          [3, 2.2e-3],
          [4, -1e-4],
          [5, 2.2e-3],
        ],
      },
    },
    'out_of_range',
    'population.phi_star',
  ],
  ['NaN from sqrt over the window', M, { 'population.alpha': 'sqrt(4 - z) - 2' }, 'bad_expression', 'population.alpha'],
  ['log10 of a negative number', M, { 'population.alpha': 'log10(3.5 - z)' }, 'bad_expression', 'population.alpha'],
  ['expression with a call', L, { 'population.alpha': "import('fs')" }, 'bad_expression', 'population.alpha'],
  [
    'expression with implicit multiplication',
    L,
    { 'population.alpha': '-1.35 - 0.1z' },
    'bad_expression',
    'population.alpha',
  ],
  ['l_star overflowing to infinity', L, { 'population.log10_l_star': 400 }, 'not_finite', 'population.log10_l_star'],
  ['negative bias', L, { 'population.bias': -1 }, 'out_of_range', 'population.bias'],
  ['zero occupation', L, { 'population.occupation': 0 }, 'out_of_range', 'population.occupation'],
  ['occupation above 1', L, { 'population.occupation': 1.5 }, 'out_of_range', 'population.occupation'],
  // occupation enters only abundance matching (bias: auto); read and ignored beside a given bias before
  ['occupation beside a given bias', T, { 'populations[0].occupation': 0.5 }, 'conflict', 'populations[0].occupation'],
  ['duplicate population names', T, { 'populations[1].name': 'quiescent' }, 'conflict', 'populations[1].name'],
  [
    'negative rest wavelength',
    M,
    { 'population.rest_wavelength': -1500 },
    'out_of_range',
    'population.rest_wavelength',
  ],
  // cosmology
  ['unknown preset', M, { 'cosmology.preset': 'planck2019' }, 'out_of_range', 'cosmology.preset'],
  ['no h0 and no preset', L, { 'cosmology.h0': DEL }, 'missing_key', 'cosmology.h0'],
  ['no omega_m and no preset', L, { 'cosmology.omega_m': DEL }, 'missing_key', 'cosmology.omega_m'],
  ['h0 of 600', L, { 'cosmology.h0': 600 }, 'out_of_range', 'cosmology.h0'],
  ['zero h0', L, { 'cosmology.h0': 0 }, 'out_of_range', 'cosmology.h0'],
  ['omega_m above 1', L, { 'cosmology.omega_m': 1.2 }, 'out_of_range', 'cosmology.omega_m'],
  ['negative t_cmb', L, { 'cosmology.t_cmb': -1 }, 'out_of_range', 'cosmology.t_cmb'],
  ['omega_b above omega_m', L, { 'cosmology.omega_b': 0.5 }, 'out_of_range', 'cosmology.omega_b'],
];

describe('bad input: one SurveyError with a stable code and key path', () => {
  test.each(cases)('%s', (_name, base, edit, code, keyPath) => {
    const obj = clone(parse(base) as Record<string, unknown>);
    for (const [k, v] of Object.entries(edit)) setPath(obj, k, v);
    // Through the object entry point, and (where YAML can express the value) through the text one.
    const e = errorOf(() => parseSurveyObject(obj, FILE));
    expect({ code: e.code, keyPath: e.keyPath }).toEqual({ code, keyPath });
    expect(e.file).toBe(FILE);
    expectOneSentence(e);
    const e2 = errorOf(() => loadSurveyText(toYaml(obj), FILE));
    expect({ code: e2.code, keyPath: e2.keyPath }).toEqual({ code, keyPath });
  });

  test('an unknown key suggests the nearest valid key', () => {
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj, 'population.aplha', -1);
    expect(errorOf(() => parseSurveyObject(obj, FILE)).message).toContain('did you mean alpha?');
    const obj2 = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj2, 'detection.kind', 'lineflux');
    expect(errorOf(() => parseSurveyObject(obj2, FILE)).message).toContain('did you mean line_flux?');
  });

  test('a linear L* under log10_l_star names the slip and the fix (failed before: "l_star is infinite ... give values that stay finite")', () => {
    const message = (v: number) => {
      const obj = parse(LINE_YAML) as Record<string, unknown>;
      setPath(obj, 'population.log10_l_star', v);
      return errorOf(() => parseSurveyObject(obj, FILE));
    };
    const e = message(4.57e42);
    expect(e.code).toBe('not_finite'); // as before: 10^4.57e42 overflows
    expect(e.message).toContain('is 4.57e42, not a log10 of L* (from -30 to 60)');
    expect(e.message).toContain('write l_star: 4.57e42 (or log10_l_star: 42.66)');
    expectOneSentence(e);
    // just beyond the range: the same code as the check of L* gave (out_of_range), no linear hint
    const f = message(61);
    expect(f.code).toBe('out_of_range');
    expect(f.message).toContain('is 61, not a log10 of L*');
    expect(f.message).not.toContain('linear');
    // the range's ends are accepted (L* = 1e60 and 1e-30, the physical range)
    const ok = parse(LINE_YAML) as Record<string, unknown>;
    setPath(ok, 'population.log10_l_star', 60);
    expect(() => parseSurveyObject(ok, FILE)).not.toThrow();
  });

  test('a value that should be a mapping of one of several keys names them, not a conflict (failed before: "slices.width: count and width are both given")', () => {
    const message = (key: string, v: unknown) => {
      const obj = parse(LINE_YAML) as Record<string, unknown>;
      setPath(obj, key, v);
      return errorOf(() => parseSurveyObject(obj, FILE)).message;
    };
    expect(message('slices', 5)).toBe(
      `${FILE}: slices: is 5 but must be a mapping holding one of count, width, edges; write it as slices: {count: 5}.`,
    );
    expect(message('detection.equivalent_width_cut', '15 Angstrom')).toBe(
      `${FILE}: detection.equivalent_width_cut: is the text "15 Angstrom" but must be a mapping holding one of rest, observed; write it as equivalent_width_cut: {rest: "15 Angstrom"} (or {observed: "15 Angstrom"} for a width in the observed frame).`,
    );
    // two keys given is still a conflict
    expect(message('slices', { count: 3, edges: [0.1, 0.2] })).toContain('count and edges are both given');
  });

  test('a key of another section is told where it belongs, not renamed to a near key here (failed before: "populations[0].equivalent_width_cut: ... (did you mean equivalent_widths?); rename or remove it")', () => {
    const message = (key: string, v: unknown) => {
      const obj = parse(LINE_YAML) as Record<string, unknown>;
      setPath(obj, key, v);
      const e = errorOf(() => parseSurveyObject(obj, FILE));
      expect({ code: e.code, keyPath: e.keyPath }).toEqual({ code: 'unknown_key', keyPath: key });
      expectOneSentence(e);
      return e.message;
    };
    expect(message('population.equivalent_width_cut', { rest: 10 })).toBe(
      `${FILE}: population.equivalent_width_cut: unknown key "equivalent_width_cut" here: it is a key of detection, not of a population; move it there.`,
    );
    expect(message('detection.blend_ratio', 0.3)).toContain(
      'unknown key "blend_ratio" here: it is a key of a population, not of detection; move it there.',
    );
    expect(message('detection.equivalent_widths', { model: 'exponential', scale: 50 })).toContain(
      'it is a key of a population, not of detection',
    );
    expect(message('redshift_selection', 0.5)).toContain(
      'it is a key of detection or of a population, not of the top level',
    );
    expect(message('h0', 70)).toContain('it is a key of cosmology, not of the top level');
    // a misspelling with no home elsewhere keeps its suggestion
    expect(message('population.aplha', -1)).toContain('did you mean alpha?');
  });

  test('a unit of the wrong dimension names the expected unit', () => {
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj, 'area', '2.5 deg');
    expect(errorOf(() => parseSurveyObject(obj, FILE)).message).toContain('deg^2');
  });
});

describe('bad YAML and bad files', () => {
  const yamlCases: [string, string, string, string][] = [
    ['syntax error', 'format: 1\narea: [1, 2\ncosmology: {h0: 70}\n', 'yaml_syntax', ''],
    [
      'duplicate key',
      LINE_YAML.replace('kind: line_flux', 'kind: line_flux\n  kind: magnitude'),
      'yaml_syntax',
      'detection.kind',
    ],
    ['two documents', LINE_YAML + '---\n' + LINE_YAML, 'yaml_syntax', ''],
    ['unsupported tag', LINE_YAML.replace('area: "900 arcmin^2"', 'area: !secret 900'), 'yaml_syntax', ''],
    ['a list, not a mapping', '- 1\n- 2\n', 'wrong_type', ''],
    ['an empty file', '', 'wrong_type', ''],
    ['infinity', LINE_YAML.replace('area: "900 arcmin^2"', 'area: .inf'), 'not_finite', 'area'],
    ['binary data', LINE_YAML.replace('area: "900 arcmin^2"', 'area: !!binary aGVsbG8='), 'wrong_type', 'area'],
  ];
  test.each(yamlCases)('%s', (_name, text, code, keyPath) => {
    const e = errorOf(() => loadSurveyText(text, FILE));
    expect({ code: e.code, keyPath: e.keyPath }).toEqual({ code, keyPath });
    expectOneSentence(e);
  });

  test('a number pasted with the typeset minus sign (U+2212) where a number must be: the sentence names the sign and gives the number to write (failed before: "is the text "−2" but must be a number")', () => {
    const text = `${LINE_YAML}`.replace('area: "900 arcmin^2"', 'area: "900 arcmin^2"\nfield: {aspect: \u22122}');
    const e = errorOf(() => loadSurveyText(text, FILE));
    expect({ code: e.code, keyPath: e.keyPath }).toEqual({ code: 'wrong_type', keyPath: 'field.aspect' });
    expect(e.message).toContain('the typeset minus sign "\u2212" (U+2212)');
    expect(e.message).toContain('write -2 with the minus sign "-"');
    expectOneSentence(e);
    // a text that is not a number keeps the plain sentence
    const other = errorOf(() => loadSurveyText(text.replace('aspect: \u22122', 'aspect: two'), FILE));
    expect(other.message).toContain('is the text "two" but must be');
    expect(other.message).not.toContain('U+2212');
  });

  test("a section written as its values alone shows the form to write, with those values where they fit (failed before: 'change the value to that form'; found by a trial user)", () => {
    const message = (key: string, v: unknown) => {
      const obj = parse(LINE_YAML) as Record<string, unknown>;
      setPath(obj, key, v);
      const e = errorOf(() => parseSurveyObject(obj, FILE));
      expectOneSentence(e);
      return e.message;
    };
    expect(message('redshift', [0.8, 1.6])).toContain('write it as redshift: {min: 0.8, max: 1.6}.');
    expect(message('redshift', '0.8-1.6')).toContain('write it as redshift: {min: 0.5, max: 1.5}.');
    expect(message('slices', [0.8, 1.0, 1.6])).toContain('write it as slices: {edges: [0.8, 1, 1.6]}.');
    expect(message('histogram', 0.2)).toContain('write it as histogram: {width: 0.2}.');
    expect(message('cosmology', 'planck2018')).toContain(
      'write it as cosmology: {h0: 70, omega_m: 0.3} or {preset: planck2018}.',
    );
    expect(message('field', 4)).toContain('write it as field: {aspect: 1, count: 4}.');
    for (const [k, v] of [
      ['redshift', [0.8, 1.6]],
      ['slices', 5],
      ['histogram', 0.2],
      ['cosmology', 'planck2018'],
      ['field', 4],
    ] as const)
      expect(message(k, v)).not.toContain('change the value to that form');
  });

  test("a spectrum's path without its mapping, or a bias factor given as a table: the sentence shows the form to write (failed before: 'change the value to that form')", () => {
    const mag = `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 1, max: 1.5}
detection: {kind: magnitude, limit: 25, band: {center: 8000, fwhm: 1000, profile: tophat}, sed: SED}
population: {variable: magnitude, phi_star: 0.003, m_star: -21, alpha: -1.3}
`;
    const sed = errorOf(() => loadSurveyText(mag.replace('SED', 'spec.csv'), FILE));
    expect({ code: sed.code, keyPath: sed.keyPath }).toEqual({ code: 'wrong_type', keyPath: 'detection.sed' });
    expect(sed.message).toBe(
      `${FILE}: detection.sed: is the text "spec.csv" but must be a mapping of keys; write it as sed: {file: spec.csv}.`,
    );
    expectOneSentence(sed);
    const list = errorOf(() => loadSurveyText(mag.replace('SED', '[a]'), FILE));
    expect(list.message).toContain('write it as sed: {file: spectrum.csv} (the path relative to the survey file)');
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj, 'population.bias', {
      over_growth: {
        table: [
          [1, 2],
          [2, 3],
        ],
      },
    });
    const bias = errorOf(() => parseSurveyObject(obj, FILE));
    expect(bias.keyPath).toBe('population.bias.over_growth');
    expect(bias.message).toContain('write it as over_growth: 0.84, a plain number (b = 0.84 / D(z))');
    expectOneSentence(bias);
  });

  test("a number written with a unit, or quoted, where a key takes a plain number: the sentence gives the number to write (failed before: 'change the value to that form')", () => {
    const message = (key: string, v: unknown) => {
      const obj = parse(LINE_YAML) as Record<string, unknown>;
      setPath(obj, key, v);
      const e = errorOf(() => parseSurveyObject(obj, FILE));
      expect({ code: e.code, keyPath: e.keyPath }).toEqual({ code: 'wrong_type', keyPath: key });
      expectOneSentence(e);
      return e.message;
    };
    // h0 is a plain number in km/s/Mpc (docs/survey-file.md)
    expect(message('cosmology.h0', '70 km/s/Mpc')).toBe(
      `${FILE}: cosmology.h0: is the text "70 km/s/Mpc" but must be a number, without a unit; write 70 alone, in the key's own unit (docs/survey-file.md gives each key's unit).`,
    );
    expect(message('slices.count', '5 slices')).toContain('write 5 alone');
    expect(message('cosmology.h0', '70')).toBe(
      `${FILE}: cosmology.h0: is the text "70" but must be a number; write 70 without quotes.`,
    );
    // a percentage: no key takes one, so the fix gives the fraction (a correlation of "70%" was told
    // to "write 70", which is then out of range; found by a trial user)
    expect(message('detection.photo_z.outlier_fraction', '5%')).toContain(
      'no key takes a percentage: write it as its fraction, 0.05',
    );
    // not a number to write as it is: the plain sentence (5.5 is no whole number; "seventy" no number)
    expect(message('slices.count', '5.5')).toContain('change the value to that form');
    expect(message('cosmology.h0', 'seventy')).toContain('change the value to that form');
  });

  test('a syntax error gives its line and column', () => {
    const e = errorOf(() => loadSurveyText('format: 1\narea: [1, 2\ncosmology: {h0: 70}\n', FILE));
    expect(e.message).toMatch(/line \d+, column \d+/);
  });

  test('missing file, directory and a 2 MiB file', () => {
    const dir = tempDir('skytally-load-');
    const missing = join(dir, 'nope.yaml');
    let e = errorOf(() => loadSurveyFile(missing));
    expect([e.code, e.keyPath]).toEqual(['file_unreadable', '']);
    expectOneSentence(e, missing);
    const sub = join(dir, 'sub.yaml');
    mkdirSync(sub);
    e = errorOf(() => loadSurveyFile(sub));
    expect(e.code).toBe('file_unreadable');
    const big = join(dir, 'big.yaml');
    writeFileSync(big, LINE_YAML + '#' + 'x'.repeat(2 * 1024 * 1024) + '\n');
    e = errorOf(() => loadSurveyFile(big));
    expect([e.code, e.keyPath]).toEqual(['file_too_large', '']);
    expectOneSentence(e, big);
    e = errorOf(() => loadSurveyText(LINE_YAML + '#' + 'x'.repeat(2 * 1024 * 1024) + '\n', FILE));
    expect(e.code).toBe('file_too_large');
  });

  test('an alias bomb (each level nine times the last) is stopped at the alias limit', () => {
    let text = 'a0: &a0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]\n';
    for (let i = 1; i <= 9; i++) {
      text += `a${i}: &a${i} [${Array(9)
        .fill(`*a${i - 1}`)
        .join(', ')}]\n`;
    }
    // Fully expanded this would hold 9^10 (about 3.5e9) strings.
    const e = errorOf(() => loadSurveyText(text, FILE));
    expect([e.code, e.keyPath]).toEqual(['yaml_aliases', '']);
    expectOneSentence(e);
  });

  test('a few aliases are fine', () => {
    const text = LINE_YAML.replace('alpha: -1.35', 'alpha: &a -1.35').replace(
      'slices: {count: 4}',
      'slices: {count: 4}\nhistogram: {width: 0.1}',
    );
    expect(loadSurveyText(text, FILE).populations[0]!.alpha.at(1)).toBe(-1.35);
  });
});
