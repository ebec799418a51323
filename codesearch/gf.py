"""Arithmetic in the finite fields GF(p^m) for small alphabets, by lookup tables.

Problem
-------
Linear codes over GF(q) with q a prime power (Reed-Solomon codes over GF(4), BCH codes whose
roots live in GF(2^m), the hexacode, ...) need field addition, multiplication and linear algebra.
The fields used by the tables are small (q <= 2^12), so exp/log tables are exact and fast.

Representation (the convention of the whole package)
    An element of GF(p^m) is an integer ``0 <= x < p^m`` whose base-p digits ``a_0 .. a_{m-1}``
    are the coefficients of ``a_0 + a_1 alpha + ... + a_{m-1} alpha^{m-1}``, alpha a root of the
    field's *defining polynomial*: the first primitive monic polynomial of degree m over GF(p) in
    the order of its coefficient list (constant term first, read as a base-p number). Addition
    is digit-wise addition mod p (XOR when p = 2); the prime subfield is ``{0, .., p-1}``.

References
----------
R. Lidl and H. Niederreiter, *Finite Fields*, Cambridge University Press, 1997, ch. 2-3
(primitive polynomials, minimal polynomials, cyclotomic cosets); F. J. MacWilliams and
N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland, 1977, ch. 4.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from codesearch.errors import ParameterError

__all__ = ["Field", "field", "prime_power", "digit_add_table"]

#: Largest field order tabulated (the q x q tables hold 16 M entries at 4096).
MAX_ORDER = 1 << 12


def prime_power(q: int) -> tuple[int, int] | None:
    """``(p, m)`` with ``q = p^m``, p prime, or None when q is not a prime power."""
    if q < 2:
        return None
    p = next(f for f in range(2, q + 1) if q % f == 0)
    m, r = 0, q
    while r % p == 0:
        r //= p
        m += 1
    return (p, m) if r == 1 else None


def digit_add_table(q: int) -> np.ndarray:
    """``T[x, y]`` = digit-wise sum mod p of x and y (the additive group of GF(q))."""
    pm = prime_power(q)
    if pm is None:
        raise ParameterError(f"q={q} is not a prime power")
    p, m = pm
    xs = np.arange(q)
    out = np.zeros((q, q), dtype=np.int64)
    scale = 1
    for _ in range(m):
        dx = (xs // scale) % p
        out += ((dx[:, None] + dx[None, :]) % p) * scale
        scale *= p
    return out.astype(np.uint16 if q > 256 else np.uint8)


@dataclass(frozen=True, eq=False)
class Field:
    """GF(q) by tables. ``exp[i] = alpha^i`` (length 2(q-1)), ``log[x]`` for x != 0."""

    q: int
    p: int
    m: int
    poly: tuple[int, ...]
    exp: np.ndarray
    log: np.ndarray
    add: np.ndarray
    mul: np.ndarray  # a q x q table, or an object indexed the same way for q > 256
    neg: np.ndarray
    inv: np.ndarray

    def power(self, x: int, e: int) -> int:
        """x^e (0^0 = 1)."""
        if e == 0:
            return 1
        if x == 0:
            return 0
        return int(self.exp[(int(self.log[x]) * e) % (self.q - 1)])

    def sub(self, x: int, y: int) -> int:
        return int(self.add[x, self.neg[y]])

    # ---------------------------------------------------------------- polynomials, low first
    def poly_mul(self, a: list[int], b: list[int]) -> list[int]:
        out = [0] * (len(a) + len(b) - 1)
        for i, x in enumerate(a):
            if x:
                for j, y in enumerate(b):
                    if y:
                        out[i + j] = int(self.add[out[i + j], self.mul[x, y]])
        return out

    def poly_eval(self, a: list[int], x: int) -> int:
        acc = 0
        for c in reversed(a):
            acc = int(self.add[self.mul[acc, x], c])
        return acc

    # ---------------------------------------------------------------- matrices
    def rref(self, mat: np.ndarray) -> tuple[np.ndarray, list[int]]:
        """Reduced row echelon form and pivot columns (rows of zeros dropped)."""
        a = np.array(mat, dtype=np.int64) % self.q if self.m == 1 else np.array(mat, np.int64)
        rows, cols = a.shape
        pivots: list[int] = []
        r = 0
        for c in range(cols):
            if r == rows:
                break
            nz = np.nonzero(a[r:, c])[0]
            if nz.size == 0:
                continue
            i = r + int(nz[0])
            a[[r, i]] = a[[i, r]]
            a[r] = self.mul[self.inv[a[r, c]], a[r]]
            for j in range(rows):
                if j != r and a[j, c]:
                    a[j] = self.add[a[j], self.mul[self.neg[a[j, c]], a[r]]]
            pivots.append(c)
            r += 1
        return a[:r].astype(np.uint8 if self.q <= 256 else np.uint16), pivots

    def rank(self, mat: np.ndarray) -> int:
        return len(self.rref(mat)[1])

    def null_space(self, mat: np.ndarray) -> np.ndarray:
        """A basis (rows) of ``{x : mat x^T = 0}``."""
        mat = np.asarray(mat)
        n = mat.shape[1]
        red, piv = self.rref(mat) if mat.shape[0] else (np.zeros((0, n), np.uint8), [])
        free = [c for c in range(n) if c not in piv]
        out = np.zeros((len(free), n), dtype=np.int64)
        for t, f in enumerate(free):
            out[t, f] = 1
            for r, c in enumerate(piv):
                out[t, c] = self.neg[red[r, f]]
        return out.astype(np.uint8)

    def matmul(self, a: np.ndarray, b: np.ndarray) -> np.ndarray:
        """Matrix product over GF(q) (small matrices)."""
        a = np.asarray(a, dtype=np.int64)
        b = np.asarray(b, dtype=np.int64)
        if self.m == 1:
            return ((a @ b) % self.q).astype(np.uint8)
        out = np.zeros((a.shape[0], b.shape[1]), dtype=np.int64)
        for t in range(a.shape[1]):
            out = self.add[out, self.mul[a[:, t][:, None], b[t][None, :]]]
        return out.astype(np.uint8)


def _poly_is_primitive(p: int, m: int, coeffs: list[int]) -> bool:
    """Monic ``x^m + sum coeffs[i] x^i`` is primitive iff x has order exactly p^m - 1."""
    order = p**m - 1
    # powers of x modulo the polynomial, as digit vectors
    cur = [1] + [0] * (m - 1)
    for e in range(1, order + 1):
        top = cur[m - 1]
        cur = [0] + cur[: m - 1]
        if top:
            cur = [(c - top * f) % p for c, f in zip(cur, coeffs)]
        if cur == [1] + [0] * (m - 1):
            return e == order
    return False


@lru_cache(maxsize=None)
def field(q: int) -> Field:
    """The tables of GF(q) in the package's convention (see the module docstring)."""
    pm = prime_power(q)
    if pm is None:
        raise ParameterError(f"GF(q) needs a prime power q, got q={q}")
    if q > MAX_ORDER:
        raise ParameterError(f"GF(q) is tabulated for q <= {MAX_ORDER}, got q={q}")
    p, m = pm
    if m == 1:
        poly = (p - next(g for g in range(1, p) if _is_generator(g, p)), 1) if p > 2 else (1, 1)
    else:
        for code in range(p**m):
            coeffs = [(code // p**i) % p for i in range(m)]
            if coeffs[0] and _poly_is_primitive(p, m, coeffs):
                poly = tuple(coeffs) + (1,)
                break
    exp = np.zeros(2 * (q - 1), dtype=np.int64)
    log = np.zeros(q, dtype=np.int64)
    if m == 1:
        g = (-poly[0]) % p
        x = 1
        for i in range(q - 1):
            exp[i] = x
            log[x] = i
            x = (x * g) % p
    else:
        digits = [1] + [0] * (m - 1)
        for i in range(q - 1):
            x = sum(dg * p**j for j, dg in enumerate(digits))
            exp[i] = x
            log[x] = i
            top = digits[m - 1]
            digits = [0] + digits[: m - 1]
            if top:
                digits = [(c - top * f) % p for c, f in zip(digits, poly[:m])]
    exp[q - 1:] = exp[: q - 1]
    add = digit_add_table(q).astype(np.int64) if q <= 256 else _DigitAdd(p, m)
    nz = np.arange(1, q)
    if q <= 256:
        mul = np.zeros((q, q), dtype=np.int64)
        mul[1:, 1:] = exp[(log[nz][:, None] + log[nz][None, :]) % (q - 1)]
    else:
        mul = _LogMul(exp, log)
    xs = np.arange(q, dtype=np.int64)
    neg = sum(((-((xs // p**j) % p)) % p) * p**j for j in range(m)).astype(np.int64)
    inv = np.zeros(q, dtype=np.int64)
    inv[1:] = exp[(-log[nz]) % (q - 1)]
    for arr in (exp, log, neg, inv):
        arr.setflags(write=False)
    return Field(q, p, m, tuple(poly), exp, log, add, mul, neg, inv)


class _DigitAdd:
    """``add[x, y]``: digit-wise addition mod p, for fields too large for a table."""

    def __init__(self, p: int, m: int) -> None:
        self.p, self.m = p, m

    def __getitem__(self, key: tuple) -> np.ndarray:
        x, y = (np.asarray(v, dtype=np.int64) for v in key)
        if self.p == 2:
            return x ^ y
        out = np.zeros(np.broadcast(x, y).shape, dtype=np.int64)
        for j in range(self.m):
            s = self.p**j
            out += (((x // s) % self.p + (y // s) % self.p) % self.p) * s
        return out


class _LogMul:
    """``mul[x, y]`` by logarithms, for fields too large for a q x q table."""

    def __init__(self, exp: np.ndarray, log: np.ndarray) -> None:
        self.exp, self.log, self.order = exp, log, len(log) - 1

    def __getitem__(self, key: tuple) -> np.ndarray:
        x, y = (np.asarray(v, dtype=np.int64) for v in key)
        out = self.exp[(self.log[x] + self.log[y]) % self.order]
        return np.where((x == 0) | (y == 0), 0, out)


def _is_generator(g: int, p: int) -> bool:
    x, seen = 1, set()
    for _ in range(p - 1):
        x = (x * g) % p
        seen.add(x)
    return len(seen) == p - 1
