/**
 * What a command needs from the outside world, so that tests can call `run(argv, io)` directly,
 * and how outputs are written.
 *
 * Outputs (--out and --figures) are all or nothing: every output is first checked (before any
 * work: the path, its folder, that it is no input), then rendered in memory, then staged as a
 * temporary file beside its target, and only when every one is staged are they renamed into
 * place. A failure at any step removes every temporary file and writes nothing. What --out names:
 *
 * - `-`: standard output;
 * - a regular file, or a symbolic link to one: the file the link points to is replaced atomically
 *   (the link stays a link); the file keeps its permissions;
 * - a new file: created atomically, in a folder that must already exist (a missing folder is
 *   probably a mistyped path, so it is refused rather than created);
 * - a FIFO or a character device (a pipe, /dev/null, /dev/stdout, a terminal), or anything under
 *   /dev, /proc or /sys: written straight into, never replaced;
 * - a folder, a socket or a block device: refused.
 *
 * No output may be an input: outputs are compared with every file read (the survey file and the
 * files it names) by identity, device and inode after resolving links, so that neither a link nor
 * a second path to the same file can overwrite an input. Every failure is one sentence, exit 2.
 */
import {
  closeSync,
  fchmodSync,
  lstatSync,
  mkdirSync,
  openSync,
  realpathSync,
  renameSync,
  rmdirSync,
  statSync,
  unlinkSync,
  writeFileSync,
  writeSync,
  type Stats,
} from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { excerpt, inputError, SurveyError } from '../errors.js';
import type { InputFile } from '../model/survey.js';

export interface CliIO {
  stdout(text: string): void;
  stderr(text: string): void;
  /** Directory relative paths are resolved against. */
  cwd: string;
  /** True when stderr is a terminal (progress bars are drawn only then). */
  stderrIsTTY: boolean;
  /**
   * True when stdout is a terminal: the HTML page and report are not written there without --out
   * (absent counts as false, as for a pipe).
   */
  stdoutIsTTY?: boolean;
}

export type OutputFormat = 'table' | 'json' | 'csv';
export const FORMATS: readonly OutputFormat[] = ['table', 'json', 'csv'];

export interface OutputOptions {
  format: OutputFormat;
  out?: string;
}

export interface Renderable {
  json(): unknown;
  table(): string;
  csv(): string;
}

/** JSON text of a result; a NaN or Infinity anywhere is an internal failure, never written. */
export function toJsonText(value: unknown): string {
  return (
    JSON.stringify(
      value,
      (key: string, v: unknown) => {
        if (typeof v === 'number' && !Number.isFinite(v)) {
          throw new Error(`internal: the output value "${key}" is not a finite number`);
        }
        return v;
      },
      2,
    ) + '\n'
  );
}

export function parseFormat(value: string): OutputFormat {
  if ((FORMATS as readonly string[]).includes(value)) return value as OutputFormat;
  throw inputError(
    'bad_option',
    '',
    '--format',
    `unknown format "${excerpt(value)}"`,
    `use one of ${FORMATS.join(', ')}`,
  );
}

export function renderText(opts: OutputOptions, result: Renderable): string {
  return opts.format === 'json' ? toJsonText(result.json()) : opts.format === 'csv' ? result.csv() : result.table();
}

/**
 * Render in the chosen format and write it to stdout or to --out (see the top of this file). An
 * --out that is one of `inputs` (paths or identities of files read) is refused.
 */
export function emit(
  io: CliIO,
  opts: OutputOptions,
  result: Renderable,
  inputs: readonly (string | InputFile)[] = [],
): void {
  const outputs = new Outputs(io, { out: opts.out });
  outputs.refuseInputs(inputs);
  outputs.setMain(renderText(opts, result));
  outputs.commit();
}

/** Write `text` atomically to `target` (a path, resolved against the process's directory). */
export function writeAtomic(target: string, text: string | Uint8Array): void {
  const d = destinationOf(resolve(target), target, '--out');
  commitFiles([{ dest: d, data: text }], []);
}

