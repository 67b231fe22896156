/**
 * Where outputs go (src/cli/io.ts): --out through links, into pipes and devices, "-" for standard
 * output, refused where it cannot be written (one sentence, exit 2, never raw system text); no
 * output ever replaces an input (compared by device and inode); all or nothing (nothing is
 * written unless every output is ready; no temporary file left behind); a closed pipe ends the
 * program quietly with status 0.
 */
import { tempDir } from '../support/temp.js';
import { spawn, spawnSync, execFileSync } from 'node:child_process';
import {
  cpSync,
  existsSync,
  linkSync,
  lstatSync,
  mkdirSync,
  readFileSync,
  readdirSync,
  statSync,
  symlinkSync,
  writeFileSync,
} from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runCli, type Captured } from './helpers.js';
import { run, type CliIO } from '../../src/cli/index.js';
import { useExploreScript } from '../support/explore-script.js';
import { sampleReport } from '../support/sample-reports.js';

const SAMPLE = 'samples/halpha-narrowband.yaml';

function tmp(): string {
  return tempDir('skytally-out-');
}

/** Exit 2 with one sentence on stderr, nothing on stdout, and no raw system error text. */
function refused(r: Captured): void {
  expect(r.code, r.stderr).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.trim().split('\n');
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^skytally: .+\.$/);
  // (paths left out: a temporary folder's random name, skytally-out-EAIQGB, is not an error code)
  expect(r.stderr.replace(/\S*\/\S*/g, '<path>')).not.toMatch(/\b(E[A-Z]{3,}|errno|syscall)\b/);
  expect(r.stderr).not.toContain('internal failure');
}

/** No staged temporary file left in `dir`. */
function noTemporaryFiles(dir: string): void {
  expect(readdirSync(dir).filter((f) => f.endsWith('.tmp') || f.includes('.tmp-'))).toEqual([]);
}

describe('--out: what it names decides how it is written', () => {
  test('a symbolic link: the file it points to is replaced, the link stays a link', async () => {
    const dir = tmp();
    const real = join(dir, 'real.json');
    const link = join(dir, 'link.json');
    writeFileSync(real, 'old');
    symlinkSync('real.json', link);
    const r = await runCli(['predict', SAMPLE, '--format', 'json', '--out', link]);
    expect(r.code, r.stderr).toBe(0);
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(JSON.parse(readFileSync(real, 'utf8')).format).toBe(1);
    noTemporaryFiles(dir);
  });

  test('a replaced file keeps its permissions', async () => {
    const dir = tmp();
    const out = join(dir, 'out.json');
    writeFileSync(out, 'old', { mode: 0o640 });
    const r = await runCli(['predict', SAMPLE, '--format', 'json', '--out', out]);
    expect(r.code).toBe(0);
    expect(statSync(out).mode & 0o777).toBe(0o640);
  });

  test('a FIFO is written into, not replaced', async () => {
    const dir = tmp();
    const fifo = join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    const reader = spawn('cat', [fifo]);
    let received = '';
    reader.stdout.on('data', (d: Buffer) => (received += d.toString()));
    const done = new Promise<void>((res) => reader.on('close', () => res()));
    try {
      const r = await runCli(['predict', SAMPLE, '--format', 'json', '--out', fifo]);
      expect(r.code, r.stderr).toBe(0);
      expect(lstatSync(fifo).isFIFO()).toBe(true);
      await done;
      expect(JSON.parse(received).format).toBe(1);
    } finally {
      reader.kill();
    }
  });

  test('a character device is written into, not replaced (/dev/full: one sentence, the device is full)', async () => {
    if (!existsSync('/dev/full') || !statSync('/dev/full').isCharacterDevice()) return;
    const r = await runCli(['predict', SAMPLE, '--out', '/dev/full']);
    refused(r);
    expect(r.stderr).toContain('--out');
    expect(statSync('/dev/full').isCharacterDevice()).toBe(true);
    const n = await runCli(['predict', SAMPLE, '--out', '/dev/null']);
    expect(n.code).toBe(0);
    expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
  });

  test('"-" is standard output', async () => {
    const r = await runCli(['predict', SAMPLE, '--format', 'json', '--out', '-']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).format).toBe(1);
    expect(existsSync('-')).toBe(false);
  });

  test('report --out - writes the HTML to standard output', async () => {
    const r = await runCli(['report', 'samples/slitless-halpha.yaml', '--out', '-']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout.startsWith('<!DOCTYPE html>') || r.stdout.startsWith('<!doctype html>')).toBe(true);
    expect(existsSync('-')).toBe(false);
    // the document `--out FILE` writes (made once per run: test/support/sample-reports.ts)
    expect(r.stdout).toBe(readFileSync((await sampleReport('slitless-halpha.yaml')).html, 'utf8'));
  }, 120_000);

  test.each([
    ['a file under /proc', () => '/proc/skytally-test.json'],
    [
      'a file in a folder that does not exist (probably a mistyped path; not created)',
      () => join(tmp(), 'no', 'such', 'x.json'),
    ],
    ['a folder', () => tmp()],
    ['an empty path', () => ''],
  ])('refused: %s', async (_what, path) => {
    const p = path();
    const r = await runCli(['predict', SAMPLE, '--out', p]);
    refused(r);
    expect(r.stderr).toContain('--out');
    if (p.includes('no/such')) expect(existsSync(join(p, '..', '..'))).toBe(false);
  });

  test.skipIf(typeof process.getuid === 'function' && process.getuid() === 0)(
    'a folder without write permission: one sentence',
    async () => {
      const dir = tmp();
      const ro = join(dir, 'ro');
      mkdirSync(ro, { mode: 0o555 });
      const r = await runCli(['predict', SAMPLE, '--out', join(ro, 'x.json')]);
      refused(r);
      expect(r.stderr).toContain('permission is denied');
    },
  );
});

