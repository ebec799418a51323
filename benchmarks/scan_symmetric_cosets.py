"""Scan of random permutation-invariant inner codes with the symmetric coset-union search.

Run from the repository root, e.g.
``PYTHONPATH=. python benchmarks/scan_symmetric_cosets.py 18 8 3 --cycles 0-3,4-7,8-11,12-15
--codes 300 --seed 4 --time-limit 2``.
Writes nothing; the saved numbers are in benchmarks/results_constructions.md
("Prescribed-symmetry coset unions").

A cyclic group G is given by the cycles of one coordinate permutation (``a-b`` = the cycle
a, a+1, .., b). Each sample is a random G-invariant binary [n, k, >= d] code: spans of G-orbits
of random vectors (density 0.2, 0.35 or 0.5; half of them projected onto the fixed space of
the permutation or its complement there), kept when the span reaches dimension k and the
minimum distance is >= d. For each code,
:func:`codesearch.constructions.cosets.symmetric_coset_union_search` finds the largest union
of cosets invariant under G (exact when it finishes within ``--time-limit``), and the scan
prints the running best: cosets including the inner code, and whether the search was
exhausted. The seed of ``numpy.random.default_rng`` fixes the codes drawn.
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from codesearch.constructions.cosets import symmetric_coset_union_search
from codesearch.gf import field
from codesearch.model import LinearCode


def _permutation(n: int, spec: str) -> list[int]:
    p = list(range(n))
    for part in spec.split(","):
        a, b = (int(x) for x in part.split("-"))
        cyc = list(range(a, b + 1))
        for i, j in enumerate(cyc):
            p[j] = cyc[(i + 1) % len(cyc)]
    return p


def _apply(p: list[int], x: np.ndarray) -> np.ndarray:
    y = np.zeros_like(x)
    y[p] = x
    return y


def _min_distance(g: np.ndarray) -> int:
    ints = [int("".join(map(str, r[::-1])), 2) for r in g]
    span = [0]
    for x in ints:
        span = span + [s ^ x for s in span]
    return min(bin(s).count("1") for s in span[1:])


def random_invariant_code(n: int, k: int, p: list[int], rng: np.random.Generator, d: int,
                          tries: int = 200) -> np.ndarray | None:
    """A random [n, k, >= d] generator matrix whose span the permutation p maps onto itself."""
    gf = field(2)
    for _ in range(tries):
        basis: list[np.ndarray] = []
        fails = 0
        while len(basis) < k and fails < 50:
            x = (rng.random(n) < rng.choice([0.2, 0.35, 0.5])).astype(np.uint8)
            if rng.random() < 0.5:  # project onto the fixed space (sum over the orbit)
                acc, y = x.copy(), x.copy()
                for _ in range(60):
                    y = _apply(p, y)
                    if (y == x).all():
                        break
                    acc ^= y
                x = acc if rng.random() < 0.5 else acc ^ x
            if not x.any():
                fails += 1
                continue
            orbit = [x]
            while True:  # the span of the orbit of x
                y = _apply(p, orbit[-1])
                if gf.rank(np.array(orbit + [y])) == len(orbit):
                    break
                orbit.append(y)
            m = np.array(basis + orbit)
            r = gf.rank(m)
            if len(basis) < r <= k:
                new: list[np.ndarray] = []
                for row in m:
                    if gf.rank(np.array(new + [row])) > len(new):
                        new.append(row)
                basis = new
            else:
                fails += 1
        if len(basis) == k:
            g = np.array(basis, dtype=np.uint8)
            if _min_distance(g) >= d:
                return g
    return None


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("n", type=int)
    ap.add_argument("k", type=int)
    ap.add_argument("d", type=int)
    ap.add_argument("--cycles", required=True, help="cycles a-b,c-d,.. of the permutation")
    ap.add_argument("--codes", type=int, default=60)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--time-limit", type=float, default=2.0)
    args = ap.parse_args()
    p = _permutation(args.n, args.cycles)
    rng = np.random.default_rng(args.seed)
    best, t0 = 0, time.monotonic()
    for t in range(args.codes):
        g = random_invariant_code(args.n, args.k, p, rng, args.d)
        if g is None:
            continue
        res = symmetric_coset_union_search(LinearCode(g, 2), args.d, [p],
                                           time_limit=args.time_limit)
        cosets = len(res.syndromes)
        if cosets > best:
            best = cosets
            print(f"code {t}: {cosets} cosets ({res.size} words), "
                  f"{'exhausted' if res.optimal else 'time limit'}", flush=True)
    print(f"best {best} cosets over {args.codes} codes, {time.monotonic() - t0:.0f} s")


if __name__ == "__main__":
    main()
