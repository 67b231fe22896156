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

// A script's options are refused as the command line refuses its flags (failed before: targets
// {alpha: NaN} gave a null target and "sigma(alpha) = NaN" notes, {alfa: 0.1} "gives undefined",
// mocks: 2.5 drew "2.5" mocks and seed -1 was used).
describe('library options are checked as the command line checks them', () => {
  const survey = withLimit(9.5);
  test.each([
    [{ mocks: 2.5 }, 'mocks'],
    [{ mocks: -3 }, 'mocks'],
    [{ mocks: 10_001 }, 'mocks'],
    [{ seed: -1 }, 'seed'],
    [{ seed: 2 ** 32 }, 'seed'],
    [{ modelDraws: 0.5 }, 'modelDraws'],
    [{ targets: { alfa: 0.1 } }, 'targets.alfa'],
    [{ targets: { alpha: Number.NaN } }, 'targets.alpha'],
    [{ targets: { alpha: 0 } }, 'targets.alpha'],
    [{ targets: { alpha: -0.1 } }, 'targets.alpha'],
  ])('%j is bad_option naming %s', async (opts, keyPath) => {
    const e = (await forecast(survey, { cosmicVariance: false, ...opts }).then(
      () => undefined,
      (err: unknown) => err,
    )) as { code?: string; keyPath?: string; message?: string } | undefined;
    expect({ code: e?.code, keyPath: e?.keyPath }).toEqual({ code: 'bad_option', keyPath });
    expect(e?.message).toMatch(/^[^\n]*; [^\n]*\.$/);
  });
  test('the options the command line accepts still run: mocks 0, seed 0 and 2^32 - 1, a positive target', async () => {
    for (const opts of [
      { mocks: 0 },
      { seed: 0, mocks: 1 },
      { seed: 4294967295, mocks: 1 },
      { targets: { alpha: 0.1 } },
    ]) {
      const f = await forecast(survey, { cosmicVariance: false, ...opts });
      expect(f.fisher.sigma.alpha).toBeGreaterThan(0);
    }
  });
});
