"""Slow, obviously correct pure-Python twins of the kernels in :mod:`codesearch._kernels`.

Each function here computes the same thing as its kernel, by the definition and without any
cleverness; the tests compare the two on random inputs.
"""

from __future__ import annotations

import itertools

import numpy as np

# ======================================================================= distances (foundation)


def hamming(x, y) -> int:
    """Number of positions where the two words differ."""
    return sum(1 for a, b in zip(x, y) if a != b)


def distance_distribution(words: np.ndarray) -> list[int]:
    """Number of unordered pairs at each distance 0..n."""
    rows = [tuple(int(s) for s in r) for r in words]
    n = words.shape[1]
    out = [0] * (n + 1)
    for i in range(len(rows)):
        for j in range(i + 1, len(rows)):
            out[hamming(rows[i], rows[j])] += 1
    return out


def first_close_pair(words: np.ndarray, below: int) -> tuple[int, int, int] | None:
    """First pair (i, j) in row order with distance < ``below``, or None."""
    rows = [tuple(int(s) for s in r) for r in words]
    for i in range(len(rows)):
        for j in range(i + 1, len(rows)):
            dist = hamming(rows[i], rows[j])
            if dist < below:
                return i, j, dist
    return None


def linear_weight_distribution(gen: np.ndarray, p: int) -> list[int]:
    """Weight distribution of the span of ``gen``'s rows over GF(p), by listing all combinations."""
    k, n = gen.shape
    out = [0] * (n + 1)
    for coeffs in itertools.product(range(p), repeat=k):
        word = [sum(c * int(gen[r, x]) for r, c in enumerate(coeffs)) % p for x in range(n)]
        out[sum(1 for s in word if s)] += 1
    return out


def gf_rank(words: np.ndarray, p: int) -> int:
    """Rank over GF(p) by textbook Gaussian elimination on a list of lists."""
    rows = [[int(s) % p for s in r] for r in words]
    rank, n = 0, (len(rows[0]) if rows else 0)
    for col in range(n):
        pivot = next((i for i in range(rank, len(rows)) if rows[i][col]), None)
        if pivot is None:
            continue
        rows[rank], rows[pivot] = rows[pivot], rows[rank]
        inv = pow(rows[rank][col], p - 2, p)
        rows[rank] = [(v * inv) % p for v in rows[rank]]
        for i in range(len(rows)):
            if i != rank and rows[i][col]:
                f = rows[i][col]
                rows[i] = [(a - f * b) % p for a, b in zip(rows[i], rows[rank])]
        rank += 1
    return rank
