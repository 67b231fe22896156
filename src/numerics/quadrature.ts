/**
 * Numerical integration of smooth real functions.
 *
 * - `gaussLegendreRule(n)`: n-point Gauss-Legendre nodes and weights on [-1, 1], computed by Newton's
 *   method on the Legendre recurrence (Press et al., Numerical Recipes, 3rd ed., section 4.6) and
 *   cached per n. Exact for polynomials of degree <= 2n - 1.
 * - `gaussLegendre(f, a, b, n)`: the fixed rule mapped to [a, b]. Best for analytic integrands on a
 *   fixed interval (the error falls geometrically with n).
 * - `panelNodes(cuts, maxStep, n, out?)`: composite n-point Gauss-Legendre rule between cut points
 *   (kinks of the integrand), each piece split into equal panels no wider than maxStep.
 * - `integrate(f, a, b, opts)`: globally adaptive Gauss-Kronrod 10-21 quadrature with the QUADPACK
 *   error estimate (Piessens, de Doncker-Kapenga, Ueberhuber & Kahaner 1983, QUADPACK, routine QK21
 *   and QAG; nodes and weights from QK21). Returns the value and an error estimate.
 * - `integrateToInfinity(f, a, opts)`: integral over [a, inf) via t = a + u/(1-u).
 */

export interface QuadratureRule {
  /** Nodes on [-1, 1], ascending. */
  readonly nodes: Float64Array;
  /** Weights (sum to 2). */
  readonly weights: Float64Array;
}

const ruleCache = new Map<number, QuadratureRule>();

/** P_n(z) and P_(n-1)(z) of legendreAt (gaussLegendreRule does not nest). */
const legendre = new Float64Array(2);

/**
 * P_n(z) and P_(n-1)(z) by the three-term recurrence (DLMF 18.9.1) into out. A function of its own:
 * run cold, V8's optimising compiler costs more the larger the function it optimises, and every
 * process makes a few rules (DEVELOPERS.md, "Start-up time"); the arithmetic is the same.
 */
function legendreAt(n: number, z: number, out: Float64Array): void {
  let p1 = 1;
  let p2 = 0;
  for (let j = 1; j <= n; j++) {
    const p3 = p2;
    p2 = p1;
    p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
  }
  out[0] = p1;
  out[1] = p2;
}

/**
 * n-point Gauss-Legendre rule on [-1, 1] (cached). n must be an integer in [1, 1000].
 * Nodes are roots of P_n; weights w_i = 2 / ((1 - x_i^2) P_n'(x_i)^2) (DLMF 3.5.19).
 */
export function gaussLegendreRule(n: number): QuadratureRule {
  const cached = ruleCache.get(n);
  if (cached) return cached;
  if (!Number.isInteger(n) || n < 1 || n > 1000) {
    throw new Error(`Gauss-Legendre rule needs an integer number of points in [1, 1000], got ${n}`);
  }
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  const m = Math.floor((n + 1) / 2);
  for (let i = 0; i < m; i++) {
    // Initial guess (Tricomi), then Newton on P_n.
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 0;
    for (let iter = 0; iter < 100; iter++) {
      legendreAt(n, z, legendre);
      const p1 = legendre[0]!;
      pp = (n * (z * p1 - legendre[1]!)) / (z * z - 1);
      const dz = p1 / pp;
      z -= dz;
      if (Math.abs(dz) <= 1e-16) {
        // one more evaluation of the derivative at the converged node
        legendreAt(n, z, legendre);
        pp = (n * (z * legendre[0]! - legendre[1]!)) / (z * z - 1);
        break;
      }
    }
    const w = 2 / ((1 - z * z) * pp * pp);
    nodes[i] = -z;
    nodes[n - 1 - i] = z;
    weights[i] = w;
    weights[n - 1 - i] = w;
  }
  if (n % 2 === 1) nodes[(n - 1) / 2] = 0;
  const rule = { nodes, weights };
  ruleCache.set(n, rule);
  return rule;
}

/**
 * Fixed n-point Gauss-Legendre quadrature of f over [a, b] (a > b gives the negative integral).
 * @example gaussLegendre(Math.exp, 0, 1, 10) // e - 1 to about 1e-16
 */
export function gaussLegendre(f: (x: number) => number, a: number, b: number, n: number): number {
  const { nodes, weights } = gaussLegendreRule(n);
  const c = 0.5 * (a + b);
  const h = 0.5 * (b - a);
  let s = 0;
  for (let i = 0; i < n; i++) s += weights[i]! * f(c + h * nodes[i]!);
  return s * h;
}

/** Nodes x[0..count) and weights w[0..count) of a composite rule (see `panelNodes`). */
export interface PanelNodes {
  x: Float64Array;
  w: Float64Array;
  count: number;
}

/**
 * True when every value is at most the next (so that sorting would leave the array as it is: the
 * sort is stable). Most cuts come in order, often just two; Array.prototype.sort allocates a work
 * copy and boxes every comparison in code not yet optimised (a cold forecast of the narrow-band
 * sample sorted about 2300 such arrays, 2.6 MB of garbage).
 */
