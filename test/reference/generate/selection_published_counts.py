#!/usr/bin/env python3
"""Independent counts of the surveys of test/published/selection-effects-surveys.test.ts, from
docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation; shares no code with
skytally):
- line_flux: the measured flux F = T L (1 + b) 10^(-0.4 A) / (4 pi D_L^2) (b the blend ratio, A the
  attenuation in mag, T = 1 on center +- fwhm/2 for a top hat, a gaussian cut at center +- 1.5 fwhm),
  so L_lim = 4 pi D_L^2 F_lim / (T (1 + b) 10^(-0.4 A)); the luminosity function intrinsic and
  unblended;
- line_flux with blended_lines: each line at its own wavelength and filter transmission (below);
- magnitude: m = M + 5 log10(D_L / 10 pc) - 2.5 log10(1 + z)
  - 2.5 (beta + 2) log10(lambda_band / ((1 + z) lambda_rest)), limits in Vega converted by
  vega_to_ab, the redshift selection S(z) multiplying the integrand.
Comoving distance, dV/dz and the Schechter integral above the limit by scipy.integrate.quad (epsrel
1e-12 inside, 1e-10 over z). The test writes the numbers it prints (scipy 1.10.1, numpy, Python 3.11).

Run: /usr/bin/python3 test/reference/generate/selection_published_counts.py
"""
import os

import numpy as np
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
MPC_CM = 3.0856775814913673e24
HALPHA = 6562.8
LYA = 1215.67


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-12)[0]


def dv_dz(z, area_deg2):
    return area_deg2 * (np.pi / 180) ** 2 * C_KMS / H0 * comoving(z) ** 2 / e(z)


def n_above(x_min, phi, alpha):
    """phi* times the integral of t^alpha e^-t from x_min (= L_lim / L*) to infinity."""
    return phi * integrate.quad(lambda t: t**alpha * np.exp(-t), x_min, np.inf, epsrel=1e-12, limit=200)[0]


def line_count(area, flux, line, transmission, z_lo, z_hi, phi, l_star, alpha, blend=0.0, att=0.0):
    def f(z):
        t = transmission(line * (1 + z))
        if t <= 0:
            return 0.0
        d_l = (1 + z) * comoving(z) * MPC_CM
        l_lim = 4 * np.pi * d_l**2 * flux / (t * (1 + blend) * 10 ** (-0.4 * att))
        return dv_dz(z, area) * n_above(l_lim / l_star, phi, alpha)

    return integrate.quad(f, z_lo, z_hi, epsrel=1e-10, limit=400)[0]


def tophat(center, fwhm):
    return lambda lam: 1.0 if abs(lam - center) <= fwhm / 2 else 0.0


def magnitude_count(area, m_lim, band, rest, beta, z_lo, z_hi, phi_of_z, m_star_of_z, alpha, selection):
    def f(z):
        d_l_pc = (1 + z) * comoving(z) * 1e6
        k = 5 * np.log10(d_l_pc / 10) - 2.5 * np.log10(1 + z) - 2.5 * (beta + 2) * np.log10(band / ((1 + z) * rest))
        x_min = 10 ** (-0.4 * (m_lim - k - m_star_of_z(z)))  # L_lim / L* of the limit's absolute magnitude
        return dv_dz(z, area) * selection(z) * n_above(x_min, phi_of_z(z), alpha)

    return integrate.quad(f, z_lo, z_hi, epsrel=1e-10, limit=400)[0]


# HiZELS-like H-alpha at z = 2.23: 0.6 deg^2, 1e-16 (H-alpha + [NII]), top hat 21210/210 A, Sobral et al. 2013
for b in (0.0, 0.2):
    print('hizels_z2.23 blend', b, repr(line_count(0.6, 1e-16, HALPHA, tophat(21210, 210), 21105 / HALPHA - 1,
                                                   21315 / HALPHA - 1, 10**-2.78, 10**42.87, -1.59, b, 1.0)))
# HiZELS-like H-alpha at z = 0.84: 1.3 deg^2, 8e-17, top hat 12110/150 A
for b in (0.0, 0.33):
    print('hizels_z0.84 blend', b, repr(line_count(1.3, 8e-17, HALPHA, tophat(12110, 150), 12035 / HALPHA - 1,
                                                   12185 / HALPHA - 1, 10**-2.47, 10**42.25, -1.56, b, 1.0)))


