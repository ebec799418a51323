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
