/**
 * Level-2 tables of the model's draws kept by everything they depend on (sliceLevelKept in
 * src/counts/model-draws.ts): a slice whose inputs are those of a slice tabulated before (an
 * explore page's change of the window's other end leaves every slice but the last as it was)
 * reads its series, and the draws equal those computed afresh bit for bit (expected values: the
 * same computation with every kept series forgotten). The page's path (moveAcrossLimits) keeps a
 * level 1 per slice for this; any other prediction makes one level 1 for the population.
 */
import { readFileSync } from 'node:fs';
import { expect, test } from 'vitest';
import { parse } from 'yaml';
import { parseSurveyObject } from '../../src/survey/index.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { countPopulation } from '../../src/counts/engine.js';
import {
  drawModelOffsets,
  forgetLevel1Series,
  level1Paths,
  level2Paths,
  populationDraws,
  TABLE_MIN_DRAWS,
} from '../../src/counts/model-draws.js';

const FILE = 'samples/plan-robust-uv-slope.yaml';

test("the window's end moved and back: the slices that did not change read their level-2 series, and the draws equal those made afresh bit for bit", () => {
  const obj = parse(readFileSync(FILE, 'utf8')) as Record<string, unknown>;
  const draws = (max: number) => {
    const survey = parseSurveyObject({ ...obj, redshift: { min: 4, max } }, FILE);
    const pop = survey.populations[0]!;
    const cosmo = new FlatCosmology(survey.cosmology);
    const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
    const offsets = drawModelOffsets(pop.modelUncertainty!, pop.components.length, TABLE_MIN_DRAWS + 16, 3, 0);
    return populationDraws(survey, pop, cosmo, own, offsets, {
      luminosity: true,
      histogramDraws: 0,
      moveAcrossLimits: true,
    });
  };
  forgetLevel1Series();
  const fresh = draws(8);
  forgetLevel1Series();
  const shorter = draws(7.6);
  const kept = level2Paths.kept;
  const made = level2Paths.made;
  const again = draws(8);
  // slices 4-5, 5-6, 6-7 as before; 7-8 new
  expect(level2Paths.kept - kept).toBe(3);
  expect(level2Paths.made - made).toBe(1);
  expect(again.counts).toEqual(fresh.counts);
  expect(again.luminosity).toEqual(fresh.luminosity);
  // the last slice does change (the comparison is not of one computation with itself)
  expect(shorter.counts[3]![0]!).toBeLessThan(fresh.counts[3]![0]!);
  expect(shorter.counts[2]).toEqual(fresh.counts[2]);
});

test('without the page, one level 1 for the population serves its four slices, made afresh and then read again bit for bit', () => {
  const survey = parseSurveyObject(parse(readFileSync(FILE, 'utf8')) as Record<string, unknown>, FILE);
  const pop = survey.populations[0]!;
  const cosmo = new FlatCosmology(survey.cosmology);
  const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
  const offsets = drawModelOffsets(pop.modelUncertainty!, pop.components.length, TABLE_MIN_DRAWS + 16, 3, 0);
  const draws = () => populationDraws(survey, pop, cosmo, own, offsets, { luminosity: true, histogramDraws: 0 });
  forgetLevel1Series();
  const afresh = level1Paths.afresh;
  const made = level2Paths.made;
  const fresh = draws();
  expect(own).toHaveLength(4);
  expect(level1Paths.afresh - afresh).toBe(1);
  expect(level2Paths.made - made).toBe(4);
  // again: the level-1 series read, not made; the same numbers
  const again = draws();
  expect(level1Paths.afresh - afresh).toBe(1);
  expect(again.counts).toEqual(fresh.counts);
  expect(again.luminosity).toEqual(fresh.luminosity);
});

test('the model offsets are drawn once per model uncertainty and arguments: the same array again, the numbers of a fresh draw', () => {
  const survey = parseSurveyObject(parse(readFileSync(FILE, 'utf8')) as Record<string, unknown>, FILE);
  const pop = survey.populations[0]!;
  const mu = pop.modelUncertainty!;
  const first = drawModelOffsets(mu, pop.components.length, 50, 3, 0);
  expect(drawModelOffsets(mu, pop.components.length, 50, 3, 0)).toBe(first);
  // expected values: a copy of the model uncertainty (another key) draws them afresh
  const fresh = drawModelOffsets(structuredClone(mu), pop.components.length, 50, 3, 0);
  expect(fresh).not.toBe(first);
  expect(fresh).toEqual(first);
  // another seed, stream or number of draws is another set (the key holds each of them)
  const other = [
    drawModelOffsets(mu, pop.components.length, 50, 4, 0),
    drawModelOffsets(mu, pop.components.length, 50, 3, 1),
  ];
  for (const o of other) expect(o[0]!.characteristic).not.toBe(first[0]!.characteristic);
  expect(drawModelOffsets(mu, pop.components.length, 20, 3, 0)).toHaveLength(20);
});
