/**
 * The noise depth law (plan.depth_law.noise, src/planning/depth.ts).
 *
 * Reference: test/reference/selection.json, case plans[0] (plan-noise-depth.yaml), written by the
 * committed generator test/reference/generate/selection.py (semantics 8 of its header): the flux
 * ratio from the closed-form root evaluated with mpmath at 30 digits, and the counts at each limit
 * integrated independently (astropy, mpmath, scipy quad at epsrel 1e-10). Tolerances: limits 1e-12
 * mag (closed form in double precision), counts 1e-6 relative (the engine's quadrature against
 * epsrel 1e-10; counts.json tests hold 1e-5).
 * Limits of the law (from its definition): r_s = r_r = 0 gives the source law to rounding (1e-13);
 * r_s -> infinity with r_r = 0 tends to the background law (x tau^1/2 - 1 = O(1 / r_s), expanding the root).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { readPlanSection } from '../../src/survey/plan-section.js';
import { frameCount, makeDepthModel, noiseFluxRatio } from '../../src/planning/depth.js';
import { surveyAtLimit } from '../../src/planning/model.js';
import { predict } from '../../src/counts/predict.js';
import { plan } from '../../src/library/plan.js';
import { SurveyError } from '../../src/errors.js';

interface DepthRow {
  exposure_hours: number;
  frames: number;
  flux_ratio: number;
  limit: number;
  source_law_limit: number;
  background_law_limit: number;
  slices: number[];
  total: number;
}
interface PlanCase {
  file: string;
  yaml: string;
  reference: { limit: number; exposure_hours: number; frames: number };
  noise: { sky_to_source: number; read_to_source: number; frame_hours: number };
  depth: DepthRow[];
}
const fixture = JSON.parse(readFileSync(new URL('../reference/selection.json', import.meta.url), 'utf8')) as {
  plans: PlanCase[];
};
const c = fixture.plans[0]!;
const survey = loadSurveyText(c.yaml, c.file);
const spec = readPlanSection(survey, survey.populations[0]!);
const depth = makeDepthModel(spec.limitKind, spec.depthLaw);
const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('noise law against selection.json (plan-noise-depth.yaml)', () => {
  test('the plan section reads as the reference states it', () => {
    expect(spec.depthLaw).toEqual({
      kind: 'noise',
      referenceLimit: 25.5,
      referenceHours: 1,
      skyToSource: 4,
      readToSource: 0.3,
      frameHours: 0.5,
    });
    expect(frameCount(c.reference.exposure_hours, c.noise.frame_hours)).toBe(c.reference.frames);
  });
  test.each(c.depth.map((r) => [r.exposure_hours, r] as const))(
    '%s h: frames, flux ratio and limit (1e-12)',
    (hours, r) => {
      expect(frameCount(hours, c.noise.frame_hours)).toBe(r.frames);
      expect(
        rel(noiseFluxRatio(hours / c.reference.exposure_hours, r.frames / c.reference.frames, 4, 0.3), r.flux_ratio),
      ).toBeLessThan(1e-13);
      expect(Math.abs(depth.limitAt(hours) - r.limit)).toBeLessThan(1e-12);
    },
  );
  test.each(c.depth.filter((_, i) => i % 3 === 0).map((r) => [r.exposure_hours, r] as const))(
    '%s h: counts per slice at that limit (1e-6 relative)',
    (_h, r) => {
      const p = predict(surveyAtLimit(survey, r.limit));
      if (p.breakdown !== 'redshift') throw new Error('one population: redshift breakdown expected');
      p.slices.forEach((s, i) => expect(rel(s.count, r.slices[i]!), `slice ${i}`).toBeLessThan(1e-6));
      expect(rel(p.totals.count, r.total)).toBeLessThan(1e-6);
    },
  );
  test('hoursFor gives the shortest exposure reaching a limit (1e-12), also across a frame boundary', () => {
    for (const r of c.depth) expect(rel(depth.hoursFor(r.limit), r.exposure_hours)).toBeLessThan(1e-12);
    // Just past two frames (1.0 h) the third frame's read noise makes the limit slightly shallower than at 1.0 h.
    expect(depth.limitAt(1.0001)).toBeLessThan(depth.limitAt(1.0));
    const justShallower = depth.limitAt(1.0) - 1e-6;
    expect(depth.hoursFor(justShallower)).toBeLessThan(1.0);
    const range = depth.depthRange(0.6, 1.3);
    expect(range.deepest).toBe(Math.max(depth.depthAt(1.0), depth.depthAt(1.3)));
    expect(range.shallowest).toBeLessThanOrEqual(depth.depthAt(0.6));
  });
});

describe('limits of the noise law (from its definition)', () => {
  const taus = [0.05, 0.37, 1, 2.7, 20];
  test('no sky and no read noise is the source law exactly (1e-13)', () => {
    for (const t of taus) expect(Math.abs(noiseFluxRatio(t, 3, 0, 0) * t - 1)).toBeLessThan(1e-13);
    const src = makeDepthModel('magnitude', { kind: 'source', referenceLimit: 25.5, referenceHours: 1 });
    const noise = makeDepthModel('magnitude', {
      kind: 'noise',
      referenceLimit: 25.5,
      referenceHours: 1,
      skyToSource: 0,
      readToSource: 0,
      frameHours: 0.5,
    });
    for (const t of taus) expect(Math.abs(noise.limitAt(t) - src.limitAt(t))).toBeLessThan(1e-12);
  });
  test('sky-dominated noise tends to the background law: the ratio departs from it as 1 / r_s', () => {
    for (const t of taus) {
      const dev = (rs: number) => Math.abs(noiseFluxRatio(t, 1, rs, 0) / t ** -0.5 - 1);
      expect(dev(1e12)).toBeLessThan(1e-5);
      // Each hundredfold rise of r_s cuts the departure about a hundredfold (t = 1 has none at all).
      if (t !== 1) expect(dev(1e8) / dev(1e6)).toBeCloseTo(0.01, 4);
    }
    const bg = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 5e-17, referenceHours: 2 });
    const noise = makeDepthModel('line_flux', {
      kind: 'noise',
      referenceLimit: 5e-17,
      referenceHours: 2,
      skyToSource: 1e12,
      readToSource: 0,
      frameHours: 100,
    });
    for (const t of taus) expect(rel(noise.limitAt(t), bg.limitAt(t))).toBeLessThan(1e-5);
  });
});

describe('the plan with the noise law', () => {
  test('runs, states the law, and its best design lies between the two power laws in depth', async () => {
    const bg = makeDepthModel('magnitude', { kind: 'background', referenceLimit: 25.5, referenceHours: 1 });
    const src = makeDepthModel('magnitude', { kind: 'source', referenceLimit: 25.5, referenceHours: 1 });
    const p = await plan(survey, { workers: 1 });
    expect(p.depth_law).toEqual({
      kind: 'noise',
      reference_limit: 25.5,
      reference_exposure_hours: 1,
      sky_to_source: 4,
      read_to_source: 0.3,
      frame_hours: 0.5,
      reference_frames: 2,
    });
    const t = p.best.exposure_hours_per_pointing;
    expect(Math.abs(p.best.limit - depth.limitAt(t))).toBeLessThan(1e-9);
    const [lo, hi] = [bg.limitAt(t), src.limitAt(t)].sort((a, b) => a - b);
    expect(p.best.limit).toBeGreaterThan(lo!);
    expect(p.best.limit).toBeLessThan(hi!);
  }, 120_000);
  test.each([
    ['sky_to_source missing', '{noise: {read_to_source: 0.3, frame_hours: 0.5}}', 'plan.depth_law.noise.sky_to_source'],
    [
      'read noise without frames',
      '{noise: {sky_to_source: 4, read_to_source: 0.3}}',
      'plan.depth_law.noise.frame_hours',
    ],
    ['a negative ratio', '{noise: {sky_to_source: -1}}', 'plan.depth_law.noise.sky_to_source'],
    ['an unknown key', '{noise: {sky_to_source: 4, dark_to_source: 1}}', 'plan.depth_law.noise.dark_to_source'],
    [
      'too many frames',
      '{noise: {sky_to_source: 4, read_to_source: 0.1, frame_hours: 0.00001}}',
      'plan.depth_law.noise.frame_hours',
    ],
  ])('refuses %s', (_what, law, key) => {
    const s = loadSurveyText(c.yaml.replace(/depth_law: .*\n/, `depth_law: ${law}\n`), c.file);
    let err: unknown;
    try {
      readPlanSection(s, s.populations[0]!);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    expect((err as SurveyError).message).toContain(key);
  });
});
