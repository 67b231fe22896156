/**
 * Fuzz test (fast-check, fixed seed): mutated copies of the bundled sample surveys go through the
 * loader and `predict`, in-process through the program's own `run(argv, io)`. Every file must
 * end in one of two ways: exit 2 with exactly one sentence on stderr (warnings aside), or exit 0
 * with JSON whose every number is finite. Never exit 1 (an internal failure), never a stack
 * trace, never a hang (the loader's caps bound the work; the test's timeout would catch one).
 *
 * Mutations: values replaced by extreme numbers (1e308, 5e-324, -1e300, NaN, infinities), by
 * values of the wrong type, by hostile strings (units, expressions with poles or overflow,
 * hexadecimal, comments, control characters, paths to devices and to files that are not tables,
 * prototype names), numbers scaled by large powers of ten, keys deleted, renamed or repeated,
 * values wrapped in lists. Several mutations may apply to one file.
 */
import fc from 'fast-check';
import { cpSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { parse, stringify } from 'yaml';
import { runCli } from './helpers.js';

const SAMPLES = readdirSync('samples')
  .filter((f) => f.endsWith('.yaml'))
  .sort();
const BASES = SAMPLES.map((f) => parse(readFileSync(join('samples', f), 'utf8')) as unknown);

// In memory where the system offers it: two thousand small writes.
const dir = mkdtempSync(join(existsSync('/dev/shm') ? '/dev/shm' : tmpdir(), 'skytally-fuzz-'));
cpSync('samples/filters', join(dir, 'filters'), { recursive: true });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

type Path = (string | number)[];

/** Every place in the tree (the root excepted), depth first. */
function paths(v: unknown, at: Path = [], out: Path[] = []): Path[] {
  if (Array.isArray(v)) {
    v.forEach((x, i) => {
      out.push([...at, i]);
      paths(x, [...at, i], out);
    });
  } else if (v !== null && typeof v === 'object') {
    for (const [k, x] of Object.entries(v)) {
      out.push([...at, k]);
      paths(x, [...at, k], out);
    }
  }
  return out;
}

function parentOf(root: unknown, path: Path): Record<string | number, unknown> {
  let node = root as Record<string | number, unknown>;
  for (const k of path.slice(0, -1)) node = node[k] as Record<string | number, unknown>;
  return node;
}

const EXTREME_NUMBERS = [
  0,
  -0,
  1,
  -1,
  0.5,
  42,
  1e6,
  -1e6,
  1e300,
  -1e300,
  1e-300,
  -1e-300,
  1e308,
  5e-324,
  2 ** 53,
  1e-9,
  1e9,
  NaN,
  Infinity,
  -Infinity,
];

const HOSTILE_STRINGS = [
  '',
  'abc',
  '1e999',
  '5%',
  '0x10',
  '0b101',
  '1 # a comment',
  'z^1000',
  'exp(1000*z)',
  '1/(z-1)',
  '10^(400*z)',
  'log10(z - 5)',
  'sqrt(-1 - z)',
  '-1.35 - 0.1*z',
  '3 arcmin^2',
  '2 um',
  '-1 erg/s/cm^2',
  '1e-17 W/m^2',
  '90 min',
  '1e30 deg^2',
  '__proto__',
  'constructor',
  'toString',
  '/dev/zero',
  '/etc/passwd',
  '../../../../etc/hostname',
  'filters/nb-9200-invented.csv',
  'filters',
  'red \u001b[31m text\nsecond line',
  'x'.repeat(2000),
  'planck2018',
  'gaussian',
  'table',
  'magnitude',
  'luminosity',
  'threshold',
  'double_schechter',
  'auto',
];

const OTHER_VALUES: unknown[] = [
  null,
  true,
  false,
  [],
  {},
  [1, 2],
  { table: [] },
  {
    table: [
      [0, 1],
      [1, 2],
    ],
  },
  {
    table: [
      [1, 0],
      [0, 1],
    ],
  },
  {
    table: [
      [0, 1e300],
      [30, -1e300],
    ],
  },
  [[1, 2], [3]],
];

const valueArb = fc.oneof(
  fc.constantFrom(...EXTREME_NUMBERS),
  fc.double({ noNaN: false }),
  fc.constantFrom(...HOSTILE_STRINGS),
  fc.constantFrom(...OTHER_VALUES),
);

const mutationArb = fc.record({
  at: fc.nat(),
  op: fc.constantFrom(
    'replace',
    'replace',
    'replace',
    'delete',
    'scale',
    'negate',
    'rename',
    'wrap',
    'text',
    'nudge',
    'nudge',
    'nudge',
  ),
  value: valueArb,
  power: fc.constantFrom(-300, -30, -3, 3, 30, 300),
  /** For 'nudge': a plausible change of a number (valid files that are not the samples). */
  factor: fc.constantFrom(0.5, 0.9, 0.99, 1.01, 1.1, 2),
});

const caseArb = fc.record({
  sample: fc.nat({ max: BASES.length - 1 }),
  mutations: fc.array(mutationArb, { minLength: 1, maxLength: 3 }),
  /** Repeat one line of the YAML text (a repeated key where the line holds one). */
  repeatLine: fc.option(fc.nat(), { freq: 4 }),
  format: fc.constantFrom('json', 'json', 'json', 'table'),
});

type Mutation = { at: number; op: string; value: unknown; power: number; factor: number };

function mutate(base: unknown, muts: Mutation[]): unknown {
  const root = structuredClone(base);
  for (const m of muts) {
    const all = paths(root);
    if (all.length === 0) break;
    const path = all[m.at % all.length]!;
    const parent = parentOf(root, path);
    const key = path[path.length - 1]!;
    const old = parent[key];
    switch (m.op) {
      case 'replace':
        parent[key] = structuredClone(m.value);
        break;
      case 'delete':
        if (Array.isArray(parent)) parent.splice(key as number, 1);
        else delete parent[key];
        break;
      case 'scale':
        parent[key] =
          typeof old === 'number' ? old * 10 ** m.power : typeof old === 'string' ? `${old}e${m.power}` : m.value;
        break;
      case 'negate':
        parent[key] = typeof old === 'number' ? -old : typeof old === 'string' ? `-${old}` : m.value;
        break;
      case 'rename':
        if (!Array.isArray(parent)) {
          delete parent[key];
          parent[`${String(key)}s`] = old;
        }
        break;
      case 'wrap':
        parent[key] = [old];
        break;
      case 'nudge':
        if (typeof old === 'number') parent[key] = old === 0 ? m.factor - 1 : old * m.factor;
        break;
      case 'text':
        parent[key] = typeof old === 'number' ? String(old) : (JSON.stringify(old) ?? 'null');
        break;
    }
  }
  return root;
}

/** Every number in a parsed JSON value is finite (JSON.parse never yields NaN, but a null may hide one). */
function finiteEverywhere(v: unknown): boolean {
  if (typeof v === 'number') return Number.isFinite(v);
  if (Array.isArray(v)) return v.every(finiteEverywhere);
  if (v !== null && typeof v === 'object') return Object.values(v).every(finiteEverywhere);
  return true;
}

/** One check of one case: throws `what()` when `ok` is false. */
function check(ok: boolean, what: () => string): void {
  if (!ok) throw new Error(what());
}

describe('mutated sample surveys through the loader and predict', () => {
  test('2,000 files: exit 2 with one sentence, or exit 0 with finite JSON; never exit 1, a stack trace or a hang', async () => {
    const tally = { refused: 0, predicted: 0 };
    const file = join(dir, 'mutant.yaml');
    await fc.assert(
      fc.asyncProperty(caseArb, async (c) => {
        const obj = mutate(BASES[c.sample], c.mutations);
        let text = stringify(obj);
        if (c.repeatLine !== null) {
          const lines = text.split('\n');
          const i = c.repeatLine % lines.length;
          lines.splice(i, 0, lines[i]!);
          text = lines.join('\n');
        }
        writeFileSync(file, text);
        // Two draws of a model_uncertainty: every draw's numbers must be finite and nothing here is
        // statistical. Two draws run the same code per draw as five or twenty (each counted by the
        // exact path, below the table thresholds of src/counts/model-draws.ts; percentiles between
        // two order statistics) at a fraction of the cost. Only for a file that names the block:
        // --draws on a file without one is refused.
        const draws = text.includes('model_uncertainty') ? ['--draws', '2'] : [];
        const r = await runCli(['predict', file, '--format', c.format, ...draws]);
        // Each case's checks are plain tests that throw (fast-check reports the failing file and
        // shrinks it): the same checks as expect's matchers at a fraction of their cost per case.
        check([0, 2].includes(r.code), () => `exit ${r.code} for\n${text}\n${r.stderr}`);
        check(!r.stderr.includes('internal failure'), () => `internal failure for\n${text}\n${r.stderr}`);
        check(!/\n\s+at /.test(r.stderr), () => `a stack trace for\n${text}\n${r.stderr}`);
        const said = r.stderr.split('\n').filter((l) => l.length > 0 && !l.startsWith('skytally: warning: '));
        if (r.code === 2) {
          tally.refused++;
          check(said.length === 1, () => `${said.length} lines on stderr, not 1, for\n${text}\n${r.stderr}`);
          check(/^skytally: .+\.$/.test(said[0]!), () => `not one sentence: ${said[0]}`);
          check(r.stdout === '', () => `exit 2 with output on stdout for\n${text}`);
        } else {
          tally.predicted++;
          check(said.length === 0, () => `exit 0 with a message on stderr for\n${text}\n${r.stderr}`);
          if (c.format === 'json') {
            const json = JSON.parse(r.stdout) as { totals: { count: number } };
            check(finiteEverywhere(json), () => `a number that is not finite for\n${text}`);
            const count = json.totals.count;
            check(typeof count === 'number' && count >= 0, () => `total count ${count} for\n${text}`);
          } else {
            check(!/NaN|Infinity/.test(r.stdout), () => `NaN or Infinity in the table for\n${text}`);
          }
        }
      }),
      // A fixed seed: the same 2,000 files every run. SKYTALLY_FUZZ_SEED and SKYTALLY_FUZZ_RUNS
      // explore others (e.g. SKYTALLY_FUZZ_SEED=7 SKYTALLY_FUZZ_RUNS=20000 npx vitest run test/cli/fuzz.test.ts).
      {
        numRuns: Number(process.env.SKYTALLY_FUZZ_RUNS ?? 2000),
        seed: Number(process.env.SKYTALLY_FUZZ_SEED ?? 20251202),
        endOnFailure: true,
      },
    );
    // Both outcomes are exercised.
    expect(tally.refused).toBeGreaterThan(500);
    expect(tally.predicted).toBeGreaterThan(50);
  }, 600_000);
});
