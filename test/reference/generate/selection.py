#!/usr/bin/python3
"""Independent expected counts for survey files using the selection keys: redshift selection,
line blending, dust attenuation, equivalent-width cuts, spectrum-based k-corrections, Vega
magnitudes, photometric redshifts, and the noise depth law of a plan.

The survey files are test/reference/surveys-selection/*.yaml (each says in its header what it
exercises). This script shares no code with skytally: it reads the YAML with PyYAML and integrates
with astropy 5.2.1 FlatLambdaCDM (Neff 3.046, massless neutrinos, as counts.py), mpmath.gammainc
and scipy.integrate.quad (epsrel 1e-10 over z, 1e-11 over luminosity). K-corrections come from
kcorrection.py in this folder (synthetic photometry after Hogg et al. 2002, arXiv:astro-ph/0210394).

THE SEMANTICS IMPLEMENTED (the contract; where the survey-file keys leave a choice, the choice is
marked "choice"):

Plain counts (unchanged from counts.py): N = area * int dz dV/dz/dOmega * n(z), n(z) the Schechter
number density of sources passing the hard limit, times the completeness of their measured value.

1. redshift_selection {table: [[z, fraction], ...]} (also a number or an expression in z): the
   fraction S(z) of sources at TRUE redshift z that the selection keeps; a table is linear in z with
   its end values held outside. On the detection, or on a population (the population's wins for
   that population). It multiplies the integrand: counts, histogram bins, per-population results.
2. blend_ratio b (number) on a line population: the MEASURED line flux is
   F = L T(z) (1 + b) 10^(-0.4 A(z)) / (4 pi D_L^2) (T: the filter transmission at the line's own
   redshifted wavelength, 1 without a filter; the neighbouring lines are taken to have the same
   transmission and attenuation). The hard limit, the completeness and the histogram (log10 of the
   measured flux) all see F. The luminosity function is in the unblended L.
3. attenuation A(z) in magnitudes on a population (number, table or expression in z): the
   luminosity function is intrinsic and the observed flux is dimmed by 10^(-0.4 A): for line_flux,
   F as above; for magnitude, m = M + DM + K(z) + A(z) (grey over the band). A may depend on z only.
4. equivalent_width_cut {rest: W} or {observed: W} on the detection with equivalent_widths on the
   population: the kept fraction E(z) multiplies the integrand and is INDEPENDENT OF LUMINOSITY.
   The observed width is the rest width times (1 + z). Choice: the cut is applied to the width the
   survey measures, which includes the blended lines: W_measured,rest = (1 + b) W_line. So
   E(z) = P(W_line > W_rest_cut / (1 + b)) or P(W_line > W_obs_cut / ((1 + z)(1 + b))).
   Choice: attenuation does not change the width (line and continuum dimmed alike).
   Distributions of the rest width W of the line:
     exponential {scale W0}: P(W > w) = exp(-w / W0)  (w >= 0);
     lognormal {median Wm, sigma_dex s}: log10 W ~ Normal(log10 Wm, s),
        P(W > w) = 0.5 erfc((log10 w - log10 Wm) / (s sqrt 2)), and 1 at w = 0;
     table [[w, fraction above w], ...]: linear in w, end values held outside.
   A cut of 0 keeps everything.
5. detection.sed {file}: rest-frame f_lambda, linear in wavelength. Apparent magnitude
   m = M + DM + K(z) (+ A(z)) with K from synthetic photometry (kcorrection.py): M monochromatic AB at
   the population's rest_wavelength, or AB in rest_band ({center, fwhm}, top-hat unless profile says
   gaussian; or {file}). The observed band is band {center, fwhm, profile tophat|gaussian} or
   band_file (choice: band given as an object when a spectrum is used; a gaussian band untruncated).
6. system: vega with vega_to_ab o (m_AB = m_Vega + o), on the detection: the limit and the
   completeness (logistic half or table magnitudes) are Vega in that band, converted once; on the
   population: m_star is Vega in the population's rest band/wavelength, M*_AB = M*_Vega + o. Every
   output magnitude (histogram bins here) is AB.
7. detection.photo_z {sigma s, outlier_fraction f}: a source at true z is measured at z + N(0, s(1+z))
   with probability 1 - f, and with probability f anywhere in the survey's redshift window
   [zmin, zmax] with equal probability. Slices are slices in MEASURED redshift. True redshifts are
   integrated over [max(0, (zmin - 6 s) / (1 + 6 s)), (zmax + 6 s) / (1 - 6 s)], i.e. as far as a
   source 6 sigma away can scatter to the window's edge (the gaussian tail beyond is < 1e-9). Every
   source in that true range is an outlier with probability f (so outliers come from the whole
   integrated true range). Sources whose measured z falls outside the window are lost. Detection
   (limit, completeness, histogram value) depends on the TRUE z. Migration matrix M[i][j] = expected
   sources in true bin i measured in bin j; true bins: [below window, slices..., above window];
   measured bins: [below window (z_m < zmin), slices..., above window (z_m > zmax)]; row sums are
   the true counts over the extended range, column sums the measured counts, and the grand total is
   conserved. Sigma 0 and no outliers: measured = true. Histogram bins of a measured slice: sources
   measured in that slice, binned by apparent magnitude.
8. depth_law {noise: {sky_to_source r_s, read_to_source r_r, frame_hours t_f}} (plan): at the
   reference exposure t0 and limit (flux F0) the variance is source : sky : read = 1 : r_s : r_r.
   At exposure t, with n(t) = max(1, ceil(t / t_f)) frames (whole frames; n0 = n(t0)), the flux
   ratio x = F/F0 that has the reference's signal-to-noise solves
     (1 + r_s + r_r) tau^2 x^2 = x tau + r_s tau + r_r n(t)/n0,   tau = t / t0,
   x = [tau + sqrt(tau^2 + 4 (1 + r_s + r_r) tau^2 (r_s tau + r_r n/n0))] / (2 (1 + r_s + r_r) tau^2);
   a magnitude limit is m0 - 2.5 log10 x. r_s = r_r = 0 is exactly the source law (x = 1/tau);
   r_s -> infinity (r_r = 0) tends to the background law (x = tau^-1/2).

Other conventions: units via astropy (Angstrom, um, erg/s/cm^2, deg^2, arcmin^2); numbers are the
survey file's default units. Histogram bins have edges at integer multiples of the width. With
several populations the slices follow the first population's window and each population counts
only inside its own window (as counts.py); each population's own slices are also given.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/selection.py > test/reference/selection.json
"""
import datetime
import json
import math
import os
import sys
import warnings

