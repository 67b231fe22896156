/**
 * Photometric redshifts (detection.photo_z; docs/survey-file.md, "Photometric redshifts").
 *
 * References: test/reference/selection.json (test/reference/generate/selection.py, item 7: scipy
 * 1.10.1 quad at epsrel 1e-10 over true z with scipy's ndtr, astropy 5.2.1 distances) for the
 * survey files photoz-broadband.yaml and zero-photoz.yaml, to 1e-8 relative (the generator's
 * suggested tolerance); the plain prediction itself for sigma 0 without outliers (exactly); a
 * closed form for outliers alone (sigma 0: measured = (1 - f) true + f N_window width / window);
 * and the conservation of the migration matrix (row sums, column sums, grand total) to 1e-12.
 */
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { measuredProbability } from '../../src/counts/photo-z.js';
import { choosePopulation } from '../../src/model/select.js';
import { SurveyError } from '../../src/errors.js';
import { runCli } from '../cli/helpers.js';
import { sampleCommand } from '../support/sample-commands.js';
import type { Prediction, PhotoZMigration, PredictionSlice } from '../../src/model/outputs/prediction.js';

interface RefCase {
  file: string;
  yaml: string;
  slices: { z_min: number; z_max: number; count: number; count_true_redshift?: number }[];
  total: number;
  first_slice_bins: { lo: number; hi: number; count: number }[];
  photo_z?: {
    true_range: [number, number];
    true_bins: [number, number][];
    measured_bins: [number | null, number | null][];
    migration_matrix: number[][];
    true_counts: number[];
    measured_counts: number[];
    grand_total: number;
  };
}
const REF = JSON.parse(readFileSync(new URL('../reference/selection.json', import.meta.url), 'utf8')) as {
  surveys: RefCase[];
  zero_effect: RefCase[];
};
const refCase = (file: string): RefCase => [...REF.surveys, ...REF.zero_effect].find((c) => c.file === file)!;
const REL = 1e-8;
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

function run(yaml: string, file = 'photo-z.yaml'): Prediction {
  return predict(loadSurveyText(yaml, file));
}
const slicesOf = (p: Prediction): PredictionSlice[] => {
  if (p.breakdown !== 'redshift') throw new Error('expected redshift slices');
  return p.slices;
};

/** Rows sum to the true counts, columns to the measured counts, both to one grand total. */
function expectConserved(m: PhotoZMigration): void {
  const total = m.true_counts.reduce((a, c) => a + c, 0);
  m.migration_matrix.forEach((row, i) => {
    const sum = row.reduce((a, c) => a + c, 0);
    expect(Math.abs(sum - m.true_counts[i]!), `row ${i}`).toBeLessThanOrEqual(1e-12 * total);
  });
  m.measured_counts.forEach((c, j) => {
    const sum = m.migration_matrix.reduce((a, row) => a + row[j]!, 0);
    expect(Math.abs(sum - c), `column ${j}`).toBeLessThanOrEqual(1e-12 * total);
  });
  expect(Math.abs(m.measured_counts.reduce((a, c) => a + c, 0) - total)).toBeLessThanOrEqual(1e-12 * total);
  const last = m.measured_counts.length - 1;
  expect(m.lost_count).toBeCloseTo(m.measured_counts[0]! + m.measured_counts[last]!, 9);
}

