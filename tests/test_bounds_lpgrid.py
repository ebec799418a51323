"""The warm-started high-precision Delsarte LP path (chains over d, extra columns, refinement).

References: scipy's HiGHS as an independent LP solver on small random LPs; the cold
high-precision simplex started from the slack basis (a different pivot sequence) on the long
cells; an exact rational elimination of the final basis for the tightness check; and the
A(n,2) = 2^(n-1) closed form (even-weight code; common practice).
"""

from __future__ import annotations

import decimal
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given, strategies as st

from codesearch import verify
from codesearch.bounds import delsarte
from codesearch.bounds.hpsimplex import Tableau
from codesearch.model import Params


def _scipy_value(G: np.ndarray) -> float | None:
    from scipy.optimize import linprog

    res = linprog(np.ones(G.shape[1]), A_ub=G, b_ub=-np.ones(G.shape[0]), bounds=(0, None),
                  method="highs")
    return res.fun if res.status == 0 else None


def _dec(x: float) -> decimal.Decimal:
    return decimal.Decimal(x)


@given(st.integers(2, 6), st.integers(2, 6), st.integers(0, 2**32 - 1))
def test_tableau_rows_then_columns_match_scipy(nrows, ncols, seed):
    # Grow a random LP row by row (dual simplex) and then column by column (primal simplex);
    # the optimum must equal scipy's HiGHS on the whole problem (independent solver).
    rng = np.random.default_rng(seed)
    G = rng.integers(-5, 6, size=(nrows, ncols + 2)).astype(float)
    G[:, 0] = -1.0 - rng.integers(0, 3, size=nrows)  # keeps the LP feasible
    tab = Tableau(ncols, 50)
    for r in range(nrows):
        tab.add_row(r, [_dec(v) for v in G[r, :ncols]])
        assert tab.dual_simplex(500)
    ref = _scipy_value(G[:, :ncols])
    assert ref is not None and abs(float(tab.objective()) - ref) <= 1e-7 * max(1.0, abs(ref))
    for c in (ncols, ncols + 1):
        tab.add_column(c, {r: _dec(G[r, c]) for r in range(nrows)})
        assert tab.primal_simplex(500)
    ref = _scipy_value(G)
    assert abs(float(tab.objective()) - ref) <= 1e-7 * max(1.0, abs(ref))
    # The reported solution is feasible and has the reported value.
    u = np.zeros(ncols + 2)
    for c, v in tab.solution().items():
        u[c] = float(v)
    assert (u >= -1e-9).all() and (G @ u <= -1 + 1e-7).all()
    assert abs(u.sum() - float(tab.objective())) <= 1e-7 * max(1.0, abs(ref))


# Cells whose LP value is beyond 2^40 (double precision cannot certify them), n <= 72 so
# that the cold simplex used as the reference stays quick.
BIG_CELLS = [(64, 3), (64, 4), (64, 6), (66, 8), (70, 5), (72, 10)]


@pytest.mark.parametrize("cell", BIG_CELLS)
@pytest.mark.parametrize("plus", [False, True])
def test_chain_agrees_with_cold_simplex(cell, plus):
    p = Params(2, *cell)
    r = (delsarte.delsarte_lp_plus if plus else delsarte.delsarte_lp)(p)
    assert r.certified and r.value > 2**40
    ok, value, _ = verify.check_certificate(r.certificate)
    assert ok and value == r.value
    n, d, even = delsarte.lp_cell(p)
    rows, ks, extras, _ = delsarte._problem(2, n, d, even, plus)
    ex = delsarte._Exact(2, n, rows, ks, extras)
    cold = delsarte._decimal_fallback(ex, 2, n)
    assert cold is not None and cold[0] == r.value


@pytest.mark.parametrize("n,d", [(64, 4), (80, 12), (96, 20)])
def test_chain_value_is_floor_of_exact_vertex(n, d):
    # Tightness: solve the chain's final basis in exact rationals (Fraction elimination) and
    # check both optimality conditions exactly; the certified value must be its floor.
    chain = delsarte._Chain(2, n, True)
    best = chain.solve(d, False)
    assert best is not None
    S, T = chain.tab.basis()
    rows = delsarte.allowed_distances(n, d, True)
    ex = delsarte._Exact(2, n, rows, chain.ks, [])
    rowpos = {i: r for r, i in enumerate(rows)}
    Tr = [rowpos[i] for i in T]
    M = [[Fraction(ex.cols[c][r]) for c in S] for r in Tr]
    y = _solve(M, [Fraction(-1)] * len(S))
    lam = _solve([list(col) for col in zip(*M)], [Fraction(-ex.cost[c]) for c in S])
    assert all(v >= 0 for v in y)  # primal feasible on the basis
    assert all(v >= 0 for v in lam)  # Delsarte's primal (distance distribution) >= 0
    for c in range(len(ex.cols)):  # every dual constraint of Delsarte's primal holds
        assert sum(l * ex.cols[c][r] for l, r in zip(lam, Tr)) + ex.cost[c] >= 0
    for r in range(len(rows)):  # every row of our LP holds
        assert sum(v * ex.cols[c][r] for v, c in zip(y, S)) <= -1
    exact = 1 + sum(v * ex.cost[c] for v, c in zip(y, S))
    assert exact == 1 + sum(lam)  # strong duality: this is the LP optimum
    assert best[0] == exact.numerator // exact.denominator


