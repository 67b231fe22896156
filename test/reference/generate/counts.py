#!/usr/bin/python3
"""Independent expected counts for invented surveys, from docs/survey-file.md's definitions.

Distances and volumes: astropy.cosmology.FlatLambdaCDM(H0, Om0, Tcmb0, Neff=3.046, m_nu=0).
Hard-limit number densities: mpmath.gammainc (upper incomplete gamma, any real s).
With completeness: scipy.integrate.quad over ln L of the Schechter function times completeness.
Outer integral over z: scipy.integrate.quad (epsrel 1e-10).
This script shares no code with skytally; it reads the same YAML text with PyYAML.

Run: /usr/bin/python3 test/reference/generate/counts.py > test/reference/counts.json
"""
import datetime, json, math, sys
import yaml, numpy as np, scipy, mpmath, astropy
from scipy import integrate
from astropy.cosmology import FlatLambdaCDM
import astropy.units as u

LN10 = math.log(10.0)
MPC_CM = 3.0856775814913673e24
DEG2_SR = (math.pi / 180.0) ** 2

CASES = {
"line_tophat": """
title: Invented H-alpha emitters behind a narrow-band filter
cosmology: {h0: 70, omega_m: 0.3}
area: 1.2
detection:
  kind: line_flux
  limit: 5e-17
  line: 6563
  filter: {center: 11800, fwhm: 120}
population: {variable: luminosity, phi_star: 2.2e-3, log10_l_star: 42.4, alpha: -1.5}
slices: {count: 4}
histogram: {width: 0.1}
""",
"line_gaussian_completeness": """
title: Invented [OII] emitters with a gaussian filter and a logistic completeness
cosmology: {preset: planck2018}
area: "2700 arcmin^2"
detection:
  kind: line_flux
  limit: 3e-17
  line: 3727
  filter: {center: 8150, fwhm: 100, profile: gaussian}
  completeness: {model: logistic, half: 4e-17, width: 0.1}
population: {variable: luminosity, phi_star: 2.0e-3, l_star: 3.0e41, alpha: "-1.3 - 0.1*z"}
slices: {count: 3}
histogram: {width: 0.1}
""",
"magnitude_deep": """
title: Invented deep continuum field at high redshift
cosmology: {h0: 68, omega_m: 0.31, t_cmb: 2.7255}
area: 0.05
redshift: {min: 3.5, max: 6.5}
detection:
  kind: magnitude
  limit: 28.5
  band: "0.9 um"
  beta: -2.2
  completeness: {model: table, table: [[27.0, 1.0], [27.8, 0.9], [28.2, 0.6], [28.5, 0.3]]}
population: {variable: magnitude, phi_star: 5.0e-4, m_star: "-20.8 + 0.1*(z - 4)", alpha: -2.1, rest_wavelength: 1500}
slices: {width: 0.5}
histogram: {width: 0.25}
""",
"magnitude_local": """
title: Invented shallow local survey starting at z = 0
cosmology: {h0: 70, omega_m: 0.3}
area: "0.02 sr"
redshift: {min: 0.0, max: 0.4}
detection: {kind: magnitude, limit: 19.5, band: 6200, beta: -1.0}
population: {variable: magnitude, phi_star: 4.0e-3, m_star: -21.2, alpha: -1.2, rest_wavelength: 6200}
slices: {count: 4}
histogram: {width: 0.25}
""",
"threshold_mass": """
title: Invented mass-limited sample
cosmology: {h0: 70, omega_m: 0.3}
area: 1.5
redshift: {min: 0.2, max: 1.5}
detection:
  kind: threshold
  limit: {table: [[0.2, 9.0], [1.5, 10.0]]}
population:
  variable: luminosity
  quantity: stellar mass [Msun]
  log10_phi_star_dex: -2.9
  log10_l_star: 10.9
  alpha: -1.35
slices: {edges: [0.2, 0.5, 0.8, 1.1, 1.5]}
histogram: {width: 0.2}
""",
"two_lines_one_filter": """
title: Invented narrow-band search with an [OIII] interloper (two populations)
cosmology: {h0: 70, omega_m: 0.3}
area: 0.8
detection:
  kind: line_flux
  limit: 4e-17
  filter: {center: 9200, fwhm: 110}
populations:
  - {name: halpha, variable: luminosity, line: 6563, log10_phi_star: -2.8, log10_l_star: 41.9, alpha: -1.35}
  - {name: oiii, variable: luminosity, line: 5007, log10_phi_star: -2.9, log10_l_star: 42.0, alpha: -1.6}
slices: {count: 3}
histogram: {width: 0.1}
""",
"double_schechter_mass": """
title: Invented mass-limited sample with a double Schechter mass function
cosmology: {h0: 70, omega_m: 0.3}
area: 2.0
redshift: {min: 0.2, max: 1.0}
detection:
  kind: threshold
  limit: {table: [[0.2, 8.6], [0.6, 9.2], [1.0, 9.7]]}
population:
  shape: double_schechter
  variable: luminosity
  log10_l_star: 10.7
  log10_phi_star_1_dex: "-2.45 - 0.2*z"
  alpha_1: -0.45
  log10_phi_star_2_dex: -3.1
  alpha_2: -1.5
slices: {width: 0.2}
histogram: {width: 0.25}
""",
"threshold_magnitude_completeness": """
title: Invented absolute-magnitude-limited sample with a logistic completeness
cosmology: {h0: 70, omega_m: 0.3}
area: 3.0
redshift: {min: 0.5, max: 1.0}
detection:
  kind: threshold
  limit: -19.0
  completeness: {model: logistic, half: -19.5, width: 0.2}
population: {variable: magnitude, log10_phi_star: -2.6, m_star: -21.0, alpha: -1.1}
slices: {count: 2}
histogram: {width: 0.5}
""",
}

