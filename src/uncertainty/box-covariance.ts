/**
 * Covariance of the mean linear density contrasts in two boxes of one field along the line of
 * sight (two redshift slices of the same field): parallel boxes, transverse centres aligned,
 * radial sides L_a and L_b whose centres lie d apart along the line of sight. At z = 0:
 *
 *   C_ab = ∫ d^3k / (2 pi)^3  P(k) W_a(k) W_b(k)^*
 *        = (1/pi^3) ∫_0^∞∫_0^∞∫_0^∞ P(|k|) T_x(k_x) T_y(k_y) sinc(k_z L_a / 2) sinc(k_z L_b / 2) cos(k_z d) dk
 *
 * (common practice: the box window of src/uncertainty/window.ts with the phase e^{i k_z d} of the
 * offset; for a = b and d = 0 it is the box variance sigma^2). Each transverse axis's weight
 * T(k) = sinc(k w_a / 2) sinc(k w_b / 2) is taken as sinc^2(k w / 2) with the geometric mean
 * w = sqrt(w_a w_b): the two slices' comoving widths differ by the ratio of their transverse
 * distances (about 1.5 % between adjacent slices of the bundled samples), and the weight differs
 * from the exact one at second order in that difference (checked against a direct 3-D
 * integration with the exact sides, test/reference/generate/box_covariance.py).
 *
 * Method: the transverse axes by window.ts's sinc^2 product rule (sincSquaredRule); the radial
 * integral J(K) = ∫_0^∞ dk sinc(k A) sinc(k B) cos(k d) P(sqrt(K^2 + k^2)) (A = L_a / 2,
 * B = L_b / 2) tabulated on ln K (0.1 apart, 4-point Lagrange cubics) from Gauss-Legendre
 * panels of 6 points (graded near k = 0, then at most half the fastest period 2 pi / (A + B + d)
 * wide) up to 8 lobes of the thinner slice, and beyond it the non-oscillating part of the weight:
 * sin(kA) sin(kB) cos(kd) = (1/4)[cos((A-B-d)k) + cos((A-B+d)k) - cos((A+B-d)k) - cos((A+B+d)k)],
 * whose zero-frequency terms (d = 0: the variance; d = A + B: touching slices) leave c_0 / (A B k^2)
 * times P, integrated in t = 1/k; the oscillating terms' tail is dropped (of order P(k_max) /
 * (k_max^2 (A + B + d))).
 */
import type { LinearPower } from './power-spectrum.js';
import { gaussLegendre } from './quadrature.js';
import { sincSquaredRule, type SincRule } from './window.js';

/** One box: transverse sides and radial side (comoving Mpc). */
export type BoxSides = readonly [number, number, number];

const LOBES = 8;
const POINTS = 6;
/** Gauss-Legendre nodes per panel of PANEL_PERIODS periods of the fastest frequency (sliceCorrelations' rule). */
const PANEL_POINTS = 32;
const PANEL_PERIODS = 8;
const TABLE_STEP = 0.1;
const GRADE_K = 1e-4;

function sinc(x: number): number {
  return Math.abs(x) < 1e-4 ? 1 - (x * x) / 6 : Math.sin(x) / x;
}

/** Nodes and weights of ∫_0^∞ g(k) W(k) dk for W = sinc(kA) sinc(kB) cos(kd) (explicit part), and the tail coefficient. */
interface RadialRule {
  k2: Float64Array;
  w: Float64Array;
  /** Tail: c0 / (A B) ∫_{kMax}^∞ g(k) / k^2 dk in t = 1/k: nodes k^2 and weights. */
  tailK2: Float64Array;
  tailW: Float64Array;
}

function radialRule(la: number, lb: number, d: number): RadialRule {
  const a = 0.5 * la;
  const b = 0.5 * lb;
  const fastest = a + b + d;
  const h = Math.PI / fastest;
  const kMax = (LOBES * Math.PI) / Math.min(a, b);
  const gl = gaussLegendre(POINTS);
  const k2: number[] = [];
  const w: number[] = [];
  const panel = (lo: number, hi: number): void => {
    const c = 0.5 * (lo + hi);
    const half = 0.5 * (hi - lo);
    for (let i = 0; i < POINTS; i++) {
      const k = c + half * gl.x[i]!;
      k2.push(k * k);
      w.push(gl.w[i]! * half * sinc(k * a) * sinc(k * b) * Math.cos(k * d));
    }
  };
  // graded from GRADE_K up to the first full panel (the spectrum's k^n_s kink at k = 0)
  let lo = 0;
  let hi = Math.min(GRADE_K, h);
  panel(lo, hi);
  while (hi < h) {
    lo = hi;
    hi = Math.min(h, hi * 4);
    panel(lo, hi);
  }
  const n = Math.ceil((kMax - hi) / h);
  const step = (kMax - hi) / n;
  for (let j = 0; j < n; j++) panel(hi + j * step, hi + (j + 1) * step);
  // zero-frequency terms of the weight beyond kMax
  const tol = 1e-9 * fastest;
  let c0 = 0;
  if (Math.abs(a - b - d) < tol) c0 += 0.25;
  if (Math.abs(a - b + d) < tol) c0 += 0.25;
  if (Math.abs(a + b - d) < tol) c0 -= 0.25;
  const tailK2: number[] = [];
  const tailW: number[] = [];
  if (c0 !== 0) {
    // ∫_{kMax}^∞ g(k) / k^2 dk = ∫_0^{1/kMax} g(1/t) dt, geometric panels in t
    const glt = gaussLegendre(POINTS);
    let tHi = 1 / kMax;
    for (let j = 0; j < 6; j++) {
      const tLo = j === 5 ? 0 : tHi / 4;
      const c = 0.5 * (tHi + tLo);
      const half = 0.5 * (tHi - tLo);
      for (let i = 0; i < POINTS; i++) {
        const t = c + half * glt.x[i]!;
        tailK2.push(1 / (t * t));
        tailW.push((glt.w[i]! * half * c0) / (a * b));
      }
      tHi = tLo;
    }
  }
  return {
    k2: Float64Array.from(k2),
    w: Float64Array.from(w),
    tailK2: Float64Array.from(tailK2),
    tailW: Float64Array.from(tailW),
  };
}

function radialSum(p0: (k2: number) => number, bigK2: number, r: RadialRule): number {
  let s = 0;
  for (let i = 0; i < r.k2.length; i++) s += r.w[i]! * p0(bigK2 + r.k2[i]!);
  for (let i = 0; i < r.tailK2.length; i++) s += r.tailW[i]! * p0(bigK2 + r.tailK2[i]!);
  return s;
}

const ruleCache = new Map<number, SincRule>();
function transverseRule(length: number): SincRule {
  let r = ruleCache.get(length);
  if (!r) {
    if (ruleCache.size >= 256) ruleCache.delete(ruleCache.keys().next().value!);
    ruleCache.set(length, (r = sincSquaredRule(length)));
  }
  return r;
}

/** J(K) of one pair of radial sides and separation, on the fixed grid ln K = LN_K0 + g TABLE_STEP, made as asked. */
interface RadialTable {
  rule: RadialRule;
  values: Float64Array;
}
const LN_K0 = Math.log(1e-8);
const TABLE_SIZE = Math.ceil((Math.log(1e5) - LN_K0) / TABLE_STEP) + 1;
const radialTables = new WeakMap<LinearPower, Map<string, RadialTable>>();

function radialTable(power: LinearPower, la: number, lb: number, d: number): RadialTable {
  let byKey = radialTables.get(power);
  if (!byKey) radialTables.set(power, (byKey = new Map<string, RadialTable>()));
  const key = `${la} ${lb} ${d}`;
  let t = byKey.get(key);
  if (!t) {
    if (byKey.size >= 4096) byKey.delete(byKey.keys().next().value!);
    byKey.set(key, (t = { rule: radialRule(la, lb, d), values: new Float64Array(TABLE_SIZE).fill(NaN) }));
  }
  return t;
}

