"""Independent checks of codes and bound certificates.

(Foundation work in progress: the fast packed kernel replaces the numpy path below.)
"""

from __future__ import annotations

from fractions import Fraction
from functools import lru_cache
from typing import Any, Callable, Mapping

import numpy as np

from codesearch.errors import InputError, VerificationError
from codesearch.model import Code, Params

__all__ = ["assert_code", "min_distance", "check_certificate", "load_certificate",
           "run_certificate_check", "CERTIFICATE_CHECKERS"]


def min_distance(code: Code) -> int:
    """Minimum Hamming distance over distinct pairs (n + 1 for codes of size < 2)."""
    w = code.words
    best = code.n + 1
    for i in range(code.size - 1):
        dist = (w[i + 1 :] != w[i]).sum(axis=1)
        if dist.size:
            best = min(best, int(dist.min()))
    return best


def assert_code(code: Code, params: Params) -> None:
    """Raise :class:`VerificationError` unless ``code`` is a code of cell ``params``."""
    if code.q != params.q or code.n != params.n:
        raise VerificationError(
            f"code has q={code.q}, n={code.n}; expected q={params.q}, n={params.n}"
        )
    if code.size >= 2 and min_distance(code) < params.d:
        raise VerificationError(f"code has minimum distance below d={params.d}")


