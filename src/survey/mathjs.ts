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

/** An instance with units; adds `sr`, `micron` and `Jy`, which mathjs does not know by these names. */
export function getUnits(): MathJs {
  if (units) return units;
  const mj = create({ unitDependencies: unitDependencies!, createUnitDependencies: createUnitDependencies! });
  // sr: the SI steradian, 1 sr = 1 rad^2 (SI brochure, 9th ed., Table 4). micron: the micrometre.
  mj.createUnit('sr', '1 rad^2');
  mj.createUnit('micron', '1 um');
  // Jy: the jansky, 1 Jy = 1e-26 W m^-2 Hz^-1 (IAU Style Manual, Wilkins 1989, Table 7), with the
  // short SI prefixes (mJy, uJy, nJy).
  mj.createUnit('Jy', { definition: '1e-26 W m^-2 Hz^-1', prefixes: 'short' });
  units = mj;
  return mj;
}
