/**
 * The forecast table prints a value beside its spread with digits enough to show the spread: a
 * wide survey measures log10 L* near 42 to a few 1e-4, and five significant digits printed its
 * mock fits' p16, p50 and p84 all as "41.851" (failed before: a DESI-like [OII] count over
 * 14,000 deg^2, sigma(log10 L*) 2.1e-4, showed the three percentiles and the mean alike).
 */
import { describe, expect, test } from 'vitest';
import { forecast } from '../../src/forecast/forecast.js';
import { forecastTable } from '../../src/render/forecast-table.js';
import { loadSurveyFile } from '../../src/index.js';

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
});
