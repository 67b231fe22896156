/** Benchmarks of the cosmic-variance physics (src/uncertainty). */
import { resolveCosmology } from '../../src/cosmology/parameters.js';
import { createHaloModel } from '../../src/uncertainty/haloes.js';
import { createLinearPower } from '../../src/uncertainty/power-spectrum.js';
import { boxSigma } from '../../src/uncertainty/window.js';
import { sliceUncertainty } from '../../src/uncertainty/cosmic-variance.js';
import type { BenchCase } from './run.js';

const cosmology = resolveCosmology({ preset: 'planck2018' });
const power = createLinearPower(cosmology);
const full = createLinearPower(cosmology, { form: 'full' });
const haloes = createHaloModel(power);
haloes.sigma(1e12, 0); // build the sigma(M) table outside the timed runs

let h0 = 60;
export const cases: BenchCase[] = [
  {
    name: 'createLinearPower(planck2018 variant, no_wiggle)',
    run: () => createLinearPower({ ...cosmology, h0: (h0 += 1e-6) }),
  },
  {
    name: 'createLinearPower(planck2018 variant, full)',
    run: () => createLinearPower({ ...cosmology, h0: (h0 += 1e-6) }, { form: 'full' }),
  },
  { name: 'sigmaR(8/h Mpc, z=0)', run: () => power.sigmaR(8 / power.h, 0), repeats: 500 },
  { name: 'boxSigma cube 100x100x100 Mpc, z=1', run: () => boxSigma(power, 1, [100, 100, 100]), repeats: 200 },
  { name: 'boxSigma pencil 5x5x1000 Mpc, z=1', run: () => boxSigma(power, 1, [5, 5, 1000]), repeats: 200 },
  { name: 'boxSigma slab 500x500x10 Mpc, z=1', run: () => boxSigma(power, 1, [500, 500, 10]), repeats: 200 },
  { name: 'boxSigma tiny cube 1x1x1 Mpc, z=1', run: () => boxSigma(power, 1, [1, 1, 1]), repeats: 200 },
  { name: 'boxSigma pencil 5x5x1000 Mpc, z=1, full form', run: () => boxSigma(full, 1, [5, 5, 1000]), repeats: 200 },
  {
    name: 'halo model sigma(M) table build',
    run: () => createHaloModel(createLinearPower({ ...cosmology, h0: (h0 += 1e-6) })).sigma(1e12, 0),
    repeats: 20,
  },
  {
    name: 'matchHaloMass(1e-3 Mpc^-3, z=2, occupation 0.5)',
    run: () => haloes.matchHaloMass(1e-3, 2, 0.5),
    repeats: 200,
  },
  { name: 'matchHaloMass(1e-5 Mpc^-3, z=6, occupation 1)', run: () => haloes.matchHaloMass(1e-5, 6, 1), repeats: 200 },
  {
    name: 'sliceUncertainty(0.5 deg2, 1 field, z=2, dz=0.2)',
    run: () =>
      sliceUncertainty(power, {
        areaSr: 0.5 * (Math.PI / 180) ** 2,
        aspect: 1,
        fieldCount: 1,
        transverseDistanceMpc: 5300,
        radialDepthMpc: 240,
        zMid: 2,
        bias: 3,
        count: 400,
      }),
    repeats: 200,
  },
];
