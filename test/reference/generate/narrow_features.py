#!/usr/bin/python3
"""Independent expected counts for survey files whose expressions in z have a narrow feature (a dip,
a spike or a step about 1e-3 of the window wide) in each place an expression can stand: the redshift
selection, a population parameter (log10_phi_star, m_star, alpha), an attenuation and a threshold
limit; a spike between a table's rows 0.001 apart (phi_star_table_spike: a forecast's density grid,
which does not cut at a parameter's rows, must refine its redshift nodes to follow it); a coarse
tabulated filter with sharp steps between its few rows (filter_table_steps, its curve in
test/reference/narrow-features/coarse-steps.csv: the transmission, relative to its peak, linear
between rows and 0 outside them as docs/survey-file.md says, has a kink at each row's redshift
lambda_k / lambda_line - 1, where quad is cut; the measured flux is L T / (4 pi D_L^2)); and (bias_cases) the bias-weighted integrals of a total's uncertainty where the bias, given as
an expression or a table, has a narrow feature or rows inside a slice.

Semantics as counts.py (whose model this script reuses: astropy 5.2.1 FlatLambdaCDM, mpmath.gammainc
for the hard-limit number density) and selection.py items 1 and 3: the redshift selection S(z)
multiplies the integrand; an attenuation A(z) in magnitudes dims the observed flux,
obs = log10 F - 0.4 A for line_flux and m + A for magnitude. The outer integral over z is
scipy.integrate.quad (epsrel 1e-10, limit 400) with `points=` at each feature's centre and at
+-2, 5 and 20 of its widths (each case names its features), so that quad's subdivision starts at
the feature rather than having to find it. Shares no code with skytally.

The totals' bias-weighted integrals (docs/outputs.md, the uncertainty block of a total; README.md,
"Uncertainty on every count"), over the population's window with dN/dz = area dV/dz/dOmega S(z) n(z),
dN/dchi = area chi(z)^2 S(z) n(z) (flat sky, chi from astropy) and D(z) the linear growth of flat
matter + Lambda normalised at z = 0 (power.py's hypergeometric form):
  N = int dN, the count-weighted bias b = int b dN / N, the mean redshift int z dN / N,
  <b D> = int b D dN / N and the effective depth L = (int b D dN)^2 / int b D (dN/dchi) b D dN
  (the program's (int q dchi)^2 / int q^2 dchi with q = dN/dchi b D).
Each by quad as above, with `points=` at each feature (a table's rows: its rows).

Run from the repository root:
    /usr/bin/python3 test/reference/generate/narrow_features.py > test/reference/narrow_features.json
"""
import datetime, json, math, os, sys
import yaml, numpy as np, scipy, mpmath, astropy
from scipy import integrate

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import counts as C  # noqa: E402
import power as P  # noqa: E402  (the linear growth)

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
"phi_star_table_spike": ("""
title: Invented line survey whose log10 phi* table spikes between rows 0.001 apart
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: {min: 1.0, max: 2.0}
detection: {kind: line_flux, limit: 3e-17, line: 6563}
population:
  variable: luminosity
  log10_phi_star: {table: [[1.0, -3.0], [1.371, -3.1], [1.372, -2.3], [1.373, -3.1], [2.0, -3.2]]}
  log10_l_star: 42.4
  alpha: -1.5
slices: {count: 2}
histogram: {width: 0.2}
""", [(1.372, 0.0005)]),
"filter_table_steps": ("""
title: Invented H-alpha search through a coarse tabulated filter with sharp steps between its rows
cosmology: {h0: 70, omega_m: 0.3}
area: 1.5
detection:
  kind: line_flux
  limit: 3e-17
  line: 6563
  filter: {profile: table, file: narrow-features/coarse-steps.csv}
population: {variable: luminosity, log10_phi_star: -2.8, log10_l_star: 41.9, alpha: -1.35}
slices: {count: 2}
histogram: {width: 0.1}
""", [(w / 6563.0 - 1, 0.0) for w in (9092, 9131, 9139, 9197, 9206)]),
}

