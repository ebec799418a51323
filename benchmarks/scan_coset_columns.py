"""Hill climb over inner codes for the coset-union search: change one parity-check column at a time.

Run from the repository root, e.g.
``PYTHONPATH=. python benchmarks/scan_coset_columns.py 17 6 3 --time 180 --seed 1``.
Writes nothing; the saved numbers are in benchmarks/results_constructions.md
("Hill climb over the inner code's parity-check columns").

The inner code is the binary [n, k] code whose parity-check matrix has n columns in
GF(2)^(n-k) (:func:`codesearch.constructions.searched.null_space_code`). Each step replaces
one column by a random nonzero vector, keeps the matrix at full rank and the inner distance
at >= d, and scores the new inner code by
:func:`codesearch.constructions.cosets.coset_union_search` (``local`` method, ``--inner-time``
seconds, a fresh seed per step); ties are broken towards fewer distinct syndromes of weight
< d (a sparser conflict graph). A step whose score is at least the current one is kept. The
scan prints each new best: cosets including the inner code, and the columns. The seed of
``numpy.random.default_rng`` fixes the columns drawn and the inner seeds; the inner search
stops on its time limit, so two runs with one seed can still take different paths.
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from codesearch.constructions.cosets import coset_union_search, coset_weights, good_syndromes
from codesearch.constructions.searched import null_space_code
from codesearch.errors import ParameterError


def score(columns: list[int], r: int, d: int, inner_time: float, seed: int) -> tuple[int, int]:
    """(cosets found, minus the size of the connection set's complement); (-1, 0) if invalid."""
    code = null_space_code(columns, r)
    if code.k != len(columns) - r:  # the columns do not span GF(2)^r
        return (-1, 0)
    try:
        w = coset_weights(code)
        res = coset_union_search(code, d, method="local", time_limit=inner_time, seed=seed,
                                 weights=w)
    except ParameterError:  # inner distance below d
        return (-1, 0)
    bad = (1 << r) - int(good_syndromes(w, d).size)
    return (len(res.syndromes), -bad)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("n", type=int)
    ap.add_argument("k", type=int, help="inner dimension")
    ap.add_argument("d", type=int)
    ap.add_argument("--time", type=float, default=60.0, help="seconds for the whole climb")
    ap.add_argument("--inner-time", type=float, default=0.2, help="seconds per inner search")
    ap.add_argument("--seed", type=int, default=0)
    a = ap.parse_args()
    r = a.n - a.k
    rng = np.random.default_rng(a.seed)
    while True:
        cols = [int(v) for v in rng.integers(1, 1 << r, a.n)]
        cur = score(cols, r, a.d, a.inner_time, int(rng.integers(1 << 30)))
        if cur[0] > 0:
            break
    best, t0, steps = cur, time.monotonic(), 0
    print(f"start: {cur[0]} cosets", flush=True)
    while time.monotonic() - t0 < a.time:
        steps += 1
        new = list(cols)
        new[int(rng.integers(a.n))] = int(rng.integers(1, 1 << r))
        val = score(new, r, a.d, a.inner_time, int(rng.integers(1 << 30)))
        if val >= cur:
            cols, cur = new, val
            if val > best:
                best = val
                print(f"{time.monotonic() - t0:7.1f} s  step {steps}: {val[0]} cosets "
                      f"({val[0] << a.k} words)  columns {cols}", flush=True)
    print(f"best {best[0]} cosets ({best[0] << a.k} words) after {steps} steps", flush=True)


if __name__ == "__main__":
    main()
