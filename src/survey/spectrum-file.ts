/**
 * Rest-frame spectra (detection.sed.file): rows "wavelength, f_lambda" in the format of the
 * transmission files (src/survey/transmission-file.ts: the same reader, header and unit rules,
 * size caps). f_lambda is in any unit (only ratios enter the k-corrections), 0 or more, with some
 * row above 0; it is read linearly between rows and never extrapolated.
 */
import type { InputFile } from '../model/survey.js';
import type { Spectrum } from '../model/photometry.js';
import { readWavelengthTable } from './transmission-file.js';

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
  if (!t.values.some((v) => v > 0)) t.bad('has no f_lambda above 0', 'check the second column');
  return { file: path, wavelengthAngstrom: t.wavelengthAngstrom, fLambda: t.values };
}
