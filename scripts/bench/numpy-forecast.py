"""The forecast job as an analyst would write it with numpy: the side-by-side reference for
`npm run bench` (never imported by sere). Usage:

    python3 numpy-forecast.py COUNTS.json DRAWS YEARS SEED

COUNTS.json holds {"counts": k×k transition counts, "start": start mix, "target": [state, share]}.
The job, the same as `sere forecast` with source posterior: Dirichlet posterior draws of every
row (Jeffreys prior, 0.5 per cell), the mix projected year by year (batched matmul), the
stationary mix of every draw, the first year the target share is reached, and 5/50/95 % bands of
every state in every year (np.quantile). Prints a one-line summary so the work cannot be skipped.
"""
import json
import sys

import numpy as np


def main() -> None:
    spec = json.load(open(sys.argv[1]))
    draws, years, seed = int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
    counts = np.asarray(spec["counts"], dtype=float)
    start = np.asarray(spec["start"], dtype=float)
    target_state, target_share = spec["target"]
    k = counts.shape[0]
    rng = np.random.default_rng(seed)

    # Posterior draws: each row Dirichlet(counts + 0.5), as normalised gammas.
    gammas = rng.standard_gamma(counts + 0.5, size=(draws, k, k))
    matrices = gammas / gammas.sum(axis=2, keepdims=True)

    # Projection: mixes[d] = start · P_d^t, every year kept (as a straightforward script would).
    mixes = np.empty((years + 1, draws, k))
    mixes[0] = start
    for t in range(1, years + 1):
        mixes[t] = np.einsum("dk,dkj->dj", mixes[t - 1], matrices)

    # Stationary mix of every draw: solve π(P − I) = 0 with Σπ = 1 (least squares on the stacked system).
    a = np.transpose(matrices, (0, 2, 1)) - np.eye(k)
    a[:, -1, :] = 1.0
    b = np.zeros((draws, k))
    b[:, -1] = 1.0
    stationary = np.linalg.solve(a, b[:, :, None])[:, :, 0]

    # First year the target share is reached, per draw (−1: never within the horizon).
    reached = mixes[:, :, target_state] >= target_share
    first = np.where(reached.any(axis=0), reached.argmax(axis=0), -1)

    bands = np.quantile(mixes, [0.05, 0.5, 0.95], axis=1)
    stationary_bands = np.quantile(stationary, [0.05, 0.5, 0.95], axis=0)
    print(f"numpy: {draws} draws × {years} years × {k} states; median share of state 0 at the horizon "
          f"{bands[1, -1, 0]:.4f}; stationary {stationary_bands[1, 0]:.4f}; reached in {np.mean(first >= 0):.3f}")


if __name__ == "__main__":
    main()
