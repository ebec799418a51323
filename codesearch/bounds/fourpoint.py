"""Size of the four-point semidefinite program for binary codes, announced before anything is built.

Problem
-------
The four-point bound of Gijswijt, Mittelmann and Schrijver has one variable per orbit of
codes ``S`` with ``|S| <= 4`` under the automorphisms of the cube, and requires the matrix
``(x(C u C'))`` indexed by codes of size at most 2 to be PSD. This module does not solve it:
it estimates the program's size from first principles, so that a request can be refused
with one line naming that size before any memory is spent.

Estimate
--------
An ordered 4-tuple ``(0, u, v, w)`` is determined up to coordinate permutations by how many
of its ``n`` columns ``(0, u_i, v_i, w_i)`` take each of the 8 possible values: ``C(n+7, 7)``
orbits. An unordered 4-set modulo translations gives at most ``4! = 24`` of them, so the
program has at least ``m = C(n+7, 7) / 24`` variables. Every interior-point method (Clarabel,
SCS's direct mode, SDPA) factors an ``m x m`` Schur-complement matrix at each iteration:
at least ``8 m^2`` bytes of memory and ``m^3 / 3`` floating-point operations per iteration,
whatever the block structure. These are lower bounds: the program is at least this large.

On this machine (24 GB, 2 cores, about 8 * 10^9 flop/s per core measured with numpy's
Cholesky on 5000 x 5000) that is: n = 17, m >= 14 421, 1.7 GB, ~1 minute per iteration;
n = 20, m >= 37 001, 11 GB, ~18 minutes per iteration; n = 21, m >= 49 335, 19.5 GB,
~40 minutes; from n = 22 on (m >= 65 032, 34 GB) the factor alone does not fit in memory.

References
----------
D. C. Gijswijt, H. D. Mittelmann and A. Schrijver, "Semidefinite code bounds based on
quadruple distances", IEEE Trans. Inform. Theory 58 (2012) 2697-2705.
"""

from __future__ import annotations

from dataclasses import dataclass
from math import comb

from codesearch.errors import ParameterError
from codesearch.model import Params

__all__ = ["FourPointSize", "four_point_size", "check_four_point_fits", "MEMORY_BYTES",
           "FLOPS_PER_SECOND"]

#: Memory available to one solve (the machine's 24 GB).
MEMORY_BYTES = 24 * 10**9
#: Sustained dense floating-point rate of both cores together (numpy Cholesky, measured).
FLOPS_PER_SECOND = 16 * 10**9


@dataclass(frozen=True)
class FourPointSize:
    """Lower bounds on the size of the four-point program of length ``n``.

    Attributes
    ----------
    n : int
    variables : int
        At least this many variables (orbits of 4-point codes).
    schur_bytes : int
        Memory of the dense Schur complement, ``8 * variables^2``.
    seconds_per_iteration : float
        ``variables^3 / 3`` floating-point operations at :data:`FLOPS_PER_SECOND`.
    """

    n: int
    variables: int
    schur_bytes: int
    seconds_per_iteration: float

    @property
    def fits(self) -> bool:
        return self.schur_bytes <= MEMORY_BYTES

    def describe(self) -> str:
        return (f"four-point SDP for n={self.n}: at least {self.variables:,} variables, "
                f"Schur complement >= {self.schur_bytes / 1e9:.1f} GB, "
                f">= {self.seconds_per_iteration / 60:.0f} min per interior-point iteration")


def four_point_size(n: int) -> FourPointSize:
    """Lower bounds on the four-point program of binary length ``n`` (see the module notes)."""
    m = comb(n + 7, 7) // 24
    return FourPointSize(n=n, variables=m, schur_bytes=8 * m * m,
                         seconds_per_iteration=m**3 / 3 / FLOPS_PER_SECOND)


def check_four_point_fits(params: Params) -> FourPointSize:
    """Raise :class:`ParameterError` with one line naming the estimated size.

    The program is refused when it cannot fit in :data:`MEMORY_BYTES`, and also when it
    would fit: its symmetry reduction (the S_n-isotypic decomposition of the matrices
    indexed by pairs of words) is not built in this version, so nothing is solved.
    """
    if params.q != 2:
        raise ParameterError("the four-point bound is for binary codes")
    size = four_point_size(params.n)
    if not size.fits:
        raise ParameterError(f"{size.describe()}: beyond the {MEMORY_BYTES / 1e9:.0f} GB "
                             "of this machine, not built")
    raise ParameterError(f"{size.describe()}: its symmetry reduction is not implemented, "
                         "not built")