def check_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a bound certificate with exact arithmetic.

    Returns ``(valid, bound, reason)``; dispatches on ``cert["kind"]`` through
    :data:`CERTIFICATE_CHECKERS`. ``bound`` is the integer the certificate proves (None when
    invalid). A malformed certificate raises :class:`~codesearch.errors.InputError`.
    """
    if not isinstance(cert, Mapping) or "kind" not in cert:
        raise InputError("certificate: not a JSON object with a 'kind' key")
    checker = CERTIFICATE_CHECKERS.get(cert["kind"])
    if checker is None:
        raise InputError(f"certificate: unknown kind {cert['kind']!r}")
    return checker(cert)


# ======================================================================= delsarte-lp certificates
# Written apart from codesearch.bounds (no shared code): Krawtchouk values come from the
# generating function prod (1 + (q-1) z)^(n-x) (1 - z)^x, binomials from math.comb, and every
# comparison is between Python integers after clearing one common denominator.


@lru_cache(maxsize=64)
def _kraw_columns(q: int, n: int) -> tuple[tuple[int, ...], ...]:
    """``T[x][k] = K_k(x)`` from the generating function, recursively in x.

    Multiplying ``G_x(z) = sum_k K_k(x) z^k`` by ``(1 - z) / (1 + (q-1) z)`` gives
    ``G_{x+1}``, i.e. ``K_k(x+1) = K_k(x) - K_{k-1}(x) - (q-1) K_{k-1}(x+1)``.
    """
    from math import comb

    cur = [comb(n, k) * (q - 1) ** k for k in range(n + 1)]
    table = [tuple(cur)]
    for _ in range(n):
        nxt = [0] * (n + 1)
        nxt[0] = cur[0]
        for k in range(1, n + 1):
            nxt[k] = cur[k] - cur[k - 1] - (q - 1) * nxt[k - 1]
        table.append(tuple(nxt))
        cur = nxt
    return tuple(table)


@lru_cache(maxsize=None)
def _cw_cap(n: int, delta: int, w: int) -> int:
    """Upper bound on binary constant-weight codes A(n, 2 delta, w).

    Johnson: A(n, 2δ, w) <= floor(n/w * A(n-1, 2δ, w-1)); complements: weight w and n-w give
    the same codes; a single word when w < δ (two weight-w words are within 2w < 2δ).
    """
    if w > n or w < 0:
        return 0
    if n - w < w:
        w = n - w
    if w < delta:
        return 1
    return n * _cw_cap(n - 1, delta, w - 1) // w


def _extra_row(family: str, index: int, n: int, d: int) -> tuple[dict[int, int], int]:
    """Rebuild one extra inequality ``sum_i a_i A_i <= b`` for binary (n, d)."""
    from math import comb

    if family == "constant-weight":
        if not d <= index <= n:
            raise InputError(f"certificate: constant-weight index {index} outside {d}..{n}")
        return {index: 1}, min(_cw_cap(n, (d + 1) // 2, index), comb(n, index))
    if family == "antipodal-ball":
        r = (d - 1) // 2
        return {i: 1 for i in range(n - r, n + 1)}, 1
    if family == "antipodal-shell":
        if d % 2:
            raise InputError("certificate: antipodal-shell needs even d")
        s = d // 2
        per = n // s
        row = {n - s: 1}
        row.update({i: per for i in range(n - s + 1, n + 1)})
        return row, per
    raise InputError(f"certificate: unknown extra family {family!r}")


def _parse_fraction(text: Any, what: str) -> Fraction:
    """Parse ``"p/q"`` or ``"p"`` (decimal integers, q > 0) exactly."""
    if not isinstance(text, str):
        raise InputError(f"certificate: {what} must be a string 'p/q', got {text!r}")
    num, _, den = text.partition("/")
    try:
        p = int(num)
        q = int(den) if den else 1
    except ValueError:
        raise InputError(f"certificate: {what} is not a rational 'p/q': {text!r}") from None
    if q <= 0:
        raise InputError(f"certificate: {what} needs a positive denominator: {text!r}")
    return Fraction(p, q)


def _check_delsarte_lp(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp`` certificate: y >= 0 (and z >= 0) with, for every allowed i >= d,
    ``sum_k y_k K_k(i) - sum_j z_j a_ji <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) +
    sum_j z_j b_j``. Integer arithmetic only (one common denominator)."""
    from math import lcm

    for key in ("q", "n", "d", "even", "y", "bound"):
        if key not in cert:
            raise InputError(f"certificate: missing key {key!r}")
    q, n, d, even = cert["q"], cert["n"], cert["d"], cert["even"]
    for name, v in (("q", q), ("n", n), ("d", d)):
        if isinstance(v, bool) or not isinstance(v, int):
            raise InputError(f"certificate: {name} must be an integer")
    if not isinstance(even, bool):
        raise InputError("certificate: even must be true or false")
    if not (2 <= q <= 1 << 16 and 1 <= d <= n <= 4096):
        raise InputError(f"certificate: parameters q={q}, n={n}, d={d} out of range")
    ys = cert["y"]
    if not isinstance(ys, list) or len(ys) != n:
        raise InputError(f"certificate: y must be a list of n={n} rationals")
    y = [_parse_fraction(t, f"y[{k + 1}]") for k, t in enumerate(ys)]
    claimed = _parse_fraction(cert["bound"], "bound")
    extras_in = cert.get("extra", [])
    if not isinstance(extras_in, list):
        raise InputError("certificate: extra must be a list")
    if even and (q != 2 or d % 2):
        return False, None, "even-distance restriction is only valid for q = 2 and even d"
    if extras_in and q != 2:
        return False, None, "extra inequalities are only defined for q = 2"
    rows: list[tuple[dict[int, int], int, Fraction]] = []
    for j, e in enumerate(extras_in):
        if not isinstance(e, Mapping) or not {"family", "index", "z"} <= set(e):
            raise InputError(f"certificate: extra[{j}] needs family, index, z")
        if isinstance(e["index"], bool) or not isinstance(e["index"], int):
            raise InputError(f"certificate: extra[{j}].index must be an integer")
        coeffs, rhs = _extra_row(str(e["family"]), e["index"], n, d)
        rows.append((coeffs, rhs, _parse_fraction(e["z"], f"extra[{j}].z")))
    if any(v < 0 for v in y) or any(z < 0 for (_, _, z) in rows):
        return False, None, "a dual multiplier is negative"
    L = lcm(*(v.denominator for v in y), *(z.denominator for (_, _, z) in rows))
    Y = [v.numerator * (L // v.denominator) for v in y]
    Z = [z.numerator * (L // z.denominator) for (_, _, z) in rows]
    T = _kraw_columns(q, n)
    for i in range(d, n + 1):
        if even and i % 2:
            continue
        Ti = T[i]
        total = sum(Y[k - 1] * Ti[k] for k in range(1, n + 1) if Y[k - 1])
        total -= sum(Zj * coeffs.get(i, 0) for Zj, (coeffs, _, _) in zip(Z, rows))
        if total > -L:
            return False, None, f"dual constraint fails at distance i={i}"
    value = Fraction(L + sum(Y[k - 1] * T[0][k] for k in range(1, n + 1))
                     + sum(Zj * rhs for Zj, (_, rhs, _) in zip(Z, rows)), L)
    if value != claimed:
        return False, None, f"bound is {value}, certificate claims {claimed}"
    bound = value.numerator // value.denominator
    return True, bound, f"A_{q}({n},{d}) <= {bound}" + (" (even distances)" if even else "")


def load_certificate(path: str) -> dict[str, Any] | None:
    """The JSON object in ``path`` if it looks like a certificate (has ``kind``), else None.

    Lets ``codesearch check FILE`` recognise a certificate by content, not by name.
    """
    import json

    try:
        with open(path, encoding="utf-8") as fh:
            text = fh.read()
    except OSError as exc:
        raise InputError(f"{path}: cannot read ({exc.strerror})") from None
    if not text.lstrip().startswith("{"):
        return None
    try:
        obj = json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"{path}:{exc.lineno}: malformed JSON ({exc.msg})") from None
    return obj if isinstance(obj, dict) and "kind" in obj else None


def run_certificate_check(cert: Mapping[str, Any], *, as_json: bool = False) -> int:
    """Check a certificate and print the verdict; exit status 0 valid, 1 invalid.

    A malformed certificate raises :class:`InputError` (the CLI maps it to status 2).
    """
    import json

    valid, bound, reason = check_certificate(cert)
    if as_json:
        print(json.dumps({"kind": cert["kind"], "valid": valid, "bound": bound, "reason": reason}))
    else:
        print(f"{cert['kind']} certificate {'VALID' if valid else 'INVALID'}: {reason}")
    return 0 if valid else 1


#: Certificate kind -> checker returning ``(valid, bound, reason)``.
CERTIFICATE_CHECKERS: dict[str, Callable[[Mapping[str, Any]], tuple[bool, int | None, str]]] = {
    "delsarte-lp": _check_delsarte_lp,
}
