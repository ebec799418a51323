"""Checker of the four-point semidefinite bound certificates (kind ``four-point-sdp``).

The certificate is re-checked from its own data alone. Schrijver's two block families and
his linear rows are checked as for ``three-point-sdp`` (:mod:`codesearch.verify.three_point`);
this module adds the blocks built on pairs of words ``D = {0, w}`` and the diagonal
inequalities of 4-sets, rebuilding every coefficient itself: the words are described by how
many columns take each pattern of four bits, the orbit of a set of words is found by trying
the 24 orders of its points, and nothing is shared with :mod:`codesearch.bounds.fourpoint`.

The inequality checked
----------------------
For a binary code ``C`` of length ``n`` and distance ``d`` (all distances even when
``even``) and a set ``S`` of words let ``x(S)`` be the probability that a random automorphism
of the cube maps ``S`` into ``C``, divided by that of one word. For ``|w| = i`` and any split
of ``{0, w}`` into ``A`` (in the code) and ``B`` (out of it), the matrix indexed by words

    N_uv = sum_{B' in B} (-1)^|B'| x(A u B' u {u, v})

is an average of rank-one matrices ``f f^T``, hence PSD (family 2: ``A = {0, w}``;
family 3: ``A = {0}``, ``B = {w}``; family 4: ``A`` empty). It is invariant under the
coordinate permutations fixing ``w``, so it lies in the tensor product of the Terwilliger
algebras of the cubes of length ``i`` and ``n - i``; Schrijver's block diagonalisation of each
factor shows that for every ``k1, k2`` the matrix

    B[(i1,i2),(j1,j2)] = sum_{t1,t2} beta_i(i1,j1,k1,t1) beta_{n-i}(i2,j2,k2,t2) N(...)

(``u`` with ``i1`` ones on the support of ``w`` and ``i2`` off it, ``v`` likewise with
``j1, j2``, ``t1, t2`` ones in common) is PSD for every code, and so is ``F^T B F`` for any
real ``F``: a block of the certificate names its rows ``(i1, i2)`` and a ``sign``; row ``r``
of ``F`` is ``e_r`` (sign 0) or ``e_r + sign e_r'`` with ``r' = (i - i1, i2)``. For a 4-set
``S`` and a split ``S = A u B`` the same argument gives the scalar inequality
``sum_{B' in B} (-1)^|B'| x(A u B') >= 0`` (row ``quad``). Then, with every dual matrix ``Z``
PSD and every multiplier ``mu >= 0``,

    |C| = 1 + sum_i C(n,i) x(pair at distance i)
        <= 1 + sum <Z, B(x)> + sum mu (rhs - row(x)) + sum_i C(n,i) x(...)
         = const + sum_S r_S x(S)  <=  const + sum_S max(r_S, 0) cap(S),

``cap`` of a pair or triple as in the three-point checker, of a 4-set the least cap of its
four triples (a code containing ``S`` contains each of them). Variables of sets with a
distance in ``1..d-1`` (or odd, when ``even``) are zero and left out.

References
----------
D. C. Gijswijt, H. D. Mittelmann and A. Schrijver, "Semidefinite code bounds based on
quadruple distances", IEEE Trans. Inform. Theory 58 (2012) 2697-2705.
A. Schrijver, "New code upper bounds from the Terwilliger algebra and semidefinite
programming", IEEE Trans. Inform. Theory 51 (2005) 2859-2866.
"""

from __future__ import annotations

import itertools
import math
from fractions import Fraction
from typing import Any, Mapping

from codesearch.errors import InputError
from codesearch.verify import strict
from codesearch.verify.lp import _kraw_columns
from codesearch.verify.three_point import (
    _Objective, _ROW_SHAPES, _tp_beta, _tp_johnson, _tp_psd, add_schrijver_part,
    block_psd_work, compare_claims, read_binary_cell, read_block, read_row)

__all__ = ["check_four_point_certificate", "check_size_cut_exclusion",
           "check_four_point_size_cut", "MAX_FOUR_POINT_N", "FOUR_POINT_WORK"]

