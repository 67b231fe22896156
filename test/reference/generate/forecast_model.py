#!/usr/bin/python3
"""Independent Fisher sigmas across a luminosity function's own uncertainty (forecast --model-draws),
for invented survey files of test/reference/surveys-model/.

THE SEMANTICS IMPLEMENTED (the contract):
- The forecast's parameters theta = (log10 phi*, log10 L* or M*, alpha), constant offsets at every z.
- A draw d (the model_uncertainty semantics of model_uncertainty.py: sigmas, correlations, Cholesky
  factor; or every row of a draws file once, offsets = row - assumed values) moves the assumed
  model to theta_0 + d; the Fisher matrix of that draw is the one of the unbinned extended Poisson
  likelihood (Cash 1979, ApJ 228, 939) of a survey whose population follows the drawn model:
      F_jk = integral dz integral dx lambda(z, x; theta_0 + d) dln lambda/dtheta_j dln lambda/dtheta_k,
  lambda = area dV/dz/dOmega phi(x; z, theta) above the hard limit (x = log10 L or M), exactly as
  fisher.py writes it (phi per dex ln10 phi* u^(alpha+1) e^-u, per mag 0.4 ln10 phi* u^(alpha+1) e^-u,
  u = L/L* or 10^(0.4 (M* - M)); derivatives by central differences, step 1e-5).
- Cosmic variance: one normalisation nuisance per slice with the INVENTED fractions sigma_i and
  correlation R_ij below (the same for every draw: the forecast keeps the assumed model's
  fractions), a joint Gaussian prior of covariance S_ij = sigma_i sigma_j R_ij: the augmented matrix
  [[F, B], [B^T, diag(N_i) + S^-1]] inverted (numpy.linalg.inv), as fisher.py does.
- Each draw gives sigma_j = sqrt((F^-1)_jj) (Poisson only) and from the augmented inverse (with
  cosmic variance); the percentiles p16, p50, p84 over the draws are numpy's default (type 7).
- --target (Poisson only): the information is linear in area, so the area that meets sigma_j = T in
  a share p of the draws is A (P_p(sigma_j) / T)^2 with P_p the draws' percentile.

Numerics: z by the Gauss-Legendre nodes of model_uncertainty.py's Survey (16 per slice, per sixth
of a slice behind a gaussian filter; astropy FlatLambdaCDM volumes); x per draw and node by 48
Gauss-Legendre panels of 8 points in t = ln u from the limit to ln(max(u_lim, 1) + 45). Checks:
the counts of that quadrature against model_uncertainty.py's incomplete-gamma counts (1e-10
relative), and the sigmas at the assumed values against 96 panels (1e-9 relative).

Monte Carlo error of each percentile: the order-statistic estimate of model_uncertainty.py
(standard_error), and se_1000, the error of a 1,000-draw estimate.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/forecast_model.py > test/reference/forecast_model.json
"""
import datetime
import json
import math
import os
import sys

import numpy as np
import scipy
import astropy

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import model_uncertainty as mu  # noqa: E402  (the survey files' reading and the draws' semantics)

SEED = 20261213
DRAWS = 20000
CHUNK = 1000
H = 1e-5
LN10 = math.log(10.0)
GL8_X, GL8_W = np.polynomial.legendre.leggauss(8)
PS = [0.16, 0.5, 0.84]
PN = ['p16', 'p50', 'p84']

CASES = [
    {'file': 'line-correlated.yaml', 'cosmic_variance': [0.08, 0.07, 0.065, 0.06],
     'cosmic_variance_correlation': [[1.0, 0.3, 0.05, 0.0], [0.3, 1.0, 0.3, 0.05], [0.05, 0.3, 1.0, 0.3],
                                     [0.0, 0.05, 0.3, 1.0]],
     'target': {'alpha': 0.02}},
    {'file': 'uv-magnitude.yaml', 'cosmic_variance': [0.25, 0.22, 0.2],
     'cosmic_variance_correlation': [[1.0, 0.1, 0.01], [0.1, 1.0, 0.1], [0.01, 0.1, 1.0]],
     'target': {'alpha': 0.03}},
    {'file': 'narrowband-draws-file.yaml', 'cosmic_variance': [0.15, 0.14, 0.15],
     'cosmic_variance_correlation': [[1.0, 0.4, 0.1], [0.4, 1.0, 0.4], [0.1, 0.4, 1.0]],
     'target': {'log10_l_star': 0.02}},
]


