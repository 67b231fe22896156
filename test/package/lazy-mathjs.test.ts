/**
 * The built library (dist/index.js, made by scripts/build.mjs) reads mathjs from its own file
 * (dist/mathjs.cjs) only when a survey file holds a unit or an expression the quick readers do not
 * know, and then gives the numbers the TypeScript sources give (exactly: the same code runs).
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { beforeAll, describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';

beforeAll(() => {
  if (!existsSync('dist/index.js') || !existsSync('dist/mathjs.cjs'))
    execFileSync('npm', ['run', 'build'], { stdio: 'ignore' });
}, 300_000);

/** A survey text whose filter centre is in picometres and whose alpha is an expression with log10. */
function unusualText(): string {
  return readFileSync('samples/halpha-narrowband.yaml', 'utf8')
    .replace('center: "1.19 um"', 'center: "1190000 pm"')
    .replace(/^(\s*)alpha: .*$/m, '$1alpha: "-1.35 + 0.1*log10(1 + z)"');
}

/** Runs the built library on `text` in a new process: the total count and whether mathjs was read. */
function builtRun(text: string): { count: number; centre: number; mathjs: boolean } {
  const script = `
    import { createRequire } from 'node:module';
    const { loadSurveyText, predict } = await import('./dist/index.js');
    const survey = loadSurveyText(process.env.SURVEY_TEXT, 'samples/test.yaml');
    const p = predict(survey);
    const cache = createRequire(import.meta.url).cache;
    console.log(JSON.stringify({
      count: p.totals.count,
      centre: survey.detection.filter.centerAngstrom,
      mathjs: Object.keys(cache).some((k) => k.endsWith('mathjs.cjs')),
    }));`;
  const out = execFileSync(process.execPath, ['--input-type=module', '-e', script], {
    encoding: 'utf8',
    env: { ...process.env, SURVEY_TEXT: text },
  });
  return JSON.parse(out) as { count: number; centre: number; mathjs: boolean };
}

describe('mathjs is read only when needed', () => {
  test('a bundled sample with common units and expressions does not read it', () => {
    const text = readFileSync('samples/halpha-narrowband.yaml', 'utf8');
    const r = builtRun(text);
    expect(r.mathjs).toBe(false);
    expect(r.count).toBe(predict(loadSurveyText(text, 'samples/test.yaml')).totals.count);
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
