/**
 * Redshift selection, line blending, attenuation and equivalent-width cuts against an independent
 * integration: test/reference/generate/selection.py (astropy 5.2.1 distances, mpmath 1.2.1
 * incomplete gamma, scipy 1.10.1 quad at epsrel 1e-10; its header states the semantics).
 * Tolerances: counts, slices and histogram bins 1e-6 relative; the effects' own values at each
 * slice's middle (selection fraction, kept fraction, attenuation) 1e-12; the measured flux of L*
 * 1e-9. The zero-effect files must reproduce their plain file exactly (bit for bit).
 */
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { erfc, fractionAbove, selectionEffects } from '../../src/selection/effects.js';
import { makeObserver } from '../../src/selection/observe.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { populationAt } from '../../src/population/model.js';
import type { Prediction } from '../../src/model/outputs/prediction.js';
import type { EquivalentWidthDistribution } from '../../src/model/selection.js';

interface Slice {
  z_min: number;
  z_max: number;
  count: number;
}
interface Ingredient {
  z: number;
  redshift_selection: number;
  equivalent_width_kept: number;
  attenuation_mag: number;
  measured_flux_of_l_star?: number;
}
interface Case {
  file: string;
  yaml: string;
  slices: Slice[];
  total: number;
  first_slice_bins?: { lo: number; hi: number; count: number }[];
  ingredients?: Ingredient[];
  populations?: { name: string; slices: Slice[]; ingredients: Ingredient[] }[];
  equals_plain?: string;
}
const fixture = JSON.parse(readFileSync(new URL('../reference/selection.json', import.meta.url), 'utf8')) as {
  surveys: Case[];
  zero_effect: Case[];
};
const REL = 1e-6;
/** The reference surveys that use only the effects of this module (the others need spectra, Vega or photometric redshifts). */
const MINE = ['slitless-halpha-blend-dust-ew.yaml', 'narrowband-two-lines-selection.yaml'];
const cases = fixture.surveys.filter((c) => MINE.includes(c.file));
const rel = (a: number, b: number) => Math.abs(a / b - 1);

function expectSlices(got: { z_min: number; z_max: number; count: number }[], want: Slice[]): void {
  expect(got.length).toBe(want.length);
  want.forEach((s, i) => {
    expect(got[i]!.z_min).toBeCloseTo(s.z_min, 10);
    expect(got[i]!.z_max).toBeCloseTo(s.z_max, 10);
    expect(rel(got[i]!.count, s.count), `slice ${i}: ${got[i]!.count} vs ${s.count}`).toBeLessThan(REL);
  });
}

describe('selection effects against selection.py', () => {
  test('both reference surveys are here', () => expect(cases.length).toBe(MINE.length));

  test.each(cases.map((c) => [c.file, c] as const))('%s: slices, populations and total to 1e-6', (_f, c) => {
    const p = predict(loadSurveyText(c.yaml, c.file), { noUncertainty: true });
    if (c.populations) {
      c.populations.forEach((q, k) => expectSlices(p.populations[k]!.slices, q.slices));
      const all = c.populations.reduce((a, q) => a + q.slices.reduce((b, s) => b + s.count, 0), 0);
      expect(rel(p.totals.count, all)).toBeLessThan(REL);
    } else {
      expectSlices(p.slices!, c.slices);
      expect(rel(p.totals.count, c.total)).toBeLessThan(REL);
    }
  });

  test.each(cases.map((c) => [c.file, c] as const))(
    '%s: histogram bins of the measured flux near the limit to 1e-6',
    (_f, c) => {
      const p = predict(loadSurveyText(c.yaml, c.file), { noUncertainty: true });
      const h = p.populations[0]!.slices[0]!.histogram;
      expect(c.first_slice_bins!.length).toBeGreaterThan(0);
      for (const bin of c.first_slice_bins!) {
        const i = h.edges.findIndex((e) => Math.abs(e - bin.lo) < 1e-9);
        expect(i, `bin ${bin.lo}`).toBeGreaterThanOrEqual(0);
        expect(rel(h.counts[i]!, bin.count), `bin ${bin.lo}: ${h.counts[i]} vs ${bin.count}`).toBeLessThan(REL);
      }
    },
  );

  test.each(cases.map((c) => [c.file, c] as const))("%s: each effect at the slices' middles to 1e-12", (_f, c) => {
    const survey = loadSurveyText(c.yaml, c.file);
    const cosmo = new FlatCosmology(survey.cosmology);
    const lists = c.populations ? c.populations.map((q) => q.ingredients) : [c.ingredients!];
    lists.forEach((rows, k) => {
      const pop = survey.populations[k]!;
      const fx = selectionEffects(survey.detection, pop);
      const observer = makeObserver(survey.detection, pop, cosmo);
      for (const r of rows) {
        expect(Math.abs(fx.selection(r.z) - r.redshift_selection)).toBeLessThan(1e-12);
        expect(Math.abs(fx.equivalentWidthKept(r.z) - r.equivalent_width_kept)).toBeLessThan(1e-12);
        expect(Math.abs(fx.attenuation(r.z) - r.attenuation_mag)).toBeLessThan(1e-12);
        // log10 of the measured (blended, dimmed, filtered) flux of an L* source
        const obs = observer.at(r.z, populationAt(pop, r.z).characteristic);
        expect(rel(10 ** obs.a, r.measured_flux_of_l_star!)).toBeLessThan(1e-9);
      }
    });
  });
});

