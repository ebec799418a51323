"""Distance-4 binary codes glued from partitions of the even-weight words.

Problem
-------
Let P_1, .., P_s partition the even-weight words of length a and Q_1, .., Q_s those of length
b, every class a code of minimum distance 4. Then ``C = union_i P_i x Q_i`` has minimum
distance 4: two words in the same product differ by >= 4 in one half (or in both), and two
words in different products differ in both halves by a positive even amount. Its size is
``sum_i |P_i| |Q_i|``, largest when both lists are sorted by size.

Partitions offered
    syndrome  x -> sum_i x_i h_i with h_i = i written in s = ceil(log2 a) bits (h_0 = 0):
              2^s classes of 2^(a-1-s) words (cosets of a shortened extended Hamming code);
    weight    x -> (wt(x) mod 4, sum_i x_i beta_i) with beta_i distinct nonzero elements of
              GF(2^t), 2^t > a: two words of one class at distance 2 would have equal weight,
              so differ by a swap i <-> j, changing the sum by beta_i + beta_j != 0. The
              classes are unions of constant-weight codes of distance 4, of unequal sizes.

References
----------
R. L. Graham and N. J. A. Sloane, Lower bounds for constant weight codes, *IEEE Trans.
Inform. Theory* 26 (1980) 37-43 (partitions of constant-weight words into distance-4 codes);
A. E. Brouwer, J. B. Shearer, N. J. A. Sloane and W. D. Smith, A new table of constant weight
codes, *IEEE Trans. Inform. Theory* 36 (1990) 1334-1380 (glued partitions; from memory).
"""

from __future__ import annotations

from functools import lru_cache
from itertools import product

import numpy as np

from codesearch.errors import ParameterError
from codesearch.gf import field
from codesearch.model import MAX_LISTED_WORDS, Code

__all__ = ["PARTITION_KINDS", "even_weight_partition", "class_sizes", "glued_size",
           "glued_code"]

PARTITION_KINDS = ("syndrome", "weight")
MAX_SIDE = 16


def _check(a: int, kind: str) -> None:
    if kind not in PARTITION_KINDS:
        raise ParameterError(f"partition kind must be one of {', '.join(PARTITION_KINDS)}")
    if not 2 <= a <= MAX_SIDE:
        raise ParameterError(f"partition sides need length 2..{MAX_SIDE}, got {a}")


@lru_cache(maxsize=None)
def _labels(a: int, kind: str) -> tuple[np.ndarray, np.ndarray]:
    """(even-weight words of length a, class label of each)."""
    _check(a, kind)
    allw = np.array(list(product([0, 1], repeat=a)), dtype=np.uint8)
    words = allw[allw.sum(axis=1) % 2 == 0]
    if kind == "syndrome":
        s = max(1, (a - 1).bit_length())
        h = np.arange(a)
        syn = np.bitwise_xor.reduce(np.where(words == 1, h[None, :], 0), axis=1)
        labels = syn
    else:
        t = a.bit_length()  # 2^t > a
        gf = field(2**t)
        beta = np.arange(1, a + 1)
        acc = np.zeros(words.shape[0], dtype=np.int64)
        for i in range(a):
            acc = np.where(words[:, i] == 1, gf.add[acc, beta[i]], acc)
        labels = ((words.sum(axis=1) % 4) // 2) * 2**t + acc
    _, inv = np.unique(labels, return_inverse=True)
    return words, inv.astype(np.int64)


def even_weight_partition(a: int, kind: str = "syndrome") -> list[np.ndarray]:
    """The classes (arrays of words) of the partition, largest first."""
    words, lab = _labels(a, kind)
    classes = [words[lab == c] for c in range(lab.max() + 1)]
    classes.sort(key=lambda c: -c.shape[0])
    return classes


@lru_cache(maxsize=None)
def class_sizes(a: int, kind: str = "syndrome") -> tuple[int, ...]:
    """Sizes of the classes, largest first."""
    _, lab = _labels(a, kind)
    return tuple(sorted(np.bincount(lab).tolist(), reverse=True))


def glued_size(a: int, b: int, kind_a: str = "syndrome", kind_b: str = "syndrome") -> int:
    """Size of :func:`glued_code` without building it."""
    sa, sb = class_sizes(a, kind_a), class_sizes(b, kind_b)
    return sum(x * y for x, y in zip(sa, sb))


def glued_code(a: int, b: int, kind_a: str = "syndrome", kind_b: str = "syndrome",
               max_words: int = MAX_LISTED_WORDS) -> Code:
    """The code ``union_i P_i x Q_i`` of length a + b and minimum distance 4."""
    size = glued_size(a, b, kind_a, kind_b)
    if size > max_words:
        raise ParameterError(f"the glued code has {size} words, more than the cap {max_words}")
    parts = []
    for p, q in zip(even_weight_partition(a, kind_a), even_weight_partition(b, kind_b)):
        parts.append(np.hstack([np.repeat(p, q.shape[0], axis=0), np.tile(q, (p.shape[0], 1))]))
    return Code(np.vstack(parts), 2)
