"""Hadamard matrices and the binary codes built from them, up to Levenshtein's codes.

Problem
-------
A Hadamard matrix of order N is an N x N matrix H of +-1 entries with H H^T = N I. Its rows
give binary codes whose pairwise distances are N/2 (or close), and gluing such codes side by
side gives, for every binary (n, d) with 2d > n, a code whose size equals the Plotkin bound:
the Plotkin bound is sharp wherever the needed Hadamard matrices exist (Levenshtein 1961).

Matrices (orders this module produces)
    Sylvester  H_{2N} = [[H, H], [H, -H]] from H_1 = [1];
    Paley I    order q + 1 for a prime power q = 3 (mod 4), from the quadratic character of GF(q);
    Paley II   order 2(q + 1) for a prime power q = 1 (mod 4);
    Kronecker  H_a (x) H_b, order ab.
These give every order 4t up to 88 (92 needs another method; see :func:`hadamard_orders`).

Codes from a normalised H (first row and column all +1), +1 -> 0 and -1 -> 1:
    A_N   rows of H without the first column: (N - 1, N, N/2), equidistant;
    A'_N  the words of A_N starting with 0, that coordinate deleted: (N - 2, N/2, N/2);
    B_N   A_N and its complements: (N - 1, 2N, N/2 - 1);
    C_N   rows of H and -H: (N, 2N, N/2).

Levenshtein's construction (d even, n < 2d): with k = floor(d / (2d - n)),
``a = d(2k + 1) - n(k + 1)`` and ``b = kn - d(2k - 1)`` are non-negative integers with
``n = (2k - 1) a + (2k + 1) b`` and ``d = k a + (k + 1) b``. Juxtapose a/2 copies of A'_{4k}
and b/2 copies of A'_{4k+4} (keeping 2k words of each); an odd a (then k is even) adds one
A_{2k}, an odd b (then k is odd) one A_{2k+2}. Size 2k = the Plotkin bound. For n = 2d:
C_{2d}, 4d words. Odd d: puncture the code for (n + 1, d + 1).

Conference-matrix codes (q = 1 mod 4 a prime power, S the symmetric Jacobsthal matrix of
GF(q)): the rows of (S + I + J)/2 and (-S + I + J)/2 with the all-zero and all-one words form
a (q, 2q + 2, (q - 1)/2) code.

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, ch. 2 sections 3-4 (Hadamard codes, Levenshtein's theorem) and ch. 2 section 3 (Paley
constructions); V. I. Levenshtein, Application of Hadamard matrices to a problem in coding,
*Problems of Cybernetics* 5 (1964) 166-184.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from codesearch.errors import ParameterError
from codesearch.gf import field, prime_power
from codesearch.model import Code

__all__ = [
    "hadamard",
    "hadamard_recipe",
    "hadamard_orders",
    "hadamard_code",
    "levenshtein_plan",
    "levenshtein_orders",
    "levenshtein_code",
    "plotkin_size",
    "conference_code",
]

#: Largest order searched for a recipe.
MAX_ORDER = 256


def _quadratic_character(q: int) -> np.ndarray:
    """chi[x] for x in GF(q): 0 at 0, +1 on nonzero squares, -1 otherwise."""
    gf = field(q)
    chi = -np.ones(q, dtype=np.int64)
    chi[0] = 0
    chi[gf.exp[0:q - 1:2]] = 1
    return chi


def _jacobsthal(q: int) -> np.ndarray:
    """Q[x, y] = chi(x - y) over GF(q)."""
    gf = field(q)
    chi = _quadratic_character(q)
    xs = np.arange(q)
    diff = gf.add[xs[:, None], gf.neg[xs][None, :]]
    return chi[diff]


@lru_cache(maxsize=None)
def hadamard_recipe(order: int) -> tuple | None:
    """How this module builds a Hadamard matrix of ``order``, or None when it cannot.

    Returns a nested tuple: ``("sylvester", N)``, ``("paley1", q)``, ``("paley2", q)`` or
    ``("kronecker", recipe_a, recipe_b)``. Paley constructions are preferred to products.
    """
    if order in (1, 2):
        return ("sylvester", order)
    if order < 1 or order % 4 or order > MAX_ORDER:
        return None
    if order & (order - 1) == 0:
        return ("sylvester", order)
    q = order - 1
    if prime_power(q) and q % 4 == 3:
        return ("paley1", q)
    if order % 2 == 0:
        q = order // 2 - 1
        if q > 1 and prime_power(q) and q % 4 == 1:
            return ("paley2", q)
    for a in range(2, order):
        if order % a == 0 and a <= order // a:
            ra, rb = hadamard_recipe(a), hadamard_recipe(order // a)
            if ra is not None and rb is not None and a > 1:
                return ("kronecker", ra, rb)
    return None


def hadamard_orders(limit: int) -> tuple[list[int], list[int]]:
    """``(built, missing)``: the orders 4t <= limit this module can and cannot build."""
    built, missing = [], []
    for order in range(4, limit + 1, 4):
        (built if hadamard_recipe(order) is not None else missing).append(order)
    return built, missing


def _from_recipe(recipe: tuple) -> np.ndarray:
    kind = recipe[0]
    if kind == "sylvester":
        h = np.ones((1, 1), dtype=np.int64)
        while h.shape[0] < recipe[1]:
            h = np.block([[h, h], [h, -h]])
        return h
    if kind == "paley1":
        q = recipe[1]
        s = _jacobsthal(q)
        # q = 3 mod 4: Q is skew; H = I + [[0, 1^T], [-1, Q]]
        core = np.zeros((q + 1, q + 1), dtype=np.int64)
        core[0, 1:] = 1
        core[1:, 0] = -1
        core[1:, 1:] = s
        return core + np.eye(q + 1, dtype=np.int64)
    if kind == "paley2":
        q = recipe[1]
        s = _jacobsthal(q)
        # q = 1 mod 4: Q symmetric; S = [[0, 1^T], [1, Q]], replace 0 by [[1,-1],[-1,-1]],
        # +-1 by +-[[1,1],[1,-1]]
        conf = np.zeros((q + 1, q + 1), dtype=np.int64)
        conf[0, 1:] = 1
        conf[1:, 0] = 1
        conf[1:, 1:] = s
        zero = np.array([[1, -1], [-1, -1]])
        one = np.array([[1, 1], [1, -1]])
        return np.kron(conf, one) + np.kron((conf == 0).astype(np.int64), zero)
    if kind == "kronecker":
        return np.kron(_from_recipe(recipe[1]), _from_recipe(recipe[2]))
    raise ValueError(recipe)


def hadamard(order: int) -> np.ndarray:
    """A normalised Hadamard matrix of ``order`` (+-1 entries, first row and column +1).

    Raises
    ------
    ParameterError
        When ``order`` is not 1, 2 or a multiple of 4 that this module can build.
    """
    recipe = hadamard_recipe(order)
    if recipe is None:
        _, missing = hadamard_orders(MAX_ORDER)
        raise ParameterError(
            f"no Hadamard matrix of order {order} here: orders are 1, 2 and multiples of 4 "
            f"up to {MAX_ORDER} except {', '.join(map(str, missing))}")
    h = _from_recipe(recipe)
    h = h * h[:, :1]  # normalise the first column, then the first row
    h = h * h[:1, :]
    return h


def _binary(h: np.ndarray) -> np.ndarray:
    return (h < 0).astype(np.uint8)


def hadamard_code(order: int, variant: str) -> Code:
    """The code ``variant`` in ``{"A", "A'", "B", "C"}`` from the Hadamard matrix of ``order``.

    Parameters (n, M, d): A (N-1, N, N/2); A' (N-2, N/2, N/2); B (N-1, 2N, N/2-1);
    C (N, 2N, N/2), with N = order.
    """
    if variant not in ("A", "A'", "B", "C"):
        raise ParameterError(f"Hadamard code variant must be A, A', B or C, got {variant!r}")
    if order < 2 or (variant in ("A'", "B") and order < 4):
        raise ParameterError(f"the {variant} code needs order >= {2 if variant in 'AC' else 4}")
    h = _binary(hadamard(order))
    a = h[:, 1:]
    if variant == "A":
        return Code(a, 2)
    if variant == "A'":
        return Code(a[a[:, 0] == 0][:, 1:], 2)
    if variant == "B":
        return Code(np.vstack([a, 1 - a]), 2)
    return Code(np.vstack([h, 1 - h]), 2)


def plotkin_size(n: int, d: int) -> int:
    """The binary Plotkin bound in the range 2d > n (d even), 2d = n, or through d + 1."""
    if d % 2:
        return plotkin_size(n + 1, d + 1)
    if 2 * d == n:
        return 4 * d
    if 2 * d < n:
        raise ParameterError(f"({n}, {d}) is outside the Plotkin range 2d >= n")
    return 2 * (d // (2 * d - n))


def levenshtein_plan(n: int, d: int) -> list[tuple[str, int, int]]:
    """The blocks ``(variant, order, copies)`` of Levenshtein's code for even d, n <= 2d."""
    if d % 2 or not (d <= n <= 2 * d):
        raise ParameterError(f"Levenshtein's plan needs even d and d <= n <= 2d, got ({n}, {d})")
    if n == 2 * d:
        return [("C", 2 * d, 1)]
    k = d // (2 * d - n)
    a = d * (2 * k + 1) - n * (k + 1)
    b = k * n - d * (2 * k - 1)
    plan = []
    if a // 2:
        plan.append(("A'", 4 * k, a // 2))
    if b // 2:
        plan.append(("A'", 4 * k + 4, b // 2))
    if a % 2:
        plan.append(("A", 2 * k, 1))
    if b % 2:
        plan.append(("A", 2 * k + 2, 1))
    return plan


def levenshtein_orders(n: int, d: int) -> list[int]:
    """Hadamard orders Levenshtein's code for binary (n, d) needs."""
    if d % 2:
        return levenshtein_orders(n + 1, d + 1)
    return sorted({order for _, order, _ in levenshtein_plan(n, d)})


def levenshtein_code(n: int, d: int) -> Code:
    """Levenshtein's binary code of length n, distance d, 2d > n (or 2d = n, d even),
    of size :func:`plotkin_size`.
    """
    if not (1 <= d <= n and 2 * d >= n) or (2 * d == n and d % 2):
        raise ParameterError(
            f"Levenshtein's codes need 1 <= d <= n < 2d (or n = 2d with d even), got n={n}, d={d}")
    if d % 2:
        return Code(levenshtein_code(n + 1, d + 1).words[:, :-1], 2)
    size = plotkin_size(n, d)
    parts = []
    for variant, order, copies in levenshtein_plan(n, d):
        block = hadamard_code(order, variant).words[:size]
        parts.extend([block] * copies)
    return Code(np.hstack(parts), 2)


def conference_code(q: int) -> Code:
    """The (q, 2q + 2, (q - 1)/2) conference-matrix code, q = 1 (mod 4) a prime power."""
    if q < 5 or q % 4 != 1 or prime_power(q) is None or q > 4096:
        raise ParameterError(
            f"conference-matrix codes need a prime power q = 1 (mod 4), 5 <= q <= 4096; got {q}")
    s = _jacobsthal(q)
    eye = np.eye(q, dtype=np.int64)
    one = np.ones((q, q), dtype=np.int64)
    rows = np.vstack([(s + eye + one) // 2, (-s + eye + one) // 2,
                      np.zeros((1, q), np.int64), np.ones((1, q), np.int64)])
    return Code(rows.astype(np.uint8), 2)
