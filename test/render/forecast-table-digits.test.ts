/**
 * The forecast table (and the report's) prints a value beside its spread with digits enough to show the spread: a
 * wide survey measures log10 L* near 42 to a few 1e-4, and five significant digits printed its
 * mock fits' p16, p50 and p84 all as "41.851" (failed before: a DESI-like [OII] count over
 * 14,000 deg^2, sigma(log10 L*) 2.1e-4, showed the three percentiles and the mean alike).
 */
import { describe, expect, test } from 'vitest';
import { forecast } from '../../src/forecast/forecast.js';
import { forecastTable } from '../../src/render/forecast-table.js';
import { renderReport } from '../../src/render/report.js';
import { predictionViews } from '../../src/render/draw.js';
import { loadSurveyFile, predict } from '../../src/index.js';

function cells(table: string, name: string): string[] {
  const line = table.split('\n').find((l) => l.startsWith(`│ ${name} `))!;
  return line
    .split('│')
    .map((c) => c.trim())
    .filter((c) => c !== '');
}

describe('forecast table: values beside their spread', () => {
  test('mock percentiles 1e-5 apart near 41.85 print apart, each to a tenth of the spread (definition of the cells)', async () => {
    const f = await forecast(loadSurveyFile('samples/halpha-narrowband.yaml'), { mocks: 2, seed: 1 });
    const n = f.parameters[1]!; // log10_l_star
    const mid = f.center[n]!;
    const std = 2.6e-4;
    const stats = { ...f.mocks!.parameters[n]!, mean: mid + 1e-5, std, p16: mid - std, p50: mid, p84: mid + std };
    const g = { ...f, mocks: { ...f.mocks!, parameters: { ...f.mocks!.parameters, [n]: stats } } };
    const row = cells(forecastTable(g), n);
    // parameter, input, sigma, sigma (Poisson only), mean, std, p16, p50, p84, offset
    const [, , , , mean, , p16, p50, p84] = row;
    expect(new Set([p16, p50, p84]).size).toBe(3);
    for (const [text, want] of [
      [mean!, stats.mean],
      [p16!, stats.p16],
      [p50!, stats.p50],
      [p84!, stats.p84],
    ] as const)
      expect(Math.abs(Number(text) - want)).toBeLessThan(std / 10);
  });

  test('a spread of a few per cent of the value keeps five significant digits (the bundled samples print as before)', async () => {
    const f = await forecast(loadSurveyFile('samples/halpha-narrowband.yaml'), { mocks: 2, seed: 1 });
    const n = f.parameters[2]!; // alpha
    const row = cells(forecastTable(f), n);
    const s = f.mocks!.parameters[n]!;
    // five significant digits of -1.4 and so on: at most 6 characters after the sign
    expect(row[6]!.replace('-', '').length).toBeLessThanOrEqual(6);
    expect(Math.abs(Number(row[6]) - s.p16)).toBeLessThan(1e-4 * Math.abs(s.p16));
  });

  test("the report's forecast table: the assumed value and the mock fits' mean 1e-5 apart near 41.85 print apart, each to a tenth of the spread (failed before: both 41.8508 and 41.851, a sigma apart by rounding)", async () => {
    const survey = loadSurveyFile('samples/halpha-narrowband.yaml');
    const f = await forecast(survey, { mocks: 2, seed: 1 });
    const n = f.parameters[1]!; // log10_l_star
    const center = 41.850771;
    const std = 2.6e-4;
    const stats = { ...f.mocks!.parameters[n]!, mean: center + 1e-5, std };
    const g = {
      ...f,
      center: { ...f.center, [n]: center },
      fisher: { ...f.fisher, sigma: { ...f.fisher.sigma, [n]: 2.1e-4 } },
      mocks: { ...f.mocks!, parameters: { ...f.mocks!.parameters, [n]: stats } },
    };
    const html = renderReport({
      surveyText: 'x',
      surveyTitle: f.title,
      prediction: predictionViews(survey, predict(survey)).combined,
      forecast: g,
      figures: [],
    });
    const table = html.slice(html.indexOf('id="forecast-table"'));
    const row = table.slice(table.indexOf(`<span class="key">${n}</span>`)).split('</tr>')[0]!;
    // cells after the parameter's: assumed value, Fisher sigma, mean of the mock fits, their spread
    const [assumed, , mean] = row
      .split('<td>')
      .slice(1)
      .map((c) => Number(c.split('</td>')[0]));
    expect(Math.abs(assumed! - center)).toBeLessThan(std / 10);
    expect(Math.abs(mean! - stats.mean)).toBeLessThan(std / 10);
  });
});
