/**
 * Several populations, densities, tabulated filters.
 *
 * Origins of the expected values:
 * - "one file with two populations = two files with one each": exact (same code path, same slices);
 * - sums and shares: exact bookkeeping identities (1e-12 relative for round-off);
 * - luminosity density with a constant threshold: closed form phi* L* Gamma(alpha+2, u) and the total
 *   j = phi* L* Gamma(alpha+2) (Schechter 1976 form; common practice, textbook result), 1e-12 relative;
 *   the fraction tends to 1 as the limit goes to 0 for alpha > -2 with 1 - f ~ u^s / (s Gamma(s)),
 *   s = alpha + 2 (DLMF 8.7.1, leading term of the lower incomplete gamma function);
 * - completeness-weighted luminosity density: brute-force trapezoid integral written here (1e-6);
 * - Kennicutt 1998 (ARA&A 36, 189) factors: eq. (1) UV 1.4e-28, eq. (2) H-alpha 7.9e-42, eq. (3) [OII]
 *   1.4e-41 (values as published; equation numbers from memory);
 * - tabulated filters: a table that samples the top-hat or gaussian profile reproduces its counts
 *   (1e-4 relative, the tolerance).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile, loadSurveyText, parseSurveyObject } from '../../src/survey/load.js';
import { populationByName } from '../../src/model/select.js';
import { predict } from '../../src/counts/predict.js';
import { forecast } from '../../src/forecast/forecast.js';
import { KENNICUTT1998 } from '../../src/survey/normalise.js';
import { gammaFn, upperGamma } from '../../src/numerics/gamma.js';
import { SurveyError } from '../../src/errors.js';
import { parse } from 'yaml';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';
import { sampleCommand } from '../support/sample-commands.js';

const NB = `
title: two lines through one filter
cosmology: {h0: 70, omega_m: 0.3}
area: 0.8
detection:
  kind: line_flux
  limit: 4e-17
  filter: {center: 9200, fwhm: 110, profile: gaussian}
  completeness: {model: logistic, half: 5e-17, width: 0.1}
populations:
  - {name: halpha, variable: luminosity, line: 6563, log10_phi_star: -2.8, log10_l_star: 41.9, alpha: -1.35, sfr_conversion: halpha}
  - {name: oiii, variable: luminosity, line: 5007, log10_phi_star: -2.9, log10_l_star: 42.0, alpha: -1.6}
slices: {count: 3}
histogram: {width: 0.1}
`;

function single(text: string, index: number): string {
  const obj = parse(text) as Record<string, unknown>;
  const pops = obj.populations as unknown[];
  delete obj.populations;
  obj.population = pops[index];
  return JSON.stringify(obj);
}

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('two populations in one file = two files with one population each (exact)', () => {
  const both = predict(loadSurveyText(NB, 'nb.yaml'));
  test.each([0, 1])('population %i: same slices, counts, histograms, densities', (i) => {
    const alone = predict(loadSurveyText(single(NB, i), 'nb.yaml'));
    const mine = both.populations[i]!;
    expect(mine.slices.map((s) => [s.z_min, s.z_max])).toEqual(alone.slices!.map((s) => [s.z_min, s.z_max]));
    expect(mine.slices.map((s) => s.count)).toEqual(alone.slices!.map((s) => s.count));
    expect(mine.slices.map((s) => s.histogram)).toEqual(alone.slices!.map((s) => s.histogram));
    expect(mine.totals).toEqual(alone.totals);
  });

  test('explicit edges: every population uses the same edges; inside its window it equals its own file', () => {
    const text = NB.replace('slices: {count: 3}', 'slices: {edges: [0.38, 0.40, 0.42]}');
    const p = predict(loadSurveyText(text, 'nb.yaml'));
    const [ha, o3] = p.populations;
    expect(ha!.slices.map((s) => s.z_min)).toEqual([0.38, 0.4]);
    expect(o3!.slices.map((s) => s.z_min)).toEqual([0.38, 0.4]);
    const alone = predict(loadSurveyText(single(text, 0), 'nb.yaml'));
    expect(ha!.slices.map((s) => s.count)).toEqual(alone.slices!.map((s) => s.count));
    // [OIII] lies at z ~ 0.84, outside the edges: it counts 0 there and a warning says so; the
    // top level (its windows differ) is broken down by observed flux, which holds only H-alpha.
    expect(o3!.totals.count).toBe(0);
    expect(p.warnings.some((w) => w.code === 'population_outside_slices' && w.message.startsWith('oiii:'))).toBe(true);
    expect(p.breakdown).toBe('observed');
    expect(p.observed_bins.bins.reduce((a, b) => a + b.populations.oiii!.count, 0)).toBe(0);
    expect(rel(p.totals.count, ha!.totals.count)).toBeLessThan(1e-12);
  });

  test('explicit edges spanning both windows: each line is counted on the edges cut at its window, as its own file would be', async () => {
    const text = NB.replace('slices: {count: 3}', 'slices: {edges: [0.39, 0.40, 0.41, 0.83, 0.85]}');
    const p = predict(loadSurveyText(text, 'nb.yaml'));
    const [ha, o3] = p.populations;
    // each population's slices are the edges inside its window, the outer ones moved to its ends
    // (before, every population had all four slices: H-alpha's last, 0.41-0.83, was 0.42 deep in
    // redshift where its sources lie in 0.017, and its cosmic-variance box and volume were that deep)
    expect(ha!.slices.map((s) => [s.z_min, s.z_max])).toEqual([
      [0.39, 0.4],
      [0.4, 0.41],
      [0.41, ha!.window.max],
    ]);
    expect(o3!.slices.map((s) => [s.z_min, s.z_max])).toEqual([
      [o3!.window.min, 0.83],
      [0.83, 0.85],
    ]);
    // = a file holding that population alone on those edges (which must lie inside its window)
    for (const [i, q] of [ha!, o3!].entries()) {
      const edges = [q.slices[0]!.z_min, ...q.slices.map((s) => s.z_max)];
      const alone = predict(
        loadSurveyText(single(text, i).replace(/"edges":\[[^\]]*\]/, `"edges":${JSON.stringify(edges)}`), 'nb.yaml'),
      );
      expect(q.slices.map((s) => s.count)).toEqual(alone.slices!.map((s) => s.count));
      expect(q.slices.map((s) => s.volume_mpc3)).toEqual(alone.slices!.map((s) => s.volume_mpc3));
      expect(q.slices.map((s) => s.uncertainty)).toEqual(alone.slices!.map((s) => s.uncertainty));
      expect(q.totals).toEqual(alone.totals);
      // forecast --population gives the numbers of that file (its cosmic-variance nuisances too:
      // with the slices 0.42 deep, sigma(log10 phi*) of an [OIII] window came out 20 % small)
      const f = await forecast(loadSurveyText(text, 'nb.yaml'), { population: q.name });
      const g = await forecast(
        loadSurveyText(single(text, i).replace(/"edges":\[[^\]]*\]/, `"edges":${JSON.stringify(edges)}`), 'nb.yaml'),
      );
      expect(f.fisher.sigma).toEqual(g.fisher.sigma);
    }
    // the total is the plain sum of the population totals
    expect(rel(p.totals.count, ha!.totals.count + o3!.totals.count)).toBeLessThan(1e-12);
  });
});

describe('top-level totals: everything detected, each population over its own window (bookkeeping identities)', () => {
  const p = predict(loadSurveyText(NB, 'nb.yaml'));
  test('lines at other redshifts: totals are the sum of the populations; no top-level redshift slices', () => {
    expect(p.breakdown).toBe('observed');
    expect(p.slices).toBeUndefined();
    const sum = p.populations.reduce((a, q) => a + q.totals.count, 0);
    expect(rel(p.totals.count, sum)).toBeLessThan(1e-12);
    expect(p.totals.per_deg2).toBeCloseTo(sum / p.area_deg2, 10);
    expect(p.redshift.min).toBe(p.populations[0]!.window.min);
    expect(p.redshift.max).toBe(p.populations[1]!.window.max);
    // the volume is that of the two windows together (they do not overlap)
    expect(
      rel(p.totals.volume_mpc3, p.populations[0]!.totals.volume_mpc3 + p.populations[1]!.totals.volume_mpc3),
    ).toBeLessThan(1e-9);
  });
  test('observed_bins: each population sums to its total, the bins to the total; shares sum to 1 where a bin holds sources', () => {
    const o = p.observed_bins;
    expect(o.variable).toBe('log10_line_flux');
    expect(o.width).toBe(0.1);
    for (const q of p.populations)
      expect(
        rel(
          o.bins.reduce((a, b) => a + b.populations[q.name]!.count, 0),
          q.totals.count,
        ),
      ).toBeLessThan(1e-12);
    expect(
      rel(
        o.bins.reduce((a, b) => a + b.count, 0),
        p.totals.count,
      ),
    ).toBeLessThan(1e-12);
    for (const b of o.bins) {
      expect(b.max - b.min).toBeCloseTo(0.1, 9);
      expect(b.per_deg2).toBeCloseTo(b.count / p.area_deg2, 12);
      const shares = Object.values(b.populations).map((x) => x.share);
      for (const f of shares) {
        expect(f).toBeGreaterThanOrEqual(0);
        expect(f).toBeLessThanOrEqual(1);
      }
      if (b.count > 0) expect(shares.reduce((a, f) => a + f, 0)).toBeCloseTo(1, 12);
      else expect(shares.every((f) => f === 0)).toBe(true);
    }
  });
  test('two galaxy types in one window: redshift slices holding both, summing to the total', () => {
    const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: {min: 0.5, max: 1.5}
detection: {kind: magnitude, limit: 24, band: 8000}
populations:
  - {name: star-forming, variable: magnitude, phi_star: 2e-3, m_star: -21.0, alpha: -1.3}
  - {name: quiescent, variable: magnitude, phi_star: 1.2e-3, m_star: -21.3, alpha: -0.6}
slices: {count: 4}
`;
    const q = predict(loadSurveyText(text, 'two.yaml'));
    expect(q.breakdown).toBe('redshift');
    const slices = q.slices!;
    expect(slices).toHaveLength(4);
    slices.forEach((s, i) => {
      expect(s.population_counts).toEqual({
        'star-forming': q.populations[0]!.slices[i]!.count,
        quiescent: q.populations[1]!.slices[i]!.count,
      });
      expect(rel(s.count, q.populations[0]!.slices[i]!.count + q.populations[1]!.slices[i]!.count)).toBeLessThan(1e-12);
      expect(
        rel(
          s.histogram.counts.reduce((a, c) => a + c, 0),
          s.count,
        ),
      ).toBeLessThan(1e-9);
    });
    expect(
      rel(
        slices.reduce((a, s) => a + s.count, 0),
        q.totals.count,
      ),
    ).toBeLessThan(1e-12);
    expect(rel(q.totals.count, q.populations[0]!.totals.count + q.populations[1]!.totals.count)).toBeLessThan(1e-12);
  });
  test('populationByName: by name, first by default, bad_option naming the valid names', () => {
    const s = loadSurveyText(NB, 'nb.yaml');
    expect(populationByName(s, 'oiii').name).toBe('oiii');
    expect(populationByName(s).name).toBe('halpha');
    try {
      populationByName(s, 'OIII');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(SurveyError);
      expect((e as SurveyError).code).toBe('bad_option');
      expect((e as SurveyError).message).toMatch(/"halpha", "oiii"/);
    }
  });
});

const MASS = (limit: number, alpha: number, extra = '') => `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.3, max: 0.9}
detection: {kind: threshold, limit: ${limit}${extra}}
population: {variable: luminosity, quantity: "stellar mass [Msun]", phi_star: 2e-3, log10_l_star: 10.8, alpha: ${alpha}}
slices: {count: 2}
`;

describe('luminosity density (closed forms)', () => {
  test.each([-0.5, -1.3, -1.9])(
    'constant threshold, alpha = %f: detected phi* L* Gamma(alpha+2, u), total phi* L* Gamma(alpha+2) (1e-12)',
    (alpha) => {
      const p = predict(loadSurveyText(MASS(10.3, alpha), 'm.yaml'));
      const lStar = 10 ** 10.8;
      const u = 10 ** (10.3 - 10.8);
      for (const ld of [...p.slices!.map((s) => s.luminosity_density!), p.totals.luminosity_density!]) {
        expect(rel(ld.detected, 2e-3 * lStar * upperGamma(alpha + 2, u))).toBeLessThan(1e-12);
        expect(rel(ld.total!, 2e-3 * lStar * gammaFn(alpha + 2))).toBeLessThan(1e-12);
        expect(ld.unit).toBe('stellar mass [Msun] Mpc^-3');
      }
    },
  );

  test('the fraction tends to 1 as the limit goes to 0 (alpha = -1.3 > -2), as 1 - u^s / (s Gamma(s))', () => {
    const alpha = -1.3;
    const s = alpha + 2;
    let prev = 0;
    for (const lim of [10.8, 9, 7, 5, 3]) {
      const f = predict(loadSurveyText(MASS(lim, alpha), 'm.yaml')).totals.luminosity_density!.fraction!;
      expect(f).toBeGreaterThan(prev);
      expect(f).toBeLessThanOrEqual(1);
      const u = 10 ** (lim - 10.8);
      if (u < 1e-3) expect(rel(1 - f, u ** s / (s * gammaFn(s)))).toBeLessThan(2 * u + 1e-9);
      prev = f;
    }
    expect(1 - prev).toBeLessThan(1e-4);
  });

  test('alpha <= -2: total and fraction omitted, with a note', () => {
    const ld = predict(loadSurveyText(MASS(10.3, -2.2), 'm.yaml')).totals.luminosity_density!;
    expect(ld.total).toBeUndefined();
    expect(ld.fraction).toBeUndefined();
    expect(ld.note).toMatch(/diverges/);
  });

  test('with completeness, the detected density is the completeness-weighted integral (brute-force trapezoid, 1e-6)', () => {
    const text = MASS(9.5, -1.3, ', completeness: {model: logistic, half: 10.0, width: 0.15}');
    const ld = predict(loadSurveyText(text, 'm.yaml')).totals.luminosity_density!;
    // threshold, luminosity variable: c = 1 / (1 + exp((half - x) / width)) with x = log10 quantity (rises with mass)
    const lStar = 10 ** 10.8;
    let sum = 0;
    const n = 200000;
    const x0 = 9.5;
    const x1 = 10.8 + Math.log10(60);
    const h = (x1 - x0) / n;
    for (let i = 0; i <= n; i++) {
      const x = x0 + i * h;
      const u = 10 ** (x - 10.8);
      const f = (2e-3 * u ** (-1.3 + 2) * Math.exp(-u) * Math.LN10) / (1 + Math.exp((10.0 - x) / 0.15)); // phi(u) u du/dx
      sum += (i === 0 || i === n ? 0.5 : 1) * f * h;
    }
    expect(rel(ld.detected, sum * lStar)).toBeLessThan(1e-6);
  });
});

describe('star-formation-rate densities (Kennicutt 1998, ARA&A 36, 189)', () => {
  test('factors as published: eq. (1) UV 1.4e-28, eq. (2) H-alpha 7.9e-42, eq. (3) [OII] 1.4e-41 (equation numbers from memory)', () => {
    expect(KENNICUTT1998.uv).toBe(1.4e-28);
    expect(KENNICUTT1998.halpha).toBe(7.9e-42);
    expect(KENNICUTT1998.oii).toBe(1.4e-41);
  });
  test('sfr density = factor x luminosity density, per slice and in total (1e-15)', () => {
    const p = predict(loadSurveyText(NB, 'nb.yaml'));
    const ha = p.populations[0]!;
    for (const x of [...ha.slices, ha]) {
      const ld = 'totals' in x ? x.totals.luminosity_density! : x.luminosity_density!;
      const sfr = 'totals' in x ? x.totals.sfr_density_msun_yr_mpc3! : x.sfr_density_msun_yr_mpc3!;
      expect(rel(sfr.detected, 7.9e-42 * ld.detected)).toBeLessThan(1e-15);
      expect(rel(sfr.total!, 7.9e-42 * ld.total!)).toBeLessThan(1e-15);
    }
    expect(p.populations[1]!.totals.sfr_density_msun_yr_mpc3).toBeUndefined();
  });
  test('uv with a magnitude population: L_nu* = 4 pi (10 pc)^2 x 3631 Jy x 10^(-0.4 M*) (the AB zero point of docs/survey-file.md, common practice), 1e-12', () => {
    const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 3, max: 4}
detection: {kind: threshold, limit: -19}
population: {variable: magnitude, phi_star: 2.2e-3, m_star: -21, alpha: -1.6, sfr_conversion: uv}
slices: {count: 1}
`;
    const p = predict(loadSurveyText(text, 'uv.yaml'));
    const pcCm = 3.0856775814913674e18; // IAU 2015 B2 parsec in cm (3.0856775814913673e16 m; the same double)
    // 3631 Jy = 3631e-23 erg s^-1 cm^-2 Hz^-1 (common practice); the earlier 10^(-0.4 x 48.60) of Oke &
    // Gunn 1983 (3630.78 Jy) is 6.0e-5 lower, beyond the 1e-12 checked
    const lnuStar = 4 * Math.PI * (10 * pcCm) ** 2 * 3631e-23 * 10 ** (-0.4 * -21);
    const u = 10 ** (0.4 * (-21 - -19));
    const ld = p.totals.luminosity_density!;
    expect(ld.unit).toBe('erg s^-1 Hz^-1 Mpc^-3');
    expect(rel(ld.detected, 2.2e-3 * lnuStar * upperGamma(0.4, u))).toBeLessThan(1e-12);
    expect(rel(p.totals.sfr_density_msun_yr_mpc3!.detected, 1.4e-28 * ld.detected)).toBeLessThan(1e-15);
  });
  test('a conversion that does not fit the variable is a kind_mismatch', () => {
    expect(() =>
      loadSurveyText(MASS(10, -1.3).replace('alpha: -1.3}', 'alpha: -1.3, sfr_conversion: uv}'), 'm.yaml'),
    ).toThrow(SurveyError);
  });
});

describe('tabulated filter curves', () => {
  const dir = tempDir('skytally-filter-');
  const base = (filter: string) => `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
detection: {kind: line_flux, limit: 3e-17, line: 6563, filter: ${filter}}
population: {variable: luminosity, log10_phi_star: -2.8, log10_l_star: 41.9, alpha: -1.35}
slices: {count: 3}
`;
  test('a tabulated top-hat reproduces the analytic top-hat (1e-4)', () => {
    writeFileSync(join(dir, 'tophat.csv'), 'wavelength,transmission\n9145,0.8\n9255,0.8\n');
    const tab = predict(loadSurveyFile(writeSurvey(dir, 'tophat.yaml', base('{profile: table, file: tophat.csv}'))));
    const ana = predict(loadSurveyText(base('{center: 9200, fwhm: 110}'), 'x.yaml'));
    expect(rel(tab.totals.count, ana.totals.count)).toBeLessThan(1e-4);
    tab.slices!.forEach((s, i) => expect(rel(s.count, ana.slices![i]!.count)).toBeLessThan(1e-4));
  });
  test('a tabulated gaussian (0.5 A steps, nanometre header) reproduces the analytic gaussian (1e-4)', () => {
    const sigma = 110 / (2 * Math.sqrt(2 * Math.LN2));
    let csv = '# sampled gaussian\nwavelength_nm, transmission\n';
    for (let w = 9200 - 165; w <= 9200 + 165 + 1e-9; w += 0.5)
      csv += `${(w / 10).toFixed(5)}, ${Math.exp(-((w - 9200) ** 2) / (2 * sigma * sigma))}\n`;
    writeFileSync(join(dir, 'gauss.csv'), csv);
    const tab = predict(loadSurveyFile(writeSurvey(dir, 'gauss.yaml', base('{profile: table, file: gauss.csv}'))));
    const ana = predict(loadSurveyText(base('{center: 9200, fwhm: 110, profile: gaussian}'), 'x.yaml'));
    expect(rel(tab.totals.count, ana.totals.count)).toBeLessThan(1e-4);
    tab.slices!.forEach((s, i) => expect(rel(s.count, ana.slices![i]!.count)).toBeLessThan(1e-4));
  });
  test.each([
    ['missing file', null, 'file_unreadable'],
    ['one row', 'wavelength,transmission\n9000,1\n', 'bad_table'],
    ['decreasing wavelength', '9100,1\n9000,1\n', 'bad_table'],
    ['negative transmission', '9000,1\n9100,-0.1\n', 'bad_table'],
    ['unknown header unit', 'lambda_mm,t\n9000,1\n9100,1\n', 'bad_table'],
    ['text in a row', '9000,1\n9100,high\n', 'bad_table'],
    ['all zero', '9000,0\n9100,0\n', 'bad_table'],
  ])('%s: one SurveyError naming the survey file, the key and the CSV', (_n, csv, code) => {
    const name = `bad-${code}-${Math.random().toString(36).slice(2)}.csv`;
    if (csv !== null) writeFileSync(join(dir, name), csv);
    const survey = writeSurvey(dir, 'bad.yaml', base(`{profile: table, file: ${name}}`));
    try {
      loadSurveyFile(survey);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(SurveyError);
      const err = e as SurveyError;
      expect(err.code).toBe(code);
      expect(err.keyPath).toBe('detection.filter.file');
      expect(err.file).toBe(survey);
      expect(err.message).toContain(name);
      expect(err.message.split('. ').length).toBe(1); // one sentence
    }
  });
  test('center or fwhm beside a table is a conflict', () => {
    writeFileSync(join(dir, 'ok.csv'), '9000,1\n9100,1\n');
    const obj = parse(base('{profile: table, file: ok.csv, center: 9050}'));
    expect(() => parseSurveyObject(obj, join(dir, 'x.yaml'))).toThrow(/center/);
  });
});

function writeSurvey(dir: string, name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

describe('every sample runs through predict, and the CLI prints warnings on stderr', () => {
  test.each(['deep-continuum', 'halpha-narrowband', 'mass-limited', 'narrowband-interlopers', 'double-schechter-mass'])(
    'samples/%s.yaml',
    async (name) => {
      // shared with the files that read the same run (test/support/sample-commands.ts)
      const r = await sampleCommand(['predict', `samples/${name}.yaml`, '--format', 'json']);
      expect(r.code).toBe(0);
      const p = JSON.parse(r.stdout);
      expect(p.totals.count).toBeGreaterThan(0);
      expect(p.warnings).toEqual([]);
    },
  );
  test('a warning reaches stderr', async () => {
    const dir = tempDir('skytally-warn-');
    const file = writeSurvey(
      dir,
      'w.yaml',
      `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 5.5, max: 6.5}
detection: {kind: magnitude, limit: 27, band: 8000}
population: {variable: magnitude, phi_star: 5e-4, m_star: -20.8, alpha: -1.8}
`,
    );
    const r = await runCli(['predict', file]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/warning: .*Lyman alpha/);
  });
});

describe('a redshift window that misses one of several lines through one filter', () => {
  // found by a trial user: the sentence said "the filter sees the line at 5007 Angstrom" without
  // saying whose, and offered to check the filter, when the redshift key (cutting every population's
  // window) was what left that line out
  test("refused naming that population's line, its window and the three ways out", () => {
    const text = NB.replace('area: 0.8', 'area: 0.8\nredshift: {min: 0.38, max: 0.42}');
    let e: unknown;
    try {
      loadSurveyText(text, 'nb.yaml');
    } catch (err) {
      e = err;
    }
    expect(e).toBeInstanceOf(SurveyError);
    const m = (e as SurveyError).message;
    expect(m).toContain("detection.filter: the filter sees oiii's line at 5007 Angstrom at z = 0.8");
    expect(m).toContain('which does not overlap redshift 0.38 to 0.42');
    expect(m).toContain('widen redshift to reach z = 0.8');
    expect(m).toContain("leave redshift out (the filter sets each population's window), or remove that population");
  });
  test('one population: the sentence is as before (the filter or the window may be wrong)', () => {
    const text = single(NB, 1).replace('"area":0.8', '"area":0.8,"redshift":{"min":0.38,"max":0.42}');
    let m = '';
    try {
      loadSurveyText(text, 'nb.yaml');
    } catch (err) {
      m = (err as SurveyError).message;
    }
    expect(m).toContain('the filter sees the line at 5007 Angstrom');
    expect(m).toContain('check the filter center and fwhm, the line and the redshift window');
  });
});
