/**
 * One definition per output: the TypeScript type of every JSON output is generated from its JSON
 * Schema in specs/ (scripts/generate-output-types.ts). This fails while a generated module is out
 * of date: after editing a schema, run `npx tsx scripts/generate-output-types.ts`.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { OUTPUT_DIR, OUTPUTS, generateOutputTypes } from '../../scripts/generate-output-types.js';

describe('output types generated from specs/', async () => {
  const generated = await generateOutputTypes();

  test('every output has its module, and the shared blocks theirs', () => {
    expect([...generated.keys()].sort()).toEqual([...OUTPUTS.map((o) => `${o.schema}.ts`), 'shared.ts'].sort());
  });

  test.each([...generated.keys()])('src/model/outputs/%s is up to date with its schema', (name) => {
    expect(readFileSync(new URL(name, OUTPUT_DIR), 'utf8')).toBe(generated.get(name));
  });
});

describe('the check output follows its schema (specs/check.schema.json)', async () => {
  const { Ajv2020 } = await import('ajv/dist/2020.js');
  const { readdirSync } = await import('node:fs');
  const { loadSurveyFile } = await import('../../src/survey/load.js');
  const { describeSurvey } = await import('../../src/survey/describe.js');
  const validate = new Ajv2020({ allErrors: true, strict: false }).compile(
    JSON.parse(readFileSync('specs/check.schema.json', 'utf8')) as object,
  );
  test.each(readdirSync('samples').filter((f) => f.endsWith('.yaml')))('samples/%s', (f) => {
    const ok = validate({ ...describeSurvey(loadSurveyFile(`samples/${f}`)), warnings: [] });
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });
});
