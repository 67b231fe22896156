/**
 * Cosmic variance against published numbers (wide tolerances, stated beside each check). skytally
 * gives the rms linear matter fluctuation in a box (the field's sides at the slice's middle
 * redshift, the slice's depth) times the bias; published estimates rest on other assumptions
 * (cosmology, power spectrum, simulations, nonlinear clustering), so these checks catch gross
 * errors (a factor of two, a wrong scaling with area, depth or redshift), not percent-level ones.
 *
 * Moster et al. 2011 (ApJ 731, 113, "A cosmic variance cookbook"), eq. 10 and Table 3 (from
 * memory; the same numbers as a public transcription of the table): the dark-matter cosmic
 * variance of a field for slices of dz = 0.2 is sigma_a / (zbar^beta + sigma_b), with
 * (sigma_a, beta, sigma_b) = (0.251, 0.358, 0.364) for the UDF (3.4' x 3.4') and
 * (0.261, 0.684, 0.854) for one GOODS field (10' x 16'). Their cosmology (from memory, that of
 * Moster et al. 2010): Omega_m = 0.26, h = 0.72, sigma8 = 0.77, n_s = 0.95, Omega_b = 0.0413.
 * Measured on this code: skytally / fit = 0.98-1.00 (UDF), 1.01-1.06 (GOODS) at zbar = 0.5-3.
 * Not checked: COSMOS-sized fields (84' x 84'), where skytally is 11-25 % above the fit at
 * zbar = 0.5-3 (33 % at 5), for reasons not established here (the fit's accuracy over that range,
 * the transfer function).
 *
 * Driver & Robotham 2010 (MNRAS 407, 2131), eq. 3 (from memory; the same formula as their public R
 * implementation, `cosvarcar` of the celestial package): the cosmic variance in per cent of
 * M* +- 1 mag galaxies in a box of sides A >= B (transverse) and C (radial), in Mpc for h = 0.7,
 * N independent fields:
 *   (1 - 0.03 sqrt(A/B - 1)) (219.7 - 52.4 log10(291 A B) + 3.21 log10(291 A B)^2) / sqrt(N C / 291),
 * calibrated on SDSS DR7 for volumes 1e3 to 1e7 Mpc^3. It is empirical: it holds nonlinear and
 * redshift-space clustering, which linear theory leaves out, so skytally with the bias of such
 * galaxies (about 1 to 1.2, common practice) must lie below it but not far: measured 0.64-0.88.
 */
import { describe, expect, test } from 'vitest';
import { FlatCosmology, loadSurveyText, predict } from '../../src/index.js';

interface Box {
  areaArcmin2: number;
  aspect: number;
  zMin: number;
  zMax: number;
  cosmology: string;
  bias: number;
  fields?: number;
}

/** The cosmic-variance fraction and sigma_matter of one slice holding the whole window. */
function sliceUncertainty(b: Box): { cv: number; sigmaMatter: number } {
  const text = `format: 1
title: cosmic-variance box (published check)
cosmology: ${b.cosmology}
area: "${b.areaArcmin2} arcmin^2"
field: {aspect: ${b.aspect}, count: ${b.fields ?? 1}}
redshift: {min: ${b.zMin}, max: ${b.zMax}}
detection: {kind: threshold, limit: 9}
population: {variable: luminosity, quantity: "stellar mass [Msun]", log10_phi_star: -3, log10_l_star: 10.8, alpha: -1.3, bias: ${b.bias}}
slices: {count: 1}
`;
  const p = predict(loadSurveyText(text, 'cv-box.yaml'));
  const u = (p.slices ?? [])[0]!.uncertainty!;
  return { cv: u.cosmic_variance_fraction, sigmaMatter: u.sigma_matter };
}

describe('cosmic variance of dark matter: Moster et al. 2011 fit (from memory; 10 %)', () => {
  const WMAP = '{h0: 72, omega_m: 0.26, sigma8: 0.77, n_s: 0.95, omega_b: 0.0413}';
  const fields = [
    { name: 'UDF, 3.4 x 3.4 arcmin', a: 3.4, b: 3.4, sigmaA: 0.251, beta: 0.358, sigmaB: 0.364 },
    { name: 'GOODS, one 10 x 16 arcmin field', a: 10, b: 16, sigmaA: 0.261, beta: 0.684, sigmaB: 0.854 },
  ];
  for (const f of fields)
    for (const z of [0.5, 1, 2, 3])
      test(`${f.name}, zbar = ${z}, dz = 0.2`, () => {
        const fit = f.sigmaA / (z ** f.beta + f.sigmaB);
        const { sigmaMatter } = sliceUncertainty({
          areaArcmin2: f.a * f.b,
          aspect: f.a / f.b,
          zMin: z - 0.1,
          zMax: z + 0.1,
          cosmology: WMAP,
          bias: 1,
        });
        // 10 %: the fit's own accuracy and the cosmology recalled from memory (measured <= 6 %)
        expect(sigmaMatter / fit).toBeGreaterThan(0.9);
        expect(sigmaMatter / fit).toBeLessThan(1.1);
      });
});

