/**
 * Table files whose wavelengths are in um or nm without a header naming the unit are read in
 * Angstrom (docs/survey-file.md, "Filters": Angstrom is "also the unit without a header"). A band
 * file of 0.78 to 1.03 um so written was a band at 0.905 Angstrom, which `band: 0.905` is refused
 * for (wavelengths run from 1 to 1e11 Angstrom, README "Limits"), yet it was counted with only a
 * Lyman-alpha warning advising igm: madau1995 (found by a trial user). Now the curve's wavelength is
 * held to the same range, and the refusals and the warning name the header to write.
 *
 * The expected wavelengths are worked by hand: a symmetric trapezoid's transmission-weighted mean
 * is its middle, 9050 Angstrom for rows from 7800 to 10300 Angstrom; a filter table whose curve is
 * above 0 between its zero rows at 11800 and 12050 Angstrom sets the window of the 6563 Angstrom line
 * from 11800 / 6563 - 1 to 12050 / 6563 - 1 (survey-file.md, "Filters": the window is where the
 * curve is above 0).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { parse } from 'yaml';
import { loadSurveyFile } from '../../src/survey/index.js';
import { predict } from '../../src/index.js';
import { errorOf } from '../support/survey-error.js';
import { tempDir } from '../support/temp.js';
import { LINE_YAML, MAGNITUDE_YAML, setPath } from './fixtures.js';

const dir = tempDir('skytally-table-units-');

/** A 7800-10300 Angstrom trapezoid (flat from 8200 to 9900), its wavelengths divided by `scale`. */
function trapezoid(name: string, scale: number, header: string | undefined): string {
  const rows: string[] = header ? [header] : [];
  for (const [w, t] of [
    [7800, 0],
    [8200, 0.9],
    [9900, 0.9],
    [10300, 0],
  ] as const)
    rows.push(`${w / scale},${t}`);
  const path = join(dir, name);
  writeFileSync(path, rows.join('\n') + '\n');
  return path;
}

/** MAGNITUDE_YAML with `edits` (dotted keys), written beside the tables and loaded. */
function magnitudeSurvey(name: string, edits: Record<string, unknown>, yaml = MAGNITUDE_YAML): string {
  const obj = parse(yaml) as Record<string, unknown>;
  for (const [k, v] of Object.entries(edits)) setPath(obj, k, v);
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(obj));
  return path;
}

describe('a band file in um without a header naming the unit', () => {
  test('is refused naming detection.band_file and the header to write (its mean, 0.905 Angstrom, is below 1 Angstrom)', () => {
    const band = trapezoid('z-um.csv', 1e4, undefined);
    const file = magnitudeSurvey('band-um.yaml', { 'detection.band': undefined, 'detection.band_file': band });
    const e = errorOf(() => loadSurveyFile(file));
    expect([e.code, e.keyPath]).toEqual(['bad_table', 'detection.band_file']);
    expect(e.message).toMatch(/0\.905 Angstrom/);
    expect(e.message).toMatch(/wavelength_um, transmission/);
    expect(e.message.endsWith('.')).toBe(true);
  });

  test('with the header wavelength_um it is the band at 9050 Angstrom, as the same curve in Angstrom', () => {
    const um = trapezoid('z-um-header.csv', 1e4, 'wavelength_um,transmission');
    const aa = trapezoid('z-aa.csv', 1, undefined);
    const a = loadSurveyFile(
      magnitudeSurvey('band-um-h.yaml', { 'detection.band': undefined, 'detection.band_file': um }),
    );
    const b = loadSurveyFile(
      magnitudeSurvey('band-aa.yaml', { 'detection.band': undefined, 'detection.band_file': aa }),
    );
    const bandOf = (s: typeof a): number => (s.detection.kind === 'magnitude' ? s.detection.bandAngstrom : NaN);
    expect(bandOf(a)).toBeCloseTo(9050, 9);
    expect(bandOf(b)).toBeCloseTo(9050, 9);
    expect(predict(a).totals.count).toBeCloseTo(predict(b).totals.count, 6);
  });

  test('a K band in um (1.95-2.35 read as Angstrom, above 1) is counted with a warning that names the header, not igm', () => {
    const k = join(dir, 'k-um.csv');
    writeFileSync(k, '1.95,0\n2.0,1\n2.3,1\n2.35,0\n');
    const s = loadSurveyFile(magnitudeSurvey('k-um.yaml', { 'detection.band': undefined, 'detection.band_file': k }));
    const w = predict(s).warnings.find((x) => x.code === 'band_blueward_of_lyman_alpha');
    expect(w?.message).toMatch(/below the Lyman limit \(912 A\) even at z = 0/);
    expect(w?.message).toMatch(/wavelength_um, transmission/);
    expect(w?.message).not.toMatch(/consider igm/);
  });

  test('a band written as a plain 850 (um meant) is warned with the form to write', () => {
    const s = loadSurveyFile(magnitudeSurvey('band-850.yaml', { 'detection.band': 850 }));
    const w = predict(s).warnings.find((x) => x.code === 'band_blueward_of_lyman_alpha');
    expect(w?.message).toMatch(/band: "850 um"/);
    expect(w?.message).not.toMatch(/consider igm/);
  });

  test('a band above the Lyman limit keeps the igm advice', () => {
    const s = loadSurveyFile(magnitudeSurvey('band-uv.yaml', { 'detection.band': 3000, 'redshift.min': 3 }));
    const w = predict(s).warnings.find((x) => x.code === 'band_blueward_of_lyman_alpha');
    expect(w?.message).toMatch(/consider igm: madau1995/);
  });
});

describe('a narrow-band filter file in um without a header', () => {
  const rows = [
    [1.18, 0],
    [1.185, 1],
    [1.2, 1],
    [1.205, 0],
  ];

  test('is refused with a sentence that names the header to write', () => {
    const f = join(dir, 'nb-um.csv');
    writeFileSync(f, rows.map((r) => r.join(',')).join('\n') + '\n');
    const e = errorOf(() =>
      loadSurveyFile(magnitudeSurvey('nb-um.yaml', { 'detection.filter': { profile: 'table', file: f } }, LINE_YAML)),
    );
    expect([e.code, e.keyPath]).toEqual(['bad_window', 'detection.filter']);
    expect(e.message).toMatch(/read as 1\.18 to 1\.205 Angstrom/);
    expect(e.message).toMatch(/wavelength_um, transmission/);
  });

  test('with its header it sets the window lambda / 6563 - 1 over 11800-12050 Angstrom', () => {
    const f = join(dir, 'nb-um-h.csv');
    writeFileSync(f, 'wavelength_um,transmission\n' + rows.map((r) => r.join(',')).join('\n') + '\n');
    const s = loadSurveyFile(
      magnitudeSurvey('nb-um-h.yaml', { 'detection.filter': { profile: 'table', file: f } }, LINE_YAML),
    );
    const w = s.populations[0]!.window;
    expect(w.min).toBeCloseTo(11800 / 6563 - 1, 12);
    expect(w.max).toBeCloseTo(12050 / 6563 - 1, 12);
  });
});