function tableAt(power: LinearPower, t: RadialTable, g: number): number {
  let v = t.values[g]!;
  if (Number.isNaN(v)) {
    v = radialSum(power.powerZ0FromK2, Math.exp(2 * (LN_K0 + g * TABLE_STEP)), t.rule);
    t.values[g] = v;
  }
  return v;
}

/** J at K^2 = k2 by the 4-point Lagrange cubic through the table's nearest nodes. */
function radialAt(power: LinearPower, t: RadialTable, k2: number): number {
  const x = (0.5 * Math.log(k2) - LN_K0) / TABLE_STEP;
  let g = Math.floor(x);
  if (g < 1) g = 1;
  if (g > TABLE_SIZE - 3) g = TABLE_SIZE - 3;
  const u = x - g;
  const y0 = tableAt(power, t, g - 1);
  const y1 = tableAt(power, t, g);
  const y2 = tableAt(power, t, g + 1);
  const y3 = tableAt(power, t, g + 2);
  return (
    (-u * (u - 1) * (u - 2) * y0) / 6 +
    ((u + 1) * (u - 1) * (u - 2) * y1) / 2 -
    ((u + 1) * u * (u - 2) * y2) / 2 +
    ((u + 1) * u * (u - 1) * y3) / 6
  );
}

/**
 * The covariance at z = 0 of the mean density contrasts in boxes `a` and `b` ([width, height,
 * depth], Mpc) whose centres lie `separationMpc` apart along the line of sight (see the module
 * comment); multiply by D(z_a) D(z_b) for the slices' redshifts. J(K) depends only on the radial
 * sides and the separation, so it is kept per pair (on a fixed ln K grid from 1e-8 to 1e5 per Mpc,
 * filled as the transverse sides ask): another area costs only the transverse sums.
 */
export function boxCovariance0(power: LinearPower, a: BoxSides, b: BoxSides, separationMpc: number): number {
  for (const s of [...a, ...b]) {
    if (!(s > 0) || !Number.isFinite(s))
      throw new RangeError(`boxCovariance0: every box side must be a positive finite length in Mpc, got ${s}`);
  }
  if (!(separationMpc >= 0) || !Number.isFinite(separationMpc))
    throw new RangeError(`boxCovariance0: the separation must be a finite length >= 0 in Mpc, got ${separationMpc}`);
  const cx = Math.sqrt(a[0] * b[0]);
  const cy = Math.sqrt(a[1] * b[1]);
  const rx = transverseRule(cx);
  const ry = transverseRule(cy);
  const table = radialTable(power, a[2], b[2], separationMpc);
  let total = 0;
  for (let i = 0; i < rx.u.length; i++) {
    const qx = ((2 * rx.u[i]!) / cx) ** 2;
    let row = 0;
    for (let j = 0; j < ry.u.length; j++) row += ry.w[j]! * radialAt(power, table, qx + ((2 * ry.u[j]!) / cy) ** 2);
    total += rx.w[i]! * row;
  }
  // (1/pi^3) ∫∫ dk_x dk_y T_x T_y J, with dk = (2 / side) du on each transverse axis
  return (4 / (Math.PI ** 3 * cx * cy)) * total;
}

/** One slice of a field: its box's sides (Mpc) and its centre's comoving distance along the line of sight (Mpc). */
export interface SliceBox {
  sides: BoxSides;
  centreMpc: number;
}

/*
 * The slices' correlation matrix, tabulated (sliceCorrelations). boxCovariance0 integrates each
 * pair over k_z afresh, resolving cos(k_z d) up to 8 lobes of the thinner slice: n slices cost
 * n^2 / 2 such integrals, each of about (d / L) panels, for every ln K node the transverse sums
 * ask (a 50-slice forecast took 55 s). The same integral in the other order,
 *
 *   C_ij = ∫_0^∞ dk_z Q(k_z; w_ij) sinc(k_z L_i / 2) sinc(k_z L_j / 2) cos(k_z (c_i - c_j)),
 *   Q(k_z; w) = (1/pi^3) ∫_0^∞∫_0^∞ dk_x dk_y sinc^2(k_x w / 2) sinc^2(k_y rho w / 2) P(|k|),
 *
 * puts everything that depends on the transverse side w (the geometric mean of the two slices'
 * widths, rho the field's height over width) into Q, which is smooth and does not oscillate, and
 * everything that oscillates into the slices' factors sinc(k L_i / 2) e^{i k c_i}, which do not
 * depend on w. So:
 *   - Q is tabulated once per spectrum and rho at transverse sides w_g = exp(g SIDE_STEP) (integer
 *     g, shared by every call: another area or set of slices reuses the nodes), each on the ln k_z
 *     grid of the spectrum's table step (4-point Lagrange cubics in ln Q), from the inner sum
 *     I(K) = Σ_b w_b P(K^2 + k_b^2) over the y axis as window.ts tabulates it;
 *   - per node g, the pair's integral M_g,ij = Σ_q u_q Q(k_q; w_g) Re[e_i(k_q) e_j(k_q)^*] on one
 *     k_z rule for all pairs: Gauss-Legendre panels of 6 points graded near 0 up to half the
 *     fastest period 2 pi / S (S = max c + L / 2 - min c + L / 2, the largest difference of two
 *     slices' ends), then panels of 8 such periods with 32 points each (4 per period of the
 *     fastest frequency, where 32 points integrate a cosine over 8 periods to ~1e-14; the
 *     differences from boxCovariance0 stay those of 6 points per half period), up to 8 lobes of
 *     the thinnest slice, and beyond it the zero-frequency part of the weight, as boxCovariance0 does, with
 *     e_i = sinc(k L_i / 2) e^{i k c_i} (on the uniform panels by the recurrence
 *     e^{i (k + h) c} = e^{i k c} e^{i h c}: no trigonometry per node, none per pair);
 *   - C_ij = Σ_g l_g(ln w_ij) M_g,ij, the 4-point Lagrange cubic in ln w through the nodes
 *     around w_ij; entries M_g,ij are kept, so that the plans' areas (another w for every pair)
 *     cost four sums per pair at most and often none, and the numbers do not depend on what was
 *     asked before (each entry is the same sum whichever call makes it).
 * Many slices (more than 16) may take the same sums in real space instead (sumPairsSpatial: Ξ_g
 * tabulated in r, four lookups a pair), which costs about (span / h) 32 n per node plus a few
 * operations per pair rather than 64 n^3.
 * Cost: n equal slices need about 32 n nodes, so 4 (n^2 / 2) 32 n = 64 n^3 products of a node's
 * weight and a pair's factor (50 slices: 8e6; 200 slices: 5e8, under a second), plus the transverse
 * tables (about a millisecond per node). Accuracy against boxCovariance0: within 2.2e-5 of each
 * correlation (test/uncertainty/box-covariance.test.ts, 1e-4 asserted; nodes 0.05 apart in ln w
 * gave the same but for narrow-band neighbours, 4e-7 where 0.1 gives 3.5e-6), for the no-wiggle
 * spectrum the uncertainties use; with the wiggles of the full form boxCovariance0's panels (6 points per half
 * period of the pair's own frequency) under-resolve the spectrum's oscillation and the two differ
 * by up to 1e-3.
 */
const SIDE_STEP = 0.1;
const Q_LN_K0 = Math.log(1e-9);
const Q_LN_K1 = Math.log(1e7);

/**
 * Q(k; w) at one transverse node, from lazily filled tables of ln I (over ln K) and ln Q (over
 * ln k) on one grid. A class rather than closures made per node, so that V8 compiles its methods
 * once for every node (closures of one source made afresh are compiled afresh, and a table
 * lookup calling a fill function passed to it met a new target at every node).
 */