// ---------------------------------------------------------------------------------------------

type Destination =
  | { kind: 'stdout' }
  /** A regular file to create or replace atomically (links resolved: `path` is the real file). */
  | { kind: 'replace'; path: string; shown: string; option: string; mode?: number }
  /** A FIFO, a device or a file of the system (/dev, /proc, /sys): written straight into. */
  | { kind: 'stream'; path: string; shown: string; option: string };

const SYSTEM_DIRS = ['/dev/', '/proc/', '/sys/'];
const isSystemPath = (p: string) => SYSTEM_DIRS.some((d) => p.startsWith(d)) && !p.startsWith('/dev/shm/');

function refuse(option: string, what: string, fix: string): never {
  throw inputError(option === '--figures' ? 'bad_option' : 'output_unwritable', '', option, what, fix);
}

function systemReason(code: string | undefined): string {
  switch (code) {
    case 'ENOSPC':
      return 'the device is full';
    case 'EDQUOT':
      return 'the disk quota is used up';
    case 'EACCES':
    case 'EPERM':
      return 'permission is denied';
    case 'EROFS':
      return 'the file system is read-only';
    case 'ENOENT':
      return 'the system has no such place to write to';
    case 'ENOTDIR':
      return 'a part of the path is not a folder';
    case 'EISDIR':
      return 'it is a folder';
    case 'EFBIG':
      return 'the file would be too large';
    case 'EIO':
      return 'the device reported an input/output error';
    case 'ENXIO':
      return 'nothing is reading from it';
    case 'EINVAL':
      return 'the system does not accept writes there';
    case 'ELOOP':
      return 'it is a loop of symbolic links';
    case 'ENAMETOOLONG':
      return 'the name is too long for the system';
    case 'EBUSY':
      return 'it is busy';
    default:
      return `the system refused it (${code ?? 'unknown error'})`;
  }
}

function codeOf(e: unknown): string | undefined {
  return (e as { code?: string } | null)?.code;
}

/** One sentence for a failed write (never the raw system message). */
function writeFailure(e: unknown, shown: string, option: string): SurveyError {
  if (e instanceof SurveyError) return e;
  const fix =
    option === '--figures'
      ? 'give a folder you can write to'
      : 'give a path you can write to (or - for standard output)';
  return inputError(
    option === '--figures' ? 'bad_option' : 'output_unwritable',
    '',
    option,
    `${shown} cannot be written: ${systemReason(codeOf(e))}`,
    fix,
  );
}

/** Where an output named `given` (resolved to `abs`) goes; refuses what cannot be written. */
function destinationOf(abs: string, given: string, option: string): Destination {
  const shown = excerpt(given, 120);
  let link: Stats;
  try {
    link = lstatSync(abs);
  } catch (e) {
    if (codeOf(e) !== 'ENOENT')
      refuse(option, `${shown} cannot be used: ${systemReason(codeOf(e))}`, 'give another path');
    // A new file: its folder must exist.
    const parent = dirname(abs);
    let pst: Stats;
    try {
      pst = statSync(parent);
    } catch (e2) {
      return refuse(
        option,
        codeOf(e2) === 'ENOENT'
          ? `the folder ${excerpt(dirname(given) || '.', 120)} does not exist`
          : `the folder of ${shown} cannot be used: ${systemReason(codeOf(e2))}`,
        codeOf(e2) === 'ENOENT'
          ? 'check the path (skytally creates no folders for --out), or create the folder first'
          : 'give another path',
      );
    }
    if (!pst.isDirectory()) refuse(option, `${excerpt(dirname(given), 120)} is not a folder`, 'check the path');
    const real = join(realpathSync(parent), basename(abs));
    return isSystemPath(real) || isSystemPath(abs)
      ? { kind: 'stream', path: abs, shown, option }
      : { kind: 'replace', path: real, shown, option };
  }
  let st: Stats;
  try {
    st = statSync(abs);
  } catch (e) {
    return refuse(
      option,
      codeOf(e) === 'ENOENT' && link.isSymbolicLink()
        ? `${shown} is a symbolic link to a file that does not exist`
        : `${shown} cannot be used: ${systemReason(codeOf(e))}`,
      'give another path',
    );
  }
  if (st.isDirectory()) refuse(option, `${shown} is a folder`, 'give a file name inside it');
  if (st.isFIFO() || st.isCharacterDevice()) return { kind: 'stream', path: abs, shown, option };
  if (!st.isFile())
    refuse(
      option,
      `${shown} is ${st.isSocket() ? 'a socket' : 'a block device'}, not a file`,
      'give the path of a file',
    );
  const real = realpathSync(abs);
  if (isSystemPath(real) || isSystemPath(abs)) return { kind: 'stream', path: abs, shown, option };
  return { kind: 'replace', path: real, shown, option, mode: st.mode & 0o7777 };
}