# name -> (survey text, [(centre, width), ...] of the bias's features or rows (width 0))
BIAS_CASES = {
"bias_spike": ("""
title: Invented H-alpha survey whose bias has a narrow spike
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
redshift: {min: 0.8, max: 1.8}
detection: {kind: line_flux, limit: 2e-17, line: 6563}
population:
  variable: luminosity
  phi_star: 1.5e-3
  log10_l_star: 42.5
  alpha: -1.4
  bias: "1.5 + 2*exp(-((z - 1.37)/0.003)^2)"
slices: {count: 2}
""", [(1.37, 0.003)]),
"bias_table": ("""
title: Invented H-alpha survey whose bias is a table with a steep step inside a slice
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
redshift: {min: 0.8, max: 1.8}
detection: {kind: line_flux, limit: 2e-17, line: 6563}
population:
  variable: luminosity
  phi_star: 1.5e-3
  log10_l_star: 42.5
  alpha: -1.4
  bias: {table: [[0.8, 1.2], [1.137, 1.4], [1.139, 2.6], [1.8, 2.9]]}
slices: {count: 2}
""", [(1.137, 0.0), (1.139, 0.0)]),
}


REFERENCE_DIR = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..')


def table_filter(doc):
    """A tabulated filter (docs/survey-file.md, filters): rows `wavelength_angstrom, transmission`
    relative to the peak, linear between rows, 0 outside; the window is where the curve is above 0
    (from the row before the first positive one to the row after the last). Returns the survey
    without its filter but with that window as its redshift range, and T(z) at the line."""
    det = doc['detection']
    rows = np.loadtxt(os.path.join(REFERENCE_DIR, det['filter']['file']), delimiter=',', comments='#', skiprows=3)
    ws, ts = rows[:, 0], rows[:, 1] / rows[:, 1].max()
    pos = np.nonzero(ts > 0)[0]
    lo, hi = ws[max(pos[0] - 1, 0)], ws[min(pos[-1] + 1, len(ws) - 1)]
    line = float(doc['population'].get('line', det['line']))
    plain = dict(doc, redshift={'min': lo / line - 1, 'max': hi / line - 1},
                 detection={k: v for k, v in det.items() if k != 'filter'})
    return plain, lambda z: float(np.interp(line * (1 + z), ws, ts, left=0.0, right=0.0))


def model(doc):
    """counts.py's model with the redshift selection and attenuation of selection.py items 1 and 3,
    and a tabulated filter."""
    pop = doc['population']; det = doc['detection']
    if det.get('filter', {}).get('profile') == 'table':
        plain, trans = table_filter(doc)
        m = C.survey_model(plain, pop)
        untransmitted = m['obs_of']

        def obs_of_filtered(z):
            a, slope, olim = untransmitted(z)
            t = trans(z)
            return (a + math.log10(t) if t > 0 else -math.inf), slope, olim
        m['obs_of'] = obs_of_filtered
    else:
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


def bias_total(m, bias, features):
    """The totals' bias-weighted integrals over the population's window (see the top)."""
    z1, z2 = m['window']
    om = m['cosmo'].Om0
    dens = {}

    def n_sel(z):
        if z not in dens:
            dens[z] = m['selection'](z) * C.n_between(m, z, -1e9, 1e9)
        return dens[z]

    dndz = lambda z: m['area_sr'] * m['cosmo'].differential_comoving_volume(z).value * n_sel(z)
    dndchi = lambda z: m['area_sr'] * m['cosmo'].comoving_distance(z).value ** 2 * n_sel(z)
    growth = lambda z: P.growth({'omega_m': om}, z)
    pts = sorted({c + k * w for c, w in features for k in (-20, -5, -2, 0, 2, 5, 20) if z1 < c + k * w < z2})

    def quad(f):
        return integrate.quad(f, z1, z2, epsabs=0, epsrel=1e-10, limit=400, points=pts or None)[0]

    n = quad(dndz)
    nb = quad(lambda z: dndz(z) * bias(z))
    nz = quad(lambda z: dndz(z) * z)
    q = quad(lambda z: dndz(z) * bias(z) * growth(z))
    q2 = quad(lambda z: dndz(z) * (bias(z) * growth(z)) ** 2 * dndchi(z))
    return {'count': n, 'bias': nb / n, 'mean_redshift': nz / n, 'bias_growth': q / n,
            'effective_depth_mpc': q * q / q2}


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
    out['bias_cases'] = []
    for name, (text, features) in BIAS_CASES.items():
        doc = C.num(yaml.safe_load(text))
        m = model(doc)
        total = bias_total(m, param(doc['population']['bias']), features)
        out['bias_cases'].append({'name': name, 'yaml': text, 'features': [list(f) for f in features], 'total': total})
        print(name, total, file=sys.stderr)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write('\n')


if __name__ == '__main__':
    main()
