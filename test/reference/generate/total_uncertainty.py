#!/usr/bin/python3
"""Reference for the uncertainty of a survey's TOTAL count: the n(z)-weighted calculation.

For each population the detected sources' distribution along the line of sight is computed
independently of skytally: dN/dchi = area_sr * chi^2 * n_det(z) (flat sky, chi = comoving
distance from astropy.cosmology), with n_det(z) the number density above the limit times the
completeness (test/reference/generate/counts.py: mpmath incomplete gamma, scipy quad).

  * count-weighted redshift      z_eff = ∫ z dN / N
  * count-weighted bias          b_eff = ∫ b(z) dN / N, b(z) matched at every z to the detected
                                  density n_det(z) (Sheth & Tormen 1999 haloes, abundance matching
                                  as in Trenti & Stiavelli 2008; occupation 1), or the bias given
  * selection depth              N^2 / ∫ (dN/dchi)^2 dchi (the length of the uniform slab with the
                                  same ∫ p^2, p = (dN/dchi) / N)
  * effective depth              L_eff = (∫ q dchi)^2 / ∫ q^2 dchi, q = p b D: the same for the
                                  weight of the fluctuations (D the linear growth)
  * count-weighted density       n_eff = ∫ n_det dN / N
  * cosmic variance of the count (the n(z)-weighted box): the fractional fluctuation of
        N = ∫ dchi dN/dchi [1 + b(z) delta(chi)]  averaged over one field's transverse box is
        sigma^2 = ∫ d^3k/(2 pi)^3 P(k, 0) sinc^2(kx a/2) sinc^2(ky b/2) |R(kz)|^2,
        R(kz)   = ∫ dchi p(chi) b(z) D(z) exp(i kz chi),
    with the field's transverse sides a, b at z_eff (the flat-sky box convention of
    src/uncertainty/cosmic-variance.ts), P the Eisenstein & Hu 1998 no-wiggle spectrum normalised
    to sigma8 and D the linear growth (test/reference/generate/power.py); the fraction over
    `count` fields is sigma / sqrt(count). The radial window is the Fourier transform of the whole
    distribution (no box is fitted to it): this is the calculation the program's effective box
    approximates. For comparison, box_cosmic_variance_fraction is the uniform box of depth L_eff
    (same transverse sides) times <b D> = ∫ q dchi: the program's approximation, computed here.
  * several populations in disjoint windows: each is computed as above and the total's variance
    is the sum of theirs (their windows lie > 1000 Mpc apart, where the linear matter correlation
    is below 1e-3 of the variances compared here).
  * halo mass of the bias: the M with effective Sheth-Tormen bias of haloes above M at z_eff equal
    to b_eff.

Numerics: the transverse double integral by Gauss-Legendre on 60 sinc^2 lobes per axis plus the
averaged 1/(2u^2) tail, tabulated on a log grid of kz; the kz integral by the trapezoid rule on a
grid resolving the oscillations of R; R by Simpson's rule on 4001 points. sigma(M) from
power.py's sigma2_unnorm (scipy quad) on a 0.25 grid in ln M, cubic spline; n(>M) by scipy quad;
matching by scipy brentq.

Run:  /usr/bin/python3 test/reference/generate/total_uncertainty.py > test/reference/total-uncertainty.json
"""
import datetime
import json
import math
import os
import sys

import astropy
import astropy.units as u
import mpmath
import numpy as np
import scipy
import yaml
from astropy.cosmology import FlatLambdaCDM
from scipy import integrate, interpolate, optimize

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import counts as C  # noqa: E402  (survey models and detected densities)
import power as P  # noqa: E402  (Eisenstein & Hu transfer function, growth, sigma_R)

DELTA_C = 1.686
ST_A, ST_a, ST_p = 0.3222, 0.707, 0.3

