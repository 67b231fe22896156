/**
 * Changes made so that V8's optimising compiler compiles the count engine's hot functions once in
 * a cold process (the photo-z slice's sums over its pieces' nodes in a function of the module, the
 * model draws' level-2 rows and histogram terms in classes, the open brightest bin's end worked out
 * for every node, the nodes' components of one class in packed arrays) keep the same arithmetic
 * in the same order, so every number is the same bit for bit. Source: the SHA-256 of
 * each sample's whole prediction as JSON (JSON.stringify gives every number's shortest exact
 * form) on the code before them (commit e1057c7), recorded with the same calls as below.
 */
import { describe, expect, test } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';

/** The samples whose cold predict met those functions, and their predictions' digests before. */
const BEFORE: Record<string, string> = {
  // the open brightest bin in the completeness's varying range
  'narrowband-interlopers': 'd892a85e44476085b94dbd6326cc0694590a197cd95cabdf5ef856d67e08f4b8',
  // measured slices summed over the pieces' nodes; nodes' components
  'photoz-optical-field': 'a84408f400566729259271b2feb9492e3a0f0a6f987551db4d30350b86ac2a03',
  // level-2 rows of the completeness tables, histogram tables
  'plan-robust-uv-slope': '01d45d1002601d8b831d259ec0f79de017d1c79a2b832f4fd55950c460a25574',
  // two components' histogram tables
  'double-schechter-mass': '2862d744fffc2bf15d78c09052b51cec19ed4352e9d74b0d630f607451b289c2',
  'mass-limited': '58b75620cb409c6ce811c8cc27f86e4c8c0d71ae7c95cdfa3acbea8b6df6b7d8',
};

describe('hot functions compiled once: the same numbers bit for bit', () => {
  for (const [name, digest] of Object.entries(BEFORE)) {
    test(`predict ${name}: the prediction's SHA-256 as before (e1057c7)`, () => {
      const file = `samples/${name}.yaml`;
      const p = predict(loadSurveyText(readFileSync(file, 'utf8'), file, 'samples'));
      expect(createHash('sha256').update(JSON.stringify(p)).digest('hex')).toBe(digest);
    });
  }
});
