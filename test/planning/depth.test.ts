/**
 * Depth laws, against common practice of exposure-time scaling:
 * - background-limited: S/N ~ F sqrt(t), so four times the exposure reaches a flux limit half as
 *   bright, 1.25 log10 4 = 0.7526 mag deeper (common practice);
 * - source-limited: S/N ~ sqrt(F t), four times the exposure reaches a quarter of the flux, 2.5 log10 4 = 1.505 mag.
 * Tolerance 1e-12 (closed forms).
 */
import { describe, expect, test } from 'vitest';
import { makeDepthModel } from '../../src/planning/depth.js';

describe('power laws (common practice)', () => {
  test('background-limited: 4x the exposure is 0.753 mag deeper (1.25 log10 4 = 0.75257), to 1e-12', () => {
    const m = makeDepthModel('magnitude', { kind: 'background', referenceLimit: 26.5, referenceHours: 1 });
    expect(m.limitAt(4) - m.limitAt(1)).toBeCloseTo(0.75257, 5);
    expect(Math.abs(m.limitAt(4) - m.limitAt(1) - 1.25 * Math.log10(4))).toBeLessThan(1e-12);
    expect(m.limitAt(1)).toBe(26.5);
  });
  test('background-limited: 4x the exposure halves the flux limit, to 1e-12 relative', () => {
    const m = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 6e-17, referenceHours: 2 });
    expect(Math.abs(m.limitAt(8) / m.limitAt(2) - 0.5)).toBeLessThan(1e-12);
    expect(Math.abs(m.limitAt(0.5) / 6e-17 - 2)).toBeLessThan(1e-12);
  });
  test('source-limited: 4x the exposure is 1.505 mag deeper and a quarter of the flux, to 1e-12', () => {
    const mag = makeDepthModel('magnitude', { kind: 'source', referenceLimit: 24, referenceHours: 1 });
    expect(Math.abs(mag.limitAt(4) - 24 - 2.5 * Math.log10(4))).toBeLessThan(1e-12);
    const flux = makeDepthModel('line_flux', { kind: 'source', referenceLimit: 1e-16, referenceHours: 1 });
    expect(Math.abs(flux.limitAt(4) / 1e-16 - 0.25)).toBeLessThan(1e-12);
  });
  test.each([0.01, 0.3, 1, 7, 250])('hoursFor inverts limitAt at %s h (1e-12 relative)', (h) => {
    for (const m of [
      makeDepthModel('magnitude', { kind: 'background', referenceLimit: 26.5, referenceHours: 1.5 }),
      makeDepthModel('line_flux', { kind: 'source', referenceLimit: 3e-17, referenceHours: 0.5 }),
    ]) {
      expect(Math.abs(m.hoursFor(m.limitAt(h)) / h - 1)).toBeLessThan(1e-12);
    }
  });
});

describe('table law: linear in log10 hours (as documented)', () => {
  test('magnitude halfway in log hours is the mean of the rows', () => {
    const m = makeDepthModel('magnitude', { kind: 'table', hours: [1, 4, 16], limits: [26, 26.6, 27.4] });
    expect(m.limitAt(2)).toBeCloseTo(26.3, 12);
    expect(m.limitAt(8)).toBeCloseTo(27.0, 12);
    expect(m.hoursFor(27.0)).toBeCloseTo(8, 10);
  });
  test('line flux is interpolated in log10 flux: halfway gives the geometric mean', () => {
    const m = makeDepthModel('line_flux', { kind: 'table', hours: [1, 100], limits: [1e-16, 1e-17] });
    expect(m.limitAt(10) / Math.sqrt(1e-16 * 1e-17)).toBeCloseTo(1, 12);
  });
});
