/**
 * The predict table's sentence on its total's uncertainty gives both terms readably at any size:
 * one decimal from 0.1 % up (as before), two significant figures below, where one decimal printed
 * "0.0 % against 0.0 %" for a wide survey. Expected values: the fractions times 100 (definition of
 * a percentage), on an invented block and on a 15,000 deg^2 survey's prediction.
 */
import { describe, expect, test } from 'vitest';
import { uncertaintyNote } from '../../src/render/predict-table.js';
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
});
