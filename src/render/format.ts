/**
 * The one module that writes numbers and words for people: tables, the HTML report, figure
 * labels, and the numbers inside messages and warnings (CSV and JSON write numbers in full:
 * csv.ts, src/cli/io.ts). It imports nothing, so every layer may use it.
 */

/** A number with `sig` significant figures; exponent form outside [1e-3, 1e6). */
export function sig(x: number, digits = 4): string {
  if (x === 0) return '0';
  if (!Number.isFinite(x)) return String(x);
  const ax = Math.abs(x);
  if (ax >= 1e6 || ax < 1e-3) {
    const [m, e] = x.toExponential(digits - 1).split('e');
    return `${trimZeros(m!)}e${e!.replace('+', '')}`;
  }
  return trimZeros(Number(x.toPrecision(digits)).toString());
}

/**
 * Significant digits for a value written beside its spread (an assumed value beside its Fisher
 * sigma, a mock fit's mean or percentile beside their standard deviation): at least `least`, and
 * enough to show the spread's second digit, so that a spread of 1e-5 of the value (a wide survey's
 * log10 L* near 42) does not print p16, p50 and p84 alike, nor a value and its mean a whole sigma
 * apart by rounding alone. `least` where the spread is not a positive number or x is 0 or not finite.
 */
export function digitsBeside(x: number, spread: number | undefined, least: number): number {
  if (typeof spread !== 'number' || !(spread > 0) || x === 0 || !Number.isFinite(x)) return least;
  return Math.min(15, Math.max(least, Math.ceil(Math.log10(Math.abs(x) / spread)) + 2));
}

function trimZeros(s: string): string {
  return s.includes('.') && !s.includes('e') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
}

/**
 * `digits` significant figures, as short as JavaScript writes them (0.30000 -> "0.3", 1.5e-17
 * stays "1.5e-17"): the numbers inside messages and warnings. Not finite: as JavaScript writes it.
 */
export function precise(x: number, digits = 4): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(digits))) : String(x);
}

/** Like `precise`, but in exponent form (1.995e42) beyond [1e-3, 1e5): parameter values in a model summary. */
export function compact(x: number, digits = 4): string {
  const ax = Math.abs(x);
  if (ax !== 0 && (ax >= 1e5 || ax < 1e-3)) {
    const [m, e] = x.toExponential(digits - 1).split('e');
    return `${Number(m)}e${Number(e)}`;
  }
  return precise(x, digits);
}

/** Always in exponent form, `digits` significant figures: 1.995e42. */
export function exponential(x: number, digits = 4): string {
  return Number(x.toPrecision(digits)).toExponential().replace('+', '');
}

/** "0.80–1.00": a redshift range with the digits its edges need (2 to 4 decimals). */
export function formatRange(a: number, b: number): string {
  const digits = Math.max(decimalsNeeded(a), decimalsNeeded(b), 2);
  return `${a.toFixed(digits)}–${b.toFixed(digits)}`;
}

/** Decimals (0 to 4) that write x to 1e-9. */
function decimalsNeeded(x: number): number {
  for (let d = 0; d <= 4; d++) if (Math.abs(Number(x.toFixed(d)) - x) < 1e-9) return d;
  return 4;
}

/**
 * A number for a table, as HTML: `sig` significant digits; thousands separated by commas at
 * 1000 or more (below 1e7); powers of ten written out (1.23 × 10<sup>8</sup>) from 1e7 up and
 * below 1e-3. Not finite: an em dash (callers never pass one; outputs hold no NaN).
 */
export function formatNumber(x: number, sig = 4): string {
  if (typeof x !== 'number' || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax >= 1e7 || ax < 1e-3) {
    const [m, e] = x.toExponential(sig - 1).split('e');
    const mant = String(Number(m));
    return `${mant} × 10<sup>${Number(e)}</sup>`;
  }
  if (ax >= 1000) return groupThousands(Math.round(x));
  return String(Number(x.toPrecision(sig)));
}

/**
 * A number the survey file wrote, for the report's model table. From 1,000 up with every digit it
 * needs to give that number back (the shortest form that does, Number.prototype.toString's): 6562.8
 * as "6,562.8" where formatNumber writes "6,563", and 1.23456789e42 as "1.23456789 × 10<sup>42</sup>";
 * thousands grouped and powers of ten where formatNumber puts them. Below 1,000 six significant
 * digits, formatNumber(x, 6): there they keep every digit a reader needs (-3.46222 for a log10 phi*
 * written -3.4622156886994633), where from 1,000 up formatNumber kept only the integer.
 */
export function formatWritten(x: number): string {
  if (typeof x !== 'number' || !Number.isFinite(x)) return '—';
  const ax = Math.abs(x);
  if (ax < 1000) return formatNumber(x, 6);
  if (ax >= 1e7) {
    const [m, e] = x.toExponential().split('e');
    return `${m} × 10<sup>${Number(e)}</sup>`;
  }
  // between 1,000 and 1e7 toString writes no exponent
  const s = String(x);
  const dot = s.indexOf('.');
  const whole = dot < 0 ? s : s.slice(0, dot);
  return groupThousands(Number(whole)) + (dot < 0 ? '' : s.slice(dot));
}

/**
 * An integer with commas between groups of three digits, as toLocaleString('en-US') writes it
 * (written out here: the first toLocaleString of a process loads the locale data, tens of ms).
 */