import astropy
import astropy.units as u
import mpmath
import numpy as np
import scipy
import yaml
from astropy.cosmology import FlatLambdaCDM
from scipy import integrate, special

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import kcorrection as kc  # noqa: E402

warnings.simplefilter('ignore', u.UnitsWarning)
LN10 = math.log(10.0)
MPC_CM = (1 * u.Mpc).to(u.cm).value
DEG2_SR = (math.pi / 180.0) ** 2
FILES = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'surveys-selection')
PHOTOZ_REACH = 6.0
GL20_X, GL20_W = np.polynomial.legendre.leggauss(20)
EXPR_FUNCS = {'log10': math.log10, 'ln': math.log, 'exp': math.exp, 'sqrt': math.sqrt, 'abs': abs, 'min': min, 'max': max}


def num(v):
    """PyYAML (YAML 1.1) reads 4e-17 as a string; YAML 1.2 reads a number."""
    if isinstance(v, str):
        try:
            return float(v)
        except ValueError:
            return v
    if isinstance(v, list):
        return [num(x) for x in v]
    if isinstance(v, dict):
        return {k: num(x) for k, x in v.items()}
    return v


def quantity(v, unit):
    """A number in the default unit, or a string with a unit, converted to unit."""
    if isinstance(v, (int, float)):
        return float(v)
    return u.Quantity(v.replace('um', 'micron').replace('^', '')).to(unit).value


def param(v):
    """number | {table: [[z, v], ...]} (linear, ends held) | expression in z -> function of z."""
    if isinstance(v, (int, float)):
        return lambda z: float(v)
    if isinstance(v, dict):
        t = np.array(v['table'], dtype=float)
        return lambda z: float(np.interp(z, t[:, 0], t[:, 1]))
    expr = v.replace('^', '**')
    return lambda z: float(eval(expr, {'__builtins__': {}}, dict(EXPR_FUNCS, z=z)))


