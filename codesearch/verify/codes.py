"""Checks of explicit codes: distance distribution, minimum distance, linearity, claims.

Every code a search returns, a file holds or the store keeps passes through
:func:`assert_code`. The pairwise distances come from the packed distance kernels of
:mod:`codesearch._kernels` (tested against the definition in :mod:`codesearch._reference`).

The distance distribution of an ``M``-word code counts the unordered pairs at each distance
``0..n``. For a *linear* code (a subspace of GF(p)^n) the pairs at distance ``i > 0`` number
``M * A_i / 2`` where ``A_i`` is the weight distribution, so only ``O(M n)`` work is needed;
otherwise the packed kernel visits all ``M (M - 1) / 2`` pairs.

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, ch. 1 (distance distribution of linear codes equals the weight distribution).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from codesearch.errors import VerificationError
from codesearch.model import Code, Params

__all__ = ["CodeReport", "check_code", "assert_code", "assert_min_distance", "min_distance",
           "distance_distribution", "first_close_pair", "is_prime", "prepare",
           "ball_check_cost", "assert_code_by_balls", "check_cost", "assert_large_binary", "binary_linear_basis", "assert_large_qary",
           "PAIR_CHECK_WORDS", "BITMAP_MAX_N"]


def is_prime(q: int) -> bool:
    """True for prime q (the alphabets where we test linearity over GF(q))."""
    return q >= 2 and all(q % p for p in range(2, int(q**0.5) + 1))


@dataclass(frozen=True)
class CodeReport:
    """What :func:`check_code` found.

    Attributes
    ----------
    n, q, size : int
        Length, alphabet size, number of codewords (duplicates included).
    min_distance : int or None
        Least distance over pairs of rows (0 when there are duplicates); None when size < 2.
    distance_distribution : list of int or None
        Unordered pairs at each distance 0..n; None for a generator matrix checked by
        information sets (minimum distance only).
    duplicates : int
        Pairs of equal rows (``distance_distribution[0]``).
    linear : bool or None
        Whether the rows form a subspace of GF(q)^n; None when q is not prime.
    dimension : int or None
        The dimension when linear.
    weight_distribution : list of int or None
        Words of each weight 0..n when linear (None when only the minimum distance was
        computed).
    claimed_d : int or None
        The minimum distance the check was asked to confirm.
    valid : bool
        True when no claim was made, or the claim holds.
    offending : tuple of int or None
        ``(i, j, distance)``: the first pair of rows (0-based) closer than ``claimed_d``.
    """

    n: int
    q: int
    size: int
    min_distance: int | None
    distance_distribution: list[int] | None
    duplicates: int
    linear: bool | None
    dimension: int | None
    weight_distribution: list[int] | None = None
    claimed_d: int | None = None
    valid: bool = True
    offending: tuple[int, int, int] | None = None
    method: str = "pairs"

    def to_json(self) -> dict[str, Any]:
        """The object printed by ``codesearch check --json``."""
        return {
            "n": self.n,
            "q": self.q,
            "size": self.size,
            "min_distance": self.min_distance,
            "distance_distribution": (None if self.distance_distribution is None
                                      else list(self.distance_distribution)),
            "duplicates": self.duplicates,
            "linear": self.linear,
            "dimension": self.dimension,
            "weight_distribution": self.weight_distribution,
            "claimed_d": self.claimed_d,
            "valid": self.valid,
            "method": self.method,
        }


def _kernels():
    from codesearch import _kernels

    return _kernels


def prepare() -> None:
    """Load the checker's compiled kernels now (a no-op once loaded).

    Long-running drivers call this before starting work, so that the first import of numba
    (a second or more) does not happen in the middle of the run.
    """
    _kernels()


def _packed(code: Code) -> tuple[np.ndarray, int, int]:
    k = _kernels()
    return k.pack_words(code.words, code.q), k.plane_count(code.q), k.limb_count(code.n)


def distance_distribution(code: Code) -> list[int]:
    """Unordered pairs of rows at each distance 0..n, over all pairs (packed kernel)."""
    if code.size < 2:
        return [0] * (code.n + 1)
    k = _kernels()
    planes = k.plane_count(code.q)
    if planes > 1 and planes * code.n <= 64:
        # short q-ary codes: all symbols in one word, one load per pair
        col = k.pack_interleaved(code.words, code.q)
        low, high = (np.uint64(v) for v in k.interleaved_masks(code.n, planes))
        return [int(v) for v in k.distance_distribution_interleaved(col, low, high, code.n)]
    packed, planes, limbs = _packed(code)
    return [int(v) for v in k.distance_distribution_packed(packed, planes, limbs, code.n)]


def first_close_pair(code: Code, below: int) -> tuple[int, int, int] | None:
    """The first pair of rows ``(i, j, dist)`` with ``dist < below``, or None (early exit)."""
    if code.size < 2:
        return None
    packed, planes, limbs = _packed(code)
    i, j, dist = (int(v) for v in _kernels().first_close_pair_packed(packed, planes, limbs, below))
    return None if i < 0 else (i, j, dist)


def min_distance(code: Code) -> int | None:
    """Minimum distance over pairs of rows; None for fewer than two rows."""
    if code.size < 2:
        return None
    dist = distance_distribution(code)
    return next(i for i, c in enumerate(dist) if c)


def _linear_dimension(code: Code) -> int | None:
    """The dimension if the rows are exactly a subspace of GF(q)^n, else None.

    A set C of distinct vectors lies in span(C), which has q^rank elements; so C is a subspace
    iff |C| = q^rank(C). Quick rejections: |C| must be a power of q and C must hold 0.
    """
    q, m = code.q, code.size
    if not is_prime(q) or m == 0:
        return None
    k, power = 0, 1
    while power < m:
        power *= q
        k += 1
    if power != m or not (code.words == 0).all(axis=1).any():
        return None
    if k > code.n:
        return None
    rank = int(_kernels().gf_rank(np.array(code.words, dtype=np.uint8, order="C"), q, k))
    if rank != k:
        return None
    # |C| = q^k = q^rank; C is a subspace provided its rows are distinct
    srt = code.canonical().words
    if m > 1 and (srt[1:] == srt[:-1]).all(axis=1).any():
        return None
    return k


def check_code(code: Code, d: int | None = None) -> CodeReport:
    """Check a code: distance distribution, duplicates, linearity, and the claim ``d``.

    Parameters
    ----------
    code : Code
        The code to check.
    d : int, optional
        Claimed minimum distance. With a claim the report names the first offending pair.
    """
    n, q, m = code.n, code.q, code.size
    dim = _linear_dimension(code)
    linear: bool | None = None if not is_prime(q) else dim is not None
    weights = None
    if dim is not None:
        weights = np.bincount((code.words != 0).sum(axis=1), minlength=n + 1).astype(np.int64)
        dist = [0] + [int(m * int(a) // 2) for a in weights[1:]]
        method = "weights"
    else:
        dist = distance_distribution(code)
        method = "pairs"
    mind = next((i for i, c in enumerate(dist) if c), None) if m >= 2 else None
    valid, offending = True, None
    if d is not None and mind is not None and mind < d:
        valid = False
        offending = first_close_pair(code, d)
    return CodeReport(
        n=n, q=q, size=m, min_distance=mind, distance_distribution=dist, duplicates=dist[0],
        linear=linear, dimension=dim,
        weight_distribution=None if weights is None else [int(v) for v in weights],
        claimed_d=d, valid=valid, offending=offending, method=method,
    )



def assert_min_distance(code: Code, d: int) -> None:
    """Raise :class:`VerificationError` if two rows of ``code`` are closer than ``d``."""
    bad = first_close_pair(code, d)
    if bad is not None:
        i, j, dist = bad
        raise VerificationError(
            f"rows {i} and {j} are at distance {dist} < d={d} "
            f"({code.to_strings()[i]} / {code.to_strings()[j]})"
        )


def assert_code(code: Code, params: Params) -> None:
    """Raise :class:`VerificationError` unless ``code`` is a code of the cell ``params``.

    The check costs what :func:`check_cost` states: pairs of words up to
    :data:`PAIR_CHECK_WORDS` words, and for larger binary codes (n <= 64) a time linear in M
    (:func:`assert_large_binary`).
    """
    if not isinstance(code, Code):
        raise VerificationError(f"expected a Code, got {type(code).__name__}")
    if code.q != params.q or code.n != params.n:
        raise VerificationError(
            f"code has q={code.q}, n={code.n}; the cell needs q={params.q}, n={params.n}"
        )
    if code.q == 2 and code.n <= 64 and code.size > PAIR_CHECK_WORDS:
        assert_large_binary(code, params.d)
        return
    if code.q > 2 and code.size > PAIR_CHECK_WORDS and _qary_bitmap_cost(code, params.d):
        assert_large_qary(code, params.d)
        return
    assert_min_distance(code, params.d)


# ===================================================================== large codes, linear time
# A binary code of M words is first tested for linearity in O(M k) (rank, then the 2^k
# coordinates of the words on a reduced basis: M = 2^k distinct words in a k-dimensional
# space are the whole space); its distances are then the weights of its words. A nonlinear
# code is checked on a bitmap of all 2^n words: each word marks its radius-r ball
# (r = floor((d-1)/2)), a word found marked twice means two words within 2r; for even d each
# word also probes its radius-(r+1) sphere, which finds two words within 2r + 1. Codes over
# q > 2 letters are checked the same way on a bitmap of the q^n words indexed in base q.

#: Codes up to this many words are checked pair by pair.
PAIR_CHECK_WORDS = 4096
#: Longest binary length checked on a bitmap of 2^n bits (2^32 bits = 512 MiB).
BITMAP_MAX_N = 32


def _ball_masks(n: int, weights: range) -> np.ndarray:
    import itertools

    out = [sum(1 << j for j in c) for w in weights for c in itertools.combinations(range(n), w)]
    return np.array(out, dtype=np.uint64)


#: Largest q^n checked on a bitmap for q > 2 (2^32 bits = 512 MiB).
QARY_BITMAP_MAX_WORDS = 1 << 32


def _rows(tuples, k: int) -> np.ndarray:
    listed = list(tuples)
    return np.array(listed, dtype=np.int64).reshape(len(listed), k)


def digit_patterns(q: int, n: int, weights: range) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The changes of the given weights as CSR patterns ``(ptr, pos, add)``.

    Pattern k adds ``add[t]`` (in ``1..q-1``, mod q) at coordinate ``pos[t]`` for t in
    ``ptr[k]:ptr[k+1]``, in the order of the weights, then of the supports
    (``itertools.combinations``), then of the additions (``itertools.product``); weight 0 is
    the empty change. Built with numpy one weight at a time (a Python loop over the 5.9e6
    patterns of the radius-8 ball in 4^12 took 7 s).
    """
    import itertools

    sizes = [np.zeros(0, dtype=np.int64)]
    pos = [np.zeros(0, dtype=np.int64)]
    add = [np.zeros(0, dtype=np.int64)]
    for k in weights:
        if k > n:
            continue  # no support of that size
        supports = _rows(itertools.combinations(range(n), k), k)
        adds = _rows(itertools.product(range(1, q), repeat=k), k)
        shape = (supports.shape[0], adds.shape[0], k)
        pos.append(np.broadcast_to(supports[:, None, :], shape).reshape(-1))
        add.append(np.broadcast_to(adds[None, :, :], shape).reshape(-1))
        sizes.append(np.full(shape[0] * shape[1], k, dtype=np.int64))
    ptr = np.concatenate([np.zeros(1, dtype=np.int64), np.cumsum(np.concatenate(sizes))])
    return ptr, np.concatenate(pos), np.concatenate(add)


