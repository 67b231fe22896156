/**
 * Published surveys whose selection is more than a flux limit, as checks of the selection keys
 * against what real surveys found: narrow-band H-alpha surveys whose limit is on the blended
 * H-alpha + [NII] flux with a dust-corrected luminosity function (`blend_ratio`, `attenuation`),
 * a narrow-band Lyman-alpha survey at z = 6.6, and a colour-selected (BzK) count with a
 * `redshift_selection`. The surveys' numbers and the luminosity functions are recalled FROM
 * MEMORY (named beside each check). Each check has two parts:
 * - the integral itself against an independent scipy integration of the same model, to 1e-6
 *   (test/reference/generate/selection_published_counts.py, scipy 1.10.1: comoving distance,
 *   dV/dz, the Schechter integral above the limit with the blend and the attenuation, or the
 *   magnitude limit through D_L and the colour term with the redshift selection, by quad);
 * - the published count against the prediction, within twice the model's own spread (Poisson
 *   noise and cosmic variance at the bias stated) or, where the k-correction dominates, between
 *   the counts of the two ends of its plausible range.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';

const close = (got: number, want: number, rel: number) => expect(Math.abs(got / want - 1)).toBeLessThan(rel);

/** A HiZELS-like narrow-band H-alpha survey: a top-hat filter, the Sobral et al. 2013 function. */
function hizels(o: {
  area: number;
  limit: string;
  center: string;
  fwhm: string;
  logPhi: number;
  logL: number;
  alpha: number;
  blend: number;
  bias: string;
  /** [NII] 6583.45 and 6548.05 at their own wavelengths (3 : 1 of the blend) instead of blend_ratio. */
  lines?: boolean;
}): string {
  return `format: 1
title: HiZELS-like narrow-band H-alpha survey (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: ${o.area}
detection:
  kind: line_flux
  limit: "${o.limit} erg/s/cm^2"
  line: "6562.8 Angstrom"
  filter: {center: "${o.center}", fwhm: "${o.fwhm}", profile: tophat}
population:
  name: H-alpha emitters
  variable: luminosity
  log10_phi_star: ${o.logPhi}
  log10_l_star: ${o.logL}
  alpha: ${o.alpha}
  attenuation: 1.0
  ${o.lines ? `blended_lines: [{line: 6583.45, ratio: ${0.75 * o.blend}}, {line: 6548.05, ratio: ${0.25 * o.blend}}]` : `blend_ratio: ${o.blend}`}
  ${o.bias}
slices: {count: 1}
`;
}

/**
 * The two HiZELS-like surveys (from memory, as the tests below cite): NB_K at z = 2.23 over 0.6
 * deg^2 above 1e-16 erg/s/cm^2, and NB_J at z = 0.84 over 1.3 deg^2 above 8e-17, each with the
 * Sobral et al. 2013 function's log10 phi* and log10 L* at its redshift.
 */
const z223 = { area: 0.6, limit: '1e-16', center: '2.121 um', fwhm: '210 Angstrom', logPhi: -2.78, logL: 42.87 };
const z084 = { area: 1.3, limit: '8e-17', center: '1.211 um', fwhm: '150 Angstrom', logPhi: -2.47, logL: 42.25 };

