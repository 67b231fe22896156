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
});
