/**
 * A population's `model_uncertainty` block (docs/survey-file.md, "The model's own uncertainty"):
 * 1-sigma values of the Schechter parameters with optional correlations, or `draws_file`, a CSV
 * of draws (a header naming the parameters, one draw a row, the parameters' values). Every
 * problem is one SurveyError naming the key.
 */
import { isAbsolute, resolve } from 'node:path';
import { excerpt, inputError } from '../errors.js';
import type { InputFile } from '../model/survey.js';
import { modelParameterNames, type ModelParameter, type ModelUncertainty } from '../model/model-uncertainty.js';
import { cholesky } from '../numerics/linalg.js';
import { readInputText } from './read-input.js';
import { fmt } from './zparam.js';

/** Largest draws file read, bytes (8 MiB: 100,000 draws of five parameters). */
export const MAX_DRAWS_BYTES = 8 * 1024 * 1024;
/** Most rows a draws file may hold. */
export const MAX_DRAWS_ROWS = 100_000;
/** Largest 1-sigma accepted per parameter: 1 dex for log10 phi* and log10 L*, 2.5 mag for M*, 1 for alpha. */
export const MAX_SIGMA: Record<ModelParameter, number> = {
  log10_phi_star: 1,
  log10_phi_star_1: 1,
  log10_phi_star_2: 1,
  log10_l_star: 1,
  m_star: 2.5,
  alpha: 1,
  alpha_1: 1,
  alpha_2: 1,
};

export interface ModelUncertaintyContext {
  file: string;
  /** Key path of the block, e.g. "population.model_uncertainty". */
  path: string;
  shape: 'schechter' | 'double_schechter';
  variable: 'luminosity' | 'magnitude';
  /** The assumed value of a parameter at the window's middle, in the form the file writes it. */
  assumed: (p: ModelParameter) => number;
  baseDir: string;
  inputs: InputFile[];
}

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