def qary_ball_patterns(q: int, n: int, d: int
                       ) -> tuple[np.ndarray, np.ndarray, np.ndarray, int]:
    """The arguments of the kernel ``qary_ball_clash`` after the words: the patterns of the
    radius-r ball (r = floor((d-1)/2)), then for even d those of the radius-(r+1) sphere, and
    the index of the first sphere pattern."""
    r = max(0, (d - 1) // 2)
    ptr, pos, add = digit_patterns(q, n, range(r + 1))
    probe_from = ptr.size - 1
    if d % 2 == 0:
        p2, pos2, add2 = digit_patterns(q, n, range(r + 1, r + 2))
        ptr = np.concatenate([ptr, p2[1:] + ptr[-1]])
        pos, add = np.concatenate([pos, pos2]), np.concatenate([add, add2])
    return ptr, pos, add, probe_from


def _qary_bitmap_cost(code: Code, d: int) -> tuple[str, int, int] | None:
    q, n, m = code.q, code.n, code.size
    if q**n > QARY_BITMAP_MAX_WORDS:
        return None
    r = max(0, (d - 1) // 2)
    sphere = [math.comb(n, i) * (q - 1) ** i for i in range(r + 2)]
    per = sum(sphere[: r + 1]) + (sphere[r + 1] if d % 2 == 0 else 0)
    ops = m * per * (r + 1) + q**n // 64
    return ("bitmap", ops, q**n // 8) if ops < m * (m - 1) // 2 else None


def assert_large_qary(code: Code, d: int) -> str:
    """Check a code over q > 2 letters at distance ``d`` on a bitmap of the q^n words (each
    word marks its radius-r ball, probes its radius-(r+1) sphere for even d; see the comment
    above :data:`PAIR_CHECK_WORDS`), when that is cheaper than the pairs. Returns the method
    used ("bitmap" or "pairs").

    Raises
    ------
    VerificationError
        When two words are closer than ``d``.
    """
    if code.size < 2 or _qary_bitmap_cost(code, d) is None:
        assert_min_distance(code, d)
        return "pairs"
    q, n = code.q, code.n
    idx = code.words.astype(np.int64) @ (q ** np.arange(n, dtype=np.int64))
    bad = int(_kernels().qary_ball_clash(np.ascontiguousarray(idx), q, n,
                                         *qary_ball_patterns(q, n, d)))
    if bad >= 0:
        raise VerificationError(
            f"row {bad} lies within distance {d - 1} of another row; the code does not have "
            f"minimum distance {d}")
    return "bitmap"


def check_cost(code: Code, d: int) -> tuple[str, int, int]:
    """How :func:`assert_code` will check ``code`` at distance ``d``, before it does.

    Returns ``(method, operations, bytes)``: ``"pairs"`` (M(M-1)/2 distances), ``"linear"``
    (M words reduced on a basis, 2^k flags; falls back to the next method if the code is not
    linear), ``"bitmap"`` (M times the ball and sphere sizes, a 2^n-bit map).
    """
    m, n = code.size, code.n
    pairs = ("pairs", m * (m - 1) // 2, 0)
    if code.q > 2 and m > PAIR_CHECK_WORDS:
        return _qary_bitmap_cost(code, d) or pairs
    if code.q != 2 or n > 64 or m <= PAIR_CHECK_WORDS:
        return pairs
    if m & (m - 1) == 0:
        return ("linear", m * n, m)
    return _bitmap_cost(m, n, d) or pairs


def _bitmap_cost(m: int, n: int, d: int) -> tuple[str, int, int] | None:
    if n > BITMAP_MAX_N:
        return None
    r = max(0, (d - 1) // 2)
    per = sum(math.comb(n, i) for i in range(r + 1)) + (math.comb(n, r + 1) if d % 2 == 0 else 0)
    ops = m * per + (1 << n) // 64
    return ("bitmap", ops, (1 << n) // 8) if ops < m * (m - 1) // 2 else None


def _span(words: np.ndarray, n: int) -> tuple[np.ndarray | None, int]:
    """(basis as a (k, n) uint8 array, least nonzero weight) when the packed binary words are
    exactly a linear space, else (None, least nonzero weight or 65)."""
    m = words.shape[0]
    if m == 0 or m & (m - 1):
        return None, 65
    out = np.zeros(64, dtype=np.uint64)
    rank, distinct, minw = (int(v) for v in _kernels().binary_span_check(words, out))
    if not distinct:
        return None, minw
    bits = (out[:rank, None] >> np.arange(n, dtype=np.uint64)[None, :]) & np.uint64(1)
    return bits.astype(np.uint8), minw


def binary_linear_basis(code: Code) -> np.ndarray | None:
    """A basis of ``code`` as a (k, n) uint8 array when its words are exactly a binary linear
    space (n <= 64), else None. Time linear in the number of words; no distance is checked."""
    if code.q != 2 or code.n > 64:
        return None
    words = np.ascontiguousarray(_kernels().pack_words(code.words, 2)[:, 0])
    return _span(words, code.n)[0]


def assert_large_binary(code: Code, d: int) -> tuple[str, np.ndarray | None]:
    """Check a binary code (n <= 64) at distance ``d`` in time linear in its size when it is
    linear or fits the bitmap (see the comment above), by pairs otherwise.

    Returns
    -------
    (method, basis)
        The method used ("linear", "bitmap" or "pairs") and, when the words are exactly a
        linear space, a basis of it as a (k, n) uint8 array (else None).

    Raises
    ------
    VerificationError
        When two words are closer than ``d``.
    """
    k = _kernels()
    m, n = code.size, code.n
    if m < 2:
        return "pairs", None
    words = np.ascontiguousarray(k.pack_words(code.words, 2)[:, 0])
    basis, minw = _span(words, n)
    if basis is not None:
        if minw < d:
            raise VerificationError(
                f"linear code of dimension {basis.shape[0]} has a word of weight {minw} < d={d}")
        return "linear", basis
    if _bitmap_cost(m, n, d) is None:
        assert_min_distance(code, d)
        return "pairs", None
    r = max(0, (d - 1) // 2)
    probe = _ball_masks(n, range(r + 1, r + 2)) if d % 2 == 0 else np.zeros(0, np.uint64)
    bad = int(k.binary_ball_clash(words, n, _ball_masks(n, range(r + 1)), probe))
    if bad >= 0:
        raise VerificationError(
            f"row {bad} lies within distance {d - 1} of another row; the code does not have "
            f"minimum distance {d}")
    return "bitmap", None


# ===================================================================== large binary codes
# Two words at distance <= 2r share a word at distance <= r from both, so a binary code has
# minimum distance >= 2r + 1 iff its radius-r balls are pairwise disjoint; if moreover all its
# words have the same weight parity every distance is even, and the bound rises to 2r + 2.
# Listing M * V(n, r) ball words and sorting them is far cheaper than M^2/2 pair distances
# when r is small.


def ball_check_cost(code: Code, d: int) -> int | None:
    """Number of ball words :func:`assert_code_by_balls` would list, or None if it does not
    apply (q != 2, n > 64, or d even with words of both weight parities)."""
    if code.q != 2 or code.n > 64 or d < 2:
        return None
    r = (d - 1) // 2
    if d % 2 == 0:
        par = code.words.sum(axis=1) % 2
        if par.size and par.min() != par.max():
            return None
    return code.size * sum(math.comb(code.n, i) for i in range(r + 1))


def assert_code_by_balls(code: Code, params: Params) -> None:
    """Raise :class:`VerificationError` unless ``code`` is a binary code of the cell, checked by
    disjoint radius-r balls (see the comment above); falls back to :func:`assert_code`."""
    import itertools

    if code.q != params.q or code.n != params.n:
        raise VerificationError(
            f"code has q={code.q}, n={code.n}; the cell needs q={params.q}, n={params.n}")
    if ball_check_cost(code, params.d) is None:
        assert_code(code, params)
        return
    n, r = code.n, (params.d - 1) // 2
    weights = (np.uint64(1) << np.arange(n, dtype=np.uint64))
    packed = (code.words.astype(np.uint64) * weights).sum(axis=1, dtype=np.uint64)
    masks = [0]
    for i in range(1, r + 1):
        masks.extend(sum(1 << j for j in c) for c in itertools.combinations(range(n), i))
    ball = (packed[:, None] ^ np.array(masks, dtype=np.uint64)[None, :]).ravel()
    ball.sort()
    clash = np.nonzero(ball[1:] == ball[:-1])[0]
    if clash.size:
        raise VerificationError(
            f"two codewords lie within distance {2 * r} (balls of radius {r} meet); "
            f"the code does not have minimum distance {params.d}")