describe('no output replaces an input (compared by device and inode, links resolved)', () => {
  function copySamples(): string {
    const dir = tmp();
    cpSync('samples', join(dir, 'samples'), { recursive: true });
    return join(dir, 'samples');
  }

  test('--out naming the filter table the survey reads', async () => {
    const s = copySamples();
    const csv = join(s, 'filters', 'nb-9200-invented.csv');
    const before = readFileSync(csv, 'utf8');
    const r = await runCli(['predict', join(s, 'narrowband-interlopers.yaml'), '--out', csv]);
    refused(r);
    expect(readFileSync(csv, 'utf8')).toBe(before);
  });

  test('distances and clustering --survey: --out naming a table that survey reads', async () => {
    const s = copySamples();
    const csv = join(s, 'filters', 'nb-9200-invented.csv');
    const before = readFileSync(csv, 'utf8');
    for (const command of ['distances', 'clustering']) {
      refused(await runCli([command, '--z', '1', '--survey', join(s, 'narrowband-interlopers.yaml'), '--out', csv]));
      expect(readFileSync(csv, 'utf8')).toBe(before);
    }
  });

  test('--out naming the filter table through a symbolic link to its folder', async () => {
    const s = copySamples();
    symlinkSync(join(s, 'filters'), join(s, 'linked'));
    const csv = join(s, 'filters', 'nb-9200-invented.csv');
    const before = readFileSync(csv, 'utf8');
    const r = await runCli([
      'predict',
      join(s, 'narrowband-interlopers.yaml'),
      '--out',
      join(s, 'linked', 'nb-9200-invented.csv'),
    ]);
    refused(r);
    expect(readFileSync(csv, 'utf8')).toBe(before);
  });

  test('the survey reached through a symbolic link, --out naming the file itself', async () => {
    const s = copySamples();
    const real = join(s, 'halpha-narrowband.yaml');
    const link = join(s, 'link.yaml');
    symlinkSync(real, link);
    const before = readFileSync(real, 'utf8');
    const r = await runCli(['predict', link, '--out', real]);
    refused(r);
    expect(readFileSync(real, 'utf8')).toBe(before);
    const r2 = await runCli(['report', link, '--out', real]);
    refused(r2);
    expect(readFileSync(real, 'utf8')).toBe(before);
  });

  test('--out naming a hard link of the survey', async () => {
    const s = copySamples();
    const real = join(s, 'mass-limited.yaml');
    const hard = join(s, 'hard.yaml');
    linkSync(real, hard);
    const before = readFileSync(real, 'utf8');
    for (const command of ['check', 'predict']) {
      refused(await runCli([command, real, '--out', hard]));
      expect(readFileSync(real, 'utf8')).toBe(before);
    }
    refused(await runCli(['compare', real, join(s, 'double-schechter-mass.yaml'), '--out', hard]));
    refused(await runCli(['distances', '--z', '1', '--survey', real, '--out', hard]));
    expect(readFileSync(real, 'utf8')).toBe(before);
  });

  test('--figures into the folder holding an input whose name a figure has', async () => {
    const dir = tmp();
    const survey = join(dir, 'counts.svg');
    writeFileSync(survey, readFileSync('samples/mass-limited.yaml', 'utf8'));
    const r = await runCli(['predict', survey, '--figures', dir]);
    refused(r);
    expect(readFileSync(survey, 'utf8')).toBe(readFileSync('samples/mass-limited.yaml', 'utf8'));
    expect(readdirSync(dir)).toEqual(['counts.svg']);
  });
});

