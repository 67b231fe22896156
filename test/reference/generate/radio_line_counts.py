#!/usr/bin/env python3
"""Independent numbers for test/survey/radio-lines.test.ts and test/published/radio-surveys.test.ts,
from docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation, H0 = 70,
Omega_m = 0.3):

1. A velocity-integrated flux S [Jy km/s] of a line of rest frequency nu is the line flux
   F = S nu / c: 1 Jy = 1e-23 erg s^-1 cm^-2 Hz^-1, 1 km/s = 1e5 cm/s, c = 2.99792458e10 cm/s.
   HI 21 cm: nu = 1420.405751768 MHz (common practice).
2. The count of a line_flux survey with that limit: N = area int dV/dz dz int_{L_lim}^inf phi(L) dL,
   L_lim(z) = 4 pi D_L(z)^2 F, phi the Schechter function phi* (L/L*)^alpha exp(-L/L*) / L*, for
   the ALFALFA-like survey of the published test: 7,000 deg^2, 0 < z < 0.06 in six slices, S >= 0.7
   Jy km/s, phi* = 4.5e-3 Mpc^-3, L* = 10^9.94 Msun x 2.406176e25 erg/s per Msun, alpha = -1.25.
3. The 1.4 GHz star-forming galaxies of docs/survey-file.md: the count of the published (Saunders
   et al. 1990) form phi(L) = Phi* (L/L*)^(1 - a) exp(-log10(1 + L/L*)^2 / (2 s^2)) per dex and of the
   Schechter function fitted to it, S_nu = (1 + z)^(1 + a_radio) L_nu / (4 pi D_L^2), a_radio = -0.7.

Every integral by scipy.integrate.quad; the incomplete gamma function is not used, so that no
special-function code is shared with skytally.
Run: python3 test/reference/generate/radio_line_counts.py (numpy 2.4.6, scipy 1.17.1 here). The
tests write the numbers it prints.
"""
import numpy as np
from scipy import integrate, optimize

C_KMS = 299792.458
C_CGS = 2.99792458e10
H0, OM = 70.0, 0.3
DH = C_KMS / H0
MPC_CM = 3.0856775814913673e24
DEG2_SR = (np.pi / 180) ** 2
NU_HI = 1420.405751768e6


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return DH * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def dv_dz_sr(z):
    return DH * comoving(z) ** 2 / e(z)


def lum_dist_cm(z):
    return (1 + z) * comoving(z) * MPC_CM


# 1. the conversion
per_jy_kms = 1e-23 * NU_HI * 1e5 / C_CGS
print(f"1 Jy km/s at HI 21 cm = {per_jy_kms!r} erg/s/cm^2")

# 2. the HI survey
L_PER_MSUN = 4 * np.pi * MPC_CM ** 2 * per_jy_kms / 2.356e5
print(f"L per Msun from M_HI = 2.356e5 D^2 S: {L_PER_MSUN!r} erg/s")
PHI, LSTAR, ALPHA = 4.5e-3, 10 ** 9.94 * 2.406176e25, -1.25
F_LIM = 0.7 * per_jy_kms


def n_above(z):
    u_lim = 4 * np.pi * lum_dist_cm(z) ** 2 * F_LIM / LSTAR
    f = lambda lu: PHI * np.log(10) * (10 ** lu) ** (ALPHA + 1) * np.exp(-(10 ** lu))
    lo = np.log10(u_lim)
    return integrate.quad(f, lo, max(lo, 0) + 3, epsabs=0, epsrel=1e-12, limit=400)[0]


edges = np.linspace(0, 0.06, 7)
sr = 7000 * DEG2_SR
counts = []
for a, b in zip(edges[:-1], edges[1:]):
    counts.append(sr * integrate.quad(lambda z: dv_dz_sr(z) * n_above(z), a, b, epsabs=0, epsrel=1e-11, limit=200)[0])
print("HI slices:", [float(repr_c) for repr_c in counts])
print("HI total:", sum(counts))

# 3. 1.4 GHz star-forming galaxies
PHI_S, L_S, A_S, SIG_S = 3.55e-3, 1.85e21, 1.22, 0.63  # Novak et al. 2017, from memory; W/Hz


def saunders(l, ls):
    return PHI_S * (l / ls) ** (1 - A_S) * np.exp(-np.log10(1 + l / ls) ** 2 / (2 * SIG_S ** 2))


def schechter_dex(l, lphi, lls, al):
    u = l / 10 ** lls
    return np.log(10) * 10 ** lphi * u ** (al + 1) * np.exp(-u)


grid = np.logspace(21, 23.5, 60)
fit = optimize.least_squares(
    lambda p: np.log10(schechter_dex(grid, *p)) - np.log10(saunders(grid, L_S)), [-2.5, 22.5, -1.2]
).x
print("Schechter fitted over 1e21-10^23.5 W/Hz (log10 phi*, log10 L* [W/Hz], alpha):", list(map(float, fit)))
print("largest misfit over that range [dex]:", float(np.abs(np.log10(schechter_dex(grid, *fit)) - np.log10(saunders(grid, L_S))).max()))
AB_L_NU = 4 * np.pi * (10 * 3.0856775814913673e18) ** 2 * 3631e-23  # erg/s/Hz of AB 0 at 10 pc
print("its M* [AB]:", float(-2.5 * np.log10(10 ** fit[1] * 1e7 / AB_L_NU)))
S_LIM = 50e-6 * 1e-23  # erg/s/cm^2/Hz


def evol(z):
    return (1 + z) ** (3.16 - 0.32 * z)


def n_radio(z, f, ls):
    l_lim = 4 * np.pi * lum_dist_cm(z) ** 2 * S_LIM / (1 + z) ** 0.3 / 1e7  # W/Hz
    lo = np.log10(l_lim)
    return integrate.quad(lambda x: f(10 ** x, ls), lo, lo + 8, epsabs=0, epsrel=1e-11, limit=400)[0]


sr2 = 2 * DEG2_SR
redges = [0.01, 0.5, 1, 1.5, 2, 3]
for name, f, ls in [
    ("Saunders", saunders, lambda z: L_S * evol(z)),
    ("Schechter fit", lambda l, lls: schechter_dex(l, fit[0], lls, fit[2]), lambda z: np.log10(10 ** fit[1] * evol(z))),
]:
    cs = [
        sr2 * integrate.quad(lambda z: dv_dz_sr(z) * n_radio(z, f, ls(z)), a, b, epsabs=0, epsrel=1e-10, limit=200)[0]
        for a, b in zip(redges[:-1], redges[1:])
    ]
    print(name, "slices:", cs, "total:", sum(cs))
