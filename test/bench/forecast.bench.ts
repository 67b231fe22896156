/**
 * Forecast benchmarks: the Fisher forecast of each sample (no mocks; Poisson only and with cosmic
 * variance), the Fisher matrix alone on a
 * prepared grid, and 1,000 mock surveys of about 5,000 sources each, drawn and fitted, with 2
 * workers (the sample H-alpha survey scaled in area to 5,000 expected sources).
 */
import { readdirSync } from 'node:fs';
import { loadSurveyFile } from '../../src/survey/load.js';
import { forecast } from '../../src/forecast/forecast.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import type { Survey } from '../../src/model/survey.js';
import type { BenchCase } from './run.js';
import mt19937 from '@stdlib/random-base-mt19937';
import { buildSamplingTables, CatalogueSampler } from '../../src/forecast/sampler.js';
import { buildRejectionTables, RejectionSampler } from '../forecast/rejection-sampler.js';

// (forecasts refuse photometric-redshift scatter: photoz-* samples have it)
const samples = readdirSync('samples').filter(
  (f) => f.endsWith('.yaml') && !f.startsWith('plan') && !f.startsWith('photoz'),
);
let sink = 0;

function scaledTo(s: Survey, n: number, count: number): Survey {
  const f = n / count;
  return { ...s, areaDeg2: s.areaDeg2 * f, areaSr: s.areaSr * f };
}

const fisherCases: BenchCase[] = samples.flatMap((f): BenchCase[] => {
  const s = loadSurveyFile(`samples/${f}`);
  // Forecasts vary one Schechter function: a sample whose first population is double is refused.
  if (s.populations[0]!.shape === 'double_schechter') return [];
  const cosmo = new FlatCosmology(s.cosmology);
  const grid = buildDensityGrid(s, s.populations[0]!, cosmo, s.sliceEdges);
  return [
    {
      name: `forecast Fisher (grid + matrix + JSON), ${f}, no cosmic variance`,
      repeats: 30,
      run: async () => {
        const r = await forecast(s, { cosmicVariance: false });
        sink += r.count;
      },
    },
    {
      name: `forecast Fisher with cosmic variance (fractions from src/uncertainty), ${f}`,
      repeats: 10,
      run: async () => {
        const r = await forecast(s, {});
        sink += r.count;
      },
    },
    {
      name: `fisherParts on a prepared grid (${grid.pointT.length} points), ${f}`,
      repeats: 30,
      run: () => {
        sink += fisherParts(grid).count;
      },
    },
  ];
});

const base = loadSurveyFile('samples/halpha-narrowband.yaml');
const baseCount = fisherParts(
  buildDensityGrid(base, base.populations[0]!, new FlatCosmology(base.cosmology), base.sliceEdges),
).count;
const five = scaledTo(base, 5000, baseCount);

/** Drawing alone: ~5000 sources over the slices of the scaled H-alpha survey, 20 catalogues per run. */
const fiveGrid = buildDensityGrid(five, five.populations[0]!, new FlatCosmology(five.cosmology), five.sliceEdges);
const fiveTables = buildSamplingTables(fiveGrid);
const fiveCounts = Array.from(fiveTables.sliceExpected, (x) => Math.round(x));
const samplerCases: BenchCase[] = [
  {
    name: 'sampler: 20 catalogues of ~5000 sources, inverse tables',
    repeats: 20,
    run: () => {
      const rand = (mt19937.factory({ seed: 3 }) as unknown as { normalized: () => number }).normalized;
      const sampler = new CatalogueSampler(fiveGrid, fiveTables);
      for (let i = 0; i < 20; i++) sink += sampler.draw(fiveCounts, rand).sumT;
    },
  },
  {
    name: 'sampler: 20 catalogues of ~5000 sources, rejection (before)',
    repeats: 20,
    run: () => {
      const rand = (mt19937.factory({ seed: 3 }) as unknown as { normalized: () => number }).normalized;
      const sampler = new RejectionSampler(fiveGrid, buildRejectionTables(fiveGrid));
      const nodeCum = fiveTables.nodeCum;
      for (let i = 0; i < 20; i++) {
        // the same node choice as CatalogueSampler.draw, then t by rejection
        for (let s = 0; s < fiveCounts.length; s++) {
          const j0 = fiveGrid.sliceNodeStart[s]!;
          const j1 = fiveGrid.sliceNodeStart[s + 1]!;
          for (let k = 0; k < fiveCounts[s]!; k++) {
            const x = rand();
            let j = j0;
            while (j < j1 - 1 && nodeCum[j]! <= x) j++;
            sink += sampler.drawT(j, rand);
          }
        }
      }
    },
  },
  {
    name: 'sampler: tables of the scaled H-alpha grid, inverse tables / rejection',
    repeats: 20,
    run: () => {
      sink += buildSamplingTables(fiveGrid).cellCum.length + buildRejectionTables(fiveGrid).cellCum.length;
    },
  },
];

export const cases: BenchCase[] = [
  ...fisherCases,
  ...samplerCases,
  {
    name: '1000 mocks x ~5000 sources, drawn + fitted, 2 workers (halpha scaled)',
    repeats: 1,
    run: async () => {
      const r = await forecast(five, { cosmicVariance: false, mocks: 1000, workers: 2, seed: 5 });
      sink += r.mocks!.failed_fits;
    },
  },
  {
    name: '1000 mocks x ~5000 sources, drawn + fitted, 1 worker (halpha scaled)',
    repeats: 1,
    run: async () => {
      const r = await forecast(five, { cosmicVariance: false, mocks: 1000, workers: 1, seed: 5 });
      sink += r.mocks!.failed_fits;
    },
  },
];
export const _sink = () => sink;
