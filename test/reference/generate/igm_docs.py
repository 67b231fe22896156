#!/usr/bin/python3
"""Madau 1995 intergalactic transmission and a dropout count, from docs/survey-file.md's text only.

Written from the page's sections "Intergalactic attenuation (igm)" (T_IGM with its line table and
photoelectric term, the 1e-30 floor, the photon-weighted band average over a band_file), "magnitude"
(K(z) with -2.5 log10 T_IGM), "Spectra, bands and magnitude systems" (K(z) by synthetic photometry
of a spectrum file through a band {center, fwhm, profile}, T_IGM inside the band integral), "Cosmology" (flat, t_cmb 0: no radiation), the logistic completeness
table, redshift_selection (S(z) multiplies the counts; a table is linear in z between rows, end
values held outside) and "Parameters that vary with redshift"; no line of skytally's code was read
for it. Float arithmetic (numpy), integrals by scipy.integrate.quad:
- points: T_IGM(lambda, z) at wavelengths on both sides of every jump (1e-12 relative);
- band_averages: <T_IGM>(z) over two tabulated bands (one trapezoid falling to 0 at its ends, one
  ragged, not 0 at its ends), quad split at the rows and the redshifted lines (epsrel 1e-12);
- dropout: the slices of an invented dropout field whose band (6500 Angstrom) meets Lyman alpha at
  z = 6500/1216 - 1 = 4.345 inside its window, with a logistic completeness and a colour-selection
  table: N = area_sr int dV/dz/dOmega S(z) int_{u_lim}^inf phi* u^alpha e^-u c(m) du dz, with
  m = M* + K(z) - 2.5 log10 u, u_lim where m = limit; quad over ln u inside (epsrel 1e-12) and over
  z outside (epsrel 1e-11), split at the slice edges, the table's rows and the transmission's jump.
- sed: the slices of a dropout field counted through a rest-frame spectrum (sed, from
  "Spectra, bands and magnitude systems": K(z) by synthetic photometry through a top-hat band,
  T_IGM(lambda, z) inside the band integral) whose band meets Lyman alpha and beta inside its window:
  the same count with that K(z), quad over the band split at the spectrum's rows and the redshifted
  lines (epsrel 1e-13), over z split at the slice edges and where a line or a row reaches an end of
  the band (epsrel 1e-11).
- mixed: the slices of a power-law population beside a population with its own spectrum (sed), the
  band a top-hat {center, fwhm} (from "magnitude", each population's own beta or sed): the power law's
  K(z) at the band's center with T_IGM averaged over the top-hat as band_averages above does.
- mean_transmission: 1 - D_A, the mean of T_IGM over rest 1050-1170 Angstrom at z_em = 3 and 4
  (Oke & Korycansky 1982's D_A, as Madau 1995 uses it), by quad.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/igm_docs.py > test/reference/igm_docs.json
Any Python 3 with numpy and scipy (and PyYAML) runs it.
"""
import datetime
import json
import math
import sys

import numpy as np
import scipy
import yaml
from scipy import integrate

LINES = [(1216.0, 3.6e-3), (1026.0, 1.7e-3), (973.0, 1.2e-3), (950.0, 9.3e-4)]
LIMIT = 912.0


def tau_lines(lam, z):
    return sum(a * (lam / lj) ** 3.46 for lj, a in LINES if lj < lam < lj * (1 + z))


def tau_pe(lam, z):
    if not (LIMIT < lam < LIMIT * (1 + z)):
        return 0.0
    xc = lam / LIMIT
    xem = 1 + z
    t = (0.25 * xc**3 * (xem**0.46 - xc**0.46) + 9.4 * xc**1.5 * (xem**0.18 - xc**0.18)
         - 0.7 * xc**3 * (xc**-1.32 - xem**-1.32) - 0.023 * (xem**1.68 - xc**1.68))
    return max(0.0, t)


def transmission(lam, z):
    return max(1e-30, math.exp(-(tau_lines(lam, z) + tau_pe(lam, z))))


def band_average(rows, z, beta):
    ws = [r[0] for r in rows]
    ts = [r[1] for r in rows]
    s = lambda l: float(np.interp(l, ws, ts))
    jumps = [lj * (1 + z) for lj, _ in LINES] + [LIMIT * (1 + z)]
    cuts = sorted(set(ws + [j for j in jumps if ws[0] < j < ws[-1]]))
    num = den = 0.0
    for a, b in zip(cuts[:-1], cuts[1:]):
        w = lambda l: s(l) * l ** (beta + 1)
        num += integrate.quad(lambda l: transmission(l, z) * w(l), a, b, epsabs=0, epsrel=1e-12, limit=200)[0]
        den += integrate.quad(w, a, b, epsabs=0, epsrel=1e-12, limit=200)[0]
    return max(1e-30, num / den)


