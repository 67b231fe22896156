/**
 * The cosmology as every output states it: the CMB temperature of the presets, 2.7255 K (Fixsen
 * 2009, as docs/survey-file.md gives it), was printed with four digits, "2.725 K", in the tables
 * (predict, distances, clustering) and the report, a value no file had given; now every digit up
 * to six is shown, as Omega_Lambda is.
 */
import { describe, expect, test } from 'vitest';
import { runCli } from '../cli/helpers.js';

describe('the CMB temperature as stated', () => {
  test('planck2018: predict, distances and clustering tables say T_cmb = 2.7255 K', async () => {
    const runs = [
      ['predict', 'samples/deep-continuum.yaml'],
      ['distances', '--z', '1', '--preset', 'planck2018'],
      ['clustering', '--z', '1', '--radius-mpc', '8', '--mass-msun', '1e12', '--preset', 'planck2018'],
    ];
    for (const argv of runs) {
      const r = await runCli(argv);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout, argv[0]).toContain('T_cmb = 2.7255 K');
    }
  });
  test('a file giving t_cmb: 2.72548 is stated with its digits', async () => {
    const r = await runCli(['distances', '--z', '1', '--h0', '70', '--omega-m', '0.3', '--t-cmb', '2.72548']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('T_cmb = 2.72548 K');
  });
  test('the report states T_CMB = 2.7255 K', async () => {
    const r = await runCli(['report', 'samples/deep-continuum.yaml', '--out', '-', '--mocks', '20']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('T_CMB = 2.7255 K');
  });
});
