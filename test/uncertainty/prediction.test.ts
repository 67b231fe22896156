/**
 * Uncertainty blocks of predict. References: Poisson fraction 1/sqrt(N) exactly and the
 * quadrature sum (common practice); cosmic variance = b sigma_dm / sqrt(fields) (the method's
 * definition, Trenti & Stiavelli 2008 / Somerville et al. 2004); sigma(8/h Mpc, z=0) = sigma8 by the
 * normalisation's definition; D(z) = 1/(1+z) for omega_m = 1 (exact, Einstein-de Sitter).
 */
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { loadSurveyFile, parseSurveyObject } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';
import { runCli } from '../cli/helpers.js';

const schema = JSON.parse(readFileSync('specs/prediction.schema.json', 'utf8'));
const validate = new Ajv2020({ strict: false }).compile(schema);
const SAMPLES = ['samples/halpha-narrowband.yaml', 'samples/deep-continuum.yaml', 'samples/mass-limited.yaml'];

function survey(extra: Record<string, unknown> = {}, population: Record<string, unknown> = {}) {
  return parseSurveyObject(
    {
      format: 1,
      title: 'uncertainty test',
      cosmology: { h0: 70, omega_m: 0.3 },
      area: 0.1,
      redshift: { min: 1, max: 2 },
      detection: { kind: 'magnitude', limit: 26, band: 9000 },
      population: { variable: 'magnitude', phi_star: 2.2e-3, m_star: -21, alpha: -1.5, ...population },
      slices: { count: 4 },
      ...extra,
    },
    'u.yaml',
  );
}

describe('predict uncertainty', () => {
  test.each(SAMPLES)('%s: every slice and the total carry a valid uncertainty block (schema)', (f) => {
    const p = predict(loadSurveyFile(f));
    expect(validate(p), JSON.stringify(validate.errors)).toBe(true);
    for (const s of [...p.slices!, p.totals]) {
      const u = s.uncertainty!;
      expect(u.poisson_fraction).toBe(1 / Math.sqrt(s.count));
      expect(u.total_fraction).toBeCloseTo(Math.hypot(u.poisson_fraction, u.cosmic_variance_fraction), 14);
      expect(u.cosmic_variance_fraction).toBeCloseTo(u.bias * u.sigma_matter, 14);
    }
  });

  test.each(['samples/narrowband-interlopers.yaml', 'samples/double-schechter-mass.yaml'])(
    '%s: valid against the schema; observed breakdown without slices, redshift breakdown with them',
    (f) => {
      const p = predict(loadSurveyFile(f));
      expect(validate(p), JSON.stringify(validate.errors)).toBe(true);
      expect(p.breakdown === 'redshift').toBe(p.slices !== undefined);
      // the schema refuses slices beside breakdown observed, and their absence beside redshift
      const wrong =
        p.breakdown === 'observed' ? { ...p, slices: p.populations[0]!.slices } : { ...p, slices: undefined };
      expect(validate(JSON.parse(JSON.stringify(wrong)))).toBe(false);
    },
  );

  test('a given bias is used as given; independent fields divide the variance by their number', () => {
    const one = predict(survey({}, { bias: 2.5 }));
    expect(one.slices![0]!.uncertainty!.bias).toBe(2.5);
    expect(one.slices![0]!.uncertainty!.halo_mass_min_msun).toBeUndefined();
    // Same total area in 4 fields: each box has half the sides; the fraction is b sigma(small box)/2.
    const four = predict(survey({ field: { aspect: 1, count: 4 } }, { bias: 2.5 }));
    const u4 = four.slices![0]!.uncertainty!;
    expect(u4.cosmic_variance_fraction).toBeCloseTo((2.5 * u4.sigma_matter) / 2, 14);
    expect(u4.sigma_matter).toBeGreaterThan(one.slices![0]!.uncertainty!.sigma_matter);
  });

  test('auto bias: abundance-matched halo mass rises and bias grows with a brighter limit (Sheth-Tormen; common practice)', () => {
    const faint = predict(survey({ detection: { kind: 'magnitude', limit: 28, band: 9000 } }));
    const bright = predict(survey({ detection: { kind: 'magnitude', limit: 24, band: 9000 } }));
    expect(bright.totals.uncertainty!.halo_mass_min_msun!).toBeGreaterThan(
      faint.totals.uncertainty!.halo_mass_min_msun!,
    );
    expect(bright.totals.uncertainty!.bias).toBeGreaterThan(faint.totals.uncertainty!.bias);
  });

  test('a very wide survey approaches zero cosmic variance (under 1 %) while a pencil beam does not', () => {
    const wide = predict(survey({ area: 5000 }, { bias: 1.5 }));
    const pencil = predict(survey({ area: '10 arcmin^2' }, { bias: 1.5 }));
    expect(wide.totals.uncertainty!.cosmic_variance_fraction).toBeLessThan(0.01);
    expect(pencil.totals.uncertainty!.cosmic_variance_fraction).toBeGreaterThan(0.05);
  });

  test('an elongated field of the same area has lower cosmic variance (common practice)', () => {
    const square = predict(survey({}, { bias: 2 }));
    const strip = predict(survey({ field: { aspect: 16, count: 1 } }, { bias: 2 }));
    expect(strip.totals.uncertainty!.cosmic_variance_fraction).toBeLessThan(
      square.totals.uncertainty!.cosmic_variance_fraction,
    );
  });
});

describe('clustering command', () => {
  test('sigma(8/h Mpc, z=0) = sigma8 (definition of the normalisation, 1e-4) and D(z) = 1/(1+z) for omega_m = 1 (exact, 1e-8)', async () => {
    const h = 0.7;
    const r = await runCli([
      'clustering',
      '--z',
      '0,1,3',
      '--radius-mpc',
      `${8 / h}`,
      '--mass-msun',
      '1e11,1e12',
      '--h0',
      '70',
      '--omega-m',
      '0.3',
      '--format',
      'json',
    ]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.rows[0].sigma_r[`${8 / h}`] / 0.81).toBeCloseTo(1, 4);
    expect(Object.keys(j.rows[0].halo_bias)).toEqual(['1e11', '1e12']);
    expect(j.rows[2].halo_bias['1e12']).toBeGreaterThan(j.rows[0].halo_bias['1e12']);
    const eds = JSON.parse((await runCli(['clustering', '--z', '0.5,2', '--omega-m', '1', '--format', 'json'])).stdout);
    expect(eds.rows[0].growth).toBeCloseTo(1 / 1.5, 8);
    expect(eds.rows[1].growth).toBeCloseTo(1 / 3, 8);
  });
  test('bad lists exit 2', async () => {
    expect((await runCli(['clustering', '--z', '1', '--mass-msun', '-5'])).code).toBe(2);
    expect((await runCli(['clustering', '--z', '1', '--transfer', 'wiggly'])).code).toBe(2);
  });
});
