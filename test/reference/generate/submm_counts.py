#!/usr/bin/env python3
"""Independent counts of test/fixtures/submm-850um.yaml (test/published/submillimetre-surveys.test.ts),
from docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation, H0 = 70,
Omega_m = 0.3):

- the spectrum test/fixtures/spectra/dust-35k-beta1.5-fnu.csv holds f_nu (its header says so):
  each row becomes f_lambda = f_nu / lambda^2, read linearly between rows;
- K(z) by synthetic photometry (Hogg et al. 2002, eq. 8, as docs/survey-file.md writes it) through
  a top-hat band of 850 +- 42.5 um, with absolute magnitudes at rest 850 um:
  K = -2.5 log10[ int l f(l / (1+z)) dl / ((1+z) lambda_rest^2 f(lambda_rest) int dl / l) ];
- m = M + 5 log10(D_L / 10 pc) + K; counted when m <= m_lim, times the completeness
  1 / (1 + exp((m - half) / width)); m_lim and half are 4 and 4.5 mJy as AB magnitudes,
  -2.5 log10(f_nu / 3631 Jy);
- the Schechter function in magnitude, phi(M) = 0.4 ln 10 phi* 10^(0.4 (alpha+1) (M*-M))
  exp(-10^(0.4 (M*-M))), with log10 phi* = -4 - 0.5 max(z - 2.5, 0), M* = -26.6 + 0.4 max(2.5 - z, 0),
  alpha = -1.5; N = area int dz dV/dz/dOmega int dM phi(M) c(m).

Also the flux density at 850 um of a galaxy of L_IR(8-1000 um) = 1e12 Lsun (Lsun = 3.828e33 erg/s)
with this spectrum, at z = 1 to 6: L_nu(850 um) = L_IR f_nu(850 um) / int f_nu dnu, its absolute AB
magnitude M = -2.5 log10(L_nu / (4 pi (10 pc)^2 3631 Jy)), S = 3631 Jy 10^(-0.4 (M + DM + K)).

Every integral by scipy.integrate.quad (epsrel 1e-12 for the band, 1e-11 over M, 1e-10 over z).

Run: python3 test/reference/generate/submm_counts.py (numpy 2.4.6, scipy 1.17.1 here). The test
writes the numbers it prints.
"""
import os
import numpy as np
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
DH = C_KMS / H0
DEG2_SR = (np.pi / 180) ** 2
HERE = os.path.dirname(os.path.abspath(__file__))
SPECTRUM = os.path.join(HERE, '..', '..', 'fixtures', 'spectra', 'dust-35k-beta1.5-fnu.csv')


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def d_c(z):
    return DH * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def dv_dz(z):
    return DH * d_c(z) ** 2 / e(z)


def dist_mod(z):
    return 5 * np.log10((1 + z) * d_c(z) * 1e5)


rows = np.loadtxt(SPECTRUM, delimiter=',', comments='#', skiprows=3)
lam = rows[:, 0] * 1e4  # Angstrom
flam = rows[:, 1] / lam**2


def f(l):
    return np.interp(l, lam, flam)


CEN, FWHM, REST = 8.5e6, 8.5e5, 8.5e6
LO, HI = CEN - FWHM / 2, CEN + FWHM / 2


def k_corr(z):
    pts = [x for x in lam * (1 + z) if LO < x < HI]
    num = integrate.quad(lambda l: l * f(l / (1 + z)), LO, HI, points=pts, limit=400, epsabs=0, epsrel=1e-12)[0]
    den = (1 + z) * REST**2 * f(REST) * np.log(HI / LO)
    return -2.5 * np.log10(num / den)


def ab(jy):
    return -2.5 * np.log10(jy / 3631)


M_LIM, HALF, WIDTH = ab(0.004), ab(0.0045), 0.15


def n_detected(z):
    phis = 10 ** (-4.0 - 0.5 * max(z - 2.5, 0))
    ms = -26.6 + 0.4 * max(2.5 - z, 0)
    a = -1.5
    shift = dist_mod(z) + k_corr(z)
    m_abs_lim = M_LIM - shift

    def phi(m):
        x = 10 ** (0.4 * (ms - m))
        return 0.4 * np.log(10) * phis * x ** (a + 1) * np.exp(-x)

    def c(m):
        return 1 / (1 + np.exp((m + shift - HALF) / WIDTH))

    return integrate.quad(lambda m: phi(m) * c(m), ms - 12, m_abs_lim, epsabs=0, epsrel=1e-11, limit=200)[0]


def count(z0, z1):
    pts = [2.5] if z0 < 2.5 < z1 else None
    return 5 * DEG2_SR * integrate.quad(lambda z: dv_dz(z) * n_detected(z), z0, z1, points=pts, epsabs=0, epsrel=1e-10, limit=200)[0]


edges = [0.5, 1, 2, 3, 4, 6]
counts = [count(a, b) for a, b in zip(edges[:-1], edges[1:])]
print('counts', [repr(x) for x in counts])
print('total', repr(sum(counts)))

# S_850 of L_IR = 1e12 Lsun
H, KB, C = 6.62607015e-34, 1.380649e-23, 299792458.0


def fnu_mbb(nu):
    return nu**1.5 * nu**3 / np.expm1(H * nu / (KB * 35.0))


l_ir = integrate.quad(fnu_mbb, C / 1000e-6, C / 8e-6, epsabs=0, epsrel=1e-12, limit=200)[0]
# the tabulated spectrum at 850 um, as f_nu relative to its peak, against the analytic one's
nu850 = C / 850e-6
lnu = 1e12 * 3.828e33 * fnu_mbb(nu850) / l_ir
m_abs = -2.5 * np.log10(lnu / (4 * np.pi * (10 * 3.0856775814913673e18) ** 2 * 3631e-23))
print('M_850 of 1e12 Lsun', repr(m_abs))
for z in [1, 1.5, 2, 2.5, 3, 3.5, 4, 5, 6]:
    s = 3631e3 * 10 ** (-0.4 * (m_abs + dist_mod(z) + k_corr(z)))
    print('S850 mJy at z =', z, repr(s))
