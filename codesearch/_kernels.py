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


def plane_count(q: int) -> int:
    """Number of bit planes needed for symbols 0..q-1, ``ceil(log2 q)``."""
    return max(1, (int(q) - 1).bit_length())


def limb_count(n: int) -> int:
    """Number of 64-bit limbs per plane for words of length n."""
    return (int(n) + 63) // 64


def pack_words(words: np.ndarray, q: int) -> np.ndarray:
    """Pack an (M, n) uint8 symbol array into the (M, P*L) uint64 plane layout (see module doc).

    Pure numpy (no compilation); bit j of limb l of plane p is bit p of the symbol at position
    64 l + j.
    """
    words = np.ascontiguousarray(words, dtype=np.uint8)
    m, n = words.shape
    planes, limbs = plane_count(q), limb_count(n)
    out = np.zeros((m, planes * limbs), dtype=np.uint64)
    if m == 0:
        return out
    pad = limbs * 64 - n
    for p in range(planes):
        bits = (words >> np.uint8(p)) & np.uint8(1)
        if pad:
            bits = np.concatenate([bits, np.zeros((m, pad), dtype=np.uint8)], axis=1)
        packed = np.packbits(bits, axis=1, bitorder="little")  # (m, limbs * 8) bytes
        out[:, p * limbs : (p + 1) * limbs] = packed.view("<u8").astype(np.uint64, copy=False)
    return out


@nb.njit(nb.int64(nb.uint64[:, ::1], nb.int64, nb.int64, nb.int64, nb.int64), cache=True,
         inline="always")
def _pair_distance(packed, i, j, planes, limbs):
    acc = 0
    for l in range(limbs):
        x = nb.uint64(0)
        for p in range(planes):
            x |= packed[i, p * limbs + l] ^ packed[j, p * limbs + l]
        acc += popcount64(x)
    return acc


@nb.njit(nb.int64[::1](nb.uint64[:, ::1], nb.int64, nb.int64, nb.int64), cache=True,
         parallel=True)
def distance_distribution_packed(packed, planes, limbs, n):
    """Number of unordered pairs {i < j} at each distance 0..n (int64 array of length n + 1).

    Rows are dealt to chunks round-robin so that the triangle of pairs is evenly shared; each
    chunk keeps four sub-histograms so that consecutive increments rarely hit the same counter
    (breaking the store-to-load dependency of a single histogram).
    """
    m = packed.shape[0]
    chunks = min(m, 512)
    hist = np.zeros((max(chunks, 1), n + 1), dtype=np.int64)
    width = planes * limbs
    for c in nb.prange(chunks):
        h = np.zeros((4, n + 1), dtype=np.int64)
        for i in range(c, m, chunks):
            if width == 1:
                a = packed[i, 0]
                j = i + 1
                while j + 3 < m:
                    h[0, popcount64(a ^ packed[j, 0])] += 1
                    h[1, popcount64(a ^ packed[j + 1, 0])] += 1
                    h[2, popcount64(a ^ packed[j + 2, 0])] += 1
                    h[3, popcount64(a ^ packed[j + 3, 0])] += 1
                    j += 4
                while j < m:
                    h[0, popcount64(a ^ packed[j, 0])] += 1
                    j += 1
            elif limbs == 1 and planes == 2:
                a0 = packed[i, 0]
                a1 = packed[i, 1]
                for j in range(i + 1, m):
                    x = (a0 ^ packed[j, 0]) | (a1 ^ packed[j, 1])
                    h[j & 3, popcount64(x)] += 1
            elif limbs == 1 and planes == 3:
                a0 = packed[i, 0]
                a1 = packed[i, 1]
                a2 = packed[i, 2]
                for j in range(i + 1, m):
                    x = (a0 ^ packed[j, 0]) | (a1 ^ packed[j, 1]) | (a2 ^ packed[j, 2])
                    h[j & 3, popcount64(x)] += 1
            else:
                row = packed[i].copy()
                for j in range(i + 1, m):
                    acc = 0
                    for l in range(limbs):
                        x = nb.uint64(0)
                        for p in range(planes):
                            x |= row[p * limbs + l] ^ packed[j, p * limbs + l]
                        acc += popcount64(x)
                    h[j & 3, acc] += 1
        for k in range(n + 1):
            hist[c, k] = h[0, k] + h[1, k] + h[2, k] + h[3, k]
    out = np.zeros(n + 1, dtype=np.int64)
    for c in range(chunks):
        for k in range(n + 1):
            out[k] += hist[c, k]
    return out


@nb.njit(nb.int64[::1](nb.uint64[:, ::1], nb.int64, nb.int64, nb.int64), cache=True)
def first_close_pair_packed(packed, planes, limbs, below):
    """First pair (i, j), i < j in row order, at distance < ``below``; returns [i, j, dist].

    Returns [-1, -1, min_distance] when no such pair exists (min over all pairs, or n + 1
    sentinel 2**62 for fewer than two words). Exits at the first offending pair.
    """
    m = packed.shape[0]
    best = np.int64(1) << 62
    for i in range(m):
        for j in range(i + 1, m):
            dist = _pair_distance(packed, i, j, planes, limbs)
            if dist < below:
                return np.array([i, j, dist], dtype=np.int64)
            if dist < best:
                best = dist
    return np.array([-1, -1, best], dtype=np.int64)


