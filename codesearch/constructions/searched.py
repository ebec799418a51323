"""Binary linear codes found by recorded randomised searches, rebuilt from their records.

Problem
-------
Several binary records at n = 22..28 are linear codes with no family name in this library
(the [23, 14, 5] code with Wagner's parameters, a [28, 14, 8] code, a [27, 9, 10] code). Each
(and a [28, 10, 10] code) is found here by a small seeded search whose outcome is recorded (the search, its parameters,
its seed and the result), so the record is both cheap to rebuild and reproducible; every build
is re-verified at the recorded distance by the independent checker.

Searches
    quasi-cyclic   the span of the block-wise cyclic shifts of one or more generators
                   (g a_1, .., g a_l), polynomials mod x^m - 1 (length l m), with g a
                   divisor of x^m - 1 of a prescribed degree per generator and the a_j drawn
                   uniformly from the nonzero m-bit words (:func:`quasi_cyclic_search`);
                   the first of ``tries`` draws from ``numpy.random.default_rng(seed)``
                   reaching dimension k and distance d is kept.
    columns        a parity-check matrix built column by column: each new column (an r-bit
                   word, bit t = row t) is drawn uniformly among the words that are not a sum
                   of at most s - 1 columns already chosen, so any s columns stay independent
                   and the code (the null space) has distance >= s + 1; restart ``seed`` draws
                   from ``numpy.random.default_rng(seed)``.

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977: ch. 1 section 10 (columns of a parity-check matrix and the minimum distance), ch. 16
section 7 (quasi-cyclic and double-circulant codes).
T. A. Gulliver and V. K. Bhargava, searches for quasi-cyclic codes (common practice; from memory).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import LinearCode

__all__ = ["SearchRecord", "RECORDS", "searched_code", "quasi_cyclic_generator",
           "quasi_cyclic_search", "column_search", "null_space_code", "cyclic_divisors"]


@dataclass(frozen=True)
class SearchRecord:
    """One recorded search and its outcome.

    Attributes
    ----------
    key : str
        Name of the record (the family parameter).
    n, k, d : int
        Parameters of the code found (d verified whenever the code is built).
    method : str
        ``"quasi-cyclic"`` or ``"columns"``.
    params : tuple of (str, value)
        Search parameters: ``m, l, degrees, tries, seed`` or ``r, s, seed``.
    result : tuple
        The generators (tuples of l polynomials, bit t = coefficient of x^t), or the
        parity-check columns.
    """

    key: str
    n: int
    k: int
    d: int
    method: str
    params: tuple[tuple[str, Any], ...]
    result: tuple

    def rerun(self) -> tuple | None:
        """Run the recorded search again (its result must equal ``result``)."""
        p = dict(self.params)
        if self.method == "quasi-cyclic":
            return quasi_cyclic_search(p["m"], p["l"], p["degrees"], self.k, self.d,
                                       p["tries"], p["seed"])
        return column_search(p["r"], self.n, p["s"], p["seed"])

    @property
    def label(self) -> str:
        kind = "quasi-cyclic" if self.method == "quasi-cyclic" else "column-search"
        return f"{kind} [{self.n},{self.k},{self.d}] ({self.key})"


RECORDS: dict[str, SearchRecord] = {r.key: r for r in [
    # [28,14,8]: A(28,8) >= 16384; punctured A(27,7) >= 16384; shortened A(27,8) >= 8192;
    # both A(26,7) >= 8192
    SearchRecord("qc28-14", 28, 14, 8, "quasi-cyclic",
                 (("m", 14), ("l", 2), ("degrees", (0,)), ("tries", 50000), ("seed", 1)),
                 ((14972, 2258),)),
    # [27,9,10]: A(27,10) >= 512; punctured A(26,9) >= 512
    SearchRecord("qc27-9", 27, 9, 10, "quasi-cyclic",
                 (("m", 9), ("l", 3), ("degrees", (0,)), ("tries", 50000), ("seed", 1)),
                 ((44, 15, 443),)),
    # [28,10,10], two generators: A(28,10) >= 1024; punctured A(27,9) >= 1024
    SearchRecord("qc28-10", 28, 10, 10, "quasi-cyclic",
                 (("m", 7), ("l", 4), ("degrees", (0, 4)), ("tries", 100000), ("seed", 1)),
                 ((73, 56, 2, 82), (105, 58, 29, 39))),
    # restart 73; 23 columns of F_2^9, any 4 independent: the parameters of Wagner's
    # [23,14,5] code, giving A(22,5), A(23,5), A(23,6), A(24,6)
    SearchRecord("columns23-14", 23, 14, 5, "columns", (("r", 9), ("s", 4), ("seed", 73)),
                 (419, 252, 400, 154, 15, 136, 492, 504, 350, 110, 256, 17, 80, 438, 348,
                  106, 437, 425, 141, 411, 170, 208, 327)),
]}


# ----------------------------------------------------------------------------- builders
def _bits(x: int, width: int) -> np.ndarray:
    return np.array([(x >> t) & 1 for t in range(width)], dtype=np.uint8)


def _rotate(p: int, s: int, m: int) -> int:
    """x^s p(x) mod x^m - 1 (bit t = coefficient of x^t)."""
    s %= m
    return ((p << s) | (p >> (m - s))) & ((1 << m) - 1) if s else p


def _poly_mul(a: int, b: int, m: int) -> int:
    """a(x) b(x) mod x^m - 1 over GF(2)."""
    out = 0
    for t in range(m):
        if (b >> t) & 1:
            out ^= _rotate(a, t, m)
    return out


def _poly_mod(a: int, b: int) -> int:
    db = b.bit_length() - 1
    while a and a.bit_length() - 1 >= db:
        a ^= b << (a.bit_length() - 1 - db)
    return a


def cyclic_divisors(m: int, degree: int) -> list[int]:
    """The divisors of x^m - 1 over GF(2) of the given degree, in increasing order."""
    full = (1 << m) | 1
    return [g for g in range(1 << degree, 1 << (degree + 1)) if _poly_mod(full, g) == 0]


def quasi_cyclic_generator(vectors: tuple[tuple[int, ...], ...], m: int) -> np.ndarray:
    """A basis of the quasi-cyclic code spanned by the block-wise cyclic shifts of the
    generators ``vectors`` (each a tuple of l polynomials, bit t = coefficient of x^t)."""
    from codesearch.gf import field

    rows = []
    for vec in vectors:
        for s in range(m):
            rows.append(np.concatenate([_bits(_rotate(int(p), s, m), m) for p in vec]))
    g = np.array(rows, dtype=np.uint8)
    reduced, _ = field(2).rref(g)
    return np.ascontiguousarray(reduced, dtype=np.uint8)


def null_space_code(columns: tuple[int, ...] | list[int], r: int) -> LinearCode:
    """The binary code whose parity-check matrix has the given columns (bit t = row t)."""
    from codesearch.gf import field

    h = np.array([_bits(int(c), r) for c in columns], dtype=np.uint8).T
    return LinearCode(field(2).null_space(h), 2)


def searched_code(key: str) -> LinearCode:
    """Rebuild a recorded code from its record (unverified; see ``build_family``)."""
    rec = RECORDS.get(key)
    if rec is None:
        raise ParameterError(f"unknown searched code {key!r} (known: {', '.join(RECORDS)})")
    p = dict(rec.params)
    if rec.method == "quasi-cyclic":
        return LinearCode(quasi_cyclic_generator(rec.result, p["m"]), 2)
    return null_space_code(rec.result, p["r"])


# ----------------------------------------------------------------------------- the searches
def _min_weight(rows: np.ndarray) -> int:
    """Least weight of a nonzero word of the span of ``rows`` (listing all 2^k words)."""
    weights = (1 << np.arange(rows.shape[1], dtype=np.uint64)).astype(np.uint64)
    ints = (rows.astype(np.uint64) * weights).sum(axis=1, dtype=np.uint64)
    w = np.zeros(1, dtype=np.uint64)
    for r in ints:
        w = np.concatenate([w, w ^ r])
    return int(np.bitwise_count(w[1:]).min())


def quasi_cyclic_search(m: int, l: int, degrees: tuple[int, ...], k: int, d: int,
                        tries: int, seed: int) -> tuple[tuple[int, ...], ...] | None:
    """Generators of a [l m, k, >= d] quasi-cyclic code, or None after ``tries`` draws.

    Each draw takes, for every entry dg of ``degrees``, a divisor g of x^m - 1 of degree dg
    (uniformly) and l multipliers a_j (uniform nonzero m-bit words): the generator
    (g a_1, .., g a_l) spans at most m - dg dimensions. Draws whose span has dimension other
    than k are skipped; the minimum distance is found by listing the 2^k words (k <= 22).
    """
    if not (2 <= m <= 31 and l >= 1 and 1 <= k <= 22 and tries >= 1 and degrees):
        raise ParameterError("quasi-cyclic search: 2 <= m <= 31, l >= 1, 1 <= k <= 22")
    rng = np.random.default_rng(seed)
    divisors = {dg: cyclic_divisors(m, dg) for dg in set(degrees)}
    if any(not v for v in divisors.values()):
        raise ParameterError(f"x^{m} - 1 has no divisor of some degree in {degrees}")
    for _ in range(tries):
        vectors = []
        for dg in degrees:
            g = divisors[dg][int(rng.integers(len(divisors[dg])))]
            vectors.append(tuple(_poly_mul(g, int(a), m)
                                 for a in rng.integers(1, 1 << m, size=l)))
        gen = quasi_cyclic_generator(tuple(vectors), m)
        if gen.shape[0] == k and _min_weight(gen) >= d:
            return tuple(vectors)
    return None


def column_search(r: int, n: int, s: int, seed: int) -> tuple[int, ...]:
    """Up to n columns of F_2^r, any s of them independent (one seeded restart)."""
    if not (2 <= r <= 20 and n >= 1 and s >= 1):
        raise ParameterError("column search: 2 <= r <= 20, n >= 1, s >= 1")
    rng = np.random.default_rng(seed)
    size = 1 << r
    # reach[j]: words that are sums of exactly j chosen columns (j < s)
    reach = np.zeros((s, size), dtype=bool)
    reach[0, 0] = True
    chosen: list[int] = []
    while len(chosen) < n:
        free = np.nonzero(~reach.any(axis=0))[0]
        if free.size == 0:
            break
        c = int(rng.choice(free))
        for j in range(s - 1, 0, -1):
            reach[j, np.nonzero(reach[j - 1])[0] ^ c] = True
        chosen.append(c)
    return tuple(chosen)