export function groupThousands(n: number): string {
  const digits = String(Math.abs(n));
  let out = '';
  for (let i = 0; i < digits.length; i++) {
    if (i > 0 && (digits.length - i) % 3 === 0) out += ',';
    out += digits[i];
  }
  return n < 0 ? `-${out}` : out;
}

/** Fixed decimals for redshifts: as many as the edges need, 2 to 4. */
export function formatZ(z: number): string {
  return z.toFixed(Math.max(2, decimalsNeeded(z)));
}

/**
 * An uncertainty fraction as a percentage, "7.1%": one decimal from 0.1 % up, two significant
 * figures below (a whole-sky survey's Poisson term must not read 0.0%), three from 10,000 % up (a
 * survey expecting almost no source must not print 17 digits). Shares keep `percent`.
 */
export function uncertaintyPercent(f: number | undefined): string {
  if (typeof f !== 'number' || !Number.isFinite(f)) return '';
  const p = 100 * f;
  if (Math.abs(p) >= 1e4) return `${sig(p, 3)}%`;
  return `${Math.abs(p) >= 0.1 || p === 0 ? p.toFixed(1) : p.toPrecision(2)}%`;
}

export function percent(f: number | undefined): string {
  return typeof f === 'number' && Number.isFinite(f) ? `${(100 * f).toFixed(1)}%` : '';
}

/** Fixed decimals (limits: log10 L, log10 flux or AB magnitudes, to 0.01). */
export function formatFixed(x: number, decimals = 2): string {
  return typeof x === 'number' && Number.isFinite(x) ? x.toFixed(decimals).replace(/^-(0\.0*)$/, '$1') : '—';
}

/** Always in powers of ten with `sig` digits kept, for columns spanning decades (volumes): 1.10 × 10<sup>6</sup>. */
export function formatScientific(x: number, sig = 3): string {
  if (typeof x !== 'number' || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const [m, e] = x.toExponential(sig - 1).split('e');
  return `${m} × 10<sup>${Number(e)}</sup>`;
}

/** Fixed decimals (e.g. magnitudes, redshifts). */
export function fixed(x: number, decimals: number): string {
  return x.toFixed(decimals);
}

/** A redshift, with as many decimals as it needs (at most 4). */
export function zText(z: number): string {
  return Number(z.toFixed(4)).toString();
}

/** A forecast parameter in words for people: log10_l_star -> "log10 L*" (keys stay in JSON and CSV). */
export function parameterWords(name: string): string {
  const words: Record<string, string> = {
    alpha: 'alpha',
    log10_phi_star: 'log10 phi*',
    log10_l_star: 'log10 L*',
    l_star: 'L*',
    m_star: 'M*',
  };
  return words[name] ?? name.replace(/_/g, ' ');
}

/**
 * A plan goal in words: "count" -> "expected count", "faint_count" -> "expected count fainter
 * than the knee", {sigma: "alpha"} or "sigma_alpha" -> "sigma of alpha".
 */
export function goalWords(goal: string | { sigma: string }): string {
  if (typeof goal === 'object') return `sigma of ${parameterWords(goal.sigma)}`;
  if (goal === 'count') return 'expected count';
  if (goal === 'faint_count') return 'expected count fainter than the knee (L* or M*)';
  if (goal.startsWith('sigma_')) return `sigma of ${parameterWords(goal.slice('sigma_'.length))}`;
  return goal.replace(/_/g, ' ');
}

/** A population's shape in words, "Schechter" capitalised: double_schechter -> "double Schechter function". */
export function shapeWords(shape: string): string {
  if (shape === 'schechter') return 'Schechter function';
  if (shape === 'double_schechter') return 'double Schechter function';
  return `${shape.replace(/_/g, ' ')} function`;
}

/**
 * Words of `text` in lines of at most `width` characters; nothing is dropped: the lines hold
 * every word in order (a word longer than a line is split across lines).
 */
export function wrapWords(text: string, width: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (let word of text.trim().split(/\s+/)) {
    if (word === '') continue;
    while (word.length > width) {
      if (line) {
        lines.push(line);
        line = '';
      }
      lines.push(word.slice(0, width));
      word = word.slice(width);
    }
    if (!line) line = word;
    else if (line.length + 1 + word.length <= width) line += ` ${word}`;
    else {
      lines.push(line);
      line = word;
    }
  }
  if (line) lines.push(line);
  return lines;
}

/** A limit in its variable for people: 25.50 AB, M = -20.00, 4e-17 erg/s/cm^2, log10 = 9.6 (or the text of one that varies with z). */
export function limitText(v: string, x: number | string): string {
  if (typeof x === 'string') return x;
  if (v === 'apparent_magnitude') return `${x.toFixed(2)} AB`;
  if (v === 'absolute_magnitude') return `M = ${x.toFixed(2)}`;
  if (v === 'line_flux_cgs') return `${sig(x, 3)} erg/s/cm^2`;
  return `log10 = ${sig(x, 4)}`;
}

/** An English ordinal: 1st, 2nd, 3rd, 4th, 11th, 12th, 13th, 21st, 22nd, 101st. */
export function ordinal(n: number): string {
  const tens = n % 100;
  const last = n % 10;
  const suffix = tens >= 11 && tens <= 13 ? 'th' : last === 1 ? 'st' : last === 2 ? 'nd' : last === 3 ? 'rd' : 'th';
  return `${n}${suffix}`;
}
