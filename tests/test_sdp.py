"""Tests of Schrijver's three-point semidefinite bound and its exact certificate checker.

References used below (outside the project):
- Schrijver, IEEE Trans. Inform. Theory 51 (2005): the block diagonalisation (checked here
  against the definition, the full 2^n x 2^n matrix) and published three-point values.
- Perfect codes meet the sphere-packing bound (Hamming, Golay), so any sound bound that is
  at most the Hamming bound equals their size.
- Levenshtein's theorem: in the Plotkin range (d even, 2d > n) A(n,d) = 2 floor(d/(2d-n)),
  and A(2d, d) = 4d, whenever the needed Hadamard matrices exist (true for n <= 28).
- Delsarte's LP (computed here with scipy's HiGHS as an independent float reference).
"""

from __future__ import annotations

import itertools
import json
import math
import subprocess
import sys
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from codesearch.bounds.sdp import three_point_bound, three_point_cost
from codesearch.bounds.terwilliger import (
    beta,
    constant_weight_cap,
    three_point_data,
    triangle_of,
    variable_cap,
)
from codesearch.errors import InputError, ParameterError
from codesearch.model import Code, Params
from codesearch.verify import check_certificate, min_distance
from codesearch.verify.three_point import _tp_psd

import known_codes


# ------------------------------------------------------------------ the block diagonalisation
@pytest.mark.parametrize("n", [3, 4, 5, 6])
def test_blocks_have_the_eigenvalues_of_the_full_matrix(n):
    # Schrijver (2005), Section III: sum x[i,j,t] M[i,j,t] has the eigenvalues of the
    # blocks (scaled by C(n-2k, i-k)^(-1/2) on both sides), block k with multiplicity
    # C(n,k) - C(n,k-1). Checked against the 2^n x 2^n matrix built from the definition.
    rng = np.random.default_rng(n)
    x = {}
    for i in range(n + 1):
        for j in range(i, n + 1):
            for t in range(min(i, j) + 1):
                if i + j - t <= n:
                    x[(i, j, t)] = x[(j, i, t)] = rng.normal()
    weight = [bin(a).count("1") for a in range(2**n)]
    full = np.array(
        [[x[(weight[a], weight[b], bin(a & b).count("1"))] for b in range(2**n)]
         for a in range(2**n)]
    )
    expected = np.sort(np.linalg.eigvalsh(full))
    got = []
    for k in range(n // 2 + 1):
        idx = range(k, n - k + 1)
        block = np.array(
            [[sum(beta(n, i, j, k, t) * x[(i, j, t)] for t in range(min(i, j) + 1)
                  if i + j - t <= n) for j in idx] for i in idx], dtype=float
        )
        scale = np.array([math.comb(n - 2 * k, i - k) ** -0.5 for i in idx])
        eig = np.linalg.eigvalsh(scale[:, None] * block * scale[None, :])
        got += list(eig) * (math.comb(n, k) - (math.comb(n, k - 1) if k else 0))
    np.testing.assert_allclose(np.sort(got), expected, atol=1e-9 * max(1, abs(expected).max()))


# ------------------------------------------------- the program holds for actual codes (soundness)
def _nordstrom_robinson() -> Code:
    """(16, 256, 6) Nordstrom-Robinson code from the extended Golay code: put an octad on the
    first 8 coordinates, keep the codewords whose first 8 symbols are 0 or e_0 + e_j, and
    delete those 8 coordinates (MacWilliams & Sloane, ch. 2 section 8, from memory)."""
    golay = known_codes.golay_24().words.astype(np.int64)
    octad = next(w for w in golay if w.sum() == 8)
    support = list(np.flatnonzero(octad))
    order = support + [i for i in range(24) if i not in support]
    g = golay[:, order]
    heads = [tuple([0] * 8)]
    heads += [tuple(1 if p in (0, j) else 0 for p in range(8)) for j in range(1, 8)]
    rows = [w[8:] for w in g if tuple(w[:8]) in heads]
    return Code(np.array(rows, dtype=np.uint8), 2)


def _frequencies(code: Code) -> dict[tuple[int, int, int], Fraction]:
    """x[triangle] of a code from the definition: triples (u, v, w) in C^3 counted by shape."""
    words = code.words.astype(np.int64)
    n = code.n
    m = len(words)
    packed = (words * (1 << np.arange(n))).sum(axis=1)

    def pop(a):
        # SWAR population count on int64 arrays (words have n <= 24 bits here)
        a = a - ((a >> 1) & 0x55555555)
        a = (a & 0x33333333) + ((a >> 2) & 0x33333333)
        a = (a + (a >> 4)) & 0x0F0F0F0F
        return (a * 0x01010101 & 0xFFFFFFFF) >> 24
    counts: dict[tuple[int, int, int], int] = {}
    for u in packed:
        rel = packed ^ u
        wt = pop(rel)
        inter = pop(rel[:, None] & rel[None, :])
        i = np.broadcast_to(wt[:, None], inter.shape)
        j = np.broadcast_to(wt[None, :], inter.shape)
        key = (i * (n + 1) + j) * (n + 1) + inter
        vals, cnt = np.unique(key, return_counts=True)
        for kv, c in zip(vals, cnt):
            ii, rem = divmod(int(kv), (n + 1) ** 2)
            jj, tt = divmod(rem, n + 1)
            counts[(ii, jj, tt)] = counts.get((ii, jj, tt), 0) + int(c)
    x: dict[tuple[int, int, int], Fraction] = {}
    f = math.factorial
    for (i, j, t), c in counts.items():
        shapes = f(n) // (f(t) * f(i - t) * f(j - t) * f(n - i - j + t))
        x[(i, j, t)] = Fraction(c, m * shapes)
    return x


@pytest.mark.parametrize(
    "builder, d",
    [
        (lambda: known_codes.reed_muller_1(3), 4),  # extended Hamming [8,4,4]
        (lambda: known_codes.reed_muller_1(4), 8),  # [16,5,8]
        (_nordstrom_robinson, 6),  # (16,256,6), not linear
        (lambda: Code(known_codes.even_weight(6).words[:20], 2), 2),  # arbitrary subset, d=2
    ],
)
def test_codes_satisfy_every_constraint_exactly(builder, d):
    # Soundness of the program itself: the x of a real code is feasible (all rows, all PSD
    # blocks in exact arithmetic, the caps used to absorb residuals).
    code = builder()
    n = code.n
    assert min_distance(code) >= d
    even = d % 2 == 0 and all(
        bin(int(a)).count("1") % 2 == 0
        for a in ((code.words.astype(np.int64) ^ code.words[0]) * (1 << np.arange(n))).sum(1)
    )
    x = _frequencies(code)

    def val(i, j, t):
        return x.get((i, j, t), Fraction(0))

    data = three_point_data(n, d, even)
    # every triangle with a nonzero frequency is a free variable of the program
    free = set(data.triangles)
    for (i, j, t), v in x.items():
        tri = triangle_of(i, j, t)
        assert tri == (0, 0, 0) or tri in free
        assert v <= variable_cap(n, d, tri) if tri != (0, 0, 0) else v == 1
    y = [val(*_rep(tri)) for tri in data.triangles]
    for label, cv, rhs in data.rows:
        assert sum(c * y[v] for v, c in cv.items()) <= rhs, label
    assert 1 + sum(c * y[v] for v, c in enumerate(data.objective)) == code.size
    for family, k, size, const, coef in data.blocks:
        mat = [[Fraction(0)] * size for _ in range(size)]
        for (r, s) in set(const) | set(coef):
            e = const.get((r, s), 0) + sum(c * y[v] for v, c in coef.get((r, s), {}).items())
            mat[r][s] = mat[s][r] = Fraction(e)
        assert _tp_psd(mat), (family, k)


def _rep(tri):
    """A representative (i, j, t) of a triangle (a, b, c): i = a, j = b."""
    a, b, c = tri
    return a, b, (a + b - c) // 2


# ------------------------------------------------------------------------- certified values
@pytest.mark.parametrize(
    "n, d, size",
    [
        (7, 3, 16),  # Hamming [7,4,3], perfect
        (8, 4, 16),  # extended Hamming
        (15, 3, 2048),  # Hamming [15,11,3], perfect
        (12, 6, 24),  # Levenshtein: A(2d, d) = 4d
        (16, 8, 32),  # A(2d, d) = 4d (RM(1,4) plus complements)
        (18, 12, 4),  # Levenshtein: 2 floor(12 / 6)
        (20, 12, 6),  # Levenshtein: 2 floor(12 / 4)
        (14, 10, 2),  # Levenshtein: 2 floor(10 / 6)
    ],
)
def test_bound_equals_known_optimum(n, d, size):
    res = three_point_bound(Params(2, n, d))
    assert res.certified and res.usable
    assert res.value == size
    assert check_certificate(json.loads(json.dumps(res.certificate)))[:2] == (True, size)


@pytest.mark.slow
def test_golay_cells():
    # Golay [23,12,7] is perfect: A(23,7) = A(24,8) = 4096 (MacWilliams & Sloane ch. 2).
    for n, d in [(23, 7), (24, 8)]:
        res = three_point_bound(Params(2, n, d))
        assert res.certified and res.value == 4096


@pytest.mark.parametrize(
    "n, d, published",
    [
        (19, 6, 1280),  # Schrijver (2005), table of new bounds; from memory
        (17, 4, 3276),  # Schrijver (2005); from memory
    ],
)
def test_published_three_point_values(n, d, published):
    # The program here adds the rows A_i <= A(n,d,i) to Schrijver's, so it could only be
    # lower; on these cells it reproduces the published values exactly.
    res = three_point_bound(Params(2, n, d))
    assert res.certified
    assert res.value == published


@pytest.mark.parametrize("n, d, published", [(28, 8, 32151), (27, 7, 32151)])
def test_reaches_the_published_three_point_value_at_length_28(n, d, published):
    # A(27,7) = A(28,8) <= 32151: Schrijver (2005), table of new bounds (from memory; the row
    # of data/published_binary.csv). Before the multipliers were refitted after rounding,
    # the float optimum 32151.7 was certified as 32152.
    res = three_point_bound(Params(2, n, d))
    assert res.certified and res.value == published
    assert check_certificate(json.loads(json.dumps(res.certificate)))[:2] == (True, published)


def test_antipodal_rows_enter_the_program():
    # The strengthened LP (this package's Delsarte LP with the antipodal rows) gives 9674 at
    # A(26,8); the program contains those rows, so it is never weaker (it certified 9695
    # without them).
    res = three_point_bound(Params(2, 26, 8))
    assert res.certified and res.value <= 9674
    cert = json.loads(json.dumps(res.certificate))
    assert check_certificate(cert)[:2] == (True, res.value)
    used = {m["row"][0] for m in cert["multipliers"]}
    assert used & {"antipodal-ball", "antipodal-shell"}


def test_multiplier_refit_never_raises_the_bound(monkeypatch):
    # The refit only offers other multipliers; each pass keeps the lower exact bound, and the
    # passes themselves do not depend on it.
    from codesearch.bounds import sdp

    with_refit = sdp.solve_three_point(26, 8)
    monkeypatch.setattr(sdp, "_refit_multipliers", lambda prog, parts: None)
    without = sdp.solve_three_point(26, 8)
    assert with_refit["certified"] and without["certified"]
    assert with_refit["exact"] <= without["exact"]
    assert len(with_refit["passes"]) == len(without["passes"])


def _delsarte_float(n: int, d: int) -> float:
    """Delsarte's LP optimum (even distances for even d) with scipy's HiGHS."""
    from scipy.optimize import linprog

    if d % 2:
        n, d = n + 1, d + 1
    idx = [i for i in range(d, n + 1) if i % 2 == 0]

    def kraw(k, i):
        return sum((-1) ** s * math.comb(i, s) * math.comb(n - i, k - s) for s in range(k + 1))

    res = linprog(-np.ones(len(idx)), A_ub=[[-kraw(k, i) for i in idx] for k in range(1, n + 1)],
                  b_ub=[math.comb(n, k) for k in range(1, n + 1)],
                  bounds=[(0, None)] * len(idx), method="highs")
    return 1.0 - res.fun


@pytest.mark.parametrize("n, d", [(12, 5), (13, 4), (16, 5), (17, 8), (18, 7), (20, 8)])
def test_never_weaker_than_delsarte_and_never_below_codes(n, d):
    res = three_point_bound(Params(2, n, d))
    assert res.certified
    assert res.value <= math.floor(_delsarte_float(n, d) + 1e-6)


# Lower bounds: sizes of codes someone has built. Powers of two come from linear codes
# (shortened extended Hamming for d=4, shortened extended BCH [32,21,6] for d=6, shortened
# Golay [24,12,8] for d=8); the rest are from the standard tables of A(n,d), from memory.
_LOWER = {
    (9, 4): 20, (10, 4): 40, (11, 4): 72, (12, 4): 144, (13, 4): 256, (16, 4): 2048,
    (17, 4): 2720, (18, 4): 5312, (19, 4): 10496, (20, 4): 20480,
    (13, 6): 32, (16, 6): 256, (17, 6): 256, (18, 6): 512, (19, 6): 1024, (20, 6): 2048,
    (21, 6): 2560, (22, 6): 4096, (23, 6): 8192, (24, 6): 16384, (26, 6): 32768,
    (27, 6): 65536, (28, 6): 131072,
    (16, 8): 32, (17, 8): 36, (18, 8): 64, (19, 8): 128, (20, 8): 256, (21, 8): 512,
    (22, 8): 1024, (23, 8): 2048, (24, 8): 4096, (28, 8): 16384,
    (20, 10): 40, (24, 10): 136, (24, 12): 48, (28, 12): 178,
}


@pytest.mark.slow
def test_whole_grid_sound_and_certified():
    for n in range(4, 29):
        for d in range(4, min(12, n) + 1):
            res = three_point_bound(Params(2, n, d))
            assert res.certified, (n, d)
            assert res.value >= _LOWER.get((n, d), 1), (n, d)
            # A(n, d-1) >= A(n, d) and A(n+1, d) >= A(n, d): the table's lower bounds
            # propagate, so the bound must dominate them too
            for (n2, d2), low in _LOWER.items():
                if n2 <= n and d2 >= d:
                    assert res.value >= low, (n, d, n2, d2)


def test_lower_bound_table_cells_fast():
    for (n, d), low in _LOWER.items():
        if n <= 18:
            assert three_point_bound(Params(2, n, d)).value >= low, (n, d)


def test_nordstrom_robinson_cell():
    code = _nordstrom_robinson()
    assert code.size == 256 and min_distance(code) == 6
    res = three_point_bound(Params(2, 16, 6))
    assert res.value >= code.size


# ------------------------------------------------------------------------------- the checker
@pytest.fixture(scope="module")
def cert():
    # A(12,4): a cell where the semidefinite passes beat the strengthened LP, so the
    # certificate has dual blocks (at A(13,6) the LP pass with the antipodal rows wins)
    res = three_point_bound(Params(2, 12, 4))
    assert res.certificate["blocks"]
    return json.loads(json.dumps(res.certificate))


def test_checker_accepts(cert):
    assert check_certificate(cert) == (True, 160, check_certificate(cert)[2])


def test_checker_rejects_lower_claim(cert):
    bad = dict(cert, value=159)
    valid, _, reason = check_certificate(bad)
    assert not valid and "proves only 160" in reason


def test_checker_rejects_non_psd_block(cert):
    bad = json.loads(json.dumps(cert))
    mat = bad["blocks"][0]["matrix"]
    mat[0][0] = "-1/1"
    assert check_certificate(bad)[0] is False


def test_checker_rejects_negative_multiplier(cert):
    bad = json.loads(json.dumps(cert))
    bad["multipliers"][0]["value"] = "-1/3"
    assert check_certificate(bad)[0] is False


def test_checker_rejects_wrong_cell(cert):
    assert check_certificate(dict(cert, n=13))[0] is False  # program (12,4) cannot bound A(13,4)
    assert check_certificate(dict(cert, d=3, n=11))[0] is True  # A(11,3) = A(12,4)
    assert check_certificate(dict(cert, d=2))[0] is False


def test_checker_rejects_bad_row_labels(cert):
    for label in (["weight", 0], ["weight", 99], ["upper", 3, 2, 5], ["antipodal-ball", 1],
                  ["antipodal-shell", 2]):
        bad = json.loads(json.dumps(cert))
        bad["multipliers"].append({"row": label, "value": "1/2"})
        assert check_certificate(bad)[0] is False, label
    for label in (["nonsense", 1], ["weight"], ["upper", 3, 2], [], "weight", ["weight", 1.0],
                  ["weight", True], ["weight", "1"]):  # malformed: one line, exit 2
        bad = json.loads(json.dumps(cert))
        bad["multipliers"].append({"row": label, "value": "1/2"})
        with pytest.raises(InputError):
            check_certificate(bad)


def test_checker_rejects_floats_and_garbage(cert):
    bad = json.loads(json.dumps(cert))
    bad["blocks"][0]["matrix"][0][0] = 0.5
    with pytest.raises(InputError):
        check_certificate(bad)
    with pytest.raises(InputError):
        check_certificate({k: v for k, v in cert.items() if k != "blocks"})


def test_scaled_certificate_changes_bound(cert):
    # doubling every dual matrix and multiplier breaks the balance: the checker must
    # recompute (and here refuse) rather than trust the claimed value
    bad = json.loads(json.dumps(cert))
    for b in bad["blocks"]:
        b["matrix"] = [[str(2 * Fraction(v)) for v in row] for row in b["matrix"]]
    valid, _, _ = check_certificate(bad)
    assert not valid


# ---------------------------------------------------------------------------- small pieces
@given(st.lists(st.integers(-4, 4), min_size=9, max_size=9), st.integers(0, 3))
def test_exact_psd_matches_eigenvalues(entries, extra):
    a = np.array(entries, dtype=float).reshape(3, 3)
    mat = a @ a.T - extra * np.eye(3)  # symmetric, integer; PSD iff min eigenvalue >= 0
    lam = np.linalg.eigvalsh(mat).min()
    if abs(lam) < 1e-9:
        expected = True
    else:
        expected = lam > 0
    assert _tp_psd([[Fraction(int(v)) for v in row] for row in mat]) == expected


def test_constant_weight_cap_is_johnson_on_small_cases():
    # A(n, 4, 3) = Steiner-type values: A(7,4,3) = 7 (Fano plane), A(9,4,3) = 12 (from
    # memory); the Johnson bound gives floor(n/3 floor((n-1)/2)).
    assert constant_weight_cap(7, 4, 3) == 7
    assert constant_weight_cap(9, 4, 3) == 12
    assert constant_weight_cap(10, 6, 2) == 1  # two weight-2 words are at distance <= 4


def test_parameter_errors_and_cells_out_of_scope():
    assert three_point_bound(Params(3, 6, 3)) is None  # q-ary: not implemented
    assert three_point_bound(Params(2, 6, 2)) is None  # A(n,2) = 2^(n-1) is known
    with pytest.raises(ParameterError):
        three_point_bound(Params(2, 8, 4), solver="nope")


def test_cost_estimate_is_monotone():
    costs = [three_point_cost(Params(2, n, 6)) for n in range(8, 29)]
    assert all(a <= b for a, b in zip(costs, costs[1:]))
    assert math.isinf(three_point_cost(Params(3, 6, 3)))


def test_import_is_cheap():
    code = ("import sys, codesearch.bounds.sdp; "
            "print(any(m in sys.modules for m in ('clarabel', 'scipy', 'cvxpy', 'numba')))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_tiny_time_limit_still_returns_a_sound_result():
    # whatever the solver manages in the time allowed, the result is either certified
    # (and then sound: the extended Golay code has 4096 words) or flagged uncertified
    res = three_point_bound(Params(2, 24, 8), time_limit=0.05)
    assert res.method == "three-point-sdp"
    if res.certified:
        assert res.value >= 4096
        assert check_certificate(json.loads(json.dumps(res.certificate)))[0]


@pytest.mark.slow
def test_scs_solver_is_accepted_and_sound():
    res = three_point_bound(Params(2, 8, 4), solver="scs")
    assert res.certified and res.value == 16  # extended Hamming [8,4,4] is optimal


class _SolverPanic(BaseException):
    """Stands in for pyo3's PanicException: Clarabel's Rust panics reach Python as a
    BaseException, not an Exception."""


@pytest.mark.parametrize("fail_at", [1, 2])
def test_a_solver_panic_keeps_the_passes_already_certified(monkeypatch, fail_at):
    # A solver crash in a later pass must not lose the earlier certified passes, nor escape
    # as a traceback; the failure is recorded among the passes.
    import codesearch.bounds.sdp as sdp

    real, calls = sdp._solve_scaled, []

    def flaky(*args, **kwargs):
        calls.append(1)
        if len(calls) == fail_at:
            raise _SolverPanic("SVD error: SVD(1)")
        return real(*args, **kwargs)

    monkeypatch.setattr(sdp, "_solve_scaled", flaky)
    res = sdp.solve_three_point.__wrapped__(13, 6)  # bypass the cache
    assert res["certified"]
    assert res["value"] >= 32  # A(13,6) = 32 (MacWilliams-Sloane App. A; from memory)
    assert check_certificate(dict(res["certificate"], q=2, n=13, d=6))[:2] == (True, res["value"])
    assert res["passes"][-1]["status"].startswith("solver failure: _SolverPanic")
    assert len(res["passes"]) == fail_at + 1  # the LP pass, then the SDP passes up to the failure


def test_keyboard_interrupt_in_the_solver_still_stops(monkeypatch):
    import codesearch.bounds.sdp as sdp

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(sdp, "_solve_scaled", interrupted)
    with pytest.raises(KeyboardInterrupt):
        sdp.solve_three_point.__wrapped__(10, 4)
