"""Counting transitions from a long survey table as an analyst would with plain numpy (pandas is
not installed): the side-by-side reference for `sere fit` in `npm run bench` (never imported by
sere). Usage:

    python3 numpy-count.py SURVEY.csv [STEP]

SURVEY.csv is `site,time,state` with a header, no quotes (the bench's tables). np.loadtxt and
np.genfromtxt parse field by field in Python and take minutes on 10⁷ rows, so this reads the
bytes once and tokenises them with vectorised numpy: newline and comma positions, each column
gathered into a fixed-width byte-string array, np.unique(return_inverse) for site and state ids,
digits summed for the times; then lexsort by (site, time), consecutive rows of one site one step
apart, and bincount into the k×k table. Prints a one-line summary so the work cannot be skipped.
"""
import sys

import numpy as np


def column(raw: np.ndarray, start: np.ndarray, end: np.ndarray) -> np.ndarray:
    """Bytes raw[start:end] of every row as one fixed-width byte-string array (zero-padded)."""
    width = int((end - start).max())
    index = start[:, None] + np.arange(width)
    cells = raw[np.minimum(index, raw.size - 1)]
    cells[index >= end[:, None]] = 0
    return np.ascontiguousarray(cells).view(f"S{width}").ravel()


def main() -> None:
    path = sys.argv[1]
    step = int(sys.argv[2]) if len(sys.argv) > 2 else 1
    raw = np.fromfile(path, dtype=np.uint8)
    newlines = np.flatnonzero(raw == ord("\n"))
    if newlines.size == 0 or newlines[-1] != raw.size - 1:
        newlines = np.append(newlines, raw.size)
    starts = np.concatenate(([0], newlines[:-1] + 1))[1:]  # skip the header
    ends = newlines[1:]
    ends = ends - (raw[np.maximum(ends - 1, 0)] == ord("\r"))  # CRLF
    keep = ends > starts
    starts, ends = starts[keep], ends[keep]
    commas = np.flatnonzero(raw == ord(","))
    first = commas[np.searchsorted(commas, starts)]
    second = commas[np.searchsorted(commas, first + 1)]

    site_names, site = np.unique(column(raw, starts, first), return_inverse=True)
    state_names, state = np.unique(column(raw, second + 1, ends), return_inverse=True)
    digits = column(raw, first + 1, second).view(np.uint8).reshape(starts.size, -1).astype(np.int64)
    present = digits > 0
    length = present.sum(axis=1)
    power = np.where(present, 10 ** np.maximum(length[:, None] - 1 - np.arange(digits.shape[1]), 0), 0)
    time = ((digits - ord("0")) * power).sum(axis=1)

    order = np.lexsort((time, site))
    site, time, state = site[order], time[order], state[order]
    pair = (site[1:] == site[:-1]) & (time[1:] - time[:-1] == step)
    k = state_names.size
    counts = np.bincount(state[:-1][pair] * k + state[1:][pair], minlength=k * k).reshape(k, k)
    latest = np.bincount(state[time == time.max()], minlength=k)
    print(f"numpy: {starts.size} rows, {site_names.size} sites, {k} states, {counts.sum()} transitions; "
          f"latest {time.max()}: {latest.tolist()}; first row {counts[0].tolist()}")


if __name__ == "__main__":
    main()