describe('photometric redshifts against selection.json (scipy quad)', () => {
  const c = refCase('photoz-broadband.yaml');
  const p = run(c.yaml, c.file);
  const m = p.photo_z!;

  test('measured and true counts per slice, and the total, to 1e-8', () => {
    const slices = slicesOf(p);
    expect(slices).toHaveLength(c.slices.length);
    c.slices.forEach((s, i) => {
      expect(slices[i]!.z_min).toBeCloseTo(s.z_min, 12);
      expect(rel(slices[i]!.count, s.count), `slice ${i} measured`).toBeLessThan(REL);
      expect(rel(slices[i]!.count_true_redshift!, s.count_true_redshift!), `slice ${i} true`).toBeLessThan(REL);
    });
    expect(rel(p.totals.count, c.total)).toBeLessThan(REL);
    // scatter moves sources: the measured counts differ from the true ones by more than 1 %
    expect(rel(slices[0]!.count, slices[0]!.count_true_redshift!)).toBeGreaterThan(0.01);
  });

  test('true range (6 sigma beyond the window), bins and migration matrix', () => {
    const ref = c.photo_z!;
    expect(m.reach_sigma).toBe(6);
    expect(m.true_range.min).toBeCloseTo(ref.true_range[0], 12);
    expect(m.true_range.max).toBeCloseTo(ref.true_range[1], 12);
    expect(m.true_bins.map((b) => [b.z_min, b.z_max])).toEqual(
      ref.true_bins.map(([a, b]) => [expect.closeTo(a, 12), expect.closeTo(b, 12)]),
    );
    // an unbounded end (null in the fixture) is absent
    expect(m.measured_bins.map((b) => [b.z_min ?? null, b.z_max ?? null])).toEqual(
      ref.measured_bins.map(([a, b]) => [
        a === null ? null : expect.closeTo(a, 12),
        b === null ? null : expect.closeTo(b, 12),
      ]),
    );
    expect(Object.keys(m.measured_bins[0]!)).toEqual(['z_max']);
    const grand = ref.grand_total;
    ref.migration_matrix.forEach((row, i) =>
      row.forEach((want, j) => {
        const got = m.migration_matrix[i]![j]!;
        // elements above 1e-6 of the grand total to 1e-8 relative; the others to 1e-14 of it
        if (want > 1e-6 * grand) expect(rel(got, want), `M[${i}][${j}] ${got} vs ${want}`).toBeLessThan(REL);
        else expect(Math.abs(got - want), `M[${i}][${j}] ${got} vs ${want}`).toBeLessThan(1e-14 * grand);
      }),
    );
    ref.true_counts.forEach((t, i) => expect(rel(m.true_counts[i]!, t), `true ${i}`).toBeLessThan(REL));
    ref.measured_counts.forEach((t, i) => expect(rel(m.measured_counts[i]!, t), `measured ${i}`).toBeLessThan(REL));
    expect(
      rel(
        m.true_counts.reduce((a, x) => a + x, 0),
        grand,
      ),
    ).toBeLessThan(REL);
  });

  test('the migration matrix conserves the total; slices hold the inner columns and rows', () => {
    expectConserved(m);
    const slices = slicesOf(p);
    slices.forEach((s, i) => {
      expect(s.count).toBeCloseTo(m.measured_counts[i + 1]!, 6);
      expect(s.count_true_redshift).toBeCloseTo(m.true_counts[i + 1]!, 6);
    });
    expect(p.populations[0]!.photo_z).toEqual(m);
  });

  test('histogram of the first measured slice (sources measured in it, by apparent magnitude) to 1e-8', () => {
    const h = slicesOf(p)[0]!.histogram;
    for (const bin of c.first_slice_bins) {
      const i = h.edges.findIndex((e) => Math.abs(e - bin.lo) < 1e-9);
      if (bin.count === 0) {
        if (i >= 0 && i < h.counts.length) expect(h.counts[i]).toBe(0);
        continue;
      }
      expect(rel(h.counts[i]!, bin.count), `bin ${bin.lo}`).toBeLessThan(REL);
    }
    const sum = h.counts.reduce((a, x) => a + x, 0);
    expect(rel(sum, slicesOf(p)[0]!.count)).toBeLessThan(1e-12);
  });
});

describe('limits', () => {
  test('sigma 0 without outliers is the plain prediction exactly (zero-photoz.yaml)', () => {
    const zero = refCase('zero-photoz.yaml');
    const plain = run(refCase('zero-plain-magnitude.yaml').yaml);
    const p = run(zero.yaml);
    const a = slicesOf(p);
    const b = slicesOf(plain);
    a.forEach((s, i) => {
      expect(s.count).toBe(b[i]!.count);
      expect(s.count_true_redshift).toBe(b[i]!.count);
      expect(s.histogram).toEqual(b[i]!.histogram);
      expect(s.uncertainty).toEqual(b[i]!.uncertainty);
      expect(s.luminosity_density).toEqual(b[i]!.luminosity_density);
      expect(rel(s.count, zero.slices[i]!.count)).toBeLessThan(REL);
    });
    expect(p.totals).toEqual(plain.totals);
    const m = p.photo_z!;
    expectConserved(m);
    m.migration_matrix.forEach((row, i) => row.forEach((x, j) => i !== j && expect(x).toBe(0)));
    expect(m.lost_count).toBe(0);
  });

  test('tiny sigma tends to the plain prediction', () => {
    const plainYaml = refCase('zero-plain-magnitude.yaml').yaml;
    const plain = slicesOf(run(plainYaml));
    const p = slicesOf(run(plainYaml.replace('  completeness:', '  photo_z: {sigma: 0.0001}\n  completeness:')));
    p.forEach((s, i) => {
      expect(rel(s.count, plain[i]!.count)).toBeLessThan(1e-3);
      expect(rel(s.count_true_redshift!, plain[i]!.count)).toBeLessThan(1e-8);
    });
  });

  test('outliers alone (sigma 0): (1 - f) of each slice stays, f of the window spreads uniformly', () => {
    const f = 0.12;
    const plainYaml = refCase('zero-plain-magnitude.yaml').yaml;
    const plain = slicesOf(run(plainYaml));
    const p = run(
      plainYaml.replace('  completeness:', `  photo_z: {sigma: 0, outlier_fraction: ${f}}\n  completeness:`),
    );
    const all = plain.reduce((a, s) => a + s.count, 0);
    const [zmin, zmax] = [plain[0]!.z_min, plain[plain.length - 1]!.z_max];
    slicesOf(p).forEach((s, i) => {
      const want = (1 - f) * plain[i]!.count + (f * all * (s.z_max - s.z_min)) / (zmax - zmin);
      expect(rel(s.count, want), `slice ${i}`).toBeLessThan(1e-8);
    });
    expect(rel(p.totals.count, all)).toBeLessThan(1e-8);
    expectConserved(p.photo_z!);
  });

  test('the probability of being measured in the bins sums to 1 at every true z', () => {
    const pz = { sigma: 0.05, outlierFraction: 0.02 };
    const w = { min: 0.5, max: 1.5 };
    const edges = [-Infinity, 0.5, 0.75, 1.1, 1.5, Infinity];
    for (const z of [0, 0.2, 0.5, 0.9, 1.5, 2.3]) {
      let sum = 0;
      for (let j = 0; j + 1 < edges.length; j++) sum += measuredProbability(pz, w, edges[j]!, edges[j + 1]!, z);
      expect(Math.abs(sum - 1)).toBeLessThan(1e-15);
    }
    // far tails are not rounded to 0 (erfc, not 1 - erf): 7 sigma below the bin
    const far = measuredProbability({ sigma: 0.05, outlierFraction: 0 }, w, 1.0, 1.1, 1.0 - 7 * 0.05 * 2);
    expect(far).toBeGreaterThan(0);
    expect(far).toBeLessThan(1e-11);
  });
});

