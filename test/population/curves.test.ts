/**
 * The luminosity function tabulated for the figures (src/population/curves.ts).
 * Expected values are the Schechter (1976, ApJ 203, 297) form written out by hand in closed form
 * at chosen points (per dex: ln10 phi* u^(alpha+1) e^-u with u = L/L*; per magnitude:
 * 0.4 ln10 phi* u^(alpha+1) e^-u with u = 10^(0.4 (M* - M))), plus the library's
 * schechterPerDex / schechterMagnitude on the whole grid. Tolerance: relative 1e-12.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/index.js';
import {
  luminosityFunctionBand,
  luminosityFunctionCurve,
  DEX_ABOVE_KNEE,
  DEX_BELOW_KNEE,
} from '../../src/population/curves.js';
import { populationAt } from '../../src/population/model.js';
import { drawModelOffsets } from '../../src/counts/model-draws.js';
import type { ModelOffsets } from '../../src/model/model-uncertainty.js';
import type { Population } from '../../src/model/population.js';
import { schechterMagnitude, schechterPerDex } from '../../src/population/schechter.js';

const REL = 1e-12;
const rel = (a: number, b: number) => Math.abs(a / b - 1);

/** phi at x, read off the grid (the point must be on it to 1e-9). */
function at(curve: { x: number[]; phi: number[] }, x: number): number {
  const i = curve.x.findIndex((v) => Math.abs(v - x) < 1e-9);
  if (i < 0) throw new Error(`x = ${x} is not on the grid`);
  return curve.phi[i]!;
}

const luminositySurvey = loadSurveyText(
  `format: 1
title: curve test, luminosity
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.5, max: 1.5}
detection: {kind: line_flux, limit: 1e-16, line: 6563}
population:
  variable: luminosity
  phi_star: "1.1e-3 * (1 + z)"
  log10_l_star: "42 + 0.5*z"
  alpha: -1.35
`,
  'curve-lum.yaml',
);

const magnitudeSurvey = loadSurveyText(
  `format: 1
title: curve test, magnitude
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 3, max: 5}
detection: {kind: magnitude, limit: 28, band: "1.5 um"}
population:
  variable: magnitude
  rest_wavelength: 1500
  phi_star: 2e-3
  m_star: "-21 + 0.2*(z - 4)"
  alpha: "-1.7 - 0.1*(z - 4)"
`,
  'curve-mag.yaml',
);

describe('per dex, luminosity variable (closed form)', () => {
  const z = 1;
  const phiStar = 2.2e-3; // 1.1e-3 (1 + z)
  const knee = 42.5; // 42 + 0.5 z
  const alpha = -1.35;
  const curve = luminosityFunctionCurve(luminositySurvey.populations[0]!, z, 41.3, { step: 0.05 });

  test('knee and limit are handed through', () => {
    expect(curve.knee).toBeCloseTo(knee, 12);
    expect(curve.limit).toBe(41.3);
    expect(curve.x_label).toBe('log₁₀ L [erg s⁻¹]');
  });

  test('at the knee phi = ln10 phi* / e (u = 1), rel 1e-12', () => {
    expect(rel(at(curve, knee), (Math.LN10 * phiStar) / Math.E)).toBeLessThan(REL);
  });

  test.each([-2, -1, 0.5, 1])('at log10 L = knee %+f: ln10 phi* u^(alpha+1) exp(-u), rel 1e-12', (d) => {
    const u = 10 ** d;
    const expected = Math.LN10 * phiStar * u ** (alpha + 1) * Math.exp(-u);
    expect(rel(at(curve, knee + d), expected)).toBeLessThan(REL);
  });

  test('every grid point equals schechterPerDex, ascending x, no non-finite value', () => {
    curve.x.forEach((x, i) => {
      expect(rel(curve.phi[i]!, schechterPerDex(x, phiStar, knee, alpha))).toBeLessThan(REL);
      if (i > 0) expect(x).toBeGreaterThan(curve.x[i - 1]!);
    });
    expect(curve.phi.every(Number.isFinite)).toBe(true);
  });

  test('the grid covers the knee and runs down past the limit', () => {
    expect(curve.x[0]).toBeLessThanOrEqual(Math.min(knee - DEX_BELOW_KNEE, curve.limit! - 0.5) + 1e-9);
    expect(curve.x[curve.x.length - 1]).toBeCloseTo(knee + DEX_ABOVE_KNEE, 9);
  });

  test('a limit 5 dex below the knee pulls the faint end past it', () => {
    const deep = luminosityFunctionCurve(luminositySurvey.populations[0]!, z, knee - 5);
    expect(deep.x[0]).toBeLessThan(knee - 5);
  });
});

