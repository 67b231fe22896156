/**
 * Several populations in the human table, the CSV, the report and the shares figure.
 *
 * Expected values are predict's own JSON (its numbers are checked against references in
 * test/counts and test/uncertainty); here: what each output shows when the populations' windows
 * differ (the interloper sample) and when they coincide, and that no population is shown as 0
 * merely because it lies at another redshift. CSV is read back with a strict reader (every row
 * the header's width, fields quoted per RFC 4180).
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { predictionCsv, predictionTable } from '../../src/render/predict-table.js';
import { observedShareRows, observedSharesSpec, renderSvg, SHARE_FLOOR } from '../../src/render/figures.js';
import { drawFigures, predictionViews } from '../../src/render/draw.js';
import { renderReport } from '../../src/render/report.js';

const survey = loadSurveyFile('samples/narrowband-interlopers.yaml');
const p = predict(survey);

/** RFC 4180 rows (quoted fields may hold commas); throws on a row of another width. */
function readCsv(text: string): string[][] {
  const rows: string[][] = [];
  for (const line of text.trimEnd().split('\n')) {
    const fields: string[] = [];
    let i = 0;
    while (i <= line.length) {
      if (line[i] === '"') {
        let j = i + 1;
        let v = '';
        while (j < line.length) {
          if (line[j] === '"' && line[j + 1] === '"') {
            v += '"';
            j += 2;
          } else if (line[j] === '"') break;
          else v += line[j++];
        }
        fields.push(v);
        i = j + 2;
      } else {
        const j = line.indexOf(',', i);
        fields.push(line.slice(i, j < 0 ? line.length : j));
        i = j < 0 ? line.length + 1 : j + 1;
      }
    }
    if (rows.length > 0 && fields.length !== rows[0]!.length)
      throw new Error(`row ${rows.length} has ${fields.length} fields, not ${rows[0]!.length}`);
    rows.push(fields);
  }
  return rows;
}

