"""Upper bounds against outside references: theorems, well-known codes, scipy.

Every check names its source beside it ("from memory" where recalled without the source at
hand).
"""

from __future__ import annotations

from math import comb

import numpy as np
import pytest

from codesearch import verify
from codesearch.bounds import (
    all_bounds,
    bound_names,
    cell_summary,
    compute_bound,
    gv_lower_bound,
    upper_bound,
)
from codesearch.bounds import classical, delsarte
from codesearch.bounds.krawtchouk import ball_volume, krawtchouk_table
from codesearch.errors import ParameterError
from codesearch.model import Params

from bounds_codes import (
    golay11_ternary,
    golay23,
    hamming_code,
    reed_muller_1,
    reed_muller_2,
    reed_solomon,
)


def _explicit_k(q: int, n: int, k: int, x: int) -> int:
    # Definition of the Krawtchouk polynomial (MacWilliams-Sloane ch. 5 eq. (53)).
    return sum((-1) ** j * (q - 1) ** (k - j) * comb(x, j) * comb(n - x, k - j) for j in range(k + 1))


@pytest.mark.parametrize("q,n", [(2, 1), (2, 9), (3, 7), (5, 6), (16, 5), (2, 30)])
def test_krawtchouk_tables_match_definition(q, n):
    T = krawtchouk_table(q, n)
    G = verify.lp._kraw_columns(q, n)
    for k in range(n + 1):
        for x in range(n + 1):
            assert T[k][x] == _explicit_k(q, n, k, x) == G[x][k]


def test_ball_volume_counts_words():
    # Direct count over GF(3)^4 (definition of the Hamming ball).
    import itertools

    words = np.array(list(itertools.product(range(3), repeat=4)))
    for r in range(5):
        assert ball_volume(3, 4, r) == int(((words != 0).sum(axis=1) <= r).sum())


def _usable_values(p: Params) -> dict[str, int]:
    return {k: b.value for k, b in all_bounds(p).items() if b.usable}


def _assert_sound(code, d: int) -> None:
    """No usable upper bound below the size of a code that exists."""
    assert verify.min_distance(code) >= d
    p = Params(code.q, code.n, d)
    for name, value in _usable_values(p).items():
        assert value >= code.size, (name, value, code.size)


@pytest.mark.parametrize("m", [2, 3, 4])
def test_hamming_codes_are_perfect(m):
    # Hamming codes are perfect: they meet the sphere-packing bound (MacWilliams-Sloane ch. 6).
    code = hamming_code(m)
    n = 2**m - 1
    assert code.size == 2 ** (n - m)
    _assert_sound(code, 3)
    p = Params(2, n, 3)
    assert classical.hamming(p).value == code.size
    assert upper_bound(p).value == code.size


def test_golay_meets_sphere_packing():
    # A(23,7) = 4096 from the Golay code, a perfect code (MacWilliams-Sloane ch. 20).
    code = golay23()
    assert code.size == 4096
    _assert_sound(code, 7)
    p = Params(2, 23, 7)
    assert classical.hamming(p).value == 4096
    assert delsarte.delsarte_lp(p).value == 4096
    assert upper_bound(p).value == 4096
    # Extended Golay code: A(24,8) = 4096 (same source); Johnson and the LP reach it.
    assert upper_bound(Params(2, 24, 8)).value == 4096


def test_ternary_golay_is_perfect():
    # Ternary Golay code [11,6,5]_3 is perfect (MacWilliams-Sloane ch. 20).
    code = golay11_ternary()
    assert code.size == 729
    _assert_sound(code, 5)
    assert classical.hamming(Params(3, 11, 5)).value == 729
    assert upper_bound(Params(3, 11, 5)).value == 729


@pytest.mark.parametrize("m", [3, 4, 5])
def test_reed_muller_first_order_meets_plotkin(m):
    # RM(1,m) has 2^(m+1) words at distance 2^(m-1) = n/2; Plotkin: A(2d, d) <= 4d (equality
    # by Levenshtein's theorem; MacWilliams-Sloane ch. 2 section 3).
    code = reed_muller_1(m)
    d = 2 ** (m - 1)
    _assert_sound(code, d)
    assert classical.plotkin(Params(2, 2**m, d)).value == code.size == 4 * d
    assert upper_bound(Params(2, 2**m, d)).value == 4 * d


def test_reed_muller_second_order_sound():
    code = reed_muller_2(4)
    assert code.size == 2**11
    _assert_sound(code, 4)


