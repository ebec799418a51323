"""Propagation between the cells of a table: derive codes and upper bounds from neighbours.

Problem
-------
Given what the store holds for some cells of a table of A_q(n,d), derive better entries for
other cells with the standard relations, to a fixed point. Every derived code is built by the
canonical operations of :mod:`codesearch.constructions.operations` (linear codes stay
generator matrices, so a 2^24-word code costs no more than its k x n generator) and verified
by the store before it is kept, with its provenance: the rule, the stored codes used, and a
label a table reader wants ("3x shortened extended Golay(24,12)"). Every derived upper bound
is stored with a ``"cell-relation"`` certificate citing the stored bounds it used, which the
store re-checks against those rows.

Code constructions (lower bounds)
    shorten      A_q(n-1,d) >= ceil(A_q(n,d)/q): keep the words with the most frequent symbol
                 at the best coordinate, delete that coordinate (a linear code: M/q on any
                 coordinate where it is not identically zero);
    puncture     A_q(n-1,d-1) >= A_q(n,d): delete a coordinate;
    parity       binary, d odd: A(n+1,d+1) >= A(n,d): append an overall parity bit;
    pad          A_q(n+1,d) >= A_q(n,d): append a zero symbol (so a table never shows
                 A(n+1,d) < A(n,d));
    relax        A_q(n,d-1) >= A_q(n,d): the same words;
    u|u+v        A_q(2n, d) >= A_q(n, ceil(d/2)) A_q(n, d);
    direct-sum   A_q(n1+n2, d) >= A_q(n1, d) A_q(n2, d);
    chains       the construction library's table (:func:`codesearch.constructions.table`)
                 seeded with the stored codes that beat it, so that its chains ((u|u+v),
                 direct sums, juxtaposition, shortening ...) also start from codes found by
                 the searches.

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

import re
from dataclasses import dataclass
from typing import Any, Callable, Iterable

import numpy as np

from codesearch.constructions import operations as op
from codesearch.errors import ParameterError
from codesearch.model import Code, LinearCode, Params
from codesearch.results import BoundResult
from codesearch.verify.relations import RELATION_RULES, relation_cells, relation_value

__all__ = [
    "shorten_best",
    "propagate",
    "PropagationSummary",
    "MAX_DERIVED_WORDS",
    "code_label",
]

AnyCode = Code | LinearCode

#: Largest derived code that is materialised as explicit words (a linear one, kept as a
#: generator matrix, has no cap). Binary codes are built and checked in O(M n) each
#: (:func:`codesearch.verify.assert_large_binary`); other alphabets are checked pair by pair,
#: so they stop at :data:`MAX_DERIVED_QARY_WORDS`.
MAX_DERIVED_WORDS = 1 << 20
#: Largest explicit derived code over q > 2 (M^2 / 2 pair distances to check).
MAX_DERIVED_QARY_WORDS = 1 << 13

#: Methods whose codes seed the construction library's chains (codes found by searches).
_NOT_SEEDS = re.compile(r"^(construction|derived:)")


def _cell(q: int, n: int, d: int) -> Params | None:
    return Params(q, n, d) if n >= 1 and 1 <= d <= n else None


# --------------------------------------------------------------------- code constructions
def shorten_best(code: AnyCode) -> AnyCode:
    """Shortened code with the most words: a linear code on its last coordinate that is not
    identically zero (q^(k-1) words); an explicit code on the largest (coordinate, symbol)
    class (at least ``ceil(M / q)`` words, by pigeonhole), through
    :func:`codesearch.constructions.operations.raw_shorten`."""
    if isinstance(code, LinearCode):
        return op.raw_shorten(code)
    w = code.words
    best = (-1, 0, 0)
    for i in range(code.n):
        counts = np.bincount(w[:, i], minlength=code.q)
        a = int(np.argmax(counts))
        if counts[a] > best[0]:
            best = (int(counts[a]), i, a)
    return op.raw_shorten(code, best[1], best[2])


def _linear_ops(*codes: AnyCode) -> list[AnyCode]:
    """Inputs for a binary operation: all linear stay generators, otherwise all words."""
    if all(isinstance(c, LinearCode) for c in codes):
        return list(codes)
    return [c.words(MAX_DERIVED_WORDS) if isinstance(c, LinearCode) else c for c in codes]


def _pair(f: Callable[[AnyCode, AnyCode], AnyCode]) -> Callable[[list[AnyCode]], AnyCode]:
    return lambda c: f(*_linear_ops(c[0], c[1]))


# Each rule: its label word (put before the source's label) and how the code is built.
_RULES: dict[str, tuple[str, Callable[[list[AnyCode]], AnyCode]]] = {
    "shorten": ("shortened", lambda c: shorten_best(c[0])),
    "puncture": ("punctured", lambda c: op.raw_puncture(c[0], -1)),
    "parity": ("extended", lambda c: op.raw_parity_extend(c[0])),
    "pad": ("padded", lambda c: op.raw_pad(c[0], 0)),
    "relax": ("", lambda c: c[0]),
    "u|u+v": ("(u|u+v)", _pair(op.raw_u_u_plus_v)),
    "direct-sum": ("direct sum", _pair(op.raw_direct_sum)),
}


def code_label(provenance: dict[str, Any] | None, method: str | None) -> str:
    """How a stored code reads in a table: its construction or derivation label, else the
    method that found it."""
    prov = provenance or {}
    return str(prov.get("label") or prov.get("construction") or method or "code")


def _derived_label(rule: str, labels: list[str]) -> str:
    word = _RULES[rule][0]
    if rule in ("u|u+v", "direct-sum"):
        return f"{word} of {labels[0]} and {labels[1]}"
    if not word:
        return labels[0]
    m = re.match(rf"(?:(\d+)x )?{re.escape(word)} (.*)$", labels[0])
    if m:  # "shortened 2x shortened X" reads "3x shortened X"
        return f"{int(m.group(1) or 1) + 1}x {word} {m.group(2)}"
    return f"{word} {labels[0]}"


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


def _code_candidates(p: Params, lower: Callable[[Params], int]) -> Iterable[_Candidate]:
    """Every relation that yields a code for cell ``p``, with its guaranteed size."""
    q, n, d = p.q, p.n, p.d
    src = _cell(q, n + 1, d)
    if src is not None:
        yield _Candidate(p, -(-lower(src) // q), "shorten", (src,))
    src = _cell(q, n + 1, d + 1)
    if src is not None:
        yield _Candidate(p, lower(src), "puncture", (src,))
    if q == 2 and d % 2 == 0 and d >= 2:
        src = _cell(q, n - 1, d - 1)
        if src is not None:
            yield _Candidate(p, lower(src), "parity", (src,))
    src = _cell(q, n - 1, d)
    if src is not None:
        yield _Candidate(p, lower(src), "pad", (src,))
    src = _cell(q, n, d + 1)
    if src is not None:
        yield _Candidate(p, lower(src), "relax", (src,))
    if n % 2 == 0:
        a, b = _cell(q, n // 2, (d + 1) // 2), _cell(q, n // 2, d)
        if a is not None and b is not None:
            yield _Candidate(p, lower(a) * lower(b), "u|u+v", (a, b))
    for n1 in range(d, n - d + 1):
        if n1 > n - n1:
            break
        a, b = _cell(q, n1, d), _cell(q, n - n1, d)
        if a is not None and b is not None:
            yield _Candidate(p, lower(a) * lower(b), "direct-sum", (a, b))


def propagate(
    store: Any,
    cells: Iterable[Params],
    *,
    max_words: int = MAX_DERIVED_WORDS,
    chains: bool = True,
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
        Derived codes held as explicit words are not built past this size (linear codes,
        held as generator matrices, have no cap; over q > 2 at most
        :data:`MAX_DERIVED_QARY_WORDS`).
    chains : bool
        Also run the construction library's chains seeded with the stored codes found by
        searches (:func:`codesearch.constructions.table` with ``seeds``).
    progress : callable, optional
        Called with ``{"event": "derived", "kind", "cell", "rule", "value", "label"}`` for
        each entry added.

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
    if table[0].q > 2:
        max_words = min(max_words, MAX_DERIVED_QARY_WORDS)
    view = _StoreView(store, progress)
    rounds = 0
    changed = True
    while changed:
        rounds += 1
        new_codes = sum(_derive_codes(view, p, max_words) for p in table)
        new_bounds = sum(_derive_bounds(view, p) for p in table)
        if chains:
            new_codes += _derive_chains(view, table, max_words)
        changed = bool(new_codes or new_bounds)
    return PropagationSummary(view.codes, view.bounds, rounds)


class _StoreView:
    """The store's best values and codes per cell, cached during one propagation (this module
    is the only writer meanwhile, and it updates the cache with what it writes)."""

    def __init__(self, store: Any, progress: Callable[[dict[str, Any]], None] | None) -> None:
        self.store = store
        self.progress = progress
        self._summary: dict[Params, Any] = {}
        self._upper: dict[Params, tuple[int, int] | None] = {}
        self._codes: dict[int, AnyCode] = {}
        self._linear: dict[Params, bool] = {}
        self.codes = self.bounds = 0

    def summary(self, p: Params) -> Any:
        if p not in self._summary:
            self._summary[p] = self.store.summary(p)
        return self._summary[p]

    def lower(self, p: Params) -> int:
        return self.summary(p).lower

    def label(self, p: Params) -> str:
        s = self.summary(p)
        return code_label(s.lower_provenance, s.lower_method)

    def code(self, p: Params) -> AnyCode:
        """The cell's best stored code as stored (a generator matrix stays one)."""
        cid = self.summary(p).code_id
        if cid not in self._codes:
            self._codes[cid] = self.store.get_stored(cid)[1]
        return self._codes[cid]

    def upper(self, p: Params) -> tuple[int, int] | None:
        """``(bound row id, value)`` of the cell's best stored bound, or None."""
        if p not in self._upper:
            self._upper[p] = self.store.best_upper_row(p)
        return self._upper[p]

    def settled(self, p: Params) -> bool:
        ub = self.upper(p)
        return ub is not None and self.lower(p) >= ub[1]

    def add_code(self, p: Params, code: AnyCode, rule: str, label: str,
                 sources: tuple[Params, ...], method: str | None = None) -> None:
        ids = [self.summary(s).code_id for s in sources]
        before = self.summary(p)
        self.store.add_code(
            code, p, method=method or f"derived:{rule}", status="feasible",
            settings={"rule": rule},
            provenance={"rule": rule, "from": ids, "label": label,
                        "cells": [[s.q, s.n, s.d] for s in sources]},
        )
        self._summary.pop(p, None)
        self._log(before)
        self.codes += 1
        self._told(p, "code", rule, code.size, label)

    def add_bound(self, p: Params, rule: str, value: int, cert: dict[str, Any],
                  srcs: list[Params]) -> None:
        before = self.summary(p)
        bid = self.store.add_bound(
            BoundResult(p, value, f"relation:{rule}", certificate=cert,
                        note=f"{rule} from " + ", ".join(str(s) for s in srcs)),
        )
        self._upper[p] = (bid, value)
        self._summary.pop(p, None)
        self._log(before)
        self.bounds += 1
        self._told(p, "bound", rule, value, None)

    def _log(self, before: Any) -> None:
        """Record the improvement in the store's log (derivations take no search time)."""
        self.store.log_improvements(before, seconds=0.0)

    def _told(self, p: Params, kind: str, rule: str, value: int, label: str | None) -> None:
        if self.progress is not None:
            self.progress({"event": "derived", "kind": kind, "cell": p, "rule": rule,
                           "value": value, "label": label})


