import { test } from 'vitest';
import { readFileSync } from 'node:fs';
import { parse } from 'yaml';
import { parseSurveyObject } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';
test('pts', () => {
  for (const f of ['samples/mass-limited.yaml', 'samples/double-schechter-mass.yaml', 'samples/plan-robust-uv-slope.yaml']) {
    console.log('==', f);
    const s = parseSurveyObject(parse(readFileSync(f, 'utf8')), f);
    const t = performance.now();
    predict(s, {});
    console.log('ms', performance.now() - t);
    const t2 = performance.now();
    predict(s, {});
    console.log('warm ms', performance.now() - t2);
  }
}, 600000);
