/**
 * Two small private mathjs instances, each built on first use: one with only the expression
 * parser (for parameters in z; cheap to build) and one with the unit system (for quantities such
 * as "900 arcmin^2"; building mathjs's unit tables costs a few hundred milliseconds, so it happens
 * only when a survey file holds a unit string).
 *
 * The imports name only the factories we use, so that the bundles made by scripts/build.mjs carry
 * just those parts of mathjs (about 300 kB instead of the whole package).
 */
import { create, parseDependencies, unitDependencies, createUnitDependencies } from 'mathjs';
import type * as MathJsModule from 'mathjs';

export type MathJs = MathJsModule.MathJsInstance;

let parser: MathJs | undefined;
let units: MathJs | undefined;

/** An instance with the expression parser only. */
export function getParser(): MathJs {
  parser ??= create({ parseDependencies: parseDependencies! });
  return parser;
}

/** An instance with units; adds `sr` and `micron`, which mathjs does not know by these names. */
export function getUnits(): MathJs {
  if (units) return units;
  const mj = create({ unitDependencies: unitDependencies!, createUnitDependencies: createUnitDependencies! });
  // sr: the SI steradian, 1 sr = 1 rad^2 (SI brochure, 9th ed., Table 4). micron: the micrometre.
  mj.createUnit('sr', '1 rad^2');
  mj.createUnit('micron', '1 um');
  units = mj;
  return mj;
}
