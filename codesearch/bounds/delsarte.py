"""Delsarte's linear programming bound on A_q(n,d), certified in exact arithmetic.

Problem
-------
For a code C with minimum distance d, the averaged distance distribution
A_i = |{(x, y) in C^2 : d(x, y) = i}| / |C| satisfies A_0 = 1, A_i = 0 for 0 < i < d,
A_i >= 0, and (MacWilliams transform) sum_i A_i K_k(i) >= 0 for every k, where K_k are the
q-ary Krawtchouk polynomials. So |C| = sum_i A_i is at most the LP optimum

    maximise 1 + sum_{i in I} A_i  subject to  sum_{i in I} A_i K_k(i) >= -K_k(0), k = 1..n,

with I = {d, ..., n} (binary, d even: the even i only, since some optimal code has only even
distances; odd d maps through A(n, 2t-1) = A(n+1, 2t)). Every dual-feasible vector
y >= 0 with sum_k y_k K_k(i) <= -1 for all i in I proves |C| <= 1 + sum_k y_k K_k(0)
(weak duality), whatever its origin: that vector, in exact rationals, is the certificate.

Optionally extra valid inequalities ``sum_i a_i A_i <= b`` are appended, each proved per
codeword and so valid for the average (binary: :func:`extra_inequalities`; q > 2: the
constant-weight family of :func:`qary_extra_inequalities`, certificate kind
``delsarte-lp-qcw``); their dual multipliers z_j >= 0 enter the certificate as
``sum_k y_k K_k(i) - sum_j z_j a_ji <= -1`` and the bound becomes
``1 + sum_k y_k K_k(0) + sum_j z_j b_j``.

How the value is made exact
---------------------------
The float LP is solved by scipy's HiGHS on a scaled problem: with u_k = y_k K_k(0) the
constraint matrix becomes Q_k(i) = K_k(i) / K_k(0), all in [-1, 1], so even binary n = 128
(K_k(i) ~ 1e37) is well scaled. The float dual is rounded to dyadic rationals m_k / 2^E with
2^E well above q^n, the constraint sums are evaluated exactly in integers, and the vector is
rescaled by the exact worst slack so every constraint holds exactly. When that rescaling could
lose an integer (the float optimum sits close below an integer, or is large), a few rounds of
iterative refinement on the active set (exact integer residuals, float corrections) tighten
the dual; every candidate is checked exactly and the least certified value is reported. A
result that cannot be certified is returned with ``certified=False`` and never used.

Beyond about 2^40 doubles cannot even find the optimal basis (the certificate must hold to
within 1 while its terms are as large as the value). Those LPs are solved in high-precision
decimal arithmetic (:mod:`codesearch.bounds.hpsimplex`), warm-started along a *chain*: for
one length n the LP at distance d is the LP at the next allowed distance plus one row, so
the optimal dictionary of the previous d stays dual feasible and a few dual simplex pivots
finish (:class:`_Chain`, which walks d downwards from n and keeps every result); the LP with
extra inequalities adds its columns to a copy of the plain optimum and runs the primal
simplex. The decimal solution is turned into an exact certificate by iterative refinement
with exact integer residuals (:func:`_refine_certify`); an exact rational vertex is used
only when the value sits at an integer. A grid run also asks for each LP twice (A(n, 2t-1)
is solved as A(n+1, 2t)), so certified results are cached per LP cell.

References
----------
P. Delsarte, "Bounds for unrestricted codes, by linear programming", Philips Res. Rep. 27
(1972) 272-289; and "An algebraic approach to the association schemes of coding theory",
Philips Res. Rep. Suppl. 10 (1973).
F. J. MacWilliams and N. J. A. Sloane, "The Theory of Error-Correcting Codes" (1977), ch. 17
section 4 (the LP bound, the even-distance restriction, and the extra inequalities A_i <= A(n,d,i)).
M. R. Best, A. E. Brouwer, F. J. MacWilliams, A. M. Odlyzko and N. J. A. Sloane, "Bounds for
binary codes of length less than 25", IEEE Trans. Inform. Theory 24 (1978) 81-93 (adding
constant-weight and antipodal inequalities to Delsarte's LP).
"""

from __future__ import annotations

import decimal
import math
from collections import OrderedDict
from fractions import Fraction
from functools import lru_cache
from typing import Any

import numpy as np

from codesearch.bounds.classical import constant_weight_bound
from codesearch.bounds.krawtchouk import krawtchouk_table
from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = ["delsarte_lp", "delsarte_lp_plus", "lp_cell", "extra_inequalities", "solve_float_lp",
           "clear_caches", "qary_extra_inequalities", "qary_constant_weight_bound"]

#: Extra bits of the dyadic rounding beyond log2(q^n): rounding moves each constraint sum by
#: at most q^n / 2^E, far below the slack the rescaling has to absorb.
_GUARD_BITS = 96
_REFINE_ROUNDS = 4


def lp_cell(params: Params) -> tuple[int, int, bool]:
    """The cell (n, d, even) the LP is solved for: binary odd d maps to (n+1, d+1)."""
    q, n, d = params.q, params.n, params.d
    if q == 2 and d % 2 == 1:
        return n + 1, d + 1, True
    return n, d, q == 2


