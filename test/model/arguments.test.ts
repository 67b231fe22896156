/**
 * The library's entry points refuse the wrong kind of argument with a SurveyError in one sentence
 * saying what they take and how to get it, never a TypeError from inside the computation (failed
 * before: predict('samples/halpha-narrowband.yaml') and predict({}) threw "TypeError: Cannot
 * destructure property 'h0' of 'c' as it is undefined"). The functions are called through the
 * library's own surface, src/index.ts. A population named wrongly through the library names the
 * library's option, options.population; the command line keeps --population.
 */
import { describe, expect, test } from 'vitest';
import * as lib from '../../src/index.js';
import { SurveyError } from '../../src/errors.js';
import { runCli } from '../cli/helpers.js';

const SAMPLE = 'samples/halpha-narrowband.yaml';
const survey = lib.loadSurveyFile(SAMPLE);
const asWritten = { format: 1, area: 2, cosmology: { preset: 'planck2018' }, detection: {}, population: {} };

/** The SurveyError a call throws, synchronously or as a rejected promise; anything else fails. */
async function refusal(call: () => unknown): Promise<SurveyError> {
  try {
    await call();
  } catch (e) {
    expect(e, String(e)).toBeInstanceOf(SurveyError);
    return e as SurveyError;
  }
  throw new Error('expected a SurveyError, and the call succeeded');
}