export function ascending(values: readonly number[]): boolean {
  for (let i = 0; i + 1 < values.length; i++) if (!(values[i]! <= values[i + 1]!)) return false;
  return true;
}

/**
 * Composite n-point Gauss-Legendre rule between cut points: sum w[i] f(x[i]) over i < count
 * approximates the integral of f over [min(cuts), max(cuts)]. `cuts` are the points the integrand
 * may have a kink at (the ends included); they are sorted in place. Each piece between
 * neighbouring cuts is split into ceil(width / maxStep) (at least 1) equal panels of width h, with
 * nodes pa + h (x_q + 1) / 2 and weights h w_q / 2 (pa the panel's start), in ascending order.
 * `out`, when given, is filled and returned (its arrays replaced by larger ones when too short):
 * hot loops keep one and reuse it instead of allocating per call.
 * @example const p = panelNodes([0, 1], 0.5, 4); // 8 nodes; sum of p.w[i] p.x[i]^2 = 1/3
 */
export function panelNodes(cuts: number[], maxStep: number, n: number, out?: PanelNodes): PanelNodes {
  const { nodes, weights } = gaussLegendreRule(n);
  if (!ascending(cuts)) cuts.sort((x, y) => x - y);
  let size = 0;
  for (let i = 0; i + 1 < cuts.length; i++) size += n * Math.max(1, Math.ceil((cuts[i + 1]! - cuts[i]!) / maxStep));
  const p = out ?? { x: new Float64Array(size), w: new Float64Array(size), count: 0 };
  if (p.x.length < size) {
    const grown = Math.max(size, 2 * p.x.length);
    p.x = new Float64Array(grown);
    p.w = new Float64Array(grown);
  }
  const { x, w } = p;
  let k = 0;
  for (let i = 0; i + 1 < cuts.length; i++) {
    const a = cuts[i]!;
    const b = cuts[i + 1]!;
    const nSub = Math.max(1, Math.ceil((b - a) / maxStep));
    const h = (b - a) / nSub;
    for (let j = 0; j < nSub; j++) {
      const pa = a + j * h;
      for (let q = 0; q < n; q++, k++) {
        x[k] = pa + 0.5 * h * (nodes[q]! + 1);
        w[k] = 0.5 * h * weights[q]!;
      }
    }
  }
  p.count = k;
  return p;
}

// QUADPACK QK21: abscissae of the 21-point Kronrod rule (xgk[1], xgk[3], ... are the 10-point
// Gauss nodes) and their weights, positive half, as published in QUADPACK (Piessens et al. 1983).
const XGK = [
  0.995657163025808080735527280689003, 0.973906528517171720077964012084452, 0.930157491355708226001207180059508,
  0.865063366688984510732096688423493, 0.780817726586416897063717578345042, 0.679409568299024406234327365114874,
  0.562757134668604683339000099272694, 0.433395394129247190799265943165784, 0.294392862701460198131126603103866,
  0.14887433898163121088482600112972, 0,
];
const WGK = [
  0.011694638867371874278064396062192, 0.03255816230796472747881897245939, 0.05475589657435199603138130024458,
  0.07503967481091995276704314091619, 0.093125454583697605535065465083366, 0.109387158802297641899210590325805,
  0.123491976262065851077958109831074, 0.134709217311473325928054001771707, 0.142775938577060080797094273138717,
  0.147739104901338491374841515972068, 0.149445554002916905664936468389821,
];
const WG = [
  0.066671344308688137593568809893332, 0.149451349150580593145776339657697, 0.219086362515982043995534934228163,
  0.269266719309996355091226921569469, 0.295524224714752870173892994651338,
];

/** Kronrod nodes and weights of QK21 on [-1, 1] (exposed for tests: exact to degree 31). */
export const KRONROD21 = { xgk: XGK, wgk: WGK, wg: WG } as const;

interface Segment {
  a: number;
  b: number;
  value: number;
  error: number;
  depth: number;
}

const EPS = Number.EPSILON;

/** One QK21 panel: Kronrod value and the QUADPACK error estimate. */
function qk21(f: (x: number) => number, a: number, b: number): { value: number; error: number } {
  const centr = 0.5 * (a + b);
  const hlgth = 0.5 * (b - a);
  const dhlgth = Math.abs(hlgth);
  const fc = f(centr);
  let resg = 0;
  let resk = WGK[10]! * fc;
  let resabs = Math.abs(resk);
  const fv1 = new Array<number>(10);
  const fv2 = new Array<number>(10);
  for (let j = 0; j < 10; j++) {
    const absc = hlgth * XGK[j]!;
    const f1 = f(centr - absc);
    const f2 = f(centr + absc);
    fv1[j] = f1;
    fv2[j] = f2;
    resk += WGK[j]! * (f1 + f2);
    resabs += WGK[j]! * (Math.abs(f1) + Math.abs(f2));
    if (j % 2 === 1) resg += WG[(j - 1) / 2]! * (f1 + f2);
  }
  const reskh = resk * 0.5;
  let resasc = WGK[10]! * Math.abs(fc - reskh);
  for (let j = 0; j < 10; j++) {
    resasc += WGK[j]! * (Math.abs(fv1[j]! - reskh) + Math.abs(fv2[j]! - reskh));
  }
  const result = resk * hlgth;
  resabs *= dhlgth;
  resasc *= dhlgth;
  let abserr = Math.abs((resk - resg) * hlgth);
  if (resasc !== 0 && abserr !== 0) abserr = resasc * Math.min(1, Math.pow((200 * abserr) / resasc, 1.5));
  if (resabs > Number.MIN_VALUE / (50 * EPS)) abserr = Math.max(EPS * 50 * resabs, abserr);
  return { value: result, error: abserr };
}

