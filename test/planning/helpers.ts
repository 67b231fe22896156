/** Plan surveys built from the bundled samples (invented scenarios) for the planning tests. */
import { readFileSync } from 'node:fs';
import { loadSurveyText } from '../../src/survey/load.js';
import type { Survey } from '../../src/model/survey.js';

export function sampleText(name: string): string {
  return readFileSync(new URL(`../../samples/${name}`, import.meta.url), 'utf8');
}

/** A sample with its text edited (e.g. the plan section replaced). */
export function sample(name: string, edit?: (t: string) => string): Survey {
  const text = sampleText(name);
  return loadSurveyText(edit ? edit(text) : text, name);
}

/** The H-alpha plan sample with a new plan section. */
export function halphaPlan(plan: string, extra?: (t: string) => string): Survey {
  return sample('plan-halpha-layers.yaml', (t) => {
    const base = t.slice(0, t.indexOf('\nplan:'));
    return (extra ? extra(base) : base) + '\nplan:\n' + plan;
  });
}
