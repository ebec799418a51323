"""A search method used only by the table tests: the greedy lexicode (not exhaustive).

The lexicode of length n and distance d takes, in lexicographic order, every word at
distance >= d from all words taken so far; binary lexicodes with d = 3 are the Hamming codes
when n = 2^r - 1 (Conway and Sloane, "Lexicographic codes", IEEE Trans. IT 32 (1986)).
Registered in the search registry at run time by :func:`register`.
"""

from __future__ import annotations

import itertools
import time

import numpy as np

from codesearch.model import Code
from codesearch.results import SearchResult, Status

OPTIONS = frozenset()


def run(params, *, time_limit=None, seed=None, progress=None):
    start = time.perf_counter()
    words = np.array(list(itertools.product(range(params.q), repeat=params.n)), dtype=np.uint8)
    chosen = []
    for w in words:
        if all(int((w != c).sum()) >= params.d for c in chosen):
            chosen.append(w)
    # Give kill tests something to interrupt: a short pause inside the budget.
    if time_limit is not None:
        time.sleep(min(0.25, time_limit / 2))
    code = Code(np.array(chosen, dtype=np.uint8).reshape(len(chosen), params.n), params.q)
    return SearchResult(params, Status.FEASIBLE, code, None, "stub-lex",
                        time.perf_counter() - start, seed=seed, settings={"order": "lex"})


def register():
    """Add the stub methods to the search registry (idempotent)."""
    from codesearch.search import METHODS, MethodSpec

    METHODS.setdefault("stub-lex", MethodSpec("stub-lex", "table_stub_lex", False,
                                              "test-only greedy lexicode"))
    METHODS.setdefault("stub-clique", MethodSpec("stub-clique", "table_stub_clique", True,
                                                 "test-only exact clique via networkx"))