def num(v):
    """PyYAML (YAML 1.1) reads 4e-17 as a string; YAML 1.2 (skytally's parser) reads a number."""
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

def unit_number(v, default_unit, target):
    if isinstance(v, (int, float)):
        return float(v)
    q = u.Quantity(v.replace('um', 'micron'))
    return q.to(target).value

def param(v):
    """number, {table}, or expression in z -> function of z (PyYAML parses; expressions via Python eval of a fixed vocabulary)."""
    if isinstance(v, (int, float)):
        return lambda z: float(v)
    if isinstance(v, dict):
        t = np.array(v['table'], dtype=float)
        return lambda z: float(np.interp(z, t[:, 0], t[:, 1]))
    expr = v.replace('^', '**')
    return lambda z: float(eval(expr, {'__builtins__': {}}, {'z': z}))

def build(doc):
    c = doc['cosmology']
    if c.get('preset') == 'planck2018':
        H0, Om, T = 67.66, 0.3111, 2.7255   # Planck 2018 VI Table 2 (from memory), as skytally's preset
    else:
        H0, Om, T = c['h0'], c['omega_m'], c.get('t_cmb', 0.0)
    cosmo = FlatLambdaCDM(H0=H0, Om0=Om, Tcmb0=T, Neff=3.046, m_nu=0 * u.eV)
    area = doc['area']
    area_sr = unit_number(area, 'deg2', u.sr) if isinstance(area, str) else area * DEG2_SR
    return cosmo, area_sr

def normalisation(p, sfx):
    if 'phi_star' + sfx in p: return param(p['phi_star' + sfx])
    if 'log10_phi_star' + sfx in p: f = param(p['log10_phi_star' + sfx]); return lambda z, f=f: 10 ** f(z)
    if 'phi_star' + sfx + '_dex' in p: f = param(p['phi_star' + sfx + '_dex']); return lambda z, f=f: f(z) / LN10
    f = param(p['log10_phi_star' + sfx + '_dex']); return lambda z, f=f: 10 ** f(z) / LN10

def pop_params(p):
    """[(phi*(z), alpha(z)), ...] (one component, or two for shape double_schechter) and L*/M*(z)."""
    if p.get('shape') == 'double_schechter':
        comps = [(normalisation(p, '_1'), param(p['alpha_1'])), (normalisation(p, '_2'), param(p['alpha_2']))]
    else:
        comps = [(normalisation(p, ''), param(p['alpha']))]
    if 'l_star' in p: star = param(p['l_star'])
    elif 'log10_l_star' in p: g = param(p['log10_l_star']); star = lambda z, g=g: 10 ** g(z)
    else: star = param(p['m_star'])
    return comps, star