def cosmology(doc):
    c = doc['cosmology']
    if c.get('preset') == 'planck2018':
        h0, om, t = 67.66, 0.3111, 2.7255  # as counts.py and skytally's preset
    else:
        h0, om, t = c['h0'], c['omega_m'], c.get('t_cmb', 0.0)
    return FlatLambdaCDM(H0=h0, Om0=om, Tcmb0=t, Neff=3.046, m_nu=0 * u.eV)


def area_sr(doc):
    a = doc['area']
    return a * DEG2_SR if isinstance(a, (int, float)) else u.Quantity(a.replace('^', '')).to(u.sr).value


def normalisation(p, sfx=''):
    if 'phi_star' + sfx in p:
        return param(p['phi_star' + sfx])
    if 'log10_phi_star' + sfx in p:
        f = param(p['log10_phi_star' + sfx]); return lambda z: 10 ** f(z)
    if 'phi_star' + sfx + '_dex' in p:
        f = param(p['phi_star' + sfx + '_dex']); return lambda z: f(z) / LN10
    f = param(p['log10_phi_star' + sfx + '_dex']); return lambda z: 10 ** f(z) / LN10


def ew_above(dist):
    """P(W_rest > w) for the population's rest-frame equivalent-width distribution (w in Angstrom)."""
    m = dist['model']
    if m == 'exponential':
        w0 = quantity(dist['scale'], u.AA)
        return lambda w: math.exp(-w / w0)
    if m == 'lognormal':
        med = quantity(dist['median'], u.AA); s = float(dist['sigma_dex'])
        return lambda w: 1.0 if w <= 0 else 0.5 * math.erfc((math.log10(w) - math.log10(med)) / (s * math.sqrt(2)))
    t = np.array(dist['table'], dtype=float)
    return lambda w: float(np.interp(w, t[:, 0], t[:, 1]))


def completeness_fn(comp, kind, shift):
    """(c(obs), breakpoints in obs): obs = log10 measured flux (line_flux) or apparent AB magnitude
    (magnitude). shift: the Vega-to-AB offset of the detection (added to the completeness magnitudes).
    The breakpoints (table nodes; the logistic's middle and +-2, 5, 10 widths) only guide quadrature."""
    if comp is None:
        return None
    if comp['model'] == 'logistic':
        w = float(comp['width'])
        if kind == 'line_flux':
            lh = math.log10(quantity(comp['half'], u.erg / u.s / u.cm ** 2))
            return (lambda obs: 1.0 / (1.0 + math.exp((lh - obs) / w))), [lh + k * w for k in (-10, -5, -2, 0, 2, 5, 10)], \
                (lambda obs: special.expit((obs - lh) / w))
        half = float(comp['half']) + shift
        return (lambda obs: 1.0 / (1.0 + math.exp((obs - half) / w))), [half + k * w for k in (-10, -5, -2, 0, 2, 5, 10)], \
            (lambda obs: special.expit((half - obs) / w))
    t = np.array(comp['table'], dtype=float)
    xs = np.log10(t[:, 0]) if kind == 'line_flux' else t[:, 0] + shift
    return (lambda obs: float(np.interp(obs, xs, t[:, 1]))), list(xs), (lambda obs: np.interp(obs, xs, t[:, 1]))


def band_of(det, base):
    """The observed band for synthetic photometry: band {center, fwhm, profile} or band_file."""
    if 'band_file' in det:
        return kc.Band('table', table=kc.read_csv(os.path.join(base, det['band_file'])), label=det['band_file'])
    b = det['band']
    return kc.Band(b.get('profile', 'tophat'), quantity(b['center'], u.AA), quantity(b['fwhm'], u.AA))


def rest_band_of(rb, base):
    if 'file' in rb:
        return kc.Band('table', table=kc.read_csv(os.path.join(base, rb['file'])), label=rb['file'])
    return kc.Band(rb.get('profile', 'tophat'), quantity(rb['center'], u.AA), quantity(rb['fwhm'], u.AA))


