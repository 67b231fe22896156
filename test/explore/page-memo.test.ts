/**
 * The explore page's memory of earlier updates (exploreMemo: work a change of a control cannot
 * alter, each population's counts and the density grid's Fisher sums at another area,
 * src/counts/count-memo.ts and src/forecast/grid-memo.ts) gives the numbers computed without it: on every bundled sample, a page's engine is driven through a
 * change of every control in turn (the area twice, so that sums kept at one area serve another,
 * and back to the first values, so that every kept entry is read again), and after each change
 * every output and the Fisher sigmas (with and without cosmic variance) equal those of the engine
 * without a memory to 1e-12 relative (the area enters a fresh grid inside each point's logarithm,
 * a kept one as a factor: rounding apart, the same numbers). Then each memory alone against the
 * engine and the grid at another area.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { controlSettings, settingsObject, type ControlSpec } from '../../src/library/explore/settings.js';
import { exploreCompute, exploreMemo, type ExploreResult } from '../../src/library/explore/engine.js';
import { FisherSumsMemo, scaledParts } from '../../src/forecast/grid-memo.js';
import { CountMemo, memoKey } from '../../src/counts/count-memo.js';
import { countPopulation } from '../../src/counts/engine.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { surveyForPopulation } from '../../src/model/select.js';
import { sampleControls } from '../support/sample-controls.js';

const REL = 1e-12;
const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml'));

/** A control moved within its range (a few per cent of it, or of its value on a log scale). */
function moved(c: ControlSpec, step: number): number {
  const v = c.scale === 'log' ? c.value * 10 ** (0.02 * step) : c.value + 0.02 * step * (c.max - c.min);
  return Math.min(c.max, Math.max(c.min, v));
}

/** `what: got` when |got - want| exceeds REL `scale` (NaN included), else nothing. */
function offBy(got: number, want: number, what: string, scale = Math.abs(want)): string[] {
  return Math.abs(got - want) <= REL * scale ? [] : [`${what}: ${got}, not ${want}`];
}

/**
 * Every output, row and sigma of `a` equals that of `b` to REL relative, everything else equal.
 * The numbers are compared first and the ones that differ reported together (one expect for all:
 * the same conditions as one expect per number, at a fraction of the cost).
 */
function expectSame(a: ExploreResult, b: ExploreResult, what: string): void {
  expect(a.error, what).toBe(b.error);
  expect(a.outputs.map((o) => o.name)).toEqual(b.outputs.map((o) => o.name));
  const differ: string[] = [];
  a.outputs.forEach((o, i) => differ.push(...offBy(o.value, b.outputs[i]!.value, o.name)));
  expect(a.rows.length).toBe(b.rows.length);
  a.rows.forEach((row, i) => {
    const want = b.rows[i]!;
    expect(Object.keys(row)).toEqual(Object.keys(want));
    for (const [k, v] of Object.entries(want)) {
      const got = (row as unknown as Record<string, unknown>)[k];
      if (typeof v === 'number') differ.push(...offBy(got as number, v, `row ${i} ${k}`));
      else if (got !== v) differ.push(`row ${i} ${k}: ${String(got)}, not ${String(v)}`);
    }
  });
  expect(a.fisherNote).toBe(b.fisherNote);
  if (b.fisher) {
    for (const [x, y, name] of [
      [a.fisher!.sigma, b.fisher.sigma, 'sigma'],
      [a.fisher!.sigmaPoisson, b.fisher.sigmaPoisson, 'sigma (Poisson)'],
    ] as const)
      y.forEach((want, i) => differ.push(...offBy(x[i]!, want, `${name} ${i}`, want)));
  }
  expect(differ, what).toEqual([]);
}

