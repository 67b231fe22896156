/**
 * Outputs of the built program, before and after a change that must not change them: every command
 * on every bundled sample (check, predict and forecast as text and JSON, plan on the plan samples,
 * report as JSON and HTML, predict's figures, compare of all samples, distances and clustering of
 * the presets), run in two built checkouts, each output compared byte for byte. Not a test (it runs
 * the built program some hundred times): a check to run before landing a speed-up.
 *
 *   npx tsx test/bench/outputs-diff.ts --before DIR [--root DIR] [filter]
 *
 * `--before DIR`: a built checkout of the earlier commit; `--root`: this one by default. Exits 1
 * when any output differs (or a run's exit code differs), listing them.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, existsSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const args = process.argv.slice(2);
let root = process.cwd();
let before: string | undefined;
let filter = '';
for (let i = 0; i < args.length; i++) {
  if (args[i] === '--root') root = resolve(args[++i]!);
  else if (args[i] === '--before') before = resolve(args[++i]!);
  else filter = args[i]!;
}
if (!before) throw new Error('outputs-diff: give --before DIR (a built checkout of the earlier commit)');

const samples = readdirSync(join(root, 'samples'))
  .filter((f) => f.endsWith('.yaml'))
  .sort();
interface Case {
  name: string;
  argv: string[];
}
const cases: Case[] = [];
for (const s of samples) {
  const file = `samples/${s}`;
  const isPlan = /^plan:/m.test(readFileSync(join(root, file), 'utf8'));
  for (const c of ['check', 'predict', 'forecast']) {
    cases.push({ name: `${c} ${s} text`, argv: [c, file] });
    cases.push({ name: `${c} ${s} json`, argv: [c, file, '--format', 'json'] });
  }
  if (isPlan) cases.push({ name: `plan ${s} json`, argv: ['plan', file, '--format', 'json'] });
  cases.push({ name: `report ${s} json`, argv: ['report', file, '--format', 'json'] });
  cases.push({ name: `report ${s} html`, argv: ['report', file, '--out', '{out}/report.html'] });
  cases.push({ name: `predict ${s} figures`, argv: ['predict', file, '--figures', '{out}/fig'] });
}
cases.push({
  name: 'compare all',
  argv: ['compare', ...samples.filter((s) => !/^(plan-|photoz|double-schechter)/.test(s)).map((s) => `samples/${s}`)],
});
for (const preset of ['planck2018', 'planck2015']) {
  cases.push({ name: `distances ${preset}`, argv: ['distances', '--preset', preset, '--z', '0.5,1,3,7'] });
  cases.push({ name: `clustering ${preset}`, argv: ['clustering', '--preset', preset, '--z', '0.5,1,3,7'] });
}

/**
 * One run: exit code, stdout, stderr and every file written under its own output directory (the
 * checkout's and the output directory's paths, which messages name, written as <root> and <out>).
 */
function run(dir: string, argv: string[]): Map<string, string> {
  const out = mkdtempSync(join(tmpdir(), 'skytally-outputs-'));
  try {
    const a = argv.map((x) => x.replace('{out}', out));
    for (const x of a) if (x.startsWith(out) && x.endsWith('/fig')) mkdirSync(x, { recursive: true });
    const r = spawnSync(process.execPath, ['bin/skytally.js', ...a], { cwd: dir, encoding: 'latin1' });
    const paths = (text: string) => text.replaceAll(out, '<out>').replaceAll(dir, '<root>');
    const got = new Map<string, string>([
      ['exit', String(r.status)],
      ['stdout', paths(r.stdout)],
      ['stderr', paths(r.stderr)],
    ]);
    const walk = (d: string, rel: string): void => {
      if (!existsSync(d)) return;
      for (const e of readdirSync(d, { withFileTypes: true })) {
        if (e.isDirectory()) walk(join(d, e.name), `${rel}${e.name}/`);
        else got.set(`${rel}${e.name}`, paths(readFileSync(join(d, e.name), 'latin1')));
      }
    };
    walk(out, '');
    return got;
  } finally {
    rmSync(out, { recursive: true, force: true });
  }
}

let differ = 0;
let compared = 0;
for (const c of cases) {
  if (filter && !c.name.includes(filter)) continue;
  const a = run(before, c.argv);
  const b = run(root, c.argv);
  const keys = new Set([...a.keys(), ...b.keys()]);
  const bad = [...keys].filter((k) => a.get(k) !== b.get(k));
  compared++;
  if (bad.length) {
    differ++;
    console.log(`DIFFERS ${c.name}: ${bad.join(', ')}`);
  } else console.log(`same    ${c.name} (${keys.size - 3} files, exit ${a.get('exit')})`);
}
console.log(`${compared} cases, ${differ} differ`);
process.exitCode = differ ? 1 : 0;