/** Identity of an existing path (links followed), or undefined. */
function identityOf(path: string): { dev: number; ino: number } | undefined {
  try {
    const st = statSync(path);
    return { dev: st.dev, ino: st.ino };
  } catch {
    return undefined;
  }
}

function sameFile(a: { dev: number; ino: number } | undefined, b: { dev: number; ino: number } | undefined): boolean {
  return a !== undefined && b !== undefined && a.dev === b.dev && a.ino === b.ino;
}

/** Temporary files staged and not yet renamed into place (removed on failure or interruption). */
const pending = new Set<string>();

/** Remove every staged temporary file (on failure, or when the program is interrupted). */
export function removePendingFiles(): void {
  for (const tmp of pending) {
    try {
      unlinkSync(tmp);
    } catch {
      /* already gone */
    }
  }
  pending.clear();
}

const SIGNALS: NodeJS.Signals[] = ['SIGINT', 'SIGTERM', 'SIGHUP'];

/** Run `fn` with handlers that remove staged files if a signal ends the program meanwhile. */
function withCleanupOnSignal<T>(fn: () => T): T {
  const handler = (sig: NodeJS.Signals) => {
    removePendingFiles();
    for (const s of SIGNALS) process.removeListener(s, handler);
    process.kill(process.pid, sig);
  };
  for (const s of SIGNALS) process.on(s, handler);
  try {
    return fn();
  } finally {
    for (const s of SIGNALS) process.removeListener(s, handler);
  }
}

function stage(dest: Extract<Destination, { kind: 'replace' }>, data: string | Uint8Array): string {
  // 48 random bits from Math.random, not node:crypto, whose first use starts OpenSSL (about 20
  // million instructions of every run with --out); the name need not be secret: 'wx' below refuses
  // any file already there, a link included
  const random = Math.floor(Math.random() * 2 ** 48)
    .toString(16)
    .padStart(12, '0');
  const tmp = join(dirname(dest.path), `.${basename(dest.path)}.${process.pid}-${random}.tmp`);
  let fd: number | undefined;
  try {
    fd = openSync(tmp, 'wx', 0o666);
    pending.add(tmp);
    const buf = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
    let off = 0;
    while (off < buf.length) off += writeSync(fd, buf, off, buf.length - off);
    if (dest.mode !== undefined) fchmodSync(fd, dest.mode);
    closeSync(fd);
    fd = undefined;
    return tmp;
  } catch (e) {
    if (fd !== undefined) {
      try {
        closeSync(fd);
      } catch {
        /* ignore */
      }
    }
    throw writeFailure(e, dest.shown, dest.option);
  }
}

interface Planned {
  dest: Destination;
  data: string | Uint8Array;
}

/**
 * Write every planned output, all or nothing: stage the files to replace, create `mkdirs`, rename
 * the staged files into place, then write the streams (which cannot be staged). On any failure
 * before the renames, nothing is left behind.
 */
