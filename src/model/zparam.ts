/** Parameters that may vary with redshift, as every computation reads them. */

/** What the file said of a parameter in z: a number, {table: [[z, v], ...]} or the expression text. */
export type ZSource = number | { table: [number, number][] } | string;

/**
 * What the file said of a given bias: a parameter in z, or {over_growth: B}, b(z) = B / D(z) with D
 * the linear growth factor of the file's cosmology, D(0) = 1 (docs/survey-file.md, "bias").
 */
export type BiasSource = ZSource | { over_growth: number };

/**
 * A parameter that may vary with redshift: a number, a table in z, or a safe expression in z (a
 * given bias also {over_growth: B}: `ZParam<BiasSource>`).
 */
export interface ZParam<S extends BiasSource = ZSource> {
  /** What the file said, for display: a number, {table: [[z, v], ...]}, the expression text or {over_growth: B}. */
  readonly source: S;
  /** True when the value does not depend on z. */
  readonly constant: boolean;
  /** Value at redshift z (finite for every z in the survey window; checked at load time). */
  at(this: void, z: number): number;
  /**
   * An expression with min, max or abs: the redshifts strictly inside (lo, hi) where it has a kink
   * (where it switches from one argument to another, or abs's argument changes sign), so that
   * integrals over z may cut there as they cut at a table's rows. Absent when there is none.
   */
  readonly kinks?: (this: void, lo: number, hi: number) => number[];
  /**
   * An expression with a narrow feature (a dip, a peak or a step much narrower than the window it
   * was checked over): redshifts strictly inside (lo, hi) where integrals over z should cut so that
   * their rule follows it, graded down to the feature's own width. Absent when there is none.
   */
  readonly features?: (this: void, lo: number, hi: number) => number[];
}

/** Whether a parameter's source is a table {table: [[z, v], ...]} (linear between its rows). */
export function isTableSource(source: BiasSource | undefined): source is { table: [number, number][] } {
  return typeof source === 'object' && 'table' in source;
}