describe.each(SAMPLES)('%s', (sample) => {
  test('the page engine with its memory of earlier updates gives the numbers computed without it', async () => {
    const path = join('samples', sample);
    const { raw, controls } = sampleControls(path, sample);
    const keep = exploreMemo();
    const values = new Map<string, number>();
    const area = controls.find((c) => c.key === 'area');
    const steps: [ControlSpec, number][] = [
      ...(area ? ([[area, 1]] as [ControlSpec, number][]) : []),
      ...controls.map((c): [ControlSpec, number] => [c, -1]),
      ...(area ? ([[area, 2]] as [ControlSpec, number][]) : []),
      ...controls.map((c): [ControlSpec, number] => [c, 0]),
    ];
    for (const [c, step] of steps) {
      for (const [k, v] of controlSettings(c, moved(c, step))) values.set(k, v);
      const object = () => settingsObject(raw, controls, values);
      const kept = await exploreCompute({ text: '', object: object() }, sample, dirname(path), keep);
      const fresh = await exploreCompute({ text: '', object: object() }, sample, dirname(path));
      expectSame(kept, fresh, `${c.key} moved by ${step}`);
    }
  });
});

/**
 * Every number of `a` equals that of `b` to REL relative; everything else equal (the same keys,
 * the same other values). What differs is collected with its path, for one expect.
 */
function differences(a: unknown, b: unknown, path: string, out: string[] = []): string[] {
  if (typeof b === 'number') {
    if (typeof a !== 'number') out.push(`${path}: ${typeof a}, not a number`);
    else out.push(...offBy(a, b, path));
  } else if (b !== null && typeof b === 'object') {
    if (a === null || typeof a !== 'object') {
      out.push(`${path}: ${String(a)}, not an object`);
      return out;
    }
    const keys = Object.keys(b).sort();
    const got = Object.keys(a).sort();
    if (JSON.stringify(got) !== JSON.stringify(keys)) out.push(`${path}: keys ${got.join(',')}, not ${keys.join(',')}`);
    for (const [k, v] of Object.entries(b)) differences((a as Record<string, unknown>)[k], v, `${path}.${k}`, out);
  } else if (!Object.is(a, b)) out.push(`${path}: ${String(a)}, not ${String(b)}`);
  return out;
}

function expectClose(a: unknown, b: unknown, path: string): void {
  expect(differences(a, b, path), path).toEqual([]);
}

describe("the count engine's results kept by inputs", () => {
  test.each(['halpha-narrowband.yaml', 'plan-robust-uv-slope.yaml', 'deep-continuum.yaml'])(
    "%s: at another area, every number of the kept slices (counts, volumes, histograms, luminosities, profiles, the nodes of the draws, what each node adds) times the ratio equals the engine's (1e-12)",
    (sample) => {
      const survey = loadSurveyFile(`samples/${sample}`);
      const cosmo = new FlatCosmology(survey.cosmology);
      const memo = new CountMemo();
      for (const [pop, options] of survey.populations.flatMap((p) => [
        [p, { profile: true, drawNodes: p.modelUncertainty !== undefined }] as const,
        // what each node adds (photometric redshifts weight it)
        [p, { nodeDetail: true }] as const,
      ])) {
        const first = memo.count(survey, pop, cosmo, pop.sliceEdges, options);
        // what predict does to the slices it is given does not reach the kept ones
        first.forEach((s) => delete s.drawNodes);
        const wider = { ...survey, areaSr: 2.3 * survey.areaSr, areaDeg2: 2.3 * survey.areaDeg2 };
        const kept = memo.count(wider, pop, cosmo, pop.sliceEdges, options);
        const fresh = countPopulation(wider, pop, cosmo, pop.sliceEdges, options);
        expectClose(kept, fresh, `${sample} ${pop.name}`);
        expectClose(
          memo.count(survey, pop, cosmo, pop.sliceEdges, options),
          countPopulation(survey, pop, cosmo, pop.sliceEdges, options),
          `${sample} ${pop.name} again`,
        );
      }
    },
  );
});

