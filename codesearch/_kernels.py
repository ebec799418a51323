"""All numba kernels of codesearch, in one module.

Kernels see arrays and integers only; every input is an argument (no globals). They are
compiled lazily on first call and cached on disk (``cache=True``), so importing this module
is cheap but importing it at all is reserved for code that needs a kernel.

Each kernel has a slow, obviously correct twin in :mod:`codesearch._reference`; the tests
compare the two on random inputs.

Packed words
------------
A word of length n over q symbols is stored as ``P = ceil(log2 q)`` bit planes of
``L = ceil(n / 64)`` uint64 limbs, planes contiguous: ``packed[i, p * L + l]`` holds bit p of
the symbols at positions ``64 l .. 64 l + 63``. Two words differ at a position iff some plane
differs there, so ``dist(x, y) = sum_l popcount(OR_p (x[p, l] XOR y[p, l]))``.
"""

from __future__ import annotations

import numba as nb
import numpy as np
from llvmlite import ir
from numba.core import types
from numba.extending import intrinsic


@intrinsic
def popcount64(typingctx, x):
    """Population count of a uint64 through LLVM's ctpop (one POPCNT instruction)."""
    sig = types.uint64(types.uint64)

    def codegen(context, builder, signature, args):
        return builder.ctpop(args[0])

    return sig, codegen


# ======================================================================= distances (foundation)


# ======================================================================= clique engine (exact search)


# ======================================================================= heuristics (greedy, local search)
