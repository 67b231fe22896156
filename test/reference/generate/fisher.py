#!/usr/bin/python3
"""Independent Fisher matrices of the unbinned extended Poisson likelihood for invented surveys.

F_jk = integral dz integral dx lambda(z, x) (d ln lambda / d theta_j)(d ln lambda / d theta_k),
lambda = area_sr dV_C/dz/dOmega(z) phi(x; z, theta) c(x, z) above the limit, with
theta = (log10 phi*, log10 L* or M*, alpha) as constant offsets at every z.

- Distances and volumes: astropy.cosmology.FlatLambdaCDM(H0, Om0, Tcmb0=0).
- phi(x) in the observed population variable, written from docs/survey-file.md's standard forms:
  per dex of L: ln10 phi* (L/L*)^(alpha+1) exp(-L/L*); per magnitude:
  0.4 ln10 phi* 10^(0.4 (alpha+1) (M*-M)) exp(-10^(0.4 (M*-M))).
- d ln lambda / d theta by central finite differences (step 1e-5; no analytic derivative is used).
- Integrals: scipy.integrate.quad_vec over x (from the limit to 45 e-folds above the knee) and over z
  (epsrel 1e-10).
- Cosmic variance: the augmented matrix [[F, b_i], [b_i^T, N_i + 1/sigma_i^2]] inverted with numpy.linalg.inv;
  with a correlation R_ij of the slices' nuisances (invented numbers of the size the box covariance gives
  thin slices), the nuisance block is diag(N_i) + S^-1, S_ij = sigma_i sigma_j R_ij (numpy.linalg.inv).
Shares no code with skytally. The surveys are invented; their definitions are written into the
output so that the test builds the same surveys.

Run: /usr/bin/python3 test/reference/generate/fisher.py > test/reference/fisher.json
"""
import datetime, json, math, sys
import numpy as np, scipy, astropy
from scipy import integrate
from astropy.cosmology import FlatLambdaCDM
import astropy.units as units

LN10 = math.log(10.0)
MPC_CM = (1 * units.Mpc).to(units.cm).value
DEG2_SR = (math.pi / 180.0) ** 2
H = 1e-5

SURVEYS = [
    {
        "name": "line_flux_hard_limit",
        "kind": "line_flux", "area_deg2": 1.5, "cosmology": {"h0": 70, "omega_m": 0.3},
        "edges": [0.7, 0.9, 1.1, 1.3, 1.5],
        "detection": {"limit_cgs": 3e-17, "line_angstrom": 6563.0},
        "population": {"variable": "luminosity", "log10_phi_star": -2.7, "log10_l_star": 42.4, "alpha": [-1.5, 0.0]},
        "cosmic_variance": [0.12, 0.1, 0.09, 0.08],
        "cosmic_variance_correlation": [[1.0, 0.37, 0.08, -0.002], [0.37, 1.0, 0.38, 0.085],
                                        [0.08, 0.38, 1.0, 0.39], [-0.002, 0.085, 0.39, 1.0]],
    },
    {
        "name": "line_flux_logistic_completeness",
        "kind": "line_flux", "area_deg2": 0.8, "cosmology": {"h0": 70, "omega_m": 0.3},
        "edges": [0.4, 0.6, 0.8],
        "detection": {"limit_cgs": 2e-17, "line_angstrom": 6563.0,
                      "completeness": {"model": "logistic", "half_cgs": 3e-17, "width": 0.1}},
        "population": {"variable": "luminosity", "log10_phi_star": -2.5, "log10_l_star": 41.9, "alpha": [-1.3, -0.1]},
    },
    {
        "name": "magnitude_evolving_alpha",
        "kind": "magnitude", "area_deg2": 0.05, "cosmology": {"h0": 70, "omega_m": 0.3},
        "edges": [5.5, 6.0, 6.5, 7.0],
        "detection": {"limit_mag": 28.5, "band_angstrom": 12500.0, "beta": -2.2,
                      "completeness": {"model": "logistic", "half": 28.2, "width": 0.15}},
        "population": {"variable": "magnitude", "log10_phi_star": -3.3, "m_star": -20.8, "alpha": [-1.3, -0.1],
                       "rest_wavelength_angstrom": 1500.0},
        "cosmic_variance": [0.3, 0.28, 0.35],
        "cosmic_variance_correlation": [[1.0, 0.05, -0.001], [0.05, 1.0, 0.06], [-0.001, 0.06, 1.0]],
    },
    {
        "name": "threshold_mass",
        "kind": "threshold", "area_deg2": 2.0, "cosmology": {"h0": 70, "omega_m": 0.3},
        "edges": [0.3, 0.5, 0.7, 0.9, 1.1],
        "detection": {"limit": 9.8},
        "population": {"variable": "luminosity", "log10_phi_star": -2.9, "log10_l_star": 10.9, "alpha": [-1.25, 0.0]},
    },
]