class Model:
    """One population seen by the survey's detection."""

    def __init__(self, doc, pop, base):
        self.doc, self.pop = doc, pop
        self.cosmo, self.area = cosmology(doc), area_sr(doc)
        det = doc['detection']; self.kind = kind = det['kind']
        self.name = pop.get('name', '')
        if pop.get('shape') == 'double_schechter':
            self.comps = [(normalisation(pop, '_1'), param(pop['alpha_1'])), (normalisation(pop, '_2'), param(pop['alpha_2']))]
        else:
            self.comps = [(normalisation(pop), param(pop['alpha']))]
        if 'l_star' in pop:
            self.star = param(pop['l_star'])
        elif 'log10_l_star' in pop:
            g = param(pop['log10_l_star']); self.star = lambda z: 10 ** g(z)
        else:
            g = param(pop['m_star'])
            pop_shift = float(pop.get('vega_to_ab', 0.0)) if pop.get('system') == 'vega' else 0.0
            self.star = lambda z: g(z) + pop_shift
        det_shift = float(det.get('vega_to_ab', 0.0)) if det.get('system') == 'vega' else 0.0
        cf = completeness_fn(det.get('completeness'), kind, det_shift)
        self.comp, self.comp_nodes, self.comp_vec = cf if cf else (None, [], None)
        self.check_inner = False
        # selection, attenuation, equivalent widths
        sel = pop.get('redshift_selection', det.get('redshift_selection'))
        self.selection = param(sel) if sel is not None else (lambda z: 1.0)
        self.attenuation = param(pop['attenuation']) if 'attenuation' in pop else (lambda z: 0.0)
        self.blend = float(pop.get('blend_ratio', 0.0))
        cut = det.get('equivalent_width_cut')
        if cut is not None:
            above = ew_above(pop['equivalent_widths'])
            if 'rest' in cut:
                wc = quantity(cut['rest'], u.AA)
                self.ew_kept = lambda z: above(wc / (1 + self.blend))
            else:
                wc = quantity(cut['observed'], u.AA)
                self.ew_kept = lambda z: above(wc / ((1 + z) * (1 + self.blend)))
        else:
            self.ew_kept = lambda z: 1.0
        self.photo_z = det.get('photo_z')
        # table nodes in z (kinks of the integrand), only to guide the quadrature
        self.z_kinks = sorted({float(r[0]) for v in (sel, pop.get('attenuation')) if isinstance(v, dict) for r in v['table']})
        if kind == 'line_flux':
            line = quantity(pop.get('line', det.get('line')), u.AA)
            self.flim = quantity(det['limit'], u.erg / u.s / u.cm ** 2)
            filt = det.get('filter')
            if filt:
                center, fwhm = quantity(filt['center'], u.AA), quantity(filt['fwhm'], u.AA)
                gauss = filt.get('profile') == 'gaussian'
                half = 1.5 * fwhm if gauss else fwhm / 2
                zlo, zhi = (center - half) / line - 1, (center + half) / line - 1
                sig = fwhm / (2 * math.sqrt(2 * math.log(2)))
                self.trans = (lambda z: math.exp(-(line * (1 + z) - center) ** 2 / (2 * sig * sig))) if gauss else (lambda z: 1.0)
            else:
                zlo, zhi = doc['redshift']['min'], doc['redshift']['max']
                self.trans = lambda z: 1.0
            self.window = (zlo, zhi)
            self.olim = math.log10(self.flim)
        elif kind == 'magnitude':
            self.window = (doc['redshift']['min'], doc['redshift']['max'])
            self.mlim = float(det['limit']) + det_shift
            self.olim = self.mlim
            if 'sed' in det:
                spec = kc.Spectrum(table=kc.read_csv(os.path.join(base, det['sed']['file'])))
                band = band_of(det, base)
                if 'rest_band' in pop:
                    q = rest_band_of(pop['rest_band'], base)
                    self.kcorr = lambda z: kc.k_band(spec, band, z, q)
                else:
                    lr = quantity(pop.get('rest_wavelength', 1500), u.AA)
                    self.kcorr = lambda z: kc.k_mono(spec, band, z, lr)
            else:
                lb = quantity(det['band'], u.AA); beta = float(det.get('beta', -2.0))
                lr = quantity(pop.get('rest_wavelength', 1500), u.AA)
                self.kcorr = lambda z: -2.5 * math.log10(1 + z) - 2.5 * (beta + 2) * math.log10(lb / ((1 + z) * lr))
        else:
            raise ValueError('threshold surveys are not used here')
        self._cache = {}

    # obs = a(z) + slope * log10(L / L*)
    def obs_of(self, z):
        if z in self._cache:
            return self._cache[z]
        if self.kind == 'line_flux':
            dl = self.cosmo.luminosity_distance(z).to(u.Mpc).value * MPC_CM
            f = self.star(z) * self.trans(z) * (1 + self.blend) * 10 ** (-0.4 * self.attenuation(z)) / (4 * math.pi * dl * dl)
            r = (math.log10(f), 1.0)
        else:
            dm = 5 * math.log10(self.cosmo.luminosity_distance(z).to(u.pc).value / 10.0)
            r = (self.star(z) + dm + self.kcorr(z) + self.attenuation(z), -2.5)
        self._cache[z] = r
        return r

    def weight(self, z):
        """Multiplicative effects at true z: redshift selection x equivalent-width kept fraction."""
        return self.selection(z) * self.ew_kept(z)

    def n_between(self, z, obs_lo=-1e9, obs_hi=1e9):
        """Number density at true z of detected sources with obs in [obs_lo, obs_hi]."""
        a, slope = self.obs_of(z)
        if slope > 0:
            obs_lo = max(obs_lo, self.olim)
        else:
            obs_hi = min(obs_hi, self.olim)
        if obs_hi <= obs_lo:
            return 0.0
        l1, l2 = sorted(((obs_lo - a) / slope, (obs_hi - a) / slope))
        comps = [(phi(z), alpha(z) + 1) for phi, alpha in self.comps]
        if self.comp is None:
            n = 0.0
            for phi, s in comps:
                g1 = float(mpmath.gammainc(s, a=10 ** l1))
                g2 = 0.0 if l2 > 6 else float(mpmath.gammainc(s, a=10 ** l2))
                n += phi * (g1 - g2)
            return n
        c = self.comp
        hi = min(l2, math.log10(200.0)) * LN10
        lo = l1 * LN10
        if hi <= lo:
            return 0.0
        nodes = [(x - a) / slope * LN10 for x in self.comp_nodes]
        pts = np.unique(np.concatenate([np.linspace(lo, hi, 17), [p for p in nodes if lo < p < hi]]))
        if not self.check_inner:
            # 20-point Gauss-Legendre on each panel (vectorised); checked against quad below
            half, mid = 0.5 * np.diff(pts), 0.5 * (pts[1:] + pts[:-1])
            x = (mid[:, None] + half[:, None] * GL20_X[None, :]).ravel()
            wts = (half[:, None] * GL20_W[None, :]).ravel()
            dens = sum(phi * np.exp(s * x - np.exp(x)) for phi, s in comps)
            cv = np.array([c(a + slope * t / LN10) for t in x]) if self.comp_vec is None else self.comp_vec(a + slope * x / LN10)
            return float(np.sum(wts * dens * cv))
        f = lambda lnu: sum(phi * math.exp(s * lnu - math.exp(lnu)) for phi, s in comps) * c(a + slope * lnu / LN10)
        return sum(integrate.quad(f, pts[i], pts[i + 1], epsabs=0, epsrel=1e-12, limit=200)[0] for i in range(len(pts) - 1))

    def dvdz(self, z):
        return self.cosmo.differential_comoving_volume(z).value

    # photometric redshifts
    def true_range(self):
        zmin, zmax = self.window
        if not self.photo_z or float(self.photo_z.get('sigma', 0)) == 0:
            return zmin, zmax
        s = float(self.photo_z['sigma'])
        return max(0.0, (zmin - PHOTOZ_REACH * s) / (1 + PHOTOZ_REACH * s)), (zmax + PHOTOZ_REACH * s) / (1 - PHOTOZ_REACH * s)

    def p_measured(self, z, a, b):
        """Probability that a source at true z is measured in [a, b] (a, b may be +-inf)."""
        zmin, zmax = self.window
        s = float(self.photo_z.get('sigma', 0)); f = float(self.photo_z.get('outlier_fraction', 0))
        if s == 0:
            g = 1.0 if a <= z < b or (b == zmax and z == zmax) else 0.0
        else:
            w = s * (1 + z)
            g = special.ndtr((b - z) / w) - special.ndtr((a - z) / w)
        lo, hi = max(a, zmin), min(b, zmax)
        unif = max(0.0, hi - lo) / (zmax - zmin)
        return (1 - f) * g + f * unif

    def count(self, z1, z2, obs_lo=-1e9, obs_hi=1e9, measured=None):
        """Expected sources with TRUE z in [z1, z2] (clipped to the model's true range) and, with
        measured=(a, b), measured redshift in [a, b]."""
        lo_t, hi_t = self.true_range()
        z1, z2 = max(z1, lo_t), min(z2, hi_t)
        if z2 <= z1:
            return 0.0
        if measured is None:
            g = lambda z: self.dvdz(z) * self.weight(z) * self.n_between(z, obs_lo, obs_hi)
            pts = [p for p in self.z_kinks if z1 < p < z2] or None
        else:
            a, b = measured
            g = lambda z: self.dvdz(z) * self.weight(z) * self.p_measured(z, a, b) * self.n_between(z, obs_lo, obs_hi)
            pts = sorted({p for p in [a, b] + self.z_kinks if z1 < p < z2}) or None
        return self.area * integrate.quad(g, z1, z2, epsabs=0, epsrel=1e-10, limit=400, points=pts)[0]