def upper_gamma(s, x):
    return float(mpmath.gammainc(s, a=x))

def completeness_fn(comp, kind, variable):
    """c as a function of the observed value obs (apparent mag, log10 flux, log10 quantity, absolute mag)."""
    if comp is None:
        return None
    if comp['model'] == 'logistic':
        half, w = comp['half'], comp['width']
        if kind == 'line_flux':
            return lambda obs: 1.0 / (1.0 + math.exp((-obs - (-math.log10(half))) / w))
        if kind == 'threshold' and variable == 'luminosity':
            return lambda obs: 1.0 / (1.0 + math.exp((half - obs) / w))
        return lambda obs: 1.0 / (1.0 + math.exp((obs - half) / w))
    t = np.array(comp['table'], dtype=float)
    if kind == 'line_flux':
        xs = -np.log10(t[:, 0]); order = np.argsort(xs)
        xs, fs = xs[order], t[order, 1]
        return lambda obs: float(np.interp(-obs, xs, fs))
    return lambda obs: float(np.interp(obs, t[:, 0], t[:, 1]))

def survey_models(doc):
    pops = doc['populations'] if 'populations' in doc else [doc['population']]
    return [survey_model(doc, p) for p in pops]

def survey_model(doc, pop):
    cosmo, area_sr = build(doc)
    det = doc['detection']; kind = det['kind']
    variable = pop.get('variable', 'luminosity')
    comps, star = pop_params(pop)
    comp = completeness_fn(det.get('completeness'), kind, variable)
    if kind == 'line_flux':
        line = float(pop.get('line', det.get('line'))); flim = float(det['limit'])
        filt = det.get('filter')
        if filt is None:
            # no filter: the redshift key is the window, transmission 1
            zlo, zhi = doc['redshift']['min'], doc['redshift']['max']
            trans = lambda z: 1.0
        else:
            center, fwhm = float(filt['center']), float(filt['fwhm'])
            gauss = filt.get('profile') == 'gaussian'
            half = 1.5 * fwhm if gauss else fwhm / 2
            zlo, zhi = (center - half) / line - 1, (center + half) / line - 1
            sigma = fwhm / (2 * math.sqrt(2 * math.log(2)))
            def trans(z):
                d = line * (1 + z) - center
                return math.exp(-d * d / (2 * sigma * sigma)) if gauss else 1.0
        def obs_of(z):
            # obs = log10 measured flux = log10(L T / (4 pi D_L^2)); returns (a, slope) with obs = a + slope log10(L/L*)
            dl = cosmo.luminosity_distance(z).to(u.Mpc).value * MPC_CM
            return math.log10(star(z) * trans(z) / (4 * math.pi * dl * dl)), 1.0, math.log10(flim)
    elif kind == 'magnitude':
        band = unit_number(det['band'], 'AA', u.AA)
        beta = det.get('beta', -2.0); mlim = det['limit']; rest = pop.get('rest_wavelength', 1500)
        zlo, zhi = doc['redshift']['min'], doc['redshift']['max']
        def obs_of(z):
            dm = 5 * math.log10(cosmo.luminosity_distance(z).to(u.pc).value / 10.0)
            k = dm - 2.5 * math.log10(1 + z) - 2.5 * (beta + 2) * math.log10(band / ((1 + z) * rest))
            return star(z) + k, -2.5, mlim
    else:
        lim = param(det['limit'])
        zlo, zhi = doc['redshift']['min'], doc['redshift']['max']
        if variable == 'luminosity':
            obs_of = lambda z: (math.log10(star(z)), 1.0, lim(z))
        else:
            obs_of = lambda z: (star(z), -2.5, lim(z))
    return dict(cosmo=cosmo, area_sr=area_sr, comps=comps, comp=comp, obs_of=obs_of, window=(zlo, zhi))

