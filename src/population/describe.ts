/**
 * A JSON-ready statement of the assumed model of a population: what the file said for each
 * Schechter parameter (number, table or expression) and its value at the window's middle.
 * Every output carries this, because a forecast is only as good as the model assumed.
 */
import type { Population } from '../model/population.js';
import { describeUncertainty } from '../model/model-uncertainty.js';
import type { Survey } from '../model/survey.js';
import { isTableSource, type BiasSource, type ZParam } from '../model/zparam.js';
import type { ModelDescription, ParameterDescription } from '../model/outputs/shared.js';
import { compact } from '../render/format.js';
import { describeSelection } from '../selection/describe.js';

/** A parameter as written and at redshift z (the window's middle). */
function parameterAt(p: ZParam, z: number): ParameterDescription {
  return { given: p.source, at_window_middle: p.at(z) };
}

const fmt = (x: number): string => compact(x, 4);

/**
 * A given bias as written, in words: "2.4", "1.2 + 0.4*z", "a table in z" or "0.84 / D(z)" (from
 * {over_growth: 0.84}, D the linear growth factor, D(0) = 1).
 */
export function biasWords(source: BiasSource): string {
  if (typeof source === 'number') return fmt(source);
  if (typeof source === 'string') return source;
  if (isTableSource(source)) return 'a table in z';
  return `${fmt(source.over_growth)} / D(z)`;
}

/** The summary's words on a given bias: "bias 0.84 / D(z) (1.586 at z = 1.35)"; '' for bias auto. */
function givenBiasWords(p: Population, zMid: number): string {
  if (p.bias === 'auto') return '';
  const b = p.bias;
  if (b.constant) return `bias ${fmt(b.at(zMid))}`;
  return `bias ${isTableSource(b.source) ? 'from ' : ''}${biasWords(b.source)} (${fmt(b.at(zMid))} at z = ${fmt(zMid)})`;
}

/**
 * Where the absolute magnitudes are defined, for the summary: a rest band, or (with a spectrum) the
 * rest wavelength; the population's own spectrum, or its own spectral slope beta, where it gives one.
 */
function restFrameWords(survey: Survey, p: Population): string {
  const det = survey.detection;
  if (det.kind !== 'magnitude') return '';
  const own = p.sed
    ? `k-corrected with its own spectrum ${p.sed.spectrum.file} in place of ` +
      (det.sed ? `the spectrum ${det.sed.spectrum.file}` : `detection.beta = ${fmt(det.beta)}`)
    : '';
  const b = p.restBand;
  if (b)
    return (
      (b.table
        ? ` in the rest band ${b.table.file}`
        : ` in a rest-frame ${b.profile} band at ${fmt(b.centerAngstrom)} A (fwhm ${fmt(b.fwhmAngstrom)} A)`) +
      (own ? `, ${own}` : '')
    );
  if (own) return ` at rest ${fmt(p.restWavelengthAngstrom)} A, ${own}`;
  if (det.sed)
    return ` at rest ${fmt(p.restWavelengthAngstrom)} A, k-corrected with the spectrum ${det.sed.spectrum.file}`;
  // a population's own spectral slope (the detection's is said with the detection)
  return p.beta !== undefined
    ? ` (k-corrected with its own spectral slope beta = ${fmt(p.beta)} in place of detection.beta = ${fmt(det.beta)})`
    : '';
}