def slice_edges(doc, m):
    zlo, zhi = m.window
    if 'redshift' in doc and doc['detection'].get('filter'):
        zlo, zhi = max(zlo, doc['redshift']['min']), min(zhi, doc['redshift']['max'])
    sl = doc.get('slices', {'count': 10})
    if 'edges' in sl:
        return [float(e) for e in sl['edges']]
    if 'count' in sl:
        return [float(e) for e in np.linspace(zlo, zhi, int(sl['count']) + 1)]
    w = sl['width']; e = [zlo]
    while e[-1] + w < zhi - 1e-9:
        e.append(e[-1] + w)
    e.append(zhi)
    return [float(x) for x in e]


def load(name):
    path = os.path.join(FILES, name)
    text = open(path).read()
    doc = num(yaml.safe_load(text))
    pops = doc['populations'] if 'populations' in doc else [doc['population']]
    return text, doc, [Model(doc, p, FILES) for p in pops]


def hist_bins(m, edges, w):
    """A few bins near the limit of the first slice (edges at integer multiples of w)."""
    k = math.floor(m.olim / w + 1e-9)
    ks = [k, k + 1, k + 2, k + 4] if m.kind == 'line_flux' else [k, k - 1, k - 2, k - 4]
    return [(round(kk * w, 10), round((kk + 1) * w, 10)) for kk in sorted(ks)]