function commitFiles(planned: Planned[], mkdirs: { path: string; shown: string }[]): void {
  withCleanupOnSignal(() => {
    const created: string[] = [];
    const staged: { tmp: string; path: string; dest: Destination }[] = [];
    try {
      for (const m of mkdirs) {
        try {
          mkdirSync(m.path);
          created.push(m.path);
        } catch (e) {
          if (codeOf(e) !== 'EEXIST') throw writeFailure(e, m.shown, '--figures');
        }
      }
      for (const p of planned) {
        if (p.dest.kind === 'replace') staged.push({ tmp: stage(p.dest, p.data), path: p.dest.path, dest: p.dest });
      }
      for (const s of staged) {
        try {
          renameSync(s.tmp, s.path);
          pending.delete(s.tmp);
        } catch (e) {
          throw writeFailure(e, (s.dest as { shown: string }).shown, (s.dest as { option: string }).option);
        }
      }
    } catch (e) {
      removePendingFiles();
      for (const d of created.reverse()) {
        try {
          rmdirSync(d);
        } catch {
          /* not empty or gone: leave it */
        }
      }
      throw e;
    }
    for (const p of planned) {
      if (p.dest.kind !== 'stream') continue;
      try {
        writeFileSync(p.dest.path, p.data, { flag: 'a' });
      } catch (e) {
        throw writeFailure(e, p.dest.shown, p.dest.option);
      }
    }
  });
}

/** A file to write into the --figures folder: its name (e.g. counts.svg) and bytes. */
export interface FigureFile {
  name: string;
  data: string | Uint8Array;
}

/**
 * The outputs of one command: --out (or standard output) and the --figures folder. Create it
 * before any work (the paths are checked at once), call `refuseInputs` with every file read as
 * soon as the inputs are loaded, set the rendered outputs, then `commit()`.
 */
export class Outputs {
  private readonly io: CliIO;
  private readonly out: Destination;
  private readonly figuresDir?: FiguresDir;
  private main?: string;
  private figures: FigureFile[] = [];
  private inputs: { path: string; id: { dev: number; ino: number } | undefined }[] = [];

  constructor(io: CliIO, opts: { out?: string | undefined; figures?: string | undefined }) {
    this.io = io;
    if (opts.out === undefined || opts.out === '-') this.out = { kind: 'stdout' };
    else if (opts.out === '') refuse('--out', 'is empty', 'give a file name, or - for standard output');
    else this.out = destinationOf(resolve(io.cwd, opts.out), opts.out, '--out');
    if (opts.figures !== undefined) this.figuresDir = figuresDirOf(io, opts.figures);
  }

  /** The --figures folder (absolute), when given. */
  get figuresPath(): string | undefined {
    return this.figuresDir?.abs;
  }

  /**
   * Refuse (exit 2) when an output is one of these files read, compared by identity (device and
   * inode, links resolved); paths that do not exist are skipped.
   */
  refuseInputs(inputs: readonly (string | InputFile)[]): void {
    for (const input of inputs) {
      const path = typeof input === 'string' ? resolve(this.io.cwd, input) : input.path;
      const id = typeof input === 'string' ? identityOf(path) : { dev: input.dev, ino: input.ino };
      this.inputs.push({ path, id });
    }
    this.checkAgainstInputs();
  }

  private checkAgainstInputs(): void {
    for (const { dest, label } of this.destinations()) {
      if (dest.kind === 'stdout') continue;
      const id = identityOf(dest.path);
      for (const input of this.inputs) {
        if (sameFile(id, input.id) || dest.path === input.path) {
          throw inputError(
            'output_exists',
            '',
            dest.option,
            `${label} ${dest.shown} is the input file ${excerpt(input.path, 120)}`,
            `choose another ${dest.option === '--figures' ? 'folder' : '--out path'}; skytally never overwrites what it reads`,
          );
        }
      }
    }
  }

  /** The text for --out (or standard output). */
  setMain(text: string): void {
    this.main = text;
  }