describe('slices kept one by one', () => {
  test.each(SAMPLES)(
    "%s: after the window's end moved and back, each population's slices equal the engine's over the whole window bit for bit",
    (sample) => {
      const survey = loadSurveyFile(`samples/${sample}`);
      const cosmo = new FlatCosmology(survey.cosmology);
      const memo = new CountMemo();
      for (const pop of survey.populations) {
        const edges = pop.sliceEdges;
        if (edges.length < 3) continue;
        const options = { profile: true, drawNodes: pop.modelUncertainty !== undefined };
        const shorter = [...edges.slice(0, -1), edges.at(-2)! + 0.5 * (edges.at(-1)! - edges.at(-2)!)];
        const first = memo.count(survey, pop, cosmo, shorter, options);
        expect(first).toEqual(countPopulation(survey, pop, cosmo, shorter, options));
        // every slice but the last read from the memory, the last counted on its own
        expect(memo.count(survey, pop, cosmo, edges, options)).toEqual(
          countPopulation(survey, pop, cosmo, edges, options),
        );
        // and without the draws' nodes, which a population with a model is counted with either way
        expect(memo.count(survey, pop, cosmo, edges, { profile: true })).toEqual(
          countPopulation(survey, pop, cosmo, edges, { profile: true }),
        );
      }
    },
  );
});

describe('the Fisher sums kept by inputs', () => {
  test('another area: the kept sums times the ratio of the areas equal a grid built for it (1e-12)', () => {
    const survey = loadSurveyFile('samples/halpha-narrowband.yaml');
    const pop = survey.populations[0]!;
    const cosmo = new FlatCosmology(survey.cosmology);
    const memo = new FisherSumsMemo();
    const first = memo.parts(survey, pop, cosmo, pop.sliceEdges);
    const wider = { ...survey, areaSr: 3.7 * survey.areaSr, areaDeg2: 3.7 * survey.areaDeg2 };
    const kept = memo.parts(wider, pop, cosmo, pop.sliceEdges);
    const fresh = fisherParts(buildDensityGrid(wider, pop, cosmo, pop.sliceEdges));
    expect(kept).not.toBe(first);
    expect(Math.abs(kept.count / fresh.count - 1)).toBeLessThanOrEqual(REL);
    kept.matrix.forEach((row, j) =>
      row.forEach((v, k) => expect(Math.abs(v - fresh.matrix[j]![k]!)).toBeLessThanOrEqual(REL * Math.abs(v))),
    );
    kept.slices.forEach((s, i) => {
      expect(Math.abs(s.count / fresh.slices[i]!.count - 1)).toBeLessThanOrEqual(REL);
      s.b.forEach((v, j) => expect(Math.abs(v - fresh.slices[i]!.b[j]!)).toBeLessThanOrEqual(REL * Math.abs(v)));
    });
    // the same area: the kept sums themselves
    expect(memo.parts(survey, pop, cosmo, pop.sliceEdges)).toBe(first);
    expect(scaledParts(first, 1)).toBe(first);
  });

  test('the key: the same for another area or another population of the file, not for another limit', () => {
    const survey = loadSurveyFile('samples/narrowband-interlopers.yaml');
    const view = (s: typeof survey) => surveyForPopulation(s, s.populations[0]!);
    const key = (s: typeof survey) => FisherSumsMemo.key(view(s), s.populations[0]!, s.populations[0]!.sliceEdges);
    const base = key(survey);
    expect(key({ ...survey, areaSr: 2 * survey.areaSr, areaDeg2: 2 * survey.areaDeg2 })).toBe(base);
    expect(key({ ...survey, populations: [survey.populations[0]!] })).toBe(base);
    const d = survey.detection;
    if (d.kind !== 'line_flux') throw new Error('the sample is a line survey');
    expect(key({ ...survey, detection: { ...d, limitCgs: 1.1 * d.limitCgs } })).not.toBe(base);
    // non-finite numbers, which JSON writes alike, are told apart
    expect(new Set([Infinity, -Infinity, NaN, 0].map((x) => memoKey([{ max: x }]))).size).toBe(4);
  });
});