def ingredients(m, edges):
    """The effects' values at each slice's middle redshift (for diagnosis)."""
    rows = []
    for a, b in zip(edges[:-1], edges[1:]):
        z = 0.5 * (a + b)
        r = {'z': z, 'redshift_selection': m.selection(z), 'equivalent_width_kept': m.ew_kept(z),
             'attenuation_mag': m.attenuation(z), 'dvdz_sr': m.dvdz(z)}
        if m.kind == 'line_flux':
            r['measured_flux_of_l_star'] = 10 ** m.obs_of(z)[0]
            r['filter_transmission'] = m.trans(z)
        else:
            r['k_correction'] = m.kcorr(z)
            r['apparent_ab_of_m_star'] = m.obs_of(z)[0]
        r['n_detected_mpc3'] = m.n_between(z)
        if m.comp is not None:
            # self-check: the vectorised Gauss-Legendre inner integral against adaptive quad
            m.check_inner = True
            q = m.n_between(z)
            m.check_inner = False
            assert abs(q / r['n_detected_mpc3'] - 1) < 1e-11, (m.name, z, q, r['n_detected_mpc3'])
        rows.append(r)
    return rows


def survey_case(name, plain=None):
    text, doc, models = load(name)
    m = models[0]
    edges = slice_edges(doc, m)
    photo = bool(m.photo_z)
    case = {'file': name, 'yaml': text}
    if not photo:
        slices = [{'z_min': a, 'z_max': b, 'count': sum(mm.count(a, b) for mm in models)} for a, b in zip(edges[:-1], edges[1:])]
    else:
        zmin, zmax = m.window
        lo_t, hi_t = m.true_range()
        true_bins = [(lo_t, zmin)] + list(zip(edges[:-1], edges[1:])) + [(zmax, hi_t)]
        meas_bins = [(-math.inf, zmin)] + list(zip(edges[:-1], edges[1:])) + [(zmax, math.inf)]
        matrix = [[m.count(ta, tb, measured=(ma, mb)) if tb > ta else 0.0 for ma, mb in meas_bins] for ta, tb in true_bins]
        true_counts = [m.count(ta, tb) if tb > ta else 0.0 for ta, tb in true_bins]
        col = [sum(matrix[i][j] for i in range(len(true_bins))) for j in range(len(meas_bins))]
        for i, t in enumerate(true_counts):
            assert abs(sum(matrix[i]) - t) <= 1e-8 * max(t, 1e-300) + 1e-12, (i, sum(matrix[i]), t)
        slices = [{'z_min': a, 'z_max': b, 'count': col[j + 1], 'count_true_redshift': true_counts[j + 1]}
                  for j, (a, b) in enumerate(zip(edges[:-1], edges[1:]))]
        case['photo_z'] = {
            'true_range': [lo_t, hi_t],
            'true_bins': [[a, b] for a, b in true_bins],
            'measured_bins': [[a if math.isfinite(a) else None, b if math.isfinite(b) else None] for a, b in meas_bins],
            'bins_note': 'first and last true bins: below and above the window (to the integration limits); first and last '
                         'measured bins: measured below and above the window (lost); null = unbounded',
            'migration_matrix': matrix,
            'true_counts': true_counts,
            'measured_counts': col,
            'grand_total': sum(true_counts),
        }
    case['slices'] = slices
    case['total'] = sum(s['count'] for s in slices)
    w = doc.get('histogram', {}).get('width')
    if w:
        a0, b0 = edges[0], edges[1]
        bins = []
        for lo, hi in hist_bins(m, edges, w):
            if photo:
                c = m.count(-math.inf, math.inf, lo, hi, measured=(a0, b0))
            else:
                c = sum(mm.count(a0, b0, lo, hi) for mm in models)
            bins.append({'lo': lo, 'hi': hi, 'count': c})
        case['first_slice_bins'] = bins
        case['histogram_variable'] = 'log10 measured line flux (erg/s/cm^2)' if m.kind == 'line_flux' else 'apparent AB magnitude'
    if len(models) > 1:
        case['populations'] = []
        for mm in models:
            e = slice_edges(doc, mm)
            case['populations'].append({'name': mm.name, 'window': list(mm.window),
                                        'slices': [{'z_min': a, 'z_max': b, 'count': mm.count(a, b)} for a, b in zip(e[:-1], e[1:])],
                                        'ingredients': ingredients(mm, e)})
    else:
        case['ingredients'] = ingredients(m, edges)
    if plain:
        case['equals_plain'] = plain
    print(name, [round(s['count'], 6) for s in slices], file=sys.stderr)
    return case


