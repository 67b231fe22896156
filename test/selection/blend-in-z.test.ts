/**
 * `blend_ratio` as a table or an expression in z (the [NII]/H-alpha ratio of slitless and
 * narrow-band H-alpha surveys falls with redshift: about 0.3 at z ~ 1 and less at z ~ 2, common
 * practice). Checked:
 * - against an independent scipy integration of the same definitions
 *   (test/reference/generate/blend_in_z.py, scipy 1.17.1: F = L (1 + b(z)) 10^(-0.4 A) / (4 pi D_L^2),
 *   the width cut keeping P(W > W_cut / B(z)) or P(W > W_cut / ((1 + z) B(z)))), to 1e-8 per slice;
 * - a table constant in z against the number (definition, 1e-12), and a larger blend never counting
 *   fewer sources (the limit in L falls as 1 + b grows: definition);
 * - predict's slices against forecast's and the explore page's (the same model, 1e-9);
 * - the outputs state the blend as written and at the window's middle; refusals name the key.
 */
import { describe, expect, test } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { forecast, loadSurveyText, predict } from '../../src/index.js';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { exploreControls, settingsObject, settingsText } from '../../src/library/explore/settings.js';
import { parseSurveyObject } from '../../src/survey/load.js';
import { parseYaml } from '../../src/survey/yaml.js';
import { errorOf } from '../support/survey-error.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';

interface RefCase {
  blend_ratio: unknown;
  equivalent_width_cut?: Record<string, number>;
  equivalent_widths?: Record<string, unknown>;
  width_row_crossed_at_z?: number[];
  slices: number[];
}
const ref = JSON.parse(readFileSync(new URL('../reference/blend_in_z.json', import.meta.url), 'utf8')) as {
  cases: Record<string, RefCase>;
};

const rel = (a: number, b: number) => Math.abs(a / b - 1);
const yaml = (v: unknown) => JSON.stringify(v);

/** The reference's invented slitless H-alpha survey with the case's blend and width cut. */
function survey(c: Pick<RefCase, 'blend_ratio' | 'equivalent_width_cut' | 'equivalent_widths'>): string {
  return `format: 1
title: invented slitless H-alpha survey with a blend falling with z
cosmology: {h0: 70, omega_m: 0.3}
area: 10
redshift: {min: 0.9, max: 1.8}
detection:
  kind: line_flux
  limit: 2e-16
  line: 6562.8
${c.equivalent_width_cut ? `  equivalent_width_cut: ${yaml(c.equivalent_width_cut)}\n` : ''}population:
  name: H-alpha
  variable: luminosity
  log10_phi_star: -2.6
  log10_l_star: 42.6
  alpha: -1.4
  attenuation: 1.0
  blend_ratio: ${yaml(c.blend_ratio)}
${c.equivalent_widths ? `  equivalent_widths: ${yaml(c.equivalent_widths)}\n` : ''}  bias: 1.5
slices: {edges: [0.9, 1.2, 1.5, 1.8]}
`;
}

describe('a blend ratio that varies with z, against scipy (test/reference/generate/blend_in_z.py)', () => {
  test.each(Object.keys(ref.cases))('%s: every slice to 1e-8', (name) => {
    const c = ref.cases[name]!;
    const p = predict(loadSurveyText(survey(c), `${name}.yaml`), { noUncertainty: true });
    const counts = p.slices!.map((s) => s.count);
    expect(counts.length).toBe(3);
    counts.forEach((n, i) => expect(rel(n, c.slices[i]!)).toBeLessThan(1e-8));
    // slices sum to the total
    expect(
      rel(
        p.totals.count,
        c.slices.reduce((a, b) => a + b, 0),
      ),
    ).toBeLessThan(1e-8);
  });

  test('the rest-frame cut crosses a row of the width table inside a slice (the reference cuts there)', () => {
    const z = ref.cases.expression_rest_table_cut!.width_row_crossed_at_z!;
    expect(z.length).toBe(1);
    expect(z[0]).toBeGreaterThan(1.2);
    expect(z[0]).toBeLessThan(1.5);
  });
});

