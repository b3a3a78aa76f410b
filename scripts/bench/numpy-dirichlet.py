"""The reference beside `npm run bench -- kernel`: numpy's own Dirichlet rows at the same shapes.

numpy's Generator.dirichlet draws each row as normalised gamma variates (Marsaglia & Tsang 2000 with a
ziggurat normal, in C) — the method of the year kernel. Given one year matrix as JSON
({"k": k, "P": [...], "kappa": [... or null for a row that does not vary]}) and a number of year
matrices, it times each varying row's Dirichlet(κᵢ·Pᵢ) over its non-zero cells, vectorised over the
years (size=years), and prints the user CPU in ns per gamma variate, best of 5 after a warm-up.
"""
import json
import sys
import time

import numpy as np

case = json.loads(sys.argv[1])
years = int(sys.argv[2])
k = case["k"]
P = np.array(case["P"], dtype=float).reshape(k, k)
rows = []
for i, kappa in enumerate(case["kappa"]):
    if kappa is None:
        continue
    alpha = kappa * P[i][P[i] > 0]
    rows.append(alpha)
variates = sum(len(a) for a in rows) * years
rng = np.random.default_rng(9)


def run():
    start = time.process_time()
    for alpha in rows:
        rng.dirichlet(alpha, size=years)
    return time.process_time() - start


run()
best = min(run() for _ in range(5))
print(f"{best * 1e9 / variates:.1f}")
