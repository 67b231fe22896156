/**
 * compare: several survey files side by side. For each survey: its area, window, limit, expected
 * count (predict), count per deg^2, count fainter than the characteristic luminosity (L* or M*),
 * the Poisson and cosmic-variance fractions of the total (predict), the Fisher sigma of each
 * parameter (forecast, with cosmic variance unless switched off) and the time where the file gives
 * `exposure`. The best value of each row is marked by survey index in `best`: every survey whose
 * value ties with the best (equal to 1e-9 relative, i.e. equal but for rounding) is listed.
 * A double Schechter population has every row but the sigmas (a forecast varies a single
 * Schechter function); a note says so.
 */
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { predict } from '../counts/predict.js';
import { forecast } from '../forecast/forecast.js';
import { buildDensityGrid, sliceCount } from '../forecast/grid.js';
import { describeModel } from '../population/describe.js';
import type { ComparedSurvey, Comparison } from '../model/outputs/compare.js';
import { choosePopulation, populationByName, refuseScatteredRedshifts, surveyForPopulation } from '../model/select.js';
import { faintCount } from './tables.js';
import { warning, mergeWarnings, type Warning } from '../warnings.js';
import { sig } from '../render/format.js';
import { checkOptions, checkSurveyList } from '../model/arguments.js';

/** Values this close (relative) are a tie: equal but for the rounding of the arithmetic. */
export const TIE_RELATIVE = 1e-9;

export const COMPARE_CAVEAT =
  'Counts and sigmas are only as good as the luminosity functions assumed: each column holds if its population follows the model in its file.';

export type LimitVariable = ComparedSurvey['limit_variable'];

/** Rows that have a best value, and which way is better. */
export const COMPARE_ROWS: { row: string; better: 'higher' | 'lower' }[] = [
  { row: 'area_deg2', better: 'higher' },
  { row: 'limit', better: 'higher' }, // deeper: see depthOf
  { row: 'count', better: 'higher' },
  { row: 'per_deg2', better: 'higher' },
  { row: 'faint_count', better: 'higher' },
  { row: 'poisson_fraction', better: 'lower' },
  { row: 'cosmic_variance_fraction', better: 'lower' },
  { row: 'model_fraction', better: 'lower' },
  { row: 'exposure_hours', better: 'lower' },
  { row: 'count_per_hour', better: 'higher' },
];

export interface CompareOptions {
  population?: string;
  cosmicVariance?: boolean;
}

function limitOf(survey: Survey, p: Population): { limit: number | string; variable: LimitVariable } {
  const d = survey.detection;
  if (d.kind === 'magnitude') return { limit: d.limitMag, variable: 'apparent_magnitude' };
  if (d.kind === 'line_flux') return { limit: d.limitCgs, variable: 'line_flux_cgs' };
  const src = d.limit.source;
  return {
    limit: typeof src === 'number' ? src : d.limit.constant ? d.limit.at(0) : JSON.stringify(src),
    variable: p.variable === 'luminosity' ? 'log10_quantity' : 'absolute_magnitude',
  };
}

/**
 * Count of `population` fainter than L* (or M*) in the survey as it stands. The density grid holds
 * one Schechter component, so a double Schechter population is counted component by component
 * (each with its own phi* and alpha and the shared L* or M*) and the two counts added.
 */
export function faintCountOf(survey: Survey, population: Population): number {
  const cosmo = new FlatCosmology(survey.cosmology);
  let n = 0;
  for (const c of population.components) {
    const single: Population =
      population.shape === 'schechter'
        ? population
        : { ...population, shape: 'schechter', phiStar: c.phiStar, alpha: c.alpha, components: [c] };
    const grid = buildDensityGrid(survey, single, cosmo, survey.sliceEdges);
    for (let s = 0; s < sliceCount(grid); s++) n += faintCount(grid, s, 0).count;
  }
  return n;
}

