#!/usr/bin/python3
"""Independent K-corrections by synthetic photometry (Hogg, Baldry, Blanton & Eisenstein 2002,
"The K correction", arXiv:astro-ph/0210394).

Definitions used (Hogg et al. 2002 numbering of the arXiv version):
- eq. 2: m_R = M_Q + DM + K_QR, where R is the OBSERVED-frame band (the survey's band) and Q the
  EMITTED (rest-frame) band in which the absolute magnitude is defined (Hogg's K_QR names the rest
  band first); DM = 5 log10(D_L / 10 pc) (eq. 3).
- eq. 4: photon-counting AB apparent magnitude through a band R(lambda) (R = probability that a
  photon is counted, the transmission as tabulated):
      m_R = -2.5 log10[ int dlambda lambda f_lambda(lambda) R(lambda) / int dlambda lambda g_lambda(lambda) R(lambda) ]
  with the AB standard g_nu = 3631 Jy = 3631e-23 erg/s/cm^2/Hz, i.e. g_lambda = c g_nu / lambda^2
  (c = 2.99792458e18 Angstrom/s), so int lambda g_lambda R dlambda = c g_nu int R dlambda / lambda.
- eq. 8 (frequency form) and its wavelength form (eq. 13 of the arXiv version, from memory of the
  numbering), for a source with rest-frame spectrum L_lambda:
      K_QR(z) = -2.5 log10[ int dl_o l_o L_lambda(l_o/(1+z)) R(l_o) * int dl_e Q(l_e)/l_e
                            / ( (1+z) int dl_e l_e L_lambda(l_e) Q(l_e) * int dl_o R(l_o)/l_o ) ]
- Monochromatic rest-frame AB magnitude at lambda_r (Q a delta function at lambda_r; the limit of
  eq. 8), M = -2.5 log10[L_nu(lambda_r) / (4 pi (10 pc)^2 g_nu)], L_nu = lambda_r^2 L_lambda / c:
      K(z) = -2.5 log10[ int dl_o l_o L_lambda(l_o/(1+z)) R(l_o) / ( (1+z) lambda_r^2 L_lambda(lambda_r) int dl_o R(l_o)/l_o ) ]
  For f_lambda ~ lambda^beta and a narrow band at lambda_b this tends to the power-law colour term
  -2.5 log10(1+z) - 2.5 (beta+2) log10(lambda_b / ((1+z) lambda_r)).

Identities that hold exactly (both follow from eq. 8 with the AB standard, g_nu constant):
- (A) a source flat in f_nu (f_lambda ~ lambda^-2) has the same AB magnitude in every band, so
  K_QR = -2.5 log10(1+z) for ANY observed band R and ANY rest band Q (or rest wavelength).
- (B) for ANY spectrum, if the rest band is the observed band blueshifted by (1+z0),
  Q(l) = R(l (1+z0)), then K_QR(z0) = -2.5 log10(1+z0) (the spectrum's integrals cancel).
The identity (A) is exact for the continuous spectrum; a TABULATED flat-f_nu spectrum read with
linear interpolation of f_lambda deviates slightly (reported below as tabulated_flat_fnu).

Numerical conventions (the contract the survey code must follow):
- A spectrum file: rest-frame wavelength in Angstrom, f_lambda in any unit, read with LINEAR
  interpolation of f_lambda in wavelength between rows (never extrapolated: every integral here stays
  inside the tabulated range, asserted).
- Bands: top-hat {center, fwhm}: R = 1 on [center - fwhm/2, center + fwhm/2]; gaussian {center,
  fwhm}: R = exp(-(l - center)^2 / (2 s^2)), s = fwhm / (2 sqrt(2 ln 2)), untruncated (integrated
  over center +/- 3 fwhm, outside which less than 2e-12 of the throughput lies); a band file:
  wavelength (Angstrom), transmission, linear between rows, zero outside.
- Integrals: on every interval between the merged nodes of the band and of the redshifted spectrum
  (the gaussian split further into pieces no wider than s/4), 12-point Gauss-Legendre; each interval
  integrand is then a cubic polynomial (tabulated/top-hat) or smooth, so the sums are exact to
  rounding. Checked against scipy.integrate.quad (adaptive) at several points (assert 1e-12).

Run from the repository root:
    /usr/bin/python3 test/reference/generate/kcorrection.py > test/reference/kcorrection.json
"""
import datetime
import json
import math
import os
import sys

import numpy as np
import scipy
from scipy import integrate

