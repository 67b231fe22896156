/**
 * What a command needs from the outside world, so that tests can call `run(argv, io)` directly.
 */
import { renameSync, writeFileSync, mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { inputError } from '../errors.js';

export interface CliIO {
  stdout(text: string): void;
  stderr(text: string): void;
  /** Directory relative paths are resolved against. */
  cwd: string;
  /** True when stderr is a terminal (progress bars are drawn only then). */
  stderrIsTTY: boolean;
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
      (key, v) => {
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
  throw inputError('bad_option', '', '--format', `unknown format "${value}"`, `use one of ${FORMATS.join(', ')}`);
}

/**
 * Render in the chosen format and write to stdout or, atomically, to --out (a temporary file
 * renamed into place). An --out that names an input file is refused.
 */
export function emit(io: CliIO, opts: OutputOptions, result: Renderable, inputs: readonly string[] = []): void {
  const text = opts.format === 'json' ? toJsonText(result.json()) : opts.format === 'csv' ? result.csv() : result.table();
  if (!opts.out) {
    io.stdout(text);
    return;
  }
  const target = resolve(io.cwd, opts.out);
  for (const input of inputs) {
    if (resolve(io.cwd, input) === target) {
      throw inputError('output_exists', '', '--out', `the output file ${opts.out} is an input file`, 'choose another --out path');
    }
  }
  writeAtomic(target, text);
}

export function writeAtomic(target: string, text: string | Uint8Array): void {
  mkdirSync(dirname(target), { recursive: true });
  const tmp = `${target}.tmp-${process.pid}-${Date.now()}`;
  writeFileSync(tmp, text);
  renameSync(tmp, target);
}
