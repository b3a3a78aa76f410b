# Direct numerical maximisation of the likelihood of records seen through observer error, independent
# of sere's EM (Baum-Welch): the values pinned in test/chain/error-em.test.ts ("agrees with direct
# maximisation by scipy"). Three states; invented record patterns (n sites each, recorded states at
# steps after the first survey, unsurveyed steps between) and an accuracy assessment A (row = verified,
# column = recorded) whose cell (c, a) is 0, so E[c, a] is a structural zero.
# Log-likelihood: sum_patterns n * log P(record | pi, P, E), by the plain (unscaled) forward
# recursion over every step, + sum A[x, r] log E[x, r]. Each row of P, of E (over its allowed cells)
# and pi is a softmax of free logits; maximised by scipy.optimize.minimize (BFGS, then Nelder-Mead
# polish) from 8 random starts, best kept. Run: python3 test/reference/error-mle.py
# With the assessment a tenth of this size the likelihood had two modes (EM from the assessment's
# proportions found -442.004, the optimiser -441.910 with E[a, a] = 0.64): the assessment here is
# large enough to pin E, so the maximum is the one EM finds.
import numpy as np
from scipy.optimize import minimize

K = 3
patterns = [
    (30, [(0, 0), (1, 0), (2, 1), (3, 1)]),
    (25, [(0, 1), (1, 1), (3, 2)]),
    (20, [(0, 2), (1, 2), (2, 2)]),
    (15, [(0, 0), (2, 2), (3, 2)]),
    (12, [(0, 1), (1, 0), (2, 0)]),
    (10, [(0, 2), (1, 1), (2, 1), (4, 0)]),
    (8, [(0, 0), (1, 1), (2, 0)]),
    (6, [(0, 2), (2, 0)]),
    (5, [(0, 1)]),
]
A = np.array([[400, 30, 10], [40, 300, 20], [0, 50, 250]], float)
allowedE = A > 0

def softmax_rows(z, allowed):
    M = np.zeros(allowed.shape); at = 0
    for i in range(allowed.shape[0]):
        idx = np.flatnonzero(allowed[i]); v = z[at:at + len(idx)]; at += len(idx)
        e = np.exp(v - v.max()); M[i, idx] = e / e.sum()
    return M, at

def unpack(theta):
    P, a = softmax_rows(theta, np.ones((K, K), bool))
    E, b = softmax_rows(theta[a:], allowedE)
    z = theta[a + b:]; e = np.exp(z - z.max()); pi = e / e.sum()
    return pi, P, E

def loglik(pi, P, E):
    ll = float((A[allowedE] * np.log(E[allowedE])).sum())
    for n, surveys in patterns:
        rec = dict(surveys); T = surveys[-1][0] + 1
        alpha = pi * (E[:, rec[0]] if 0 in rec else 1)
        for t in range(1, T):
            alpha = (alpha @ P) * (E[:, rec[t]] if t in rec else 1)
        ll += n * np.log(alpha.sum())
    return ll

size = K * K + int(allowedE.sum()) + K
rng = np.random.default_rng(1)
best = None
for _ in range(8):
    x0 = rng.normal(size=size)
    f = lambda t: -loglik(*unpack(t))
    r = minimize(f, x0, method='BFGS', options={'gtol': 1e-10, 'maxiter': 20000})
    r = minimize(f, r.x, method='Nelder-Mead', options={'xatol': 1e-12, 'fatol': 1e-14, 'maxiter': 30000, 'maxfev': 30000})
    if best is None or r.fun < best.fun: best = r
pi, P, E = unpack(best.x)
print('P =', [[float(f'{x:.9g}') for x in row] for row in P])
print('E =', [[float(f'{x:.9g}') for x in row] for row in E])
print('pi =', [float(f'{x:.9g}') for x in pi])
print('loglik =', f'{-best.fun:.10f}')
