/**
 * A JSON-ready, normalised view of a Survey for the `check` command: plain numbers, units in the
 * key names, parameters that vary with z shown with their source and their values at the ends
 * of the population's window.
 */
import type { Completeness } from '../model/detection.js';
import { photoZTrueRange, type PhotoZ } from '../model/photo-z.js';
import type { Survey } from '../model/survey.js';
import type { BiasSource, ZParam } from '../model/zparam.js';
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import type { ParameterView, SurveyCheck } from '../model/outputs/check.js';
import type { CompletenessBlock } from '../model/outputs/shared.js';
import { describeSelection } from '../selection/describe.js';
import { describeUncertainty } from '../model/model-uncertainty.js';
import { checkSurvey } from '../model/arguments.js';

/** A parameter as written in the file, with its normalised value at the window's ends when it varies. */
export function parameterView(p: ZParam<BiasSource>, window: { min: number; max: number }): ParameterView {
  if (p.constant) return p.at(window.min);
  return { as_written: p.source, at_window_min: p.at(window.min), at_window_max: p.at(window.max) };
}

function describeCompleteness(c: Completeness | undefined): CompletenessBlock | undefined {
  if (!c) return undefined;
  if (c.model === 'logistic') return { model: 'logistic', half: c.half, width: c.width };
  return { model: 'table', x: c.x, fraction: c.fraction };
}

/** detection.photo_z with the true redshifts it integrates (src/model/photo-z.ts). */
function photoZView(
  pz: PhotoZ | undefined,
  survey: Survey,
): { sigma: number; outlier_fraction: number; true_range: { min: number; max: number } } | undefined {
  if (!pz) return undefined;
  return {
    sigma: pz.sigma,
    outlier_fraction: pz.outlierFraction,
    true_range: photoZTrueRange(survey.populations[0]!.window, pz),
  };
}

/** Remove undefined members so the view prints cleanly as JSON. */
function clean<T extends object>(o: T): T {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as T;
}

/** The survey as `check` prints it (specs/check.schema.json, less the warnings the command adds). */
export function describeSurvey(survey: Survey): Omit<SurveyCheck, 'warnings'> {
  checkSurvey(survey, 'describeSurvey');
  const c = survey.cosmology;
  const d = survey.detection;
  const win = survey.redshift;
  let detection: SurveyCheck['detection'];
  if (d.kind === 'line_flux') {
    detection = clean({
      kind: d.kind,
      limit_cgs: d.limitCgs,
      limit_jy_km_s: d.limitGivenJyKms,
      line_angstrom: d.lineAngstrom,
      filter: d.filter
        ? clean({
            center_angstrom: d.filter.centerAngstrom,
            fwhm_angstrom: d.filter.fwhmAngstrom,
            profile: d.filter.profile,
            file: d.filter.table?.file,
          })
        : undefined,
      completeness: describeCompleteness(d.completeness),
    });
  } else if (d.kind === 'magnitude') {
    detection = clean({
      kind: d.kind,
      limit_mag: d.limitMag,
      limit_jy: d.limitGivenJy,
      band_angstrom: d.bandAngstrom,
      band_ghz: d.bandGivenHz === undefined ? undefined : d.bandGivenHz / 1e9,
      band_file: d.bandTable?.file,
      system: d.magnitudeSystem?.system,
      vega_to_ab: d.magnitudeSystem?.vegaToAb,
      sed_file: d.sed?.spectrum.file,
      // the band's shape: detection.sed's, or the one the populations' own spectra go through
      band: d.spectrumBand
        ? {
            profile: d.spectrumBand.profile,
            center_angstrom: d.spectrumBand.centerAngstrom,
            fwhm_angstrom: d.spectrumBand.fwhmAngstrom,
          }
        : undefined,
      beta: d.beta,
      igm: d.igm,
      photo_z: photoZView(d.photoZ, survey),
      completeness: describeCompleteness(d.completeness),
    });
  } else {
    detection = clean({
      kind: d.kind,
      limit: parameterView(d.limit, win),
      photo_z: photoZView(d.photoZ, survey),
      completeness: describeCompleteness(d.completeness),
    });
  }
  return clean({
    format: survey.format,
    file: survey.file,
    title: survey.title,
    // The outputs' cosmology block (src/model/cosmology-json.ts), with the preset's name shown first.
    cosmology: clean({ preset: c.preset, preset_source: c.presetSource, ...cosmologyJsonOf(c) }),
    area_deg2: survey.areaDeg2,
    area_sr: survey.areaSr,
    window: { min: win.min, max: win.max },
    field: { aspect: survey.field.aspect, count: survey.field.count },
    exposure_hours: survey.exposureHours,
    detection,
    populations: survey.populations.map((p) =>
      clean({
        name: p.name,
        shape: p.shape,
        variable: p.variable,
        quantity: p.quantity,
        window: { min: p.window.min, max: p.window.max },
        phi_star_mpc3: parameterView(p.phiStar, p.window),
        l_star: p.lStar ? parameterView(p.lStar, p.window) : undefined,
        m_star: p.mStar ? parameterView(p.mStar, p.window) : undefined,
        alpha: parameterView(p.alpha, p.window),
        components:
          p.components.length > 1
            ? p.components.map((c) => ({
                phi_star_mpc3: parameterView(c.phiStar, p.window),
                alpha: parameterView(c.alpha, p.window),
              }))
            : undefined,
        sfr_conversion: p.sfrConversion ? { name: p.sfrConversion.name, factor: p.sfrConversion.factor } : undefined,
        slice_edges: p.sliceEdges,
        line_angstrom: p.lineAngstrom,
        rest_wavelength_angstrom: p.variable === 'magnitude' ? p.restWavelengthAngstrom : undefined,
        rest_band: p.restBand
          ? clean({
              profile: p.restBand.profile,
              center_angstrom: p.restBand.centerAngstrom,
              fwhm_angstrom: p.restBand.fwhmAngstrom,
              file: p.restBand.table?.file,
            })
          : undefined,
        magnitude_system:
          p.variable === 'magnitude'
            ? clean({
                stated: 'ab' as const,
                m_star_given: p.magnitudeSystem?.system ?? ('ab' as const),
                vega_to_ab: p.magnitudeSystem?.vegaToAb,
              })
            : undefined,
        k_correction:
          d.kind === 'magnitude'
            ? p.sed
              ? {
                  method: 'spectrum' as const,
                  spectrum_file: p.sed.spectrum.file,
                  spectrum_from: 'population' as const,
                }
              : d.sed
                ? { method: 'spectrum' as const, spectrum_file: d.sed.spectrum.file }
                : p.beta !== undefined
                  ? { method: 'power_law' as const, beta: p.beta, beta_from: 'population' as const }
                  : { method: 'power_law' as const, beta: d.beta }
            : undefined,
        bias: p.bias === 'auto' ? 'auto' : parameterView(p.bias, p.window),
        occupation: p.occupation,
        selection: describeSelection(d, p),
        model_uncertainty: p.modelUncertainty ? describeUncertainty(p.modelUncertainty) : undefined,
      }),
    ),
    slices: { count: survey.sliceEdges.length - 1, edges: survey.sliceEdges },
    histogram_width: survey.histogramWidth,
  });
}