describe('cosmic variance of normal galaxies: Driver & Robotham 2010 (from memory; linear theory below the empirical value)', () => {
  const cosmology = FlatCosmology.fromParams({ h0: 70, omegaM: 0.3 });
  const ARCMIN_PER_RAD = (180 / Math.PI) * 60;

  /** Driver & Robotham 2010, eq. 3, as a fraction. */
  function driverRobotham(a: number, b: number, c: number, n = 1): number {
    const [long, short] = a >= b ? [a, b] : [b, a];
    const l = Math.log10(long * short * 291.0);
    return (
      ((1 - 0.03 * Math.sqrt(long / short - 1)) * (219.7 - 52.4 * l + 3.21 * l * l)) / Math.sqrt((n * c) / 291.0) / 100
    );
  }

  /** A box at 0.1 < z < 0.2 (GAMA-like depth) of the given angular sides in degrees. */
  function gamaLike(widthDeg: number, heightDeg: number, fields: number, bias: number) {
    const zMin = 0.1;
    const zMax = 0.2;
    const dm = cosmology.transverseComovingDistanceMpc((zMin + zMax) / 2);
    const a = ((widthDeg * Math.PI) / 180) * dm;
    const b = ((heightDeg * Math.PI) / 180) * dm;
    const c = cosmology.comovingDistanceMpc(zMax) - cosmology.comovingDistanceMpc(zMin);
    const { cv } = sliceUncertainty({
      areaArcmin2: widthDeg * heightDeg * 3600 * fields,
      aspect: widthDeg / heightDeg,
      zMin,
      zMax,
      cosmology: '{h0: 70, omega_m: 0.3}',
      bias,
      fields,
    });
    return { cv, dr: driverRobotham(a, b, c, fields), volume: a * b * c };
  }

  test('a GAMA-like 12 x 4 deg field at 0.1 < z < 0.2, one and three fields: bias 1 to 1.2 gives 0.55 to 1 times the empirical value', () => {
    for (const fields of [1, 3])
      for (const bias of [1, 1.2]) {
        const r = gamaLike(12, 4, fields, bias);
        expect(r.volume).toBeGreaterThan(1e6);
        expect(r.volume).toBeLessThan(1e7);
        // measured 0.71 (b = 1) and 0.86 (b = 1.2): nonlinear and redshift-space power left out
        expect(r.cv / r.dr).toBeGreaterThan(0.55);
        expect(r.cv / r.dr).toBeLessThan(1);
      }
    // three far-apart fields: 1/sqrt(3) in both (Driver & Robotham 2010: "GAMA ... 3 %-8 %")
    const one = gamaLike(12, 4, 1, 1.1);
    const three = gamaLike(12, 4, 3, 1.1);
    expect(three.cv / one.cv).toBeCloseTo(1 / Math.sqrt(3), 6);
    expect(three.dr).toBeGreaterThan(0.03);
    expect(three.dr).toBeLessThan(0.1);
  });

  test('the rule of thumb: below 10 % once 1e7 Mpc^3 is surveyed in one square field (bias 1.2); a quarter of the volume, more', () => {
    // a cube of side 215 Mpc at z = 0.07: D_M(0.07) = 296 Mpc for h = 0.7, Omega_m = 0.3
    const zc = 0.07;
    const dm = cosmology.transverseComovingDistanceMpc(zc);
    const side = 215;
    const theta = (side / dm) * ARCMIN_PER_RAD;
    // the window whose comoving depth is the side, centred on D_C(zc)
    const dc = cosmology.comovingDistanceMpc(zc);
    const zAt = (d: number) => {
      let lo = 0;
      let hi = 1;
      for (let i = 0; i < 80; i++) {
        const mid = (lo + hi) / 2;
        if (cosmology.comovingDistanceMpc(mid) < d) lo = mid;
        else hi = mid;
      }
      return (lo + hi) / 2;
    };
    const box = (s: number) =>
      sliceUncertainty({
        areaArcmin2: ((s / dm) * ARCMIN_PER_RAD) ** 2,
        aspect: 1,
        zMin: zAt(dc - s / 2),
        zMax: zAt(dc + s / 2),
        cosmology: '{h0: 70, omega_m: 0.3}',
        bias: 1.2,
      }).cv;
    expect(theta).toBeGreaterThan(100);
    const big = box(side);
    expect(driverRobotham(side, side, side)).toBeCloseTo(0.108, 2);
    expect(big).toBeLessThan(0.1);
    expect(big / driverRobotham(side, side, side)).toBeGreaterThan(0.55);
    const small = box(100);
    expect(small).toBeGreaterThan(big * 1.5);
    expect(small / driverRobotham(100, 100, 100)).toBeGreaterThan(0.55);
    expect(small / driverRobotham(100, 100, 100)).toBeLessThan(1);
  });
});
