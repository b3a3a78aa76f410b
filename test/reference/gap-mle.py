# Direct numerical maximisation of the gap likelihood, independent of sere's EM: the values pinned in
# test/chain/gap-em.test.ts ("agrees with direct maximisation of the gap likelihood by scipy").
# Likelihood of one-step counts n_ij and pairs g steps apart m_ijg under a 3-state chain with the
# structural zero c -> a: sum n_ij log P_ij + sum m_ijg log (P^g)_ij, with each row a softmax of free
# logits over its allowed cells; maximised by scipy.optimize.minimize (BFGS, then Nelder-Mead
# polish) from 20 random starts, best kept. Run: python3 test/reference/gap-mle.py
import numpy as np
from scipy.optimize import minimize

K = 3
allowed = np.ones((K, K), bool); allowed[2, 0] = False
counts = np.array([[20, 5, 2], [3, 15, 6], [0, 4, 18]], float)
gaps = [(0, 1, 2, 6), (0, 2, 2, 4), (1, 0, 2, 3), (2, 2, 2, 9), (0, 0, 3, 5), (2, 1, 3, 2), (1, 2, 4, 3)]
free = [np.flatnonzero(allowed[i]) for i in range(K)]
sizes = [len(f) for f in free]

def matrix(theta):
    P = np.zeros((K, K)); at = 0
    for i in range(K):
        z = theta[at:at + sizes[i]]; at += sizes[i]
        e = np.exp(z - z.max()); P[i, free[i]] = e / e.sum()
    return P

def loglik(P):
    ll = float((counts[counts > 0] * np.log(P[counts > 0])).sum())
    for i, j, g, n in gaps:
        ll += n * np.log(np.linalg.matrix_power(P, g)[i, j])
    return ll

rng = np.random.default_rng(1)
best = None
for _ in range(20):
    x0 = rng.normal(size=sum(sizes))
    r = minimize(lambda t: -loglik(matrix(t)), x0, method='BFGS', options={'gtol': 1e-12, 'maxiter': 10000})
    r = minimize(lambda t: -loglik(matrix(t)), r.x, method='Nelder-Mead', options={'xatol': 1e-13, 'fatol': 1e-15, 'maxiter': 200000, 'maxfev': 200000})
    if best is None or r.fun < best.fun: best = r
P = matrix(best.x)
np.set_printoptions(precision=12, suppress=False)
print('P =', [[float(f'{x:.12g}') for x in row] for row in P])
print('loglik =', f'{-best.fun:.12f}')
