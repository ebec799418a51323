"""A high-precision simplex tableau that is warm-started and grown by rows or by columns.

Problem
-------
Delsarte's LP for long codes (binary n ~ 128) has an optimum near 2^120 while its
certificate must satisfy every constraint to within 1, so double precision cannot even find
the optimal basis. This module solves the scaled problem

    minimise sum_c u_c  subject to  sum_c G[r][c] u_c <= -1 (every row r),  u >= 0,

in decimal arithmetic with a chosen number of significant digits (libmpdec through
:mod:`decimal`), as a condensed dictionary: basic variables (structural columns ``("u", c)``
or row slacks ``("s", r)``) are expressed in the nonbasic ones,

    x_B[p] = T[p, N] - sum_j T[p, j] x_N[j],    z = T[m, N] - sum_j T[m, j] x_N[j],

so ``T[m, j] = -(reduced cost of x_N[j])``. The slack basis is dual feasible because every
cost is 1, which is where a cold start begins (dual simplex).

Warm starts, the reason this module exists: a grid run solves the same LP family for
many cells, and neighbouring cells share most of their optimal basis.

* :meth:`Tableau.add_row` appends a constraint with its slack basic. Reduced costs do not
  change, so an optimal (dual feasible) dictionary stays dual feasible and a few dual simplex
  pivots restore primal feasibility: a Delsarte LP at distance d - 2 is the LP at d plus one
  row (the constraint at distance d - 2).
* :meth:`Tableau.add_column` appends a variable, nonbasic at 0. Primal feasibility is kept,
  so a few primal simplex pivots restore optimality: the LP with extra inequalities is the
  plain LP plus one column per inequality.

The tableau only has to find the right basis: callers turn its solution into an exact
certificate and check it in integers, so rounding here can cost tightness, never soundness.

References
----------
V. Chvatal, "Linear Programming", Freeman (1983), ch. 7 (the dictionary form and the
revised/condensed tableau) and ch. 10 (the dual simplex method; adding constraints to an
optimal dictionary).
R. G. Bland, "New finite pivoting rules for the simplex method", Math. Oper. Res. 2 (1977)
103-107 (least-index rule, used after many pivots so that degenerate vertices cannot cycle).
"""

from __future__ import annotations

import decimal
from typing import Sequence

import numpy as np

__all__ = ["Tableau", "pivot"]

#: Pivots after which the double shadow of the tableau is rebuilt from the decimals.
_SHADOW_AGE = 40


def pivot(T: np.ndarray, r: int, j: int) -> np.ndarray:
    """Exchange basic row ``r`` with nonbasic column ``j`` in a condensed tableau.

    ``T`` is an object array of :class:`decimal.Decimal` (any field works); returns the new
    tableau: pivot row divided by the pivot, column ``j`` replaced by ``-col / p`` and the
    pivot entry by ``1 / p``, every other entry updated by the rank-one correction.
    """
    p = T[r, j]
    rowr = T[r, :] / p
    col = T[:, j].copy()
    T = T - np.outer(col, rowr)
    T[r, :] = rowr
    T[:, j] = -col / p
    T[r, j] = 1 / p
    return T


