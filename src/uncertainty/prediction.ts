/**
 * Uncertainty of every count of a prediction: Poisson noise and cosmic variance.
 *
 * Per slice (and per population): the slice's volume is approximated by a box of transverse
 * sides D_M(z_mid) times each field's angular sides and radial side D_C(z2) - D_C(z1); sigma_dm
 * is the rms linear matter fluctuation in that box (window.ts). The galaxy bias is a number, a
 * table or expression in z, or "auto": abundance matching as in Trenti & Stiavelli 2008 (haloes of
 * the Sheth & Tormen 1999 mass function above M_min as numerous as the detected galaxies divided
 * by the occupation; the bias is the abundance-weighted Sheth-Tormen bias above M_min).
 * Cosmic-variance fraction = b sigma_dm / sqrt(field count); Poisson fraction = 1/sqrt(N);
 * total = their sum in quadrature. Several populations in one slice: their fluctuations trace the
 * same matter, so the combined bias is the count-weighted mean of their biases.
 *
 * Totals (totalUncertainty): weighted by where the detected sources lie in redshift (the slices'
 * node profiles), not by the window's volume: the count-weighted bias and an n(z)-weighted box.
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import type { ZParam } from '../model/zparam.js';
import { inputError } from '../errors.js';
import { createLinearPower, type LinearPower } from './power-spectrum.js';
import { createHaloModel, MATCH_MASS_MAX_MSUN, MATCH_MASS_MIN_MSUN, type HaloModel } from './haloes.js';
import { fieldBoxSidesMpc, sliceMatterSigma } from './cosmic-variance.js';
import { sliceCorrelations } from './box-covariance.js';
import { addWarning, warning, type Warning } from '../warnings.js';
import { ascending } from '../numerics/quadrature.js';
import type { RedshiftProfile } from '../counts/engine.js';

export interface UncertaintyJson {
  poisson_fraction: number;
  cosmic_variance_fraction: number;
  total_fraction: number;
  bias: number;
  sigma_matter: number;
  halo_mass_min_msun?: number;
  /**
   * Totals only, when the counted redshifts form one contiguous range: the radial side of the
   * n(z)-weighted box, Mpc (see totalUncertainty).
   */
  effective_depth_mpc?: number;
}

export interface CountedRange {
  zMin: number;
  zMax: number;
  count: number;
  volumeMpc3: number;
}

export interface UncertaintyContext {
  survey: Survey;
  cosmo: FlatCosmology;
  power: LinearPower;
  /** Where the output's warnings go (e.g. abundance matching held at a mass bound). */
  warnings: Warning[];
}

export function uncertaintyContext(survey: Survey, cosmo: FlatCosmology): UncertaintyContext {
  return { survey, cosmo, power: createLinearPower(survey.cosmology, { form: 'no_wiggle' }), warnings: [] };
}

/** Where one population's abundance matching was held at one bound, for its one warning. */
interface MassBoundNote {
  warning: Warning;
  zLo: number;
  zHi: number;
  /** The density furthest beyond the bound (after occupation), Mpc^-3. */
  extreme: number;
}

/** The mass-bound notes of each list of warnings, by population name and bound. */
const massBoundNotes = new WeakMap<Warning[], Map<string, MassBoundNote>>();

/**
 * Say in `list` that abundance matching for population `name` held the halo mass at a bound at z
 * (`target`: the density matched, after occupation). One warning per population and bound: a
 * second redshift widens the range the first one names (and keeps the density furthest beyond
 * the bound) instead of adding a line per slice and per node of the totals.
 */
