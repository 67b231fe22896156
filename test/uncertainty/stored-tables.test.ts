/**
 * The stored tables of the common cosmologies (src/uncertainty/stored-tables.ts) are the tables the
 * code makes: each equals a fresh computation (to 1e-12 relative; on the Node that wrote them, bit
 * for bit), the committed module is what scripts/generate-power-tables.ts writes now, and a
 * spectrum and halo model built from them give the same numbers as ones made afresh.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it, vi } from 'vitest';
import { GENERATED_PATH, STORED_COSMOLOGIES, generatePowerTablesSource } from '../../scripts/generate-power-tables.js';
import { resolveCosmology } from '../../src/cosmology/parameters.js';
import { computeLnSigmaTable, createHaloModel } from '../../src/uncertainty/haloes.js';
import { computeLinearPower, computeShapeTable, createLinearPower } from '../../src/uncertainty/power-spectrum.js';
import {
  decodeDoubles,
  encodeDoubles,
  powerKey,
  storedLnSigmaM,
  storedShapeTable,
} from '../../src/uncertainty/stored-tables.js';

/** Largest difference of two arrays of the same length, relative where above 1 in size (logarithms cross 0). */
function maxRelDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i]! - b[i]!) / Math.max(1, Math.abs(b[i]!)));
  return worst;
}

describe('stored cosmology tables', () => {
  it('the committed module is what the generator writes (run npx tsx scripts/generate-power-tables.ts)', () => {
    expect(readFileSync(GENERATED_PATH, 'utf8')).toBe(generatePowerTablesSource());
  });

  it('base64 of little-endian doubles reads back bit for bit', () => {
    const xs = Float64Array.from([0, -0, 1, -2.5, Math.PI, 1e-300, 5e-324, Number.MAX_VALUE, -1 / 3]);
    const back = decodeDoubles(encodeDoubles(xs));
    expect([...back].map((x) => Object.is(x, -0) || x)).toEqual([...xs].map((x) => Object.is(x, -0) || x));
  });

  it('without the Buffer of Node (a browser) atob reads the same doubles', () => {
    const text = encodeDoubles(Float64Array.from([0.1, -7e200, 3]));
    const withBuffer = decodeDoubles(text);
    vi.stubGlobal('Buffer', undefined);
    try {
      expect(decodeDoubles(text)).toEqual(withBuffer);
    } finally {
      vi.unstubAllGlobals();
    }
    expect([...withBuffer]).toEqual([0.1, -7e200, 3]);
  });

  describe.each(STORED_COSMOLOGIES.map((input) => [JSON.stringify(input), input] as const))('%s', (_, input) => {
    const cosmology = resolveCosmology(input);
    const key = powerKey(cosmology, 'no_wiggle');
    const fresh = computeLinearPower(cosmology, { form: 'no_wiggle' });

    it('the ln P shape table and sigma(8/h Mpc) equal a fresh computation to 1e-12', () => {
      const stored = storedShapeTable(key)!;
      const made = computeShapeTable(cosmology, 'no_wiggle');
      expect(stored.lnShape.length).toBe(3225);
      expect(maxRelDiff(stored.lnShape, made.lnShape)).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(stored.sigma8Unnormalised / made.sigma8Unnormalised - 1)).toBeLessThanOrEqual(1e-12);
    });

    it('ln sigma(M, 0) at the spline knots equals a fresh computation to 1e-12', () => {
      const stored = storedLnSigmaM(key)!;
      expect(stored.length).toBe(75);
      expect(maxRelDiff(stored, computeLnSigmaTable(fresh))).toBeLessThanOrEqual(1e-12);
    });

    it('a spectrum and halo model from the stored tables give what fresh ones give (1e-12)', () => {
      const power = createLinearPower(cosmology, { form: 'no_wiggle' });
      const haloes = createHaloModel(power);
      expect(power).not.toBe(fresh);
      for (const k2 of [1e-6, 1e-2, 0.3, 40])
        expect(power.powerZ0FromK2(k2) / fresh.powerZ0FromK2(k2) - 1).toBeCloseTo(0, 12);
      for (const r of [0.5, 8, 60]) expect(power.sigmaR(r, 1) / fresh.sigmaR(r, 1) - 1).toBeCloseTo(0, 12);
      const freshHaloes = createHaloModel(fresh);
      for (const m of [1e8, 1e11, 1e14]) {
        expect(haloes.sigma(m, 2) / freshHaloes.sigma(m, 2) - 1).toBeCloseTo(0, 12);
        expect(haloes.haloDensityAboveMpc3(m, 2) / freshHaloes.haloDensityAboveMpc3(m, 2) - 1).toBeCloseTo(0, 12);
      }
    });
  });

  it('other cosmologies and the full form have no stored table (they are made as before)', () => {
    const other = resolveCosmology({ h0: 71, omegaM: 0.3 });
    expect(storedShapeTable(powerKey(other, 'no_wiggle'))).toBeUndefined();
    expect(storedLnSigmaM(powerKey(other, 'no_wiggle'))).toBeUndefined();
    expect(storedShapeTable(powerKey(resolveCosmology({ preset: 'planck2018' }), 'full'))).toBeUndefined();
    expect(storedShapeTable('__proto__')).toBeUndefined();
  });
});
