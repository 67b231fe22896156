/**
 * The forecast's density grid with panels 0.6 wide in t beyond 8 logistic widths of the
 * completeness's half point equals the grid with every panel one width wide (the code before it,
 * kept in fine-grid.ts) on every bundled sample and population it can forecast, and on variants
 * with narrower and wider logistic completeness: per-slice counts and Fisher sums, and the
 * Poisson sigmas, to 1e-9 relative (the stated tolerance of the faster path; the error estimate
 * is in src/forecast/grid.ts). Without a narrow logistic the grids are the same points.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { fisherParts, summariseFisher } from '../../src/forecast/fisher.js';
import { surveyForPopulation } from '../../src/model/select.js';
import { buildFineDensityGrid } from './fine-grid.js';

const REL = 1e-9;
const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml'));

function cases(): [string, string][] {
  const out: [string, string][] = [];
  for (const f of SAMPLES) {
    const text = readFileSync(`samples/${f}`, 'utf8');
    out.push([f, text]);
    if (/model: logistic/.test(text)) {
      for (const w of ['0.02', '0.3'])
        out.push([`${f}, logistic width ${w}`, text.replace(/width: [0-9.]+\}/, `width: ${w}}`)]);
    }
  }
  return out;
}

describe.each(cases())('%s', (name, text) => {
  test('per-slice counts, Fisher sums and sigmas equal the fine grid to 1e-9', () => {
    const file = loadSurveyText(text, `samples/${name.split(',')[0]!}`, 'samples');
    const cosmo = new FlatCosmology(file.cosmology);
    let checked = 0;
    for (const pop of file.populations) {
      if (pop.shape === 'double_schechter') continue;
      const survey = surveyForPopulation(file, pop);
      const fast = buildDensityGrid(survey, pop, cosmo, pop.sliceEdges);
      const fine = buildFineDensityGrid(survey, pop, cosmo, pop.sliceEdges);
      expect(fast.pointT.length).toBeLessThanOrEqual(fine.pointT.length);
      const a = fisherParts(fast);
      const b = fisherParts(fine);
      expect(Math.abs(a.count / b.count - 1), 'count').toBeLessThanOrEqual(REL);
      a.slices.forEach((s, i) => {
        const r = b.slices[i]!;
        expect(Math.abs(s.count - r.count), `slice ${i} count`).toBeLessThanOrEqual(REL * r.count);
        s.b.forEach((v, j) => expect(Math.abs(v - r.b[j]!)).toBeLessThanOrEqual(REL * Math.abs(r.b[j]!) + 1e-300));
      });
      // matrix entries relative to the geometric mean of their diagonal entries (their natural scale)
      a.matrix.forEach((row, j) =>
        row.forEach((v, k) =>
          expect(Math.abs(v - b.matrix[j]![k]!), `F[${j}][${k}]`).toBeLessThanOrEqual(
            REL * Math.sqrt(b.matrix[j]![j]! * b.matrix[k]![k]!),
          ),
        ),
      );
      const sa = summariseFisher(a.matrix);
      const sb = summariseFisher(b.matrix);
      expect(sa === undefined).toBe(sb === undefined);
      sa?.sigma.forEach((v, j) => expect(Math.abs(v / sb!.sigma[j]! - 1), `sigma ${j}`).toBeLessThanOrEqual(REL));
      checked++;
    }
    if (!name.startsWith('double-schechter')) expect(checked).toBeGreaterThan(0);
  });
});