POINTS = []
for z in [3.0, 4.0, 5.5, 7.0]:
    for lj in [lj for lj, _ in LINES] + [LIMIT]:
        for side in [0.999, 1.001]:
            POINTS.append((lj * (1 + z) * side, z))
    for rest in [1400, 1100, 1000, 960, 930, 900, 700, 500]:
        POINTS.append((rest * (1 + z), z))
POINTS += [(6500.0, 4.3), (6500.0, 4.4), (6500.0, 6.0), (3000.0, 6.0)]

BANDS = {
    "trapezoid": [[5600, 0], [5800, 0.9], [6600, 1.0], [6800, 0]],
    "ragged": [[5000, 0.2], [5300, 0.7], [6100, 0.5], [6400, 0.9], [7000, 0.1]],
}

# The survey the count reads (the test loads this text): docs/survey-file.md's keys only.
DROPOUT = """title: Invented dropout field whose band meets Lyman alpha inside the window
cosmology: {h0: 70, omega_m: 0.3}
area: "300 arcmin^2"
redshift: {min: 3.3, max: 4.7}
detection:
  kind: magnitude
  limit: 26.8
  band: "6500 Angstrom"
  beta: -2.3
  igm: madau1995
  completeness: {model: logistic, half: 26.5, width: 0.15}
  redshift_selection: {table: [[3.3, 0.05], [3.5, 0.35], [3.7, 0.7], [4.0, 0.8], [4.3, 0.65], [4.5, 0.3], [4.7, 0.05]]}
population:
  name: UV-selected galaxies
  variable: magnitude
  rest_wavelength: 1600
  phi_star: 1.3e-3
  m_star: "-20.95 + 0.1*(z - 4)"
  alpha: -1.7
slices: {width: 0.2}
"""

C_KMS = 299792.458


def magnitude_density(k, m_star, lim, half, width, phi, alpha):
    """Sources per Mpc^3 at z above an apparent limit with a logistic completeness: the Schechter
    function in t = ln(L / L*) (M = M* - 2.5 t / ln 10; m = M + K(z)), integrated from the limit to
    L = 60 L*, beyond which exp(-L / L*) leaves under 1e-26 of it."""

    def density(z):
        kz = k(z)
        ms = m_star(z)
        t_lim = math.log(10 ** (0.4 * (ms + kz - lim)))
        c = lambda t: 1 / (1 + math.exp((ms + kz - 2.5 * t / math.log(10) - half) / width))
        g = lambda t: phi * math.exp((alpha + 1) * t - math.exp(t)) * c(t)
        if t_lim >= math.log(60.0):
            return 0.0
        return integrate.quad(g, t_lim, math.log(60.0), epsabs=0, epsrel=1e-12, limit=200)[0]

    return density


def flat_distances(doc):
    """E(z), the Hubble distance c / H0 and the comoving distance of a survey file's flat cosmology (no radiation)."""
    h0, om = doc["cosmology"]["h0"], doc["cosmology"]["omega_m"]
    e = lambda z: math.sqrt(om * (1 + z) ** 3 + 1 - om)
    dh = C_KMS / h0
    dc = lambda z: dh * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]
    return e, dh, dc


def slice_counts(integrand, lo, hi, step, inner):
    """The integral of dN/dz over slices `step` wide from lo to hi, each cut at the points of `inner` inside it."""
    edges = [round(lo + step * i, 10) for i in range(int(round((hi - lo) / step)) + 1)]
    out = []
    for a, b in zip(edges[:-1], edges[1:]):
        cuts = sorted({a, b} | {x for x in inner if a < x < b})
        n = sum(integrate.quad(integrand, p, q, epsabs=0, epsrel=1e-11, limit=200)[0] for p, q in zip(cuts[:-1], cuts[1:]))
        out.append({"z_min": a, "z_max": b, "count": n})
    return out


def dropout_slices():
    doc = yaml.safe_load(DROPOUT)
    e, dh, dc = flat_distances(doc)
    area_sr = 300 / 3600 * (math.pi / 180) ** 2
    det = doc["detection"]
    lim, band, beta = det["limit"], 6500.0, det["beta"]
    half, width = det["completeness"]["half"], det["completeness"]["width"]
    sel = det["redshift_selection"]["table"]
    pop = doc["population"]
    phi, alpha, rest = pop["phi_star"], pop["alpha"], pop["rest_wavelength"]
    m_star = lambda z: -20.95 + 0.1 * (z - 4)

    def k(z):
        dl_pc = (1 + z) * dc(z) * 1e6
        return (5 * math.log10(dl_pc / 10) - 2.5 * math.log10(1 + z)
                - 2.5 * (beta + 2) * math.log10(band / ((1 + z) * rest))
                - 2.5 * math.log10(transmission(band, z)))

    density = magnitude_density(k, m_star, lim, half, width, phi, alpha)

    def integrand(z):
        s = float(np.interp(z, [r[0] for r in sel], [r[1] for r in sel]))
        return area_sr * dh * dc(z) ** 2 / e(z) * s * density(z)

    lo, hi, step = 3.3, 4.7, 0.2
    inner = [r[0] for r in sel] + [band / lj - 1 for lj, _ in LINES] + [band / LIMIT - 1]
    return slice_counts(integrand, lo, hi, step, inner)


