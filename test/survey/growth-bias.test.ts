/**
 * A bias given as {over_growth: B}: b(z) = B / D(z), D the linear growth factor of the file's own
 * cosmology, D(0) = 1 (docs/survey-file.md, "Bias, occupation and fields"). Checked against scipy's
 * hypergeometric closed form of D (test/reference/growth_bias.json, made by
 * test/reference/generate/growth_bias.py with scipy 1.17.1, each value also checked there against
 * the growing-mode integral by scipy.integrate.quad to 1e-10); against a dense table of the same
 * bias (the table is linear between its 1,000 rows); its refusals; the assumed model's words; and
 * the explore page's survey file written back.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadSurveyText, parseSurveyObject } from '../../src/survey/load.js';
import { parseYaml } from '../../src/survey/yaml.js';
import { predict } from '../../src/counts/predict.js';
import { exploreControls, settingsObject, settingsText } from '../../src/library/explore/settings.js';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { slicesHtml } from '../../src/render/explore/view.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';

interface Reference {
  header: { b: number };
  cosmologies: {
    name: string;
    omega_m: number;
    points: { z: number; d: number; bias: number }[];
    bias_table: [number, number][];
  }[];
}
const reference = JSON.parse(
  readFileSync(new URL('../reference/growth_bias.json', import.meta.url), 'utf8'),
) as Reference;
const cosmologyOf = (name: string) => reference.cosmologies.find((c) => c.name === name)!;

const COSMOLOGY: Record<string, string> = {
  round: '{h0: 70, omega_m: 0.3}',
  planck2018: '{preset: planck2018}',
};

/** An invented [OII] survey over 0.6 < z < 1.6 in five slices, with the given cosmology and bias. */
function survey(cosmology: string, bias: string): string {
  return `format: 1
title: Invented [OII] survey with a bias over the growth factor
cosmology: ${cosmology}
area: "100 deg^2"
redshift: {min: 0.6, max: 1.6}
detection: {kind: line_flux, limit: "1e-16 erg/s/cm^2", line: "3727 Angstrom"}
population:
  name: ELGs
  variable: luminosity
  log10_phi_star: -2.4
  log10_l_star: 41.8
  alpha: -1.3
  bias: ${bias}
slices: {count: 5}
`;
}

/** The reference value at z (the slices' middles are the reference's points to rounding). */
function referenceBias(name: string, z: number): number {
  const p = cosmologyOf(name).points.find((q) => Math.abs(q.z - z) < 1e-12);
  if (!p) throw new Error(`no reference point at z = ${z}`);
  return p.bias;
}

describe('bias: {over_growth: B} against scipy hyp2f1 (test/reference/growth_bias.json)', () => {
  test.each(['round', 'planck2018'])(
    '%s: each slice reports bias 0.84 / D(z_mid) to 1e-9 (scipy hyp2f1 closed form of D)',
    (name) => {
      expect(reference.header.b).toBe(0.84);
      const p = predict(loadSurveyText(survey(COSMOLOGY[name]!, '{over_growth: 0.84}'), `${name}.yaml`));
      expect(p.slices).toHaveLength(5);
      let worst = 0;
      for (const s of p.slices!) {
        const want = referenceBias(name, 0.5 * (s.z_min + s.z_max));
        worst = Math.max(worst, Math.abs(s.uncertainty!.bias / want - 1));
      }
      // measured: 6.7e-16 (round) and 1.1e-15 (planck2018)
      expect(worst).toBeLessThan(1e-9);
    },
  );

  test('the same survey with a table of 1,000 rows of B / D(z) from the reference gives the totals the same cosmic variance (1e-6; the table is linear between rows)', () => {
    const rows = cosmologyOf('round').bias_table;
    expect(rows).toHaveLength(1000);
    const table = `{table: [${rows.map(([z, b]) => `[${z}, ${b}]`).join(', ')}]}`;
    const form = predict(loadSurveyText(survey(COSMOLOGY.round!, '{over_growth: 0.84}'), 'form.yaml'));
    const tabled = predict(loadSurveyText(survey(COSMOLOGY.round!, table), 'table.yaml'));
    const u = form.totals.uncertainty!;
    const t = tabled.totals.uncertainty!;
    // measured: cosmic variance 7.0e-9 apart, bias 6.0e-9 apart, count 2.5e-14 (relative)
    expect(Math.abs(u.cosmic_variance_fraction / t.cosmic_variance_fraction - 1)).toBeLessThan(1e-6);
    expect(Math.abs(u.bias / t.bias - 1)).toBeLessThan(1e-6);
    expect(Math.abs(form.totals.count / tabled.totals.count - 1)).toBeLessThan(1e-9);
  });

  test('the assumed model reads "bias 0.84 / D(z)" with its value at the window\'s middle (predict JSON and text, forecast, report; check echoes the form as written)', async () => {
    const text = survey(COSMOLOGY.round!, '{over_growth: 0.84}');
    const p = predict(loadSurveyText(text, 'form.yaml'));
    // the window's middle is z = 1.1: 0.84 / D(1.1) = 1.433 (reference)
    expect(referenceBias('round', 1.1).toPrecision(4)).toBe('1.433');
    expect(p.models[0]!.summary).toMatch(/; bias 0\.84 \/ D\(z\) \(1\.433 at z = 1\.1\)$/);
    const dir = tempDir('skytally-growth-bias-');
    const file = join(dir, 'form.yaml');
    writeFileSync(file, text);
    const shown = await runCli(['predict', file]);
    expect(shown.code, shown.stderr).toBe(0);
    expect(shown.stdout).toContain('bias 0.84 / D(z) (1.433 at z = 1.1)');
    const checked = await runCli(['check', file, '--format', 'json']);
    expect(checked.code, checked.stderr).toBe(0);
    const view = (JSON.parse(checked.stdout) as { populations: { bias: { as_written: unknown } }[] }).populations[0]!
      .bias;
    expect(view.as_written).toEqual({ over_growth: 0.84 });
    // forecast's text and the report: the same words; the report's table of the model as written
    const f = await runCli(['forecast', file]);
    expect(f.code, f.stderr).toBe(0);
    expect(f.stdout).toContain('; bias 0.84 / D(z) (1.433 at z = 1.1)');
    const html = await runCli(['report', file]);
    expect(html.code, html.stderr).toBe(0);
    expect(html.stdout).toContain(
      '<span class="key">bias</span></th><td>0.84 / D(z) (D the linear growth factor of the cosmology, 1 at z = 0)</td>',
    );
    expect(html.stdout).toContain('bias 0.84 / D(z) (1.433 at z = 1.1)');
  });
});