function noteMassBound(list: Warning[], name: string, held: 'min' | 'max', z: number, target: number): void {
  let notes = massBoundNotes.get(list);
  if (!notes) massBoundNotes.set(list, (notes = new Map<string, MassBoundNote>()));
  const key = `${held} ${name}`;
  const old = notes.get(key);
  const at = old ? list.indexOf(old.warning) : -1;
  const note: MassBoundNote =
    old && at >= 0
      ? {
          warning: old.warning,
          zLo: Math.min(old.zLo, z),
          zHi: Math.max(old.zHi, z),
          extreme: held === 'min' ? Math.max(old.extreme, target) : Math.min(old.extreme, target),
        }
      : { warning: warning('bias_at_mass_bound', ''), zLo: z, zHi: z, extreme: target };
  const what = held === 'min' ? 'more than all' : 'less than the';
  const mass = held === 'min' ? MATCH_MASS_MIN_MSUN : MATCH_MASS_MAX_MSUN;
  const lo = note.zLo.toPrecision(3);
  const hi = note.zHi.toPrecision(3);
  const where =
    lo === hi
      ? `at z = ${lo} (${note.extreme.toPrecision(3)} Mpc^-3 after occupation)`
      : `at z = ${lo} to ${hi} (as ${held === 'min' ? 'high' : 'low'} as ${note.extreme.toPrecision(3)} Mpc^-3 after occupation)`;
  const message =
    `${name}: the detected density ${where} is ${what} haloes above ${mass.toExponential(0)} Msun provide, ` +
    `so the bias ${lo === hi ? 'is' : 'there is'} that of haloes above this mass; give population.bias to set it`;
  note.warning = warning('bias_at_mass_bound', message);
  if (at >= 0) list[at] = note.warning;
  else {
    addWarning(list, note.warning);
    // (the entry the list holds, should the same message have been there already)
    note.warning = list.find((w) => w.code === 'bias_at_mass_bound' && w.message === message) ?? note.warning;
  }
  notes.set(key, note);
}

/**
 * Expected count below which a slice (or a group of the totals' nodes) held at a matching bound is
 * not warned about: no source is to be seen there, so its bias changes no number a survey could
 * check (a flux-limited count carried far beyond its last source holds 1e-10 and less there).
 */
export const UNSEEN_COUNT = 1e-3;

/** Bias of one population for a range of redshift holding `count` sources in `volumeMpc3`, at z. */
export function populationBias(
  ctx: UncertaintyContext,
  p: Population,
  z: number,
  count: number,
  volumeMpc3: number,
): { bias: number; haloMassMinMsun?: number } {
  if (p.bias !== 'auto') return { bias: p.bias.at(z) };
  const density = count / volumeMpc3;
  const haloes = createHaloModel(ctx.power);
  // Outside what haloes between the matching bounds provide, hold the mass at the bound (and say
  // so) rather than refuse the whole prediction: the counts do not depend on it.
  const target = density / p.occupation;
  const atBound = (held: 'min' | 'max') => {
    const mass = held === 'min' ? MATCH_MASS_MIN_MSUN : MATCH_MASS_MAX_MSUN;
    if (count >= UNSEEN_COUNT) noteMassBound(ctx.warnings, p.name, held, z, target);
    return { bias: haloes.effectiveBiasAbove(mass, z), haloMassMinMsun: mass };
  };
  // (target >= n(>1e6 Msun) and target <= n(>1e16 Msun), asked without summing the abundance
  // tables further down than the answer needs)
  if (!haloes.densityAboveReaches(MATCH_MASS_MIN_MSUN, z, target, false)) return atBound('min');
  if (haloes.densityAboveReaches(MATCH_MASS_MAX_MSUN, z, target, true)) return atBound('max');
  try {
    const m = haloes.matchHaloMass(density, z, p.occupation);
    return { bias: m.bias, haloMassMinMsun: m.haloMassMinMsun };
  } catch (err) {
    const what = err instanceof Error ? err.message.replace(/\.$/, '') : String(err);
    throw inputError(
      'out_of_range',
      ctx.survey.file,
      'population.bias',
      `abundance matching failed for ${p.name} at z = ${z.toPrecision(3)} (${what})`,
      'give population.bias as a number, table or expression instead of "auto"',
    );
  }
}

/** sigma_dm of the box of one field for the redshift range [z1, z2] centred at zc. */
export function matterSigma(ctx: UncertaintyContext, z1: number, z2: number, zc: number): number {
  const { survey, cosmo } = ctx;
  return sliceMatterSigma(ctx.power, {
    areaSr: survey.areaSr,
    aspect: survey.field.aspect,
    fieldCount: survey.field.count,
    transverseDistanceMpc: cosmo.transverseComovingDistanceMpc(zc),
    radialDepthMpc: cosmo.comovingDistanceMpc(z2) - cosmo.comovingDistanceMpc(z1),
    zMid: zc,
  });
}

