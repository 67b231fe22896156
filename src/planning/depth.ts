/**
 * Depth reached in an exposure of t hours per pointing (the plan's depth law), in the survey's
 * limit kind: an apparent AB magnitude (magnitude kind) or a line flux in erg s^-1 cm^-2
 * (line_flux kind).
 *
 * - background: background-limited imaging, signal-to-noise ~ F sqrt(t), so the flux limit
 *   scales as t^-1/2 and a magnitude limit deepens by 1.25 log10(t / t_ref) (common practice).
 * - source: source-limited, signal-to-noise ~ sqrt(F t), so the flux limit scales as t^-1 and a
 *   magnitude limit deepens by 2.5 log10(t / t_ref) (common practice).
 * - table: [[hours, limit], ...] interpolated linearly in log10(hours): linear in the limit for
 *   magnitudes, linear in log10(flux) for line fluxes. Exposures outside the table are refused
 *   when the plan is read (no extrapolation).
 *
 * - noise: a noise budget between the two (see noiseFluxRatio): at the reference limit F0 and
 *   exposure t0 the variance splits source : sky : read = 1 : r_s : r_r, the read noise that of the
 *   reference's n0 frames. At exposure t, of n(t) = max(1, ceil(t / t_frame)) frames, the flux with
 *   the reference's signal-to-noise is F = x F0 with (tau = t / t0, K = 1 + r_s + r_r)
 *     S/N^2 ~ (x tau)^2 / (x tau + r_s tau + r_r n / n0) = 1 / K  (the reference's, x = tau = 1).
 *   r_s = r_r = 0 is the source law exactly; r_s -> infinity with r_r = 0 tends to the background law.
 *   Whole frames make the depth a saw-tooth in t (each new frame adds read noise): rising inside a
 *   frame, dropping a little where one more frame starts.
 *
 * Everything works on a "depth" d, the limit in a variable that grows as the survey goes deeper:
 * d = magnitude, or d = -log10(flux). Then d(t) = d_ref + k log10(t / t_ref) for the two power
 * laws, with k = 1.25 | 2.5 (magnitude) or 0.5 | 1 (line flux, dex).
 */

import { MAX_NOISE_FRAMES, depthOfLimit, type DepthLaw, type LimitKind } from '../model/plan.js';

export { depthOfLimit, type DepthLaw, type LimitKind };

export interface DepthModel {
  limitKind: LimitKind;
  law: DepthLaw;
  /** Limit (magnitude or erg/s/cm^2) after `hours` per pointing. */
  limitAt(hours: number): number;
  /** Depth d = magnitude or -log10 flux after `hours`. */
  depthAt(hours: number): number;
  /** Exposure (hours) that reaches `limit` (inverse of limitAt; for the noise law the shortest such exposure). */
  hoursFor(limit: number): number;
  /** The shallowest and deepest depth over exposures in [h0, h1] (the ends, except for the noise law's saw-tooth). */
  depthRange(h0: number, h1: number): { shallowest: number; deepest: number };
}

/** Whole frames of an exposure of `hours` (at least one; a hair's tolerance so that 1.0 / 0.5 is 2 frames). */
export function frameCount(hours: number, frameHours: number): number {
  return Math.max(1, Math.ceil(hours / frameHours - 1e-9));
}

/**
 * x = F / F0, the flux with the reference's signal-to-noise after tau = t / t0 of the reference exposure
 * with nRatio = n / n0 of its frames: the positive root of K tau^2 x^2 = x tau + r_s tau + r_r nRatio,
 *   x = [tau + sqrt(tau^2 + 4 K tau^2 (r_s tau + r_r nRatio))] / (2 K tau^2),  K = 1 + r_s + r_r.
 */
export function noiseFluxRatio(tau: number, nRatio: number, skyToSource: number, readToSource: number): number {
  const k = 1 + skyToSource + readToSource;
  const t2 = tau * tau;
  return (tau + Math.sqrt(t2 + 4 * k * t2 * (skyToSource * tau + readToSource * nRatio))) / (2 * k * t2);
}

/** The inverse at a fixed number of frames: tau reaching the flux ratio x (the positive root of the same quadratic in tau). */
function noiseTau(x: number, nRatio: number, skyToSource: number, readToSource: number): number {
  const k = 1 + skyToSource + readToSource;
  const b = x + skyToSource;
  return (b + Math.sqrt(b * b + 4 * k * x * x * readToSource * nRatio)) / (2 * k * x * x);
}

/** Depth d -> limit. */
export function limitOfDepth(kind: LimitKind, d: number): number {
  return kind === 'magnitude' ? d : 10 ** -d;
}