export function describeModel(survey: Survey, p: Population): ModelDescription {
  const zMid = 0.5 * (p.window.min + p.window.max);
  const d: ModelDescription = {
    name: p.name,
    shape: p.shape,
    variable: p.variable,
    window: { ...p.window },
    phi_star_mpc3: parameterAt(p.phiStar, zMid),
    alpha: parameterAt(p.alpha, zMid),
    summary: '',
    selection: describeSelection(survey.detection, p),
  };
  if (p.quantity) d.quantity = p.quantity;
  if (p.components.length > 1) {
    d.components = p.components.map((c) => ({
      phi_star_mpc3: parameterAt(c.phiStar, zMid),
      alpha: parameterAt(c.alpha, zMid),
    }));
  }
  if (p.sfrConversion) {
    const eq: Record<string, string> = {
      halpha: 'Kennicutt 1998 (ARA&A 36, 189), H-alpha',
      oii: 'Kennicutt 1998 (ARA&A 36, 189), [OII]',
      uv: 'Kennicutt 1998 (ARA&A 36, 189), UV continuum',
      factor: 'given in the survey file',
    };
    d.sfr_conversion = {
      name: p.sfrConversion.name,
      factor: p.sfrConversion.factor,
      source: eq[p.sfrConversion.name]!,
    };
  }
  if (p.lStar) d.l_star = parameterAt(p.lStar, zMid);
  if (p.mStar) d.m_star = parameterAt(p.mStar, zMid);
  if (survey.detection.kind === 'line_flux') d.line_angstrom = p.lineAngstrom ?? survey.detection.lineAngstrom;
  const det = survey.detection;
  if (det.kind === 'magnitude') {
    d.rest_wavelength_angstrom = p.restWavelengthAngstrom;
    if (p.restBand) {
      d.rest_band = {
        profile: p.restBand.profile,
        center_angstrom: p.restBand.centerAngstrom,
        fwhm_angstrom: p.restBand.fwhmAngstrom,
      };
      if (p.restBand.table) d.rest_band.file = p.restBand.table.file;
    }
    d.k_correction = p.sed
      ? { method: 'spectrum', spectrum_file: p.sed.spectrum.file, spectrum_from: 'population' }
      : det.sed
        ? { method: 'spectrum', spectrum_file: det.sed.spectrum.file }
        : p.beta !== undefined
          ? { method: 'power_law', beta: p.beta, beta_from: 'population' }
          : { method: 'power_law', beta: det.beta };
  }
  if (p.variable === 'magnitude') {
    d.magnitude_system = { stated: 'ab', m_star_given: p.magnitudeSystem?.system ?? 'ab' };
    if (p.magnitudeSystem) d.magnitude_system.vega_to_ab = p.magnitudeSystem.vegaToAb;
  }
  const evolving =
    p.components.some((c) => !c.phiStar.constant || !c.alpha.constant) || !(p.lStar ?? p.mStar)!.constant;
  const knee =
    p.variable === 'luminosity'
      ? `L* = ${fmt(p.lStar!.at(zMid))}${survey.detection.kind === 'threshold' ? (p.quantity ? ` (${p.quantity})` : '') : ' erg/s'}`
      : `M* = ${fmt(p.mStar!.at(zMid))} AB${p.magnitudeSystem ? ` (given in Vega, AB = Vega ${p.magnitudeSystem.vegaToAb < 0 ? '-' : '+'} ${fmt(Math.abs(p.magnitudeSystem.vegaToAb))})` : ''}${restFrameWords(survey, p)}`;
  const tail = evolving ? ` (evolving; values at z = ${fmt(zMid)})` : '';
  if (p.components.length > 1) {
    const parts = p.components.map(
      (c, i) => `phi${i + 1}* = ${fmt(c.phiStar.at(zMid))} Mpc^-3, alpha${i + 1} = ${fmt(c.alpha.at(zMid))}`,
    );
    d.summary = `${p.name}: double Schechter function in ${p.variable}, ${knee}; ${parts.join('; ')}${tail}`;
  } else {
    d.summary =
      `${p.name}: Schechter function in ${p.variable}, phi* = ${fmt(p.phiStar.at(zMid))} Mpc^-3, ${knee}, ` +
      `alpha = ${fmt(p.alpha.at(zMid))}${tail}`;
  }
  const sel = selectionWords(d.selection, selectionRanges(survey, p));
  if (sel) d.summary += `; ${sel}`;
  // a given bias (bias auto is matched to haloes by the prediction: the outputs give what it matched)
  const bias = givenBiasWords(p, zMid);
  if (bias) d.summary += `; ${bias}`;
  if (p.modelUncertainty) {
    d.model_uncertainty = describeUncertainty(p.modelUncertainty);
    d.summary += `; ${uncertaintyWords(d.model_uncertainty)}`;
  }
  return d;
}

