"""Propagation between the cells of a table: derive codes and upper bounds from neighbours.

Problem
-------
Given what the store holds for some cells of a table of A_q(n,d), derive better entries for
other cells with the standard relations, to a fixed point. Every derived code is built word
by word and verified before it is stored (provenance: the rule and the stored codes used);
every derived upper bound is stored with a ``"cell-relation"`` certificate citing the stored
bounds it used, which the store re-checks against those rows.

Code constructions (lower bounds)
    shorten      A_q(n-1,d) >= ceil(A_q(n,d)/q): keep the words with the most frequent symbol
                 at the best coordinate, delete that coordinate;
    puncture     A_q(n-1,d-1) >= A_q(n,d): delete a coordinate;
    parity       binary, d odd: A(n+1,d+1) >= A(n,d): append an overall parity bit;
    pad          A_q(n+1,d) >= A_q(n,d): append a zero symbol;
    relax        A_q(n,d-1) >= A_q(n,d): the same words;
    u|u+v        A_q(2n, d) >= A_q(n, ceil(d/2)) A_q(n, d), over Z_q;
    direct-sum   A_q(n1+n2, d) >= A_q(n1, d) A_q(n2, d).

Upper-bound relations
    the rules of :mod:`codesearch.verify.relations` (``times-q-shorter``, ``longer``,
    ``smaller-d``, ``punctured``, ``parity-odd``; with ``punctured``, ``parity-odd`` gives
    A(n,2t-1) = A(n+1,2t)). The checker owns the rules; this module only applies them.

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, Ch. 1 (shortening, puncturing, parity extension), Ch. 2 section 9 (the (u|u+v)
construction) and Ch. 17 section 1 (elementary relations between values of A(n,d)).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable, Iterable

import numpy as np

from codesearch.model import Code, Params
from codesearch.results import BoundResult
from codesearch.verify.relations import RELATION_RULES, relation_cells, relation_value

__all__ = [
    "shorten",
    "puncture",
    "parity_extend",
    "pad",
    "u_u_plus_v",
    "direct_sum",
    "propagate",
    "PropagationSummary",
]

#: Largest derived code that is materialised (larger ones would dominate verification time).
MAX_DERIVED_WORDS = 4096


def _cell(q: int, n: int, d: int) -> Params | None:
    return Params(q, n, d) if n >= 1 and 1 <= d <= n else None


# --------------------------------------------------------------------- code constructions
def shorten(code: Code) -> Code:
    """Shortened code: the largest (coordinate, symbol) class with that coordinate deleted.

    The result has length ``n - 1``, the same minimum distance, and at least
    ``ceil(M / q)`` words (pigeonhole on the symbol at any one coordinate).
    """
    w = code.words
    best = (-1, 0, 0)
    for i in range(code.n):
        counts = np.bincount(w[:, i], minlength=code.q)
        a = int(np.argmax(counts))
        if counts[a] > best[0]:
            best = (int(counts[a]), i, a)
    _, i, a = best
    rows = w[w[:, i] == a]
    return Code(np.delete(rows, i, axis=1), code.q)


def puncture(code: Code) -> Code:
    """Delete the last coordinate (distance drops by at most one)."""
    return Code(code.words[:, :-1], code.q)


def parity_extend(code: Code) -> Code:
    """Binary: append the overall parity bit (odd distances go up by one)."""
    parity = (code.words.sum(axis=1) % 2).astype(np.uint8)[:, None]
    return Code(np.hstack([code.words, parity]), code.q)


def pad(code: Code) -> Code:
    """Append a zero symbol to every word."""
    return Code(np.hstack([code.words, np.zeros((code.size, 1), np.uint8)]), code.q)


def u_u_plus_v(c1: Code, c2: Code) -> Code:
    """The code ``{(u | u+v mod q) : u in c1, v in c2}`` of length ``2n``.

    Its minimum distance is at least ``min(2 d1, d2)``: for ``v = v'`` the distance is
    ``2 d(u, u')``; otherwise ``d(u,u') + d(u+v, u'+v') >= d(v, v')`` by the triangle
    inequality in Z_q^n.
    """
    u = np.repeat(c1.words, c2.size, axis=0).astype(np.int32)
    v = np.tile(c2.words, (c1.size, 1)).astype(np.int32)
    return Code(np.hstack([u, (u + v) % c1.q]).astype(np.uint8), c1.q)


def direct_sum(c1: Code, c2: Code) -> Code:
    """All concatenations ``(a | b)``; distance ``min(d1, d2)``."""
    a = np.repeat(c1.words, c2.size, axis=0)
    b = np.tile(c2.words, (c1.size, 1))
    return Code(np.hstack([a, b]), c1.q)


# ------------------------------------------------------------------------ the fixed point
@dataclass(frozen=True)
class PropagationSummary:
    """What one call of :func:`propagate` added to the store."""

    codes: int
    bounds: int
    rounds: int


@dataclass(frozen=True)
class _Candidate:
    target: Params
    size: int
    rule: str
    sources: tuple[Params, ...]
    build: Callable[[list[Code]], Code]


def _code_candidates(p: Params, lower: Callable[[Params], int]) -> Iterable[_Candidate]:
    """Every construction that yields a code for cell ``p``, with its guaranteed size."""
    q, n, d = p.q, p.n, p.d
    src = _cell(q, n + 1, d)
    if src is not None:
        yield _Candidate(p, -(-lower(src) // q), "shorten", (src,), lambda c: shorten(c[0]))
    src = _cell(q, n + 1, d + 1)
    if src is not None:
        yield _Candidate(p, lower(src), "puncture", (src,), lambda c: puncture(c[0]))
    if q == 2 and d % 2 == 0 and d >= 2:
        src = _cell(q, n - 1, d - 1)
        if src is not None:
            yield _Candidate(p, lower(src), "parity", (src,), lambda c: parity_extend(c[0]))
    src = _cell(q, n - 1, d)
    if src is not None:
        yield _Candidate(p, lower(src), "pad", (src,), lambda c: pad(c[0]))
    src = _cell(q, n, d + 1)
    if src is not None:
        yield _Candidate(p, lower(src), "relax", (src,), lambda c: c[0])
    if n % 2 == 0:
        a, b = _cell(q, n // 2, (d + 1) // 2), _cell(q, n // 2, d)
        if a is not None and b is not None:
            yield _Candidate(p, lower(a) * lower(b), "u|u+v", (a, b),
                             lambda c: u_u_plus_v(c[0], c[1]))
    for n1 in range(d, n - d + 1):
        if n1 > n - n1:
            break
        a, b = _cell(q, n1, d), _cell(q, n - n1, d)
        if a is not None and b is not None:
            yield _Candidate(p, lower(a) * lower(b), "direct-sum", (a, b),
                             lambda c: direct_sum(c[0], c[1]))


def propagate(
    store: Any,
    cells: Iterable[Params],
    *,
    max_words: int = MAX_DERIVED_WORDS,
    progress: Callable[[dict[str, Any]], None] | None = None,
) -> PropagationSummary:
    """Derive codes and bounds into ``cells`` from everything stored, to a fixed point.

    Parameters
    ----------
    store : codesearch.store.Store
        Read for sources (any cell of the same alphabet) and written for targets.
    cells : iterable of Params
        The table: only these cells receive derived entries.
    max_words : int
        Derived codes larger than this are not materialised (their size is not claimed).
    progress : callable, optional
        Called with ``{"event": "derived", ...}`` for each entry added.

    Returns
    -------
    PropagationSummary

    Notes
    -----
    Each round only stores strict improvements (a larger code, a smaller bound), and both
    are bounded integers, so the loop terminates.
    """
    table = sorted(set(cells))
    if not table:
        return PropagationSummary(0, 0, 0)
    view = _StoreView(store, progress)
    rounds = 0
    changed = True
    while changed:
        rounds += 1
        new_codes = sum(_derive_codes(view, p, max_words) for p in table)
        new_bounds = sum(_derive_bounds(view, p) for p in table)
        changed = bool(new_codes or new_bounds)
    return PropagationSummary(view.codes, view.bounds, rounds)


class _StoreView:
    """The store's best values per cell, cached during one propagation (this module is the
    only writer meanwhile, and it updates the cache with what it writes)."""

    def __init__(self, store: Any, progress: Callable[[dict[str, Any]], None] | None) -> None:
        self.store = store
        self.progress = progress
        self._lower: dict[Params, int] = {}
        self._upper: dict[Params, tuple[int, int] | None] = {}
        self.codes = self.bounds = 0

    def lower(self, p: Params) -> int:
        if p not in self._lower:
            self._lower[p] = self.store.summary(p).lower
        return self._lower[p]

    def upper(self, p: Params) -> tuple[int, int] | None:
        """``(bound row id, value)`` of the cell's best stored bound, or None."""
        if p not in self._upper:
            self._upper[p] = self.store.best_upper_row(p)
        return self._upper[p]

    def add_code(self, p: Params, code: Code, cand: _Candidate, ids: list[int]) -> None:
        self.store.add_code(
            code, p, method=f"derived:{cand.rule}", status="feasible",
            settings={"rule": cand.rule},
            provenance={"rule": cand.rule, "from": ids,
                        "cells": [[s.q, s.n, s.d] for s in cand.sources]},
        )
        self._lower[p] = code.size
        self.codes += 1
        self._told(p, "code", cand.rule, code.size)

    def add_bound(self, p: Params, rule: str, value: int, cert: dict[str, Any],
                  srcs: list[Params]) -> None:
        bid = self.store.add_bound(
            BoundResult(p, value, f"relation:{rule}", certificate=cert,
                        note=f"{rule} from " + ", ".join(str(s) for s in srcs)),
        )
        self._upper[p] = (bid, value)
        self.bounds += 1
        self._told(p, "bound", rule, value)

    def _told(self, p: Params, kind: str, rule: str, value: int) -> None:
        if self.progress is not None:
            self.progress({"event": "derived", "kind": kind, "cell": p, "rule": rule,
                           "value": value})


