"""Checks of upper bounds derived between cells of a table (certificate kind ``cell-relation``).

A derived bound cites stored bounds of other cells and names the rule that turns them into a
bound on its own cell. The rules are elementary relations between values of A_q(n,d), pure
integer arithmetic (rule names as stored):

times-q-shorter  A_q(n,d) <= q A_q(n-1,d)  (the words with the most frequent symbol at one
                 coordinate, that coordinate deleted, form a code of length n-1);
longer           A_q(n,d) <= A_q(n+1,d);
smaller-d        A_q(n,d) <= A_q(n,d-1);
punctured        A_q(n,d) <= A_q(n-1,d-1)   (puncturing is injective when d >= 2);
parity-odd       binary, d odd: A(n,d) <= A(n+1,d+1) (parity extension).

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, Ch. 1 and Ch. 17 section 1 (elementary relations between values of A(n,d)).
"""

from __future__ import annotations

from typing import Any, Callable, Mapping

from codesearch.errors import VerificationError
from codesearch.model import Params

__all__ = ["RELATION_RULES", "relation_cells", "relation_value", "check_cell_relation"]

#: The rules, in the order a table run tries them.
RELATION_RULES = ("times-q-shorter", "longer", "smaller-d", "punctured", "parity-odd")


def _cell(q: int, n: int, d: int) -> Params | None:
    return Params(q, n, d) if n >= 1 and 1 <= d <= n else None


def relation_cells(rule: str, p: Params) -> list[Params] | None:
    """The cells whose upper bounds ``rule`` uses to bound cell ``p`` (None: the rule does not
    apply)."""
    q, n, d = p.q, p.n, p.d
    if rule == "times-q-shorter":
        c = _cell(q, n - 1, d)
    elif rule == "longer":
        c = _cell(q, n + 1, d)
    elif rule == "smaller-d":
        c = _cell(q, n, d - 1) if d >= 2 else None
    elif rule == "punctured":
        c = _cell(q, n - 1, d - 1) if d >= 2 else None
    elif rule == "parity-odd":
        c = _cell(q, n + 1, d + 1) if q == 2 and d % 2 == 1 else None
    else:
        return None
    return None if c is None else [c]


def relation_value(rule: str, p: Params, cited: list[tuple[Params, int]]) -> int | None:
    """Upper bound on cell ``p`` that ``rule`` gives from the cited ``(cell, bound)`` pairs.

    Returns None when the rule does not apply or the cited cells are not the ones it needs.
    """
    cells = relation_cells(rule, p)
    if cells is None or [c for c, _ in cited] != cells:
        return None
    value = int(cited[0][1])
    return p.q * value if rule == "times-q-shorter" else value


#: ``lookup(bound_id) -> (q, n, d, value, certified)`` of a stored bound, or None.
BoundLookup = Callable[[int], "tuple[int, int, int, int, bool] | None"]


def check_cell_relation(p: Params, value: int, cert: Mapping[str, Any],
                        lookup: BoundLookup) -> None:
    """Raise :class:`VerificationError` unless ``cert`` proves ``A(p) <= value``.

    ``cert`` is ``{"kind": "cell-relation", "rule": ..., "cites": [{"q", "n", "d",
    "bound_id", "value"}, ...]}``; every cited bound must exist (``lookup``), be certified and
    match what the certificate says of it.
    """
    from codesearch.verify import strict

    cited = []
    for j, ref in enumerate(strict.get_list(cert, "cites", "relation", 4)):
        where = f"relation: cites[{j}]"
        strict.mapping(ref, where)
        for key in ("q", "n", "d", "value"):
            strict.get_int(ref, key, where, 0, None)
        row = lookup(strict.get_int(ref, "bound_id", where, 0, None))
        if row is None or not row[4]:
            raise VerificationError(f"relation for {p} cites a missing or uncertified bound")
        if (row[0], row[1], row[2]) != (ref["q"], ref["n"], ref["d"]) or row[3] != ref["value"]:
            raise VerificationError(f"relation for {p} cites bound {ref['bound_id']} wrongly")
        cited.append((Params(row[0], row[1], row[2]), int(row[3])))
    rule = strict.get_str(cert, "rule", "relation")
    implied = relation_value(rule, p, cited)
    if implied is None or implied > int(value):
        raise VerificationError(f"relation {cert.get('rule')!r} does not give {value} for {p}")
