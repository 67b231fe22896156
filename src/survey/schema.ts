/**
 * Validation of a parsed survey file against specs/survey.schema.json (JSON Schema 2020-12,
 * precompiled into survey-validator.generated.ts),
 * and the translation of the validator's findings into one SurveyError:
 * unknown keys (with the nearest valid key), conflicts (two keys of which one is allowed),
 * wrong types, bad tables, and missing keys, in that order of preference.
 */
import type { ErrorObject } from 'ajv';
import { closest, distance } from 'fastest-levenshtein';
import { excerpt, inputError, type SurveyError } from '../errors.js';
import generatedValidate from './survey-validator.generated.js';

/** Location of the schema, relative to this module (src/survey or dist/survey). */
export const SURVEY_SCHEMA_URL = new URL('../../specs/survey.schema.json', import.meta.url);

interface Validator {
  (data: unknown): boolean;
  errors?: ErrorObject[] | null;
}

/**
 * The schema precompiled by ajv (scripts/generate-survey-validator.ts): importing ajv and
 * compiling the schema at run time would cost several hundred ms at every start.
 */
const validate = generatedValidate as unknown as Validator;

/** "/populations/0/phi_star/table/1" -> "populations[0].phi_star.table[1]". */
export function keyPathOf(instancePath: string): string {
  let out = '';
  for (const raw of instancePath.split('/').slice(1)) {
    const seg = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (/^\d+$/.test(seg)) out += `[${seg}]`;
    else out += out ? `.${seg}` : seg;
  }
  return out;
}

function join(parent: string, key: string): string {
  return parent ? `${parent}.${key}` : key;
}

/** Nearest candidate by edit distance, when it is near enough to be a likely typo. */
export function suggest(word: string, candidates: string[]): string | undefined {
  if (candidates.length === 0) return undefined;
  const best = closest(word, candidates);
  const d = distance(word.toLowerCase(), best.toLowerCase());
  return d <= Math.max(2, Math.floor(best.length / 3)) ? best : undefined;
}

const TYPE_WORDS: Record<string, string> = {
  number: 'a number',
  integer: 'a whole number',
  string: 'a string',
  object: 'a mapping of keys',
  array: 'a list',
  boolean: 'true or false',
};

/** A number as a message writes it: at most 6 significant digits, no trailing zeros. */
function short(x: number): string {
  return String(Number(x.toPrecision(6)));
}

/**
 * A 1-sigma of `model_uncertainty` written as text, as a paper prints it: an asymmetric error
 * ("+0.21/-0.12", "^{+0.21}_{-0.12}") or one number with a sign or unit ("±0.2", "0.2 dex"). The
 * sentence says which number to write; undefined for any other key or text.
 */