@nb.njit(nb.int64[::1](nb.uint64[:, ::1], nb.int64), cache=True, parallel=True)
def gray_weight_distribution_binary(gen_packed, n):
    """Weight distribution of the binary linear code spanned by the k rows of ``gen_packed``.

    ``gen_packed`` is (k, L) uint64 (one plane). All 2**k codewords are visited in Gray-code
    order, each reached from the previous by one row XOR; the range of ranks is split into
    chunks whose first codeword is computed directly from its Gray code.
    """
    k = gen_packed.shape[0]
    limbs = gen_packed.shape[1]
    total = np.int64(1) << k
    chunks = 64 if total >= 4096 else 1
    per = (total + chunks - 1) // chunks
    hist = np.zeros((chunks, n + 1), dtype=np.int64)
    for c in nb.prange(chunks):
        start = c * per
        stop = min(total, start + per)
        if start >= stop:
            continue
        word = np.zeros(limbs, dtype=np.uint64)
        g = start ^ (start >> 1)
        for r in range(k):
            if (g >> r) & 1:
                for l in range(limbs):
                    word[l] ^= gen_packed[r, l]
        for t in range(start, stop):
            w = 0
            for l in range(limbs):
                w += popcount64(word[l])
            hist[c, w] += 1
            # next Gray code flips the bit of the lowest set bit of t + 1
            nxt = t + 1
            r = 0
            while (nxt >> r) & 1 == 0 and r < k:
                r += 1
            if r < k:
                for l in range(limbs):
                    word[l] ^= gen_packed[r, l]
    out = np.zeros(n + 1, dtype=np.int64)
    for c in range(chunks):
        for w in range(n + 1):
            out[w] += hist[c, w]
    return out


@nb.njit(nb.int64[::1](nb.int64[:, ::1], nb.int64), cache=True, parallel=True)
def odometer_weight_distribution(gen, p):
    """Weight distribution of the linear code over GF(p) (p prime) spanned by the rows of ``gen``.

    Codewords are visited with a base-p odometer over the k coefficients; each step adds one row
    mod p (plus one more row per carry), so the work is O(p**k * n). The leading coefficient is
    split across parallel chunks.
    """
    k, n = gen.shape
    rest = np.int64(1)
    for _ in range(max(k - 1, 0)):
        rest *= p
    lead = p if k >= 1 else 1
    hist = np.zeros((lead, n + 1), dtype=np.int64)
    for c in nb.prange(lead):
        word = np.zeros(n, dtype=np.int64)
        if k >= 1:
            for x in range(n):
                word[x] = (c * gen[0, x]) % p
        digits = np.zeros(max(k, 1), dtype=np.int64)
        for t in range(rest):
            w = 0
            for x in range(n):
                if word[x] != 0:
                    w += 1
            hist[c, w] += 1
            r = 1
            while r < k:
                for x in range(n):
                    word[x] = (word[x] + gen[r, x]) % p
                digits[r] += 1
                if digits[r] < p:
                    break
                digits[r] = 0  # p additions of the row brought the word back: carry
                r += 1
    out = np.zeros(n + 1, dtype=np.int64)
    for c in range(lead):
        for w in range(n + 1):
            out[w] += hist[c, w]
    return out


@nb.njit(nb.int64(nb.uint8[:, ::1], nb.int64, nb.int64), cache=True)
def gf_rank(words, p, limit):
    """Rank over GF(p) (p prime) of the rows of ``words``, stopping once it exceeds ``limit``.

    Rows are reduced one at a time against a basis kept in echelon form (each basis row is zero
    in the pivot columns of the rows before it), so memory is O(n^2) whatever the number of rows.
    """
    m, n = words.shape
    basis = np.zeros((n, n), dtype=np.int64)
    pivcol = np.full(n, -1, dtype=np.int64)
    row = np.zeros(n, dtype=np.int64)
    r = 0
    for i in range(m):
        for x in range(n):
            row[x] = words[i, x]
        for b in range(r):
            f = row[pivcol[b]]
            if f != 0:
                g = p - f
                for x in range(n):
                    row[x] = (row[x] + g * basis[b, x]) % p
        piv = -1
        for x in range(n):
            if row[x] != 0:
                piv = x
                break
        if piv < 0:
            continue
        inv = 1  # row[piv] ** (p - 2) mod p, Fermat
        base = row[piv]
        e = p - 2
        while e > 0:
            if e & 1:
                inv = (inv * base) % p
            base = (base * base) % p
            e >>= 1
        for x in range(n):
            basis[r, x] = (row[x] * inv) % p
        pivcol[r] = piv
        r += 1
        if r > limit or r == n:
            return r
    return r


# ======================================================================= clique engine (exact search)


# ======================================================================= heuristics (greedy, local search)
