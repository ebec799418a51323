"""A four-point semidefinite upper bound on A(n, d) for binary codes, proved in exact arithmetic.

Problem
-------
Bound the size of every binary code ``C`` of length ``n`` and minimum distance ``d`` with
constraints on how the code's *quadruples* of words sit in the cube, as in the method of
Gijswijt, Mittelmann and Schrijver (2012), on top of Schrijver's three-point program
(:mod:`codesearch.bounds.sdp`).

Variables
---------
Let ``G`` be the automorphism group of the cube (translations and coordinate permutations)
and, for a set ``S`` of words, ``y(S)`` the probability that ``g(S)`` lies in ``C`` for ``g``
uniform in ``G``; ``y`` depends only on the ``G``-orbit of ``S``. Put
``x(S) = y(S) / y({0})``: ``x`` of a single word is 1, ``x`` of a pair or triple is
Schrijver's three-point variable of its triangle of distances
(:mod:`codesearch.bounds.terwilliger`), and ``x`` of a 4-set is new. A 4-set
``{P0, P1, P2, P3}`` is described by its *profile* ``(s0, s1, s2, s3, m1, m2, m3)``: ``s_a``
columns in which ``P_a`` differs from the three others, ``m_b`` columns that split the four
points as ``{P0, P_b} | {the other two}``; the rest of the ``n`` columns are constant. The
``G``-orbits of 4-sets are the profiles modulo the 24 relabellings of the points (the
canonical profile is the least one); the pairwise distances are
``d(P_a, P_b) = s_a + s_b + (the two m's whose matching separates a and b)``. A 4-set with a
distance in ``1..d-1`` never lies in a code, so its variable is zero and left out; for even
``d`` only codes with all distances even are considered (some largest code is one:
puncture, then extend by parity), which also zeroes every set with an odd distance.

Constraints (every one holds for every code; proofs)
----------------------------------------------------
For a code ``C`` and a set ``D`` of words, the matrix indexed by words ``u, v``

    E_g[ 1(g u in C) 1(g v in C) prod_{a in A} 1(g a in C) prod_{b in B} (1 - 1(g b in C)) ]

with ``D = A u B`` is an average of matrices ``f f^T`` (``f_u = 1(g u in C) * ...``), hence
positive semidefinite; expanding the product it is a signed sum of ``y`` of sets, and dividing
by ``y({0}) > 0`` keeps it PSD. For ``|D| = 1`` these are Schrijver's two matrices (kept as
they are, with all of Schrijver's linear rows). New here: ``D = {0, w}`` with ``|w| = i``,

* family 2 (``0, w`` in ``C``):      ``N_uv = x({0, w, u, v})``, ``i >= d``;
* family 3 (``0`` in, ``w`` out):    ``N_uv = x({0, u, v}) - x({0, w, u, v})``, ``i >= d``;
* family 4 (``0, w`` both out):      ``N_uv = x({u, v}) - x({0, u, v}) - x({w, u, v})
  + x({0, w, u, v})``, ``1 <= i <= n``

(family 3 with ``i < d`` is Schrijver's first matrix again, so it is left out), and the
diagonal inequalities of the same kind for every 4-set ``S`` of the program and every split
``S = A u B`` with ``A`` not empty: ``sum_{B' in B} (-1)^|B'| x(A u B') >= 0``.

Symmetry reduction (block diagonalisation)
------------------------------------------
``N`` is invariant under the permutations fixing ``w``, ``S_i x S_{n-i}`` (support of ``w``
and its complement). The matrices indexed by ``F^i x F^{n-i}`` invariant under that group are
the tensor product of two Terwilliger algebras of cubes, so Schrijver's block
diagonalisation of each factor gives theirs: with ``u`` of weights ``(i1, i2)`` on the two
parts, ``v`` of weights ``(j1, j2)`` and ``t1, t2`` common ones, ``N`` is PSD if and only if
for all ``0 <= k1 <= i/2``, ``0 <= k2 <= (n-i)/2`` the block

    B[(i1,i2),(j1,j2)] = sum_{t1,t2} beta^(i)[i1,j1,k1,t1] beta^(n-i)[i2,j2,k2,t2] N(i1,j1,t1,i2,j2,t2)

(``k1 <= i1, j1 <= i - k1``, ``k2 <= i2, j2 <= n - i - k2``; ``beta^(m)`` Schrijver's coefficient
at length ``m``, :func:`codesearch.bounds.terwilliger.beta`) is PSD: the blocks are the images of
``N`` under the tensor product of the two *-isomorphisms, up to a positive diagonal
congruence, with multiplicity ``(C(i,k1) - C(i,k1-1)) (C(n-i,k2) - C(n-i,k2-1))``. Rows whose
diagonal entry vanishes for every code (the words ``u`` that cannot lie in ``C`` together with
the set ``A``) are dropped. Two further splits, each a congruence of the block:

* *parity* (even ``d``): entries between rows with ``i1 + i2`` of different parities are
  zero (the sets involved have an odd distance), so the block is the direct sum of its two
  parity classes;
* *swap* (families 2 and 4): translation by ``w`` exchanges ``0`` and ``w``, maps row
  ``(i1, i2)`` to ``(i - i1, i2)`` and leaves ``N`` invariant; with ``f_r = e_r + e_r'`` and
  ``f_r = e_r - e_r'`` (``r'`` the mirror row) the block splits into a ``+`` and a ``-`` part.
  For odd ``i`` (family 4 with even ``d``) the mirror exchanges the parity classes, so only
  the class of even ``i1 + i2`` is kept.

Each split block is ``F^T B F`` for a fixed integer matrix ``F``, so it is PSD for every code
whatever the splits; the splits lose nothing because ``B`` is their direct sum.
:mod:`codesearch.verify.four_point` rebuilds every coefficient itself.

What is and is not in the program
---------------------------------
It contains Schrijver's three-point program (his two block families, all his linear rows),
so its value is never above the three-point bound; added are the families 2-4 above, the
diagonal inequalities of every free 4-set and, on request (``target``), the moment matrix
of all sets of at most two words (families 5 and 6 below).

The pair moment matrix (families 5 and 6)
-----------------------------------------
The matrix indexed by the sets ``S`` of at most two words with entries ``y(S u S')`` is
``E_g[f f^T]`` with ``f_S = 1(g S in C)``, so it is PSD; divided by ``y({0}) = |C| / 2^n`` its
entries are ``x(S u S')``, except the corner ``x(empty) = 2^n / |C|``, which is not linear in
``x``. Write a pair or a single word as ``(u, a)``: the set ``{u, u + a}`` (``a = 0``: the word
``u``; each pair appears twice, which does not change positive semidefiniteness). The entry
between ``(u, a)`` and ``(v, b)`` is ``f(a, b, c) = x({0, a, c, c + b})``, ``c = u + v``
(translate by ``u``), so the characters ``z`` of ``F_2^n`` block-diagonalise the part without
the empty set: block ``z`` has entries ``F_z(a, b) = sum_c (-1)^(z.c) f(a, b, c)``, and it
vanishes on the rows with ``z.a = 1`` (``f(a, b, c + a) = f(a, b, c)``). The row of the empty
set has entries ``x({u, u + a}) = p(a)``, constant in ``u``, so it meets only ``z = 0``: with
the row scaled by ``2^(-n/2)`` that block is ``[[1 / |C|, p^T], [p, F_0]]``. For a code of at
least ``U`` words, ``[[1 / U, p^T], [p, F_0]]`` is then PSD too (the corner only grew), and
scaling the first row by ``U`` makes it integral: family 6 is

    [[U, U C(n, j) p_j], [U C(n, i) p_i, G_0(i, j)]]   (rows: the empty set, then weights i),

``G_0`` the ``k = 0`` block below at ``w = 0`` (``beta`` at ``k = 0`` is exactly the sum over
the words of weights ``i`` and ``j``). Every ``F_z`` with ``|z| = w`` is invariant under
``S_w x S_{n-w}``, so the tensor-product reduction of families 2-4 applies: family 5 is, for
each ``w`` and ``(k1, k2) != (0, 0)`` when ``w = 0``, the block

    B[(i1,i2),(j1,j2)] = sum_{t1,t2} beta^(w)[i1,j1,k1,t1] beta^(n-w)[i2,j2,k2,t2] F_w(...),

rows ``a = 0`` or of an allowed distance, with ``i1`` even (``z.a = 0``). ``F_w`` is a sum
over ``c`` grouped by its numbers of ones ``T`` in the four cells cut out by ``a`` and ``b``
(sizes ``S``, of which ``s1`` on the support of ``z``): the 4-set depends on ``T`` only, and
the sign sum over the placements is a product of Krawtchouk values
``K_T(s1)`` of length ``S`` (:func:`codesearch.bounds.krawtchouk.krawtchouk`). The program then bounds only the codes
of at least ``U`` words: its certificate proves ``A <= max(U - 1, floor(bound))``, and
:func:`four_point_bound` tries the targets ``U`` in turn (:func:`_pair_refinement`).
Real codes satisfy every block, linear and nonlinear ones (``tests/test_fourpoint.py``).
Measured (benchmarks/results_fourpoint.md): the targets 136 at A(19,8), 257 at A(20,8),
48 at A(21,10) and 85 at A(22,10) are excluded, so A(19,8) <= 135, A(20,8) <= 256,
A(21,10) <= 47 and A(22,10) <= 84, the published values; at A(17,8) and A(18,8) the values
drop from 38.76 and 74.79 to 38.21 and 73.02, above the published 37 and 72 (from memory),
and at distance 6 the solves take several times longer than the plain program. A(18,6) at
the target 674 (23 minutes) ends in numerical errors, but since the linear multipliers are
refitted after rounding (:func:`codesearch.bounds.sdp._refit_multipliers`) two of its passes
certify the program infeasible, so A(18,6) <= 673, the published value; A(19,6) at the
target 1238 gives 1238.07 (17 minutes, one pass), so A(19,6) <= 1238; A(20,6) at the target
2280 gives 2279.90 (33 minutes, one pass), so A(20,6) <= 2279, the published value. Not
every cell gains: A(20,4) at the target 26169 stays at the LP's 26214.4 (45 minutes), and
the pair blocks without families 2-4 give only 2286.6 at A(20,6) in 19 minutes (the solve
time is in the 4-set variables and rows, which both programs share).

Size cuts (a code of exactly ``U`` words)
-----------------------------------------
For a code ``C`` of ``M`` words and a word ``u`` put ``S_u = sum_{x in C} (-1)^(u.x)``; then
``b_k = sum_{|u| = k} S_u^2 = M sum_i A_i K_k(i)`` (``A_i`` the distance distribution,
``A_0 = 1``). Two congruences bound ``b_k`` from below (:mod:`codesearch.bounds.integral`
proves them for Delsarte's LP):

* ``M`` odd: every ``S_u`` is odd, so ``b_k >= C(n,k)``;
* ``M = 2 mod 4`` and all weights even: ``S_u = M - 2 t_u`` with ``t_u = u.sigma (mod 2)``,
  ``sigma`` the sum of the words (of even weight ``s``), so ``S_u = 2 mod 4`` on the
  ``(C(n,k) + K_k(s)) / 2`` words of weight ``k`` orthogonal to ``sigma`` and
  ``b_k >= 2 (C(n,k) + K_k(s))``; ``s`` is not known, so one program per even ``s`` (or one
  with the least right-hand side over ``s``, which is weaker but covers them all).

With ``size_cut`` (:func:`size_cut_floors`) the rows ``("size-cut", k)``,
``U sum_i A_i K_k(i) >= c_k``, are added to the program at target ``U``; they hold for codes
of exactly ``U`` words only, so such a solve *excludes the size* ``U`` when its bound is
below ``U`` and proves nothing else. :func:`four_point_size_cut` combines the exclusions
with a certificate of ``A <= U`` into one of ``A <= U - 1`` (kind ``four-point-size-cut``).
Measured (benchmarks/results_fourpoint.md, seventh round): A(18,8) <= 72 (odd-size cut, one
solve) and A(19,6) <= 1237 (the least 2-mod-4 cut, one solve), the published values; at
A(17,8), size 38, the cut excludes the weights s = 0..6 of the sum but not s = 8, 10 (38.04,
38.07), so A(17,8) stays at 38.

Size, refusal and certificate
-----------------------------
:func:`four_point_size` counts the program exactly before anything is built: only free
variables (sets with a distance in ``1..d-1`` or odd are zero and never become variables),
the blocks after the splits with their vanishing rows dropped, and the terms of the block
entries. :func:`check_four_point_fits` refuses (one line naming the size) a cell past
:data:`MEMORY_BYTES`, :data:`MAX_BUILD_TERMS` or :data:`MAX_SECONDS` of estimated time;
from :data:`UNCOUNTED_N` on without counting. The solve and the rigorous rounding are
:func:`codesearch.bounds.sdp.solve_program`'s; the certificate (kind ``four-point-sdp``)
names the rows ``(i1, i2)`` and the ``sign`` of each new block, and
:mod:`codesearch.verify.four_point` re-checks it from scratch before it is returned.

References
----------
D. C. Gijswijt, H. D. Mittelmann and A. Schrijver, "Semidefinite code bounds based on
quadruple distances", IEEE Trans. Inform. Theory 58 (2012) 2697-2705 (the variables on
4-sets, the matrices ``M_D`` and their reduction by the stabiliser of ``D``).
A. Schrijver, "New code upper bounds from the Terwilliger algebra and semidefinite
programming", IEEE Trans. Inform. Theory 51 (2005) 2859-2866 (the block diagonalisation of
the Terwilliger algebra used for each factor).
M. Laurent, "Strengthened semidefinite programming bounds for codes", Math. Program. 109
(2007) 239-261 (the matrices as moment matrices of 0/1 variables).
"""

