/**
 * plan and compare as library calls. Issue 5 target: a 10,000-design grid with the Fisher goal
 * under 5 s on a 2-core machine (whole plan call: depth tables, cosmic-variance tables, grid,
 * refinement).
 */
import type { BenchCase } from './run.js';
import { readFileSync } from 'node:fs';
import { loadSurveyText } from '../../src/survey/load.js';
import { plan } from '../../src/library/plan.js';
import { compare } from '../../src/planning/compare.js';

function sample(name: string, edit?: (t: string) => string) {
  const text = readFileSync(new URL(`../../samples/${name}`, import.meta.url), 'utf8');
  return loadSurveyText(edit ? edit(text) : text, name);
}

const uv10k = sample('plan-uv-deep-wide.yaml', (t) => t.replace('count: 200', 'count: 10000'));
const halpha10k = sample('plan-halpha-layers.yaml', (t) =>
  t.replace('count: 120', 'count: 10000').replace('tiers: 2', 'tiers: 1'),
);
const uv = sample('plan-uv-deep-wide.yaml');
const halphaTiers = sample('plan-halpha-layers.yaml');
const a = sample('halpha-narrowband.yaml');
const b = sample('deep-continuum.yaml');

export const cases: BenchCase[] = [
  {
    name: 'plan: sigma(alpha), magnitude, 10,000 designs, 1 thread',
    run: () => plan(uv10k, { workers: 1 }),
    repeats: 3,
  },
  {
    name: 'plan: sigma(alpha), magnitude, 10,000 designs, 2 threads',
    run: () => plan(uv10k, { workers: 2 }),
    repeats: 3,
  },
  {
    name: 'plan: sigma(L*), line flux, 10,000 designs, 1 thread',
    run: () => plan(halpha10k, { workers: 1 }),
    repeats: 3,
  },
  {
    name: 'plan: sigma(L*), line flux, 10,000 designs, 2 threads',
    run: () => plan(halpha10k, { workers: 2 }),
    repeats: 3,
  },
  { name: 'plan: sample plan-uv-deep-wide (200 designs)', run: () => plan(uv), repeats: 3 },
  { name: 'plan: sample plan-halpha-layers (2 tiers, 120 exposures)', run: () => plan(halphaTiers), repeats: 3 },
  { name: 'compare: two sample surveys', run: () => compare([a, b]), repeats: 3 },
];