@pytest.mark.parametrize("q,n,k", [(5, 5, 2), (5, 4, 3), (7, 6, 2), (3, 3, 2)])
def test_reed_solomon_meets_singleton(q, n, k):
    # Reed-Solomon codes are MDS: q^k words at distance n - k + 1 (Reed and Solomon 1960).
    code = reed_solomon(q, n, k)
    _assert_sound(code, n - k + 1)
    p = Params(q, n, n - k + 1)
    assert classical.singleton(p).value == code.size
    assert upper_bound(p).value == code.size


@pytest.mark.parametrize("q", [2, 3, 4, 5, 7, 8])
def test_mds_cells_equal_singleton(q):
    # A_q(n,d) = q^(n-d+1) for prime powers q and n <= q + 1 (extended Reed-Solomon codes
    # exist; MacWilliams-Sloane ch. 11): every usable bound must be >= it and upper equal it.
    for n in range(1, q + 2):
        for d in range(1, n + 1):
            p = Params(q, n, d)
            exact = q ** (n - d + 1)
            for name, value in _usable_values(p).items():
                assert value >= exact, (p, name)
            assert upper_bound(p).value == exact


@pytest.mark.parametrize("q", [2, 3, 4, 6])
def test_distance_one_and_two(q):
    # A_q(n,1) = q^n; A_q(n,2) = q^(n-1) (a parity check code; common practice).
    for n in range(2, 7):
        assert upper_bound(Params(q, n, 1)).value == q**n
        assert upper_bound(Params(q, n, 2)).value == q ** (n - 1)


