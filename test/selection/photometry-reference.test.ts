/**
 * Spectra, bands and magnitude systems through the whole count (detection.sed, rest_band,
 * system: vega with vega_to_ab).
 *
 * Reference: test/reference/selection.json, written by the committed generator
 * test/reference/generate/selection.py (semantics 5 and 6 of its header; astropy 5.2.1
 * FlatLambdaCDM, mpmath, scipy quad at epsrel 1e-10; its K-corrections by kcorrection.py), cases
 * vega-restband-sed.yaml (a Vega survey through a tabulated band, the spectrum, M* in Vega in a
 * rest-frame top-hat), dropout-sed-selection.yaml (a gaussian band, the spectrum with M* at 1500
 * Angstrom, with a redshift selection table and 1 mag of attenuation) and zero-vega.yaml (system
 * vega with zero offsets).
 * Tolerances: slice counts and histogram bins 1e-6 relative (measured about 5e-9; the K table is
 * good to 1e-8 mag, the engine's quadrature to about 1e-9); K(z) and the apparent magnitude of M* at
 * the slices' middles 2e-8 mag (the table's tolerance); zero offsets equal the plain survey exactly.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { makeObserver } from '../../src/selection/observe.js';
import { SurveyError } from '../../src/errors.js';
import { describeSurvey } from '../../src/survey/describe.js';
import type { Prediction } from '../../src/model/outputs/prediction.js';
import { detectionLine } from '../../src/render/predict-table.js';
import { tempDir } from '../support/temp.js';

interface Slice {
  z_min: number;
  z_max: number;
  count: number;
}
interface Case {
  file: string;
  yaml: string;
  slices: Slice[];
  total: number;
  first_slice_bins?: { lo: number; hi: number; count: number }[];
  ingredients?: { z: number; k_correction?: number; apparent_ab_of_m_star?: number; attenuation_mag?: number }[];
  equals_plain?: string;
}
const fixture = JSON.parse(readFileSync(new URL('../reference/selection.json', import.meta.url), 'utf8')) as {
  surveys: Case[];
  zero_effect: Case[];
};
const dir = fileURLToPath(new URL('../reference/surveys-selection/', import.meta.url));
const find = (name: string): Case => [...fixture.surveys, ...fixture.zero_effect].find((c) => c.file === name)!;
const rel = (a: number, b: number) => Math.abs(a / b - 1);

function slicesOf(p: Prediction) {
  if (p.breakdown !== 'redshift') throw new Error('one population: redshift breakdown expected');
  return p.slices;
}

describe.each(['vega-restband-sed.yaml', 'dropout-sed-selection.yaml'])('%s against selection.json', (name) => {
  const c = find(name);
  const survey = loadSurveyFile(`${dir}/${c.file}`);
  const p = predict(survey);
  test('slice counts and the total (1e-6 relative)', () => {
    const slices = slicesOf(p);
    expect(slices).toHaveLength(c.slices.length);
    c.slices.forEach((r, i) => expect(rel(slices[i]!.count, r.count), `slice ${i}`).toBeLessThan(1e-6));
    expect(rel(p.totals.count, c.total)).toBeLessThan(1e-6);
  });
  test('histogram bins of the first slice, in apparent AB magnitude (1e-6 relative)', () => {
    const h = slicesOf(p)[0]!.histogram;
    expect(c.first_slice_bins!.length).toBeGreaterThan(0);
    for (const b of c.first_slice_bins!) {
      const k = h.edges.findIndex((e) => Math.abs(e - b.lo) < 1e-9);
      expect(k, `bin ${b.lo}`).toBeGreaterThanOrEqual(0);
      if (b.count === 0) expect(h.counts[k] ?? 0, `bin ${b.lo}`).toBe(0);
      else expect(rel(h.counts[k]!, b.count), `bin ${b.lo}`).toBeLessThan(1e-6);
    }
  });
  test("K(z) and the apparent AB magnitude of M* at the slices' middles (2e-8 mag)", () => {
    const cosmo = new FlatCosmology(survey.cosmology);
    const pop = survey.populations[0]!;
    const obs = makeObserver(survey.detection, pop, cosmo);
    expect(c.ingredients!.length).toBeGreaterThan(0);
    for (const r of c.ingredients!) {
      const mStar = pop.mStar!.at(r.z);
      const a = obs.at(r.z, mStar).a;
      expect(Math.abs(a - r.apparent_ab_of_m_star!)).toBeLessThan(2e-8);
      const dm = 5 * Math.log10(cosmo.luminosityDistanceMpc(r.z) / 1e-5);
      expect(Math.abs(a - mStar - dm - (r.attenuation_mag ?? 0) - r.k_correction!)).toBeLessThan(2e-8);
    }
  });
});

describe('vega-restband-sed.yaml: the magnitude systems', () => {
  const c = find('vega-restband-sed.yaml');
  const survey = loadSurveyFile(`${dir}/${c.file}`);
  const p = predict(survey);
  test('everything is AB once: the limit, the completeness and M*; the outputs say how each was given', () => {
    const d = survey.detection;
    if (d.kind !== 'magnitude') throw new Error('magnitude kind expected');
    expect(d.limitMag).toBeCloseTo(20.5 + 0.18, 12);
    expect(d.completeness).toEqual({ model: 'logistic', half: 20.2 + 0.18, width: 0.12 });
    expect(survey.populations[0]!.mStar!.at(0.2)).toBeCloseTo(-21.3 - 0.12, 12);
    expect(p.detection).toMatchObject({
      kind: 'magnitude',
      limit_ab_mag: 20.68,
      system: 'vega',
      vega_to_ab: 0.18,
      sed_file: 'spectra/invented-starburst.csv',
    });
    const m = p.models[0]!;
    expect(m.magnitude_system).toEqual({ stated: 'ab', m_star_given: 'vega', vega_to_ab: -0.12 });
    expect(m.rest_band).toEqual({ profile: 'tophat', center_angstrom: 6200, fwhm_angstrom: 1400 });
    expect(m.k_correction).toEqual({ method: 'spectrum', spectrum_file: 'spectra/invented-starburst.csv' });
    expect(m.m_star!.given).toBe(-21.3);
    expect(m.m_star!.at_window_middle).toBeCloseTo(-21.42, 12);
    expect(m.summary).toContain('given in Vega');
    expect(detectionLine(p)).toBe(
      'AB magnitude limit 20.68 (given in Vega, AB = Vega + 0.18) in the band bands/invented-red-band.csv, k-corrected with the spectrum spectra/invented-starburst.csv',
    );
    const check = describeSurvey(survey);
    expect(check.detection).toMatchObject({ system: 'vega', sed_file: 'spectra/invented-starburst.csv' });
  });
});

describe('zero offsets reproduce the plain survey exactly (selection.json zero_effect)', () => {
  test('zero-vega.yaml equals zero-plain-magnitude.yaml and the reference (1e-6)', () => {
    const c = find('zero-vega.yaml');
    expect(c.equals_plain).toBe('zero-plain-magnitude.yaml');
    const a = slicesOf(predict(loadSurveyFile(`${dir}/zero-vega.yaml`)));
    const b = slicesOf(predict(loadSurveyFile(`${dir}/zero-plain-magnitude.yaml`)));
    a.forEach((s, i) => {
      expect(s.count).toBe(b[i]!.count);
      expect(s.histogram).toEqual(b[i]!.histogram);
      expect(rel(s.count, c.slices[i]!.count)).toBeLessThan(1e-6);
    });
  });
  test('a Vega offset o on the detection alone is the AB survey with the limit and completeness moved by o', () => {
    const base = find('zero-plain-magnitude.yaml').yaml;
    const vega = base
      .replace('  limit: 25.0\n', '  limit: 24.7\n  system: vega\n  vega_to_ab: 0.3\n')
      .replace('half: 24.7', 'half: 24.4');
    const ab = predict(loadSurveyText(base, 'ab.yaml'));
    const v = predict(loadSurveyText(vega, 'vega.yaml'));
    expect(rel(v.totals.count, ab.totals.count)).toBeLessThan(1e-12);
  });
});

describe('refusals name the key and the fix (exit 2)', () => {
  const base = find('vega-restband-sed.yaml').yaml;
  const refused = (yaml: string): SurveyError => {
    try {
      loadSurveyText(yaml, `${dir}/edited.yaml`);
    } catch (e) {
      if (e instanceof SurveyError) return e;
      throw e;
    }
    throw new Error('not refused');
  };
  test.each([
    [
      'a window beyond the spectrum',
      base.replace('redshift: {min: 0.05, max: 0.45}', 'redshift: {min: 0.05, max: 14}'),
      'detection.sed',
    ],
    ['vega without an offset', base.replace('  vega_to_ab: 0.18\n', ''), 'detection.vega_to_ab'],
    [
      'an offset without vega',
      base.replace('  system: vega\n  vega_to_ab: 0.18\n', '  vega_to_ab: 0.18\n'),
      'detection.vega_to_ab',
    ],
    ['beta with a spectrum', base.replace('  limit: 20.5\n', '  limit: 20.5\n  beta: -2\n'), 'detection.beta'],
    [
      'a wavelength band with a spectrum',
      base.replace('  band_file: bands/invented-red-band.csv\n', '  band: 6400\n'),
      'detection.band',
    ],
    [
      'a rest band without a spectrum',
      base.replace('  sed: {file: spectra/invented-starburst.csv}\n', '  beta: -1\n'),
      'population.rest_band',
    ],
    [
      'a rest band with a rest wavelength',
      base.replace('  alpha: -1.2\n', '  alpha: -1.2\n  rest_wavelength: 6000\n'),
      'population.rest_band',
    ],
    ['a missing spectrum file', base.replace('invented-starburst.csv', 'no-such-spectrum.csv'), 'detection.sed.file'],
  ])('%s', (_what, yaml, key) => {
    const e = refused(yaml);
    expect(e.message).toContain(key);
  });
});

describe('warnings about Lyman alpha with a spectrum', () => {
  test('a band reaching blueward of Lyman alpha (1+z) warns, naming the spectrum, with igm none', () => {
    const yaml = find('dropout-sed-selection.yaml').yaml.replace(
      'redshift: {min: 3.2, max: 4.6}',
      'redshift: {min: 3.2, max: 8}',
    );
    const p = predict(loadSurveyText(yaml, `${dir}/edited.yaml`));
    const w = p.warnings.find((x) => x.code === 'band_blueward_of_lyman_alpha');
    expect(w?.message).toContain('red edge at 10500 A');
    expect(w?.message).toContain('spectrum');
    const madau = predict(loadSurveyText(yaml.replace('  igm: none\n', '  igm: madau1995\n'), `${dir}/edited.yaml`));
    expect(madau.warnings.find((x) => x.code === 'band_blueward_of_lyman_alpha')?.message).toContain(
      'applied to the spectrum inside the band',
    );
    expect(madau.totals.count).toBeLessThan(p.totals.count);
  });
});

describe('photometric redshifts with a spectrum', () => {
  // The invented spectrum cut to rest-frame 3000-10000 A: enough for a top-hat band at 7250-8750 A over
  // z = 0.6-1.4, not for the true redshifts up to (1.4 + 0.24) / 0.76 = 2.16 that photo_z sigma 0.04 integrates.
  const tmp = tempDir('skytally-sed-');
  const rows = readFileSync(`${dir}/spectra/invented-starburst.csv`, 'utf8')
    .split('\n')
    .filter((l) => /^\d/.test(l) && Number(l.split(',')[0]) >= 3000 && Number(l.split(',')[0]) <= 10000);
  writeFileSync(join(tmp, 'cut.csv'), `wavelength_angstrom,f_lambda\n${rows.join('\n')}\n`);
  const base = find('photoz-broadband.yaml').yaml.replace(
    '  band: "8000 Angstrom"\n  beta: -1.5\n',
    '  band: {center: 8000, fwhm: 1500}\n  sed: {file: SPECTRUM}\n',
  );
  const write = (yaml: string, name: string): string => {
    const f = join(tmp, name);
    writeFileSync(f, yaml);
    return f;
  };
  test('a true range beyond the spectrum is refused naming detection.sed; the window alone is not', () => {
    expect(base).toContain('photo_z');
    const cut = base.replace('SPECTRUM', 'cut.csv');
    let err: unknown;
    try {
      loadSurveyFile(write(cut, 'photoz-cut.yaml'));
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    expect((err as SurveyError).keyPath).toBe('detection.sed');
    expect(() => loadSurveyFile(write(cut.replace(/\n {2}photo_z: .*\n/, '\n'), 'exact-cut.yaml'))).not.toThrow();
  });
  test('sigma 0 and no outliers reproduce the survey without photo_z exactly', () => {
    const full = base.replace('SPECTRUM', `${dir}/spectra/invented-starburst.csv`);
    const exact = predict(
      loadSurveyFile(
        write(full.replace(/\n {2}photo_z: .*\n/, '\n  photo_z: {sigma: 0, outlier_fraction: 0}\n'), 'zero.yaml'),
      ),
    );
    const none = predict(loadSurveyFile(write(full.replace(/\n {2}photo_z: .*\n/, '\n'), 'none.yaml')));
    expect(exact.totals.count).toBeGreaterThan(0);
    expect(exact.totals.count).toBe(none.totals.count);
    const scattered = predict(loadSurveyFile(write(full, 'scattered.yaml')));
    expect(Number.isFinite(scattered.totals.count)).toBe(true);
    expect(rel(scattered.totals.count, none.totals.count)).toBeLessThan(0.2);
  });
});