/**
 * The correlation matrix of the slices [edges[i], edges[i + 1]]' matter fluctuations in one field
 * (src/uncertainty/box-covariance.ts): each slice's box as matterSigma makes it (transverse sides
 * at the slice's middle redshift, radial side D_C(z2) - D_C(z1)), centred at the middle of its
 * comoving range. It depends on the cosmology, the area, the fields and the edges only.
 */
export function slicesCorrelation(ctx: UncertaintyContext, edges: readonly number[]): number[][] {
  const { survey, cosmo } = ctx;
  const boxes = [];
  for (let i = 0; i + 1 < edges.length; i++) {
    const z1 = edges[i]!;
    const z2 = edges[i + 1]!;
    const c1 = cosmo.comovingDistanceMpc(z1);
    const c2 = cosmo.comovingDistanceMpc(z2);
    const zc = 0.5 * (z1 + z2);
    const sides = fieldBoxSidesMpc({
      areaSr: survey.areaSr,
      aspect: survey.field.aspect,
      fieldCount: survey.field.count,
      transverseDistanceMpc: cosmo.transverseComovingDistanceMpc(zc),
      radialDepthMpc: c2 - c1,
      zMid: zc,
    });
    boxes.push({ sides, centreMpc: 0.5 * (c1 + c2) });
  }
  return sliceCorrelations(ctx.power, boxes);
}

/**
 * The uncertainty block for a count made of several populations' parts (one part for a single
 * population), over [zMin, zMax] with representative redshift zc. Undefined when the count is 0
 * (a fraction of nothing is not defined).
 */
export function combinedUncertainty(
  ctx: UncertaintyContext,
  parts: { population: Population; count: number; volumeMpc3: number }[],
  zMin: number,
  zMax: number,
  zc: number,
): UncertaintyJson | undefined {
  const count = parts.reduce((a, p) => a + p.count, 0);
  if (!(count > 0)) return undefined;
  let weighted = 0;
  let haloMass: number | undefined;
  for (const part of parts) {
    if (!(part.count > 0)) continue;
    const b = populationBias(ctx, part.population, zc, part.count, part.volumeMpc3);
    weighted += b.bias * part.count;
    if (parts.length === 1) haloMass = b.haloMassMinMsun;
  }
  const bias = weighted / count;
  const sigma = matterSigma(ctx, zMin, zMax, zc);
  const poisson = 1 / Math.sqrt(count);
  const cv = (bias * sigma) / Math.sqrt(ctx.survey.field.count);
  const out: UncertaintyJson = {
    poisson_fraction: poisson,
    cosmic_variance_fraction: cv,
    total_fraction: Math.hypot(poisson, cv),
    bias,
    sigma_matter: sigma,
  };
  if (haloMass !== undefined) out.halo_mass_min_msun = haloMass;
  return out;
}

/** One slice of one population, with where in redshift its detected sources lie. */
export interface TotalPart {
  population: Population;
  count: number;
  zMin: number;
  zMax: number;
  profile: RedshiftProfile;
}

/** A population's detected sources along the line of sight: its nodes, dN/dchi there and its bias. */
interface LineOfSight {
  population: Population;
  zMin: number;
  zMax: number;
  /** Node redshifts, ascending. */
  z: number[];
  /** dN/dchi at each node, Mpc^-1. */
  perMpc: number[];
  /** The expected count each node carries. */
  count: number[];
  /** The bias at each node. */
  bias: number[];
  /** The bias at any redshift of the range (for the cross terms of populations sharing a range). */
  biasAt: (z: number) => number;
}

