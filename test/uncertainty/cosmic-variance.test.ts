import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  fieldBoxSidesMpc,
  sliceUncertainty,
  type SliceUncertaintyInput,
} from '../../src/uncertainty/cosmic-variance.js';
import { createHaloModel } from '../../src/uncertainty/haloes.js';
import { createLinearPower } from '../../src/uncertainty/power-spectrum.js';
import { boxSigma } from '../../src/uncertainty/window.js';
import { planck2018, relErr } from './helpers.js';

const power = createLinearPower(planck2018);
const DEG2_SR = (Math.PI / 180) ** 2;

// Distances for z = 2 (mid) and a 1.9-2.1 slice in Planck 2018: invented round numbers of the right size
// (this module takes them as inputs; the cosmology code supplies real ones).
const base: SliceUncertaintyInput = {
  areaSr: 0.5 * DEG2_SR,
  aspect: 1,
  fieldCount: 1,
  transverseDistanceMpc: 5300,
  radialDepthMpc: 240,
  zMid: 2,
  bias: 3,
  count: 400,
};

describe('slice uncertainty: definitions (closed forms)', () => {
  it('Poisson fraction is exactly 1/sqrt(N); total is the quadrature sum', () => {
    for (const count of [1, 4, 400, 12345.6]) {
      const r = sliceUncertainty(power, { ...base, count });
      expect(r.poissonFraction).toBe(1 / Math.sqrt(count));
      expect(r.totalFraction).toBe(Math.hypot(r.poissonFraction, r.cosmicVarianceFraction));
    }
  });

  it('one field: the cosmic-variance fraction is b sigma_dm of its box', () => {
    const r = sliceUncertainty(power, base);
    const sides = fieldBoxSidesMpc(base);
    expect(r.sigmaMatter).toBe(boxSigma(power, 2, sides));
    expect(r.cosmicVarianceFraction).toBe(3 * r.sigmaMatter);
    expect(r.bias).toBe(3);
    expect(r.haloMassMinMsun).toBeUndefined();
  });

  it('field sides: width/height = aspect, width x height = (area / count) D_M^2, depth = radial (1e-12)', () => {
    const g = { ...base, aspect: 2.5, fieldCount: 3 };
    const [w, h, d] = fieldBoxSidesMpc(g);
    expect(relErr(w / h, 2.5)).toBeLessThan(1e-12);
    expect(relErr(w * h, (g.areaSr / 3) * 5300 ** 2)).toBeLessThan(1e-12);
    expect(d).toBe(240);
  });

  it('count independent equal fields: the cosmic-variance fraction of the total is (one field) / sqrt(count) exactly', () => {
    const one = sliceUncertainty(power, base);
    for (const count of [2, 4, 9, 25]) {
      // the same per-field box (total area scaled with the count) => exactly 1/sqrt(count)
      const many = sliceUncertainty(power, { ...base, areaSr: base.areaSr * count, fieldCount: count });
      expect(many.sigmaMatter).toBe(one.sigmaMatter);
      expect(relErr(many.cosmicVarianceFraction, one.cosmicVarianceFraction / Math.sqrt(count))).toBeLessThan(1e-15);
    }
  });

  it('fast-check: cosmic variance is linear in the bias and falls as the area grows', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 8, noNaN: true }),
        fc.double({ min: 0.01, max: 20, noNaN: true }),
        (b, areaDeg2) => {
          const r1 = sliceUncertainty(power, { ...base, bias: b, areaSr: areaDeg2 * DEG2_SR });
          const r2 = sliceUncertainty(power, { ...base, bias: 2 * b, areaSr: areaDeg2 * DEG2_SR });
          const r3 = sliceUncertainty(power, { ...base, bias: b, areaSr: 2 * areaDeg2 * DEG2_SR });
          return (
            relErr(r2.cosmicVarianceFraction, 2 * r1.cosmicVarianceFraction) < 1e-12 &&
            r3.cosmicVarianceFraction < r1.cosmicVarianceFraction
          );
        },
      ),
      { numRuns: 50, seed: 7 },
    );
  });

  it('works with a matched bias and reports the halo mass', () => {
    const haloes = createHaloModel(power);
    const m = haloes.matchHaloMass(1e-3, 2, 0.5);
    const r = sliceUncertainty(power, { ...base, bias: m.bias, haloMassMinMsun: m.haloMassMinMsun });
    expect(r.haloMassMinMsun).toBe(m.haloMassMinMsun);
    expect(Number.isFinite(r.totalFraction)).toBe(true);
  });

  it('rejects a zero count, a zero area, a fractional field count and a non-positive bias', () => {
    expect(() => sliceUncertainty(power, { ...base, count: 0 })).toThrow(RangeError);
    expect(() => sliceUncertainty(power, { ...base, areaSr: 0 })).toThrow(RangeError);
    expect(() => sliceUncertainty(power, { ...base, fieldCount: 1.5 })).toThrow(RangeError);
    expect(() => sliceUncertainty(power, { ...base, bias: 0 })).toThrow(RangeError);
    expect(() => sliceUncertainty(power, { ...base, radialDepthMpc: Number.NaN })).toThrow(RangeError);
  });
});
