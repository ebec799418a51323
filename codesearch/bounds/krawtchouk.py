"""Exact Krawtchouk polynomials, binomials and Hamming-ball volumes.

Problem
-------
Every bound on A_q(n,d) in this package is built from a few exact integer sequences: the
q-ary Krawtchouk polynomials K_k(x) (the eigenvalues of the Hamming scheme, which drive the
Delsarte linear program), and the volume V_q(n, r) of a Hamming ball. They grow past the range of
a double (binary n = 128 already has K_64(0) ~ 2.4e37, q = 16, n = 40 about 1e58), so they are
kept as Python integers; tables are cached per (q, n) because a grid run asks for the same
table once per d.

References
----------
P. Delsarte, "An algebraic approach to the association schemes of coding theory", Philips
Res. Rep. Suppl. 10 (1973), section 4 (Krawtchouk polynomials and their three-term recurrence).
F. J. MacWilliams and N. J. A. Sloane, "The Theory of Error-Correcting Codes" (1977),
chapter 5, section 7 (properties of Krawtchouk polynomials used here: K_k(0) = C(n,k)(q-1)^k
and the reciprocity (q-1)^i C(n,i) K_k(i) = (q-1)^k C(n,k) K_i(k)).
"""

from __future__ import annotations

from functools import lru_cache
from math import comb

__all__ = ["krawtchouk_table", "krawtchouk", "ball_volume", "sphere_size"]


@lru_cache(maxsize=256)
def krawtchouk_table(q: int, n: int) -> tuple[tuple[int, ...], ...]:
    """All values K_k(x) for 0 <= k, x <= n, as exact integers.

    Parameters
    ----------
    q, n : int
        Alphabet size (>= 2) and length (>= 0).

    Returns
    -------
    tuple of tuple of int
        ``table[k][x] = K_k(x) = sum_j (-1)^j (q-1)^(k-j) C(x, j) C(n-x, k-j)``.

    Notes
    -----
    Built by the three-term recurrence in k,
    ``(k+1) K_{k+1}(x) = (k + (q-1)(n-k) - q x) K_k(x) - (q-1)(n-k+1) K_{k-1}(x)``,
    whose division by k+1 is exact (every K_k(x) is an integer); O(n^2) big-integer steps.
    The independent checker in :mod:`codesearch.verify` uses the explicit sum instead.
    """
    if q < 2 or n < 0:
        raise ValueError(f"need q >= 2 and n >= 0, got q={q}, n={n}")
    rows: list[list[int]] = [[1] * (n + 1)]
    if n >= 1:
        rows.append([(q - 1) * n - q * x for x in range(n + 1)])
    for k in range(1, n):
        prev, cur = rows[k - 1], rows[k]
        nxt = []
        for x in range(n + 1):
            num = (k + (q - 1) * (n - k) - q * x) * cur[x] - (q - 1) * (n - k + 1) * prev[x]
            value, rem = divmod(num, k + 1)
            # Invariant: Krawtchouk values are integers, so the division is exact.
            assert rem == 0
            nxt.append(value)
        rows.append(nxt)
    return tuple(tuple(r) for r in rows)


def krawtchouk(q: int, n: int, k: int, x: int) -> int:
    """The single value K_k(x) of the q-ary Krawtchouk polynomial of degree k, length n."""
    return krawtchouk_table(q, n)[k][x]


def sphere_size(q: int, n: int, r: int) -> int:
    """Number of words at Hamming distance exactly r from a fixed word: C(n, r) (q-1)^r."""
    if r < 0 or r > n:
        return 0
    return comb(n, r) * (q - 1) ** r


@lru_cache(maxsize=4096)
def ball_volume(q: int, n: int, r: int) -> int:
    """Number of words within Hamming distance r of a fixed word, V_q(n, r)."""
    return sum(sphere_size(q, n, i) for i in range(0, min(r, n) + 1))
