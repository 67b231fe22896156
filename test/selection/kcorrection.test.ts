/**
 * K-corrections by synthetic photometry (src/selection/kcorrection.ts; Hogg et al. 2002,
 * arXiv:astro-ph/0210394, eqs. 2-4 and 8).
 *
 * Reference: test/reference/kcorrection.json, written by the committed generator
 * test/reference/generate/kcorrection.py (numpy and scipy; its own 12-point Gauss-Legendre sums,
 * checked there against scipy.integrate.quad to 1e-12): the invented spectrum, a tabulated and an
 * analytic flat-f_nu source, through gaussian, top-hat and tabulated observed bands, with absolute
 * magnitudes at rest wavelengths or in rest bands, at 15 redshifts from 0 to 6.
 * Tolerances: 1e-8 mag for the exact synthetic photometry (the generator suggests 1e-8; the sums
 * are exact to rounding); 2e-8 mag for the tabulated K(z) the counts use (its tolerance is 1e-8).
 * Identities (Hogg et al. 2002, from eq. 8): a source flat in f_nu has K = -2.5 log10(1+z) for every
 * band and rest frame (1e-12); a rest band equal to the observed band blueshifted by (1+z0) gives
 * K(z0) = -2.5 log10(1+z0) for any spectrum (1e-10); a very narrow band on a power law gives the
 * power-law colour term (1e-9).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import type { Filter } from '../../src/model/detection.js';
import type { RestFrame, SedPhotometry } from '../../src/model/photometry.js';
import {
  adaptiveCubicTable,
  bandIntegrals,
  kCorrectionFunction,
  sedKCorrection,
  tabulatedSpectrum,
  type SpectrumShape,
} from '../../src/selection/kcorrection.js';
import { bandAveragedMadau1995 } from '../../src/selection/igm.js';
import { readSpectrumFile } from '../../src/survey/spectrum-file.js';
import { readTransmissionFile } from '../../src/survey/transmission-file.js';
import { SurveyError } from '../../src/errors.js';

interface BandJson {
  profile: 'tophat' | 'gaussian' | 'table';
  center_angstrom?: number;
  fwhm_angstrom?: number;
  label?: string;
}
interface Case {
  spectrum: 'invented' | 'tabulated_flat_fnu' | 'flat_fnu';
  observed_band: BandJson;
  rest_wavelength_angstrom?: number;
  rest_band?: BandJson;
  k: number[];
}
interface Fixture {
  z: number[];
  cases: Case[];
  identities: {
    name: string;
    rows?: { observed_band: BandJson; z0: number; k: number }[];
    k?: number;
    colour_term?: number;
  }[];
}
const fixture = JSON.parse(readFileSync(new URL('../reference/kcorrection.json', import.meta.url), 'utf8')) as Fixture;
const dir = fileURLToPath(new URL('../reference/surveys-selection/', import.meta.url));
const invented = readSpectrumFile('spectra/invented-starburst.csv', 'test.yaml', 'detection.sed.file', dir);
const flatTable = readSpectrumFile('spectra/flat-fnu.csv', 'test.yaml', 'detection.sed.file', dir);
const redBand: Filter = {
  profile: 'table',
  centerAngstrom: 0,
  fwhmAngstrom: 0,
  table: readTransmissionFile('bands/invented-red-band.csv', 'test.yaml', 'detection.band_file', dir),
};
const analyticFlat: SpectrumShape = { at: (l) => (1500 / l) ** 2, nodes: [], min: 0, max: Infinity };
const spectra: Record<Case['spectrum'], SpectrumShape> = {
  invented: tabulatedSpectrum(invented),
  tabulated_flat_fnu: tabulatedSpectrum(flatTable),
  flat_fnu: analyticFlat,
};

function band(b: BandJson): Filter {
  if (b.profile === 'table') return redBand;
  return { profile: b.profile, centerAngstrom: b.center_angstrom!, fwhmAngstrom: b.fwhm_angstrom! };
}
function rest(c: Case): RestFrame {
  return c.rest_band
    ? { kind: 'band', band: band(c.rest_band) }
    : { kind: 'wavelength', angstrom: c.rest_wavelength_angstrom! };
}
function label(c: Case): string {
  const b = (x: BandJson) =>
    x.profile === 'table' ? 'red-band file' : `${x.profile} ${x.center_angstrom}/${x.fwhm_angstrom}`;
  return `${c.spectrum}, ${b(c.observed_band)}, rest ${c.rest_band ? b(c.rest_band) : `${c.rest_wavelength_angstrom} A`}`;
}

describe('synthetic photometry against kcorrection.json (1e-8 mag)', () => {
  test.each(fixture.cases.map((c) => [label(c), c] as const))('%s', (_l, c) => {
    const k = kCorrectionFunction(spectra[c.spectrum], band(c.observed_band), rest(c));
    fixture.z.forEach((z, i) => expect(Math.abs(k(z) - c.k[i]!), `z = ${z}`).toBeLessThan(1e-8));
  });
});

describe('identities of Hogg et al. 2002 eq. 8', () => {
  test('a source flat in f_nu: K = -2.5 log10(1+z) for every band and rest frame, to 1e-12', () => {
    const zs = [0, 0.3, 1.7, 4.2];
    const restFrames: RestFrame[] = [
      { kind: 'wavelength', angstrom: 1216 },
      { kind: 'band', band: { profile: 'gaussian', centerAngstrom: 2300, fwhmAngstrom: 400 } },
      { kind: 'band', band: redBand },
    ];
    const bands: Filter[] = [
      redBand,
      { profile: 'tophat', centerAngstrom: 4400, fwhmAngstrom: 900 },
      { profile: 'gaussian', centerAngstrom: 16000, fwhmAngstrom: 3000 },
    ];
    for (const b of bands) {
      for (const r of restFrames) {
        const k = kCorrectionFunction(analyticFlat, b, r);
        for (const z of zs) expect(Math.abs(k(z) + 2.5 * Math.log10(1 + z))).toBeLessThan(1e-12);
      }
    }
  });
  test('the rest band = the observed band blueshifted by (1+z0): K(z0) = -2.5 log10(1+z0), any spectrum (1e-10)', () => {
    const rows = fixture.identities[1]!.rows!;
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      const b = band(r.observed_band);
      const f = 1 / (1 + r.z0);
      const q: Filter =
        b.profile === 'table'
          ? { ...b, table: { ...b.table!, wavelengthAngstrom: b.table!.wavelengthAngstrom.map((l) => l * f) } }
          : { profile: b.profile, centerAngstrom: b.centerAngstrom * f, fwhmAngstrom: b.fwhmAngstrom * f };
      const k = kCorrectionFunction(spectra.invented, b, { kind: 'band', band: q })(r.z0);
      expect(Math.abs(k + 2.5 * Math.log10(1 + r.z0))).toBeLessThan(1e-10);
      expect(Math.abs(k - r.k)).toBeLessThan(1e-10);
    }
  });
  test('a 0.001 Angstrom band on a power law gives the power-law colour term (1e-9)', () => {
    const id = fixture.identities[2]!;
    const pl: SpectrumShape = { at: (l) => (l / 1500) ** -1.3, nodes: [], min: 0, max: Infinity };
    const k = kCorrectionFunction(
      pl,
      { profile: 'tophat', centerAngstrom: 9000, fwhmAngstrom: 1e-3 },
      { kind: 'wavelength', angstrom: 1500 },
    )(1.7);
    expect(Math.abs(k - id.colour_term!)).toBeLessThan(1e-9);
    expect(Math.abs(k - id.k!)).toBeLessThan(1e-9);
  });
});

describe('the tabulated K(z) the counts use', () => {
  const sed = (b: Filter): SedPhotometry => ({ spectrum: invented, band: b, surveyFile: 'test.yaml' });
  const tableCases: [string, Filter, RestFrame, number, number][] = [
    [
      'gaussian band, rest 1500 A',
      { profile: 'gaussian', centerAngstrom: 8000, fwhmAngstrom: 1500 },
      { kind: 'wavelength', angstrom: 1500 },
      3.2,
      4.6,
    ],
    [
      'red-band file, rest top-hat',
      redBand,
      { kind: 'band', band: { profile: 'tophat', centerAngstrom: 6200, fwhmAngstrom: 1400 } },
      0.05,
      0.45,
    ],
    [
      'top-hat band, rest 2300 A',
      { profile: 'tophat', centerAngstrom: 12500, fwhmAngstrom: 2500 },
      { kind: 'wavelength', angstrom: 2300 },
      0,
      3,
    ],
  ];
  test.each(tableCases)('%s: within 2e-8 mag of the exact value', (_n, b, r, z0, z1) => {
    const s = sed(b);
    const table = sedKCorrection(s, r, 'none', z0, z1);
    expect(sedKCorrection(s, r, 'none', z0, z1)).toBe(table);
    const exact = kCorrectionFunction(tabulatedSpectrum(invented), b, r);
    for (let i = 0; i <= 200; i++) {
      const z = z0 + ((z1 - z0) * (i + 0.37)) / 201;
      expect(Math.abs(table(z) - exact(z)), `z = ${z}`).toBeLessThan(2e-8);
    }
  });
  test('the adaptive cubic table is exact for a cubic and refines a kink', () => {
    const cubic = adaptiveCubicTable((z) => 1 + z - 2 * z * z + 0.5 * z ** 3, 0, 2, 1e-12);
    expect(Math.abs(cubic(1.234) - (1 + 1.234 - 2 * 1.234 ** 2 + 0.5 * 1.234 ** 3))).toBeLessThan(1e-12);
    const kink = adaptiveCubicTable((z) => Math.abs(z - 0.3) ** 2.5, 0, 1, 1e-9);
    for (const z of [0.1, 0.2999, 0.3, 0.3001, 0.77])
      expect(Math.abs(kink(z) - Math.abs(z - 0.3) ** 2.5)).toBeLessThan(2e-9);
  });
  test('a redshift beyond the spectrum is refused naming detection.sed', () => {
    // The spectrum starts at 400 Angstrom: a gaussian band at 8000 +- 3 x 1500 A needs 3500 / (1+z) >= 400, z <= 7.75.
    const s = sed({ profile: 'gaussian', centerAngstrom: 8000, fwhmAngstrom: 1500 });
    expect(() => sedKCorrection(s, { kind: 'wavelength', angstrom: 1500 }, 'none', 3, 8)).toThrow(SurveyError);
    const inside = sedKCorrection(s, { kind: 'wavelength', angstrom: 1500 }, 'none', 3, 4);
    expect(() => inside(9)).toThrow(/detection\.sed/);
  });
});

describe('the intergalactic transmission inside the band integral (igm: madau1995)', () => {
  test('a power law through a band file: the same band average as the power-law path (1e-3 mag, its midpoint rule)', () => {
    // bandAveragedMadau1995 weights the band by lambda^(beta+1), as l f_lambda R does for f_lambda ~ lambda^beta.
    const beta = -1.7;
    const pl: SpectrumShape = { at: (l) => (l / 1500) ** beta, nodes: [], min: 0, max: Infinity };
    for (const z of [4.4, 5, 5.5]) {
      const withIgm = bandIntegrals(pl, redBand, z, 'madau1995').num;
      const without = bandIntegrals(pl, redBand, z, 'none').num;
      const dk = -2.5 * Math.log10(withIgm / without);
      expect(dk).toBeGreaterThan(0.05);
      expect(Math.abs(dk + 2.5 * Math.log10(bandAveragedMadau1995(redBand.table!, z, beta)))).toBeLessThan(1e-3);
    }
  });
  test('redward of Lyman alpha at every wavelength of the band the IGM changes nothing (exactly)', () => {
    const b: Filter = { profile: 'tophat', centerAngstrom: 12500, fwhmAngstrom: 2500 };
    const r: RestFrame = { kind: 'wavelength', angstrom: 1500 };
    const k0 = kCorrectionFunction(spectra.invented, b, r, 'none');
    const k1 = kCorrectionFunction(spectra.invented, b, r, 'madau1995');
    expect(k1(4)).toBe(k0(4)); // 11250 / 5 > 1216
    expect(k1(9)).toBeGreaterThan(k0(9) + 0.1);
  });
});
