#!/usr/bin/python3
"""Reference values for src/uncertainty/box-covariance.ts: the covariance of the mean linear density
contrasts in two boxes of one field, parallel, transverse centres aligned, centres d apart along the
line of sight (two redshift slices of one field):

    C_ab = ∫ d^3k / (2 pi)^3 P(|k|) W_a(k) W_b(k) cos(k_z d),   W(k) = Π_i sinc(k_i L_i / 2),

at z = 0, sides in comoving Mpc, P in Mpc^3 (Eisenstein & Hu 1998 no-wiggle, sigma_8 normalised,
from test/reference/generate/power.py through box_sigma.py's spline of ln T).

Method, independent of the TypeScript product rule (and with the exact transverse sides of each
box, where the TypeScript takes their geometric mean): the integral over the octant in polar
coordinates of the transverse wavevector,

    C_ab = (1/pi^3) ∫_0^∞ K dK  A(K) J(K),
    A(K) = ∫_0^{pi/2} dphi  sinc(K cos(phi) w_a/2) sinc(K cos(phi) w_b/2) sinc(K sin(phi) h_a/2) sinc(K sin(phi) h_b/2),
    J(K) = ∫_0^∞ dk  sinc(k A) sinc(k B) cos(k d) P(sqrt(K^2 + k^2)),   A = L_a/2, B = L_b/2:

A(K) by scipy.integrate.quad (QUADPACK QAGS); J(K) by 24-point Gauss-Legendre on panels a twelfth of
the fastest period wide up to k_1, and beyond k_1 the weight written as
(1/(4 A B k^2)) [cos((A-B-d)k) + cos((A-B+d)k) - cos((A+B-d)k) - cos((A+B+d)k)], each term by
QUADPACK's Fourier integral (QAWF, weight 'cos', to infinity) or plain quad for a zero frequency;
the K integral by quad on panels in ln K. Every value is computed with two settings (the second
with a k_1 twice as far and tighter tolerances); their relative difference is asserted below 2e-5
and the finer value is written. A pair of identical boxes at d = 0 is the box variance, checked
against box_sigma.py's brute-force triple sum (asserted to 2e-5).

Run:  /usr/bin/python3 test/reference/generate/box_covariance.py > test/reference/box_covariance.json
"""
import datetime
import json
import math
import os
import sys
import warnings

import numpy as np
import scipy
from scipy import integrate

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import power as P  # noqa: E402
import box_sigma as BS  # noqa: E402

COSMO = P.COSMOLOGIES[1]  # round: h0 70, omega_m 0.3 (the bundled H-alpha samples' background)

# (name, box a [w, h, L], box b, separation d of the centres, Mpc). Adjacent slices touch: d = (L_a + L_b) / 2.
PAIRS = [
    ("variance", [72.0, 72.0, 35.0], [72.0, 72.0, 35.0], 0.0),
    ("adjacent_narrowband", [71.0, 71.0, 35.0], [72.0, 72.0, 35.0], 35.0),
    ("next_but_one_narrowband", [71.0, 71.0, 35.0], [73.0, 73.0, 35.0], 70.0),
    ("adjacent_unequal", [50.0, 30.0, 60.0], [60.0, 36.0, 100.0], 80.0),
    ("pencils_touching", [5.0, 5.0, 150.0], [5.5, 5.5, 170.0], 160.0),
]

SETTINGS = {
    "base": {"k1_lobes": 30, "epsrel": 1e-8, "k_panels_per_e": 2},
    "fine": {"k1_lobes": 60, "epsrel": 1e-10, "k_panels_per_e": 3},
}


def sinc(x):
    return np.sinc(np.asarray(x) / math.pi)


def make_power():
    p0, err = BS.spline_power(COSMO, "no_wiggle", 1e-7, 1e4)
    return p0, err


