/** Options and helpers shared by commands. */
import { resolve } from 'node:path';
import { Option, type Command } from 'commander';
import { FORMATS, parseFormat, type CliIO, type OutputOptions } from '../io.js';
import { excerpt, inputError, SurveyError } from '../../errors.js';
import type { Survey } from '../../model/survey.js';
import { modelDrawing, refuseUndrawnModel } from '../../model/model-uncertainty.js';
import { compact } from '../../render/format.js';
import { warningLines, type Warning } from '../../warnings.js';

/** Each warning as one line on stderr (`skytally: warning: ...`); the JSON output carries them too. */
export function printWarnings(io: CliIO, warnings: readonly Warning[]): void {
  if (warnings.length > 0) io.stderr(warningLines(warnings));
}

/** --no-png: with --figures, write each figure as SVG only (no raster: faster, and no rasteriser needed). */
export function addNoPngOption(cmd: Command): void {
  cmd.option('--no-png', 'with --figures, write SVG only (no PNG)');
}

/** Whether --figures also writes PNG (commander gives png: false for --no-png). */
export function wantsPng(opts: Record<string, unknown>): boolean {
  return opts.png !== false;
}

/*
 * Options given where they change nothing. One that asks for something the run cannot give
 * (draws of a model the file does not make uncertain, fits of mock surveys that are not drawn) is
 * refused; one that only fixes how something is done when it is done (the seed of draws that are
 * not made, --no-png without figures) leaves the output as it would be without it, so the run goes
 * on with a one-line note on standard error (a script may pass it to every run).
 */

/** A one-line note on stderr: `skytally: note: <command> <flag>: <why>, so it changes nothing.` */
export function optionNote(io: CliIO, command: string, flag: string, why: string): void {
  io.stderr(`skytally: note: ${command} ${flag}: ${why}, so it changes nothing.\n`);
}

/** The note for --no-png given without --figures (nothing is drawn, so no PNG either way). */
export function noteNoPngWithoutFigures(io: CliIO, command: string, opts: Record<string, unknown>): void {
  if (opts.png === false && typeof opts.figures !== 'string')
    optionNote(io, command, '--no-png', 'no figures are written without --figures DIR');
}

export { modelDrawing };

/** Why a survey's model is not drawn at random: no model_uncertainty, or only draws files (each row once). */
export function unseededModel(survey: Survey): string {
  return modelDrawing(survey) === 'none'
    ? 'no population has a model_uncertainty block'
    : "every population's model_uncertainty is a draws_file, read row by row";
}

/** --draws N given for a file whose model is not drawn N times: refused, naming the file. */
export function refuseDrawsWithoutModel(survey: Survey): void {
  refuseUndrawnModel(survey, '--draws', 'N');
}

export function addOutputOptions(cmd: Command): void {
  cmd.addOption(new Option('--format <format>', 'output format').choices([...FORMATS]).default('table'));
  cmd.option('--out <file>', 'write the output to this file (atomically; - for standard output) instead of stdout');
}

/** The text of an option's value: commander gives a string (a boolean for a bare flag). */
export function optionText(v: unknown): string {
  if (typeof v === 'string') return v;
  if (typeof v === 'boolean' || typeof v === 'number' || v === undefined || v === null) return String(v);
  return Array.isArray(v) ? v.map(optionText).join(',') : JSON.stringify(v);
}

export function outputOptions(opts: Record<string, unknown>): OutputOptions {
  const o: OutputOptions = { format: parseFormat(optionText(opts.format ?? 'table')) };
  if (typeof opts.out === 'string') o.out = opts.out;
  return o;
}

/**
 * A survey file as every command reads it: loaded, and its plan section (when it has one) checked
 * as plan reads it, so that a mistyped or impossible plan key is refused by every command, not
 * only by plan. `population` is the --population the command was given, if any.
 */
export async function loadSurveyArg(io: CliIO, file: string, population?: string) {
  const { loadSurveyFile } = await surveyLoader();
  const survey = loadSurveyFile(resolve(io.cwd, file));
  await checkPlanSection(survey, population);
  return survey;
}

/**
 * A survey's plan section read as plan and report read it, for the population named (the file's
 * first when none is, or when no population has that name: the command refuses the name itself), so
 * that every command refuses a mistyped or impossible plan key too; a threshold survey's plan, which
 * report leaves out, passes.
 */
export async function checkPlanSection(survey: Survey, population?: string): Promise<void> {
  const raw = survey.raw as Record<string, unknown> | null | undefined;
  if (raw === null || typeof raw !== 'object' || raw.plan === undefined) return;
  const { readPlanSection } = await surveyLoader();
  const named = population === undefined ? undefined : survey.populations.find((p) => p.name === population);
  try {
    readPlanSection(survey, named ?? survey.populations[0]!);
  } catch (e) {
    if (!(e instanceof SurveyError && e.code === 'kind_mismatch' && survey.detection.kind === 'threshold')) throw e;
  }
}

/**
 * The survey loader, imported on first use and kept: a program that runs many commands in one
 * process (the library's callers, the tests) resolves the import once, not once per command.
 */
