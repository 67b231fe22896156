/**
 * How a population member of scaled luminosity u = L/L* (or u = 10^(0.4 (M*-M))) is observed at
 * redshift z, for each detection kind. In every kind the observed value is affine in log10 u:
 *
 *   obs = a(z) + slope * log10 u
 *
 * line_flux  (slope +1):   obs = log10 measured line flux [erg s^-1 cm^-2]
 *                          = log10 u + log10(L* T(line (1+z)) / (4 pi D_L^2))
 * Blending (1 + b) and dust (A(z) mag) of src/selection/effects.ts add log10(1 + b) - 0.4 A(z) to a(z)
 * of a line flux and A(z) to K(z) below; the limit in the population's variable is then intrinsic.
 * Lines blended at their own wavelengths add r_i T(line_i (1+z)) to T instead (effects.ts
 * lineTransmission), so a blend is seen wherever one of its lines is in the filter.
 *
 * magnitude  (slope -2.5): obs = apparent AB magnitude = M* - 2.5 log10 u + K(z), where
 *                          K(z) = 5 log10(D_L / 10 pc) - 2.5 log10(1+z)
 *                                 - 2.5 (beta+2) log10(band / ((1+z) rest_wavelength))
 *                                 - 2.5 log10 T_IGM(z)
 *                          so that the absolute-magnitude limit is M_lim(z) = limit - K(z) (docs/survey-file.md).
 *                          beta is the population's own when it gives one, else detection.beta.
 *                          T_IGM = 1 unless detection.igm is madau1995 (src/selection/igm.ts): then the
 *                          Madau 1995 mean transmission at the band's effective wavelength, or averaged
 *                          over detection.band_file when given.
 *                          With detection.sed, K(z) = 5 log10(D_L / 10 pc) + K_QR(z), K_QR by synthetic
 *                          photometry of the spectrum (src/selection/kcorrection.ts, the IGM inside it).
 *                          A population's own sed replaces, for it, detection.sed or the power law.
 * threshold  (slope +1 for a luminosity variable: obs = log10 quantity; -2.5 for a magnitude
 *             variable: obs = absolute magnitude).
 *
 * The hard limit is obs >= obsLimit (slope > 0) or obs <= obsLimit (slope < 0), i.e.
 * log10 u >= (obsLimit - a) / slope in both cases.
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Detection } from '../model/detection.js';
import type { Population } from '../model/population.js';
import { MPC_CM } from '../cosmology/constants.js';
import { bandAveragedMadau1995, bandShapeAveragedMadau1995, madau1995Transmission } from './igm.js';
import { sedKCorrection } from './kcorrection.js';
import type { RestFrame } from '../model/photometry.js';
import { photoZTrueRange } from '../model/photo-z.js';
import { selectionEffects } from './effects.js';

export type HistogramVariable = 'apparent_magnitude' | 'log10_line_flux' | 'log10_quantity' | 'absolute_magnitude';

export interface Observation {
  /** Offset a(z) in obs = a + slope log10 u. */
  a: number;
  slope: number;
  /** The faintest obs counted at this z. */
  obsLimit: number;
  /** log10 of the limit in u = L/L*. -Infinity never occurs: a zero transmission gives +Infinity (nothing detected). */
  log10ULimit: number;
  /** The limit in the population's variable: log10 L (luminosity) or M (magnitude). */
  limitInVariable: number;
  /** Filter transmission relative to the peak (1 without a filter). */
  transmission: number;
}

export interface Observer {
  slope: number;
  variable: HistogramVariable;
  /** Observation at z, given the characteristic luminosity (erg/s or quantity unit) or magnitude at z. */
  at(z: number, characteristic: number): Observation;
}

const FOUR_PI = 4 * Math.PI;
const TEN_PC_MPC = 1e-5;