class TransverseNode {
  private readonly lnI: Float64Array;
  private readonly lnQ: Float64Array;
  /** The smallest and largest of qx. */
  private readonly qMin: number;
  private readonly qMax: number;
  constructor(
    private readonly p0: (k2: number) => number,
    private readonly step: number,
    size: number,
    /** the transverse rules' squared wavenumbers and weights: x (width w) and y (height rho w) */
    private readonly qx: Float64Array,
    private readonly wx: Float64Array,
    private readonly qy: Float64Array,
    private readonly wy: Float64Array,
    private readonly norm: number,
  ) {
    this.lnI = new Float64Array(size).fill(NaN);
    this.lnQ = new Float64Array(size).fill(NaN);
    let qMin = Infinity;
    let qMax = -Infinity;
    for (let a = 0; a < qx.length; a++) {
      if (qx[a]! < qMin) qMin = qx[a]!;
      if (qx[a]! > qMax) qMax = qx[a]!;
    }
    this.qMin = qMin;
    this.qMax = qMax;
  }

  /**
   * Q at k^2: exp of the 4-point Lagrange cubic in ln Q through the cells m - 1 .. m + 2 around
   * x = (ln k - Q_LN_K0) / step (x held within the grid, 1 <= m <= size - 3); linear in the values
   * where one of the four is -Infinity (a spectrum that underflows, as only synthetic test
   * spectra do). The cells are filled as met unless prepare filled them. (The lookup is written
   * out here and in fillQ rather than called, so that V8 compiles it only inside them.)
   */
  at(k2: number): number {
    const table = this.lnQ;
    const length = table.length;
    let x = (0.5 * Math.log(k2) - Q_LN_K0) / this.step;
    if (x < 0) x = 0;
    if (x > length - 1) x = length - 1;
    let m = Math.floor(x);
    if (m < 1) m = 1;
    if (m > length - 3) m = length - 3;
    const y0 = table[m - 1]!;
    const y1 = table[m]!;
    const y2 = table[m + 1]!;
    const y3 = table[m + 2]!;
    if (Number.isNaN(y0) || Number.isNaN(y1) || Number.isNaN(y2) || Number.isNaN(y3)) {
      this.fillQCells(m);
      return this.at(k2);
    }
    const u = x - m;
    if (y0 === -Infinity || y1 === -Infinity || y2 === -Infinity || y3 === -Infinity) {
      const a = Math.exp(y1);
      const b = Math.exp(y2);
      return Math.max(0, (1 - u) * a + u * b);
    }
    return Math.exp(
      (-u * (u - 1) * (u - 2) * y0) / 6 +
        ((u + 1) * (u - 1) * (u - 2) * y1) / 2 -
        ((u + 1) * u * (u - 2) * y2) / 2 +
        ((u + 1) * u * (u - 1) * y3) / 6,
    );
  }

  /**
   * Fills the cells `cells` (lookupCells) of the ln Q table that are not yet filled, and first the
   * cells of the ln I table their sums meet: the same values the lookups would fill one by one
   * (each cell is the same sum whenever it is made), but with the fills out of the lookups' way,
   * so that V8 compiles the lookups without the fills inlined into them.
   */
  prepare(cells: Int32Array): void {
    const table = this.lnQ;
    let lo = -1;
    let hi = -1;
    for (let c = 0; c < cells.length; c++)
      if (Number.isNaN(table[cells[c]!]!)) {
        if (lo < 0) lo = cells[c]!;
        hi = cells[c]!;
      }
    if (lo < 0) return;
    this.fillIRange(
      Math.exp(2 * (Q_LN_K0 + lo * this.step)) + this.qMin,
      Math.exp(2 * (Q_LN_K0 + hi * this.step)) + this.qMax,
    );
    for (let c = 0; c < cells.length; c++) {
      const j = cells[c]!;
      if (Number.isNaN(table[j]!)) table[j] = this.fillQ(j);
    }
  }

  /** Fills the cells of the ln I table that lookups at K^2 from k2Lo to k2Hi meet. */
  private fillIRange(k2Lo: number, k2Hi: number): void {
    const table = this.lnI;
    const length = table.length;
    const lo = cellOf(length, clampX(length, (0.5 * Math.log(k2Lo) - Q_LN_K0) / this.step)) - 1;
    const hi = cellOf(length, clampX(length, (0.5 * Math.log(k2Hi) - Q_LN_K0) / this.step)) + 2;
    for (let j = lo; j <= hi; j++) if (Number.isNaN(table[j]!)) table[j] = this.fillI(j);
  }

  /** The ln Q cells m - 1 .. m + 2 not yet filled. */
  private fillQCells(m: number): void {
    const table = this.lnQ;
    for (let j = m - 1; j <= m + 2; j++) if (Number.isNaN(table[j]!)) table[j] = this.fillQ(j);
  }

  /** The ln I cells m - 1 .. m + 2 not yet filled. */
  private fillICells(m: number): void {
    const table = this.lnI;
    for (let j = m - 1; j <= m + 2; j++) if (Number.isNaN(table[j]!)) table[j] = this.fillI(j);
  }

  /** ln I at the cell m: I(K) = Σ_b wy_b P(K^2 + qy_b), the y axis's sum. */
  private fillI(m: number): number {
    const bigK2 = Math.exp(2 * (Q_LN_K0 + m * this.step));
    const { qy, wy, p0 } = this;
    let s = 0;
    for (let b = 0; b < qy.length; b++) s += wy[b]! * p0(bigK2 + qy[b]!);
    return s > 0 ? Math.log(s) : -Infinity;
  }

  /** ln Q at the cell m: norm Σ_a wx_a I(k_m^2 + qx_a), I by the lookup of `at` in the ln I table. */
  private fillQ(m: number): number {
    const kz2 = Math.exp(2 * (Q_LN_K0 + m * this.step));
    const { qx, wx, lnI } = this;
    const length = lnI.length;
    let s = 0;
    for (let a = 0; a < qx.length; a++) {
      let x = (0.5 * Math.log(kz2 + qx[a]!) - Q_LN_K0) / this.step;
      if (x < 0) x = 0;
      if (x > length - 1) x = length - 1;
      let c = Math.floor(x);
      if (c < 1) c = 1;
      if (c > length - 3) c = length - 3;
      if (Number.isNaN(lnI[c - 1]!) || Number.isNaN(lnI[c]!) || Number.isNaN(lnI[c + 1]!) || Number.isNaN(lnI[c + 2]!))
        this.fillICells(c);
      const y0 = lnI[c - 1]!;
      const y1 = lnI[c]!;
      const y2 = lnI[c + 1]!;
      const y3 = lnI[c + 2]!;
      const u = x - c;
      let v: number;
      if (y0 === -Infinity || y1 === -Infinity || y2 === -Infinity || y3 === -Infinity) {
        const ea = Math.exp(y1);
        const eb = Math.exp(y2);
        v = Math.max(0, (1 - u) * ea + u * eb);
      } else
        v = Math.exp(
          (-u * (u - 1) * (u - 2) * y0) / 6 +
            ((u + 1) * (u - 1) * (u - 2) * y1) / 2 -
            ((u + 1) * u * (u - 2) * y2) / 2 +
            ((u + 1) * u * (u - 1) * y3) / 6,
        );
      s += wx[a]! * v;
    }
    return s > 0 ? Math.log(this.norm * s) : -Infinity;
  }
}

interface FieldTables {
  step: number;
  size: number;
  rho: number;
  nodes: Map<number, TransverseNode>;
  /** By the slices (their ends): their M_g entries and the pass over their k_z rule. */
  sums: Map<string, SlicesEntry>;
  /** Bytes of the M_g matrices kept in `sums` (keepSums). */
  sumsBytes: number;
}

/** One set of slices' kept numbers. */
interface SlicesEntry {
  /** M_g entries by node g: n x n, NaN where not yet summed. */
  sums: Map<number, Float64Array>;
  /** Bytes of the matrices in `sums`. */
  bytes: number;
  /** The k_z rule and what depends on it alone, made at the first sums asked (sumPairs). */
  pass?: SlicesPass;
  /** The same for the real-space sums (sumPairsSpatial). */
  spatial?: SpatialPass;
  /** Nodes whose entries are summed pair by pair (sumPairs) among many slices (sumPairsSpatial). */
  pairwise?: number[];
}