describe('per magnitude, magnitude variable (closed form)', () => {
  const z = 5;
  const phiStar = 2e-3;
  const mStar = -20.8; // -21 + 0.2 (z - 4)
  const alpha = -1.8; // -1.7 - 0.1 (z - 4)
  const curve = luminosityFunctionCurve(magnitudeSurvey.populations[0]!, z, -18.3);

  test('knee is M* at z', () => {
    expect(curve.knee).toBeCloseTo(mStar, 12);
    expect(curve.x_label).toBe('absolute AB magnitude M [mag]');
  });

  test('at M = M*: 0.4 ln10 phi* / e, rel 1e-12', () => {
    // grid points are M* - 3 + k * 0.125 (default step): M* is on the grid
    expect(rel(at(curve, mStar), (0.4 * Math.LN10 * phiStar) / Math.E)).toBeLessThan(REL);
  });

  test.each([-2.5, -1, 2.5, 5])(
    'at M = M* %+f: 0.4 ln10 phi* u^(alpha+1) exp(-u), u = 10^(0.4 (M* - M)), rel 1e-12',
    (dm) => {
      const u = 10 ** (0.4 * -dm);
      const expected = 0.4 * Math.LN10 * phiStar * u ** (alpha + 1) * Math.exp(-u);
      expect(rel(at(curve, mStar + dm), expected)).toBeLessThan(REL);
    },
  );

  test('every grid point equals schechterMagnitude; the faint end is past the limit', () => {
    curve.x.forEach((x, i) =>
      expect(rel(curve.phi[i]!, schechterMagnitude(x, phiStar, mStar, alpha))).toBeLessThan(REL),
    );
    expect(curve.x[curve.x.length - 1]!).toBeGreaterThan(curve.limit!);
    expect(curve.x[0]!).toBeCloseTo(mStar - 2.5 * DEX_ABOVE_KNEE, 9);
  });
});

/**
 * The band written the plain way: for each draw, phi at every x from schechterPerDex /
 * schechterMagnitude with that draw's phi*_c 10^(d_phi_c), alpha_c + d_alpha_c and knee + d_c
 * summed over the components; per x the draws sorted and the 16th and 84th percentiles taken
 * linearly between order statistics (Hyndman & Fan 1996 type 7, numpy's default).
 */
function plainBand(
  p: Population,
  z: number,
  x: number[],
  offsets: readonly ModelOffsets[],
): { p16: number[]; p84: number[] } {
  const at = populationAt(p, z);
  const magnitude = p.variable === 'magnitude';
  const knee = magnitude ? at.characteristic : Math.log10(at.characteristic);
  const type7 = (s: number[], q: number) => {
    const h = (s.length - 1) * q;
    const lo = Math.floor(h);
    const hi = Math.min(lo + 1, s.length - 1);
    return s[lo]! + (h - lo) * (s[hi]! - s[lo]!);
  };
  const p16: number[] = [];
  const p84: number[] = [];
  for (const xi of x) {
    const phis = offsets.map((o) => {
      let v = 0;
      at.components.forEach((c, j) => {
        const phiStar = c.phiStar * 10 ** (o.log10PhiStar[j] ?? 0);
        const alpha = c.alpha + (o.alpha[j] ?? 0);
        const k = knee + o.characteristic;
        v += magnitude ? schechterMagnitude(xi, phiStar, k, alpha) : schechterPerDex(xi, phiStar, k, alpha);
      });
      return v;
    });
    phis.sort((a, b) => a - b);
    p16.push(type7(phis, 0.16));
    p84.push(type7(phis, 0.84));
  }
  return { p16, p84 };
}

describe("the band over the model's draws", () => {
  const doubleSurvey = loadSurveyText(
    `format: 1
title: curve test, band
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.2, max: 1.2}
detection: {kind: threshold, limit: 10.2}
population:
  variable: luminosity
  shape: double_schechter
  quantity: stellar mass [Msun]
  log10_l_star: "10.7 + 0.05*z"
  phi_star_1: 3.3e-3
  alpha_1: -0.55
  phi_star_2: 6.1e-4
  alpha_2: -1.52
  model_uncertainty:
    log10_phi_star_1: 0.07
    log10_phi_star_2: 0.11
    alpha_1: 0.1
    alpha_2: 0.09
    log10_l_star: 0.05
`,
    'curve-band-double.yaml',
  );
  const magnitudeBand = loadSurveyText(
    `format: 1
title: curve test, magnitude band
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 3, max: 5}
detection: {kind: magnitude, limit: 28, band: "1.5 um"}
population:
  variable: magnitude
  rest_wavelength: 1500
  phi_star: 1.7e-3
  m_star: "-20.9 + 0.2*(z - 4)"
  alpha: -1.83
  model_uncertainty: {log10_phi_star: 0.09, m_star: 0.15, alpha: 0.12, correlation: {m_star-alpha: 0.5}}
`,
    'curve-band-mag.yaml',
  );
  test.each([
    ['double Schechter, luminosity', doubleSurvey, 0.7, 10.2],
    ['single Schechter, magnitude', magnitudeBand, 4.2, -19.1],
  ] as const)('%s: p16 and p84 bit for bit those of the plain form (400 draws)', (_, survey, z, limit) => {
    const p = survey.populations[0]!;
    const offsets = drawModelOffsets(p.modelUncertainty!, p.components.length, 400, 7, 0);
    const curve = luminosityFunctionCurve(p, z, limit);
    const band = luminosityFunctionBand(p, z, curve.x, offsets);
    const plain = plainBand(p, z, curve.x, offsets);
    expect(band.draws).toBe(400);
    expect(band.p16).toEqual(plain.p16);
    expect(band.p84).toEqual(plain.p84);
    // the band spreads: p16 below p84 where phi is above underflow
    expect(band.p16.some((v, i) => v < band.p84[i]!)).toBe(true);
  });
});
