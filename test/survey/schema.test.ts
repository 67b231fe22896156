import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { generateValidatorSource, GENERATED_PATH } from '../../scripts/generate-survey-validator.js';
import { SECTION_KEYS, SURVEY_SCHEMA_URL } from '../../src/survey/schema.js';

type Schema = { [k: string]: unknown; properties?: Record<string, Schema>; $ref?: string; items?: Schema };
const schema = JSON.parse(readFileSync(SURVEY_SCHEMA_URL, 'utf8')) as Schema;
const defs = schema.$defs as Record<string, Schema>;
const resolve = (s: Schema): Schema => (s.$ref ? defs[s.$ref.replace('#/$defs/', '')]! : s);

describe('specs/survey.schema.json', () => {
  test('the committed precompiled validator matches the schema (regenerate: npx tsx scripts/generate-survey-validator.ts)', () => {
    expect(readFileSync(GENERATED_PATH, 'utf8')).toBe(generateValidatorSource());
  });

  test('holds every key of the survey-file contract (docs/survey-file.md, docs/names.md)', () => {
    const keysOf = (s: Schema) => Object.keys(resolve(s).properties ?? {}).sort();
    const p = schema.properties!;
    expect(keysOf(schema)).toEqual(
      [
        'area',
        'cosmology',
        'detection',
        'exposure',
        'field',
        'format',
        'histogram',
        'plan',
        'population',
        'populations',
        'redshift',
        'slices',
        'title',
      ].sort(),
    );
    expect(keysOf(p.cosmology!)).toEqual(['h0', 'n_s', 'omega_b', 'omega_m', 'preset', 'sigma8', 't_cmb']);
    expect(keysOf(p.redshift!)).toEqual(['max', 'min']);
    expect(keysOf(p.field!)).toEqual(['aspect', 'count']);
    const det = resolve(p.detection!);
    expect(keysOf(det)).toEqual([
      'band',
      'band_file',
      'beta',
      'completeness',
      'equivalent_width_cut',
      'filter',
      'igm',
      'kind',
      'limit',
      'line',
      'photo_z',
      'redshift_selection',
      'sed',
      'system',
      'vega_to_ab',
    ]);
    expect(keysOf(det.properties!.photo_z!)).toEqual(['outlier_fraction', 'sigma']);
    expect(det.properties!.igm!.enum).toEqual(['none', 'madau1995']);
    expect(det.properties!.kind!.enum).toEqual(['line_flux', 'magnitude', 'threshold']);
    expect(keysOf(det.properties!.filter!)).toEqual(['center', 'file', 'fwhm', 'profile']);
    expect(det.properties!.filter!.properties!.profile!.enum).toEqual(['tophat', 'gaussian', 'table']);
    expect(keysOf(det.properties!.completeness!)).toEqual(['half', 'model', 'table', 'width']);
    expect(keysOf(p.population!)).toEqual(
      [
        'alpha',
        'bias',
        'l_star',
        'line',
        'log10_l_star',
        'log10_phi_star',
        'log10_phi_star_dex',
        'm_star',
        'name',
        'occupation',
        'phi_star',
        'phi_star_dex',
        'quantity',
        'rest_wavelength',
        'shape',
        'variable',
        // double Schechter components and the star-formation-rate conversion
        'alpha_1',
        'alpha_2',
        'phi_star_1',
        'log10_phi_star_1',
        'phi_star_1_dex',
        'log10_phi_star_1_dex',
        'phi_star_2',
        'log10_phi_star_2',
        'phi_star_2_dex',
        'log10_phi_star_2_dex',
        'sfr_conversion',
        // the luminosity function's own uncertainty
        'model_uncertainty',
        // photometry: the rest band, the population's own spectral slope or spectrum and the magnitude system of m_star
        'rest_band',
        'beta',
        'sed',
        'system',
        'vega_to_ab',
        // selection effects
        'attenuation',
        'blend_ratio',
        'blended_lines',
        'equivalent_widths',
        'redshift_selection',
        'valid_redshift',
      ].sort(),
    );
    expect(keysOf(resolve(p.population!).properties!.model_uncertainty!)).toEqual([
      'alpha',
      'alpha_1',
      'alpha_2',
      'correlation',
      'draws_file',
      'log10_l_star',
      'log10_phi_star',
      'log10_phi_star_1',
      'log10_phi_star_2',
      'm_star',
    ]);
    expect(keysOf(p.populations!.items as Schema)).toEqual(keysOf(p.population!));
    expect(keysOf(p.slices!)).toEqual(['count', 'edges', 'width']);
    expect(keysOf(p.histogram!)).toEqual(['width']);
  });

  test("the loader's table of sections (for keys put in the wrong one) holds each section's keys", () => {
    const keysOf = (s: Schema) => Object.keys(resolve(s).properties ?? {}).sort();
    const p = schema.properties!;
    expect([...SECTION_KEYS.top].sort()).toEqual(keysOf(schema));
    expect([...SECTION_KEYS.cosmology].sort()).toEqual(keysOf(p.cosmology!));
    expect([...SECTION_KEYS.detection].sort()).toEqual(keysOf(p.detection!));
    expect([...SECTION_KEYS.population].sort()).toEqual(keysOf(p.population!));
  });

  test('every object but plan forbids unknown keys', () => {
    const open: string[] = [];
    const walk = (s: unknown, path: string) => {
      if (!s || typeof s !== 'object') return;
      const o = s as Schema;
      // (an `if` only tests a condition, such as bias being a mapping with over_growth; its `then`
      // holds the shape and is walked)
      if (
        o.type === 'object' &&
        o.additionalProperties !== false &&
        path !== '/properties/plan' &&
        !path.endsWith('/if')
      )
        open.push(path);
      for (const [k, v] of Object.entries(o)) walk(v, `${path}/${k}`);
    };
    walk(schema, '');
    expect(open).toEqual([]);
  });
});
