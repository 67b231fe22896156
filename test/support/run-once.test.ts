/**
 * test/support/run-once.ts: a folder made once per run. One build for requests at the same time,
 * none when the folder is in place; a marker left by another thread is waited for, and when that
 * thread gives up (the marker gone, no folder) the folder is built here.
 */
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { describe, expect, test } from 'vitest';
import { madeOncePerRun } from './run-once.js';
import { TEST_ROOT_VARIABLE } from './temp.js';

const unique = (what: string) => `${what}-${process.pid}-${Date.now()}-${Math.random().toString(36).slice(2)}`;
const at = (name: string) => join(process.env[TEST_ROOT_VARIABLE]!, `once-${name}`);

describe('madeOncePerRun', () => {
  test('requests at the same time build once; the folder holds what the build wrote', async () => {
    const name = unique('same-time');
    let builds = 0;
    const build = async (dir: string) => {
      builds++;
      await sleep(20);
      writeFileSync(join(dir, 'x.txt'), 'made');
    };
    const [a, b] = await Promise.all([madeOncePerRun(name, build), madeOncePerRun(name, build)]);
    expect(a).toBe(b);
    expect(builds).toBe(1);
    expect(readFileSync(join(a, 'x.txt'), 'utf8')).toBe('made');
    expect(existsSync(`${a}.making`)).toBe(false);
  });

  test('a folder another thread put in place is read, not built again', async () => {
    const name = unique('in-place');
    mkdirSync(at(name));
    writeFileSync(join(at(name), 'x.txt'), 'theirs');
    const dir = await madeOncePerRun(name, () => Promise.reject(new Error('built although in place')));
    expect(readFileSync(join(dir, 'x.txt'), 'utf8')).toBe('theirs');
  });

  test("another thread's marker: waits for its folder, then reads it", async () => {
    const name = unique('waits');
    writeFileSync(`${at(name)}.making`, 'other');
    let built = false;
    const p = madeOncePerRun(name, () => {
      built = true;
      return Promise.resolve();
    });
    await sleep(150);
    // the other thread finishes: its folder renamed into place, its marker removed
    mkdirSync(at(name));
    writeFileSync(join(at(name), 'x.txt'), 'theirs');
    rmSync(`${at(name)}.making`);
    const dir = await p;
    expect(built).toBe(false);
    expect(readFileSync(join(dir, 'x.txt'), 'utf8')).toBe('theirs');
  });

  test('the other thread gives up (marker gone, no folder): the folder is built here', async () => {
    const name = unique('gave-up');
    writeFileSync(`${at(name)}.making`, 'other');
    const p = madeOncePerRun(name, (dir) => Promise.resolve(writeFileSync(join(dir, 'x.txt'), 'ours')));
    await sleep(150);
    rmSync(`${at(name)}.making`);
    expect(readFileSync(join(await p, 'x.txt'), 'utf8')).toBe('ours');
  });

  test('a build that fails leaves no marker and no folder', async () => {
    const name = unique('fails');
    await expect(madeOncePerRun(name, () => Promise.reject(new Error('no')))).rejects.toThrow('no');
    expect(existsSync(at(name))).toBe(false);
    expect(existsSync(`${at(name)}.making`)).toBe(false);
  });
});