# A magnitude survey whose k-correction is synthetic photometry of a spectrum (docs/survey-file.md,
# "Spectra, bands and magnitude systems": sed, a top-hat band {center, fwhm}, M* monochromatic AB at
# rest_wavelength) with igm: madau1995, T_IGM(lambda, z) multiplying the redshifted spectrum inside the
# band integral. Lyman alpha (1216 (1 + z)) enters the band 6400-6600 Angstrom at z = 4.263 and
# covers it from z = 4.428; Lyman beta enters at z = 5.238: the band integral has a kink at each, inside
# a slice (a band this narrow makes them sharp: a count that does not cut its quadrature there is
# 1e-6 to 5e-6 off in those slices). The spectrum file is an input (test/reference/igm-docs/).
SED_FILE = "test/reference/igm-docs/lyman-sed.csv"
SED_SURVEY = """title: Invented dropout field counted through a spectrum, its band meeting Lyman alpha and beta
cosmology: {h0: 70, omega_m: 0.3}
area: "300 arcmin^2"
redshift: {min: 3.8, max: 5.4}
detection:
  kind: magnitude
  limit: 27.0
  band: {center: "6500 Angstrom", fwhm: "200 Angstrom", profile: tophat}
  sed: {file: lyman-sed.csv}
  igm: madau1995
  completeness: {model: logistic, half: 26.6, width: 0.2}
population:
  name: UV-selected galaxies
  variable: magnitude
  rest_wavelength: 1600
  phi_star: 1.3e-3
  m_star: "-20.95 + 0.1*(z - 4)"
  alpha: -1.7
slices: {width: 0.2}
"""


def read_spectrum(path):
    rows = []
    header = False
    for line in open(path):
        line = line.strip()
        if not line or line.startswith("#"):
            continue
        if not header:
            header = True
            assert line == "wavelength_angstrom,f_lambda", line
            continue
        w, f = line.split(",")
        rows.append((float(w), float(f)))
    return [r[0] for r in rows], [r[1] for r in rows]


def sed_slices():
    doc = yaml.safe_load(SED_SURVEY)
    e, dh, dc = flat_distances(doc)
    area_sr = 300 / 3600 * (math.pi / 180) ** 2
    det = doc["detection"]
    lim = det["limit"]
    center, fwhm = 6500.0, 200.0
    b0, b1 = center - fwhm / 2, center + fwhm / 2
    half, width = det["completeness"]["half"], det["completeness"]["width"]
    pop = doc["population"]
    phi, alpha, rest = pop["phi_star"], pop["alpha"], pop["rest_wavelength"]
    m_star = lambda z: -20.95 + 0.1 * (z - 4)
    ws, fs = read_spectrum(SED_FILE)
    f = lambda l: float(np.interp(l, ws, fs))
    jumps = [lj for lj, _ in LINES] + [LIMIT]
    # the rest-frame side: int l f Q dl / int Q / l dl = lambda_rest^2 f(lambda_rest); int R / l dl = ln(b1 / b0)
    rest_term = rest**2 * f(rest) * math.log(b1 / b0)

    def k(z):
        # K(z) = -2.5 log10[int l f(l / (1+z)) T_IGM(l, z) R(l) dl / ((1+z) lambda_rest^2 f(lambda_rest) int R / l dl)],
        # R = 1 on the band; quad split where a spectrum row or a Lyman line (or 912) falls, redshifted
        inner = [w * (1 + z) for w in ws] + [lj * (1 + z) for lj in jumps]
        cuts = sorted({b0, b1} | {x for x in inner if b0 < x < b1})
        g = lambda l: l * f(l / (1 + z)) * transmission(l, z)
        num = sum(integrate.quad(g, a, b, epsabs=0, epsrel=1e-13, limit=200)[0] for a, b in zip(cuts[:-1], cuts[1:]))
        dl_pc = (1 + z) * dc(z) * 1e6
        return 5 * math.log10(dl_pc / 10) - 2.5 * math.log10(num / ((1 + z) * rest_term))

    density = magnitude_density(k, m_star, lim, half, width, phi, alpha)

    def integrand(z):
        return area_sr * dh * dc(z) ** 2 / e(z) * density(z)

    lo, hi, step = 3.8, 5.4, 0.2
    # where a Lyman line (or 912) or a spectrum row, redshifted, reaches an end of the band
    inner = [b / lj - 1 for lj in jumps + ws for b in (b0, b1)]
    return slice_counts(integrand, lo, hi, step, inner)


