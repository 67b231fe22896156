/**
 * `check`'s text: one `key = value` line per value of the normalised survey, each followed by the
 * unit the value is in where the key's name does not state it (docs/outputs.md gives the units:
 * `cosmology.h0 = 70 km/s/Mpc`, `populations[0].l_star = 2e+42 erg/s`, a threshold survey's L* in
 * its quantity's unit, a parameter as written in the form the file wrote it, `log10_l_star` a log10).
 * Keys whose name ends in their unit (`area_deg2`, `phi_star_mpc3`, `center_angstrom`) and values
 * without a unit (redshifts, alpha, fractions, the bias) are printed as they are.
 */
import type { SurveyCheck } from '../model/outputs/check.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';

/**
 * The text's key = value lines: nested keys joined by dots, one line per key of each population
 * (populations[0].name, populations[0].window.min, ...: a list of objects is written key by key,
 * not as one line of JSON), a list of words written as words (log10_phi_star, m_star, alpha; none
 * when empty); lists of numbers stay JSON, as slices.edges.
 */
function readableLines(obj: unknown, prefix = '', out: Record<string, string> = {}): Record<string, string> {
  const isObject = (v: unknown) => v !== null && typeof v === 'object' && !Array.isArray(v);
  if (isObject(obj)) {
    for (const [k, v] of Object.entries(obj as Record<string, unknown>))
      readableLines(v, prefix ? `${prefix}.${k}` : k, out);
  } else if (Array.isArray(obj) && obj.some(isObject)) {
    obj.forEach((v, i) => readableLines(v, `${prefix}[${i}]`, out));
  } else if (Array.isArray(obj) && obj.every((v) => typeof v === 'string')) {
    out[prefix] = obj.length === 0 ? 'none' : obj.join(', ');
  } else {
    out[prefix] = typeof obj === 'string' ? obj : JSON.stringify(obj);
  }
  return out;
}

/** The unit in a quantity's label, "stellar mass [Msun]" -> "Msun"; undefined without one. */
function bracketUnit(quantity: string | undefined): string | undefined {
  const m = /\[([^\]]+)\]\s*$/.exec(quantity ?? '');
  const unit = m?.[1]?.trim();
  return unit ? unit : undefined;
}

/** The unit of L* (luminosity variable): erg/s for a line, the quantity's unit for a threshold. */
function luminosityUnit(survey: Survey, p: Population): string {
  if (survey.detection.kind !== 'threshold') return 'erg/s';
  const unit = bracketUnit(p.quantity);
  if (unit) return unit;
  return p.quantity ? `(in the unit of ${p.quantity})` : "(in the quantity's unit)";
}

/** The unit of log10 L*: "log10 erg/s", "log10 Msun", or in words for a quantity without a unit. */
function log10LuminosityUnit(survey: Survey, p: Population): string {
  if (survey.detection.kind !== 'threshold') return 'log10 erg/s';
  const unit = bracketUnit(p.quantity);
  if (unit) return `log10 ${unit}`;
  return `(log10 of the ${p.quantity ?? 'quantity'})`;
}

/** The unit of each form of phi* a file may write (docs/survey-file.md). */
function normalisationUnit(key: string | undefined): string {
  const log = key?.startsWith('log10_') ?? false;
  const dex = key?.endsWith('_dex') ?? false;
  return `${log ? 'log10 ' : ''}Mpc^-3${dex ? ' dex^-1' : ''}`;
}

/**
 * The observed variable of the detection (the completeness's x and half, a threshold's limit, the
 * histogram): its unit and the unit of a width in it.
 */
function observedUnits(survey: Survey): { value: string; width: string } {
  const d = survey.detection;
  if (d.kind === 'line_flux') return { value: '-log10 erg/s/cm^2', width: 'dex' };
  if (d.kind === 'magnitude') return { value: 'AB mag', width: 'mag' };
  const pops = survey.populations;
  if (pops.every((p) => p.variable === 'magnitude')) return { value: 'absolute AB mag', width: 'mag' };
  const units = new Set(pops.map((p) => log10LuminosityUnit(survey, p)));
  return { value: units.size === 1 ? [...units][0]! : '(log10 of the quantity)', width: 'dex' };
}

