/**
 * What package.json promises, checked against what is installed and what ships:
 * - engines.node (for users) lies within every production dependency's own engines.node, and
 *   devEngines (for contributors) within every development dependency's, for every package in
 *   package-lock.json (semver.subset: every Node version we accept, each of them accepts);
 * - ES modules only: "type": "module", the entry exported with the "import" and "types"
 *   conditions alone (no "require", no "main"), and the description says so;
 * - the program's --version is package.json's version (no second copy of it);
 * - LICENSE is the MIT licence that package.json names.
 * The declarations compiling in a consumer project are checked from `npm pack` by
 * scripts/check-package.mjs (CI runs it).
 */
import { readFileSync } from 'node:fs';
import semver from 'semver';
import { describe, expect, test } from 'vitest';
import { runCli } from '../cli/helpers.js';

interface LockEntry {
  version?: string;
  dev?: boolean;
  engines?: { node?: string } | string[];
}

const pkg = JSON.parse(readFileSync('package.json', 'utf8'));
const lock = JSON.parse(readFileSync('package-lock.json', 'utf8')) as { packages: Record<string, LockEntry> };

describe('engines match the dependencies', () => {
  const entries = Object.entries(lock.packages).filter(([path]) => path !== '');
  const nodeRange = (e: LockEntry) => (e.engines && !Array.isArray(e.engines) ? e.engines.node : undefined);
  test.each([
    ['production', pkg.engines.node as string, false],
    ['development', pkg.devEngines.runtime.version as string, true],
  ])('%s dependencies accept every Node version in %s', (_kind, ours, dev) => {
    expect(semver.validRange(ours)).not.toBeNull();
    const refused = entries
      .filter(([, e]) => Boolean(e.dev) === dev && nodeRange(e) !== undefined)
      .filter(([, e]) => !semver.subset(ours, nodeRange(e)!))
      .map(([path, e]) => `${path}@${e.version} wants node ${nodeRange(e)}`);
    expect(refused).toEqual([]);
  });
  test("this machine's Node is accepted for development; users need 20.19.0 at least", () => {
    expect(semver.satisfies(process.versions.node, pkg.devEngines.runtime.version)).toBe(true);
    expect(semver.minVersion(pkg.engines.node)?.version).toBe('20.19.0');
  });
});

describe('ES modules only', () => {
  test('"type": "module"; the entry exported to import alone; the description says so', () => {
    expect(pkg.type).toBe('module');
    expect(pkg.main).toBeUndefined();
    expect(pkg.exports['.']).toEqual({ types: './dist/index.d.ts', import: './dist/index.js' });
    expect(JSON.stringify(pkg.exports)).not.toContain('require');
    expect(pkg.description).toMatch(/ES modules only/);
  });
});

describe('one version, one licence', () => {
  test('--version prints package.json version', async () => {
    const r = await runCli(['--version']);
    expect(r.code).toBe(0);
    expect(r.stdout.trim()).toBe(pkg.version);
  });
  test('LICENSE is the MIT licence named in package.json', () => {
    const text = readFileSync('LICENSE', 'utf8');
    expect(pkg.license).toBe('MIT');
    expect(text.split('\n')[0]).toBe('MIT License');
    expect(text).toMatch(/^Copyright \(c\) \d{4} skytally contributors$/m);
    expect(text).toContain('THE SOFTWARE IS PROVIDED "AS IS", WITHOUT WARRANTY OF ANY KIND');
  });
});
