"""Checks of linear codes given by a generator matrix over GF(p), p prime.

:func:`check_generator` lists all ``p^k`` codewords for the weight distribution (Gray code for
p = 2, an odometer otherwise) up to :data:`ENUMERATION_LIMIT` of them; beyond that
:func:`linear_min_distance` finds the minimum distance alone by information sets.

References
----------
The information-set method of Brouwer and Zimmermann, as described in A. Betten et al.,
*Error-Correcting Linear Codes*, Springer 2006, ch. 1 (from memory).
"""

from __future__ import annotations

import numpy as np

from typing import Any

from codesearch.errors import InputError, VerificationError
from codesearch.model import Params
from codesearch.verify.codes import CodeReport, _kernels, is_prime

__all__ = ["check_generator", "linear_min_distance", "information_set_forms",
           "ENUMERATION_LIMIT", "check_additive_generator", "assert_linear_code"]


def check_generator(rows: np.ndarray, q: int, d: int | None = None,
                    method: str = "auto") -> CodeReport:
    """Check the linear code spanned by the rows of a generator matrix over GF(q), q prime.

    The rows are first reduced to a basis (dependent rows are dropped). ``method``:
    ``"enumerate"`` lists all q^k codewords (Gray code for q = 2, an odometer otherwise) for
    the weight distribution; ``"information-sets"`` finds the minimum distance alone
    (:func:`linear_min_distance`; the distributions are then None); ``"auto"`` enumerates up
    to :data:`ENUMERATION_LIMIT` codewords and uses information sets beyond.
    """
    if not is_prime(q):
        raise InputError(f"generator matrices need a prime q, got q={q}")
    if method not in ("auto", "enumerate", "information-sets"):
        raise InputError(f"unknown method {method!r} (auto, enumerate, information-sets)")
    rows = np.ascontiguousarray(rows, dtype=np.uint8)
    k_all, n = rows.shape
    basis = _row_basis(rows, q)
    k = basis.shape[0]
    m = q**k
    if method == "information-sets" or (method == "auto" and m > ENUMERATION_LIMIT):
        mind = linear_min_distance(basis, q, claimed=d) if k else None
        return CodeReport(
            n=n, q=q, size=m, min_distance=mind, distance_distribution=None, duplicates=0,
            linear=True, dimension=k, weight_distribution=None, claimed_d=d,
            valid=d is None or mind is None or mind >= d, offending=None,
            method="information-sets",
        )
    if m > 1 << 40:
        raise InputError(f"{q}^{k} codewords are too many to enumerate (dimension {k})")
    kern = _kernels()
    if q == 2:
        weights = kern.gray_weight_distribution_binary(kern.pack_words(basis, 2), n)
    else:
        weights = kern.odometer_weight_distribution(basis.astype(np.int64), q)
    dist = [0] + [int(m * int(a) // 2) for a in weights[1:]]
    mind = next((i for i, c in enumerate(dist) if c), None) if m >= 2 else None
    valid = d is None or mind is None or mind >= d
    return CodeReport(
        n=n, q=q, size=m, min_distance=mind, distance_distribution=dist, duplicates=0,
        linear=True, dimension=k, weight_distribution=[int(v) for v in weights],
        claimed_d=d, valid=valid, offending=None, method="generator",
    )


#: Largest number of codewords :func:`check_generator` lists one by one (``method="auto"``);
#: beyond it only the minimum distance is computed, by information sets.
ENUMERATION_LIMIT = 1 << 32


def _reduce_on(basis: np.ndarray, q: int, columns: list[int]) -> tuple[np.ndarray, list[int]]:
    """Row-reduce ``basis`` over GF(q) taking pivots among ``columns`` in order.

    Returns the reduced matrix and its pivot columns: row i < r has a unit at pivot i, and
    rows r..k-1 are zero on every one of ``columns`` (r = their rank).
    """
    k = basis.shape[0]
    m = basis.astype(np.int64) % q
    pivots: list[int] = []
    for col in columns:
        r0 = len(pivots)
        nz = np.nonzero(m[r0:, col])[0]
        if nz.size == 0:
            continue
        r = r0 + int(nz[0])
        m[[r0, r]] = m[[r, r0]]
        m[r0] = (m[r0] * pow(int(m[r0, col]), q - 2, q)) % q
        for other in range(k):
            if other != r0 and m[other, col]:
                m[other] = (m[other] - m[other, col] * m[r0]) % q
        pivots.append(col)
        if len(pivots) == k:
            break
    return np.ascontiguousarray(m), pivots


def information_set_forms(basis: np.ndarray, q: int, tries: int = 16,
                          seed: int = 0) -> list[tuple[np.ndarray, int, list[int]]]:
    """Generator matrices of one code, each reduced on its own set of columns.

    ``basis`` (k x n, rank k over GF(q), q prime). Returns ``(form, rank, pivots)``: row
    i < rank of ``form`` has a unit in column ``pivots[i]``; the pivot sets are pairwise
    disjoint; a form of rank k is systematic on an information set, and the
    last form may have rank r < k on the columns left over (its rows r..k-1 vanish there).
    Columns are taken in the given order and then in ``tries - 1`` seeded random orders; the
    order giving most full-rank sets (then the largest leftover rank) wins.
    """
    k, n = basis.shape
    rng = np.random.default_rng(seed)
    best: list[tuple[np.ndarray, int, list[int]]] = []
    best_key = (-1, -1)
    for attempt in range(max(1, tries)):
        left = list(range(n)) if attempt == 0 else [int(c) for c in rng.permutation(n)]
        forms: list[tuple[np.ndarray, int, list[int]]] = []
        while left:
            form, pivots = _reduce_on(basis, q, left)
            if not pivots:
                break
            forms.append((form, len(pivots), pivots))
            if len(pivots) < k:
                break
            used = set(pivots)
            left = [c for c in left if c not in used]
        full = sum(1 for _, r, _ in forms if r == k)
        key = (full, forms[-1][1] if forms and forms[-1][1] < k else 0)
        if key > best_key:
            best, best_key = forms, key
    return best


def linear_min_distance(basis: np.ndarray, q: int, claimed: int | None = None) -> int:
    """Minimum distance of the linear code spanned by ``basis`` (rank k), by information sets.

    Take forms G_1..G_m of the code reduced on disjoint column sets I_j, G_j of rank
    r_j = k - e_j there (:func:`information_set_forms`). A codeword whose coefficient vector
    in the rows of G_j has t nonzero entries has weight at least t - e_j on I_j (the unit
    columns read off r_j of its coefficients). Level w lists, for each form, every
    combination of w rows. A codeword not met by the time form j finished level w thus
    weighs at least sum_{i<=j} max(0, w + 1 - e_i) + sum_{i>j} max(0, w - e_i); once that
    reaches the least weight seen, the least weight seen is the minimum distance. With
    ``claimed``, stops as soon as a word lighter than ``claimed`` is seen (the claim fails;
    the value returned is then only an upper bound on the minimum distance).

    References
    ----------
    The information-set method of Brouwer and Zimmermann, as described in A. Betten et al.,
    *Error-Correcting Linear Codes*, Springer 2006, ch. 1 (from memory).
    """
    kern = _kernels()
    basis = np.ascontiguousarray(basis, dtype=np.uint8)
    k, n = basis.shape
    if k == 0:
        return 0
    forms = information_set_forms(basis, q)
    deficit = [k - r for _, r, _ in forms]
    if q == 2:
        packed = [kern.pack_words(f.astype(np.uint8), 2) for f, _, _ in forms]

        def level(j: int, w: int, best: int) -> int:
            return int(kern.least_weight_of_row_sums_binary(packed[j], w, best))
    else:
        def level(j: int, w: int, best: int) -> int:
            return int(kern.least_weight_of_row_sums_prime(forms[j][0], q, w, best))
    best = n
    for w in range(1, k + 1):
        for j in range(len(forms)):
            best = level(j, w, best)
            if claimed is not None and best < claimed:
                return best
            floor = sum(max(0, w + 1 - e) for e in deficit[: j + 1])
            floor += sum(max(0, w - e) for e in deficit[j + 1:])
            if floor >= best:
                return best
    return best  # level k of the first (full-rank) form listed every nonzero codeword


def _row_basis(rows: np.ndarray, q: int) -> np.ndarray:
    """Rows of ``rows`` forming a basis of their span (greedy, in order)."""
    kern = _kernels()
    keep: list[int] = []
    for i in range(rows.shape[0]):
        trial = np.ascontiguousarray(rows[keep + [i]])
        if kern.gf_rank(trial, q, len(keep) + 1) == len(keep) + 1:
            keep.append(i)
    return np.ascontiguousarray(rows[keep]).reshape(len(keep), rows.shape[1])


# ===================================================================== linear codes, any field
# A code that is linear over GF(p^m) is in particular a group under the digit-wise addition of
# its symbols (codesearch.gf's convention), so its distances are the weights of its words. The
# check below enumerates the GF(p)-span of the rows it is given; it needs no field
# multiplication, so it does not rely on the field tables the producer used.


def check_additive_generator(rows: np.ndarray, q: int, d: int | None = None,
                             max_words: int = 1 << 24) -> CodeReport:
    """Check the code spanned over GF(p) by ``rows`` under digit-wise addition, q = p^m.

    The symbols of q = p^m are read as m base-p digits; the span is an additive group, so its
    distance distribution is its weight distribution. Its size is p^r with r the GF(p) rank of
    the rows written out digit by digit.

    Raises
    ------
    InputError
        When q is not a prime power or the span has more than ``max_words`` words.
    """
    p = next((f for f in range(2, q + 1) if q % f == 0), q)
    m, rest = 0, q
    while rest % p == 0:
        rest //= p
        m += 1
    if rest != 1:
        raise InputError(f"q={q} is not a prime power")
    rows = np.ascontiguousarray(rows, dtype=np.uint8)
    r_all, n = rows.shape
    digits = np.concatenate([(rows.astype(np.int64) // p**j) % p for j in range(m)], axis=1)
    rank = int(_kernels().gf_rank(np.ascontiguousarray(digits, dtype=np.uint8), p, r_all)) \
        if r_all else 0
    size = p**rank
    if size > max_words:
        raise InputError(f"{size} codewords are too many to enumerate (cap {max_words})")
    # digit-wise addition table of the group (Z_p)^m
    xs = np.arange(q)
    add = np.zeros((q, q), dtype=np.int64)
    for j in range(m):
        dx = (xs // p**j) % p
        add += ((dx[:, None] + dx[None, :]) % p) * p**j
    add = add.astype(np.uint8)
    words = np.zeros((1, n), dtype=np.uint8)
    basis = digits[:0]
    for i in range(r_all):
        trial = np.ascontiguousarray(np.vstack([basis, digits[i:i + 1]]), dtype=np.uint8)
        if int(_kernels().gf_rank(trial, p, trial.shape[0])) == trial.shape[0]:
            basis = trial
            mult = [np.zeros(n, dtype=np.uint8), rows[i]]
            for _ in range(p - 2):
                mult.append(add[mult[-1], rows[i]])
            words = np.vstack([add[words, c[None, :]] for c in mult])
    weights = np.bincount((words != 0).sum(axis=1), minlength=n + 1).astype(np.int64)
    dist = [0] + [int(size * int(a) // 2) for a in weights[1:]]
    mind = next((i for i, c in enumerate(dist) if c), None) if size >= 2 else None
    return CodeReport(
        n=n, q=q, size=size, min_distance=mind, distance_distribution=dist, duplicates=0,
        linear=None, dimension=None, weight_distribution=[int(v) for v in weights],
        claimed_d=d, valid=d is None or mind is None or mind >= d, offending=None,
        method="additive-span",
    )


def assert_linear_code(code: Any, params: Params, enumerate_up_to: int = 1 << 22) -> CodeReport:
    """Raise :class:`VerificationError` unless the :class:`~codesearch.model.LinearCode`
    ``code`` has q^k words of length n and minimum distance at least ``params.d``.

    Prime q goes through :func:`check_generator` (information sets beyond
    ``enumerate_up_to`` words, the minimum distance alone beyond); q = p^m through
    :func:`check_additive_generator` on the rows the code lists its words from
    (:meth:`~codesearch.model.LinearCode.additive_basis`).
    """
    from codesearch.model import LinearCode

    if not isinstance(code, LinearCode):
        raise VerificationError(f"expected a LinearCode, got {type(code).__name__}")
    if code.q != params.q or code.n != params.n:
        raise VerificationError(
            f"code has q={code.q}, n={code.n}; the cell needs q={params.q}, n={params.n}")
    if is_prime(code.q):
        method = "enumerate" if code.size <= enumerate_up_to else "information-sets"
        report = check_generator(code.generator, code.q, params.d, method=method)
    else:
        report = check_additive_generator(code.additive_basis(), code.q, params.d)
    if report.size != code.size:
        raise VerificationError(f"the generator spans {report.size} words, not {code.size}")
    if code.k and not report.valid:
        raise VerificationError(
            f"minimum distance {report.min_distance} < d={params.d} ({code!r})")
    return report
