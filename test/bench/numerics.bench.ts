/**
 * Numerics benchmarks. Each case does 10 000 calls so the median time in ms reads as
 * 0.1 x microseconds per call. x runs log-spaced over [1e-3, 1e2] (both methods of upperGamma).
 */
import { upperGamma } from '../../src/numerics/gamma.js';
import { gaussLegendre, integrate } from '../../src/numerics/quadrature.js';
import { brent } from '../../src/numerics/roots.js';
import type { BenchCase } from './run.js';

const N = 10_000;
const xs = Float64Array.from({ length: N }, (_, i) => 1e-3 * Math.pow(10, (5 * i) / (N - 1)));
let sink = 0;

const gammaCase = (s: number): BenchCase => ({
  name: `upperGamma s=${s}, x in [1e-3, 1e2], 10k calls`,
  run: () => {
    let acc = 0;
    for (let i = 0; i < N; i++) acc += upperGamma(s, xs[i]!);
    sink += acc;
    return acc;
  },
});

export const cases: BenchCase[] = [
  gammaCase(-0.5),
  gammaCase(0),
  gammaCase(0.5),
  gammaCase(-2.3),
  {
    name: 'gaussLegendre n=24 of exp on [0, 1], 10k calls',
    run: () => {
      let acc = 0;
      for (let i = 0; i < N; i++) acc += gaussLegendre(Math.exp, 0, 1 + i * 1e-6, 24);
      sink += acc;
      return acc;
    },
  },
  {
    name: 'integrate GK21 rel 1e-10 of 1/((x-0.3)^2+1e-4) on [0, 1], 100 calls',
    run: () => {
      let acc = 0;
      for (let i = 0; i < 100; i++) acc += integrate((x) => 1 / ((x - 0.3) ** 2 + 1e-4), 0, 1 + i * 1e-6).value;
      sink += acc;
      return acc;
    },
  },
  {
    name: 'brent cos x = x on [0, 1], 10k calls',
    run: () => {
      let acc = 0;
      for (let i = 0; i < N; i++) acc += brent((x) => Math.cos(x) - x - i * 1e-9, 0, 1);
      sink += acc;
      return acc;
    },
  },
];
export const _sink = () => sink;
