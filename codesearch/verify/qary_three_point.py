"""Independent checker of ``"qary-three-point-sdp"`` certificates (q >= 3).

The certificate holds dual matrices ``Z`` (one per block ``(family, a, k)``, rational
entries ``"p/q"``) and multipliers ``mu >= 0`` on named linear rows of the
Gijswijt-Schrijver-Tanaka program (see :mod:`codesearch.bounds.qary_sdp`). For every q-ary
code ``C`` of length ``n`` and minimum distance ``d`` with three-point frequencies ``x``,

    |C| = 1 + sum_i C(n,i) (q-1)^i x[i,0,0,0]
        <= 1 + sum_i C(n,i)(q-1)^i x[i,0,0,0] + sum <Z, B(x)> + sum mu (rhs - row(x))
         = const + sum_tri r_tri x_tri  <=  const + sum_tri max(r_tri, 0) cap_tri,

because each ``Z`` is PSD and ``B(x)`` is PSD for codes (Gijswijt-Schrijver-Tanaka), the rows
hold for codes, and ``0 <= x_tri <= cap_tri``. Everything is rebuilt here with integers and
:class:`fractions.Fraction` (nothing from :mod:`codesearch.bounds`): the block coefficients
``alpha`` from Schrijver's ``beta`` at length ``n - a``, the forced zeros, the rows, the
Krawtchouk values, the q-ary constant-weight caps and the orbit sizes.

References
----------
D. C. Gijswijt, A. Schrijver and H. Tanaka, J. Combin. Theory Ser. A 113 (2006) 1719-1731.
A. Schrijver, IEEE Trans. Inform. Theory 51 (2005) 2859-2866.
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes* (1977), ch. 5
section 7 (q-ary Krawtchouk polynomials).
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any, Mapping

__all__ = ["check_qary_three_point", "exact_psd", "parse_rational", "read_psd_block"]

#: Longest code accepted (keeps a hostile file from asking for astronomically large work).
MAX_N = 64


def parse_rational(text: Any) -> Fraction:
    """``"p/q"`` or an integer; floats are refused (the checkers' common parser)."""
    from codesearch.verify.exact import parse_fraction

    return parse_fraction(text)


def exact_psd(mat: list[list[Fraction]]) -> bool:
    """True iff the symmetric rational matrix is positive semidefinite, exactly (the test of
    the binary three-point checker: Sylvester/Bareiss, then an LDL^T allowing zero rows)."""
    from codesearch.verify.three_point import _tp_psd

    return _tp_psd(mat)


def read_psd_block(rows: Any, m: int, name: str) -> tuple[list[list[Fraction]], int] | str:
    """Check an ``m x m`` dual block (rows of exact rationals, or of ``"p/q"`` strings) is
    symmetric and PSD.

    Returns ``(matrix, common denominator)``, or the reason it fails (a string).
    """
    mat = [[v if isinstance(v, Fraction) else parse_rational(v) for v in row] for row in rows]
    if len(mat) != m or any(len(row) != m for row in mat):
        return f"{name} is not {m}x{m}"
    if any(mat[r][s] != mat[s][r] for r in range(m) for s in range(r)):
        return f"{name} is not symmetric"
    if not exact_psd(mat):
        return f"{name} is not positive semidefinite"
    den = 1
    for row in mat:
        for z in row:
            den = math.lcm(den, z.denominator)
    return mat, den


def _binom(a: int, b: int) -> int:
    return math.comb(a, b) if 0 <= b <= a else 0


def _beta(m: int, i: int, j: int, k: int, t: int) -> int:
    # Schrijver's beta^t_{i,j,k} at length m
    return sum((-1) ** (u - t) * _binom(u, t) * _binom(m - 2 * k, u - k)
               * _binom(m - k - u, i - u) * _binom(m - k - u, j - u)
               for u in range(t, min(i, j) + 1))


def _alpha(q: int, n: int, i: int, j: int, t: int, p: int, a: int, k: int, memo: dict) -> int:
    key = (i, j, t, p, a, k)
    if key not in memo:
        g = sum((-1) ** (a - h) * _binom(a, h) * _binom(t - a, p - h) * (q - 2) ** (t - a - p + h)
                for h in range(min(a, p) + 1) if t - a - p + h >= 0) if t >= a else 0
        memo[key] = _beta(n - a, i - a, j - a, k - a, t - a) * (q - 1) ** (i + j - t) * g if g else 0
    return memo[key]


def _cw_cap(q: int, n: int, d: int, w: int, memo: dict) -> int:
    """q-ary constant-weight codes: min of (q-1)^w C(n,w), floor(n(q-1) B(n-1,w-1) / w) and
    floor(n B(n-1,w) / (n-w)); one word when w = 0 or min(n, 2w) < d."""
    key = (n, w)
    if key in memo:
        return memo[key]
    if w < 0 or w > n:
        val = 0
    elif w == 0 or min(n, 2 * w) < d:
        val = 1
    else:
        val = min(_binom(n, w) * (q - 1) ** w, n * (q - 1) * _cw_cap(q, n - 1, d, w - 1, memo) // w)
        if w < n:
            val = min(val, n * _cw_cap(q, n - 1, d, w, memo) // (n - w))
    memo[key] = val
    return val


#: Row label -> number of integer indices after it.
_ROW_SHAPES = {"upper": 4, "pair": 4, "weight": 1, "delsarte": 1}


def _work(n: int, blocks: list, multipliers: list) -> int:
    """Elementary steps: per block entry the t, p and h/u loops of alpha (at most
    (n+1)^2 (n/2+1)), per block the exact PSD test, per Delsarte row n^2, the caps."""
    from codesearch.verify.three_point import block_psd_work

    steps = n ** 4
    for j, (_, weights, mat) in enumerate(blocks):
        m = len(weights)
        steps += m * m * (n + 1) ** 2 * (n // 2 + 1) + block_psd_work(mat, j)
    steps += sum(n * n if name == "delsarte" else 1 for name, _, _ in multipliers)
    return steps


def check_qary_three_point(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a ``qary-three-point-sdp`` certificate; returns ``(valid, bound, reason)``.

    Fields are read strictly (as :func:`codesearch.verify.three_point.check_three_point_certificate`
    does): q in 3..36, n <= :data:`MAX_N`, integer labels, exact rationals, sizes within the
    caps before any work; ``bound`` (when given) must be exactly what the dual proves and
    ``value`` its floor.
    """
    from codesearch.model import MAX_Q
    from codesearch.verify import strict
    from codesearch.verify.three_point import compare_claims, read_block, read_row

    what = "certificate"
    q = strict.get_int(cert, "q", what, 2, MAX_Q)
    n = strict.get_int(cert, "n", what, 1, MAX_N)
    d = strict.get_int(cert, "d", what, 1, n)
    claimed = strict.get_int(cert, "value", what, 0, None)
    exact_claim = (strict.rational(cert["bound"], "certificate: bound", allow_int=False)
                   if "bound" in cert else None)
    if q < 3:
        return False, None, f"bad cell q={q}, n={n}, d={d} for a q-ary three-point certificate"
    blocks = [read_block(b, j, n, ("family", "a", "k")) for j, b in
              enumerate(strict.get_list(cert, "blocks", what, 2 * (n + 1) ** 2))]
    mults = [read_row(m, j, _ROW_SHAPES)
             for j, m in enumerate(strict.get_list(cert, "multipliers", what, strict.MAX_ROWS))]
    strict.check_work(_work(n, blocks, mults), f"q-ary three-point certificate for n={n}")

    def ok_index(i: int, j: int, t: int, p: int) -> bool:
        return 0 <= p <= t <= min(i, j) and i + j - t <= n and i >= 0 and j >= 0

    def tri(i: int, j: int, t: int, p: int) -> tuple | None:
        sides = sorted((i, j, i + j - t - p), reverse=True)
        if any(0 < s < d for s in sides):
            return None
        return (sides[0], sides[1], sides[2], t - p)

    const = Fraction(1)
    coef: dict[tuple, Fraction] = {}

    def add(triangle: tuple | None, value: Fraction) -> None:
        nonlocal const
        if triangle is None or not value:
            return
        if triangle == (0, 0, 0, 0):
            const += value
        else:
            coef[triangle] = coef.get(triangle, Fraction(0)) + value

    for i in range(1, n + 1):
        add(tri(i, 0, 0, 0), Fraction(_binom(n, i) * (q - 1) ** i))

    memo: dict = {}
    seen = set()
    for (family, a, k), weights, matrix in blocks:
        if family not in (0, 1) or not 0 <= a <= k or 2 * k > n + a or (family, a, k) in seen:
            return False, None, f"bad block family={family}, a={a}, k={k}"
        seen.add((family, a, k))
        if len(set(weights)) != len(weights) or any(not k <= w <= n + a - k for w in weights):
            return False, None, f"bad weights in block ({family},{a},{k})"
        read = read_psd_block(matrix, len(weights), f"block ({family},{a},{k})")
        if isinstance(read, str):
            return False, None, read
        mat, den = read
        acc: dict = {}

        def put(triangle: tuple | None, value: int) -> None:
            if triangle is not None:
                acc[triangle] = acc.get(triangle, 0) + value

        for r, i in enumerate(weights):
            for s, j in enumerate(weights):
                z = mat[r][s]
                if not z:
                    continue
                zi = z.numerator * (den // z.denominator)
                for t in range(a, min(i, j) + 1):
                    if i + j - t > n:
                        continue
                    for p in range(t + 1):
                        al = _alpha(q, n, i, j, t, p, a, k, memo)
                        if not al:
                            continue
                        if family == 0:
                            put(tri(i, j, t, p), zi * al)
                        else:
                            put(tri(i + j - t - p, 0, 0, 0), zi * al)
                            put(tri(i, j, t, p), -zi * al)
        for triangle, value in acc.items():
            add(triangle, Fraction(value, den))

    cw: dict = {}
    for name, idx, mu in mults:
        label = [name, *idx]
        if mu < 0:
            return False, None, f"negative multiplier on row {label}"
        if label[0] in ("upper", "pair"):
            i, j, t, p = idx
            if not ok_index(i, j, t, p):
                return False, None, f"bad row {label}"
            if label[0] == "upper":  # x[i,j,t,p] - x[i,0,0,0] <= 0
                add(tri(i, j, t, p), -mu)
                add(tri(i, 0, 0, 0), mu)
            else:  # x[i,0,0,0] + x[j,0,0,0] - x[i,j,t,p] <= 1
                const += mu
                add(tri(i, 0, 0, 0), -mu)
                add(tri(j, 0, 0, 0), -mu)
                add(tri(i, j, t, p), mu)
        elif label[0] == "weight":  # C(n,i)(q-1)^i x[i,0,0,0] <= B_q(n,d,i)
            i = idx[0]
            if not 1 <= i <= n:
                return False, None, f"bad row {label}"
            const += mu * _cw_cap(q, n, d, i, cw)
            add(tri(i, 0, 0, 0), -mu * _binom(n, i) * (q - 1) ** i)
        elif label[0] == "delsarte":  # -sum_i C(n,i)(q-1)^i K_k(i) x[i,0,0,0] <= 0
            k = idx[0]
            if not 0 <= k <= n:
                return False, None, f"bad row {label}"
            for i in range(n + 1):
                kraw = sum((-1) ** s * (q - 1) ** (k - s) * _binom(i, s) * _binom(n - i, k - s)
                           for s in range(k + 1))
                add(tri(i, 0, 0, 0), mu * _binom(n, i) * (q - 1) ** i * kraw)
        else:
            return False, None, f"unknown row {label}"

    f = math.factorial
    for (a_, b_, c_, s_), r in coef.items():
        if r <= 0:
            continue
        if (a_ + b_ - c_ + s_) % 2 or c_ + s_ > a_ + b_:
            return False, None, f"impossible triangle {(a_, b_, c_, s_)}"
        t = (a_ + b_ - c_ + s_) // 2
        p = t - s_
        shapes = (f(n) // (f(p) * f(s_) * f(a_ - t) * f(b_ - t) * f(n - a_ - b_ + t))
                  * (q - 1) ** (a_ + b_ - t) * (q - 2) ** s_)
        caps = sorted(1 if v == 0 else _cw_cap(q, n, d, v, cw) for v in (a_, b_, c_))
        const += r * min(Fraction(1), Fraction(caps[0] * caps[1], shapes))
    return compare_claims(const, exact_claim, claimed,
                          f"q-ary three-point SDP bound A_{q}({n},{d})")
