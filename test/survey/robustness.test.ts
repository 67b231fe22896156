/**
 * The loader against hostile and extreme input: physical ranges checked once at load, stated
 * caps on every size, one reader for every input file (regular files only, with a size limit),
 * the YAML limits, messages that quote at most a short escaped excerpt, and the strict expression
 * grammar. Each case must be one SurveyError (tests assert the code and the key path, not the
 * wording). Expected values are the limits stated in src/model/limits.ts, src/cosmology/parameters.ts
 * (COSMOLOGY_RANGES) and README.md ("Limits").
 */
import { tempDir } from '../support/temp.js';
import fc from 'fast-check';
import { execFileSync } from 'node:child_process';
import { symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { parse } from 'yaml';
import { SurveyError } from '../../src/errors.js';
import { compileExpression, loadSurveyFile, loadSurveyText, parseSurveyObject } from '../../src/survey/index.js';
import { COSMOLOGY_RANGES, MAX_BARYON_FRACTION, resolveCosmology } from '../../src/cosmology/parameters.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { createLinearPower } from '../../src/uncertainty/power-spectrum.js';
import { CAPS, MAX_REDSHIFT, MIN_SLICE_WIDTH } from '../../src/model/limits.js';
import { readInputText } from '../../src/survey/read-input.js';
import { LINE_YAML, MAGNITUDE_YAML, THRESHOLD_YAML, setPath } from './fixtures.js';
import { errorOf } from '../support/survey-error.js';

const FILE = 'demo/survey.yaml';

function oneSentence(e: SurveyError): void {
  // eslint-disable-next-line no-control-regex -- the escape character is what must not reach the terminal
  expect(e.message).not.toMatch(/[\n\r\u001b]/);
  expect(e.message.endsWith('.'), e.message).toBe(true);
  expect(e.message).not.toMatch(/\b(undefined|NaN)\b/);
}

/** The fixture with `key` set to `value` (dotted path), loaded; the error it gives. */
function refusal(yaml: string, edits: Record<string, unknown>): SurveyError {
  const obj = parse(yaml) as Record<string, unknown>;
  for (const [k, v] of Object.entries(edits)) setPath(obj, k, v);
  const e = errorOf(() => parseSurveyObject(obj, FILE));
  oneSentence(e);
  return e;
}

function loads(yaml: string, edits: Record<string, unknown>) {
  const obj = parse(yaml) as Record<string, unknown>;
  for (const [k, v] of Object.entries(edits)) setPath(obj, k, v);
  return parseSurveyObject(obj, FILE);
}

describe('cosmology: every parameter checked once, at load, against its physical range', () => {
  test.each<[string, Record<string, unknown>, string]>([
    [
      'omega_b equal to omega_m (the power spectrum needs dark matter)',
      { cosmology: { h0: 70, omega_m: 0.3, omega_b: 0.3 } },
      'cosmology.omega_b',
    ],
    ['omega_b above omega_m', { cosmology: { h0: 70, omega_m: 0.3, omega_b: 0.31 } }, 'cosmology.omega_b'],
    ['omega_b above half of omega_m', { cosmology: { h0: 70, omega_m: 0.3, omega_b: 0.16 } }, 'cosmology.omega_b'],
    ['omega_b 0', { cosmology: { h0: 70, omega_m: 0.3, omega_b: 0 } }, 'cosmology.omega_b'],
    ['the default omega_b 0.049 above a small omega_m', { cosmology: { h0: 70, omega_m: 0.04 } }, 'cosmology.omega_b'],
    ['h0 5', { cosmology: { h0: 5, omega_m: 0.3 } }, 'cosmology.h0'],
    ['h0 1e6', { cosmology: { h0: 1e6, omega_m: 0.3 } }, 'cosmology.h0'],
    ['omega_m 1e-300', { cosmology: { h0: 70, omega_m: 1e-300 } }, 'cosmology.omega_m'],
    ['omega_m 1.5', { cosmology: { h0: 70, omega_m: 1.5 } }, 'cosmology.omega_m'],
    ['sigma8 0', { cosmology: { h0: 70, omega_m: 0.3, sigma8: 0 } }, 'cosmology.sigma8'],
    ['sigma8 50', { cosmology: { h0: 70, omega_m: 0.3, sigma8: 50 } }, 'cosmology.sigma8'],
    ['n_s 0.1', { cosmology: { h0: 70, omega_m: 0.3, n_s: 0.1 } }, 'cosmology.n_s'],
    ['n_s 3', { cosmology: { h0: 70, omega_m: 0.3, n_s: 3 } }, 'cosmology.n_s'],
    ['t_cmb 1e6 K', { cosmology: { h0: 70, omega_m: 0.3, t_cmb: 1e6 } }, 'cosmology.t_cmb'],
    ['t_cmb 0.5 K', { cosmology: { h0: 70, omega_m: 0.3, t_cmb: 0.5 } }, 'cosmology.t_cmb'],
    ['t_cmb below 0', { cosmology: { h0: 70, omega_m: 0.3, t_cmb: -1 } }, 'cosmology.t_cmb'],
    [
      'radiation on top of omega_m 1 (no room left for Lambda)',
      { cosmology: { h0: 70, omega_m: 1, t_cmb: 2.7255 } },
      'cosmology.t_cmb',
    ],
    ['preset __proto__', { cosmology: { preset: '__proto__' } }, 'cosmology.preset'],
    ['preset constructor', { cosmology: { preset: 'constructor' } }, 'cosmology.preset'],
    ['preset toString', { cosmology: { preset: 'toString' } }, 'cosmology.preset'],
    ['preset hasOwnProperty', { cosmology: { preset: 'hasOwnProperty' } }, 'cosmology.preset'],
  ])('%s: out_of_range naming the key', (_name, edits, keyPath) => {
    const e = refusal(LINE_YAML, edits);
    expect([e.code, e.keyPath]).toEqual(['out_of_range', keyPath]);
  });

  test('the presets and the measured values load', () => {
    expect(loads(LINE_YAML, { cosmology: { preset: 'planck2018' } }).cosmology.preset).toBe('planck2018');
    expect(
      loads(LINE_YAML, { cosmology: { h0: 70, omega_m: 0.3, t_cmb: 2.7255, omega_b: 0.049, sigma8: 0.81, n_s: 0.965 } })
        .cosmology.tCmb,
    ).toBe(2.7255);
  });

  test('every cosmology inside the ranges gives finite distances and a finite, normalised power spectrum (property)', () => {
    const R = COSMOLOGY_RANGES;
    const d = (r: { min: number; max: number }) => fc.double({ min: r.min, max: r.max, noNaN: true });
    fc.assert(
      fc.property(
        d(R.h0),
        d(R.omegaM),
        fc.double({ min: 1e-6, max: MAX_BARYON_FRACTION, noNaN: true }),
        d(R.sigma8),
        d(R.nS),
        fc.constantFrom(0, 1, 2.7255, 10),
        (h0, omegaM, fb, sigma8, nS, tCmb) => {
          let c;
          try {
            c = resolveCosmology({ h0, omegaM, omegaB: fb * omegaM, sigma8, nS, tCmb });
          } catch (e) {
            // the one combination refused inside the ranges: radiation beyond the critical density
            expect(e).toMatchObject({ code: 'out_of_range', keyPath: 'cosmology.t_cmb' });
            return;
          }
          const cosmo = new FlatCosmology(c);
          for (const z of [0.01, 1, MAX_REDSHIFT]) {
            expect(Number.isFinite(cosmo.luminosityDistanceMpc(z))).toBe(true);
            expect(Number.isFinite(cosmo.volumeElementMpc3Sr(z))).toBe(true);
          }
          const lp = createLinearPower(c);
          // sigma(8/h Mpc, z = 0) is sigma8 by construction (the definition of the normalisation; 1e-6)
          expect(lp.sigmaR(8 / (h0 / 100), 0) / sigma8).toBeCloseTo(1, 6);
          expect(Number.isFinite(lp.sigmaR(1, MAX_REDSHIFT))).toBe(true);
        },
      ),
      { numRuns: 60, seed: 31 },
    );
  });
});

describe('every parameter in its physical range, refused before any work', () => {
  test.each<[string, string, Record<string, unknown>, string, string]>([
    ['alpha -1.8e26', LINE_YAML, { 'population.alpha': -1.8e26 }, 'out_of_range', 'population.alpha'],
    [
      'alpha 1e300 in a table',
      LINE_YAML,
      {
        'population.alpha': {
          table: [
            [0, -1],
            [3, 1e300],
          ],
        },
      },
      'out_of_range',
      'population.alpha',
    ],
    ['phi_star 1e10 Mpc^-3', LINE_YAML, { 'population.phi_star': 1e10 }, 'out_of_range', 'population.phi_star'],
    ['log10_l_star 70', LINE_YAML, { 'population.log10_l_star': 70 }, 'out_of_range', 'population.log10_l_star'],
    [
      'log10_l_star 400 (an infinite L*)',
      LINE_YAML,
      { 'population.log10_l_star': 400 },
      'not_finite',
      'population.log10_l_star',
    ],
    ['m_star 1e300', MAGNITUDE_YAML, { 'population.m_star': 1e300 }, 'out_of_range', 'population.m_star'],
    ['magnitude limit 1e300', MAGNITUDE_YAML, { 'detection.limit': 1e300 }, 'out_of_range', 'detection.limit'],
    ['magnitude limit -1e300', MAGNITUDE_YAML, { 'detection.limit': -1e300 }, 'out_of_range', 'detection.limit'],
    ['line-flux limit 1e300', LINE_YAML, { 'detection.limit': 1e300 }, 'out_of_range', 'detection.limit'],
    [
      'line-flux limit "1e999" (infinite text)',
      LINE_YAML,
      { 'detection.limit': '1e999' },
      'not_finite',
      'detection.limit',
    ],
    [
      'threshold limit row 418283',
      THRESHOLD_YAML,
      {
        'detection.limit': {
          table: [
            [0.3, 9],
            [1.5, 418283],
          ],
        },
      },
      'out_of_range',
      'detection.limit',
    ],
    ['beta 1e300', MAGNITUDE_YAML, { 'detection.beta': 1e300 }, 'out_of_range', 'detection.beta'],
    ['histogram width 1e-9', LINE_YAML, { 'histogram.width': 1e-9 }, 'out_of_range', 'histogram.width'],
    ['histogram width 1e9', LINE_YAML, { 'histogram.width': 1e9 }, 'out_of_range', 'histogram.width'],
    [
      'completeness width 1e9',
      LINE_YAML,
      { 'detection.completeness': { half: 6e-17, width: 1e9 } },
      'out_of_range',
      'detection.completeness.width',
    ],
    [
      'completeness width 1e-300',
      LINE_YAML,
      { 'detection.completeness': { half: 6e-17, width: 1e-300 } },
      'out_of_range',
      'detection.completeness.width',
    ],
    [
      'completeness half 1e300 mag',
      MAGNITUDE_YAML,
      { 'detection.completeness': { half: 1e300, width: 0.2 } },
      'out_of_range',
      'detection.completeness.half',
    ],
    ['line 1e300 Angstrom', LINE_YAML, { 'detection.line': 1e300 }, 'out_of_range', 'detection.line'],
    [
      'filter fwhm 1e-300 Angstrom',
      LINE_YAML,
      { 'detection.filter.fwhm': 1e-300 },
      'out_of_range',
      'detection.filter.fwhm',
    ],
    ['bias 1e300', LINE_YAML, { 'population.bias': 1e300 }, 'out_of_range', 'population.bias'],
    ['field count 1e9', LINE_YAML, { field: { count: 1000000000 } }, 'out_of_range', 'field.count'],
    ['field aspect 1e-300', LINE_YAML, { field: { aspect: 1e-300 } }, 'out_of_range', 'field.aspect'],
    ['area 1e-300 deg^2', LINE_YAML, { area: 1e-300 }, 'out_of_range', 'area'],
    ['exposure 1e300 h', LINE_YAML, { exposure: 1e300 }, 'out_of_range', 'exposure'],
    [
      'sfr factor 1e300',
      LINE_YAML,
      { 'population.sfr_conversion': 1e300 },
      'out_of_range',
      'population.sfr_conversion',
    ],
    ['redshift beyond z = 30', MAGNITUDE_YAML, { redshift: { min: 4, max: 1e6 } }, 'bad_window', 'redshift.max'],
    [
      'a window 1 to 1.000000000000001',
      MAGNITUDE_YAML,
      { redshift: { min: 1, max: 1.000000000000001 } },
      'bad_window',
      'redshift.max',
    ],
    [
      'a filter that sees the line beyond z = 30',
      LINE_YAML,
      { 'detection.line': 100 },
      'bad_window',
      'detection.filter',
    ],
  ])('%s', (_name, yaml, edits, code, keyPath) => {
    const e = refusal(yaml, edits);
    expect([e.code, e.keyPath]).toEqual([code, keyPath]);
  });

  test("a threshold limit written as the quantity itself (1e9 for 1e9 Msun) is refused with its log10 to write (failed before: 'the limit is 1000000000 at z = 0.5', no way out)", () => {
    // a luminosity variable's threshold is log10 of the quantity (docs/survey-file.md, detection.limit)
    const e = refusal(THRESHOLD_YAML, { 'detection.limit': 1e9 });
    expect([e.code, e.keyPath]).toEqual(['out_of_range', 'detection.limit']);
    expect(e.text).toBe(
      "is 1e9, not a log10 of the quantity (from -30 to 60); a threshold survey's limit is log10 of the quantity: it looks like a linear value, write limit: 9.",
    );
    // log10(2.5e10) = 10.39794 (common practice), to 6 figures
    expect(refusal(THRESHOLD_YAML, { 'detection.limit': 2.5e10 }).text).toContain('write limit: 10.3979.');
    // a number above 60 but below 1e3 is only out of its range
    expect(refusal(THRESHOLD_YAML, { 'detection.limit': 99 }).message).toContain('outside its physical range');
  });
  test('the values at the ends of each range load', () => {
    expect(loads(LINE_YAML, { 'population.alpha': -2.4, 'histogram.width': 0.01 }).histogramWidth).toBe(0.01);
    expect(loads(MAGNITUDE_YAML, { 'detection.limit': 40, 'detection.beta': 5 }).detection).toMatchObject({
      limitMag: 40,
      beta: 5,
    });
    expect(loads(MAGNITUDE_YAML, { redshift: { min: 4, max: MAX_REDSHIFT } }).redshift.max).toBe(MAX_REDSHIFT);
  });
});

describe('every size has a stated cap', () => {
  test.each<[string, string, Record<string, unknown>, string, string]>([
    [
      '20,001 slice edges (the cap covers edges too)',
      MAGNITUDE_YAML,
      { redshift: { min: 1, max: 3 }, slices: { edges: Array.from({ length: 20001 }, (_, i) => 1 + (2 * i) / 20000) } },
      'bad_slices',
      'slices.edges',
    ],
    [
      `${CAPS.slices + 1} slices by count`,
      MAGNITUDE_YAML,
      { slices: { count: CAPS.slices + 1 } },
      'bad_slices',
      'slices.count',
    ],
    [
      'slices narrower than 1e-6 by count',
      MAGNITUDE_YAML,
      { redshift: { min: 1, max: 1.0001 }, slices: { count: 1000 } },
      'bad_slices',
      'slices.count',
    ],
    [
      'slice edges 1.2 and 1.2000000000000002',
      MAGNITUDE_YAML,
      { redshift: { min: 1, max: 2 }, slices: { edges: [1.2, 1.2000000000000002] } },
      'bad_slices',
      'slices.edges[1]',
    ],
    [
      'a table of 1,001 rows',
      LINE_YAML,
      { 'population.alpha': { table: Array.from({ length: 1001 }, (_, i) => [i / 500, -1.35]) } },
      'too_large',
      'population.alpha.table',
    ],
    [
      'a completeness table of 1,001 rows',
      MAGNITUDE_YAML,
      { 'detection.completeness': { table: Array.from({ length: 1001 }, (_, i) => [20 + i / 100, 0.5]) } },
      'too_large',
      'detection.completeness.table',
    ],
    ['a text of 5,000 characters', LINE_YAML, { title: 'x'.repeat(5000) }, 'too_large', 'title'],
    [
      '21 populations',
      LINE_YAML,
      {
        population: undefined,
        populations: Array.from({ length: 21 }, (_, i) => ({
          name: `p${i}`,
          variable: 'luminosity',
          phi_star: 2.2e-3,
          log10_l_star: 42,
          alpha: -1.35,
        })),
      },
      'too_large',
      'populations',
    ],
    [
      '5 populations over 500 slices (2,500 counts)',
      LINE_YAML,
      {
        population: undefined,
        slices: { count: 500 },
        populations: Array.from({ length: 5 }, (_, i) => ({
          name: `p${i}`,
          variable: 'luminosity',
          phi_star: 2.2e-3,
          log10_l_star: 42,
          alpha: -1.35,
        })),
      },
      'bad_slices',
      'slices',
    ],
    [
      'a threshold limit crossing more histogram bins than a slice may have',
      THRESHOLD_YAML,
      {
        'detection.limit': {
          table: [
            [0.3, 9],
            [1.5, 59],
          ],
        },
        'histogram.width': 0.01,
      },
      'too_large',
      'detection.limit',
    ],
    [
      'a threshold limit whose narrow spike between the sampled points crosses more histogram bins than a slice may have',
      THRESHOLD_YAML,
      { 'detection.limit': '9.5 + 40 * exp(-((z - 1.0123) / 0.0001)^2)', 'histogram.width': 0.01 },
      'too_large',
      'detection.limit',
    ],
    ['a quantity string of 200 characters', LINE_YAML, { area: `1 ${'deg '.repeat(50)}` }, 'bad_unit', 'area'],
  ])('%s', (_name, yaml, edits, code, keyPath) => {
    const obj = parse(yaml) as Record<string, unknown>;
    for (const [k, v] of Object.entries(edits)) {
      if (v === undefined) delete obj[k];
      else setPath(obj, k, v);
    }
    const e = errorOf(() => parseSurveyObject(obj, FILE));
    oneSentence(e);
    expect([e.code, e.keyPath]).toEqual([code, keyPath]);
  });

  test('a threshold limit spiking between the sampled points: the cap counts the spike, found at its top (the greatest value of a gaussian is its height, common practice)', () => {
    const spike = (height: number) => {
      const obj = parse(THRESHOLD_YAML) as Record<string, unknown>;
      setPath(obj, 'detection.limit', `9.5 + ${height} * exp(-((z - 1.0123) / 0.0001)^2)`);
      setPath(obj, 'histogram.width', 0.01);
      return obj;
    };
    // 40 above 9.5 is 4,000 bins of 0.01; the 64 sampled points (0.5 + k/63) all lie more than 0.004,
    // 40 widths, from z = 1.0123, where the spike is below 1e-300
    const e = errorOf(() => parseSurveyObject(spike(40), FILE));
    expect(e.message).toContain('changes by 40 over the redshift window (from 9.5 at z = 0.5 to 49.5 at z = 1.0123)');
    expect(e.message).toContain('4000 histogram bins of 0.01');
    // 9.99 above is 999 bins: within the cap, accepted
    expect(() => parseSurveyObject(spike(9.99), FILE)).not.toThrow();
    // a dip: the least value found at its bottom
    const dip = spike(40);
    setPath(dip, 'detection.limit', '49.5 - 40 * exp(-((z - 1.0123) / 0.0001)^2)');
    expect(errorOf(() => parseSurveyObject(dip, FILE)).message).toContain(
      '(from 9.5 at z = 1.0123 to 49.5 at z = 0.5)',
    );
  });

  test(`the narrowest slice (${MIN_SLICE_WIDTH}) and the last remainder: a remainder narrower than that joins the slice before`, () => {
    const s = loads(MAGNITUDE_YAML, { redshift: { min: 1, max: 1.3000005 }, slices: { width: 0.1 } });
    expect(s.sliceEdges).toHaveLength(4);
    expect(s.sliceEdges[3]).toBe(1.3000005);
  });

  test('a survey file with 21,000 keys is refused by the key cap (and checked for repeated keys in one pass)', () => {
    const text = `${LINE_YAML}extra: {${Array.from({ length: 21_000 }, (_, i) => `${i.toString(36)}: 0`).join(', ')}}\n`;
    const e = errorOf(() => loadSurveyText(text, FILE));
    expect([e.code, e.keyPath]).toEqual(['too_large', '']);
  });

  test('a repeated key is still found, with its path, among many keys', () => {
    const keys = Array.from({ length: 5000 }, (_, i) => `  k${i}: ${i}`);
    keys.push('  k17: again');
    const e = errorOf(() => loadSurveyText(`${LINE_YAML}extra:\n${keys.join('\n')}\n`, FILE));
    expect([e.code, e.keyPath]).toEqual(['yaml_syntax', 'extra.k17']);
  });

  test('nesting deeper than 32 levels is refused', () => {
    const e = errorOf(() => loadSurveyText(`${LINE_YAML}extra: ${'['.repeat(40)}${']'.repeat(40)}\n`, FILE));
    expect(e.code).toBe('too_large');
  });

  test('an alias inside the node it names (a: &a [*a]) is refused, not expanded for ever', () => {
    for (const text of ['a: &a [*a]\n', `${LINE_YAML}extra: &e {b: [1, *e]}\n`]) {
      const e = errorOf(() => loadSurveyText(text, FILE));
      expect(e.code).toBe('yaml_aliases');
      oneSentence(e);
    }
  });
});

describe('every input file: a regular file, within its size limit, read by one reader', () => {
  const dir = tempDir('skytally-inputs-');
  const fifo = join(dir, 'pipe.yaml');
  execFileSync('mkfifo', [fifo]);

  test.each([
    ['/dev/zero', 'not_a_file'],
    ['/dev/null', 'not_a_file'],
    [fifo, 'not_a_file'],
    [dir, 'file_unreadable'],
  ])('the survey file %s is refused at once (%s)', (path, code) => {
    const e = errorOf(() => loadSurveyFile(path));
    expect([e.code, e.file]).toEqual([code, path]);
    oneSentence(e);
  });

  test.each([
    ['/dev/zero', 'not_a_file'],
    ['a FIFO', 'not_a_file'],
    ['a folder', 'file_unreadable'],
    ['a binary file', 'not_text'],
    ['a 2 MiB file', 'file_too_large'],
  ])('a filter file that is %s is refused at once', (what, code) => {
    const path =
      what === '/dev/zero'
        ? '/dev/zero'
        : what === 'a FIFO'
          ? fifo
          : what === 'a folder'
            ? dir
            : join(dir, what === 'a binary file' ? 'binary.csv' : 'big.csv');
    if (what === 'a binary file') writeFileSync(path, Buffer.from([0x77, 0x00, 0x01, 0x02]));
    if (what === 'a 2 MiB file') writeFileSync(path, 'wavelength,transmission\n' + '9000,1\n'.repeat(300_000));
    const e = refusal(LINE_YAML, { 'detection.filter': { profile: 'table', file: path } });
    expect([e.code, e.keyPath]).toEqual([code, 'detection.filter.file']);
  });

  test('a transmission table of more than 2,000 rows is refused', () => {
    const path = join(dir, 'long.csv');
    writeFileSync(
      path,
      'wavelength,transmission\n' + Array.from({ length: 20_000 }, (_, i) => `${11000 + i * 0.1},1`).join('\n'),
    );
    const e = refusal(LINE_YAML, { 'detection.filter': { profile: 'table', file: path } });
    expect([e.code, e.keyPath]).toEqual(['bad_table', 'detection.filter.file']);
    // 2,000 rows are read
    writeFileSync(
      path,
      'wavelength,transmission\n' + Array.from({ length: 2000 }, (_, i) => `${11800 + i * 0.1},1`).join('\n'),
    );
    expect(loads(LINE_YAML, { 'detection.filter': { profile: 'table', file: path } }).detection).toMatchObject({
      filter: { profile: 'table' },
    });
  });

  test('a survey file of 300 KiB is refused (256 KiB cap)', () => {
    const path = join(dir, 'big.yaml');
    writeFileSync(path, LINE_YAML + '#' + 'x'.repeat(300 * 1024) + '\n');
    expect(errorOf(() => loadSurveyFile(path)).code).toBe('file_too_large');
  });

  test('a file whose size the system does not state (/proc) is read whole, block after block, without mixing the blocks', () => {
    // /proc files report size 0: the reader goes on reading 64 KiB blocks until the end. This
    // process's memory map is larger than one block (checked below), so several blocks are read
    // into the one reused buffer; every line must come out whole (a block copied from the buffer
    // after the next read overwrote it would cut lines at the block edges). The two line forms
    // are those of proc(5): a mapping header ("start-end perms offset dev inode [path]") or a
    // "Key: value" line.
    const text = readInputText('/proc/self/smaps', {
      maxBytes: 64 * 1024 * 1024,
      maxLabel: '64 MiB',
      file: '/proc/self/smaps',
      keyPath: '',
      subject: 'the file',
      fix: '',
    }).text;
    expect(text.length).toBeGreaterThan(64 * 1024);
    expect(text.endsWith('\n')).toBe(true);
    const lines = text.slice(0, -1).split('\n');
    const odd = lines.filter(
      (l) => !/^[0-9a-f]+-[0-9a-f]+ [-rwxsp]{4} [0-9a-f]+ [0-9a-f]+:[0-9a-f]+ \d+/.test(l) && !/^[A-Za-z_]+:\s/.test(l),
    );
    expect(odd).toEqual([]);
    expect(lines[0]).toMatch(/^[0-9a-f]+-[0-9a-f]+ /);
  });

  test('the loader records every file read with its identity (survey first, then the filter)', () => {
    const csv = join(dir, 'band.csv');
    writeFileSync(csv, 'wavelength_nm,transmission\n1180,0\n1185,1\n1195,1\n1200,0\n');
    const link = join(dir, 'link.csv');
    symlinkSync(csv, link);
    const survey = join(dir, 's.yaml');
    const obj = parse(LINE_YAML) as Record<string, unknown>;
    setPath(obj, 'detection.filter', { profile: 'table', file: 'link.csv' });
    writeFileSync(survey, JSON.stringify(obj));
    const s = loadSurveyFile(survey);
    expect(s.inputs!.map((i) => i.path)).toEqual([survey, link]);
    const direct = readInputText(csv, {
      maxBytes: 1e6,
      maxLabel: '',
      file: '',
      keyPath: '',
      subject: 'the file',
      fix: '',
    });
    // the link and the file it names are the same file (device and inode)
    expect([s.inputs![1]!.dev, s.inputs![1]!.ino]).toEqual([direct.dev, direct.ino]);
  });
});

describe('messages quote at most a short, escaped excerpt, and nothing of a file that is not a table', () => {
  const dir = tempDir('skytally-echo-');

  test('a filter file that is not a table (a password-like file): not one byte of it in the message', () => {
    const secret = join(dir, 'shadow');
    writeFileSync(secret, 'root:$6$secrethash:20228:0:99999:7:::\ndaemon:*:20228:0:99999:7:::\n');
    const e = refusal(LINE_YAML, { 'detection.filter': { profile: 'table', file: secret } });
    expect([e.code, e.keyPath]).toEqual(['bad_table', 'detection.filter.file']);
    expect(e.message).not.toContain('root');
    expect(e.message).not.toContain('secrethash');
    expect(e.message).not.toContain('20228');
  });

  test('a bad row of a real table is quoted short and escaped', () => {
    const csv = join(dir, 'bad-row.csv');
    writeFileSync(csv, `wavelength,transmission\n11800,0.5\n\u001b[31m${'y'.repeat(200)}\n`);
    const e = refusal(LINE_YAML, { 'detection.filter': { profile: 'table', file: csv } });
    expect(e.code).toBe('bad_table');
    expect(e.message).not.toContain('\u001b');
    expect(e.message).toContain('\\x1b');
    expect(e.message).not.toContain('y'.repeat(60));
  });

  test('control characters and line breaks in paths and values are escaped', () => {
    const e = errorOf(() => loadSurveyFile(join(dir, 'no\u001b[2Jsuch\nfile.yaml')));
    // eslint-disable-next-line no-control-regex -- the escape character is what must not reach the terminal
    expect(e.message).not.toMatch(/[\n\u001b]/);
    expect(e.message).toContain('\\x1b[2J');
    const p = refusal(LINE_YAML, { cosmology: { preset: 'pl\u001b]0;title\u0007anck\u202e' } });
    // eslint-disable-next-line no-control-regex -- escape and bell are what must not reach the terminal
    expect(p.message).not.toMatch(/[\u001b\u0007\u202e]/);
  });
});

describe('expressions follow the stated grammar, strictly', () => {
  test.each(['5%', '-1.35 + 5%', '-1.35 # a comment', '0x10', '0b101', '0o17', '-1.35 + 0X1F*z', '#'])(
    '%s is refused',
    (text) => {
      const e = errorOf(() => compileExpression(text, FILE, 'population.alpha'));
      expect([e.code, e.keyPath]).toEqual(['bad_expression', 'population.alpha']);
      oneSentence(e);
    },
  );

  test('decimal numbers in every form are still read (1e3, .5, 2., 1E-2)', () => {
    expect(compileExpression('1e3 + .5 + 2. + 1E-2 + 0.25*z', FILE, 'k').fn(4)).toBeCloseTo(1003.51, 12);
  });
});
