"""Upper bounds on A(n,3) = A(n+1,4) from the neighbourhood profiles of all words of the space.

Problem
-------
Delsarte's LP only sees pairs of codewords. For distance 4 (and 3, through the parity bit)
much of what limits a code lives in the words *around* it: Johnson's improvement of the
sphere-packing bound counts the words at distance 2 from a distance-3 code, which lie at
distance 2 from at most ``n/2`` codewords. This bound keeps that information inside the LP.
Every word ``x`` of ``F_2^N`` has a *profile*, the numbers ``N_s(x)`` of codewords at a few
distances ``s`` (odd words: ``N_1, N_3``; even words: ``N_0, N_2, N_4``); the profiles lie in
a small finite set (at most one codeword at distance 1, the codewords at distance 3 form a
partial Steiner triple system avoiding it, ...), and the first and second moments of the
profiles over the space are linear in the distance distribution:
``sum_x N_s(x) N_t(x) = M sum_h A_h p^h_{st}``. So for a size ``M``, the distance
distribution and the distribution of profiles (as ``2^(N-1)/M`` words per codeword) must
satisfy one joint LP; when it has no solution for ``M = U + 1`` (and then for every larger
``M``), ``A(N, 4) <= U``.

The theorem, the admissible profiles and the exact check are in
:mod:`codesearch.verify.profile_lp` (the referee owns the proof; this module only solves).
Here: the joint LP (Delsarte rows, the constant-weight and antipodal inequalities of
:func:`codesearch.bounds.delsarte.extra_inequalities`, the moment identities, the profile
count ``<= 2^(N-1)/(U+1)``) is solved in floating point with HiGHS, maximising
``sum_h A_h``; the smallest ``U`` whose optimum stays below ``U`` is found by a downward
search from the Delsarte value, and the dual of that LP, converted exactly from the doubles,
is the certificate (kind ``profile-lp``). What the rounding leaves is absorbed by proven caps
on ``A_h`` in the checker; a dual that does not certify ``U`` is retried at ``U + 1``.

Measured (benchmarks/results_bounds_published.md): A(20,3) = A(21,4) <= 43688 (the
published value; Delsarte's LP gives 43690), A(21,3) = A(22,4) <= 87341 (LP 87381), and
small gains at lengths 23-24.

References
----------
S. M. Johnson, "A new upper bound for error-correcting codes", IRE Trans. Inform. Theory 8
(1962) 203-207.
P. Delsarte, "An algebraic approach to the association schemes of coding theory", Philips
Res. Rep. Suppl. 10 (1973).
B. Mounits, T. Etzion and S. Litsyn, "Improved upper bounds on sizes of codes", IEEE Trans.
Inform. Theory 48 (2002) 880-886 (new linear inequalities for distances 3 and 4 from the words
around a code; the profile moments here are our own way of generating such inequalities).
"""

from __future__ import annotations

import math
from fractions import Fraction
from functools import lru_cache

import numpy as np

from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = ["profile_lp", "profile_float_excess", "profile_certificate", "MIN_LENGTH",
           "MAX_LENGTH"]

#: Shortest length tried (below it every cell is settled by classical codes and bounds).
MIN_LENGTH = 10
#: Longest length tried here (the checker accepts up to its own MAX_LENGTH); at N = 32 one
#: LP has about 16 000 profile columns and takes seconds.
MAX_LENGTH = 32
#: Families used: both (the even one helps from N = 23 on, the odd one carries N = 21, 22).
_FAMILIES = ("odd", "even")