def forecast_names(sv):
    return ['log10_phi_star', sv.star_name, 'alpha']


def ln_phi(sv, x, lphi, star, alpha):
    """ln of the density per unit x (log10 L or M) at x for the given parameters (arrays broadcast)."""
    if sv.variable == 'luminosity':
        lu = x - star
        return np.log(LN10) + lphi * LN10 + (alpha + 1) * lu * LN10 - 10.0 ** lu
    lu = 0.4 * (star - x)
    return np.log(0.4 * LN10) + lphi * LN10 + (alpha + 1) * lu * LN10 - 10.0 ** lu


def fisher_per_draw(sv, theta, panels=48):
    """theta: (n, 3) offsets. Returns per slice N (n,), b (n, 3), F (n, 3, 3)."""
    n = theta.shape[0]
    out = []
    for nd in sv.nodes:
        N = np.zeros(n); b = np.zeros((n, 3)); F = np.zeros((n, 3, 3))
        for i in range(len(nd['w'])):
            lphi = nd['lphi'][0][i] + theta[:, 0:1]
            star = nd['star'][i] + theta[:, 1:2]
            alpha = nd['alpha'][0][i] + theta[:, 2:3]
            lim = nd['lim'][i]
            lx = sv.log10_x(star, lim)          # log10 u at the limit, (n, 1)
            t_lo = lx * LN10
            t_hi = np.log(np.maximum(10.0 ** lx, 1.0) + 45.0)
            edges = t_lo + (t_hi - t_lo) * np.linspace(0, 1, panels + 1)[None, :]
            a, c = edges[:, :-1], edges[:, 1:]
            t = (0.5 * (a + c))[:, :, None] + (0.5 * (c - a))[:, :, None] * GL8_X[None, None, :]
            wt = (0.5 * (c - a))[:, :, None] * GL8_W[None, None, :]
            t = t.reshape(n, -1); wt = wt.reshape(n, -1)
            # the observed value of each point (fixed while the parameters move)
            if sv.variable == 'luminosity':
                x = star + t / LN10; dxdt = 1 / LN10
            else:
                x = star - t / (0.4 * LN10); dxdt = 1 / (0.4 * LN10)
            base = (lphi, star, alpha)
            lp = ln_phi(sv, x, *base)
            lam = np.exp(lp) * dxdt * wt * nd['w'][i]
            d = []
            for j in range(3):
                up = list(base); dn = list(base)
                up[j] = up[j] + H; dn[j] = dn[j] - H
                d.append((ln_phi(sv, x, *up) - ln_phi(sv, x, *dn)) / (2 * H))
            N += lam.sum(axis=1)
            for j in range(3):
                b[:, j] += (lam * d[j]).sum(axis=1)
                for k in range(j, 3):
                    v = (lam * d[j] * d[k]).sum(axis=1)
                    F[:, j, k] += v
                    if k != j:
                        F[:, k, j] += v
        out.append((N, b, F))
    return out


def sigmas(parts, cv, r):
    """Per draw sigma Poisson only and with cosmic variance (joint prior S = cv cv^T * r): (n, 3) each."""
    Ftot = sum(p[2] for p in parts)
    poisson = np.sqrt(np.diagonal(np.linalg.inv(Ftot), axis1=1, axis2=2))
    ns = len(parts); n = Ftot.shape[0]
    A = np.zeros((n, 3 + ns, 3 + ns))
    A[:, :3, :3] = Ftot
    A[:, 3:, 3:] = np.linalg.inv(np.outer(cv, cv) * np.array(r))[None, :, :]
    for i, (N, b, _) in enumerate(parts):
        A[:, :3, 3 + i] = b; A[:, 3 + i, :3] = b
        A[:, 3 + i, 3 + i] += N
    withcv = np.sqrt(np.diagonal(np.linalg.inv(A)[:, :3, :3], axis1=1, axis2=2))
    return poisson, withcv


def summary(values, names, errors):
    pc = np.percentile(values, [100 * p for p in PS], axis=0)
    out = {}
    for j, nme in enumerate(names):
        d = {k: float(pc[i, j]) for i, k in enumerate(PN)}
        if errors:
            srt = np.sort(values[:, j]); n = len(srt)
            se = {}
            for p, k in zip(PS, PN):
                dd = math.sqrt(n * p * (1 - p))
                lo, hi = int(math.floor(n * p - dd)), int(math.ceil(n * p + dd))
                se[k] = 0.5 * (srt[min(hi, n - 1)] - srt[max(lo, 0)])
            d['standard_error'] = se
            d['se_1000'] = {k: v * math.sqrt(n / 1000.0) for k, v in se.items()}
        out[nme] = d
    return out


