"""Independent checker of ``"relation-chain"`` and ``"theorem"`` certificates.

A ``relation-chain`` certificate proves ``A_q(n,d) <= value`` from bounds on neighbouring
cells and one elementary relation; each cited bound carries its own certificate (of any
kind, a relation chain included), which is re-checked recursively through
:func:`codesearch.verify.check_certificate`. The relations, re-implemented here with integers
only (nothing is imported from the producers in :mod:`codesearch.bounds` or
:mod:`codesearch.propagate`):

    times-q-shorter  A_q(n,d) <= q A_q(n-1,d)
    longer           A_q(n,d) <= A_q(n+1,d)
    smaller-d        A_q(n,d) <= A_q(n,d-1)
    punctured        A_q(n,d) <= A_q(n-1,d-1)      (d >= 2: puncturing is injective)
    parity-odd       A(n,d)   <= A(n+1,d+1)        (binary, d odd: append the parity bit)

A nested certificate may prove its bound for ``(n+1, d+1)`` when the cited cell is binary
with odd ``d`` (the LP and SDP certificates of odd ``d`` are written for the even cell).

A ``theorem`` certificate names a closed form recomputed here: ``singleton``
(``q^(n-d+1)``) or ``hamming`` (``floor(q^n / V_q(n, floor((d-1)/2)))``).

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, Ch. 1 (sphere packing, shortening, puncturing, parity extension), Ch. 11 (Singleton),
Ch. 17 section 1 (relations between values of A(n,d)).
"""

from __future__ import annotations

import math
from typing import Any, Callable, Mapping

from codesearch.model import MAX_Q
from codesearch.verify import strict

#: the table's entry point, passed in by :mod:`codesearch.verify.certificates` (the nested
#: certificates may be of any kind)
Checker = Callable[[Mapping[str, Any]], tuple[bool, "int | None", str]]

__all__ = ["check_relation_chain", "check_theorem", "MAX_DEPTH"]

#: Deepest nesting accepted (one step per cell of a chain; keeps the recursion within Python's stack).
MAX_DEPTH = 200


def _cell(cert: Any, what: str = "certificate") -> tuple[int, int, int]:
    """The cell ``(q, n, d)`` of a certificate or a citation, read strictly (q <= 36, n <= the
    bounds limit 4096)."""
    strict.mapping(cert, what)
    q = strict.get_int(cert, "q", what, 2, MAX_Q)
    n = strict.get_int(cert, "n", what, 1, 4096)
    d = strict.get_int(cert, "d", what, 1, n)
    return q, n, d


def _value(cert: Mapping[str, Any], what: str = "certificate") -> int:
    return strict.get_int(cert, "value", what, 0, None)


def _rule(rule: str, q: int, n: int, d: int) -> tuple[tuple[int, int, int], int] | None:
    """(cited cell, multiplier) of ``rule`` for target (q, n, d); None if not applicable."""
    if rule == "times-q-shorter":
        cell, mult = (q, n - 1, d), q
    elif rule == "longer":
        cell, mult = (q, n + 1, d), 1
    elif rule == "smaller-d":
        cell, mult = (q, n, d - 1), 1
    elif rule == "punctured":
        cell, mult = (q, n - 1, d - 1), 1
    elif rule == "parity-odd":
        if q != 2 or d % 2 == 0:
            return None
        cell, mult = (q, n + 1, d + 1), 1
    else:
        return None
    if not 1 <= cell[2] <= cell[1]:
        return None
    return cell, mult


def check_theorem(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Recompute a closed-form bound (``singleton`` or ``hamming``) and compare."""
    q, n, d = _cell(cert)
    claimed = _value(cert)
    name = strict.get_str(cert, "theorem", "certificate")
    if name == "singleton":
        proven = q ** (n - d + 1)
    elif name == "hamming":
        t = (d - 1) // 2
        proven = q**n // sum(math.comb(n, i) * (q - 1) ** i for i in range(t + 1))
    else:
        return False, None, f"theorem {name!r} cannot be re-checked from the file"
    if claimed != proven:
        return False, None, f"claimed {claimed} but {name} gives {proven}"
    return True, claimed, f"{name} bound A_{q}({n},{d}) <= {proven}"


def check_relation_chain(cert: Mapping[str, Any], check: Checker, _depth: int = 0
                         ) -> tuple[bool, int | None, str]:
    """Re-check a ``relation-chain`` certificate and every certificate it cites.

    Returns
    -------
    (valid, bound, reason)
    """
    if _depth > MAX_DEPTH:
        return False, None, "relation chain nested too deeply"
    q, n, d = _cell(cert)
    claimed = _value(cert)
    rule = strict.get_str(cert, "rule", "certificate")
    spec = _rule(rule, q, n, d)
    if spec is None:
        return False, None, f"rule {strict.short(rule)} does not apply to A_{q}({n},{d})"
    cell, mult = spec
    cites = strict.get_list(cert, "cites", "certificate", 1)
    if len(cites) != 1:
        return False, None, "a relation cites exactly one cell"
    cite = cites[0]
    if _cell(cite, "certificate: cites[0]") != cell:
        return False, None, (f"rule {rule} needs A_{cell[0]}({cell[1]},{cell[2]}), "
                             f"cited {_cell(cite)}")
    used = _value(cite, "certificate: cites[0]")
    inner = strict.field(cite, "certificate", "certificate: cites[0]")
    if not isinstance(inner, Mapping):
        return False, None, "cited bound has no certificate"
    where = _cell(inner, "certificate: cites[0].certificate")
    cq, cn, cd = cell
    if where != cell and not (cq == 2 and cd % 2 == 1 and where == (2, cn + 1, cd + 1)):
        return False, None, f"cited certificate is for {where}, not {cell}"
    if inner.get("kind") == "relation-chain":
        ok, bound, why = check_relation_chain(inner, check, _depth + 1)
    else:
        ok, bound, why = check(inner)
    if not ok or bound is None:
        return False, None, f"cited A_{cq}({cn},{cd}): {why}"
    if bound > used:
        return False, None, f"cited A_{cq}({cn},{cd}) <= {used} but its certificate proves {bound}"
    proven = mult * used
    if claimed != proven:
        return False, None, f"claimed {claimed} but {rule} gives {proven}"
    return True, claimed, f"A_{q}({n},{d}) <= {proven} by {rule} from A_{cq}({cn},{cd}) <= {used}"
