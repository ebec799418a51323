"""Upper bounds on a grid of cells, improved by the relations between neighbouring cells.

Problem
-------
The bounds of one cell (:func:`codesearch.bounds.all_bounds`) ignore what the neighbouring
cells know. Across a grid the elementary relations between values of ``A_q(n,d)``

    times-q-shorter  A_q(n,d) <= q A_q(n-1,d)     (the words with the most frequent symbol
                                                    at one coordinate, shortened there)
    longer           A_q(n,d) <= A_q(n+1,d)       (append a fixed symbol)
    smaller-d        A_q(n,d) <= A_q(n,d-1)
    punctured        A_q(n,d) <= A_q(n-1,d-1)     (puncturing is injective for d >= 2)
    parity-odd       A(n,d) <= A(n+1,d+1), binary odd d (append the parity bit)

carry a good bound from one cell to the next (for example A(18,4) <= 2 A(17,4) = 6552, below
every bound computed at length 18 alone). :func:`grid_bounds` applies them to a fixed point
(values are integers that only decrease) and records, for every cell it improves, the rule
and the cited cells with their values. The rule arithmetic is :mod:`codesearch.propagate`'s
(shared with table runs); :func:`relation_certificate` writes a self-contained certificate
of kind ``"relation-chain"`` (the rule, and for each cited cell its own certificate, nested
to any depth) that :mod:`codesearch.verify.relation_chain` re-checks from the file alone.

Only bounds whose justification a checker can redo from the file enter the relations: the
certified computed bounds (LP, SDP) and the closed forms the relation checker recomputes
itself (Singleton, sphere packing). The least bound of a cell may still be another closed
form; it is reported as the cell's own bound, and relations start from the certifiable one.

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, Ch. 1 (shortening, puncturing, the parity extension) and Ch. 17 section 1 (the
elementary relations between values of A(n,d), e.g. Theorem 17.1's A(n,d) <= 2 A(n-1,d)).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Iterable

from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = ["CellBound", "grid_bounds", "relation_certificate", "RECHECKED_THEOREMS",
           "certificate_of"]

#: Closed forms the relation checker recomputes itself (so a chain may cite them).
RECHECKED_THEOREMS = frozenset({"singleton", "hamming"})


@dataclass(frozen=True)
class CellBound:
    """The bounds of one cell of a grid after the cell relations.

    Attributes
    ----------
    params : Params
        The cell.
    bounds : dict of str to BoundResult
        Everything :func:`codesearch.bounds.all_bounds` found for the cell itself.
    upper : BoundResult
        The least usable bound: the cell's own, or a relation (``method`` ``"relation:RULE"``,
        certificate kind ``"relation-chain"`` without the nested certificates, see
        :func:`relation_certificate`).
    cites : tuple of (Params, int)
        For a relation: the cited cells and the values used; empty otherwise.
    chain : BoundResult or None
        The least bound a certificate can back when a relation gave it (it may be above
        ``upper`` when a closed form the checker cannot redo wins the cell).
    """

    params: Params
    bounds: dict = field(hash=False)
    upper: BoundResult
    cites: tuple = ()
    chain: BoundResult | None = None

    @property
    def kind(self) -> str:
        """Certificate kind of the upper bound (``"theorem"`` for a closed form)."""
        cert = self.upper.certificate
        return "theorem" if cert is None else str(cert.get("kind", "certificate"))


def _checkable(bounds: dict[str, BoundResult]) -> BoundResult | None:
    """The least usable bound a relation certificate can cite (see the module notes)."""
    ok = [b for b in bounds.values() if b.usable
          and (b.certificate is not None or b.method in RECHECKED_THEOREMS)]
    return min(ok, key=lambda b: b.value) if ok else None


def grid_bounds(cells: Iterable[Params], compute: Callable[[Params], dict[str, BoundResult]],
                *, relations: bool = True) -> dict[Params, CellBound]:
    """Bounds of every cell, then the cell relations across the grid to a fixed point.

    Parameters
    ----------
    cells : iterable of Params
        The grid (any set of cells; relations only cite cells of the grid).
    compute : callable
        ``compute(params) -> dict`` of the cell's own bounds (e.g. ``all_bounds`` with fixed
        options).
    relations : bool
        Apply the relations (False: each cell's own least bound).

    Returns
    -------
    dict of Params to CellBound
    """
    from codesearch.bounds import least_usable
    from codesearch.verify.relations import RELATION_RULES as BOUND_RULES, relation_cells, relation_value

    grid = sorted(set(cells))
    own = {p: compute(p) for p in grid}
    best = {p: least_usable(own[p]) for p in grid}
    # value a relation may use: the certifiable bound, then whatever relations derive
    usable = {p: _checkable(own[p]) for p in grid}
    value = {p: (None if b is None else b.value) for p, b in usable.items()}
    chosen: dict[Params, tuple[str, list[tuple[Params, int]]]] = {}
    changed = relations
    while changed:
        changed = False
        for p in grid:
            for rule in BOUND_RULES:
                srcs = relation_cells(rule, p)
                if not srcs or any(s not in value or value[s] is None for s in srcs):
                    continue
                cited = [(s, value[s]) for s in srcs]
                v = relation_value(rule, p, cited)
                if v is None or (value[p] is not None and v >= value[p]):
                    continue
                value[p] = v
                chosen[p] = (rule, cited)
                changed = True
    # At the fixed point every chosen relation cites the final value of its cells (a later
    # decrease of a cited cell would have lowered the citing cell again).
    out = {}
    for p in grid:
        chain = None
        if p in chosen:
            rule, cited = chosen[p]
            cert = {"kind": "relation-chain", "q": p.q, "n": p.n, "d": p.d, "value": value[p],
                    "rule": rule,
                    "cites": [{"q": s.q, "n": s.n, "d": s.d, "value": v} for s, v in cited]}
            chain = BoundResult(p, value[p], f"relation:{rule}", certificate=cert,
                                note=f"{rule} from " + ", ".join(
                                    f"A({s.n},{s.d}) <= {v}" for s, v in cited))
        if chain is not None and chain.value < best[p].value:
            out[p] = CellBound(p, own[p], chain, tuple(chosen[p][1]), chain)
        else:
            out[p] = CellBound(p, own[p], best[p], (), chain)
    return out


def certificate_of(cell: CellBound, grid: dict[Params, CellBound]) -> dict | None:
    """Self-contained certificate of the cell's upper bound.

    For a closed form that no checker recomputes, the certificate of a computed bound of the
    same value; None when there is none.
    """
    up = cell.upper
    if up.certificate is not None and up.certificate.get("kind") == "relation-chain":
        return relation_certificate(up, grid)
    if up.certificate is not None:
        return dict(up.certificate)
    if up.method in RECHECKED_THEOREMS:
        p = up.params
        return {"kind": "theorem", "theorem": up.method, "q": p.q, "n": p.n, "d": p.d,
                "value": up.value}
    # another closed form: a computed bound of the same value stands in (the LP implies
    # most closed forms; None when none reaches the value)
    same = [b for b in cell.bounds.values()
            if b.usable and b.certificate is not None and b.value == up.value]
    return dict(same[0].certificate) if same else None


def _cited_certificate(p: Params, v: int, grid: dict[Params, CellBound]) -> dict:
    cell = grid[p]
    if cell.chain is not None and cell.chain.value == v:
        return relation_certificate(cell.chain, grid)
    own = _checkable(cell.bounds)
    if own is not None and own.value == v:
        if own.certificate is not None:
            return dict(own.certificate)
        return {"kind": "theorem", "theorem": own.method, "q": p.q, "n": p.n, "d": p.d,
                "value": own.value}
    raise AssertionError(f"no certificate for the value {v} cited at {p}")


def relation_certificate(bound: BoundResult, grid: dict[Params, CellBound]) -> dict:
    """The ``"relation-chain"`` certificate of a relation bound with every cited certificate
    nested (recursively), ready for :func:`codesearch.verify.check_certificate`."""
    cert = dict(bound.certificate)
    cert["cites"] = [dict(c, certificate=_cited_certificate(Params(c["q"], c["n"], c["d"]),
                                                            c["value"], grid))
                     for c in cert["cites"]]
    return cert