export function makeObserver(detection: Detection, population: Population, cosmo: FlatCosmology): Observer {
  // Blending and attenuation move obs (src/selection/effects.ts); 0 without them.
  const effects = selectionEffects(detection, population);
  const shift = effects.obsShift;
  switch (detection.kind) {
    case 'line_flux': {
      const line = population.lineAngstrom ?? detection.lineAngstrom;
      if (line === undefined) throw new Error('line_flux detection needs a rest wavelength');
      const through = effects.lineTransmission;
      const log10Limit = Math.log10(detection.limitCgs);
      return {
        slope: 1,
        variable: 'log10_line_flux',
        at(z, lStar) {
          const dlCm = cosmo.luminosityDistanceMpc(z) * MPC_CM;
          const t = through(z);
          const log10Area = Math.log10(FOUR_PI * dlCm * dlCm);
          const dObs = shift(z);
          const a = Math.log10(lStar) + Math.log10(t) - log10Area + dObs;
          const log10U = t > 0 ? log10Limit - a : Infinity;
          return {
            a,
            slope: 1,
            obsLimit: log10Limit,
            log10ULimit: log10U,
            limitInVariable: t > 0 ? log10Limit - Math.log10(t) + log10Area - dObs : Infinity,
            transmission: t,
          };
        },
      };
    }
    case 'magnitude': {
      const { limitMag, bandAngstrom } = detection;
      // the population's own spectral slope, where it gives one, replaces the detection's
      const beta = population.beta ?? detection.beta;
      const rest = population.restWavelengthAngstrom;
      // the population's own spectrum, where it gives one, replaces detection.sed or the power law
      const sed = population.sed ?? detection.sed;
      let kOf: (z: number) => number;
      if (sed) {
        // Synthetic photometry (src/selection/kcorrection.ts); the IGM, if any, inside its integral.
        const frame: RestFrame = population.restBand
          ? { kind: 'band', band: population.restBand }
          : { kind: 'wavelength', angstrom: rest };
        // Tabulated over the redshifts counted: the window, or with photo_z the true range reaching it.
        const zs = detection.photoZ ? photoZTrueRange(population.window, detection.photoZ) : population.window;
        const kSed = sedKCorrection(sed, frame, detection.igm, zs.min, zs.max);
        kOf = (z) => 5 * Math.log10(cosmo.luminosityDistanceMpc(z) / TEN_PC_MPC) + kSed(z);
      } else {
        const igm = igmMagnitude(detection, beta);
        kOf = (z) => apparentMinusAbsolute(cosmo, z, bandAngstrom, rest, beta) + igm(z);
      }
      return {
        slope: -2.5,
        variable: 'apparent_magnitude',
        at(z, mStar) {
          const k = kOf(z) + shift(z);
          const a = mStar + k;
          const mLim = limitMag - k;
          return {
            a,
            slope: -2.5,
            obsLimit: limitMag,
            log10ULimit: (a - limitMag) / 2.5,
            limitInVariable: mLim,
            transmission: 1,
          };
        },
      };
    }
    case 'threshold': {
      const limit = detection.limit;
      if (population.variable === 'luminosity') {
        return {
          slope: 1,
          variable: 'log10_quantity',
          at(z, qStar) {
            const a = Math.log10(qStar);
            const lim = limit.at(z);
            return { a, slope: 1, obsLimit: lim, log10ULimit: lim - a, limitInVariable: lim, transmission: 1 };
          },
        };
      }
      return {
        slope: -2.5,
        variable: 'absolute_magnitude',
        at(z, mStar) {
          const lim = limit.at(z);
          return {
            a: mStar,
            slope: -2.5,
            obsLimit: lim,
            log10ULimit: (mStar - lim) / 2.5,
            limitInVariable: lim,
            transmission: 1,
          };
        },
      };
    }
  }
}

/**
 * The IGM term of K(z): -2.5 log10 T_IGM(z), 0 without attenuation. `beta` weights a band table's
 * average: the population's own spectral slope, else detection.beta.
 */
export function igmMagnitude(
  detection: Extract<Detection, { kind: 'magnitude' }>,
  beta: number,
): (z: number) => number {
  if (detection.igm !== 'madau1995') return () => 0;
  const table = detection.bandTable;
  const band = detection.bandAngstrom;
  // a band given as a shape (allowed beside a population's own sed): averaged over it, as a band_file is
  const shape = detection.spectrumBand;
  if (table) return (z) => -2.5 * Math.log10(bandAveragedMadau1995(table, z, beta));
  if (shape) return (z) => -2.5 * Math.log10(bandShapeAveragedMadau1995(shape, z, beta));
  return (z) => -2.5 * Math.log10(madau1995Transmission(band, z));
}

/**
 * K(z) = m - M for the power-law spectrum f_lambda ~ lambda^beta (docs/survey-file.md, "magnitude"):
 * 5 log10(D_L / 10 pc) - 2.5 log10(1+z) - 2.5 (beta+2) log10(band / ((1+z) rest)).
 */
export function apparentMinusAbsolute(
  cosmo: FlatCosmology,
  z: number,
  bandAngstrom: number,
  restAngstrom: number,
  beta: number,
): number {
  const dl = cosmo.luminosityDistanceMpc(z);
  return (
    5 * Math.log10(dl / TEN_PC_MPC) -
    2.5 * Math.log10(1 + z) -
    2.5 * (beta + 2) * Math.log10(bandAngstrom / ((1 + z) * restAngstrom))
  );
}
