"""The table of certificate checkers and the one entry point :func:`check_certificate`.

A computed bound (a linear or semidefinite program) carries a JSON-ready certificate with a
``kind``. Each kind has one checker ``f(cert) -> (valid, bound, reason)`` in its own module of
this package; it rebuilds every coefficient itself from ``(q, n, d)`` with Python integers and
:class:`fractions.Fraction`, and shares no code with the producer in :mod:`codesearch.bounds`.
A new kind is one module plus one line in :data:`CERTIFICATE_CHECKERS`.
"""

from __future__ import annotations

from typing import Any, Callable, Mapping

from codesearch.errors import InputError
from codesearch.model import MAX_Q
from codesearch.verify import strict
from codesearch.verify.four_point import check_four_point_certificate, check_four_point_size_cut
from codesearch.verify.integral import (check_distance_enumeration, check_odd_size,
                                        check_size_mod_4)
from codesearch.verify.lp import check_delsarte_lp, check_delsarte_lp_qcw
from codesearch.verify.profile_lp import check_profile_lp
from codesearch.verify.qary_three_point import check_qary_three_point
from codesearch.verify.relation_chain import check_relation_chain, check_theorem
from codesearch.verify.three_point import check_three_point_certificate

__all__ = ["CERTIFICATE_CHECKERS", "Checker", "check_certificate", "binding_problem",
           "certificate_cell"]

#: ``f(cert) -> (valid, bound, reason)``; ``bound`` is the integer the certificate proves.
Checker = Callable[[Mapping[str, Any]], tuple[bool, int | None, str]]

#: Certificate kind -> checker. One line per kind.
CERTIFICATE_CHECKERS: dict[str, Checker] = {
    "delsarte-lp": check_delsarte_lp,
    "delsarte-lp-qcw": check_delsarte_lp_qcw,
    "three-point-sdp": check_three_point_certificate,
    "qary-three-point-sdp": check_qary_three_point,
    "four-point-sdp": check_four_point_certificate,
    # these nest certificates of any kind, re-checked through the table's entry point
    "four-point-size-cut": lambda cert: check_four_point_size_cut(cert, check_certificate),
    "lp-odd-size": lambda cert: check_odd_size(cert, check_certificate),
    "lp-size-mod-4": lambda cert: check_size_mod_4(cert, check_certificate),
    "distance-enumeration": lambda cert: check_distance_enumeration(cert, check_certificate),
    "relation-chain": lambda cert: check_relation_chain(cert, check_certificate),
    "profile-lp": lambda cert: check_profile_lp(cert, check_certificate),
    "theorem": check_theorem,
}


def certificate_cell(cert: Mapping[str, Any]) -> tuple[int, int, int]:
    """The cell ``(q, n, d)`` a certificate states, read strictly."""
    strict.mapping(cert, "certificate")
    q = strict.get_int(cert, "q", "certificate", 2, MAX_Q)
    n = strict.get_int(cert, "n", "certificate", 1, 4096)
    return q, n, strict.get_int(cert, "d", "certificate", 1, n)


def _cell_text(cell: tuple[int, int, int]) -> str:
    q, n, d = cell
    return f"A({n},{d})" if q == 2 else f"A_{q}({n},{d})"


def binding_problem(cert: Mapping[str, Any], cell: tuple[int, int, int] | Any,
                    kind: str | None = None) -> str | None:
    """Why ``cert`` cannot stand for the upper bound of ``cell`` (a ``Params`` or ``(q, n, d)``),
    or None when it can.

    A certificate is bound to the cell it states: the same ``(q, n, d)``, or, for a binary
    cell of odd ``d``, the even cell ``(2, n+1, d+1)`` (``A(n,d) = A(n+1,d+1)`` by parity
    extension and puncturing). With ``kind``, the certificate's kind must be that one too.
    """
    want = tuple(int(v) for v in (cell if isinstance(cell, tuple) else (cell.q, cell.n, cell.d)))
    have = certificate_cell(cert)
    q, n, d = want
    if have != want and not (q == 2 and d % 2 == 1 and have == (2, n + 1, d + 1)):
        return f"certificate is for {_cell_text(have)}, not {_cell_text(want)}"  # type: ignore
    if kind is not None and cert.get("kind") != kind:
        return f"certificate is of kind {strict.short(cert.get('kind'))}, not {kind}"
    return None


def check_certificate(cert: Mapping[str, Any], cell: Any = None, *, kind: str | None = None
                      ) -> tuple[bool, int | None, str]:
    """Re-check a bound certificate with exact arithmetic.

    Parameters
    ----------
    cert : Mapping
        The certificate (a decoded JSON object).
    cell : Params or (q, n, d), optional
        The cell the certificate is offered for: a certificate for another cell (see
        :func:`binding_problem`) is refused (``valid`` False) before it is checked.
    kind : str, optional
        The kind it is offered as (refused when different).

    Returns
    -------
    (valid, bound, reason)
        ``bound`` is the integer upper bound the certificate proves when valid.

    Raises
    ------
    InputError
        When the certificate is malformed (unknown kind, missing, mistyped or non-exact
        fields) or its check would pass the caps of :mod:`codesearch.verify.strict` (said
        before the work starts).
    """
    strict.mapping(cert, "certificate")
    kind_name = cert.get("kind")
    if not isinstance(kind_name, str) or kind_name not in CERTIFICATE_CHECKERS:
        known = ", ".join(sorted(CERTIFICATE_CHECKERS)) or "none"
        raise InputError(f"unknown certificate kind {strict.short(kind_name)} (known: {known})")
    if cell is not None or kind is not None:
        problem = binding_problem(cert, cell, kind) if cell is not None else (
            None if kind_name == kind else f"certificate is of kind {kind_name}, not {kind}")
        if problem is not None:
            return False, None, problem
    try:
        return CERTIFICATE_CHECKERS[kind_name](cert)
    except (KeyError, TypeError, ValueError, ZeroDivisionError, AttributeError,
            IndexError, RecursionError, OverflowError) as exc:
        # defence in depth: the checkers read their fields strictly, so this is a bug there
        msg = str(exc).splitlines()[0][:80] if str(exc) else type(exc).__name__
        raise InputError(f"malformed {kind_name} certificate: {msg}") from None