const BASE = `
format: 1
title: Invented photometric-redshift test survey
cosmology: {h0: 70, omega_m: 0.3}
area: 0.3
redshift: {min: 0.5, max: 1.5}
detection:
  kind: magnitude
  limit: 24.5
  band: 8800
  photo_z: {sigma: 0.05, outlier_fraction: 0.02}
population:
  variable: magnitude
  log10_phi_star: -2.9
  m_star: -21.3
  alpha: -1.15
  rest_wavelength: 4000
slices: {count: 4}
`;

describe('several populations and the threshold kind', () => {
  test('two populations: the top-level migration is the sum of theirs', () => {
    const yaml = BASE.replace(
      /population:[\s\S]*slices:/,
      `populations:
  - {name: red, variable: magnitude, log10_phi_star: -3.1, m_star: -21.5, alpha: -0.6, rest_wavelength: 4000}
  - {name: blue, variable: magnitude, log10_phi_star: -2.8, m_star: -20.9, alpha: -1.3, rest_wavelength: 4000}
slices:`,
    );
    const p = run(yaml);
    const [a, b] = p.populations.map((q) => q.photo_z!);
    expectConserved(p.photo_z!);
    p.photo_z!.migration_matrix.forEach((row, i) =>
      row.forEach((x, j) => expect(x).toBeCloseTo(a!.migration_matrix[i]![j]! + b!.migration_matrix[i]![j]!, 6)),
    );
    slicesOf(p).forEach((s, i) => {
      expect(s.count_true_redshift).toBeCloseTo(
        p.populations[0]!.slices[i]!.count_true_redshift! + p.populations[1]!.slices[i]!.count_true_redshift!,
        6,
      );
      expect(s.count).toBeCloseTo(p.populations[0]!.slices[i]!.count + p.populations[1]!.slices[i]!.count, 6);
    });
  });

  test('threshold kind: sigma 0 is the plain prediction exactly; scatter conserves the total', () => {
    const yaml = `
format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.3, max: 1.1}
detection:
  kind: threshold
  limit: "10.2 + 0.3*z"
  photo_z: {sigma: SIGMA}
population: {variable: luminosity, quantity: "stellar mass [Msun]", log10_phi_star: -2.7, log10_l_star: 10.8, alpha: -1.2}
slices: {count: 2}
`;
    const plain = run(yaml.replace('  photo_z: {sigma: SIGMA}\n', ''));
    const zero = run(yaml.replace('SIGMA', '0'));
    slicesOf(zero).forEach((s, i) => expect(s.count).toBe(slicesOf(plain)[i]!.count));
    const p = run(yaml.replace('SIGMA', '0.03'));
    expectConserved(p.photo_z!);
    slicesOf(p).forEach((s, i) => expect(rel(s.count_true_redshift!, slicesOf(plain)[i]!.count)).toBeLessThan(1e-6));
  });
});

