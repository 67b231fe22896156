/**
 * clustering's table and CSV give the radii and masses in increasing order. They followed the JSON
 * object's key order, in which keys that look like whole numbers come first: --radius-mpc 30,8.5,8
 * gave the columns of 8, 30 and then 8.5 Mpc (found by a trial user). Each column must still hold
 * its own radius's value: at z = 0 the radius 8/h Mpc (h = 0.7: 11.428571428571429 Mpc) holds
 * sigma8 itself, 0.81, by the definition of sigma8 (docs/survey-file.md, cosmology).
 */
import { describe, expect, test } from 'vitest';
import { runCli } from '../cli/helpers.js';

const ARGS = [
  'clustering',
  '--z',
  '0,1',
  '--radius-mpc',
  '30,11.428571428571429,8,100',
  '--mass-msun',
  '1e12,5e11,2000000000000',
  '--h0',
  '70',
  '--omega-m',
  '0.3',
];

describe('clustering columns in increasing radius and mass', () => {
  test('CSV: the header in increasing order, each value the JSON value of its key', async () => {
    const csv = await runCli([...ARGS, '--format', 'csv']);
    const json = await runCli([...ARGS, '--format', 'json']);
    expect(csv.code).toBe(0);
    const lines = csv.stdout.trim().split('\n');
    const header = lines[0]!.split(',');
    expect(header).toEqual([
      'z',
      'growth',
      'sigma_r_8',
      'sigma_r_11.428571428571429',
      'sigma_r_30',
      'sigma_r_100',
      'halo_bias_5e11',
      'halo_bias_1e12',
      'halo_bias_2000000000000',
      'halo_density_above_mpc3_5e11',
      'halo_density_above_mpc3_1e12',
      'halo_density_above_mpc3_2000000000000',
    ]);
    const rows = (JSON.parse(json.stdout) as { rows: Record<string, Record<string, number> | number>[] }).rows;
    lines.slice(1).forEach((line, i) => {
      const cells = line.split(',').map(Number);
      header.forEach((h, j) => {
        const m = /^(sigma_r|halo_bias|halo_density_above_mpc3)_(.+)$/.exec(h);
        const want = m ? (rows[i]![m[1]!] as Record<string, number>)[m[2]!] : (rows[i]![h] as number);
        expect(cells[j], h).toBe(want);
      });
    });
    // sigma8 by definition: the radius 8/h Mpc at z = 0
    expect(Number(lines[1]!.split(',')[3])).toBeCloseTo(0.81, 6);
  });

  test('table: the same order in its head', async () => {
    const t = await runCli(ARGS);
    const head = t.stdout.split('\n').find((l) => l.includes('sigma(R='))!;
    const order = [...head.matchAll(/sigma\(R=([^ ]+) Mpc\)|bias\(([^ ]+) Msun\)/g)].map((m) => m[1] ?? m[2]);
    expect(order).toEqual(['8', '11.428571428571429', '30', '100', '5e11', '1e12', '2000000000000']);
  });
});
