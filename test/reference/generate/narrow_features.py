#!/usr/bin/python3
"""Independent expected counts for survey files whose expressions in z have a narrow feature (a dip,
a spike or a step about 1e-3 of the window wide) in each place an expression can stand: the redshift
selection, a population parameter (log10_phi_star, m_star, alpha), an attenuation and a threshold
limit.

Semantics as counts.py (whose model this script reuses: astropy 5.2.1 FlatLambdaCDM, mpmath.gammainc
for the hard-limit number density) and selection.py items 1 and 3: the redshift selection S(z)
multiplies the integrand; an attenuation A(z) in magnitudes dims the observed flux,
obs = log10 F - 0.4 A for line_flux and m + A for magnitude. The outer integral over z is
scipy.integrate.quad (epsrel 1e-10, limit 400) with `points=` at each feature's centre and at
+-2, 5 and 20 of its widths (each case names its features), so that quad's subdivision starts at
the feature rather than having to find it. Shares no code with skytally.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/narrow_features.py > test/reference/narrow_features.json
"""
import datetime, json, math, os, sys
import yaml, numpy as np, scipy, mpmath, astropy
from scipy import integrate

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import counts as C  # noqa: E402

# the functions an expression may call (docs/survey-file.md), for Python's eval
def exp(x):
    """e^x, infinite beyond the largest double as in JavaScript (Python raises OverflowError)."""
    return math.exp(x) if x < 709.78 else math.inf


EXPR_FUNCS = {'exp': exp, 'ln': math.log, 'log10': math.log10, 'sqrt': math.sqrt, 'abs': abs, 'min': min, 'max': max}


def param(v):
    """number | {table: [[z, v], ...]} (linear, ends held) | expression in z -> function of z."""
    if isinstance(v, (int, float)):
        return lambda z: float(v)
    if isinstance(v, dict):
        t = np.array(v['table'], dtype=float)
        return lambda z: float(np.interp(z, t[:, 0], t[:, 1]))
    expr = v.replace('^', '**')
    return lambda z: float(eval(expr, {'__builtins__': {}}, dict(EXPR_FUNCS, z=z)))


C.param = param  # counts.py's model reads its expressions through this one

# name -> (survey text, [(centre, width), ...] of its narrow features)
CASES = {
"selection_dip": ("""
title: Invented H-alpha survey whose redshift selection has a narrow dip (a sky line)
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
redshift: {min: 0.8, max: 1.8}
detection:
  kind: line_flux
  limit: 2e-17
  line: 6563
  redshift_selection: "1 - 0.9*exp(-((z - 1.1)/0.001)^2)"
population: {variable: luminosity, phi_star: 1.5e-3, log10_l_star: 42.5, alpha: -1.4}
slices: {count: 2}
histogram: {width: 0.2}
""", [(1.1, 0.001)]),
"phi_star_spike": ("""
title: Invented line survey whose log10 phi* has a narrow spike
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: {min: 1.0, max: 2.0}
detection: {kind: line_flux, limit: 3e-17, line: 6563}
population:
  variable: luminosity
  log10_phi_star: "-2.9 - 0.1*z + 0.8*exp(-((z - 1.37)/0.0007)^2)"
  log10_l_star: 42.4
  alpha: -1.5
slices: {count: 2}
histogram: {width: 0.2}
""", [(1.37, 0.0007)]),
"m_star_step": ("""
title: Invented continuum field whose M* steps by 0.6 mag over 5e-4 in z
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 3.0, max: 5.0}
detection: {kind: magnitude, limit: 27.0, band: "1.2 um"}
population:
  variable: magnitude
  phi_star: 1.2e-3
  m_star: "-20.8 - 0.6/(1 + exp(-(z - 3.62)/0.0005))"
  alpha: "-1.7 - 0.05*(z - 4)"
slices: {count: 2}
histogram: {width: 0.5}
""", [(3.62, 0.0005)]),
"alpha_dip": ("""
title: Invented continuum field whose faint-end slope has a narrow dip
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 3.0, max: 5.0}
detection: {kind: magnitude, limit: 28.0, band: "1.2 um"}
population:
  variable: magnitude
  phi_star: 1.2e-3
  m_star: -20.8
  alpha: "-1.7 - 0.3*exp(-((z - 4.41)/0.002)^2)"
slices: {count: 2}
histogram: {width: 0.5}
""", [(4.41, 0.002)]),
"attenuation_spike": ("""
title: Invented H-alpha survey whose attenuation has a narrow spike
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
redshift: {min: 0.8, max: 1.8}
detection: {kind: line_flux, limit: 2e-17, line: 6563}
population:
  variable: luminosity
  phi_star: 1.5e-3
  log10_l_star: 42.5
  alpha: -1.4
  attenuation: "0.4 + 1.5*exp(-((z - 1.52)/0.001)^2)"
slices: {count: 2}
histogram: {width: 0.2}
""", [(1.52, 0.001)]),
"threshold_limit_spike": ("""
title: Invented mass-limited sample whose limit has a narrow spike
cosmology: {h0: 70, omega_m: 0.3}
area: 1.5
redshift: {min: 0.2, max: 1.5}
detection:
  kind: threshold
  limit: "9.0 + 0.8*z + 1.2*exp(-((z - 0.63)/0.0008)^2)"
population:
  variable: luminosity
  quantity: stellar mass [Msun]
  log10_phi_star: -3.0
  log10_l_star: 10.9
  alpha: -1.35
slices: {edges: [0.2, 0.5, 0.8, 1.5]}
histogram: {width: 0.2}
""", [(0.63, 0.0008)]),
}


