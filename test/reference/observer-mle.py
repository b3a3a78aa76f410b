# Direct numerical maximisation of the likelihood of records seen through observer error with one
# error matrix per observer, independent of sere's EM (Baum-Welch): the values pinned in
# test/chain/observer-em.test.ts ("agrees with direct maximisation by scipy"). Three states, two
# observers (0 and 1) and a pooled matrix (index 2 here) for surveys by an observer the assessment
# does not name. Invented record patterns: n sites each, (step after the first survey, recorded
# state, observer) per survey; observer None reads through the pooled matrix.
# Log-likelihood: sum_patterns n * log P(record | pi, P, E_0, E_1, E_pool), by the plain (unscaled)
# forward recursion over every step, + sum_o sum A_o[x, r] log E_o[x, r] + sum A_pool log E_pool,
# with A_pool = A_0 + A_1 (sere's pooled matrix takes every assessed count). Cells allowed in every
# matrix are those the pooled assessment saw. Each row of P, of each E and pi is a softmax of free
# logits; maximised by scipy.optimize.minimize (BFGS, then Nelder-Mead polish) from 8 random starts,
# best kept. Run: python3 test/reference/observer-mle.py
import numpy as np
from scipy.optimize import minimize

K = 3
patterns = [
    (30, [(0, 0, 0), (1, 0, 1), (2, 1, 0), (3, 1, 1)]),
    (25, [(0, 1, 1), (1, 1, 1), (3, 2, 0)]),
    (20, [(0, 2, 0), (1, 2, 0), (2, 2, 1)]),
    (15, [(0, 0, 1), (2, 2, 1), (3, 2, 1)]),
    (12, [(0, 1, 0), (1, 0, 1), (2, 0, 0)]),
    (10, [(0, 2, None), (1, 1, 0), (2, 1, None), (4, 0, 1)]),
    (8, [(0, 0, 0), (1, 1, 0), (2, 0, 0)]),
    (6, [(0, 2, 1), (2, 0, 0)]),
    (5, [(0, 1, None)]),
]
A0 = np.array([[200, 5, 5], [10, 180, 10], [0, 10, 150]], float)
A1 = np.array([[150, 40, 5], [30, 120, 10], [0, 40, 100]], float)
A = [A0, A1, A0 + A1]
allowedE = (A0 + A1) > 0

def softmax_rows(z, allowed):
    M = np.zeros(allowed.shape); at = 0
    for i in range(allowed.shape[0]):
        idx = np.flatnonzero(allowed[i]); v = z[at:at + len(idx)]; at += len(idx)
        e = np.exp(v - v.max()); M[i, idx] = e / e.sum()
    return M, at

def unpack(theta):
    P, at = softmax_rows(theta, np.ones((K, K), bool))
    Es = []
    for _ in range(3):
        E, b = softmax_rows(theta[at:], allowedE); at += b; Es.append(E)
    z = theta[at:]; e = np.exp(z - z.max()); pi = e / e.sum()
    return pi, P, Es

def loglik(pi, P, Es):
    ll = sum(float((A[m][allowedE] * np.log(Es[m][allowedE])).sum()) for m in range(3))
    for n, surveys in patterns:
        rec = {t: (r, 2 if o is None else o) for t, r, o in surveys}; T = surveys[-1][0] + 1
        emit = lambda t: Es[rec[t][1]][:, rec[t][0]] if t in rec else 1
        alpha = pi * emit(0)
        for t in range(1, T):
            alpha = (alpha @ P) * emit(t)
        ll += n * np.log(alpha.sum())
    return ll

size = K * K + 3 * int(allowedE.sum()) + K
rng = np.random.default_rng(1)
best = None
for _ in range(8):
    x0 = rng.normal(size=size)
    f = lambda t: -loglik(*unpack(t))
    r = minimize(f, x0, method='BFGS', options={'gtol': 1e-10, 'maxiter': 20000})
    r = minimize(f, r.x, method='Nelder-Mead', options={'xatol': 1e-12, 'fatol': 1e-14, 'maxiter': 30000, 'maxfev': 30000})
    if best is None or r.fun < best.fun: best = r
pi, P, Es = unpack(best.x)
fmt = lambda M: [[float(f'{x:.9g}') for x in row] for row in M]
print('P =', fmt(P))
for m, name in enumerate(['E0', 'E1', 'Epool']):
    print(name, '=', fmt(Es[m]))
print('pi =', [float(f'{x:.9g}') for x in pi])
print('loglik =', f'{-best.fun:.10f}')
