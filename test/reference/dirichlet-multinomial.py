"""Reference values for sere's Dirichlet-multinomial code, from SciPy (run once; output kept in
dirichlet-multinomial.json). scipy.stats.dirichlet_multinomial (SciPy >= 1.11): logpmf, mean, var.

    python3 test/reference/dirichlet-multinomial.py > test/reference/dirichlet-multinomial.json
"""
import json
import scipy
from scipy.stats import dirichlet_multinomial

cases = [
    {"n": [3, 0, 2], "a": [0.5, 1.2, 3.0]},
    {"n": [10, 5, 1, 0], "a": [2.0, 2.0, 0.3, 0.1]},
    {"n": [40, 7, 3], "a": [80.0, 15.0, 5.0]},
    {"n": [1, 0], "a": [0.05, 0.05]},
    {"n": [120, 30, 0, 50], "a": [1200.0, 250.0, 3.0, 600.0]},
    {"n": [0, 0, 6], "a": [0.2, 0.7, 0.1]},
]
out = []
for c in cases:
    n, a = c["n"], c["a"]
    N = sum(n)
    out.append({
        "n": n, "a": a,
        "logpmf": float(dirichlet_multinomial.logpmf(n, a, N)),
        "mean": [float(x) for x in dirichlet_multinomial.mean(a, N)],
        "var": [float(x) for x in dirichlet_multinomial.var(a, N)],
    })

# Maximum-likelihood Dirichlet-multinomial parameters of a row's periods, found by a general-purpose
# optimiser (scipy.optimize.minimize, L-BFGS-B on log a) on the summed logpmf: what Minka's fixed
# point must reach.
import numpy as np
from scipy.optimize import minimize
periods = [[30, 12, 3], [18, 20, 7], [41, 5, 2], [25, 15, 6], [10, 28, 9], [33, 9, 1]]
def nll(loga):
    a = np.exp(loga)
    return -sum(dirichlet_multinomial.logpmf(n, a, sum(n)) for n in periods)
res = minimize(nll, np.log([5.0, 3.0, 1.0]), method="L-BFGS-B", options={"ftol": 1e-15, "gtol": 1e-10, "maxiter": 10000})
a = np.exp(res.x)
mle = {"periods": periods, "a": [float(x) for x in a], "kappa": float(a.sum()), "loglik": float(-res.fun)}
print(json.dumps({"source": "SciPy %s scipy.stats.dirichlet_multinomial (logpmf, mean, var) and scipy.optimize.minimize (L-BFGS-B) for the MLE, test/reference/dirichlet-multinomial.py" % scipy.__version__, "cases": out, "mle": mle}, indent=1))
