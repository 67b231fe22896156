/**
 * Changes made so that V8's optimising compiler compiles the hot functions of a cold predict and
 * report once (the photo-z slice's sums over its pieces' nodes in a function of the module, the
 * model draws' level-2 rows and histogram terms in classes, the open brightest bin's end worked out
 * for every node, the nodes' components of one class in packed arrays; the luminosity function's
 * band in two loops of their own, the draws' Fisher series table a class, fisherSums and knotSums a
 * slice at a time, the panel's clamp worked out before its branch) keep the same arithmetic in the
 * same order, so every number is the same bit for bit. Source: the SHA-256 of every number of each
 * result, in document order (JSON.stringify gives each number's shortest exact form; the words
 * are left out, so that a change of wording does not touch these checks), on the code before them
 * (commit e1057c7), recorded with the same calls as below. A change meant to move these numbers
 * records them again on the code before it.
 */
import { describe, expect, test } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { luminosityFunctionBand } from '../../src/population/curves.js';
import { drawModelOffsets } from '../../src/counts/model-draws.js';
import { runCli } from '../cli/helpers.js';

/** Every number in v, in document order. */
function numbers(v: unknown, out: number[] = []): number[] {
  if (typeof v === 'number') out.push(v);
  else if (Array.isArray(v)) for (const x of v) numbers(x, out);
  else if (v && typeof v === 'object') for (const x of Object.values(v)) numbers(x, out);
  return out;
}

function digest(v: unknown): string {
  return createHash('sha256')
    .update(JSON.stringify(numbers(v)))
    .digest('hex');
}

function load(name: string) {
  const file = `samples/${name}.yaml`;
  return loadSurveyText(readFileSync(file, 'utf8'), file, 'samples');
}

/** The samples whose cold predict met those functions, and their predictions' numbers before. */
const PREDICT_BEFORE: Record<string, string> = {
  // the open brightest bin in the completeness's varying range
  'narrowband-interlopers': 'a30f2f5079cc6a7ec860a5706608b4031fbffee79e971dacf450532895184d40',
  // measured slices summed over the pieces' nodes; nodes' components (recorded again, as the next
  // one and the report below, when the luminosity densities of magnitude populations took the AB zero
  // point 3631 Jy for 48.60: those densities moved by 6.0e-5 and nothing else, as outputs-diff showed)
  'photoz-optical-field': 'e7fa9f82e495891e0ad9c26f77177aee390dbad41df0e42448c92baf5871b438',
  // level-2 rows of the completeness tables, histogram tables (recorded again, as the report below,
  // when one level-1 table per population replaced one per slice: the draws' percentiles of the
  // counts and detected luminosity densities moved, 100 numbers by at most 2.8e-14 relative, and
  // nothing else, as outputs-diff and a number-by-number comparison showed)
  'plan-robust-uv-slope': '65e2b73a6a86954da4069d7e2a60c334654cdc0d6d093277ce04aedf7f31ca27',
  // two components' histogram tables
  'double-schechter-mass': '1fbe7562b2674e57b7e0eaa53e1f553caa0c25704337e64f67e214bd1fd17247',
  'mass-limited': '2d5181a8933f9697c0fd6c02099e13cd1d84ccbea7008adba2aa082e7067355b',
};

/** The luminosity function's band of each sample's first population (1,000 draws, seed 1, 60 points). */
const BAND_BEFORE: Record<string, string> = {
  'plan-robust-uv-slope': 'c7ae0712d50c49ef1e22e6133abef377aa39c9b0bff1dd68660855e7ade64921',
  'double-schechter-mass': 'f444f89f0fd75607da96980b05cfe3cad66e7b2c86a11d463b419f1a8a8819b7',
  'mass-limited': 'b12e3a5c63ba3fa2fa4c1a74c22c5b91be0c34de03f768503012804c5783179a',
};

describe('hot functions compiled once: the same numbers bit for bit (e1057c7)', () => {
  for (const [name, before] of Object.entries(PREDICT_BEFORE)) {
    test(`predict ${name}`, () => {
      expect(digest(predict(load(name)))).toBe(before);
    });
  }

  test('report --format json of the robust UV plan (prediction, forecast with its draws, robust plan)', async () => {
    const r = await runCli(['report', 'samples/plan-robust-uv-slope.yaml', '--format', 'json']);
    expect(r.code).toBe(0);
    // plan.robust.agreement came later (how often the robust best wins draw by draw, checked in
    // test/planning/robust.test.ts): every number before it is still the same bit for bit.
    // Recorded again when the slices' cosmic-variance nuisances took one joint prior (correlated
    // slices of one field): the forecast's, the draws' and the plan's sigmas with cosmic variance
    // moved by design (outputs-diff listed those and nothing else). Recorded again when the forecast's
    // cosmic-variance fractions took the density grid's own slice counts instead of the count engine's:
    // the report's forecast part moved (39 numbers, by at most 2.0e-13 relative), nothing else.
    // Recorded again for one level-1 table per population (see the predict digest above): the
    // prediction's draws moved (100 numbers, by at most 2.8e-14 relative), nothing else
    // forecast.cosmology and plan.cosmology came later too (the forecast and the plan restate the
    // cosmology: test/cli/cosmology-restated.test.ts); each equals the prediction's, which is counted.
    const doc = JSON.parse(r.stdout) as {
      prediction: { cosmology: unknown };
      forecast: { cosmology?: unknown };
      plan: { cosmology?: unknown; robust: { agreement?: unknown } };
    };
    expect(doc.plan.robust.agreement).toBeDefined();
    delete doc.plan.robust.agreement;
    expect(doc.forecast.cosmology).toEqual(doc.prediction.cosmology);
    expect(doc.plan.cosmology).toEqual(doc.prediction.cosmology);
    delete doc.forecast.cosmology;
    delete doc.plan.cosmology;
    expect(digest(doc)).toBe('e54f94134f79e6dbaa99ed64b3d8530ab176e8e2b54a5131faff89809ee2b9e3');
  });

  for (const [name, before] of Object.entries(BAND_BEFORE)) {
    test(`luminosityFunctionBand of ${name}`, () => {
      const p = load(name).populations[0]!;
      const offsets = drawModelOffsets(p.modelUncertainty!, p.components.length, 1000, 1, 0);
      const z = 0.5 * (p.window.min + p.window.max);
      const x = Array.from({ length: 60 }, (_, i) => (p.variable === 'magnitude' ? -24 + i * 0.1 : 8 + i * 0.1));
      expect(digest(luminosityFunctionBand(p, z, x, offsets))).toBe(before);
    });
  }
});
