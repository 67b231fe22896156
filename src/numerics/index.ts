/** Public face of the numerics layer: special functions, quadrature, roots, interpolation. */
export { EULER_GAMMA, gammaFn, logUpperGamma, upperGamma } from './gamma.js';
export {
  gaussLegendre,
  gaussLegendreRule,
  integrate,
  integrateToInfinity,
  KRONROD21,
  type IntegrateOptions,
  type IntegrateResult,
  type QuadratureRule,
} from './quadrature.js';
export { brent, expandBracket, type BracketOptions, type BrentOptions } from './roots.js';
export {
  findInterval,
  interpLinear,
  linearInterpolant,
  monotoneCubic,
  naturalCubicSpline,
  type Interpolant,
} from './interpolate.js';