  /** Files for the --figures folder (ignored without --figures). */
  setFigures(files: FigureFile[]): void {
    this.figures = files;
  }

  private destinations(): { dest: Destination; label: string }[] {
    const out: { dest: Destination; label: string }[] = [];
    if (this.main !== undefined || this.out.kind !== 'stdout') out.push({ dest: this.out, label: 'the output' });
    if (this.figuresDir) {
      for (const f of this.figures) {
        const abs = join(this.figuresDir.abs, f.name);
        const shown = excerpt(join(this.figuresDir.shown, f.name), 120);
        const dest: Destination = this.figuresDir.exists
          ? destinationOf(abs, join(this.figuresDir.shown, f.name), '--figures')
          : { kind: 'replace', path: join(this.figuresDir.real, f.name), shown, option: '--figures' };
        out.push({ dest, label: 'the figure' });
      }
    }
    return out;
  }

  /** Write everything (see the top of this file); standard output last. */
  commit(): void {
    this.checkAgainstInputs();
    const planned: Planned[] = [];
    const seen = new Map<string, string>();
    for (const { dest } of this.destinations()) {
      if (dest.kind === 'stdout') continue;
      const prior = seen.get(dest.path);
      if (prior !== undefined) {
        throw inputError(
          'output_exists',
          '',
          dest.option,
          `${dest.shown} would be written twice (also as ${prior})`,
          'give --out a path outside the --figures folder',
        );
      }
      seen.set(dest.path, dest.shown);
    }
    if (this.out.kind !== 'stdout' && this.main !== undefined) planned.push({ dest: this.out, data: this.main });
    const mkdirs: { path: string; shown: string }[] = [];
    if (this.figuresDir && this.figures.length > 0) {
      for (const m of this.figuresDir.missing) mkdirs.push({ path: m, shown: this.figuresDir.shown });
      const dests = this.destinations().filter((d) => d.label === 'the figure');
      dests.forEach((d, i) => planned.push({ dest: d.dest, data: this.figures[i]!.data }));
    }
    commitFiles(planned, mkdirs);
    if (this.out.kind === 'stdout' && this.main !== undefined) this.io.stdout(this.main);
  }
}

interface FiguresDir {
  abs: string;
  shown: string;
  exists: boolean;
  /** The folder with links resolved (as it will be once created). */
  real: string;
  /** The folders to create, outermost first (empty when the folder exists). */
  missing: string[];
}

/**
 * Check a --figures folder before anything is computed: an existing folder, or a new one (with
 * any missing folders above it) under an existing folder. The missing folders are created only
 * when the figures are written, and removed again if writing fails.
 */
function figuresDirOf(io: CliIO, given: string): FiguresDir {
  const shown = excerpt(given, 120);
  if (given === '') refuse('--figures', 'is empty', 'give a folder');
  const abs = resolve(io.cwd, given);
  const missing: string[] = [];
  let at = abs;
  for (;;) {
    let st: Stats;
    try {
      st = statSync(at);
    } catch (e) {
      const parent = dirname(at);
      if (codeOf(e) !== 'ENOENT' || parent === at) {
        return refuse(
          '--figures',
          `the folder ${shown} cannot be used: ${systemReason(codeOf(e))}`,
          'give a folder you can write to',
        );
      }
      missing.unshift(at);
      at = parent;
      continue;
    }
    if (!st.isDirectory()) {
      if (at === abs)
        refuse(
          '--figures',
          `${shown} exists and is not a directory`,
          'give a directory, or a path that does not exist yet',
        );
      refuse('--figures', `${excerpt(at, 120)} (on the way to ${shown}) is not a directory`, 'check the path');
    }
    const realTop = realpathSync(at);
    const rel = abs.slice(at.length).replace(/^\/+/, '');
    const real = rel ? join(realTop, rel) : realTop;
    const realMissing = missing.map((m) => join(realTop, m.slice(at.length).replace(/^\/+/, '')));
    return { abs, shown, exists: missing.length === 0, real, missing: realMissing };
  }
}
