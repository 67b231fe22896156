/**
 * The program as bin/skytally.js runs it: the CommonJS bundle dist/cli/skytally.cjs compiled with
 * the V8 code cache the build recorded (src/cli/code-cache.ts). The cache fits the Node that built
 * it; a cache recorded for another bundle (V8 compares only the lengths) or one V8 refuses is not
 * used and the bundle compiled as usual; the program writes exactly what the ES-module bundle of
 * the same sources (dist/cli/skytally.js, no cache) writes.
 */
import { execFileSync } from 'node:child_process';
import { copyFileSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { DIGEST_BYTES } from '../../src/cli/code-cache.js';
import { tempDir } from '../support/temp.js';

const BUILT = ['dist/cli/skytally.cjs', 'dist/cli/skytally.cjs.cache', 'dist/vega.cjs.cache', 'dist/cli/skytally.js'];
const dir = tempDir('skytally-code-cache-test-');

beforeAll(() => {
  if (!BUILT.every((f) => existsSync(f))) execFileSync('npm', ['run', 'build'], { stdio: 'ignore' });
}, 300_000);

/** In a new process: load `bundle` through the loader; whether V8 refused its cache. */
function loadIn(bundle: string): { rejected: boolean | undefined; exports: string[] } {
  const script = `
    const { loadCached } = require(${JSON.stringify(resolve('dist/cli/code-cache.cjs'))});
    const r = loadCached(${JSON.stringify(resolve(bundle))});
    console.log(JSON.stringify({ rejected: r.rejected, exports: Object.keys(r.exports).sort() }));`;
  return JSON.parse(execFileSync(process.execPath, ['-e', script], { encoding: 'utf8' })) as {
    rejected: boolean | undefined;
    exports: string[];
  };
}

/** What bin/skytally.js (a program that runs main) writes for `args`, with --out into the test directory. */
function programOutput(entry: string, args: string[], name: string): string {
  const out = join(dir, name);
  execFileSync(process.execPath, [entry, ...args, '--out', out], { stdio: 'ignore' });
  return readFileSync(out, 'utf8');
}

describe('the code caches', () => {
  test('the caches the build recorded fit this Node and their bundles', () => {
    expect(loadIn('dist/cli/skytally.cjs')).toEqual({
      rejected: false,
      exports: ['VERSION', 'handleError', 'main', 'run'],
    });
    expect(loadIn('dist/vega.cjs')).toEqual({ rejected: false, exports: ['vega', 'vegaLite'] });
  });

  test('a cache recorded for another bundle of the same length (all V8 compares) is not used', () => {
    const text = readFileSync('dist/cli/skytally.cjs', 'utf8');
    const at = text.indexOf('function run(');
    expect(at).toBeGreaterThan(0);
    const bundle = join(dir, 'changed.cjs');
    // one character of the source changed, the length kept: a function renamed
    writeFileSync(bundle, `${text.slice(0, at)}function ruN(${text.slice(at + 'function run('.length)}`);
    expect(readFileSync(bundle, 'utf8').length).toBe(text.length);
    copyFileSync('dist/cli/skytally.cjs.cache', `${bundle}.cache`);
    const r = loadIn(bundle);
    expect(r.rejected).toBeUndefined();
    expect(r.exports).toContain('main');
  });

  test('a cache V8 refuses: the bundle is compiled from its source and runs', () => {
    const bundle = join(dir, 'same.cjs');
    copyFileSync('dist/cli/skytally.cjs', bundle);
    const cache = readFileSync('dist/cli/skytally.cjs.cache');
    // the bundle's digest kept, the bytecode that follows it spoilt
    writeFileSync(`${bundle}.cache`, Buffer.concat([cache.subarray(0, DIGEST_BYTES), Buffer.alloc(4096, 7)]));
    const r = loadIn(bundle);
    expect(r.rejected).toBe(true);
    expect(r.exports).toContain('main');
  });
});

/** The commands compared: bin/skytally.js against the ES-module bundle (--out into the test directory). */
const COMMANDS: [string, string[]][] = [
  ['check', ['check', 'samples/halpha-narrowband.yaml', '--format', 'json']],
  ['predict-json', ['predict', 'samples/deep-continuum.yaml', '--format', 'json']],
  ['predict-csv', ['predict', 'samples/dropout-field.yaml', '--format', 'csv']],
  ['report', ['report', 'samples/dropout-field.yaml']],
];

describe('bin/skytally.js writes what the ES-module bundle writes', () => {
  /** What the ES-module bundle writes for each command, by name. */
  const esm = new Map<string, string>();
  beforeAll(() => {
    // The ES-module bundle's run(argv, io), the function its main() calls with the process's
    // arguments and streams, for every command in one process (a process each cost about 0.3 s of
    // CPU to start and load the bundle); the program under test, bin/skytally.js, runs as a
    // program of its own for each command below.
    const runner = join(dir, 'esm-runner.mjs');
    writeFileSync(
      runner,
      `import { run } from ${JSON.stringify(resolve('dist/cli/skytally.js'))};
const io = { stdout: (s) => process.stdout.write(s), stderr: (s) => process.stderr.write(s), cwd: process.cwd(), stderrIsTTY: false };
for (const [args, out] of JSON.parse(process.argv[2])) {
  const code = await run([...args, '--out', out], io);
  if (code !== 0) throw new Error(\`\${args.join(' ')}: exit \${code}\`);
}
`,
    );
    const jobs = COMMANDS.map(([name, args]) => [args, join(dir, `esm-${name}.out`)] as const);
    execFileSync(process.execPath, [runner, JSON.stringify(jobs)], { stdio: 'ignore' });
    for (const [name] of COMMANDS) esm.set(name, readFileSync(join(dir, `esm-${name}.out`), 'utf8'));
  }, 120_000);

  test.each(COMMANDS.slice(0, 3))('%s: %j', (name, args) => {
    expect(programOutput('bin/skytally.js', args, 'bin.out')).toBe(esm.get(name));
  });
  test('a report, with its figures drawn by vega from dist/vega.cjs', () => {
    const html = programOutput('bin/skytally.js', COMMANDS[3]![1], 'bin.html');
    expect(html).toContain('<svg');
    expect(html).toBe(esm.get('report'));
  }, 60_000);
});
