/**
 * The forecast's and compare's text say how the slices' cosmic-variance normalisations were
 * marginalised: under one joint prior, correlated between the slices of the field (the Fisher
 * marginalisation of src/forecast/fisher.ts), where the line read as if each slice had its own
 * independent nuisance. The line must match what was computed: with cosmic variance switched off it
 * says so instead.
 */
import { describe, expect, test } from 'vitest';
import { runCli } from '../cli/helpers.js';

describe('the forecast text names the joint prior of the slices', () => {
  test('forecast: the Fisher line says the normalisations are correlated between the slices', async () => {
    const r = await runCli(['forecast', 'samples/halpha-narrowband.yaml']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain(
      'Fisher: unbinned Poisson likelihood, one cosmic-variance normalisation per slice, correlated between the slices, marginalised',
    );
    const off = await runCli(['forecast', 'samples/halpha-narrowband.yaml', '--no-cosmic-variance']);
    expect(off.code, off.stderr).toBe(0);
    expect(off.stdout).toContain('Fisher: unbinned Poisson likelihood, cosmic variance switched off');
    expect(off.stdout).not.toContain('correlated between the slices');
  });
  test('compare: the sigmas line says the same', async () => {
    const r = await runCli(['compare', 'samples/halpha-narrowband.yaml', 'samples/slitless-halpha.yaml']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain(
      'Sigmas: Fisher matrix with one cosmic-variance normalisation per slice, correlated between the slices, marginalised.',
    );
  });
});
