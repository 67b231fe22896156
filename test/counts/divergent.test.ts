/**
 * A count that diverges is bad input: with a flux limit from z = 0 the integrand behaves
 * like z^(2 alpha + 4), which diverges for alpha <= -2.5 (common practice; from the definitions in
 * docs/survey-file.md). Exit 2, code "divergent", nothing written; alpha just above -2.5 still counts.
 */
import { describe, expect, test } from 'vitest';
import { writeFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { parseSurveyObject } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';
import { SurveyError } from '../../src/errors.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';

const survey = (alpha: number, zmin = 0, kind: 'line_flux' | 'magnitude' = 'line_flux') =>
  parseSurveyObject(
    {
      format: 1,
      title: 'divergence test',
      cosmology: { h0: 70, omega_m: 0.3 },
      area: 1,
      redshift: { min: zmin, max: 0.5 },
      detection: kind === 'line_flux' ? { kind, limit: 1e-16, line: 6563 } : { kind, limit: 20, band: 6000 },
      population:
        kind === 'line_flux'
          ? { variable: 'luminosity', phi_star: 2.2e-3, l_star: 1e42, alpha, bias: 1 }
          : { variable: 'magnitude', phi_star: 2.2e-3, m_star: -21, alpha, bias: 1 },
      slices: { count: 2 },
    },
    'div.yaml',
  );

describe('divergent counts', () => {
  test.each(['line_flux', 'magnitude'] as const)(
    '%s: alpha = -2.6 from z = 0 is refused with code divergent',
    (kind) => {
      try {
        predict(survey(-2.6, 0, kind));
        expect.unreachable('should have thrown');
      } catch (e) {
        expect(e).toBeInstanceOf(SurveyError);
        expect((e as SurveyError).code).toBe('divergent');
        expect((e as SurveyError).keyPath).toBe('redshift.min');
      }
    },
  );
  test('alpha = -2.6 from z = 0.01 and alpha = -2.4 from z = 0 give finite counts', () => {
    expect(Number.isFinite(predict(survey(-2.6, 0.01)).totals.count)).toBe(true);
    const p = predict(survey(-2.4, 0));
    expect(Number.isFinite(p.totals.count)).toBe(true);
    expect(p.totals.count).toBeGreaterThan(0);
  });
  test('through the command: exit 2, one sentence, no output file', async () => {
    const dir = tempDir('skytally-div-');
    const f = join(dir, 'div.yaml');
    writeFileSync(
      f,
      'format: 1\ntitle: d\ncosmology: {h0: 70, omega_m: 0.3}\narea: 1\nredshift: {min: 0, max: 0.5}\ndetection: {kind: line_flux, limit: 1e-16, line: 6563}\npopulation: {variable: luminosity, phi_star: 2.2e-3, l_star: 1e42, alpha: -2.7}\n',
    );
    const out = join(dir, 'p.json');
    const r = await runCli(['predict', f, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('redshift.min');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(out)).toBe(false);
  });
});
