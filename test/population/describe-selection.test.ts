/**
 * The assumed model's summary line (src/population/describe.ts) names the selection effects in plain
 * words: where a redshift selection is set and the fraction it keeps at the window's middle; a
 * fraction, blend or attenuation that varies with z also gives its range over the window (a table's
 * smallest and largest value over the window are at its rows or the window's ends: linear between
 * rows, as docs/survey-file.md defines a table), so that a selection that keeps nothing at the
 * middle does not read as one that keeps nothing.
 */
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import fc from 'fast-check';
import { describeModel, rangeOver } from '../../src/population/describe.js';
import { makeZParam } from '../../src/survey/zparam.js';

describe('the summary line of a redshift selection', () => {
  test('set on the detection: the dropout sample keeps 0.8 at z = 4, its table row there, and 0.05 at the window ends (the sample file)', () => {
    const s = loadSurveyFile(fileURLToPath(new URL('../../samples/dropout-field.yaml', import.meta.url)));
    const summary = describeModel(s, s.populations[0]!).summary;
    expect(summary).toContain(
      "redshift selection from the detection keeps 0.8 at the window's middle (0.05 to 0.8 over the window)",
    );
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
    const summary = describeModel(s, s.populations[0]!).summary;
    expect(summary).toContain('redshift selection from the population keeps 0.5');
    // a value that does not vary with z has no range and no redshift
    expect(summary).not.toContain('over the window');
    expect(summary).not.toContain("window's middle");
  });

  const withSelection = (selection: string, extra = '') =>
    loadSurveyText(
      `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 1, max: 3}
detection: {kind: line_flux, limit: 1e-16, line: 6563}
population:
  variable: luminosity
  phi_star: 1e-3
  l_star: 1e42
  alpha: -1.3
  redshift_selection: ${selection}
${extra}`,
      'selection.yaml',
    );

  test('a table that is 0 at the middle: the words give its range, from its rows inside the window', () => {
    // rows outside the window (z = 0.5, 3.5) do not count; the window's ends are linear between rows
    const s = withSelection('{table: [[0.5, 0.9], [1.5, 0.6], [2, 0], [2.5, 0.3], [3.5, 1]]}');
    const summary = describeModel(s, s.populations[0]!).summary;
    // at z = 1: 0.9 + (0.6 - 0.9) (1 - 0.5) / (1.5 - 0.5) = 0.75; at z = 3: 0.3 + 0.7 (0.5 / 1) = 0.65
    expect(summary).toContain(
      "redshift selection from the population keeps 0 at the window's middle (0 to 0.75 over the window)",
    );
  });

  test("an expression: its range over the window; attenuation and blend with their units' words", () => {
    const s = withSelection(
      '"0.25 + 0.5*z - 0.125*z^2"',
      `  attenuation: "0.5 + 0.25*z"
  blend_ratio: {table: [[1, 0.4], [3, 0.2]]}
`,
    );
    const summary = describeModel(s, s.populations[0]!).summary;
    // 0.25 + 0.5 z - z^2 / 8 peaks at z = 2 (0.75) and is 0.625 at z = 1 and z = 3
    expect(summary).toContain(
      "redshift selection from the population keeps 0.75 at the window's middle (0.625 to 0.75 over the window)",
    );
    expect(summary).toContain(
      "blended lines add 0.3 of the line flux at the window's middle (0.2 to 0.4 of the line flux over the window)",
    );
    expect(summary).toContain("attenuation 1 mag at the window's middle (0.75 to 1.25 mag over the window) applied");
  });
});

describe("rangeOver: a table's range over a window (property test, fast-check)", () => {
  // A table is linear between its rows and holds its end values outside (docs/survey-file.md), so
  // over a window its extremes are at the window's ends or at rows inside it (common practice for
  // piecewise-linear functions): every value in the window lies in the range, and both ends of the
  // range are values the table takes there.
  test('every value of a random table in a random window lies in the range, and the range is attained', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 0, max: 10, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true })), {
          minLength: 2,
          maxLength: 12,
        }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        fc.double({ min: 0.001, max: 5, noNaN: true }),
        (rows, lo, width) => {
          const zs = [...new Set(rows.map(([z]) => z))].sort((a, b) => a - b);
          fc.pre(zs.length >= 2);
          const table = zs.map((z, i) => [z, rows[i]![1]] as [number, number]);
          const p = makeZParam({ table }, 't.yaml', 'detection.redshift_selection');
          const hi = lo + width;
          const [min, max] = rangeOver(p, lo, hi);
          const probe = Array.from({ length: 201 }, (_, i) => p.at(lo + (width * i) / 200));
          for (const v of probe) {
            expect(v).toBeGreaterThanOrEqual(min - 1e-12);
            expect(v).toBeLessThanOrEqual(max + 1e-12);
          }
          const inside = [lo, hi, ...zs.filter((z) => z > lo && z < hi)].map((z) => p.at(z));
          expect(inside).toContain(min);
          expect(inside).toContain(max);
        },
      ),
      { seed: 20261204, numRuns: 300 },
    );
  });
});
