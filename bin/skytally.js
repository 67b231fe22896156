#!/usr/bin/env node
// Thin wrapper: the command-line program lives in src/cli (bundled into dist/cli by `npm run build`).
import { main } from '../dist/cli/skytally.js';
main();