/** What sumPairs makes once per set of slices: another area asks new nodes of the same rule. */
interface SlicesPass {
  rule: SlicesRule;
  nq: number;
  kEnd: number;
  /** The ln Q cells the rule's and beyond's lookups meet (lookupCells). */
  cells: Int32Array;
  factors: SliceFactors;
}

const fieldTables = new WeakMap<LinearPower, Map<string, FieldTables>>();

/**
 * How many bytes of M_g matrices one field's tables keep for slice sets other than the one being
 * worked on: each node's matrix is n x n, 8 MB at 1,000 slices, and a plan meets tens of nodes per
 * set, so without a bound a process working through many large sets of slices would keep them all
 * (up to 64 sets). Past it the oldest sets are dropped whole (made again, to the same numbers, if
 * asked again). A property so that tests can lower it.
 */
export const keptSliceSums = { limitBytes: 256 * 1024 * 1024 };

/** Bytes of M_g matrices kept for every field of `power` (for tests). */
export function keptSliceSumsBytes(power: LinearPower): number {
  let bytes = 0;
  for (const t of fieldTables.get(power)?.values() ?? []) bytes += t.sumsBytes;
  return bytes;
}

/** Keep node g's matrix m in `entry` of t, dropping t's oldest other sets past keptSliceSums.limitBytes. */
function keepSums(t: FieldTables, entry: SlicesEntry, g: number, m: Float64Array): void {
  const old = entry.sums.get(g);
  const change = m.byteLength - (old ? old.byteLength : 0);
  entry.sums.set(g, m);
  entry.bytes += change;
  t.sumsBytes += change;
  for (const [key, other] of t.sums) {
    if (t.sumsBytes <= keptSliceSums.limitBytes) break;
    if (other === entry) continue;
    t.sums.delete(key);
    t.sumsBytes -= other.bytes;
  }
}

function tablesFor(power: LinearPower, rho: number): FieldTables {
  let byRho = fieldTables.get(power);
  if (!byRho) fieldTables.set(power, (byRho = new Map<string, FieldTables>()));
  const key = rho.toPrecision(12);
  let t = byRho.get(key);
  if (!t) {
    if (byRho.size >= 16) byRho.delete(byRho.keys().next().value!);
    const step = power.form === 'full' ? 0.02 : 0.1;
    const size = Math.ceil((Q_LN_K1 - Q_LN_K0) / step) + 1;
    byRho.set(key, (t = { step, size, rho: Number(key), nodes: new Map(), sums: new Map(), sumsBytes: 0 }));
  }
  return t;
}

function transverseNode(power: LinearPower, t: FieldTables, g: number): TransverseNode {
  let node = t.nodes.get(g);
  if (!node) {
    const w = Math.exp(g * SIDE_STEP);
    const h = t.rho * w;
    const rx = transverseRule(w);
    const ry = transverseRule(h);
    const qx = rx.u.map((u) => ((2 * u) / w) ** 2);
    const qy = ry.u.map((u) => ((2 * u) / h) ** 2);
    // 1 / pi^3 times the Jacobians 4 / (w h) of the two transverse axes
    const norm = 4 / (Math.PI ** 3 * w * h);
    node = new TransverseNode(power.powerZ0FromK2, t.step, t.size, qx, rx.w, qy, ry.w, norm);
    if (t.nodes.size >= 512) t.nodes.delete(t.nodes.keys().next().value!);
    t.nodes.set(g, node);
  }
  return node;
}

/** x (a position on a table's grid of `length` values) held within the grid. */
function clampX(length: number, x: number): number {
  if (x < 0) return 0;
  if (x > length - 1) return length - 1;
  return x;
}

/** The cell m (1 <= m <= length - 3) of the 4-point Lagrange cubic at x (within the grid). */
function cellOf(length: number, x: number): number {
  let m = Math.floor(x);
  if (m < 1) m = 1;
  if (m > length - 3) m = length - 3;
  return m;
}

/**
 * The cells of a table on the grid of `step` (`size` values) that lookups at these k^2 meet
 * (each lookup's four), in increasing order.
 */
function lookupCells(k2s: Float64Array, size: number, step: number): Int32Array {
  const need = new Uint8Array(size);
  for (let i = 0; i < k2s.length; i++) {
    const m = cellOf(size, clampX(size, (0.5 * Math.log(k2s[i]!) - Q_LN_K0) / step));
    need[m - 1] = need[m] = need[m + 1] = need[m + 2] = 1;
  }
  let count = 0;
  for (let j = 0; j < size; j++) count += need[j]!;
  const cells = new Int32Array(count);
  for (let j = 0, c = 0; j < size; j++) if (need[j] === 1) cells[c++] = j;
  return cells;
}

/**
 * The k_z rule shared by every pair of the slices (see above): graded panels near 0 (nodes `k`,
 * weights `u`), then `panels` panels of width `width` (half the fastest period) from `start`
 * (Gauss-Legendre nodes `x`, weights `gw` on [-1, 1]) up to 8 lobes of the thinnest slice or just
 * beyond.
 */
interface SlicesRule {
  k: Float64Array;
  u: Float64Array;
  start: number;
  width: number;
  panels: number;
  x: Float64Array;
  gw: Float64Array;
}

function slicesRule(lo: Float64Array, hi: Float64Array): SlicesRule {
  let min = Infinity;
  let max = -Infinity;
  let thinnest = Infinity;
  for (let i = 0; i < lo.length; i++) {
    min = Math.min(min, lo[i]!);
    max = Math.max(max, hi[i]!);
    thinnest = Math.min(thinnest, hi[i]! - lo[i]!);
  }
  const h = Math.PI / (max - min);
  const kMax = (2 * LOBES * Math.PI) / thinnest;
  const gl = gaussLegendre(POINTS);
  const k: number[] = [];
  const u: number[] = [];
  const panel = (a: number, b: number): void => {
    const c = 0.5 * (a + b);
    const half = 0.5 * (b - a);
    for (let i = 0; i < POINTS; i++) {
      k.push(c + half * gl.x[i]!);
      u.push(gl.w[i]! * half);
    }
  };
  let b = Math.min(GRADE_K, h);
  panel(0, b);
  while (b < h) {
    const a = b;
    b = Math.min(h, b * 4);
    panel(a, b);
  }
  // uniform panels of PANEL_PERIODS fastest periods, PANEL_POINTS Gauss-Legendre nodes each
  const width = 2 * PANEL_PERIODS * h;
  const panels = Math.max(1, Math.ceil((kMax - b) / width));
  const glp = gaussLegendre(PANEL_POINTS);
  return { k: Float64Array.from(k), u: Float64Array.from(u), start: b, width, panels, x: glp.x, gw: glp.w };
}

/** A node's weights over the rule and its tail ∫ Q / k^2 beyond the rule. */
interface NodeSums {
  gq: Float64Array;
  tail: number;
}

/**
 * The tail rule of ∫_{kEnd}^∞ Q(k) / k^2 dk = ∫_0^{1/kEnd} Q(1/t) dt: three geometric panels in t
 * down to 1 / (64 kEnd), Gauss-Legendre nodes as k^2 with their weights, and kFar = 64 kEnd, beyond
 * which the power law Q ∝ k^-3 of the spectrum's tail gives Q(k_far) / (4 k_far) (that part is
 * ~(1/64)^4 of the whole).
 */
function tailRule(kEnd: number): { k2: number[]; w: number[]; kFar: number } {
  const gl = gaussLegendre(POINTS);
  const k2: number[] = [];
  const w: number[] = [];
  let tHi = 1 / kEnd;
  for (let j = 0; j < 3; j++) {
    const tLo = tHi / 4;
    const c = 0.5 * (tHi + tLo);
    const half = 0.5 * (tHi - tLo);
    for (let i = 0; i < POINTS; i++) {
      k2.push((1 / (c + half * gl.x[i]!)) ** 2);
      w.push(gl.w[i]! * half);
    }
    tHi = tLo;
  }
  return { k2, w, kFar: 1 / tHi };
}

