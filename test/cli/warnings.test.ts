/**
 * Warnings (src/warnings.ts): one mechanism for every command. Each warning has a stable code
 * and a one-line message, is printed on stderr as `skytally: warning: <message>` and appears in
 * the command's JSON as {code, message}; every output schema in specs/ carries the same
 * `warning` definition listing every code. Each warning fires on a file made to trigger it; the
 * bundled samples raise none (checked for predict in test/counts/populations.test.ts, for
 * forecast in test/forecast/cli.test.ts and for the plan samples' reports in
 * report-forecast-plan.test.ts).
 */
import { tempDir } from '../support/temp.js';
import type { Json } from '../support/json.js';
import { describe, expect, test } from 'vitest';
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { runCli } from './helpers.js';
import { WARNING_CODES } from '../../src/warnings.js';
import { sampleText } from '../planning/helpers.js';

type Any = Json;

const dir = tempDir('skytally-warnings-');
function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

/** The output schemas (every schema in specs/ but the two that describe input). */
const OUTPUT_SCHEMAS = readdirSync('specs').filter(
  (f) => f.endsWith('.schema.json') && f !== 'survey.schema.json' && f !== 'plan-section.schema.json',
);
const ajv = new Ajv2020({ allErrors: true, strict: false });
for (const f of readdirSync('specs'))
  if (f.endsWith('.schema.json')) ajv.addSchema(JSON.parse(readFileSync(`specs/${f}`, 'utf8')), f);
const validate = (schema: string, doc: unknown) => {
  const v = ajv.getSchema(schema)!;
  const ok = v(doc);
  return ok ? 'valid' : JSON.stringify(v.errors);
};

/** The H-alpha sample with `l_star: 43` in place of `log10_l_star: 42.3`: a log10 given linearly. */
const LINEAR_LOG = file(
  'linear-log.yaml',
  readFileSync('samples/halpha-narrowband.yaml', 'utf8').replace(/^(\s*)log10_l_star: 42\.3.*$/m, '$1l_star: 43'),
);
/** A UV search at z = 5.5-6.5 in a band at 8000 A: blueward of Lyman alpha there, no IGM key. */
const BLUEWARD = file(
  'blueward.yaml',
  `title: Invented blueward band
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 5.5, max: 6.5}
detection: {kind: magnitude, limit: 27, band: 8000}
population: {variable: magnitude, phi_star: 5e-4, m_star: -20.8, alpha: -1.8}
`,
);

describe('every output schema carries the same warning definition', () => {
  test.each(OUTPUT_SCHEMAS)('%s', (f) => {
    const s = JSON.parse(readFileSync(`specs/${f}`, 'utf8')) as Any;
    // the prediction's fields common to both breakdowns are under its prediction_base definition
    const top = s.properties ? s : s.$defs.prediction_base;
    expect(top.required).toContain('warnings');
    expect(top.properties.warnings.items).toEqual({ $ref: '#/$defs/warning' });
    expect(s.$defs.warning.properties.code.enum).toEqual(Object.keys(WARNING_CODES));
    const first = JSON.parse(readFileSync(`specs/${OUTPUT_SCHEMAS[0]}`, 'utf8')) as Any;
    expect(s.$defs.warning).toEqual(first.$defs.warning);
  });
});

