"""Words as integer indices, and Hamming balls as reusable patterns.

Shared plumbing of the searchers that work on word indices (:mod:`codesearch.search.greedy`,
:mod:`codesearch.search.lexicode`, :mod:`codesearch.search.local`,
:mod:`codesearch.search.sat`). A word ``(x_0, ..., x_{n-1})`` over ``0..q-1`` has index
``sum_j x_j q**(n-1-j)``, so index order is lexicographic order. A Hamming ball of radius r is
described once, relative to its centre: XOR masks for q = 2, otherwise a CSR list of
(coordinate, added symbol) changes. The kernels in :mod:`codesearch._kernels` apply them.
"""

from __future__ import annotations

from math import comb

import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import Code, Params
from codesearch.verify.codes import digit_patterns

__all__ = [
    "MAX_INDEX_SPACE",
    "ball_size",
    "ball_masks",
    "ball_patterns",
    "powers",
    "indices_to_words",
    "code_of_indices",
    "xorshift_state",
]

#: Word indices must fit an int64 with room for arithmetic on them.
MAX_INDEX_SPACE = 2**62


def ball_size(q: int, n: int, r: int) -> int:
    """Number of words within Hamming distance ``r`` of a fixed word."""
    return sum(comb(n, i) * (q - 1) ** i for i in range(0, min(r, n) + 1))


def powers(q: int, n: int) -> np.ndarray:
    """``pw[j] = q**(n-1-j)`` as int64 (place value of coordinate j)."""
    if q**n > MAX_INDEX_SPACE:
        raise ParameterError(f"q^n = {q}^{n} is too large for the heuristic searchers")
    return np.array([q ** (n - 1 - j) for j in range(n)], dtype=np.int64)


def ball_masks(n: int, r: int) -> np.ndarray:
    """Every binary word of weight <= ``r`` as an int64 XOR mask (weight order)."""
    # Within a weight k, the masks follow itertools.combinations(range(n), k) (bit n-1-j for
    # position j). The k-subsets of {s, .., n-1} in that order are those containing s (s plus
    # the (k-1)-subsets of {s+1, ..}) followed by those of {s+1, ..}: each is a suffix of the
    # list for s = 0, so one array and the offsets of its suffixes build the next weight in
    # O(C(n, k)) numpy work (a Python list of combinations took seconds at n = 26).
    parts = [np.zeros(1, dtype=np.int64)]
    place = np.array([1 << (n - 1 - j) for j in range(n)], dtype=np.int64)
    prev, prev_off = parts[0], np.zeros(n + 1, dtype=np.int64)
    for k in range(1, min(r, n) + 1):
        pieces = [place[s] + prev[prev_off[s + 1]:] for s in range(n - k + 1)]
        cur = np.concatenate(pieces)
        off = np.full(n + 1, cur.size, dtype=np.int64)
        off[: n - k + 1] = np.cumsum([0] + [p.size for p in pieces[:-1]])
        parts.append(cur)
        prev, prev_off = cur, off
    return np.concatenate(parts)


def ball_patterns(q: int, n: int, r: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The ball of radius ``r`` as CSR patterns ``(pat_ptr, pat_pos, pat_add)``.

    Pattern k adds ``pat_add[t]`` (in ``1..q-1``, mod q) at coordinate ``pat_pos[t]`` for t in
    ``pat_ptr[k]:pat_ptr[k+1]``; pattern 0 is the empty change (the centre itself).
    """
    return digit_patterns(q, n, range(min(r, n) + 1))


def indices_to_words(idx: np.ndarray, q: int, n: int) -> np.ndarray:
    """``(M, n)`` uint8 array of the words with the given indices."""
    idx = np.asarray(idx, dtype=np.int64).copy()
    out = np.empty((idx.shape[0], n), dtype=np.uint8)
    for j in range(n - 1, -1, -1):
        out[:, j] = idx % q
        idx //= q
    return out


def code_of_indices(idx: np.ndarray | None, params: Params) -> Code | None:
    """The code whose words have the given indices (sorted), or None for no index."""
    if idx is None or np.asarray(idx).size == 0:
        return None
    return Code(indices_to_words(np.sort(idx), params.q, params.n), params.q)


def xorshift_state(seed: int, stream: int) -> np.ndarray:
    """xorshift64* state of the heuristic kernels, derived from (seed, stream) through numpy's
    SeedSequence (never 0)."""
    word = np.random.SeedSequence([seed, stream]).generate_state(1, dtype=np.uint64)
    return np.array([word[0] | np.uint64(1)], dtype=np.uint64)