def _solve(M: list[list[Fraction]], b: list[Fraction]) -> list[Fraction]:
    """Gaussian elimination over Fraction (slow, obviously correct)."""
    A = [row[:] + [v] for row, v in zip(M, b)]
    size = len(A)
    for col in range(size):
        piv = next(r for r in range(col, size) if A[r][col] != 0)
        A[col], A[piv] = A[piv], A[col]
        for r in range(size):
            if r != col and A[r][col] != 0:
                f = A[r][col] / A[col][col]
                A[r] = [a - f * c for a, c in zip(A[r], A[col])]
    return [A[r][size] / A[r][r] for r in range(size)]


def test_chain_distance_two_is_even_weight_code():
    # A(n,2) = 2^(n-1) (even-weight code; common practice): the LP reaches it at n = 100.
    r = delsarte.delsarte_lp(Params(2, 100, 2))
    assert r.certified and r.value == 2**99
    assert verify.check_certificate(r.certificate)[:2] == (True, r.value)


def test_cell_cache_shares_checked_certificate_between_mapped_cells():
    # A(n, 2t-1) and A(n+1, 2t) are the same LP: one certificate, returned for both cells.
    a = delsarte.delsarte_lp(Params(2, 30, 7))
    b = delsarte.delsarte_lp(Params(2, 31, 8))
    assert a.value == b.value and a.certificate == b.certificate
    assert a.certificate is not b.certificate  # callers get their own copy


# ----------------------------------------------------------------- q-ary extra inequalities
def _ternary_golay_extended():
    """[12, 6, 6]_3: the ternary Golay code with a zero-sum check symbol appended
    (MacWilliams-Sloane ch. 20 section 2)."""
    from bounds_codes import golay11_ternary
    from codesearch.model import Code

    w = golay11_ternary().words.astype(np.int64)
    return Code(np.hstack([w, (-w.sum(axis=1, keepdims=True)) % 3]), 3)


def _qary_codes():
    from bounds_codes import golay11_ternary, reed_solomon

    # (name, code, designed distance): MDS distances n - k + 1 (Reed and Solomon 1960).
    return [
        ("golay11_3", golay11_ternary(), 5),
        ("golay12_3", _ternary_golay_extended(), 6),
        ("rs_5_5_2", reed_solomon(5, 5, 2), 4),
        ("rs_5_5_3", reed_solomon(5, 5, 3), 3),
        ("rs_7_7_3", reed_solomon(7, 7, 3), 5),
        ("rs_7_6_2", reed_solomon(7, 6, 2), 5),
    ]


@pytest.mark.parametrize("name,code,d", _qary_codes(),
                         ids=lambda v: v if isinstance(v, str) else "")
