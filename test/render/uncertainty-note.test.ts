/**
 * The predict table's sentence on its total's uncertainty gives both terms readably at any size:
 * one decimal from 0.1 % up (as before), two significant figures below, where one decimal printed
 * "0.0 % against 0.0 %" for a wide survey. Expected values: the fractions times 100 (definition of
 * a percentage), on an invented block and on a 15,000 deg^2 survey's prediction.
 */
import { describe, expect, test } from 'vitest';
import { sourcesSentence, uncertaintyNote } from '../../src/render/predict-table.js';
import { percent, uncertaintyPercent } from '../../src/render/format.js';
import { buildReport, loadSurveyFile } from '../../src/index.js';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { tempDir } from '../support/temp.js';
import type { PredictionTotals } from '../../src/model/outputs/prediction.js';

const totals = (poisson: number, cv: number) =>
  ({
    count: 1,
    per_deg2: 1,
    volume_mpc3: 1,
    mean_redshift: 1,
    uncertainty: {
      poisson_fraction: poisson,
      cosmic_variance_fraction: cv,
      total_fraction: Math.hypot(poisson, cv),
      bias: 1.5,
      sigma_matter: 0.01,
    },
  }) as unknown as PredictionTotals;

describe('the uncertainty sentence under the predict table', () => {
  test('percentages of 0.1 % and above keep one decimal', () => {
    expect(uncertaintyNote(totals(0.019, 0.185))).toContain(
      "cosmic variance dominates the total's uncertainty (18.5 % against 1.9 % Poisson)",
    );
  });
  test('smaller ones get two significant figures, never 0.0 %', () => {
    const note = uncertaintyNote(totals(0.000131, 0.000497))!;
    expect(note).toContain('(0.050 % against 0.013 % Poisson)');
    expect(note).not.toContain('0.0 %');
    expect(uncertaintyNote(totals(0.02, 0.0004))).toContain('(2.0 % against 0.040 % cosmic variance)');
  });
  test('huge ones (a survey expecting almost no source) get three significant figures, not 17 digits (failed before)', () => {
    // 1.7e-27 sources expected: the Poisson fraction 1/sqrt(N) is 2.43e13, 2.43e15 %
    const note = uncertaintyNote(totals(1 / Math.sqrt(1.696e-27), 2.117))!;
    expect(note).toContain(
      "Poisson noise dominates the total's uncertainty (2.43e15 % against 211.7 % cosmic variance)",
    );
    expect(uncertaintyNote(totals(123.456, 0.5))).toContain('(12300 % against 50.0 % cosmic variance)');
  });
  test('the sentence on the three sources of uncertainty writes its percentages the same way (it printed 0.0 % before)', () => {
    const m = {
      draws: 1000,
      p2_5: 0.8e8,
      p16: 0.9e8,
      p50: 1e8,
      p84: 1.1e8,
      p97_5: 1.2e8,
      fraction: 0.1,
    };
    const u = { poisson_fraction: 0.0001, cosmic_variance_fraction: 0.0005 };
    expect(sourcesSentence('Sources of uncertainty of the total', 1e8, u, m)).toBe(
      'Sources of uncertainty of the total 1e8: Poisson noise 0.010 %, cosmic variance 0.050 %, the model 10.0 % (9e7 to 1.1e8 over 1000 draws of its uncertainty); the model dominates.',
    );
  });

  test('the report writes its uncertainty percentages by the same rule (it printed 0.0% for a 15,000 deg^2 survey); shares keep one decimal', async () => {
    // the fractions times 100 (definition of a percentage)
    expect(uncertaintyPercent(0.071)).toBe('7.1%');
    expect(uncertaintyPercent(0.000447)).toBe('0.045%');
    expect(uncertaintyPercent(2.428e13)).toBe('2.43e15%');
    expect(uncertaintyPercent(0)).toBe('0.0%');
    expect(uncertaintyPercent(undefined)).toBe('');
    expect(percent(0.000447)).toBe('0.0%');
    const dir = tempDir('skytally-wide-report-');
    const file = join(dir, 'wide.yaml');
    writeFileSync(file, readFileSync('samples/halpha-narrowband.yaml', 'utf8').replace(/^area: .*$/m, 'area: 15000'));
    const { html, results } = await buildReport(loadSurveyFile(file), { mocks: 0 });
    const u = results.prediction.totals.uncertainty!;
    expect(u.poisson_fraction).toBeLessThan(0.001);
    expect(html).toContain(`>${uncertaintyPercent(u.poisson_fraction)}<`);
    expect(html).not.toMatch(/>0\.0%</);
  }, 30_000);
});
