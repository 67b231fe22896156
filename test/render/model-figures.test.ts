/**
 * The model's own uncertainty in the figures and the report: the counts figure's band (predict's
 * model percentiles, 1e-9 relative), the luminosity-function band (p16 and p84 of phi over the same
 * seeded draws, recomputed here from the parameters as written in the files and the Schechter
 * function written out in the test, Schechter 1976; percentiles linear between order statistics,
 * as numpy.percentile; 1e-9 relative), and the report's sentence on the three sources (its numbers
 * those of the JSON, to the digits shown).
 */
import { describe, expect, test } from 'vitest';
import { join } from 'node:path';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';
import { drawModelOffsets } from '../../src/counts/model-draws.js';
import {
  countsAxis,
  countsSpec,
  luminosityFunctionSpec,
  spanText,
  type CountRow,
  type LuminosityFunctionRow,
} from '../../src/render/figures.js';
import { drawFigures, predictionViews } from '../../src/render/draw.js';
import { renderReport } from '../../src/render/report.js';
import { formatNumber } from '../../src/render/format.js';

const DIR = 'test/reference/surveys-model';
const DRAWS = 200;

/** numpy.percentile's default (linear between order statistics). */
function pct(values: number[], q: number): number {
  const v = [...values].sort((a, b) => a - b);
  const h = (v.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, v.length - 1);
  return v[lo]! + (h - lo) * (v[hi]! - v[lo]!);
}

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('the counts figure: the model band beside the error bars', () => {
  const survey = loadSurveyFile(join(DIR, 'line-correlated.yaml'));
  const p = predict(survey, { model: { draws: DRAWS, seed: 3 } });
  if (p.breakdown !== 'redshift') throw new Error('one population');
  const view = predictionViews(survey, p, 3).combined;

  test("the band's p16, p50 and p84 are predict's model percentiles (1e-9), beside the slice's middle", () => {
    const spec = countsSpec(view)!;
    const rows = (spec.data as { values: CountRow[] }).values;
    expect(rows).toHaveLength(p.slices.length);
    rows.forEach((r, j) => {
      const m = p.slices[j]!.model!;
      expect(rel(r.model_p16!, m.p16)).toBeLessThan(1e-9);
      expect(rel(r.model_p50!, m.p50)).toBeLessThan(1e-9);
      expect(rel(r.model_p84!, m.p84)).toBeLessThan(1e-9);
      expect(r.model_draws).toBe(DRAWS);
      expect(r.band_x1!).toBeGreaterThan(r.z_mid);
      expect(r.band_x2!).toBeLessThan(p.slices[j]!.z_max);
    });
    const layers = spec.layer as { mark: { type: string }; encoding: Record<string, unknown> }[];
    const band = layers.find((l) => l.mark.type === 'rect')!;
    expect((band.encoding.y as { field: string }).field).toBe('model_p16');
    expect((band.encoding.y2 as { field: string }).field).toBe('model_p84');
  });

  test('the drawn figure names the band and the error bars in its legend', async () => {
    const figs = await drawFigures(survey, p, { modelSeed: 3 });
    const counts = figs.find((f) => f.name === 'counts')!;
    expect(counts.svg).toContain(`the model: p16–p84 of ${DRAWS} draws`);
    expect(counts.svg).toContain('1σ: Poisson and cosmic variance');
    const lf = figs.find((f) => f.name === 'luminosity-function')!;
    expect(lf.svg).toContain(`the model: p16–p84 of ${DRAWS} draws`);
  });

  test('without model_uncertainty nothing changes: no band, no legend', () => {
    const plain = loadSurveyFile(join(DIR, 'line-correlated.yaml'));
    plain.populations[0]!.modelUncertainty = undefined;
    const q = predict(plain);
    const v = predictionViews(plain, q).combined;
    const spec = countsSpec(v)!;
    const layers = spec.layer as { mark: { type: string }; encoding: Record<string, unknown> }[];
    expect(layers.map((l) => l.mark.type)).toEqual(['bar', 'errorbar']);
    expect(layers.every((l) => l.encoding.color === undefined)).toBe(true);
    const lf = luminosityFunctionSpec(v)!;
    const rows = (lf.data as { values: LuminosityFunctionRow[] }).values;
    expect(rows.some((r) => r.kind === 'band')).toBe(false);
    expect(JSON.stringify(lf)).not.toContain('color":{"datum');
  });
});

