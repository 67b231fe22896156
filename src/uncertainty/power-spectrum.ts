/**
 * Linear matter power spectrum for flat Lambda-CDM.
 *
 *     P(k, z) = A k^n_s T(k)^2 D(z)^2          [k in 1/Mpc (not h/Mpc), P in Mpc^3]
 *
 * T(k): Eisenstein & Hu 1998 (ApJ 496, 605) fitting formulae,
 *   - 'no_wiggle' (default): the zero-baryon shape with the baryon suppression alpha_Gamma and
 *     the sound-horizon fit (their eqs. 26, 28-31);
 *   - 'full': CDM + baryon pieces with the acoustic oscillations (their eqs. 2-24).
 *   Where the paper's z_eq is used as 1 + z (eq. 2) we follow the authors' published code
 *   ("Really 1+z"): 1 + z_eq = 2.50e4 w_m Theta^-4, R(z) = 31.5 w_b Theta^-4 (1000 / (1 + z)).
 *   Theta = T_CMB / 2.7 K, with T_CMB = cosmology.tCmb, or 2.7255 K (T_CMB_DEFAULT_K,
 *   Fixsen 2009) when the cosmology's tCmb is 0 (no radiation in the background).
 * D(z): exact linear growth, src/uncertainty/growth.ts (Heath 1977), D(0) = 1.
 * A: fixed so that sigma(R = 8/h Mpc, z = 0) = sigma8 with the spherical top-hat window
 *   W(x) = 3 (sin x - x cos x) / x^3 (common practice):
 *
 *     sigma^2(R) = ∫ dln k  k^3 P(k) / (2 pi^2)  W(kR)^2.
 *
 * Integrals over k use 10-point Gauss-Legendre panels in ln k (width 0.5) up to the first zero
 * of W, then panels of width pi in x = kR out to x ≈ 80 (the neglected tail, ~ 9/(8 x^4) of the
 * local Delta^2, is < 1e-7 relative);
 * accuracy ~1e-7 relative, checked against scipy.integrate.quad (test/reference/power.json).
 * A cubic table of ln P(k, 0) in ln k (step 0.01, 1e-8 .. 1e6 per Mpc; interpolation error
 * < 1e-7 for the no-wiggle form, < 1e-5 for the full form) serves the fast paths. A spectrum is
 * built once per cosmology and form (see createLinearPower).
 */
import type { Cosmology } from '../model/cosmology.js';
import { GRAVITATIONAL_CONSTANT, MPC_M, SOLAR_MASS_KG, T_CMB_DEFAULT_K } from '../cosmology/constants.js';
import { createGrowth } from './growth.js';
import { lazyLagrangeCubicAt, lazyLagrangeCubics } from '../numerics/interpolate.js';
import { gaussLegendre } from './quadrature.js';
import { powerKey, storedShapeTable, type ShapeTable } from './stored-tables.js';

export type TransferForm = 'no_wiggle' | 'full';

export interface LinearPowerOptions {
  /** Transfer-function form; default 'no_wiggle'. */
  form?: TransferForm;
}

export interface LinearPower {
  readonly cosmology: Cosmology;
  readonly form: TransferForm;
  /** Dimensionless Hubble parameter h = H0 / (100 km/s/Mpc). */
  readonly h: number;
  /** Mean comoving matter density today, rho_m0 = omega_m rho_crit0, in Msun / Mpc^3. */
  readonly rhoM0MsunMpc3: number;
  /** The normalisation A in P = A k^n_s T^2 D^2 (Mpc^(3 + n_s)). */
  readonly amplitude: number;
  /** Transfer function T(k), k in 1/Mpc; T -> 1 as k -> 0. */
  transfer(kPerMpc: number): number;
  /** Linear growth factor D(z), D(0) = 1. */
  growth(z: number): number;
  /** Linear power P(k, z) in Mpc^3 (exact evaluation of the fit). */
  power(kPerMpc: number, z: number): number;
  /**
   * Fast P(k, z = 0) in Mpc^3 from the squared wavenumber k^2 (Mpc^-2), by cubic interpolation
   * of the ln P table; relative accuracy ~1e-7 (no-wiggle). For hot loops (window integrals).
   */
  powerZ0FromK2(this: void, k2: number): number;
  /** rms linear fluctuation in a sphere of comoving radius rMpc (top-hat window), at z. */
  sigmaR(rMpc: number, z: number): number;
  /** Comoving top-hat radius (Mpc) enclosing mass M (Msun) at the mean matter density. */
  radiusOfMassMpc(massMsun: number): number;
  /** sigma of the top-hat sphere enclosing mass M (Msun) at the mean density, at z. */
  sigmaM(massMsun: number, z: number): number;
}

