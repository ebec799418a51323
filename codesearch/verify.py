"""Independent checks of codes and of bound certificates.

This module is the project's referee: every code a search returns, a file holds or the store
keeps passes through :func:`assert_code`, and every computed bound's certificate through
:func:`check_certificate`. It is kept small and separate from the searchers: it shares with
them only the packed distance kernel of :mod:`codesearch._kernels` (itself tested against the
definition in :mod:`codesearch._reference`). Certificates are checked with Python integers and
:class:`fractions.Fraction` only.

Codes
-----
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

import json
import math
from dataclasses import dataclass, field
from fractions import Fraction
from functools import lru_cache
from typing import Any, Callable, Mapping

import numpy as np

from codesearch.errors import InputError, VerificationError
from codesearch.model import Code, Params

__all__ = [
    "CodeReport",
    "check_code",
    "check_generator",
    "linear_min_distance",
    "information_set_forms",
    "assert_code",
    "assert_min_distance",
    "min_distance",
    "distance_distribution",
    "first_close_pair",
    "is_prime",
    "check_certificate",
    "CERTIFICATE_CHECKERS",
    "parse_fraction",
    "prepare",
    "load_certificate",
]


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
    """Raise :class:`VerificationError` unless ``code`` is a code of the cell ``params``."""
    if not isinstance(code, Code):
        raise VerificationError(f"expected a Code, got {type(code).__name__}")
    if code.q != params.q or code.n != params.n:
        raise VerificationError(
            f"code has q={code.q}, n={code.n}; the cell needs q={params.q}, n={params.n}"
        )
    assert_min_distance(code, params.d)


# ============================================================================ certificates


def parse_fraction(text: Any) -> Fraction:
    """Parse ``"p/q"`` or an integer (string or int) into a Fraction; floats are refused."""
    if isinstance(text, bool) or isinstance(text, float):
        raise ValueError(f"expected an exact rational, got {text!r}")
    if isinstance(text, int):
        return Fraction(text)
    if not isinstance(text, str):
        raise ValueError(f"expected a string 'p/q', got {type(text).__name__}")
    if any(c in text for c in ".eE"):
        raise ValueError(f"expected an exact rational 'p/q', got {text!r}")
    return Fraction(text)


#: Certificate kind -> checker ``f(cert) -> (valid, bound, reason)``. Checkers use exact
#: arithmetic only and rebuild every coefficient themselves from (q, n, d).
CERTIFICATE_CHECKERS: dict[str, Callable[[Mapping[str, Any]], tuple[bool, int | None, str]]] = {}


def check_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a bound certificate with exact arithmetic.

    Returns
    -------
    (valid, bound, reason)
        ``bound`` is the integer upper bound the certificate proves when valid.

    Raises
    ------
    InputError
        When the certificate is malformed (unknown kind, missing or non-exact fields).
    """
    if not isinstance(cert, Mapping):
        raise InputError("certificate must be a JSON object")
    kind = cert.get("kind")
    checker = CERTIFICATE_CHECKERS.get(kind)  # type: ignore[arg-type]
    if checker is None:
        known = ", ".join(sorted(CERTIFICATE_CHECKERS)) or "none"
        raise InputError(f"unknown certificate kind {kind!r} (known: {known})")
    try:
        return checker(cert)
    except (KeyError, TypeError, ValueError, ZeroDivisionError) as exc:
        raise InputError(f"malformed {kind} certificate: {exc}") from None


def load_json_file(path: str) -> Any:
    """Read a JSON file with one-line errors."""
    from codesearch.codefile import _decode, _read_bytes

    text = _decode(_read_bytes(path), path)
    try:
        return json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"{path}:{exc.lineno}: invalid JSON: {exc.msg}") from None


# ======================================================================= delsarte-lp certificates
# Written apart from codesearch.bounds (no shared code): Krawtchouk values come from the
# generating function prod (1 + (q-1) z)^(n-x) (1 - z)^x, binomials from math.comb, and every
# comparison is between Python integers after clearing one common denominator.


