"""Closed-form bounds on A_q(n,d), the size of the largest q-ary code of length n and
minimum Hamming distance d, in exact integer arithmetic.

Problem
-------
Given a cell (q, n, d), return integers U with A_q(n,d) <= U (Singleton, sphere packing,
Plotkin, Johnson, Elias-Bassalygo), the Griesmer bound (valid for *linear* codes only, q a
prime power) and the Gilbert-Varshamov lower bound (a code of that size *exists*; no code is
in hand). Every function returns a :class:`~codesearch.results.BoundResult` whose ``note``
says which form of the theorem applied; no floating point is used anywhere, so a value is
exactly the theorem's floor.

References
----------
F. J. MacWilliams and N. J. A. Sloane, "The Theory of Error-Correcting Codes" (1977):
ch. 1 section 5 (sphere packing), ch. 2 section 2 (Plotkin bound and Levenshtein's sharp
binary forms), ch. 11 section 3 (Singleton), ch. 17 sections 2-5 (Johnson's improved sphere
packing bound, constant-weight bounds, Elias bound), ch. 17 section 6 (Griesmer),
ch. 1 section 10 (Gilbert-Varshamov).
R. M. Roth, "Introduction to Coding Theory" (2006), ch. 4 (q-ary Plotkin and
Elias-Bassalygo bounds in the form used here).
V. I. Levenshtein, "The application of Hadamard matrices to a problem in coding",
Problems of Cybernetics 5 (1964) (the binary Plotkin bound is attained when Hadamard
matrices of the needed orders exist).
"""

from __future__ import annotations

from functools import lru_cache
from math import comb

from codesearch.bounds.krawtchouk import ball_volume, sphere_size
from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = [
    "singleton",
    "hamming",
    "plotkin",
    "johnson",
    "elias",
    "griesmer",
    "gilbert_varshamov",
    "constant_weight_bound",
    "constant_weight_bound_qary",
    "is_prime_power",
]


