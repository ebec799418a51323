"""Checkers of Delsarte linear-programming certificates (kinds ``delsarte-lp``,
``delsarte-lp-qcw``).

A certificate is a dual feasible vector in exact rationals. The checker rebuilds every
coefficient itself, apart from :mod:`codesearch.bounds` (no shared code): Krawtchouk values
come from the generating function ``(1 + (q-1) z)^(n-x) (1 - z)^x``, binomials from
:func:`math.comb`, and every comparison is between Python integers after clearing one common
denominator.

References
----------
P. Delsarte, "An algebraic approach to the association schemes of coding theory", Philips
Res. Rep. Suppl. 10 (1973).
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, ch. 17 (the linear programming bound and its extra inequalities).
"""

from __future__ import annotations

import math
from fractions import Fraction
from functools import lru_cache
from typing import Any, Mapping

from codesearch.errors import InputError
from codesearch.verify.exact import rational_field

__all__ = ["check_delsarte_lp", "check_delsarte_lp_qcw"]


@lru_cache(maxsize=64)
def _kraw_columns(q: int, n: int) -> tuple[tuple[int, ...], ...]:
    """``T[x][k] = K_k(x)`` from the generating function, recursively in x.

    Multiplying ``G_x(z) = sum_k K_k(x) z^k`` by ``(1 - z) / (1 + (q-1) z)`` gives
    ``G_{x+1}``, i.e. ``K_k(x+1) = K_k(x) - K_{k-1}(x) - (q-1) K_{k-1}(x+1)``.
    """
    cur = [math.comb(n, k) * (q - 1) ** k for k in range(n + 1)]
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
    if family == "constant-weight":
        if not d <= index <= n:
            raise InputError(f"certificate: constant-weight index {index} outside {d}..{n}")
        return {index: 1}, min(_cw_cap(n, (d + 1) // 2, index), math.comb(n, index))
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


def _lp_certificate_head(cert: Mapping[str, Any], more: tuple[str, ...]
                         ) -> tuple[int, int, int, list[Fraction], Fraction]:
    """Parse the part every LP certificate shares: ``(q, n, d, y, bound)``.

    Raises :class:`InputError` for a missing key (``q n d y bound`` and ``more``), non-integer
    or out-of-range parameters, or a ``y`` that is not a list of n rationals.
    """
    for key in ("q", "n", "d", *more, "y", "bound"):
        if key not in cert:
            raise InputError(f"certificate: missing key {key!r}")
    q, n, d = cert["q"], cert["n"], cert["d"]
    for name, v in (("q", q), ("n", n), ("d", d)):
        if isinstance(v, bool) or not isinstance(v, int):
            raise InputError(f"certificate: {name} must be an integer")
    if not (2 <= q <= 1 << 16 and 1 <= d <= n <= 4096):
        raise InputError(f"certificate: parameters q={q}, n={n}, d={d} out of range")
    ys = cert["y"]
    if not isinstance(ys, list) or len(ys) != n:
        raise InputError(f"certificate: y must be a list of n={n} rationals")
    y = [rational_field(t, f"y[{k + 1}]") for k, t in enumerate(ys)]
    return q, n, d, y, rational_field(cert["bound"], "bound")


def check_delsarte_lp(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp`` certificate: y >= 0 (and z >= 0) with, for every allowed i >= d,
    ``sum_k y_k K_k(i) - sum_j z_j a_ji <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) +
    sum_j z_j b_j``. Integer arithmetic only (one common denominator)."""
    q, n, d, y, claimed = _lp_certificate_head(cert, ("even",))
    even = cert["even"]
    if not isinstance(even, bool):
        raise InputError("certificate: even must be true or false")
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
        rows.append((coeffs, rhs, rational_field(e["z"], f"extra[{j}].z")))
    if any(v < 0 for v in y) or any(z < 0 for (_, _, z) in rows):
        return False, None, "a dual multiplier is negative"
    L = math.lcm(*(v.denominator for v in y), *(z.denominator for (_, _, z) in rows))
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


# ===================================================================== delsarte-lp-qcw
# Delsarte's LP for q-ary codes with the constant-weight inequalities A_i <= B_q(n, d, i)
# (see codesearch.bounds.delsarte.qary_extra_inequalities for the proof). The caps are
# rebuilt here by their own recursion; Krawtchouk values come from _kraw_columns above.


@lru_cache(maxsize=None)
def _qcw_cap(q: int, n: int, d: int, w: int) -> int:
    """q-ary constant-weight bound: the least of C(n,w)(q-1)^w, n(q-1)B(n-1,w-1)/w and
    n B(n-1,w)/(n-w) (floors); 1 when w = 0 or two weight-w words cannot be d apart."""
    if w < 0 or w > n:
        return 0
    if w == 0 or 2 * w < d or n < d:
        return 1
    caps = [math.comb(n, w) * (q - 1) ** w, (n * (q - 1) * _qcw_cap(q, n - 1, d, w - 1)) // w]
    if n > w:
        caps.append((n * _qcw_cap(q, n - 1, d, w)) // (n - w))
    return min(caps)


def check_delsarte_lp_qcw(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp-qcw`` certificate: y >= 0, z >= 0 with, for every i = d..n,
    ``sum_k y_k K_k(i) - z_i <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) + sum_i z_i
    B_q(n, d, i)``. Integer arithmetic after clearing one common denominator."""
    q, n, d, y, claimed = _lp_certificate_head(cert, ("extra",))
    if not isinstance(cert["extra"], list):
        raise InputError("certificate: extra must be a list")
    z: dict[int, Fraction] = {}
    for j, e in enumerate(cert["extra"]):
        if not isinstance(e, Mapping) or not {"index", "z"} <= set(e):
            raise InputError(f"certificate: extra[{j}] needs index and z")
        if e.get("family", "constant-weight") != "constant-weight":
            return False, None, f"extra[{j}]: unknown family {e.get('family')!r}"
        i = e["index"]
        if isinstance(i, bool) or not isinstance(i, int) or not d <= i <= n or i in z:
            raise InputError(f"certificate: extra[{j}].index must be a new integer in {d}..{n}")
        z[i] = rational_field(e["z"], f"extra[{j}].z")
    if any(v < 0 for v in y) or any(v < 0 for v in z.values()):
        return False, None, "a dual multiplier is negative"
    L = math.lcm(*(v.denominator for v in y), *(v.denominator for v in z.values()))
    Y = [v.numerator * (L // v.denominator) for v in y]
    Z = {i: v.numerator * (L // v.denominator) for i, v in z.items()}
    T = _kraw_columns(q, n)
    for i in range(d, n + 1):
        total = sum(Y[k - 1] * T[i][k] for k in range(1, n + 1) if Y[k - 1]) - Z.get(i, 0)
        if total > -L:
            return False, None, f"dual constraint fails at distance i={i}"
    num = L + sum(Y[k - 1] * T[0][k] for k in range(1, n + 1))
    num += sum(Zi * _qcw_cap(q, n, d, i) for i, Zi in Z.items())
    value = Fraction(num, L)
    if value != claimed:
        return False, None, f"bound is {value}, certificate claims {claimed}"
    bound = value.numerator // value.denominator
    return True, bound, f"A_{q}({n},{d}) <= {bound} (constant-weight inequalities)"
