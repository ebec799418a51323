"""Binary linear codes found by recorded randomised searches, rebuilt from their records.

Problem
-------
Several binary records at n = 22..28 are linear codes with no family name in this library
(the [23, 14, 5] code with Wagner's parameters, a [28, 14, 8] code, a [27, 9, 10] code). Each
is found here by a small seeded search whose outcome is recorded (the search, its parameters,
its seed and the result), so the record is both cheap to rebuild and reproducible; every build
is re-verified at the recorded distance by the independent checker.

Searches
    quasi-cyclic   generator [I | A_2 | .. | A_l] of l circulant m x m blocks, A_j the
                   circulant whose first row is ``first_j`` (bit t = column t), the first
                   rows drawn uniformly from the nonzero m-bit words, ``tries`` draws from
                   ``numpy.random.default_rng(seed)``; the first draw reaching distance d is
                   kept. The identity block makes the rank m.
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
           "quasi_cyclic_search", "column_search", "null_space_code"]


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
        Search parameters: ``m, l, tries, seed`` or ``r, s, seed``.
    result : tuple of int
        The first rows of the circulants, or the parity-check columns.
    """

    key: str
    n: int
    k: int
    d: int
    method: str
    params: tuple[tuple[str, Any], ...]
    result: tuple[int, ...]

    @property
    def label(self) -> str:
        kind = "quasi-cyclic" if self.method == "quasi-cyclic" else "column-search"
        return f"{kind} [{self.n},{self.k},{self.d}] ({self.key})"


RECORDS: dict[str, SearchRecord] = {r.key: r for r in [
    # found at draw 179 of seed 1; [28,14,8]: A(28,8) >= 16384, punctured A(27,7) >= 16384,
    # shortened A(27,8) >= 8192, both A(26,7) >= 8192
    SearchRecord("qc28-14", 28, 14, 8, "quasi-cyclic",
                 (("m", 14), ("l", 2), ("tries", 20000), ("seed", 1)), (1, 12405)),
    # found at draw 17 of seed 1; [27,9,10]: A(27,10) >= 512, punctured A(26,9) >= 512
    SearchRecord("qc27-9", 27, 9, 10, "quasi-cyclic",
                 (("m", 9), ("l", 3), ("tries", 50000), ("seed", 1)), (1, 500, 69)),
    # restart 73; 23 columns of F_2^9, any 4 independent: the parameters of Wagner's
    # [23,14,5] code, giving A(22,5), A(23,5), A(23,6), A(24,6)
    SearchRecord("columns23-14", 23, 14, 5, "columns", (("r", 9), ("s", 4), ("seed", 73)),
                 (419, 252, 400, 154, 15, 136, 492, 504, 350, 110, 256, 17, 80, 438, 348,
                  106, 437, 425, 141, 411, 170, 208, 327)),
]}


# ----------------------------------------------------------------------------- builders
def _bits(x: int, width: int) -> np.ndarray:
    return np.array([(x >> t) & 1 for t in range(width)], dtype=np.uint8)


def quasi_cyclic_generator(firsts: tuple[int, ...] | list[int], m: int) -> np.ndarray:
    """[A_1 | .. | A_l], A_j the m x m circulant with first row ``firsts[j]`` (bit t = column t);
    row i is the first row rotated by i places."""
    blocks = []
    for f in firsts:
        row = _bits(int(f), m)
        blocks.append(np.array([np.roll(row, i) for i in range(m)], dtype=np.uint8))
    return np.hstack(blocks)


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
def _words(rows: np.ndarray) -> np.ndarray:
    """All 2^k codewords as integers (bit t = column t), k <= 20."""
    weights = (1 << np.arange(rows.shape[1], dtype=np.uint64)).astype(np.uint64)
    ints = (rows.astype(np.uint64) * weights).sum(axis=1, dtype=np.uint64)
    w = np.zeros(1, dtype=np.uint64)
    for r in ints:
        w = np.concatenate([w, w ^ r])
    return w


def _min_weight(rows: np.ndarray) -> int:
    return int(np.bitwise_count(_words(rows)[1:]).min())


def quasi_cyclic_search(m: int, l: int, d: int, tries: int, seed: int
                        ) -> tuple[int, ...] | None:
    """First rows (1, f_2, .., f_l) of a [l m, m, >= d] quasi-cyclic code, or None.

    The minimum distance of each draw is computed by listing its 2^m words (m <= 20).
    """
    if not (1 <= m <= 20 and l >= 2 and tries >= 1):
        raise ParameterError("quasi-cyclic search: 1 <= m <= 20, l >= 2, tries >= 1")
    rng = np.random.default_rng(seed)
    for _ in range(tries):
        firsts = (1,) + tuple(int(x) for x in rng.integers(1, 1 << m, size=l - 1))
        if _min_weight(quasi_cyclic_generator(firsts, m)) >= d:
            return firsts
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
