/**
 * Common emission-line names, recognised only to answer a `line:` written as a name with the rest
 * wavelength to write instead: skytally never picks a wavelength for a name, since air and vacuum
 * wavelengths differ by about 1.8 Angstrom at H-alpha and filters are quoted in either.
 *
 * Rest wavelengths in Angstrom (common practice; from memory): air for lines above 2000 Angstrom,
 * vacuum below, as tables of optical and ultraviolet lines give them; the [OII] doublet as the mean
 * of 3726.03 and 3728.82.
 */
interface LineName {
  /** How it is written: lower case, without brackets, spaces, hyphens or dots. */
  keys: readonly string[];
  name: string;
  angstrom: number;
  frame: 'air' | 'vacuum';
  vacuumAngstrom?: number;
}

const LINES: readonly LineName[] = [
  {
    keys: ['halpha', 'ha', 'hα', 'hα6563', 'halpha6563'],
    name: 'H-alpha',
    angstrom: 6562.8,
    frame: 'air',
    vacuumAngstrom: 6564.6,
  },
  { keys: ['hbeta', 'hb', 'hβ', 'hbeta4861'], name: 'H-beta', angstrom: 4861.3, frame: 'air', vacuumAngstrom: 4862.7 },
  {
    keys: ['oiii', 'oiii5007', 'o3', 'oiii5008'],
    name: '[OIII] 5007',
    angstrom: 5006.8,
    frame: 'air',
    vacuumAngstrom: 5008.2,
  },
  {
    keys: ['oii', 'oii3727', 'oii3726', 'oii3729', 'o2'],
    name: "the [OII] 3726, 3729 doublet's mean",
    angstrom: 3727.4,
    frame: 'air',
    vacuumAngstrom: 3728.5,
  },
  {
    keys: ['nii', 'nii6583', 'nii6584', 'n2'],
    name: '[NII] 6583',
    angstrom: 6583.4,
    frame: 'air',
    vacuumAngstrom: 6585.3,
  },
  { keys: ['lyalpha', 'lya', 'lyα', 'lymanalpha', 'lyman'], name: 'Lyman-alpha', angstrom: 1215.67, frame: 'vacuum' },
  {
    keys: ['paalpha', 'paa', 'paα', 'paschenalpha'],
    name: 'Paschen-alpha',
    angstrom: 18751,
    frame: 'air',
    vacuumAngstrom: 18756.1,
  },
  {
    keys: ['pabeta', 'pab', 'paβ', 'paschenbeta'],
    name: 'Paschen-beta',
    angstrom: 12818.1,
    frame: 'air',
    vacuumAngstrom: 12821.6,
  },
];

/**
 * The sentence to answer a line written as a name ("[OII]", "H-alpha", "Lya") with: its rest
 * wavelength to write, and the other frame's where it differs; undefined for anything else.
 */
/** The names known, for the tests. */
export const LINE_NAMES = LINES;

/** How HI 21 cm is written as a name (lower case, without spaces, hyphens or dots; "21 cm" is a wavelength, read as one). */
const HI_KEYS = ['hi', 'h1', 'hi21cm', 'h121cm'];

export function lineNameHint(text: string): string | undefined {
  const key = text
    .trim()
    .toLowerCase()
    .replace(/[\s[\]()\-_.λ]/g, '');
  // a radio line is quoted by its rest frequency (1420.405751768 MHz, common practice)
  if (HI_KEYS.includes(key))
    return `"${text.trim()}" names a line, not its wavelength: write its rest frequency or wavelength with the unit, e.g. "1420.405752 MHz" or "21.106114 cm" for HI`;
  const line = LINES.find((l) => l.keys.includes(key));
  if (!line) return undefined;
  const other =
    line.vacuumAngstrom !== undefined ? `; ${line.vacuumAngstrom} in vacuum, if the filter's wavelengths are` : '';
  return `"${text.trim()}" names a line, not its wavelength: write the rest wavelength, e.g. ${line.angstrom} for ${line.name} (Angstrom in ${line.frame}${other})`;
}
