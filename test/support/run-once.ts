/**
 * What several test files need and is costly to make, made once per test run in the run's
 * temporary directory (test/support/global-setup.ts), so that the other worker thread reuses it:
 * the first to ask makes it in a private folder, then renames the folder into place, so a reader
 * never sees half of it. While one thread makes it, a marker file says so and the other thread
 * waits for it rather than making it a second time (it makes its own copy only when the maker gave
 * up without one, or after ten minutes). Only for things that depend on their name alone (the files
 * in samples/, which no test changes, and the sources).
 */
import { existsSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { threadId } from 'node:worker_threads';
import { TEST_ROOT_VARIABLE, tempDir } from './temp.js';

/** Longest wait for the other thread's copy before making one's own (the set-up hooks' timeout). */
const WAIT_MS = 600_000;

/** This thread's requests by name, so that one thread never waits for itself. */
const asked = new Map<string, Promise<string>>();

async function make(shared: string, build: (dir: string) => Promise<void>): Promise<string> {
  const marker = `${shared}.making`;
  let mine = false;
  try {
    writeFileSync(marker, String(threadId), { flag: 'wx' });
    mine = true;
  } catch {
    // the other thread is making it: wait until it is in place or the marker is gone
    const until = Date.now() + WAIT_MS;
    while (!existsSync(shared) && existsSync(marker) && Date.now() < until) await sleep(50);
    if (existsSync(shared)) return shared;
  }
  try {
    const own = tempDir('skytally-once-');
    await build(own);
    try {
      renameSync(own, shared);
    } catch (e) {
      // the other thread renamed its own copy into place first: read that one
      if (!existsSync(shared)) throw e;
    }
    return shared;
  } finally {
    if (mine) rmSync(marker, { force: true });
  }
}

/** The run's folder `name` (letters, digits, - and _), made by `build(folder)` unless a thread made it before. */
export function madeOncePerRun(name: string, build: (dir: string) => Promise<void>): Promise<string> {
  const root = process.env[TEST_ROOT_VARIABLE];
  if (!root) throw new Error(`${TEST_ROOT_VARIABLE} is not set: run the tests through vitest`);
  const shared = join(root, `once-${name.replace(/[^A-Za-z0-9_-]/g, '_')}`);
  let p = asked.get(shared);
  if (!p) {
    p = existsSync(shared) ? Promise.resolve(shared) : make(shared, build);
    asked.set(shared, p);
  }
  return p;
}