/** Critical density today, rho_crit0 = 3 H0^2 / (8 pi G), in Msun / Mpc^3 (comoving = physical at z = 0). */
export function criticalDensityMsunMpc3(h0KmSMpc: number): number {
  const h0PerS = (h0KmSMpc * 1000) / MPC_M;
  const rhoKgM3 = (3 * h0PerS * h0PerS) / (8 * Math.PI * GRAVITATIONAL_CONSTANT);
  return (rhoKgM3 * MPC_M ** 3) / SOLAR_MASS_KG;
}

/** Parameters of the Eisenstein & Hu 1998 fit, derived once per cosmology. */
export interface EhParameters {
  h: number;
  omegaM: number;
  omegaB: number;
  theta: number; // T_CMB / 2.7 K
  wm: number; // omega_m h^2
  wb: number; // omega_b h^2
  fb: number; // omega_b / omega_m
}

export function eisensteinHuParameters(c: Cosmology): EhParameters {
  const h = c.h0 / 100;
  const tCmb = c.tCmb > 0 ? c.tCmb : T_CMB_DEFAULT_K;
  return {
    h,
    omegaM: c.omegaM,
    omegaB: c.omegaB,
    theta: tCmb / 2.7,
    wm: c.omegaM * h * h,
    wb: c.omegaB * h * h,
    fb: c.omegaB / c.omegaM,
  };
}

/**
 * Eisenstein & Hu 1998 no-wiggle transfer function (eqs. 26, 28-31), k in 1/Mpc:
 *   s = 44.5 ln(9.83 / w_m) / sqrt(1 + 10 w_b^(3/4)) Mpc                         (26)
 *   alpha_G = 1 - 0.328 ln(431 w_m) f_b + 0.38 ln(22.3 w_m) f_b^2                 (31)
 *   Gamma_eff = Om h (alpha_G + (1 - alpha_G) / (1 + (0.43 k s)^4))              (30)
 *   q = (k / h Mpc^-1) Theta^2 / Gamma_eff                                         (28)
 *   T = L0 / (L0 + C0 q^2), L0 = ln(2e + 1.8 q), C0 = 14.2 + 731 / (1 + 62.5 q)   (29)
 */
export function eisensteinHuNoWiggle(p: EhParameters): (kPerMpc: number) => number {
  const s = (44.5 * Math.log(9.83 / p.wm)) / Math.sqrt(1 + 10 * p.wb ** 0.75);
  const alphaG = 1 - 0.328 * Math.log(431 * p.wm) * p.fb + 0.38 * Math.log(22.3 * p.wm) * p.fb * p.fb;
  const omh = p.omegaM * p.h;
  const t2 = p.theta * p.theta;
  return (k: number): number => {
    if (k <= 0) return 1;
    const ks = 0.43 * k * s;
    const ks2 = ks * ks;
    const gammaEff = omh * (alphaG + (1 - alphaG) / (1 + ks2 * ks2));
    const q = ((k / p.h) * t2) / gammaEff;
    const l0 = Math.log(2 * Math.E + 1.8 * q);
    const c0 = 14.2 + 731 / (1 + 62.5 * q);
    return l0 / (l0 + c0 * q * q);
  };
}

/**
 * Eisenstein & Hu 1998 full transfer function with baryon acoustic oscillations
 * (eqs. 2-24), k in 1/Mpc: T = f_b T_b + f_c T_c (16), with the CDM piece T_c (17-20) and the
 * baryon piece T_b (21-24); parameters z_eq, k_eq, z_d, R, s, k_silk, alpha_c, beta_c, alpha_b,
 * beta_b, beta_node from eqs. 2-15, 23, 24.
 */
