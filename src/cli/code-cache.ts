/**
 * Start-up of the command-line program: its CommonJS bundles (dist/cli/skytally.cjs, and
 * dist/vega.cjs when a figure is drawn) are compiled with V8's code cache, the compiled bytecode
 * that `npm run build` writes beside each bundle (`<bundle>.cache`, scripts/code-cache.mjs) after
 * running the program over the samples. Reading the cache skips parsing the bundle and compiling
 * the functions the build's runs used. V8 checks a cache against its own version and flags and
 * the source's length; the cache file also starts with the CRC-32 of the bundle it was recorded
 * for. Whenever it does not fit (another Node version, a changed bundle) the bundle is compiled
 * from the source as usual: the cache changes how fast the program starts, never what it does.
 *
 * Bundled on its own into dist/cli/code-cache.cjs for bin/skytally.js, and into the program's
 * bundle for dist/vega.cjs. Node 20 has no compile cache for modules (Node 22's
 * `module.enableCompileCache` is the built-in form of the same), hence a vm.Script here. Code
 * compiled by vm.Script cannot itself import() (Node 20 asks for an experimental flag), so the
 * bundle is handed `__skytallyImport`, this module's own import(), for the one package it
 * imports at run time (the rasteriser; scripts/build.mjs rewrites that import).
 */
import { isAscii } from 'node:buffer';
import { readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import { Script } from 'node:vm';
import { crc32 } from 'node:zlib';

/**
 * Length of the bundle's digest at the start of its cache file: its CRC-32, big-endian. A checksum,
 * not a cryptographic hash: it guards against a bundle edited or rebuilt beside an old cache, where
 * any change is caught but for one in 2^32, and costs a fraction of a SHA-256, whose first use
 * starts OpenSSL (about 45 million instructions in every start; node:zlib's crc32 of the
 * 1.7 MB bundle with the module's loading is about 20 million).
 */
export const DIGEST_BYTES = 4;

/** The digest at the start of a cache file recorded for `bytes`. */
export function bundleDigest(bytes: Uint8Array): Buffer {
  const digest = Buffer.alloc(DIGEST_BYTES);
  digest.writeUInt32BE(crc32(bytes));
  return digest;
}

/** Set (to any value) by the build while it runs the program to record the caches. */
export const WRITE_ENV = 'SKYTALLY_WRITE_CODE_CACHE';

export interface CachedLoad {
  /** The bundle's module.exports. */
  exports: Record<string, unknown>;
  /**
   * True when V8 refused the cache, false when it used it, undefined when there was none (or it
   * was recorded for another bundle).
   */
  rejected: boolean | undefined;
}

/** import() from this module (loaded by Node, not through vm.Script). */
const importModule = (specifier: string): Promise<unknown> => import(specifier);

/** Bundles loaded by this process, by path (each is evaluated once). */
const loaded = new Map<string, CachedLoad>();

/** Load a CommonJS bundle, compiled with its code cache `<file>.cache` when one fits. */
export function loadCached(file: string): CachedLoad {
  const known = loaded.get(file);
  if (known) return known;
  const bytes = readFileSync(file);
  // (esbuild writes ASCII but for a few literals: latin1 reads such a file the same, faster)
  const source = bytes.toString(isAscii(bytes) ? 'latin1' : 'utf8');
  // V8 checks a cache against the source's length only: the cache file starts with the CRC-32 of
  // the bundle it was recorded for, and is used only for that bundle.
  const digest = bundleDigest(bytes);
  const cacheFile = `${file}.cache`;
  let cachedData: Buffer | undefined;
  if (!process.env[WRITE_ENV]) {
    try {
      const cache = readFileSync(cacheFile);
      if (cache.length > DIGEST_BYTES && digest.equals(cache.subarray(0, DIGEST_BYTES)))
        cachedData = cache.subarray(DIGEST_BYTES);
    } catch {
      cachedData = undefined;
    }
  }
  const script = new Script(
    `(function (exports, require, module, __filename, __dirname, __skytallyImport) {${source}\n})`,
    {
      filename: file,
      ...(cachedData ? { cachedData } : {}),
    },
  );
  const module = { exports: {} as Record<string, unknown>, filename: file, id: file, loaded: false };
  const fn = script.runInThisContext() as (
    exports: unknown,
    require: NodeJS.Require,
    module: unknown,
    filename: string,
    dirname: string,
    importModule: (specifier: string) => Promise<unknown>,
  ) => void;
  const result: CachedLoad = { exports: module.exports, rejected: cachedData ? script.cachedDataRejected : undefined };
  loaded.set(file, result);
  if (process.env[WRITE_ENV]) {
    // After the build's runs: the bytecode of every function compiled by then goes into the cache.
    process.on('exit', () => writeFileSync(cacheFile, Buffer.concat([digest, script.createCachedData()])));
  }
  fn.call(module.exports, module.exports, createRequire(file), module, file, dirname(file), importModule);
  module.loaded = true;
  result.exports = module.exports;
  return result;
}
