/**
 * Property tests (fast-check): random valid surveys load into finite Surveys whose slice edges
 * increase strictly and cover the window exactly.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { stringify } from 'yaml';
import { describeSurvey, loadSurveyText, parseSurveyObject } from '../../src/survey/index.js';

const finite = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

const areaArb = fc.oneof(
  finite(1e-4, 4e4),
  finite(1e-2, 1e5).map((a) => `${a} arcmin^2`),
  finite(1e-5, 12).map((a) => `${a} sr`),
);

const windowArb = fc.tuple(finite(0, 6), finite(1e-3, 4)).map(([min, d]) => ({ min, max: min + d }));

const slicesArb = (w: { min: number; max: number }) =>
  fc.oneof(
    fc.integer({ min: 1, max: 200 }).map((count) => ({ count })),
    // at most the loader's 1000 slices
    finite(Math.max(1e-3, (w.max - w.min) / 900), 2).map((width) => ({ width })),
    fc
      .uniqueArray(finite(w.min, w.max), { minLength: 2, maxLength: 12 })
      .map((a) => [...a].sort((x, y) => x - y))
      // slices at least 1e-6 wide in redshift (the loader's narrowest slice)
      .filter((a) => a.every((v, i) => i === 0 || v - a[i - 1]! >= 1e-6))
      .map((edges) => ({ edges })),
  );

const zparamArb = (lo: number, hi: number) =>
  fc.oneof(
    finite(lo, hi),
    fc.tuple(finite(lo, hi), finite(-0.05, 0.05)).map(([a, b]) => `${a} + ${b}*z`),
    fc.tuple(finite(lo, hi), finite(lo, hi)).map(([a, b]) => ({
      table: [
        [0, a],
        [8, b],
      ],
    })),
  );

const surveyArb = windowArb.chain((w) =>
  fc.record({
    kind: fc.constantFrom('line_flux', 'magnitude', 'threshold'),
    area: areaArb,
    slices: slicesArb(w),
    window: fc.constant(w),
    h0: finite(50, 90),
    // below 1 so that radiation (t_cmb 2.7255 K: omega_r ~ 1e-4) still fits in a flat universe
    omegaM: finite(0.1, 0.99),
    tCmb: fc.constantFrom(0, 2.7255),
    limit: finite(-19, -15),
    mag: finite(20, 30),
    alpha: zparamArb(-2.2, -0.5),
    logPhi: zparamArb(-5, -1),
    logL: zparamArb(40, 44),
    mStar: zparamArb(-23, -18),
  }),
);

// eslint-disable-next-line @typescript-eslint/no-explicit-any
function build(r: any): Record<string, unknown> {
  const base: Record<string, unknown> = {
    format: 1,
    title: 'random demo survey',
    cosmology: { h0: r.h0, omega_m: r.omegaM, t_cmb: r.tCmb },
    area: r.area,
    redshift: r.window,
    slices: r.slices,
  };
  if (r.kind === 'line_flux') {
    base.detection = { kind: 'line_flux', limit: 10 ** r.limit, line: 6563 };
    base.population = { variable: 'luminosity', log10_phi_star: r.logPhi, log10_l_star: r.logL, alpha: r.alpha };
  } else if (r.kind === 'magnitude') {
    base.detection = { kind: 'magnitude', limit: r.mag, band: '1.6 um' };
    base.population = { variable: 'magnitude', log10_phi_star: r.logPhi, m_star: r.mStar, alpha: r.alpha };
  } else {
    base.detection = { kind: 'threshold', limit: 10 };
    base.population = { variable: 'luminosity', log10_phi_star: r.logPhi, log10_l_star: r.logL, alpha: r.alpha };
  }
  return base;
}

function allFinite(v: unknown): boolean {
  if (typeof v === 'number') return Number.isFinite(v);
  if (Array.isArray(v)) return v.every(allFinite);
  if (v && typeof v === 'object') return Object.values(v).every(allFinite);
  return true;
}

describe('random valid surveys', () => {
  test('load into finite surveys with slices that cover the window exactly', () => {
    fc.assert(
      fc.property(surveyArb, (r) => {
        const obj = build(r);
        const s = loadSurveyText(stringify(obj), 'random.yaml');
        expect(allFinite(describeSurvey(s))).toBe(true);
        for (const z of [s.redshift.min, (s.redshift.min + s.redshift.max) / 2, s.redshift.max]) {
          const p = s.populations[0]!;
          expect(Number.isFinite(p.alpha.at(z)) && p.phiStar.at(z) > 0).toBe(true);
        }
        const e = s.sliceEdges;
        expect(e.length).toBeGreaterThanOrEqual(2);
        // each condition over every edge in one expect (the edges that break it listed)
        expect(
          e.filter((v, i) => i > 0 && !(v > e[i - 1]!)),
          'edges not above the previous',
        ).toEqual([]);
        expect(e[0]).toBe(s.redshift.min);
        expect(e[e.length - 1]).toBe(s.redshift.max);
        const sl = r.slices as { count?: number; width?: number; edges?: number[] };
        if (sl.count !== undefined) expect(e.length).toBe(sl.count + 1);
        if (sl.width !== undefined) {
          const w = sl.width;
          expect(
            e.filter((v, i) => i > 0 && i < e.length - 1 && !(Math.abs(v - e[i - 1]! - w) < 1e-9)),
            'slices narrower or wider than the width',
          ).toEqual([]);
          expect(e[e.length - 1]! - e[e.length - 2]!).toBeLessThanOrEqual(sl.width + 1e-9);
          expect(e[e.length - 1]! - e[e.length - 2]!).toBeGreaterThan(1e-9 - 1e-15);
        }
        if (sl.edges !== undefined) expect(e).toEqual(sl.edges);
        else expect(s.redshift).toEqual(r.window);
        expect(s.areaDeg2).toBeGreaterThan(0);
        expect(s.areaSr).toBeCloseTo(s.areaDeg2 * (Math.PI / 180) ** 2, 15);
      }),
      { numRuns: 300, seed: 20240601 },
    );
  });

  test('an area given in arcmin^2 equals the same area in deg^2 divided by 3600 (definition; relative 1e-14)', () => {
    fc.assert(
      fc.property(finite(1e-3, 4e4), (a) => {
        const base = build({
          kind: 'threshold',
          area: a,
          slices: { count: 2 },
          window: { min: 0.5, max: 1 },
          h0: 70,
          omegaM: 0.3,
          tCmb: 0,
          limit: 0,
          mag: 0,
          alpha: -1,
          logPhi: -3,
          logL: 42,
          mStar: -20,
        });
        const deg = parseSurveyObject(base, 'a.yaml').areaDeg2;
        const arc = parseSurveyObject({ ...base, area: `${a * 3600} arcmin^2` }, 'a.yaml').areaDeg2;
        expect(Math.abs(arc - deg) / deg).toBeLessThan(1e-14);
      }),
      { numRuns: 200, seed: 7 },
    );
  });
});
