/**
 * Machine instructions per warm library call, counted by valgrind's callgrind: a measure of work
 * that does not depend on how busy the machine is (wall-clock medians do). Usage:
 *
 *     npx tsx test/bench/instructions.ts [--root DIR] [--runs N] [filter]
 *
 * For each case a small driver is bundled with esbuild from DIR's sources (default: this tree; a
 * checkout of an older commit gives "before" figures), then run under
 * `valgrind --tool=callgrind` twice: with W warm-up calls only, and with W + N calls. The
 * difference divided by N is the cost of one warm call (start-up, parsing and JIT warm-up cancel).
 * Node runs with --single-threaded so that background compilation does not blur the counts; the
 * counts still vary by about 1 % from run to run. Needs valgrind (apt-get install valgrind).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

const args = process.argv.slice(2);
const opt = (name: string): string | undefined => {
  const i = args.indexOf(name);
  if (i < 0) return undefined;
  const v = args[i + 1];
  args.splice(i, 2);
  return v;
};
const root = resolve(opt('--root') ?? fileURLToPath(new URL('../../', import.meta.url)));
const runs = Number(opt('--runs') ?? 20);
const warm = 20;
const filter = args[0] ?? '';

/** Driver cases: a survey (sample plus edits) and predict options; `area` varies the area per call. */
const CASES: { name: string; sample: string; edits: [string, string][]; options: string; varyArea?: boolean }[] = [
  {
    name: 'halpha 10 slices: histograms + completeness + cosmic variance',
    sample: 'halpha-narrowband.yaml',
    edits: [['slices: {count: 5}', 'slices: {count: 10}']],
    options: '{}',
  },
  {
    name: 'halpha 10 slices: the same, area changed every call',
    sample: 'halpha-narrowband.yaml',
    edits: [['slices: {count: 5}', 'slices: {count: 10}']],
    options: '{}',
    varyArea: true,
  },
  {
    name: 'halpha 10 slices: histograms + completeness, no uncertainty',
    sample: 'halpha-narrowband.yaml',
    edits: [['slices: {count: 5}', 'slices: {count: 10}']],
    options: '{ noUncertainty: true }',
  },
  {
    name: 'halpha 10 slices: histograms + cosmic variance, no completeness',
    sample: 'halpha-narrowband.yaml',
    edits: [
      ['slices: {count: 5}', 'slices: {count: 10}'],
      ['  completeness: {model: logistic, half: 5e-17, width: 0.08}\n', ''],
    ],
    options: '{}',
  },
  {
    name: 'halpha 10 slices: histograms only',
    sample: 'halpha-narrowband.yaml',
    edits: [
      ['slices: {count: 5}', 'slices: {count: 10}'],
      ['  completeness: {model: logistic, half: 5e-17, width: 0.08}\n', ''],
    ],
    options: '{ noUncertainty: true }',
  },
  {
    name: 'deep continuum 8 slices: table completeness + cosmic variance',
    sample: 'deep-continuum.yaml',
    edits: [],
    options: '{}',
  },
  {
    name: 'mass-limited 10 slices: cosmic variance',
    sample: 'mass-limited.yaml',
    edits: [['slices: {edges: [0.3, 0.5, 0.7, 0.9, 1.2, 1.5]}', 'slices: {count: 10}']],
    options: '{}',
  },
];

function driver(c: (typeof CASES)[number]): string {
  return `
import { readFileSync } from 'node:fs';
import { loadSurveyText } from ${JSON.stringify(join(root, 'src/survey/load.ts'))};
import { predict } from ${JSON.stringify(join(root, 'src/counts/predict.ts'))};
let text = readFileSync(${JSON.stringify(join(root, 'samples', c.sample))}, 'utf8');
for (const [a, b] of ${JSON.stringify(c.edits)}) { if (!text.includes(a)) throw new Error('edit not found: ' + a); text = text.replace(a, b); }
const survey = loadSurveyText(text, ${JSON.stringify(join(root, 'samples', c.sample))});
const n = Number(process.argv[2]);
let sink = 0;
for (let i = 0; i < n; i++) {
  const s = ${c.varyArea ? '{ ...survey, areaSr: survey.areaSr * (1 + 0.01 * i), areaDeg2: survey.areaDeg2 * (1 + 0.01 * i) }' : 'survey'};
  sink += predict(s, ${c.options}).totals.count;
}
if (!(sink > 0)) throw new Error('no count');
`;
}

function instructions(bundle: string, calls: number): number {
  const r = spawnSync(
    'valgrind',
    [
      '--tool=callgrind',
      '--callgrind-out-file=/dev/null',
      process.execPath,
      '--single-threaded',
      bundle,
      String(calls),
    ],
    {
      stdio: ['ignore', 'ignore', 'pipe'],
      encoding: 'utf8',
      maxBuffer: 1 << 26,
    },
  );
  const m = /Collected : (\d+)/.exec(r.stderr ?? '');
  if (r.status !== 0 || !m) throw new Error(`valgrind failed (is it installed?): ${r.error?.message ?? r.stderr}`);
  return Number(m[1]);
}

const dir = mkdtempSync(join(tmpdir(), 'skytally-instructions-'));
try {
  console.log(
    `instructions per warm predict (callgrind), sources from ${root}, ${runs} calls after ${warm} warm-up calls`,
  );
  for (const c of CASES) {
    if (filter && !c.name.includes(filter)) continue;
    const entry = join(dir, 'driver.ts');
    writeFileSync(entry, driver(c));
    const bundle = join(dir, 'driver.mjs');
    await build({
      entryPoints: [entry],
      outfile: bundle,
      bundle: true,
      format: 'esm',
      platform: 'node',
      target: 'node20',
      logLevel: 'warning',
      external: ['playwright-core', '@resvg/resvg-js'],
      banner: { js: "import { createRequire as __r } from 'node:module'; const require = __r(import.meta.url);" },
    });
    const base = instructions(bundle, warm);
    const full = instructions(bundle, warm + runs);
    console.log(`${c.name.padEnd(70)} ${((full - base) / runs / 1e6).toFixed(2).padStart(9)} M instructions per call`);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
