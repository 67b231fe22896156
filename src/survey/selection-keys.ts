/**
 * The selection keys of a survey file (docs/survey-file.md, "Selection effects"):
 * detection.redshift_selection, detection.equivalent_width_cut, and on a population
 * redshift_selection, blend_ratio, attenuation, equivalent_widths and valid_redshift.
 */
import { inputError } from '../errors.js';
import type { DetectionKind } from '../model/detection.js';
import type { DetectionSelection, EquivalentWidthDistribution, PopulationSelection } from '../model/selection.js';
import type { ZParam } from '../model/zparam.js';
import { MAX_REDSHIFT, RANGES, describeRange, inRange, type Range } from '../model/limits.js';
import { parseQuantity } from './units.js';
import { checkParam, constantParam, fmt, makeZParam, type ZTable } from './zparam.js';

type Q = number | string;
type ZRaw = number | string | ZTable;
type Window = { min: number; max: number };

export interface RawDetectionSelection {
  kind: DetectionKind;
  redshift_selection?: ZRaw;
  equivalent_width_cut?: { rest?: Q; observed?: Q };
}

export interface RawPopulationSelection {
  redshift_selection?: ZRaw;
  blend_ratio?: ZRaw;
  blended_lines?: { line: Q; ratio: number }[];
  attenuation?: ZRaw;
  equivalent_widths?: {
    model: 'exponential' | 'lognormal' | 'table';
    scale?: Q;
    median?: Q;
    sigma_dex?: number;
    table?: [number, number][];
  };
  valid_redshift?: { min: number; max: number };
}

function ranged(v: number, range: Range, file: string, path: string): number {
  if (!inRange(v, range)) {
    throw inputError(
      'out_of_range',
      file,
      path,
      `is ${fmt(v)}${range.unit ? ` ${range.unit}` : ''}, outside its range (${describeRange(range)})`,
      'give a value in that range',
    );
  }
  return v;
}

function width(v: Q, file: string, path: string): number {
  return ranged(parseQuantity(v, 'wavelength', file, path), RANGES.equivalentWidth, file, path);
}

function fraction(v: ZRaw, w: Window, file: string, path: string): ZParam {
  const p = makeZParam(v, file, path);
  checkParam(p, w, file, path, { what: 'the fraction kept', range: RANGES.fraction });
  return p;
}

/** detection.redshift_selection (checked over the window of every population) and equivalent_width_cut. */
export function readDetectionSelection(det: RawDetectionSelection, hull: Window, file: string): DetectionSelection {
  const out: DetectionSelection = {};
  if (det.redshift_selection !== undefined)
    out.redshiftSelection = fraction(det.redshift_selection, hull, file, 'detection.redshift_selection');
  const cut = det.equivalent_width_cut;
  if (cut !== undefined) {
    const frame = cut.rest !== undefined ? 'rest' : 'observed';
    out.equivalentWidthCut = {
      frame,
      angstrom: width((cut.rest ?? cut.observed)!, file, `detection.equivalent_width_cut.${frame}`),
    };
  }
  return out;
}

function distribution(
  d: NonNullable<RawPopulationSelection['equivalent_widths']>,
  file: string,
  path: string,
): EquivalentWidthDistribution {
  const need = (key: string, what: string): never => {
    throw inputError('missing_key', file, `${path}.${key}`, `is missing (model ${d.model})`, `give ${what}`);
  };
  const positive = (v: Q, key: string): number => {
    const x = width(v, file, `${path}.${key}`);
    if (!(x > 0))
      throw inputError('out_of_range', file, `${path}.${key}`, `is ${fmt(x)} Angstrom`, 'give a positive width');
    return x;
  };
  if (d.model === 'exponential') {
    if (d.scale === undefined) need('scale', 'the scale width of the exponential (Angstrom or with a unit)');
    return { model: 'exponential', scaleAngstrom: positive(d.scale!, 'scale') };
  }
  if (d.model === 'lognormal') {
    if (d.median === undefined) need('median', 'the median rest-frame width (Angstrom or with a unit)');
    if (d.sigma_dex === undefined) need('sigma_dex', 'the spread of log10 W in dex');
    return {
      model: 'lognormal',
      medianAngstrom: positive(d.median!, 'median'),
      sigmaDex: ranged(d.sigma_dex!, RANGES.sigmaDex, file, `${path}.sigma_dex`),
    };
  }
  if (d.table === undefined) need('table', 'rows [width in Angstrom, fraction of sources above it]');
  const rows = d.table!;
  rows.forEach(([w, f], i) => {
    ranged(w, RANGES.equivalentWidth, file, `${path}.table[${i}][0]`);
    ranged(f, RANGES.fraction, file, `${path}.table[${i}][1]`);
    if (i > 0 && !(w > rows[i - 1]![0])) {
      throw inputError(
        'bad_table',
        file,
        `${path}.table[${i}]`,
        `the widths are not strictly increasing (${fmt(w)} follows ${fmt(rows[i - 1]![0])})`,
        'list the rows in increasing width without repeats',
      );
    }
    if (i > 0 && f > rows[i - 1]![1]) {
      throw inputError(
        'bad_table',
        file,
        `${path}.table[${i}]`,
        `the fraction above ${fmt(w)} Angstrom (${fmt(f)}) exceeds the fraction above a smaller width`,
        'give fractions that do not grow with the width',
      );
    }
  });
  return { model: 'table', widthAngstrom: rows.map((r) => r[0]), fractionAbove: rows.map((r) => r[1]) };
}