describe('all or nothing', () => {
  test('--out x.json with a --figures folder that cannot be written: x.json is not written either', async () => {
    const dir = tmp();
    const out = join(dir, 'x.json');
    const r = await runCli([
      'predict',
      'samples/mass-limited.yaml',
      '--format',
      'json',
      '--out',
      out,
      '--figures',
      '/proc/skytally-figures',
    ]);
    refused(r);
    expect(existsSync(out)).toBe(false);
    noTemporaryFiles(dir);
  }, 120_000);

  test('a figure that cannot be written (a folder has its name): neither the report nor any figure is written, no temporary file left', async () => {
    const dir = tmp();
    const figs = join(dir, 'figs');
    mkdirSync(join(figs, 'histograms.svg'), { recursive: true });
    const out = join(dir, 'report.html');
    const r = await runCli(['report', 'samples/slitless-halpha.yaml', '--out', out, '--figures', figs]);
    refused(r);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(figs)).toEqual(['histograms.svg']);
    noTemporaryFiles(dir);
    noTemporaryFiles(figs);
  }, 120_000);

  test('--figures folders that did not exist are not left behind when writing fails', async () => {
    const dir = tmp();
    const out = join(dir, 'sub');
    mkdirSync(out);
    // --out names a folder: refused before any work, and no figures folder is created
    const r = await runCli([
      'predict',
      'samples/mass-limited.yaml',
      '--out',
      out,
      '--figures',
      join(dir, 'new', 'figs'),
    ]);
    refused(r);
    expect(existsSync(join(dir, 'new'))).toBe(false);
  });
});

describe('a closed pipe ends the program quietly with status 0', () => {
  // The program as a process (its own main, from the sources): `| head -1` closes the pipe early.
  const runner = join('test', 'cli', 'main-runner.ts');
  const zs = Array.from({ length: 1000 }, (_, i) => (i * 0.01).toFixed(2)).join(',');
  test.each([['distances, JSON', `distances --z ${zs} --format json`]])(
    '%s | head -1',
    (_name, args) => {
      const err = join(tmp(), 'stderr.txt');
      const r = spawnSync(
        'bash',
        [
          '-c',
          `node --import tsx ${runner} ${args} 2>${err} | head -1 >/dev/null; echo "\${PIPESTATUS[0]}"; cat ${err}`,
        ],
        {
          encoding: 'utf8',
          cwd: process.cwd(),
        },
      );
      const [status, ...rest] = r.stdout.split('\n');
      expect(rest.join('\n').trim()).toBe('');
      expect(status).toBe('0');
    },
    60_000,
  );
});

describe('HTML is not printed on a terminal', () => {
  // Common practice for programs that write large or binary documents: refuse a terminal, not a pipe.
  const runOnTerminal = async (argv: string[]): Promise<Captured> => {
    let stdout = '';
    let stderr = '';
    const io: CliIO = {
      stdout: (s) => (stdout += s),
      stderr: (s) => (stderr += s),
      cwd: process.cwd(),
      stderrIsTTY: false,
      stdoutIsTTY: true,
    };
    return { code: await run(argv, io), stdout, stderr };
  };
  test.each([
    ['explore', ['explore', 'samples/halpha-narrowband.yaml']],
    ['report', ['report', 'samples/halpha-narrowband.yaml']],
  ])('%s without --out on a terminal: one sentence naming --out, exit 2, nothing printed', async (command, argv) => {
    const r = await runOnTerminal(argv);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(new RegExp(`^skytally: ${command} --out: .*terminal.*give --out FILE\\.html`));
  });
  test('report --format json on a terminal is printed (it is text, not a page)', async () => {
    const r = await runOnTerminal(['report', 'samples/halpha-narrowband.yaml', '--format', 'json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).prediction).toBeDefined();
  });
  test('explore --out - on a terminal prints the page anyway', async () => {
    await useExploreScript();
    const r = await runOnTerminal(['explore', 'samples/halpha-narrowband.yaml', '--out', '-']);
    expect(r.code).toBe(0);
    expect(r.stdout.startsWith('<!DOCTYPE html>')).toBe(true);
  });
});