describe('refused input', () => {
  const codeOf = (yaml: string): { code: string; key: string } => {
    try {
      loadSurveyText(yaml, 'bad.yaml');
    } catch (e) {
      if (e instanceof SurveyError) return { code: e.code, key: e.keyPath };
      throw e;
    }
    return { code: 'none', key: '' };
  };
  test.each([
    ['negative sigma', BASE.replace('sigma: 0.05', 'sigma: -0.01'), 'out_of_range', 'detection.photo_z.sigma'],
    ['sigma above 0.15', BASE.replace('sigma: 0.05', 'sigma: 0.2'), 'out_of_range', 'detection.photo_z.sigma'],
    [
      'outlier fraction 1',
      BASE.replace('outlier_fraction: 0.02', 'outlier_fraction: 1'),
      'out_of_range',
      'detection.photo_z.outlier_fraction',
    ],
    ['slices narrower than sigma (1 + z) / 2', BASE.replace('count: 4', 'count: 30'), 'bad_slices', 'slices'],
    [
      'true range beyond z = 30',
      BASE.replace('max: 1.5', 'max: 25').replace('sigma: 0.05', 'sigma: 0.15').replace('count: 4', 'count: 2'),
      'out_of_range',
      'detection.photo_z.sigma',
    ],
    [
      'an expression without value over the true range',
      BASE.replace('m_star: -21.3', 'm_star: "-21.3 + sqrt(1.55 - z)"'),
      'bad_expression',
      'population.m_star',
    ],
  ])('%s', (_what, yaml, code, key) => {
    expect(codeOf(yaml)).toEqual({ code, key });
  });

  test('photo_z does not apply to line_flux', () => {
    const yaml = `
format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.5, max: 1}
detection: {kind: line_flux, limit: 3e-17, line: 6563, photo_z: {sigma: 0.03}}
population: {variable: luminosity, log10_phi_star: -2.7, log10_l_star: 42.1, alpha: -1.5}
`;
    expect(codeOf(yaml)).toEqual({ code: 'kind_mismatch', key: 'detection.photo_z' });
  });

  test('forecasts, comparisons and plans refuse scatter, accept sigma 0 without outliers', () => {
    expect(() => choosePopulation(loadSurveyText(BASE, 'a.yaml'))).toThrow(/photo_z/);
    try {
      choosePopulation(loadSurveyText(BASE, 'a.yaml'));
    } catch (e) {
      expect((e as SurveyError).code).toBe('conflict');
    }
    const exact = loadSurveyText(
      BASE.replace('photo_z: {sigma: 0.05, outlier_fraction: 0.02}', 'photo_z: {sigma: 0, outlier_fraction: 0}'),
      'b.yaml',
    );
    expect(choosePopulation(exact).name).toBe('population');
  });
});

describe('through the command line (samples/photoz-optical-field.yaml)', () => {
  const SAMPLE = 'samples/photoz-optical-field.yaml';
  test('predict: the table says the slices are in measured redshift; the CSV has count_true_redshift', async () => {
    // runs on a sample, shared with the files that read them too (test/support/sample-commands.ts)
    const table = await sampleCommand(['predict', SAMPLE]);
    expect(table.code).toBe(0);
    expect(table.stdout).toContain('slices in MEASURED redshift');
    expect(table.stdout).toContain('true-z count');
    // a slice's +/- (its measured-redshift box, an upper bound) can exceed the total's: the table says why
    expect(table.stdout).toContain(
      "A slice's +/- takes the cosmic variance of its measured-redshift box, an upper bound",
    );
    const csv = await sampleCommand(['predict', SAMPLE, '--format', 'csv']);
    expect(csv.code).toBe(0);
    const [header, first] = csv.stdout.split('\n');
    const cols = header!.split(',');
    expect(cols).toContain('count_true_redshift');
    const j = await sampleCommand(['predict', SAMPLE, '--format', 'json']);
    expect(j.code).toBe(0);
    const json = JSON.parse(j.stdout) as Prediction;
    const row = first!.split(',');
    expect(Number(row[cols.indexOf('count_true_redshift')])).toBeCloseTo(slicesOf(json)[0]!.count_true_redshift!, 6);
    expect(json.warnings).toEqual([]);
    expectConserved(json.photo_z!);
  });

  test('compare refuses scatter (exit 2, one sentence); the report omits its forecast with the reason', async () => {
    const cmp = await runCli(['compare', SAMPLE, 'samples/deep-continuum.yaml']);
    expect(cmp.code).toBe(2);
    expect(cmp.stdout).toBe('');
    expect(cmp.stderr).toContain('detection.photo_z');
    expect(cmp.stderr.trim().split('\n')).toHaveLength(1);
    const rep = await runCli(['report', SAMPLE, '--format', 'json']);
    expect(rep.code).toBe(0);
    const doc = JSON.parse(rep.stdout) as { forecast: { omitted?: string }; prediction: Prediction };
    expect(doc.forecast.omitted).toMatch(/^No forecast: .*photo_z/);
    expect(doc.prediction.photo_z).toBeDefined();
  });
});