from __future__ import annotations

import itertools
import math
import time
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from math import comb
from typing import Any

from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = ["FourPointSize", "four_point_size", "check_four_point_fits", "four_point_bound",
           "four_point_data", "FourPointData", "canonical_profile", "profile_distances",
           "block_rows", "FAMILIES", "MEMORY_BYTES", "MAX_BUILD_TERMS", "MAX_SECONDS",
           "UNCOUNTED_N", "quad_cap", "solve_four_point", "PAIR_SOLVES", "PAIR_PASSES_BELOW_8",
           "pair_moment_rows", "SIZE_CUTS", "size_cut_floors", "four_point_size_cut"]

#: Memory allowed to one solve (this machine has 24 GB, shared).
MEMORY_BYTES = 20 * 10**9
#: Largest program built: terms of the block entries (the build and the check are linear
#: in it; about 20 s of Python per 10^7).
MAX_BUILD_TERMS = 6 * 10**7
#: Longest estimated run accepted (seconds of wall time on this machine, see
#: :attr:`FourPointSize.seconds`).
MAX_SECONDS = 4 * 3600
#: The time model: ``_SECONDS_AT * (terms / _TERMS_AT) ** _SECONDS_POWER``, a least-squares
#: fit in logarithms on the measured runs of benchmarks/results_fourpoint.md (A(17,8),
#: A(18,8), A(20,8): 143 s, 463 s, 1368 s of wall time for 2.4, 3.7, 8.4 million terms;
#: build, three numerical passes, rounding and the independent re-check, on the shared,
#: loaded machine).
_SECONDS_AT, _TERMS_AT, _SECONDS_POWER = 361.0, 3.75e6, 1.8
#: The memory model: peak bytes ``_BASE_BYTES + _BYTES_PER_TERM * terms`` (same runs: 0.9,
#: 1.5, 3.9 GB peak resident, 370-460 bytes per term; the dict-of-dicts program dominates,
#: not the solver). Raised from 500 to 720 bytes per term after A(20,4) (9.4 million terms,
#: 6.9 GB) and A(22,6) (18.7 million terms, 13.5 GB) came in 37-40 % above the first fit;
#: both runs' wall times (37 and 121 min) were within 20 % of the time model.
_BASE_BYTES, _BYTES_PER_TERM = 3 * 10**8, 720
#: Solves with the pair moment blocks (families 5, 6) after the plain four-point solve.
PAIR_SOLVES = 3
#: Numerical passes of a pair solve for distances below 8: one. At distance 6 the first pass
#: settled every cell measured (A(18,6) <= 673, A(19,6) <= 1238, A(20,6) <= 2279) and the
#: later ones cost an hour or more and moved nothing (benchmarks/results_fourpoint.md).
PAIR_PASSES_BELOW_8 = 1
#: From this length on the program is refused without being counted: the blocks of family 4
#: (whose rows do not depend on d) alone have 9.9 * 10^7 terms at n = 28 (counted), past
#: :data:`MAX_BUILD_TERMS`, and more for longer codes.
UNCOUNTED_N = 28