def allowed_distances(n: int, d: int, even: bool) -> list[int]:
    """Distances i >= d that may occur (even i only when ``even``)."""
    return [i for i in range(d, n + 1) if not even or i % 2 == 0]


def extra_inequalities(n: int, d: int) -> list[tuple[str, int, dict[int, int], int]]:
    """Valid inequalities ``sum_i a_i A_i <= b`` for binary codes of length n, distance d.

    Each holds for the distance distribution A_i(c) seen from every single codeword c, hence
    for the average. Returned as ``(family, index, {i: a_i}, b)``; the checker in
    :mod:`codesearch.verify` rebuilds them from ``(family, index)`` on its own.

    ``constant-weight`` (index i)
        A_i <= A(n, 2 ceil(d/2), i): the codewords at distance i from c, translated by c,
        form a constant-weight code of weight i whose distances are even and >= d;
        bounded by Johnson's constant-weight bound. Kept only when below C(n, i).
    ``antipodal-ball`` (index 0)
        sum_{i >= n-r} A_i <= 1, r = floor((d-1)/2): those codewords lie in the radius-r
        ball around the complement of c, which holds at most one codeword.
    ``antipodal-shell`` (d = 2s even; index 0)
        A_{n-s} + floor(n/s) sum_{i > n-s} A_i <= floor(n/s): codewords at distance s from
        the complement of c have pairwise disjoint difference supports (at most n/s of them),
        and none exists when a codeword lies within s-1 of the complement.
    """
    from math import comb

    out: list[tuple[str, int, dict[int, int], int]] = []
    delta = (d + 1) // 2
    for i in range(d, n + 1):
        cap = constant_weight_bound(n, delta, i)
        if cap < comb(n, i):
            out.append(("constant-weight", i, {i: 1}, cap))
    r = (d - 1) // 2
    ball = {i: 1 for i in range(max(n - r, d), n + 1)}
    if ball:
        out.append(("antipodal-ball", 0, ball, 1))
    if d % 2 == 0:
        s = d // 2
        if n - s >= d:
            per = n // s
            shell = {n - s: 1}
            for i in range(n - s + 1, n + 1):
                shell[i] = per
            out.append(("antipodal-shell", 0, shell, per))
    return out


