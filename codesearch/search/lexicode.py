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

from codesearch.search import _wordspace as ws
from codesearch.search import greedy
from codesearch.search.base import Context, Outcome

__all__ = ["OPTIONS", "SEEDING", "run"]

OPTIONS = frozenset({"size"})
SEEDING = "none"
#: Tiny runs through the binary and q-ary ball marking (:func:`codesearch.search.prepare_method`).
WARM_UP = (((2, 7, 3), {}), ((3, 4, 3), {}))


def run(ctx: Context) -> Outcome:
    """The lexicode of the cell (a prefix of it if the time limit cuts the scan short)."""
    idx, complete, scanned = greedy.greedy_indices(ctx.params, "lex", deadline=ctx.deadline,
                                                   progress=ctx.progress)
    return Outcome(ws.code_of_indices(idx, ctx.params), nodes=scanned,
                   settings={"order": "lex", "complete": complete})
