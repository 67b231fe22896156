/**
 * README's library section names the result types a script imports; each must be exported by the
 * library (`npm test` typechecks this file, and the test reads README's list so that the two agree).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, expectTypeOf, test } from 'vitest';
import type {
  ClusteringTable,
  Comparison,
  DistanceTable,
  Forecast,
  Plan,
  Prediction,
  ReportJson,
  Survey,
  SurveyCheck,
} from '../../src/index.js';
import type { compare, distanceTable, forecast, plan, predict } from '../../src/index.js';

const NAMES = [
  'Prediction',
  'Forecast',
  'Plan',
  'Comparison',
  'DistanceTable',
  'ClusteringTable',
  'SurveyCheck',
  'ReportJson',
  'Survey',
];

describe("README's result types", () => {
  test('the list in README is the list imported above', () => {
    const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8').replace(/\s+/g, ' ');
    const sentence = /exported by name: (.*?) with the `Survey` they read/.exec(readme)?.[1];
    expect(sentence, 'README names the result types').toBeDefined();
    const listed = [...sentence!.matchAll(/`([A-Za-z]+)`/g)].map((m) => m[1]);
    expect([...listed, 'Survey']).toEqual(NAMES);
  });
  test('each is the type its function returns', () => {
    expectTypeOf<ReturnType<typeof predict>>().toEqualTypeOf<Prediction>();
    expectTypeOf<Awaited<ReturnType<typeof forecast>>>().toEqualTypeOf<Forecast>();
    expectTypeOf<Awaited<ReturnType<typeof plan>>>().toEqualTypeOf<Plan>();
    expectTypeOf<Awaited<ReturnType<typeof compare>>>().toEqualTypeOf<Comparison>();
    expectTypeOf<ReturnType<typeof distanceTable>>().toEqualTypeOf<DistanceTable>();
    expectTypeOf<Parameters<typeof predict>[0]>().toEqualTypeOf<Survey>();
    expectTypeOf<ClusteringTable>().toHaveProperty('rows');
    expectTypeOf<SurveyCheck>().toHaveProperty('warnings');
    expectTypeOf<ReportJson>().toHaveProperty('prediction');
  });
});
