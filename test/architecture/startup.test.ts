/**
 * Start-up: what the command line loads before it knows the command. Every module src/cli/main.ts
 * reaches through static imports (value imports and `export ... from`, not `import type` and not
 * `import()`) is part of every run of the program, so that set holds the command line itself and
 * only the small modules every command needs; the loader, the physics, the studies and the
 * figures are imported by the commands that run them (DEVELOPERS.md, "Start-up time").
 */
import { readFileSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { dirname, join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { expect, test } from 'vitest';

const SRC = resolve(__dirname, '../../src');

/** The value imports of a module that run when it is loaded (type-only ones are erased by the build). */
function staticImports(file: string): string[] {
  const source = ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.Latest, false);
  const out: string[] = [];
  for (const st of source.statements) {
    if (ts.isImportDeclaration(st)) {
      const clause = st.importClause;
      if (clause?.isTypeOnly) continue;
      const named = clause?.namedBindings;
      const onlyTypes =
        clause !== undefined &&
        clause.name === undefined &&
        named !== undefined &&
        ts.isNamedImports(named) &&
        named.elements.length > 0 &&
        named.elements.every((e) => e.isTypeOnly);
      if (!onlyTypes) out.push((st.moduleSpecifier as ts.StringLiteral).text);
    } else if (ts.isExportDeclaration(st) && st.moduleSpecifier && !st.isTypeOnly) {
      out.push((st.moduleSpecifier as ts.StringLiteral).text);
    }
  }
  return out;
}

function closure(entry: string): { modules: string[]; packages: string[] } {
  const modules = new Set<string>();
  const packages = new Set<string>();
  const stack = [join(SRC, entry)];
  while (stack.length) {
    const file = stack.pop()!;
    const rel = relative(SRC, file);
    if (modules.has(rel)) continue;
    modules.add(rel);
    for (const spec of staticImports(file)) {
      if (spec.startsWith('.')) {
        if (!spec.endsWith('.json')) stack.push(resolve(dirname(file), spec.replace(/\.js$/, '.ts')));
      } else packages.add(spec.startsWith('@') ? spec.split('/').slice(0, 2).join('/') : spec.split('/')[0]!);
    }
  }
  return { modules: [...modules].sort(), packages: [...packages].sort() };
}

/** Modules outside src/cli that every command may load at start: small, and free of computation. */
const EVERY_RUN = [
  'errors.ts',
  'warnings.ts',
  'render/format.ts',
  'render/csv.ts',
  'cosmology/parameters.ts',
  'cosmology/presets.ts',
  'cosmology/constants.ts',
];

test('the command line loads no loader, physics, study or figure module before its command runs', () => {
  const { modules } = closure('cli/main.ts');
  const outside = modules.filter((m) => !m.startsWith('cli/') && !m.startsWith('model/') && !EVERY_RUN.includes(m));
  expect(outside).toEqual([]);
  expect(modules).toContain('cli/commands/predict.ts'); // the scan follows the commands' static imports
});

test('the packages loaded at start are the option parser and the CSV writer', () => {
  const builtins = new Set(builtinModules.flatMap((m) => [m, `node:${m}`]));
  const { packages } = closure('cli/main.ts');
  expect(packages.filter((p) => !builtins.has(p))).toEqual(['commander', 'csv-stringify']);
});
