/** The population of interest, by name (default: the first). */
import { inputError } from '../errors.js';
import type { Population, Survey } from '../survey/types.js';

export function pickPopulation(survey: Survey, name?: string): Population {
  if (name === undefined) return survey.populations[0]!;
  const p = survey.populations.find((q) => q.name === name);
  if (!p) {
    throw inputError('bad_option', survey.file, '--population', `no population is named "${name}"`, `use one of ${survey.populations.map((q) => `"${q.name}"`).join(', ')}`);
  }
  return p;
}
