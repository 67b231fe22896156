/**
 * A slice whose limit is taken where the narrow-band filter passes none of the population's lines:
 * [OIII] 5007 with 4959 as a blended line through a 50 Angstrom top hat (their windows, 48 (1 + z)
 * Angstrom apart, leave a gap at the middle slice's middle); and two lines through a tabulated
 * filter, 0 at its ends, on explicit slice edges spanning both windows, where each population's
 * slices are now the edges cut at its window (the limit was taken at the window's end). Found by a trial user:
 * predict's JSON and CSV, its figures, report and explore all failed there (an internal failure,
 * exit 1: the limit was infinite), and the table printed "Infinity". Checked:
 * - each slice's limit and count against an independent scipy evaluation of docs/survey-file.md's
 *   definitions (test/reference/generate/filter_gap_limits.py, scipy 1.17.1): the limit to 1e-9 dex
 *   where a line is seen, null where none is; the counts to 1e-8;
 * - every command's output is written (exit 0): JSON with null, CSV with an empty field, the
 *   table with '-' and a sentence saying why, the figures, the explore page's numbers.
 */
import { describe, expect, test } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadSurveyFile, loadSurveyText, predict } from '../../src/index.js';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { runCli } from '../cli/helpers.js';
import { useExploreScript } from '../support/explore-script.js';
import { tempDir } from '../support/temp.js';

interface RefSlice {
  z_min: number;
  z_max: number;
  z_ref: number;
  limit: number | null;
  count: number;
}
const ref = JSON.parse(readFileSync(new URL('../reference/filter_gap_limits.json', import.meta.url), 'utf8')) as {
  narrow_tophat_blend: { window: number[]; slices: RefSlice[] };
  table_edges: { rows: number[][]; edges: number[]; populations: Record<string, { slices: RefSlice[] }> };
};

const rel = (a: number, b: number) => Math.abs(a / b - 1);

const NARROW = `format: 1
title: invented 50 A filter, [OIII] 5007 with 4959 blended
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
detection:
  kind: line_flux
  limit: 2e-17
  filter: {center: 9210, fwhm: 50, profile: tophat}
population:
  name: OIII
  variable: luminosity
  line: 5006.8
  log10_phi_star: -2.85
  log10_l_star: 41.9
  alpha: -1.5
  blended_lines: [{line: 4958.9, ratio: 0.33}]
  bias: 1.2
slices: {count: 3}
`;

const TABLE_EDGES = `format: 1
title: invented tabulated filter, two lines on slice edges spanning both windows
cosmology: {h0: 70, omega_m: 0.3}
area: 1.8
detection:
  kind: line_flux
  limit: 2.5e-17
  filter: {profile: table, file: nb.csv}
populations:
  - name: H-alpha
    variable: luminosity
    line: 6562.8
    log10_phi_star: -2.65
    log10_l_star: 41.6
    alpha: -1.35
    bias: 1.0
  - name: "[OII]"
    variable: luminosity
    line: 3727.4
    log10_phi_star: -2.5
    log10_l_star: 42.0
    alpha: -1.3
    bias: 1.8
slices: {edges: ${JSON.stringify(ref.table_edges.edges)}}
`;

function expectSlices(
  got: { z_min: number; z_max: number; limit_at_center: number | null; count: number }[],
  want: RefSlice[],
) {
  expect(got.length).toBe(want.length);
  want.forEach((w, i) => {
    const g = got[i]!;
    expect(Math.abs(g.z_min - w.z_min)).toBeLessThan(1e-9);
    expect(Math.abs(g.z_max - w.z_max)).toBeLessThan(1e-9);
    if (w.limit === null) expect(g.limit_at_center).toBeNull();
    else expect(Math.abs(g.limit_at_center! - w.limit)).toBeLessThan(1e-9);
    if (w.count === 0) expect(g.count).toBe(0);
    else expect(rel(g.count, w.count)).toBeLessThan(1e-8);
  });
}

describe('a slice limit where the filter passes no line (test/reference/generate/filter_gap_limits.py)', () => {
  const dir = tempDir('skytally-filter-gap-');
  const narrow = join(dir, 'narrow.yaml');
  writeFileSync(narrow, NARROW);
  const tableFile = join(dir, 'edges.yaml');
  writeFileSync(
    join(dir, 'nb.csv'),
    `wavelength, transmission\n${ref.table_edges.rows.map((r) => r.join(', ')).join('\n')}\n`,
  );
  writeFileSync(tableFile, TABLE_EDGES);

  test('[OIII] and 4959 through 50 A: the middle slice has no limit (null), the others and every count as scipy', () => {
    const p = predict(loadSurveyText(NARROW, 'narrow.yaml'));
    expectSlices(p.slices!, ref.narrow_tophat_blend.slices);
    expect(p.slices![1]!.limit_at_center).toBeNull();
  });

  test('two lines through a table on edges spanning both windows: each on the edges cut at its window', () => {
    const p = predict(loadSurveyFile(tableFile));
    expect(p.breakdown).toBe('observed');
    // each population's slices: the edges cut at its window's ends (before, H-alpha's last slice
    // reached z = 1.5 and its limit was taken at its window's end, where the table is 0)
    for (const q of p.populations) expectSlices(q.slices, ref.table_edges.populations[q.name]!.slices);
    expect(p.populations[0]!.slices.length).toBe(2);
  });

  test('every command writes its output: JSON null, CSV empty field, table "-" with its reason, figures, report', async () => {
    const json = await runCli(['predict', narrow, '--format', 'json']);
    expect(json.code, json.stderr).toBe(0);
    expect(JSON.parse(json.stdout).slices[1].limit_at_center).toBeNull();
    const csv = await runCli(['predict', narrow, '--format', 'csv']);
    expect(csv.code, csv.stderr).toBe(0);
    const row = csv.stdout.split('\n')[2]!.split(',');
    expect(row[3]).toBe('');
    const table = await runCli(['predict', narrow]);
    expect(table.code, table.stderr).toBe(0);
    expect(table.stdout).not.toContain('Infinity');
    expect(table.stdout).toContain("A limit '-': the filter passes none of the population's lines");
    const figures = await runCli(['predict', tableFile, '--figures', join(dir, 'figures'), '--no-png']);
    expect(figures.code, figures.stderr).toBe(0);
    const report = await runCli(['report', narrow, '--format', 'json']);
    expect(report.code, report.stderr).toBe(0);
    await useExploreScript();
    const page = await runCli(['explore', narrow, '--out', join(dir, 'page.html')]);
    expect(page.code, page.stderr).toBe(0);
  });

  test("the explore page's numbers are predict's", async () => {
    const e = await exploreCompute({ text: NARROW }, 'narrow.yaml', '.');
    expect(e.error).toBeUndefined();
    const p = predict(loadSurveyText(NARROW, 'narrow.yaml'));
    expect(Number(e.outputs.find((o) => o.name === 'total-count')!.value)).toBe(p.totals.count);
  });
});