export function eisensteinHuFull(p: EhParameters): (kPerMpc: number) => number {
  const { wm, wb, fb, theta } = p;
  const th2 = theta * theta;
  const th4 = th2 * th2;
  const fc = 1 - fb;
  const onePlusZeq = (2.5e4 * wm) / th4; // (2), "really 1 + z" in the authors' code
  const kEq = (7.46e-2 * wm) / th2; // (3), 1/Mpc
  const b1d = 0.313 * wm ** -0.419 * (1 + 0.607 * wm ** 0.674);
  const b2d = 0.238 * wm ** 0.223;
  const zd = ((1291 * wm ** 0.251) / (1 + 0.659 * wm ** 0.828)) * (1 + b1d * wb ** b2d); // (4)
  const rOf = (onePlusZ: number): number => ((31.5 * wb) / th4) * (1000 / onePlusZ); // (5)
  const rd = rOf(1 + zd);
  const req = rOf(onePlusZeq);
  const s =
    (2 / (3 * kEq)) * Math.sqrt(6 / req) * Math.log((Math.sqrt(1 + rd) + Math.sqrt(rd + req)) / (1 + Math.sqrt(req))); // (6), Mpc
  const kSilk = 1.6 * wb ** 0.52 * wm ** 0.73 * (1 + (10.4 * wm) ** -0.95); // (7)
  const a1 = (46.9 * wm) ** 0.67 * (1 + (32.1 * wm) ** -0.532);
  const a2 = (12.0 * wm) ** 0.424 * (1 + (45.0 * wm) ** -0.582);
  const alphaC = a1 ** -fb * a2 ** -(fb * fb * fb); // (11)
  const bb1 = 0.944 / (1 + (458 * wm) ** -0.708);
  const bb2 = (0.395 * wm) ** -0.0266;
  const betaC = 1 / (1 + bb1 * (fc ** bb2 - 1)); // (12)
  const y = onePlusZeq / (1 + zd);
  const sy = Math.sqrt(1 + y);
  const gy = y * (-6 * sy + (2 + 3 * y) * Math.log((sy + 1) / (sy - 1))); // (15)
  const alphaB = 2.07 * kEq * s * (1 + rd) ** -0.75 * gy; // (14)
  const betaNode = 8.41 * wm ** 0.435; // (23)
  const betaB = 0.5 + fb + (3 - 2 * fb) * Math.sqrt((17.2 * wm) ** 2 + 1); // (24)
  const tTilde = (q: number, lnArg: number, alpha: number): number => {
    // (19)-(20): ln(e + 1.8 beta q) / (ln(e + 1.8 beta q) + C q^2), C = 14.2/alpha + 386/(1 + 69.9 q^1.08)
    const c = 14.2 / alpha + 386 / (1 + 69.9 * q ** 1.08);
    return lnArg / (lnArg + c * q * q);
  };
  return (k: number): number => {
    if (k <= 0) return 1;
    const q = k / (13.41 * kEq); // (10)
    const ks = k * s;
    const f = 1 / (1 + (ks / 5.4) ** 4); // (18)
    const lnBeta = Math.log(Math.E + 1.8 * betaC * q);
    const tc = f * tTilde(q, lnBeta, 1) + (1 - f) * tTilde(q, lnBeta, alphaC); // (17)
    const sTilde = s / Math.cbrt(1 + (betaNode / ks) ** 3); // (22)
    const x = k * sTilde;
    const j0 = Math.abs(x) < 1e-4 ? 1 - (x * x) / 6 : Math.sin(x) / x;
    const tb =
      (tTilde(q, Math.log(Math.E + 1.8 * q), 1) / (1 + (ks / 5.2) ** 2) +
        (alphaB / (1 + (betaB / ks) ** 3)) * Math.exp(-((k / kSilk) ** 1.4))) *
      j0; // (21)
    return fb * tb + fc * tc; // (16)
  };
}

/** Spherical top-hat window in Fourier space, W(x) = 3 (sin x - x cos x) / x^3. */
export function topHatWindow(x: number): number {
  if (x < 1e-2) {
    const x2 = x * x;
    return 1 - x2 / 10 + (x2 * x2) / 280;
  }
  return (3 * (Math.sin(x) - x * Math.cos(x))) / (x * x * x);
}

const LNK_MIN = Math.log(1e-8);
const LNK_MAX = Math.log(1e6);
const LNK_STEP = 0.01;
const FIRST_ZERO_TOPHAT = 4.493409457909064; // first positive root of tan x = x

/**
 * sigma^2(R) for a spectrum given as a function of k (z = 0 shape, any normalisation):
 * ∫ dln k k^3 P / (2 pi^2) W(kR)^2 by Gauss-Legendre panels (see the module comment).
 */