def _ceil_div(a: int, b: int) -> int:
    return -(-a // b)


def is_prime_power(q: int) -> bool:
    """True when q = p^m for a prime p and m >= 1 (so GF(q) and linear codes exist)."""
    if q < 2:
        return False
    p = 2
    while p * p <= q:
        if q % p == 0:
            while q % p == 0:
                q //= p
            return q == 1
        p += 1
    return True


def singleton(params: Params) -> BoundResult:
    """Singleton bound A_q(n,d) <= q^(n-d+1) (delete d-1 coordinates: words stay distinct)."""
    q, n, d = params.q, params.n, params.d
    return BoundResult(params, q ** (n - d + 1), "singleton", note="q^(n-d+1)")


def hamming(params: Params) -> BoundResult:
    """Sphere-packing bound floor(q^n / V_q(n, t)), t = floor((d-1)/2): balls are disjoint."""
    q, n, d = params.q, params.n, params.d
    t = (d - 1) // 2
    return BoundResult(params, q**n // ball_volume(q, n, t), "hamming", note=f"radius t={t}")


def _plotkin_qary(q: int, n: int, d: int) -> tuple[int, str]:
    """min over shortened lengths m <= n with q d > (q-1) m of q^(n-m) floor(qd / (qd-(q-1)m)).

    The basic Plotkin inequality M(M-1) d <= theta n M^2, theta = (q-1)/q, gives
    M <= qd / (qd - (q-1)n) when qd > (q-1)n; shortening (A_q(n,d) <= q A_q(n-1,d)) carries
    it to every longer n, including the case d = theta n.
    """
    best, how = q**n, "trivial"
    for m in range(d, n + 1):
        den = q * d - (q - 1) * m
        if den <= 0:
            break
        value = q ** (n - m) * (q * d // den)
        if value < best:
            best, how = value, f"q-ary form at length {m}" if m == n else f"shortened to length {m}"
    return best, how


def _plotkin_binary_sharp(n: int, d: int) -> int | None:
    """Levenshtein's sharp binary forms at length n itself, or None outside their range."""
    if d % 2 == 0:
        if 2 * d > n:
            return 2 * (d // (2 * d - n))
        if 2 * d == n:
            return 4 * d
    else:
        # A(n, d) = A(n+1, d+1) for odd d (puncture / extend by a parity bit).
        return _plotkin_binary_sharp(n + 1, d + 1)
    return None


def plotkin(params: Params) -> BoundResult:
    """Plotkin bound in its finite forms (q-ary, and for q = 2 Levenshtein's sharp forms).

    For q = 2 and d even: A(n,d) <= 2 floor(d / (2d - n)) when 2d > n and A(2d, d) <= 4d;
    odd d through A(n, d) = A(n+1, d+1); beyond the range by shortening,
    A(n,d) <= 2^(n-m) A(m,d). For q > 2 the inequality M <= qd / (qd - (q-1) n) with the
    same shortening. Returns q^n (trivial) when no form applies.
    """
    q, n, d = params.q, params.n, params.d
    best, how = _plotkin_qary(q, n, d)
    if q == 2:
        for m in range(d, n + 1):
            sharp = _plotkin_binary_sharp(m, d)
            if sharp is not None:
                value = 2 ** (n - m) * sharp
                if value < best:
                    best = value
                    how = "binary sharp form" if m == n else f"binary sharp form shortened to {m}"
    return BoundResult(params, best, "plotkin", note=how)


@lru_cache(maxsize=65536)
def constant_weight_bound(n: int, delta: int, w: int) -> int:
    """Johnson's bound on A(n, 2 delta, w), binary constant-weight codes.

    ``A(n, 2δ, w) <= floor(n/w * A(n-1, 2δ, w-1))`` (count pairs (word, position in its
    support)), ``A(n, 2δ, w) = A(n, 2δ, n-w)`` (complements), with ``A = 1`` when
    ``w < δ`` (two weight-w words are at distance <= 2w < 2δ) and ``0`` when ``w > n``.
    """
    chain = []  # followed as a loop, not recursion: n goes up to the bounds limit 4096
    while True:
        if w < 0 or w > n:
            value = 0
            break
        w = min(w, n - w)
        if w < delta:
            value = 1
            break
        chain.append((n, w))
        n, w = n - 1, w - 1
    for m, v in reversed(chain):
        value = (m * value) // v
    return value


def _johnson_odd(n: int, e: int) -> int:
    """Johnson's improved sphere-packing bound for binary A(n, 2e+1).

    Words at distance exactly e+1 from the code and outside every radius-e ball: codeword
    c sees at least C(n, e+1) - C(2e+1, e+1) N(c) of them (N(c) = number of codewords at
    distance 2e+1 from c, at most A(n, 2e+2, 2e+1)), and each such word is seen from at
    most floor(n/(e+1)) codewords (their difference patterns have disjoint supports).
    """
    shell = comb(n, e + 1) - comb(2 * e + 1, e + 1) * constant_weight_bound(n, e + 1, 2 * e + 1)
    shell = max(shell, 0)
    per = n // (e + 1)
    if per == 0:
        return 2**n // ball_volume(2, n, e)
    # M * (V(n,e) + shell / per) <= 2^n, kept in integers.
    return (2**n * per) // (ball_volume(2, n, e) * per + shell)


def constant_weight_bound_qary(q: int, n: int, d: int, w: int) -> int:
    """Johnson's bound on A_q(n, d, w), q-ary words of weight w at distance >= d.

    ``M w <= n (q-1) A_q(n-1, d, w-1)`` (count pairs (word, nonzero position): the words
    with symbol a at position p, that position deleted, form a code of weight w-1), and a
    single word when ``2w < d``.
    """
    chain = []  # a loop down the chain (n goes up to 4096), then back up
    while True:
        if w < 0 or w > n:
            value = 0
            break
        if 2 * w < d:
            value = 1
            break
        chain.append((n, w))
        n, w = n - 1, w - 1
    for m, v in reversed(chain):
        value = (m * (q - 1) * value) // v
    return value


def _johnson_qary_odd(q: int, n: int, e: int) -> int:
    """The improved sphere-packing bound for A_q(n, 2e+1), q >= 2.

    Same count as :func:`_johnson_odd`: a word at distance e+1 from codeword c lies within e
    of another codeword c' only if d(c, c') = 2e+1 and it takes c' values on e+1 of their
    2e+1 differing positions and c values elsewhere (C(2e+1, e+1) words per c'); such c'
    form a weight-(2e+1) code around c, at most A_q(n, 2e+1, 2e+1). A word outside all
    balls is at distance e+1 from at most A_q(n, 2e+1, e+1) <= floor(n (q-1) / (e+1))
    codewords (their difference patterns share at most one position and differ there).
    """
    shell = sphere_size(q, n, e + 1) - comb(2 * e + 1, e + 1) * constant_weight_bound_qary(
        q, n, 2 * e + 1, 2 * e + 1)
    shell = max(shell, 0)
    per = (n * (q - 1)) // (e + 1)
    vol = ball_volume(q, n, e)
    if per == 0:
        return q**n // vol
    return (q**n * per) // (vol * per + shell)


def johnson(params: Params) -> BoundResult | None:
    """Johnson's improved sphere-packing bound.

    Binary: odd d = 2e+1 directly, even d through A(n, 2e+2) = A(n-1, 2e+1). q-ary: the same
    counting argument (:func:`_johnson_qary_odd`) at radius e = floor((d-1)/2), which for even d
    bounds the codes of distance d-1 and hence those of distance d.
    """
    q, n, d = params.q, params.n, params.d
    if q != 2:
        e = (d - 1) // 2
        return BoundResult(params, _johnson_qary_odd(q, n, e), "johnson",
                           note=f"q-ary form, radius e={e}")
    if d % 2 == 1:
        return BoundResult(params, _johnson_odd(n, (d - 1) // 2), "johnson", note="odd d")
    if n == 1:
        return None
    return BoundResult(params, _johnson_odd(n - 1, (d - 2) // 2), "johnson",
                       note=f"via A({n - 1},{d - 1})")


def elias(params: Params) -> BoundResult:
    """Elias-Bassalygo bound, finite form, minimised over the radius w.

    For every integer w <= theta n with w^2 - 2 theta n w + theta n d > 0 (theta = (q-1)/q),
    A_q(n,d) <= theta n d / (w^2 - 2 theta n w + theta n d) * q^n / V_q(n, w); multiplied
    through by q this is (q-1) n d q^n / ((q w^2 - 2(q-1) n w + (q-1) n d) V_q(n, w)).
    """
    q, n, d = params.q, params.n, params.d
    best, best_w = q**n, None
    top = (q - 1) * n * d * q**n
    shell = volume = 1  # V_q(n, w) kept as a running sum (n reaches 4096: no O(n) per w)
    for w in range(0, (q - 1) * n // q + 1):
        if w:
            shell = shell * (n - w + 1) * (q - 1) // w  # C(n,w)(q-1)^w, exactly
            volume += shell
        den = q * w * w - 2 * (q - 1) * n * w + (q - 1) * n * d
        if den <= 0:
            break
        value = top // (den * volume)
        if value < best:
            best, best_w = value, w
    return BoundResult(params, best, "elias", note=f"radius w={best_w}")


def griesmer(params: Params) -> BoundResult | None:
    """Griesmer bound for *linear* codes: q^k for the largest k with sum ceil(d/q^i) <= n.

    Scope ``"linear"``: it does not bound nonlinear codes and never enters ``upper``.
    None unless q is a prime power.
    """
    q, n, d = params.q, params.n, params.d
    if not is_prime_power(q):
        return None
    k, length = 0, 0
    while True:
        need = length + _ceil_div(d, q**k)
        if need > n:
            break
        length, k = need, k + 1
    return BoundResult(params, q**k, "griesmer", scope="linear", note=f"linear codes only, k <= {k}")


def gilbert_varshamov(params: Params) -> BoundResult:
    """Gilbert-Varshamov lower bound: a code of at least this size exists.

    Gilbert: ceil(q^n / V_q(n, d-1)) (a maximal code covers the space with radius d-1 balls).
    Varshamov, q a prime power: a linear [n, k, >= d] code exists when V_q(n-1, d-2) < q^(n-k).
    The larger of the two; scope ``"existential"`` (no code is in hand).
    """
    q, n, d = params.q, params.n, params.d
    gilbert = _ceil_div(q**n, ball_volume(q, n, d - 1))
    best, how = gilbert, "Gilbert"
    if is_prime_power(q):
        if d == 1:
            k = n
        else:
            vol = ball_volume(q, n - 1, d - 2)
            k = 0
            while k + 1 <= n and vol < q ** (n - k - 1):
                k += 1
        if q**k > best:
            best, how = q**k, f"Varshamov linear, k={k}"
    return BoundResult(params, best, "gv", scope="existential", note=f"existential lower bound ({how})")