/** dN/dchi of `los` at z: linear between its nodes, held flat beyond the end nodes, 0 outside its range. */
function perMpcAt(los: LineOfSight, z: number): number {
  const zs = los.z;
  if (z < los.zMin || z > los.zMax || zs.length === 0) return 0;
  if (z <= zs[0]!) return los.perMpc[0]!;
  const last = zs.length - 1;
  if (z >= zs[last]!) return los.perMpc[last]!;
  let lo = 0;
  let hi = last;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (zs[mid]! <= z) lo = mid;
    else hi = mid;
  }
  const t = (z - zs[lo]!) / (zs[hi]! - zs[lo]!);
  return los.perMpc[lo]! + t * (los.perMpc[hi]! - los.perMpc[lo]!);
}

/** Redshift width of the groups of nodes whose bias is matched together (at most; see totalUncertainty). */
const BIAS_GROUP_DZ = 0.05;
/** Share of a part's count below which a bias group is not matched to haloes. */
const NEGLIGIBLE_SHARE = 1e-12;

/**
 * The bias of haloes matched to a detected density at z (the tabulated matcher), held at the
 * matching bounds with the same warning as populationBias.
 */
function matchedBias(ctx: UncertaintyContext, p: Population, z: number, density: number, count: number): number {
  const m = matcherAt(ctx, z).match(density / p.occupation);
  if (m.held && count >= UNSEEN_COUNT) noteMassBound(ctx.warnings, p.name, m.held, z, density / p.occupation);
  return m.bias;
}

/** The mass M whose haloes above it have the effective bias `bias` at z, if one lies between the matching bounds. */
function haloMassOfBias(ctx: UncertaintyContext, bias: number, z: number): number | undefined {
  return matcherAt(ctx, z).massForBias(bias);
}

/**
 * The tabulated matcher at z, kept per linear power spectrum and redshift (a prediction asks at the
 * same redshifts for every population and for the top-level total).
 */
function matcherAt(ctx: UncertaintyContext, z: number): ReturnType<HaloModel['matcherAt']> {
  let byZ = matchers.get(ctx.power);
  if (!byZ) matchers.set(ctx.power, (byZ = new Map<number, ReturnType<HaloModel['matcherAt']>>()));
  let m = byZ.get(z);
  if (!m) {
    if (byZ.size > 4096) byZ.clear();
    byZ.set(z, (m = createHaloModel(ctx.power).matcherAt(z)));
  }
  return m;
}
const matchers = new WeakMap<LinearPower, Map<number, ReturnType<HaloModel['matcherAt']>>>();

/**
 * The uncertainty block of a total: the count of every part (one population's slices, or several
 * populations'), with the bias and the cosmic variance weighted by where the detected sources lie
 * in redshift (the parts' redshift profiles), not by the window's volume.
 *
 * Bias: a given bias is taken at every node; for "auto", each part's nodes are grouped into
 * redshift ranges no wider than 0.05 (at least 8 per part) and each group's bias is that of
 * haloes matched to its count-weighted density sum_k N_k n_k / N at its count-weighted redshift
 * (n_k the density of detected sources at node k): a steep n(z) or a gaussian filter's wings
 * do not dilute it. The total's bias is the count-weighted b = sum_k N_k b_k / N.
 *
 * Cosmic variance: the parts are grouped into contiguous redshift ranges (populations whose
 * counted ranges overlap share one); ranges apart are independent (their variances add). In
 * each range the weight along the line of sight q(chi) = dN/dchi b D(z) (D the linear growth; the
 * sum over the range's populations) makes one box per field: transverse sides at the range's
 * count-weighted redshift, radial side the effective depth L = (int q dchi)^2 / int q^2 dchi (the
 * uniform slab with the same integral of the squared normalised weight). Its fraction is
 * <b D> sigma_0(L) / sqrt(fields), with <b D> = int q dchi / N and sigma_0 the rms matter
 * fluctuation in the box at z = 0. For a uniform weight L is the window's depth (the slice box);
 * for a long window the variance of the weighted count tends to the box's; in between the box
 * agrees with the exact n(z)-weighted variance (the Fourier transform of q as the radial window)
 * to 3 % for the windows tested (test/reference/total-uncertainty.json).
 *
 * The block reports the effective bias b, sigma_matter = fraction * sqrt(fields) / b (so that the
 * fraction is b sigma_matter / sqrt(fields), as for a slice), the effective depth of a single
 * range, and, for one population with bias "auto", the halo mass whose haloes above it have the
 * bias b at the count-weighted redshift. Undefined when the count is 0.
 */
