/**
 * Tabulated transmission curves (detection.filter.file, detection.band_file).
 *
 * Format: a text file of rows "wavelength, transmission" (comma, semicolon, tab or spaces between
 * the two numbers). Lines starting with # and blank lines are skipped. One header line is allowed
 * before the first row; its first column names the wavelength unit:
 *   wavelength | wavelength_angstrom -> Angstrom (also the unit when there is no header)
 *   wavelength_nm                    -> nanometres
 *   wavelength_um                    -> micrometres
 * Wavelengths must increase strictly; transmissions must be 0 or more with a positive peak. The
 * curve is stored relative to its peak, linear between rows and 0 outside the table. The path is
 * relative to the survey file's directory. Every problem is one SurveyError naming the survey file,
 * the key and the transmission file.
 */
import { isAbsolute, resolve } from 'node:path';
import { excerpt, inputError } from '../errors.js';
import type { InputFile } from '../model/survey.js';
import type { TransmissionTable } from '../model/detection.js';
import { MAX_TABLE_BYTES, readInputText } from './read-input.js';
import { RANGES } from '../model/limits.js';
import { tableMeanWavelength } from '../selection/filter.js';
import { precise } from '../render/format.js';

const UNIT_SCALE: Record<string, number> = { '': 1, _angstrom: 1, _nm: 10, _um: 1e4 };

/** Most rows a transmission table may hold (each row inside a window is a kink the count integrates piece by piece). */
export const MAX_TABLE_ROWS = 2000;

/**
 * Read and check a transmission file; `keyPath` is the survey key that names it. `record`, when
 * given, receives the identity of the file read (so that no output may replace it).
 *
 * Nothing of the file is quoted until it has shown itself to be a table (a recognised header or
 * a row of two numbers), and then only a short escaped excerpt: a file that is not a table (a
 * password file named by mistake or on purpose) never has its contents printed.
 */
export function readTransmissionFile(
  path: string,
  surveyFile: string,
  keyPath: string,
  baseDir: string,
  record?: (input: InputFile) => void,
): TransmissionTable {
  const t = readWavelengthTable(
    path,
    surveyFile,
    keyPath,
    baseDir,
    { subject: 'transmission file', column: 'transmission' },
    record,
  );
  const peak = Math.max(...t.values);
  if (!(peak > 0)) t.bad('has no transmission above 0', 'check the second column');
  const table = { file: path, wavelengthAngstrom: t.wavelengthAngstrom, transmission: t.values.map((v) => v / peak) };
  // the curve's wavelength (a band's effective wavelength, a filter's center) must lie in the range
  // a wavelength written as a number may have, as band: 0.9 is refused; a table in um or nm without
  // its header is read in Angstrom (0.78 to 1.03 um read as 0.78 to 1.03 Angstrom, an X-ray band)
  const mean = tableMeanWavelength(table);
  const range = RANGES.wavelength;
  if (!(mean >= range.min && mean <= range.max)) {
    const w = t.wavelengthAngstrom;
    t.bad(
      `has its transmission-weighted mean wavelength at ${precise(mean, 4)} Angstrom (rows from ${precise(w[0]!, 4)} to ${precise(w[w.length - 1]!, 4)} Angstrom), outside the range of a wavelength (from ${range.min} to ${range.max} Angstrom)`,
      !t.unitNamed
        ? 'a table without a unit in its header is read in Angstrom: if its wavelengths are in um or nm, name the unit in a header line (wavelength_um, transmission or wavelength_nm, transmission)'
        : 'check the wavelength column and the unit its header names',
    );
  }
  return table;
}

/**
 * A table of wavelength (Angstrom) against a value of 0 or more, as read; `bad` throws about it.
 * `valueHeader` is the header's second column, lower case, when the file has a header with one.
 */
export interface WavelengthTable {
  wavelengthAngstrom: number[];
  values: number[];
  valueHeader?: string;
  /** Whether a header named the wavelength unit (wavelength_angstrom, _nm or _um), not left it to the default Angstrom. */
  unitNamed: boolean;
  bad(what: string, fix: string): never;
}