/** ∫_{kEnd}^∞ Q(k) / k^2 dk on tailRule(kEnd). */
function beyond(node: TransverseNode, kEnd: number): number {
  const { k2, w, kFar } = tailRule(kEnd);
  let s = 0;
  for (let i = 0; i < k2.length; i++) s += w[i]! * node.at(k2[i]!);
  return s + node.at(kFar * kFar) / (4 * kFar);
}

/** The k^2 at which beyond(node, kEnd) looks Q up, in its order. */
function beyondPoints(kEnd: number): number[] {
  const { k2, kFar } = tailRule(kEnd);
  k2.push(kFar * kFar);
  return k2;
}

/** Panels per chunk of the pass over the rule. */
const CHUNK_PANELS = 64;

/**
 * Fills M_g,ij for the asked entries (`asked`: per pair i <= j, the nodes g it lacks): one pass
 * over the k_z rule in chunks of panels, the slices' factors e_i = sinc(k L_i / 2) e^{i k c_i}
 * of a chunk made first, on the uniform panels by the recurrence e^{i (k + width) c} =
 * e^{i k c} e^{i width c} from each panel's Gauss-Legendre offsets.
 */
function sumPairs(
  power: LinearPower,
  t: FieldTables,
  lo: Float64Array,
  hi: Float64Array,
  entry: SlicesEntry,
  asked: { i: number; j: number; nodes: number[] }[],
): void {
  // (the loops are functions of their own: V8 compiled this function whole, with them inlined,
  // once a plan had called it for a few areas; what depends on the slices alone is made once)
  const n = lo.length;
  const pass = (entry.pass ??= slicesPass(t, lo, hi));
  const { rule, nq, kEnd, cells, factors: f } = pass;
  // each node's weights u_q Q(k_q; w_g) over the rule, and its tail
  const gOf = new Map<number, NodeSums>();
  for (const a of asked)
    for (const g of a.nodes) {
      if (gOf.has(g)) continue;
      const node = transverseNode(power, t, g);
      node.prepare(cells);
      gOf.set(g, { gq: nodeWeights(node, rule, nq), tail: beyond(node, kEnd) });
    }
  const acc = asked.map((a) => new Float64Array(a.nodes.length));
  const gqs = asked.map((a) => a.nodes.map((g) => gOf.get(g)!.gq));
  f.reset();
  accumulate(asked, gqs, acc, f.headRe, f.headIm, rule.k.length, 0, rule.k.length);
  for (let p0 = 0; p0 < rule.panels; p0 += CHUNK_PANELS) {
    const np = Math.min(CHUNK_PANELS, rule.panels - p0);
    for (let i = 0; i < n; i++) f.panels(i, p0, np);
    accumulate(asked, gqs, acc, f.re, f.im, f.chunk, rule.k.length + rule.x.length * p0, rule.x.length * np);
  }
  storePairs(lo, hi, entry.sums, asked, acc, gOf);
}

function slicesPass(t: FieldTables, lo: Float64Array, hi: Float64Array): SlicesPass {
  const rule = slicesRule(lo, hi);
  const nq = rule.k.length + rule.x.length * rule.panels;
  const kEnd = rule.start + rule.panels * rule.width;
  const cells = lookupCells(ruleLookups(rule, nq, kEnd), t.size, t.step);
  return { rule, nq, kEnd, cells, factors: new SliceFactors(lo, hi, rule) };
}

/** Every k^2 at which sumPairs looks a node's Q up: the rule's, then beyond's (kEnd the rule's end). */
function ruleLookups(rule: SlicesRule, nq: number, kEnd: number): Float64Array {
  const { x, width, start, panels } = rule;
  const nHead = rule.k.length;
  const pp = x.length;
  const lookups = new Float64Array(nq + POINTS * 3 + 1);
  for (let q = 0; q < nHead; q++) lookups[q] = rule.k[q]! ** 2;
  for (let p = 0; p < panels; p++) {
    const c = start + (p + 0.5) * width;
    for (let m = 0; m < pp; m++) lookups[nHead + pp * p + m] = (c + 0.5 * width * x[m]!) ** 2;
  }
  lookups.set(beyondPoints(kEnd), nq);
  return lookups;
}

/** A node's weights u_q Q(k_q; w_g) over the rule's nq nodes. */
function nodeWeights(node: TransverseNode, rule: SlicesRule, nq: number): Float64Array {
  const { x, gw, width, start, panels } = rule;
  const nHead = rule.k.length;
  const pp = x.length;
  const gq = new Float64Array(nq);
  for (let q = 0; q < nHead; q++) gq[q] = rule.u[q]! * node.at(rule.k[q]! ** 2);
  for (let p = 0; p < panels; p++) {
    const c = start + (p + 0.5) * width;
    for (let m = 0; m < pp; m++)
      gq[nHead + pp * p + m] = 0.5 * width * gw[m]! * node.at((c + 0.5 * width * x[m]!) ** 2);
  }
  return gq;
}

/**
 * The slices' factors e_i = sinc(k L_i / 2) e^{i k c_i}: made at construction for the graded head
 * (`headRe`, `headIm`: slice i's from i * nHead), then by `panels` for CHUNK_PANELS uniform panels
 * of the rule at a time (`re`, `im`: slice i's from i * chunk), from the state `reset` sets. Per slice: e^{i width c} and e^{i width A} (the steps),
 * e^{i p width c} and e^{i p width A} at the chunk's first panel p (the state), and each
 * Gauss-Legendre node's offset in the first panel.
 */
class SliceFactors {
  readonly chunk: number;
  readonly re: Float64Array;
  readonly im: Float64Array;
  readonly headRe: Float64Array;
  readonly headIm: Float64Array;
  private readonly start: number;
  private readonly width: number;
  private readonly x: Float64Array;
  private readonly halfDepth: Float64Array;
  private readonly stepC: Float64Array;
  private readonly stepA: Float64Array;
  private readonly stateC: Float64Array;
  private readonly stateA: Float64Array;
  private readonly offC: Float64Array;
  private readonly offA: Float64Array;

  constructor(lo: Float64Array, hi: Float64Array, rule: SlicesRule) {
    const n = lo.length;
    const { x, width, start } = rule;
    const pp = x.length;
    const nHead = rule.k.length;
    this.start = start;
    this.width = width;
    this.x = x;
    const origin = 0.5 * (lo[0]! + hi[0]!);
    const centre = new Float64Array(n);
    const halfDepth = (this.halfDepth = new Float64Array(n));
    const stepC = (this.stepC = new Float64Array(2 * n));
    const stepA = (this.stepA = new Float64Array(2 * n));
    this.stateC = new Float64Array(2 * n);
    this.stateA = new Float64Array(2 * n);
    const offC = (this.offC = new Float64Array(2 * n * pp));
    const offA = (this.offA = new Float64Array(2 * n * pp));
    for (let i = 0; i < n; i++) {
      centre[i] = 0.5 * (lo[i]! + hi[i]!) - origin;
      halfDepth[i] = 0.5 * (hi[i]! - lo[i]!);
      stepC[2 * i] = Math.cos(width * centre[i]!);
      stepC[2 * i + 1] = Math.sin(width * centre[i]!);
      stepA[2 * i] = Math.cos(width * halfDepth[i]!);
      stepA[2 * i + 1] = Math.sin(width * halfDepth[i]!);
      for (let m = 0; m < pp; m++) {
        const k = start + 0.5 * width * (1 + x[m]!);
        offC[2 * (i * pp + m)] = Math.cos(k * centre[i]!);
        offC[2 * (i * pp + m) + 1] = Math.sin(k * centre[i]!);
        offA[2 * (i * pp + m)] = Math.cos(k * halfDepth[i]!);
        offA[2 * (i * pp + m) + 1] = Math.sin(k * halfDepth[i]!);
      }
    }
    const chunk = (this.chunk = pp * CHUNK_PANELS);
    this.re = new Float64Array(n * chunk);
    this.im = new Float64Array(n * chunk);
    const re = (this.headRe = new Float64Array(n * nHead));
    const im = (this.headIm = new Float64Array(n * nHead));
    // the graded head
    for (let i = 0; i < n; i++)
      for (let q = 0; q < nHead; q++) {
        const k = rule.k[q]!;
        const s = sinc(k * halfDepth[i]!);
        re[i * nHead + q] = s * Math.cos(k * centre[i]!);
        im[i * nHead + q] = s * Math.sin(k * centre[i]!);
      }
  }