describe('neutral values reproduce the plain prediction exactly', () => {
  const plain = new Map<string, Prediction>();
  const zero = fixture.zero_effect.filter((c) => !/photoz|vega/.test(c.file));
  for (const c of zero) if (!c.equals_plain) plain.set(c.file, predict(loadSurveyText(c.yaml, c.file)));

  test.each(zero.filter((c) => c.equals_plain).map((c) => [c.file, c] as const))('%s', (_f, c) => {
    const got = predict(loadSurveyText(c.yaml, c.file));
    const want = plain.get(c.equals_plain!)!;
    expect(
      got.slices!.map((s) => [s.count, s.histogram, s.limit_at_center, s.luminosity_density, s.uncertainty]),
    ).toEqual(want.slices!.map((s) => [s.count, s.histogram, s.limit_at_center, s.luminosity_density, s.uncertainty]));
    expect(got.totals).toEqual(want.totals);
    // and the reference agrees with the plain file too (selection.py asserts it to 1e-12)
    expectSlices(got.slices!, c.slices);
  });
});

describe('equivalent-width distributions', () => {
  test('erfc against values of Abramowitz & Stegun table 7.1 (from memory) to 1e-12', () => {
    expect(erfc(0)).toBe(1);
    expect(Math.abs(erfc(0.5) - 0.4795001221869535)).toBeLessThan(1e-12);
    expect(Math.abs(erfc(1) - 0.15729920705028513)).toBeLessThan(1e-12);
    expect(Math.abs(erfc(-1) - 1.8427007929497148)).toBeLessThan(1e-12);
  });
  test('a cut of 0 keeps every source in every model; the lognormal keeps half at its median', () => {
    const models: EquivalentWidthDistribution[] = [
      { model: 'exponential', scaleAngstrom: 50 },
      { model: 'lognormal', medianAngstrom: 40, sigmaDex: 0.3 },
      { model: 'table', widthAngstrom: [0, 30], fractionAbove: [0.9, 0.2] },
    ];
    for (const d of models) {
      expect(fractionAbove(d, 0)).toBe(1);
    }
    expect(fractionAbove({ model: 'lognormal', medianAngstrom: 40, sigmaDex: 0.3 }, 40)).toBeCloseTo(0.5, 14);
    expect(fractionAbove({ model: 'exponential', scaleAngstrom: 50 }, 50)).toBeCloseTo(Math.exp(-1), 15);
    expect(fractionAbove({ model: 'table', widthAngstrom: [0, 30], fractionAbove: [0.9, 0.2] }, 15)).toBeCloseTo(
      0.55,
      15,
    );
  });
});

describe('the selection reaches the cosmic variance and the forecast', () => {
  const text = readFileSync('samples/dropout-field.yaml', 'utf8');
  const withTable = loadSurveyText(text, 'dropout-field.yaml');
  const without = loadSurveyText(text.replace(/^ {2}redshift_selection:.*\n/m, ''), 'dropout-field.yaml');

  test('the total box is as deep as the selected sources: a selection peaked in the window shortens it', () => {
    const a = predict(withTable).totals.uncertainty!;
    const b = predict(without).totals.uncertainty!;
    expect(a.effective_depth_mpc).toBeLessThan(0.9 * b.effective_depth_mpc!);
  });

  test('the forecast counts what predict counts (the selection enters its likelihood like completeness), to 1e-9', async () => {
    const { forecast } = await import('../../src/forecast/forecast.js');
    const f = await forecast(withTable, { cosmicVariance: false });
    const p = predict(withTable, { noUncertainty: true });
    expect(rel(f.count, p.totals.count)).toBeLessThan(1e-9);
    const f0 = await forecast(without, { cosmicVariance: false });
    // fewer sources, so wider constraints on every parameter
    for (const k of Object.keys(f.fisher.sigma)) expect(f.fisher.sigma[k]!).toBeGreaterThan(f0.fisher.sigma[k]!);
  });
});