def noise_depth(tau, n_ratio, rs, rr):
    """Flux ratio x = F/F0 reaching the reference's signal-to-noise (mpmath, 30 digits)."""
    mpmath.mp.dps = 30
    tau, n_ratio, rs, rr = (mpmath.mpf(v) for v in (tau, n_ratio, rs, rr))
    k = 1 + rs + rr
    x = (tau + mpmath.sqrt(tau ** 2 + 4 * k * tau ** 2 * (rs * tau + rr * n_ratio))) / (2 * k * tau ** 2)
    return x


def frames(t, tf):
    return max(1, math.ceil(t / tf - 1e-9))


def plan_case(name):
    text, doc, models = load(name)
    m = models[0]
    plan = doc['plan']
    ref = plan['reference']; m0 = float(ref['limit']); t0 = float(ref['exposure_hours'])
    nz = plan['depth_law']['noise']; rs, rr, tf = float(nz['sky_to_source']), float(nz['read_to_source']), float(nz['frame_hours'])
    n0 = frames(t0, tf)
    edges = slice_edges(doc, m)
    rows = []
    for t in [0.05, 0.12, 0.37, 0.62, 1.0, 1.3, 2.7, 5.2, 12.2, 20.0]:
        x = noise_depth(t / t0, frames(t, tf) / n0, rs, rr)
        lim = m0 - 2.5 * float(mpmath.log10(x))
        m.mlim = m.olim = lim
        m._cache = {}
        counts = [m.count(a, b) for a, b in zip(edges[:-1], edges[1:])]
        rows.append({'exposure_hours': t, 'frames': frames(t, tf), 'flux_ratio': float(x), 'limit': lim,
                     'source_law_limit': m0 + 2.5 * math.log10(t / t0), 'background_law_limit': m0 + 1.25 * math.log10(t / t0),
                     'slices': counts, 'total': sum(counts)})
    limits = []
    for t in [0.05, 0.37, 1.0, 2.7, 20.0]:
        xs = float(noise_depth(t / t0, frames(t, tf) / n0, 0, 0))
        xb = float(noise_depth(t / t0, frames(t, tf) / n0, 1e12, 0))
        limits.append({'exposure_hours': t, 'sky_0_read_0_flux_ratio': xs, 'source_law_flux_ratio': t0 / t,
                       'sky_1e12_read_0_flux_ratio': xb, 'background_law_flux_ratio': (t0 / t) ** 0.5})
        assert abs(xs * t / t0 - 1) < 1e-14
        assert abs(xb / (t0 / t) ** 0.5 - 1) < 1e-5
    return {'file': name, 'yaml': text, 'slice_edges': edges, 'reference': {'limit': m0, 'exposure_hours': t0, 'frames': n0},
            'noise': {'sky_to_source': rs, 'read_to_source': rr, 'frame_hours': tf},
            'depth': rows, 'limits_of_the_law': limits,
            'note': 'limit = reference limit - 2.5 log10(flux_ratio); slices/total: the survey file counted with that limit over its own area'}


