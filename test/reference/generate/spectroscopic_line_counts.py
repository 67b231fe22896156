#!/usr/bin/env python3
"""Independent counts of the two spectroscopic line-flux surveys of
test/published/spectroscopic-line-surveys.test.ts (no filter: F = L / (4 pi D_L^2)), from
docs/survey-file.md's definitions: flat Lambda-CDM with radiation when t_cmb > 0 (photons from the
Stefan-Boltzmann law plus 3.046 massless neutrino species, each 7/8 (4/11)^(4/3) of the photons),
redshift_selection a table linear in z, parameters evolving as written. Comoving distance, dV/dz
and the Schechter integral above the limit (times a logistic completeness
where given) by scipy.integrate.quad (epsrel 1e-12 inside, 1e-10
over z, piece by piece between the edges given). Shares no code with skytally.
The test writes the numbers it prints (scipy 1.17.1, numpy, Python 3).

Run: python3 test/reference/generate/spectroscopic_line_counts.py
"""
import numpy as np
from scipy import integrate

C_KMS = 299792.458
C_MS = 299792458.0
SIGMA_SB = 5.670374419e-8  # CODATA 2018
G = 6.67430e-11  # CODATA 2018
MPC_M = 648000 / np.pi * 149597870700 * 1e6
MPC_CM = 100 * MPC_M


def omega_r(h0, t_cmb):
    if t_cmb <= 0:
        return 0.0
    h = h0 * 1000 / MPC_M
    rho_crit = 3 * h * h / (8 * np.pi * G)
    photons = 4 * SIGMA_SB / C_MS**3 * t_cmb**4 / rho_crit
    return photons * (1 + 7 / 8 * (4 / 11) ** (4 / 3) * 3.046)


def count(h0, om, t_cmb, area_deg2, edges, flux, log10_phi, log10_l_star, alpha, keep, half=None, width=None):
    orad = omega_r(h0, t_cmb)
    ol = 1 - om - orad

    def e(z):
        return np.sqrt(om * (1 + z) ** 3 + orad * (1 + z) ** 4 + ol)

    def comoving(z):
        return C_KMS / h0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-12, limit=200)[0]

    def f(z):
        d = comoving(z)
        d_l = (1 + z) * d * MPC_CM
        dv = area_deg2 * (np.pi / 180) ** 2 * C_KMS / h0 * d * d / e(z)
        x = 4 * np.pi * d_l**2 * flux / 10 ** log10_l_star(z)
        a = alpha(z)
        if half is None:
            n = integrate.quad(lambda t: t**a * np.exp(-t), x, np.inf, epsabs=0, epsrel=1e-12, limit=400)[0]
        else:
            # logistic completeness in log10 of the measured flux F = t x flux / x (docs/survey-file.md)
            def c(t):
                return 1 / (1 + np.exp((np.log10(half) - np.log10(t / x * flux)) / width))

            n = integrate.quad(lambda t: t**a * np.exp(-t) * c(t), x, np.inf, epsabs=0, epsrel=1e-12, limit=400)[0]
        return dv * keep(z) * 10 ** log10_phi(z) * n

    return [integrate.quad(f, a, b, epsabs=0, epsrel=1e-10, limit=200)[0] for a, b in zip(edges[:-1], edges[1:])]


# DESI-ELG-like [OII]: planck2018 (h0 67.66, omega_m 0.3111, t_cmb 2.7255), 1 deg^2, 0.6 < z < 1.6 in
# slices of 0.1, 8e-17 erg/s/cm^2, log10 L* = 41.1 + 2.33 log10(1 + z), log10 phi* = -2.4,
# alpha = -1.46, the colour box as a table
BOX = [[0.6, 0.4], [0.8, 0.6], [1.1, 0.7], [1.4, 0.6], [1.6, 0.4]]
desi = count(67.66, 0.3111, 2.7255, 1.0, np.linspace(0.6, 1.6, 11), 8e-17, lambda z: -2.4,
             lambda z: 41.1 + 2.33 * np.log10(1 + z), lambda z: -1.46,
             lambda z: np.interp(z, [r[0] for r in BOX], [r[1] for r in BOX]))
print('desi total', repr(sum(desi)), 'first slice', repr(desi[0]))
# HETDEX-like Lyman alpha: h0 70, omega_m 0.3, no radiation, 1 deg^2, 1.88 < z < 3.52 in pieces of
# 0.1 (the last 0.04), 5e-17, phi* 6.32e-4, L* 5.29e42, alpha -1.75
hetdex = count(70.0, 0.3, 0.0, 1.0, [1.88 + 0.1 * k for k in range(17)] + [3.52], 5e-17,
               lambda z: np.log10(6.32e-4), lambda z: np.log10(5.29e42), lambda z: -1.75, lambda z: 1.0)
print('hetdex total', repr(sum(hetdex)))
# the same with a logistic completeness in line flux, half 1e-16 erg/s/cm^2, width 0.1 dex
hetdex_c = count(70.0, 0.3, 0.0, 1.0, [1.88 + 0.1 * k for k in range(17)] + [3.52], 5e-17,
                 lambda z: np.log10(6.32e-4), lambda z: np.log10(5.29e42), lambda z: -1.75, lambda z: 1.0,
                 half=1e-16, width=0.1)
print('hetdex with completeness', repr(sum(hetdex_c)))
