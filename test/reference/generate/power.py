#!/usr/bin/python3
"""Reference values for src/uncertainty (growth, Eisenstein & Hu 1998 transfer functions, sigma_R).

An implementation independent of the TypeScript code: written from the papers, integrals by
scipy.integrate.quad (adaptive QUADPACK), growth from the hypergeometric closed form with
scipy.special.hyp2f1, the critical density from astropy.cosmology and astropy.units.

Run:  /usr/bin/python3 test/reference/generate/power.py > test/reference/power.json
"""
import datetime
import json
import math
import sys

import astropy
import astropy.units as u
import mpmath
import numpy as np
import scipy
from astropy.cosmology import FlatLambdaCDM
from scipy import integrate, special

T_CMB_DEFAULT = 2.7255

COSMOLOGIES = [
    # Planck 2018 VI Table 2 (TT,TE,EE+lowE+lensing+BAO), as in src/cosmology/presets.ts
    {"name": "planck2018", "h0": 67.66, "omega_m": 0.3111, "omega_b": 0.02242 / 0.6766 ** 2,
     "sigma8": 0.8102, "n_s": 0.9665, "t_cmb": 2.7255},
    # invented round-number test case, no radiation (t_cmb = 0 -> transfer uses 2.7255 K)
    {"name": "round", "h0": 70.0, "omega_m": 0.3, "omega_b": 0.045, "sigma8": 0.8, "n_s": 1.0, "t_cmb": 0.0},
    # high-baryon invented case to exercise alpha_Gamma and the oscillations
    {"name": "baryon_rich", "h0": 65.0, "omega_m": 0.25, "omega_b": 0.06, "sigma8": 0.9, "n_s": 0.95, "t_cmb": 2.7255},
]


def eh_params(c):
    h = c["h0"] / 100.0
    theta = (c["t_cmb"] if c["t_cmb"] > 0 else T_CMB_DEFAULT) / 2.7
    wm = c["omega_m"] * h * h
    wb = c["omega_b"] * h * h
    return h, theta, wm, wb, c["omega_b"] / c["omega_m"]


def t_no_wiggle(k, c):
    """Eisenstein & Hu 1998 eqs. 26, 28-31; k in 1/Mpc."""
    h, theta, wm, wb, fb = eh_params(c)
    s = 44.5 * math.log(9.83 / wm) / math.sqrt(1.0 + 10.0 * wb ** 0.75)
    ag = 1.0 - 0.328 * math.log(431.0 * wm) * fb + 0.38 * math.log(22.3 * wm) * fb ** 2
    gamma = c["omega_m"] * h * (ag + (1.0 - ag) / (1.0 + (0.43 * k * s) ** 4))
    q = k / h * theta ** 2 / gamma
    l0 = math.log(2.0 * math.e + 1.8 * q)
    c0 = 14.2 + 731.0 / (1.0 + 62.5 * q)
    return l0 / (l0 + c0 * q * q)


def t_full(k, c):
    """Eisenstein & Hu 1998 eqs. 2-24 (1 + z_eq and R with 1 + z as in the authors' code); k in 1/Mpc."""
    h, theta, wm, wb, fb = eh_params(c)
    fc = 1.0 - fb
    zeq1 = 2.50e4 * wm * theta ** -4
    keq = 7.46e-2 * wm * theta ** -2
    b1 = 0.313 * wm ** -0.419 * (1 + 0.607 * wm ** 0.674)
    b2 = 0.238 * wm ** 0.223
    zd = 1291.0 * wm ** 0.251 / (1 + 0.659 * wm ** 0.828) * (1 + b1 * wb ** b2)
    R = lambda zp1: 31.5 * wb * theta ** -4 * (1000.0 / zp1)
    rd, req = R(1 + zd), R(zeq1)
    s = 2.0 / (3.0 * keq) * math.sqrt(6.0 / req) * math.log((math.sqrt(1 + rd) + math.sqrt(rd + req)) / (1 + math.sqrt(req)))
    ksilk = 1.6 * wb ** 0.52 * wm ** 0.73 * (1 + (10.4 * wm) ** -0.95)
    a1 = (46.9 * wm) ** 0.670 * (1 + (32.1 * wm) ** -0.532)
    a2 = (12.0 * wm) ** 0.424 * (1 + (45.0 * wm) ** -0.582)
    alpha_c = a1 ** (-fb) * a2 ** (-fb ** 3)
    bb1 = 0.944 / (1 + (458.0 * wm) ** -0.708)
    bb2 = (0.395 * wm) ** -0.0266
    beta_c = 1.0 / (1 + bb1 * (fc ** bb2 - 1))
    y = zeq1 / (1 + zd)
    G = y * (-6 * math.sqrt(1 + y) + (2 + 3 * y) * math.log((math.sqrt(1 + y) + 1) / (math.sqrt(1 + y) - 1)))
    alpha_b = 2.07 * keq * s * (1 + rd) ** -0.75 * G
    beta_node = 8.41 * wm ** 0.435
    beta_b = 0.5 + fb + (3 - 2 * fb) * math.sqrt((17.2 * wm) ** 2 + 1)

    q = k / (13.41 * keq)

    def t0(alpha, beta):
        C = 14.2 / alpha + 386.0 / (1 + 69.9 * q ** 1.08)
        L = math.log(math.e + 1.8 * beta * q)
        return L / (L + C * q * q)

    f = 1.0 / (1 + (k * s / 5.4) ** 4)
    tc = f * t0(1.0, beta_c) + (1 - f) * t0(alpha_c, beta_c)
    st = s / (1 + (beta_node / (k * s)) ** 3) ** (1.0 / 3.0)
    tb = (t0(1.0, 1.0) / (1 + (k * s / 5.2) ** 2) + alpha_b / (1 + (beta_b / (k * s)) ** 3) * math.exp(-(k / ksilk) ** 1.4)) * np.sinc(k * st / math.pi)
    return fb * tb + fc * tc


