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
from typing import Any, Iterator, Mapping

from codesearch.errors import InputError
from codesearch.model import MAX_Q
from codesearch.verify import strict
from codesearch.verify.exact import rational_field

#: Longest code whose LP certificate is read (the bounds limit).
MAX_N = 4096
_WHAT = "certificate"

__all__ = ["check_delsarte_lp", "check_delsarte_lp_qcw"]


def _kraw_rows(q: int, n: int) -> Iterator[tuple[int, ...]]:
    """``T[x][k] = K_k(x)`` for x = 0..n, one row at a time (memory of one row).

    Multiplying ``G_x(z) = sum_k K_k(x) z^k`` by ``(1 - z) / (1 + (q-1) z)`` gives
    ``G_{x+1}``, i.e. ``K_k(x+1) = K_k(x) - K_{k-1}(x) - (q-1) K_{k-1}(x+1)``.
    """
    cur = [math.comb(n, k) * (q - 1) ** k for k in range(n + 1)]
    yield tuple(cur)
    for _ in range(n):
        nxt = [0] * (n + 1)
        nxt[0] = cur[0]
        for k in range(1, n + 1):
            nxt[k] = cur[k] - cur[k - 1] - (q - 1) * nxt[k - 1]
        yield tuple(nxt)
        cur = nxt


@lru_cache(maxsize=16)
def _kraw_table(q: int, n: int) -> tuple[tuple[int, ...], ...]:
    return tuple(_kraw_rows(q, n))


def _kraw_columns(q: int, n: int) -> Iterator[tuple[int, ...]] | tuple[tuple[int, ...], ...]:
    """The rows of the Krawtchouk table: cached when small (a table of many cells re-checks
    the same lengths), streamed otherwise (memory of one row)."""
    if (n + 1) ** 2 * (n * q.bit_length() + 1) <= _CACHED_BITS:
        return _kraw_table(q, n)
    return _kraw_rows(q, n)


#: Largest Krawtchouk table kept in memory between checks (bits of its entries).
_CACHED_BITS = 1 << 25