HERE = os.path.dirname(os.path.abspath(__file__))
FILES = os.path.join(HERE, '..', 'surveys-selection')
C_ANGSTROM = 2.99792458e18
G_NU_AB = 3631e-23
GL_X, GL_W = np.polynomial.legendre.leggauss(12)
FWHM_TO_SIGMA = 1.0 / (2.0 * math.sqrt(2.0 * math.log(2.0)))


def read_csv(path):
    """Two numeric columns; lines starting with '#' and a header line of words are skipped."""
    rows = []
    with open(path) as fh:
        for line in fh:
            s = line.strip()
            if not s or s.startswith('#'):
                continue
            a, b = s.split(',')[:2]
            try:
                rows.append((float(a), float(b)))
            except ValueError:
                continue  # the header
    t = np.array(rows, dtype=float)
    assert np.all(np.diff(t[:, 0]) > 0), path
    return t


class Spectrum:
    """Rest-frame f_lambda: a table (linear interpolation) or an analytic function."""

    def __init__(self, table=None, fn=None, label=''):
        self.table, self.fn, self.label = table, fn, label

    def nodes(self):
        return self.table[:, 0] if self.table is not None else np.array([])

    def __call__(self, lam):
        lam = np.asarray(lam, dtype=float)
        if self.fn is not None:
            return self.fn(lam)
        t = self.table
        assert np.all(lam >= t[0, 0] * (1 - 1e-12)) and np.all(lam <= t[-1, 0] * (1 + 1e-12)), \
            'spectrum evaluated outside its table: %g-%g' % (lam.min(), lam.max())
        return np.interp(lam, t[:, 0], t[:, 1])


class Band:
    """kind tophat | gaussian | table; R(lambda) and its support, in the frame where it is defined."""

    def __init__(self, kind, center=None, fwhm=None, table=None, label=''):
        self.kind, self.center, self.fwhm, self.table, self.label = kind, center, fwhm, table, label

    def scaled(self, factor):
        """The same band with wavelengths multiplied by factor: Q(l) = R(l / factor)."""
        if self.kind == 'table':
            t = self.table.copy(); t[:, 0] *= factor
            return Band('table', table=t, label=self.label + ' x %g' % factor)
        return Band(self.kind, self.center * factor, self.fwhm * factor, label=self.label + ' x %g' % factor)

    def support(self):
        if self.kind == 'tophat':
            return self.center - self.fwhm / 2, self.center + self.fwhm / 2
        if self.kind == 'gaussian':
            return self.center - 3 * self.fwhm, self.center + 3 * self.fwhm
        return self.table[0, 0], self.table[-1, 0]

    def nodes(self):
        lo, hi = self.support()
        if self.kind == 'tophat':
            return np.array([lo, hi])
        if self.kind == 'gaussian':
            s = self.fwhm * FWHM_TO_SIGMA
            n = int(math.ceil((hi - lo) / (s / 4)))
            return np.linspace(lo, hi, n + 1)
        return self.table[:, 0]

    def __call__(self, lam):
        lam = np.asarray(lam, dtype=float)
        if self.kind == 'tophat':
            lo, hi = self.support()
            return np.where((lam >= lo) & (lam <= hi), 1.0, 0.0)
        if self.kind == 'gaussian':
            s = self.fwhm * FWHM_TO_SIGMA
            return np.exp(-(lam - self.center) ** 2 / (2 * s * s))
        return np.interp(lam, self.table[:, 0], self.table[:, 1], left=0.0, right=0.0)

    def describe(self):
        if self.kind == 'table':
            return {'profile': 'table', 'label': self.label}
        return {'profile': self.kind, 'center_angstrom': self.center, 'fwhm_angstrom': self.fwhm}


def _gl(f, edges):
    a, b = edges[:-1], edges[1:]
    half, mid = 0.5 * (b - a), 0.5 * (b + a)
    x = mid[:, None] + half[:, None] * GL_X[None, :]
    return float(np.sum(half[:, None] * GL_W[None, :] * f(x)))


def band_integrals(spec, band, z):
    """(int l f_lambda(l/(1+z)) R(l) dl, int R(l)/l dl) over the band's support, observed frame."""
    lo, hi = band.support()
    sn = spec.nodes() * (1 + z)
    edges = np.unique(np.concatenate([band.nodes(), sn[(sn > lo) & (sn < hi)]]))
    num = _gl(lambda l: l * spec(l / (1 + z)) * band(l), edges)
    den = _gl(lambda l: band(l) / l, edges)
    return num, den


