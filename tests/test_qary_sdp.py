"""The q-ary three-point bound (Gijswijt, Schrijver and Tanaka 2006) and its exact checker.

References used below (outside the project):
- Gijswijt, Schrijver and Tanaka, J. Combin. Theory Ser. A 113 (2006): the block
  diagonalisation, checked here against the definition (the full q^n x q^n matrix).
- Perfect codes meet the sphere-packing bound: ternary Hamming [4,2,3], ternary Golay
  [11,6,5], quinary Hamming [6,4,3] (MacWilliams and Sloane, ch. 1, 6, 20; from memory).
- MDS codes meet the Singleton bound (Reed-Solomon codes over GF(5)).
"""

from __future__ import annotations

import copy
import itertools
import math
from fractions import Fraction

import numpy as np
import pytest

from codesearch.verify.qary_three_point import exact_psd
from codesearch.bounds.qary_sdp import (
    alpha,
    qary_shape_count,
    qary_three_point_bound,
    qary_three_point_data,
    qary_triangle,
    qary_variable_cap,
)
from codesearch.errors import InputError
from codesearch.model import Code, Params
from codesearch.verify import check_certificate, min_distance

import known_codes


def _orbit(u, v):
    i = sum(1 for x in u if x)
    j = sum(1 for x in v if x)
    t = sum(1 for x, y in zip(u, v) if x and y)
    p = sum(1 for x, y in zip(u, v) if x and x == y)
    return i, j, t, p


@pytest.mark.parametrize("q, n", [(3, 3), (3, 4), (4, 3), (5, 2)])
def test_blocks_have_the_eigenvalues_of_the_full_matrix(q, n):
    # GST (2006): sum x[i,j,t,p] M[i,j,t,p] has the eigenvalues of the blocks (a, k), scaled
    # by C(n+a-2k, i-k)^(-1/2) (q-1)^(-i/2) on both sides, with multiplicity
    # C(n,a) (C(n-a,k-a) - C(n-a,k-a-1)) (q-2)^a.
    rng = np.random.default_rng(q * 10 + n)
    words = list(itertools.product(range(q), repeat=n))
    x = {}
    for u in words:
        for v in words:
            o = _orbit(u, v)
            if o not in x:
                x[o] = x.get((o[1], o[0], o[2], o[3]), rng.normal())
    full = np.array([[x[_orbit(u, v)] for v in words] for u in words])
    expected = np.sort(np.linalg.eigvalsh(full))
    got = []
    for a in range(n + 1):
        for k in range(a, n + 1):
            if 2 * k > n + a:
                continue
            idx = range(k, n + a - k + 1)
            block = np.array([[sum(alpha(q, n, i, j, t, p, a, k) * x[(i, j, t, p)]
                                   for t in range(min(i, j) + 1) for p in range(t + 1)
                                   if (i, j, t, p) in x) for j in idx] for i in idx], dtype=float)
            scale = np.array([(math.comb(n + a - 2 * k, i - k) * (q - 1) ** i) ** -0.5
                              for i in idx])
            mult = (math.comb(n, a) * (math.comb(n - a, k - a)
                                       - (math.comb(n - a, k - a - 1) if k > a else 0))
                    * (q - 2) ** a)
            got += list(np.linalg.eigvalsh(scale[:, None] * block * scale[None, :])) * mult
    np.testing.assert_allclose(np.sort(got), expected, atol=1e-9 * max(1, abs(expected).max()))


def _hamming_3_4() -> Code:
    # ternary Hamming [4,2,3]: null space of the columns (0,1),(1,0),(1,1),(1,2)
    return known_codes.span(np.array([[1, 0, 1, 1], [0, 1, 1, 2]]), 3)


def _hamming_5_6() -> Code:
    # quinary Hamming [6,4,3]: parity checks with columns (0,1),(1,0),(1,1),(1,2),(1,3),(1,4)
    gen = [[1, 0, 0, 0, 4, 4], [0, 1, 0, 0, 4, 3], [0, 0, 1, 0, 4, 2], [0, 0, 0, 1, 4, 1]]
    return known_codes.span(np.array(gen), 5)


def _greedy(q: int, n: int, d: int, limit: int = 40) -> Code:
    """A nonlinear code: the lexicographically first words at distance >= d (q = 4)."""
    rows = []
    for w in itertools.product(range(q), repeat=n):
        if all(sum(a != b for a, b in zip(w, r)) >= d for r in rows):
            rows.append(w)
            if len(rows) == limit:
                break
    return Code(np.array(rows, dtype=np.uint8), q)