class _Program:
    """The float LP for length N and the bookkeeping to map its dual back to exact rows.

    Variables: ``A_h`` (even ``h >= 4``), the profile counts ``nu_P`` per family (words per
    codeword), ``t`` and ``omega``. Minimise ``t + K omega`` subject to Delsarte's rows, the
    extra inequalities, the moment identities, ``sum_P nu_P <= t + s (sum_h A_h - U)`` per
    family (``s``: the chord of ``2^(N-1)/M`` between ``U+1`` and the known bound ``V``) and
    ``sum_h A_h / U + omega >= 1``. A code of size ``U+1 .. V`` gives a solution with
    ``omega = 0`` and ``t = 2^(N-1)/(U+1)``, so an optimum above that excludes them all;
    ``omega`` (cost ``K = 1000 t``) keeps the LP feasible when the moments alone already
    exclude the sizes, so that its dual is still a certificate.
    """

    def __init__(self, N: int) -> None:
        from codesearch.bounds.delsarte import extra_inequalities
        from codesearch.bounds.krawtchouk import krawtchouk_table
        from codesearch.verify.profile_lp import FAMILIES, monomial_key, profile_program, profiles

        self.N = N
        prog = profile_program(N, _FAMILIES)
        D = prog.distances
        nA = len(D)
        K = krawtchouk_table(2, N)
        self.extras = [e for e in extra_inequalities(N, 4) if any(i in e[2] for i in D)]
        blocks = [(f, profiles(N, f)) for f in _FAMILIES]
        nv = nA + sum(len(p) for _, p in blocks) + 2  # ..., t, omega
        self.nA, self.nv = nA, nv
        ub, ub_rhs, self.ub_tag = [], [], []
        for k in range(1, N // 2 + 1):  # K_k = K_{N-k} on even distances
            row = np.zeros(nv)
            row[:nA] = [-K[k][h] / K[k][0] for h in D]
            ub.append(row)
            ub_rhs.append(1.0)
            self.ub_tag.append(("y", k, K[k][0]))
        for j, (_fam, _idx, coeffs, b) in enumerate(self.extras):
            row = np.zeros(nv)
            row[:nA] = [coeffs.get(h, 0) / b for h in D]
            ub.append(row)
            ub_rhs.append(1.0)
            self.ub_tag.append(("z", j, b))
        eq, eq_rhs, self.eq_tag = [], [], []
        off = nA
        self.cap_rows = []
        for f, P in blocks:
            sl = slice(off, off + len(P))
            row = np.zeros(nv)
            row[sl] = 1.0
            row[-2] = -1.0
            self.cap_rows.append(len(ub))
            ub.append(row)
            ub_rhs.append(0.0)  # the chord's slope and offset are set per (U, V)
            self.ub_tag.append(("cap", f, 1))
            Parr = np.array(P, dtype=float)
            for j, m in enumerate(prog.monomials[f]):
                row = np.zeros(nv)
                row[sl] = np.prod(Parr[:, list(m)], axis=1)
                row[:nA] = [-prog.coeff[f][j][h] for h in D]
                c = prog.constant[f][j]
                s = max(1.0, abs(c), float(np.abs(row).max()))
                eq.append(row / s)
                eq_rhs.append(c / s)
                self.eq_tag.append((f, monomial_key(tuple(FAMILIES[f][a] for a in m)), s))
            off += len(P)
        row = np.zeros(nv)
        row[:nA] = -1.0
        row[-1] = -1.0  # omega: keeps the LP feasible, at a prohibitive cost
        ub.append(row)
        ub_rhs.append(-1.0)  # scaled per U: -sum A / U - omega <= -1
        self.size_row = len(ub) - 1
        self.ub_tag.append(("lambda", 0, None))
        self.A_ub, self.b_ub = np.array(ub), np.array(ub_rhs)
        self.A_eq, self.b_eq = np.array(eq), np.array(eq_rhs)

    def solve(self, U: int, V: int):
        from scipy.optimize import linprog

        A_ub = self.A_ub.copy()
        b_ub = self.b_ub.copy()
        A_ub[self.size_row, : self.nA] = -1.0 / U
        # sum nu <= t + s (sum A - U): the chord of 2^(N-1)/M between U+1 and V
        g = lambda m: 2.0 ** (self.N - 1) / m  # noqa: E731
        s = (g(V) - g(U + 1)) / (V - U - 1) if V > U + 1 else 0.0
        for r in self.cap_rows:
            A_ub[r, : self.nA] = -s
            b_ub[r] = -s * U
        c = np.zeros(self.nv)
        c[-2] = 1.0
        c[-1] = 1e3 * g(U + 1)
        return linprog(c, A_ub=A_ub, b_ub=b_ub, A_eq=self.A_eq, b_eq=self.b_eq,
                       bounds=(0, None), method="highs")


@lru_cache(maxsize=8)
def _program(N: int) -> _Program:
    return _Program(N)


def profile_float_excess(N: int, U: int, V: int) -> float:
    """``t* (U+1) / 2^(N-1)``: above 1 (with a margin) means no code of size ``U+1 .. V``, up
    to the float tolerance; ``inf`` when even the distance distribution alone is impossible."""
    res = _program(N).solve(U, V)
    if res.status == 2:
        return math.inf
    if res.status != 0:
        return 0.0  # unsolved: excludes nothing
    return res.fun * (U + 1) / 2.0 ** (N - 1)


def _fmt(v: Fraction) -> str:
    return f"{v.numerator}/{v.denominator}" if v.denominator != 1 else str(v.numerator)


def profile_certificate(n: int, d: int, U: int, top: dict) -> dict | None:
    """The ``profile-lp`` certificate claiming ``A(n, d) <= U`` from the float dual at ``U``,
    given the certificate ``top`` of a bound ``V`` on the same cell (it is nested), or None
    when the solve fails (the checker decides whether it proves ``U``)."""
    from codesearch.verify import check_certificate

    N = n + 1 if d == 3 else n
    prog = _program(N)
    ok, V, _ = check_certificate(top)
    if not ok:
        return None
    res = prog.solve(U, V)
    if res.status != 0:
        return None
    y = [Fraction(0)] * N
    extra, lam = [], Fraction(0)
    for dual, (kind, idx, scale) in zip(res.ineqlin.marginals, prog.ub_tag):
        v = Fraction(float(-dual))  # the double's exact value
        if v <= 0:
            continue
        if kind == "y":
            y[idx - 1] = v / scale
        elif kind == "z":
            fam, index, _, _ = prog.extras[idx]
            extra.append({"family": fam, "index": index, "z": _fmt(v / scale)})
        elif kind == "lambda":
            lam = v / U
    mu: dict[str, dict[str, str]] = {f: {} for f in _FAMILIES}
    for dual, (f, key, scale) in zip(res.eqlin.marginals, prog.eq_tag):
        v = Fraction(float(-dual)) / Fraction(scale)
        if v:
            mu[f][key] = _fmt(v)
    return {"kind": "profile-lp", "q": 2, "n": n, "d": d, "value": U,
            "y": [_fmt(v) for v in y], "extra": extra, "lambda": _fmt(lam),
            "profiles": [{"family": f, "mu": mu[f]} for f in _FAMILIES], "top": top}


def _search(N: int, top: int) -> int | None:
    """Smallest U < top whose float LP excludes the sizes U+1 .. top (None if none)."""
    def excluded(U: int) -> bool:
        return profile_float_excess(N, U, top) > 1.0 + 1e-7

    if not excluded(top - 1):
        return None
    hi, step = top - 1, 1  # hi: excluded
    lo = None
    while lo is None:
        cand = top - 1 - 2 * step
        if cand < 1 or not excluded(cand):
            lo = max(cand, 0)
        else:
            hi, step = cand, step * 2
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if excluded(mid):
            hi = mid
        else:
            lo = mid
    return hi


@lru_cache(maxsize=1024)  # deterministic and seconds long: once per process per cell
def profile_lp(params: Params) -> BoundResult | None:
    """The profile-moment bound for binary ``d = 3, 4`` (certificate kind ``profile-lp``).

    None when the cell is outside ``MIN_LENGTH <= N <= MAX_LENGTH`` (``N = n + 1`` for
    ``d = 3``), or when it does not improve on Delsarte's LP with the extra inequalities.
    """
    from codesearch.bounds.delsarte import delsarte_lp_plus
    from codesearch.verify import check_certificate

    if params.q != 2 or params.d not in (3, 4):
        return None
    n, d = params.n, params.d
    N = n + 1 if d == 3 else n
    if not MIN_LENGTH <= N <= MAX_LENGTH:
        return None
    lp = delsarte_lp_plus(Params(2, N, 4))
    if lp is None or not lp.usable:
        return None
    U = _search(N, lp.value)
    if U is None:
        return None
    for claim in range(U, lp.value):
        cert = profile_certificate(n, d, claim, lp.certificate)
        if cert is None:
            continue
        ok, value, reason = check_certificate(cert)
        if ok and value == claim:
            via = "" if N == n else f" via A({N},4)"
            return BoundResult(params, claim, "profile-lp", certificate=cert,
                               note=f"profile moments{via}; Delsarte LP gives {lp.value}")
    return None
