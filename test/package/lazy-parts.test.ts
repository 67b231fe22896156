/**
 * The built library (dist/index.js, made by scripts/build.mjs) reads mathjs from its own file
 * (dist/mathjs.cjs) only when a survey file holds a unit or an expression the quick readers do not
 * know, and the random-number generators (dist/random.cjs) only for mock surveys (the model's
 * draws take theirs from src/numerics/random.ts, the same numbers); either way it gives the numbers the TypeScript sources give (exactly: the same code
 * runs).
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { beforeAll, describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';

beforeAll(() => {
  if (!existsSync('dist/index.js') || !existsSync('dist/mathjs.cjs') || !existsSync('dist/random.cjs'))
    execFileSync('npm', ['run', 'build'], { stdio: 'ignore' });
}, 300_000);

/** A survey text whose filter centre is in picometres and whose alpha is an expression with log10. */
function unusualText(): string {
  return readFileSync('samples/halpha-narrowband.yaml', 'utf8')
    .replace('center: "1.19 um"', 'center: "1190000 pm"')
    .replace(/^(\s*)alpha: .*$/m, '$1alpha: "-1.35 + 0.1*log10(1 + z)"');
}

interface BuiltRun {
  count: number;
  centre: number;
  /** The whole prediction, as JSON. */
  prediction: string;
  mathjs: boolean;
  random: boolean;
}

/** Runs the built library on `text` in a new process: its prediction and which lazy parts it read. */
function builtRun(text: string): BuiltRun {
  const script = `
    import { createRequire } from 'node:module';
    const { loadSurveyText, predict } = await import('./dist/index.js');
    const survey = loadSurveyText(process.env.SURVEY_TEXT, 'samples/test.yaml');
    const p = predict(survey);
    const cache = createRequire(import.meta.url).cache;
    console.log(JSON.stringify({
      count: p.totals.count,
      centre: survey.detection.filter?.centerAngstrom,
      prediction: JSON.stringify(p),
      mathjs: Object.keys(cache).some((k) => k.endsWith('mathjs.cjs')),
      random: Object.keys(cache).some((k) => k.endsWith('random.cjs')),
    }));`;
  const out = execFileSync(process.execPath, ['--input-type=module', '-e', script], {
    encoding: 'utf8',
    env: { ...process.env, SURVEY_TEXT: text },
  });
  return JSON.parse(out) as BuiltRun;
}

describe('mathjs is read only when needed', () => {
  test('a bundled sample with common units and expressions does not read it', () => {
    const text = readFileSync('samples/halpha-narrowband.yaml', 'utf8');
    const r = builtRun(text);
    expect(r.mathjs).toBe(false);
    expect(r.random).toBe(false);
    expect(r.prediction).toBe(JSON.stringify(predict(loadSurveyText(text, 'samples/test.yaml'))));
  });
  test('a unit and an expression only mathjs reads: read, and the same numbers as the sources', () => {
    const text = unusualText();
    const r = builtRun(text);
    expect(r.mathjs).toBe(true);
    const survey = loadSurveyText(text, 'samples/test.yaml');
    const filter = survey.detection.kind === 'line_flux' ? survey.detection.filter : undefined;
    expect(r.centre).toBe(filter?.centerAngstrom);
    expect(r.centre).toBe(11900); // 1190000 pm = 1.19 um (SI prefixes)
    expect(r.count).toBe(predict(survey).totals.count);
  });
});

describe('the random-number generators are read only for mock surveys', () => {
  test("a sample with model_uncertainty does not read them, and its draws are the sources' exactly", () => {
    const text = readFileSync('samples/mass-limited.yaml', 'utf8');
    expect(text).toMatch(/^\s*model_uncertainty:/m);
    const r = builtRun(text);
    expect(r.random).toBe(false);
    expect(r.mathjs).toBe(false);
    const p = predict(loadSurveyText(text, 'samples/test.yaml'));
    expect(p.totals.model).toBeDefined();
    expect(r.prediction).toBe(JSON.stringify(p));
  });
});
