/** Number formatting for tables: significant figures, no trailing noise. (CSV: csv.ts.) */

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

function trimZeros(s: string): string {
  return s.includes('.') && !s.includes('e') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
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