/**
 * The common reader of wavelength tables (transmission curves here, spectra in spectrum-file.ts):
 * the format above, the second column being `column` (0 or more).
 */
export function readWavelengthTable(
  path: string,
  surveyFile: string,
  keyPath: string,
  baseDir: string,
  kind: { subject: string; column: string },
  record?: (input: InputFile) => void,
): WavelengthTable {
  const full = isAbsolute(path) ? path : resolve(baseDir, path);
  const shown = excerpt(path, 80);
  const bad = (what: string, fix: string): never => {
    throw inputError('bad_table', surveyFile, keyPath, `the ${kind.subject} "${shown}" ${what}`, fix);
  };
  const read = readInputText(full, {
    maxBytes: MAX_TABLE_BYTES,
    maxLabel: '1 MiB a table may have',
    file: surveyFile,
    keyPath,
    subject: `the ${kind.subject} "${shown}"${full === path ? '' : ` (looked for ${excerpt(full, 120)})`}`,
    fix: 'give a path relative to the survey file',
  });
  record?.({ path: read.path, dev: read.dev, ino: read.ino });
  const text = read.text;
  let scale = 1;
  let seenRow = false;
  let headerSeen = false;
  let valueHeader: string | undefined;
  let unitNamed = false;
  const wl: number[] = [];
  const tr: number[] = [];
  const lines = text.split(/\r?\n/);
  lines.forEach((rawLine, i) => {
    const line = rawLine.trim();
    if (line === '' || line.startsWith('#')) return;
    const cells = line.split(/\s*[,;\t]\s*|\s+/).filter((c) => c.length > 0);
    const nums = cells.map((c) => (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(c) ? Number(c) : NaN));
    if (!seenRow && !headerSeen && nums.some((x) => Number.isNaN(x))) {
      headerSeen = true;
      const first = (cells[0] ?? '').toLowerCase();
      const m = /^wavelength(_angstrom|_nm|_um)?$/.exec(first);
      if (!m) {
        bad(
          `does not start with a table: its first line (line ${i + 1}) is neither a header whose first column is wavelength, wavelength_angstrom, wavelength_nm or wavelength_um nor a row of two numbers`,
          `give a CSV of wavelength, ${kind.column} rows`,
        );
      }
      scale = UNIT_SCALE[m![1] ?? '']!;
      unitNamed = m![1] !== undefined;
      if (cells[1] !== undefined) valueHeader = cells[1].toLowerCase();
      return;
    }
    if (cells.length !== 2 || nums.some((x) => !Number.isFinite(x))) {
      if (!seenRow && !headerSeen) {
        bad(
          `does not start with a table: its first line (line ${i + 1}) is not a row of two numbers`,
          `give a CSV of wavelength, ${kind.column} rows`,
        );
      }
      bad(`line ${i + 1} ("${excerpt(line)}") is not two numbers`, `write each row as wavelength, ${kind.column}`);
    }
    seenRow = true;
    if (wl.length >= MAX_TABLE_ROWS)
      bad(`holds more than ${MAX_TABLE_ROWS} rows`, `resample the curve to at most ${MAX_TABLE_ROWS} rows`);
    const w = nums[0]! * scale;
    const t = nums[1]!;
    if (!(w > 0)) bad(`line ${i + 1} has the wavelength ${nums[0]}, not above 0`, 'give positive wavelengths');
    if (!(t >= 0))
      bad(`line ${i + 1} has the ${kind.column} ${t}, below 0`, `give values of ${kind.column} of 0 or more`);
    if (wl.length > 0 && !(w > wl[wl.length - 1]!))
      bad(
        `line ${i + 1}: the wavelength ${nums[0]} does not follow the one before upward`,
        'list the rows in increasing wavelength without repeats',
      );
    wl.push(w);
    tr.push(t);
  });
  if (wl.length < 2)
    bad(`holds ${wl.length} row${wl.length === 1 ? '' : 's'}`, `give at least two rows of wavelength, ${kind.column}`);
  return { wavelengthAngstrom: wl, values: tr, ...(valueHeader !== undefined ? { valueHeader } : {}), unitNamed, bad };
}