def test_qary_constant_weight_inequalities_hold_on_real_codes(name, code, d):
    # Each inequality A_i <= B_q(n, d, i) is claimed per codeword: check it on the distance
    # distribution seen from codewords of well-known codes; and the code's size never
    # exceeds the LP with these inequalities.
    assert verify.min_distance(code) >= d
    q, n = code.q, code.n
    w = code.words.astype(np.int64)
    extras = delsarte.qary_extra_inequalities(q, n, d)
    for c in range(0, code.size, max(1, code.size // 50)):
        counts = np.bincount((w != w[c]).sum(axis=1), minlength=n + 1)
        for _, _, coeffs, rhs in extras:
            assert sum(a * int(counts[i]) for i, a in coeffs.items()) <= rhs, name
    plus = delsarte.delsarte_lp_plus(Params(q, n, d))
    assert plus.certified and plus.value >= code.size
    assert verify.check_certificate(plus.certificate)[:2] == (True, plus.value)


def test_qary_constant_weight_caps_agree_with_checker_and_small_exhaustive():
    # Producer and checker compute the caps by separate code; and for tiny parameters the
    # cap is at least the exact maximum found by brute force over all weight-w words.
    import itertools

    for q in (3, 4):
        for n in range(1, 9):
            for d in range(1, n + 1):
                for w in range(0, n + 1):
                    assert (delsarte.qary_constant_weight_bound(q, n, d, w)
                            == verify.lp._qcw_caps(q, n, d)[w]), (q, n, d, w)
    q = 3
    for n, d, w in [(4, 3, 2), (4, 3, 3), (5, 3, 3), (4, 2, 2), (5, 4, 3)]:
        words = [x for x in itertools.product(range(q), repeat=n)
                 if sum(1 for s in x if s) == w]
        best = _max_code(words, d)
        assert delsarte.qary_constant_weight_bound(q, n, d, w) >= best, (n, d, w)


def _max_code(words, d):
    """Largest subset with pairwise distance >= d (networkx max clique; an outside solver)."""
    import networkx as nx

    g = nx.Graph()
    g.add_nodes_from(range(len(words)))
    for a in range(len(words)):
        for b in range(a + 1, len(words)):
            if sum(1 for x, y in zip(words[a], words[b]) if x != y) >= d:
                g.add_edge(a, b)
    return max(len(c) for c in nx.find_cliques(g))


def test_qary_lp_plus_sound_never_weaker_and_strengthens_a_cell():
    # MDS codes (Reed-Solomon, n <= q) have q^(n-d+1) words: the LP with the inequalities
    # stays at or above that, and never above the plain LP.
    for q in (3, 4, 5):
        for n in range(2, q + 1):
            for d in range(2, n + 1):
                p = Params(q, n, d)
                plain, plus = delsarte.delsarte_lp(p), delsarte.delsarte_lp_plus(p)
                assert plus.certified and q ** (n - d + 1) <= plus.value <= plain.value
    # A_5(7,5): plain LP 125 (= Singleton), with the inequalities 104 (computed here).
    p = Params(5, 7, 5)
    assert delsarte.delsarte_lp_plus(p).value < delsarte.delsarte_lp(p).value


def test_qcw_checker_rejects_tampering():
    r = delsarte.delsarte_lp_plus(Params(5, 7, 5))
    cert = r.certificate
    assert cert["kind"] == "delsarte-lp-qcw" and cert["extra"]
    assert verify.check_certificate(cert)[:2] == (True, r.value)
    smaller = dict(cert, bound=str(r.value - 1))
    assert not verify.check_certificate(smaller)[0]
    cheap = dict(cert, extra=[dict(e, z="0") for e in cert["extra"]])
    assert not verify.check_certificate(cheap)[0]


@pytest.mark.slow
@pytest.mark.parametrize("d", [3, 4, 9, 17, 26, 33, 40])
def test_chain_agrees_with_cold_simplex_at_128(d):
    # The longest cells of the grid (values up to 2^121): chain and cold simplex agree.
    for plus in (False, True):
        p = Params(2, 128, d)
        r = (delsarte.delsarte_lp_plus if plus else delsarte.delsarte_lp)(p)
        assert r.certified and verify.check_certificate(r.certificate)[:2] == (True, r.value)
        n, d2, even = delsarte.lp_cell(p)
        rows, ks, extras, _ = delsarte._problem(2, n, d2, even, plus)
        cold = delsarte._decimal_fallback(delsarte._Exact(2, n, rows, ks, extras), 2, n)
        assert cold is not None and cold[0] == r.value


@pytest.mark.parametrize("q,n,d", [(3, 40, 5), (4, 30, 8)])
def test_qary_chain_agrees_with_cold_simplex(q, n, d):
    # All distances (no even restriction) and q-ary Krawtchouk values: values beyond 2^40.
    for plus in (False, True):
        p = Params(q, n, d)
        r = (delsarte.delsarte_lp_plus if plus else delsarte.delsarte_lp)(p)
        assert r.certified and r.value > 2**40
        assert verify.check_certificate(r.certificate)[:2] == (True, r.value)
        rows, ks, extras, _ = delsarte._problem(q, n, d, False, plus)
        cold = delsarte._decimal_fallback(delsarte._Exact(q, n, rows, ks, extras), q, n)
        assert cold is not None and cold[0] == r.value


def test_chain_restart_keeps_results_and_solves_the_skipped_cell():
    # A request for a distance the chain walked past without recording restarts it from
    # the top; what the old chain certified is kept. Reference: the float path (value small).
    delsarte.clear_caches()
    first = delsarte._chain_result(2, 64, 10, True, False, start=True)
    assert first is not None
    again = delsarte._chain_result(2, 64, 40, True, False, start=True)
    assert again is not None
    chain = delsarte._CHAINS[(2, 64, True)]
    assert chain.results[(10, False)][0] == first[0]
    assert again[0] == delsarte.delsarte_lp(Params(2, 64, 40), exact_fallback=False).value
    delsarte.clear_caches()
