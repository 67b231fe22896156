/**
 * Surveys built in code for the forecast tests (invented scenarios), from the small plain
 * description that test/reference/generate/fisher.py also reads, so that both sides count the
 * same survey.
 */
import type { Completeness, Detection } from '../../src/model/detection.js';
import type { Survey } from '../../src/model/survey.js';
import type { ZParam } from '../../src/model/zparam.js';

export interface SurveySpec {
  name: string;
  kind: 'line_flux' | 'magnitude' | 'threshold';
  area_deg2: number;
  cosmology: { h0: number; omega_m: number };
  edges: number[];
  detection: {
    limit_cgs?: number;
    line_angstrom?: number;
    limit_mag?: number;
    band_angstrom?: number;
    beta?: number;
    limit?: number;
    completeness?: { model: 'logistic'; half?: number; half_cgs?: number; width: number };
  };
  population: {
    variable: 'luminosity' | 'magnitude';
    log10_phi_star: number;
    log10_l_star?: number;
    m_star?: number;
    /** alpha = alpha[0] + alpha[1] z */
    alpha: [number, number];
    rest_wavelength_angstrom?: number;
  };
  cosmic_variance?: number[];
  /** The correlation of the slices' nuisances (invented), for the joint prior. */
  cosmic_variance_correlation?: number[][];
}

export function constant(v: number): ZParam {
  return { source: v, constant: true, at: () => v };
}

export function linear(a0: number, a1: number): ZParam {
  if (a1 === 0) return constant(a0);
  return { source: `${a0} + ${a1}*z`, constant: false, at: (z) => a0 + a1 * z };
}

export function surveyFromSpec(s: SurveySpec): Survey {
  const d = s.detection;
  let completeness: Completeness | undefined;
  if (d.completeness) {
    // The Survey stores a line-flux half as -log10 of the flux (src/model/detection.ts).
    const half = d.completeness.half_cgs !== undefined ? -Math.log10(d.completeness.half_cgs) : d.completeness.half!;
    completeness = { model: 'logistic', half, width: d.completeness.width };
  }
  let detection: Detection;
  if (s.kind === 'line_flux') {
    detection = { kind: 'line_flux', limitCgs: d.limit_cgs!, lineAngstrom: d.line_angstrom! };
  } else if (s.kind === 'magnitude') {
    detection = {
      kind: 'magnitude',
      limitMag: d.limit_mag!,
      bandAngstrom: d.band_angstrom!,
      beta: d.beta!,
      igm: 'none',
    };
  } else {
    detection = { kind: 'threshold', limit: constant(d.limit!) };
  }
  if (completeness) detection.completeness = completeness;
  const p = s.population;
  const omegaM = s.cosmology.omega_m;
  const zMin = s.edges[0]!;
  const zMax = s.edges[s.edges.length - 1]!;
  return {
    format: 1,
    file: '',
    title: s.name,
    cosmology: {
      h0: s.cosmology.h0,
      omegaM,
      omegaLambda: 1 - omegaM,
      omegaR: 0,
      tCmb: 0,
      omegaB: 0.049,
      sigma8: 0.81,
      nS: 0.965,
    },
    areaDeg2: s.area_deg2,
    areaSr: s.area_deg2 * (Math.PI / 180) ** 2,
    redshift: { min: zMin, max: zMax },
    field: { aspect: 1, count: 1 },
    detection,
    populations: [
      {
        name: 'invented population',
        shape: 'schechter',
        variable: p.variable,
        phiStar: constant(10 ** p.log10_phi_star),
        components: [{ phiStar: constant(10 ** p.log10_phi_star), alpha: linear(p.alpha[0], p.alpha[1]) }],
        ...(p.log10_l_star !== undefined ? { lStar: constant(10 ** p.log10_l_star) } : {}),
        ...(p.m_star !== undefined ? { mStar: constant(p.m_star) } : {}),
        alpha: linear(p.alpha[0], p.alpha[1]),
        ...(s.kind === 'line_flux' ? { lineAngstrom: d.line_angstrom! } : {}),
        restWavelengthAngstrom: p.rest_wavelength_angstrom ?? 1500,
        bias: 'auto',
        occupation: 1,
        window: { min: zMin, max: zMax },
        sliceEdges: [...s.edges],
      },
    ],
    sliceEdges: [...s.edges],
    histogramWidth: s.kind === 'magnitude' ? 0.25 : 0.1,
    raw: null,
  };
}

/** A survey with a given number of slices whose expected count is about `target` sources. */
export function scaledToCount(s: Survey, count: number, current: number): Survey {
  const f = count / current;
  return { ...s, areaDeg2: s.areaDeg2 * f, areaSr: s.areaSr * f };
}
