/**
 * The assumed model's summary line (src/population/describe.ts) names the selection effects in plain
 * words: where a redshift selection is set and the fraction it keeps at the window's middle.
 */
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import { describeModel } from '../../src/population/describe.js';

describe('the summary line of a redshift selection', () => {
  test('set on the detection: the dropout sample keeps 0.8 at z = 4, its table row there (the sample file)', () => {
    const s = loadSurveyFile(fileURLToPath(new URL('../../samples/dropout-field.yaml', import.meta.url)));
    const summary = describeModel(s, s.populations[0]!).summary;
    expect(summary).toContain("redshift selection from the detection keeps 0.8 (at the window's middle)");
    // one bracket after another read as a stutter in the line
    expect(summary).not.toMatch(/\) \(/);
  });

  test("set on the population: named as the population's", () => {
    const s = loadSurveyText(
      `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 1, max: 2}
detection: {kind: magnitude, limit: 25, band: "8000 Angstrom"}
population:
  variable: magnitude
  phi_star: 1e-3
  m_star: -21
  alpha: -1.3
  redshift_selection: "0.5"
`,
      'selection.yaml',
    );
    expect(describeModel(s, s.populations[0]!).summary).toContain(
      "redshift selection from the population keeps 0.5 (at the window's middle)",
    );
  });
});
