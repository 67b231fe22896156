/**
 * Linear growth factor D(z) of matter fluctuations in flat Lambda-CDM.
 *
 * Method: the exact growing mode for pressureless matter plus a cosmological constant
 * (Heath 1977, MNRAS 179, 351):
 *
 *     D(a) ∝ E(a) ∫_0^a da' / (a' E(a'))^3,   E(a) = H(a)/H0 = sqrt(Om a^-3 + OL),
 *
 * normalised to D(z = 0) = 1. Radiation is ignored in the growth (its effect on D at z < 10
 * is below 1e-4): E uses only matter and Lambda with OL = 1 - Om, so the model stays flat.
 *
 * Numerics: 1/(a E)^3 = a^{3/2} / (Om + OL a^3)^{3/2}; with a = u^2 the integrand becomes
 * 2 u^4 / (Om + OL u^6)^{3/2}, a smooth function of u on [0, sqrt(a)] that a 32-point
 * Gauss-Legendre rule integrates to ~1e-15 relative (checked against the hypergeometric closed
 * form D ∝ a 2F1(1/3, 1; 11/6; -a^3 OL/Om) in test/uncertainty/growth.test.ts). No table needed:
 * one call costs ~32 flops-heavy evaluations (well under a microsecond).
 */
// the numerics' rule itself (not ./quadrature.js): the loader reaches this module for a bias given
// as {over_growth: B}, and the loader reaches no other module of the uncertainty
import { gaussLegendreRule } from '../numerics/quadrature.js';

const GROWTH_NODES = 32;
/** Growth factors a growth function keeps by redshift (all are dropped when this many are held). */
const GROWTH_KEPT = 4096;

/** Unnormalised growing mode g(a) = E(a) ∫_0^a da'/(a'E)^3 for matter density omegaM (flat). */
function growingMode(omegaM: number, a: number): number {
  const omegaL = 1 - omegaM;
  const { nodes: x, weights: w } = gaussLegendreRule(GROWTH_NODES);
  const uMax = Math.sqrt(a);
  const half = 0.5 * uMax;
  let s = 0;
  for (let i = 0; i < GROWTH_NODES; i++) {
    const u = half * (1 + x[i]!);
    const u2 = u * u;
    const u4 = u2 * u2;
    const den = omegaM + omegaL * u4 * u2;
    s += (w[i]! * 2 * u4) / (den * Math.sqrt(den));
  }
  const integral = s * half;
  const e = Math.sqrt(omegaM / (a * a * a) + omegaL);
  return e * integral;
}

/**
 * Linear growth factor D(z) normalised to D(0) = 1, flat Lambda-CDM with matter density
 * omegaM (0 < omegaM <= 1), radiation ignored. For omegaM = 1 it returns 1/(1+z) (to 1e-15).
 * Throws a RangeError for omegaM outside (0, 1] or z <= -1 / not finite.
 */
export function linearGrowth(omegaM: number, z: number): number {
  if (!(omegaM > 0 && omegaM <= 1)) throw new RangeError(`linearGrowth: omegaM must be in (0, 1], got ${omegaM}`);
  if (!(z > -1) || !Number.isFinite(z))
    throw new RangeError(`linearGrowth: z must be a finite number above -1, got ${z}`);
  return growingMode(omegaM, 1 / (1 + z)) / growingMode(omegaM, 1);
}

/**
 * A growth function bound to one matter density, with the z = 0 normalisation computed once.
 * Returns D(z) with D(0) = 1, kept by z.
 */
export function createGrowth(omegaM: number): (z: number) => number {
  if (!(omegaM > 0 && omegaM <= 1)) throw new RangeError(`createGrowth: omegaM must be in (0, 1], got ${omegaM}`);
  const norm = growingMode(omegaM, 1);
  // D by z (a prediction asks again at the same redshifts: a slice's box, the totals' nodes)
  const kept = new Map<number, number>();
  return (z: number): number => {
    const known = kept.get(z);
    if (known !== undefined) return known;
    if (!(z > -1) || !Number.isFinite(z)) throw new RangeError(`growth: z must be a finite number above -1, got ${z}`);
    const d = growingMode(omegaM, 1 / (1 + z)) / norm;
    if (kept.size >= GROWTH_KEPT) kept.clear();
    kept.set(z, d);
    return d;
  };
}

/**
 * Carroll, Press & Turner 1992 (ARA&A 30, 499, eq. 29) growth-suppression approximation,
 * g(Om, OL) = 2.5 Om / (Om^(4/7) - OL + (1 + Om/2)(1 + OL/70)), with D(z) ≈ g(z) / (g(0) (1+z))
 * using Om(z), OL(z). Exposed for comparison only; the exact integral above is what the code uses.
 */
export function carrollPressTurnerGrowth(omegaM: number, z: number): number {
  const g = (om: number, ol: number): number => (2.5 * om) / (om ** (4 / 7) - ol + (1 + om / 2) * (1 + ol / 70));
  const omegaL = 1 - omegaM;
  const a3 = (1 + z) ** 3;
  const e2 = omegaM * a3 + omegaL;
  const omz = (omegaM * a3) / e2;
  const olz = omegaL / e2;
  return g(omz, olz) / (g(omegaM, omegaL) * (1 + z));
}