def k_mono(spec, band, z, rest_wavelength):
    """K(z) for an absolute AB magnitude at one rest wavelength (monochromatic)."""
    num, den = band_integrals(spec, band, z)
    return -2.5 * math.log10(num / ((1 + z) * rest_wavelength ** 2 * float(spec(rest_wavelength)) * den))


_REST = {}


def k_band(spec, band, z, rest_band):
    """K_QR(z): observed band R, rest-frame band Q (Hogg et al. 2002 eq. 8 / its wavelength form)."""
    num_r, den_r = band_integrals(spec, band, z)
    key = (id(spec), id(rest_band))
    if key not in _REST:
        _REST[key] = band_integrals(spec, rest_band, 0.0)
    num_q, den_q = _REST[key]
    return -2.5 * math.log10(num_r * den_q / ((1 + z) * num_q * den_r))


def ab_mag_band(spec, band):
    """AB magnitude of f_lambda (taken as erg/s/cm^2/Angstrom) through a band, at z = 0."""
    num, den = band_integrals(spec, band, 0.0)
    return -2.5 * math.log10(num / (C_ANGSTROM * G_NU_AB * den))


def ab_mag_mono(spec, lam):
    return -2.5 * math.log10(lam * lam * float(spec(lam)) / C_ANGSTROM / G_NU_AB)


def quad_band_integrals(spec, band, z):
    """The same two integrals with scipy.integrate.quad (adaptive Gauss-Kronrod) on each interval
    between the merged nodes, for the self-check."""
    lo, hi = band.support()
    sn = spec.nodes() * (1 + z)
    pts = np.unique(np.concatenate([[lo, hi], band.nodes() if band.kind != 'gaussian' else [band.center],
                                    sn[(sn > lo) & (sn < hi)]]))
    f = lambda l: l * float(spec(l / (1 + z))) * float(band(l))
    g = lambda l: float(band(l)) / l
    q = lambda h: sum(integrate.quad(h, a, b, epsabs=0, epsrel=1e-13, limit=200)[0] for a, b in zip(pts[:-1], pts[1:]))
    return q(f), q(g)


def invented_spectrum():
    return Spectrum(table=read_csv(os.path.join(FILES, 'spectra', 'invented-starburst.csv')),
                    label='spectra/invented-starburst.csv')


def tabulated_flat_fnu():
    return Spectrum(table=read_csv(os.path.join(FILES, 'spectra', 'flat-fnu.csv')), label='spectra/flat-fnu.csv')


def red_band():
    return Band('table', table=read_csv(os.path.join(FILES, 'bands', 'invented-red-band.csv')),
                label='bands/invented-red-band.csv')


ZS = [0.0, 0.05, 0.1, 0.25, 0.5, 0.75, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 5.0, 6.0]