def _derive_codes(view: _StoreView, p: Params, max_words: int) -> int:
    """Build and store every code construction that beats the cell's best code; the count."""
    added = 0
    for cand in _code_candidates(p, view.lower):
        if cand.size <= view.lower(p) or cand.size > max_words:
            continue
        ub = view.upper(p)
        if ub is not None and view.lower(p) >= ub[1]:
            break  # the cell is already settled
        ids = [view.store.summary(s).code_id for s in cand.sources]
        code = cand.build([view.store.get_code(i)[1] for i in ids])
        if code.size <= view.lower(p):
            continue
        view.add_code(p, code, cand, ids)
        added += 1
    return added


def _derive_bounds(view: _StoreView, p: Params) -> int:
    """Store every relation that improves the cell's best bound, citing its sources; the
    count."""
    added = 0
    for rule in RELATION_RULES:
        srcs = relation_cells(rule, p)
        if srcs is None:
            continue
        rows = [view.upper(s) for s in srcs]
        if any(r is None for r in rows):
            continue
        value = relation_value(rule, p, [(s, r[1]) for s, r in zip(srcs, rows)])
        cur = view.upper(p)
        if value is None or (cur is not None and value >= cur[1]):
            continue
        cert = {"kind": "cell-relation", "rule": rule,
                "cites": [{"q": s.q, "n": s.n, "d": s.d, "bound_id": r[0], "value": r[1]}
                          for s, r in zip(srcs, rows)]}
        view.add_bound(p, rule, value, cert, srcs)
        added += 1
    return added
