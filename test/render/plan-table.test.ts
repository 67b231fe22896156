/**
 * The plan table states the hours each design uses: whole pointings of (exposure + overhead) hours
 * (common practice for a time request), which is below the budget when the last pointing does not
 * fit. The table showed only the budget split, "100 %" for every one-tier design, so a design of
 * 3 pointings of 10.87 h under a 40 h budget read as spending it all (failed before).
 */
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { loadSurveyFile, plan, planTable } from '../../src/index.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { ordinal, sig } from '../../src/render/format.js';

describe('plan table: hours used', () => {
  test('every row of a one-tier plan shows its pointings times (exposure + overhead), under the budget', async () => {
    const p = await plan(loadSurveyFile('samples/plan-uv-deep-wide.yaml'));
    const table = planTable(p);
    const head = table.split('\n').find((l) => l.includes('hours per pointing'))!;
    const cells = (line: string) => line.split('│').map((c) => c.trim());
    const col = cells(head).indexOf('hours used');
    expect(col).toBeGreaterThan(0);
    const byExposure = new Map(p.designs.map((d) => [sig(d.exposure_hours_per_pointing, 4), d]));
    const rows = table
      .split('\n')
      .filter((l) => l.startsWith('│') && !l.includes('hours per pointing'))
      .map(cells);
    expect(rows.length).toBeGreaterThan(20);
    let under = 0;
    for (const row of rows) {
      const d = byExposure.get(row[col - 2]!) ?? p.best;
      const hours = d.pointings * (d.exposure_hours_per_pointing + p.overhead_hours);
      expect(Math.abs(d.hours_used - hours)).toBeLessThan(1e-9 * hours);
      expect(hours).toBeLessThanOrEqual(p.budget_hours * (1 + 1e-12));
      expect(row[col]).toBe(sig(d.hours_used, 4));
      if (Number(row[col]) < p.budget_hours * 0.995) under += 1;
    }
    // the grid's designs leave part of the budget when the last pointing does not fit
    expect(under).toBeGreaterThan(0);
  });
});

describe('plan table: the note column', () => {
  test('no empty, unlabelled last column; "note" with "below minimum_count" only where a design falls short (failed before: an empty column in every table)', async () => {
    const cells = (line: string) =>
      line
        .split('│')
        .slice(1, -1)
        .map((c) => c.trim());
    const survey = loadSurveyFile('samples/plan-uv-deep-wide.yaml');
    const p = await plan(survey);
    expect(p.designs.every((d) => d.meets_minimum_count)).toBe(true);
    const head = planTable(p)
      .split('\n')
      .find((l) => l.includes('hours per pointing'))!;
    expect(cells(head).at(-1)).toBe('goal value');
    expect(cells(head).slice(1)).not.toContain(''); // (the first, the mark's, has no heading)
    // a minimum count that the shallowest designs miss: the column appears, named, filled where it applies
    const text = readFileSync('samples/plan-uv-deep-wide.yaml', 'utf8').replace(
      'minimum_count: 200',
      'minimum_count: 75000',
    );
    const strict = await plan(loadSurveyText(text, 'samples/plan-uv-deep-wide.yaml'));
    const below = strict.designs.filter((d) => !d.meets_minimum_count).length;
    expect(below).toBeGreaterThan(0);
    const table = planTable(strict);
    const lines = table.split('\n');
    const h = cells(lines.find((l) => l.includes('hours per pointing'))!);
    expect(h.at(-1)).toBe('note');
    const rows = lines.filter((l) => l.startsWith('│') && !l.includes('hours per pointing')).map(cells);
    for (const r of rows) expect(['', 'below minimum_count']).toContain(r.at(-1));
    expect(rows.some((r) => r.at(-1) === 'below minimum_count')).toBe(true);
  });
});

describe('plan table: the designs within 5 % of the best', () => {
  test("a tiered design is quoted with every tier's limit, not only its deepest tier's (failed before: 'limit 3.48e-17' for a design of 2.89e-16 + 3.48e-17)", async () => {
    const p = await plan(loadSurveyFile('samples/plan-halpha-layers.yaml'));
    const line = planTable(p)
      .split('\n')
      .find((l) => l.startsWith('Within'))!;
    const { from, to } = p.near_best;
    expect(from.tiers!.length).toBe(2);
    // the limits as the design rows write them (docs/outputs.md: a tiered design's limit is its deepest tier's)
    const tierLimits = (d: typeof from) => d.tiers!.map((t) => `${sig(t.limit, 3)} erg/s/cm^2`).join(' + ');
    expect(line).toContain(`(limits ${tierLimits(from)})`);
    expect(line).toContain(`(limits ${tierLimits(to)})`);
    // the deepest tier's limit is the design's own
    expect(Math.min(...from.tiers!.map((t) => t.limit))).toBe(from.limit);
  });

  test('a one-tier plan keeps one limit per end', async () => {
    const p = await plan(loadSurveyFile('samples/plan-uv-deep-wide.yaml'));
    const line = planTable(p)
      .split('\n')
      .find((l) => l.startsWith('Within'))!;
    expect(line).toMatch(/\(limit [0-9.]+ AB\) to [0-9.]+ deg\^2 \(limit [0-9.]+ AB\)/);
  });

  test('one design within 5 % of the best is "1 design", not "1 designs" (failed before; common practice of English)', async () => {
    const p = await plan(loadSurveyFile('samples/plan-uv-deep-wide.yaml'));
    const one = { ...p, near_best: { ...p.near_best, designs_within: 1 } };
    const line = planTable(one)
      .split('\n')
      .find((l) => l.startsWith('Within'))!;
    expect(line).toContain(': 1 design, from');
    expect(planTable(p)).toContain(`: ${p.near_best.designs_within} designs, from`);
    expect(p.near_best.designs_within).toBeGreaterThan(1);
  });

  test('English ordinals in "every 2nd shown" (failed before: "every 2th"; common practice of English)', async () => {
    expect([1, 2, 3, 4, 11, 12, 13, 21, 22, 23, 101, 111, 112].map(ordinal)).toEqual([
      '1st',
      '2nd',
      '3rd',
      '4th',
      '11th',
      '12th',
      '13th',
      '21st',
      '22nd',
      '23rd',
      '101st',
      '111th',
      '112th',
    ]);
    const p = await plan(loadSurveyFile('samples/plan-robust-uv-slope.yaml'));
    const step = Math.ceil(p.designs.length / 20);
    expect(step).toBe(2);
    expect(planTable(p)).toContain(`Designs (${p.designs.length}, every 2nd shown):`);
  });
});
