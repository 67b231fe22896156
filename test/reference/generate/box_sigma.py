#!/usr/bin/python3
"""Reference values for src/uncertainty/window.ts: rms linear fluctuation sigma in rectangular boxes.

The quantity (module comment of src/uncertainty/window.ts; Newman & Davis 2002, ApJ 564, 567):

    sigma^2 = ∫ d^3k / (2 pi)^3  P(|k|, z) Π_i sinc^2(k_i L_i / 2)
            = 8 / (pi^3 V) ∫_0^∞∫_0^∞∫_0^∞ d^3u  P(sqrt(Σ (2 u_i / L_i)^2), z) Π sinc^2(u_i),

sides L_i in comoving Mpc, P in Mpc^3: Eisenstein & Hu 1998 transfer functions (no-wiggle and full),
growth and the sigma_8 normalisation (top-hat of radius 8/h Mpc) all imported from
test/reference/generate/power.py, so the spectrum is the one test/reference/power.json checks.

Method, independent of the TypeScript fast rule: a brute-force tensor product of one 1-D rule per
axis, summed directly over all node triples (no tabulation of the inner sum), by numpy:
  - the first sinc^2 lobe [0, pi] in geometric panels down to pi 2^-GRADE (the integrand has a
    kink ~ |u|^n_s at u = 0 when the other axes are near 0 too), Gauss-Legendre on each;
  - lobes [j pi, (j + 1) pi], j = 1 .. LOBES - 1, two Gauss-Legendre panels each;
  - beyond LOBES pi the averaged weight <sin^2 u> = 1/2, ∫ f(u) / (2 u^2) du = ∫ f(1/t) / 2 dt,
    Gauss-Legendre on geometric panels in t = 1/u down to t = 0. Its error is ~1/(2 pi (LOBES pi)^3)
    per axis for a smooth spectrum (common practice; 3e-6 for LOBES = 12, 1.3e-6 for 16). The
    averaging needs P to vary slowly against sin^2 u: for the full (oscillating) form the explicit
    lobes go on to k = K_OSC (1/Mpc), past the baryon oscillations (Silk-damped by k ~ 0.3/Mpc), and
    below K_OSC no panel is wider than DK_OSC in k (the oscillation period is ~2 pi / 150 Mpc, i.e.
    ~0.4 in u on a 20 Mpc axis, finer than a sinc^2 lobe); without this the two rules differed by 1e-4.
P(k) at the nodes from a cubic spline of ln T in ln k on a grid of step 1e-3 built from the scalar
transfer functions of power.py; the spline is checked against them (asserted below).
Every value is computed with two rules (the second finer in every respect) and their relative
difference is asserted below 1e-5; the finer value is written. A white-noise spectrum P = P0 checks
the base rule against the closed form sigma^2 = P0 / V (asserted to 1e-5).

Run:  /usr/bin/python3 test/reference/generate/box_sigma.py > test/reference/box_sigma.json
"""
import datetime
import json
import math
import os
import sys

import numpy as np
import scipy
from scipy import interpolate

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import power as P  # noqa: E402  (Eisenstein & Hu transfer functions, growth, sigma_R normalisation)

PLANCK = P.COSMOLOGIES[0]

# Boxes compared in test/uncertainty/window.test.ts: (name, sides in Mpc, z, transfer form).
BOXES = [
    ("cube", [100.0, 100.0, 100.0], 1.0, "no_wiggle"),
    ("pencil", [5.0, 5.0, 1000.0], 1.0, "no_wiggle"),
    ("slab", [500.0, 500.0, 10.0], 1.0, "no_wiggle"),
    ("elongated_full", [20.0, 30.0, 400.0], 0.5, "full"),
]

RULES = {
    "base": {"k_osc": 0.5, "dk_osc": 0.02, "lobes": 12, "points": 6, "grade": 20, "grade_points": 4, "tail_panels": 12, "tail_points": 5},
    "fine": {"k_osc": 0.8, "dk_osc": 0.01, "lobes": 16, "points": 8, "grade": 24, "grade_points": 6, "tail_panels": 16, "tail_points": 6},
}


def gl_panel(a, b, n):
    x, w = np.polynomial.legendre.leggauss(n)
    return 0.5 * (a + b) + 0.5 * (b - a) * x, 0.5 * (b - a) * w


def sinc2(u):
    return (np.sin(u) / u) ** 2


def axis_rule(r, length, form):
    """Nodes u and weights (sinc^2 included) for ∫_0^∞ sinc^2(u) f(u) du on an axis of length Mpc."""
    lobes = r["lobes"]
    if form == "full":
        lobes = max(lobes, math.ceil(r["k_osc"] * length / (2.0 * math.pi)))
    us, ws = [], []
    u_osc = r["k_osc"] * length / 2.0 if form == "full" else 0.0
    du_osc = r["dk_osc"] * length / 2.0

    def add(a, b, n):
        # full form: panels no wider than dk_osc in k below k_osc (the oscillations in P along this axis)
        m = math.ceil((b - a) / du_osc) if a < u_osc else 1
        for i in range(m):
            x, w = gl_panel(a + (b - a) * i / m, a + (b - a) * (i + 1) / m, n)
            us.append(x)
            ws.append(w * sinc2(x))

    edges = [0.0] + [math.pi * 2.0 ** -j for j in range(r["grade"], -1, -1)]
    for a, b in zip(edges[:-1], edges[1:]):
        add(a, b, r["grade_points"])
    for j in range(1, lobes):
        for a, b in ((j * math.pi, (j + 0.5) * math.pi), ((j + 0.5) * math.pi, (j + 1) * math.pi)):
            add(a, b, r["points"])
    t_hi = 1.0 / (lobes * math.pi)
    for i in range(r["tail_panels"]):
        t_lo = 0.0 if i == r["tail_panels"] - 1 else t_hi / 4.0
        t, w = gl_panel(t_lo, t_hi, r["tail_points"])
        us.append(1.0 / t)
        ws.append(0.5 * w)
        t_hi = t_lo
    return np.concatenate(us), np.concatenate(ws)


