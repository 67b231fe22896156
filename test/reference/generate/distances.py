#!/usr/bin/python3
"""Reference distances, volumes and times for flat Lambda-CDM cosmologies.

Source 1: astropy.cosmology.FlatLambdaCDM(H0, Om0, Tcmb0, Neff=3.046, m_nu=0) (astropy 5.2.1),
  which uses closed forms without radiation (Tcmb0 = 0: hypergeometric comoving distance, arcsinh
  age) and scipy.integrate.quad with radiation.
Source 2 (independent, higher precision): mpmath.quad of the defining integrals (Hogg 1999,
  astro-ph/9905116, eqs. 14-15 and 30) at 30 digits, with astropy's Omega_gamma + Omega_nu and
  Omega_Lambda, for the comoving distance, lookback time and age.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/distances.py
Writes test/reference/distances.json.
"""
import datetime
import json
import os
import platform
import sys

import astropy
import astropy.units as u
import mpmath
import numpy
import scipy
from astropy.cosmology import FlatLambdaCDM

mpmath.mp.dps = 30

COSMOLOGIES = [
    {"label": "H0=70 Om=0.3 T=0", "h0": 70.0, "omega_m": 0.3, "t_cmb": 0.0},
    {"label": "H0=67.66 Om=0.3111 T=2.7255", "h0": 67.66, "omega_m": 0.3111, "t_cmb": 2.7255},
    {"label": "H0=100 Om=1 T=0 (Einstein-de Sitter)", "h0": 100.0, "omega_m": 1.0, "t_cmb": 0.0},
    {"label": "H0=50 Om=0.05 T=2.7255", "h0": 50.0, "omega_m": 0.05, "t_cmb": 2.7255},
    {"label": "H0=72 Om=0.25 T=0", "h0": 72.0, "omega_m": 0.25, "t_cmb": 0.0},
    {"label": "H0=70 Om=0.3 T=2.7255", "h0": 70.0, "omega_m": 0.3, "t_cmb": 2.7255},
]
Z_VALUES = [0.001, 0.003, 0.01, 0.03, 0.05, 0.1, 0.2, 0.3, 0.5, 0.7, 1.0, 1.5, 2.0, 3.0, 4.0, 5.0,
            6.0, 8.0, 10.0, 12.0, 15.0, 20.0]


def mp_integrals(om, orad, ol, z):
    """Dimensionless D_C/D_H, lookback/t_H and age/t_H by mpmath.quad in a = 1/(1+z)."""
    om, orad, ol = mpmath.mpf(om), mpmath.mpf(orad), mpmath.mpf(ol)
    a = 1 / (1 + mpmath.mpf(z))
    # D_C / D_H = int_a^1 da / (a^2 E(a)) = int_a^1 da / sqrt(Om a + Or + OL a^4)
    dc = mpmath.quad(lambda x: 1 / mpmath.sqrt(om * x + orad + ol * x**4), [a, 1])
    # t / t_H = int da / (a E(a)) = int a da / sqrt(Om a + Or + OL a^4)
    tl = mpmath.quad(lambda x: x / mpmath.sqrt(om * x + orad + ol * x**4), [a, 1])
    age = mpmath.quad(lambda x: x / mpmath.sqrt(om * x + orad + ol * x**4), [0, min(a, mpmath.mpf('1e-3')), a])
    return float(dc), float(tl), float(age)


def main():
    out_cosmologies = []
    for c in COSMOLOGIES:
        cosmo = FlatLambdaCDM(H0=c["h0"], Om0=c["omega_m"], Tcmb0=c["t_cmb"] * u.K, Neff=3.046,
                              m_nu=0 * u.eV)
        orad = float(cosmo.Ogamma0 + cosmo.Onu0)
        dh = float(cosmo.hubble_distance.to(u.Mpc).value)
        th = float(cosmo.hubble_time.to(u.Gyr).value)
        rows = []
        for z in Z_VALUES:
            dc_mp, tl_mp, age_mp = mp_integrals(cosmo.Om0, orad, cosmo.Ode0, z)
            rows.append({
                "z": z,
                "comoving_distance_mpc": float(cosmo.comoving_distance(z).to(u.Mpc).value),
                "luminosity_distance_mpc": float(cosmo.luminosity_distance(z).to(u.Mpc).value),
                "angular_diameter_distance_mpc": float(cosmo.angular_diameter_distance(z).to(u.Mpc).value),
                "distance_modulus": float(cosmo.distmod(z).value),
                "differential_comoving_volume_mpc3_sr": float(
                    cosmo.differential_comoving_volume(z).to(u.Mpc**3 / u.sr).value),
                "comoving_volume_gpc3": float(cosmo.comoving_volume(z).to(u.Gpc**3).value),
                "lookback_time_gyr": float(cosmo.lookback_time(z).to(u.Gyr).value),
                "age_gyr": float(cosmo.age(z).to(u.Gyr).value),
                "mpmath_comoving_distance_mpc": dh * dc_mp,
                "mpmath_lookback_time_gyr": th * tl_mp,
                "mpmath_age_gyr": th * age_mp,
            })
        out_cosmologies.append({
            "label": c["label"],
            "h0": c["h0"],
            "omega_m": c["omega_m"],
            "t_cmb": c["t_cmb"],
            "astropy": {
                "Ogamma0": float(cosmo.Ogamma0),
                "Onu0": float(cosmo.Onu0),
                "Ode0": float(cosmo.Ode0),
                "hubble_distance_mpc": dh,
                "hubble_time_gyr": th,
            },
            "rows": rows,
        })
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/distances.py",
            "source": "astropy.cosmology.FlatLambdaCDM(H0, Om0, Tcmb0, Neff=3.046, m_nu=0); "
                      "mpmath_* columns: mpmath.quad of the defining integrals (Hogg 1999) at 30 digits",
            "libraries": {
                "astropy": astropy.__version__,
                "numpy": numpy.__version__,
                "scipy": scipy.__version__,
                "mpmath": mpmath.__version__,
                "python": platform.python_version(),
            },
            "date": datetime.date.today().isoformat(),
            "units": "Mpc, Mpc^3/sr, Gpc^3 (all-sky), Gyr (1e9 Julian years), mag",
        },
        "cosmologies": out_cosmologies,
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "distances.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {path}", file=sys.stderr)


if __name__ == "__main__":
    main()