def case(spec, rng):
    sv = mu.Survey(spec['file'])
    names = forecast_names(sv)
    cv = spec['cosmic_variance']
    r = spec['cosmic_variance_correlation']
    assert len(cv) == len(sv.nodes) and len(r) == len(cv)
    zero = np.zeros((1, 3))
    p0 = fisher_per_draw(sv, zero)
    # checks: the x quadrature's counts against the incomplete-gamma counts; panels doubled
    counts = sv.counts({})[0]
    assert np.all(np.abs(np.array([p[0][0] for p in p0]) / counts - 1) < 1e-10), (spec['file'], counts)
    s0 = sigmas(p0, cv, r)
    s0b = sigmas(fisher_per_draw(sv, zero, panels=96), cv, r)
    assert np.all(np.abs(s0[0] / s0b[0] - 1) < 1e-9) and np.all(np.abs(s0[1] / s0b[1] - 1) < 1e-9)
    u = sv.uncertainty
    if 'draws_file' in u:
        path = os.path.join(mu.FILES, u['draws_file'])
        with open(path) as fh:
            head = fh.readline().strip().split(',')
        rows = np.loadtxt(path, delimiter=',', skiprows=1, ndmin=2)
        ass = sv.assumed()
        theta = np.column_stack([rows[:, head.index(k)] - ass[k] for k in names])
        method = 'every row of the draws file once: exact (no Monte Carlo error)'
        errors = False
    else:
        order = [k for k in u if k != 'correlation']
        cov, _, _ = sv.covariance(order)
        d = rng.standard_normal((DRAWS, len(order))) @ np.linalg.cholesky(cov).T
        theta = np.column_stack([d[:, order.index(k)] if k in order else np.zeros(DRAWS) for k in names])
        method = 'Monte Carlo: numpy default_rng(%d).standard_normal((%d, %d)) times the Cholesky factor' % (
            SEED, DRAWS, len(order))
        errors = True
    chunks = [sigmas(fisher_per_draw(sv, theta[i:i + CHUNK]), cv, r) for i in range(0, theta.shape[0], CHUNK)]
    poisson = np.concatenate([c[0] for c in chunks]); withcv = np.concatenate([c[1] for c in chunks])
    area = float(sv.area / mu.DEG2_SR)
    sp = summary(poisson, names, errors)
    req = {}
    for nme, target in spec['target'].items():
        j = names.index(nme)
        req[nme] = {'target': target,
                    'area_deg2_plain': area * (float(s0[0][0, j]) / target) ** 2,
                    'area_deg2_p50': area * (sp[nme]['p50'] / target) ** 2,
                    'area_deg2_p84': area * (sp[nme]['p84'] / target) ** 2}
    return {
        'file': spec['file'], 'yaml': sv.text, 'parameters': names, 'area_deg2': area,
        'slice_edges': sv.edges, 'cosmic_variance': cv,
        'cosmic_variance_correlation': r, 'draws': int(theta.shape[0]), 'method': method,
        'plain': {'sigma_poisson_only': s0[0][0].tolist(), 'sigma_with_cosmic_variance': s0[1][0].tolist()},
        'sigma_poisson_only': sp,
        'sigma_with_cosmic_variance': summary(withcv, names, errors),
        'requirement_poisson_only': req,
    }


def main():
    rng = np.random.default_rng(SEED)
    out = {
        'header': {
            'command': '/usr/bin/python3 test/reference/generate/forecast_model.py > test/reference/forecast_model.json',
            'libraries': {'astropy': astropy.__version__, 'scipy': scipy.__version__, 'numpy': np.__version__},
            'python': sys.version.split()[0],
            'date': datetime.date.today().isoformat(),
            'seed': SEED,
            'draws': DRAWS,
            'what': 'p16, p50, p84 of the Fisher sigmas over draws of model_uncertainty, Poisson only and with '
                    'invented cosmic-variance fractions and correlations; semantics in the generator docstring. A test comparing an '
                    'N-draw result should allow ~4 x sqrt(standard_error^2 + se_1000^2 x 1000 / N).',
        },
        'cases': [],
    }
    for spec in CASES:
        c = case(spec, rng)
        print(spec['file'], c['plain'], c['sigma_with_cosmic_variance'], file=sys.stderr)
        out['cases'].append(c)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write('\n')


if __name__ == '__main__':
    main()