/** A population's selection keys, checked against the detection kind and over its window. */
export function readPopulationSelection(
  p: RawPopulationSelection,
  path: string,
  kind: DetectionKind,
  cut: boolean,
  w: Window,
  file: string,
): PopulationSelection {
  const out: PopulationSelection = {};
  if (p.redshift_selection !== undefined)
    out.redshiftSelection = fraction(p.redshift_selection, w, file, `${path}.redshift_selection`);
  if (p.blend_ratio !== undefined) {
    if (kind !== 'line_flux') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.blend_ratio`,
        `blend_ratio applies to line searches (line_flux), not ${kind}`,
        'remove it',
      );
    }
    const raw = p.blend_ratio;
    if (typeof raw === 'number') {
      out.blendRatio = constantParam(ranged(raw, RANGES.blendRatio, file, `${path}.blend_ratio`));
    } else {
      // a table or an expression in z: the [NII]/H-alpha ratio falls with redshift
      const b = makeZParam(raw, file, `${path}.blend_ratio`);
      checkParam(b, w, file, `${path}.blend_ratio`, { what: 'the blend ratio', range: RANGES.blendRatio });
      out.blendRatio = b;
    }
  }
  if (p.attenuation !== undefined) {
    if (kind === 'threshold') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.attenuation`,
        'attenuation dims an observed flux, and a threshold survey observes none',
        'remove it, or use detection kind line_flux or magnitude',
      );
    }
    const a = makeZParam(p.attenuation, file, `${path}.attenuation`);
    checkParam(a, w, file, `${path}.attenuation`, {
      what: 'the attenuation',
      range: RANGES.attenuation,
      unitLabel: 'mag',
    });
    out.attenuation = a;
  }
  if (p.equivalent_widths !== undefined) {
    if (kind !== 'line_flux') {
      throw inputError(
        'kind_mismatch',
        file,
        `${path}.equivalent_widths`,
        `equivalent_widths applies to line searches (line_flux), not ${kind}`,
        'remove it',
      );
    }
    out.equivalentWidths = distribution(p.equivalent_widths, file, `${path}.equivalent_widths`);
    if (!cut) {
      // (checked after the distribution itself) read and ignored, the counts would hold every width while the file seems to cut them
      throw inputError(
        'missing_key',
        file,
        'detection.equivalent_width_cut',
        `is missing, but ${path}.equivalent_widths gives a distribution of equivalent widths that only that cut uses`,
        'add equivalent_width_cut: {rest: W} or {observed: W} to detection, or remove equivalent_widths',
      );
    }
  } else if (cut) {
    throw inputError(
      'missing_key',
      file,
      `${path}.equivalent_widths`,
      "is missing, but detection.equivalent_width_cut needs the distribution of the line's equivalent widths",
      'give e.g. equivalent_widths: {model: exponential, scale: "50 Angstrom"}',
    );
  }
  const v = p.valid_redshift;
  if (v !== undefined) {
    ranged(v.min, { min: 0, max: MAX_REDSHIFT, unit: '' }, file, `${path}.valid_redshift.min`);
    ranged(v.max, { min: 0, max: MAX_REDSHIFT, unit: '' }, file, `${path}.valid_redshift.max`);
    if (!(v.max > v.min)) {
      throw inputError(
        'out_of_range',
        file,
        `${path}.valid_redshift.max`,
        `is ${fmt(v.max)}, not above min (${fmt(v.min)})`,
        'give max above min',
      );
    }
    out.validRedshift = { min: v.min, max: v.max };
  }
  return out;
}
