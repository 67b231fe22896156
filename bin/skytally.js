#!/usr/bin/env node
// Thin wrapper: the command-line program lives in src/cli, bundled by `npm run build` into
// dist/cli/skytally.cjs and compiled here with its V8 code cache (src/cli/code-cache.ts).
// CommonJS (bin/package.json), so that starting the program does not start Node's ES-module loader.
'use strict';
const { join } = require('node:path');
const { loadCached } = require('../dist/cli/code-cache.cjs');

loadCached(join(__dirname, '..', 'dist', 'cli', 'skytally.cjs')).exports.main();