export function sigmaSquaredTopHat(powerOfK: (k: number) => number, rMpc: number): number {
  const { x: gx, w: gw } = gaussLegendre(10);
  const n = gx.length;
  let total = 0;
  // Part 1: ln k from kLo to the first zero of W, panels of width <= 0.5.
  const kLo = Math.min(1e-6, 1e-3 / rMpc);
  const lnA = Math.log(kLo);
  const lnB = Math.log(FIRST_ZERO_TOPHAT / rMpc);
  const nPanels = Math.max(1, Math.ceil((lnB - lnA) / 0.5));
  const width = (lnB - lnA) / nPanels;
  for (let j = 0; j < nPanels; j++) {
    const c = lnA + (j + 0.5) * width;
    let s = 0;
    for (let i = 0; i < n; i++) {
      const k = Math.exp(c + 0.5 * width * gx[i]!);
      const wv = topHatWindow(k * rMpc);
      s += gw[i]! * k * k * k * powerOfK(k) * wv * wv;
    }
    total += 0.5 * width * s;
  }
  // Part 2: x = kR from the first zero in panels of width pi to x ≈ 80 (dln k = dx / x).
  for (let j = 0; j < 24; j++) {
    const xa = FIRST_ZERO_TOPHAT + j * Math.PI;
    const c = xa + 0.5 * Math.PI;
    let s = 0;
    for (let i = 0; i < n; i++) {
      const x = c + 0.5 * Math.PI * gx[i]!;
      const k = x / rMpc;
      const wv = topHatWindow(x);
      s += (gw[i]! * k * k * k * powerOfK(k) * wv * wv) / x;
    }
    total += 0.5 * Math.PI * s;
  }
  return total / (2 * Math.PI * Math.PI);
}

/** Spectra already built, by form and the parameters they depend on (most recent last). */
const powerCache = new Map<string, LinearPower>();
const POWER_CACHE_SIZE = 8;

/**
 * The linear power spectrum of one cosmology, as the cosmology factory made it
 * (src/cosmology/parameters.ts: every parameter inside the fit's domain).
 * Built once per cosmology: a second call with the same parameters (h0, omegaM, omegaB, sigma8,
 * nS, tCmb) and form returns the same object, with its tables (ln P here, sigma(M) and the halo
 * abundances in haloes.ts) already made. The last few cosmologies are kept.
 */
export function createLinearPower(cosmology: Cosmology, options: LinearPowerOptions = {}): LinearPower {
  const key = powerKey(cosmology, options.form ?? 'no_wiggle');
  const cached = powerCache.get(key);
  if (cached) {
    powerCache.delete(key);
    powerCache.set(key, cached);
    return cached;
  }
  const built = buildLinearPower(cosmology, options, key);
  powerCache.set(key, built);
  if (powerCache.size > POWER_CACHE_SIZE) powerCache.delete(powerCache.keys().next().value!);
  return built;
}

/**
 * The unnormalised shape table of one spectrum: ln(k^n_s T^2) on the uniform ln k grid, and
 * sigma(8/h Mpc) of that shape (the normalisation divides it out). What createLinearPower makes
 * for a cosmology it has no stored table of (stored-tables.ts).
 */
export function computeShapeTable(cosmology: Cosmology, form: TransferForm): ShapeTable {
  const p = eisensteinHuParameters(cosmology);
  const transfer = form === 'full' ? eisensteinHuFull(p) : eisensteinHuNoWiggle(p);
  const nS = cosmology.nS;
  const nTab = Math.round((LNK_MAX - LNK_MIN) / LNK_STEP) + 1;
  const lnShape = new Float64Array(nTab);
  for (let i = 0; i < nTab; i++) {
    const lnk = LNK_MIN + i * LNK_STEP;
    const t = transfer(Math.exp(lnk));
    lnShape[i] = nS * lnk + 2 * Math.log(t);
  }
  const lnShapeAt = shapeInterpolator(lnShape);
  const shapeOfK = (k: number): number => Math.exp(lnShapeAt(Math.log(k)));
  return { lnShape, sigma8Unnormalised: Math.sqrt(sigmaSquaredTopHat(shapeOfK, 8 / p.h)) };
}

/**
 * ln of the unnormalised shape at ln k from its table: the 4-point Lagrange cubic through nodes
 * i-1 .. i+2; linear extrapolation beyond the table.
 */