#: family -> (name, the point subsets of {0:0, 1:w, 2:u, 3:v} with their signs)
FAMILIES: dict[int, tuple[str, tuple[tuple[tuple[int, ...], int], ...]]] = {
    2: ("0 and w in the code", (((0, 1, 2, 3), 1),)),
    3: ("0 in, w out", (((0, 2, 3), 1), ((0, 1, 2, 3), -1))),
    4: ("0 and w out", (((2, 3), 1), ((0, 2, 3), -1), ((1, 2, 3), -1), ((0, 1, 2, 3), 1))),
}

# The three perfect matchings of the points {0,1,2,3}, named by the partner of point 0.
_PARTNERS = (1, 2, 3)


def _matching_pairs(b: int) -> tuple[frozenset, frozenset]:
    rest = [p for p in (1, 2, 3) if p != b]
    return frozenset((0, b)), frozenset(rest)


def _relabellings() -> list[tuple[tuple[int, ...], tuple[int, ...]]]:
    """For each permutation ``p`` (new point ``a`` = old point ``p[a]``): the old index of
    each new ``s`` and of each new ``m`` entry."""
    out = []
    for p in itertools.permutations(range(4)):
        mperm = []
        for b in _PARTNERS:
            pair = {p[0], p[b]}
            if 0 in pair:
                old = (pair - {0}).pop()
            else:
                old = ({1, 2, 3} - pair).pop()
            mperm.append(old - 1)
        out.append((tuple(p), tuple(mperm)))
    return out


_RELABEL = _relabellings()


def canonical_profile(prof: tuple[int, ...]) -> tuple[int, ...]:
    """The least profile ``(s0, s1, s2, s3, m1, m2, m3)`` over the 24 relabellings."""
    s, m = prof[:4], prof[4:]
    return min(tuple(s[a] for a in p) + tuple(m[b] for b in mp) for p, mp in _RELABEL)


def _separates(b: int, x: int, y: int) -> bool:
    first, _second = _matching_pairs(b)
    return (x in first) != (y in first)


_SEP = {(x, y): tuple(b - 1 for b in _PARTNERS if _separates(b, x, y))
        for x in range(4) for y in range(4) if x != y}


def profile_distances(prof: tuple[int, ...]) -> dict[tuple[int, int], int]:
    """``d(P_a, P_b)`` for ``a < b``."""
    return {(a, b): prof[a] + prof[b] + sum(prof[4 + c] for c in _SEP[(a, b)])
            for a in range(4) for b in range(a + 1, 4)}


def _profile_of(i: int, i1: int, j1: int, t1: int, i2: int, j2: int, t2: int
                ) -> tuple[int, ...]:
    """Profile of ``(0, w, u, v)``: ``|w| = i``; ``u``, ``v`` of weights ``i1, j1`` on the
    support of ``w`` (``t1`` in common) and ``i2, j2`` off it (``t2`` in common)."""
    return (t1, i - i1 - j1 + t1, i2 - t2, j2 - t2, t2, j1 - t1, i1 - t1)


def _allowed(dist: int, d: int, even: bool) -> bool:
    return dist == 0 or (dist >= d and not (even and dist % 2))


def _set_key(prof: tuple[int, ...], points: tuple[int, ...], d: int, even: bool):
    """Orbit of the set of the given points: ``()`` for one word, a triangle ``(a, b, c)``
    (Schrijver's, ``(i, i, 0)`` for a pair) for two or three distinct words, a canonical
    profile for four; None when the set has a forbidden distance (its variable is 0)."""
    dist = profile_distances(prof)
    reps: list[int] = []
    for p in points:
        if not any(dist[(min(p, r), max(p, r))] == 0 for r in reps):
            reps.append(p)
    sides = [dist[(a, b)] for a, b in itertools.combinations(reps, 2)]
    if not all(_allowed(x, d, even) for x in sides):
        return None
    if len(reps) == 1:
        return ()
    if len(reps) == 2:
        return (sides[0], sides[0], 0)
    if len(reps) == 3:
        return tuple(sorted(sides, reverse=True))
    return canonical_profile(prof)


def block_rows(n: int, d: int, even: bool, family: int, i: int, k1: int, k2: int
               ) -> list[tuple[int, int]]:
    """Rows ``(i1, i2)`` of block ``(k1, k2)`` of ``family`` whose diagonal is not zero for
    every code (before the parity and swap splits), in order."""
    rows = []
    for i1 in range(k1, i - k1 + 1):
        for i2 in range(k2, n - i - k2 + 1):
            a, b = i1 + i2, i - i1 + i2  # d(0, u), d(w, u)
            if family == 2:
                ok = _allowed(a, d, even) and _allowed(b, d, even)
            elif family == 3:
                ok = _allowed(a, d, even) and b != 0
            else:
                ok = a != 0 and b != 0
            if ok:
                rows.append((i1, i2))
    return rows


def _splits(family: int, i: int, even: bool, rows: list[tuple[int, int]]):
    """The (sign, parity, rows) of the split blocks; rows of a swap half are the
    representatives ``i1 <= i - i1`` (``<`` for the minus half)."""
    parities = (0, 1) if even else (-1,)
    swap = family in (2, 4) and (not even or i % 2 == 0)
    for parity in parities:
        if even and i % 2 and parity == 1:
            continue  # congruent to parity 0 through the mirror
        cls = [r for r in rows if parity < 0 or (r[0] + r[1]) % 2 == parity]
        if swap:
            yield 1, parity, [r for r in cls if 2 * r[0] <= i]
            yield -1, parity, [r for r in cls if 2 * r[0] < i]
        else:
            yield 0, parity, cls


@dataclass(frozen=True)
class FourPointData:
    """The exact four-point program of one cell, in the layout of
    :class:`codesearch.bounds.terwilliger.ThreePointData`: Schrijver's triangles first
    (their indices unchanged), then the 4-set profiles; Schrijver's blocks (key ``k``) and rows,
    then the new blocks (key ``(i, k1, k2, sign, parity)``, family 2..4) and the diagonal
    rows ``("quad", *profile, mask)`` (``mask``: the bits of the points in ``A``)."""

    n: int
    d: int
    even: bool
    triangles: tuple
    objective: tuple
    blocks: tuple
    rows: tuple
    block_rows: dict
    terms: int


