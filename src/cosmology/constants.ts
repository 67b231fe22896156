/**
 * Physical and astronomical constants, SI unless the name says otherwise.
 * Sources: SI exact values (c); IAU 2012 Resolution B2 (au); IAU 2015 Resolution B2 (pc = 648000/pi au);
 * CODATA 2018 (G, Stefan-Boltzmann).
 */
export const SPEED_OF_LIGHT_M_S = 299_792_458; // exact (SI)
export const SPEED_OF_LIGHT_KM_S = 299_792.458;
export const AU_M = 149_597_870_700; // IAU 2012 B2, exact
export const PC_M = (648_000 / Math.PI) * AU_M; // IAU 2015 B2
export const MPC_M = 1e6 * PC_M;
export const MPC_CM = 1e8 * PC_M;
export const PC_CM = 100 * PC_M;
export const GRAVITATIONAL_CONSTANT = 6.674_30e-11; // m^3 kg^-1 s^-2, CODATA 2018
export const STEFAN_BOLTZMANN = 5.670_374_419e-8; // W m^-2 K^-4, CODATA 2018 (exact in the 2019 SI)
export const SOLAR_MASS_KG = 1.988_409_870_698_051e30; // IAU 2015 B3 nominal GM_sun / CODATA 2018 G
/** Julian year in seconds (365.25 d); astropy's Gyr is 1e9 of these. */
export const JULIAN_YEAR_S = 365.25 * 86_400;
export const GYR_S = 1e9 * JULIAN_YEAR_S;
/** Effective number of neutrino species used with radiation (docs/survey-file.md, "Cosmology"). */
export const N_EFF = 3.046;
/** CMB temperature used by the transfer function when the cosmology has none (Fixsen 2009). */
export const T_CMB_DEFAULT_K = 2.7255;

/**
 * Photon density parameter today for a CMB at temperature tCmbK:
 * Omega_gamma = (4 sigma_SB / c^3) T^4 / rho_crit, rho_crit = 3 H0^2 / (8 pi G).
 */
export function omegaPhotons(h0KmSMpc: number, tCmbK: number): number {
  if (tCmbK <= 0) return 0;
  const h0PerS = (h0KmSMpc * 1000) / MPC_M;
  const rhoCrit = (3 * h0PerS * h0PerS) / (8 * Math.PI * GRAVITATIONAL_CONSTANT); // kg m^-3
  const aOverC2 = (4 * STEFAN_BOLTZMANN) / SPEED_OF_LIGHT_M_S ** 3; // kg m^-3 K^-4
  return (aOverC2 * tCmbK ** 4) / rhoCrit;
}

/**
 * Radiation density parameter: photons plus N_EFF massless neutrino species,
 * Omega_nu = Omega_gamma * (7/8) (4/11)^(4/3) N_eff (common practice).
 */
export function omegaRadiation(h0KmSMpc: number, tCmbK: number): number {
  const og = omegaPhotons(h0KmSMpc, tCmbK);
  return og * (1 + (7 / 8) * (4 / 11) ** (4 / 3) * N_EFF);
}
