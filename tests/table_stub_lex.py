"""A search method used only by the table tests: the greedy lexicode (not exhaustive).

The lexicode of length n and distance d takes, in lexicographic order, every word at
distance >= d from all words taken so far; binary lexicodes with d = 3 are the Hamming codes
when n = 2^r - 1 (Conway and Sloane, "Lexicographic codes", IEEE Trans. IT 32 (1986)).
Tests register it with the ``stub_methods`` fixture (tests/conftest.py); a driver started in a
subprocess calls :func:`register`.
"""

from __future__ import annotations

import itertools
import os
import time

import numpy as np

from codesearch.model import Code, Params
from codesearch.search.base import Context, Outcome

OPTIONS = frozenset()
SEEDING = "none"


def lexicode(params: Params) -> Code:
    words = np.array(list(itertools.product(range(params.q), repeat=params.n)), dtype=np.uint8)
    chosen = []
    for w in words:
        if all(int((w != c).sum()) >= params.d for c in chosen):
            chosen.append(w)
    return Code(np.array(chosen, dtype=np.uint8).reshape(len(chosen), params.n), params.q)


def run(ctx: Context) -> Outcome:
    code = lexicode(ctx.params)
    # Give kill tests something to interrupt: a short pause inside the budget (longer when a
    # test asks for it, so that a loaded machine cannot finish the run before the signal).
    if ctx.time_limit is not None:
        pause = float(os.environ.get("CODESEARCH_STUB_PAUSE", "0.25"))
        time.sleep(min(pause, ctx.time_limit / 2))
    return Outcome(code, settings={"order": "lex"})


def specs() -> dict:
    """The registry entries of the test-only methods."""
    from codesearch.search import MethodSpec

    return {"stub-lex": MethodSpec("stub-lex", "table_stub_lex", False,
                                   "test-only greedy lexicode"),
            "stub-clique": MethodSpec("stub-clique", "table_stub_clique", True,
                                      "test-only exact clique via networkx")}


def register() -> None:
    """Add the test-only methods to the registry of this process (a driver subprocess)."""
    from codesearch.search import METHODS

    METHODS.update(specs())