def make(s):
    cosmo = FlatLambdaCDM(H0=s["cosmology"]["h0"], Om0=s["cosmology"]["omega_m"], Tcmb0=0)
    pop = s["population"]
    det = s["detection"]
    area_sr = s["area_deg2"] * DEG2_SR
    kind = s["kind"]

    def alpha_at(z, d):
        return pop["alpha"][0] + pop["alpha"][1] * z + d

    def x_limit(z):
        """The limit in the population variable: log10 L or M."""
        if kind == "line_flux":
            dl = cosmo.luminosity_distance(z).to(units.Mpc).value * MPC_CM
            return math.log10(det["limit_cgs"] * 4 * math.pi * dl * dl)
        if kind == "magnitude":
            return det["limit_mag"] - kcorr(z)
        return det["limit"]

    def kcorr(z):
        dl = cosmo.luminosity_distance(z).to(units.Mpc).value
        return (5 * math.log10(dl / 1e-5) - 2.5 * math.log10(1 + z)
                - 2.5 * (det["beta"] + 2) * math.log10(det["band_angstrom"] / ((1 + z) * pop["rest_wavelength_angstrom"])))

    def completeness(z, x):
        c = det.get("completeness")
        if c is None:
            return 1.0
        if kind == "line_flux":
            dl = cosmo.luminosity_distance(z).to(units.Mpc).value * MPC_CM
            flux = 10 ** x / (4 * math.pi * dl * dl)
            arg = (-math.log10(flux) + math.log10(c["half_cgs"])) / c["width"]
        else:
            arg = (x + kcorr(z) - c["half"]) / c["width"]
        return 0.0 if arg > 700 else 1.0 / (1.0 + math.exp(arg))

    def ln_phi(z, x, th):
        phi = 10 ** (pop["log10_phi_star"] + th[0])
        a = alpha_at(z, th[2])
        if pop["variable"] == "luminosity":
            uu = 10 ** (x - (pop["log10_l_star"] + th[1]))
            return math.log(LN10 * phi) + (a + 1) * math.log(uu) - uu
        m_star = pop["m_star"] + th[1]
        uu = 10 ** (0.4 * (m_star - x))
        return math.log(0.4 * LN10 * phi) + (a + 1) * math.log(uu) - uu

    def x_bright(z):
        """45 e-folds beyond the knee (or beyond the limit when the limit is brighter)."""
        xl = x_limit(z)
        if pop["variable"] == "luminosity":
            xs = pop["log10_l_star"]
            return max(xs, xl) + math.log10(45.0) + 0.5
        xs = pop["m_star"]
        return min(xs, xl) - 2.5 * math.log10(45.0) - 1.0

    def inner(z):
        """[N, b(3), F upper triangle (6)] per unit z."""
        xl, xb = x_limit(z), x_bright(z)
        lo, hi = (xl, xb) if xb > xl else (xb, xl)

        def f(x):
            c = completeness(z, x)
            lp = ln_phi(z, x, (0.0, 0.0, 0.0))
            lam = math.exp(lp) * c
            d = []
            for j in range(3):
                tp = [0.0, 0.0, 0.0]; tm = [0.0, 0.0, 0.0]
                tp[j] = H; tm[j] = -H
                d.append((ln_phi(z, x, tp) - ln_phi(z, x, tm)) / (2 * H))
            out = [lam] + [lam * d[j] for j in range(3)]
            for j in range(3):
                for k in range(j, 3):
                    out.append(lam * d[j] * d[k])
            return np.array(out)

        val, _ = integrate.quad_vec(f, lo, hi, epsrel=1e-11, epsabs=0)
        dvdz = cosmo.differential_comoving_volume(z).to(units.Mpc ** 3 / units.sr).value
        return area_sr * dvdz * val

    slices = []
    for z1, z2 in zip(s["edges"][:-1], s["edges"][1:]):
        v, _ = integrate.quad_vec(inner, z1, z2, epsrel=1e-10, epsabs=0)
        n = v[0]; b = list(v[1:4])
        F = np.zeros((3, 3)); idx = 4
        for j in range(3):
            for k in range(j, 3):
                F[j, k] = F[k, j] = v[idx]; idx += 1
        slices.append({"count": n, "b": b, "fisher": F.tolist()})
    Ftot = sum(np.array(sl["fisher"]) for sl in slices)
    out = {"fisher_poisson_only": Ftot.tolist(), "slices": slices,
           "sigma_poisson_only": np.sqrt(np.diag(np.linalg.inv(Ftot))).tolist()}
    cv = s.get("cosmic_variance")
    if cv:
        n = len(slices)
        A = np.zeros((3 + n, 3 + n))
        A[:3, :3] = Ftot
        for i, sl in enumerate(slices):
            A[:3, 3 + i] = sl["b"]; A[3 + i, :3] = sl["b"]
            A[3 + i, 3 + i] = sl["count"] + 1.0 / cv[i] ** 2
        cov = np.linalg.inv(A)[:3, :3]
        out["covariance_with_cosmic_variance"] = cov.tolist()
        out["sigma_with_cosmic_variance"] = np.sqrt(np.diag(cov)).tolist()
        r = s.get("cosmic_variance_correlation")
        if r:
            S = np.outer(cv, cv) * np.array(r)
            A[3:, 3:] = np.diag([sl["count"] for sl in slices]) + np.linalg.inv(S)
            cov = np.linalg.inv(A)[:3, :3]
            out["covariance_with_correlated_cosmic_variance"] = cov.tolist()
            out["sigma_with_correlated_cosmic_variance"] = np.sqrt(np.diag(cov)).tolist()
    return out


def main():
    results = []
    for s in SURVEYS:
        results.append({"survey": s, **make(s)})
    doc = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/fisher.py > test/reference/fisher.json",
            "versions": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
                         "astropy": astropy.__version__},
            "date": datetime.date.today().isoformat(),
            "parameters": ["log10_phi_star", "log10_l_star or m_star", "alpha"],
            "note": "Invented surveys. alpha = alpha[0] + alpha[1] z. Derivatives by central differences (1e-5).",
        },
        "cases": results,
    }
    json.dump(doc, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
