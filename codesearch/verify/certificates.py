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
from codesearch.verify.integral import check_distance_enumeration, check_odd_size
from codesearch.verify.lp import check_delsarte_lp, check_delsarte_lp_qcw
from codesearch.verify.profile_lp import check_profile_lp
from codesearch.verify.qary_three_point import check_qary_three_point
from codesearch.verify.relation_chain import check_relation_chain, check_theorem
from codesearch.verify.three_point import check_three_point_certificate

__all__ = ["CERTIFICATE_CHECKERS", "Checker", "check_certificate"]

#: ``f(cert) -> (valid, bound, reason)``; ``bound`` is the integer the certificate proves.
Checker = Callable[[Mapping[str, Any]], tuple[bool, int | None, str]]

#: Certificate kind -> checker. One line per kind.
CERTIFICATE_CHECKERS: dict[str, Checker] = {
    "delsarte-lp": check_delsarte_lp,
    "delsarte-lp-qcw": check_delsarte_lp_qcw,
    "three-point-sdp": check_three_point_certificate,
    "qary-three-point-sdp": check_qary_three_point,
    # these nest certificates of any kind, re-checked through the table's entry point
    "lp-odd-size": lambda cert: check_odd_size(cert, check_certificate),
    "distance-enumeration": lambda cert: check_distance_enumeration(cert, check_certificate),
    "relation-chain": lambda cert: check_relation_chain(cert, check_certificate),
    "profile-lp": lambda cert: check_profile_lp(cert, check_certificate),
    "theorem": check_theorem,
}


def check_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a bound certificate with exact arithmetic.

    Returns
    -------
    (valid, bound, reason)
        ``bound`` is the integer upper bound the certificate proves when valid.

    Raises
    ------
    InputError
        When the certificate is malformed (unknown kind, missing or non-exact fields).
    """
    if not isinstance(cert, Mapping):
        raise InputError("certificate must be a JSON object")
    kind = cert.get("kind")
    checker = CERTIFICATE_CHECKERS.get(kind)  # type: ignore[arg-type]
    if checker is None:
        known = ", ".join(sorted(CERTIFICATE_CHECKERS)) or "none"
        raise InputError(f"unknown certificate kind {kind!r} (known: {known})")
    try:
        return checker(cert)
    except (KeyError, TypeError, ValueError, ZeroDivisionError, AttributeError,
            IndexError) as exc:
        raise InputError(f"malformed {kind} certificate: {exc}") from None