@lru_cache(maxsize=None)
def qary_constant_weight_bound(q: int, n: int, d: int, w: int) -> int:
    """Upper bound on the size of a q-ary code of length n, constant weight w, distance >= d.

    Proof of each step (valid for every q >= 2):

    * w = 0, or min(n, 2w) < d: at most one word (two weight-w words differ in at most
      min(n, 2w) positions); w > n: none.
    * Nonzero positions: count pairs (word x, position p with x_p != 0): M w of them. For a
      fixed p and symbol a != 0, the words with x_p = a agree at p, so deleting p leaves a
      code of length n-1, weight w-1, distance >= d: at most B(n-1, w-1) words. Hence
      M w <= n (q-1) B(n-1, w-1).
    * Zero positions: likewise the words with x_p = 0, with p deleted, form a code of length
      n-1, weight w, distance >= d, so M (n-w) <= n B(n-1, w).
    * Trivially M <= C(n, w) (q-1)^w, the number of weight-w words.

    The first recursion is the q-ary form of Johnson's bound for constant-weight codes.
    """
    from math import comb

    if w < 0 or w > n:
        return 0
    if w == 0 or min(n, 2 * w) < d:
        return 1
    best = comb(n, w) * (q - 1) ** w
    best = min(best, n * (q - 1) * qary_constant_weight_bound(q, n - 1, d, w - 1) // w)
    if w < n:
        best = min(best, n * qary_constant_weight_bound(q, n - 1, d, w) // (n - w))
    return best


def qary_extra_inequalities(q: int, n: int, d: int) -> list[tuple[str, int, dict[int, int], int]]:
    """Valid inequalities ``A_i <= B_q(n, d, i)`` for q-ary codes (any q >= 2; used for q > 2).

    For a codeword c, the words x - c (symbolwise in Z_q, an isometry of the Hamming space)
    of the codewords x at distance i from c have weight i and pairwise distance >= d, so
    A_i(c) is at most the largest such constant-weight code, bounded by
    :func:`qary_constant_weight_bound`; averaging over c gives the inequality for the
    distance distribution. Kept only where the cap is below C(n, i) (q-1)^i. The same
    argument, binary, is the constant-weight family of Best et al. (1978).
    """
    from math import comb

    out = []
    for i in range(d, n + 1):
        cap = qary_constant_weight_bound(q, n, d, i)
        if cap < comb(n, i) * (q - 1) ** i:
            out.append(("constant-weight", i, {i: 1}, cap))
    return out


@lru_cache(maxsize=512)
def _scaled_matrix(q: int, n: int) -> np.ndarray:
    """Float Q[x, k-1] = K_k(x) / K_k(0) for k = 1..n (exactly rounded int division)."""
    K = krawtchouk_table(q, n)
    Q = np.array([[K[k][x] / K[k][0] for k in range(1, n + 1)] for x in range(n + 1)])
    Q.setflags(write=False)
    return Q


def _degrees(n: int, even: bool) -> list[int]:
    """Degrees k of the dual variables kept in the LP.

    On even distances the binary Krawtchouk values satisfy K_k(i) = K_{n-k}(i) and
    K_k(0) = K_{n-k}(0), so y_k and y_{n-k} are interchangeable and k > n/2 can be dropped;
    K_n(i) = 1 there (a positive constant that only costs), so k = n is dropped too.
    """
    return list(range(1, n // 2 + 1)) if even else list(range(1, n + 1))


def _problem(q: int, n: int, d: int, even: bool, use_extra: bool):
    rows = allowed_distances(n, d, even)
    ks = _degrees(n, even)
    extras = _extras(q, n, d, even) if use_extra else []
    Q = _scaled_matrix(q, n)
    nk = len(ks)
    G = np.empty((len(rows), nk + len(extras)))
    G[:, :nk] = Q[np.ix_(rows, [k - 1 for k in ks])]
    for j, (_, _, coeffs, b) in enumerate(extras):
        G[:, nk + j] = [-coeffs.get(i, 0) / b for i in rows]
    return rows, ks, extras, G


def _highs(G: np.ndarray, method: str):
    """min sum(x) s.t. G x <= -1, x >= 0 through highspy (HiGHS itself, shipped with cvxpy),
    skipping scipy's per-call option validation, which costs more than the solve on these
    small dense LPs. Returns a linprog-like namespace (status 0 = optimal)."""
    from types import SimpleNamespace

    import highspy

    rows, cols = G.shape
    # The pybind core class: the Python wrapper prints a banner to stdout on first use,
    # which would corrupt ``--json`` output; the core with output_flag off is silent.
    h = highspy._core._Highs()
    h.setOptionValue("output_flag", False)
    h.setOptionValue("solver", "simplex" if method == "highs-ds" else "ipm")
    if method == "highs-ds":
        h.setOptionValue("simplex_strategy", 1)
    inf = highspy.kHighsInf
    lp = highspy.HighsLp()
    lp.num_col_ = cols
    lp.num_row_ = rows
    lp.col_cost_ = np.ones(cols)
    lp.col_lower_ = np.zeros(cols)
    lp.col_upper_ = np.full(cols, inf)
    lp.row_lower_ = np.full(rows, -inf)
    lp.row_upper_ = np.full(rows, -1.0)
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    Gc = np.asfortranarray(G)
    lp.a_matrix_.start_ = np.arange(0, rows * cols + 1, rows, dtype=np.int32)
    lp.a_matrix_.index_ = np.tile(np.arange(rows, dtype=np.int32), cols)
    lp.a_matrix_.value_ = Gc.ravel(order="F")
    h.passModel(lp)
    h.run()
    ok = h.getModelStatus() == highspy.HighsModelStatus.kOptimal
    if not ok:
        return SimpleNamespace(status=1, x=None, fun=None, ineqlin=None)
    sol = h.getSolution()
    x = np.asarray(sol.col_value, dtype=float)
    act = np.asarray(sol.row_value, dtype=float)
    return SimpleNamespace(status=0, x=x, fun=float(x.sum()),
                           ineqlin=SimpleNamespace(residual=-1.0 - act))


@lru_cache(maxsize=1)
def _have_highs_core() -> bool:
    """True when highspy's core class is importable; else scipy's copy of HiGHS is used
    (same solver, slower per call on small LPs)."""
    try:
        import highspy

        return hasattr(highspy, "_core") and hasattr(highspy._core, "_Highs")
    except ImportError:
        return False


def _linprog(G: np.ndarray, method: str):
    from scipy.optimize import linprog

    return linprog(np.ones(G.shape[1]), A_ub=G, b_ub=-np.ones(G.shape[0]), bounds=(0, None),
                   method=method)


def solve_float_lp(q: int, n: int, d: int, even: bool, use_extra: bool = False):
    """Solve the scaled dual with HiGHS; returns (rows, degrees, extras, G, result).

    ``result`` has linprog's fields ``status`` (0 = optimal), ``x``, ``fun`` and
    ``ineqlin.residual`` (the slacks).
    """
    rows, ks, extras, G = _problem(q, n, d, even, use_extra)
    solve = _highs if _have_highs_core() else _linprog
    # Dual simplex: it returns a vertex, whose active set the exact solve uses. (The interior
    # point method was tried as a fallback on the badly scaled cells and never succeeded
    # where the simplex failed, on the binary grid n <= 128.)
    res = solve(G, "highs-ds")
    return rows, ks, extras, G, res


def _to_dyadic(values: np.ndarray, scales: list[int], E: int) -> list[int]:
    """floor(v * 2^E / s) exactly for each float v (negatives clipped to 0)."""
    out = []
    for v, s in zip(values.tolist(), scales):
        if not v > 0.0:
            out.append(0)
            continue
        num, den = float(v).as_integer_ratio()
        out.append((num << E) // (den * s))
    return out


class _Exact:
    """Exact integer data of one LP instance (Krawtchouk columns and extra rows)."""

    def __init__(self, q: int, n: int, rows: list[int], ks: list[int], extras: list) -> None:
        K = krawtchouk_table(q, n)
        self.n = n
        self.rows = rows
        self.K0 = [K[k][0] for k in ks]
        # cols[c][r]: integer coefficient of variable c in constraint row r (y part +K, z part -a).
        self.cols = [[K[k][i] for i in rows] for k in ks]
        self.cols += [[-coeffs.get(i, 0) for i in rows] for (_, _, coeffs, _) in extras]
        self.cost = self.K0 + [b for (_, _, _, b) in extras]

    def sums(self, m: list[int]) -> list[int]:
        s = [0] * len(self.rows)
        for mc, col in zip(m, self.cols):
            if mc:
                for r, a in enumerate(col):
                    s[r] += mc * a
        return s

    def certify(self, m: list[int]) -> tuple[int, int, list[int], int] | None:
        """Rescale nonnegative integer vector m to exact feasibility.

        Returns ``(floor_value, W, m, objective_numerator)`` with the certificate
        ``y_c = m_c / W``: every row sum of ``m`` is <= -W, and the bound is
        ``1 + objective_numerator / W``; None when some row sum is >= 0.
        """
        if any(x < 0 for x in m):
            return None
        s = self.sums(m)
        W = -max(s)
        if W <= 0:
            return None
        obj = sum(mc * c for mc, c in zip(m, self.cost))
        return 1 + obj // W, W, m, obj


def _solve_exact(M: list[list[int]], rhs: list[int]) -> list[Fraction] | None:
    """Solve the square integer system M x = rhs in exact rationals (None if singular).

    Fraction-free Gauss-Jordan (Bareiss-style scaling kept implicit through Fractions would be
    slower): rows are integer lists, each elimination step cross-multiplies and divides
    out the gcd to keep entries small.
    """
    from math import gcd

    size = len(M)
    A = [list(row) + [b] for row, b in zip(M, rhs)]
    for col in range(size):
        piv = next((r for r in range(col, size) if A[r][col] != 0), None)
        if piv is None:
            return None
        A[col], A[piv] = A[piv], A[col]
        prow = A[col]
        p = prow[col]
        for r in range(size):
            if r == col or A[r][col] == 0:
                continue
            f = A[r][col]
            row = [p * a - f * b for a, b in zip(A[r], prow)]
            g = 0
            for v in row:
                g = gcd(g, v)
                if g == 1:
                    break
            if g > 1:
                row = [v // g for v in row]
            A[r] = row
    return [Fraction(A[r][size], A[r][r]) for r in range(size)]


def _basis_solve(ex: "_Exact", res) -> tuple[int, int, list[int], int] | None:
    """Exact vertex on the active set of the float solution, checked exactly.

    Columns: the variables the float solution uses; rows: as many constraints of least slack.
    When the float basis is the optimal one this returns the exact LP optimum.
    """
    x = np.asarray(res.x)
    top = float(np.max(x)) if x.size else 0.0
    if not top > 0:
        return None
    S = [c for c in range(len(x)) if x[c] > 1e-12 * top]
    order = np.argsort(np.asarray(res.ineqlin.residual), kind="stable")
    if len(S) > len(order):
        return None
    return _vertex(ex, S, [int(r) for r in order[: len(S)]])


def _decimal_dual_simplex(ex: "_Exact", *, digits: int, max_pivots: int) -> list[int] | None:
    """Dual simplex in high-precision decimal arithmetic; returns an integer dual vector.

    The cold last resort, used when the warm-started chain (:class:`_Chain`) fails, and the
    independent reference its tests compare with: on cells whose LP value is far beyond
    2^40 the dual vector is huge while every constraint must hold to within 1, so doubles
    cannot resolve it. The problem min sum_c u_c s.t. sum_c u_c G[r][c] <= -1, u >= 0 (columns
    scaled by their objective weight, G = exact coefficient / cost) is solved from the slack
    basis, which is dual feasible because every cost is 1, in a condensed dictionary with
    ``digits`` significant digits (libmpdec, through numpy object arrays). The basis found is
    then solved exactly over the integers (:func:`_solve_exact`), so the precision only has
    to be good enough to find the right basis; the result is checked exactly by the caller.
    """
    import decimal

    from codesearch.bounds.hpsimplex import pivot as exchange

    ctx = decimal.Context(prec=digits)
    D = ctx.create_decimal
    m, N = len(ex.rows), len(ex.cols)
    T = np.empty((m + 1, N + 1), dtype=object)
    for c, (col, cost) in enumerate(zip(ex.cols, ex.cost)):
        dc = D(cost)
        for r, a in enumerate(col):
            T[r, c] = ctx.divide(D(a), dc)
        T[m, c] = D(-1)  # objective row: z = z0 - (T[m, :N] . x_N) with reduced costs 1
    T[:m, N] = D(-1)
    T[m, N] = D(0)
    basic = [("s", r) for r in range(m)]
    nonbasic = [("u", c) for c in range(N)]
    tiny = decimal.Decimal(10) ** (-(digits // 2))
    with decimal.localcontext(ctx):
        for pivot in range(max_pivots):
            beta = T[:m, N]
            infeasible = [i for i in range(m) if beta[i] < -tiny]
            if not infeasible:
                break
            # Most negative row first; after 2m pivots Bland's rule (least label), which
            # cannot cycle on degenerate vertices.
            bland = pivot >= 2 * m
            if bland:
                r = min(infeasible, key=lambda i: basic[i])
            else:
                r = min(infeasible, key=lambda i: beta[i])
            row = T[r, :N]
            best_j, best_key = None, None
            for j in range(N):
                a = row[j]
                if a < -tiny:
                    ratio = T[m, j] / a  # = d_j / (-a) with d_j = -T[m, j] >= 0
                    key = (ratio, nonbasic[j]) if bland else (ratio,)
                    if best_key is None or key < best_key:
                        best_j, best_key = j, key
            if best_j is None:
                return None  # dual unbounded: cannot happen for a Delsarte LP
            j = best_j
            T = exchange(T, r, j)
            basic[r], nonbasic[j] = nonbasic[j], basic[r]
        else:
            return None
    S = [idx for (kind, idx) in basic if kind == "u"]
    tight = [idx for (kind, idx) in nonbasic if kind == "s"]
    return _vertex_vector(ex, S, tight)


def _scaled_float(value: int, E: int) -> float:
    """value / 2^E as a float without overflowing on huge integers."""
    shift = max(0, abs(value).bit_length() - 64)
    return math.ldexp(float(value >> shift), shift - E)


def _fmt(x: Fraction) -> str:
    return f"{x.numerator}/{x.denominator}"


def _solve_certified(q: int, n: int, d: int, even: bool, use_extra: bool, fallback: bool):
    if fallback:
        # A neighbouring cell's high-precision run may already have solved this one.
        hit = _chain_result(q, n, d, even, use_extra, start=False)
        if hit is not None:
            extras = _extras(q, n, d, even) if use_extra else []
            return hit, _degrees(n, even), extras, None, True
    rows, ks, extras, G, res = solve_float_lp(q, n, d, even, use_extra)
    ex = _Exact(q, n, rows, ks, extras)
    if res.status != 0:
        best = _high_precision(ex, q, n, d, even, use_extra) if fallback else None
        return best, ks, extras, res, best is not None
    E = (q**n).bit_length() + _GUARD_BITS
    m = _to_dyadic(res.x, ex.cost, E)
    best = ex.certify(m)
    fobj = 1.0 + float(res.fun)
    # Refine when rescaling may have cost an integer: the certified floor exceeds the float
    # optimum's floor (after a relative tolerance), or the value is beyond float precision.
    need = best is None or best[0] > int(np.floor(fobj * (1 + 1e-9) + 1e-9)) or fobj > 2.0**40
    if need:
        exact = _basis_solve(ex, res)
        if exact is not None and (best is None or exact[0] <= best[0]):
            best = exact
            need = False
    if need:
        slack = res.ineqlin.residual
        tol = 1e-9
        T = [r for r in range(len(rows)) if slack[r] <= tol * max(1.0, abs(fobj))]
        S = [c for c in range(G.shape[1]) if res.x[c] > tol * max(1e-300, float(np.max(res.x)))]
        if T and S:
            P = np.linalg.pinv(G[np.ix_(T, S)])
            for _ in range(_REFINE_ROUNDS):
                s = ex.sums(m)
                # Want s_r = -2^E on the active rows; residual in units of 2^E (floats).
                resid = np.array([_scaled_float(-(1 << E) - s[r], E) for r in T])
                du = P @ resid
                dm = [0] * len(m)
                for pos, c in enumerate(S):
                    v = float(du[pos])
                    if v == 0.0 or not np.isfinite(v):
                        continue
                    num, den = abs(v).as_integer_ratio()
                    step = (num << E) // (den * ex.cost[c])
                    dm[c] = step if v > 0 else -step
                m = [max(0, a + b) for a, b in zip(m, dm)]
                cand = ex.certify(m)
                if cand is not None and (best is None or cand[0] < best[0]):
                    best = cand
    used = False
    # Beyond 2^40 the double solve may also return a wrong (merely feasible) vertex whose
    # exact solution certifies a loose value, so the high-precision simplex runs there too.
    if fallback and (need or fobj > _FLOAT_LIMIT):
        cand = _high_precision(ex, q, n, d, even, use_extra)
        if cand is not None and (best is None or cand[0] < best[0]):
            best, used = cand, True
    return best, ks, extras, res, used


# ---------------------------------------------------------------- warm-started high precision
#: LP values above this are beyond double precision's reach (see :func:`_solve_certified`).
_FLOAT_LIMIT = 2.0**40
_RECORD_LIMIT = 2.0**24
#: Chains kept alive (one per LP length; a grid run needs two at a time: n and n + 1).
_MAX_CHAINS = 4
_CHAINS: "dict[tuple[int, int, bool], _Chain]" = {}


def _refine_certify(ex: "_Exact", tab, q: int, n: int, rounds: int = 8):
    """Exact certificate from a high-precision optimal dictionary, by iterative refinement.

    The dictionary's basic values are rounded to dyadic integers ``m / 2^E``; then, with the
    exact integer residuals of the tight rows, corrections ``B^-1 r`` are taken from the
    dictionary itself (the column of a nonbasic slack is ``B^-1 e_r``) until the residual is
    far below 1 / value, so the exactly rescaled vector (:meth:`_Exact.certify`) is within
    2^-20 of the basis's vertex value. E carries twice the bits of q^n: a constraint error of
    eps moves the certified value by about value * eps. Returns ``(result, settled)``:
    ``settled`` is False when the refinement did not converge, or when the certified value
    sits within 2^-19 above an integer, where only the exact vertex can say whether the
    floor is one too high (the caller then solves the vertex exactly).
    """
    from fractions import Fraction

    bits = (q**n).bit_length()
    E = 2 * bits + 64
    one = 1 << E
    ctx = tab.ctx
    D = ctx.create_decimal
    rowpos = {i: r for r, i in enumerate(ex.rows)}
    m = [0] * len(ex.cols)
    basic_pos = {}
    for p, (kind, idx) in enumerate(tab.basic):
        if kind == "u":
            basic_pos[idx] = p
            v = tab.T[p, -1]
            if v > 0:
                f = Fraction(v)
                m[idx] = (f.numerator << E) // (f.denominator * ex.cost[idx])
    tight = [(j, rowpos[lab]) for j, (kind, lab) in enumerate(tab.nonbasic) if kind == "s"]
    scale = [D(c) for c in ex.cost]
    best = None
    converged = False
    for _ in range(rounds):
        s = ex.sums(m)
        cand = ex.certify(m)
        # Keep the least certified value (compare obj/W exactly by cross-multiplying).
        if cand is not None and (
                best is None or (cand[0], cand[3] * best[1]) < (best[0], best[3] * cand[1])):
            best = cand
        res = [-one - s[r] for (_, r) in tight]
        worst = max((abs(x) for x in res), default=0)
        if best is not None and worst * best[0] < one >> 24:
            converged = True
            break
        with decimal.localcontext(ctx):
            dres = [D(x) for x in res]
            for c, p in basic_pos.items():
                acc = D(0)
                for (j, _), x in zip(tight, dres):
                    if x:
                        acc += x * tab.T[p, j]
                step = acc / scale[c]
                m[c] = max(0, m[c] + int(step.to_integral_value()))
    if best is None:
        return None, True
    value, W, mm, obj = best
    frac_num = (obj + W) - value * W  # (1 + obj/W - value) * W, in [0, W)
    if converged and frac_num * (1 << 19) >= W:
        return best, True
    # Unsettled (typically an integer optimum): the vertex usually has small denominators,
    # so round each component to the nearest fraction of bounded denominator and test
    # whether that is the vertex exactly (every tight row sum equal to -1). Cheaper by far
    # than an exact elimination on a 60 x 60 matrix of 128-bit integers.
    from math import lcm

    approx = [Fraction(x, one).limit_denominator(1 << (E // 2 - 32)) if x else Fraction(0)
              for x in m]
    L = lcm(*(v.denominator for v in approx))
    mv = [v.numerator * (L // v.denominator) for v in approx]
    s = ex.sums(mv)
    if all(s[r] == -L for (_, r) in tight):
        cand = ex.certify(mv)
        if cand is not None and cand[1] == L:
            # Exactly the basis's vertex: its floor is the LP optimum's when the basis is optimal.
            return cand, True
    return best, False


class _Chain:
    """High-precision Delsarte LPs of one length n, solved for decreasing d by adding rows.

    The LP at distance d is the LP at the next larger allowed distance plus the constraint
    row of distance d; its optimal dictionary stays dual feasible when that row is added, so
    each step takes a few dual simplex pivots instead of a solve from the slack basis. The LP
    with extra inequalities at the same d starts from a copy of the plain optimum with the
    extra columns appended (primal feasible) and runs the primal simplex.
    """

    def __init__(self, q: int, n: int, even: bool) -> None:
        from codesearch.bounds.hpsimplex import Tableau

        self.q, self.n, self.even = q, n, even
        self.ks = _degrees(n, even)
        self.digits = len(str(q**n)) + 40
        self.tab = Tableau(len(self.ks), self.digits)
        self.d = n + 1  # rows present: every allowed distance >= self.d
        self.results: dict[tuple[int, bool], tuple | None] = {}
        self.pivots = 0

    def _scaled(self, i: int) -> list:
        K = krawtchouk_table(self.q, self.n)
        ctx = self.tab.ctx
        D = ctx.create_decimal
        return [ctx.divide(D(K[k][i]), D(K[k][0])) for k in self.ks]

    def solve(self, d: int, use_extra: bool):
        """Certified tuple for the LP at distance d (with the extra inequalities when
        ``use_extra``), or None when the chain already went past d without recording it."""
        key = (d, use_extra)
        if key in self.results:
            return self.results[key]
        if d >= self.d:
            return None  # already past it without recording: the caller restarts
        q, n, even = self.q, self.n, self.even
        while self.d > d:
            self.d -= 1
            i = self.d
            if even and i % 2:
                continue
            self.tab.add_row(i, self._scaled(i))
            ok = self.tab.dual_simplex(40 * self.tab.m + 200)
            self.pivots += self.tab.pivots
            self.tab.pivots = 0
            if not ok:
                self.results[(i, False)] = None
                self.d = -1  # broken: the caller starts over
                return None
            # Record well below the float limit too: near it the double-precision path
            # sometimes cannot certify, and a miss would restart the chain from the top.
            big = float(self.tab.objective()) > _RECORD_LIMIT
            done = (i, False) in self.results and (i, True) in self.results
            if (i == d or big) and not done:
                self._record(i)
        return self.results.get(key)

    def _record(self, d: int) -> None:
        q, n, even = self.q, self.n, self.even
        rows = allowed_distances(n, d, even)
        ex = _Exact(q, n, rows, self.ks, [])
        self.results[(d, False)] = _finish(ex, self.tab, q, n)
        extras = _extras(q, n, d, even)
        exx = _Exact(q, n, rows, self.ks, extras)
        ctx = self.tab.ctx
        D = ctx.create_decimal
        nk = len(self.ks)
        present = set(rows)
        columns = [{i: ctx.divide(D(-a), D(b)) for i, a in coeffs.items() if i in present}
                   for (_, _, coeffs, b) in extras]
        tab = self.tab
        if any(tab.entering_cost(col) > tab.tiny for col in columns):
            # Some inequality cuts off the plain optimum: add them all and re-optimise a copy.
            tab = tab.copy()
            for j, col in enumerate(columns):
                tab.add_column(nk + j, col)
            ok = tab.primal_simplex(40 * tab.m + 200)
        else:
            ok = True  # the plain optimum satisfies every extra inequality: it is optimal
        self.pivots += tab.pivots
        self.results[(d, True)] = _finish(exx, tab, q, n) if ok else None


def _finish(ex: "_Exact", tab, q: int, n: int):
    """Certify an optimal high-precision dictionary; exact vertex solve when unsettled."""
    best, settled = _refine_certify(ex, tab, q, n)
    if best is None or not settled:
        S, T = tab.basis()
        rowpos = {i: r for r, i in enumerate(ex.rows)}
        exact = _vertex(ex, S, [rowpos[i] for i in T])
        if exact is not None and (best is None or exact[0] <= best[0]):
            best = exact
    return best


def _vertex_vector(ex: "_Exact", S: list[int], T: list[int]) -> list[int] | None:
    """Integer dual vector proportional to the vertex of basis (columns S, tight rows T):
    the exact solution of the square system, scaled by its common denominator (or None when
    the system is singular or the vertex has a negative entry)."""
    from math import lcm

    if len(S) != len(T) or not S:
        return None
    M = [[ex.cols[c][r] for c in S] for r in T]
    sol = _solve_exact(M, [-1] * len(T))
    if sol is None or any(v < 0 for v in sol):
        return None
    L = lcm(*(v.denominator for v in sol))
    out = [0] * len(ex.cols)
    for c, v in zip(S, sol):
        out[c] = v.numerator * (L // v.denominator)
    return out


def _vertex(ex: "_Exact", S: list[int], T: list[int]):
    """The exact vertex of basis (columns S, tight rows T), checked exactly (or None)."""
    out = _vertex_vector(ex, S, T)
    return ex.certify(out) if out is not None else None


def _chain_result(q: int, n: int, d: int, even: bool, use_extra: bool, *, start: bool):
    """The warm-started high-precision result for the LP cell, from (or into) its chain.

    With ``start`` False only an already computed result is returned (no work)."""
    key = (q, n, even)
    chain = _CHAINS.get(key)
    if chain is not None and (d, use_extra) in chain.results:
        return chain.results[(d, use_extra)]
    if not start:
        return None
    if chain is None or chain.d <= d:
        # Start over from the top (the old chain went past d without recording it); keep
        # what the old chain already certified.
        old = chain
        chain = _Chain(q, n, even)
        if old is not None:
            chain.results.update((k, v) for k, v in old.results.items() if v is not None)
    _CHAINS.pop(key, None)  # re-insert: the dict's order is least recently used first
    while len(_CHAINS) >= _MAX_CHAINS:
        _CHAINS.pop(next(iter(_CHAINS)))
    _CHAINS[key] = chain
    return chain.solve(d, use_extra)


def _extras(q: int, n: int, d: int, even: bool) -> list:
    """Extra inequalities of the LP cell; on even distances those touching only odd i are void."""
    extras = extra_inequalities(n, d) if q == 2 else qary_extra_inequalities(q, n, d)
    if even:
        extras = [e for e in extras if any(i % 2 == 0 and i >= d for i in e[2])]
    return extras


def _high_precision(ex: "_Exact", q: int, n: int, d: int, even: bool, use_extra: bool):
    """Warm-started chain first; the cold high-precision simplex if the chain fails."""
    best = _chain_result(q, n, d, even, use_extra, start=True)
    if best is None:
        best = _decimal_fallback(ex, q, n)
    return best


def _decimal_fallback(ex: "_Exact", q: int, n: int) -> tuple[int, int, list[int], int] | None:
    """Exact optimum through the high-precision dual simplex, checked exactly (or None)."""
    digits = len(str(q**n)) + 30
    m = _decimal_dual_simplex(ex, digits=digits, max_pivots=40 * len(ex.rows) + 200)
    return ex.certify(m) if m is not None else None


#: Largest LP handled: n (after the odd-d mapping) and bit length of q^n (the dyadic rounding
#: converts 2^E-scaled integers to floats, E = bits(q^n) + guard).
MAX_LP_N = 200
MAX_LP_BITS = 800


#: Certified results per LP cell. A binary grid asks for each LP twice (A(n, 2t) and
#: A(n-1, 2t-1) are the same LP); a few thousand entries cover the reuse distance of a
#: row-by-row grid run.
_CELL_CACHE: "OrderedDict[tuple, tuple]" = OrderedDict()
_CELL_CACHE_SIZE = 2048


def _lp_cell_result(q: int, n: int, d: int, even: bool, use_extra: bool, fallback: bool):
    """``(value or None, certificate or None, certified, detail)`` for one LP cell, cached.

    The certificate is re-checked by :func:`codesearch.verify.check_certificate` before it is
    cached: every later hit returns this same, already checked certificate.
    """
    from codesearch import verify

    key = (q, n, d, even, use_extra, fallback)
    hit = _CELL_CACHE.get(key)
    if hit is not None:
        _CELL_CACHE.move_to_end(key)
        return hit
    best, ks, extras, res, used_decimal = _solve_certified(q, n, d, even, use_extra, fallback)
    if best is None:
        ok = res is not None and res.status == 0
        fval = int(np.floor(1.0 + res.fun)) if ok else None
        out = (fval, None, False, "float LP value" if ok else "float LP failed;")
    else:
        value, W, m, obj = best
        y = [Fraction(0)] * n
        for k, mc in zip(ks, m):
            y[k - 1] = Fraction(mc, W)
        z = [Fraction(mc, W) for mc in m[len(ks):]]
        cert: dict[str, Any] = {
            "kind": "delsarte-lp",
            "q": q,
            "n": n,
            "d": d,
            "even": even,
            "y": [_fmt(v) for v in y],
            "bound": _fmt(1 + Fraction(obj, W)),
        }
        if use_extra:
            cert["extra"] = [
                {"family": fam, "index": idx, "z": _fmt(zj)}
                for (fam, idx, _, _), zj in zip(extras, z) if zj
            ]
            if q > 2:
                # Its own kind: the q-ary family has its own checker in codesearch.verify.
                cert["kind"] = "delsarte-lp-qcw"
                del cert["even"]
        valid, checked, reason = verify.check_certificate(cert)
        if not valid or checked != value:
            out = (value, cert, False, f"certificate rejected: {reason}")
        else:
            out = (value, cert, True, ", high-precision simplex" if used_decimal else "")
    _CELL_CACHE[key] = out
    while len(_CELL_CACHE) > _CELL_CACHE_SIZE:
        _CELL_CACHE.popitem(last=False)
    return out


def clear_caches() -> None:
    """Forget every cached LP result, high-precision chain and Krawtchouk table (for
    benchmarks that must time a cold run, and for tests)."""
    _CELL_CACHE.clear()
    _CHAINS.clear()
    _scaled_matrix.cache_clear()
    krawtchouk_table.cache_clear()


def _copy_cert(cert: dict | None) -> dict | None:
    if cert is None:
        return None
    out = dict(cert)
    out["y"] = list(cert["y"])
    if "extra" in cert:
        out["extra"] = [dict(e) for e in cert["extra"]]
    return out


def _run(params: Params, use_extra: bool, name: str, fallback: bool) -> BoundResult | None:
    q = params.q
    n, d, even = lp_cell(params)
    if n > MAX_LP_N or (q**n).bit_length() > MAX_LP_BITS:
        return None
    value, cert, certified, detail = _lp_cell_result(q, n, d, even, use_extra, fallback)
    mapped = (n, d) != (params.n, params.d)
    where = f" solved at A({n},{d})" if mapped else ""
    if cert is None:
        fval = value if value is not None else q**params.n
        return BoundResult(params, fval, name, certified=False,
                           note=f"{detail} not certified{where}")
    if not certified:
        return BoundResult(params, value, name, certificate=_copy_cert(cert), certified=False,
                           note=detail)
    note = ("even distances" if even else "all distances") + where + detail
    return BoundResult(params, value, name, certificate=_copy_cert(cert), note=note)


def delsarte_lp(params: Params, *, exact_fallback: bool = True) -> BoundResult | None:
    """Delsarte's LP bound with an exact rational dual certificate (kind ``delsarte-lp``).

    Parameters
    ----------
    params : Params
        The cell.
    exact_fallback : bool
        When the double-precision solve cannot be certified tightly (LP values beyond about
        2^40), solve in high precision (warm-started along d, see the module docstring;
        about 20 ms per LP at n ~ 128 within a grid run, up to a second for a single cell
        there). Off, such cells may come back uncertified (never used as a bound).

    Returns
    -------
    BoundResult or None
        None when the cell is beyond :data:`MAX_LP_N` / :data:`MAX_LP_BITS`.
    """
    return _run(params, False, "delsarte-lp", exact_fallback)


def delsarte_lp_plus(params: Params, *, exact_fallback: bool = True) -> BoundResult | None:
    """Delsarte's LP with extra inequalities: the binary families of
    :func:`extra_inequalities`, or for q > 2 the constant-weight family of
    :func:`qary_extra_inequalities` (certificate kind ``delsarte-lp-qcw``)."""
    return _run(params, True, "delsarte-lp-plus", exact_fallback)