@lru_cache(maxsize=64)
def _kraw_columns(q: int, n: int) -> tuple[tuple[int, ...], ...]:
    """``T[x][k] = K_k(x)`` from the generating function, recursively in x.

    Multiplying ``G_x(z) = sum_k K_k(x) z^k`` by ``(1 - z) / (1 + (q-1) z)`` gives
    ``G_{x+1}``, i.e. ``K_k(x+1) = K_k(x) - K_{k-1}(x) - (q-1) K_{k-1}(x+1)``.
    """
    from math import comb

    cur = [comb(n, k) * (q - 1) ** k for k in range(n + 1)]
    table = [tuple(cur)]
    for _ in range(n):
        nxt = [0] * (n + 1)
        nxt[0] = cur[0]
        for k in range(1, n + 1):
            nxt[k] = cur[k] - cur[k - 1] - (q - 1) * nxt[k - 1]
        table.append(tuple(nxt))
        cur = nxt
    return tuple(table)


@lru_cache(maxsize=None)
def _cw_cap(n: int, delta: int, w: int) -> int:
    """Upper bound on binary constant-weight codes A(n, 2 delta, w).

    Johnson: A(n, 2δ, w) <= floor(n/w * A(n-1, 2δ, w-1)); complements: weight w and n-w give
    the same codes; a single word when w < δ (two weight-w words are within 2w < 2δ).
    """
    if w > n or w < 0:
        return 0
    if n - w < w:
        w = n - w
    if w < delta:
        return 1
    return n * _cw_cap(n - 1, delta, w - 1) // w