def n_between(m, z, obs_lo, obs_hi):
    """Number density at z of sources whose observed value lies in [obs_lo, obs_hi] and passes the hard limit."""
    a, slope, olim = m['obs_of'](z)
    # allowed obs range from the hard limit
    if slope > 0: obs_lo = max(obs_lo, olim)
    else: obs_hi = min(obs_hi, olim)
    if obs_hi <= obs_lo: return 0.0
    # log10 u range
    l1, l2 = sorted(((obs_lo - a) / slope, (obs_hi - a) / slope))
    comps = [(phi(z), alpha(z) + 1) for phi, alpha in m['comps']]
    if m['comp'] is None:
        n = 0.0
        for phi, s in comps:
            g1 = upper_gamma(s, 10 ** l1)
            g2 = 0.0 if l2 > 6 else upper_gamma(s, 10 ** l2)
            n += phi * (g1 - g2)
        return n
    f = lambda lnu: sum(phi * math.exp(s * lnu - math.exp(lnu)) for phi, s in comps) * m['comp'](a + slope * lnu / LN10)
    hi = min(l2, math.log10(200.0)) * LN10
    lo = l1 * LN10
    if hi <= lo: return 0.0
    pts = np.linspace(lo, hi, 41)
    return sum(integrate.quad(f, pts[i], pts[i + 1], epsabs=0, epsrel=1e-11, limit=200)[0] for i in range(40))

def count_all(models, z1, z2, obs_lo=-1e9, obs_hi=1e9):
    """Sum over populations of their counts inside [z1, z2] (each clipped to its own window)."""
    return sum(count(m, z1, z2, obs_lo, obs_hi) for m in models)

def count(m, z1, z2, obs_lo=-1e9, obs_hi=1e9):
    z1, z2 = max(z1, m['window'][0]), min(z2, m['window'][1])
    if z2 <= z1: return 0.0
    g = lambda z: m['cosmo'].differential_comoving_volume(z).value * n_between(m, z, obs_lo, obs_hi)
    return m['area_sr'] * integrate.quad(g, z1, z2, epsabs=0, epsrel=1e-10, limit=200)[0]

def slice_edges(doc, m):
    zlo, zhi = m['window']
    if 'redshift' in doc and doc['detection'].get('filter'):
        zlo, zhi = max(zlo, doc['redshift']['min']), min(zhi, doc['redshift']['max'])
    sl = doc.get('slices', {'count': 10})
    if 'edges' in sl: return sl['edges']
    if 'count' in sl: return list(np.linspace(zlo, zhi, sl['count'] + 1))
    w = sl['width']; e = [zlo]
    while e[-1] + w < zhi - 1e-9: e.append(e[-1] + w)
    e.append(zhi); return e

def main():
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/counts.py > test/reference/counts.json",
            "libraries": {"astropy": astropy.__version__, "scipy": scipy.__version__, "mpmath": mpmath.__version__, "numpy": np.__version__},
            "date": datetime.date.today().isoformat(),
            "what": "expected counts per slice (and a few histogram bins) for invented surveys, integrated independently",
        },
        "cases": [],
    }
    for name, text in CASES.items():
        doc = num(yaml.safe_load(text))
        models = survey_models(doc)
        m = models[0]  # the top-level slices follow the first population's window
        edges = slice_edges(doc, m)
        slices = [{"z_min": float(a), "z_max": float(b), "count": count_all(models, a, b)} for a, b in zip(edges[:-1], edges[1:])]
        # a few histogram bins of the first slice: the bins nearest the limit
        w = doc.get('histogram', {}).get('width')
        a0, slope, olim = m['obs_of'](0.5 * (edges[0] + edges[1]))
        k = math.floor(olim / w + 1e-9)
        ks = [k - 1, k - 2, k - 3] if slope > 0 else [k, k - 1, k - 2, k - 4]
        bins = [{"lo": round(kk * w, 10), "hi": round((kk + 1) * w, 10), "count": count_all(models, edges[0], edges[1], kk * w, (kk + 1) * w)} for kk in ks]
        case = {"name": name, "yaml": text, "slices": slices, "total": sum(s["count"] for s in slices), "first_slice_bins": bins}
        if len(models) > 1:
            # each population's own result: the same slices rule over its own window
            case["populations"] = []
            for mp in models:
                e = slice_edges(doc, mp)
                case["populations"].append({"window": list(mp['window']), "slices": [{"z_min": float(a), "z_max": float(b), "count": count(mp, a, b)} for a, b in zip(e[:-1], e[1:])]})
        out["cases"].append(case)
        print(name, [round(s["count"], 4) for s in slices], file=sys.stderr)
    json.dump(out, sys.stdout, indent=1)


if __name__ == "__main__":
    main()