CASES = {
    # samples/halpha-narrowband.yaml: a gaussian filter (window +- 1.5 FWHM) and a completeness
    "halpha_narrowband": """
title: H-alpha emitters at z = 0.8 in an invented 1.19 um narrow band
cosmology: {h0: 70, omega_m: 0.3}
area: 2.1
detection:
  kind: line_flux
  limit: 4e-17
  line: 6562.8
  filter: {center: 11900, fwhm: 130, profile: gaussian}
  completeness: {model: logistic, half: 5e-17, width: 0.08}
population: {name: H-alpha emitters, variable: luminosity, log10_phi_star: -2.6, log10_l_star: 42.3, alpha: -1.45}
slices: {count: 5}
""",
    # a flux-limited sample over a long window: the density falls steeply with z
    "flux_limited_wide": """
title: Invented slitless H-alpha survey, flux limited
cosmology: {h0: 70, omega_m: 0.3}
area: 2
field: {aspect: 2, count: 3}
redshift: {min: 0.3, max: 1.8}
detection: {kind: line_flux, limit: 2e-16, line: 6563}
population: {variable: luminosity, log10_phi_star: -2.8, log10_l_star: 42.3, alpha: -1.35}
slices: {count: 6}
""",
    # continuum-selected galaxies at high redshift: growth and bias change across the window
    "continuum_high_z": """
title: Invented deep continuum field at z = 4 to 6
cosmology: {h0: 70, omega_m: 0.3}
area: 0.2
redshift: {min: 4.0, max: 6.0}
detection: {kind: magnitude, limit: 27.5, band: 9000, beta: -2.0}
population: {variable: magnitude, log10_phi_star: -3.2, m_star: -20.9, alpha: -1.8, rest_wavelength: 1500}
slices: {count: 4}
""",
    # two lines through one gaussian filter: windows at z ~ 0.40 and ~ 0.84
    "two_lines": """
title: Invented narrow-band search with an [OIII] interloper
cosmology: {h0: 70, omega_m: 0.3}
area: 0.8
detection:
  kind: line_flux
  limit: 4e-17
  filter: {center: 9200, fwhm: 110, profile: gaussian}
populations:
  - {name: halpha, variable: luminosity, line: 6563, log10_phi_star: -2.8, log10_l_star: 41.9, alpha: -1.35}
  - {name: oiii, variable: luminosity, line: 5007, log10_phi_star: -2.9, log10_l_star: 42.0, alpha: -1.6, bias: 1.3}
slices: {count: 3}
""",
}


def cosmology_of(doc):
    c = doc["cosmology"]
    return {"h0": float(c["h0"]), "omega_m": float(c["omega_m"]), "omega_b": float(c.get("omega_b", 0.049)),
            "sigma8": float(c.get("sigma8", 0.81)), "n_s": float(c.get("n_s", 0.965)), "t_cmb": float(c.get("t_cmb", 0.0))}


def t_no_wiggle_np(k, c):
    """Eisenstein & Hu 1998 eqs. 26, 28-31 for an array of k (1/Mpc); the same formula as power.py."""
    h, theta, wm, wb, fb = P.eh_params(c)
    s = 44.5 * math.log(9.83 / wm) / math.sqrt(1.0 + 10.0 * wb ** 0.75)
    ag = 1.0 - 0.328 * math.log(431.0 * wm) * fb + 0.38 * math.log(22.3 * wm) * fb ** 2
    gamma = c["omega_m"] * h * (ag + (1.0 - ag) / (1.0 + (0.43 * k * s) ** 4))
    q = k / h * theta ** 2 / gamma
    l0 = np.log(2.0 * math.e + 1.8 * q)
    c0 = 14.2 + 731.0 / (1.0 + 62.5 * q)
    return l0 / (l0 + c0 * q * q)


class Haloes:
    """Sheth & Tormen 1999 mass function and bias (nu = delta_c / sigma), abundance matching."""

    def __init__(self, c):
        self.c = c
        h = c["h0"] / 100.0
        self.norm = c["sigma8"] ** 2 / P.sigma2_unnorm(c, P.t_no_wiggle, 8.0 / h)
        cosmo = FlatLambdaCDM(H0=c["h0"], Om0=c["omega_m"], Tcmb0=0)
        self.rho = (c["omega_m"] * cosmo.critical_density0).to(u.Msun / u.Mpc ** 3).value
        lnm = np.arange(math.log(1e3), math.log(1e19) + 1e-9, 0.25)
        lns = [0.5 * math.log(self.norm * P.sigma2_unnorm(c, P.t_no_wiggle, (3 * math.exp(m) / (4 * math.pi * self.rho)) ** (1 / 3)))
               for m in lnm]
        self.spline = interpolate.CubicSpline(lnm, lns)
        self.lnm_max = lnm[-1]

    def per_lnm(self, lnm, d):
        sigma = math.exp(self.spline(lnm)) * d
        nu = DELTA_C / sigma
        anu2 = ST_a * nu * nu
        f = ST_A * math.sqrt(2 * ST_a / math.pi) * (1 + anu2 ** -ST_p) * math.exp(-0.5 * anu2)
        slope = -float(self.spline(lnm, 1))
        bias = 1 + (anu2 - 1) / DELTA_C + 2 * ST_p / (DELTA_C * (1 + anu2 ** ST_p))
        return self.rho / math.exp(lnm) * f * nu * slope, bias

    def above(self, lnm0, d):
        n = integrate.quad(lambda x: self.per_lnm(x, d)[0], lnm0, self.lnm_max, epsabs=0, epsrel=1e-10, limit=200)[0]
        nb = integrate.quad(lambda x: (lambda r: r[0] * r[1])(self.per_lnm(x, d)), lnm0, self.lnm_max, epsabs=0, epsrel=1e-10, limit=200)[0]
        return n, nb

    def match(self, density, z):
        """M_min and the bias above it; held at 1e6 or 1e16 Msun outside what those haloes provide."""
        d = P.growth(self.c, z)
        g = lambda lnm: math.log(self.above(lnm, d)[0]) - math.log(density)
        lo, hi = math.log(1e6), math.log(1e16)
        lnm = lo if g(lo) <= 0 else hi if g(hi) >= 0 else optimize.brentq(g, lo, hi, xtol=1e-10)
        n, nb = self.above(lnm, d)
        return math.exp(lnm), nb / n

    def mass_of_bias(self, bias, z):
        d = P.growth(self.c, z)
        g = lambda lnm: (lambda r: r[1] / r[0])(self.above(lnm, d)) - bias
        return math.exp(optimize.brentq(g, math.log(1e6), math.log(1e16), xtol=1e-10))