describe('a varying blend behaves as the definition says', () => {
  test('a table constant in z counts what the number counts (1e-12), histograms too', () => {
    const a = predict(loadSurveyText(survey({ blend_ratio: 0.3 }), 'n.yaml'), { noUncertainty: true });
    const b = predict(
      loadSurveyText(
        survey({
          blend_ratio: {
            table: [
              [0.9, 0.3],
              [1.8, 0.3],
            ],
          },
        }),
        't.yaml',
      ),
      {
        noUncertainty: true,
      },
    );
    a.slices!.forEach((s, i) => {
      expect(rel(b.slices![i]!.count, s.count)).toBeLessThan(1e-12);
      const ha = s.histogram.counts;
      const hb = b.slices![i]!.histogram.counts;
      expect(hb.length).toBe(ha.length);
      ha.forEach((v, k) => expect(Math.abs(hb[k]! - v)).toBeLessThanOrEqual(1e-12 * Math.max(1, v)));
    });
  });

  test('a blend larger at every z never counts fewer sources in any slice', () => {
    const low = predict(loadSurveyText(survey({ blend_ratio: '0.25 - 0.05*z' }), 'lo.yaml'), { noUncertainty: true });
    const high = predict(loadSurveyText(survey({ blend_ratio: '0.45 - 0.05*z' }), 'hi.yaml'), { noUncertainty: true });
    low.slices!.forEach((s, i) => expect(high.slices![i]!.count).toBeGreaterThan(s.count));
  });

  test('forecast and the explore page count the same slices as predict (1e-9)', async () => {
    const text = survey(ref.cases.expression_rest_table_cut!);
    const p = predict(loadSurveyText(text, 'p.yaml'));
    const f = await forecast(loadSurveyText(text, 'f.yaml'));
    f.slices.forEach((s, i) => expect(rel(s.count, p.slices![i]!.count)).toBeLessThan(1e-9));
    const e = await exploreCompute({ text }, 'e.yaml', '.');
    expect(e.error).toBeUndefined();
    const shown = JSON.stringify(e);
    // the page's total is predict's (its own number formatting aside)
    expect(shown).toContain(String(p.totals.count));
  });
});

describe('the outputs state the blend as written', () => {
  test('JSON: as written and at the window middle; the model line in words', () => {
    const p = predict(loadSurveyText(survey({ blend_ratio: '0.45 - 0.14*z' }), 'w.yaml'), { noUncertainty: true });
    const sel = p.models[0]!.selection;
    expect(sel.effects).toContain('blend_ratio');
    // definition: 0.45 - 0.14 * 1.35
    expect(sel.blend_ratio).toEqual({ given: '0.45 - 0.14*z', at_window_middle: 0.45 - 0.14 * 1.35 });
    // and over the window 0.9 to 1.8: 0.45 - 0.14 * 1.8 = 0.198 to 0.45 - 0.14 * 0.9 = 0.324
    expect(p.models[0]!.summary).toContain(
      `blended lines add ${0.45 - 0.14 * 1.35} of the line flux at the window's middle (0.198 to 0.324 of the line flux over the window)`,
    );
  });

  test('a number stays a number', () => {
    const p = predict(loadSurveyText(survey({ blend_ratio: 0.3 }), 'n.yaml'), { noUncertainty: true });
    expect(p.models[0]!.selection.blend_ratio).toBe(0.3);
  });
});

describe('refused in one sentence naming the key', () => {
  test.each([
    [
      'a table row above 10',
      {
        table: [
          [0.9, 0.3],
          [1.8, 12],
        ],
      },
      'out_of_range',
    ],
    ['an expression negative inside the window', '0.5 - 0.4*z', 'out_of_range'],
    ['an expression with a name', '0.3*foo', 'bad_expression'],
  ])('%s', (_, blend, code) => {
    const e = errorOf(() => loadSurveyText(survey({ blend_ratio: blend }), 'bad.yaml'));
    expect(e.code).toBe(code);
    expect(e.message).toContain('population.blend_ratio');
  });

  test('the command line: exit 2, one sentence on stderr, nothing on stdout', async () => {
    const dir = tempDir('blend-z-');
    const file = join(dir, 'bad.yaml');
    writeFileSync(file, survey({ blend_ratio: '0.5 - 0.4*z' }));
    const r = await runCli(['predict', file]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('population.blend_ratio');
    expect(r.stderr.trim().split('\n').length).toBe(1);
  });
});

describe('the explore page writes a blend in z back as written', () => {
  test('settings written as YAML and as a parsed object keep the table and give the same prediction', () => {
    const text = survey({
      blend_ratio: {
        table: [
          [0.9, 0.35],
          [1.3, 0.3],
          [1.8, 0.15],
        ],
      },
    });
    const loaded = loadSurveyText(text, 'w.yaml');
    const raw = parseYaml(text, 'w.yaml');
    const controls = exploreControls(raw, loaded);
    const values = new Map<string, number>([
      ['area', 7.5],
      ['detection.limit', 3e-16],
    ]);
    expect(controls.map((c) => c.key)).toEqual(expect.arrayContaining([...values.keys()]));
    const written = settingsText(text, controls, values);
    expect(written).toContain('blend_ratio: {"table":[[0.9,0.35],[1.3,0.3],[1.8,0.15]]}');
    const fromText = loadSurveyText(written, 'w.yaml');
    const fromObject = parseSurveyObject(settingsObject(raw, controls, values), 'w.yaml');
    expect(fromText.populations[0]!.blendRatio!.source).toEqual({
      table: [
        [0.9, 0.35],
        [1.3, 0.3],
        [1.8, 0.15],
      ],
    });
    expect(JSON.stringify(predict(fromObject))).toBe(JSON.stringify(predict(fromText)));
    // the moved settings count what the file with them written by hand counts
    const byHand = loadSurveyText(
      text.replace('area: 10', 'area: 7.5').replace('limit: 2e-16', 'limit: 3e-16'),
      'h.yaml',
    );
    expect(JSON.stringify(predict(fromText).slices)).toBe(JSON.stringify(predict(byHand).slices));
  });
});
