/**
 * Rest-frame spectra (detection.sed.file): rows "wavelength, flux" in the format of the
 * transmission files (src/survey/transmission-file.ts: the same reader, header and unit rules,
 * size caps). The flux is f_lambda in any unit (only ratios enter the k-corrections), 0 or more,
 * with some row above 0; it is read linearly between rows and never extrapolated.
 *
 * A header's second column may say that the rows hold another quantity, which each row turns into
 * f_lambda at its own wavelength (the constant c does not matter):
 *   f_nu, fnu, l_nu, s_nu (optionally with a unit: f_nu_mjy, f_nu[mjy]), or a jansky unit (jy, flux_mjy, flux[mjy])
 *                                             -> f_lambda = f_nu / lambda^2
 *   nu_f_nu, nufnu, nu_l_nu, lambda_f_lambda  -> f_lambda = (nu f_nu) / lambda
 *   a name starting with log                  -> refused (the rows must be linear)
 *   anything else (f_lambda, flux, ...)       -> f_lambda as written
 * Far-infrared and submillimetre spectra are usually tabulated in f_nu or nu L_nu: read as f_lambda
 * they would give k-corrections wrong by 5 log10 of the band's stretch (a factor of 80 in an
 * 850 um count).
 */
import type { InputFile } from '../model/survey.js';
import type { Spectrum } from '../model/photometry.js';
import { readWavelengthTable } from './transmission-file.js';

/** How the rows of a spectrum file are read, from its header's second column (lower case). */
export function spectrumColumn(header: string | undefined): 'f_lambda' | 'f_nu' | 'nu_f_nu' | 'log' {
  if (header === undefined) return 'f_lambda';
  if (header.startsWith('log')) return 'log';
  // a unit may follow the name: f_nu_mjy, f_nu[mjy], f_nu(mjy), f_nu/mjy
  if (/^(nu_?[fl]_?nu|lambda_?[fl]_?lambda|lam_?[fl]_?lam)([_[(/].*)?$/.test(header)) return 'nu_f_nu';
  if (/^[fls]_?nu([_[(/].*)?$/.test(header) || /(^|[_[(/])[muµn]?jy[\])]?$/.test(header)) return 'f_nu';
  return 'f_lambda';
}

export function readSpectrumFile(
  path: string,
  surveyFile: string,
  keyPath: string,
  baseDir: string,
  record?: (input: InputFile) => void,
): Spectrum {
  const t = readWavelengthTable(
    path,
    surveyFile,
    keyPath,
    baseDir,
    { subject: 'spectrum file', column: 'f_lambda' },
    record,
  );
  const column = spectrumColumn(t.valueHeader);
  if (column === 'log')
    t.bad(
      `names its second column "${t.valueHeader}", a logarithm`,
      'give the flux itself (f_lambda, f_nu or nu f_nu, named in the header), not its log10',
    );
  if (!t.values.some((v) => v > 0)) t.bad('has no f_lambda above 0', 'check the second column');
  const w = t.wavelengthAngstrom;
  const fLambda =
    column === 'f_nu'
      ? t.values.map((v, i) => v / (w[i]! * w[i]!))
      : column === 'nu_f_nu'
        ? t.values.map((v, i) => v / w[i]!)
        : t.values;
  return { file: path, wavelengthAngstrom: w, fLambda };
}
