"""Exact data of the three-point semidefinite program for binary codes.

Problem
-------
Schrijver's three-point bound on ``A(n, d)`` works with variables ``x[i, j, t]`` indexed by
triples with ``0 <= t <= min(i, j)`` and ``i + j - t <= n``: for a code ``C`` in ``{0,1}^n``,
``x[i, j, t]`` is the fraction, averaged over ``u`` in ``C``, of the pairs ``(v, w)`` with
``d(u, v) = i``, ``d(u, w) = j``, ``d(v, w) = i + j - 2t`` for which both ``v`` and ``w`` lie in
``C``. The value is invariant under permuting the three distances ``(i, j, i + j - 2t)``, so one
variable per *triangle* ``{a, b, c}`` of distances suffices (``a + b + c`` even, triangle
inequalities, ``a + b + c <= 2n``).

The matrix ``sum x[i,j,t] M[i,j,t]`` (indexed by words, ``M[i,j,t]`` the 0/1 matrix of pairs of
weights ``i, j`` meeting in ``t`` ones) lies in the Terwilliger algebra of the cube; its explicit
block diagonalisation has blocks ``k = 0 .. floor(n/2)`` of size ``n - 2k + 1``, with entries
``sum_t beta[i,j,k,t] x[i,j,t]`` for ``i, j = k .. n-k`` (up to a positive diagonal congruence,
which does not change positive semidefiniteness), where

    beta[i,j,k,t] = sum_u (-1)^(u-t) C(u,t) C(n-2k, u-k) C(n-k-u, i-u) C(n-k-u, j-u).

This module holds everything that is exact (Python integers only): the triangle orbits, the
coefficient of each orbit in each block entry, the linear constraints. Solving and rounding
live in :mod:`codesearch.bounds.sdp`. The certificate checker in :mod:`codesearch.verify`
rebuilds these numbers through its own code path.

References
----------
A. Schrijver, "New code upper bounds from the Terwilliger algebra and semidefinite
programming", IEEE Trans. Inform. Theory 51 (2005) 2859-2866 (Sections II-IV: the algebra,
its block diagonalisation and the bound).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
import math
from fractions import Fraction
from math import comb

__all__ = [
    "beta",
    "Triangle",
    "ThreePointData",
    "three_point_data",
    "triangle_of",
    "constant_weight_cap",
    "shape_count",
    "variable_cap",
    "add_terms",
    "RowCollector",
]


def _binom(a: int, b: int) -> int:
    """Binomial coefficient, zero outside ``0 <= b <= a``."""
    if b < 0 or a < 0 or b > a:
        return 0
    return comb(a, b)


@lru_cache(maxsize=None)
def beta(n: int, i: int, j: int, k: int, t: int) -> int:
    """The block-diagonalisation coefficient ``beta^t_{i,j,k}`` of Schrijver (2005).

    Parameters
    ----------
    n : int
        Length.
    i, j : int
        Row and column weight (``k <= i, j <= n - k``).
    k : int
        Block index, ``0 <= k <= n // 2``.
    t : int
        Size of the intersection of the two supports.

    Returns
    -------
    int
        The exact integer coefficient.
    """
    total = 0
    for u in range(n + 1):
        term = (
            _binom(u, t)
            * _binom(n - 2 * k, u - k)
            * _binom(n - k - u, i - u)
            * _binom(n - k - u, j - u)
        )
        if term:
            total += -term if (u - t) % 2 else term
    return total


Triangle = tuple[int, int, int]


def triangle_of(i: int, j: int, t: int) -> Triangle:
    """The orbit (sorted distances, largest first) of the variable ``x[i, j, t]``."""
    a, b, c = sorted((i, j, i + j - 2 * t), reverse=True)
    return (a, b, c)


@dataclass(frozen=True)
class ThreePointData:
    """The exact semidefinite program of the three-point bound for one binary cell.

    The program is: maximise ``sum_v objective[v] * y[v]`` over ``y`` (one entry per free
    triangle, ``x[0,0,0] = 1`` substituted) subject to, for every block ``(family, k)``, the
    symmetric matrix ``const + sum_v y[v] * coef[v]`` being positive semidefinite, and
    ``rows @ y <= rhs`` for the linear rows. Every entry is an integer.

    Attributes
    ----------
    n, d : int
        The cell the program is written for.
    even : bool
        True when only even distances are allowed (valid for even ``d``).
    triangles : tuple of Triangle
        The free variables, in order.
    objective : tuple of int
        Objective coefficient of each free variable (``C(n, i)`` for ``{i, i, 0}``).
    blocks : tuple
        One entry per block: ``(family, k, size, const, coef)`` where ``const`` maps
        ``(r, s)`` (``r <= s``, 0-based inside the block) to an int and ``coef`` maps
        ``(r, s)`` to a dict ``{variable index: int}``. Family 0 is the matrix of the ``x``,
        family 1 the matrix of ``x[i+j-2t,0,0] - x[i,j,t]``.
    rows : tuple
        Linear inequalities as ``(label, {variable index: int}, rhs)`` meaning
        ``sum coef * y <= rhs``; ``label`` is ``("upper", i, j, t)`` for
        ``x[i,j,t] <= x[i,0,0]``, ``("pair", i, j, t)`` for
        ``x[i,0,0] + x[j,0,0] <= 1 + x[i,j,t]`` and ``("delsarte", k)`` for
        ``sum_i C(n,i) K_k(i) x[i,0,0] >= 0`` (``K_k`` the Krawtchouk polynomial) and
        ``("weight", i)`` for ``C(n,i) x[i,0,0] <= A(n,d,i)`` (a bound on constant-weight
        codes, :func:`constant_weight_cap`), ``("antipodal-ball", 0)`` and
        ``("antipodal-shell", 0)`` for the inequalities of the same names of
        :func:`codesearch.bounds.delsarte.extra_inequalities` on ``A_i = C(n,i) x[i,0,0]``.
    """

    n: int
    d: int
    even: bool
    triangles: tuple[Triangle, ...]
    objective: tuple[int, ...]
    blocks: tuple
    rows: tuple


def _free_triangles(n: int, d: int, even: bool) -> list[Triangle]:
    out = []
    for a in range(n + 1):
        for b in range(a + 1):
            for c in range(b + 1):
                if (a + b + c) % 2 or a > b + c or a + b + c > 2 * n:
                    continue
                if (a, b, c) == (0, 0, 0):
                    continue  # fixed to 1
                if any(1 <= v < d for v in (a, b, c)):
                    continue  # two codewords at distance 1..d-1
                if even and any(v % 2 for v in (a, b, c)):
                    continue
                out.append((a, b, c))
    return out


def add_terms(cv: dict[int, int], terms: list[tuple[int | None, int]], weight: int) -> int:
    """Add ``weight * c`` for each ``(variable, c)`` of ``terms`` to ``cv``; return the part
    on the constant ``x[0..] = 1`` (variable ``-1``). Variables forced to zero (None) drop."""
    const = 0
    for v, c in terms:
        if v is None:
            continue
        if v == -1:
            const += c * weight
        else:
            cv[v] = cv.get(v, 0) + c * weight
    return const


class RowCollector:
    """Linear rows ``sum c_v y_v <= rhs`` of a three-point program, deduplicated.

    :meth:`add` moves the constant variable (index -1) to the right-hand side and drops
    variables forced to zero; rows left without a variable are trivially true (checked:
    ``rhs >= 0`` for every row built here) and dropped.
    """

    def __init__(self) -> None:
        self.rows: list[tuple[tuple, dict[int, int], int]] = []
        self._seen: set[tuple] = set()

    def add(self, name: tuple, terms: list[tuple[int | None, int]], rhs: int) -> None:
        cv: dict[int, int] = {}
        rhs -= add_terms(cv, terms, 1)
        cv = {v: c for v, c in cv.items() if c}
        if not cv:
            return
        key = (tuple(sorted(cv.items())), rhs)
        if key not in self._seen:
            self._seen.add(key)
            self.rows.append((name, cv, rhs))


def antipodal_inequalities(n: int, d: int) -> list[tuple[str, int, dict[int, int], int]]:
    """The ``antipodal-ball`` and ``antipodal-shell`` rows of
    :func:`codesearch.bounds.delsarte.extra_inequalities` (``sum_i a_i A_i <= b``)."""
    from codesearch.bounds.delsarte import extra_inequalities

    return [row for row in extra_inequalities(n, d) if row[0].startswith("antipodal-")]


def _krawtchouk(n: int, k: int, i: int) -> int:
    return sum((-1) ** s * _binom(i, s) * _binom(n - i, k - s) for s in range(k + 1))


@lru_cache(maxsize=64)
def three_point_data(n: int, d: int, even: bool, delsarte: bool = True) -> ThreePointData:
    """Build the exact three-point program for binary length ``n`` and distance ``d``.

    Parameters
    ----------
    n, d : int
        Cell (``1 <= d <= n``).
    even : bool
        Add the even-distance restriction (only valid for even ``d``, where some largest
        code has all distances even).
    delsarte : bool
        Add Delsarte's inequalities ``sum_i C(n,i) K_k(i) x[i,0,0] >= 0`` (valid for every
        code; the semidefinite constraints imply them in theory, explicit rows help the
        solver and cost nothing in the certificate).

    Returns
    -------
    ThreePointData
    """
    tris = _free_triangles(n, d, even)
    index = {tri: v for v, tri in enumerate(tris)}
    objective = [0] * len(tris)
    for i in range(1, n + 1):
        tri = (i, i, 0)
        if tri in index:
            objective[index[tri]] = _binom(n, i)

    def var(i: int, j: int, t: int) -> int | None:
        """Index of x[i,j,t]; -1 for the constant x[0,0,0] = 1; None when forced to zero."""
        tri = triangle_of(i, j, t)
        if tri == (0, 0, 0):
            return -1
        return index.get(tri)

    blocks = []
    for family in (0, 1):
        for k in range(n // 2 + 1):
            size = n - 2 * k + 1
            const: dict[tuple[int, int], int] = {}
            coef: dict[tuple[int, int], dict[int, int]] = {}
            for r in range(size):
                for s in range(r, size):
                    i, j = r + k, s + k
                    c0 = 0
                    cv: dict[int, int] = {}
                    for t in range(min(i, j) + 1):
                        if i + j - t > n:
                            continue
                        bt = beta(n, i, j, k, t)
                        if bt == 0:
                            continue
                        terms = [(var(i, j, t), 1)]
                        if family == 1:
                            terms = [(var(i + j - 2 * t, 0, 0), 1), (terms[0][0], -1)]
                        c0 += add_terms(cv, terms, bt)
                    cv = {v: c for v, c in cv.items() if c}
                    if c0:
                        const[(r, s)] = c0
                    if cv:
                        coef[(r, s)] = cv
            blocks.append((family, k, size, const, coef))

    collector = RowCollector()
    add = collector.add

    for i in range(n + 1):
        for j in range(n + 1):
            for t in range(min(i, j) + 1):
                if i + j - t > n:
                    continue
                x = var(i, j, t)
                if x is None or x == -1:
                    continue
                # x[i,j,t] <= x[i,0,0]: a pair (v, w) with both in C has v in C.
                add(("upper", i, j, t), [(x, 1), (var(i, 0, 0), -1)], 0)
                # x[i,0,0] + x[j,0,0] <= 1 + x[i,j,t]: [v in C] + [w in C] - 1 <= [v,w in C].
                add(("pair", i, j, t), [(var(i, 0, 0), 1), (var(j, 0, 0), 1), (x, -1)], 1)
    for i in range(1, n + 1):
        # A_i <= A(n, d, i): the codewords at distance i from a codeword, translated to
        # the origin, form a constant-weight code (Johnson's bound, as in the classical
        # strengthening of Delsarte's LP); C(n,i) x[i,0,0] is the average A_i.
        add(("weight", i), [(var(i, 0, 0), _binom(n, i))], constant_weight_cap(n, d, i))
    # The antipodal inequalities of the strengthened LP, on the average distribution
    # A_i = C(n,i) x[i,0,0] (they hold around every codeword; see
    # codesearch.bounds.delsarte.extra_inequalities for the proofs). Measured: A(28,8) <= 32151
    # and A(26,8) <= 9650 with them, 32152 and 9695 without.
    for name, number, coeffs, rhs in antipodal_inequalities(n, d):
        add((name, number), [(var(i, 0, 0), a * _binom(n, i)) for i, a in coeffs.items()], rhs)
    if delsarte:
        for k in range(n + 1):
            terms = [(var(i, 0, 0), -_binom(n, i) * _krawtchouk(n, k, i)) for i in range(n + 1)]
            add(("delsarte", k), terms, 0)
    return ThreePointData(
        n=n,
        d=d,
        even=even,
        triangles=tuple(tris),
        objective=tuple(objective),
        blocks=tuple(blocks),
        rows=tuple(collector.rows),
    )


@lru_cache(maxsize=None)
def constant_weight_cap(n: int, d: int, w: int) -> int:
    """An upper bound on A(n, d, w), the size of a binary code of weight-``w`` words.

    Johnson's recursive bounds ``A(n,2e,w) <= floor(n/w * A(n-1,2e,w-1))`` and
    ``A(n,2e,w) <= floor(n/(n-w) * A(n-1,2e,w))``, with ``A(n,2e,w) = 1`` when
    ``min(w, n-w) < e`` and the trivial cap ``C(n, w)`` (Johnson 1962; MacWilliams and
    Sloane, Ch. 17, Theorems 2-3). Two weight-``w`` words are at even distance, so the
    minimum distance ``d`` may be replaced by ``2 * ceil(d / 2)``.
    """
    if w < 0 or w > n:
        return 0
    e = (d + 1) // 2
    if min(w, n - w) < e:
        return 1
    best = comb(n, w)
    if w > 0:
        best = min(best, (n * constant_weight_cap(n - 1, d, w - 1)) // w)
    if n - w > 0:
        best = min(best, (n * constant_weight_cap(n - 1, d, w)) // (n - w))
    return best


def shape_count(n: int, a: int, b: int, c: int) -> int:
    """Number of ordered pairs (v, w) at distances a, b from a fixed word with d(v,w) = c.

    Symmetric in (a, b, c): the multinomial ``n! / (s1! s2! s3! (n - (a+b+c)/2)!)`` with
    ``s1, s2, s3`` the half-perimeter minus each side.
    """
    p = (a + b + c) // 2
    f = math.factorial
    return f(n) // (f(p - a) * f(p - b) * f(p - c) * f(n - p))


def variable_cap(n: int, d: int, tri: Triangle) -> Fraction:
    """A valid upper bound on ``x`` of triangle ``tri`` for every code of distance ``d``.

    Around a codeword ``u`` there are at most ``U_s = A(n, d, s)`` codewords at distance
    ``s`` (``U_0 = 1``); so the pairs of codewords of shape ``(a, b, c)`` around ``u`` number
    at most the product of the two smallest ``U`` among the sides, and ``x`` is that count
    divided by :func:`shape_count`. Capped at 1.
    """
    caps = sorted(1 if s == 0 else constant_weight_cap(n, d, s) for s in tri)
    return min(Fraction(1), Fraction(caps[0] * caps[1], shape_count(n, *tri)))
