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
