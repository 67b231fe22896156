/**
 * Whether a plan calls its optimum flat or sharp is a property of the optimum, not of the
 * exposure grid asked for: the same survey and budget searched on a narrow grid and on a wide one
 * find the same near-best range (designs within 5 % of the best) and must get the same word. The
 * word follows the near-best range's span in area (flat from a factor sqrt 2: the best's area
 * could be 0.85 to 1.2 times what it is for at most 5 % of the goal; common practice: a design
 * choice that tolerates +-20 % is not a sharp one). Before, it followed the share of the grid's
 * designs inside the range, so a wide grid called the same optimum sharp that a narrow one
 * called flat.
 */
import { describe, expect, test } from 'vitest';
import { plan } from '../../src/library/plan.js';
import { halphaPlan } from './helpers.js';

function countPlan(maxHours: number) {
  return plan(
    halphaPlan(`  field_of_view: "0.2 deg^2"
  reference: {limit: "6e-17 erg/s/cm^2", exposure_hours: 1}
  overhead_hours: 0.1
  budget_hours: 200
  goal: count
  exposure_grid: {min_hours: 0.05, max_hours: ${maxHours}, count: 60}
`),
  );
}

describe('a flat optimum is flat on any grid', () => {
  test('the H-alpha sample, most sources in 200 h: within 5 % from about 100 to 190 deg^2 on a 0.05-1 h grid and on a 0.05-200 h grid, flat on both', async () => {
    const verdicts: string[] = [];
    for (const max of [1, 200]) {
      const p = await countPlan(max);
      const span = p.near_best.to.area_deg2 / p.near_best.from.area_deg2;
      // the same optimum: the near-best range spans a factor of about 1.9 on either grid
      expect(span).toBeGreaterThan(1.7);
      expect(span).toBeLessThan(2.1);
      const note = p.notes.find((n) => /the optimum is/.test(n));
      expect(note, `grid up to ${max} h`).toBeDefined();
      verdicts.push(/the optimum is (flat|sharp)/.exec(note!)![1]!);
    }
    expect(verdicts).toEqual(['flat', 'flat']);
  });
});

// An invented 850 um survey (a power law for the far-infrared k-correction), for sigma(alpha) in
// 200 h of 0.2 deg^2 pointings: depth pays up to the whole budget.
const submmPlan = (tiers: string) =>
  plan(
    halphaPlan(
      `  field_of_view: "0.2 deg^2"
  reference: {limit: 13.5, exposure_hours: 10}
  overhead_hours: 0.5
  budget_hours: 200
  goal: {sigma: alpha}
  exposure_grid: {min_hours: 0.5, max_hours: 200, count: 100}
${tiers}`,
      () => `format: 1
title: 850 um blank field
cosmology: {h0: 70, omega_m: 0.3}
area: 5
redshift: {min: 0.5, max: 6}
detection: {kind: magnitude, limit: 14.9, band: "850 um", beta: -5}
population: {variable: magnitude, rest_wavelength: "850 um", phi_star: 4e-5, m_star: -26.6, alpha: -1.5}
slices: {count: 11}`,
    ),
  );

describe('an optimum at the budget is not called flat or sharp', () => {
  test('sigma(alpha) of an 850 um survey, best at one pointing taking the whole budget: the goal still improves with depth there, so no word on flatness', async () => {
    // The goal keeps improving with exposure up to the budget (checked below), so the designs
    // within 5 % are the deepest few, all of one pointing: called 'sharp' before, though nothing
    // beyond the budget was tried.
    const p = await submmPlan('');
    expect(p.best.pointings).toBe(1);
    expect(p.best.hours_used).toBeCloseTo(200, 9);
    const oneDeep = p.designs.filter((d) => d.pointings === 1).sort((a, b) => a.hours_used - b.hours_used);
    expect(oneDeep.at(-1)!.goal_value).toBeLessThan(oneDeep.at(-2)!.goal_value);
    expect(p.notes.some((n) => /budget_hours, not by the exposure grid/.test(n))).toBe(true);
    expect(p.notes.some((n) => /the optimum is (flat|sharp)/.test(n))).toBe(false);
    expect(p.notes.some((n) => /as deep as the budget allows, so how flat the optimum is cannot be told/.test(n))).toBe(
      true,
    );
  });

  test('the near-best range holds the best design, also when the refinement found it off the grid', async () => {
    // The best (199.5 h) lies beyond the grid's deepest feasible exposure (188 h); the range gave
    // that grid design as both ends, 16.49 to 16.49 AB, leaving out the best's 16.52 AB.
    const p = await submmPlan('');
    expect(p.designs.some((d) => d.limit === p.best.limit)).toBe(false);
    const { from, to } = p.near_best;
    expect(from.area_deg2).toBeLessThanOrEqual(p.best.area_deg2);
    expect(to.area_deg2).toBeGreaterThanOrEqual(p.best.area_deg2);
    expect([from.limit, to.limit]).toContain(p.best.limit);
  });

  test('with two tiers a layer taking its share in one pointing is not at an edge (the shares are searched): the optimum is judged', async () => {
    const p = await submmPlan('  tiers: 2\n');
    expect(p.notes.some((n) => /A layer of the best design spends its share/.test(n))).toBe(true);
    expect(p.notes.some((n) => /the optimum is (flat|sharp)/.test(n))).toBe(true);
  });
});
