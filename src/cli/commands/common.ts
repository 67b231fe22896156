/** Options and helpers shared by commands. */
import { resolve } from 'node:path';
import { Option, type Command } from 'commander';
import { FORMATS, parseFormat, type CliIO, type OutputOptions } from '../io.js';
import { inputError } from '../../errors.js';
import { warningLines, type Warning } from '../../warnings.js';

/** Each warning as one line on stderr (`skytally: warning: ...`); the JSON output carries them too. */
export function printWarnings(io: CliIO, warnings: readonly Warning[]): void {
  if (warnings.length > 0) io.stderr(warningLines(warnings));
}

export function addOutputOptions(cmd: Command): void {
  cmd.addOption(new Option('--format <format>', 'output format').choices([...FORMATS]).default('table'));
  cmd.option('--out <file>', 'write the output to this file (atomically) instead of stdout');
}

export function outputOptions(opts: Record<string, unknown>): OutputOptions {
  const o: OutputOptions = { format: parseFormat(String(opts.format ?? 'table')) };
  if (typeof opts.out === 'string') o.out = opts.out;
  return o;
}

export async function loadSurveyArg(io: CliIO, file: string) {
  const { loadSurveyFile } = await import('../../survey/index.js');
  return loadSurveyFile(resolve(io.cwd, file));
}

/** Parse "0.5,1,2" into numbers; every item must be a finite number. */
export function parseNumberList(text: string, option: string, { min = -Infinity }: { min?: number } = {}): number[] {
  const items = text.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  if (items.length === 0) throw inputError('bad_option', '', option, 'needs at least one number', `give a comma-separated list such as ${option} 0.5,1,2`);
  return items.map((s) => {
    const v = Number(s);
    if (!Number.isFinite(v)) throw inputError('bad_option', '', option, `"${s}" is not a number`, `give a comma-separated list of numbers`);
    if (v < min) throw inputError('bad_option', '', option, `${s} is below ${min}`, `give values of at least ${min}`);
    return v;
  });
}

export function parseNumber(text: string, option: string, { min = -Infinity, max = Infinity, exclusiveMin = false } = {}): number {
  const v = Number(text);
  if (!Number.isFinite(v) || (exclusiveMin ? v <= min : v < min) || v > max) {
    throw inputError('bad_option', '', option, `"${text}" is not a number in the allowed range`, `give a number ${exclusiveMin ? 'above' : 'of at least'} ${min}${Number.isFinite(max) ? ` and at most ${max}` : ''}`);
  }
  return v;
}
