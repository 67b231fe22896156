/**
 * Whole-process start-up of the built program: every command on every bundled sample, as a ratio
 * to bare `node -e 0`. Each process is timed by wait4; the table gives the median of the
 * runs of CPU time (user + sys, which a loaded machine barely changes) and of wall time, and the
 * largest resident set. Bare node runs between the cases' runs (one per run), and each case's
 * ratio is to the median of its own bare runs, so that a load that changes during the bench moves
 * both alike. Not a test: figures to report. Run `npm run build` first.
 *
 *   npx tsx test/bench/startup.ts [--root DIR] [--before DIR] [--runs N] [filter]
 *
 * `--root DIR`: a built checkout of another commit; default this one. `--before DIR`: a built
 * checkout of an earlier commit, run in turn with the root's (same load) and shown beside it.
 * Commands whose output is JSON write it to a temporary file; `report` writes HTML.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { readdirSync, readFileSync, rmSync } from 'node:fs';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const args = process.argv.slice(2);
let root = process.cwd();
let before: string | undefined;
let runs = 5;
let filter = '';
for (let i = 0; i < args.length; i++) {
  if (args[i] === '--root') root = resolve(args[++i]!);
  else if (args[i] === '--before') before = resolve(args[++i]!);
  else if (args[i] === '--runs') runs = Number(args[++i]);
  else filter = args[i]!;
}

interface Sample {
  cpu: number;
  wall: number;
  rssKb: number;
}

const dir = mkdtempSync(join(tmpdir(), 'skytally-startup-'));
const node = process.execPath;

/**
 * One process: user+sys and peak RSS from wait4 (microsecond resolution, unlike /usr/bin/time's
 * hundredths), wall from a monotonic clock. python3 starts it and is not itself measured.
 */
const WAIT4 = [
  'import os, subprocess, sys, time',
  't = time.perf_counter()',
  'p = subprocess.Popen(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)',
  'err = p.stderr.read()',
  '_, status, ru = os.wait4(p.pid, 0)',
  'w = time.perf_counter() - t',
  'sys.stderr.write(err.decode(errors="replace")[:300])',
  'print(os.waitstatus_to_exitcode(status), ru.ru_utime + ru.ru_stime, w, ru.ru_maxrss)',
].join('\n');

function measure(argv: string[], cwd = root): Sample {
  const r = spawnSync('/usr/bin/python3', ['-c', WAIT4, node, ...argv], { cwd, encoding: 'utf8' });
  const [code, cpu, wall, rss] = r.stdout.trim().split(/\s+/).map(Number);
  if (code !== 0) throw new Error(`${argv.join(' ')} failed (${code}): ${r.stderr}`);
  return { cpu: cpu!, wall: wall!, rssKb: rss! };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

interface Summary {
  cpu: number;
  wall: number;
  rssKb: number;
}

function summarise(xs: Sample[]): Summary {
  return {
    cpu: median(xs.map((x) => x.cpu)),
    wall: median(xs.map((x) => x.wall)),
    rssKb: Math.max(...xs.map((x) => x.rssKb)),
  };
}

/** The case in each checkout (root, then before when given) and bare node, in turn, `runs` times. */
function summary(argv: string[]): { base: Summary; after: Summary; before?: Summary } {
  const roots = before ? [root, before] : [root];
  for (const r of roots) measure(argv, r); // warm the file cache
  const base: Sample[] = [];
  const xs: Sample[][] = roots.map(() => []);
  for (let i = 0; i < runs; i++) {
    base.push(measure(['-e', '0']));
    roots.forEach((r, k) => xs[k]!.push(measure(argv, r)));
  }
  return {
    base: summarise(base),
    after: summarise(xs[0]!),
    ...(before ? { before: summarise(xs[1]!) } : {}),
  };
}

const samples = readdirSync(join(root, 'samples'))
  .filter((f) => f.endsWith('.yaml'))
  .sort();
const json = join(dir, 'out.json');
const html = join(dir, 'out.html');
const txt = join(dir, 'out.txt');
const cases: { name: string; argv: string[] }[] = [];
for (const s of samples) {
  const file = `samples/${s}`;
  const isPlan = /^plan:/m.test(readFileSync(join(root, file), 'utf8'));
  cases.push({ name: `predict ${s}`, argv: ['bin/skytally.js', 'predict', file, '--format', 'json', '--out', json] });
  // the default format, the README's quick start: the table asks for the counts' model draws only
  cases.push({ name: `predict-table ${s}`, argv: ['bin/skytally.js', 'predict', file, '--out', txt] });
  cases.push({ name: `check ${s}`, argv: ['bin/skytally.js', 'check', file, '--format', 'json', '--out', json] });
  cases.push({ name: `forecast ${s}`, argv: ['bin/skytally.js', 'forecast', file, '--format', 'json', '--out', json] });
  if (isPlan)
    cases.push({ name: `plan ${s}`, argv: ['bin/skytally.js', 'plan', file, '--format', 'json', '--out', json] });
  cases.push({ name: `report ${s}`, argv: ['bin/skytally.js', 'report', file, '--out', html] });
}

const rev = (() => {
  try {
    return execFileSync('git', ['rev-parse', '--short', 'HEAD'], { cwd: root, encoding: 'utf8' }).trim();
  } catch {
    return '?';
  }
})();
console.log(`root ${root} (${rev})${before ? `, before ${before}` : ''}, ${runs} runs, median`);
const cols = (label: string) =>
  `${(label + 'cpu ms').padStart(11)} ${'x node'.padStart(7)} ${(label + 'wall ms').padStart(12)} ${'x node'.padStart(7)} ${(label + 'RSS MB').padStart(10)}`;
console.log(`${'case'.padEnd(40)} ${'node cpu'.padStart(8)} ${cols('')}${before ? ' ' + cols('b:') : ''}`);
const fmt = (m: Summary, base: Summary) =>
  `${(m.cpu * 1000).toFixed(0).padStart(11)} ${(m.cpu / base.cpu).toFixed(2).padStart(7)} ` +
  `${(m.wall * 1000).toFixed(0).padStart(12)} ${(m.wall / base.wall).toFixed(2).padStart(7)} ${(m.rssKb / 1024).toFixed(0).padStart(10)}`;
try {
  for (const c of cases) {
    if (filter && !c.name.includes(filter)) continue;
    let row: string;
    try {
      const m = summary(c.argv);
      row =
        `${c.name.padEnd(40)} ${(m.base.cpu * 1000).toFixed(0).padStart(8)} ${fmt(m.after, m.base)}` +
        (m.before ? ' ' + fmt(m.before, m.base) : '');
    } catch (e) {
      const message = (e as Error).message.split('\n')[0]!;
      // exit status 2 is a refusal: forecasts refuse a double Schechter population and photometric
      // redshifts by design, so those rows are not failures
      row = / failed \(2\): /.test(message)
        ? `${c.name.padEnd(40)} refused (exit 2), not measured: ${message.replace(/^.* failed \(2\): /, '').slice(0, 120)}`
        : `${c.name.padEnd(40)} failed: ${message}`;
    }
    console.log(row);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