  /** Every slice's state back at the first uniform panel (e^{i 0} = 1). */
  reset(): void {
    for (let i = 0; i < this.halfDepth.length; i++) {
      this.stateC[2 * i] = this.stateA[2 * i] = 1;
      this.stateC[2 * i + 1] = this.stateA[2 * i + 1] = 0;
    }
  }

  /** Slice i's factors over the uniform panels p0 .. p0 + np - 1, from its state at p0 (then moved on). */
  panels(i: number, p0: number, np: number): void {
    const { x, start, width, chunk, re, im, stateC, stateA, stepC, stepA, offC, offA } = this;
    const pp = x.length;
    let cr = stateC[2 * i]!;
    let ci = stateC[2 * i + 1]!;
    let ar = stateA[2 * i]!;
    let ai = stateA[2 * i + 1]!;
    const sr = stepC[2 * i]!;
    const si = stepC[2 * i + 1]!;
    const tr = stepA[2 * i]!;
    const ti = stepA[2 * i + 1]!;
    const a = this.halfDepth[i]!;
    for (let p = 0; p < np; p++) {
      const kc = start + (p0 + p) * width;
      for (let m = 0; m < pp; m++) {
        const o = 2 * (i * pp + m);
        const k = kc + 0.5 * width * (1 + x[m]!);
        // e^{i k c} and sin(k A) = Im e^{i k A}
        const er = cr * offC[o]! - ci * offC[o + 1]!;
        const ei = cr * offC[o + 1]! + ci * offC[o]!;
        const sinKA = ar * offA[o + 1]! + ai * offA[o]!;
        const kA = k * a;
        const s = kA < 1e-4 ? 1 - (kA * kA) / 6 : sinKA / kA;
        re[i * chunk + pp * p + m] = s * er;
        im[i * chunk + pp * p + m] = s * ei;
      }
      const ncr = cr * sr - ci * si;
      ci = cr * si + ci * sr;
      cr = ncr;
      const nar = ar * tr - ai * ti;
      ai = ar * ti + ai * tr;
      ar = nar;
    }
    stateC[2 * i] = cr;
    stateC[2 * i + 1] = ci;
    stateA[2 * i] = ar;
    stateA[2 * i + 1] = ai;
  }
}

/** Above this many slices, sliceCorrelations may sum the pairs in real space (sumPairsSpatial). */
const SPATIAL_SLICES = 16;

/**
 * The same M_g,ij in real space, for many slices (n > SPATIAL_SLICES): with Ξ_g(r) = Σ_q u_q
 * Q(k_q; w_g) cos(k_q r) on the same k_z rule, and F(r) = ∫_0^|r| (|r| - s) Ξ_g(s) ds (F'' = Ξ_g),
 * the identity sinc(k L_i / 2) sinc(k L_j / 2) cos(k (c_i - c_j)) L_i L_j = Σ_e s_e (1 - cos(k r_e)) / k^2
 * over the four differences of the slices' ends r_e (hi_j - lo_i and lo_j - hi_i with s_e = +1,
 * hi_j - hi_i and lo_j - lo_i with s_e = -1: the second derivative of the overlap of the two top
 * hats) gives M_g,ij = Σ_e s_e F(r_e) / (L_i L_j). Ξ_g is tabulated once per node on r = m h
 * (gridStep), its 4-point Lagrange cubics integrated exactly into F and F' at the grid's points; a
 * pair then costs four evaluations of F. The differences of nearly equal values (thin neighbours
 * far from the origin) lose little: the four ends lie within a few cells of each other, so F's
 * kept sums they share cancel exactly (Σ_e s_e = Σ_e s_e r_e = 0) and what remains is the cells'
 * closed forms. Fills the whole matrix of each node in `nodes` whose grid (span / h points, times
 * the rule's nodes) costs less than 0.6 times the pairs' sums it replaces (`pairsPerNode` pairs,
 * each a sum over the rule; the others are marked in `entry.pairwise` and left to sumPairs),
 * which depends on the node and the slices alone, so the numbers do not depend on what was asked
 * before. Measured (not asserted here): within 2.4e-6 of the pairs' sums with a bound of 1e-3,
 * up to 2.3e-5 for slices 0.66 Mpc deep, so the bound is 2e-4 (5.7e-7 there).
 */
function sumPairsSpatial(
  power: LinearPower,
  t: FieldTables,
  lo: Float64Array,
  hi: Float64Array,
  entry: SlicesEntry,
  nodes: readonly number[],
  pairsPerNode: number,
  everyNode: boolean,
): void {
  const n = lo.length;
  const spatial = (entry.spatial ??= spatialPass(t, lo, hi));
  const { rule, nq, kEnd, cells, ks, span, widest } = spatial;
  // each node's weights, tail and grid step; nodes of one step share the pass over the grid
  const byStep = new Map<number, { g: number; gq: Float64Array; tail: number }[]>();
  for (const g of nodes) {
    const node = transverseNode(power, t, g);
    node.prepare(cells);
    const gq = nodeWeights(node, rule, nq);
    const h = gridStep(ks, gq, widest);
    if (!everyNode && Math.ceil(span / h) + 3 > 0.6 * pairsPerNode) {
      // the grid would cost more than the pairs' sums: this node's entries are summed pair by pair
      keepSums(t, entry, g, new Float64Array(n * n).fill(NaN));
      (entry.pairwise ??= []).push(g);
      continue;
    }
    let list = byStep.get(h);
    if (!list) byStep.set(h, (list = []));
    list.push({ g, gq, tail: beyond(node, kEnd) });
  }
  const tol = 1e-9 * span;
  for (const [h, list] of byStep)
    for (let b = 0; b < list.length; b += 4) {
      const group = list.slice(b, b + 4);
      const size = Math.ceil(span / h) + 3;
      const xis = xiGrids(
        ks,
        group.map((x) => x.gq),
        h,
        size,
      );
      group.forEach(({ g, tail }, d) => {
        const m = new Float64Array(n * n);
        fillSpatial(new SecondIntegral(xis[d]!, h), tail, lo, hi, tol, m);
        keepSums(t, entry, g, m);
      });
    }
}

/** One node's M_ij for every pair from its F (SecondIntegral) and tail (the zero-frequency part as storePairs adds it). */
function fillSpatial(
  f: SecondIntegral,
  tail: number,
  lo: Float64Array,
  hi: Float64Array,
  tol: number,
  m: Float64Array,
): void {
  const n = lo.length;
  for (let i = 0; i < n; i++)
    for (let j = i; j < n; j++) {
      const loI = lo[i]!;
      const hiI = hi[i]!;
      const loJ = lo[j]!;
      const hiJ = hi[j]!;
      let c0 = 0;
      if (Math.abs(hiI - hiJ) < tol) c0 += 1;
      if (Math.abs(loI - loJ) < tol) c0 += 1;
      if (Math.abs(hiI - loJ) < tol) c0 -= 1;
      if (Math.abs(loI - hiJ) < tol) c0 -= 1;
      const v =
        (f.at(hiJ - loI) + f.at(loJ - hiI) - f.at(hiJ - hiI) - f.at(loJ - loI) + c0 * tail) /
        ((hiI - loI) * (hiJ - loJ));
      m[i * n + j] = m[j * n + i] = v;
    }
}

/** What sumPairsSpatial makes once per set of slices: the k_z rule (sumPairs' own) and its nodes, the span of the ends. */
interface SpatialPass {
  rule: SlicesRule;
  nq: number;
  kEnd: number;
  cells: Int32Array;
  /** The rule's k_z nodes in its order. */
  ks: Float64Array;
  /** The widest difference of two slices' ends, and the widest slice's depth. */
  span: number;
  widest: number;
}

