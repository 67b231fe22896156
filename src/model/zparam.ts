/** Parameters that may vary with redshift, as every computation reads them. */

/** A parameter that may vary with redshift: a number, a table in z, or a safe expression in z. */
export interface ZParam {
  /** What the file said, for display: a number, {table: [[z, v], ...]} or the expression text. */
  readonly source: number | { table: [number, number][] } | string;
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