#: Longest code whose four-point certificate is read (the program is past any machine
#: long before this).
MAX_FOUR_POINT_N = 64
#: Work cap of one four-point check: its blocks are many and large (about 10^9 elementary
#: steps for A(20,8)), so it gets a cap of its own, still refused before the work starts.
FOUR_POINT_WORK = 25 * strict.MAX_WORK
_WHAT = "certificate"

# A column of four words (P0, P1, P2, P3) is a 4-bit pattern, bit a = the bit of P_a,
# complemented when P0's bit is 1 (translations act on columns by complementing them): the
# patterns 0, 2, 4, ..., 14 (index = pattern >> 1). A set of four words up to the cube's
# automorphisms is the count of columns of each pattern, up to the 24 orders of its points.
_PERMS = tuple(itertools.permutations(range(4)))


def _pattern_map(perm: tuple[int, ...]) -> tuple[int, ...]:
    """Index of each pattern after reordering the points (new point a = old point perm[a])."""
    out = []
    for idx in range(8):
        old = idx << 1
        new = sum(((old >> perm[a]) & 1) << a for a in range(4))
        if new & 1:
            new ^= 15
        out.append(new >> 1)
    return tuple(out)


_PATTERN_MAPS = tuple(_pattern_map(p) for p in _PERMS)
#: The quad row's profile (s0, s1, s2, s3, m1, m2, m3) as patterns: s_a columns where P_a
#: alone differs, m_b columns splitting {P0, P_b} from the two others.
_PROFILE_PATTERNS = (14, 2, 4, 8, 12, 10, 6)


def _distance(counts: tuple[int, ...], a: int, b: int) -> int:
    return sum(c for idx, c in enumerate(counts) if ((idx << 1) >> a ^ (idx << 1) >> b) & 1)


class _FourPointObjective(_Objective):
    """The three-point checker's linear form, with the 4-set variables added (keyed
    ``("quad", counts)`` by the least column count over the orders of the points)."""

    def __init__(self, n: int, d: int, even: bool) -> None:
        super().__init__(n, d, even)
        self._keys: dict = {}

    def zero_distance(self, dist: int) -> bool:
        return 0 < dist < self.d or (self.even and dist % 2 == 1)

    def set_key(self, counts: tuple[int, ...], points: tuple[int, ...]):
        """Key of the variable of the set of the given points of a configuration; None
        when it is zero for these codes; ``(0, 0, 0)`` for a single word."""
        memo_key = (counts, points)
        if memo_key in self._keys:
            return self._keys[memo_key]
        reps: list[int] = []
        for p in points:
            if all(_distance(counts, p, r) for r in reps):
                reps.append(p)
        sides = [_distance(counts, a, b) for a, b in itertools.combinations(reps, 2)]
        if any(self.zero_distance(s) for s in sides):
            key = None
        elif len(reps) == 1:
            key = (0, 0, 0)
        elif len(reps) == 2:
            key = (sides[0], sides[0], 0)
        elif len(reps) == 3:
            key = tuple(sorted(sides, reverse=True))
        else:
            key = ("quad", min(tuple(sum(counts[j] for j in range(8) if mp[j] == idx)
                                     for idx in range(8)) for mp in _PATTERN_MAPS))
        self._keys[memo_key] = key
        return key


def _config(n: int, i: int, i1: int, j1: int, t1: int, i2: int, j2: int, t2: int
            ) -> tuple[int, ...]:
    """Column counts of the words (0, w, u, v): ``|w| = i``; ``u``, ``v`` with ``i1, j1``
    ones on the support of ``w`` (``t1`` common) and ``i2, j2`` off it (``t2`` common)."""
    counts = [0] * 8
    # on the support of w: bit 1 set; u is bit 2, v is bit 3
    counts[14 >> 1] += t1
    counts[6 >> 1] += i1 - t1
    counts[10 >> 1] += j1 - t1
    counts[2 >> 1] += i - i1 - j1 + t1
    counts[12 >> 1] += t2
    counts[4 >> 1] += i2 - t2
    counts[8 >> 1] += j2 - t2
    counts[0] += n - i - i2 - j2 + t2
    return tuple(counts)