def box_sigma2_z0(power_z0, sides, r, form):
    """8 / (pi^3 V) Σ_abc w_a w_b w_c P(k_abc): the direct triple sum over the tensor product."""
    rules = [axis_rule(r, l, form) for l in sides]
    q = [(2.0 * u / l) ** 2 for (u, _), l in zip(rules, sides)]
    q23 = q[1][:, None] + q[2][None, :]
    w23 = rules[1][1][:, None] * rules[2][1][None, :]
    total = 0.0
    for a in range(len(q[0])):
        total += rules[0][1][a] * np.sum(w23 * power_z0(np.sqrt(q[0][a] + q23)))
    return 8.0 / (math.pi ** 3 * sides[0] * sides[1] * sides[2]) * total


def k_range(sides, r, form):
    k2 = [(2.0 * axis_rule(r, l, form)[0] / l) ** 2 for l in sides]
    return math.sqrt(sum(x.min() for x in k2)), math.sqrt(sum(x.max() for x in k2))


def spline_power(c, form, k_lo, k_hi):
    """P(k, z = 0) = A k^n_s T(k)^2 with A from sigma_8 (power.py), T by a spline of ln T in ln k."""
    tf = P.t_no_wiggle if form == "no_wiggle" else P.t_full
    h = c["h0"] / 100.0
    norm = c["sigma8"] ** 2 / P.sigma2_unnorm(c, tf, 8.0 / h)
    step = 1e-3
    lnk = np.arange(math.log(k_lo) - 4 * step, math.log(k_hi) + 5 * step, step)
    t = np.array([tf(math.exp(x), c) for x in lnk])
    assert np.all(t > 0), "transfer function must stay positive for a spline in ln T"
    spl = interpolate.CubicSpline(lnk, np.log(t))
    rng = np.random.default_rng(20240601)
    probe = rng.uniform(lnk[2], lnk[-3], 3000)
    exact = np.array([tf(math.exp(x), c) for x in probe])
    spline_err = float(np.max(np.abs(np.exp(spl(probe)) / exact - 1)))
    assert spline_err < 1e-8, spline_err
    ns = c["n_s"]

    def p0(k):
        lk = np.log(k)
        return norm * np.exp(ns * lk + 2.0 * spl(lk))

    return p0, spline_err


def main():
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/box_sigma.py > test/reference/box_sigma.json",
            "libraries": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__},
            "date": datetime.date.today().isoformat(),
            "method": "sigma^2 = 8/(pi^3 V) ∫ d^3u P(|k|) Π sinc^2(u_i), k_i = 2 u_i / L_i, by a direct triple sum "
                      "over a tensor product of 1-D Gauss-Legendre rules (graded first lobe, two panels per further "
                      "lobe, averaged tail in t = 1/u); P from power.py (Eisenstein & Hu 1998, sigma_8 normalised) "
                      "through a cubic spline of ln T in ln k (step 1e-3); two rules, the finer value written",
            "rules": RULES,
            "units": "sides in comoving Mpc; sigma dimensionless",
        },
        "cosmology": PLANCK,
        "white_noise": [],
        "boxes": [],
    }
    for sides in ([100.0, 100.0, 100.0], [5.0, 5.0, 1000.0], [700.0, 300.0, 8.0]):
        p0 = 2500.0
        s2 = box_sigma2_z0(lambda k: np.full_like(k, p0), sides, RULES["base"], "no_wiggle")
        exact = p0 / (sides[0] * sides[1] * sides[2])
        err = abs(s2 / exact - 1)
        assert err < 1e-5, (sides, err)
        out["white_noise"].append({"sides_mpc": sides, "p0_mpc3": p0, "rel_err_sigma2": err})
    for name, sides, z, form in BOXES:
        lo = min(k_range(sides, r, form)[0] for r in RULES.values())
        hi = max(k_range(sides, r, form)[1] for r in RULES.values())
        p0, spline_err = spline_power(PLANCK, form, lo, hi)
        d = P.growth(PLANCK, z)
        sig = {key: math.sqrt(box_sigma2_z0(p0, sides, r, form)) * d for key, r in RULES.items()}
        diff = abs(sig["base"] / sig["fine"] - 1)
        assert diff < 1e-5, (name, sig, diff)
        out["boxes"].append({"name": name, "sides_mpc": sides, "z": z, "form": form, "growth": d,
                             "sigma": sig["fine"], "rel_diff_base_fine": diff, "spline_max_rel_err": spline_err})
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
