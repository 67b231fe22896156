/**
 * One of a thing is singular in what people read (English grammar): a plan whose best design is
 * one pointing said "1 pointings" in its table and plan figure, and a report of one slice said
 * "1 slices" in its summary and under its counts figure (both failed before).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { buildReport, loadSurveyFile, loadSurveyText, plan, planTable } from '../../src/index.js';
import { tempDir } from '../support/temp.js';

const dir = tempDir('skytally-singular-');

const LINE = `format: 1
title: one slice, one pointing (grammar check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1
detection: {kind: line_flux, limit: 7e-18, line: 1215.67, filter: {center: 8150, fwhm: 120, profile: gaussian}}
population: {variable: luminosity, phi_star: 7.7e-4, l_star: 6.8e42, alpha: -1.5}
slices: {count: 1}
`;

describe('one pointing, one slice', () => {
  test('a plan of one pointing: "1 pointing" in the table and the plan figure', async () => {
    const survey = loadSurveyText(
      `${LINE}plan:
  field_of_view: 1.77
  reference: {limit: 1e-17, exposure_hours: 2}
  overhead_hours: 0.1
  budget_hours: 40
  goal: {sigma: alpha}
`,
      'one-pointing.yaml',
    );
    const p = await plan(survey);
    expect(p.best.pointings).toBe(1);
    const table = planTable(p);
    expect(table).toContain('Best design (* below): 1 pointing (1.77 deg^2)');
    expect(table).not.toContain('1 pointings');
  });

  test('a report of one slice: "1 slice" in the summary and under the counts figure', async () => {
    const file = join(dir, 'one-slice.yaml');
    writeFileSync(file, LINE);
    const { html } = await buildReport(loadSurveyFile(file), { mocks: 0 });
    expect(html).toMatch(/; 1 slice;/);
    expect(html).toContain('1 slice; bars: expected count');
    expect(html).not.toMatch(/\b1 slices\b/);
  }, 30_000);
});