#: family -> the sets (as points of (0, w, u, v) = 0, 1, 2, 3) of N_uv with their signs
_FAMILY_SETS = {
    2: (((0, 1, 2, 3), 1),),
    3: (((0, 2, 3), 1), ((0, 1, 2, 3), -1)),
    4: (((2, 3), 1), ((0, 2, 3), -1), ((1, 2, 3), -1), ((0, 1, 2, 3), 1)),
}


def _read_pair_block(block: Any, j: int, n: int) -> tuple:
    """Strictly read a block of family 2..6: ``i``, ``k1``, ``k2``, ``sign``, its ``rows``
    (``[i1, i2]`` within the block's ranges; family 6 starts with the row ``[-1, -1]`` of the
    empty set) and its square ``matrix``."""
    where = f"certificate: blocks[{j}]"
    family = strict.get_int(block, "family", where, 2, 6)
    i = strict.get_int(block, "i", where, 0 if family >= 5 else 1, 0 if family == 6 else n)
    k1 = strict.get_int(block, "k1", where, 0, 0 if family == 6 else i // 2)
    k2 = strict.get_int(block, "k2", where, 0, 0 if family == 6 else (n - i) // 2)
    sign = strict.get_int(block, "sign", where, 0 if family >= 5 else -1,
                          0 if family >= 5 else 1)
    if family == 5 and i == k1 == k2 == 0:
        raise InputError(f"{where}: the block i=0, k1=0, k2=0 of the pairs is family 6")
    rows = []
    listed = strict.get_list(block, "rows", where, (i + 1) * (n - i + 1) + 1)
    for r, row in enumerate(listed):
        if not isinstance(row, list) or len(row) != 2:
            raise InputError(f"{where}: rows[{r}] must be a list [i1, i2]")
        if family == 6 and r == 0:
            if row != [-1, -1]:
                raise InputError(f"{where}: rows[0] of family 6 must be [-1, -1] (the empty set)")
            rows.append((-1, -1))
            continue
        rows.append((strict.integer(row[0], f"{where}: rows[{r}][0]", k1, i - k1),
                     strict.integer(row[1], f"{where}: rows[{r}][1]", k2, n - i - k2)))
    if family == 6 and not rows:
        raise InputError(f"{where}: family 6 needs the row [-1, -1] of the empty set")
    m = len(rows)
    mat = []
    for r, row in enumerate(strict.get_list(block, "matrix", where, m, length=m)):
        if not isinstance(row, list) or len(row) != m:
            raise InputError(f"{where}: matrix row {r} must be a list of {m} rationals")
        mat.append([strict.rational(v, f"{where}: matrix[{r}][{s}]") for s, v in enumerate(row)])
    return (family, i, k1, k2, sign), rows, mat


def _signed_placements(on: int, size: int, ones: int) -> int:
    """Sum of ``(-1)^(ones placed among the first on columns)`` over the ways to place
    ``ones`` ones in ``size`` columns."""
    total = 0
    for g in range(0, min(on, ones) + 1):
        if ones - g <= size - on:
            total += (-1) ** g * math.comb(on, g) * math.comb(size - on, ones - g)
    return total


def _pair_moment_entry(obj: _FourPointObjective, w: int, i1: int, j1: int, t1: int, i2: int,
                       j2: int, t2: int, memo: dict) -> list:
    """``sum_c (-1)^(z.c) x({0, a, c, c + b})`` for ``|z| = w``, ``a`` with ``i1`` ones on
    the support of ``z`` and ``i2`` off it, ``b`` with ``j1, j2``, ``t1, t2`` in common with
    ``a``; as ``[(key, integer coefficient)]``. The sum over ``c`` runs over its numbers of
    ones in the four cells cut out by ``a`` and ``b``."""
    mkey = ("pairs", w, i1, j1, t1, i2, j2, t2)
    got = memo.get(mkey)
    if got is not None:
        return got
    n = obj.n
    # cells (bit of a, bit of b): sizes on the support of z and off it
    on = {(1, 1): t1, (1, 0): i1 - t1, (0, 1): j1 - t1, (0, 0): w - i1 - j1 + t1}
    off = {(1, 1): t2, (1, 0): i2 - t2, (0, 1): j2 - t2, (0, 0): n - w - i2 - j2 + t2}
    cells = list(on)
    terms: dict = {}
    for ones in itertools.product(*(range(on[c] + off[c] + 1) for c in cells)):
        weight = 1
        for c, k in zip(cells, ones):
            weight *= _signed_placements(on[c], on[c] + off[c], k)
            if not weight:
                break
        if not weight:
            continue
        counts = [0] * 8
        for (abit, bbit), k in zip(cells, ones):
            size = on[(abit, bbit)] + off[(abit, bbit)]
            for cbit, cnt in ((1, k), (0, size - k)):
                # the words (0, a, c, c + b) of this column as a pattern (P0 = 0)
                pattern = (abit << 1) | (cbit << 2) | ((cbit ^ bbit) << 3)
                counts[pattern >> 1] += cnt
        v = obj.set_key(tuple(counts), (0, 1, 2, 3))
        if v is not None:
            terms[v] = terms.get(v, 0) + weight
    got = memo[mkey] = [(v, c) for v, c in terms.items() if c]
    return got


def _add_pair_block(obj: _FourPointObjective, block: tuple, memo: dict,
                    target: int | None = None) -> str | None:
    """Add ``<Z, F^T B F>`` of one block of family 2..6; the reason it is rejected, or None."""
    n = obj.n
    (family, i, k1, k2, sign), rows, mat = block
    if family == 6 and target is None:
        return "a block of family 6 needs the certificate's target"
    name = f"block family={family}, i={i}, k1={k1}, k2={k2}, sign={sign}"
    if len(set(rows)) != len(rows):
        return f"repeated rows in {name}"
    m = len(rows)
    if any(mat[r][s] != mat[s][r] for r in range(m) for s in range(r)):
        return f"{name} is not symmetric"
    if not _tp_psd(mat):
        return f"{name} is not positive semidefinite"
    den = strict.common_denominator((z for row in mat for z in row), "certificate: block")
    sets = _FAMILY_SETS.get(family, ())
    acc: dict = {}

    def column(r: tuple[int, int]) -> list[tuple[tuple[int, int], int]]:
        if sign == 0:
            return [(r, 1)]
        return [(r, 1), ((i - r[0], r[1]), sign)]

    def entry(a: tuple[int, int], b: tuple[int, int]) -> list:
        """``B[a, b]`` as ``[(key, integer coefficient)]``."""
        key = (family, i, k1, k2, a, b)
        got = memo.get(key)
        if got is not None:
            return got
        (i1, i2), (j1, j2) = a, b
        terms: dict = {}
        if family == 6 and (a == (-1, -1) or b == (-1, -1)):
            # the empty set: target in the corner, target * C(n, j) * x(pair at j) beside it
            jw = a[1] if b == (-1, -1) else b[1]
            if a == b:
                got = memo[key] = [((0, 0, 0), target)]
            elif jw == 0:
                got = memo[key] = [((0, 0, 0), target)]
            else:
                v = obj.set_key(_config(n, 0, 0, 0, 0, jw, 0, 0), (0, 2))
                got = memo[key] = [] if v is None else [(v, target * math.comb(n, jw))]
            return got
        for t1 in range(max(0, i1 + j1 - i), min(i1, j1) + 1):
            b1 = _tp_beta(i, i1, j1, k1, t1)
            if not b1:
                continue
            for t2 in range(max(0, i2 + j2 - (n - i)), min(i2, j2) + 1):
                b2 = _tp_beta(n - i, i2, j2, k2, t2)
                if not b2:
                    continue
                if family >= 5:  # the pair moment entry F_w(a, b)
                    parts = _pair_moment_entry(obj, i, i1, j1, t1, i2, j2, t2, memo)
                else:  # the signed sets of the family at the words (0, w, u, v)
                    counts = _config(n, i, i1, j1, t1, i2, j2, t2)
                    parts = [(obj.set_key(counts, pts), sgn) for pts, sgn in sets]
                for v, c in parts:
                    if v is not None:
                        terms[v] = terms.get(v, 0) + c * b1 * b2
        got = memo[key] = [(v, c) for v, c in terms.items() if c]
        return got

    for r in range(m):
        for s in range(m):
            z = mat[r][s]
            if not z:
                continue
            zi = z.numerator * (den // z.denominator)
            for a, sa in column(rows[r]):
                for b, sb in column(rows[s]):
                    for v, c in entry(a, b):
                        acc[v] = acc.get(v, 0) + zi * sa * sb * c
    for v, value in acc.items():
        obj.add(v, Fraction(value, den))
    return None


def _add_quad_row(obj: _FourPointObjective, idx: list[int], mu: Fraction) -> str | None:
    """``mu * sum_{B' in B} (-1)^|B'| x(A u B')`` for the row ``["quad", *profile, mask]``."""
    prof, mask = idx[:7], idx[7]
    if any(v < 0 for v in prof) or sum(prof) > obj.n or not 1 <= mask <= 15:
        return f"bad row {['quad', *idx]}"
    if mu < 0:
        return f"negative multiplier on row {['quad', *idx]}"
    counts = [0] * 8
    for pattern, c in zip(_PROFILE_PATTERNS, prof):
        counts[pattern >> 1] += c
    counts[0] += obj.n - sum(prof)
    counts_t = tuple(counts)
    a_pts = [p for p in range(4) if mask >> p & 1]
    b_pts = [p for p in range(4) if not mask >> p & 1]
    for size in range(len(b_pts) + 1):
        for extra in itertools.combinations(b_pts, size):
            obj.add(obj.set_key(counts_t, tuple(sorted(a_pts + list(extra)))),
                    mu * (-1) ** size)
    return None


def _capped_total(obj: _FourPointObjective, johnson_memo: dict) -> Fraction:
    """``const + sum_S max(r_S, 0) cap_S`` (see the module notes)."""
    n = obj.n
    half = (obj.d + 1) // 2
    tri_caps: dict = {}

    def tri_cap(tri: tuple[int, int, int]) -> Fraction:
        if tri not in tri_caps:
            a, b, c = tri
            caps = sorted(1 if s == 0 else _tp_johnson(n, half, s, johnson_memo)
                          for s in (a, b, c))
            p = (a + b + c) // 2
            shapes = math.factorial(n) // (
                math.factorial(p - a) * math.factorial(p - b) * math.factorial(p - c)
                * math.factorial(n - p))
            tri_caps[tri] = min(Fraction(1), Fraction(caps[0] * caps[1], shapes))
        return tri_caps[tri]

    total = obj.const
    for key, r in obj.coef.items():
        if r <= 0:
            continue
        if key[0] == "quad":
            counts = key[1]
            caps = []
            for pts in itertools.combinations(range(4), 3):
                sides = sorted((_distance(counts, a, b) for a, b in itertools.combinations(pts, 2)),
                               reverse=True)
                caps.append(tri_cap(tuple(sides)))
            total += r * min(caps)
        else:
            total += r * tri_cap(key)
    return total


def _work(n: int, schrijver: list, pair: list, multipliers: list) -> int:
    """Elementary steps: per Schrijver block entry the beta loops, per family 2..4 entry the
    (t1, t2) loops with four sets each (times four for a signed row pair), the exact PSD test
    of every block, n^2 per Delsarte row and 64 per quad row."""
    steps = n ** 3
    for j, (_, weights, mat) in enumerate(schrijver):
        steps += len(weights) ** 2 * (n // 2 + 1) ** 2 + block_psd_work(mat, j)
    cells = (n // 4 + 2) ** 4  # placements of c per entry of the pair moment blocks
    for j, ((family, i, k1, k2, sign), rows, mat) in enumerate(pair):
        m = len(rows)
        per = (i // 2 + 1) * ((n - i) // 2 + 1) * 4 * (4 if sign else 1)
        if family >= 5:
            per = (i // 2 + 1) * ((n - i) // 2 + 1) * cells
        steps += m * m * per + block_psd_work(mat, j)
    steps += sum(n * n if name == "delsarte" else 64 for name, _, _ in multipliers)
    return steps


#: Row label -> number of integer indices (Schrijver's rows, the 4-set rows, the size cuts).
_ROWS = dict(_ROW_SHAPES, quad=8, **{"size-cut": 1})


def _cut_floors(n: int, size: int, cut: Any) -> list[int] | str:
    """``c_k`` of the size cut named by the certificate's ``size_cut`` field, or the reason
    it does not apply: an odd ``size`` has every ``S_u`` odd, so ``b_k >= C(n,k)``; a size
    2 mod 4 of an even-weight code has ``S_u = 2 mod 4`` on the ``(C(n,k) + K_k(s)) / 2``
    words of weight ``k`` orthogonal to the sum of the words (weight ``s``, even), so
    ``b_k >= 2 (C(n,k) + K_k(s))``; ``sum_weight`` null takes the least over the even ``s``.
    Here ``b_k = sum_{|u|=k} S_u^2 = size sum_i A_i K_k(i)``."""
    where = "certificate: size_cut"
    strict.mapping(cut, where)
    name = strict.field(cut, "cut", where)
    if name == "odd":
        if size % 2 == 0:
            return f"the odd-size cut is for odd sizes, not {size}"
        return [math.comb(n, k) for k in range(n + 1)]
    if name != "2-mod-4":
        return f"unknown size cut {strict.short(name)}"
    if size % 4 != 2:
        return f"the 2-mod-4 cut is for sizes 2 mod 4, not {size}"
    s = cut.get("sum_weight")
    if s is None:
        weights = list(range(0, n + 1, 2))
    else:
        weights = [strict.get_int(cut, "sum_weight", where, 0, n)]
        if s % 2:
            return f"the sum of the words of an even-weight code has even weight, not {s}"
    table = tuple(_kraw_columns(2, n))  # row w: K_k(w) for k = 0..n
    return [2 * (math.comb(n, k) + min(table[w][k] for w in weights)) for k in range(n + 1)]


def _size_cut_row(n: int, floors: list[int], size: int):
    """The handler of the rows ``["size-cut", k]``: ``size sum_i A_i K_k(i) >= c_k`` with
    ``A_i = C(n,i) x(pair at i)``, ``A_0 = 1``, i.e. ``-size sum_{i>=1} C(n,i) K_k(i) x_i <=
    size C(n,k) - c_k``; adds ``mu (rhs - row(x))``."""
    table = tuple(_kraw_columns(2, n))  # row i: K_k(i) for k = 0..n

    def add(obj: _FourPointObjective, idx: list[int], mu: Fraction) -> str | None:
        k = idx[0]
        if not 0 <= k <= n:
            return f"bad row {['size-cut', *idx]}"
        if mu < 0:
            return f"negative multiplier on row {['size-cut', *idx]}"
        obj.const += mu * (size * math.comb(n, k) - floors[k])
        for i in range(1, n + 1):
            obj.add(obj.tri(i, 0, 0), mu * size * math.comb(n, i) * table[i][k])
        return None

    return add


def _four_point_total(cert: Mapping[str, Any]) -> tuple | str:
    """Read and price a four-point certificate: ``(cell, target, total)`` with ``cell`` as
    from :func:`read_binary_cell` and ``total`` the exact bound its duals prove (for codes of
    at least ``target`` words, of exactly ``target`` words with a size cut), or the reason
    it is rejected."""
    cell = read_binary_cell(cert, MAX_FOUR_POINT_N, "four-point")
    if isinstance(cell, str):
        return cell
    n0, d0, n, d, even, claimed, exact_claim = cell
    target = (strict.get_int(cert, "target", _WHAT, 1, None) if "target" in cert else None)
    handlers: dict[str, Any] = {"quad": _add_quad_row}
    if "size_cut" in cert:
        if target is None:
            return "a size cut needs the target size"
        if not even:
            return "the size cuts need the even-distance restriction"
        floors = _cut_floors(n, target, cert["size_cut"])
        if isinstance(floors, str):
            return floors
        handlers["size-cut"] = _size_cut_row(n, floors, target)
    max_blocks = 2 * (n // 2 + 1) + 4 * (n + 1) * (n // 2 + 1) ** 2 * 4
    schrijver, pair = [], []
    for j, b in enumerate(strict.get_list(cert, "blocks", _WHAT, max_blocks)):
        strict.mapping(b, f"certificate: blocks[{j}]")
        family = strict.get_int(b, "family", f"certificate: blocks[{j}]", 0, 6)
        if family in (0, 1):
            schrijver.append(read_block(b, j, n, ("family", "k")))
        else:
            pair.append(_read_pair_block(b, j, n))
    mults = [read_row(m, j, _ROWS)
             for j, m in enumerate(strict.get_list(cert, "multipliers", _WHAT, strict.MAX_ROWS))]
    if "size-cut" not in handlers and any(name == "size-cut" for name, _, _ in mults):
        return "size-cut rows without a size_cut field"
    strict.check_work(_work(n, schrijver, pair, mults), f"four-point certificate for n={n}",
                      cap=FOUR_POINT_WORK)
    obj = _FourPointObjective(n, d, even)
    johnson_memo: dict = {}
    reason = add_schrijver_part(obj, schrijver, mults, johnson_memo, handlers)
    entry_memo: dict = {}
    for block in pair:
        if reason is not None:
            break
        reason = _add_pair_block(obj, block, entry_memo, target)
    if reason is not None:
        return reason
    return cell, target, _capped_total(obj, johnson_memo)


def check_four_point_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a ``"four-point-sdp"`` certificate in exact arithmetic.

    The certificate holds the cell (``q = 2, n, d``), the program's cell (``sdp_n, sdp_d``:
    the same, or ``n+1, d+1`` for odd ``d``), ``even``, dual ``blocks`` (``family`` 0 or 1
    with ``k`` and ``weights`` as in ``three-point-sdp``; ``family`` 2, 3 or 4 with ``i``,
    ``k1``, ``k2``, ``sign`` and ``rows`` ``[i1, i2]``; each with a symmetric ``matrix`` of
    ``"p/q"`` strings), ``multipliers`` (``row`` label: Schrijver's rows or
    ``["quad", s0, s1, s2, s3, m1, m2, m3, mask]``, and a ``"p/q"`` value), the exact
    ``bound`` and the claimed integer ``value`` (its floor). A certificate with a
    ``size_cut`` proves nothing alone (see :func:`check_size_cut_exclusion`) and is refused.

    Returns
    -------
    (valid, bound, reason)

    Raises
    ------
    InputError
        A malformed field, or a check past :data:`FOUR_POINT_WORK` (said before the work).
    """
    if "size_cut" in cert:
        return False, None, ("a size-cut program bounds only codes of exactly its target "
                             "size; it is checked inside a four-point-size-cut certificate")
    got = _four_point_total(cert)
    if isinstance(got, str):
        return False, None, got
    (n0, d0, n, d, even, claimed, exact_claim), target, total = got
    what = f"four-point SDP bound A({n0},{d0})"
    if target is None:
        return compare_claims(total, exact_claim, claimed, what)
    # with a target the program holds only for codes of at least target words
    proven = max(target - 1, math.floor(total))
    ok, _, reason = compare_claims(total, exact_claim, math.floor(total), what)
    if not ok:
        return False, None, reason
    if claimed != proven:
        return False, None, (f"claimed {claimed} but the certificate proves {proven} (codes "
                             f"of at least {target} words have at most {math.floor(total)})")
    return True, claimed, (f"{what} <= {proven} (codes of at least {target} words: exact "
                           f"{float(total):.6f})")


def check_size_cut_exclusion(cert: Mapping[str, Any]) -> tuple[bool, Fraction | None, str]:
    """Re-check a four-point certificate with a ``size_cut`` (the program at ``target`` ``U``
    with the rows ``["size-cut", k]``): ``(valid, total, reason)`` with ``total`` the exact
    bound it proves for the codes of exactly ``U`` words (and, for the 2-mod-4 cut with a
    ``sum_weight``, whose words sum to a word of that weight). The size is excluded when
    ``total < U``; ``value`` must then be ``U - 1``, else ``floor(total)``."""
    if "size_cut" not in cert:
        return False, None, "not a size-cut certificate (no size_cut field)"
    got = _four_point_total(cert)
    if isinstance(got, str):
        return False, None, got
    (n0, d0, n, d, even, claimed, exact_claim), target, total = got
    if exact_claim is not None and exact_claim != total:
        return False, None, f"bound field is {exact_claim}, the certificate proves {total}"
    proven = max(target - 1, math.floor(total))
    if claimed != proven:
        return False, None, f"claimed {claimed} but the certificate proves {proven}"
    verdict = "excluded" if total < target else "not excluded"
    return True, total, (f"A({n0},{d0}) size {target}: exact {float(total):.6f}, {verdict}")


def check_four_point_size_cut(cert: Mapping[str, Any], check_certificate: Any
                              ) -> tuple[bool, int | None, str]:
    """Re-check a ``"four-point-size-cut"`` certificate: ``upper`` (any kind, re-checked
    through the table's entry point ``check_certificate``) proves ``A(n,d) <= U``; the
    ``exclusions`` (four-point certificates at target ``U`` with a ``size_cut``) each bound
    the codes of exactly ``U`` words below ``U``: one with the odd-size cut for odd ``U``,
    for ``U = 2 mod 4`` one with ``sum_weight`` null or one for every even ``s`` from 0 to
    ``n``. Then ``A(n,d) <= U - 1 = value``. For odd ``d`` the programs are those of
    ``(n+1, d+1)``."""
    q = strict.get_int(cert, "q", _WHAT, 2, 2)
    n0 = strict.get_int(cert, "n", _WHAT, 1, MAX_FOUR_POINT_N)
    d0 = strict.get_int(cert, "d", _WHAT, 1, n0)
    claimed = strict.get_int(cert, "value", _WHAT, 0, None)
    # odd d through A(n+1, d+1) (parity extension and puncturing)
    n, d = (n0 + 1, d0 + 1) if d0 % 2 else (n0, d0)
    upper = strict.mapping(strict.field(cert, "upper", _WHAT), "certificate: upper")
    ok, size, why = check_certificate(upper, (q, n, d))
    if not ok or size is None:
        return False, None, f"upper certificate: {why}"
    if claimed != size - 1:
        return False, None, f"claimed {claimed}, but the cut can only exclude {size}"
    if size % 4 == 0:
        return False, None, f"no size cut for {size} (0 mod 4)"
    weights: set = set()
    for j, ex in enumerate(strict.get_list(cert, "exclusions", _WHAT, n + 2)):
        strict.mapping(ex, f"certificate: exclusions[{j}]")
        if ex.get("kind") != "four-point-sdp":
            return False, None, f"exclusions[{j}] is not a four-point-sdp certificate"
        if (ex.get("sdp_n"), ex.get("sdp_d"), ex.get("target")) != (n, d, size):
            return False, None, f"exclusions[{j}] is not at A({n},{d}) with target {size}"
        valid, total, reason = check_size_cut_exclusion(ex)
        if not valid or total is None:
            return False, None, f"exclusions[{j}]: {reason}"
        if not total < size:
            return False, None, f"exclusions[{j}] does not exclude {size}: {reason}"
        cut = ex["size_cut"]
        weights.add(None if cut.get("cut") == "odd" or cut.get("sum_weight") is None
                    else cut["sum_weight"])
    covered = None in weights or (size % 2 == 0 and
                                  set(range(0, n + 1, 2)) <= weights)
    if not covered:
        return False, None, f"the exclusions do not cover every code of {size} words"
    via = "" if (n, d) == (n0, d0) else f" (through A({n},{d}))"
    return True, claimed, (f"A({n0},{d0}) <= {claimed}{via}: {upper.get('kind')} gives {size}, size "
                           f"{size} excluded by {len(weights)} four-point program(s) with the "
                           f"{'odd-size' if size % 2 else '2-mod-4'} cut")