/** One sentence: it ends with its only full stop followed by nothing (but in quoted names and e.g.). */
function oneSentence(message: string): void {
  expect(message).toMatch(/^[^\n]+\.$/);
  expect(
    message
      .replace(/"[^"]*"/g, '""')
      .replace(/\be\.g\./g, '')
      .slice(0, -1),
  ).not.toMatch(/\.\s/);
  expect(message).not.toMatch(/TypeError|undefined \(reading|Cannot (read|destructure)/);
}

/** Every exported function that takes a survey, called with `x` in the survey's place. */
const TAKES_A_SURVEY: Record<string, (x: unknown) => unknown> = {
  predict: (x) => lib.predict(x as lib.Survey),
  forecast: (x) => lib.forecast(x as lib.Survey),
  plan: (x) => lib.plan(x as lib.Survey),
  buildReport: (x) => lib.buildReport(x as lib.Survey),
  describeSurvey: (x) => lib.describeSurvey(x as lib.Survey),
  drawFigures: (x) => lib.drawFigures(x as lib.Survey, lib.predict(survey)),
  exploreControls: (x) => lib.exploreControls({}, x as lib.Survey),
  populationByName: (x) => lib.populationByName(x as lib.Survey),
  choosePopulation: (x) => lib.choosePopulation(x as lib.Survey),
  surveyForPopulation: (x) => lib.surveyForPopulation(x as lib.Survey, survey.populations[0]!),
};

describe('a non-survey where a survey is taken', () => {
  test.each(Object.keys(TAKES_A_SURVEY))(
    '%s: a path, {}, the file as written, undefined, null, a number',
    async (name) => {
      const call = TAKES_A_SURVEY[name]!;
      const path = await refusal(() => call(SAMPLE));
      expect(path.code).toBe('wrong_type');
      expect(path.message).toBe(
        `${name} takes a survey from loadSurveyFile(path), loadSurveyText(text, file) or parseSurveyObject(object, file), not a string; load the file first: ${name}(loadSurveyFile("${SAMPLE}")).`,
      );
      oneSentence(path.message);
      const empty = await refusal(() => call({}));
      expect(empty.message).toContain(`${name} takes a survey from loadSurveyFile(path)`);
      expect(empty.message).toContain('not an object without cosmology;');
      oneSentence(empty.message);
      const written = await refusal(() => call(asWritten));
      expect(written.message).toContain(
        "not a survey file's contents as written; check them with parseSurveyObject first",
      );
      oneSentence(written.message);
      for (const x of [undefined, null, 42, [survey]]) {
        const e = await refusal(() => call(x));
        expect(e.code).toBe('wrong_type');
        expect(e.message).toContain(`${name} takes a survey`);
        oneSentence(e.message);
      }
      // a loaded survey whose field was replaced by something else is named by that field
      const broken = await refusal(() => call({ ...survey, detection: 'line_flux' }));
      expect(broken.message).toContain("not an object whose detection is not a loaded survey's (a string)");
    },
  );

  test('compare takes a list of surveys: a single survey, a path, and a list holding a path are refused, the last naming its index', async () => {
    const one = await refusal(() => lib.compare(survey as unknown as lib.Survey[]));
    expect(one.message).toContain('compare takes a list of surveys');
    expect(one.message).toContain('not one survey; give them as an array');
    oneSentence(one.message);
    oneSentence((await refusal(() => lib.compare(SAMPLE as unknown as lib.Survey[]))).message);
    const second = await refusal(() => lib.compare([survey, SAMPLE as unknown as lib.Survey]));
    expect(second.keyPath).toBe('surveys[1]');
    expect(second.message).toMatch(
      /^surveys\[1\]: compare takes a list of surveys .*but this one is a string; load the file first: compare\(\[\.\.\., loadSurveyFile\("samples\/halpha-narrowband\.yaml"\)\]\)\.$/,
    );
    oneSentence(second.message);
  });

  test('the loaders and explorePage refuse what is not a path or a text, and say which function takes it', async () => {
    const file = await refusal(() => lib.loadSurveyFile({} as unknown as string));
    expect(file.message).toBe(
      'loadSurveyFile takes the path of a survey file, not an object; for the contents of a survey file as an object, use parseSurveyObject(object, "my-survey.yaml").',
    );
    const loaded = await refusal(() => lib.explorePage(survey as unknown as string));
    expect(loaded.message).toContain(
      'explorePage takes the path of a survey file, not an object; this is already a loaded survey',
    );
    const none = await refusal(() => lib.explorePage(undefined as unknown as string));
    expect(none.message).toBe(
      'explorePage takes the path of a survey file, not undefined; e.g. explorePage("samples/halpha-narrowband.yaml").',
    );
    const text = await refusal(() => lib.loadSurveyText(undefined as unknown as string, 'x.yaml'));
    expect(text.message).toContain('loadSurveyText takes the text of a survey file, not undefined');
    const name = await refusal(() => lib.loadSurveyText('format: 1', undefined as unknown as string));
    expect(name.message).toContain('loadSurveyText takes the name of the file as its second argument');
    const objName = await refusal(() => lib.parseSurveyObject(asWritten, undefined as unknown as string));
    expect(objName.message).toContain('parseSurveyObject takes the name of the file as its second argument');
    for (const e of [file, loaded, none, text, name, objName]) {
      expect(e.code).toBe('wrong_type');
      oneSentence(e.message);
    }
  });

  test('exploreCompute takes {text}: a path, undefined and {text: 5} are refused', async () => {
    const cases: [unknown, string][] = [
      [SAMPLE, 'not a string'],
      [undefined, 'not undefined'],
      [{ text: 5 }, 'not an object whose text is a number'],
    ];
    for (const [source, not] of cases) {
      const e = await refusal(() => lib.exploreCompute(source as { text: string }, 'x.yaml', '.'));
      expect(e.code).toBe('wrong_type');
      expect(e.message).toContain(`exploreCompute takes the survey file's text as {text: string}, ${not}; e.g. `);
      oneSentence(e.message);
    }
    const noName = await refusal(() => lib.exploreCompute({ text: 'format: 1' }, undefined as unknown as string, '.'));
    expect(noName.message).toContain('exploreCompute takes the name of the file as its second argument');
  });

  test('options that are not an object are refused (failed before: null a TypeError, a string or number ignored)', async () => {
    const plan = lib.loadSurveyFile('samples/plan-halpha-layers.yaml');
    const calls: Record<string, (o: unknown) => unknown> = {
      predict: (o) => lib.predict(survey, o as lib.PredictOptions),
      forecast: (o) => lib.forecast(survey, o as lib.ForecastOptions),
      plan: (o) => lib.plan(plan, o as lib.PlanOptions),
      compare: (o) => lib.compare([survey, survey], o as lib.CompareOptions),
      buildReport: (o) => lib.buildReport(survey, o as lib.BuildReportOptions),
    };
    for (const [name, call] of Object.entries(calls))
      for (const [o, kind] of [
        [null, 'null'],
        ['json', 'a string'],
        [5, 'a number'],
        [[], 'an array'],
      ] as const) {
        const e = await refusal(() => call(o));
        expect(e.code).toBe('wrong_type');
        expect(e.keyPath).toBe('options');
        expect(e.message).toMatch(
          new RegExp(`^options: ${name} takes its options as an object, not ${kind}; e\\.g\\. ${name}\\(`),
        );
        oneSentence(e.message);
      }
  });

  test('a loaded survey still works (the checks refuse nothing the loaders make)', () => {
    expect(lib.predict(survey).totals.count).toBeGreaterThan(0);
    expect(lib.describeSurvey(survey).area_deg2).toBe(survey.areaDeg2);
    expect(lib.populationByName(survey).name).toBe(survey.populations[0]!.name);
  });
});

describe('an unknown population: the library names options.population, the command line --population', () => {
  const multi = lib.loadSurveyFile('samples/narrowband-interlopers.yaml');

  test('forecast, plan and compare through the library (failed before: "--population", an option the library does not have)', async () => {
    for (const call of [
      () => lib.forecast(multi, { population: 'nope' }),
      () => lib.plan(lib.loadSurveyFile('samples/plan-halpha-layers.yaml'), { population: 'nope' }),
      () => lib.compare([survey, multi], { population: 'nope' }),
      () => lib.populationByName(multi, 'nope'),
      () => lib.choosePopulation(multi, 'nope'),
    ]) {
      const e = await refusal(call);
      expect(e.code).toBe('bad_option');
      expect(e.keyPath).toBe('options.population');
      expect(e.message).toMatch(
        /: options\.population: there is no population named "nope"; use one of "[^"]+"(, "[^"]+")*\.$/,
      );
      expect(e.message).not.toContain('--population');
    }
  });

  test('a double Schechter population: the library says to choose another with options.population', async () => {
    const double = lib.loadSurveyFile('samples/double-schechter-mass.yaml');
    const e = await refusal(() => lib.forecast(double));
    expect(e.code).toBe('kind_mismatch');
    expect(e.message).toContain('choose a single-Schechter population with options.population, or describe');
    expect(e.message).not.toContain('--population');
  });

  test.each([
    ['forecast', 'samples/narrowband-interlopers.yaml'],
    ['plan', 'samples/plan-halpha-layers.yaml'],
    ['compare', 'samples/halpha-narrowband.yaml samples/narrowband-interlopers.yaml'],
  ])('%s --population nope: the command line names --population', async (command, files) => {
    const r = await runCli([command, ...files.split(' '), '--population', 'nope']);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    // in the form of every option refusal, the command first, then the file the name is not in
    expect(r.stderr).toMatch(
      new RegExp(
        `^skytally: ${command} --population: [^\\n]+\\.yaml: there is no population named "nope"; use one of "[^\\n]+"\\.\\n$`,
      ),
    );
    expect(r.stderr).not.toContain('options.population');
  });

  test('forecast of a double Schechter population on the command line names --population', async () => {
    const r = await runCli(['forecast', 'samples/double-schechter-mass.yaml']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('choose a single-Schechter population with --population, or describe');
  });
});
