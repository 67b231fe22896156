/** How a survey detects its sources: the detection kinds, filters and bands, completeness. */
import type { ZParam } from './zparam.js';
import type { PhotoZ } from './photo-z.js';
import type { FluxDensityUnit, MagnitudeSystemGiven, SedPhotometry } from './photometry.js';
import type { DetectionSelection } from './selection.js';

export type FilterProfile = 'tophat' | 'gaussian' | 'table';

/**
 * A tabulated transmission curve read from a CSV file (src/survey/transmission-file.ts):
 * wavelengths in Angstrom, strictly increasing; transmission relative to its peak (max 1),
 * linear between rows and 0 outside the table.
 */
export interface TransmissionTable {
  /** The file as written in the survey (relative to the survey file). */
  file: string;
  wavelengthAngstrom: number[];
  transmission: number[];
}

export interface Filter {
  /** tophat/gaussian: as given. table: the transmission-weighted mean wavelength. */
  centerAngstrom: number;
  /** tophat/gaussian: as given. table: the distance between the outermost half-peak crossings. */
  fwhmAngstrom: number;
  profile: FilterProfile;
  /** The curve, for profile table. */
  table?: TransmissionTable;
}

/** Intergalactic attenuation applied to magnitude surveys. */
export type IgmModel = 'none' | 'madau1995';

export type Completeness =
  | { model: 'logistic'; half: number; width: number } // half, width in the completeness variable x
  | { model: 'table'; x: number[]; fraction: number[] }; // x ascending in the completeness variable

/**
 * The completeness variable x (docs/survey-file.md, "Completeness"): observed AB magnitude (magnitude kind),
 * -log10(measured line flux / erg s^-1 cm^-2) (line_flux kind; a half given as a flux is stored
 * as -log10 of it, and table x as -log10 flux, sorted ascending), log10 quantity or absolute
 * magnitude (threshold kind). Completeness falls as x grows in every kind.
 */
export type Detection = DetectionSelection &
  (
    | {
        kind: 'line_flux';
        limitCgs: number; // erg s^-1 cm^-2, faintest line flux counted (at peak transmission)
        limitGivenJyKms?: number; // detection.limit given as a velocity-integrated flux, Jy km/s (limitCgs = it x nu_line / c)
        lineAngstrom?: number; // default rest wavelength when a population gives none
        filter?: Filter;
        completeness?: Completeness;
      }
    | {
        kind: 'magnitude';
        limitMag: number; // apparent AB magnitude (a Vega limit converted once; completeness too)
        limitGivenJy?: number; // detection.limit given as a flux density, Jy (limitMag is its AB magnitude)
        limitGivenUnit?: FluxDensityUnit; // the unit it was written in (the outputs quote limits in it beside AB)
        bandAngstrom: number; // effective wavelength of the band (from band_file when band is not given)
        bandGivenHz?: number; // detection.band given as a frequency, Hz (bandAngstrom = c / nu)
        beta: number; // f_lambda ~ lambda^beta
        igm: IgmModel; // default 'none'
        igmStated?: boolean; // true when the file gives detection.igm (a warning asks for it near Lyman alpha)
        bandTable?: TransmissionTable; // detection.band_file: the band's transmission curve
        sed?: SedPhotometry; // detection.sed: k-corrections by synthetic photometry instead of beta
        spectrumBand?: Filter; // the band's shape, with detection.sed (its band) or a population's own sed
        magnitudeSystem?: MagnitudeSystemGiven; // detection.system vega: how the limit was given
        completeness?: Completeness;
        photoZ?: PhotoZ; // detection.photo_z: slices are in measured (photometric) redshift
      }
    | {
        kind: 'threshold';
        limit: ZParam; // log10 quantity (luminosity variable) or absolute magnitude (magnitude variable)
        completeness?: Completeness;
        photoZ?: PhotoZ; // detection.photo_z: slices are in measured (photometric) redshift
      }
  );

export type DetectionKind = Detection['kind'];
