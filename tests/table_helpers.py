"""Shared helpers of the store/batch/report/propagate tests (well-known codes from their definitions)."""

from __future__ import annotations

import itertools

import numpy as np

from codesearch.model import Code


def hamming_code(r: int) -> Code:
    """Binary Hamming code of length 2^r - 1: the null space of the matrix whose columns are
    all nonzero r-bit vectors (MacWilliams-Sloane Ch. 1 section 7). Minimum distance 3."""
    n = 2**r - 1
    h = np.array([[(j >> i) & 1 for j in range(1, n + 1)] for i in range(r)], dtype=np.int64)
    words = [w for w in itertools.product((0, 1), repeat=n) if not ((h @ np.array(w)) % 2).any()]
    return Code(np.array(words, dtype=np.uint8), 2)


def repetition_code(q: int, n: int) -> Code:
    """The q words (a, a, ..., a): minimum distance n."""
    return Code(np.repeat(np.arange(q, dtype=np.uint8)[:, None], n, axis=1), q)


def even_weight_code(n: int) -> Code:
    """All binary words of even weight: 2^(n-1) words, distance 2 (A(n,2) = 2^(n-1),
    common practice)."""
    words = [w for w in itertools.product((0, 1), repeat=n) if sum(w) % 2 == 0]
    return Code(np.array(words, dtype=np.uint8), 2)
