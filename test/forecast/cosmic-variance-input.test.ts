/**
 * The forecast's cosmic-variance input (src/forecast/cosmic-variance-input.ts) takes the density
 * grid's own per-slice counts instead of counting the slices again with the count engine. The
 * references: `predict` of the same file (its per-slice counts and cosmic_variance_fraction, made
 * by the count engine), which the forecast must meet to 1e-9 relative on every population of every
 * bundled sample that forecasts (the grid and the engine are different quadratures of the same
 * integral, equal to about 3e-11, and the auto bias by abundance matching follows the count); and
 * the input itself on the forecast's own counts, which the forecast must give bit for bit (it
 * reads nothing else).
 */
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { surveyForPopulation } from '../../src/model/select.js';
import { cosmicVarianceInput } from '../../src/forecast/cosmic-variance-input.js';
import type { Forecast } from '../../src/model/outputs/forecast.js';
import type { Prediction } from '../../src/model/outputs/prediction.js';
import type { Warning } from '../../src/warnings.js';
import { sampleCommand } from '../support/sample-commands.js';

/** Different quadratures of the same integral (the grid's and the count engine's): see above. */
const REL = 1e-9;
// Forecasts count by true redshift: a sample with photometric-redshift scatter is refused.
const isPhotoZ = (f: string) => /photo_z: \{sigma: 0\.0*[1-9]/.test(readFileSync(`samples/${f}`, 'utf8'));
const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml') && !isPhotoZ(f));

async function json<T>(argv: string[]): Promise<T> {
  const r = await sampleCommand(argv);
  expect(r.code, r.stderr).toBe(0);
  return JSON.parse(r.stdout) as T;
}

describe.each(SAMPLES)('%s', (sample) => {
  test("every single-Schechter population: the forecast's slice counts and cosmic-variance fractions are predict's (1e-9 relative), and the input's on its own counts bit for bit", async () => {
    const file = `samples/${sample}`;
    const survey = loadSurveyFile(file);
    const pred = await json<Prediction>(['predict', file, '--format', 'json']);
    let compared = 0;
    const differ: string[] = [];
    for (const [k, pop] of survey.populations.entries()) {
      if (pop.shape === 'double_schechter') continue;
      const f = await json<Forecast>(
        k === 0
          ? ['forecast', file, '--format', 'json']
          : ['forecast', file, '--population', pop.name, '--format', 'json'],
      );
      const want = pred.populations[k]!.slices;
      expect(f.slices.length).toBe(want.length);
      f.slices.forEach((s, i) => {
        const w = want[i]!;
        const cv = w.uncertainty?.cosmic_variance_fraction ?? 0;
        if (!(Math.abs(s.count - w.count) <= REL * w.count))
          differ.push(`${pop.name} slice ${i}: count ${s.count} vs ${w.count}`);
        // (predict gives no block to a slice without sources; the forecast, 0 below 1e-6 sources)
        const got = s.cosmic_variance_fraction!;
        if (w.count >= 1e-6 && !(Math.abs(got - cv) <= REL * cv))
          differ.push(`${pop.name} slice ${i}: cosmic variance ${got} vs ${cv}`);
        compared++;
      });
      const view = surveyForPopulation(survey, pop);
      const warnings: Warning[] = [];
      const again = cosmicVarianceInput(
        view,
        view.sliceEdges,
        pop,
        f.slices.map((s) => s.count),
        warnings,
      );
      expect(f.slices.map((s) => s.cosmic_variance_fraction)).toEqual(again);
    }
    expect(differ).toEqual([]);
    if (!survey.populations.every((p) => p.shape === 'double_schechter')) expect(compared).toBeGreaterThan(0);
  });
});

describe('the rule for a slice with almost no sources', () => {
  test('under 1e-6 expected sources gives 0, at 1e-6 and above a fraction (source: the rule as written in cosmic-variance-input.ts)', () => {
    const survey = loadSurveyFile('samples/halpha-narrowband.yaml');
    const pop = survey.populations[0]!;
    const view = surveyForPopulation(survey, pop);
    const edges = view.sliceEdges;
    const n = edges.length - 1;
    const base = Array.from({ length: n }, () => 100);
    const tiny = cosmicVarianceInput(view, edges, pop, [0, 9.99e-7, ...base.slice(2)]);
    expect(tiny.slice(0, 2)).toEqual([0, 0]);
    const at = cosmicVarianceInput(view, edges, pop, [1e-6, ...base.slice(1)], []);
    expect(at[0]).toBeGreaterThan(0);
    // a slice's fraction depends on its own count only
    expect(tiny.slice(2)).toEqual(at.slice(2));
  });

  test('a count per slice is required: a wrong number of counts is a programming error', () => {
    const survey = loadSurveyFile('samples/halpha-narrowband.yaml');
    const pop = survey.populations[0]!;
    const view = surveyForPopulation(survey, pop);
    expect(() => cosmicVarianceInput(view, view.sliceEdges, pop, [1])).toThrow(/counts given/);
  });
});