export function parseModelUncertainty(raw: unknown, ctx: ModelUncertaintyContext): ModelUncertainty {
  const { file, path } = ctx;
  if (!isPlainObject(raw))
    throw inputError(
      'wrong_type',
      file,
      path,
      'is not a mapping',
      'give 1-sigma values of the parameters, or draws_file',
    );
  const allowed = modelParameterNames(ctx.shape, ctx.variable);
  const allowedText = `${allowed.join(', ')}, correlation or draws_file`;
  const keys = Object.keys(raw);
  if (keys.length === 0)
    throw inputError(
      'missing_key',
      file,
      path,
      'is empty',
      `give 1-sigma values of ${allowed.join(', ')}, or draws_file`,
    );
  for (const k of keys) {
    if (k === 'correlation' || k === 'draws_file') continue;
    if (!allowed.includes(k as ModelParameter)) {
      throw inputError(
        'unknown_key',
        file,
        `${path}.${k}`,
        `is not a parameter of this ${ctx.shape === 'double_schechter' ? 'double Schechter ' : ''}population (${ctx.variable} variable)`,
        `use ${allowedText}`,
      );
    }
  }
  if (raw.draws_file !== undefined) {
    const other = keys.find((k) => k !== 'draws_file');
    if (other !== undefined)
      throw inputError(
        'conflict',
        file,
        `${path}.${other}`,
        'is given beside draws_file',
        'give either the sigmas (and correlation) or draws_file',
      );
    if (typeof raw.draws_file !== 'string' || raw.draws_file.length === 0)
      throw inputError(
        'wrong_type',
        file,
        `${path}.draws_file`,
        'is not a file name',
        'give the path of a CSV of draws relative to the survey file',
      );
    return readDrawsFile(raw.draws_file, ctx, allowed);
  }
  const parameters = keys.filter((k) => k !== 'correlation') as ModelParameter[];
  if (parameters.length === 0)
    throw inputError(
      'missing_key',
      file,
      path,
      'gives a correlation but no sigma',
      `give 1-sigma values of ${allowed.join(', ')}`,
    );
  const sigmas = parameters.map((p) => {
    const v = raw[p];
    if (typeof v !== 'number' || !Number.isFinite(v))
      throw inputError(
        'wrong_type',
        file,
        `${path}.${p}`,
        'is not a number',
        'give the 1-sigma uncertainty as a number',
      );
    if (v < 0)
      throw inputError(
        'out_of_range',
        file,
        `${path}.${p}`,
        `is ${fmt(v)}, a negative sigma`,
        'give the 1-sigma uncertainty as 0 or more',
      );
    const unit = p === 'm_star' ? ' mag' : p.startsWith('alpha') ? '' : ' dex';
    if (v > MAX_SIGMA[p])
      throw inputError(
        'out_of_range',
        file,
        `${path}.${p}`,
        `is ${fmt(v)}${unit}, more than the largest 1-sigma accepted (${MAX_SIGMA[p]}${unit})`,
        'give a smaller sigma, or use draws_file',
      );
    return v;
  });
  const n = parameters.length;
  const rho: number[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
  const corr = raw.correlation;
  if (corr !== undefined) {
    if (!isPlainObject(corr))
      throw inputError(
        'wrong_type',
        file,
        `${path}.correlation`,
        'is not a mapping',
        'give pairs such as {log10_phi_star-alpha: 0.7}',
      );
    const seen = new Set<string>();
    for (const [pair, value] of Object.entries(corr)) {
      const key = `${path}.correlation.${pair}`;
      const names = pair.split('-');
      if (names.length !== 2)
        throw inputError(
          'unknown_key',
          file,
          key,
          'is not a pair of parameters written a-b',
          `name two of ${parameters.join(', ')} joined by -`,
        );
      const [a, b] = names as [string, string];
      for (const nm of [a, b]) {
        if (!allowed.includes(nm as ModelParameter))
          throw inputError(
            'unknown_key',
            file,
            key,
            `names ${excerpt(nm)}, not a parameter of this population`,
            `pair two of ${parameters.join(', ')}`,
          );
        if (!parameters.includes(nm as ModelParameter))
          throw inputError(
            'missing_key',
            file,
            key,
            `pairs ${nm}, which has no sigma in this block`,
            `give ${path}.${nm}, or leave the pair out`,
          );
      }
      if (a === b)
        throw inputError('unknown_key', file, key, 'pairs a parameter with itself', 'pair two different parameters');
      const id = [a, b].sort().join('-');
      if (seen.has(id))
        throw inputError('conflict', file, key, 'is given twice (once each way round)', 'keep one of the two');
      seen.add(id);
      if (typeof value !== 'number' || !Number.isFinite(value))
        throw inputError('wrong_type', file, key, 'is not a number', 'give a correlation between -1 and 1');
      if (!(value >= -1 && value <= 1))
        throw inputError('out_of_range', file, key, `is ${fmt(value)}`, 'give a correlation between -1 and 1');
      const i = parameters.indexOf(a as ModelParameter);
      const j = parameters.indexOf(b as ModelParameter);
      rho[i]![j] = value;
      rho[j]![i] = value;
    }
  }
  const l = cholesky(rho, 1e-14);
  if (!l) {
    throw inputError(
      'not_positive_definite',
      file,
      `${path}.correlation`,
      'is not a possible correlation matrix (not positive definite: pairs left out count as uncorrelated, and a correlation of exactly 1 or -1 is degenerate)',
      'give all the pairs that are correlated, with values a posterior could have, or use draws_file',
    );
  }
  const chol = l.map((row, i) => row.map((v, j) => sigmas[i]! * v * (j <= i ? 1 : 0)));
  return { kind: 'gaussian', parameters, sigmas, correlation: rho, cholesky: chol };
}

/** Rows from which a draws file's centre is held to the assumed values, and how far it may lie (its standard deviations). */
const MIN_ROWS_CENTRE_CHECK = 10;
const CENTRE_LIMIT_SIGMAS = 5;

function readDrawsFile(name: string, ctx: ModelUncertaintyContext, allowed: ModelParameter[]): ModelUncertainty {
  const { file, path } = ctx;
  const keyPath = `${path}.draws_file`;
  const full = isAbsolute(name) ? name : resolve(ctx.baseDir, name);
  const shown = excerpt(name, 80);
  const read = readInputText(full, {
    maxBytes: MAX_DRAWS_BYTES,
    maxLabel: '8 MiB a draws file may have',
    file,
    keyPath,
    subject: `the draws file "${shown}"`,
    fix: 'give a path relative to the survey file',
  });
  ctx.inputs.push({ path: read.path, dev: read.dev, ino: read.ino });
  const bad = (what: string, fix: string): never => {
    throw inputError('bad_table', file, keyPath, `the draws file "${shown}" ${what}`, fix);
  };
  const lines = read.text.split(/\r?\n/);
  let header: ModelParameter[] | undefined;
  const offsets: number[][] = [];
  let assumed: number[] = [];
  lines.forEach((rawLine, i) => {
    const line = rawLine.trim();
    if (line === '' || line.startsWith('#')) return;
    const cells = line.split(/\s*,\s*/);
    if (!header) {
      if (!cells.every((c) => /^[a-z0-9_]+$/.test(c))) {
        bad(
          `does not start with a header of parameter names (line ${i + 1})`,
          `give a first line such as ${allowed.join(',')}`,
        );
      }
      for (const c of cells) {
        if (!allowed.includes(c as ModelParameter))
          bad(
            `names the column ${excerpt(c)}, not a parameter of this population`,
            `name columns ${allowed.join(', ')}`,
          );
      }
      if (new Set(cells).size !== cells.length) bad('names a column twice', 'name each parameter once');
      header = cells as ModelParameter[];
      assumed = header.map((p) => ctx.assumed(p));
      return;
    }
    if (cells.length !== header.length)
      bad(
        `line ${i + 1} has ${cells.length} values for ${header.length} columns`,
        'give one value per column in every row',
      );
    const nums = cells.map((c) => (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(c) ? Number(c) : NaN));
    if (nums.some((x) => !Number.isFinite(x)))
      bad(
        `line ${i + 1} ("${excerpt(line)}") is not a row of numbers`,
        'write each draw as numbers separated by commas',
      );
    if (offsets.length >= MAX_DRAWS_ROWS)
      bad(`holds more than ${MAX_DRAWS_ROWS} draws`, `thin it to at most ${MAX_DRAWS_ROWS} rows`);
    const off = nums.map((v, k) => v - assumed[k]!);
    off.forEach((d, k) => {
      const p = header![k]!;
      if (!(Math.abs(d) <= 5 * MAX_SIGMA[p]))
        bad(
          `line ${i + 1}: ${p} = ${excerpt(cells[k]!)} lies ${fmt(d)} from the assumed ${fmt(assumed[k]!)}`,
          "give draws of the same parameters as the population (log10 values, at the window's middle redshift)",
        );
    });
    offsets.push(off);
  });
  if (!header) bad('holds no header', `give a first line such as ${allowed.join(',')}`);
  if (offsets.length === 0) bad('holds no draws', 'give at least one row of values');
  // A sample of the parameters centres near the values assumed. Values in another form (linear
  // phi* under log10_phi_star, offsets instead of values, alpha with the other sign) lie within
  // the 5 caps above but every draw far from the assumed value: the model's spread is then that of
  // another model. With 10 rows or more, a column whose median lies more than 5 of its standard
  // deviations from the assumed value is refused.
  if (offsets.length >= MIN_ROWS_CENTRE_CHECK) {
    header!.forEach((p, k) => {
      const col = offsets.map((row) => row[k]!);
      const n = col.length;
      const mean = col.reduce((a, b) => a + b, 0) / n;
      const std = Math.sqrt(col.reduce((a, b) => a + (b - mean) * (b - mean), 0) / (n - 1));
      const sorted = [...col].sort((a, b) => a - b);
      const h = (n - 1) / 2;
      const median = sorted[Math.floor(h)]! + (sorted[Math.ceil(h)]! - sorted[Math.floor(h)]!) * (h - Math.floor(h));
      if (std > 0 && Math.abs(median) > CENTRE_LIMIT_SIGMAS * std)
        bad(
          `has its ${p} column centred on ${fmt(median + assumed[k]!)} (the median of ${n} draws), ${Math.round(Math.abs(median) / std)} of their standard deviations (${fmt(std)}) from the assumed ${fmt(assumed[k]!)}, so that every draw describes another model`,
          "give values of the population's own parameters at the window's middle redshift (log10 phi* and log10 L*, M* in absolute mag, alpha with its sign), not offsets from them or linear values, or set the population's values to the draws' centre",
        );
    });
  }
  return { kind: 'draws', file: name, parameters: header!, offsets };
}
