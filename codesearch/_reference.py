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


# ======================================================================= clique engine (exact search)
#
# Graphs here are lists of Python sets (adj[v] = neighbours of v), converted from the kernels'
# bitset rows by ``bitset_rows_to_sets``.


def bitset_rows_to_sets(adj: np.ndarray, n: int) -> list[set[int]]:
    """Neighbour sets from bitset rows, one bit at a time."""
    return [{j for j in range(n) if (int(adj[i, j >> 6]) >> (j & 63)) & 1} for i in range(n)]


def max_weight_clique_value(adj: list[set[int]], weights) -> int:
    """Largest clique weight, by plain recursive enumeration of cliques (no bound at all)."""
    n = len(adj)
    best = 0

    def grow(clique_weight: int, candidates: list[int]) -> None:
        nonlocal best
        best = max(best, clique_weight)
        for i, v in enumerate(candidates):
            grow(clique_weight + int(weights[v]), [u for u in candidates[i + 1 :] if u in adj[v]])

    grow(0, list(range(n)))
    return best


def colour_level(adj: list[set[int]], weights, candidates: set[int], thr: int
                 ) -> tuple[list[int], list[int], int]:
    """Greedy sequential colouring of ``candidates`` in increasing vertex order.

    Each class takes, in order, every uncoloured vertex not adjacent to one already in the
    class. A class's bound is its heaviest weight; cumulative bounds are summed. Returns the
    listed vertices (classes whose cumulative bound exceeds ``thr``, in class order), their
    cumulative bounds, and the number of classes.
    """
    uncoloured = sorted(candidates)
    listed: list[int] = []
    bounds: list[int] = []
    cum = 0
    classes = 0
    while uncoloured:
        classes += 1
        cls: list[int] = []
        for v in uncoloured:
            if all(u not in adj[v] for u in cls):
                cls.append(v)
        uncoloured = [v for v in uncoloured if v not in cls]
        cum += max(int(weights[v]) for v in cls)
        if cum > thr:
            listed += cls
            bounds += [cum] * len(cls)
    return listed, bounds, classes


def degeneracy_order(adj: list[set[int]]) -> list[int]:
    """Repeatedly delete a vertex of least remaining degree (lowest index on ties); return
    the deletion sequence reversed."""
    alive = set(range(len(adj)))
    removed: list[int] = []
    while alive:
        v = min(alive, key=lambda x: (len(adj[x] & alive), x))
        removed.append(v)
        alive.remove(v)
    return removed[::-1]


def permute(adj: list[set[int]], order) -> list[set[int]]:
    """New vertex i is old vertex order[i]."""
    where = {int(old): new for new, old in enumerate(order)}
    return [{where[u] for u in adj[int(old)]} for old in order]


def greedy_clique(adj: list[set[int]], weights, starts: int) -> int:
    """Best weight of the greedy cliques started at vertices 0..starts-1, adding vertices in
    increasing order when adjacent to all chosen."""
    best = 0
    for s in range(min(starts, len(adj))):
        chosen = [s]
        for v in range(len(adj)):
            if v != s and all(v in adj[u] for u in chosen):
                chosen.append(v)
        best = max(best, sum(int(weights[v]) for v in chosen))
    return best


def code_adjacency(words: np.ndarray, d: int) -> list[set[int]]:
    """Neighbour sets of the code graph: distinct words at Hamming distance >= d."""
    rows = [tuple(int(s) for s in r) for r in words]
    return [{j for j in range(len(rows)) if j != i and hamming(rows[i], rows[j]) >= d}
            for i in range(len(rows))]
