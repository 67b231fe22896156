// The package as a user gets it (`npm run check:package`; CI runs it after the tests):
// 1. `npm pack` (which builds) and a look at what the tarball holds;
// 2. a new consumer project in a temporary directory installs the tarball (from the local npm
//    cache where it can: --prefer-offline) and TypeScript 7;
// 3. a consumer file that uses the library's types compiles with TypeScript 5.9 (the project's
//    own compiler) and TypeScript 7, strict, checking the package's declarations
//    (skipLibCheck off) with no type packages of its own ("types": []);
// 4. the file compiled by TypeScript 5.9 runs on Node (the package imports as an ES module); the
//    installed build is not minified, has source maps and never loads esbuild; the installed
//    program runs both worker jobs (forecast mocks, plan depth tables) in two worker threads
//    (dist/worker.js found through the package's "#worker" import) with the results of one
//    thread; and `require('skytally')` is refused (ES modules only).
// The temporary directory is removed at the end, whatever happened.
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

/** The TypeScript 7 release compiled against (the project itself builds with TypeScript 5.9). */
const TYPESCRIPT_7 = '7.0.2';

const root = resolve(import.meta.dirname, '..');
const npm = process.platform === 'win32' ? 'npm.cmd' : 'npm';
const work = mkdtempSync(join(tmpdir(), 'skytally-package-'));

function sh(command, args, cwd, env = process.env) {
  return execFileSync(command, args, { cwd, env, encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] });
}

function check(condition, what) {
  if (!condition) throw new Error(`package check failed: ${what}`);
  console.log(`ok: ${what}`);
}

