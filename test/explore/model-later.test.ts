/**
 * The explore page's update in two steps (exploreInTwo, src/library/explore/engine.ts): every
 * number but the model's draws first, those marked pending, then the model's numbers. On every
 * bundled sample with model_uncertainty, at the file's values and after moving each control in
 * turn with the page's memory of earlier updates: the first step's numbers are those of the whole
 * result bit for bit (the same counts and uncertainties; expected values: the engine's own, which
 * test/explore/page-memo.test.ts and the browser test check against the commands), the pending
 * ones are exactly the model's outputs of the whole result, and the second step equals
 * exploreCompute without a memory to 1e-12 relative (as the page-memo test asks of the memory).
 * A sample without model_uncertainty has one step, equal to exploreCompute.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { controlSettings, settingsObject } from '../../src/library/explore/settings.js';
import { exploreCompute, exploreInTwo, exploreMemo, type ExploreResult } from '../../src/library/explore/engine.js';
import { outputsHtml, slicesHtml } from '../../src/render/explore/view.js';
import { sampleControls } from '../support/sample-controls.js';

const REL = 1e-12;

/** name -> value of every output and slice-table cell, as the page's data-output names them. */
function named(r: ExploreResult): Map<string, number> {
  const m = new Map<string, number>();
  for (const o of r.outputs) if (!o.pending) m.set(o.name, o.value);
  r.rows.forEach((row, i) => {
    const k = i + 1;
    m.set(`slice-${k}-count`, row.count);
    for (const [key, v] of [
      ['poisson', row.poisson],
      ['cosmic-variance', row.cosmicVariance],
      ['uncertainty', row.total],
      ['model', row.model],
    ] as const)
      if (v !== undefined) m.set(`slice-${k}-${key}`, v);
  });
  r.fisher?.sigmaPoisson.forEach((v, i) => m.set(`sigma-poisson-${r.fisher!.names[i]!}`, v));
  return m;
}

function pendingOf(r: ExploreResult): string[] {
  return [
    ...r.outputs.filter((o) => o.pending).map((o) => o.name),
    ...r.rows.flatMap((row, i) => (row.modelPending ? [`slice-${i + 1}-model`] : [])),
  ].sort();
}

describe.each(['plan-robust-uv-slope.yaml', 'mass-limited.yaml', 'double-schechter-mass.yaml'])('%s', (sample) => {
  test('first every number but the model draws (those pending), then the whole result, equal to the page without memory', async () => {
    const path = join('samples', sample);
    const { raw, controls } = sampleControls(path, sample);
    const keep = exploreMemo();
    const values = new Map<string, number>();
    for (const c of [undefined, ...controls]) {
      if (c) {
        const v = c.scale === 'log' ? c.value * 10 ** 0.03 : c.value + 0.03 * (c.max - c.min);
        for (const [k, x] of controlSettings(c, Math.min(c.max, Math.max(c.min, v)))) values.set(k, x);
      }
      const what = c ? `${c.key} moved` : 'the file';
      const source = () => ({ text: '', object: settingsObject(raw, controls, values) });
      const step = await exploreInTwo(source(), sample, dirname(path), keep);
      expect(step.model, what).toBeDefined();
      const first = step.result;
      const whole = step.model!();
      const fresh = await exploreCompute(source(), sample, dirname(path));
      // the model's numbers, and only they, were pending
      const model = [...named(whole).keys()].filter((k) => k.endsWith('-model')).sort();
      expect(model.length, what).toBeGreaterThan(0);
      expect(pendingOf(first), what).toEqual(model);
      expect(pendingOf(whole), what).toEqual([]);
      // the pending numbers carry their name and no value on the page
      expect(outputsHtml(first)).toContain('data-output="total-model" data-pending="true" aria-busy="true"');
      expect(slicesHtml(first)).toContain('data-output="slice-1-model" data-pending="true"');
      expect(outputsHtml(whole) + slicesHtml(whole)).not.toContain('data-pending');
      // every other number of the first step is the whole result's, bit for bit
      const a = named(first);
      const b = named(whole);
      expect([...a.keys()].sort(), what).toEqual([...b.keys()].filter((k) => !k.endsWith('-model')).sort());
      for (const [k, v] of a) expect(v, `${what}: ${k}`).toBe(b.get(k));
      expect(
        first.outputs.map((o) => o.name),
        what,
      ).toEqual(whole.outputs.map((o) => o.name));
      expect(first.fisherNote).toBe(whole.fisherNote);
      // the whole result equals the page computed without a memory
      const c0 = named(fresh);
      expect([...b.keys()].sort(), what).toEqual([...c0.keys()].sort());
      for (const [k, v] of c0) expect(Math.abs(b.get(k)! - v), `${what}: ${k}`).toBeLessThanOrEqual(REL * Math.abs(v));
      expect(whole.warnings).toEqual(fresh.warnings);
    }
  });
});

test('a sample without model_uncertainty: one step, the numbers of exploreCompute', async () => {
  const path = 'samples/halpha-narrowband.yaml';
  const text = readFileSync(path, 'utf8');
  const step = await exploreInTwo({ text }, path, dirname(path));
  expect(step.model).toBeUndefined();
  expect(step.result).toEqual(await exploreCompute({ text }, path, dirname(path)));
});
