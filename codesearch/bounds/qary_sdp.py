"""The three-point semidefinite bound for q-ary codes (q >= 3), proved in exact arithmetic.

Problem
-------
Bound ``A_q(n, d)`` by the semidefinite program of Gijswijt, Schrijver and Tanaka. For a code
``C`` in ``Z_q^n`` and a word ``u``, the pair ``(v - u, w - u)`` of two other words has an
orbit under the monomial group fixing 0 given by four numbers: ``i = wt(v-u)``,
``j = wt(w-u)``, ``t`` the common support and ``p`` the positions where the two agree (and
are nonzero). ``x[i,j,t,p]`` is the number of triples ``(u, v, w)`` in ``C^3`` of that orbit
divided by ``|C|`` and by the orbit's size. It only depends on the three distances
``(i, j, i+j-t-p)`` up to order and on ``s = t - p``, the positions where the three words
are pairwise distinct: one variable per *triangle* ``(a, b, c, s)``, ``a >= b >= c``. Then
``|C| = sum_i C(n,i) (q-1)^i x[i,0,0,0]`` and, for every code,

    x[0,0,0,0] = 1,   0 <= x[i,j,t,p] <= x[i,0,0,0],   x[i,0,0,0] + x[j,0,0,0] <= 1 + x[i,j,t,p],
    x = 0 when a side of its triangle lies in 1..d-1,
    for 0 <= a <= k <= n + a - k:
        ( sum_{t,p} alpha[i,j,t,p,a,k] x[i,j,t,p] )_{i,j=k}^{n+a-k}                    PSD,
        ( sum_{t,p} alpha[i,j,t,p,a,k] (x[i+j-t-p,0,0,0] - x[i,j,t,p]) )_{i,j}          PSD,

with (up to the positive diagonal congruence ``(q-1)^(i/2)``, which keeps the test)

    alpha = beta^{n-a}[i-a, j-a, k-a, t-a] (q-1)^(i+j-t)
            sum_g (-1)^(a-g) C(a,g) C(t-a, p-g) (q-2)^(t-a-p+g),

``beta^m`` being Schrijver's binary coefficient at length ``m``
(:func:`codesearch.bounds.terwilliger.beta`). Added, as for binary codes: Delsarte's
inequalities and ``A_i <= B_q(n, d, i)`` (q-ary constant-weight codes,
:func:`codesearch.bounds.delsarte.qary_constant_weight_bound`). The block structure
(block ``(a, k)`` of multiplicity ``C(n,a) (C(n-a,k-a) - C(n-a,k-a-1)) (q-2)^a``) is tested
against the full ``q^n x q^n`` matrix in tests/test_qary_sdp.py.

Solving and rounding are those of the binary bound (:func:`codesearch.bounds.sdp.solve_program`):
floating point (Clarabel), then the dual rounded to rationals, the blocks made exactly
positive definite, the residuals absorbed by proven caps on the variables; the certificate
(kind ``qary-three-point-sdp``) is re-checked by :mod:`codesearch.verify.qary_three_point`,
which rebuilds every coefficient itself.

References
----------
D. C. Gijswijt, A. Schrijver and H. Tanaka, "New upper bounds for nonbinary codes based on
the Terwilliger algebra and semidefinite programming", J. Combin. Theory Ser. A 113 (2006)
1719-1731 (the variables, constraints and the block diagonalisation used here).
A. Schrijver, "New code upper bounds from the Terwilliger algebra and semidefinite
programming", IEEE Trans. Inform. Theory 51 (2005) 2859-2866 (the binary coefficients).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from math import comb

from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = ["qary_three_point_bound", "qary_three_point_data", "qary_three_point_cost",
           "QaryThreePointData", "alpha", "qary_triangle", "qary_shape_count", "MAX_VARIABLES"]

#: Largest program built (free variables); about 2 minutes of solving on this machine.
MAX_VARIABLES = 6000


def _binom(a: int, b: int) -> int:
    return comb(a, b) if 0 <= b <= a else 0


@lru_cache(maxsize=None)
def _gsum(q: int, a: int, t: int, p: int) -> int:
    return sum((-1) ** (a - g) * _binom(a, g) * _binom(t - a, p - g) * (q - 2) ** (t - a - p + g)
               for g in range(min(a, p) + 1) if t - a - p + g >= 0)


def alpha(q: int, n: int, i: int, j: int, t: int, p: int, a: int, k: int) -> int:
    """Integer coefficient of ``x[i,j,t,p]`` in entry ``(i, j)`` of block ``(a, k)``.

    Gijswijt-Schrijver-Tanaka's ``alpha`` times ``(q-1)^((i+j)/2)`` (a diagonal congruence).
    """
    from codesearch.bounds.terwilliger import beta

    if t < a:
        return 0
    g = _gsum(q, a, t, p)
    if not g:
        return 0
    return beta(n - a, i - a, j - a, k - a, t - a) * (q - 1) ** (i + j - t) * g


Triangle = tuple[int, int, int, int]


def qary_triangle(i: int, j: int, t: int, p: int) -> Triangle:
    """The orbit ``(a, b, c, s)`` of ``x[i,j,t,p]``: sorted distances and ``s = t - p``."""
    a, b, c = sorted((i, j, i + j - t - p), reverse=True)
    return (a, b, c, t - p)


def qary_shape_count(q: int, n: int, tri: Triangle) -> int:
    """Ordered pairs ``(v, w)`` with ``(0, v, w)`` of shape ``tri`` (the orbit's size)."""
    a, b, c, s = tri
    # representative i = a, j = b: t + p = a + b - c, t - p = s
    t = (a + b - c + s) // 2
    p = t - s
    f = math.factorial
    return (f(n) // (f(p) * f(s) * f(a - t) * f(b - t) * f(n - a - b + t))
            * (q - 1) ** (a + b - t) * (q - 2) ** s)


@dataclass(frozen=True)
class QaryThreePointData:
    """The exact q-ary three-point program of one cell (layout of
    :class:`codesearch.bounds.terwilliger.ThreePointData`; block keys are ``(a, k)``, row
    labels ``("upper"|"pair", i, j, t, p)``, ``("weight", i)``, ``("delsarte", k)``)."""

    q: int
    n: int
    d: int
    triangles: tuple
    objective: tuple
    blocks: tuple
    rows: tuple


def _krawtchouk(q: int, n: int, k: int, i: int) -> int:
    return sum((-1) ** s * (q - 1) ** (k - s) * _binom(i, s) * _binom(n - i, k - s)
               for s in range(k + 1))


def _indices(q: int, n: int):
    """Every (i, j, t, p) of the q-ary Terwilliger algebra."""
    for i in range(n + 1):
        for j in range(n + 1):
            for t in range(min(i, j) + 1):
                if i + j - t > n:
                    continue
                for p in range(t + 1):
                    if q == 2 and p != t:
                        continue
                    yield i, j, t, p


def _free_triangles(q: int, n: int, d: int) -> list[Triangle]:
    seen = set()
    for i, j, t, p in _indices(q, n):
        tri = qary_triangle(i, j, t, p)
        if tri == (0, 0, 0, 0) or any(1 <= v < d for v in tri[:3]):
            continue
        seen.add(tri)
    return sorted(seen)


def qary_variable_count(q: int, n: int, d: int) -> int:
    """Free variables of the program (its size, announced before building)."""
    return len(_free_triangles(q, n, d))


@lru_cache(maxsize=32)
def qary_three_point_data(q: int, n: int, d: int) -> QaryThreePointData:
    """Build the exact q-ary three-point program of the cell ``(q, n, d)`` (q >= 3)."""
    from codesearch.bounds.delsarte import qary_constant_weight_bound
    from codesearch.bounds.terwilliger import RowCollector, add_terms

    if q < 3:
        raise ParameterError("the q-ary three-point program needs q >= 3 (binary: sdp.py)")
    tris = _free_triangles(q, n, d)
    index = {tri: v for v, tri in enumerate(tris)}
    objective = [0] * len(tris)
    for i in range(1, n + 1):
        if (i, i, 0, 0) in index:
            objective[index[(i, i, 0, 0)]] = _binom(n, i) * (q - 1) ** i

    def var(i: int, j: int, t: int, p: int) -> int | None:
        tri = qary_triangle(i, j, t, p)
        return -1 if tri == (0, 0, 0, 0) else index.get(tri)

    blocks = []
    for family in (0, 1):
        for a in range(n + 1):
            for k in range(a, n + 1):
                if 2 * k > n + a:
                    continue
                size = n + a - 2 * k + 1
                const: dict = {}
                coef: dict = {}
                for r in range(size):
                    for s_ in range(r, size):
                        i, j = k + r, k + s_
                        c0 = 0
                        cv: dict[int, int] = {}
                        for t in range(a, min(i, j) + 1):
                            if i + j - t > n:
                                continue
                            for p in range(t + 1):
                                al = alpha(q, n, i, j, t, p, a, k)
                                if not al:
                                    continue
                                terms = [(var(i, j, t, p), 1)]
                                if family == 1:
                                    terms = [(var(i + j - t - p, 0, 0, 0), 1), (terms[0][0], -1)]
                                c0 += add_terms(cv, terms, al)
                        cv = {v: c for v, c in cv.items() if c}
                        if c0:
                            const[(r, s_)] = c0
                        if cv:
                            coef[(r, s_)] = cv
                blocks.append((family, (a, k), size, const, coef))

    collector = RowCollector()
    add = collector.add
    for i, j, t, p in _indices(q, n):
        x = var(i, j, t, p)
        if x is None or x == -1:
            continue
        add(("upper", i, j, t, p), [(x, 1), (var(i, 0, 0, 0), -1)], 0)
        add(("pair", i, j, t, p), [(var(i, 0, 0, 0), 1), (var(j, 0, 0, 0), 1), (x, -1)], 1)
    for i in range(1, n + 1):
        add(("weight", i), [(var(i, 0, 0, 0), _binom(n, i) * (q - 1) ** i)],
            qary_constant_weight_bound(q, n, d, i))
    for k in range(n + 1):
        add(("delsarte", k), [(var(i, 0, 0, 0), -_binom(n, i) * (q - 1) ** i
                               * _krawtchouk(q, n, k, i)) for i in range(n + 1)], 0)
    return QaryThreePointData(q=q, n=n, d=d, triangles=tuple(tris), objective=tuple(objective),
                              blocks=tuple(blocks), rows=tuple(collector.rows))


def qary_variable_cap(q: int, n: int, d: int, tri: Triangle) -> Fraction:
    """Proven cap on the variable of ``tri``: around a codeword at most ``B_q(n,d,s)``
    codewords lie at distance ``s``, so the pairs of the triangle's shape number at most the
    product of the two smallest such caps over its sides; divided by the orbit size, and
    at most 1."""
    from codesearch.bounds.delsarte import qary_constant_weight_bound

    caps = sorted(1 if s == 0 else qary_constant_weight_bound(q, n, d, s) for s in tri[:3])
    return min(Fraction(1), Fraction(caps[0] * caps[1], qary_shape_count(q, n, tri)))


def qary_three_point_cost(params: Params) -> float:
    """Rough CPU seconds of :func:`qary_three_point_bound` (inf when it does not apply):
    proportional to the number of variables to the power 1.5 (measured on q = 3, 4, n <= 12)."""
    if params.q < 3 or params.d < 3:
        return math.inf
    return 0.05 + 2e-4 * qary_variable_count(params.q, params.n, params.d) ** 1.5


def _program(q: int, n: int, d: int):
    from codesearch.bounds.sdp import SdpProgram, _pow2_exponent

    data = qary_three_point_data(q, n, d)
    radius = (d - 1) // 2
    m0 = q**n / sum(_binom(n, i) * (q - 1) ** i for i in range(radius + 1))
    exps = {}
    for family, (a, k), size, _c, _cf in data.blocks:
        e = [_pow2_exponent(_binom(n + a - 2 * k, r) * (q - 1) ** (k + r)) // 2
             for r in range(size)]
        mult = _binom(n, a) * (_binom(n - a, k - a) - _binom(n - a, k - a - 1)) * (q - 2) ** a
        exps[(family, (a, k))] = (e, _pow2_exponent(m0 / mult))
    keys = [key for _f, key, *_ in data.blocks]
    return SdpProgram(
        data=data,
        caps=tuple(qary_variable_cap(q, n, d, tri) for tri in data.triangles),
        shapes=tuple(qary_shape_count(q, n, tri) for tri in data.triangles),
        m0=m0, kind="qary-three-point-sdp", exps=exps,
        offsets={key: key[1] for key in keys},
        labels={key: {"a": key[0], "k": key[1]} for key in keys},
    )


@lru_cache(maxsize=128)
def solve_qary_three_point(q: int, n: int, d: int, *, time_limit: float | None = None,
                           solver: str = "clarabel") -> dict:
    """Solve and certify the q-ary program of ``(q, n, d)`` (see
    :func:`codesearch.bounds.sdp.solve_program`); the certificate is re-checked by the
    independent checker before returning (a disagreement raises :class:`VerificationError`)."""
    from codesearch.bounds.sdp import solve_program
    from codesearch.errors import VerificationError
    from codesearch.verify import check_certificate

    t0 = time.perf_counter()
    best = solve_program(_program(q, n, d), time_limit=time_limit, solver=solver)
    best["seconds"] = time.perf_counter() - t0
    if best["certificate"] is not None:
        best["certificate"].update({"q": q, "n": n, "d": d})
        t1 = time.perf_counter()
        valid, bound, reason = check_certificate(best["certificate"])
        best["check_seconds"] = time.perf_counter() - t1
        if not valid or bound != best["value"]:
            raise VerificationError(f"q-ary three-point certificate for A_{q}({n},{d}) "
                                    f"rejected: {reason}")
    return best


def qary_three_point_bound(params: Params, *, time_limit: float | None = None,
                           solver: str | None = None) -> BoundResult | None:
    """The three-point bound on ``A_q(n,d)`` for ``q >= 3``, with an exact certificate.

    Returns
    -------
    BoundResult or None
        ``method="qary-three-point-sdp"``; ``certified=False`` (never used) when the rounded
        dual could not be certified. None when ``q < 3`` or ``d < 3`` (A_q(n,1), A_q(n,2) are
        known), or when the program has more than :data:`MAX_VARIABLES` variables.
    """
    from codesearch.bounds.sdp import SOLVERS

    solver = (solver or "clarabel").lower()
    if solver not in SOLVERS:
        raise ParameterError(f"unknown solver {solver!r}; choose from {', '.join(SOLVERS)}")
    q, n, d = params.q, params.n, params.d
    if q < 3 or d < 3:
        return None
    size = qary_variable_count(q, n, d)
    if size > MAX_VARIABLES:
        return None
    res = solve_qary_three_point(q, n, d, time_limit=time_limit, solver=solver)
    cert = dict(res["certificate"]) if res["certificate"] is not None else None
    value = res["value"]
    if cert is None and math.isfinite(res["float_value"]):
        value = math.floor(res["float_value"] + 1e-6)  # informative only: not usable
    note = (f"Gijswijt-Schrijver-Tanaka three-point SDP, {size} variables; float optimum "
            f"{res['float_value']:.6f}, exact dual bound {res['exact_float']:.6f}")
    if not res["certified"]:
        note += f"; uncertified: {res['reason']}"
    return BoundResult(params=params, value=value, method="qary-three-point-sdp",
                       certificate=cert, certified=res["certified"], note=note)
