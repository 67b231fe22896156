/**
 * completeness_vanishes_before_limit: a completeness curve below 1 % at the detection limit (a
 * curve kept from a shallower survey after the limit was deepened). predict keeps the curve where
 * the file puts it (docs/survey-file.md, "Completeness"), so such a file's counts follow the curve:
 * checked below from the definition of the logistic (docs/survey-file.md), and the warning says so
 * in every kind. A curve whose 50 % point lies near the limit, as measured curves do (common
 * practice: completeness is measured by injecting sources around the survey's own depth), raises
 * nothing, and no bundled sample raises it.
 */
import { describe, expect, test } from 'vitest';
import { readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse, stringify } from 'yaml';
import { loadSurveyFile, parseSurveyObject } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { predictionWarnings } from '../../src/counts/warnings.js';
import { clone, LINE_YAML, MAGNITUDE_YAML, setPath, THRESHOLD_YAML } from '../survey/fixtures.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';

const FILE = 'completeness-at-limit.yaml';
const CODE = 'completeness_vanishes_before_limit';

function survey(base: string, keys: Record<string, unknown>) {
  const obj = clone(parse(base) as Record<string, unknown>);
  for (const [k, v] of Object.entries(keys)) setPath(obj, k, v);
  return parseSurveyObject(obj, FILE);
}
const codes = (s: ReturnType<typeof survey>) => predictionWarnings(s).map((w) => w.code);

describe('completeness below 1 % at the detection limit', () => {
  test('magnitude kind: a curve at 27.2 (width 0.15) with the limit deepened to 29.5 warns, and the deeper limit indeed adds almost nothing', () => {
    // c(29.5) = 1 / (1 + exp((29.5 - 27.2) / 0.15)) = 2.2e-7
    const deep = survey(MAGNITUDE_YAML, { 'detection.limit': 29.5 });
    const w = predictionWarnings(deep).find((x) => x.code === CODE)!;
    expect(w.message).toContain('29.5 AB');
    expect(w.message).toContain('is 0.000022 %');
    const deeper = survey(MAGNITUDE_YAML, { 'detection.limit': 30.5 });
    const a = predict(deep, { noUncertainty: true }).totals.count;
    const b = predict(deeper, { noUncertainty: true }).totals.count;
    expect(b).toBeGreaterThanOrEqual(a); // a fainter limit never lowers a count
    expect((b - a) / a).toBeLessThan(1e-5); // ... and adds almost nothing, as the warning says
    // the file's own limit, 0.3 mag past the curve's 50 % point (c = 0.12): no warning
    expect(codes(survey(MAGNITUDE_YAML, {}))).not.toContain(CODE);
    // the boundary: c = 1 % at the limit lies at half + width ln 99 = 27.889
    expect(codes(survey(MAGNITUDE_YAML, { 'detection.limit': 27.88 }))).not.toContain(CODE);
    expect(codes(survey(MAGNITUDE_YAML, { 'detection.limit': 27.9 }))).toContain(CODE);
  });

  test('magnitude kind with a table whose last rows fall to 0 before the limit', () => {
    const s = survey(MAGNITUDE_YAML, {
      'detection.completeness': {
        model: 'table',
        table: [
          [26, 0.95],
          [27, 0.5],
          [27.4, 0],
        ],
      },
    });
    const w = predictionWarnings(s).find((x) => x.code === CODE)!;
    expect(w.message).toContain('is 0 %');
  });

  test('line_flux kind: a curve at 5e-16 with a limit of 1e-17 warns; at its own depth it does not', () => {
    const deep = survey(LINE_YAML, {
      'detection.limit': '1e-17 erg/s/cm^2',
      'detection.completeness': { model: 'logistic', half: 5e-16, width: 0.1 },
    });
    // c = 1 / (1 + exp((log10 5e-16 - log10 1e-17) / 0.1)) = exp(-16.99) = 4.2e-8
    const w = predictionWarnings(deep).find((x) => x.code === CODE)!;
    expect(w.message).toContain('1e-17 erg/s/cm^2');
    const near = survey(LINE_YAML, {
      'detection.limit': '4e-16 erg/s/cm^2',
      'detection.completeness': { model: 'logistic', half: 5e-16, width: 0.1 },
    });
    expect(codes(near)).not.toContain(CODE);
  });

  test('threshold kind (stellar mass): a curve at log10 M = 11 above a limit of 9.5 to 10 warns; at 9.8 it does not', () => {
    // the limit varies from 9.5 to 10 over the window; at 10, c = 1 / (1 + exp((11 - 10) / 0.1)) = 4.5e-5
    const hi = survey(THRESHOLD_YAML, { 'detection.completeness': { model: 'logistic', half: 11, width: 0.1 } });
    expect(codes(hi)).toContain(CODE);
    const ok = survey(THRESHOLD_YAML, { 'detection.completeness': { model: 'logistic', half: 9.8, width: 0.1 } });
    expect(codes(ok)).not.toContain(CODE);
  });

  test('no bundled sample raises it', () => {
    for (const f of readdirSync('samples').filter((x) => x.endsWith('.yaml')))
      expect(codes(loadSurveyFile(`samples/${f}`)), f).not.toContain(CODE);
  });

  test('on the command line: check and predict print it on stderr and in the JSON', async () => {
    const obj = clone(parse(MAGNITUDE_YAML) as Record<string, unknown>);
    setPath(obj, 'detection.limit', 29.5);
    const path = join(tempDir('skytally-completeness-limit-'), 'deep.yaml');
    writeFileSync(path, stringify(obj));
    for (const cmd of ['check', 'predict']) {
      const r = await runCli([cmd, path, '--format', 'json']);
      expect(r.code).toBe(0);
      const out = JSON.parse(r.stdout) as { warnings: { code: string }[] };
      expect(out.warnings.map((w) => w.code)).toContain(CODE);
      expect(r.stderr).toMatch(/skytally: warning: the completeness at the detection limit \(29\.5 AB\)/);
    }
  });
});