describe('the luminosity-function band: p16 and p84 of phi over the same seeded draws', () => {
  test.each([
    [
      'line-correlated.yaml',
      // phi_star 2.5e-3 (linear), log10_l_star 42.3, alpha -1.45 - 0.1 z: per dex, Schechter (1976)
      (x: number, z: number, o: { p: number; c: number; a: number }) => {
        const u = 10 ** (x - (42.3 + o.c));
        return Math.LN10 * 2.5e-3 * 10 ** o.p * u ** (-1.45 - 0.1 * z + o.a + 1) * Math.exp(-u);
      },
    ],
    [
      'uv-magnitude.yaml',
      // phi_star 10^(-2.95 - 0.2 (z - 5)), m_star -20.95 + 0.12 (z - 5), alpha -1.7 - 0.06 (z - 5): per magnitude
      (x: number, z: number, o: { p: number; c: number; a: number }) => {
        const u = 10 ** (0.4 * (-20.95 + 0.12 * (z - 5) + o.c - x));
        const alpha = -1.7 - 0.06 * (z - 5) + o.a;
        return 0.4 * Math.LN10 * 10 ** (-2.95 - 0.2 * (z - 5) + o.p) * u ** (alpha + 1) * Math.exp(-u);
      },
    ],
  ])('%s (seed 7)', (file, phi) => {
    const survey = loadSurveyFile(join(DIR, file));
    const p = predict(survey, { model: { draws: DRAWS, seed: 7 } });
    if (p.breakdown !== 'redshift') throw new Error('one population');
    const view = predictionViews(survey, p, 7).combined;
    const spec = luminosityFunctionSpec(view)!;
    const rows = (spec.data as { values: LuminosityFunctionRow[] }).values;
    const pop = survey.populations[0]!;
    const offsets = drawModelOffsets(pop.modelUncertainty!, 1, DRAWS, 7, 0).map((o) => ({
      p: o.log10PhiStar[0]!,
      c: o.characteristic,
      a: o.alpha[0]!,
    }));
    const bands = rows.filter((r) => r.kind === 'band');
    expect(bands.length).toBeGreaterThan(20 * p.slices.length);
    // p16 is held at the bottom of the y axis: the whole decade at or below the lowest density
    // drawn (the log axis is niced to whole decades), so the band reaches the axis (it stopped at
    // the curve's lowest value before)
    const lowest = Math.min(...rows.filter((r) => r.kind === 'curve').map((r) => r.phi!));
    const floor = 10 ** Math.floor(Math.log10(lowest));
    expect(floor).toBeLessThanOrEqual(lowest);
    expect(floor).toBeGreaterThan(lowest / 10);
    expect(bands.some((r) => r.lo! < lowest)).toBe(true);
    for (const r of rows.filter((q) => q.kind === 'detected')) expect(r.floor).toBe(floor);
    for (const r of bands) {
      const s = p.slices[r.slice - 1]!;
      const z = 0.5 * (s.z_min + s.z_max);
      const values = offsets.map((o) => phi(r.x, z, o));
      expect(rel(r.hi!, pct(values, 0.84)), `p84 at ${r.x}`).toBeLessThan(1e-9);
      expect(rel(r.lo!, Math.max(pct(values, 0.16), floor)), `p16 at ${r.x}`).toBeLessThan(1e-9);
    }
    // the band holds the assumed curve where the draws scatter both ways (here: the faint end)
    const curve = rows.filter((r) => r.kind === 'curve' && r.slice === 1);
    const first = bands.find((b) => b.slice === 1 && b.x === curve[0]!.x)!;
    expect(first.lo).toBeLessThan(curve[0]!.phi!);
    expect(first.hi).toBeGreaterThan(curve[0]!.phi!);
  });
});