export interface IntegrateOptions {
  /** Relative tolerance on the result (default 1e-10). */
  rel?: number;
  /** Absolute tolerance (default 0). Stops when error <= max(abs, rel * |value|). */
  abs?: number;
  /** Largest number of bisections of one panel (default 30). */
  maxDepth?: number;
  /** Largest number of panels (default 2000). */
  maxPanels?: number;
}

export interface IntegrateResult {
  value: number;
  /** Estimated absolute error (QUADPACK estimate summed over panels). */
  error: number;
  /** True when the requested tolerance was met. */
  converged: boolean;
  /** Number of function evaluations. */
  evaluations: number;
}

/**
 * Globally adaptive Gauss-Kronrod (10-21) quadrature of f over [a, b]: the panel with the largest
 * error estimate is bisected until the summed estimate is within max(abs, rel |value|), or no
 * panel can be split further (maxDepth, maxPanels). Finite a and b; a > b gives the negative.
 * Does not throw when the tolerance is missed: check `converged`.
 * @example integrate(Math.sin, 0, Math.PI).value // 2
 */
export function integrate(
  f: (x: number) => number,
  a: number,
  b: number,
  opts: IntegrateOptions = {},
): IntegrateResult {
  const rel = opts.rel ?? 1e-10;
  const absTol = opts.abs ?? 0;
  const maxDepth = opts.maxDepth ?? 30;
  const maxPanels = opts.maxPanels ?? 2000;
  if (!Number.isFinite(a) || !Number.isFinite(b)) {
    throw new Error('integrate needs finite limits; use integrateToInfinity for [a, inf)');
  }
  if (a === b) return { value: 0, error: 0, converged: true, evaluations: 0 };
  const first = qk21(f, a, b);
  let evaluations = 21;
  const segs: Segment[] = [{ a, b, value: first.value, error: first.error, depth: 0 }];
  let total = first.value;
  let totalErr = first.error;
  while (totalErr > Math.max(absTol, rel * Math.abs(total)) && segs.length < maxPanels) {
    // pick the splittable panel with the largest error
    let k = -1;
    let kErr = -1;
    for (let i = 0; i < segs.length; i++) {
      const s = segs[i]!;
      if (s.depth < maxDepth && s.error > kErr) {
        kErr = s.error;
        k = i;
      }
    }
    if (k < 0) break;
    const s = segs[k]!;
    const mid = 0.5 * (s.a + s.b);
    const left = qk21(f, s.a, mid);
    const right = qk21(f, mid, s.b);
    evaluations += 42;
    total += left.value + right.value - s.value;
    totalErr += left.error + right.error - s.error;
    segs[k] = { a: s.a, b: mid, value: left.value, error: left.error, depth: s.depth + 1 };
    segs.push({ a: mid, b: s.b, value: right.value, error: right.error, depth: s.depth + 1 });
  }
  // re-sum to remove drift from the running updates
  total = 0;
  totalErr = 0;
  for (const s of segs) {
    total += s.value;
    totalErr += s.error;
  }
  return {
    value: total,
    error: totalErr,
    converged: totalErr <= Math.max(absTol, rel * Math.abs(total)),
    evaluations,
  };
}

/**
 * Integral of f over [a, inf) by the change of variable t = a + u/(1-u), u in [0, 1)
 * (QUADPACK QAGI uses a similar map); f must decay faster than 1/t.
 * @example integrateToInfinity((t) => Math.exp(-t), 0).value // 1
 */
export function integrateToInfinity(f: (t: number) => number, a: number, opts: IntegrateOptions = {}): IntegrateResult {
  const g = (u: number): number => {
    if (u >= 1) return 0;
    const om = 1 - u;
    const t = a + u / om;
    const v = f(t);
    return v === 0 ? 0 : v / (om * om);
  };
  return integrate(g, 0, 1, opts);
}

/**
 * Cuts of an integral over (lo, hi), sorted, without those closer than 1e-9 to each other or to
 * the ends (`out` is sorted in place).
 */
export function keptBreaks(out: number[], lo: number, hi: number): number[] {
  out.sort((x, y) => x - y);
  const kept: number[] = [];
  for (const x of out)
    if (x - lo > 1e-9 && hi - x > 1e-9 && (kept.length === 0 || x - kept[kept.length - 1]! > 1e-9)) kept.push(x);
  return kept;
}