function spatialPass(t: FieldTables, lo: Float64Array, hi: Float64Array): SpatialPass {
  const rule = slicesRule(lo, hi);
  const nq = rule.k.length + rule.x.length * rule.panels;
  const kEnd = rule.start + rule.panels * rule.width;
  const lookups = ruleLookups(rule, nq, kEnd);
  const cells = lookupCells(lookups, t.size, t.step);
  const ks = new Float64Array(nq);
  for (let q = 0; q < nq; q++) ks[q] = Math.sqrt(lookups[q]!);
  let min = Infinity;
  let max = -Infinity;
  let widest = 0;
  for (let i = 0; i < lo.length; i++) {
    min = Math.min(min, lo[i]!);
    max = Math.max(max, hi[i]!);
    widest = Math.max(widest, hi[i]! - lo[i]!);
  }
  return { rule, nq, kEnd, cells, ks, span: max - min, widest };
}

/** The bound on the cubic interpolation's error, relative to the smallest diagonal entry (gridStep). */
const SPATIAL_TOL = 2e-4;

/**
 * The largest grid step h (within a factor 2^(1/4)) at which the 4-point cubics' bound on the error
 * of Ξ, Σ_q |g_q| min(2, (9/384) (k_q h)^4), is within SPATIAL_TOL of the smallest diagonal entry
 * (the widest slice's, estimated by Σ_q g_q sinc^2(k_q L / 2)).
 */
function gridStep(ks: Float64Array, gq: Float64Array, widest: number): number {
  let diag = 0;
  for (let q = 0; q < ks.length; q++) diag += gq[q]! * sinc(0.5 * ks[q]! * widest) ** 2;
  const bound = (h: number): number => {
    let s = 0;
    for (let q = 0; q < ks.length; q++) s += Math.abs(gq[q]!) * Math.min(2, (9 / 384) * (ks[q]! * h) ** 4);
    return s;
  };
  let h = 4 / ks[ks.length - 1]!;
  while (bound(h * 1.189207115002721) <= SPATIAL_TOL * diag && h < 1e6) h *= 1.189207115002721;
  while (bound(h) > SPATIAL_TOL * diag && h > 1e-9) h /= 1.189207115002721;
  return h;
}

/** Ξ(r_m) = Σ_q g_q cos(k_q m step) for m = 0 .. size - 1, for up to four weight vectors at once. */
function xiGrids(ks: Float64Array, gs: readonly Float64Array[], step: number, size: number): Float64Array[] {
  const out = gs.map(() => new Float64Array(size));
  const zero = new Float64Array(ks.length);
  const g0 = gs[0] ?? zero;
  const g1 = gs[1] ?? zero;
  const g2 = gs[2] ?? zero;
  const g3 = gs[3] ?? zero;
  const o0 = out[0]!;
  const o1 = out[1] ?? new Float64Array(size);
  const o2 = out[2] ?? new Float64Array(size);
  const o3 = out[3] ?? new Float64Array(size);
  xiLoop(ks, g0, g1, g2, g3, o0, o1, o2, o3, step, size);
  return out;
}

function xiLoop(
  ks: Float64Array,
  g0: Float64Array,
  g1: Float64Array,
  g2: Float64Array,
  g3: Float64Array,
  o0: Float64Array,
  o1: Float64Array,
  o2: Float64Array,
  o3: Float64Array,
  step: number,
  size: number,
): void {
  for (let q = 0; q < ks.length; q++) {
    const theta = ks[q]! * step;
    const cr = Math.cos(theta);
    const sr = Math.sin(theta);
    const a0 = g0[q]!;
    const a1 = g1[q]!;
    const a2 = g2[q]!;
    const a3 = g3[q]!;
    let c = 1;
    let s = 0;
    for (let m = 0; m < size; m++) {
      o0[m]! += a0 * c;
      o1[m]! += a1 * c;
      o2[m]! += a2 * c;
      o3[m]! += a3 * c;
      const nc = c * cr - s * sr;
      s = c * sr + s * cr;
      c = nc;
    }
  }
}

/**
 * F(x) = ∫_0^|x| (|x| - s) Ξ(s) ds for Ξ given on r_m = m step (m = 0 .. size - 1, even in r),
 * between the points by the 4-point Lagrange cubic through m - 1 .. m + 2 of the cell [r_m, r_m+1],
 * integrated exactly: F and F' kept at the points, the cell's part in closed form.
 */
class SecondIntegral {
  private readonly c: Float64Array;
  private readonly f1: Float64Array;
  private readonly f2: Float64Array;
  private readonly cellsN: number;

  constructor(
    xi: Float64Array,
    private readonly step: number,
  ) {
    const cellsN = (this.cellsN = xi.length - 2);
    const c = (this.c = new Float64Array(4 * cellsN));
    const f1 = (this.f1 = new Float64Array(cellsN + 1));
    const f2 = (this.f2 = new Float64Array(cellsN + 1));
    for (let m = 0; m < cellsN; m++) {
      const y0 = m === 0 ? xi[1]! : xi[m - 1]!;
      const y1 = xi[m]!;
      const y2 = xi[m + 1]!;
      const y3 = xi[m + 2]!;
      const c0 = y1;
      const c1 = -y0 / 3 - y1 / 2 + y2 - y3 / 6;
      const c2 = 0.5 * (y0 + y2) - y1;
      const c3 = (y3 - y0) / 6 + 0.5 * (y1 - y2);
      c[4 * m] = c0;
      c[4 * m + 1] = c1;
      c[4 * m + 2] = c2;
      c[4 * m + 3] = c3;
      f2[m + 1] = f2[m]! + step * f1[m]! + step * step * (c0 / 2 + c1 / 6 + c2 / 12 + c3 / 20);
      f1[m + 1] = f1[m]! + step * (c0 + c1 / 2 + c2 / 3 + c3 / 4);
    }
  }

  at(x: number): number {
    const r = Math.abs(x) / this.step;
    let m = Math.floor(r);
    if (m > this.cellsN - 1) m = this.cellsN - 1;
    const u = r - m;
    const c = this.c;
    const o = 4 * m;
    const h = this.step;
    return (
      this.f2[m]! +
      u * h * this.f1[m]! +
      h * h * u * u * (c[o]! / 2 + u * (c[o + 1]! / 6 + u * (c[o + 2]! / 12 + (u * c[o + 3]!) / 20)))
    );
  }
}

/** Each asked entry M_g,ij: its sum plus the zero-frequency part of the tail. */
function storePairs(
  lo: Float64Array,
  hi: Float64Array,
  sums: Map<number, Float64Array>,
  asked: readonly { i: number; j: number; nodes: number[] }[],
  acc: readonly Float64Array[],
  gOf: Map<number, NodeSums>,
): void {
  const n = lo.length;
  let lowest = Infinity;
  let highest = -Infinity;
  for (let i = 0; i < n; i++) {
    lowest = Math.min(lowest, lo[i]!);
    highest = Math.max(highest, hi[i]!);
  }
  const tol = 1e-9 * (highest - lowest);
  asked.forEach(({ i, j, nodes }, p) => {
    // the zero-frequency part of Re[e_i e_j^*] L_i L_j k^2 beyond kMax: cos of the ends' differences
    let c0 = 0;
    if (Math.abs(hi[i]! - hi[j]!) < tol) c0 += 1;
    if (Math.abs(lo[i]! - lo[j]!) < tol) c0 += 1;
    if (Math.abs(hi[i]! - lo[j]!) < tol) c0 -= 1;
    if (Math.abs(lo[i]! - hi[j]!) < tol) c0 -= 1;
    const l2 = (hi[i]! - lo[i]!) * (hi[j]! - lo[j]!);
    nodes.forEach((g, d) => {
      const m = sums.get(g)!;
      m[i * n + j] = m[j * n + i] = acc[p]![d]! + (c0 * gOf.get(g)!.tail) / l2;
    });
  });
}

