#!/usr/bin/env python3
"""Comoving distances at very small redshifts (test/cosmology/small-redshift.test.ts): D_C = D_H
int_0^z dz' / E(z') (Hogg 1999, arXiv:astro-ph/9905116, eqs. 14-15; flat, E^2 = Om (1 + z)^3 + Or
(1 + z)^4 + OL) by mpmath's quadrature at 40 digits, for h0 = 70, Om = 0.3 without radiation, and
with Or = 1e-4 (a value chosen for the test, so that the radiation term is checked too; OL = 1 - Om
- Or). Also the lookback time in units of the Hubble time, t_L / t_H = int_0^z dz' / ((1 + z')
E(z')) (Hogg 1999 eq. 30), by the same quadrature. Shares no code with skytally.
Writes JSON to stdout (mpmath 1.3.0, Python 3.11).

Run: python3 test/reference/generate/small_z_distances.py > test/reference/small_z_distances.json
"""
import json

import mpmath as mp

mp.mp.dps = 40
C_KMS = mp.mpf("299792.458")
ZS = ["1e-14", "1e-12", "1e-9", "1e-7", "1e-6", "9.99e-6"]


def distances(h0, om, orad):
    ol = 1 - om - orad
    dh = C_KMS / h0
    out = []
    for z in ZS:
        zz = mp.mpf(z)
        dc = dh * mp.quad(lambda x: 1 / mp.sqrt(om * (1 + x) ** 3 + orad * (1 + x) ** 4 + ol), [0, zz])
        tl = mp.quad(lambda x: 1 / ((1 + x) * mp.sqrt(om * (1 + x) ** 3 + orad * (1 + x) ** 4 + ol)), [0, zz])
        out.append({"z": float(zz), "comoving_mpc": float(dc), "lookback_over_hubble_time": float(tl)})
    return out


print(
    json.dumps(
        {
            "h0_70_om_0.3": distances(mp.mpf(70), mp.mpf("0.3"), mp.mpf(0)),
            "h0_70_om_0.3_or_1e-4": distances(mp.mpf(70), mp.mpf("0.3"), mp.mpf("1e-4")),
        },
        indent=2,
    )
)