export function totalUncertainty(
  ctx: UncertaintyContext,
  parts: readonly TotalPart[],
): { block: UncertaintyJson; meanRedshift: number } | undefined {
  const { cosmo, survey, power } = ctx;
  const live = parts.filter((p) => p.count > 0 && p.profile.z.length > 0);
  const count = live.reduce((a, p) => a + p.count, 0);
  if (!(count > 0)) return undefined;

  // Each population's line of sight: its parts' nodes, their dN/dchi and bias.
  const lines = new Map<Population, LineOfSight>();
  const groupsOf = new Map<Population, { zMin: number; zMax: number; biasAt: (z: number) => number }[]>();
  for (const part of live) {
    const pop = part.population;
    let los = lines.get(pop);
    if (!los) {
      const groups: { zMin: number; zMax: number; biasAt: (z: number) => number }[] = [];
      groupsOf.set(pop, groups);
      const biasAt =
        pop.bias !== 'auto'
          ? pop.bias.at
          : (z: number) => {
              for (const g of groups) if (z >= g.zMin && z <= g.zMax) return g.biasAt(z);
              return 0;
            };
      lines.set(
        pop,
        (los = { population: pop, zMin: Infinity, zMax: -Infinity, z: [], perMpc: [], count: [], bias: [], biasAt }),
      );
    }
    los.zMin = Math.min(los.zMin, part.zMin);
    los.zMax = Math.max(los.zMax, part.zMax);
    const { z, count: dn, volumeMpc3: dv, selected } = part.profile;
    // "auto": one bias per group of nodes no wider than BIAS_GROUP_DZ (at least 8 per part), matched
    // to the group's count-weighted density at its count-weighted redshift.
    const nGroups = pop.bias === 'auto' ? Math.max(8, Math.ceil((part.zMax - part.zMin) / BIAS_GROUP_DZ)) : 1;
    const width = (part.zMax - part.zMin) / nGroups;
    const nodeBias = new Array<number>(z.length).fill(0);
    if (pop.bias !== 'auto') z.forEach((zk, k) => (nodeBias[k] = (pop.bias as ZParam).at(zk)));
    else {
      const groupOf = (zk: number) => Math.min(nGroups - 1, Math.max(0, Math.floor((zk - part.zMin) / width)));
      const sums = Array.from({ length: nGroups }, () => ({ n: 0, zn: 0, dens: 0 }));
      for (let k = 0; k < z.length; k++) {
        const c = dn[k]!;
        if (!(c > 0) || !(dv[k]! > 0)) continue;
        const g = sums[groupOf(z[k]!)]!;
        g.n += c;
        g.zn += c * z[k]!;
        // the density of all detected sources at z (a profile with `selected` holds a share of them)
        g.dens += (c * c) / (dv[k]! * (selected ? selected[k]! : 1));
      }
      // A group holding a negligible share of the part's count (a filter's far wings) is not
      // matched (its density can lie far below any halo's and would only raise a warning): it takes
      // the bias of the nearest group that is, which its weight makes irrelevant.
      const partCount = sums.reduce((a, g) => a + g.n, 0);
      // (a density that underflows to 0 counts as negligible too)
      const matched = sums.map((g) =>
        g.n > NEGLIGIBLE_SHARE * partCount && g.dens > 0
          ? matchedBias(ctx, pop, g.zn / g.n, g.dens / g.n, g.n)
          : undefined,
      );
      const biases = matched.map((b, i) => {
        if (b !== undefined) return b;
        for (let d = 1; d < nGroups; d++) {
          const near = matched[i - d] ?? matched[i + d];
          if (near !== undefined) return near;
        }
        return 0;
      });
      for (let k = 0; k < z.length; k++) nodeBias[k] = biases[groupOf(z[k]!)]!;
      groupsOf.get(pop)!.push({ zMin: part.zMin, zMax: part.zMax, biasAt: (zk) => biases[groupOf(zk)]! });
    }
    for (let k = 0; k < z.length; k++) {
      los.z.push(z[k]!);
      los.count.push(dn[k]!);
      los.bias.push(nodeBias[k]!);
      // dN/dchi = (count / volume) * dV/dchi, dV/dchi = area * D_M^2 (flat)
      los.perMpc.push(
        dv[k]! > 0 ? (dn[k]! / dv[k]!) * survey.areaSr * cosmo.transverseComovingDistanceMpc(z[k]!) ** 2 : 0,
      );
    }
  }
  for (const los of lines.values()) {
    // (the slices' nodes come in order: a stable sort would leave them as they are)
    if (ascending(los.z)) continue;
    const order = los.z.map((_, k) => k).sort((a, b) => los.z[a]! - los.z[b]!);
    los.perMpc = order.map((k) => los.perMpc[k]!);
    los.count = order.map((k) => los.count[k]!);
    los.bias = order.map((k) => los.bias[k]!);
    los.z = order.map((k) => los.z[k]!);
  }

  // Contiguous ranges: populations whose counted ranges overlap (or touch) share one.
  const sorted = [...lines.values()].sort((a, b) => a.zMin - b.zMin);
  const groups: LineOfSight[][] = [];
  let reach = -Infinity;
  for (const los of sorted) {
    if (groups.length === 0 || los.zMin > reach) groups.push([los]);
    else groups[groups.length - 1]!.push(los);
    reach = Math.max(reach, los.zMax);
  }

  let variance = 0;
  let nb = 0;
  let zAll = 0;
  let nAll = 0;
  let depth: number | undefined;
  for (const group of groups) {
    // Over the group's nodes: N, sum z dN, int q dchi and int q^2 dchi = sum_j (q dchi)_j q(chi_j),
    // q(chi) = D(z) sum over the group's populations of dN/dchi b (cross terms included).
    let n = 0;
    let zn = 0;
    let sumQ = 0;
    let sumQ2 = 0;
    for (const los of group) {
      for (let j = 0; j < los.z.length; j++) {
        const zj = los.z[j]!;
        const perMpc = los.perMpc[j]!;
        if (!(perMpc > 0)) continue;
        const g = power.growth(zj);
        const b = los.bias[j]!;
        let qHere = 0;
        for (const other of group) qHere += other === los ? perMpc * b : perMpcAt(other, zj) * other.biasAt(zj);
        qHere *= g;
        const c = los.count[j]!;
        n += c;
        zn += c * zj;
        nb += c * b;
        sumQ += c * b * g;
        sumQ2 += c * b * g * qHere;
      }
    }
    if (!(n > 0) || !(sumQ2 > 0)) continue;
    const zc = zn / n;
    const length = (sumQ * sumQ) / sumQ2;
    const sigma0 = sliceMatterSigma(power, {
      areaSr: survey.areaSr,
      aspect: survey.field.aspect,
      fieldCount: survey.field.count,
      transverseDistanceMpc: cosmo.transverseComovingDistanceMpc(zc),
      radialDepthMpc: length,
      zMid: 0,
    });
    const cv = ((sumQ / n) * sigma0) / Math.sqrt(survey.field.count);
    variance += (n * cv) ** 2;
    zAll += zn;
    nAll += n;
    depth = groups.length === 1 ? length : undefined;
  }
  if (!(nAll > 0)) return undefined;
  const bias = nb / nAll;
  const cvFraction = Math.sqrt(variance) / nAll;
  const poisson = 1 / Math.sqrt(count);
  const meanRedshift = zAll / nAll;
  const block: UncertaintyJson = {
    poisson_fraction: poisson,
    cosmic_variance_fraction: cvFraction,
    total_fraction: Math.hypot(poisson, cvFraction),
    bias,
    sigma_matter: (cvFraction * Math.sqrt(survey.field.count)) / bias,
  };
  const pops = [...lines.keys()];
  if (pops.length === 1 && pops[0]!.bias === 'auto') {
    const m = haloMassOfBias(ctx, bias, meanRedshift);
    if (m !== undefined) block.halo_mass_min_msun = m;
  }
  if (depth !== undefined) block.effective_depth_mpc = depth;
  return { block, meanRedshift };
}
