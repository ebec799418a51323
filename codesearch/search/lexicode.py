"""Lexicodes: the greedy code in lexicographic order (method ``lexicode``).

Problem
-------
Scan all ``q^n`` words in lexicographic order and keep each word at distance ``>= d`` from
those kept before. The result is deterministic; for q = 2 it is a linear code, and for
(n, d) = (24, 8) it is the extended Golay code. A heuristic: status FEASIBLE only.
The work is done by :func:`codesearch.search.greedy.greedy_indices` (ball marking).

References
----------
J. H. Conway and N. J. A. Sloane, "Lexicographic codes: error-correcting codes from game
theory", IEEE Trans. Inform. Theory 32 (1986) 337-348.
V. Levenshtein, "A class of systematic codes", Soviet Math. Dokl. 1 (1960) 368-371.
"""

from __future__ import annotations

import time
from typing import Any, Callable

from codesearch.model import Params
from codesearch.results import SearchResult, Status
from codesearch.search import greedy

__all__ = ["OPTIONS", "run"]

OPTIONS = frozenset({"size"})


def run(
    params: Params,
    *,
    time_limit: float | None = None,
    seed: int | None = None,
    progress: Callable[[dict[str, Any]], None] | None = None,
    size: int | None = None,
) -> SearchResult:
    """The lexicode of the cell (a prefix of it if ``time_limit`` cuts the scan short).

    ``seed`` is ignored (the lexicode is deterministic) and recorded as None.
    """
    start = time.perf_counter()
    target = greedy._check_size(size)
    deadline = None if time_limit is None else start + time_limit
    idx, complete, scanned = greedy.greedy_indices(params, "lex", deadline=deadline,
                                                   progress=progress)
    code = greedy._make_code(idx, params) if idx.size else None
    return SearchResult(
        params=params,
        status=Status.FEASIBLE if code is not None else Status.UNKNOWN,
        code=code,
        upper=None,
        method="lexicode",
        seconds=time.perf_counter() - start,
        nodes=scanned,
        seed=None,
        settings={"order": "lex", "complete": complete, "time_limit": time_limit,
                  "size": target, "version": greedy._version()},
        target=target,
    )