def growth(c, z):
    """Flat matter + Lambda growing mode, D(a) = a 2F1(1/3, 1; 11/6; -a^3 OL/Om), normalised at z = 0."""
    om = c["omega_m"]
    ol = 1.0 - om
    g = lambda a: a * special.hyp2f1(1.0 / 3.0, 1.0, 11.0 / 6.0, -a ** 3 * ol / om)
    return g(1.0 / (1.0 + z)) / g(1.0)


def growth_integral(c, z):
    """The same from Heath's integral by quad (consistency of the fixture)."""
    om = c["omega_m"]
    ol = 1.0 - om
    E = lambda a: math.sqrt(om / a ** 3 + ol)
    gm = lambda a: E(a) * integrate.quad(lambda x: 1.0 / (x * E(x)) ** 3 if x > 0 else 0.0, 0, a, epsabs=0, epsrel=1e-13, limit=200)[0]
    return gm(1.0 / (1.0 + z)) / gm(1.0)


def tophat(x):
    if x < 1e-3:
        return 1 - x * x / 10
    return 3 * (math.sin(x) - x * math.cos(x)) / x ** 3


def sigma2_unnorm(c, tf, R):
    ns = c["n_s"]
    f = lambda lnk: (lambda k: k ** (3 + ns) * tf(k, c) ** 2 * tophat(k * R) ** 2)(math.exp(lnk))
    edges = [math.log(1e-8), math.log(1.0 / R)] + [math.log((4.4934 + j * math.pi) / R) for j in range(0, 400, 4)]
    total = 0.0
    for a, b in zip(edges[:-1], edges[1:]):
        total += integrate.quad(f, a, b, epsabs=0, epsrel=1e-11, limit=400)[0]
    return total / (2 * math.pi ** 2)


def main():
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/power.py > test/reference/power.json",
            "libraries": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
                          "astropy": astropy.__version__, "mpmath": mpmath.__version__},
            "date": datetime.date.today().isoformat(),
            "method": "Eisenstein & Hu 1998 (ApJ 496, 605) transfer functions re-implemented from the paper; "
                      "sigma_R by scipy.integrate.quad in ln k split at top-hat zeros; growth by scipy.special.hyp2f1; "
                      "rho_crit from astropy.cosmology.FlatLambdaCDM.critical_density0",
            "units": "k in 1/Mpc, P in Mpc^3, R in Mpc, M in Msun",
        },
        "cosmologies": [],
    }
    ks = [1e-5, 1e-4, 1e-3, 3e-3, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1.0, 3.0, 10.0, 100.0]
    for c in COSMOLOGIES:
        h = c["h0"] / 100
        entry = {"cosmology": c, "transfer": [], "growth": [], "sigma_r": [], "sigma_m": [], "power": []}
        for k in ks:
            entry["transfer"].append({"k": k, "no_wiggle": t_no_wiggle(k, c), "full": t_full(k, c)})
        for z in [0.0, 0.5, 1.0, 2.0, 5.0, 10.0]:
            d = growth(c, z)
            di = growth_integral(c, z)
            assert abs(d / di - 1) < 1e-9, (d, di)
            entry["growth"].append({"z": z, "d": d})
        norms = {}
        for name, tf in (("no_wiggle", t_no_wiggle), ("full", t_full)):
            norms[name] = c["sigma8"] ** 2 / sigma2_unnorm(c, tf, 8.0 / h)
        for k in [1e-3, 0.01, 0.1, 1.0]:
            for z in [0.0, 2.0]:
                entry["power"].append({"k": k, "z": z,
                                       "no_wiggle": norms["no_wiggle"] * k ** c["n_s"] * t_no_wiggle(k, c) ** 2 * growth(c, z) ** 2,
                                       "full": norms["full"] * k ** c["n_s"] * t_full(k, c) ** 2 * growth(c, z) ** 2})
        for R in [0.5, 2.0, 8.0 / h, 20.0, 50.0, 150.0]:
            for z in [0.0, 3.0]:
                row = {"r_mpc": R, "z": z}
                for name, tf in (("no_wiggle", t_no_wiggle), ("full", t_full)):
                    row[name] = math.sqrt(norms[name] * sigma2_unnorm(c, tf, R)) * growth(c, z)
                entry["sigma_r"].append(row)
        cosmo = FlatLambdaCDM(H0=c["h0"], Om0=c["omega_m"], Tcmb0=0)
        rho_m = (c["omega_m"] * cosmo.critical_density0).to(u.Msun / u.Mpc ** 3).value
        entry["rho_m0_msun_mpc3"] = rho_m
        for M in [1e8, 1e11, 1e14, 1e15]:
            R = (3 * M / (4 * math.pi * rho_m)) ** (1.0 / 3.0)
            entry["sigma_m"].append({"m_msun": M, "z": 0.0, "r_mpc": R,
                                     "no_wiggle": math.sqrt(norms["no_wiggle"] * sigma2_unnorm(c, t_no_wiggle, R))})
        out["cosmologies"].append(entry)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