def transverse_table(c, a, b, kz):
    """T(kz) = ∫∫ dkx dky P(k, 0) sinc^2(kx a/2) sinc^2(ky b/2) over the quarter plane."""
    norm = c["sigma8"] ** 2 / P.sigma2_unnorm(c, P.t_no_wiggle, 8.0 / (c["h0"] / 100.0))
    x, w = np.polynomial.legendre.leggauss(12)
    lobes = 60
    us, ws = [], []
    for j in range(lobes):
        lo, hi = j * math.pi, (j + 1) * math.pi
        uu = 0.5 * (hi + lo) + 0.5 * (hi - lo) * x
        s = np.where(uu > 0, np.sin(uu) / np.where(uu > 0, uu, 1), 1.0)
        us.append(uu)
        ws.append(0.5 * (hi - lo) * w * s * s)
    tx, tw = np.polynomial.legendre.leggauss(8)
    t = 0.5 / (lobes * math.pi) * (tx + 1)  # t = 1/u in (0, 1/U)
    us.append(1 / t)
    ws.append(0.5 / (lobes * math.pi) * tw * 0.5)
    uu, ww = np.concatenate(us), np.concatenate(ws)
    kx = 2 * uu / a
    ky = 2 * uu / b
    k2 = kx[:, None] ** 2 + ky[None, :] ** 2
    wgt = ww[:, None] * ww[None, :]
    out = []
    for q in kz:
        k = np.sqrt(k2 + q * q)
        p = norm * k ** c["n_s"] * t_no_wiggle_np(k, c) ** 2
        out.append(4.0 / (a * b) * float(np.sum(wgt * p)))
    return np.array(out)


def kz_grid():
    return np.concatenate([np.linspace(0, 0.02, 2001)[:-1], np.linspace(0.02, 0.3, 5601)[:-1], np.linspace(0.3, 5.0, 9401)])


def transverse_on_grid(c, a, b):
    """T on the kz grid of the radial integral (from a log table, cubic in log-log)."""
    kz = kz_grid()
    ktab = np.concatenate([[0.0], np.geomspace(1e-5, 5.0, 140)])
    ttab = transverse_table(c, a, b, ktab)
    tspline = interpolate.CubicSpline(np.log(ktab[1:]), np.log(ttab[1:]))
    tk = np.where(kz < 1e-5, ttab[0], np.exp(tspline(np.log(np.maximum(kz, 1e-5)))))
    return tk, kz


def sigma_weighted(tk, kz, chi, q):
    """rms of ∫ q delta dchi averaged over the transverse box (q normalised by the caller)."""
    r2 = np.empty_like(kz)
    for i0 in range(0, len(kz), 500):
        ks = kz[i0:i0 + 500]
        ph = np.exp(1j * ks[:, None] * chi[None, :])
        r = integrate.simpson(q[None, :] * ph, x=chi, axis=1)
        r2[i0:i0 + 500] = np.abs(r) ** 2
    return math.sqrt(integrate.trapezoid(tk * r2, kz) / math.pi ** 3)