def main():
    spec = invented_spectrum()
    flat_tab = tabulated_flat_fnu()
    flat = Spectrum(fn=lambda l: (1500.0 / l) ** 2, label='analytic flat f_nu: f_lambda = (1500/lambda)^2')
    observed = [Band('gaussian', 8000.0, 1500.0, label='gaussian 8000/1500'),
                Band('tophat', 12500.0, 2500.0, label='tophat 12500/2500'),
                red_band()]
    rest_bands = [Band('tophat', 1500.0, 200.0, label='tophat 1500/200'),
                  Band('gaussian', 2300.0, 400.0, label='gaussian 2300/400'),
                  red_band()]
    rest_wavelengths = [1500.0, 2300.0, 6200.0]

    # self-check of the Gauss-Legendre sums against scipy.integrate.quad
    for band in observed:
        for z in (0.0, 0.7, 3.3):
            a = band_integrals(spec, band, z); b = quad_band_integrals(spec, band, z)
            assert abs(a[0] / b[0] - 1) < 1e-12 and abs(a[1] / b[1] - 1) < 1e-12, (band.label, z, a, b)

    out = {
        'header': {
            'command': '/usr/bin/python3 test/reference/generate/kcorrection.py > test/reference/kcorrection.json',
            'libraries': {'numpy': np.__version__, 'scipy': scipy.__version__},
            'python': sys.version.split()[0],
            'date': datetime.date.today().isoformat(),
            'seed': 'none (no random numbers are drawn)',
            'source': 'Hogg, Baldry, Blanton & Eisenstein 2002, arXiv:astro-ph/0210394, eqs. 2-4 and 8 (and its wavelength form)',
            'what': 'K-corrections m - M - DM by synthetic photometry (photon-counting AB), for an invented tabulated '
                    'spectrum and a flat f_nu source, observed gaussian, top-hat and tabulated bands, absolute magnitudes '
                    'monochromatic at a rest wavelength or in a rest-frame band; files relative to test/reference/surveys-selection/',
            'conventions': 'spectrum: linear interpolation of f_lambda in wavelength; gaussian bands untruncated '
                           '(integrated over +/- 3 fwhm); band files linear, zero outside; AB standard 3631e-23 erg/s/cm^2/Hz; '
                           'c = 2.99792458e18 Angstrom/s. Tolerance suggested: 1e-8 mag.',
        },
        'z': ZS,
        'spectra': {'invented': spec.label, 'tabulated_flat_fnu': flat_tab.label, 'flat_fnu': flat.label},
        'absolute_magnitudes': [],
        'cases': [],
        'identities': [],
    }
    # absolute magnitudes of the spectrum itself, read as f_lambda in erg/s/cm^2/Angstrom at 10 pc
    for lam in rest_wavelengths:
        out['absolute_magnitudes'].append({'spectrum': 'invented', 'rest_wavelength_angstrom': lam,
                                           'ab_magnitude': ab_mag_mono(spec, lam)})
    for q in rest_bands:
        out['absolute_magnitudes'].append({'spectrum': 'invented', 'rest_band': q.describe(), 'ab_magnitude': ab_mag_band(spec, q)})
    for name, sp in (('invented', spec), ('tabulated_flat_fnu', flat_tab), ('flat_fnu', flat)):
        for r in observed:
            for lam in rest_wavelengths:
                out['cases'].append({'spectrum': name, 'observed_band': r.describe(), 'rest_wavelength_angstrom': lam,
                                     'k': [k_mono(sp, r, z, lam) for z in ZS]})
            for q in rest_bands:
                out['cases'].append({'spectrum': name, 'observed_band': r.describe(), 'rest_band': q.describe(),
                                     'k': [k_band(sp, r, z, q) for z in ZS]})
    # identity (A): analytic flat f_nu, every pair, equal to -2.5 log10(1+z)
    worst = max(abs(k - (-2.5 * math.log10(1 + z))) for c in out['cases'] if c['spectrum'] == 'flat_fnu'
                for k, z in zip(c['k'], ZS))
    assert worst < 1e-12, worst
    worst_tab = max(abs(k - (-2.5 * math.log10(1 + z))) for c in out['cases'] if c['spectrum'] == 'tabulated_flat_fnu'
                    for k, z in zip(c['k'], ZS))
    out['identities'].append({'name': 'flat f_nu: K = -2.5 log10(1+z) for any observed band and any rest band or wavelength',
                              'analytic_max_abs_deviation': worst,
                              'tabulated_max_abs_deviation': worst_tab,
                              'note': 'exact for the continuous spectrum; the tabulated file (linear in f_lambda between rows '
                                      '2 % apart) departs by the interpolation error shown'})
    # identity (B): rest band = observed band blueshifted by (1+z0), any spectrum
    rows = []
    for r in observed:
        for z0 in (0.5, 2.0, 4.0):
            q = r.scaled(1.0 / (1 + z0))
            k = k_band(spec, r, z0, q)
            assert abs(k + 2.5 * math.log10(1 + z0)) < 1e-10, (r.label, z0, k)
            rows.append({'observed_band': r.describe(), 'z0': z0, 'rest_band': 'observed band with wavelengths divided by (1+z0)',
                         'k': k, 'expected': -2.5 * math.log10(1 + z0)})
    out['identities'].append({'name': 'rest band = observed band blueshifted by (1+z0): K(z0) = -2.5 log10(1+z0) for any spectrum',
                              'rows': rows})
    # the power-law limit: a narrow top-hat band on a power-law spectrum approaches the colour term
    pl = Spectrum(fn=lambda l: (l / 1500.0) ** -1.3)
    narrow = Band('tophat', 9000.0, 1e-3)
    zc = 1.7
    k = k_mono(pl, narrow, zc, 1500.0)
    colour = -2.5 * math.log10(1 + zc) - 2.5 * (-1.3 + 2) * math.log10(9000.0 / ((1 + zc) * 1500.0))
    assert abs(k - colour) < 1e-9, (k, colour)
    out['identities'].append({'name': 'power law f_lambda ~ lambda^-1.3 through a 0.001 Angstrom top-hat at 9000 Angstrom, '
                                      'z = 1.7, rest 1500 Angstrom: the power-law colour term',
                              'k': k, 'colour_term': colour})
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write('\n')


if __name__ == '__main__':
    main()