@dataclass(frozen=True)
class FourPointSize:
    """Exact size of the four-point program of a cell, counted before it is built.

    Attributes
    ----------
    n, d : int
        The program's cell (even ``d``).
    quads : int
        Free 4-set variables (orbits of 4-sets with every distance allowed).
    triangles : int
        Schrijver's free variables.
    blocks : int
        New PSD blocks (after the splits, zero rows dropped).
    largest : int
        Order of the largest block.
    kkt_bytes : int
        Memory of the dense parts of the interior-point system: ``8 (m(m+1)/2)^2`` per block
        of order ``m`` plus the dense ``8 V^2`` of the variables.
    terms : int
        Terms of the block entries (work of the build and of the check).
    """

    n: int
    d: int
    quads: int
    triangles: int
    blocks: int
    largest: int
    kkt_bytes: int
    terms: int

    @property
    def variables(self) -> int:
        return self.quads + self.triangles

    @property
    def seconds(self) -> float:
        """Estimated wall time of the whole run (a power law in :attr:`terms` fitted on the
        measured cells; rough, and the machine is shared)."""
        return _SECONDS_AT * (self.terms / _TERMS_AT) ** _SECONDS_POWER

    @property
    def peak_bytes(self) -> int:
        """Estimated peak memory of the whole run (linear in :attr:`terms`, fitted on the
        measured cells), at least the dense interior-point parts."""
        return max(self.kkt_bytes, _BASE_BYTES + _BYTES_PER_TERM * self.terms)

    @property
    def fits(self) -> bool:
        return (self.peak_bytes <= MEMORY_BYTES and self.terms <= MAX_BUILD_TERMS
                and self.seconds <= MAX_SECONDS)

    @property
    def pair_seconds(self) -> float:
        """Estimated wall time of one solve with the pair moment blocks: about one plain
        solve for ``d >= 8`` (measured 587 s against 584 s at A(19,8), 1439 s against
        1373 s at A(20,8)); for smaller ``d`` the solve has one numerical pass
        (:data:`PAIR_PASSES_BELOW_8`), which takes about 1.2 plain three-pass solves (17 min
        against 15 at A(19,6), 33 against 27 at A(20,6); three passes took six times a plain
        solve at A(18,6); benchmarks/results_fourpoint.md)."""
        return self.seconds * (1.0 if self.d >= 8 else 1.2)

    def size_cut_fits(self, pair_solves: int, limit: float = MAX_SECONDS) -> bool:
        """Whether one size-cut solve (:attr:`pair_seconds`) fits in ``limit`` seconds after
        ``pair_solves`` solves with the pair moment blocks."""
        return self.pair_seconds * (pair_solves + 1) <= limit

    def pair_solves_within(self, limit: float = MAX_SECONDS) -> int:
        """How many of the :data:`PAIR_SOLVES` solves with the pair moment blocks fit in
        ``limit`` seconds (:attr:`pair_seconds` each)."""
        return max(0, min(PAIR_SOLVES, int(limit // max(self.pair_seconds, 1e-9))))

    def describe(self) -> str:
        return (f"four-point SDP for A({self.n},{self.d}): {self.variables:,} free variables "
                f"({self.quads:,} on 4-sets), {self.blocks:,} blocks up to order "
                f"{self.largest}, {self.terms:,} block terms, about "
                f"{self.peak_bytes / 1e9:.1f} GB and {self.seconds / 60:,.0f} min")


def _program_cell(params: Params) -> tuple[int, int]:
    if params.d % 2:
        return params.n + 1, params.d + 1
    return params.n, params.d


def _quad_profiles(n: int, d: int, even: bool) -> list[tuple[int, ...]]:
    """Every canonical profile of a 4-set with all six distances allowed, sorted.

    Enumerated as ``(0, w, u, v)`` with ``|w|`` the least distance of the set is not needed:
    every orbit contains a representative with ``P0 = 0``, so the loops run over ``|w| = i``
    and the weights of ``u``, ``v`` on and off the support of ``w``."""
    seen = set()
    for i in range(d, n + 1):
        if even and i % 2:
            continue
        for i1 in range(i + 1):
            for i2 in range(n - i + 1):
                if not (_allowed(i1 + i2, d, even) and _allowed(i - i1 + i2, d, even)):
                    continue
                if i1 + i2 == 0 or i - i1 + i2 == 0:
                    continue
                for j1 in range(i1, i + 1):
                    for j2 in range(n - i + 1):
                        if (j1, j2) < (i1, i2) or j1 + j2 == 0 or i - j1 + j2 == 0:
                            continue
                        if not (_allowed(j1 + j2, d, even) and _allowed(i - j1 + j2, d, even)):
                            continue
                        for t1 in range(max(0, i1 + j1 - i), min(i1, j1) + 1):
                            for t2 in range(max(0, i2 + j2 - (n - i)), min(i2, j2) + 1):
                                duv = i1 + j1 - 2 * t1 + i2 + j2 - 2 * t2
                                if duv == 0 or not _allowed(duv, d, even):
                                    continue
                                seen.add(canonical_profile(_profile_of(i, i1, j1, t1, i2, j2,
                                                                       t2)))
    return sorted(seen)


def _count_terms(n: int, i: int, rows: list, k1: int, k2: int) -> int:
    total = 0
    for i1, i2 in rows:
        for j1, j2 in rows:
            total += ((min(i1, j1) - max(0, i1 + j1 - i) + 1)
                      * (min(i2, j2) - max(0, i2 + j2 - (n - i)) + 1))
    return total


@lru_cache(maxsize=64)
def four_point_size(n: int, d: int) -> FourPointSize:
    """The exact size of the four-point program of binary ``(n, d)`` (``d`` even; odd ``d``
    is bounded through ``A(n+1, d+1)`` by the callers), counted without building it."""
    from codesearch.bounds.terwilliger import three_point_data

    even = d % 2 == 0
    quads = len(_quad_profiles(n, d, even))
    tris = len(three_point_data(n, d, even).triangles)
    sizes = []
    terms = 0
    for family in (2, 3, 4):
        for i in range(1, n + 1):
            if family != 4 and not (i >= d and not (even and i % 2)):
                continue
            for k1 in range(i // 2 + 1):
                for k2 in range((n - i) // 2 + 1):
                    rows = block_rows(n, d, even, family, i, k1, k2)
                    if rows:
                        terms += _count_terms(n, i, rows, k1, k2)
                    for _s, _p, sub in _splits(family, i, even, rows):
                        if sub:
                            sizes.append(len(sub))
    nv = quads + tris
    kkt = 8 * sum((m * (m + 1) // 2) ** 2 for m in sizes) + 8 * nv * nv
    return FourPointSize(n=n, d=d, quads=quads, triangles=tris, blocks=len(sizes),
                         largest=max(sizes, default=0), kkt_bytes=kkt, terms=terms)


def check_four_point_fits(params: Params) -> FourPointSize:
    """The size of the cell's four-point program; :class:`ParameterError` (one line naming
    the size) when it is not for this machine or the cell is not binary."""
    if params.q != 2:
        raise ParameterError("the four-point bound is for binary codes")
    if params.d < 3:
        raise ParameterError("the four-point bound needs d >= 3 (A(n,1), A(n,2) are known)")
    n, d = _program_cell(params)
    if n >= UNCOUNTED_N:
        raise ParameterError(f"four-point SDP for A({n},{d}): length {n} >= {UNCOUNTED_N}, its "
                             f"family-4 blocks alone have more than 9.9*10^7 terms, past the "
                             f"{MAX_BUILD_TERMS:,} this machine builds; not built")
    size = four_point_size(n, d)
    if not size.fits:
        raise ParameterError(f"{size.describe()}: beyond this machine "
                             f"({MEMORY_BYTES / 1e9:.0f} GB, {MAX_BUILD_TERMS:,} terms, "
                             f"{MAX_SECONDS / 3600:.0f} h), not built")
    return size


# --------------------------------------------------------------------------------------------
# The exact program.


@lru_cache(maxsize=8)
def four_point_data(n: int, d: int, even: bool, *, quad_rows: bool = True,
                    families: tuple = (2, 3, 4), target: int | None = None,
                    size_cut: tuple | None = None) -> FourPointData:
    """Build the exact four-point program of binary ``(n, d)``.

    Parameters
    ----------
    n, d : int
        Cell.
    even : bool
        Only codes with all distances even (valid for even ``d``).
    quad_rows : bool
        Add the diagonal inequalities of the 4-sets.
    families : tuple
        The block families 2..4 to build.
    target : int, optional
        Add the moment matrix of the sets of at most two words (families 5 and 6, see the
        module notes) with the corner of a code of ``target`` words: the program then
        bounds only codes of at least ``target`` words.
    size_cut : tuple, optional
        ``(cut, s)`` as in :func:`size_cut_floors`: add the rows ``("size-cut", k)`` that hold
        for codes of exactly ``target`` words (module notes, "Size cuts").

    Returns
    -------
    FourPointData
    """
    from codesearch.bounds.terwilliger import RowCollector, three_point_data

    if size_cut is not None:  # refused before the build: a cut needs a size it fits
        if target is None:
            raise ParameterError("a size cut needs the target size of the code")
        floors = size_cut_floors(n, target, *size_cut)
    base = three_point_data(n, d, even)
    tri_index = {tri: v for v, tri in enumerate(base.triangles)}
    quads = _quad_profiles(n, d, even)
    quad_index = {q: len(base.triangles) + v for v, q in enumerate(quads)}

    def var(key) -> int | None:
        if key is None:
            return None
        if key == ():
            return -1
        if len(key) == 3:
            if key == (0, 0, 0):
                return -1
            return tri_index.get(key)
        return quad_index[key]

    blocks = list(base.blocks)
    rows_of: dict = {}
    total_terms = 0
    for family in [f for f in (2, 3, 4) if f in families]:
        subsets = FAMILIES[family][1]
        for i in range(1, n + 1):
            if family != 4 and not (i >= d and not (even and i % 2)):
                continue
            xmemo: dict = {}

            def xterms(i1, j1, t1, i2, j2, t2, i=i, subsets=subsets, xmemo=xmemo):
                key = (i1, j1, t1, i2, j2, t2)
                got = xmemo.get(key)
                if got is None:
                    prof = _profile_of(i, *key)
                    got = [(var(_set_key(prof, pts, d, even)), sgn) for pts, sgn in subsets]
                    xmemo[key] = got
                return got

            for k1 in range(i // 2 + 1):
                for k2 in range((n - i) // 2 + 1):
                    rows = block_rows(n, d, even, family, i, k1, k2)
                    if not rows:
                        continue
                    entry: dict = {}

                    def full_entry(r, s, i=i, k1=k1, k2=k2, entry=entry, xterms=xterms):
                        if (r, s) in entry:
                            return entry[(r, s)]
                        c0, cv = _reduced_entry(n, i, k1, k2, r, s, xterms)
                        entry[(r, s)] = entry[(s, r)] = (c0, cv)
                        return c0, cv

                    for sign, parity, sub in _splits(family, i, even, rows):
                        if not sub:
                            continue
                        key = (i, k1, k2, sign, parity)
                        const: dict = {}
                        coef: dict = {}
                        for r_, r in enumerate(sub):
                            for s_ in range(r_, len(sub)):
                                s = sub[s_]
                                c0, cv = _split_entry(full_entry, r, s, sign, i)
                                total_terms += 1
                                if c0:
                                    const[(r_, s_)] = c0
                                if cv:
                                    coef[(r_, s_)] = cv
                        blocks.append((family, key, len(sub), const, coef))
                        rows_of[(family, key)] = tuple(sub)

    if target is not None:
        total_terms += _add_pair_moment_blocks(n, d, even, target, var, blocks, rows_of)

    collector = RowCollector()
    for label, cv, rhs in base.rows:
        collector.add(label, [(v, c) for v, c in cv.items()], rhs)
    if quad_rows:
        for prof in quads:
            for mask in range(1, 15):
                a_pts = [p for p in range(4) if mask >> p & 1]
                b_pts = [p for p in range(4) if not mask >> p & 1]
                terms = []
                for r in range(len(b_pts) + 1):
                    for extra in itertools.combinations(b_pts, r):
                        pts = tuple(sorted(a_pts + list(extra)))
                        # sum (-1)^|B'| x(A u B') >= 0, written as <= 0
                        terms.append((var(_set_key(prof, pts, d, even)), -(-1) ** r))
                collector.add(("quad", *prof, mask), terms, 0)
    rows_out = list(collector.rows)
    if size_cut is not None:
        from codesearch.bounds.krawtchouk import krawtchouk

        for k in range(n + 1):
            # target * sum_i A_i K_k(i) >= c_k, A_i = C(n,i) x(pair at i), A_0 = 1
            terms = [(var((i, i, 0) if i else ()), -target * comb(n, i) * krawtchouk(2, n, k, i))
                     for i in range(n + 1)]
            # a collector of its own per row: it moves the constant to the right-hand side
            # but does not merge the rows of k and n - k, which coincide for even codes.
            # Keeping both is a numerical device, measured at A(18,8), size 73 (one pass,
            # default settings): the solver's dual certifies 72.9989 with both rows and
            # only 73.0019 with one.
            one = RowCollector()
            one.add(("size-cut", k), terms, -floors[k])
            rows_out += one.rows
    objective = tuple(list(base.objective) + [0] * len(quads))
    return FourPointData(n=n, d=d, even=even, triangles=tuple(base.triangles) + tuple(quads),
                         objective=objective, blocks=tuple(blocks),
                         rows=tuple(rows_out), block_rows=rows_of, terms=total_terms)


def _reduced_entry(n: int, i: int, k1: int, k2: int, r: tuple[int, int], s: tuple[int, int],
                   terms) -> tuple[int, dict[int, int]]:
    """Entry ``(r, s)`` of block ``(k1, k2)`` of the tensor-product reduction for a support of
    size ``i``: ``sum_{t1,t2} beta^(i)[i1,j1,k1,t1] beta^(n-i)[i2,j2,k2,t2] N(...)`` with
    ``N`` given by ``terms(i1, j1, t1, i2, j2, t2)`` as ``[(variable, coefficient)]``;
    returns the constant part and the coefficients."""
    from codesearch.bounds.terwilliger import add_terms, beta

    (i1, i2), (j1, j2) = r, s
    c0 = 0
    cv: dict[int, int] = {}
    for t1 in range(max(0, i1 + j1 - i), min(i1, j1) + 1):
        b1 = beta(i, i1, j1, k1, t1)
        if not b1:
            continue
        for t2 in range(max(0, i2 + j2 - (n - i)), min(i2, j2) + 1):
            b2 = beta(n - i, i2, j2, k2, t2)
            if b2:
                c0 += add_terms(cv, terms(i1, j1, t1, i2, j2, t2), b1 * b2)
    return c0, cv


@lru_cache(maxsize=4096)
def _pair_moment_sets(cells: tuple[int, int, int, int], d: int, even: bool) -> tuple:
    """For words ``a``, ``b`` cutting the columns into cells of sizes ``cells`` =
    ``(|a & b|, |a - b|, |b - a|, rest)``: every count ``T`` of ones of ``c`` per cell whose
    set ``{0, a, c, c + b}`` has no forbidden distance, with the orbit key of that set."""
    out = []
    for ones in itertools.product(*(range(c + 1) for c in cells)):
        t11, t10, t01, t00 = ones
        # columns (0, a, c, c+b): (a,b,c) = (1,0,1) -> P0 alone, (1,0,0) -> P1 alone,
        # (0,1,1) -> P2 alone, (0,1,0) -> P3 alone, (0,0,1) -> {P0,P1}|{P2,P3},
        # (1,1,0) -> {P0,P2}|{P1,P3}, (1,1,1) -> {P0,P3}|{P1,P2}
        prof = (t10, cells[1] - t10, t01, cells[2] - t01, t00, cells[0] - t11, t11)
        key = _set_key(prof, (0, 1, 2, 3), d, even)
        if key is not None:
            out.append((ones, key))
    return tuple(out)


def pair_moment_rows(n: int, d: int, even: bool, w: int, k1: int, k2: int
                     ) -> list[tuple[int, int]]:
    """Rows ``(i1, i2)`` of block ``(k1, k2)`` of the character weight ``w`` in the moment
    matrix of pairs (family 5): words ``a`` of weight 0 or an allowed distance with an even
    number ``i1`` of ones on the character's support."""
    rows = []
    for i1 in range(k1 + k1 % 2, w - k1 + 1, 2):
        for i2 in range(k2, n - w - k2 + 1):
            if i1 + i2 == 0 or _allowed(i1 + i2, d, even):
                rows.append((i1, i2))
    return rows


def _add_pair_moment_blocks(n: int, d: int, even: bool, target: int, var, blocks: list,
                            rows_of: dict) -> int:
    """Append the blocks of the moment matrix of the sets of at most two words (families 5
    and 6, see the module notes) to ``blocks``; return the number of entries built."""
    from codesearch.bounds.krawtchouk import krawtchouk

    entries = 0
    for w in range(n + 1):
        memo: dict = {}

        def fourier(i1, j1, t1, i2, j2, t2, w=w, memo=memo):
            """``sum_c (-1)^(z.c) x({0, a, c, c + b})`` as ``[(variable, coefficient)]``."""
            key = (i1, j1, t1, i2, j2, t2)
            got = memo.get(key)
            if got is None:
                s1 = (t1, i1 - t1, j1 - t1, w - i1 - j1 + t1)
                s2 = (t2, i2 - t2, j2 - t2, n - w - i2 - j2 + t2)
                cells = tuple(a + b for a, b in zip(s1, s2))
                acc: dict = {}
                for ones, skey in _pair_moment_sets(cells, d, even):
                    c = 1
                    for m in range(4):
                        # signed placements of the ones of c in the cell: K_ones(s1)
                        c *= krawtchouk(2, cells[m], ones[m], s1[m])
                        if not c:
                            break
                    if c:
                        v = var(skey)
                        acc[v] = acc.get(v, 0) + c
                got = memo[key] = [(v, c) for v, c in acc.items() if c]
            return got

        for k1 in range(w // 2 + 1):
            for k2 in range((n - w) // 2 + 1):
                rows = pair_moment_rows(n, d, even, w, k1, k2)
                if not rows:
                    continue
                corner = w == 0 and k1 == 0 and k2 == 0
                const: dict = {}
                coef: dict = {}
                shift = 1 if corner else 0
                for r_, (i1, i2) in enumerate(rows):
                    for s_ in range(r_, len(rows)):
                        c0, cv = _reduced_entry(n, w, k1, k2, (i1, i2), rows[s_], fourier)
                        entries += 1
                        cv = {v: c for v, c in cv.items() if c}
                        if c0:
                            const[(r_ + shift, s_ + shift)] = c0
                        if cv:
                            coef[(r_ + shift, s_ + shift)] = cv
                if corner:
                    # the empty set: corner target, then target * C(n, i) * x(pair at i)
                    const[(0, 0)] = target
                    for s_, (_j1, j2) in enumerate(rows):
                        pair = var(() if j2 == 0 else (j2, j2, 0))
                        if pair == -1:
                            const[(0, s_ + 1)] = target
                        elif pair is not None:
                            coef[(0, s_ + 1)] = {pair: target * comb(n, j2)}
                    blocks.append((6, (0, 0, 0, 0, 0), len(rows) + 1, const, coef))
                    rows_of[(6, (0, 0, 0, 0, 0))] = ((-1, -1),) + tuple(rows)
                else:
                    key = (w, k1, k2, 0, 0)
                    blocks.append((5, key, len(rows), const, coef))
                    rows_of[(5, key)] = tuple(rows)
    return entries


def _mirror_list(r: tuple[int, int], sign: int, i: int) -> list[tuple[tuple[int, int], int]]:
    """The rows combined in split row ``r`` with their signs (``f_r = e_r + sign e_r'``)."""
    if sign == 0:
        return [(r, 1)]
    return [(r, 1), ((i - r[0], r[1]), sign)]


def _split_entry(full_entry, r, s, sign: int, i: int) -> tuple[int, dict[int, int]]:
    c0 = 0
    cv: dict[int, int] = {}
    for a, sa in _mirror_list(r, sign, i):
        for b, sb in _mirror_list(s, sign, i):
            e0, ev = full_entry(a, b)
            c0 += sa * sb * e0
            for v, c in ev.items():
                cv[v] = cv.get(v, 0) + sa * sb * c
    return c0, {v: c for v, c in cv.items() if c}


# --------------------------------------------------------------------------------------------
# Size cuts.

#: The size cuts: ``"odd"`` for odd sizes, ``"2-mod-4"`` for sizes 2 mod 4 (module notes).
SIZE_CUTS = ("odd", "2-mod-4")


def size_cut_floors(n: int, size: int, cut: str, s: int | None = None) -> list[int]:
    """``c_k`` (``k = 0..n``) with ``size * sum_i A_i K_k(i) >= c_k`` for every binary code of
    length ``n``, all weights even and exactly ``size`` words (module notes, "Size cuts").

    ``cut`` is ``"odd"`` (odd ``size``: ``c_k = C(n,k)``) or ``"2-mod-4"`` (``size = 2 mod
    4``: ``c_k = 2 (C(n,k) + K_k(s))`` for the sum of the words of even weight ``s``, or the
    least of these over the even ``s`` when ``s`` is None)."""
    from codesearch.bounds.krawtchouk import krawtchouk

    if cut == "odd":
        if size % 2 == 0:
            raise ParameterError(f"the odd-size cut is for odd sizes, not {size}")
        return [comb(n, k) for k in range(n + 1)]
    if cut != "2-mod-4":
        raise ParameterError(f"unknown size cut {cut!r}; choose from {', '.join(SIZE_CUTS)}")
    if size % 4 != 2:
        raise ParameterError(f"the 2-mod-4 cut is for sizes 2 mod 4, not {size}")
    if s is not None and not (0 <= s <= n and s % 2 == 0):
        raise ParameterError(f"the sum of the words has an even weight 0..{n}, not {s}")
    weights = range(0, n + 1, 2) if s is None else (s,)
    return [2 * (comb(n, k) + min(krawtchouk(2, n, k, w) for w in weights))
            for k in range(n + 1)]


# --------------------------------------------------------------------------------------------
# Caps, scaling and the solve.


def quad_cap(n: int, d: int, prof: tuple[int, ...]) -> Fraction:
    """A proven cap on the variable of a 4-set: ``x(S) <= x(T)`` for every 3-subset ``T``
    (a code containing ``S`` contains ``T``), and ``x(T)`` is at most Schrijver's cap of its
    triangle (:func:`codesearch.bounds.terwilliger.variable_cap`)."""
    from codesearch.bounds.terwilliger import variable_cap

    caps = []
    for pts in itertools.combinations(range(4), 3):
        tri = _set_key(prof, pts, 1, False)
        caps.append(variable_cap(n, d, tri))
    return min(caps)


def _pow2(x: float) -> int:
    return int(round(math.log2(x)))


def _program(n: int, d: int, *, quad_rows: bool = True, families: tuple = (2, 3, 4),
             target: int | None = None, size_cut: tuple | None = None):
    """The solver's view of the program: the exact data, proven caps, the first scaling and
    the names written into the certificate (families 2-4 name their rows ``(i1, i2)``)."""
    from codesearch.bounds.sdp import SdpProgram
    from codesearch.bounds.terwilliger import shape_count, variable_cap

    data = four_point_data(n, d, True, quad_rows=quad_rows, families=families, target=target,
                           size_cut=size_cut)
    radius = (d - 1) // 2
    m0 = 2.0**n / sum(comb(n, r) for r in range(radius + 1))
    caps, shapes = [], []
    for key in data.triangles:
        if len(key) == 3:
            cap = variable_cap(n, d, key)
            caps.append(cap)
            shapes.append(shape_count(n, *key))
        else:
            cap = quad_cap(n, d, key)
            caps.append(cap)
            shapes.append(m0 / float(cap))  # scaling only: solver variable x / cap
    exps, offsets, labels, row_labels = {}, {}, {}, {}
    for family, key, size, _c, _cf in data.blocks:
        if family in (0, 1):
            k = key
            e = [_pow2(comb(n - 2 * k, r)) // 2 for r in range(size)]
            mult = comb(n, k) - (comb(n, k - 1) if k else 0)
            offsets[k] = k
            labels[k] = {"k": k}
        else:
            # rows scaled by the size of their diagonal at the caps
            e = []
            for r in range(size):
                mag = abs(_c.get((r, r), 0)) + sum(abs(c) * float(caps[v])
                                                   for v, c in _cf.get((r, r), {}).items())
                e.append(_pow2(mag) // 2 if mag > 0 else 0)
            i, k1, k2, sign, parity = key
            mult = ((comb(i, k1) - (comb(i, k1 - 1) if k1 else 0))
                    * (comb(n - i, k2) - (comb(n - i, k2 - 1) if k2 else 0)) * comb(n, i))
            labels[key] = {"i": i, "k1": k1, "k2": k2, "sign": sign}
            offsets[key] = 0
            row_labels[(family, key)] = data.block_rows[(family, key)]
        exps[(family, key)] = (e, _pow2(m0 / mult))
    return SdpProgram(data=data, caps=tuple(caps), shapes=tuple(shapes), m0=m0,
                      kind="four-point-sdp", exps=exps, offsets=offsets, labels=labels,
                      row_labels=row_labels)


def solve_four_point(n: int, d: int, *, time_limit: float | None = None,
                     solver: str = "clarabel", quad_rows: bool = True,
                     target: int | None = None, passes: int | None = None,
                     solver_options: dict[str, Any] | None = None,
                     size_cut: tuple | None = None) -> dict[str, Any]:
    """Solve and certify the four-point program of binary ``(n, d)``, ``d`` even (see
    :func:`codesearch.bounds.sdp.solve_program`); the certificate is re-checked by the
    independent checker before returning (a disagreement raises
    :class:`~codesearch.errors.VerificationError`).

    With ``target`` the moment matrix of the sets of at most two words is added with the
    corner of a code of ``target`` words (families 5 and 6); the dual then bounds only the
    codes of at least ``target`` words, so the value is ``max(target - 1, floor(bound))``
    (the certificate carries the ``target``). ``passes`` caps the numerical passes (default
    three, :func:`codesearch.bounds.sdp.solve_program`); with the pair blocks at distance 6
    the later passes cost hours and rarely move the certified integer, so long solves use
    one (benchmarks/results_fourpoint.md). ``solver_options`` overrides Clarabel settings
    (:func:`codesearch.bounds.sdp.clarabel_options`); the certificate records them.

    ``size_cut`` (``(cut, s)``, :func:`size_cut_floors`; needs ``target``) adds the rows that
    hold for codes of exactly ``target`` words: the result's ``excluded`` says whether the
    bound is below ``target``, and its certificate is only an exclusion, re-checked by
    :func:`codesearch.verify.four_point.check_size_cut_exclusion` and used inside a
    ``four-point-size-cut`` certificate (:func:`four_point_size_cut`)."""
    options = tuple(sorted((solver_options or {}).items()))
    cut = None if size_cut is None else (size_cut[0], size_cut[1])
    return _solve_four_point(n, d, time_limit, solver, quad_rows, target, passes, options, cut)


@lru_cache(maxsize=64)
def _solve_four_point(n: int, d: int, time_limit: float | None, solver: str, quad_rows: bool,
                      target: int | None, passes: int | None,
                      options: tuple[tuple[str, Any], ...], size_cut: tuple | None = None
                      ) -> dict[str, Any]:
    """:func:`solve_four_point` with hashable arguments (cached per cell and settings)."""
    from codesearch.bounds.sdp import solve_program
    from codesearch.errors import VerificationError
    from codesearch.verify import check_certificate
    from codesearch.verify.four_point import check_size_cut_exclusion

    t0 = time.perf_counter()
    prog = _program(n, d, quad_rows=quad_rows, target=target, size_cut=size_cut)
    build = time.perf_counter() - t0
    best = solve_program(prog, time_limit=time_limit, solver=solver, passes=passes,
                         solver_options=dict(options))
    best["build_seconds"] = build
    best["seconds"] = time.perf_counter() - t0
    best["target"] = target
    if target is not None and best["certified"]:
        best["value"] = max(target - 1, best["value"])
    if best["certificate"] is not None:
        best["certificate"].update({"q": 2, "n": n, "d": d, "sdp_n": n, "sdp_d": d,
                                    "even": True})
        if target is not None:
            best["certificate"].update({"target": target, "value": best["value"]})
        t1 = time.perf_counter()
        if size_cut is None:
            valid, bound, reason = check_certificate(best["certificate"])
            valid = valid and bound == best["value"]
        else:
            best["certificate"]["size_cut"] = {"cut": size_cut[0], "sum_weight": size_cut[1]}
            valid, total, reason = check_size_cut_exclusion(best["certificate"])
            valid = valid and total == best["exact"]
        best["check_seconds"] = time.perf_counter() - t1
        if not valid:
            raise VerificationError(f"four-point certificate for A({n},{d}) rejected: {reason}")
    if size_cut is not None:
        best["excluded"] = bool(best["certified"]) and best["exact"] < target
    return best


def four_point_size_cut(n: int, d: int, upper: dict[str, Any], *,
                        time_limit: float | None = None, solver: str = "clarabel",
                        passes: int | None = None,
                        solver_options: dict[str, Any] | None = None,
                        max_solves: int | None = None, log: Any = None) -> dict[str, Any]:
    """Exclude the size ``U`` that the certificate ``upper`` proves for binary ``(n, d)``
    (``d`` even) with size cuts, and so prove ``A(n, d) <= U - 1``.

    ``U`` odd: one solve with the odd-size cut. ``U = 2 mod 4``: first one solve with the
    least right-hand side over the weights ``s`` of the sum of the words; when it does not
    exclude ``U``, one solve per even ``s`` (each must exclude it). ``U = 0 mod 4`` has no
    cut. Every solve has the pair moment blocks at target ``U`` (module notes). At most
    ``max_solves`` solves (``1``: only the first). ``log``, when given, is called with one line
    per solve.

    Returns
    -------
    dict
        ``certified`` (all needed exclusions found), ``value`` (``U - 1`` or ``U``),
        ``solves`` (per solve: ``cut``, ``s``, ``exact_float``, ``excluded``, ``seconds``) and
        ``certificate``: kind ``four-point-size-cut`` with ``upper`` and the ``exclusions``,
        re-checked by :func:`codesearch.verify.check_certificate` before it is returned (None
        when not certified).

    Raises
    ------
    ParameterError
        ``upper`` does not prove a bound for this cell, or its size is 0 mod 4.
    """
    from codesearch.errors import VerificationError
    from codesearch.verify import check_certificate

    ok, size, why = check_certificate(upper, (2, n, d))
    if not ok or size is None:
        raise ParameterError(f"the upper certificate does not bound A({n},{d}): {why}")
    if size % 4 == 0:
        raise ParameterError(f"A({n},{d}) <= {size}: no size cut for sizes 0 mod 4")
    plans: list[tuple[str, int | None]] = ([("odd", None)] if size % 2 else
                                           [("2-mod-4", None)])
    exclusions, solves = [], []
    while plans:
        if max_solves is not None and len(solves) >= max_solves:
            return {"certified": False, "value": size, "solves": solves, "certificate": None}
        cut = plans.pop(0)
        got = solve_four_point(n, d, time_limit=time_limit, solver=solver, target=size,
                               passes=passes, solver_options=solver_options, size_cut=cut)
        solves.append({"cut": cut[0], "s": cut[1], "exact_float": got.get("exact_float"),
                       "excluded": got["excluded"], "seconds": got["seconds"]})
        if log is not None:
            log(f"A({n},{d}) size {size}, cut {cut[0]}"
                + ("" if cut[1] is None else f" s={cut[1]}")
                + f": exact {got.get('exact_float')}, "
                + ("excluded" if got["excluded"] else "not excluded")
                + f" ({got['seconds']:.0f} s)")
        if got["excluded"]:
            exclusions.append(got["certificate"])
        elif cut == ("2-mod-4", None):
            plans = [("2-mod-4", s) for s in range(0, n + 1, 2)]
        else:
            return {"certified": False, "value": size, "solves": solves, "certificate": None}
    cert = {"kind": "four-point-size-cut", "q": 2, "n": n, "d": d, "value": size - 1,
            "upper": upper, "exclusions": exclusions}
    valid, bound, reason = check_certificate(cert)
    if not valid or bound != size - 1:
        raise VerificationError(f"size-cut certificate for A({n},{d}) rejected: {reason}")
    return {"certified": True, "value": size - 1, "solves": solves, "certificate": cert}


def _pair_refinement(n: int, d: int, solves: int, time_limit: float | None, solver: str,
                     lower: int = 1) -> dict | None:
    """The least certified value of up to ``solves`` solves with the pair moment blocks.

    A solve with target ``U`` certifies ``A <= max(U - 1, floor(bound))``; it *excludes*
    ``U`` when its bound falls below ``U`` (no code has ``U`` words or more). The program only
    tightens as ``U`` grows, so exclusion is monotone in ``U``: the least excluded target
    ``U*`` gives the best value ``U* - 1``. The search keeps ``lo`` (a target not excluded,
    first the size ``lower`` of a known code) and ``hi`` (a target excluded, or one above a
    solve's bound, whose value that solve already certifies), and tries the upper middle of
    ``lo..hi``; the first target is ``lower + 1`` (one solve settles the cell when the known
    code is optimal). ``lo`` and ``hi`` only steer the search: the value returned is the one
    its certificate proves. None when no solve was certified."""
    best = None
    lo, hi = max(lower, 0), None
    target = lo + 1
    for _ in range(solves):
        got = solve_four_point(n, d, time_limit=time_limit, solver=solver, target=target,
                               passes=PAIR_PASSES_BELOW_8 if d < 8 else None)
        if not got["certified"]:
            break
        if best is None or got["value"] < best["value"]:
            best = got
        bound = math.floor(got["exact"])
        if bound >= target:  # not excluded; the value floor(bound) is certified
            lo = target
            hi = bound + 1 if hi is None else min(hi, bound + 1)
        else:  # excluded, and by monotonicity nothing at or below the bound is
            hi = target
            lo = max(lo, bound)
        if hi - lo <= 1:
            break
        target = (lo + hi + 1) // 2
    return best


def _known_size(n: int, d: int) -> int:
    """Size of the largest code the construction library has for binary ``(n, d)`` (only
    steers the targets of :func:`_pair_refinement`; no proof rests on it)."""
    from codesearch.constructions.lookup import table

    try:
        found = table(2).best_at(n, d)
    except Exception:  # a lookup failure only costs solves
        return 1
    return found.size if found is not None else 1


def four_point_bound(params: Params, *, time_limit: float | None = None,
                     solver: str | None = None, pair_solves: int | None = None,
                     lower: int | None = None, size_cut: bool | None = None
                     ) -> BoundResult | None:
    """The four-point bound on ``A(n, d)`` with an exact certificate.

    Up to ``pair_solves`` (default :data:`PAIR_SOLVES`, fewer when they would pass
    :data:`MAX_SECONDS`) solves of the program with the pair moment blocks and a target size
    (:func:`_pair_refinement`; ``lower``, the size of a known code, steers the targets and
    defaults to the construction library's); the certificate of the least value is
    returned. With ``pair_solves=0``, or when none is certified, the plain program.
    Then, when the value ``U`` is odd or 2 mod 4 and ``size_cut`` (default: when one more pair
    solve fits in :data:`MAX_SECONDS`), one solve with the size cut at ``U``
    (:func:`four_point_size_cut` with ``max_solves=1``: the odd-size cut, or the least 2-mod-4
    cut over ``s``); when it excludes ``U`` the result is ``U - 1`` with a
    ``four-point-size-cut`` certificate.

    Returns
    -------
    BoundResult or None
        ``method="four-point-sdp"``; ``certified=False`` (never used) when the rounded dual
        could not be certified. None when the bound does not apply (``q != 2``, ``d < 3``)
        or the program is past this machine (:func:`check_four_point_fits`).
    """
    from codesearch.bounds.sdp import SOLVERS

    solver = (solver or "clarabel").lower()
    pair_solves = PAIR_SOLVES if pair_solves is None else pair_solves
    if solver not in SOLVERS:
        raise ParameterError(f"unknown solver {solver!r}; choose from {', '.join(SOLVERS)}")
    if params.q != 2 or params.d < 3:
        return None
    try:
        check_four_point_fits(params)
    except ParameterError:
        return None
    n, d = _program_cell(params)
    size = four_point_size(n, d)
    pair_solves = min(pair_solves, size.pair_solves_within())
    if size_cut is None:
        size_cut = size.size_cut_fits(pair_solves)
    res = None
    if pair_solves:
        known = _known_size(n, d) if lower is None else lower
        res = _pair_refinement(n, d, pair_solves, time_limit, solver, known)
    if res is None:  # no pair solve asked for or certified: the plain program
        res = solve_four_point(n, d, time_limit=time_limit, solver=solver)
    cert = dict(res["certificate"]) if res["certificate"] is not None else None
    value = res["value"]
    cut_note = ""
    if size_cut and cert is not None and res["certified"] and value % 4:
        got = four_point_size_cut(n, d, cert, time_limit=time_limit, solver=solver,
                                  passes=PAIR_PASSES_BELOW_8 if d < 8 else None, max_solves=1)
        last = got["solves"][-1]
        cut_note = (f"; size {value} with the {last['cut']} cut: exact "
                    f"{last['exact_float'] or math.nan:.6f}, "
                    f"{'excluded' if got['certified'] else 'kept'}")
        if got["certified"]:
            cert, value = dict(got["certificate"]), got["value"]
    if cert is not None:
        cert.update({"n": params.n, "d": params.d})
    elif math.isfinite(res["float_value"]):
        value = math.floor(res["float_value"] + 1e-6)  # informative only: not usable
    via = "" if (n, d) == (params.n, params.d) else f" via A({n},{d})"
    note = (f"four-point SDP{via}; float optimum {res['float_value']:.6f}, exact dual bound "
            f"{res['exact_float']:.6f}")
    note += cut_note
    if not res["certified"]:
        note += f"; uncertified: {res['reason']}"
    return BoundResult(params=params, value=value, method="four-point-sdp", certificate=cert,
                       certified=res["certified"], note=note)