def population_reference(doc, c, haloes, model, pop, area_sr, field):
    zlo, zhi = model["window"]
    cosmo = model["cosmo"]
    zc = np.linspace(zlo, zhi, 201)
    ndet = np.array([C.n_between(model, float(z), -1e9, 1e9) for z in zc])
    nspline = interpolate.CubicSpline(zc, ndet)
    z = np.linspace(zlo, zhi, 4001)
    chi = cosmo.comoving_distance(z).to(u.Mpc).value
    n = np.maximum(nspline(z), 0.0)
    dndchi = area_sr * chi ** 2 * n
    count = integrate.simpson(dndchi, x=chi)
    zeff = integrate.simpson(z * dndchi, x=chi) / count
    p = dndchi / count
    lsel = 1.0 / integrate.simpson(p * p, x=chi)
    neff = integrate.simpson(n * p, x=chi)
    bias_given = pop.get("bias")
    if bias_given is None or bias_given == "auto":
        zb = np.linspace(zlo, zhi, 41)
        bb = [haloes.match(float(max(nspline(zz), 1e-300)), float(zz))[1] for zz in zb]
        bz = interpolate.CubicSpline(zb, bb)(z)
    else:
        bz = np.full_like(z, float(bias_given))
    beff = integrate.simpson(p * bz, x=chi)
    dz = np.array([P.growth(c, float(zz)) for zz in np.linspace(zlo, zhi, 81)])
    growth = np.interp(z, np.linspace(zlo, zhi, 81), dz)
    dmeff = cosmo.comoving_transverse_distance(zeff).to(u.Mpc).value
    afield = area_sr / field["count"]
    a = math.sqrt(afield * field["aspect"]) * dmeff
    b = math.sqrt(afield / field["aspect"]) * dmeff
    tk, kz = transverse_on_grid(c, a, b)
    sigma = sigma_weighted(tk, kz, chi, p * bz * growth)
    # check of the Fourier machinery: a uniform weight over the same span gives the box's sinc^2
    span = chi[-1] - chi[0]
    su = sigma_weighted(tk, kz, chi, np.full_like(chi, 1.0 / span))
    suni = math.sqrt(integrate.trapezoid(tk * np.sinc(kz * span / (2 * math.pi)) ** 2, kz) / math.pi ** 3)
    assert abs(su / suni - 1) < 2e-3, (su, suni)
    cv = sigma / math.sqrt(field["count"])
    q = p * bz * growth
    bd = integrate.simpson(q, x=chi)
    leff = bd ** 2 / integrate.simpson(q * q, x=chi)
    sbox = math.sqrt(integrate.trapezoid(tk * np.sinc(kz * leff / (2 * math.pi)) ** 2, kz) / math.pi ** 3) * bd
    out = {
        "name": pop.get("name"),
        "count": count,
        "mean_redshift": zeff,
        "bias": beff,
        "cosmic_variance_fraction": cv,
        "sigma_matter": sigma / beff,
        "effective_depth_mpc": leff,
        "selection_depth_mpc": lsel,
        "window_depth_mpc": span,
        "box_cosmic_variance_fraction": sbox / math.sqrt(field["count"]),
        "count_weighted_density_mpc3": neff,
        "transverse_sides_mpc": [a, b],
    }
    if bias_given is None or bias_given == "auto":
        out["halo_mass_of_bias_msun"] = haloes.mass_of_bias(beff, zeff)
    print(f"  {pop.get('name')}: N {count:.6g} z_eff {zeff:.4f} b_eff {beff:.4f} L_eff {leff:.2f} of {span:.2f} Mpc; "
          f"cv exact {cv:.5f}, effective box {sbox / math.sqrt(field['count']):.5f} ({sbox / sigma - 1:+.4f})", file=sys.stderr)
    return out


def main():
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/total_uncertainty.py > test/reference/total-uncertainty.json",
            "libraries": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
                          "astropy": astropy.__version__, "mpmath": mpmath.__version__},
            "date": datetime.date.today().isoformat(),
            "what": "count-weighted redshift, bias, effective depth and n(z)-weighted cosmic variance of each population's "
                    "total count (see the generator's docstring); units Mpc, Msun",
        },
        "cases": [],
    }
    for name, text in CASES.items():
        print(name, file=sys.stderr)
        doc = C.num(yaml.safe_load(text))
        c = cosmology_of(doc)
        haloes = Haloes(c)
        _, area_sr = C.build(doc)
        field = {"aspect": 1.0, "count": 1, **doc.get("field", {})}
        pops = doc["populations"] if "populations" in doc else [doc["population"]]
        models = C.survey_models(doc)
        results = [population_reference(doc, c, haloes, m, p, area_sr, field) for m, p in zip(models, pops)]
        n = sum(r["count"] for r in results)
        var = sum((r["count"] * r["cosmic_variance_fraction"]) ** 2 for r in results)
        total = {"count": n, "bias": sum(r["count"] * r["bias"] for r in results) / n,
                 "cosmic_variance_fraction": math.sqrt(var) / n}
        out["cases"].append({"name": name, "yaml": text, "populations": results, "total": total})
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