def _derive_codes(view: _StoreView, p: Params, max_words: int) -> int:
    """Build and store every relation that beats the cell's best code; the count."""
    added = 0
    for cand in _code_candidates(p, view.lower):
        if cand.size <= view.lower(p) or view.settled(p):
            continue
        srcs = [view.code(s) for s in cand.sources]
        linear = all(isinstance(c, LinearCode) for c in srcs)
        if not linear and cand.size > max_words:
            continue
        code = _RULES[cand.rule][1](srcs)
        if code.size <= view.lower(p):
            continue
        label = _derived_label(cand.rule, [view.label(s) for s in cand.sources])
        view.add_code(p, code, cand.rule, label, cand.sources)
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


def _uses_seed(recipe: tuple) -> bool:
    if recipe and recipe[0] == "seed":
        return True
    return any(isinstance(r, tuple) and _uses_seed(r) for r in recipe[1:])


_SEEDS: dict[tuple, tuple] = {}


def _derive_chains(view: _StoreView, table: list[Params], max_words: int) -> int:
    """Start the construction library's chains from the stored codes found by searches that
    beat its own codes; store each chain that beats a cell (label: the chain's provenance)."""
    from codesearch import constructions

    q = table[0].q
    nmax = max(p.n for p in table)
    plain = constructions.table(q, nmax)
    seeds = []
    for p in table:
        s = view.summary(p)
        if s.code_id is None or _NOT_SEEDS.match(s.lower_method or ""):
            continue
        top = plain.best_at(p.n, p.d)
        if top is not None and top.size >= s.lower:
            continue
        seeds.append((p, s.code_id))
    if not seeds:
        return 0
    key = (q, nmax, tuple(seeds))
    if key not in _SEEDS:
        # The same seeds object each time: the library caches its table per seeds tuple.
        _SEEDS.clear()
        _SEEDS[key] = tuple(op.Built(view.code(p), p.d, view.label(p)) for p, _ in seeds)
    seeded = constructions.table(q, nmax, _SEEDS[key])
    added = 0
    for p in table:
        if view.settled(p):
            continue
        for cand in seeded.candidates(p.n, p.d):
            if cand.size <= view.lower(p):
                break
            if not _uses_seed(cand.recipe) or (not cand.linear and cand.size > max_words):
                continue
            try:
                built = cand.build(max_words)
            except ParameterError:  # an intermediate code past the cap: next route
                continue
            view.add_code(p, built.code, "chain", built.provenance, (),
                          method="derived:chain")
            added += 1
            break
    return added