# "magnitude" (each population's own beta or sed) with "Intergalactic attenuation (igm)": a band given
# as a shape {center, fwhm, profile: tophat} because one population gives its own spectrum (sed); the
# other population keeps the power law (detection.beta) at the band's center and sees T_IGM averaged
# over the band, photon-weighted by lambda^(beta + 1), as a band_file holding the same top-hat
# would give. Lyman alpha enters the band 6200-6800 Angstrom at z = 4.099 and covers it from 4.592.
MIXED_SURVEY = """title: Invented dropout field, a power-law population beside one with its own spectrum, a top-hat band
cosmology: {h0: 70, omega_m: 0.3}
area: "300 arcmin^2"
redshift: {min: 3.8, max: 5.2}
detection:
  kind: magnitude
  limit: 27.0
  band: {center: "6500 Angstrom", fwhm: "600 Angstrom", profile: tophat}
  beta: -2.3
  igm: madau1995
  completeness: {model: logistic, half: 26.6, width: 0.2}
populations:
  - name: power law
    variable: magnitude
    rest_wavelength: 1600
    phi_star: 1.3e-3
    m_star: "-20.95 + 0.1*(z - 4)"
    alpha: -1.7
  - name: own spectrum
    variable: magnitude
    rest_wavelength: 1600
    sed: {file: lyman-sed.csv}
    phi_star: 1.0e-3
    m_star: -20.5
    alpha: -1.5
slices: {width: 0.2}
"""


def mixed_power_law_slices():
    """The slices of MIXED_SURVEY's first population (the power law)."""
    doc = yaml.safe_load(MIXED_SURVEY)
    e, dh, dc = flat_distances(doc)
    area_sr = 300 / 3600 * (math.pi / 180) ** 2
    det = doc["detection"]
    lim, beta = det["limit"], det["beta"]
    center, fwhm = 6500.0, 600.0
    b0, b1 = center - fwhm / 2, center + fwhm / 2
    half, width = det["completeness"]["half"], det["completeness"]["width"]
    pop = doc["populations"][0]
    phi, alpha, rest = pop["phi_star"], pop["alpha"], pop["rest_wavelength"]
    m_star = lambda z: -20.95 + 0.1 * (z - 4)
    tophat = [[b0, 1.0], [b1, 1.0]]

    def k(z):
        dl_pc = (1 + z) * dc(z) * 1e6
        return (5 * math.log10(dl_pc / 10) - 2.5 * math.log10(1 + z)
                - 2.5 * (beta + 2) * math.log10(center / ((1 + z) * rest))
                - 2.5 * math.log10(band_average(tophat, z, beta)))

    density = magnitude_density(k, m_star, lim, half, width, phi, alpha)

    def integrand(z):
        return area_sr * dh * dc(z) ** 2 / e(z) * density(z)

    lo, hi, step = 3.8, 5.2, 0.2
    # where a Lyman line (or 912), redshifted, reaches an end of the band
    inner = [b / lj - 1 for lj in [lj for lj, _ in LINES] + [LIMIT] for b in (b0, b1)]
    return slice_counts(integrand, lo, hi, step, inner)


def mean_transmission(z):
    f = lambda r: transmission(r * (1 + z), z)
    return integrate.quad(f, 1050, 1170, epsabs=0, epsrel=1e-12, limit=200)[0] / 120


out = {
    "header": {
        "command": "/usr/bin/python3 test/reference/generate/igm_docs.py > test/reference/igm_docs.json",
        "libraries": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__},
        "date": datetime.date.today().isoformat(),
        "what": "Madau 1995 T_IGM, band averages, a dropout count (a power law, and a spectrum through a band) and 1 - D_A, from docs/survey-file.md's text only",
    },
    "points": [{"lambda_obs": l, "z": z, "transmission": transmission(l, z)} for l, z in POINTS],
    "band_averages": [
        {"band": name, "rows": rows, "z": z, "beta": beta, "transmission": band_average(rows, z, beta)}
        for name, rows in BANDS.items() for z in [3.6, 4.2, 4.8, 5.4, 6.2] for beta in [-2.5, -1.0]
    ],
    "dropout": {"survey": DROPOUT, "slices": dropout_slices()},
    "sed": {"survey": SED_SURVEY, "spectrum": SED_FILE, "slices": sed_slices()},
    "mixed": {"survey": MIXED_SURVEY, "spectrum": SED_FILE, "population": "power law", "slices": mixed_power_law_slices()},
    "mean_transmission": [{"z": z, "one_minus_d_a": mean_transmission(z)} for z in [3.0, 4.0]],
}
json.dump(out, sys.stdout, indent=1)
sys.stdout.write("\n")