try {
  // 1. The tarball.
  const packed = JSON.parse(sh(npm, ['pack', '--json', '--pack-destination', work], root));
  const { filename, files, size, unpackedSize } = packed[0];
  console.log(
    `${filename}: ${(size / 1e6).toFixed(1)} MB packed, ${(unpackedSize / 1e6).toFixed(1)} MB unpacked, ${files.length} files`,
  );
  const paths = new Set(files.map((f) => f.path));
  for (const p of [
    'package.json',
    'LICENSE',
    'README.md',
    'bin/skytally.js',
    'bin/package.json',
    'dist/index.js',
    'dist/index.d.ts',
    'dist/worker.js',
    'dist/mathjs.cjs',
    'dist/random.cjs',
    'dist/cli/skytally.js',
  ]) {
    check(paths.has(p), `the tarball holds ${p}`);
  }
  check(
    [...paths].some((p) => p.endsWith('.js.map')),
    'the tarball holds source maps',
  );
  check(
    ![...paths].some((p) => p.startsWith('src/') || p.startsWith('test/')),
    'the tarball holds no sources or tests',
  );

  // 2. The consumer project.
  const consumer = join(work, 'consumer');
  mkdirSync(consumer);
  writeFileSync(
    join(consumer, 'package.json'),
    JSON.stringify({ name: 'skytally-consumer', private: true, type: 'module' }, null, 2),
  );
  sh(
    npm,
    [
      'install',
      '--prefer-offline',
      '--no-audit',
      '--no-fund',
      '--save-exact',
      join(work, filename),
      `typescript@${TYPESCRIPT_7}`,
    ],
    consumer,
  );
  const tsconfig = {
    compilerOptions: {
      target: 'ES2022',
      lib: ['ES2022'],
      module: 'NodeNext',
      moduleResolution: 'NodeNext',
      strict: true,
      skipLibCheck: false,
      types: [],
      outDir: 'out',
    },
    files: ['consumer.ts', 'survey.ts'],
  };
  writeFileSync(join(consumer, 'tsconfig.json'), JSON.stringify(tsconfig, null, 2));
  // The survey text comes as a module, so that the consumer needs no Node types to read a file.
  const surveyText = readFileSync(join(root, 'samples', 'halpha-narrowband.yaml'), 'utf8');
  writeFileSync(join(consumer, 'survey.ts'), `export default ${JSON.stringify(surveyText)};\n`);
  writeFileSync(
    join(consumer, 'consumer.ts'),
    `import { loadSurveyText, predict, SurveyError, type Prediction, type Survey } from 'skytally';
import text from './survey.js';

// The consumer's own one-line declaration: it has no type packages, not even Node's.
declare const console: { log(line: string): void };

const survey: Survey = loadSurveyText(text, 'survey.yaml');
const prediction: Prediction = predict(survey);
const count: number = prediction.totals.count;
// the breakdown tells whether the top level holds redshift slices (a discriminated union)
const slices: number[] = prediction.breakdown === 'redshift' ? prediction.slices.map((s) => s.count) : [];
let refused = '';
try {
  loadSurveyText('format: 1\\narea: -1\\n', 'bad.yaml');
} catch (err) {
  if (err instanceof SurveyError) refused = err.code;
}
console.log(JSON.stringify({ count, slices: slices.length, refused }));
`,
  );

  // 3. Both compilers.
  const tsc5 = join(root, 'node_modules', 'typescript', 'bin', 'tsc');
  const tsc7 = join(consumer, 'node_modules', 'typescript', 'bin', 'tsc');
  const v5 = sh(process.execPath, [tsc5, '--version'], consumer).trim();
  const v7 = sh(process.execPath, [tsc7, '--version'], consumer).trim();
  check(v5.startsWith('Version 5.9'), `TypeScript 5.9 is the project's compiler (${v5})`);
  check(v7 === `Version ${TYPESCRIPT_7}`, `TypeScript 7 is installed in the consumer (${v7})`);
  sh(process.execPath, [tsc7, '-p', 'tsconfig.json', '--noEmit'], consumer);
  check(true, 'the consumer compiles with TypeScript 7 against the packed declarations');
  sh(process.execPath, [tsc5, '-p', 'tsconfig.json'], consumer);
  check(true, 'the consumer compiles with TypeScript 5.9 against the packed declarations');

  // 4. It runs; CommonJS is refused.
  const result = JSON.parse(sh(process.execPath, [join('out', 'consumer.js')], consumer));
  check(
    result.count > 0 && result.slices > 0,
    `the consumer predicts ${result.count.toFixed(1)} sources in ${result.slices} slices`,
  );
  check(
    typeof result.refused === 'string' && result.refused.length > 0,
    `bad input is refused with an error code (${result.refused})`,
  );
  // The built files as installed: not minified, with source maps, never loading esbuild.
  const dist = join(consumer, 'node_modules', 'skytally', 'dist');
  const built = readdirSync(dist, { recursive: true, encoding: 'utf8' }).filter((f) => f.endsWith('.js'));
  let code = '';
  for (const f of built) {
    const text = readFileSync(join(dist, f), 'utf8');
    if (!/\/\/# sourceMappingURL=\S+\.js\.map\s*$/.test(text) || !existsSync(join(dist, `${f}.map`))) {
      throw new Error(`package check failed: dist/${f} has no source map`);
    }
    if (/\bimport\s*\(\s*["']esbuild["']\s*\)|from\s*["']esbuild["']/.test(text)) {
      throw new Error(`package check failed: dist/${f} loads esbuild`);
    }
    code += text;
  }
  check(built.length > 3, `${built.length} built files, each with its source map, none loading esbuild`);
  check(
    /function runBlocks\(/.test(code) && /function serveJobs\(/.test(code),
    'the built code is not minified (our names kept)',
  );

  // Both worker jobs in the installed program: two workers give exactly what one thread gives.
  const bin = join(consumer, 'node_modules', 'skytally', 'bin', 'skytally.js');
  // SKYTALLY_WORKER_MIN_MS=0: two real threads, however little work (src/parallel/blocks.ts)
  const forced = { ...process.env, SKYTALLY_WORKER_MIN_MS: '0' };
  const twoAndOne = (args) =>
    [2, 1].map((k) => sh(process.execPath, [bin, ...args, '--workers', String(k)], consumer, forced));
  writeFileSync(join(consumer, 'survey.yaml'), surveyText);
  const [mocks2, mocks1] = twoAndOne([
    'forecast',
    'survey.yaml',
    '--no-cosmic-variance',
    '--mocks',
    '8',
    '--format',
    'json',
  ]);
  check(JSON.parse(mocks2).mocks.count === 8 && mocks2 === mocks1, 'forecast mocks in two worker threads = in one');
  // The H-alpha plan sample made small: one tier, 12 exposures.
  const planText = readFileSync(join(root, 'samples', 'plan-halpha-layers.yaml'), 'utf8')
    .replace(/exposure_grid: \{[^}]*\}/, 'exposure_grid: {min_hours: 0.5, max_hours: 8, count: 12}')
    .replace('tiers: 2', 'tiers: 1');
  writeFileSync(join(consumer, 'plan.yaml'), planText);
  const [plan2, plan1] = twoAndOne(['plan', 'plan.yaml', '--format', 'json']);
  check(JSON.parse(plan2).designs.length > 0 && plan2 === plan1, 'plan depth tables in two worker threads = in one');
  const cjs = spawnSync(process.execPath, ['-e', "require('skytally')"], { cwd: consumer, encoding: 'utf8' });
  check(
    cjs.status !== 0 && /ERR_PACKAGE_PATH_NOT_EXPORTED|ERR_REQUIRE_ESM/.test(cjs.stderr),
    'require() of the package is refused: ES modules only',
  );
} finally {
  rmSync(work, { recursive: true, force: true });
}
