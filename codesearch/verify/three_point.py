"""Checker of Schrijver's three-point semidefinite bound certificates (kind
``three-point-sdp``).

The certificate is re-checked from its own data alone: this module rebuilds every coefficient
itself (block coefficients beta, which variables vanish, the linear rows, the caps on the
variables) and shares no code with :mod:`codesearch.bounds.sdp` or
:mod:`codesearch.bounds.terwilliger`. Positive semidefiniteness is decided exactly (Sylvester's
criterion with Bareiss elimination, else an exact LDL^T).

References
----------
A. Schrijver, "New code upper bounds from the Terwilliger algebra and semidefinite
programming", IEEE Trans. Inform. Theory 51 (2005) 2859-2866.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any, Mapping

from codesearch.errors import InputError
from codesearch.verify import strict
from codesearch.verify.lp import _extra_row

__all__ = ["check_three_point_certificate", "MAX_N", "read_block", "read_row",
           "add_schrijver_part", "read_binary_cell"]

#: Longest code whose three-point certificate is read.
MAX_N = 128
_WHAT = "certificate"


# Schrijver's three-point semidefinite bound (A. Schrijver, IEEE Trans. Inform. Theory 51
# (2005) 2859-2866), re-checked from the certificate alone. This path rebuilds every
# coefficient itself (block coefficients beta, which variables vanish, the linear rows, the
# caps on the variables) and shares no code with codesearch.bounds.sdp / terwilliger.
#
# The inequality checked: for every binary code C of length n, minimum distance d (all
# distances even when "even"), with x[i,j,t] its three-point frequencies,
#   |C| = 1 + sum_i C(n,i) x[i,0,0]
#       <= 1 + sum <Z, B(x)> + sum mu (rhs - row(x)) + sum_i C(n,i) x[i,0,0]
#        = 1 + const + sum_tri r_tri x_tri  <=  1 + const + sum_tri max(r_tri, 0) cap_tri,
# because every Z is PSD, B(x) is PSD for codes (Schrijver's theorem), mu >= 0, rows hold
# for codes, and 0 <= x_tri <= cap_tri.


def _tp_binom(a: int, b: int) -> int:
    return math.comb(a, b) if 0 <= b <= a else 0


def _tp_beta(n: int, i: int, j: int, k: int, t: int) -> int:
    # beta^t_{i,j,k} = sum_u (-1)^(u-t) C(u,t) C(n-2k,u-k) C(n-k-u,i-u) C(n-k-u,j-u)
    total = 0
    for u in range(t, min(i, j) + 1):
        total += (-1) ** (u - t) * _tp_binom(u, t) * _tp_binom(n - 2 * k, u - k) * _tp_binom(
            n - k - u, i - u
        ) * _tp_binom(n - k - u, j - u)
    return total


def _tp_johnson(n: int, half: int, w: int, memo: dict) -> int:
    # Johnson's bounds for constant-weight codes with distance 2*half (MacWilliams-Sloane
    # ch. 17): A(n,2e,w) <= floor(n/w A(n-1,2e,w-1)), <= floor(n/(n-w) A(n-1,2e,w)),
    # = 1 when min(w, n-w) < e, <= C(n,w).
    key = (n, w)
    if key in memo:
        return memo[key]
    if min(w, n - w) < half:
        val = 1
    else:
        val = _tp_binom(n, w)
        if w > 0:
            val = min(val, n * _tp_johnson(n - 1, half, w - 1, memo) // w)
        if n - w > 0:
            val = min(val, n * _tp_johnson(n - 1, half, w, memo) // (n - w))
    memo[key] = val
    return val


def _tp_positive_definite_int(mat: list[list[int]]) -> bool:
    """Sylvester's criterion with Bareiss's fraction-free elimination: True iff every
    leading principal minor of the symmetric integer matrix is positive (exact division)."""
    a = [row[:] for row in mat]
    m = len(a)
    prev = 1
    for k in range(m):
        piv = a[k][k]  # the leading principal minor of order k + 1
        if piv <= 0:
            return False
        for i in range(k + 1, m):
            aik = a[i][k]
            row_i, row_k = a[i], a[k]
            for j in range(k + 1, m):
                row_i[j] = (row_i[j] * piv - aik * row_k[j]) // prev
        prev = piv
    return True


def _tp_psd(mat: list[list[Fraction]]) -> bool:
    """Exact test that a symmetric rational matrix is positive semidefinite.

    Fast path: scaled to integers, positive definite by Sylvester/Bareiss. Otherwise an
    exact LDL^T in rationals that allows zero pivots with zero rows.
    """
    den = 1
    for row in mat:
        for z in row:
            den = den * z.denominator // math.gcd(den, z.denominator)
    if _tp_positive_definite_int([[z.numerator * (den // z.denominator) for z in row]
                                  for row in mat]):
        return True
    a = [row[:] for row in mat]
    m = len(a)
    for p in range(m):
        piv = a[p][p]
        if piv < 0:
            return False
        if piv == 0:
            # a PSD matrix with a zero diagonal entry has a zero row there
            if any(a[p][s] != 0 for s in range(p + 1, m)):
                return False
            continue
        for r in range(p + 1, m):
            f = a[r][p] / piv
            if f:
                for s in range(p + 1, m):
                    a[r][s] -= f * a[p][s]
    return True


class _Objective:
    """``const + sum_tri coef[tri] x_tri``: the certificate's bound as a linear form in the
    three-point frequencies, with the variables that vanish for these codes left out."""

    def __init__(self, n: int, d: int, even: bool) -> None:
        self.n, self.d, self.even = n, d, even
        self.const = Fraction(1)  # the term x[0,0,0] = 1 of |C|
        self.coef: dict[tuple[int, int, int], Fraction] = {}

    def tri(self, i: int, j: int, t: int) -> tuple[int, int, int] | None:
        """Sorted triangle of x[i,j,t]; None when the variable is zero for these codes."""
        sides = sorted((i, j, i + j - 2 * t), reverse=True)
        if any(0 < s < self.d or (self.even and s % 2) for s in sides):
            return None
        return (sides[0], sides[1], sides[2])

    def ok_index(self, i: int, j: int, t: int) -> bool:
        return 0 <= t <= min(i, j) and i + j - t <= self.n

    def add(self, triangle: tuple[int, int, int] | None, value: Fraction) -> None:
        if triangle is None or not value:
            return
        if triangle == (0, 0, 0):
            self.const += value
        else:
            self.coef[triangle] = self.coef.get(triangle, Fraction(0)) + value


def read_block(block: Any, j: int, n: int, keys: tuple[str, ...]
               ) -> tuple[tuple[int, ...], list[int], list[list[Fraction]]]:
    """Strictly read dual block ``j``: its integer labels ``keys`` (each in 0..n), its
    ``weights`` (at most n+1 integers in 0..n) and its square ``matrix`` of exact rationals
    matching the weights; sizes are checked before the entries are parsed."""
    where = f"certificate: blocks[{j}]"
    strict.mapping(block, where)
    labels = tuple(strict.get_int(block, key, where, 0, n) for key in keys)
    weights = [strict.integer(w, f"{where}: weights[{r}]", 0, n)
               for r, w in enumerate(strict.get_list(block, "weights", where, n + 1))]
    m = len(weights)
    rows = strict.get_list(block, "matrix", where, m, length=m)
    mat = []
    for r, row in enumerate(rows):
        if not isinstance(row, list) or len(row) != m:
            raise InputError(f"{where}: matrix row {r} must be a list of {m} rationals")
        mat.append([strict.rational(v, f"{where}: matrix[{r}][{s}]") for s, v in enumerate(row)])
    return labels, weights, mat


def read_row(mult: Any, j: int, shapes: Mapping[str, int]) -> tuple[str, list[int], Fraction]:
    """Strictly read multiplier ``j``: ``row`` = a known label followed by its integer
    indices (``shapes``: label -> number of indices), and its exact ``value``."""
    where = f"certificate: multipliers[{j}]"
    strict.mapping(mult, where)
    label = strict.field(mult, "row", where)
    if not isinstance(label, list) or not label or not isinstance(label[0], str):
        raise InputError(f"{where}: row must be a list [name, index, ...], got "
                         f"{strict.short(label)}")
    if label[0] not in shapes or len(label) != 1 + shapes[label[0]]:
        raise InputError(f"{where}: unknown row {strict.short(label)}")
    idx = [strict.integer(v, f"{where}: row index", None, None) for v in label[1:]]
    if any(abs(v) > 1 << 20 for v in idx):
        raise InputError(f"{where}: row index out of range in {strict.short(label)}")
    return label[0], idx, strict.rational(strict.field(mult, "value", where),
                                          f"{where}: value")


def _add_block(obj: _Objective, block: tuple[tuple[int, ...], list[int], list[list[Fraction]]],
               seen: set, beta_memo: dict) -> str | None:
    """Add ``<Z, B(x)>`` of one dual block; the reason it is rejected, or None."""
    n = obj.n
    (family, k), weights, mat = block
    if family not in (0, 1) or not 0 <= k <= n // 2 or (family, k) in seen:
        return f"bad block family={family}, k={k}"
    seen.add((family, k))
    if len(set(weights)) != len(weights) or any(not k <= w <= n - k for w in weights):
        return f"bad weights in block family={family}, k={k}"
    m = len(weights)
    if any(mat[r][s] != mat[s][r] for r in range(m) for s in range(r)):
        return f"block family={family}, k={k} is not symmetric"
    if not _tp_psd(mat):
        return f"block family={family}, k={k} is not positive semidefinite"
    # <Z, B(x)> in integers over the block's common denominator, then one Fraction per
    # triangle
    den = 1
    for row in mat:
        for z in row:
            den = den * z.denominator // math.gcd(den, z.denominator)
    acc: dict = {}

    def put(triangle, value):
        if triangle is not None:
            acc[triangle] = acc.get(triangle, 0) + value

    for r, i in enumerate(weights):
        for s, j in enumerate(weights):
            z = mat[r][s]
            if not z:
                continue
            zi = z.numerator * (den // z.denominator)
            for t in range(min(i, j) + 1):
                if i + j - t > n:
                    continue
                key = (i, j, k, t)
                b = beta_memo.get(key)
                if b is None:
                    b = beta_memo[key] = _tp_beta(n, i, j, k, t)
                if not b:
                    continue
                if family == 0:
                    put(obj.tri(i, j, t), zi * b)
                else:
                    put(obj.tri(i + j - 2 * t, 0, 0), zi * b)
                    put(obj.tri(i, j, t), -zi * b)
    for triangle, value in acc.items():
        obj.add(triangle, Fraction(value, den))
    return None


#: Row label -> number of integer indices after it.
_ROW_SHAPES = {"upper": 3, "pair": 3, "weight": 1, "delsarte": 1, "antipodal-ball": 1,
               "antipodal-shell": 1}


def _add_multiplier(obj: _Objective, mult: tuple[str, list[int], Fraction],
                    johnson_memo: dict) -> str | None:
    """Add ``mu (rhs - row(x))`` of one linear row; the reason it is rejected, or None."""
    n, d = obj.n, obj.d
    name, idx, mu = mult
    label = [name, *idx]
    if mu < 0:
        return f"negative multiplier on row {label}"
    tri, add = obj.tri, obj.add
    if label[0] in ("upper", "pair"):
        i, j, t = idx
        if not obj.ok_index(i, j, t):
            return f"bad row {label}"
        if label[0] == "upper":  # x[i,j,t] - x[i,0,0] <= 0
            add(tri(i, j, t), -mu)
            add(tri(i, 0, 0), mu)
        else:  # x[i,0,0] + x[j,0,0] - x[i,j,t] <= 1
            obj.const += mu
            add(tri(i, 0, 0), -mu)
            add(tri(j, 0, 0), -mu)
            add(tri(i, j, t), mu)
    elif label[0] == "weight":  # C(n,i) x[i,0,0] <= A(n,d,i) (Johnson)
        i = idx[0]
        if not 1 <= i <= n:
            return f"bad row {label}"
        obj.const += mu * _tp_johnson(n, (d + 1) // 2, i, johnson_memo)
        add(tri(i, 0, 0), -mu * _tp_binom(n, i))
    elif label[0] == "delsarte":  # -sum_i C(n,i) K_k(i) x[i,0,0] <= 0
        k = idx[0]
        if not 0 <= k <= n:
            return f"bad row {label}"
        for i in range(n + 1):
            kraw = sum(
                (-1) ** s * _tp_binom(i, s) * _tp_binom(n - i, k - s) for s in range(k + 1)
            )
            add(tri(i, 0, 0), mu * _tp_binom(n, i) * kraw)
    elif label[0] in ("antipodal-ball", "antipodal-shell"):
        # sum_i a_i C(n,i) x[i,0,0] <= b, rebuilt by the LP checker (codesearch.verify.lp)
        if idx != [0] or (label[0] == "antipodal-shell" and d % 2):
            return f"bad row {label}"
        coeffs, rhs = _extra_row(label[0], 0, n, d)
        obj.const += mu * rhs
        for i, a in coeffs.items():
            add(tri(i, 0, 0), -mu * a * _tp_binom(n, i))
    else:
        return f"unknown row {label}"
    return None


def _capped_total(obj: _Objective, johnson_memo: dict) -> Fraction:
    """``const + sum_tri max(r_tri, 0) cap_tri``: each positive coefficient times the largest
    value its frequency can take (Johnson caps over the number of triangles of that shape)."""
    n = obj.n
    half = (obj.d + 1) // 2
    total = obj.const
    for (a, b, c), r in obj.coef.items():
        if r <= 0:
            continue
        caps = sorted(1 if s == 0 else _tp_johnson(n, half, s, johnson_memo) for s in (a, b, c))
        p = (a + b + c) // 2
        shapes = math.factorial(n) // (
            math.factorial(p - a) * math.factorial(p - b) * math.factorial(p - c)
            * math.factorial(n - p)
        )
        total += r * min(Fraction(1), Fraction(caps[0] * caps[1], shapes))
    return total


def block_psd_work(mat: list[list[Fraction]], j: int) -> int:
    """Steps of the exact PSD test of one block: m^3 eliminations on integers of up to
    m (log2 den + log2 max numerator) bits (fraction-free), one step per 64-bit limb; the
    block's common denominator is refused past the cap first."""
    m = len(mat)
    den = strict.common_denominator((z for row in mat for z in row),
                                    f"certificate: blocks[{j}]")
    top = max((abs(z.numerator).bit_length() for row in mat for z in row), default=1)
    return m ** 3 * (1 + m * (den.bit_length() + top) // 64)


def _work(n: int, blocks: list, multipliers: list) -> int:
    """Elementary steps of the check: per block entry the t and u loops of beta (at most
    (n/2+1)^2), per block the exact PSD test, per Delsarte row n^2, and the caps."""
    steps = n ** 3
    for j, (_, weights, mat) in enumerate(blocks):
        m = len(weights)
        steps += m * m * (n // 2 + 1) ** 2 + block_psd_work(mat, j)
    steps += sum(n * n if name == "delsarte" else 1 for name, _, _ in multipliers)
    return steps


def check_three_point_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a ``"three-point-sdp"`` certificate in exact arithmetic.

    The certificate holds the cell (``q, n, d``), the program's cell (``sdp_n, sdp_d``: the
    same, or ``n+1, d+1`` for odd ``d`` since ``A(n,d) = A(n+1,d+1)``), ``even`` (only even
    distances, allowed for even ``sdp_d``), dual ``blocks`` (``family`` 0 or 1, ``k``, row
    ``weights``, a symmetric ``matrix`` of ``"p/q"`` strings), ``multipliers`` (``row``
    label and ``"p/q"`` value), the exact value ``bound`` (``"p/q"``) and the claimed integer
    ``value``. Every field is read strictly (exact types, sizes within :data:`MAX_N` and the
    work cap); the certificate holds only if ``bound`` is exactly what the dual proves and
    ``value`` is its floor.

    Returns
    -------
    (valid, bound, reason)

    Raises
    ------
    InputError
        A malformed field, or a check past the caps (said before the work starts).
    """
    cell = read_binary_cell(cert, MAX_N, "three-point")
    if isinstance(cell, str):
        return False, None, cell
    n0, d0, n, d, even, claimed, exact_claim = cell
    blocks = [read_block(b, j, n, ("family", "k"))
              for j, b in enumerate(strict.get_list(cert, "blocks", _WHAT, 2 * (n // 2 + 1)))]
    mults = [read_row(m, j, _ROW_SHAPES)
             for j, m in enumerate(strict.get_list(cert, "multipliers", _WHAT, strict.MAX_ROWS))]
    strict.check_work(_work(n, blocks, mults), f"three-point certificate for n={n}")
    obj = _Objective(n, d, even)
    johnson_memo: dict = {}
    reason = add_schrijver_part(obj, blocks, mults, johnson_memo)
    if reason is not None:
        return False, None, reason
    total = _capped_total(obj, johnson_memo)
    return compare_claims(total, exact_claim, claimed, f"three-point SDP bound A({n0},{d0})")


def add_schrijver_part(obj: _Objective, blocks: list, mults: list, johnson_memo: dict,
                       other_rows: Mapping[str, Any] | None = None) -> str | None:
    """Add ``|C| - 1`` (the pairs), Schrijver's dual blocks and the multipliers of the linear
    rows to ``obj``; rows named in ``other_rows`` are added by the function given there
    (``f(obj, indices, mu) -> reason or None``). The reason a part is rejected, or None."""
    n = obj.n
    for i in range(1, n + 1):
        obj.add(obj.tri(i, 0, 0), Fraction(_tp_binom(n, i)))
    seen: set = set()
    beta_memo: dict = {}
    for block in blocks:
        reason = _add_block(obj, block, seen, beta_memo)
        if reason is not None:
            return reason
    for name, idx, mu in mults:
        if other_rows is not None and name in other_rows:
            reason = other_rows[name](obj, idx, mu)
        else:
            reason = _add_multiplier(obj, (name, idx, mu), johnson_memo)
        if reason is not None:
            return reason
    return None


def read_binary_cell(cert: Mapping[str, Any], max_n: int, name: str) -> tuple | str:
    """Strictly read the cell fields of a binary SDP certificate: ``q = 2``, ``n, d``
    (``n <= max_n``), the program's cell ``sdp_n, sdp_d`` (the same, or ``n+1, d+1`` for odd
    ``d``), ``even`` (needs even ``sdp_d``), the claimed ``value`` and the optional exact
    ``bound``. Returns ``(n, d, sdp_n, sdp_d, even, value, bound)``, or the reason the cell
    is not one this certificate may bound."""
    q = strict.get_int(cert, "q", _WHAT, 2, None)
    if q != 2:
        return f"{name} certificates are for binary codes"
    n0 = strict.get_int(cert, "n", _WHAT, 1, max_n)
    d0 = strict.get_int(cert, "d", _WHAT, 1, n0)
    n = strict.get_int(cert, "sdp_n", _WHAT, 1, max_n + 1)
    d = strict.get_int(cert, "sdp_d", _WHAT, 1, n)
    even = strict.get_bool(cert, "even", _WHAT)
    claimed = strict.get_int(cert, "value", _WHAT, 0, None)
    exact_claim = (strict.rational(cert["bound"], "certificate: bound", allow_int=False)
                   if "bound" in cert else None)
    if (n, d) != (n0, d0) and not (d0 % 2 == 1 and (n, d) == (n0 + 1, d0 + 1)):
        return f"program cell ({n},{d}) does not bound A({n0},{d0})"
    if even and d % 2:
        return "the even-distance restriction needs even d"
    return n0, d0, n, d, even, claimed, exact_claim


def compare_claims(total: Fraction, exact_claim: Fraction | None, claimed: int, what: str
                   ) -> tuple[bool, int | None, str]:
    """The verdict of an SDP certificate: ``bound`` (when given) must be exactly the value
    the dual proves and ``value`` its floor, as for the LP certificates."""
    proven = math.floor(total)
    if exact_claim is not None and exact_claim != total:
        return False, None, (f"bound field is {exact_claim}, the certificate proves "
                             f"{_approx(total)}")
    if claimed < proven:
        return False, None, f"claimed {claimed} but the certificate proves only {proven}"
    if claimed > proven:
        return False, None, (f"claimed {claimed} but the certificate proves {proven}: the "
                             f"claim must be what it proves")
    return True, claimed, f"{what} <= {proven} (exact {_approx(total)})"


def _approx(x: Fraction) -> str:
    """A rational shown to six decimals, exactly (no float overflow)."""
    sign = "-" if x < 0 else ""
    scaled = round(abs(x) * 10**6)
    return f"{sign}{scaled // 10**6}.{scaled % 10**6:06d}"