def _extra_row(family: str, index: int, n: int, d: int) -> tuple[dict[int, int], int]:
    """Rebuild one extra inequality ``sum_i a_i A_i <= b`` for binary (n, d)."""
    from math import comb

    if family == "constant-weight":
        if not d <= index <= n:
            raise InputError(f"certificate: constant-weight index {index} outside {d}..{n}")
        return {index: 1}, min(_cw_cap(n, (d + 1) // 2, index), comb(n, index))
    if family == "antipodal-ball":
        r = (d - 1) // 2
        return {i: 1 for i in range(n - r, n + 1)}, 1
    if family == "antipodal-shell":
        if d % 2:
            raise InputError("certificate: antipodal-shell needs even d")
        s = d // 2
        per = n // s
        row = {n - s: 1}
        row.update({i: per for i in range(n - s + 1, n + 1)})
        return row, per
    raise InputError(f"certificate: unknown extra family {family!r}")


def _parse_fraction(text: Any, what: str) -> Fraction:
    """Parse ``"p/q"`` or ``"p"`` (decimal integers, q > 0) exactly."""
    if not isinstance(text, str):
        raise InputError(f"certificate: {what} must be a string 'p/q', got {text!r}")
    num, _, den = text.partition("/")
    try:
        p = int(num)
        q = int(den) if den else 1
    except ValueError:
        raise InputError(f"certificate: {what} is not a rational 'p/q': {text!r}") from None
    if q <= 0:
        raise InputError(f"certificate: {what} needs a positive denominator: {text!r}")
    return Fraction(p, q)


def _lp_certificate_head(cert: Mapping[str, Any], more: tuple[str, ...]
                         ) -> tuple[int, int, int, list[Fraction], Fraction]:
    """Parse the part every LP certificate shares: ``(q, n, d, y, bound)``.

    Raises :class:`InputError` for a missing key (``q n d y bound`` and ``more``), non-integer
    or out-of-range parameters, or a ``y`` that is not a list of n rationals.
    """
    for key in ("q", "n", "d", *more, "y", "bound"):
        if key not in cert:
            raise InputError(f"certificate: missing key {key!r}")
    q, n, d = cert["q"], cert["n"], cert["d"]
    for name, v in (("q", q), ("n", n), ("d", d)):
        if isinstance(v, bool) or not isinstance(v, int):
            raise InputError(f"certificate: {name} must be an integer")
    if not (2 <= q <= 1 << 16 and 1 <= d <= n <= 4096):
        raise InputError(f"certificate: parameters q={q}, n={n}, d={d} out of range")
    ys = cert["y"]
    if not isinstance(ys, list) or len(ys) != n:
        raise InputError(f"certificate: y must be a list of n={n} rationals")
    y = [_parse_fraction(t, f"y[{k + 1}]") for k, t in enumerate(ys)]
    return q, n, d, y, _parse_fraction(cert["bound"], "bound")


def _check_delsarte_lp(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp`` certificate: y >= 0 (and z >= 0) with, for every allowed i >= d,
    ``sum_k y_k K_k(i) - sum_j z_j a_ji <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) +
    sum_j z_j b_j``. Integer arithmetic only (one common denominator)."""
    from math import lcm

    q, n, d, y, claimed = _lp_certificate_head(cert, ("even",))
    even = cert["even"]
    if not isinstance(even, bool):
        raise InputError("certificate: even must be true or false")
    extras_in = cert.get("extra", [])
    if not isinstance(extras_in, list):
        raise InputError("certificate: extra must be a list")
    if even and (q != 2 or d % 2):
        return False, None, "even-distance restriction is only valid for q = 2 and even d"
    if extras_in and q != 2:
        return False, None, "extra inequalities are only defined for q = 2"
    rows: list[tuple[dict[int, int], int, Fraction]] = []
    for j, e in enumerate(extras_in):
        if not isinstance(e, Mapping) or not {"family", "index", "z"} <= set(e):
            raise InputError(f"certificate: extra[{j}] needs family, index, z")
        if isinstance(e["index"], bool) or not isinstance(e["index"], int):
            raise InputError(f"certificate: extra[{j}].index must be an integer")
        coeffs, rhs = _extra_row(str(e["family"]), e["index"], n, d)
        rows.append((coeffs, rhs, _parse_fraction(e["z"], f"extra[{j}].z")))
    if any(v < 0 for v in y) or any(z < 0 for (_, _, z) in rows):
        return False, None, "a dual multiplier is negative"
    L = lcm(*(v.denominator for v in y), *(z.denominator for (_, _, z) in rows))
    Y = [v.numerator * (L // v.denominator) for v in y]
    Z = [z.numerator * (L // z.denominator) for (_, _, z) in rows]
    T = _kraw_columns(q, n)
    for i in range(d, n + 1):
        if even and i % 2:
            continue
        Ti = T[i]
        total = sum(Y[k - 1] * Ti[k] for k in range(1, n + 1) if Y[k - 1])
        total -= sum(Zj * coeffs.get(i, 0) for Zj, (coeffs, _, _) in zip(Z, rows))
        if total > -L:
            return False, None, f"dual constraint fails at distance i={i}"
    value = Fraction(L + sum(Y[k - 1] * T[0][k] for k in range(1, n + 1))
                     + sum(Zj * rhs for Zj, (_, rhs, _) in zip(Z, rows)), L)
    if value != claimed:
        return False, None, f"bound is {value}, certificate claims {claimed}"
    bound = value.numerator // value.denominator
    return True, bound, f"A_{q}({n},{d}) <= {bound}" + (" (even distances)" if even else "")


def load_certificate(path: str) -> dict[str, Any] | None:
    """The JSON object in ``path`` if it looks like a certificate (has ``kind``), else None.

    Lets ``codesearch check FILE`` recognise a certificate by content, not by name. Only the
    first bytes are read unless the file starts like JSON.
    """
    from codesearch.codefile import _read_head

    if not _read_head(path).lstrip().startswith(b"{"):
        return None
    obj = load_json_file(path)
    return obj if isinstance(obj, dict) and "kind" in obj else None


CERTIFICATE_CHECKERS["delsarte-lp"] = _check_delsarte_lp
# ===================================================================== three-point-sdp
# Schrijver's three-point semidefinite bound (A. Schrijver, IEEE Trans. Inform. Theory 51
# (2005) 2859-2866), re-checked from the certificate alone. This path rebuilds every
# coefficient itself (block coefficients beta, which variables vanish, the linear rows, the
# caps on the variables) and shares no code with codesearch.bounds.sdp / terwilliger.
#
# The inequality checked: for every binary code C of length n, minimum distance d (all
# distances even when "even"), with x[i,j,t] its three-point frequencies,
#   |C| = 1 + sum_i C(n,i) x[i,0,0]
#       <= 1 + sum <Z, B(x)> + sum mu (rhs - row(x)) + sum_i C(n,i) x[i,0,0]
#        = 1 + const + sum_tri r_tri x_tri  <=  1 + const + sum_tri max(r_tri, 0) cap_tri,
# because every Z is PSD, B(x) is PSD for codes (Schrijver's theorem), mu >= 0, rows hold
# for codes, and 0 <= x_tri <= cap_tri.


def _tp_binom(a: int, b: int) -> int:
    return math.comb(a, b) if 0 <= b <= a else 0


def _tp_beta(n: int, i: int, j: int, k: int, t: int) -> int:
    # beta^t_{i,j,k} = sum_u (-1)^(u-t) C(u,t) C(n-2k,u-k) C(n-k-u,i-u) C(n-k-u,j-u)
    total = 0
    for u in range(t, min(i, j) + 1):
        total += (-1) ** (u - t) * _tp_binom(u, t) * _tp_binom(n - 2 * k, u - k) * _tp_binom(
            n - k - u, i - u
        ) * _tp_binom(n - k - u, j - u)
    return total


def _tp_johnson(n: int, half: int, w: int, memo: dict) -> int:
    # Johnson's bounds for constant-weight codes with distance 2*half (MacWilliams-Sloane
    # ch. 17): A(n,2e,w) <= floor(n/w A(n-1,2e,w-1)), <= floor(n/(n-w) A(n-1,2e,w)),
    # = 1 when min(w, n-w) < e, <= C(n,w).
    key = (n, w)
    if key in memo:
        return memo[key]
    if min(w, n - w) < half:
        val = 1
    else:
        val = _tp_binom(n, w)
        if w > 0:
            val = min(val, n * _tp_johnson(n - 1, half, w - 1, memo) // w)
        if n - w > 0:
            val = min(val, n * _tp_johnson(n - 1, half, w, memo) // (n - w))
    memo[key] = val
    return val


def _tp_positive_definite_int(mat: list[list[int]]) -> bool:
    """Sylvester's criterion with Bareiss's fraction-free elimination: True iff every
    leading principal minor of the symmetric integer matrix is positive (exact division)."""
    a = [row[:] for row in mat]
    m = len(a)
    prev = 1
    for k in range(m):
        piv = a[k][k]  # the leading principal minor of order k + 1
        if piv <= 0:
            return False
        for i in range(k + 1, m):
            aik = a[i][k]
            row_i, row_k = a[i], a[k]
            for j in range(k + 1, m):
                row_i[j] = (row_i[j] * piv - aik * row_k[j]) // prev
        prev = piv
    return True


def _tp_psd(mat: list[list[Fraction]]) -> bool:
    """Exact test that a symmetric rational matrix is positive semidefinite.

    Fast path: scaled to integers, positive definite by Sylvester/Bareiss. Otherwise an
    exact LDL^T in rationals that allows zero pivots with zero rows.
    """
    den = 1
    for row in mat:
        for z in row:
            den = den * z.denominator // math.gcd(den, z.denominator)
    if _tp_positive_definite_int([[z.numerator * (den // z.denominator) for z in row]
                                  for row in mat]):
        return True
    a = [row[:] for row in mat]
    m = len(a)
    for p in range(m):
        piv = a[p][p]
        if piv < 0:
            return False
        if piv == 0:
            # a PSD matrix with a zero diagonal entry has a zero row there
            if any(a[p][s] != 0 for s in range(p + 1, m)):
                return False
            continue
        for r in range(p + 1, m):
            f = a[r][p] / piv
            if f:
                for s in range(p + 1, m):
                    a[r][s] -= f * a[p][s]
    return True


def check_three_point_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a ``"three-point-sdp"`` certificate in exact arithmetic.

    The certificate holds the cell (``q, n, d``), the program's cell (``sdp_n, sdp_d``: the
    same, or ``n+1, d+1`` for odd ``d`` since ``A(n,d) = A(n+1,d+1)``), ``even`` (only even
    distances, allowed for even ``sdp_d``), dual ``blocks`` (``family`` 0 or 1, ``k``, row
    ``weights``, a symmetric ``matrix`` of ``"p/q"`` strings), ``multipliers`` (``row``
    label and ``"p/q"`` value) and the claimed integer ``value``.

    Returns
    -------
    (valid, bound, reason)
    """
    import math

    if int(cert["q"]) != 2:
        return False, None, "three-point certificates are for binary codes"
    n0, d0 = int(cert["n"]), int(cert["d"])
    n, d = int(cert["sdp_n"]), int(cert["sdp_d"])
    even = bool(cert["even"])
    claimed = int(cert["value"])
    if not 1 <= d0 <= n0:
        return False, None, f"bad cell n={n0}, d={d0}"
    if (n, d) != (n0, d0) and not (d0 % 2 == 1 and (n, d) == (n0 + 1, d0 + 1)):
        return False, None, f"program cell ({n},{d}) does not bound A({n0},{d0})"
    if even and d % 2:
        return False, None, "the even-distance restriction needs even d"

    def tri(i: int, j: int, t: int) -> tuple[int, int, int] | None:
        """Sorted triangle of x[i,j,t]; None when the variable is zero for these codes."""
        sides = sorted((i, j, i + j - 2 * t), reverse=True)
        if any(0 < s < d or (even and s % 2) for s in sides):
            return None
        return (sides[0], sides[1], sides[2])

    def ok_index(i: int, j: int, t: int) -> bool:
        return 0 <= t <= min(i, j) and i + j - t <= n

    const = Fraction(1)  # the term x[0,0,0] = 1 of |C|
    coef: dict[tuple[int, int, int], Fraction] = {}

    def add(triangle: tuple[int, int, int] | None, value: Fraction) -> None:
        nonlocal const
        if triangle is None or not value:
            return
        if triangle == (0, 0, 0):
            const += value
        else:
            coef[triangle] = coef.get(triangle, Fraction(0)) + value

    for i in range(1, n + 1):
        add(tri(i, 0, 0), Fraction(_tp_binom(n, i)))

    seen = set()
    beta_memo: dict = {}
    for block in cert["blocks"]:
        family, k = int(block["family"]), int(block["k"])
        weights = [int(w) for w in block["weights"]]
        if family not in (0, 1) or not 0 <= k <= n // 2 or (family, k) in seen:
            return False, None, f"bad block family={family}, k={k}"
        seen.add((family, k))
        if len(set(weights)) != len(weights) or any(not k <= w <= n - k for w in weights):
            return False, None, f"bad weights in block family={family}, k={k}"
        mat = [[parse_fraction(v) for v in row] for row in block["matrix"]]
        m = len(weights)
        if len(mat) != m or any(len(row) != m for row in mat):
            return False, None, f"block family={family}, k={k} is not {m}x{m}"
        if any(mat[r][s] != mat[s][r] for r in range(m) for s in range(r)):
            return False, None, f"block family={family}, k={k} is not symmetric"
        if not _tp_psd(mat):
            return False, None, f"block family={family}, k={k} is not positive semidefinite"
        # <Z, B(x)> in integers over the block's common denominator, then one Fraction per
        # triangle
        den = 1
        for row in mat:
            for z in row:
                den = den * z.denominator // math.gcd(den, z.denominator)
        acc: dict = {}

        def put(triangle, value):
            if triangle is not None:
                acc[triangle] = acc.get(triangle, 0) + value

        for r, i in enumerate(weights):
            for s, j in enumerate(weights):
                z = mat[r][s]
                if not z:
                    continue
                zi = z.numerator * (den // z.denominator)
                for t in range(min(i, j) + 1):
                    if i + j - t > n:
                        continue
                    key = (i, j, k, t)
                    b = beta_memo.get(key)
                    if b is None:
                        b = beta_memo[key] = _tp_beta(n, i, j, k, t)
                    if not b:
                        continue
                    if family == 0:
                        put(tri(i, j, t), zi * b)
                    else:
                        put(tri(i + j - 2 * t, 0, 0), zi * b)
                        put(tri(i, j, t), -zi * b)
        for triangle, value in acc.items():
            add(triangle, Fraction(value, den))

    johnson_memo: dict = {}
    for mult in cert["multipliers"]:
        label = list(mult["row"])
        mu = parse_fraction(mult["value"])
        if mu < 0:
            return False, None, f"negative multiplier on row {label}"
        if label[0] in ("upper", "pair"):
            i, j, t = (int(v) for v in label[1:4])
            if not ok_index(i, j, t):
                return False, None, f"bad row {label}"
            if label[0] == "upper":  # x[i,j,t] - x[i,0,0] <= 0
                add(tri(i, j, t), -mu)
                add(tri(i, 0, 0), mu)
            else:  # x[i,0,0] + x[j,0,0] - x[i,j,t] <= 1
                const += mu
                add(tri(i, 0, 0), -mu)
                add(tri(j, 0, 0), -mu)
                add(tri(i, j, t), mu)
        elif label[0] == "weight":  # C(n,i) x[i,0,0] <= A(n,d,i) (Johnson)
            i = int(label[1])
            if not 1 <= i <= n:
                return False, None, f"bad row {label}"
            const += mu * _tp_johnson(n, (d + 1) // 2, i, johnson_memo)
            add(tri(i, 0, 0), -mu * _tp_binom(n, i))
        elif label[0] == "delsarte":  # -sum_i C(n,i) K_k(i) x[i,0,0] <= 0
            k = int(label[1])
            if not 0 <= k <= n:
                return False, None, f"bad row {label}"
            for i in range(n + 1):
                kraw = sum(
                    (-1) ** s * _tp_binom(i, s) * _tp_binom(n - i, k - s) for s in range(k + 1)
                )
                add(tri(i, 0, 0), mu * _tp_binom(n, i) * kraw)
        else:
            return False, None, f"unknown row {label}"

    half = (d + 1) // 2
    for (a, b, c), r in coef.items():
        if r <= 0:
            continue
        caps = sorted(1 if s == 0 else _tp_johnson(n, half, s, johnson_memo) for s in (a, b, c))
        p = (a + b + c) // 2
        shapes = math.factorial(n) // (
            math.factorial(p - a) * math.factorial(p - b) * math.factorial(p - c)
            * math.factorial(n - p)
        )
        const += r * min(Fraction(1), Fraction(caps[0] * caps[1], shapes))
    proven = math.floor(const)
    if claimed < proven:
        return False, None, f"claimed {claimed} but the certificate proves only {proven}"
    reason = f"three-point SDP bound A({n0},{d0}) <= {proven} (exact {float(const):.6f})"
    return True, claimed, reason


CERTIFICATE_CHECKERS["three-point-sdp"] = check_three_point_certificate
# ===================================================================== delsarte-lp-qcw
# Delsarte's LP for q-ary codes with the constant-weight inequalities A_i <= B_q(n, d, i)
# (see codesearch.bounds.delsarte.qary_extra_inequalities for the proof). The caps are
# rebuilt here by their own recursion; Krawtchouk values come from _kraw_columns above.


@lru_cache(maxsize=None)
def _qcw_cap(q: int, n: int, d: int, w: int) -> int:
    """q-ary constant-weight bound: the least of C(n,w)(q-1)^w, n(q-1)B(n-1,w-1)/w and
    n B(n-1,w)/(n-w) (floors); 1 when w = 0 or two weight-w words cannot be d apart."""
    if w < 0 or w > n:
        return 0
    if w == 0 or 2 * w < d or n < d:
        return 1
    caps = [math.comb(n, w) * (q - 1) ** w, (n * (q - 1) * _qcw_cap(q, n - 1, d, w - 1)) // w]
    if n > w:
        caps.append((n * _qcw_cap(q, n - 1, d, w)) // (n - w))
    return min(caps)


def _check_delsarte_lp_qcw(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Check a ``delsarte-lp-qcw`` certificate: y >= 0, z >= 0 with, for every i = d..n,
    ``sum_k y_k K_k(i) - z_i <= -1``; then ``A_q(n,d) <= 1 + sum_k y_k K_k(0) + sum_i z_i
    B_q(n, d, i)``. Integer arithmetic after clearing one common denominator."""
    from math import lcm

    q, n, d, y, claimed = _lp_certificate_head(cert, ("extra",))
    if not isinstance(cert["extra"], list):
        raise InputError("certificate: extra must be a list")
    z: dict[int, Fraction] = {}
    for j, e in enumerate(cert["extra"]):
        if not isinstance(e, Mapping) or not {"index", "z"} <= set(e):
            raise InputError(f"certificate: extra[{j}] needs index and z")
        if e.get("family", "constant-weight") != "constant-weight":
            return False, None, f"extra[{j}]: unknown family {e.get('family')!r}"
        i = e["index"]
        if isinstance(i, bool) or not isinstance(i, int) or not d <= i <= n or i in z:
            raise InputError(f"certificate: extra[{j}].index must be a new integer in {d}..{n}")
        z[i] = _parse_fraction(e["z"], f"extra[{j}].z")
    if any(v < 0 for v in y) or any(v < 0 for v in z.values()):
        return False, None, "a dual multiplier is negative"
    L = lcm(*(v.denominator for v in y), *(v.denominator for v in z.values()))
    Y = [v.numerator * (L // v.denominator) for v in y]
    Z = {i: v.numerator * (L // v.denominator) for i, v in z.items()}
    T = _kraw_columns(q, n)
    for i in range(d, n + 1):
        total = sum(Y[k - 1] * T[i][k] for k in range(1, n + 1) if Y[k - 1]) - Z.get(i, 0)
        if total > -L:
            return False, None, f"dual constraint fails at distance i={i}"
    num = L + sum(Y[k - 1] * T[0][k] for k in range(1, n + 1))
    num += sum(Zi * _qcw_cap(q, n, d, i) for i, Zi in Z.items())
    value = Fraction(num, L)
    if value != claimed:
        return False, None, f"bound is {value}, certificate claims {claimed}"
    bound = value.numerator // value.denominator
    return True, bound, f"A_{q}({n},{d}) <= {bound} (constant-weight inequalities)"


CERTIFICATE_CHECKERS["delsarte-lp-qcw"] = _check_delsarte_lp_qcw
# Checkers kept in their own modules (one registry line each).
from codesearch import _cert_integral, _cert_qary_threepoint, _cert_relation  # noqa: E402

CERTIFICATE_CHECKERS.update({"relation-chain": _cert_relation.check_relation_chain,
                             "theorem": _cert_relation.check_theorem,
                             "qary-three-point-sdp": _cert_qary_threepoint.check_qary_three_point,
                             "distance-enumeration": _cert_integral.check_distance_enumeration,
                             "lp-odd-size": _cert_integral.check_odd_size})
