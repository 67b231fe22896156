/**
 * What the tests of a population's own k-correction (test/selection/population-beta.test.ts and
 * population-sed.test.ts) share: the relative difference, the power-law K(z) of Hogg et al. 2002
 * with astropy's distance modulus (test/reference/distances.json), a one-population file cut out of
 * a two-population one, and the comparisons of a population's numbers with that file's.
 */
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import type { Prediction } from '../../src/index.js';

export const rel = (a: number, b: number): number =>
  a === b ? 0 : Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b));

interface DistanceRow {
  z: number;
  distance_modulus: number;
}
const distances = JSON.parse(readFileSync('test/reference/distances.json', 'utf8')) as {
  cosmologies: { label: string; rows: DistanceRow[] }[];
};

/** astropy's distance modulus 5 log10(D_L / 10 pc) at z, H0 = 70, Omega_m = 0.3, no radiation. */
export function distanceModulus(z: number): number {
  const c = distances.cosmologies.find((x) => x.label === 'H0=70 Om=0.3 T=0')!;
  return c.rows.find((r) => r.z === z)!.distance_modulus;
}

/** K(z) of a power law f_lambda ~ lambda^beta (Hogg et al. 2002), D_L from astropy. */
export function kOfFormula(z: number, band: number, rest: number, beta: number): number {
  return distanceModulus(z) - 2.5 * Math.log10(1 + z) - 2.5 * (beta + 2) * Math.log10(band / ((1 + z) * rest));
}

/** The file with one population only (k: 0 for A, 1 for B), as `population:`. */
export function alone(text: string, k: number): string {
  const [head, pops] = text.split('populations:\n');
  const entries = pops!.split('slices:')[0]!.split(/\n(?= {2}- )/);
  const entry = entries[k]!.replace(/^\s*- /, '  ').replace(/\n {4}/g, '\n  ');
  return `${head}population:\n${entry.trimEnd()}\nslices:${pops!.split('slices:')[1]}`;
}

/** Every number of a population's result against a one-population prediction's. */
export function expectSameCounts(multi: Prediction, k: number, single: Prediction, tol: number): void {
  const own = multi.populations[k]!;
  expect(rel(own.totals.count, single.totals.count)).toBeLessThanOrEqual(tol);
  expect(own.slices.length).toBe(single.slices!.length);
  own.slices.forEach((s, i) => {
    const t = single.slices![i]!;
    expect(rel(s.count, t.count)).toBeLessThanOrEqual(tol);
    expect(rel(s.limit_at_center!, t.limit_at_center!)).toBeLessThanOrEqual(tol);
    expect(s.histogram.edges).toEqual(t.histogram.edges);
    s.histogram.counts.forEach((c, j) => expect(rel(c, t.histogram.counts[j]!)).toBeLessThanOrEqual(tol));
  });
}

/** Every number of a forecast, in order, but those of its model statement, detection, title and warnings. */
export function forecastNumbers(x: unknown): number[] {
  return typeof x === 'number'
    ? [x]
    : Array.isArray(x)
      ? x.flatMap(forecastNumbers)
      : x && typeof x === 'object'
        ? Object.entries(x)
            .filter(([k]) => k !== 'model' && k !== 'detection' && k !== 'title' && k !== 'warnings')
            .flatMap(([, v]) => forecastNumbers(v))
        : [];
}
