/**
 * The assumed luminosity function's own 1-sigma uncertainty (a population's `model_uncertainty`,
 * docs/survey-file.md): constant offsets to the Schechter parameters, applied at every redshift so
 * that evolving parameters keep their evolution, drawn from a multivariate normal (sigmas and
 * correlations) or read from a file of draws (one draw a row).
 */
import type { ModelDescription } from './outputs/shared.js';
import type { Survey } from './survey.js';
import { inputError } from '../errors.js';

/** Default number of draws (predict's --draws). */
export const DEFAULT_MODEL_DRAWS = 1000;
/** Default seed (predict's --seed). */
export const DEFAULT_MODEL_SEED = 1;
/** Most draws a prediction may ask for. */
export const MAX_MODEL_DRAWS = 100_000;

/**
 * How a survey's model is drawn: 'seeded' when a population's model_uncertainty gives sigmas (drawn
 * --draws N times from --seed S), 'file' when every one is a draws_file (each row once, nothing
 * random), 'none' without model_uncertainty.
 */
export function modelDrawing(survey: Survey): 'seeded' | 'file' | 'none' {
  const kinds = survey.populations.map((p) => p.modelUncertainty?.kind);
  return kinds.includes('gaussian') ? 'seeded' : kinds.includes('draws') ? 'file' : 'none';
}

/**
 * A number of draws asked for (`option`, called `count` in the sentence) where the model is not drawn
 * that many times: refused, naming the file (predict --draws, report --draws, library
 * predict's model.draws). Silently ignoring it would leave the caller believing it had the model's
 * spread.
 */
export function refuseUndrawnModel(survey: Survey, option: string, count: string): void {
  const how = modelDrawing(survey);
  if (how === 'seeded') return;
  throw inputError(
    'bad_option',
    survey.file,
    option,
    how === 'none'
      ? 'no population has a model_uncertainty block, so there is no model spread to draw'
      : `every population's model_uncertainty is a draws_file, whose rows are each drawn once whatever ${count} is`,
    how === 'none'
      ? `add model_uncertainty to a population (docs/survey-file.md) or leave out ${option}`
      : `leave out ${option}`,
  );
}

/** The parameters a model uncertainty may name (double Schechter: _1 and _2, sharing L* or M*). */
export type ModelParameter =
  | 'log10_phi_star'
  | 'log10_l_star'
  | 'm_star'
  | 'alpha'
  | 'log10_phi_star_1'
  | 'log10_phi_star_2'
  | 'alpha_1'
  | 'alpha_2';

export interface GaussianModelUncertainty {
  kind: 'gaussian';
  /** The parameters in the order the file lists them (the order of every vector below). */
  parameters: ModelParameter[];
  /** 1-sigma of each parameter (dex for log10 phi* and log10 L*, mag for M*). */
  sigmas: number[];
  /** The correlation matrix (pairs left out 0), positive definite. */
  correlation: number[][];
  /** Lower Cholesky factor of the covariance sigma_i sigma_j rho_ij: an offset is L xi, xi standard normal. */
  cholesky: number[][];
}

export interface DrawsModelUncertainty {
  kind: 'draws';
  /** The draws file as named in the survey file. */
  file: string;
  /** The file's columns. */
  parameters: ModelParameter[];
  /** One row per draw: the row's values minus the assumed values at the window's middle. */
  offsets: number[][];
}

export type ModelUncertainty = GaussianModelUncertainty | DrawsModelUncertainty;

/** The names a population's model uncertainty may use, in the order a forecast lists them. */
export function modelParameterNames(
  shape: 'schechter' | 'double_schechter',
  variable: 'luminosity' | 'magnitude',
): ModelParameter[] {
  const star: ModelParameter = variable === 'luminosity' ? 'log10_l_star' : 'm_star';
  return shape === 'double_schechter'
    ? ['log10_phi_star_1', 'log10_phi_star_2', 'alpha_1', 'alpha_2', star]
    : ['log10_phi_star', star, 'alpha'];
}

/** One draw as offsets: per component (log10 phi*, alpha), and the characteristic value (log10 L* or M*). */
export interface ModelOffsets {
  log10PhiStar: number[];
  alpha: number[];
  characteristic: number;
}

/** The offsets of a vector of parameter values in `parameters`' order, for a population of `components` components. */
export function modelOffsets(
  parameters: readonly ModelParameter[],
  values: ArrayLike<number>,
  components: number,
): ModelOffsets {
  const out: ModelOffsets = {
    log10PhiStar: new Array<number>(components).fill(0),
    alpha: new Array<number>(components).fill(0),
    characteristic: 0,
  };
  parameters.forEach((p, i) => {
    const v = values[i]!;
    switch (p) {
      case 'log10_phi_star':
        out.log10PhiStar.fill(v);
        break;
      case 'alpha':
        out.alpha.fill(v);
        break;
      case 'log10_phi_star_1':
        out.log10PhiStar[0] = v;
        break;
      case 'log10_phi_star_2':
        out.log10PhiStar[1] = v;
        break;
      case 'alpha_1':
        out.alpha[0] = v;
        break;
      case 'alpha_2':
        out.alpha[1] = v;
        break;
      default:
        out.characteristic = v;
    }
  });
  return out;
}

/** The model uncertainty as read (docs/outputs.md): sigmas and the non-zero correlations, or the draws file. */
export function describeUncertainty(u: ModelUncertainty): NonNullable<ModelDescription['model_uncertainty']> {
  if (u.kind === 'draws')
    return { kind: 'draws', parameters: [...u.parameters], file: u.file, draws: u.offsets.length };
  const sigmas: Record<string, number> = {};
  const correlations: Record<string, number> = {};
  u.parameters.forEach((n, i) => {
    sigmas[n] = u.sigmas[i]!;
    for (let j = i + 1; j < u.parameters.length; j++) {
      const rho = u.correlation[i]![j]!;
      if (rho !== 0) correlations[`${n}-${u.parameters[j]!}`] = rho;
    }
  });
  return { kind: 'gaussian', parameters: [...u.parameters], sigmas, correlations };
}