describe('published surveys selected by blended line flux, dust and colour (from memory; the model spread as tolerance)', () => {
  // Sobral et al. 2013, MNRAS 428, 1128 (from memory): the H-alpha functions of HiZELS, corrected
  // for [NII] and for 1 mag of dust (A_Halpha = 1), alpha free. The surveys' limits are on the
  // narrow-band excess, H-alpha + [NII] 6548,6584, so the file gives `attenuation: 1.0` (the
  // function intrinsic) and `blend_ratio` ([NII]/H-alpha, about 0.33 at z ~ 1 and lower, about
  // 0.2, at z ~ 2 where the emitters are less metal-rich; common practice, Sobral et al. correct
  // with an equivalent-width relation of that size).
  test('HiZELS at z = 2.23 in NB_K (2.121 um, 210 A): 55 H-alpha emitters above 1e-16 erg/s/cm^2 in 0.60 deg^2 (Geach et al. 2008, MNRAS 388, 1473; from memory)', () => {
    // Sobral et al. 2013 at z = 2.23: log10 phi* = -2.78, log10 L* = 42.87, alpha = -1.59;
    // emitters' bias about 2.4 (Geach et al. 2012, MNRAS 426, 679; from memory)
    const text = (blend: number) =>
      hizels({
        ...z223,
        alpha: -1.59,
        blend,
        bias: 'bias: 2.4',
      });
    const p = predict(loadSurveyText(text(0.2), 'hizels-z2.23.yaml'));
    // scipy (selection_published_counts.py): 57.124524893677204, and 37.326559202102864 unblended
    close(p.totals.count, 57.124524893677204, 1e-6);
    close(predict(loadSurveyText(text(0), 'hizels-z2.23-unblended.yaml')).totals.count, 37.326559202102864, 1e-6);
    // 55 observed lies 0.1 sigma below: Poisson 13 % and cosmic variance 27 % at bias 2.4 (with the
    // limit read as pure H-alpha, 37.3, it would lie 1.5 sigma above: a limit on the narrow-band
    // excess taken for H-alpha alone loses a third of the emitters; with the blend averaged over the
    // filter as the docs advise, 51.1, below, 55 lies 0.25 sigma above)
    const u = p.totals.uncertainty!;
    expect(u.bias).toBeCloseTo(2.4, 9);
    expect(Math.abs(55 - p.totals.count)).toBeLessThan(2 * u.total_fraction * p.totals.count);
  });

  test("HiZELS at z = 2.23: the emitters' measured bias about 2.4 (Geach et al. 2012, MNRAS 426, 679; from memory) against bias auto: 3.16 with every matched halo hosting one, 2.46 with occupation 0.2 (docs/survey-file.md)", () => {
    const auto = (occupation: string) =>
      predict(
        loadSurveyText(
          hizels({
            ...z223,
            alpha: -1.59,
            blend: 0.2,
            lines: true,
            bias: occupation,
          }),
          'hizels-z2.23-auto.yaml',
        ),
      ).totals.uncertainty!;
    // Abundance matching with occupation 1 puts the emitters in the rarest, most massive haloes, so
    // its bias lies about 30 % above the measured one (and so does the cosmic variance shown); a
    // star-forming phase seen in a fifth of the haloes above the matched mass brings it to the
    // measurement (the measured host haloes, about 1e12 Msun, from memory as above)
    const one = auto('');
    expect(one.bias).toBeGreaterThan(3.0);
    expect(one.bias).toBeLessThan(3.3);
    const fifth = auto('occupation: 0.2');
    expect(Math.abs(fifth.bias - 2.4)).toBeLessThan(0.15);
    expect(fifth.halo_mass_min_msun!).toBeGreaterThan(5e11);
    expect(fifth.halo_mass_min_msun!).toBeLessThan(2e12);
    // a lower occupation never raises the bias (less massive haloes; common practice)
    expect(fifth.bias).toBeLessThan(one.bias);
  });

  test('HiZELS at z = 0.84 in NB_J (1.211 um, 150 A): 743 H-alpha emitters above 8e-17 erg/s/cm^2 in 1.3 deg^2 of COSMOS (Sobral et al. 2009, MNRAS 398, 75; from memory)', () => {
    // Sobral et al. 2013 at z = 0.84: log10 phi* = -2.47, log10 L* = 42.25, alpha = -1.56; bias
    // matched to haloes (auto: 1.22 here; the emitters' r0 of about 2.7 Mpc/h, Sobral et al. 2010,
    // from memory, is a bias near 1.2)
    const text = (blend: number) =>
      hizels({
        ...z084,
        alpha: -1.56,
        blend,
        bias: '',
      });
    const p = predict(loadSurveyText(text(0.33), 'hizels-z0.84.yaml'));
    // the window is the filter's: (12110 -+ 75) / 6562.8 - 1 (definition of a top hat)
    expect(p.slices![0]!.z_min).toBeCloseTo(12035 / 6562.8 - 1, 9);
    expect(p.slices![0]!.z_max).toBeCloseTo(12185 / 6562.8 - 1, 9);
    // scipy (selection_published_counts.py): 846.6762892780268, and 588.004271072772 unblended
    close(p.totals.count, 846.6762892780268, 1e-6);
    close(predict(loadSurveyText(text(0), 'hizels-z0.84-unblended.yaml')).totals.count, 588.004271072772, 1e-6);
    // 743 observed lies 0.5 sigma below: Poisson 3.4 % and cosmic variance 25 % in one field (0.2
    // sigma below 786.9, the count with the blend averaged over the filter, below)
    const u = p.totals.uncertainty!;
    expect(Math.abs(743 - p.totals.count)).toBeLessThan(2 * u.total_fraction * p.totals.count);
  });

  test('narrow-band [NII] blending line by line (docs/survey-file.md): blended_lines at 6583.45 and 6548.05 A count what the two [NII] lines placed one by one count, for both HiZELS-like surveys, and the published counts lie within the model spread of them', () => {
    const high = predict(
      loadSurveyText(
        hizels({ ...z223, alpha: -1.59, blend: 0.2, bias: 'bias: 2.4', lines: true }),
        'hizels-nii-z2.23.yaml',
      ),
    );
    const low = predict(
      loadSurveyText(hizels({ ...z084, alpha: -1.56, blend: 0.33, bias: '', lines: true }), 'hizels-nii-z0.84.yaml'),
    );
    // scipy (selection_published_counts.py, each line counted where it falls inside the top hat,
    // [NII] alone beyond H-alpha's window too): 51.208256098387636 and 797.4806185625769
    close(high.totals.count, 51.208256098387636, 1e-6);
    close(low.totals.count, 797.4806185625769, 1e-6);
    // Geach et al. 2008's 55 lies 0.24 sigma above 51.2 (Poisson 14 %, cosmic variance 28 % at bias
    // 2.4); Sobral et al. 2009's 743 lies 0.27 sigma below 797.5 (Poisson 3.5 %, cosmic variance 25 %
    // at the matched bias 1.24): both within one sigma
    for (const [p, seen] of [
      [high, 55],
      [low, 743],
    ] as const) {
      const u = p.totals.uncertainty!;
      expect(Math.abs(seen - p.totals.count)).toBeLessThan(u.total_fraction * p.totals.count);
    }
  });

  test('narrow-band [NII] blending averaged over a top hat: blend_ratio b (1 - 19 (1 + z) A / FWHM) comes near what the two [NII] lines placed one by one count, for both HiZELS-like surveys', () => {
    // the blend at H-alpha's own transmission over the whole window overstates it near the top
    // hat's edges, where [NII] 6584 (6548) has left the filter within 20.65 (14.75) (1 + z) A of them;
    // the docs' rule averages it over the window (6584 three times 6548: 19.2 (1 + z) A)
    const rule = (ratio: number, centre: number, fwhm: number) => ratio * (1 - (19 * centre) / 6562.8 / fwhm);
    const count = (o: Parameters<typeof hizels>[0]) =>
      predict(loadSurveyText(hizels(o), 'hizels-rule.yaml'), { noUncertainty: true }).totals.count;
    // scipy (selection_published_counts.py, each line counted where it falls inside the filter,
    // [NII] alone beyond H-alpha's window too): 51.208256098387636 and 797.4806185625769. Within
    // 0.5 % at z = 2.23 (skytally 51.06) and 2 % at z = 0.84 (786.9: the 11 emitters detected by
    // [NII] alone with H-alpha outside the filter are not in a count over H-alpha's window)
    close(count({ ...z223, alpha: -1.59, blend: rule(0.2, 21210, 210), bias: '' }), 51.208256098387636, 0.005);
    close(count({ ...z084, alpha: -1.56, blend: rule(0.33, 12110, 150), bias: '' }), 797.4806185625769, 0.02);
  });

  test('z = 6.6 in NB921 over the SXDS: 207 Lyman-alpha emitters in about 1 deg^2 (Ouchi et al. 2010, ApJ 723, 869; from memory)', () => {
    // The paper's function (from memory): L* = 4.4e42 erg/s, phi* = 8.5e-4 Mpc^-3, alpha = -1.5
    // fixed. NB921 (9196 A, FWHM 132 A) as a top hat; its limit NB921 < 26.0 AB as a line flux
    // with the continuum neglected: 1.445e-30 erg/s/cm^2/Hz over 132 A at 9196 A is 6.8e-18
    // (common practice). The emitters' selection (rest equivalent width above about 14 A) is the
    // function's own, so no `equivalent_width_cut` is given. Bias 3.6 as measured at z = 5.7
    // (Ouchi et al. 2010; from memory).
    const text = `format: 1
title: Ouchi-like z = 6.6 Lyman-alpha emitters in NB921 (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
detection: {kind: line_flux, limit: 6.8e-18, line: 1215.67, filter: {center: 9196, fwhm: 132, profile: tophat}}
population: {name: LAEs, variable: luminosity, phi_star: 8.5e-4, l_star: 4.4e42, alpha: -1.5, bias: 3.6}
slices: {count: 1}
`;
    const p = predict(loadSurveyText(text, 'ouchi-z6.6.yaml'));
    // scipy (selection_published_counts.py): 228.3952674947131
    close(p.totals.count, 228.3952674947131, 1e-6);
    // 207 observed lies 0.8 sigma below: Poisson 6.6 % and cosmic variance 10.5 % at bias 3.6
    const u = p.totals.uncertainty!;
    expect(Math.abs(207 - p.totals.count)).toBeLessThan(2 * u.total_fraction * p.totals.count);
  });

  test('star-forming BzK galaxies to K(Vega) < 20: about 1.2 per arcmin^2 (Daddi et al. 2004, ApJ 617, 746; Kong et al. 2006, ApJ 638, 72; from memory), with the Cirasuolo et al. 2010 K-band function and the colour cut as a redshift selection', () => {
    // Cirasuolo et al. 2010 (from memory, as the K20 check of deep-field-surveys.test.ts):
    // M*(z) = -22.26 - (z / 1.78)^0.47 (AB, rest K), phi*(z) = 3.5e-3 exp(-(z / 1.70)^1.47) Mpc^-3,
    // alpha = -1.07; K_s vega_to_ab 1.85. The sBzK cut keeps the star-forming galaxies of
    // 1.4 < z < 2.5: the window, and `redshift_selection: 0.8` for the share that is not passive
    // (passive BzK galaxies are about a quarter as many as star-forming ones at K < 20; from
    // memory). At these redshifts K sees rest 0.6-0.9 um: the colour term between there and rest
    // K is the uncertain part, a spectrum flat in f_nu (beta = -2, as the K20 check) or one
    // 0.6 mag redder over that range in AB (beta = -1.5; common practice for star-forming galaxies).
    const text = (beta: number) => `format: 1
title: sBzK-like count to K(Vega) < 20 (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "1 arcmin^2"
redshift: {min: 1.4, max: 2.5}
detection:
  kind: magnitude
  system: vega
  vega_to_ab: 1.85
  limit: 20
  band: "2.2 um"
  beta: ${beta}
  redshift_selection: 0.8
population:
  name: star-forming galaxies
  variable: magnitude
  rest_wavelength: "2.2 um"
  phi_star: "3.5e-3*exp(-(z/1.70)^1.47)"
  m_star: "-22.26 - (z/1.78)^0.47"
  alpha: -1.07
slices: {count: 1}
`;
    const flat = predict(loadSurveyText(text(-2), 'bzk-flat.yaml'), { noUncertainty: true }).totals.count;
    const red = predict(loadSurveyText(text(-1.5), 'bzk-red.yaml'), { noUncertainty: true }).totals.count;
    // scipy (selection_published_counts.py): 1.3228189951002862 and 0.6300726908343054
    close(flat, 1.3228189951002862, 1e-6);
    close(red, 0.6300726908343054, 1e-6);
    // the published density lies between the two ends of the colour term (1.32 and 0.63 per
    // arcmin^2: it is 0.91 and 1.9 times them): Poisson and cosmic variance over the surveys' several
    // hundred arcmin^2 are a few per cent, the colour term a factor of 2
    expect(1.2).toBeLessThan(flat);
    expect(1.2).toBeGreaterThan(red);
  });

  test("a stricter equivalent-width cut than the function's own (docs/survey-file.md): z = 2.2 Lyman-alpha emitters of rest width above 20 A (Konno et al. 2016, ApJ 823, 20; from memory) cut at 50 A keep exp(-30 / W0) of them for exponential widths", () => {
    // Konno et al. 2016 (from memory): L* = 5.29e42 erg/s, phi* = 6.32e-4 Mpc^-3, alpha = -1.75, of
    // emitters above 20 A at rest; widths exponential with W0 = 50 A at z ~ 2 (Ciardullo et al.
    // 2012, ApJ 744, 110; from memory). NB387 as a top hat at 3870 A, FWHM 94 A (from memory).
    const text = (cut: string) => `format: 1
title: Konno-like z = 2.2 Lyman-alpha emitters (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1.43
detection: {kind: line_flux, limit: 2e-17, line: 1215.67, filter: {center: 3870, fwhm: 94, profile: tophat}${cut}}
population:
  name: LAEs
  variable: luminosity
  phi_star: 6.32e-4
  l_star: 5.29e42
  alpha: -1.75
  bias: 1.8
${cut ? '  equivalent_widths: {model: exponential, scale: 50}\n' : ''}slices: {count: 1}
`;
    const all = predict(loadSurveyText(text(''), 'konno-like.yaml'), { noUncertainty: true }).totals.count;
    const strict = predict(loadSurveyText(text(', equivalent_width_cut: {rest: 30}'), 'konno-50a.yaml'), {
      noUncertainty: true,
    }).totals.count;
    // an exponential is memoryless: P(W > 50 | W > 20) = exp(-(50 - 20) / 50) (definition); the
    // count is that fraction of the function's own to rounding
    close(strict / all, Math.exp(-30 / 50), 1e-12);
  });
});
