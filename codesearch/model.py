"""The objects everything else talks about: cell parameters and codes.

A *cell* of a table is a triple ``(q, n, d)``: alphabet size, length, minimum distance.
A *code* is an ``(M, n)`` array of symbols ``0..q-1`` (dtype ``uint8``) together with ``q``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable

import numpy as np

from codesearch.errors import ParameterError

__all__ = ["MAX_Q", "Params", "Code", "LinearCode", "MAX_LISTED_WORDS", "grid"]

#: Largest alphabet the code file format can write (symbols 0-9 then a-z).
MAX_Q = 36

#: Byte -> symbol value for ``0-9a-z``; 255 (outside every alphabet) for any other byte.
_SYMBOL_VALUE = np.full(256, 255, dtype=np.uint8)
_SYMBOL_VALUE[np.frombuffer(b"0123456789abcdefghijklmnopqrstuvwxyz", np.uint8)] = np.arange(36)


@dataclass(frozen=True, order=True)
class Params:
    """One table cell: codes of length ``n`` over ``q`` symbols with minimum distance ``d``.

    Raises
    ------
    ParameterError
        If ``q < 2``, ``q > 36``, ``n < 1`` or ``d`` is outside ``1..n``.
    """

    q: int
    n: int
    d: int

    def __post_init__(self) -> None:
        for name in ("q", "n", "d"):
            value = getattr(self, name)
            if isinstance(value, bool) or not isinstance(value, (int, np.integer)):
                raise ParameterError(f"{name} must be an integer, got {value!r}")
            object.__setattr__(self, name, int(value))
        if not 2 <= self.q <= MAX_Q:
            raise ParameterError(f"alphabet size q={self.q} is outside 2..{MAX_Q}")
        if self.n < 1:
            raise ParameterError(f"length n={self.n} must be at least 1")
        if not 1 <= self.d <= self.n:
            raise ParameterError(f"minimum distance d={self.d} is outside 1..n={self.n}")

    def __str__(self) -> str:
        return f"A_{self.q}({self.n},{self.d})" if self.q != 2 else f"A({self.n},{self.d})"

    @property
    def space_size(self) -> int:
        """Number of words in the ambient Hamming space, ``q**n``."""
        return self.q**self.n


def _largest(values: Iterable[int]) -> int | None:
    """Largest value, O(1) for a range (a typo like 1..10**9 must fail fast)."""
    if isinstance(values, range):
        return max(values[0], values[-1]) if len(values) else None
    values = list(values)
    return max(values) if values else None


def grid(q: int, ns: Iterable[int], ds: Iterable[int], *, max_n: int | None = None,
         limit: str = "limit") -> list[Params]:
    """The cells of a table: every valid ``Params(q, n, d)`` for n in ``ns``, d in ``ds``
    (n-major order); pairs with d outside ``1..n`` are left out.

    Raises
    ------
    ParameterError
        For an invalid q, a length beyond ``max_n`` (the message calls it ``limit``), or a
        grid with no valid cell (a single cell names its own problem).
    """
    Params(q, 1, 1)  # validates q once, with the usual one-line error
    top = _largest(ns)
    if max_n is not None and top is not None and top > max_n:
        raise ParameterError(f"length n={top} is beyond the {limit} {max_n}")
    if isinstance(ds, range) and len(ds) > 1 and top is not None:
        # Distances beyond the longest length can never form a cell.
        ds = range(ds.start, max(ds.start + 1, min(ds.stop, top + 1)))
    ns, ds = list(ns), list(ds)
    if len(ns) == 1 and len(ds) == 1:
        return [Params(q, ns[0], ds[0])]
    cells = [Params(q, n, d) for n in ns for d in ds if n >= 1 and 1 <= d <= n]
    if not cells:
        raise ParameterError("the range holds no cell with 1 <= d <= n")
    return cells


@dataclass(frozen=True, eq=False)
class Code:
    """A block code held as explicit codewords.

    Parameters
    ----------
    words : numpy.ndarray
        ``(M, n)`` array of symbols in ``0..q-1``; stored as a read-only ``uint8`` copy.
    q : int
        Alphabet size.

    Notes
    -----
    Duplicates are allowed in the container (the verifier reports them); canonical order is
    lexicographic on the rows and is only applied on request (:meth:`canonical`).
    """

    words: np.ndarray
    q: int

    def __post_init__(self) -> None:
        q = int(self.q)
        if not 2 <= q <= MAX_Q:
            raise ParameterError(f"alphabet size q={q} is outside 2..{MAX_Q}")
        arr = np.asarray(self.words)
        if arr.ndim != 2:
            raise ParameterError(f"codewords must form a 2-d array, got shape {arr.shape}")
        if arr.shape[1] < 1:
            raise ParameterError("codewords must have length at least 1")
        if arr.size and (arr.min() < 0 or arr.max() >= q):
            raise ParameterError(f"a symbol lies outside 0..{q - 1}")
        arr = np.array(arr, dtype=np.uint8, copy=True, order="C")
        arr.setflags(write=False)
        object.__setattr__(self, "words", arr)
        object.__setattr__(self, "q", q)

    @property
    def size(self) -> int:
        """Number of codewords M."""
        return int(self.words.shape[0])

    @property
    def n(self) -> int:
        """Length of the codewords."""
        return int(self.words.shape[1])

    def __len__(self) -> int:
        return self.size

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Code):
            return NotImplemented
        return self.q == other.q and np.array_equal(self.words, other.words)

    def __hash__(self) -> int:
        return hash((self.q, self.words.shape, self.words.tobytes()))

    def __repr__(self) -> str:
        return f"Code(q={self.q}, n={self.n}, size={self.size})"

    def canonical(self) -> "Code":
        """The same code with its words in lexicographic order."""
        if self.size == 0:
            return self
        order = np.lexsort(self.words.T[::-1])
        return Code(self.words[order], self.q)

    def __reduce__(self) -> tuple:
        # rebuilt through the constructor, so the copy is validated and read-only too
        return (Code, (self.words, self.q))

    @classmethod
    def from_strings(cls, words: list[str], q: int) -> "Code":
        """Build a code from words written as strings of symbols 0-9a-z (all of one length)."""
        if len({len(w) for w in words}) > 1:
            raise ParameterError("codewords must all have the same length")
        data = np.frombuffer("".join(words).lower().encode("ascii"), dtype=np.uint8)
        return cls(_SYMBOL_VALUE[data].reshape(len(words), -1), q)

    def to_strings(self) -> list[str]:
        """Each codeword as a string of symbols 0-9a-z."""
        alphabet = np.frombuffer(b"0123456789abcdefghijklmnopqrstuvwxyz", dtype=np.uint8)
        chars = alphabet[self.words]
        return [row.tobytes().decode("ascii") for row in chars]


#: Largest number of codewords :meth:`LinearCode.words` lists (2^22 words of length 32 take
#: 128 MiB as uint8); larger linear codes stay generator matrices.
MAX_LISTED_WORDS = 1 << 22


@dataclass(frozen=True, eq=False)
class LinearCode:
    """A linear code over GF(q), q a prime power, held as a generator matrix.

    Parameters
    ----------
    generator : numpy.ndarray
        ``(k, n)`` array of field elements (the integer convention of :mod:`codesearch.gf`:
        for q prime the residues mod q); its rows must be linearly independent.
    q : int
        Field order.

    Notes
    -----
    The code has exactly ``q**k`` words; :meth:`words` lists them on demand, up to a cap.
    For q = p^m with m > 1 the words are listed as the GF(p)-span of :meth:`additive_basis`,
    the same rows the checker enumerates (:func:`codesearch.verify.check_additive_generator`).
    """

    generator: np.ndarray
    q: int

    def __post_init__(self) -> None:
        from codesearch.gf import field

        q = int(self.q)
        if not 2 <= q <= MAX_Q:
            raise ParameterError(f"alphabet size q={q} is outside 2..{MAX_Q}")
        gf = field(q)
        arr = np.asarray(self.generator)
        if arr.ndim != 2 or arr.shape[1] < 1:
            raise ParameterError(f"a generator matrix must be (k, n) with n >= 1, got {arr.shape}")
        if arr.size and (arr.min() < 0 or arr.max() >= q):
            raise ParameterError(f"a generator entry lies outside 0..{q - 1}")
        arr = np.array(arr, dtype=np.uint8, copy=True, order="C")
        if arr.shape[0] and gf.rank(arr) != arr.shape[0]:
            raise ParameterError(f"the {arr.shape[0]} generator rows are linearly dependent")
        arr.setflags(write=False)
        object.__setattr__(self, "generator", arr)
        object.__setattr__(self, "q", q)

    @property
    def n(self) -> int:
        """Length."""
        return int(self.generator.shape[1])

    @property
    def k(self) -> int:
        """Dimension."""
        return int(self.generator.shape[0])

    @property
    def size(self) -> int:
        """Number of codewords, ``q**k``."""
        return self.q**self.k

    def __len__(self) -> int:
        return self.size

    def __repr__(self) -> str:
        return f"LinearCode(q={self.q}, n={self.n}, k={self.k})"

    def additive_basis(self) -> np.ndarray:
        """Rows ``alpha^j g_i`` (j < m) spanning the code over the prime field GF(p)."""
        from codesearch.gf import field

        gf = field(self.q)
        if gf.m == 1:
            return self.generator
        rows = [gf.mul[gf.exp[j], self.generator.astype(np.int64)] for j in range(gf.m)]
        return np.ascontiguousarray(np.vstack(rows), dtype=np.uint8)

    def words(self, max_words: int = MAX_LISTED_WORDS) -> Code:
        """All ``q**k`` codewords as a :class:`Code`.

        Raises
        ------
        ParameterError
            When the code has more than ``max_words`` words.
        """
        if self.size > max_words:
            raise ParameterError(
                f"{self.q}^{self.k} = {self.size} codewords exceed the cap of {max_words} words"
            )
        from codesearch.gf import digit_add_table, prime_power

        p, _ = prime_power(self.q)  # type: ignore[misc]
        add = digit_add_table(self.q)
        words = np.zeros((1, self.n), dtype=np.uint8)
        for row in self.additive_basis():
            multiples = [np.zeros(self.n, dtype=np.uint8), row]
            for _ in range(p - 2):
                multiples.append(add[multiples[-1], row])
            words = np.vstack([add[words, c[None, :]] for c in multiples]).astype(np.uint8)
        return Code(words, self.q)
