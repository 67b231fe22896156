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
 * Everything works on a "depth" d, the limit in a variable that grows as the survey goes deeper:
 * d = magnitude, or d = -log10(flux). Then d(t) = d_ref + k log10(t / t_ref) for the two power
 * laws, with k = 1.25 | 2.5 (magnitude) or 0.5 | 1 (line flux, dex).
 */

import { depthOfLimit, type DepthLaw, type LimitKind } from '../model/plan.js';

export { depthOfLimit, type DepthLaw, type LimitKind };

export interface DepthModel {
  limitKind: LimitKind;
  law: DepthLaw;
  /** Limit (magnitude or erg/s/cm^2) after `hours` per pointing. */
  limitAt(hours: number): number;
  /** Depth d = magnitude or -log10 flux after `hours`. */
  depthAt(hours: number): number;
  /** Exposure (hours) that reaches `limit` (inverse of limitAt). */
  hoursFor(limit: number): number;
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
    return { limitKind, law, depthAt, limitAt: (h) => limitOfDepth(limitKind, depthAt(h)), hoursFor };
  }
  const k = depthPerDecade(limitKind, law.kind);
  const d0 = depthOfLimit(limitKind, law.referenceLimit);
  const depthAt = (hours: number): number => d0 + k * Math.log10(hours / law.referenceHours);
  return {
    limitKind,
    law,
    depthAt,
    limitAt: (h) => limitOfDepth(limitKind, depthAt(h)),
    hoursFor: (limit) => law.referenceHours * 10 ** ((depthOfLimit(limitKind, limit) - d0) / k),
  };
}
