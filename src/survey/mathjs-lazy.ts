/**
 * The built program's stand-in for ./mathjs.js (scripts/build.mjs puts it in place of that module
 * in the Node bundles): the same two functions, with the mathjs instances loaded from their own
 * file (dist/mathjs.cjs, found through the package's private import `#mathjs`) on first use. The
 * common units and expressions are read without mathjs (units.ts, quick-expression.ts), so most
 * runs never read or compile its few hundred kilobytes. Running the TypeScript sources (tests,
 * tsx) and in the explore page, ./mathjs.js itself is used.
 */
import { createRequire } from 'node:module';
import type * as Instances from './mathjs.js';

export type MathJs = Instances.MathJs;

let instances: typeof Instances | undefined;

function load(): typeof Instances {
  instances ??= createRequire(import.meta.url)('#mathjs') as typeof Instances;
  return instances;
}

/** An instance with the expression parser only. */
export function getParser(): MathJs {
  return load().getParser();
}

/** An instance with units (see ./mathjs.js). */
export function getUnits(): MathJs {
  return load().getUnits();
}