def j_of_k(p0, big_k, a, b, d, s):
    fastest = a + b + d
    period = 2.0 * math.pi / fastest
    k1 = s["k1_lobes"] * math.pi / min(a, b)
    n = int(math.ceil(k1 / (period / 12.0)))
    x, w = np.polynomial.legendre.leggauss(24)
    edges = np.linspace(0.0, k1, n + 1)
    lo = edges[:-1][:, None]
    hi = edges[1:][:, None]
    k = (0.5 * (lo + hi) + 0.5 * (hi - lo) * x[None, :]).ravel()
    wk = (0.5 * (hi - lo) * w[None, :]).ravel()
    head = float(np.sum(wk * sinc(k * a) * sinc(k * b) * np.cos(k * d) * p0(np.sqrt(big_k * big_k + k * k))))
    tail = 0.0
    for omega, sign in ((a - b - d, 1.0), (a - b + d, 1.0), (a + b - d, -1.0), (a + b + d, -1.0)):
        omega = abs(omega)

        def g(kk):
            return float(p0(np.sqrt(big_k * big_k + kk * kk))) / (kk * kk)

        if omega < 1e-9 * fastest:
            v = integrate.quad(g, k1, np.inf, epsabs=0, epsrel=s["epsrel"], limit=500)[0]
        else:
            # (the oscillating tails beyond k_1 are of order 1e-8 of the head; QUADPACK's cycle
            # warnings at that level are expected and not an error here)
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", integrate.IntegrationWarning)
                v = integrate.quad(g, k1, np.inf, weight="cos", wvar=omega, epsabs=1e-10 * abs(head) + 1e-300,
                                   limlst=400)[0]
        tail += sign * v
    return head + tail / (4.0 * a * b)


def a_of_k(big_k, box_a, box_b, s):
    def f(phi):
        c, sn = math.cos(phi), math.sin(phi)
        return float(sinc(big_k * c * box_a[0] / 2) * sinc(big_k * c * box_b[0] / 2)
                     * sinc(big_k * sn * box_a[1] / 2) * sinc(big_k * sn * box_b[1] / 2))

    side = min(box_a[0], box_a[1], box_b[0], box_b[1])
    pts = max(1, int(big_k * side / math.pi))
    return integrate.quad(f, 0.0, math.pi / 2, epsabs=0, epsrel=s["epsrel"], limit=max(200, 8 * pts))[0]


def covariance(p0, box_a, box_b, d, s):
    a = 0.5 * box_a[2]
    b = 0.5 * box_b[2]

    def integrand(lnk):
        big_k = math.exp(lnk)
        return big_k * big_k * a_of_k(big_k, box_a, box_b, s) * j_of_k(p0, big_k, a, b, d, s)

    side = min(box_a[0], box_a[1], box_b[0], box_b[1])
    ln_lo, ln_hi = math.log(1e-6), math.log(400.0 / side)
    n = int(math.ceil((ln_hi - ln_lo) * s["k_panels_per_e"]))
    edges = np.linspace(ln_lo, ln_hi, n + 1)
    total = 0.0
    # (a covariance near zero would leave a relative tolerance unreachable: an absolute one at
    # epsrel times the box variance's scale; the two settings' agreement is the check)
    scale = s["epsrel"] * 1e-2 / (ln_hi - ln_lo)
    for lo, hi in zip(edges[:-1], edges[1:]):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", integrate.IntegrationWarning)
            total += integrate.quad(integrand, lo, hi, epsabs=scale, epsrel=s["epsrel"], limit=200)[0]
    return total / math.pi ** 3


def main():
    warnings.simplefilter("error", integrate.IntegrationWarning)
    p0, spline_err = make_power()
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/box_covariance.py > test/reference/box_covariance.json",
            "libraries": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__},
            "date": datetime.date.today().isoformat(),
            "method": "C_ab = (1/pi^3) ∫ K dK A(K) J(K): A the polar-angle integral of the exact transverse windows "
                      "(quad), J the line-of-sight integral with cos(k d) (Gauss-Legendre panels, then QUADPACK QAWF "
                      "per frequency to infinity); P from power.py (Eisenstein & Hu 1998 no-wiggle, sigma_8 "
                      "normalised) through box_sigma.py's spline of ln T; two settings, the finer value written",
            "settings": SETTINGS,
            "units": "sides and separation in comoving Mpc; covariance at z = 0, dimensionless",
        },
        "cosmology": COSMO,
        "spline_max_rel_err": spline_err,
        "pairs": [],
    }
    only = os.environ.get("PAIRS")
    for name, box_a, box_b, d in PAIRS:
        if only and name not in only.split(","):
            continue
        c = {key: covariance(p0, box_a, box_b, d, s) for key, s in SETTINGS.items()}
        diff = abs(c["base"] / c["fine"] - 1)
        assert diff < 2e-5, (name, c, diff)
        row = {"name": name, "box_a_mpc": box_a, "box_b_mpc": box_b, "separation_mpc": d,
               "covariance_z0": c["fine"], "rel_diff_base_fine": diff}
        if d == 0.0 and box_a == box_b:
            bs = BS.box_sigma2_z0(p0, box_a, BS.RULES["fine"], "no_wiggle")
            row["box_sigma_py_variance"] = bs
            assert abs(c["fine"] / bs - 1) < 2e-5, (name, c["fine"], bs)
        out["pairs"].append(row)
        print(name, c, diff, file=sys.stderr)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