/** The unit of the value at `key` of check's view (a key of readableLines), or undefined where none is due. */
function unitAt(survey: Survey, key: string): string | undefined {
  const observed = observedUnits(survey);
  switch (key) {
    case 'cosmology.h0':
      return 'km/s/Mpc';
    case 'cosmology.t_cmb':
      return 'K';
    case 'detection.limit_cgs':
      return 'erg/s/cm^2';
    case 'detection.limit_jy_km_s':
      return 'Jy km/s';
    case 'detection.limit_mag':
      return 'AB mag';
    case 'detection.vega_to_ab':
      return 'mag';
    case 'detection.photo_z.sigma':
      return 'times (1 + z)';
    case 'detection.completeness.half':
    case 'detection.completeness.x':
      return observed.value;
    case 'detection.completeness.width':
      return observed.width;
    case 'histogram_width':
      return observed.width;
  }
  if (/^detection\.limit(\.at_window_(min|max))?$/.test(key)) return observed.value;
  if (/^detection\.limit\.as_written(\.table)?$/.test(key))
    return key.endsWith('.table') ? `(z, ${observed.value})` : observed.value;
  const m = /^populations\[(\d+)\]\.(.+)$/.exec(key);
  const p = m ? survey.populations[Number(m[1])] : undefined;
  if (!m || !p) return undefined;
  const rest = m[2]!;
  // a table as written: its rows are [z, value]
  const written = (unit: string) => (rest.endsWith('.table') ? `(z, ${unit})` : unit);
  const phi = /^(?:components\[(\d+)\]\.)?phi_star_mpc3\.as_written(?:\.table)?$/.exec(rest);
  if (phi) {
    const phiKey = phi[1] !== undefined ? p.components[Number(phi[1])]?.phiKey : p.normalisationKey;
    return written(`(as ${phiKey ?? 'phi_star'}: ${normalisationUnit(phiKey)})`);
  }
  if (/^l_star(\.at_window_(min|max))?$/.test(rest)) return luminosityUnit(survey, p);
  if (/^l_star\.as_written(\.table)?$/.test(rest)) {
    const lKey = p.lStarKey ?? 'l_star';
    const unit = lKey === 'l_star' ? luminosityUnit(survey, p) : log10LuminosityUnit(survey, p);
    return written(`(as ${lKey}: ${unit})`);
  }
  const absolute = 'absolute AB mag';
  if (/^m_star(\.at_window_(min|max))?$/.test(rest)) return absolute;
  if (/^m_star\.as_written(\.table)?$/.test(rest))
    return written(`(as m_star: absolute ${p.magnitudeSystem?.system === 'vega' ? 'Vega' : 'AB'} mag)`);
  if (rest === 'sfr_conversion.factor') {
    const per =
      p.variable === 'magnitude'
        ? 'erg/s/Hz'
        : survey.detection.kind === 'threshold'
          ? (bracketUnit(p.quantity) ?? 'unit of the quantity')
          : 'erg/s';
    return `Msun/yr per ${per}`;
  }
  if (rest === 'magnitude_system.vega_to_ab') return 'mag';
  const sigma = /^model_uncertainty\.sigmas\.(log10_phi_star|log10_l_star|m_star)(_\d)?$/.exec(rest);
  if (sigma) return sigma[1] === 'm_star' ? 'mag' : 'dex';
  return undefined;
}

/** check's text: "FILE: valid survey file", then one "  key = value[ unit]" line per value. */
export function checkText(fileShown: string, survey: Survey, view: Omit<SurveyCheck, 'warnings'>): string {
  const lines = Object.entries(readableLines(view)).map(([k, v]) => {
    const unit = unitAt(survey, k);
    return `  ${k} = ${v}${unit ? ` ${unit}` : ''}`;
  });
  return `${fileShown}: valid survey file\n${lines.join('\n')}\n`;
}
