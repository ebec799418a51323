"""Lengthen a binary code of distance 3 by one coordinate, doubling it where the space allows.

Given a code C0 of length n and distance 3 invariant under a group G (a group spec of
``codesearch.search.groups``, acting on the first coordinates and fixing the rest), the code
``C0 x {0}  union  C1 x {1}`` has distance 3 exactly when C1 has distance 3 and avoids every
word within distance 1 of C0 (the uncovered words U). U is G-invariant, so this driver takes
C1 as a union of G-orbits inside U: the largest such union is a maximum weight clique (weights
= orbit sizes) of the graph joining orbits whose words are pairwise at distance >= 3, solved by
the library's exact clique search within a time limit. The result is checked with the library's
verifier and written as a code file, with the orbit representatives (smallest word of each
orbit, bit j = coordinate j) printed for a record.

Usage::

    PYTHONPATH=. python benchmarks/double_gray_code.py IN.code OUT.code --group SPEC [--time T]

e.g. with the record ``z2z4-17`` written by ``codesearch construct orbit --param key=z2z4-17
--out c17.code`` and its group (``ORBITS['z2z4-17'].group``): 6144 more words at
length 18 (12288 in all), and doubling again 12288 more at length 19 (24576).
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from codesearch import verify
from codesearch.codefile import read_code, write_code
from codesearch.model import Code, Params
from codesearch.search.clique import bitsets_from_dense, max_weight_clique
from codesearch.search.groups import compute_orbits, parse_group

_POP16 = np.array([bin(i).count("1") for i in range(1 << 16)], dtype=np.int64)


def _distances(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    x = a[:, None] ^ b[None, :]
    return _POP16[x & 0xFFFF] + _POP16[(x >> 16) & 0xFFFF]


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("code")
    ap.add_argument("out")
    ap.add_argument("--group", required=True)
    ap.add_argument("--time", type=float, default=120.0, help="clique search seconds")
    args = ap.parse_args()
    c0 = read_code(args.code).code
    n = c0.n
    words = np.asarray(c0.words).astype(np.int64)
    ints = (words << np.arange(n)).sum(axis=1)
    covered = np.zeros(1 << n, dtype=bool)
    covered[ints] = True
    for j in range(n):
        covered[ints ^ (1 << j)] = True
    t0 = time.time()
    orbits = compute_orbits(parse_group(args.group, 2, n))
    inside = [orbits.order[orbits.starts[k]:orbits.starts[k + 1]] for k in range(orbits.count)
              if not covered[orbits.reps[k]]]
    # every orbit lies inside or outside the G-invariant set of uncovered words
    assert all(not covered[o].any() for o in inside)
    good = []
    for o in inside:
        dist = _distances(o, o)
        np.fill_diagonal(dist, n + 1)
        if dist.min() >= 3:
            good.append(o)
    k = len(good)
    compatible = np.ones((k, k), dtype=bool)
    for i in range(k):
        for j in range(i + 1, k):
            if _distances(good[i], good[j]).min() < 3:
                compatible[i, j] = compatible[j, i] = False
    np.fill_diagonal(compatible, False)
    res = max_weight_clique(bitsets_from_dense(compatible),
                            [len(o) for o in good], time_limit=args.time)
    chosen = sorted(int(v) for v in res.clique)
    c1 = np.concatenate([good[v] for v in chosen]) if chosen else np.zeros(0, np.int64)
    all_ints = np.concatenate([ints, c1 | (1 << n)])
    out = ((all_ints[:, None] >> np.arange(n + 1)) & 1).astype(np.uint8)
    code = Code(out, 2)
    verify.assert_code(code, Params(2, n + 1, 3))
    write_code(args.out, code, 3)
    print(f"uncovered words {int((~covered).sum())}, admissible orbits {k}, C1 = "
          f"{c1.size} words ({'largest G-invariant' if res.complete else 'time limit'}), "
          f"{code.size} words at length {n + 1}, {time.time() - t0:.1f} s")
    reps = sorted(int(good[v].min()) for v in chosen)
    print("C1 orbit representatives:", reps)


if __name__ == "__main__":
    main()