def model(doc):
    """counts.py's model with the redshift selection and attenuation of selection.py items 1 and 3."""
    pop = doc['population']; det = doc['detection']
    m = C.survey_model(doc, pop)
    sel = pop.get('redshift_selection', det.get('redshift_selection'))
    m['selection'] = param(sel) if sel is not None else (lambda z: 1.0)
    if 'attenuation' in pop:
        att = param(pop['attenuation'])
        plain = m['obs_of']
        shift = -0.4 if det['kind'] == 'line_flux' else 1.0

        def obs_of(z):
            a, slope, olim = plain(z)
            return a + shift * att(z), slope, olim
        m['obs_of'] = obs_of
    return m


def count(m, z1, z2, features, obs_lo=-1e9, obs_hi=1e9):
    """Expected sources in [z1, z2] (and, given, with their observed value in [obs_lo, obs_hi])."""
    z1, z2 = max(z1, m['window'][0]), min(z2, m['window'][1])
    if z2 <= z1:
        return 0.0
    g = lambda z: m['cosmo'].differential_comoving_volume(z).value * m['selection'](z) * C.n_between(m, z, obs_lo, obs_hi)
    pts = sorted({c + k * w for c, w in features for k in (-20, -5, -2, 0, 2, 5, 20) if z1 < c + k * w < z2})
    return m['area_sr'] * integrate.quad(g, z1, z2, epsabs=0, epsrel=1e-10, limit=400, points=pts or None)[0]


def main():
    out = {
        'header': {
            'command': '/usr/bin/python3 test/reference/generate/narrow_features.py > test/reference/narrow_features.json',
            'libraries': {'astropy': astropy.__version__, 'scipy': scipy.__version__, 'mpmath': mpmath.__version__,
                          'numpy': np.__version__},
            'date': datetime.date.today().isoformat(),
            'what': 'expected counts per slice for invented surveys whose expressions in z have a narrow feature, '
                    'integrated independently with quad cut at each feature; suggested tolerance 1e-8 relative',
        },
        'cases': [],
    }
    for name, (text, features) in CASES.items():
        doc = C.num(yaml.safe_load(text))
        m = model(doc)
        edges = C.slice_edges(doc, m)
        slices = [{'z_min': float(a), 'z_max': float(b), 'count': count(m, a, b, features)} for a, b in zip(edges[:-1], edges[1:])]
        # histogram bins of the slice holding the (first) feature: four bins on the detected side of
        # the limit at the slice's middle (the first holding it, for a flux or a quantity), edges at
        # multiples of the width
        z1, z2 = next((a, b) for a, b in zip(edges[:-1], edges[1:]) if a < features[0][0] < b)
        w = doc['histogram']['width']
        a0, slope, olim = m['obs_of'](0.5 * (z1 + z2))
        k = math.floor(olim / w + 1e-9)
        ks = [k, k + 1, k + 2, k + 4] if slope > 0 else [k - 5, k - 3, k - 2, k - 1]
        bins = [{'lo': round(kk * w, 10), 'hi': round((kk + 1) * w, 10),
                 'count': count(m, z1, z2, features, kk * w, (kk + 1) * w)} for kk in ks]
        out['cases'].append({'name': name, 'yaml': text, 'features': [list(f) for f in features], 'slices': slices,
                             'feature_slice': {'z_min': float(z1), 'z_max': float(z2), 'bins': bins}})
        print(name, [s['count'] for s in slices], file=sys.stderr)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write('\n')


if __name__ == '__main__':
    main()
