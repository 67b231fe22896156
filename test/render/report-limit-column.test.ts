/**
 * The report's table of slices for several populations over one window has one limit column, the
 * first population's (as predict's JSON top-level slices, docs/outputs.md). It was headed "limit at
 * centre" alone, so that in a dropout field with red interlopers the Lyman-break galaxies' limit read
 * as every population's, where the interlopers' (another rest wavelength and slope) differs by half
 * a magnitude (found by a trial user). Now the head and the note name the population. Expected: the
 * first population's own limit_at_center from predict (the number the column shows), and the
 * interlopers' differing from it by 2.5 (beta_i - beta) log10(band / ((1 + z) rest_i)) plus the
 * change of rest wavelength (survey-file.md, "Each population's own beta"), worked at the slice's
 * middle below.
 */
import { describe, expect, test } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadSurveyFile } from '../../src/survey/load.js';
import { tempDir } from '../support/temp.js';
import { predict } from '../../src/counts/predict.js';
import { buildReport } from '../../src/library/report.js';

const TWO = `format: 1
title: Invented i-dropout field with red interlopers
cosmology: {h0: 70, omega_m: 0.3}
area: "120 arcmin^2"
redshift: {min: 0.2, max: 7.0}
detection: {kind: magnitude, limit: 28.0, band: "9000 Angstrom", beta: -2.0, igm: madau1995}
populations:
  - {name: LBG z6, variable: magnitude, rest_wavelength: 1500, phi_star: 5.0e-4, m_star: -20.9, alpha: -1.9,
     redshift_selection: {table: [[5.4, 0.0], [5.6, 0.7], [6.3, 0.7], [6.6, 0.0]]}}
  - {name: red interlopers, variable: magnitude, rest_wavelength: 5500, beta: 1.0, phi_star: 3.0e-3, m_star: -21.0,
     alpha: -1.2, redshift_selection: {table: [[0.2, 0.01], [1.5, 0.01], [1.6, 0.0]]}}
slices: {edges: [0.2, 1.6, 5.4, 7.0]}
`;

const dir = tempDir('skytally-report-limit-');
function surveyOf(name: string, text: string) {
  const path = join(dir, name);
  writeFileSync(path, text);
  return loadSurveyFile(path);
}

describe("the report's limit column with several populations over one window", () => {
  test('is headed and noted as the first population’s, whose limits it shows', async () => {
    const survey = surveyOf('two.yaml', TWO);
    const p = predict(survey);
    const first = p.populations[0]!.slices.map((s) => s.limit_at_center!);
    const second = p.populations[1]!.slices.map((s) => s.limit_at_center!);
    // the column's numbers are the first population's
    expect(p.slices!.map((s) => s.limit_at_center)).toEqual(first);
    // the two differ at z = 0.9 (the first slice's middle): K_i - K = -2.5 (beta_i + 2) log10(9000 / (1.9 x 5500))
    //   + 2.5 (beta + 2) log10(9000 / (1.9 x 1500)), beta = -2, beta_i = 1; M_lim,i - M_lim = -(K_i - K)
    const worked = 2.5 * 3 * Math.log10(9000 / (1.9 * 5500));
    expect(second[0]! - first[0]!).toBeCloseTo(worked, 9);
    expect(Math.abs(worked)).toBeGreaterThan(0.3);
    const { html } = await buildReport(survey, {});
    expect(html).toContain(
      'limit at centre<br><span class="unit">M [AB mag]</span><br><span class="unit">of LBG z6</span>',
    );
    expect(html).toContain(
      "The limit is given at each slice's middle redshift, for LBG z6, the first population (each population's own limits are in predict's table and JSON).",
    );
  });

  test('one population: the head and the note as before', async () => {
    const one = TWO.replace(/\n {2}- \{name: red interlopers[\s\S]*?\}\}\n/, '\n');
    const { html } = await buildReport(surveyOf('one.yaml', one), {});
    expect(html).not.toContain('of LBG z6');
    expect(html).toContain("The limit is given at each slice's middle redshift.</p>");
  });
});