let loader: Promise<typeof import('../../survey/index.js')> | undefined;
export function surveyLoader(): Promise<typeof import('../../survey/index.js')> {
  loader ??= import('../../survey/index.js');
  return loader;
}

/**
 * A number as an option may write it: decimal digits with an optional sign, point and exponent
 * ("2", "-0.5", "1e12"). Nothing else: not "" (which Number() reads as 0), not hexadecimal,
 * binary or octal ("0x10"), not "Infinity", not spaces.
 */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** The number a decimal string stands for, or undefined when it is not one (or not finite). */
export function decimalNumber(text: string): number | undefined {
  if (!DECIMAL.test(text)) return undefined;
  const v = Number(text);
  return Number.isFinite(v) ? v : undefined;
}

/** Parse "0.5,1,2" into numbers; every item must be a decimal number in [min, max]. */
export function parseNumberList(
  text: string,
  option: string,
  { min = -Infinity, max = Infinity }: { min?: number; max?: number } = {},
): number[] {
  return parseKeyedList(text, option, { min, max }).map((x) => x.value);
}

/** A comma-separated list of decimal numbers in [min, max] (or above min), each kept with its text. */
export function parseKeyedList(
  text: string,
  option: string,
  {
    min = -Infinity,
    max = Infinity,
    exclusiveMin = false,
  }: { min?: number; max?: number; exclusiveMin?: boolean } = {},
): { key: string; value: number }[] {
  const items = text.split(',').map((s) => s.trim());
  if (items.length === 1 && items[0] === '') {
    throw inputError(
      'bad_option',
      '',
      option,
      'needs at least one number',
      `give a comma-separated list such as ${option} 0.5,1,2`,
    );
  }
  if (items.length > MAX_LIST_ITEMS)
    throw inputError(
      'bad_option',
      '',
      option,
      `lists ${items.length} values, more than ${MAX_LIST_ITEMS}`,
      'give fewer values',
    );
  return items.map((key) => {
    const value = decimalNumber(key);
    if (value === undefined)
      throw inputError(
        'bad_option',
        '',
        option,
        `"${excerpt(key)}" is not a decimal number`,
        'give a comma-separated list of numbers such as 0.5,1,2',
      );
    if ((exclusiveMin ? value <= min : value < min) || value > max) {
      throw inputError(
        'bad_option',
        '',
        option,
        `${key} is outside the allowed range`,
        `give values ${exclusiveMin ? 'above' : 'from'} ${compact(min, 6)}${Number.isFinite(max) ? ` ${exclusiveMin ? 'and at most' : 'to'} ${compact(max, 6)}` : ''}`,
      );
    }
    return { key, value };
  });
}

/** Most values one list option may hold (e.g. --z). */
export const MAX_LIST_ITEMS = 1000;

export function parseNumber(
  text: string,
  option: string,
  { min = -Infinity, max = Infinity, exclusiveMin = false } = {},
): number {
  const v = decimalNumber(text);
  if (v === undefined || (exclusiveMin ? v <= min : v < min) || v > max) {
    throw inputError(
      'bad_option',
      '',
      option,
      `"${excerpt(text)}" is not a ${v === undefined ? 'decimal number' : 'number in the allowed range'}`,
      `give a number ${exclusiveMin ? 'above' : 'of at least'} ${min}${Number.isFinite(max) ? ` and at most ${max}` : ''}`,
    );
  }
  return v;
}

/** A whole number from min to max, written in decimal digits. */
/** The most `--workers` a command accepts; more than the machine's cores use its cores (docs/names.md). */
export const MAX_WORKERS = 256;

/**
 * `--workers K`: a cap on the worker threads, not a request (docs/outputs.md), so a K above the
 * machine's cores (a script run on several machines) uses the cores rather than being refused.
 */
export function parseWorkers(raw: unknown, cores: number): number | undefined {
  if (raw === undefined) return undefined;
  return Math.min(parseInteger(optionText(raw), '--workers', 1, MAX_WORKERS), Math.max(1, cores));
}

export function parseInteger(text: string, option: string, min: number, max: number): number {
  const v = decimalNumber(text);
  if (v === undefined || !Number.isInteger(v) || v < min || v > max) {
    throw inputError(
      'bad_option',
      '',
      option,
      `"${excerpt(text)}" is not a whole number from ${min} to ${max}`,
      `give ${option} a whole number in that range`,
    );
  }
  return v;
}

/**
 * Refuse, before any work, to print an HTML document (the explore page, the report) on a terminal:
 * without --out it goes to standard output, which is right for a pipe and never for a screen
 * (the page is about 2 MB). `--out -` prints it anyway.
 */
export function refuseHtmlOnTerminal(io: CliIO, out: string | undefined, command: string, what: string): void {
  if (out !== undefined || !io.stdoutIsTTY) return;
  throw inputError(
    'bad_option',
    '',
    '--out',
    `without it ${command} writes ${what} to standard output, which is a terminal here`,
    'give --out FILE.html (--out - prints it here anyway; a pipe takes it as it is)',
  );
}