describe('warnings on files made to trigger them', () => {
  test('l_star: 43 (a log10 given linearly): no silent all-zero table; implausible_luminosity and no_detections, on stderr and in the JSON (failed before: exit 0, no warning)', async () => {
    const r = await runCli(['predict', LINEAR_LOG, '--format', 'json']);
    expect(r.code).toBe(0);
    const p = JSON.parse(r.stdout) as Any;
    expect(validate('prediction.schema.json', p)).toBe('valid');
    expect(p.totals.count).toBeLessThan(1);
    expect(p.warnings.map((w: Any) => w.code)).toEqual(['implausible_luminosity', 'no_detections']);
    expect(p.warnings[0].message).toMatch(/log10_l_star: 43/);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(2);
    for (const [i, line] of lines.entries()) expect(line).toBe(`skytally: warning: ${p.warnings[i].message}`);
    // the table says the same on stderr; check says the implausible value before anything is counted
    expect((await runCli(['predict', LINEAR_LOG])).stderr).toBe(r.stderr);
    const c = await runCli(['check', LINEAR_LOG, '--format', 'json']);
    expect(c.code).toBe(0);
    expect((JSON.parse(c.stdout) as Any).warnings.map((w: Any) => w.code)).toEqual(['implausible_luminosity']);
    // a constant has no redshift to name (failed before: "L* = 43 erg/s at z = ..." as if it varied)
    expect(c.stderr).toMatch(/^skytally: warning: .*L\* = 43 erg\/s is far below/);
    // a forecast of nothing stays bad input (exit 2), as before
    expect((await runCli(['forecast', LINEAR_LOG])).code).toBe(2);
  });

  test('phi* written linearly under a log10 key, or far too high: implausible_density naming the key, in check and predict; no sample raises it (failed before: a count 400 times too high, no warning)', async () => {
    const base = sampleText('halpha-narrowband.yaml');
    expect(base).toMatch(/log10_phi_star: -2\.6\n/);
    // 10^0.0025 = 1.0058 Mpc^-3 instead of 10^-2.6 = 0.0025
    const f = file('linear-phi.yaml', base.replace('log10_phi_star: -2.6', 'log10_phi_star: 0.0025'));
    const r = await runCli(['predict', f, '--format', 'json']);
    expect(r.code).toBe(0);
    const p = JSON.parse(r.stdout) as Any;
    expect(validate('prediction.schema.json', p)).toBe('valid');
    expect(p.warnings.map((w: Any) => w.code)).toEqual(['implausible_density']);
    expect(p.warnings[0].message).toMatch(
      /^H-alpha emitters: phi\* = 1\.006 Mpc\^-3 is far above .*; if log10_phi_star holds a linear value, write it under phi_star /,
    );
    expect(r.stderr).toBe(`skytally: warning: ${p.warnings[0].message}\n`);
    const c = await runCli(['check', f, '--format', 'json']);
    expect((JSON.parse(c.stdout) as Any).warnings.map((w: Any) => w.code)).toEqual(['implausible_density']);
    // a linear phi_star of 1.2 gets the plain advice; 0.5 Mpc^-3 itself passes (the bound)
    const g = file('high-phi.yaml', base.replace('log10_phi_star: -2.6', 'phi_star: 1.2'));
    const w = (JSON.parse((await runCli(['check', g, '--format', 'json'])).stdout) as Any).warnings;
    expect(w.map((x: Any) => x.message)).toEqual([
      expect.stringMatching(/phi\* = 1\.2 Mpc\^-3 .*; check phi_star \(a number density in Mpc\^-3\)$/),
    ]);
    const h = file('bound-phi.yaml', base.replace('log10_phi_star: -2.6', 'phi_star: 0.5'));
    expect((JSON.parse((await runCli(['check', h, '--format', 'json'])).stdout) as Any).warnings).toEqual([]);
    // a double Schechter names the component and its own key
    const d = sampleText('double-schechter-mass.yaml');
    expect(d).toMatch(/log10_phi_star_2: -3\.46/);
    const k = file('double-phi.yaml', d.replace(/log10_phi_star_2: -3\.46\d*/, 'log10_phi_star_2: 0.00034'));
    const dw = (JSON.parse((await runCli(['check', k, '--format', 'json'])).stdout) as Any).warnings;
    // phi* in z: the redshift where it is implausible, the window's upper end (0.843, where
    // log10 phi* = -2.6 + 40 * 0.063 = -0.08)
    const e = file('evolving-phi.yaml', base.replace('log10_phi_star: -2.6', 'log10_phi_star: "-2.6 + 40*(z - 0.78)"'));
    const ew = (JSON.parse((await runCli(['check', e, '--format', 'json'])).stdout) as Any).warnings;
    expect(ew.map((x: Any) => x.message)).toEqual([
      expect.stringMatching(/phi\* = [0-9.]+ Mpc\^-3 at z = 0\.843 is far above/),
    ]);
    expect(dw.map((x: Any) => x.code)).toEqual(['implausible_density']);
    expect(dw[0].message).toMatch(/phi\* of component 2 = 1\.001 Mpc\^-3 .*write it under phi_star_2 /);
    // no bundled sample raises it
    for (const sample of readdirSync('samples').filter((x) => x.endsWith('.yaml'))) {
      const out = JSON.parse((await runCli(['check', `samples/${sample}`, '--format', 'json'])).stdout) as Any;
      expect(out.warnings.map((x: Any) => x.code)).not.toContain('implausible_density');
    }
  });

  test("M* given as an apparent magnitude: implausible_luminosity (within the loader's range), refused beyond it", async () => {
    const text = readFileSync('samples/deep-continuum.yaml', 'utf8');
    expect(text).toMatch(/m_star: /);
    // the loader accepts m_star up to 10 (a physical range); -30 to -10 is plausible for galaxies
    const f = file('apparent.yaml', text.replace(/^(\s*)m_star: .*$/m, '$1m_star: 8.5'));
    const r = await runCli(['check', f, '--format', 'json']);
    expect(r.code).toBe(0);
    expect((JSON.parse(r.stdout) as Any).warnings).toEqual([
      { code: 'implausible_luminosity', message: expect.stringMatching(/M\* = 8\.5 .*apparent magnitude/) },
    ]);
    const g = file('apparent-far.yaml', text.replace(/^(\s*)m_star: .*$/m, '$1m_star: 24.5'));
    const refused = await runCli(['check', g, '--format', 'json']);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/m_star/);
  });

  test('a plan whose best design sits at the edge of its exposure grid: optimum_at_grid_edge, and the optimum is not called sharp (failed before)', async () => {
    const base = sampleText('plan-uv-deep-wide.yaml');
    // the best of this sample lies near 2.3 h per pointing; a grid ending at 0.8 h cuts it off
    const f = file(
      'edge.yaml',
      base.replace(/exposure_grid: \{[^}]*\}/, 'exposure_grid: {min_hours: 0.1, max_hours: 0.8, count: 40}'),
    );
    const r = await runCli(['plan', f, '--format', 'json']);
    expect(r.code).toBe(0);
    const p = JSON.parse(r.stdout) as Any;
    expect(validate('plan.schema.json', p)).toBe('valid');
    expect(p.warnings.map((w: Any) => w.code)).toEqual(['optimum_at_grid_edge']);
    expect(p.warnings[0].message).toMatch(/longest end of the exposure grid .*max_hours/);
    expect(p.notes.join(' ')).not.toMatch(/optimum is (sharp|flat)/);
    expect(p.notes.join(' ')).toMatch(/edge of the exposure grid/);
    expect(r.stderr).toBe(`skytally: warning: ${p.warnings[0].message}\n`);
    // the table run warns alike
    expect((await runCli(['plan', f])).stderr).toBe(r.stderr);
  });

  test('a plan whose best design is one pointing taking the whole budget: no grid-edge warning (a longer exposure buys no pointing, so widening the grid changes nothing), a note naming the budget instead (failed before)', async () => {
    // A narrow-band search whose sigma(alpha) keeps falling with depth over a 1.77 deg^2 camera:
    // the best of 40 h is one pointing of 39.9 h, the default grid's longest exposure
    // (budget - overhead). Before, the warning asked for a larger max_hours; with max_hours 60
    // the same design came back without a warning.
    const text = (grid: string) => `format: 1
title: one deep pointing (plan edge check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1
detection: {kind: line_flux, limit: 7e-18, line: 1215.67, filter: {center: 8150, fwhm: 120, profile: gaussian}}
population: {variable: luminosity, phi_star: 7.7e-4, l_star: 6.8e42, alpha: -1.5}
slices: {count: 1}
plan:
  field_of_view: 1.77
  reference: {limit: 1e-17, exposure_hours: 2}
  overhead_hours: 0.1
  budget_hours: 40
  goal: {sigma: alpha}${grid}
`;
    const runs = await Promise.all(
      ['', '\n  exposure_grid: {max_hours: 60}'].map((g, i) =>
        runCli(['plan', file(`budget-edge-${i}.yaml`, text(g)), '--format', 'json']),
      ),
    );
    for (const r of runs) {
      expect(r.code).toBe(0);
      const p = JSON.parse(r.stdout) as Any;
      expect(validate('plan.schema.json', p)).toBe('valid');
      expect(p.best.pointings).toBe(1);
      expect(p.best.exposure_hours_per_pointing).toBeCloseTo(39.9, 9);
      expect(p.warnings).toEqual([]);
      expect(r.stderr).toBe('');
      expect(p.notes.join(' ')).toMatch(
        /spends all of the budget on one pointing: its depth is limited by budget_hours/,
      );
      expect(p.notes.join(' ')).not.toMatch(/edge of the exposure grid/);
    }
  });

  test('the band blueward of Lyman alpha: the same warning in predict, forecast, compare (prefixed by its column), check and report JSON', async () => {
    const p = JSON.parse((await runCli(['predict', BLUEWARD, '--format', 'json'])).stdout) as Any;
    expect(p.warnings.map((w: Any) => w.code)).toEqual(['band_blueward_of_lyman_alpha']);
    const w = p.warnings[0];
    const f = await runCli(['forecast', BLUEWARD, '--format', 'json', '--no-cosmic-variance']);
    expect(f.code).toBe(0);
    const fj = JSON.parse(f.stdout) as Any;
    expect(validate('forecast.schema.json', fj)).toBe('valid');
    expect(fj.warnings).toEqual([w]);
    expect(f.stderr).toBe(`skytally: warning: ${w.message}\n`);
    const c = JSON.parse(
      (
        await runCli([
          'compare',
          'samples/halpha-narrowband.yaml',
          BLUEWARD,
          '--format',
          'json',
          '--no-cosmic-variance',
        ])
      ).stdout,
    ) as Any;
    expect(validate('compare.schema.json', c)).toBe('valid');
    expect(c.warnings).toEqual([{ code: w.code, message: `[2] ${w.message}` }]);
    expect((JSON.parse((await runCli(['check', BLUEWARD, '--format', 'json'])).stdout) as Any).warnings).toEqual([w]);
    const rep = await runCli(['report', BLUEWARD, '--format', 'json']);
    expect(rep.code).toBe(0);
    const rj = JSON.parse(rep.stdout) as Any;
    expect(validate('report.schema.json', rj)).toBe('valid');
    expect(rj.warnings).toEqual([w]);
    expect(rj.prediction.warnings).toEqual([w]);
    expect(rep.stderr).toBe(`skytally: warning: ${w.message}\n`);
  }, 60_000);

  test('the HTML report lists the warnings near its top', async () => {
    const r = await runCli(['report', LINEAR_LOG]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('<section class="warnings" id="warnings">');
    expect(r.stdout).toContain('data-code="implausible_luminosity"');
    expect(r.stdout.indexOf('id="warnings"')).toBeLessThan(r.stdout.indexOf('id="model"'));
  });

  test('abundance matching held at a mass bound: bias_at_mass_bound (routed through the same mechanism)', async () => {
    // an invented population far denser than all haloes above 1e6 Msun provide
    const text = readFileSync('samples/mass-limited.yaml', 'utf8').replace(
      /^(\s*)log10_phi_star: .*$/m,
      '$1log10_phi_star: 2.6',
    );
    expect(text).toMatch(/log10_phi_star: 2.6$/m);
    const f = file('dense.yaml', text);
    const r = await runCli(['predict', f, '--format', 'json']);
    expect(r.code).toBe(0);
    const p = JSON.parse(r.stdout) as Any;
    expect(p.warnings.some((w: Any) => w.code === 'bias_at_mass_bound')).toBe(true);
    expect(r.stderr).toMatch(/^skytally: warning: .*haloes above 1e\+6 Msun/m);
  });

  test('bias_at_mass_bound is one line per population and bound, naming the redshifts where it held (not one per slice and node)', async () => {
    // Every slice of the dense population above is held at 1e6 Msun: one warning, naming the
    // range of z and the density furthest beyond the bound (it was 38 lines, one per slice and
    // per node of the totals).
    const dense = readFileSync('samples/mass-limited.yaml', 'utf8').replace(
      /^(\s*)log10_phi_star: .*$/m,
      '$1log10_phi_star: 2.6',
    );
    const r = await runCli(['predict', file('dense.yaml', dense), '--format', 'json']);
    expect(r.code).toBe(0);
    const held = (JSON.parse(r.stdout) as Any).warnings.filter((w: Any) => w.code === 'bias_at_mass_bound');
    expect(held).toHaveLength(1);
    expect(held[0].message).toMatch(
      /at z = 0\.3\d* to 1\.\d+ \(as high as [0-9.e+]+ Mpc\^-3 after occupation\) is more than all/,
    );
    expect(held[0].message).toMatch(/haloes above 1e\+6 Msun provide, so the bias there is/);
    expect(r.stderr.split('\n').filter((l) => l.includes('haloes above'))).toHaveLength(1);
  });

  test('no bias_at_mass_bound where no source is expected: slices and ranges holding under 0.001 sources (failed before)', async () => {
    // A K-band flux-limited survey counted to z = 0.25, and a GALEX-like FUV count to z = 0.5
    // (Wyder et al. 2005 function, from memory): their far slices hold 1e-10 sources and less,
    // fewer than haloes above 1e16 Msun would give, and the warning asked to "give
    // population.bias" for slices no survey could see a galaxy in (one line each; the K-band one
    // was 112 lines before they were merged). Their counts are unchanged.
    const bright = `format: 1
title: a bright K-band limit counted far beyond its last source
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.0005, max: 0.25}
detection: {kind: magnitude, limit: 13.6, band: "2.16 um", beta: -3.4}
population: {variable: magnitude, rest_wavelength: "2.16 um", phi_star: 3.98e-3, m_star: -22.31, alpha: -1.09}
slices: {width: 0.005}
`;
    const fuv = `format: 1
title: a GALEX-like FUV count
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.001, max: 0.5}
detection: {kind: magnitude, limit: 19.9, band: 1528, beta: -1.8}
population: {variable: magnitude, rest_wavelength: 1528, phi_star: 4.07e-3, m_star: -18.04, alpha: -1.22}
slices: {width: 0.05}
`;
    for (const [name, text, far] of [
      ['bright.yaml', bright, 0.171],
      ['fuv.yaml', fuv, 0.4],
    ] as const) {
      for (const command of ['predict', 'forecast']) {
        const r = await runCli([command, file(name, text), '--format', 'json']);
        expect(r.code, r.stderr).toBe(0);
        const out = JSON.parse(r.stdout) as Any;
        expect(out.warnings.filter((w: Any) => w.code === 'bias_at_mass_bound')).toEqual([]);
        expect(r.stderr).not.toContain('haloes above');
        if (command === 'predict') {
          // the slices beyond `far`, where the mass was held, expect under 0.001 sources
          const beyond = (out.slices as Any[]).filter((s: Any) => s.z_min >= far);
          expect(beyond.length).toBeGreaterThan(0);
          for (const s of beyond) expect(s.count).toBeLessThan(1e-3);
        }
      }
    }
  });

  test('distances and clustering carry an empty list', async () => {
    const d = JSON.parse((await runCli(['distances', '--z', '1', '--format', 'json'])).stdout) as Any;
    expect(d.warnings).toEqual([]);
    expect(validate('distances.schema.json', d)).toBe('valid');
    const k = JSON.parse((await runCli(['clustering', '--z', '1', '--format', 'json'])).stdout) as Any;
    expect(k.warnings).toEqual([]);
    expect(validate('clustering.schema.json', k)).toBe('valid');
  });
});
