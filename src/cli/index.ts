export { run, main, VERSION } from './main.js';
export type { CliIO } from './io.js';