def _frequencies(code: Code, linear: bool) -> dict:
    """x[triangle] from the definition: triples (u, v, w) in C^3 counted by orbit. For a
    linear code every u sees the same picture (translation), so u = 0 suffices."""
    q, n, m = code.q, code.n, code.size
    words = code.words.astype(np.int64)
    counts: dict = {}
    bases = words[:1] if linear else words
    for u in bases:
        rel = (words - u) % q
        nz = rel != 0
        i = nz.sum(axis=1)
        t = (nz[:, None, :] & nz[None, :, :]).sum(axis=2)
        p = ((rel[:, None, :] == rel[None, :, :]) & nz[:, None, :]).sum(axis=2)
        ii = np.broadcast_to(i[:, None], t.shape)
        jj = np.broadcast_to(i[None, :], t.shape)
        key = ((ii * (n + 1) + jj) * (n + 1) + t) * (n + 1) + p
        vals, cnt = np.unique(key, return_counts=True)
        for kv, c in zip(vals, cnt):
            kv = int(kv)
            pp = kv % (n + 1)
            tt = kv // (n + 1) % (n + 1)
            jv = kv // (n + 1) ** 2 % (n + 1)
            iv = kv // (n + 1) ** 3
            tri = qary_triangle(iv, jv, tt, pp)
            counts[tri] = counts.get(tri, 0) + int(c) * (m if linear else 1)
    # every orbit of a triangle has the same size, so each contributes count / (|C| gamma);
    # orbits of one triangle are met once per representative, so average over them
    x = {}
    reps: dict = {}
    for i in range(n + 1):
        for j in range(n + 1):
            for t in range(min(i, j) + 1):
                for p in range(t + 1):
                    if i + j - t <= n:
                        tri = qary_triangle(i, j, t, p)
                        reps[tri] = reps.get(tri, 0) + 1
    for tri, c in counts.items():
        x[tri] = Fraction(c, m * qary_shape_count(q, n, tri) * reps[tri])
    return x


@pytest.mark.parametrize("builder, d, linear", [
    (_hamming_3_4, 3, True),
    (known_codes.ternary_golay, 5, True),
    (_hamming_5_6, 3, True),
    (lambda: known_codes.reed_solomon_like_mds(5, 3), 3, True),
    (lambda: _greedy(4, 5, 3), 3, False),
    (lambda: _greedy(3, 5, 2, limit=30), 2, False),
])
def test_codes_satisfy_every_constraint_exactly(builder, d, linear):
    code = builder()
    q, n = code.q, code.n
    assert min_distance(code) >= d
    x = _frequencies(code, linear)
    data = qary_three_point_data(q, n, d)
    free = set(data.triangles)
    for tri, v in x.items():
        assert tri == (0, 0, 0, 0) and v == 1 or tri in free, tri
        if tri != (0, 0, 0, 0):
            assert v <= qary_variable_cap(q, n, d, tri)
    y = [x.get(tri, Fraction(0)) for tri in data.triangles]
    assert 1 + sum(c * y[v] for v, c in enumerate(data.objective)) == code.size
    for label, cv, rhs in data.rows:
        assert sum(c * y[v] for v, c in cv.items()) <= rhs, label
    for family, key, size, const, coef in data.blocks:
        mat = [[Fraction(0)] * size for _ in range(size)]
        for (r, s) in set(const) | set(coef):
            e = const.get((r, s), 0) + sum(c * y[v] for v, c in coef.get((r, s), {}).items())
            mat[r][s] = mat[s][r] = Fraction(e)
        assert exact_psd(mat), (family, key)


@pytest.mark.parametrize("q, n, d, size", [
    (3, 4, 3, 9),      # ternary Hamming, perfect
    (3, 11, 5, 729),   # ternary Golay, perfect
    (5, 6, 3, 625),    # quinary Hamming, perfect
    (4, 5, 3, 64),     # quaternary Hamming [5,3,3], perfect (MacWilliams-Sloane ch. 7)
    (3, 5, 3, 18),     # A_3(5,3) = 18 (from memory: Brouwer's tables)
])
def test_bound_equals_known_optimum(q, n, d, size):
    res = qary_three_point_bound(Params(q, n, d))
    assert res.certified and res.usable
    assert res.value == size
    ok, bound, _ = check_certificate(res.certificate)
    assert ok and bound == size


@pytest.mark.parametrize("q, n, d", [(3, 7, 3), (3, 8, 4), (4, 6, 3), (4, 7, 4), (5, 5, 3)])
def test_never_weaker_than_the_lp_and_sound(q, n, d):
    from codesearch.bounds import all_bounds

    found = all_bounds(Params(q, n, d), sdp=True)
    sdp = found["qary-three-point-sdp"]
    assert sdp.certified
    lp = min(b.value for k, b in found.items() if k.startswith("delsarte") and b.usable)
    assert sdp.value <= lp
    assert sdp.value >= {(3, 7, 3): 99, (3, 8, 4): 99, (4, 6, 3): 164, (4, 7, 4): 128,
                         (5, 5, 3): 125}[(q, n, d)]  # codes known to exist (from memory)


@pytest.fixture(scope="module")
def cert():
    return qary_three_point_bound(Params(3, 7, 3)).certificate


def _rejected(c) -> bool:
    try:
        ok, _, _ = check_certificate(c)
    except InputError:
        return True
    return not ok


def test_tampered_certificates_are_rejected(cert):
    assert check_certificate(cert)[0]
    assert _rejected(dict(cert, value=cert["value"] - 1))
    assert _rejected(dict(cert, n=cert["n"] + 1))
    assert _rejected(dict(cert, q=2))
    bad = copy.deepcopy(cert)
    blk = next(b for b in bad["blocks"] if len(b["weights"]) > 1)
    blk["matrix"][0][0] = "-1/1"
    assert _rejected(bad)
    bad = copy.deepcopy(cert)
    bad["multipliers"].append({"row": ["delsarte", 1], "value": "-1/2"})
    assert _rejected(bad)
    bad = copy.deepcopy(cert)
    bad["multipliers"].append({"row": ["upper", 9, 1, 0, 0], "value": "1/2"})
    assert _rejected(bad)
    bad = copy.deepcopy(cert)
    bad["blocks"][0]["matrix"][0][0] = 0.5
    assert _rejected(bad)
    bad = copy.deepcopy(cert)
    bad["blocks"] = bad["blocks"][:1]  # dropping dual blocks loses the bound
    assert _rejected(bad)