SURVEYS = ['slitless-halpha-blend-dust-ew.yaml', 'narrowband-two-lines-selection.yaml', 'dropout-sed-selection.yaml',
           'vega-restband-sed.yaml', 'photoz-broadband.yaml']
ZERO = [('zero-plain-line.yaml', None), ('zero-selection.yaml', 'zero-plain-line.yaml'), ('zero-blend.yaml', 'zero-plain-line.yaml'),
        ('zero-attenuation.yaml', 'zero-plain-line.yaml'), ('zero-ew-cut.yaml', 'zero-plain-line.yaml'),
        ('zero-all-line.yaml', 'zero-plain-line.yaml'), ('zero-plain-magnitude.yaml', None),
        ('zero-photoz.yaml', 'zero-plain-magnitude.yaml'), ('zero-vega.yaml', 'zero-plain-magnitude.yaml'),
        ('zero-attenuation-magnitude.yaml', 'zero-plain-magnitude.yaml')]


def main():
    out = {
        'header': {
            'command': '/usr/bin/python3 test/reference/generate/selection.py > test/reference/selection.json',
            'libraries': {'astropy': astropy.__version__, 'scipy': scipy.__version__, 'mpmath': mpmath.__version__,
                          'numpy': np.__version__, 'pyyaml': yaml.__version__},
            'python': sys.version.split()[0],
            'date': datetime.date.today().isoformat(),
            'seed': 'none (no random numbers are drawn)',
            'what': 'expected counts per slice (and histogram bins near the limit, photo-z migration matrices, noise '
                    'depth-law limits) for the invented survey files in test/reference/surveys-selection/, integrated '
                    'independently; semantics in the docstring of the generator. Suggested tolerance 1e-8 relative '
                    '(quadrature at epsrel 1e-10); the zero-effect files equal their plain file exactly.',
        },
        'surveys': [survey_case(n) for n in SURVEYS],
        'zero_effect': [],
        'plans': [plan_case('plan-noise-depth.yaml')],
    }
    plain = {}
    for name, ref in ZERO:
        c = survey_case(name, ref)
        if ref is None:
            plain[name] = c
        else:
            p = plain[ref]
            for s, t in zip(c['slices'], p['slices']):
                assert abs(s['count'] / t['count'] - 1) < 1e-12, (name, s, t)
        out['zero_effect'].append(c)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write('\n')


if __name__ == '__main__':
    main()