describe('lines at other redshifts (breakdown observed)', () => {
  test('the table: every population with its own count, and the total of them all', () => {
    const text = predictionTable(p);
    for (const q of p.populations) {
      expect(q.totals.count).toBeGreaterThan(100);
      const row = text.split('\n').find((l) => l.startsWith(`│ ${q.name} `))!;
      expect(row, q.name).toBeDefined();
      // its count, never 0
      expect(row).toContain(` ${Number(q.totals.count.toPrecision(4))} `);
    }
    const total = text.split('\n').find((l) => l.startsWith('│ total '))!;
    expect(total).toContain(` ${Number(p.totals.count.toPrecision(4))} `);
    expect(text).toContain('share: the interloper fraction');
  });

  test('the CSV: one row per observed bin; per-population counts sum to their totals, shares to 1', () => {
    const rows = readCsv(predictionCsv(p));
    const head = rows[0]!;
    expect(head.slice(0, 2)).toEqual(['log10_line_flux_min', 'log10_line_flux_max']);
    expect(rows).toHaveLength(p.observed_bins.bins.length + 1);
    for (const q of p.populations) {
      const c = head.indexOf(`count_${q.name}`);
      const sum = rows.slice(1).reduce((a, r) => a + Number(r[c]), 0);
      expect(Math.abs(sum / q.totals.count - 1)).toBeLessThan(1e-12);
    }
    const shareCols = p.populations.map((q) => head.indexOf(`share_${q.name}`));
    const countCol = head.indexOf('count');
    for (const r of rows.slice(1)) {
      const s = shareCols.reduce((a, c) => a + Number(r[c]), 0);
      if (Number(r[countCol]) > 0) expect(s).toBeCloseTo(1, 12);
    }
  });

  test("the report: a table of the populations, the observed bins and each population's slices (ids unique)", () => {
    const { combined } = predictionViews(survey, p);
    const html = renderReport({ surveyText: 'x', surveyTitle: p.title, prediction: combined, figures: [] });
    expect(html).toContain('id="populations-table"');
    expect(html).toContain('id="observed-table"');
    for (let k = 1; k <= p.populations.length; k++) expect(html).toContain(`id="predict-table-${k}"`);
    const ids = [...html.matchAll(/ id="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
    expect(html).toContain(`<strong>${Number(p.totals.count.toPrecision(4)).toLocaleString('en-US')}</strong>`);
  });
  // the figures of this sample (counts-1..3, luminosity-function-1..3, shares) are drawn and read
  // back in test/cli/report.test.ts and test/render/samples-browser.test.ts
});

describe('the shares figure', () => {
  test('rows: bars stacked in file order, nearly empty end bins left out, one row per population and bin', () => {
    const rows = observedShareRows(p.observed_bins);
    const names = p.populations.map((q) => q.name);
    const total = p.observed_bins.bins.reduce((a, b) => a + b.count, 0);
    const kept = p.observed_bins.bins.filter((b) => rows.some((r) => r.min === b.min));
    expect(rows).toHaveLength(kept.length * names.length);
    expect(kept[0]!.count).toBeGreaterThanOrEqual(SHARE_FLOOR * total);
    expect(kept[kept.length - 1]!.count).toBeGreaterThanOrEqual(SHARE_FLOOR * total);
    // dropped only at the ends
    const first = p.observed_bins.bins.indexOf(kept[0]!);
    expect(p.observed_bins.bins.slice(first, first + kept.length)).toEqual(kept);
    for (const b of kept) {
      const mine = rows.filter((r) => r.min === b.min);
      expect(mine.map((r) => r.population)).toEqual(names);
      expect(mine[0]!.below).toBe(0);
      mine.forEach((r, k) => {
        expect(r.above - r.below).toBeCloseTo(b.populations[names[k]!]!.count, 12);
        if (k > 0) expect(r.below).toBe(mine[k - 1]!.above);
        expect(r.share).toBe(b.populations[names[k]!]!.share);
      });
      expect(mine[mine.length - 1]!.above).toBeCloseTo(b.count, 9);
    }
  });

  test('one population: no shares figure (every share would be 1)', () => {
    const one = predict(loadSurveyFile('samples/halpha-narrowband.yaml'));
    expect(observedSharesSpec(one.observed_bins)).toBeNull();
  });

  test('it draws (SVG) and names the observed variable on its axes', async () => {
    const svg = await renderSvg(observedSharesSpec(p.observed_bins, p.title)!);
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).toContain('line flux');
    expect(svg).toContain('share of the bin');
  });
});

describe('two galaxy types in one window (breakdown redshift)', () => {
  const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: {min: 0.5, max: 1.5}
detection: {kind: magnitude, limit: 24, band: 8000}
populations:
  - {name: star-forming, variable: magnitude, phi_star: 2e-3, m_star: -21.0, alpha: -1.3}
  - {name: quiescent, variable: magnitude, phi_star: 1.2e-3, m_star: -21.3, alpha: -0.6}
slices: {count: 4}
`;
  const q = predict(loadSurveyText(text, 'two.yaml'));
  test('the table and CSV keep redshift slices with a column per population; the total row sums them', () => {
    expect(q.breakdown).toBe('redshift');
    const rows = readCsv(predictionCsv(q));
    expect(rows[0]).toContain('count_star-forming');
    expect(rows).toHaveLength(q.slices!.length + 1);
    const table = predictionTable(q);
    const total = table.split('\n').find((l) => l.startsWith('│ total '))!;
    for (const pop of q.populations) expect(total).toContain(` ${Number(pop.totals.count.toPrecision(4))} `);
  });
  test('the shares figure is drawn (two populations) and the counts figure is the top-level one', async () => {
    const names = (await drawFigures(loadSurveyText(text, 'two.yaml'), q)).map((f) => f.name);
    expect(names).toEqual(['counts', 'histograms', 'luminosity-function-1', 'luminosity-function-2', 'shares']);
  });
});

describe('the limit column of several populations sharing slices', () => {
  /** Two magnitude populations over one window; the second's rest wavelength and slope are its own or not. */
  const two = (red: string) => `format: 1
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.3, max: 1.5}
detection: {kind: magnitude, limit: 25, band: 7700, beta: -2}
populations:
  - {name: blue, variable: magnitude, phi_star: 0.003, m_star: -20.5, alpha: -1.3, rest_wavelength: 3000}
  - {name: red, variable: magnitude, phi_star: 0.002, m_star: -21, alpha: -0.5, ${red}}
slices: {count: 3}
`;

  test("limits that differ get a column per population, each the population's own (its JSON slices)", () => {
    const q = predict(loadSurveyText(two('rest_wavelength: 4400, beta: 1'), 'two.yaml'), { noUncertainty: true });
    const header = predictionTable(q)
      .split('\n')
      .find((l) => l.includes('slice z'))!;
    expect(header).toContain('limit M [AB] blue');
    expect(header).toContain('limit M [AB] red');
    const row = predictionTable(q)
      .split('\n')
      .find((l) => l.includes('0.3 - 0.7'))!
      .split('│')
      .map((c) => c.trim());
    // the columns read each population's own limit_at_center (4 significant figures)
    expect(Number(row[3])).toBeCloseTo(q.populations[0]!.slices[0]!.limit_at_center!, 2);
    expect(Number(row[4])).toBeCloseTo(q.populations[1]!.slices[0]!.limit_at_center!, 2);
    expect(Math.abs(Number(row[3]) - Number(row[4]))).toBeGreaterThan(0.1);
  });

  test('limits that are the same keep one column', () => {
    const q = predict(loadSurveyText(two('rest_wavelength: 3000'), 'same.yaml'), { noUncertainty: true });
    const header = predictionTable(q)
      .split('\n')
      .find((l) => l.includes('slice z'))!;
    expect(header).toContain('limit M [AB]');
    expect(header).not.toContain('limit M [AB] blue');
  });
});
