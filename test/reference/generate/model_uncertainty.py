#!/usr/bin/python3
"""Independent Monte Carlo of the count's spread under a luminosity function's own uncertainty
(model_uncertainty blocks), for the invented survey files in test/reference/surveys-model/.

THE SEMANTICS IMPLEMENTED (the contract):
- Parameters: log10_phi_star, log10_l_star (luminosity variable) or m_star (magnitude variable),
  alpha; for a double Schechter log10_phi_star_1, log10_phi_star_2, alpha_1, alpha_2 and the shared
  log10_l_star (or m_star). The names are these whatever form the population file uses: for
  phi_star given linearly or per dex (phi_star, phi_star_dex, log10_phi_star_dex, ..._1_dex) the
  sigma is still in dex and a draw multiplies the normalisation by 10^d.
- "Applied as constant offsets at every redshift": a draw d is added to the parameter's value at
  every z, so evolving parameters keep their evolution:
      log10 phi*(z) += d_phi  (phi*(z) x 10^d_phi),  log10 L*(z) += d_L  (or M*(z) += d_M),
      alpha(z) += d_alpha.
- Sigmas and correlations: covariance C_ij = sigma_i sigma_j rho_ij, rho_ii = 1, pairs left out
  uncorrelated (rho = 0); a pair is written "a-b" in either order.
- Draws: d = L xi with L the Cholesky factor of C (numpy.linalg.cholesky) and
  xi = numpy.random.default_rng(SEED).standard_normal((N, k)), the parameters in the order they are
  listed in the file's block. A draws_file is a CSV whose header names the parameters, one draw a
  row, the VALUES of the parameters (not offsets); every row is used once (draws = rows) and the
  offsets are row - assumed value (the files here use parameters constant in z).
- Each draw gives every slice's count and the total (the total is the sum of that draw's slices);
  the percentiles of each slice and of the total are taken separately over the draws, with numpy's
  default linear interpolation between order statistics (Hyndman & Fan type 7):
  p2_5, p16, p50, p84, p97_5; fraction = (p84 - p16) / (2 p50).
- Counts per draw: hard limits only (no completeness); n(z) = sum_c phi*_c 10^d Gamma(alpha_c + d + 1,
  x(z)) with x the limit over L* (or 10^(-0.4 (M_lim - M*))), upper incomplete gamma from
  scipy.special (downward recurrence below s = 0, mpmath within 1e-3 of an integer s <= 0); the z integral by
  16-point Gauss-Legendre per slice
  (per sixth of a slice behind a gaussian filter) of area dV/dz/dOmega n(z) (astropy FlatLambdaCDM volumes);
  checked against scipy.integrate.quad with mpmath.gammainc at the assumed values and at offsets
  (assert 1e-10 relative).

Monte Carlo error of each percentile (so that a test can allow 3-4 of them, combined in quadrature
with its own): the distribution-free order-statistic estimate, half the distance between the order
statistics N p -/+ sqrt(N p (1 - p)) (the binomial 1-sigma range of the rank), and a bootstrap
(BOOT resamples, seed SEED + 1) for comparison. The error scales as 1/sqrt(draws): "se_1000" is
the error at 1,000 draws (skytally's default), se x sqrt(N / 1000).

Exact checks (no Monte Carlo error):
- One parameter's sigma alone: mean and variance of every count by 40-node Gauss-Hermite
  quadrature (numpy.polynomial.hermite_e, weight exp(-x^2/2) / sqrt(2 pi)); and the exact
  percentiles, count(theta + sigma z_p) (or -z_p where the count decreases with the parameter;
  monotonicity checked on +-6 sigma), with z_p the standard normal quantile; and the Monte Carlo
  error expected of N draws, |dcount/dxi| sqrt(p(1-p)/N) / phi(z_p).
- Correlation +1 and -1 between two parameters (the others' sigmas 0): the draw is one normal
  variable xi, d = (sigma_a xi, +-sigma_b xi); percentiles from the 1-D map as above when monotone,
  otherwise from the exact distribution of the 1-D function (grid + root refinement), the Monte
  Carlo error then sqrt(p(1-p)/N) / (density of the count at the percentile). A correlation
  of exactly +-1 is only positive semi-definite; rho = +-(1 - 1e-9) differs from these values by
  far less than any Monte Carlo error.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/model_uncertainty.py > test/reference/model_uncertainty.json
The invented posterior sample is written once by
    /usr/bin/python3 test/reference/generate/model_uncertainty.py --write-chain
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
from scipy import integrate, optimize, special

warnings.simplefilter('ignore', u.UnitsWarning)
SEED = 20261212
DRAWS = 40000
BOOT = 100
LN10 = math.log(10.0)
MPC_CM = (1 * u.Mpc).to(u.cm).value
DEG2_SR = (math.pi / 180.0) ** 2
HERE = os.path.dirname(os.path.abspath(__file__))
FILES = os.path.join(HERE, '..', 'surveys-model')
GL_X, GL_W = np.polynomial.legendre.leggauss(16)
PS = [0.025, 0.16, 0.5, 0.84, 0.975]
PNAMES = ['p2_5', 'p16', 'p50', 'p84', 'p97_5']
EXPR_FUNCS = {'log10': math.log10, 'ln': math.log, 'exp': math.exp, 'sqrt': math.sqrt, 'abs': abs, 'min': min, 'max': max}


def num(v):
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
    if isinstance(v, (int, float)):
        return float(v)
    return u.Quantity(v.replace('um', 'micron').replace('^', '')).to(unit).value


def param(v):
    if isinstance(v, (int, float)):
        return lambda z: float(v)
    if isinstance(v, dict):
        t = np.array(v['table'], dtype=float)
        return lambda z: float(np.interp(z, t[:, 0], t[:, 1]))
    expr = v.replace('^', '**')
    return lambda z: float(eval(expr, {'__builtins__': {}}, dict(EXPR_FUNCS, z=z)))


def log10_norm(p, sfx=''):
    """log10 of phi*(z) in Mpc^-3 whatever form the file uses."""
    if 'phi_star' + sfx in p:
        f = param(p['phi_star' + sfx]); return lambda z: math.log10(f(z))
    if 'log10_phi_star' + sfx in p:
        return param(p['log10_phi_star' + sfx])
    if 'phi_star' + sfx + '_dex' in p:
        f = param(p['phi_star' + sfx + '_dex']); return lambda z: math.log10(f(z) / LN10)
    f = param(p['log10_phi_star' + sfx + '_dex']); return lambda z: f(z) - math.log10(LN10)


def upper_gamma(s, x):
    """Gamma(s, x) for arrays s > -4, x > 0: scipy.special for s > 0; below, from s0 = s + k in (0, 1]
    by the downward recurrence Gamma(s, x) = (Gamma(s + 1, x) - x^s e^-x) / s; mpmath.gammainc where
    s is within 1e-3 of an integer <= 0 (where the recurrence would divide by nearly 0)."""
    s = np.asarray(s, dtype=float); x = np.asarray(x, dtype=float)
    s, x = np.broadcast_arrays(s, x)
    assert np.all(s > -4), 'alpha + 1 below -4 is outside this reference'
    k = np.where(s > 0, 0, np.floor(-s) + 1).astype(int)
    s0 = s + k
    # regularised Q(s0, x): 1 - P below x = 1.3 (scipy 1.10's gammaincc is slow there; both agree to 1e-14)
    small = x < 1.3
    q = np.empty(s.shape)
    q[small] = 1.0 - special.gammainc(s0[small], x[small])
    q[~small] = special.gammaincc(s0[~small], x[~small])
    g = q * special.gamma(s0)
    ex = np.exp(-x)
    with np.errstate(divide='ignore', invalid='ignore'):
        for i in range(1, int(k.max(initial=0)) + 1):
            m = k >= i
            si = s0[m] - i
            g[m] = (g[m] - x[m] ** si * ex[m]) / si
    near = (s <= 0.5) & (np.abs(s - np.round(s)) < 1e-3)
    for i in zip(*np.nonzero(near)):
        g[i] = float(mpmath.gammainc(s[i], a=x[i]))
    return g


class Survey:
    def __init__(self, name):
        self.name = name
        path = os.path.join(FILES, name)
        self.text = open(path).read()
        doc = num(yaml.safe_load(self.text))
        self.doc = doc
        pop = doc['population']; det = doc['detection']
        c = doc['cosmology']
        self.cosmo = FlatLambdaCDM(H0=c['h0'], Om0=c['omega_m'], Tcmb0=c.get('t_cmb', 0.0), Neff=3.046, m_nu=0 * u.eV)
        a = doc['area']
        self.area = a * DEG2_SR if isinstance(a, (int, float)) else u.Quantity(a.replace('^', '')).to(u.sr).value
        self.kind = det['kind']
        self.variable = pop.get('variable', 'luminosity')
        self.double = pop.get('shape') == 'double_schechter'
        sfx = ['_1', '_2'] if self.double else ['']
        self.lphi = [log10_norm(pop, s) for s in sfx]
        self.alpha = [param(pop['alpha' + s]) for s in sfx]
        if 'l_star' in pop:
            f = param(pop['l_star']); self.lstar = lambda z: math.log10(f(z))   # log10 L*
        elif 'log10_l_star' in pop:
            self.lstar = param(pop['log10_l_star'])
        else:
            self.lstar = param(pop['m_star'])                                  # M*
        self.star_name = 'm_star' if self.variable == 'magnitude' else 'log10_l_star'
        self.params = ([f'log10_phi_star{s}' for s in sfx] + [f'alpha{s}' for s in sfx] + [self.star_name])
        # the limit at z in the "x" of the incomplete gamma: log10(L_lim) or M_lim (absolute)
        if self.kind == 'line_flux':
            line = quantity(pop.get('line', det.get('line')), u.AA)
            flim = quantity(det['limit'], u.erg / u.s / u.cm ** 2)
            filt = det.get('filter')
            if filt:
                center, fwhm = quantity(filt['center'], u.AA), quantity(filt['fwhm'], u.AA)
                gauss = filt.get('profile') == 'gaussian'
                half = 1.5 * fwhm if gauss else fwhm / 2
                self.window = ((center - half) / line - 1, (center + half) / line - 1)
                sig = fwhm / (2 * math.sqrt(2 * math.log(2)))
                trans = (lambda z: math.exp(-(line * (1 + z) - center) ** 2 / (2 * sig * sig))) if gauss else (lambda z: 1.0)
            else:
                self.window = (doc['redshift']['min'], doc['redshift']['max'])
                trans = lambda z: 1.0

            def lim(z):
                dl = self.cosmo.luminosity_distance(z).to(u.Mpc).value * MPC_CM
                return math.log10(4 * math.pi * dl * dl * flim / trans(z))
        elif self.kind == 'magnitude':
            self.window = (doc['redshift']['min'], doc['redshift']['max'])
            lb = quantity(det['band'], u.AA); beta = float(det.get('beta', -2.0))
            lr = quantity(pop.get('rest_wavelength', 1500), u.AA); mlim = float(det['limit'])

            def lim(z):
                dm = 5 * math.log10(self.cosmo.luminosity_distance(z).to(u.pc).value / 10.0)
                k = -2.5 * math.log10(1 + z) - 2.5 * (beta + 2) * math.log10(lb / ((1 + z) * lr))
                return mlim - dm - k
        else:
            self.window = (doc['redshift']['min'], doc['redshift']['max'])
            lim = param(det['limit'])
        self.lim = lim
        sl = doc['slices']
        zlo, zhi = self.window
        if 'count' in sl:
            self.edges = [float(e) for e in np.linspace(zlo, zhi, int(sl['count']) + 1)]
        else:
            e = [zlo]
            while e[-1] + sl['width'] < zhi - 1e-9:
                e.append(e[-1] + sl['width'])
            e.append(zhi); self.edges = [float(v) for v in e]
        # Gauss-Legendre nodes per slice, with everything that does not depend on the offsets
        self.nodes = []
        panels = 6 if det.get('filter') else 1   # a gaussian filter's steep wings need more nodes
        for a, b in zip(self.edges[:-1], self.edges[1:]):
            pe = np.linspace(a, b, panels + 1)
            zs = np.concatenate([0.5 * (p + q) + 0.5 * (q - p) * GL_X for p, q in zip(pe[:-1], pe[1:])])
            w = np.concatenate([0.5 * (q - p) * GL_W for p, q in zip(pe[:-1], pe[1:])])
            w = w * self.area * np.array([self.cosmo.differential_comoving_volume(z).value for z in zs])
            self.nodes.append({
                'w': w,
                'lphi': [np.array([f(z) for z in zs]) for f in self.lphi],
                'alpha': [np.array([f(z) for z in zs]) for f in self.alpha],
                'star': np.array([self.lstar(z) for z in zs]),
                'lim': np.array([lim(z) for z in zs]),
            })
        mu = pop.get('model_uncertainty', {})
        self.uncertainty = mu

    def log10_x(self, star, lim):
        """log10 of the incomplete-gamma bound x = L_lim / L* (or 10^(-0.4 (M_lim - M*)))."""
        if self.variable == 'magnitude':
            return -0.4 * (lim - star)
        return lim - star

    def counts(self, offsets):
        """offsets: dict name -> array of shape (n,) (missing names: 0). Returns array (n, slices)."""
        n = len(next(iter(offsets.values()))) if offsets else 1
        g = lambda k: np.asarray(offsets.get(k, np.zeros(n)), dtype=float)[:, None]
        sfx = ['_1', '_2'] if self.double else ['']
        out = np.zeros((n, len(self.nodes)))
        for j, nd in enumerate(self.nodes):
            lx = self.log10_x(nd['star'][None, :] + g(self.star_name), nd['lim'][None, :])
            x = 10 ** lx
            dens = 0.0
            for c, s in enumerate(sfx):
                phi = 10 ** (nd['lphi'][c][None, :] + g('log10_phi_star' + s))
                dens = dens + phi * upper_gamma(nd['alpha'][c][None, :] + g('alpha' + s) + 1, x)
            out[:, j] = dens @ nd['w']
        return out

    def quad_counts(self, offs):
        """The same counts by scipy.integrate.quad over z with mpmath.gammainc (the self-check)."""
        sfx = ['_1', '_2'] if self.double else ['']
        res = []
        for a, b in zip(self.edges[:-1], self.edges[1:]):
            def f(z):
                star = self.lstar(z) + offs.get(self.star_name, 0.0)
                x = 10 ** self.log10_x(star, self.lim(z))
                n = sum(10 ** (self.lphi[c](z) + offs.get('log10_phi_star' + s, 0.0)) *
                        float(mpmath.gammainc(self.alpha[c](z) + offs.get('alpha' + s, 0.0) + 1, a=x)) for c, s in enumerate(sfx))
                return self.cosmo.differential_comoving_volume(z).value * n
            res.append(self.area * integrate.quad(f, a, b, epsabs=0, epsrel=1e-11, limit=200)[0])
        return np.array(res)

    def assumed(self, z=None):
        """Assumed parameter values (constant-in-z parameters only: used for draws files)."""
        z = self.window[0] if z is None else z
        vals = {}
        sfx = ['_1', '_2'] if self.double else ['']
        for c, s in enumerate(sfx):
            vals['log10_phi_star' + s] = self.lphi[c](z)
            vals['alpha' + s] = self.alpha[c](z)
        vals[self.star_name] = self.lstar(z)
        return vals

    def covariance(self, names):
        mu = self.uncertainty
        sig = np.array([float(mu.get(k, 0.0)) for k in names])
        rho = np.eye(len(names))
        for pair, r in (mu.get('correlation') or {}).items():
            a, b = pair.split('-')
            i, j = names.index(a), names.index(b)
            rho[i, j] = rho[j, i] = float(r)
        return np.outer(sig, sig) * rho, sig, rho


def percentiles(v):
    return np.percentile(v, [100 * p for p in PS], axis=0)


def order_stat_se(v):
    """Half the distance between the order statistics at ranks N p -/+ sqrt(N p (1-p))."""
    srt = np.sort(v, axis=0); n = srt.shape[0]
    out = []
    for p in PS:
        d = math.sqrt(n * p * (1 - p))
        lo, hi = int(math.floor(n * p - d)), int(math.ceil(n * p + d))
        out.append(0.5 * (srt[min(hi, n - 1)] - srt[max(lo, 0)]))
    return np.array(out)


def bootstrap_se(v, rng):
    n = v.shape[0]
    reps = np.empty((BOOT, len(PS)) + v.shape[1:])
    for b in range(BOOT):
        reps[b] = np.percentile(v[rng.integers(0, n, n)], [100 * p for p in PS], axis=0)
    return reps.std(axis=0, ddof=1)


def summary(counts, rng=None, with_errors=True):
    """counts: (N, slices). Percentiles of each slice and of the total."""
    total = counts.sum(axis=1)
    allv = np.column_stack([counts, total])
    pc = percentiles(allv)
    res = []
    if with_errors:
        se = order_stat_se(allv); bse = bootstrap_se(allv, rng)
    for j in range(allv.shape[1]):
        d = {k: float(pc[i, j]) for i, k in enumerate(PNAMES)}
        d['fraction'] = (d['p84'] - d['p16']) / (2 * d['p50'])
        if with_errors:
            n = allv.shape[0]
            d['standard_error'] = {k: float(se[i, j]) for i, k in enumerate(PNAMES)}
            d['standard_error_bootstrap'] = {k: float(bse[i, j]) for i, k in enumerate(PNAMES)}
            d['se_1000'] = {k: float(se[i, j] * math.sqrt(n / 1000.0)) for i, k in enumerate(PNAMES)}
        res.append(d)
    return {'slices': res[:-1], 'total': res[-1]}


def one_dimensional(sv, offsets_of_xi, label):
    """Exact percentiles (and Gauss-Hermite moments) of the counts when the draw is one normal xi."""
    zs = [float(special.ndtri(p)) for p in PS]
    grid = np.linspace(-6, 6, 241)
    g = sv.counts(offsets_of_xi(grid))
    g = np.column_stack([g, g.sum(axis=1)])
    hx, hw = np.polynomial.hermite_e.hermegauss(40)
    hw = hw / math.sqrt(2 * math.pi)
    h = sv.counts(offsets_of_xi(hx)); h = np.column_stack([h, h.sum(axis=1)])
    mean = hw @ h
    var = hw @ (h - mean) ** 2
    out = []
    for j in range(g.shape[1]):
        dg = np.diff(g[:, j])
        up, down = np.all(dg > 0), np.all(dg < 0)
        row = {'mean': float(mean[j]), 'variance': float(var[j]), 'monotone': bool(up or down)}
        if up or down:
            xq = np.array([z if up else -z for z in zs])
            vals = sv.counts(offsets_of_xi(xq)); vals = np.column_stack([vals, vals.sum(axis=1)])[:, j]
            eps = 1e-5
            vp = sv.counts(offsets_of_xi(xq + eps)); vp = np.column_stack([vp, vp.sum(axis=1)])[:, j]
            vm = sv.counts(offsets_of_xi(xq - eps)); vm = np.column_stack([vm, vm.sum(axis=1)])[:, j]
            slope = np.abs(vp - vm) / (2 * eps)
            dens = np.exp(-0.5 * np.array(zs) ** 2) / math.sqrt(2 * math.pi)
            se1 = slope * np.sqrt(np.array(PS) * (1 - np.array(PS))) / dens   # x 1/sqrt(N)
            row.update({k: float(vals[i]) for i, k in enumerate(PNAMES)})
            row['se_1000'] = {k: float(se1[i] / math.sqrt(1000)) for i, k in enumerate(PNAMES)}
        else:
            row.update(nonmonotone_quantiles(sv, offsets_of_xi, j))
        out.append(row)
    return {'case': label, 'slices': out[:-1], 'total': out[-1]}


def nonmonotone_quantiles(sv, offsets_of_xi, j):
    """Quantiles of y = g(xi), xi ~ N(0,1), for g not monotone on [-9, 9] (beyond, Phi < 2e-19):
    g is split into monotone pieces at the extrema found on a grid; on each piece {g <= y} is one
    interval whose end is found by brentq; CDF(y) = sum of the Phi-masses; CDF(y) = p by brentq."""
    def gfun(x):
        v = sv.counts(offsets_of_xi(np.atleast_1d(np.asarray(x, dtype=float))))
        return np.column_stack([v, v.sum(axis=1)])[:, j]
    grid = np.linspace(-9, 9, 1801)
    gv = gfun(grid)
    d = np.sign(np.diff(gv))
    cuts = [0] + [i for i in range(1, len(d)) if d[i] != d[i - 1]] + [len(grid) - 1]
    # refine each interior extremum to the grid's resolution is enough: the piece ends are extrema,
    # where g is flat, so an error h in xi moves g by O(h^2)
    pieces = []
    for a, b in zip(cuts[:-1], cuts[1:]):
        ga, gb = gfun(grid[a])[0], gfun(grid[b])[0]
        pieces.append((grid[a], grid[b], gb >= ga, ga, gb))

    def inverse(y, a, b, ga, gb):
        fa, fb = ga - y, gb - y
        if fa == 0:
            return a
        if fb == 0 or fa * fb > 0:
            return b if abs(fb) < abs(fa) else a
        return optimize.brentq(lambda x: gfun(x)[0] - y, a, b, xtol=1e-13)

    def cdf(y):
        mass = 0.0
        for a, b, up, ga, gb in pieces:
            lo_v, hi_v = (ga, gb) if up else (gb, ga)
            if y >= hi_v:
                mass += special.ndtr(b) - special.ndtr(a)
            elif y > lo_v:
                x = inverse(y, a, b, ga, gb)
                mass += (special.ndtr(x) - special.ndtr(a)) if up else (special.ndtr(b) - special.ndtr(x))
        return mass
    res = {'se_1000': {}}
    for p, k in zip(PS, PNAMES):
        q = float(optimize.brentq(lambda y: cdf(y) - p, gv.min(), gv.max(), xtol=1e-12 * gv.max(), rtol=1e-13))
        res[k] = q
        h = 1e-4 * abs(q)
        dens = (cdf(q + h) - cdf(q - h)) / (2 * h)   # density of the count at its quantile
        res['se_1000'][k] = math.sqrt(p * (1 - p) / 1000.0) / dens
    res['pieces'] = len(pieces)
    return res


def write_chain():
    """The invented posterior sample of narrowband-draws-file.yaml (a correlated, slightly skewed cloud)."""
    rng = np.random.default_rng(4242)
    n = 800
    xi = rng.standard_normal((n, 3))
    c = np.array([[1.0, -0.5, 0.6], [-0.5, 1.0, -0.7], [0.6, -0.7, 1.0]])
    d = xi @ np.linalg.cholesky(c).T * np.array([0.07, 0.06, 0.09])
    d[:, 2] += 0.03 * (xi[:, 2] ** 2 - 1)
    path = os.path.join(FILES, 'chains', 'narrowband-posterior.csv')
    with open(path, 'w') as fh:
        fh.write('log10_phi_star,log10_l_star,alpha\n')
        for a, b, cc in d:
            fh.write('%.4f,%.4f,%.4f\n' % (-2.65 + a, 42.25 + b, -1.5 + cc))
    print('wrote', path)


def mc_case(name, rng):
    sv = Survey(name)
    plain = sv.counts({})[0]
    # self-check of the Gauss-Legendre counts against quad + mpmath, at the assumed values and at an offset
    for offs in ({}, {p: (0.1 if 'alpha' in p else -0.07) for p in sv.params}):
        q = sv.quad_counts(offs)
        gl = sv.counts({k: np.array([v]) for k, v in offs.items()})[0] if offs else plain
        assert np.all(np.abs(gl / q - 1) < 1e-10), (name, offs, gl, q)
    case = {'file': name, 'yaml': sv.text, 'slice_edges': sv.edges, 'parameters': sv.params,
            'plain': {'slices': [float(v) for v in plain], 'total': float(plain.sum())}}
    mu = sv.uncertainty
    if 'draws_file' in mu:
        path = os.path.join(FILES, mu['draws_file'])
        with open(path) as fh:
            head = fh.readline().strip().split(',')
        rows = np.loadtxt(path, delimiter=',', skiprows=1, ndmin=2)
        ass = sv.assumed()
        assert ass == sv.assumed(sv.window[1]), 'a draws file here needs parameters constant in z'
        offs = {k: rows[:, i] - ass[k] for i, k in enumerate(head)}
        counts = sv.counts(offs)
        s = summary(counts, with_errors=False)
        # order statistics bracketing each type-7 percentile, for a differently interpolated percentile
        allv = np.sort(np.column_stack([counts, counts.sum(axis=1)]), axis=0)
        n = allv.shape[0]
        for j, d in enumerate(s['slices'] + [s['total']]):
            d['bracket'] = {k: [float(allv[int(math.floor((n - 1) * p)), j]), float(allv[int(math.ceil((n - 1) * p)), j])]
                            for p, k in zip(PS, PNAMES)}
        case['model'] = dict(s, draws=n, method='every row of the draws file once; exact (no Monte Carlo error); '
                                                 'type-7 percentiles, bracket = the two order statistics around each')
        return case
    names = list(k for k in mu if k != 'correlation')
    cov, sig, rho = sv.covariance(names)
    case['uncertainty_order'] = names
    if np.all(sig == 0):
        counts = np.tile(plain, (10, 1))
        case['model'] = dict(summary(counts, with_errors=False), draws='any', method='all sigmas 0: every draw is the plain prediction')
        return case
    chol = np.linalg.cholesky(cov)
    xi = rng.standard_normal((DRAWS, len(names)))
    d = xi @ chol.T
    counts = sv.counts({k: d[:, i] for i, k in enumerate(names)})
    case['model'] = dict(summary(counts, np.random.default_rng(SEED + 1)), draws=DRAWS,
                         method='Monte Carlo: numpy default_rng(%d).standard_normal((%d, %d)) times the Cholesky factor' % (SEED, DRAWS, len(names)))
    # Gauss-Hermite and exact percentiles, one parameter's sigma alone
    case['one_parameter'] = []
    for i, k in enumerate(names):
        if sig[i] == 0:
            continue
        case['one_parameter'].append(dict(one_dimensional(sv, lambda x, k=k, s=sig[i]: {k: s * np.asarray(x)}, f'{k} alone, sigma {sig[i]}'),
                                          parameter=k, sigma=float(sig[i])))
    return case, sv, names, sig


def correlation_limits(sv, a, b, sa, sb):
    rows = []
    for r in (1.0, -1.0):
        res = one_dimensional(sv, lambda x: {a: sa * np.asarray(x), b: r * sb * np.asarray(x)},
                              f'{a} sigma {sa} and {b} sigma {sb}, correlation {r:+g}, other sigmas 0')
        rows.append(dict(res, parameters=[a, b], sigmas=[sa, sb], correlation=r))
    return rows


def main():
    if '--write-chain' in sys.argv:
        write_chain(); return
    rng = np.random.default_rng(SEED)
    out = {
        'header': {
            'command': '/usr/bin/python3 test/reference/generate/model_uncertainty.py > test/reference/model_uncertainty.json',
            'libraries': {'astropy': astropy.__version__, 'scipy': scipy.__version__, 'mpmath': mpmath.__version__,
                          'numpy': np.__version__, 'pyyaml': yaml.__version__},
            'python': sys.version.split()[0],
            'date': datetime.date.today().isoformat(),
            'seed': SEED,
            'draws': DRAWS,
            'bootstrap': {'resamples': BOOT, 'seed': SEED + 1},
            'what': 'percentiles of slice and total counts under model_uncertainty for the invented files in '
                    'test/reference/surveys-model/ (Monte Carlo with its own standard errors; exact results for '
                    'draws files, one parameter alone and correlation +-1); semantics in the generator docstring. '
                    'A test comparing an N-draw result should allow ~4 x sqrt(standard_error^2 + se_1000^2 x 1000 / N).',
        },
        'surveys': [],
        'correlation_limits': [],
    }
    for name in ['line-correlated.yaml', 'uv-magnitude.yaml', 'double-schechter-mass.yaml']:
        case, sv, names, sig = mc_case(name, rng)
        out['surveys'].append(case)
        print(name, case['model']['total']['p50'], case['plain']['total'], file=sys.stderr)
        if name == 'line-correlated.yaml':
            out['correlation_limits'].append(dict(file=name, rows=correlation_limits(sv, 'log10_phi_star', 'alpha', 0.08, 0.10)))
        if name == 'uv-magnitude.yaml':
            out['correlation_limits'].append(dict(file=name, rows=correlation_limits(sv, 'm_star', 'alpha', 0.2, 0.12)))
    for name in ['narrowband-draws-file.yaml', 'narrowband-draws-assumed.yaml', 'line-zero-sigmas.yaml']:
        case = mc_case(name, rng)
        out['surveys'].append(case)
        print(name, case['model']['total']['p50'], case['plain']['total'], file=sys.stderr)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write('\n')


if __name__ == '__main__':
    main()