/** Deeper is better: a larger magnitude, a smaller flux or quantity. */
function depthOf(v: LimitVariable, x: number): number {
  return v === 'apparent_magnitude' || v === 'absolute_magnitude' ? x : -x;
}

export async function compare(surveys: Survey[], opts: CompareOptions = {}): Promise<Comparison> {
  checkSurveyList(surveys, 'compare');
  checkOptions(opts, 'compare', '{ cosmicVariance: false }');
  const useCv = opts.cosmicVariance !== false;
  const out: ComparedSurvey[] = [];
  const warnings: Warning[][] = [];
  const notes: string[] = [];
  const bands: (number | undefined)[] = []; // a magnitude survey's band, Angstrom
  const lines: (number | undefined)[] = []; // a line_flux survey's line (the compared population's), Angstrom
  for (const [i, file] of surveys.entries()) {
    // A double Schechter population is compared without Fisher sigmas (a forecast varies the three
    // parameters of a single Schechter function): every other row holds for it.
    refuseScatteredRedshifts(file);
    const named = populationByName(file, opts.population);
    const population = named.shape === 'schechter' ? choosePopulation(file, opts.population) : named;
    // The population's own window and slices, as a file holding it alone.
    const survey = surveyForPopulation(file, population);
    const pred = predict(survey);
    const own = pred.populations[0]!;
    const f =
      population.shape === 'schechter'
        ? await forecast(survey, { population: population.name, cosmicVariance: useCv })
        : undefined;
    if (opts.population === undefined && file.populations.length > 1) {
      const others = file.populations.filter((q) => q !== population).map((q) => `"${q.name}"`);
      notes.push(
        `[${i + 1}] holds ${file.populations.length} populations: only the first, "${population.name}", is compared (counted over its own window), without ${others.join(', ')}; choose one with --population NAME.`,
      );
    }
    if (!f)
      notes.push(
        `[${i + 1}] "${population.name}" is a double Schechter population: no Fisher sigmas are given for it (a forecast varies phi*, L* or M* and alpha of a single Schechter function).`,
      );
    warnings.push(
      mergeWarnings(pred.warnings, f?.warnings ?? []).map((w) => warning(w.code, `[${i + 1}] ${w.message}`)),
    );
    const lim = limitOf(survey, population);
    bands.push(survey.detection.kind === 'magnitude' ? survey.detection.bandAngstrom : undefined);
    lines.push(survey.detection.kind === 'line_flux' ? population.lineAngstrom : undefined);
    const u = own.totals.uncertainty;
    const row: ComparedSurvey = {
      title: survey.title,
      file: survey.file,
      population: population.name,
      cosmology: cosmologyJsonOf(survey.cosmology),
      model: describeModel(survey, population),
      area_deg2: survey.areaDeg2,
      redshift: { ...survey.redshift },
      limit: lim.limit,
      limit_variable: lim.variable,
      ...(survey.detection.kind === 'magnitude' && survey.detection.limitGivenUnit
        ? { limit_unit: survey.detection.limitGivenUnit }
        : {}),
      ...(survey.detection.kind === 'line_flux' && survey.detection.limitGivenJyKms !== undefined
        ? { limit_jy_km_s: survey.detection.limitGivenJyKms }
        : {}),
      count: own.totals.count,
      per_deg2: own.totals.per_deg2,
      faint_count: faintCountOf(survey, population),
      poisson_fraction: u ? u.poisson_fraction : 0,
      cosmic_variance_fraction: u ? u.cosmic_variance_fraction : 0,
      sigma: f ? { ...f.fisher.sigma } : {},
    };
    if (own.totals.model) row.model_fraction = own.totals.model.fraction;
    if (survey.exposureHours !== undefined) {
      row.exposure_hours = survey.exposureHours;
      row.count_per_hour = row.count / survey.exposureHours;
    }
    out.push(row);
  }
  const best: Record<string, number[]> = {};
  const pick = (name: string, values: (number | undefined)[], higher: boolean) => {
    const marked = bestIndices(values, higher);
    const present = values.filter((v) => v !== undefined).length;
    if (marked.length > 0 && present >= 2) best[name] = marked;
  };
  for (const { row, better } of COMPARE_ROWS) {
    if (row === 'limit') {
      const kinds = new Set(out.map((s) => s.limit_variable));
      if (kinds.size === 1 && out.every((s) => typeof s.limit === 'number')) {
        pick(
          'limit',
          out.map((s) => depthOf(s.limit_variable, s.limit as number)),
          true,
        );
        const given = bands.filter((b): b is number => b !== undefined);
        if (given.length > 1 && Math.max(...given) > 1.01 * Math.min(...given))
          notes.push(
            `The limits are AB magnitudes in different bands (${bands.map((b, j) => `[${j + 1}] ${b === undefined ? '-' : `${sig(b, 4)} A`}`).join(', ')}): the faintest is marked, which is the faintest flux density, not necessarily the deepest for the population; compare the counts and sigmas instead.`,
          );
        const counted = lines.filter((l): l is number => l !== undefined);
        if (counted.length > 1 && Math.max(...counted) > 1.001 * Math.min(...counted))
          notes.push(
            `The limits are fluxes of different lines (${lines.map((l, j) => `[${j + 1}] ${l === undefined ? '-' : `${sig(l, 5)} A`}`).join(', ')}): the faintest is marked, which is the faintest line flux, not necessarily the deepest for the population; compare the counts and sigmas instead.`,
          );
      } else if (out.length > 1)
        notes.push('The limits are of different kinds (or vary with redshift), so no limit is marked best.');
      continue;
    }
    pick(
      row,
      out.map((s) => (s as unknown as Record<string, number | undefined>)[row]),
      better === 'higher',
    );
  }
  const sigmaNames = [...new Set(out.flatMap((s) => Object.keys(s.sigma)))];
  for (const n of sigmaNames)
    pick(
      `sigma.${n}`,
      out.map((s) => s.sigma[n]),
      false,
    );
  // Files of different cosmologies: their volumes, counts and sigmas differ partly for that reason.
  if (new Set(out.map((s) => JSON.stringify(s.cosmology))).size > 1) {
    const said = (c: ComparedSurvey['cosmology']): string =>
      `H0 = ${sig(c.h0)}, Omega_m = ${sig(c.omega_m)}, T_cmb = ${sig(c.t_cmb, 6)} K` +
      (c.sigma8 !== undefined ? `, sigma8 = ${sig(c.sigma8)}` : '') +
      (c.preset ? ` (preset ${c.preset})` : '');
    notes.push(
      `The files assume different cosmologies (${out.map((s, j) => `[${j + 1}] ${said(s.cosmology)}`).join('; ')}): their volumes, counts, cosmic variance and sigmas differ partly for that reason, not only for the survey designs.`,
    );
  }
  if (out.some((s) => s.exposure_hours === undefined) && out.some((s) => s.exposure_hours !== undefined)) {
    notes.push('Some files give no exposure, so their cost is not shown.');
  }
  return {
    format: 1,
    cosmic_variance: useCv,
    caveat: COMPARE_CAVEAT,
    surveys: out,
    best,
    notes,
    warnings: mergeWarnings(...warnings),
  };
}

/** Indices of the best of `values` (highest or lowest), every one that ties with it (TIE_RELATIVE). */
export function bestIndices(values: readonly (number | undefined)[], higher: boolean): number[] {
  let top: number | undefined;
  for (const v of values) {
    if (v === undefined || !Number.isFinite(v)) continue;
    if (top === undefined || (higher ? v > top : v < top)) top = v;
  }
  if (top === undefined) return [];
  const t = top;
  const out: number[] = [];
  values.forEach((v, i) => {
    if (v !== undefined && Number.isFinite(v) && Math.abs(v - t) <= TIE_RELATIVE * Math.max(Math.abs(v), Math.abs(t)))
      out.push(i);
  });
  return out;
}
