/**
 * A JSON-ready statement of the assumed model of a population: what the file said for each
 * Schechter parameter (number, table or expression) and its value at the window's middle.
 * Every output carries this, because a forecast is only as good as the model assumed.
 */
import type { Population, Survey, ZParam } from '../survey/types.js';

export interface ParameterDescription {
  /** As written: a number, {table: [[z, v], ...]} or an expression in z. */
  given: number | { table: [number, number][] } | string;
  /** Value at the middle of the population's window. */
  at_window_middle: number;
}

export interface ModelDescription {
  name: string;
  shape: 'schechter';
  variable: 'luminosity' | 'magnitude';
  quantity?: string;
  window: { min: number; max: number };
  phi_star_mpc3: ParameterDescription;
  l_star?: ParameterDescription;
  m_star?: ParameterDescription;
  alpha: ParameterDescription;
  line_angstrom?: number;
  rest_wavelength_angstrom?: number;
  /** One line a person can read: "Schechter in luminosity: phi* = ..., L* = ..., alpha = ... (at z = ...)". */
  summary: string;
}

function describeParam(p: ZParam, z: number): ParameterDescription {
  return { given: p.source, at_window_middle: p.at(z) };
}

function fmt(x: number): string {
  const ax = Math.abs(x);
  if (ax !== 0 && (ax >= 1e5 || ax < 1e-3)) {
    const [m, e] = x.toExponential(3).split('e');
    return `${Number(m)}e${Number(e)}`;
  }
  return Number(x.toPrecision(4)).toString();
}

export function describeModel(survey: Survey, p: Population): ModelDescription {
  const zMid = 0.5 * (p.window.min + p.window.max);
  const d: ModelDescription = {
    name: p.name,
    shape: p.shape,
    variable: p.variable,
    window: { ...p.window },
    phi_star_mpc3: describeParam(p.phiStar, zMid),
    alpha: describeParam(p.alpha, zMid),
    summary: '',
  };
  if (p.quantity) d.quantity = p.quantity;
  if (p.lStar) d.l_star = describeParam(p.lStar, zMid);
  if (p.mStar) d.m_star = describeParam(p.mStar, zMid);
  if (survey.detection.kind === 'line_flux') d.line_angstrom = p.lineAngstrom ?? survey.detection.lineAngstrom;
  if (survey.detection.kind === 'magnitude') d.rest_wavelength_angstrom = p.restWavelengthAngstrom;
  const evolving = !p.phiStar.constant || !p.alpha.constant || !(p.lStar ?? p.mStar)!.constant;
  const knee =
    p.variable === 'luminosity'
      ? `L* = ${fmt(p.lStar!.at(zMid))}${survey.detection.kind === 'threshold' ? (p.quantity ? ` (${p.quantity})` : '') : ' erg/s'}`
      : `M* = ${fmt(p.mStar!.at(zMid))} AB`;
  d.summary =
    `${p.name}: Schechter function in ${p.variable}, phi* = ${fmt(p.phiStar.at(zMid))} Mpc^-3, ${knee}, ` +
    `alpha = ${fmt(p.alpha.at(zMid))}${evolving ? ` (evolving; values at z = ${fmt(zMid)})` : ''}`;
  return d;
}