function shapeInterpolator(lnShape: Float64Array): (lnk: number) => number {
  const nTab = lnShape.length;
  const slopeHi = (lnShape[nTab - 1]! - lnShape[nTab - 2]!) / LNK_STEP;
  const slopeLo = (lnShape[1]! - lnShape[0]!) / LNK_STEP;
  // The 4-point Lagrange cubic through nodes i-1 .. i+2, as a polynomial in u = t - i, made when
  // first read (a prediction reads about 1,200 of the 3,225 nodes).
  const coef = lazyLagrangeCubics(lnShape);
  return (lnk: number): number => {
    const t = (lnk - LNK_MIN) / LNK_STEP;
    if (t < 0) return lnShape[0]! + slopeLo * (lnk - LNK_MIN);
    if (t > nTab - 1) return lnShape[nTab - 1]! + slopeHi * (lnk - LNK_MAX);
    let i = Math.floor(t);
    if (i < 1) i = 1;
    if (i > nTab - 3) i = nTab - 3;
    return lazyLagrangeCubicAt(coef, i, t - i);
  };
}

/**
 * A spectrum made afresh, without the stored tables and outside the cache (what the stored tables
 * are made from and checked against).
 */
export function computeLinearPower(cosmology: Cosmology, options: LinearPowerOptions = {}): LinearPower {
  return buildLinearPower(cosmology, options, undefined);
}

/** The spectrum; `key` (powerKey) names its stored tables, undefined to make them here. */
function buildLinearPower(cosmology: Cosmology, options: LinearPowerOptions, key: string | undefined): LinearPower {
  const form: TransferForm = options.form ?? 'no_wiggle';
  const c = cosmology;
  if (form !== 'no_wiggle' && form !== 'full') throw new RangeError(`createLinearPower: unknown form ${String(form)}`);

  const p = eisensteinHuParameters(c);
  const transfer = form === 'full' ? eisensteinHuFull(p) : eisensteinHuNoWiggle(p);
  const nS = c.nS;
  const growth = createGrowth(c.omegaM);

  // The table of ln(k^n_s T^2) on a uniform ln k grid (unnormalised) and its sigma(8/h Mpc):
  // stored for the common cosmologies (the same numbers, made by the same code), else made here.
  const { lnShape, sigma8Unnormalised } =
    (key !== undefined ? storedShapeTable(key) : undefined) ?? computeShapeTable(c, form);
  const lnShapeAt = shapeInterpolator(lnShape);
  const amplitude = (c.sigma8 / sigma8Unnormalised) ** 2;
  const lnAmp = Math.log(amplitude);

  const powerZ0 = (k: number): number => Math.exp(lnAmp + lnShapeAt(Math.log(k)));
  const rhoM0 = c.omegaM * criticalDensityMsunMpc3(c.h0);

  const checkZ = (z: number, who: string): void => {
    if (!(z > -1) || !Number.isFinite(z)) throw new RangeError(`${who}: z must be a finite number above -1, got ${z}`);
  };

  const lp: LinearPower = {
    cosmology: c,
    form,
    h: p.h,
    rhoM0MsunMpc3: rhoM0,
    amplitude,
    transfer,
    growth,
    power(kPerMpc: number, z: number): number {
      checkZ(z, 'power');
      if (!(kPerMpc >= 0) || !Number.isFinite(kPerMpc))
        throw new RangeError(`power: k must be finite and >= 0, got ${kPerMpc}`);
      if (kPerMpc === 0) return 0;
      const d = growth(z);
      const t = transfer(kPerMpc);
      return amplitude * kPerMpc ** nS * t * t * d * d;
    },
    powerZ0FromK2(k2: number): number {
      return Math.exp(lnAmp + lnShapeAt(0.5 * Math.log(k2)));
    },
    sigmaR(rMpc: number, z: number): number {
      checkZ(z, 'sigmaR');
      if (!(rMpc > 0) || !Number.isFinite(rMpc))
        throw new RangeError(`sigmaR: radius must be positive and finite, got ${rMpc}`);
      return Math.sqrt(sigmaSquaredTopHat(powerZ0, rMpc)) * growth(z);
    },
    radiusOfMassMpc(massMsun: number): number {
      if (!(massMsun > 0) || !Number.isFinite(massMsun))
        throw new RangeError(`radiusOfMassMpc: mass must be positive and finite, got ${massMsun}`);
      return Math.cbrt((3 * massMsun) / (4 * Math.PI * rhoM0));
    },
    sigmaM(massMsun: number, z: number): number {
      return lp.sigmaR(lp.radiusOfMassMpc(massMsun), z);
    },
  };
  return lp;
}
