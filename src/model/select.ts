/** Choosing one population of a survey by name (forecast and plan take the population of interest). */
import { inputError } from '../errors.js';
import type { Population } from './population.js';
import type { Survey } from './survey.js';
import { photoZIsExact } from './photo-z.js';
import { checkSurvey } from './arguments.js';

/** The library's option naming a population: `forecast(survey, {population: 'name'})`. */
const LIBRARY_OPTION = 'options.population';

/**
 * The population called `name`, or the first one when `name` is undefined. An unknown name is a
 * SurveyError (bad_option) that lists the valid names. `option` names where the name came from,
 * for the message: the library's own option, `options.population`, by default; the command line
 * passes `--population`.
 */
export function populationByName(survey: Survey, name?: string, option = LIBRARY_OPTION): Population {
  checkSurvey(survey, 'populationByName');
  const first = survey.populations[0];
  if (name === undefined) {
    if (!first)
      throw inputError(
        'bad_option',
        survey.file,
        option,
        'the survey has no population',
        'add a population to the survey file',
      );
    return first;
  }
  const found = survey.populations.find((p) => p.name === name);
  if (found) return found;
  const names = survey.populations.map((p) => `"${p.name}"`).join(', ');
  throw inputError('bad_option', survey.file, option, `there is no population named "${name}"`, `use one of ${names}`);
}

/**
 * The survey as a file holding `population` alone would load: the same sky, cosmology, detection
 * and histogram width, with that population's own window and slice edges. Forecast, compare and
 * plan work on this view, so that a population of a several-population file gets exactly the
 * numbers of a file that describes it alone (same filter, same limit). The population object is
 * shared, not copied. A survey of one population is returned as it is.
 */
export function surveyForPopulation(survey: Survey, population: Population): Survey {
  checkSurvey(survey, 'surveyForPopulation');
  if (survey.populations.length === 1 && survey.populations[0] === population) return survey;
  if (!survey.populations.includes(population))
    throw new Error(`internal: "${population.name}" is not a population of this survey`);
  const edges = population.sliceEdges;
  return {
    ...survey,
    redshift: { min: edges[0]!, max: edges[edges.length - 1]! },
    populations: [population],
    sliceEdges: edges,
  };
}

/**
 * A population's key path as the file writes it: `population` for the one population of a file
 * that gives it under `population:`, else `populations[i]`.
 */
export function populationPath(survey: Survey, p: Population): string {
  const listed = Array.isArray((survey.raw as { populations?: unknown } | undefined)?.populations);
  const i = survey.populations.indexOf(p);
  return listed || i > 0 ? `populations[${i}]` : 'population';
}

/**
 * The population of interest (by name, default the first). Forecasts vary the three parameters
 * of a single Schechter function, so a double Schechter population is refused. `option` as for
 * populationByName.
 */
export function choosePopulation(survey: Survey, name?: string, option = LIBRARY_OPTION): Population {
  checkSurvey(survey, 'choosePopulation');
  refuseScatteredRedshifts(survey);
  const p = populationByName(survey, name, option);
  if (p.shape !== 'schechter') {
    throw inputError(
      'kind_mismatch',
      survey.file,
      `${populationPath(survey, p)}.shape`,
      `forecasts and plans vary phi*, L* (or M*) and alpha of a single Schechter function, but "${p.name}" is ${p.shape}`,
      `choose a single-Schechter population with ${option}, or describe this one with shape: schechter`,
    );
  }
  return p;
}

/**
 * Forecasts, comparisons and plans count sources by true redshift: they refuse photometric
 * redshifts that move sources between slices (sigma above 0 or outliers; docs/survey-file.md,
 * "Photometric redshifts"). Sigma 0 without outliers changes nothing and is accepted.
 */
export function refuseScatteredRedshifts(survey: Survey): void {
  const d = survey.detection;
  if (d.kind === 'line_flux' || photoZIsExact(d.photoZ)) return;
  throw inputError(
    'conflict',
    survey.file,
    'detection.photo_z',
    `forecasts, comparisons and plans count sources by true redshift, but photo_z moves them between slices (sigma ${d.photoZ!.sigma}, outlier_fraction ${d.photoZ!.outlierFraction})`,
    'run predict for the counts by measured redshift, or set sigma: 0 and outlier_fraction: 0 (or remove photo_z) for a forecast, comparison or plan',
  );
}
