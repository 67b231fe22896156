#!/usr/bin/env node
// Thin wrapper: the command-line program lives in src/cli, bundled by `npm run build` into
// dist/cli/skytally.cjs and compiled here with its V8 code cache (src/cli/code-cache.ts).
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';

const { loadCached } = createRequire(import.meta.url)('../dist/cli/code-cache.cjs');
loadCached(fileURLToPath(new URL('../dist/cli/skytally.cjs', import.meta.url))).exports.main();