/** Depth per decade of exposure time: 1.25 / 2.5 mag (magnitude) or 0.5 / 1 dex (line flux). */
export function depthPerDecade(kind: LimitKind, law: 'background' | 'source'): number {
  const perDex = law === 'background' ? 0.5 : 1;
  return kind === 'magnitude' ? 2.5 * perDex : perDex;
}

export function makeDepthModel(limitKind: LimitKind, law: DepthLaw): DepthModel {
  if (law.kind === 'table') {
    const lx = law.hours.map(Math.log10);
    const ld = law.limits.map((v) => depthOfLimit(limitKind, v));
    const depthAt = (hours: number): number => {
      const x = Math.log10(hours);
      const n = lx.length;
      if (x <= lx[0]!) return ld[0]!;
      if (x >= lx[n - 1]!) return ld[n - 1]!;
      let i = 0;
      while (i < n - 2 && x > lx[i + 1]!) i++;
      const f = (x - lx[i]!) / (lx[i + 1]! - lx[i]!);
      return ld[i]! + f * (ld[i + 1]! - ld[i]!);
    };
    const hoursFor = (limit: number): number => {
      const d = depthOfLimit(limitKind, limit);
      const n = ld.length;
      if (d <= ld[0]!) return law.hours[0]!;
      if (d >= ld[n - 1]!) return law.hours[n - 1]!;
      let i = 0;
      while (i < n - 2 && d > ld[i + 1]!) i++;
      const f = (d - ld[i]!) / (ld[i + 1]! - ld[i]!);
      return 10 ** (lx[i]! + f * (lx[i + 1]! - lx[i]!));
    };
    return {
      limitKind,
      law,
      depthAt,
      limitAt: (h) => limitOfDepth(limitKind, depthAt(h)),
      hoursFor,
      depthRange: (h0, h1) => ({ shallowest: depthAt(h0), deepest: depthAt(h1) }),
    };
  }
  if (law.kind === 'noise') return noiseDepthModel(limitKind, law);
  const k = depthPerDecade(limitKind, law.kind);
  const d0 = depthOfLimit(limitKind, law.referenceLimit);
  const depthAt = (hours: number): number => d0 + k * Math.log10(hours / law.referenceHours);
  return {
    limitKind,
    law,
    depthAt,
    limitAt: (h) => limitOfDepth(limitKind, depthAt(h)),
    hoursFor: (limit) => law.referenceHours * 10 ** ((depthOfLimit(limitKind, limit) - d0) / k),
    depthRange: (h0, h1) => ({ shallowest: depthAt(h0), deepest: depthAt(h1) }),
  };
}

function noiseDepthModel(limitKind: LimitKind, law: Extract<DepthLaw, { kind: 'noise' }>): DepthModel {
  const { referenceHours: t0, skyToSource: rs, readToSource: rr, frameHours: tf } = law;
  const n0 = frameCount(t0, tf);
  // Depth per dex of flux: 2.5 mag, or 1 for -log10 flux.
  const c = limitKind === 'magnitude' ? 2.5 : 1;
  const d0 = depthOfLimit(limitKind, law.referenceLimit);
  const depthWith = (hours: number, frames: number): number =>
    d0 - c * Math.log10(noiseFluxRatio(hours / t0, frames / n0, rs, rr));
  const depthAt = (hours: number): number => depthWith(hours, frameCount(hours, tf));
  const hoursFor = (limit: number): number => {
    const x = 10 ** (-(depthOfLimit(limitKind, limit) - d0) / c);
    // The answer has at least the frames of the one-frame solution; each frame more adds read noise.
    let n = frameCount(noiseTau(x, 1 / n0, rs, rr) * t0, tf);
    for (let i = 0; i <= MAX_NOISE_FRAMES; i++, n++) {
      const t = noiseTau(x, n / n0, rs, rr) * t0;
      if (frameCount(t, tf) <= n) return t;
    }
    return Infinity;
  };
  const depthRange = (h0: number, h1: number): { shallowest: number; deepest: number } => {
    // Inside a frame the depth rises with t; it drops where a frame starts: the extremes lie at the
    // ends, at whole frames (deepest) or just after them (shallowest).
    let shallowest = depthAt(h0);
    let deepest = depthAt(h1);
    const first = frameCount(h0, tf);
    const last = Math.min(frameCount(h1, tf), first + MAX_NOISE_FRAMES);
    for (let k = first; k <= last; k++) {
      const t = k * tf;
      if (t < h0 || t > h1) continue;
      deepest = Math.max(deepest, depthWith(t, k));
      if (t < h1) shallowest = Math.min(shallowest, depthWith(t, k + 1));
    }
    return { shallowest, deepest };
  };
  return { limitKind, law, depthAt, limitAt: (h) => limitOfDepth(limitKind, depthAt(h)), hoursFor, depthRange };
}