describe("the report: one sentence per slice table on the three sources of the total's uncertainty", () => {
  test('present, its numbers those of the JSON', () => {
    const survey = loadSurveyFile(join(DIR, 'uv-magnitude.yaml'));
    const p = predict(survey, { model: { draws: DRAWS } });
    const html = renderReport({
      surveyText: 'text',
      surveyTitle: p.title,
      prediction: predictionViews(survey, p).combined,
      figures: [],
    });
    const m = /<p class="sources" id="predict-table-sources">([^<]*)<\/p>/.exec(html);
    expect(m).not.toBeNull();
    const text = m![1]!;
    const parts =
      /^Of the total ([\d,.]+) ± ([\d,.]+), Poisson ([\d.]+)%, cosmic variance ([\d.]+)%, model ([\d.]+)%: (Poisson noise|cosmic variance|the model) dominates\.$/.exec(
        text,
      );
    expect(parts, text).not.toBeNull();
    const num = (s: string) => Number(s.replace(/,/g, ''));
    const t = p.totals;
    const u = t.uncertainty!;
    // four significant figures for the count, three for the 1σ, one decimal for the percentages
    expect(rel(num(parts![1]!), t.count)).toBeLessThan(5e-4);
    expect(rel(num(parts![2]!), t.count * u.total_fraction)).toBeLessThan(5e-3);
    expect(Math.abs(num(parts![3]!) - 100 * u.poisson_fraction)).toBeLessThanOrEqual(0.05 + 1e-12);
    expect(Math.abs(num(parts![4]!) - 100 * u.cosmic_variance_fraction)).toBeLessThanOrEqual(0.05 + 1e-12);
    expect(Math.abs(num(parts![5]!) - 100 * t.model!.fraction)).toBeLessThanOrEqual(0.05 + 1e-12);
    // the table of slices has the model's range per slice and for the total
    expect(html).toContain('model<br><span class="unit">p16–p84</span>');
    if (p.breakdown !== 'redshift') throw new Error('one population');
    expect(html).toContain(
      `<td>${formatNumber(p.slices[0]!.model!.p16, 3)}–${formatNumber(p.slices[0]!.model!.p84, 3)}</td>`,
    );
    const largest = Math.max(u.poisson_fraction, u.cosmic_variance_fraction, t.model!.fraction);
    const named = {
      'Poisson noise': u.poisson_fraction,
      'cosmic variance': u.cosmic_variance_fraction,
      'the model': t.model!.fraction,
    };
    expect(named[parts![6] as keyof typeof named]).toBe(largest);
  });

  test('without model_uncertainty, no sentence', () => {
    const survey = loadSurveyFile(join(DIR, 'uv-magnitude.yaml'));
    survey.populations[0]!.modelUncertainty = undefined;
    const p = predict(survey);
    const html = renderReport({
      surveyText: 'text',
      surveyTitle: p.title,
      prediction: predictionViews(survey, p).combined,
      figures: [],
    });
    expect(html).not.toContain('class="sources"');
    expect(html).not.toContain('p16–p84');
  });
});

describe('a log count axis over many decades: bars, error bars and bands stay on the plot', () => {
  // A GALEX-like FUV count (Wyder et al. 2005 function, from memory) over z = 0.001-0.5: the
  // slices' counts fall from 8.4 to 4e-14, so the axis keeps six decades and the last slices'
  // error bars and model bands lie wholly below its floor. Before, each band was drawn from the
  // floor down to its p84, hanging below the axis over the legend, and the note wrote the span
  // as 214000000000000.
  const text = `format: 1
title: GALEX-like FUV count
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.001, max: 0.5}
detection: {kind: magnitude, limit: 19.9, band: 1528, beta: -1.8}
population:
  variable: magnitude
  rest_wavelength: 1528
  phi_star: 4.07e-3
  m_star: -18.04
  alpha: -1.22
  model_uncertainty: {log10_phi_star: 0.06, m_star: 0.11, alpha: 0.07}
slices: {width: 0.05}
`;
  const survey = loadSurveyText(text, 'galex-fuv.yaml');
  const p = predict(survey, { model: { draws: DRAWS, seed: 1 } });
  if (p.breakdown !== 'redshift') throw new Error('one population');
  const view = predictionViews(survey, p, 1).combined;

  test('every drawn error bar and band lies within the axis (failed before: bands below the floor)', () => {
    const spec = countsSpec(view)!;
    const rows = (spec.data as { values: CountRow[] }).values;
    const axis = countsAxis(rows);
    if (!axis.log) throw new Error('a log axis');
    // the case at hand: some slices' whole band and error bar lie below the floor
    expect(
      p.slices.some((s) => s.model!.p84 < axis.floor && s.count * (1 + s.uncertainty!.total_fraction) < axis.floor),
    ).toBe(true);
    for (const r of rows) {
      for (const v of [r.low, r.high, r.model_p16, r.model_p50, r.model_p84]) {
        if (v !== undefined) expect(v).toBeGreaterThanOrEqual(axis.floor);
      }
      // what is drawn is predict's: a band's p84, an error bar's top (1e-12)
      const s = p.slices[r.slice - 1]!;
      if (r.model_p84 !== undefined) expect(rel(r.model_p84, s.model!.p84)).toBeLessThan(1e-12);
      if (r.high !== undefined) expect(rel(r.high, s.count * (1 + s.uncertainty!.total_fraction))).toBeLessThan(1e-12);
    }
    // the slices whose band reaches the floor keep it
    const kept = rows.filter((r) => r.model_p84 !== undefined).length;
    expect(kept).toBe(p.slices.filter((s) => s.model!.p84 >= axis.floor).length);
  });

  test('the span is written as a power of ten (failed before: 214000000000000)', async () => {
    expect(spanText(214)).toBe('214');
    expect(spanText(2.1437e14)).toBe('2.14 × 10¹⁴');
    expect(spanText(1e6)).toBe('10⁶');
    expect(spanText(9.9996e5)).toBe('10⁶');
    const figs = await drawFigures(survey, p, { modelSeed: 1 });
    const counts = figs.find((f) => f.name === 'counts')!;
    expect(counts.svg).toMatch(/span a factor of \d\.\d+ × 10¹⁴/);
    expect(counts.svg).not.toMatch(/factor of \d{7}/);
  });
});
