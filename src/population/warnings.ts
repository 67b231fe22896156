/**
 * Warnings about a survey file as written that need no counting: values that pass every check
 * but are almost certainly mistakes. Each command that reads a survey file carries them in its
 * output (src/warnings.ts).
 */
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import type { ZParam } from '../model/zparam.js';
import { warning, type Warning } from '../warnings.js';
import { exponential, precise } from '../render/format.js';
import { selectionWarnings } from '../selection/warnings.js';

/**
 * Below this a line or continuum luminosity [erg/s] is implausible for a galaxy: the faintest
 * galaxies whose line luminosity functions are measured reach about 1e38 erg/s (common practice;
 * the Sun is 3.8e33 erg/s in all), and a number like 42 or 43 is a log10 given as a linear value.
 */
export const MIN_PLAUSIBLE_LUMINOSITY_ERG_S = 1e30;
/**
 * Characteristic absolute magnitudes of galaxy luminosity functions lie between about -24 and
 * -17 (common practice); outside -30 to -10, M* is almost certainly an apparent magnitude or a
 * sign slip.
 */
export const PLAUSIBLE_M_STAR = { brightest: -30, faintest: -10 } as const;

/**
 * Above this a Schechter normalisation [Mpc^-3] is implausible for galaxies: the densest measured
 * luminosity and mass functions have phi* of a few 1e-2 Mpc^-3 (common practice), and a value
 * near 1 is what a linear phi* (0.001) written under a log10 key (10^0.001) gives.
 */
export const MAX_PLAUSIBLE_PHI_STAR_MPC3 = 0.5;

/** HI 21 cm's rest wavelength [Angstrom]: c / 1420.405751768 MHz (common practice). */
const HI_ANGSTROM = 2110611405;
/**
 * The luminosity of the HI line per solar mass of HI [erg/s]: M_HI = 2.356e5 D_L^2 S (Msun, Mpc,
 * Jy km/s; common practice) with L = 4 pi D_L^2 S nu / c (docs/survey-file.md, "Radio lines").
 */
export const HI_ERG_S_PER_MSUN = 2.406176e25;

const fmt = (x: number): string => precise(x, 4);
const expText = (x: number): string => exponential(x, 4);

/** " at z = 1.2" where a parameter varies with z; nothing for a constant, the same at every z. */
function atZ(p: ZParam, z: number): string {
  return p.constant ? '' : ` at z = ${fmt(z)}`;
}

/** The window's ends and middle: where a parameter in z is looked at. */
function probeRedshifts(p: Population): number[] {
  const { min, max } = p.window;
  return min === max ? [min] : [min, 0.5 * (min + max), max];
}

/** A luminosity or magnitude of each population that is implausible for its kind. */
export function luminosityWarnings(survey: Survey): Warning[] {
  const out: Warning[] = [];
  for (const p of survey.populations) {
    const zs = probeRedshifts(p);
    // For the threshold kind a luminosity-like variable is a free quantity (a mass, a rate, ...)
    // with no unit the program knows, so only luminosities in erg/s are judged.
    if (p.variable === 'luminosity' && p.lStar && survey.detection.kind !== 'threshold') {
      const values = zs.map((z) => ({ z, v: p.lStar!.at(z) }));
      const low = values.find((x) => x.v < MIN_PLAUSIBLE_LUMINOSITY_ERG_S);
      if (low) {
        const asLog = low.v > 30 && low.v < 50;
        // an HI mass function's M* in solar masses, given as the line's luminosity
        const line =
          p.lineAngstrom ?? (survey.detection.kind === 'line_flux' ? survey.detection.lineAngstrom : undefined);
        const hiMass = line !== undefined && Math.abs(line / HI_ANGSTROM - 1) < 1e-3 && low.v >= 1e5 && low.v <= 1e13;
        out.push(
          warning(
            'implausible_luminosity',
            `${p.name}: L* = ${fmt(low.v)} erg/s${atZ(p.lStar, low.z)} is far below any galaxy's luminosity (under ${expText(MIN_PLAUSIBLE_LUMINOSITY_ERG_S)} erg/s), so almost nothing is detected` +
              (asLog
                ? `; it looks like a log10: write log10_l_star: ${fmt(low.v)} (or l_star: ${expText(10 ** low.v)})`
                : hiMass
                  ? `; it looks like an HI mass in Msun: the line's luminosity is ${expText(HI_ERG_S_PER_MSUN)} erg/s per Msun, so write log10_l_star: ${fmt(Math.log10(low.v * HI_ERG_S_PER_MSUN))}`
                  : '; give l_star in erg/s or log10_l_star'),
          ),
        );
      }
    }
    if (p.variable === 'magnitude' && p.mStar) {
      const odd = zs
        .map((z) => ({ z, v: p.mStar!.at(z) }))
        .find((x) => x.v > PLAUSIBLE_M_STAR.faintest || x.v < PLAUSIBLE_M_STAR.brightest);
      if (odd) {
        out.push(
          warning(
            'implausible_luminosity',
            `${p.name}: M* = ${fmt(odd.v)}${atZ(p.mStar, odd.z)} is not a plausible absolute magnitude for galaxies (expected between ${PLAUSIBLE_M_STAR.brightest} and ${PLAUSIBLE_M_STAR.faintest})` +
              (odd.v > 0
                ? '; it looks like an apparent magnitude: give m_star as an absolute AB magnitude'
                : '; check m_star'),
          ),
        );
      }
    }
  }
  return out;
}

/** A normalisation of each population (each component of a double Schechter) implausibly high for galaxies. */
export function densityWarnings(survey: Survey): Warning[] {
  const out: Warning[] = [];
  for (const p of survey.populations) {
    const zs = probeRedshifts(p);
    for (const [i, c] of p.components.entries()) {
      const high = zs.map((z) => ({ z, v: c.phiStar.at(z) })).find((x) => x.v > MAX_PLAUSIBLE_PHI_STAR_MPC3);
      if (!high) continue;
      const key = c.phiKey ?? (p.components.length > 1 ? `phi_star_${i + 1}` : 'phi_star');
      const hint = key.startsWith('log10_')
        ? `; if ${key} holds a linear value, write it under ${key.slice('log10_'.length)} (the log10 of a galaxy population's phi* is below 0)`
        : `; check ${key} (a number density in Mpc^-3)`;
      out.push(
        warning(
          'implausible_density',
          `${p.name}: phi*${p.components.length > 1 ? ` of component ${i + 1}` : ''} = ${fmt(high.v)} Mpc^-3${atZ(c.phiStar, high.z)} is far above any galaxy population's (above ${MAX_PLAUSIBLE_PHI_STAR_MPC3} Mpc^-3; the densest have a few 1e-2), so every count is inflated${hint}`,
        ),
      );
    }
  }
  return out;
}

/** Every warning about the survey file itself (before any count). */
export function surveyWarnings(survey: Survey): Warning[] {
  return [...luminosityWarnings(survey), ...densityWarnings(survey), ...selectionWarnings(survey)];
}