def split_line_count(area, flux, lo, hi, phi, l_star, alpha, blend, att):
    """The same narrow-band count with [NII] 6548.05 and 6583.45 placed one by one (1 : 3 of the
    blend) through the top hat lo-hi, each line counted where it falls inside: what the blend at
    H-alpha's own transmission (skytally's documented rule) approximates; for docs/survey-file.md."""
    lines = [(HALPHA, 1.0), (6583.45, 0.75 * blend), (6548.05, 0.25 * blend)]

    def f(z):
        w = sum(r for lam, r in lines if lo <= lam * (1 + z) <= hi)
        if w <= 0:
            return 0.0
        d_l = (1 + z) * comoving(z) * MPC_CM
        return dv_dz(z, area) * n_above(4 * np.pi * d_l**2 * flux / (w * 10 ** (-0.4 * att)) / l_star, phi, alpha)

    cuts = sorted({lo / lam - 1 for lam, _ in lines} | {hi / lam - 1 for lam, _ in lines})
    return integrate.quad(f, cuts[0], cuts[-1], epsrel=1e-10, limit=400, points=cuts[1:-1])[0]


print('hizels_z2.23 [NII] lines one by one', repr(split_line_count(0.6, 1e-16, 21105, 21315, 10**-2.78, 10**42.87,
                                                                  -1.59, 0.2, 1.0)))
print('hizels_z0.84 [NII] lines one by one', repr(split_line_count(1.3, 8e-17, 12035, 12185, 10**-2.47, 10**42.25,
                                                                  -1.56, 0.33, 1.0)))


def gaussian(center, fwhm):
    """A gaussian filter relative to its peak, cut to 0 beyond center +- 1.5 fwhm (docs/survey-file.md, "Filters")."""
    sigma = fwhm / (2 * np.sqrt(2 * np.log(2)))
    return lambda lam: float(np.exp(-((lam - center) ** 2) / (2 * sigma**2))) if abs(lam - center) <= 1.5 * fwhm else 0.0


def blended_lines_count(area, flux, lines, transmission, edges, phi, l_star, alpha, att, ew_kept=None):
    """A line count with `blended_lines` (docs/survey-file.md): the measured flux
    L (T(lambda_0 (1 + z)) + sum_i r_i T(lambda_i (1 + z))) 10^(-0.4 A) / (4 pi D_L^2), lines[0] the
    population's own line (ratio 1), over the redshifts where any line is inside the filter's range
    edges = (lo, hi); with an equivalent-width cut, ew_kept(B, z) the fraction kept at the blend
    B(z) = (T_0 + S) / T_0 where T_0 > 0, S = sum_i r_i T_i where T_0 = 0. quad is cut where each line
    reaches an end of the range."""
    lo, hi = edges

    def f(z):
        ts = [r * transmission(lam * (1 + z)) for lam, r in lines]
        w = sum(ts)
        if w <= 0:
            return 0.0
        kept = 1.0
        if ew_kept is not None:
            s = sum(ts[1:])
            kept = ew_kept((ts[0] + s) / ts[0] if ts[0] > 0 else s, z)
        d_l = (1 + z) * comoving(z) * MPC_CM
        return kept * dv_dz(z, area) * n_above(4 * np.pi * d_l**2 * flux / (w * 10 ** (-0.4 * att)) / l_star, phi, alpha)

    cuts = sorted({lo / lam - 1 for lam, _ in lines} | {hi / lam - 1 for lam, _ in lines})
    return integrate.quad(f, cuts[0], cuts[-1], epsrel=1e-10, limit=400, points=cuts[1:-1])[0]


NII = lambda b: [(HALPHA, 1.0), (6583.45, 0.75 * b), (6548.05, 0.25 * b)]
# the same two HiZELS-like counts through blended_lines (as split_line_count above, written again
# through the general form)
print('blended_lines hizels_z2.23', repr(blended_lines_count(0.6, 1e-16, NII(0.2), tophat(21210, 210), (21105, 21315),
                                                             10**-2.78, 10**42.87, -1.59, 1.0)))
# a gaussian NB_K (21210 A, FWHM 210 A): each line at its own transmission, cut at 1.5 fwhm
print('blended_lines gaussian z2.23', repr(blended_lines_count(0.6, 1e-16, NII(0.2), gaussian(21210, 210),
                                                               (21210 - 315, 21210 + 315), 10**-2.78, 10**42.87,
                                                               -1.59, 1.0)))
