/**
 * The Poisson Fisher sums of density grids kept from one forecast to the next (the explore page
 * asks for a forecast on every change of a control), by everything the grid depends on except
 * the area: the cosmology, the detection, the population and the slice edges (grid.ts reads
 * nothing else of the survey). The area enters the density only as a factor (lambda is
 * proportional to area_sr, grid.ts), so every sum of fisherParts -- the count, the b_i and the
 * matrix -- is proportional to it: sums kept for one area serve another, times the ratio of the
 * areas. The scaled sums equal those of a grid built afresh for the new area to rounding (the
 * factor enters each point's logarithm there; test/explore/page-memo.test.ts checks 1e-12 on
 * every sample).
 *
 * The key is the JSON of those inputs: the survey model is plain data but for the parameters in
 * z, whose JSON is what the file said (ZParam.source), from which they are built.
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { densityFisherParts } from './grid.js';
import type { FisherParts } from './fisher.js';
import { KeptByArea, memoKey } from '../counts/count-memo.js';

/** Grids remembered (the last used kept): a page's controls of several populations and a limit or two. */
const ENTRIES = 16;

export class FisherSumsMemo {
  private readonly kept = new KeptByArea<FisherParts>(ENTRIES, scaledParts);

  /** The key of the grid of `population` in `survey` on `edges`, area aside. */
  static key(survey: Survey, population: Population, edges: readonly number[]): string {
    return memoKey([survey.cosmology, survey.detection, population, edges]);
  }

  /**
   * fisherParts(buildDensityGrid(survey, population, cosmo, edges)) (densityFisherParts: the
   * same sums without the grid's arrays), from the sums kept for the same inputs at any area when
   * there are some. The result is not to be changed by the caller.
   */
  parts(survey: Survey, population: Population, cosmo: FlatCosmology, edges: readonly number[]): FisherParts {
    return this.kept.get(FisherSumsMemo.key(survey, population, edges), survey.areaSr, () =>
      densityFisherParts(survey, population, cosmo, edges),
    );
  }
}

/** Every sum of `parts` times `ratio` (`parts` itself for a ratio of 1). */
export function scaledParts(parts: FisherParts, ratio: number): FisherParts {
  if (ratio === 1) return parts;
  const out: FisherParts = {
    matrix: parts.matrix.map((row) => row.map((v) => v * ratio)),
    slices: parts.slices.map((s) => ({ count: s.count * ratio, b: s.b.map((v) => v * ratio) })),
    count: parts.count * ratio,
  };
  // (shares of each slice's integral: the area scales them out)
  if (parts.quadratureMissed) out.quadratureMissed = parts.quadratureMissed;
  return out;
}
