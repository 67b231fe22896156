/**
 * Cosmology benchmarks. Each case does 10 000 calls (z spread over [0.01, 10]) so the median time in
 * ms reads as 0.1 x microseconds per call.
 */
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import type { BenchCase } from './run.js';

const N = 10_000;
const zs = Float64Array.from({ length: N }, (_, i) => 0.01 + (10 * i) / N);
const noRad = FlatCosmology.fromParams({ h0: 70, omegaM: 0.3 });
const rad = FlatCosmology.fromParams({ h0: 67.66, omegaM: 0.3111, tCmb: 2.7255 });
let sink = 0;

const loop = (name: string, n: number, f: (z: number) => number): BenchCase => ({
  name,
  run: () => {
    let acc = 0;
    for (let i = 0; i < n; i++) acc += f(zs[(i * (N / n)) | 0]!);
    sink += acc;
    return acc;
  },
});

export const cases: BenchCase[] = [
  loop('comovingDistanceMpc no radiation (Carlson R_F), 10k calls', N, (z) => noRad.comovingDistanceMpc(z)),
  loop('comovingDistanceMpc with radiation (Gauss-Legendre 24), 10k calls', N, (z) => rad.comovingDistanceMpc(z)),
  loop('volumeElementMpc3Sr no radiation, 10k calls', N, (z) => noRad.volumeElementMpc3Sr(z)),
  loop('volumeElementMpc3Sr with radiation, 10k calls', N, (z) => rad.volumeElementMpc3Sr(z)),
  loop('comovingVolumeBetweenMpc3Sr(z, z+0.1) with radiation, 10k calls', N, (z) =>
    rad.comovingVolumeBetweenMpc3Sr(z, z + 0.1),
  ),
  loop('lookbackTimeGyr with radiation, 10k calls', N, (z) => rad.lookbackTimeGyr(z)),
  loop('ageGyr with radiation (adaptive), 1k calls', 1000, (z) => rad.ageGyr(z)),
  {
    name: 'FlatCosmology.fromParams (construction), 10k calls',
    run: () => {
      let acc = 0;
      for (let i = 0; i < N; i++) acc += FlatCosmology.fromParams({ h0: 70 + i * 1e-6, omegaM: 0.3 }).hubbleDistanceMpc;
      sink += acc;
      return acc;
    },
  },
];
export const _sink = () => sink;