# z = 0.84 top hat with an observed-frame equivalent-width cut of 50 A on the blend, exponential
# rest widths of scale 30 A: kept exp(-50 / ((1 + z) B(z) 30))
print('blended_lines ew z0.84', repr(blended_lines_count(1.3, 8e-17, NII(0.33), tophat(12110, 150), (12035, 12185),
                                                         10**-2.47, 10**42.25, -1.56, 1.0,
                                                         lambda b, z: np.exp(-50 / ((1 + z) * b * 30)))))


def table_fraction(ws, fs):
    """P(W > w) of a table: linear between rows, the end values held beyond them, 1 at w <= 0."""
    return lambda w: 1.0 if w <= 0 else float(np.interp(w, ws, fs))


# gaussian NB_J (12110 A, FWHM 150 A) with a rest-frame cut of 20 A and a table of widths: kinks
# where 20 / B(z) crosses a row (B varies through the gaussian's wings)
TAB = table_fraction([0, 10, 20, 40, 80], [1, 0.8, 0.5, 0.2, 0.05])
print('blended_lines gaussian table ew z0.84', repr(blended_lines_count(
    1.3, 8e-17, NII(0.33), gaussian(12110, 150), (12110 - 225, 12110 + 225), 10**-2.47, 10**42.25, -1.56, 1.0,
    lambda b, z: TAB(20 / b))))


def table_filter(path):
    """A tabulated filter relative to its peak, linear between rows, 0 outside (docs/survey-file.md)."""
    rows = np.loadtxt(path, delimiter=',', comments='#', skiprows=2)
    ws, ts = rows[:, 0], rows[:, 1] / rows[:, 1].max()
    return ws, (lambda lam: float(np.interp(lam, ws, ts, left=0.0, right=0.0)))


def table_blended_count(area, flux, lines, ws, transmission, phi, l_star, alpha):
    """blended_lines through a tabulated filter: quad cut where each line crosses each row."""
    def f(z):
        w = sum(r * transmission(lam * (1 + z)) for lam, r in lines)
        if w <= 0:
            return 0.0
        d_l = (1 + z) * comoving(z) * MPC_CM
        return dv_dz(z, area) * n_above(4 * np.pi * d_l**2 * flux / w / l_star, phi, alpha)

    nz = [i for i, t in enumerate(transmission(x) for x in ws) if t > 0]
    lo, hi = ws[max(nz[0] - 1, 0)], ws[min(nz[-1] + 1, len(ws) - 1)]
    cuts = sorted({wl / lam - 1 for lam, _ in lines for wl in ws if lo <= wl <= hi})
    return integrate.quad(f, cuts[0], cuts[-1], epsrel=1e-10, limit=800, points=cuts[1:-1])[0]


# the invented 920 nm table of samples/narrowband-interlopers.yaml, H-alpha with [NII] (0.3, 3 : 1)
WS, NB920 = table_filter(os.path.join(os.path.dirname(os.path.abspath(__file__)), '../../../samples/filters/nb-9200-invented.csv'))
print('blended_lines table nb920', repr(table_blended_count(1.5, 3e-17, NII(0.3), WS, NB920, 10**-2.8, 10**41.9,
                                                            -1.35)))
# Ouchi et al. 2010-like z = 6.6 LAEs: 1 deg^2, 6.8e-18, NB921 as a top hat 9196/132 A
print('ouchi_z6.6', repr(line_count(1.0, 6.8e-18, LYA, tophat(9196, 132), 9130 / LYA - 1, 9262 / LYA - 1,
                                    8.5e-4, 4.4e42, -1.5)))
# sBzK-like: K(Vega) < 20 (AB 21.85) per arcmin^2 at 1.4 < z < 2.5, Cirasuolo et al. 2010, S(z) = 0.8
for beta in (-2.0, -1.5):
    print('bzk beta', beta, repr(magnitude_count(1 / 3600, 20 + 1.85, 22000, 22000, beta, 1.4, 2.5,
                                                 lambda z: 3.5e-3 * np.exp(-((z / 1.70) ** 1.47)),
                                                 lambda z: -22.26 - (z / 1.78) ** 0.47, -1.07, lambda z: 0.8)))
