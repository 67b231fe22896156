/**
 * A small private mathjs instance (units and the expression parser only), loaded on first use.
 *
 * Why not `import { create, unitDependencies } from 'mathjs'`: the package's ESM entry pulls in
 * several hundred modules, and importing it costs about 1.3 s on our machines no matter which
 * factories are used afterwards. The package also ships a single-file build
 * (`mathjs/lib/browser/math.js`, listed in its `exports` map) that loads in about 0.1 s. We
 * require that file synchronously, only when a survey file holds a unit string or an
 * expression, and build our own instance from it so that nothing else can change its units.
 */
import { createRequire } from 'node:module';
import type * as MathJsModule from 'mathjs';

export type MathJs = MathJsModule.MathJsInstance;

let instance: MathJs | undefined;

export function getMath(): MathJs {
  if (instance) return instance;
  const require = createRequire(import.meta.url);
  const m = require('mathjs/lib/browser/math.js') as typeof MathJsModule;
  const mj = m.create({
    unitDependencies: m.unitDependencies!,
    createUnitDependencies: m.createUnitDependencies!,
    parseDependencies: m.parseDependencies!,
  });
  // Units mathjs does not know by these names. sr: the SI steradian, 1 sr = 1 rad^2 (SI brochure,
  // 9th ed., Table 4). micron: the micrometre.
  mj.createUnit('sr', '1 rad^2');
  mj.createUnit('micron', '1 um');
  instance = mj;
  return mj;
}
