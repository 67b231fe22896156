/**
 * What cannot be forecast is bad input with its own code: no source above the limit
 * (no_sources) is not the same problem as sources too few to measure three parameters
 * (singular_fisher). Invented threshold surveys; the counts follow from the Schechter function's
 * exp(-L/L*) at limits far above L* (common practice).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { forecast } from '../../src/forecast/forecast.js';

const base = readFileSync(new URL('../../samples/mass-limited.yaml', import.meta.url), 'utf8');

/** The sample with its threshold moved to `log10Limit` (log10 Msun). */
function withLimit(log10Limit: number) {
  return loadSurveyText(base.replace(/^(\s*limit:\s*).*$/m, `$1${log10Limit}`), 'limit-test.yaml');
}

describe('forecast error codes', () => {
  test('a limit 1e8 times above the knee leaves no source at all: no_sources, naming detection.limit', async () => {
    await expect(forecast(withLimit(20), { cosmicVariance: false })).rejects.toMatchObject({
      code: 'no_sources',
      keyPath: 'detection.limit',
    });
  });
  test('a limit where about 1e-300 sources are expected leaves a Fisher matrix that cannot be inverted: singular_fisher', async () => {
    await expect(forecast(withLimit(13.7), { cosmicVariance: false })).rejects.toMatchObject({
      code: 'singular_fisher',
    });
  });
  // alpha <= -2.5 with the window from z = 0 under a magnitude limit: the count diverges as
  // z^(2 alpha + 4) (src/counts/engine.ts, common practice), so no Fisher matrix exists; it was
  // refused with cosmic variance (by the count behind it) and accepted without
  const uv = readFileSync(new URL('../../samples/plan-uv-deep-wide.yaml', import.meta.url), 'utf8')
    .replace('redshift: {min: 4, max: 8}', 'redshift: {min: 0, max: 8}')
    .replace(/alpha: "-1\.95 - 0\.08\*\(z - 6\)"/, 'alpha: -2.6');
  test.each([true, false])(
    'a count that diverges at z = 0 is refused (cosmic variance %s): divergent, naming redshift.min',
    async (cv) => {
      expect(uv).toContain('alpha: -2.6');
      await expect(forecast(loadSurveyText(uv, 'divergent.yaml'), { cosmicVariance: cv })).rejects.toMatchObject({
        code: 'divergent',
        keyPath: 'redshift.min',
      });
    },
  );
});