def _work(q: int, n: int, den_bits: int) -> int:
    """Elementary steps of an LP check: (n+1)^2 products of numbers of about
    ``n log2 q + den_bits`` bits (one step per 64-bit limb)."""
    return (n + 1) ** 2 * (1 + (n * q.bit_length() + den_bits) // 64)


@lru_cache(maxsize=4096)
def _cw_cap(n: int, delta: int, w: int) -> int:
    """Upper bound on binary constant-weight codes A(n, 2 delta, w).

    Johnson: A(n, 2δ, w) <= floor(n/w * A(n-1, 2δ, w-1)); complements: weight w and n-w give
    the same codes; a single word when w < δ (two weight-w words are within 2w < 2δ).
    Followed as a loop down the chain, then back up (no recursion: n may be 4096).
    """
    chain = []
    while True:
        if w > n or w < 0:
            value = 0
            break
        if n - w < w:
            w = n - w
        if w < delta:
            value = 1
            break
        chain.append((n, w))
        n, w = n - 1, w - 1
    for m, v in reversed(chain):
        value = m * value // v
    return value


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
    or out-of-range parameters (q <= 36, n <= 4096), or a ``y`` that is not a list of n
    rationals.
    """
    for key in ("q", "n", "d", *more, "y", "bound"):
        strict.field(cert, key, _WHAT)
    q = strict.get_int(cert, "q", _WHAT, 2, MAX_Q)
    n = strict.get_int(cert, "n", _WHAT, 1, MAX_N)
    d = strict.get_int(cert, "d", _WHAT, 1, n)
    ys = strict.get_list(cert, "y", _WHAT, n, length=n)
    y = [rational_field(t, f"y[{k + 1}]") for k, t in enumerate(ys)]
    return q, n, d, y, rational_field(cert["bound"], "bound")


def _common_denominator(values: list[Fraction], q: int, n: int) -> int:
    """The lcm of the denominators, refused past the caps before the (n+1)^2 products."""
    L = strict.common_denominator(values, "certificate")
    strict.check_work(_work(q, n, L.bit_length()), f"certificate for q={q}, n={n}")
    return L


def check_delsarte_lp(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp`` certificate: y >= 0 (and z >= 0) with, for every allowed i >= d,
    ``sum_k y_k K_k(i) - sum_j z_j a_ji <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) +
    sum_j z_j b_j``. Integer arithmetic only (one common denominator)."""
    q, n, d, y, claimed = _lp_certificate_head(cert, ("even",))
    even = strict.get_bool(cert, "even", _WHAT)
    extras_in = strict.get_list(cert, "extra", _WHAT, n + 3) if "extra" in cert else []
    if even and (q != 2 or d % 2):
        return False, None, "even-distance restriction is only valid for q = 2 and even d"
    if extras_in and q != 2:
        return False, None, "extra inequalities are only defined for q = 2"
    rows: list[tuple[dict[int, int], int, Fraction]] = []
    for j, e in enumerate(extras_in):
        where = f"certificate: extra[{j}]"
        strict.mapping(e, where)
        family = strict.get_str(e, "family", where)
        coeffs, rhs = _extra_row(family, strict.get_int(e, "index", where, 0, n), n, d)
        rows.append((coeffs, rhs, rational_field(e["z"], f"extra[{j}].z")))
    if any(v < 0 for v in y) or any(z < 0 for (_, _, z) in rows):
        return False, None, "a dual multiplier is negative"
    L = _common_denominator(y + [z for (_, _, z) in rows], q, n)
    Y = [v.numerator * (L // v.denominator) for v in y]
    Z = [z.numerator * (L // z.denominator) for (_, _, z) in rows]
    T0: tuple[int, ...] = ()
    for i, Ti in enumerate(_kraw_columns(q, n)):
        if i == 0:
            T0 = Ti
        if i < d or (even and i % 2):
            continue
        total = sum(Y[k - 1] * Ti[k] for k in range(1, n + 1) if Y[k - 1])
        total -= sum(Zj * coeffs.get(i, 0) for Zj, (coeffs, _, _) in zip(Z, rows))
        if total > -L:
            return False, None, f"dual constraint fails at distance i={i}"
    value = Fraction(L + sum(Y[k - 1] * T0[k] for k in range(1, n + 1))
                     + sum(Zj * rhs for Zj, (_, rhs, _) in zip(Z, rows)), L)
    if value != claimed:
        return False, None, f"bound is {value}, certificate claims {claimed}"
    bound = value.numerator // value.denominator
    return True, bound, f"A_{q}({n},{d}) <= {bound}" + (" (even distances)" if even else "")


# ===================================================================== delsarte-lp-qcw
# Delsarte's LP for q-ary codes with the constant-weight inequalities A_i <= B_q(n, d, i)
# (see codesearch.bounds.delsarte.qary_extra_inequalities for the proof). The caps are
# rebuilt here by their own recurrence; Krawtchouk values come from _kraw_columns above.


def _qcw_caps(q: int, n: int, d: int) -> list[int]:
    """``B_q(n, d, w)`` for w = 0..n, the q-ary constant-weight bound: the least of
    C(n,w)(q-1)^w, n(q-1)B(n-1,w-1)/w and n B(n-1,w)/(n-w) (floors); 1 when w = 0 or two
    weight-w words cannot be d apart. Built row by row in the length (memory of one row)."""
    prev: list[int] = [1]  # length 0: only w = 0
    for m in range(1, n + 1):
        row = []
        for w in range(m + 1):
            if w == 0 or 2 * w < d or m < d:
                row.append(1)
                continue
            caps = [math.comb(m, w) * (q - 1) ** w, (m * (q - 1) * prev[w - 1]) // w]
            if m > w:
                caps.append((m * prev[w]) // (m - w))
            row.append(min(caps))
        prev = row
    return prev


def check_delsarte_lp_qcw(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp-qcw`` certificate: y >= 0, z >= 0 with, for every i = d..n,
    ``sum_k y_k K_k(i) - z_i <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) + sum_i z_i
    B_q(n, d, i)``. Integer arithmetic after clearing one common denominator."""
    q, n, d, y, claimed = _lp_certificate_head(cert, ("extra",))
    z: dict[int, Fraction] = {}
    for j, e in enumerate(strict.get_list(cert, "extra", _WHAT, n + 1)):
        where = f"certificate: extra[{j}]"
        strict.mapping(e, where)
        if "family" in e and strict.get_str(e, "family", where) != "constant-weight":
            return False, None, f"extra[{j}]: unknown family {strict.short(e['family'])}"
        i = strict.get_int(e, "index", where, d, n)
        if i in z:
            raise InputError(f"{where}: index {i} repeated")
        z[i] = rational_field(strict.field(e, "z", where), f"extra[{j}].z")
    if any(v < 0 for v in y) or any(v < 0 for v in z.values()):
        return False, None, "a dual multiplier is negative"
    L = _common_denominator(y + list(z.values()), q, n)
    Y = [v.numerator * (L // v.denominator) for v in y]
    Z = {i: v.numerator * (L // v.denominator) for i, v in z.items()}
    T0: tuple[int, ...] = ()
    for i, Ti in enumerate(_kraw_columns(q, n)):
        if i == 0:
            T0 = Ti
        if i < d:
            continue
        total = sum(Y[k - 1] * Ti[k] for k in range(1, n + 1) if Y[k - 1]) - Z.get(i, 0)
        if total > -L:
            return False, None, f"dual constraint fails at distance i={i}"
    num = L + sum(Y[k - 1] * T0[k] for k in range(1, n + 1))
    caps = _qcw_caps(q, n, d) if Z else []
    num += sum(Zi * caps[i] for i, Zi in Z.items())
    value = Fraction(num, L)
    if value != claimed:
        return False, None, f"bound is {value}, certificate claims {claimed}"
    bound = value.numerator // value.denominator
    return True, bound, f"A_{q}({n},{d}) <= {bound} (constant-weight inequalities)"