def _levenshtein_value(n: int, d: int) -> int | None:
    """Exact A(n,d) in the binary Plotkin range (Levenshtein 1964, given Hadamard matrices of
    the needed orders, which exist for every order used below; MacWilliams-Sloane ch. 2 Thm 8)."""
    if d % 2:
        return _levenshtein_value(n + 1, d + 1)
    if 2 * d > n:
        return 2 * (d // (2 * d - n))
    if 2 * d == n:
        return 4 * d
    return None


def test_levenshtein_values_in_plotkin_range():
    for n in range(2, 29):
        for d in range(1, n + 1):
            exact = _levenshtein_value(n, d)
            if exact is None:
                continue
            p = Params(2, n, d)
            assert classical.plotkin(p).value == exact
            for name, value in _usable_values(p).items():
                assert value >= exact, (p, name, value)
            assert upper_bound(p).value == exact


# Exact values of A(n,d) from the published tables of binary codes (from memory: the table
# of Brouwer and the survey of Agrell, Vardy and Zeger 2001); used for soundness only.
KNOWN_EXACT = {
    (8, 3): 20, (9, 3): 40, (10, 3): 72, (11, 3): 144, (12, 3): 256, (13, 3): 512,
    (14, 3): 1024, (15, 3): 2048, (9, 4): 20, (10, 4): 40, (11, 4): 72, (12, 4): 144,
    (10, 5): 12, (11, 5): 24, (12, 5): 32, (13, 5): 64, (14, 5): 128, (15, 5): 256,
    (16, 5): 256, (16, 6): 256, (17, 7): 36, (20, 8): 256, (24, 8): 4096, (23, 7): 4096,
}


@pytest.mark.parametrize("cell,size", sorted(KNOWN_EXACT.items()))
def test_no_bound_below_known_values(cell, size):
    p = Params(2, *cell)
    for name, value in _usable_values(p).items():
        assert value >= size, (name, value)


def test_lp_tight_on_nordstrom_robinson():
    # Delsarte's LP gives A(16,6) <= 256, met by the Nordstrom-Robinson code (from memory;
    # MacWilliams-Sloane ch. 17 section 4 discusses this example).
    assert delsarte.delsarte_lp(Params(2, 16, 6)).value == 256
    assert delsarte.delsarte_lp(Params(2, 15, 5)).value == 256


def _scipy_lp_value(q: int, n: int, d: int) -> float:
    """The LP optimum from an unscaled primal built from the Krawtchouk definition."""
    from scipy.optimize import linprog

    if q == 2 and d % 2:
        n, d = n + 1, d + 1
    rows = [i for i in range(d, n + 1) if q > 2 or i % 2 == 0]
    A = np.array([[-_explicit_k(q, n, k, i) for i in rows] for k in range(1, n + 1)], float)
    b = np.array([_explicit_k(q, n, k, 0) for k in range(1, n + 1)], float)
    res = linprog(-np.ones(len(rows)), A_ub=A, b_ub=b, bounds=(0, None), method="highs")
    assert res.status == 0
    return 1.0 - res.fun


@pytest.mark.parametrize("q,nmax", [(2, 16), (3, 9), (4, 7)])
def test_lp_equals_independent_scipy_solve(q, nmax):
    # Independent computation: scipy's HiGHS on the textbook (unscaled) primal.
    for n in range(1, nmax + 1):
        for d in range(1, n + 1):
            p = Params(q, n, d)
            ours = delsarte.delsarte_lp(p)
            assert ours.certified
            ref = _scipy_lp_value(q, n, d)
            assert ours.value == int(np.floor(ref * (1 + 1e-9) + 1e-9)), (p, ref, ours.value)


def test_lp_plus_never_weaker_and_sound():
    for n in range(4, 21):
        for d in range(3, n + 1):
            p = Params(2, n, d)
            plain = delsarte.delsarte_lp(p)
            plus = delsarte.delsarte_lp_plus(p)
            assert plus.certified and plus.value <= plain.value
            if (n, d) in KNOWN_EXACT:
                assert plus.value >= KNOWN_EXACT[(n, d)]


def test_lp_plus_strengthens_some_cell():
    # A(17,6): plain LP 425, with the constant-weight inequalities 341 (computed here; the
    # published upper bound is 340, from memory, so both are sound).
    p = Params(2, 17, 6)
    assert delsarte.delsarte_lp_plus(p).value < delsarte.delsarte_lp(p).value


def test_large_binary_lp_certifies():
    # Binary n = 128 in the Plotkin-near range: the scaled LP still certifies exactly.
    for d in (50, 63, 64, 100):
        r = delsarte.delsarte_lp(Params(2, 128, d))
        assert r is not None and r.certified
        ok, value, _ = verify.check_certificate(r.certificate)
        assert ok and value == r.value
        exact = _levenshtein_value(128, d)
        if exact is not None:  # Plotkin range: Levenshtein's exact value bounds it below
            assert r.value >= exact


def test_qary_large_lp_certifies():
    r = delsarte.delsarte_lp(Params(16, 40, 33))
    assert r is not None and r.certified
    assert verify.check_certificate(r.certificate)[:2] == (True, r.value)
    assert r.value <= classical.plotkin(Params(16, 40, 33)).value


def test_griesmer_is_linear_only_and_gv_existential():
    p = Params(2, 17, 6)
    g = compute_bound(p, "griesmer")
    assert g.scope == "linear" and not g.usable
    assert upper_bound(p).method != "griesmer"
    assert compute_bound(Params(6, 5, 3), "griesmer") is None  # 6 is not a prime power
    gv = classical.gilbert_varshamov(p)
    assert gv.scope == "existential"
    assert gv.value == gv_lower_bound(p)


def test_gv_values():
    # Gilbert: ceil(2^n / V(n, d-1)); Varshamov gives a [7,4,3] code (the Hamming code).
    assert gv_lower_bound(Params(2, 7, 3)) == 16
    assert gv_lower_bound(Params(2, 10, 4)) >= -(-(2**10) // ball_volume(2, 10, 3))


def test_elias_and_johnson_values():
    # Johnson's improved sphere packing: A(12,5) (i.e. A(12,5)) <= 51? compare with the
    # sphere-packing bound: always <= it (the theorem adds a nonnegative term).
    for n in range(3, 40):
        for d in range(1, n + 1, 2):
            p = Params(2, n, d)
            assert classical.johnson(p).value <= classical.hamming(p).value


def test_gv_below_upper_property():
    from hypothesis import given, settings, strategies as st

    @settings(max_examples=60, deadline=None, derandomize=True)
    @given(st.integers(2, 9), st.integers(1, 30), st.data())
    def check(q, n, data):
        d = data.draw(st.integers(1, n))
        p = Params(q, n, d)
        s = cell_summary(p, lp=n <= 20)
        assert 1 <= s["gv"] <= s["upper"]
        assert all(v >= s["upper"] for v in s["bounds"].values())
        assert s["upper"] <= q ** (n - d + 1)

    check()


def test_registry_and_errors():
    assert bound_names()[0] == "singleton"
    with pytest.raises(ParameterError):
        compute_bound(Params(2, 5, 3), "no-such-bound")
    with pytest.raises(ParameterError):
        upper_bound((2, 5, 3))
    with pytest.raises(ParameterError):
        upper_bound(Params(2, 5000, 3))


@pytest.mark.parametrize("m", [5, 6])
def test_lp_exact_on_long_hamming_codes(m):
    # Hamming codes are perfect (MacWilliams-Sloane ch. 6): A(2^m-1, 3) = 2^(2^m-1-m), and
    # the LP lies between the code size and the sphere-packing bound, so it equals it. These
    # values are beyond double precision's reach; the high-precision simplex certifies them.
    n = 2**m - 1
    r = delsarte.delsarte_lp(Params(2, n, 3))
    assert r.certified and r.value == 2 ** (n - m)
    assert verify.check_certificate(r.certificate)[:2] == (True, r.value)


def test_lp_distance_two_long():
    # A(n,2) = 2^(n-1) (even-weight code; common practice); the LP reaches it exactly.
    r = delsarte.delsarte_lp(Params(2, 64, 2))
    assert r.certified and r.value == 2**63


def test_fast_path_leaves_hard_cells_uncertified_not_wrong():
    # Without the fallback a cell may stay uncertified, but it never enters ``upper``.
    r = delsarte.delsarte_lp(Params(2, 100, 30), exact_fallback=False)
    if not r.certified:
        assert not r.usable
        assert upper_bound(Params(2, 100, 30), lp_fallback=False).method != "delsarte-lp"
    full = delsarte.delsarte_lp(Params(2, 100, 30))
    assert full.certified and verify.check_certificate(full.certificate)[0]


@pytest.mark.slow
def test_lp_exact_on_hamming_127():
    # [127,120,3] Hamming code is perfect: the LP equals 2^120 (MacWilliams-Sloane ch. 6).
    r = delsarte.delsarte_lp(Params(2, 127, 3))
    assert r.certified and r.value == 2**120


def _extend(code):
    """Append an overall parity bit (MacWilliams-Sloane ch. 1: odd d becomes d + 1)."""
    from codesearch.model import Code

    w = code.words.astype(np.int64)
    return Code(np.hstack([w, w.sum(axis=1, keepdims=True) % 2]), 2)


@pytest.mark.parametrize("name,build,d", [
    ("golay23", golay23, 7),
    ("golay24", lambda: _extend(golay23()), 8),
    ("hamming15", lambda: hamming_code(4), 3),
    ("hamming16", lambda: _extend(hamming_code(4)), 4),
    ("rm1_4", lambda: reed_muller_1(4), 8),
    ("rm2_4", lambda: reed_muller_2(4), 4),
])
def test_extra_inequalities_hold_on_real_codes(name, build, d):
    # Each extra inequality is claimed per codeword (see extra_inequalities): check it on the
    # distance distribution seen from every codeword of well-known codes.
    code = build()
    n = code.n
    w = code.words.astype(np.int64)
    for c in range(0, code.size, max(1, code.size // 64)):
        dist = (w != w[c]).sum(axis=1)
        counts = np.bincount(dist, minlength=n + 1)
        for fam, idx, coeffs, rhs in delsarte.extra_inequalities(n, d):
            lhs = sum(a * int(counts[i]) for i, a in coeffs.items())
            assert lhs <= rhs, (name, fam, idx)


def test_public_api_and_lazy_imports():
    import subprocess
    import sys

    import codesearch.bounds as b

    assert {"upper_bound", "all_bounds", "gv_lower_bound", "cell_summary", "BOUNDS",
            "compute_bound", "best_lp_certificate"} <= set(b.__all__)
    # Importing the front end must not load scipy, highspy or matplotlib (common practice for
    # a fast CLI; the project rule is that imports stay cheap).
    code = ("import sys, codesearch.bounds, codesearch.report.plot; "
            "print(any(m in sys.modules for m in ('scipy', 'highspy', 'matplotlib')))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_qary_johnson_sound_and_never_above_hamming():
    # Ternary Golay code [11,6,5]_3 is perfect (MacWilliams-Sloane ch. 20): Johnson = 729.
    assert classical.johnson(Params(3, 11, 5)).value == 729
    for q in (3, 4, 5):
        for n in range(2, 16):
            for d in range(1, n + 1):
                p = Params(q, n, d)
                assert classical.johnson(p).value <= classical.hamming(p).value
