/** Public face of the cosmology layer: the flat Lambda-CDM model, presets and constants. */
export { FlatLambdaCDM, carlsonRF, type FlatLambdaCDMParams } from './flat-lcdm.js';
export {
  COSMOLOGY_DEFAULTS,
  PRESETS,
  resolveCosmology,
  type CosmologyInput,
  type CosmologyPreset,
} from './presets.js';
export { N_EFF, T_CMB_DEFAULT_K, omegaPhotons, omegaRadiation } from './constants.js';