class Tableau:
    """Condensed simplex dictionary over :class:`decimal.Decimal` (see the module docstring).

    Parameters
    ----------
    ncols : int
        Number of structural columns (``u_0 .. u_{ncols-1}``), all nonbasic at first.
    digits : int
        Significant decimal digits of every entry.
    """

    def __init__(self, ncols: int, digits: int) -> None:
        self.ctx = decimal.Context(prec=digits)
        self.tiny = decimal.Decimal(10) ** (-(digits // 2))
        self.T = np.empty((1, ncols + 1), dtype=object)
        self.T[0, :ncols] = self.ctx.create_decimal(-1)  # every cost is 1
        self.T[0, ncols] = self.ctx.create_decimal(0)
        self.basic: list[tuple[str, int]] = []
        self.nonbasic: list[tuple[str, int]] = [("u", c) for c in range(ncols)]
        self.pivots = 0
        # Double-precision shadow of T, updated by the same pivots and rows; it only ranks
        # candidate rows (steepest-edge weights), and is rebuilt from T every _SHADOW_AGE
        # pivots so that its rounding errors stay small.
        self.F: np.ndarray | None = None
        self._age = 0

    # ------------------------------------------------------------------ structure
    @property
    def m(self) -> int:
        """Number of constraint rows."""
        return len(self.basic)

    def copy(self) -> "Tableau":
        other = Tableau.__new__(Tableau)
        other.ctx, other.tiny = self.ctx, self.tiny
        other.T = self.T.copy()  # Decimals are immutable: a shallow copy is a full copy
        other.basic, other.nonbasic = list(self.basic), list(self.nonbasic)
        other.pivots = 0
        other.F, other._age = None, 0
        return other

    def add_row(self, label: int, coeffs: Sequence) -> None:
        """Append the constraint ``sum_c coeffs[c] u_c <= -1``; its slack ``("s", label)`` is basic.

        ``coeffs`` are Decimals indexed by structural column. The new row is the constraint
        with every basic structural variable substituted by its dictionary row.
        """
        with decimal.localcontext(self.ctx):
            m, width = self.m, self.T.shape[1]
            N = width - 1
            row = np.empty(width, dtype=object)
            zero = self.ctx.create_decimal(0)
            for j, (kind, idx) in enumerate(self.nonbasic):
                row[j] = coeffs[idx] if kind == "u" else zero
            row[N] = self.ctx.create_decimal(-1)
            for p, (kind, idx) in enumerate(self.basic):
                if kind == "u" and coeffs[idx]:
                    row = row - coeffs[idx] * self.T[p, :]
            self.T = np.vstack([self.T[:m], row[None, :], self.T[m:]])
            self.basic.append(("s", label))
            if self.F is not None:
                frow = np.array(row, dtype=float)
                self.F = np.vstack([self.F[:m], frow[None, :], self.F[m:]])

    def add_column(self, label: int, coeffs: dict) -> None:
        """Append structural column ``("u", label)`` (cost 1), nonbasic at 0.

        ``coeffs`` maps a row label to the column's Decimal coefficient in that constraint
        (absent rows: 0). In the current dictionary the column is the same combination of
        the slack columns (a nonbasic slack's column, or a unit vector for a basic one),
        plus the cost in the objective row.
        """
        with decimal.localcontext(self.ctx):
            m = self.m
            col = np.empty(m + 1, dtype=object)
            col[:] = self.ctx.create_decimal(0)
            col[m] = self.ctx.create_decimal(-1)
            where = {lab: j for j, (kind, lab) in enumerate(self.nonbasic) if kind == "s"}
            rowpos = {lab: p for p, (kind, lab) in enumerate(self.basic) if kind == "s"}
            for lab, a in coeffs.items():
                if not a:
                    continue
                if lab in rowpos:
                    col[rowpos[lab]] += a
                else:
                    col = col + a * self.T[:, where[lab]]
            N = self.T.shape[1] - 1
            self.T = np.hstack([self.T[:, :N], col[:, None], self.T[:, N:]])
            self.F = None
            self.nonbasic.append(("u", label))

    def entering_cost(self, coeffs: dict) -> decimal.Decimal:
        """Objective-row entry a column with these coefficients would get (> 0: it would
        improve the optimum, so the dictionary is no longer optimal once it is added)."""
        with decimal.localcontext(self.ctx):
            m = self.m
            where = {lab: j for j, (kind, lab) in enumerate(self.nonbasic) if kind == "s"}
            total = self.ctx.create_decimal(-1)
            for lab, a in coeffs.items():
                if a and lab in where:
                    total += a * self.T[m, where[lab]]
            return total

    # ------------------------------------------------------------------ pivoting
    def _pivot(self, r: int, j: int) -> None:
        self.T = pivot(self.T, r, j)
        self.basic[r], self.nonbasic[j] = self.nonbasic[j], self.basic[r]
        self.pivots += 1
        if self.F is not None:
            self._pivot_float(self.F, r, j)
            self._age += 1

    def _weights(self, F: np.ndarray) -> np.ndarray:
        """Dual steepest-edge weights ||e_r^T B^-1||^2 of every row, from the double shadow F.

        Row r of B^-1 holds the row's entries in the nonbasic slack columns, and a 1 when
        the row's basic variable is itself a slack. Doubles suffice: the weights only rank
        candidate rows, every feasibility decision is taken in decimal.
        """
        m = self.m
        js = [j for j, (kind, _) in enumerate(self.nonbasic) if kind == "s"]
        w = np.array([1.0 if kind == "s" else 0.0 for (kind, _) in self.basic])
        if js:
            Fs = F[:m, js]
            w += np.einsum("ij,ij->i", Fs, Fs)
        return np.maximum(w, 1e-300)

    @staticmethod
    def _pivot_float(F: np.ndarray, r: int, j: int) -> None:
        """The same pivot on the double shadow of the tableau (in place)."""
        p = F[r, j]
        rowr = F[r, :] / p
        col = F[:, j].copy()
        F -= np.outer(col, rowr)
        F[r, :] = rowr
        F[:, j] = -col / p
        F[r, j] = 1.0 / p

    def dual_simplex(self, max_pivots: int) -> bool:
        """Restore primal feasibility from a dual feasible dictionary; True when optimal.

        The leaving row maximises beta_r^2 / w_r (dual steepest edge, weights recomputed in
        doubles every pivot), which takes far fewer pivots than the most negative beta_r on
        these LPs; after 2m + 10 pivots Bland's least-label rule takes over (no cycling).
        """
        tiny = self.tiny
        with decimal.localcontext(self.ctx):
            for step in range(max_pivots):
                m, N = self.m, self.T.shape[1] - 1
                beta = self.T[:m, N]
                infeasible = [i for i in range(m) if beta[i] < -tiny]
                if not infeasible:
                    return True
                bland = step >= 2 * m + 10
                if bland:
                    r = min(infeasible, key=lambda i: self.basic[i])
                else:
                    if self.F is None or self._age >= _SHADOW_AGE:
                        self.F, self._age = np.array(self.T, dtype=float), 0
                    w = self._weights(self.F)
                    r = max(infeasible, key=lambda i: float(beta[i]) ** 2 / w[i])
                row = self.T[r, :N]
                obj = self.T[m, :N]
                best_j, best_key = None, None
                for j in range(N):
                    a = row[j]
                    if a < -tiny:
                        ratio = obj[j] / a  # = d_j / (-a) with d_j = -T[m, j] >= 0
                        key = (ratio, self.nonbasic[j]) if bland else (ratio,)
                        if best_key is None or key < best_key:
                            best_j, best_key = j, key
                if best_j is None:
                    return False  # primal infeasible: cannot happen for a Delsarte LP
                self._pivot(r, best_j)
        return False

    def primal_simplex(self, max_pivots: int) -> bool:
        """Restore optimality from a primal feasible dictionary; True when optimal."""
        tiny = self.tiny
        with decimal.localcontext(self.ctx):
            for step in range(max_pivots):
                m, N = self.m, self.T.shape[1] - 1
                obj = self.T[m, :N]
                entering = [j for j in range(N) if obj[j] > tiny]
                if not entering:
                    return True
                bland = step >= 2 * m + 10
                if bland:
                    j = min(entering, key=lambda k: self.nonbasic[k])
                else:
                    j = max(entering, key=lambda k: obj[k])
                col = self.T[:m, j]
                beta = self.T[:m, N]
                best_r, best_key = None, None
                for r in range(m):
                    a = col[r]
                    if a > tiny:
                        ratio = max(beta[r], 0) / a
                        key = (ratio, self.basic[r]) if bland else (ratio,)
                        if best_key is None or key < best_key:
                            best_r, best_key = r, key
                if best_r is None:
                    return False  # unbounded: cannot happen (the objective is >= 0)
                self._pivot(best_r, j)
        return False

    # ------------------------------------------------------------------ solution
    def solution(self) -> dict[int, decimal.Decimal]:
        """Values of the basic structural variables (nonbasic ones are 0)."""
        N = self.T.shape[1] - 1
        return {idx: self.T[p, N] for p, (kind, idx) in enumerate(self.basic) if kind == "u"}

    def objective(self) -> decimal.Decimal:
        return self.T[self.m, self.T.shape[1] - 1]

    def basis(self) -> tuple[list[int], list[int]]:
        """(basic structural columns, labels of rows whose slack is nonbasic)."""
        S = [idx for (kind, idx) in self.basic if kind == "u"]
        T = [idx for (kind, idx) in self.nonbasic if kind == "s"]
        return S, T