function sigmaText(path: string, text: string): { what: string; fix: string } | undefined {
  const m = /(?:^|\.)model_uncertainty\.([a-z0-9_]+)$/.exec(path);
  if (!m || m[1] === 'correlation' || m[1] === 'draws_file') return undefined;
  const numbers = text.replace(/\u2212/g, '-').match(/[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/g) ?? [];
  const dex = m[1]!.startsWith('log10_')
    ? ' (in dex: an error quoted on phi* or L* itself is first taken to log10)'
    : '';
  if (numbers.length === 2 && numbers.some((n) => n.startsWith('+')) && numbers.some((n) => n.startsWith('-'))) {
    const [a, b] = numbers.map((n) => Math.abs(Number(n))) as [number, number];
    return {
      what: `is ${describeValue(text)}, an asymmetric error, but must be one number, a symmetric 1-sigma error${dex}`,
      fix: `give the mean of the two sides, ${short((a + b) / 2)}, or the larger, ${short(Math.max(a, b))}, to be cautious (or the published posterior's draws as draws_file)`,
    };
  }
  if (numbers.length === 1) {
    return {
      what: `is ${describeValue(text)} but must be a number, the 1-sigma error${dex}`,
      fix: `write ${short(Math.abs(Number(numbers[0])))} without quotes, sign or unit`,
    };
  }
  return undefined;
}

function describeValue(v: unknown): string {
  if (v === null) return 'empty';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'a mapping';
  if (typeof v === 'string') return `the text "${v.length > 30 ? v.slice(0, 27) + '...' : v}"`;
  if (typeof v === 'number') return String(v);
  if (typeof v === 'boolean' || typeof v === 'bigint' || v === undefined) return `${typeof v} ${String(v)}`;
  return typeof v; // a symbol or a function: neither comes out of a parsed file
}

function isMapping(v: unknown): boolean {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/**
 * "a mapping holding one of count, width, edges" for a mapping whose schema asks for exactly one of
 * several keys (a oneOf of `required` branches), so that `slices: 5` is told the form to write.
 */
function oneKeyOf(schema: unknown): string | undefined {
  const branches = (schema as { oneOf?: unknown } | undefined)?.oneOf;
  if (!Array.isArray(branches) || branches.length === 0) return undefined;
  const keys = branches.map((b) => {
    const r = (b as { required?: unknown }).required;
    return Object.keys(b as object).length === 1 && Array.isArray(r) && r.length === 1 ? String(r[0]) : undefined;
  });
  if (keys.some((k) => k === undefined)) return undefined;
  return `a mapping holding one of ${keys.join(', ')}`;
}

function depth(e: ErrorObject): number {
  return e.instancePath === '' ? 0 : e.instancePath.split('/').length - 1;
}

/**
 * The keys of the sections a key is most often put into by mistake (specs/survey.schema.json; the
 * test/survey/schema.test.ts keeps them equal to it): `blend_ratio` under detection, or
 * `equivalent_width_cut` under a population, is a key of another section, where the nearest
 * spelling here (`equivalent_widths`) would mislead.
 */
export const SECTION_KEYS: Readonly<Record<'top' | 'cosmology' | 'detection' | 'population', readonly string[]>> = {
  top: [
    'format',
    'title',
    'cosmology',
    'area',
    'redshift',
    'field',
    'detection',
    'population',
    'populations',
    'slices',
    'histogram',
    'exposure',
    'plan',
  ],
  cosmology: ['preset', 'h0', 'omega_m', 't_cmb', 'omega_b', 'sigma8', 'n_s'],
  detection: [
    'kind',
    'limit',
    'line',
    'band',
    'sed',
    'system',
    'vega_to_ab',
    'band_file',
    'beta',
    'igm',
    'filter',
    'completeness',
    'photo_z',
    'redshift_selection',
    'equivalent_width_cut',
  ],
  population: [
    'name',
    'shape',
    'variable',
    'quantity',
    'phi_star',
    'log10_phi_star',
    'phi_star_dex',
    'log10_phi_star_dex',
    'l_star',
    'log10_l_star',
    'm_star',
    'alpha',
    'phi_star_1',
    'log10_phi_star_1',
    'phi_star_1_dex',
    'log10_phi_star_1_dex',
    'alpha_1',
    'phi_star_2',
    'log10_phi_star_2',
    'phi_star_2_dex',
    'log10_phi_star_2_dex',
    'alpha_2',
    'line',
    'rest_wavelength',
    'rest_band',
    'beta',
    'sed',
    'system',
    'vega_to_ab',
    'bias',
    'occupation',
    'model_uncertainty',
    'redshift_selection',
    'blend_ratio',
    'blended_lines',
    'attenuation',
    'equivalent_widths',
    'valid_redshift',
    'sfr_conversion',
  ],
};

const SECTION_WORDS = {
  top: 'the top level',
  cosmology: 'cosmology',
  detection: 'detection',
  population: 'a population',
} as const;

function sectionId(parent: string): keyof typeof SECTION_KEYS | undefined {
  if (parent === '') return 'top';
  if (parent === 'cosmology' || parent === 'detection' || parent === 'population') return parent;
  return /^populations\[\d+\]$/.test(parent) ? 'population' : undefined;
}

function sectionOf(parent: string): string {
  const id = sectionId(parent);
  return id ? SECTION_WORDS[id] : parent;
}

/** The other sections (top level, cosmology, detection, population) that hold `key`, in words. */
function misplaced(key: string, parent: string): string[] | undefined {
  const here = sectionId(parent);
  if (!here) return undefined;
  const homes = (Object.keys(SECTION_KEYS) as (keyof typeof SECTION_KEYS)[]).filter(
    (id) => id !== here && SECTION_KEYS[id].includes(key),
  );
  return homes.length > 0 ? homes.map((id) => SECTION_WORDS[id]) : undefined;
}

/**
 * A radio or submillimetre spectral index written under its own name: the file's spectral slope is
 * beta of f_lambda ~ lambda^beta, and an index a of f_nu ~ nu^a is beta = -(2 + a)
 * (docs/survey-file.md, "A power-law spectrum f_nu ~ nu^a").
 */
const SPECTRAL_INDEX_KEYS = new Set(['spectral_index', 'spectral_slope', 'radio_spectral_index', 'alpha_radio']);

function spectralIndexError(key: string, value: unknown, file: string, path: string): SurveyError {
  const a = typeof value === 'number' && Number.isFinite(value) ? value : undefined;
  return inputError(
    'unknown_key',
    file,
    path,
    `unknown key "${key}": the spectrum's slope is detection.beta, of f_lambda ~ lambda^beta`,
    a === undefined
      ? 'a spectral index a of f_nu ~ nu^a is beta = -(2 + a): a synchrotron a = -0.7 is beta: -1.3'
      : `a spectral index a of f_nu ~ nu^a is beta = -(2 + a): for a = ${a}, write beta: ${Number((-(2 + a)).toPrecision(12))}`,
  );
}

/**
 * The form to write for keys whose wrong type is a common slip (a spectrum's path without its
 * mapping, a bias factor given as a table): shown in the refusal's fix.
 */
const FORM_EXAMPLES: Readonly<Record<string, string>> = {
  sed: '{file: spectrum.csv} (the path relative to the survey file)',
  over_growth: '0.84, a plain number (b = 0.84 / D(z))',
  // the sections that are mappings, often first written as a list or one value
  redshift: '{min: 0.5, max: 1.5}',
  cosmology: '{h0: 70, omega_m: 0.3} or {preset: planck2018}',
  slices: '{count: 5}, {width: 0.2} or {edges: [0.3, 0.5, 0.9]}',
  histogram: '{width: 0.25}',
  field: '{aspect: 1, count: 4}',
  photo_z: '{sigma: 0.03, outlier_fraction: 0.02}',
};

/**
 * The form to write for a mapping given as its values alone: redshift [0.1, 1.2], slices
 * [0.3, 0.6, 0.9], slices: 5, histogram: 0.5.
 */
function formOfValues(key: string, data: unknown): string | undefined {
  if (key === 'equivalent_width_cut' && (typeof data === 'string' || typeof data === 'number')) {
    const w = typeof data === 'string' ? `"${excerpt(data)}"` : String(data);
    return `equivalent_width_cut: {rest: ${w}} (or {observed: ${w}} for a width in the observed frame)`;
  }
  if (typeof data === 'number' && Number.isFinite(data)) {
    if (key === 'slices' && Number.isInteger(data) && data > 0) return `slices: {count: ${data}}`;
    if (key === 'histogram' && data > 0) return `histogram: {width: ${data}}`;
    return undefined;
  }
  if (!Array.isArray(data) || !data.every((x) => typeof x === 'number' && Number.isFinite(x))) return undefined;
  const xs = data as number[];
  if (key === 'redshift' && xs.length === 2) return `redshift: {min: ${xs[0]}, max: ${xs[1]}}`;
  if (key === 'slices' && xs.length >= 2) return `slices: {edges: [${xs.join(', ')}]}`;
  return undefined;
}

/** Validate `obj`; return undefined when it matches the schema, else the one error to report. */
export function schemaError(obj: unknown, file: string): SurveyError | undefined {
  if (validate(obj)) return undefined;
  const errors = validate.errors ?? [];

  // 1. Unknown keys.
  const extra = errors.find((e) => e.keyword === 'additionalProperties');
  if (extra) {
    const key = String((extra.params as { additionalProperty: string }).additionalProperty);
    const parent = keyPathOf(extra.instancePath);
    const props = Object.keys(((extra.parentSchema ?? {}) as { properties?: object }).properties ?? {});
    if (sectionId(parent) === 'detection' && SPECTRAL_INDEX_KEYS.has(key))
      return spectralIndexError(key, (extra.data as Record<string, unknown>)[key], file, join(parent, key));
    // a bias mapping has two forms, and ajv reports whichever branch it tried last: name both
    if (/(^|\.)bias$/.test(parent)) {
      const forms = ['table', 'over_growth'];
      const given = Object.keys(extra.data ?? {});
      if (forms.every((f) => given.includes(f)))
        return inputError(
          'conflict',
          file,
          parent,
          'gives both table and over_growth, two forms of the bias',
          'keep one: {table: [[z, bias], ...]} or {over_growth: B} for B / D(z)',
        );
      const near = suggest(key, forms);
      return inputError(
        'unknown_key',
        file,
        join(parent, key),
        `unknown key "${key}"${near ? ` (did you mean ${near}?)` : ''}`,
        'a bias given as a mapping is {table: [[z, bias], ...]} or {over_growth: B} (b = B / D(z))',
      );
    }
    const home = misplaced(key, parent);
    if (home) {
      return inputError(
        'unknown_key',
        file,
        join(parent, key),
        `unknown key "${key}" here: it is a key of ${home.join(' or of ')}, not of ${sectionOf(parent)}`,
        `move it there`,
      );
    }
    const near = suggest(key, props);
    return near
      ? inputError(
          'unknown_key',
          file,
          join(parent, key),
          `unknown key "${key}" (did you mean ${near}?)`,
          'rename or remove it',
        )
      : inputError(
          'unknown_key',
          file,
          join(parent, key),
          `unknown key "${key}"`,
          `remove it; the keys allowed here are ${props.join(', ')}`,
        );
  }

  // 2. Two keys where only one is allowed (oneOf over `required` branches that several pass).
  // A value that is not a mapping passes every `required` branch vacuously: that is a wrong type
  // (`slices: 5`), reported below, not two keys given.
  const conflict = errors.find(
    (e) =>
      e.keyword === 'oneOf' &&
      Array.isArray((e.params as { passingSchemas: unknown }).passingSchemas) &&
      isMapping(e.data),
  );
  if (conflict) {
    const branches = (conflict.schema ?? []) as { required?: string[] }[];
    const passing = (conflict.params as { passingSchemas: number[] }).passingSchemas;
    const keys = passing.map((i) => branches[i]?.required?.[0] ?? '?');
    const all = branches.map((b) => b.required?.[0] ?? '?');
    const parent = keyPathOf(conflict.instancePath);
    return inputError(
      'conflict',
      file,
      join(parent, keys[1] ?? keys[0] ?? ''),
      `${keys.join(' and ')} are both given but only one of ${all.join(', ')} is allowed`,
      `keep one of them`,
    );
  }

  // 3. Wrong values (types, enums, list lengths), the most specific place first.
  const valueErrors = errors
    .filter((e) => !['required', 'anyOf', 'oneOf', 'if', '$ref'].includes(e.keyword))
    .sort((a, b) => depth(b) - depth(a));
  const first = valueErrors[0];
  if (first) {
    const path = keyPathOf(first.instancePath);
    const data = first.data;
    switch (first.keyword) {
      case 'type': {
        const group = errors.find((e) => e.keyword === 'anyOf' && e.instancePath === first.instancePath);
        const title = (group?.parentSchema as { title?: string } | undefined)?.title;
        const expected =
          title ??
          oneKeyOf(first.parentSchema) ??
          TYPE_WORDS[String((first.params as { type: string }).type)] ??
          'another type';
        // "beta: −2" pasted from a paper: YAML reads the typeset minus sign (U+2212) as text
        const typeset = typeof data === 'string' ? data.trim().replace(/\u2212/g, '-') : '';
        if (typeset !== data && /^-(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(typeset)) {
          return inputError(
            'wrong_type',
            file,
            path,
            `is the text "${data as string}", written with the typeset minus sign "−" (U+2212), but must be ${expected}`,
            `write ${typeset} with the minus sign "-"`,
          );
        }
        const sigma = typeof data === 'string' ? sigmaText(path, data) : undefined;
        if (sigma) return inputError('wrong_type', file, path, sigma.what, sigma.fix);
        // "h0: 70 km/s/Mpc" or "h0: '70'": a number with a unit, or quoted, where the key takes a
        // plain number in its own unit
        const type = String((first.params as { type: string }).type);
        const lead =
          typeof data === 'string' && title === undefined && (type === 'number' || type === 'integer')
            ? /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([^\s\d.eE+-]?)/.exec(data)
            : null;
        if (lead && (lead[2] !== '' || lead[0] === data) && (type === 'number' || Number.isInteger(Number(lead[1])))) {
          return lead[2] !== ''
            ? inputError(
                'wrong_type',
                file,
                path,
                `is ${describeValue(data)} but must be ${expected}, without a unit`,
                lead[2] === '%'
                  ? `no key takes a percentage: write it as its fraction, ${Number(lead[1]) / 100}`
                  : `write ${lead[1]} alone, in the key's own unit (docs/survey-file.md gives each key's unit)`,
              )
            : inputError(
                'wrong_type',
                file,
                path,
                `is ${describeValue(data)} but must be ${expected}`,
                `write ${lead[1]} without quotes`,
              );
        }
        const key = path
          .split('.')
          .pop()!
          .replace(/\[\d+\]$/, '');
        return inputError(
          'wrong_type',
          file,
          path,
          `is ${describeValue(data)} but must be ${expected}`,
          key === 'sed' && typeof data === 'string'
            ? `write it as sed: {file: ${data}}`
            : formOfValues(key, data) !== undefined
              ? `write it as ${formOfValues(key, data)}`
              : FORM_EXAMPLES[key]
                ? `write it as ${key}: ${FORM_EXAMPLES[key]}`
                : 'change the value to that form',
        );
      }
      case 'enum':
      case 'const': {
        const allowed = (first.keyword === 'enum' ? (first.schema as unknown[]) : [first.schema]).map(String);
        const near = typeof data === 'string' ? suggest(data, allowed) : undefined;
        return inputError(
          'out_of_range',
          file,
          path,
          `is ${describeValue(data)} but must be ${allowed.length === 1 ? '' : 'one of '}${allowed.join(' | ')}${near ? ` (did you mean ${near}?)` : ''}`,
          'use one of those values',
        );
      }
      case 'minItems':
      case 'maxItems': {
        const n = Number((first.params as { limit: number }).limit);
        const code = /(^|\.)table(\[|$)/.test(path) ? 'bad_table' : /^slices/.test(path) ? 'bad_slices' : 'wrong_type';
        const isRow = /\]$/.test(path) && /table\[\d+\]$/.test(path);
        const what = isRow
          ? `is a row of ${Array.isArray(data) ? data.length : '?'} values but each row must hold exactly 2`
          : `has ${Array.isArray(data) ? data.length : '?'} ${Array.isArray(data) && data.length === 1 ? 'entry' : 'entries'} but needs ${first.keyword === 'minItems' ? 'at least' : 'at most'} ${n}`;
        return inputError(code, file, path, what, isRow ? 'write each row as [x, value]' : 'add the missing entries');
      }
      default:
        return inputError(
          'wrong_type',
          file,
          path,
          `${first.message ?? 'is not valid'}`,
          'see specs/survey.schema.json for the allowed form',
        );
    }
  }

  // 4. Missing keys.
  const missing = errors.find((e) => e.keyword === 'required');
  if (missing) {
    const key = String((missing.params as { missingProperty: string }).missingProperty);
    const parent = keyPathOf(missing.instancePath);
    const group = errors.find((e) => e.keyword === 'oneOf' && e.instancePath === missing.instancePath);
    const options = group ? ((group.schema ?? []) as { required?: string[] }[]).map((b) => b.required?.[0]) : [];
    if (group && options.includes(key)) {
      return inputError('missing_key', file, join(parent, key), `is missing`, `give one of ${options.join(', ')}`);
    }
    return inputError('missing_key', file, join(parent, key), `is missing`, `add ${key} (see the survey-file format)`);
  }
  const e = errors[0]!;
  return inputError(
    'wrong_type',
    file,
    keyPathOf(e.instancePath),
    e.message ?? 'is not valid',
    'see specs/survey.schema.json',
  );
}