/** Adds Σ_q g_q (re_i re_j + im_i im_j) over the chunk's `len` nodes (rule index from q0) to each asked entry. */
function accumulate(
  asked: readonly { i: number; j: number; nodes: number[] }[],
  gqs: readonly Float64Array[][],
  acc: readonly Float64Array[],
  re: Float64Array,
  im: Float64Array,
  chunk: number,
  q0: number,
  len: number,
): void {
  for (let p = 0; p < asked.length; p++) {
    const { i, j } = asked[p]!;
    const g = gqs[p]!;
    const out = acc[p]!;
    if (g.length === 4) sum4(g[0]!, g[1]!, g[2]!, g[3]!, re, im, i * chunk, j * chunk, q0, len, out);
    else for (let d = 0; d < g.length; d++) out[d]! += sum1(g[d]!, re, im, i * chunk, j * chunk, q0, len);
  }
}

function sum1(
  g: Float64Array,
  re: Float64Array,
  im: Float64Array,
  oi: number,
  oj: number,
  q0: number,
  len: number,
): number {
  let s = 0;
  for (let q = 0; q < len; q++) s += g[q0 + q]! * (re[oi + q]! * re[oj + q]! + im[oi + q]! * im[oj + q]!);
  return s;
}

function sum4(
  g0: Float64Array,
  g1: Float64Array,
  g2: Float64Array,
  g3: Float64Array,
  re: Float64Array,
  im: Float64Array,
  oi: number,
  oj: number,
  q0: number,
  len: number,
  out: Float64Array,
): void {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  for (let q = 0; q < len; q++) {
    const e = re[oi + q]! * re[oj + q]! + im[oi + q]! * im[oj + q]!;
    s0 += g0[q0 + q]! * e;
    s1 += g1[q0 + q]! * e;
    s2 += g2[q0 + q]! * e;
    s3 += g3[q0 + q]! * e;
  }
  out[0]! += s0;
  out[1]! += s1;
  out[2]! += s2;
  out[3]! += s3;
}

/**
 * The correlation matrix of the slices' mean density contrasts in one field,
 * R_ij = C_ij / sqrt(C_ii C_jj) with C the covariance of boxCovariance0 (each pair's transverse
 * sides their geometric mean), computed from the tables described above (the growth factors
 * cancel; the diagonal is 1 exactly). A slice's cosmic-variance fractions f_i then give the
 * covariance of their fractional count fluctuations f_i f_j R_ij. The slices share the field's
 * shape: height over width the same for all (to 1e-9). `options.method`: 'auto' (more than 16
 * slices: each transverse node in real space where that costs less, sumPairsSpatial), 'pairs'
 * (every entry pair by pair, sumPairs) or 'spatial' (every node in real space); the tests compare
 * them.
 */
export function sliceCorrelations(
  power: LinearPower,
  slices: readonly SliceBox[],
  options: { method?: 'auto' | 'pairs' | 'spatial' } = {},
): number[][] {
  const n = slices.length;
  const lo = new Float64Array(n);
  const hi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = slices[i]!;
    for (const x of s.sides)
      if (!(x > 0) || !Number.isFinite(x))
        throw new RangeError(`sliceCorrelations: every box side must be a positive finite length in Mpc, got ${x}`);
    if (!Number.isFinite(s.centreMpc))
      throw new RangeError(`sliceCorrelations: a slice's centre must be a finite distance in Mpc, got ${s.centreMpc}`);
    lo[i] = s.centreMpc - 0.5 * s.sides[2];
    hi[i] = s.centreMpc + 0.5 * s.sides[2];
  }
  const r: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  if (n === 0) return r;
  const rho = slices[0]!.sides[1] / slices[0]!.sides[0];
  for (const s of slices) {
    if (Math.abs(s.sides[1] / s.sides[0] / rho - 1) > 1e-9)
      throw new RangeError('sliceCorrelations: the slices of one field must share its height over width');
  }
  const t = tablesFor(power, rho);
  const method = options.method ?? 'auto';
  const spatial = method === 'spatial' || (method === 'auto' && n > SPATIAL_SLICES);
  // the number of transverse nodes the pairs meet (for sumPairsSpatial's choice; part of the key,
  // so that another area of the same field, every width scaled alike, finds the same choice)
  let gLo = Infinity;
  let gHi = -Infinity;
  for (const sl of slices) {
    gLo = Math.min(gLo, Math.floor(Math.log(sl.sides[0]) / SIDE_STEP));
    gHi = Math.max(gHi, Math.floor(Math.log(sl.sides[0]) / SIDE_STEP));
  }
  const nodeCount = gHi - gLo + 4;
  const key = `${spatial ? `${method} ${nodeCount} ` : ''}${n} ${Array.from(lo).join(',')} ${Array.from(hi).join(',')}`;
  let entry = t.sums.get(key);
  if (!entry) {
    if (t.sums.size >= 64) {
      const [oldest, dropped] = t.sums.entries().next().value!;
      t.sums.delete(oldest);
      t.sumsBytes -= dropped.bytes;
    }
    t.sums.set(key, (entry = { sums: new Map<number, Float64Array>(), bytes: 0 }));
  }
  const sums = entry.sums;
  // each pair's nodes and Lagrange weights in ln w
  const nodeOf = new Int32Array(n * n);
  const weightOf = new Float64Array(4 * n * n);
  const asked: { i: number; j: number; nodes: number[] }[] = [];
  const missing = new Set<number>();
  for (let i = 0; i < n; i++)
    for (let j = i; j < n; j++) {
      const x = (0.5 * Math.log(slices[i]!.sides[0] * slices[j]!.sides[0])) / SIDE_STEP;
      const g = Math.floor(x);
      const u = x - g;
      nodeOf[i * n + j] = g;
      const o = 4 * (i * n + j);
      weightOf[o] = (-u * (u - 1) * (u - 2)) / 6;
      weightOf[o + 1] = ((u + 1) * (u - 1) * (u - 2)) / 2;
      weightOf[o + 2] = (-(u + 1) * u * (u - 2)) / 2;
      weightOf[o + 3] = ((u + 1) * u * (u - 1)) / 6;
      if (spatial) {
        for (let c = -1; c <= 2; c++) if (!sums.has(g + c)) missing.add(g + c);
        continue;
      }
      const lacking: number[] = [];
      for (let c = -1; c <= 2; c++) {
        let m = sums.get(g + c);
        if (!m) keepSums(t, entry, g + c, (m = new Float64Array(n * n).fill(NaN)));
        if (Number.isNaN(m[i * n + j]!)) lacking.push(g + c);
      }
      if (lacking.length > 0) asked.push({ i, j, nodes: lacking });
    }
  if (spatial) {
    // nodes met for the first time: in real space where its grid is cheaper, else pair by pair
    if (missing.size > 0)
      sumPairsSpatial(
        power,
        t,
        lo,
        hi,
        entry,
        [...missing].sort((x, y) => x - y),
        ((n * (n + 1)) / 2) * Math.min(1, 4 / nodeCount),
        method === 'spatial',
      );
    const partial = new Set<number>(entry.pairwise);
    if (partial.size > 0)
      for (let i = 0; i < n; i++)
        for (let j = i; j < n; j++) {
          const g = nodeOf[i * n + j]!;
          const lacking: number[] = [];
          for (let c = -1; c <= 2; c++)
            if (partial.has(g + c) && Number.isNaN(sums.get(g + c)![i * n + j]!)) lacking.push(g + c);
          if (lacking.length > 0) asked.push({ i, j, nodes: lacking });
        }
  }
  if (asked.length > 0) sumPairs(power, t, lo, hi, entry, asked);
  const c = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let j = i; j < n; j++) {
      const g = nodeOf[i * n + j]!;
      const o = 4 * (i * n + j);
      let s = 0;
      for (let d = 0; d < 4; d++) s += weightOf[o + d]! * sums.get(g - 1 + d)![i * n + j]!;
      c[i * n + j] = s;
    }
  for (let i = 0; i < n; i++) {
    r[i]![i] = 1;
    for (let j = i + 1; j < n; j++) r[i]![j] = r[j]![i] = c[i * n + j]! / Math.sqrt(c[i * n + i]! * c[j * n + j]!);
  }
  return r;
}
