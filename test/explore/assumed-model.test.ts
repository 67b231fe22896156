/**
 * The explore page states the model its numbers assume, as every output does (docs/outputs.md,
 * "explore"): the lines of predict's table head, `Survey:` (area, window, detection, filter,
 * completeness), `Cosmology:` and one `Assumed model:` per population, for the settings shown
 * (a moved parameter is stated as moved). Found by a trial user: the page stated only sigma8 and
 * n_s, and the model only in the collapsed panel holding the survey file. Checked against
 * predict's own table of the same file (the same words).
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { exploreControls, settingsText } from '../../src/library/explore/settings.js';
import { assumedHtml } from '../../src/render/explore/view.js';
import { escapeHtml } from '../../src/render/explore/figures.js';
import { explorePage } from '../../src/library/explore/page.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { predictionTable } from '../../src/render/predict-table.js';
import { useExploreScript } from '../support/explore-script.js';

const SAMPLES = fileURLToPath(new URL('../../samples/', import.meta.url));

/** The lines of predict's table that state the survey, the cosmology and the models. */
function tableHead(text: string, path: string): string[] {
  const table = predictionTable(predict(loadSurveyText(text, path)));
  return table.split('\n').filter((l) => /^(Survey|Cosmology|Assumed model): /.test(l));
}

describe('the assumed model, on the explore page', () => {
  test.each(['narrowband-interlopers.yaml', 'halpha-narrowband.yaml', 'deep-continuum.yaml'])(
    "%s: the survey, cosmology and every population's model, in predict's words",
    async (name) => {
      const path = join(SAMPLES, name);
      const text = readFileSync(path, 'utf8');
      const r = await exploreCompute({ text }, path, dirname(path));
      const head = tableHead(text, path);
      expect(head.length).toBeGreaterThanOrEqual(3);
      expect(r.assumed).toEqual(head);
      const html = assumedHtml(r);
      for (const line of head) expect(html).toContain(escapeHtml(line));
    },
  );

  test('a moved parameter is stated as moved', async () => {
    const path = join(SAMPLES, 'halpha-narrowband.yaml');
    const text = readFileSync(path, 'utf8');
    const survey = loadSurveyText(text, path);
    const moved = settingsText(text, exploreControls(survey.raw, survey), new Map([['population.alpha', -1.7]]));
    const r = await exploreCompute({ text: moved }, path, dirname(path));
    expect(r.assumed!.some((l) => l.startsWith('Assumed model:') && l.includes('alpha = -1.7'))).toBe(true);
    expect(r.assumed).toEqual(tableHead(moved, path));
  });

  test('the page opens with the statement in its results', async () => {
    await useExploreScript();
    const html = await explorePage(join(SAMPLES, 'halpha-narrowband.yaml'));
    expect(html).toContain('data-part="assumed-model"');
    expect(html).toContain('Cosmology: flat Lambda-CDM, H0 = 70 km/s/Mpc');
  });
});