/** The model uncertainty in words for the summary line. */
function uncertaintyWords(u: NonNullable<ModelDescription['model_uncertainty']>): string {
  if (u.kind === 'draws') return `model uncertainty: ${u.draws} draws from ${u.file}`;
  const s = Object.entries(u.sigmas ?? {}).map(([n, v]) => `${n} ${fmt(v)}`);
  const r = Object.entries(u.correlations ?? {}).map(([n, v]) => `${n} ${fmt(v)}`);
  return `model uncertainty (1 sigma): ${s.join(', ')}${r.length ? `; correlations ${r.join(', ')}` : ''}`;
}

/**
 * The smallest and largest value of a parameter in z over [lo, hi], for words: a table's exactly
 * (linear between its rows: the ends and the rows inside), an expression's over 401 even points,
 * its kinks and its narrow features (a summary's four digits; the counts integrate it exactly).
 */
export function rangeOver(p: ZParam, lo: number, hi: number): [number, number] {
  const zs = [lo, hi];
  if (isTableSource(p.source)) {
    for (const [z] of p.source.table) if (z > lo && z < hi) zs.push(z);
  } else if (!p.constant) {
    for (let i = 1; i < 400; i++) zs.push(lo + ((hi - lo) * i) / 400);
    zs.push(...(p.kinks?.(lo, hi) ?? []), ...(p.features?.(lo, hi) ?? []));
  }
  const v = zs.map((z) => p.at(z));
  return [Math.min(...v), Math.max(...v)];
}

/** The ranges over the window of the selection's parameters that vary with z (none for a number). */
interface SelectionRanges {
  redshiftSelection?: [number, number];
  blendRatio?: [number, number];
  attenuation?: [number, number];
}

function selectionRanges(survey: Survey, p: Population): SelectionRanges {
  const { min, max } = p.window;
  const of = (q: ZParam | undefined) => (q && !q.constant ? rangeOver(q, min, max) : undefined);
  const r: SelectionRanges = {};
  const sel = of(p.redshiftSelection ?? survey.detection.redshiftSelection);
  if (sel) r.redshiftSelection = sel;
  const blend = of(p.blendRatio);
  if (blend) r.blendRatio = blend;
  const att = of(p.attenuation);
  if (att) r.attenuation = att;
  return r;
}

/**
 * A value in words: a parameter that varies with z at the window's middle and over the window
 * ("0.8 at the window's middle (0.05 to 0.8 over the window)"), a number as it is.
 */
function valueWords(atMiddle: number, r: [number, number] | undefined, unit = ''): string {
  return r
    ? `${fmt(atMiddle)}${unit} at the window's middle (${fmt(r[0])} to ${fmt(r[1])}${unit} over the window)`
    : `${fmt(atMiddle)}${unit}`;
}

/**
 * The selection effects in words for the summary line ('' without any, so plain summaries are
 * unchanged). A parameter that varies with z is given at the window's middle and as its range over
 * the window, so that a selection that keeps nothing at the middle does not read as one that keeps
 * nothing at all; a number as it is.
 */
function selectionWords(s: ModelDescription['selection'], r: SelectionRanges): string {
  const parts: string[] = [];
  if (s.redshift_selection)
    parts.push(
      `redshift selection from the ${s.redshift_selection.from} keeps ${valueWords(s.redshift_selection.fraction.at_window_middle, r.redshiftSelection)}`,
    );
  if (s.blend_ratio !== undefined)
    parts.push(
      typeof s.blend_ratio === 'number'
        ? `blended lines add ${fmt(s.blend_ratio)} of the line flux`
        : `blended lines add ${valueWords(s.blend_ratio.at_window_middle, r.blendRatio, ' of the line flux')}`,
    );
  if (s.blended_lines)
    parts.push(
      `blended lines at ${s.blended_lines.map((b) => `${compact(b.line_angstrom, 7)} A (${fmt(b.ratio)} of the line flux)`).join(' and ')}, each at its own filter transmission`,
    );
  if (s.attenuation_mag)
    parts.push(
      `attenuation ${valueWords(s.attenuation_mag.at_window_middle, r.attenuation, ' mag')} applied (the luminosity function is intrinsic)`,
    );
  if (s.equivalent_width_cut)
    parts.push(
      `${s.equivalent_width_cut.frame}-frame equivalent width >= ${fmt(s.equivalent_width_cut.width_angstrom)} A keeps ${fmt(s.equivalent_width_cut.kept_at_window_middle)} at the window's middle`,
    );
  return parts.join(', ');
}
