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
 * total = their sum in quadrature. The survey total uses one box spanning the whole window at the
 * count-weighted mean redshift. Several populations in one slice: their fluctuations trace the
 * same matter, so the combined bias is the count-weighted mean of their biases.
 */
import type { FlatLambdaCDM } from '../cosmology/flat-lcdm.js';
import type { Population, Survey } from '../survey/types.js';
import { inputError } from '../errors.js';
import { createLinearPower, type LinearPower } from './power-spectrum.js';
import { createHaloModel, MATCH_MASS_MAX_MSUN, MATCH_MASS_MIN_MSUN } from './haloes.js';
import { sliceMatterSigma } from './cosmic-variance.js';

export interface UncertaintyJson {
  poisson_fraction: number;
  cosmic_variance_fraction: number;
  total_fraction: number;
  bias: number;
  sigma_matter: number;
  halo_mass_min_msun?: number;
}

export interface CountedRange {
  zMin: number;
  zMax: number;
  count: number;
  volumeMpc3: number;
}

export interface UncertaintyContext {
  survey: Survey;
  cosmo: FlatLambdaCDM;
  power: LinearPower;
  /** Sentences for the output's warnings (e.g. abundance matching held at a mass bound). */
  warnings: string[];
  /** Where the blocks computed for one population are kept for reuse (see UncertaintyMemo). */
  memo?: UncertaintyMemo;
}

/**
 * The uncertainty blocks of single populations computed for one survey, by population and by the
 * exact inputs (count, volume, redshifts): `report` computes them once in predict and the
 * forecast reads its per-slice cosmic-variance fractions back from here instead of computing
 * the same numbers again. A block is reused only for bit-for-bit the same inputs, so it is the
 * block a new computation would give. The warnings a computation adds are not kept: a reader
 * of the memo that needs them (predict) computes instead.
 */
export class UncertaintyMemo {
  private readonly blocks = new Map<Population, Map<string, UncertaintyJson | undefined>>();
  constructor(readonly survey: Survey) {}

  /**
   * True when blocks computed for `other` may be read here: the same survey, or a view of it
   * (surveyForPopulation, a changed detection limit) with the same cosmology, area and fields, on
   * which a block's value depends besides the keyed inputs and the population.
   */
  serves(other: Survey): boolean {
    const s = this.survey;
    return other === s || (other.cosmology === s.cosmology && other.areaSr === s.areaSr && other.field === s.field);
  }

  private static key(count: number, volumeMpc3: number, zMin: number, zMax: number, zc: number): string {
    return `${count},${volumeMpc3},${zMin},${zMax},${zc}`;
  }

  /** The block kept for these inputs: [true, block] when there is one, [false] otherwise. */
  get(p: Population, count: number, volumeMpc3: number, zMin: number, zMax: number, zc: number): [boolean, UncertaintyJson | undefined] {
    const m = this.blocks.get(p);
    const k = UncertaintyMemo.key(count, volumeMpc3, zMin, zMax, zc);
    return m?.has(k) ? [true, m.get(k)] : [false, undefined];
  }

  set(p: Population, count: number, volumeMpc3: number, zMin: number, zMax: number, zc: number, block: UncertaintyJson | undefined): void {
    let m = this.blocks.get(p);
    if (!m) this.blocks.set(p, (m = new Map()));
    m.set(UncertaintyMemo.key(count, volumeMpc3, zMin, zMax, zc), block);
  }
}

export function uncertaintyContext(survey: Survey, cosmo: FlatLambdaCDM): UncertaintyContext {
  return { survey, cosmo, power: createLinearPower(survey.cosmology, { form: 'no_wiggle' }), warnings: [] };
}

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
  const atBound = (mass: number, what: string) => {
    const message =
      `${p.name}: the detected density at z = ${z.toPrecision(3)} (${target.toPrecision(3)} Mpc^-3 after occupation) is ${what} ` +
      `haloes above ${mass.toExponential(0)} Msun provide, so the bias is that of haloes above this mass; give population.bias to set it`;
    if (!ctx.warnings.includes(message)) ctx.warnings.push(message);
    return { bias: haloes.effectiveBiasAbove(mass, z), haloMassMinMsun: mass };
  };
  if (target >= haloes.haloDensityAboveMpc3(MATCH_MASS_MIN_MSUN, z)) return atBound(MATCH_MASS_MIN_MSUN, 'more than all');
  if (target <= haloes.haloDensityAboveMpc3(MATCH_MASS_MAX_MSUN, z)) return atBound(MATCH_MASS_MAX_MSUN, 'less than the');
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
  if (parts.length === 1 && ctx.memo && ctx.memo.serves(ctx.survey)) {
    const p = parts[0]!;
    ctx.memo.set(p.population, p.count, p.volumeMpc3, zMin, zMax, zc, { ...out });
  }
  return out;
}

/**
 * combinedUncertainty of one population's count, read from ctx.memo when it holds the block for
 * exactly these inputs (then no warning is added to ctx.warnings), computed otherwise.
 */
export function singleUncertainty(
  ctx: UncertaintyContext,
  part: { population: Population; count: number; volumeMpc3: number },
  zMin: number,
  zMax: number,
  zc: number,
): UncertaintyJson | undefined {
  if (ctx.memo && ctx.memo.serves(ctx.survey)) {
    const [found, block] = ctx.memo.get(part.population, part.count, part.volumeMpc3, zMin, zMax, zc);
    if (found) return block && { ...block };
  }
  return combinedUncertainty(ctx, [part], zMin, zMax, zc);
}

/** Count-weighted mean of the slices' middle redshifts. */
export function countWeightedRedshift(slices: readonly { z_min: number; z_max: number; count: number }[]): number {
  let n = 0;
  let zn = 0;
  for (const s of slices) {
    n += s.count;
    zn += s.count * 0.5 * (s.z_min + s.z_max);
  }
  return n > 0 ? zn / n : 0.5 * (slices[0]!.z_min + slices[slices.length - 1]!.z_max);
}

/** Which term dominates, in words, for the table. */
export function dominantTerm(u: UncertaintyJson): string {
  const ratio = u.cosmic_variance_fraction / u.poisson_fraction;
  if (ratio > 1) return `cosmic variance dominates the total's uncertainty (${(100 * u.cosmic_variance_fraction).toFixed(1)} % against ${(100 * u.poisson_fraction).toFixed(1)} % Poisson)`;
  return `Poisson noise dominates the total's uncertainty (${(100 * u.poisson_fraction).toFixed(1)} % against ${(100 * u.cosmic_variance_fraction).toFixed(1)} % cosmic variance)`;
}