describe('bias: {over_growth: B} refused where it is not a number above 0 (exit 2, one sentence naming the file and the key, nothing written)', () => {
  const dir = tempDir('skytally-growth-bias-refusals-');
  test.each([
    ['{over_growth: -1}', 'population.bias.over_growth', 'above 0'],
    ['{over_growth: 0}', 'population.bias.over_growth', 'above 0'],
    ['{over_growth: "x"}', 'population.bias.over_growth', 'must be a number'],
    ['{over_growth: 1, extra: 2}', 'population.bias.extra', 'unknown key "extra"'],
    // a mapping of neither form names both forms, whichever branch the schema tried last
    ['{x: 2}', 'population.bias.x', '{table: [[z, bias], ...]} or {over_growth: B}'],
    ['{over_grwth: 1}', 'population.bias.over_grwth', 'did you mean over_growth?'],
    ['{table: [[1, 2], [2, 3]], extra: 1}', 'population.bias.extra', '{table: [[z, bias], ...]} or {over_growth: B}'],
    ['{over_growth: 1, table: [[1, 2], [2, 3]]}', 'population.bias', 'gives both table and over_growth'],
    // 60 / D(z) passes 100 inside the window (D(1.6) = 0.488 for omega_m = 0.3): named at a z
    ['{over_growth: 60}', 'population.bias', 'at z = '],
  ])('bias: %s', async (bias, key, words) => {
    const file = join(dir, 'bad.yaml');
    const out = join(dir, `out-${Math.random().toString(36).slice(2)}.json`);
    writeFileSync(file, survey(COSMOLOGY.round!, bias));
    const r = await runCli(['predict', file, '--format', 'json', '--out', out]);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.split('\n');
    expect(lines, r.stderr).toHaveLength(2);
    expect(lines[0]).toMatch(/^skytally: [^\n]+; [^\n]+\.$/);
    expect(lines[0]).toContain(`${file}: ${key}:`);
    expect(lines[0]).toContain(words);
    expect(existsSync(out)).toBe(false);
  });
});

describe('the explore page keeps bias: {over_growth: B}', () => {
  test('the survey file written back with other settings keeps the form, loads and predicts the same numbers as the settings applied to the parsed file (round trip)', () => {
    const text = survey(COSMOLOGY.planck2018!, '{over_growth: 0.84}');
    const raw = parseYaml(text, 'explore.yaml');
    const controls = exploreControls(raw, loadSurveyText(text, 'explore.yaml'));
    // unchanged: the file itself, and its numbers
    expect(settingsText(text, controls, new Map())).toBe(text);
    const values = new Map([
      ['area', 250],
      ['detection.limit', 8e-17],
    ]);
    const written = settingsText(text, controls, values);
    expect(written).toContain('  bias: {over_growth: 0.84}\n');
    const fromText = loadSurveyText(written, 'explore.yaml');
    const fromObject = parseSurveyObject(settingsObject(raw, controls, values), 'explore.yaml');
    expect(JSON.stringify(predict(fromText))).toBe(JSON.stringify(predict(fromObject)));
    expect(fromText.areaDeg2).toBe(250);
    const p = predict(fromText);
    for (const s of p.slices!)
      expect(Math.abs(s.uncertainty!.bias / referenceBias('planck2018', 0.5 * (s.z_min + s.z_max)) - 1)).toBeLessThan(
        1e-9,
      );
  });

  test('the page\'s note on the cosmic variance says the bias given ("given as 0.84 / D(z)")', async () => {
    const text = survey(COSMOLOGY.round!, '{over_growth: 0.84}');
    const r = await exploreCompute({ text }, '/virtual/explore.yaml', '/virtual');
    const html = slicesHtml(r);
    expect(html).toContain('(count-weighted over the detected sources; given as 0.84 / D(z))');
  });
});
