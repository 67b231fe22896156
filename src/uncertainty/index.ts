/** Cosmic-variance physics: growth, linear power, haloes, box windows and the slice glue. */
export { linearGrowth, createGrowth, carrollPressTurnerGrowth } from './growth.js';
export {
  createLinearPower,
  criticalDensityMsunMpc3,
  eisensteinHuFull,
  eisensteinHuNoWiggle,
  eisensteinHuParameters,
  topHatWindow,
  type LinearPower,
  type LinearPowerOptions,
  type TransferForm,
} from './power-spectrum.js';
export {
  createHaloModel,
  shethTormenBias,
  shethTormenMultiplicity,
  DELTA_C,
  SHETH_TORMEN,
  MATCH_MASS_MIN_MSUN,
  MATCH_MASS_MAX_MSUN,
  type HaloMatch,
  type HaloModel,
} from './haloes.js';
export { boxSigma, boxSigmaReference, sphereSigma, equalVolumeRadiusMpc, sincSquaredRule } from './window.js';
export {
  sliceUncertainty,
  sliceMatterSigma,
  fieldBoxSidesMpc,
  type SliceGeometry,
  type SliceUncertainty,
  type SliceUncertaintyInput,
} from './cosmic-variance.js';
