"""Delta chi-square of joint 2-parameter confidence regions at the normal 1- and 2-sigma
probabilities: chi2.ppf(erf(k / sqrt(2)), df=2), from scipy.

Run: /usr/bin/python3 test/reference/generate/chi2_2dof.py > test/reference/chi2-2dof.json
"""
import datetime
import json
import math

import scipy
from scipy.stats import chi2

rows = []
for k in (1, 2, 3):
    p = math.erf(k / math.sqrt(2))
    rows.append({"k_sigma": k, "probability": p, "delta_chi2": float(chi2.ppf(p, 2))})

print(json.dumps({
    "header": {
        "command": "/usr/bin/python3 test/reference/generate/chi2_2dof.py > test/reference/chi2-2dof.json",
        "libraries": {"scipy": scipy.__version__},
        "date": datetime.date.today().isoformat(),
        "what": "chi2.ppf(erf(k/sqrt(2)), df=2): Delta chi2 of the k-sigma joint region of two parameters",
    },
    "rows": rows,
}, indent=2))
