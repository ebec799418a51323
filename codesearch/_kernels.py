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
    if planes == 1:
        # binary: packbits writes the bytes of each limb directly (no padded bit temporaries)
        raw = np.packbits(words, axis=1, bitorder="little")
        buf = out.view(np.uint8).reshape(m, limbs * 8)
        buf[:, : raw.shape[1]] = raw
        return out
    pad = limbs * 64 - n
    # rows go in blocks so that the temporaries stay O(block * n), whatever M is
    block = 8192
    for lo in range(0, m, block):
        chunk = words[lo : lo + block]
        for p in range(planes):
            bits = (chunk >> np.uint8(p)) & np.uint8(1)
            if pad:
                bits = np.concatenate([bits, np.zeros((bits.shape[0], pad), dtype=np.uint8)], axis=1)
            packed = np.packbits(bits, axis=1, bitorder="little")  # (rows, limbs * 8) bytes
            out[lo : lo + block, p * limbs : (p + 1) * limbs] = packed.view("<u8")
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


@nb.njit(nb.void(nb.uint64[:, ::1], nb.int64, nb.int64, nb.int64, nb.int64, nb.int64[:, ::1]),
         cache=True)
def _distance_rows(packed, planes, limbs, first, step, h):
    """Add to ``h[k & 3, dist]`` the pairs (i, j > i) for rows i = first, first + step, ...

    Kept out of the parallel loop on purpose: compiled as a plain function, its inner loops
    keep the optimisations that a prange body loses (measured: about twice the speed).
    Four sub-histograms let consecutive increments proceed without waiting on each other.
    """
    m = packed.shape[0]
    for i in range(m):  # not range(first, m, step): that hides i >= 0 and costs index checks
        if i % step != first:
            continue
        if planes * limbs == 1:
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
            j = i + 1
            while j + 1 < m:
                h[0, popcount64((a0 ^ packed[j, 0]) | (a1 ^ packed[j, 1]))] += 1
                h[1, popcount64((a0 ^ packed[j + 1, 0]) | (a1 ^ packed[j + 1, 1]))] += 1
                j += 2
            if j < m:
                h[0, popcount64((a0 ^ packed[j, 0]) | (a1 ^ packed[j, 1]))] += 1
        elif limbs == 1 and planes == 3:
            a0 = packed[i, 0]
            a1 = packed[i, 1]
            a2 = packed[i, 2]
            j = i + 1
            while j + 3 < m:
                x0 = (a0 ^ packed[j, 0]) | (a1 ^ packed[j, 1]) | (a2 ^ packed[j, 2])
                x1 = (a0 ^ packed[j + 1, 0]) | (a1 ^ packed[j + 1, 1]) | (a2 ^ packed[j + 1, 2])
                x2 = (a0 ^ packed[j + 2, 0]) | (a1 ^ packed[j + 2, 1]) | (a2 ^ packed[j + 2, 2])
                x3 = (a0 ^ packed[j + 3, 0]) | (a1 ^ packed[j + 3, 1]) | (a2 ^ packed[j + 3, 2])
                h[0, popcount64(x0)] += 1
                h[1, popcount64(x1)] += 1
                h[2, popcount64(x2)] += 1
                h[3, popcount64(x3)] += 1
                j += 4
            while j < m:
                h[0, popcount64((a0 ^ packed[j, 0]) | (a1 ^ packed[j, 1]) | (a2 ^ packed[j, 2]))] += 1
                j += 1
        else:
            for j in range(i + 1, m):
                acc = 0
                for l in range(limbs):
                    x = nb.uint64(0)
                    for p in range(planes):
                        x |= packed[i, p * limbs + l] ^ packed[j, p * limbs + l]
                    acc += popcount64(x)
                h[j & 3, acc] += 1


@nb.njit(nb.int64[::1](nb.uint64[:, ::1], nb.int64, nb.int64, nb.int64), cache=True,
         parallel=True)
def distance_distribution_packed(packed, planes, limbs, n):
    """Number of unordered pairs {i < j} at each distance 0..n (int64 array of length n + 1).

    Rows are dealt to chunks round-robin so that the triangle of pairs is evenly shared
    between threads; each chunk fills its own histograms.
    """
    m = packed.shape[0]
    chunks = min(m, 64)
    hist = np.zeros((max(chunks, 1), n + 1), dtype=np.int64)
    for c in nb.prange(chunks):
        h = np.zeros((4, n + 1), dtype=np.int64)
        _distance_rows(packed, planes, limbs, c, chunks, h)
        hist[c] = h.sum(axis=0)
    return hist.sum(axis=0)


def pack_interleaved(words: np.ndarray, q: int) -> np.ndarray:
    """Pack each q-ary word into one uint64, symbol k in bits ``P k .. P k + P - 1``.

    Only for ``n * P <= 64`` and ``P = ceil(log2 q) >= 2``. Two words differ at position k iff
    their XOR is nonzero in group k; :func:`interleaved_masks` gives the masks with which
    :func:`distance_distribution_interleaved` tests every group at once.
    """
    words = np.ascontiguousarray(words, dtype=np.uint8)
    planes = plane_count(q)
    out = np.zeros(words.shape[0], dtype=np.uint64)
    for k in range(words.shape[1]):
        out |= words[:, k].astype(np.uint64) << np.uint64(planes * k)
    return out


def interleaved_masks(n: int, planes: int) -> tuple[int, int]:
    """``(low, high)``: the lower ``planes - 1`` bits and the top bit of each of n groups."""
    low = sum(((1 << (planes - 1)) - 1) << (planes * k) for k in range(n))
    high = sum(1 << (planes * k + planes - 1) for k in range(n))
    return low, high


@nb.njit(nb.void(nb.uint64[::1], nb.uint64, nb.uint64, nb.int64, nb.int64, nb.int64[:, ::1]),
         cache=True)
def _interleaved_rows(col, low, high, first, step, h):
    """Histogram rows first, first + step, ... of an interleaved q-ary code (see pack_interleaved).

    Group test without shifts: for x = a ^ b, ``(x & low) + low`` carries into the top bit of
    a group iff the group's lower bits are not all zero (the sum stays below 2^P, so no carry
    leaves the group); OR-ing x adds the top bit itself. So ``((x & low) + low | x) & high``
    has one bit per differing position: four operations, whatever the number of planes.
    """
    m = col.shape[0]
    for i in range(m):  # not range(first, m, step): that hides i >= 0 and costs index checks
        if i % step != first:
            continue
        a = col[i]
        j = i + 1
        while j + 3 < m:
            x0 = a ^ col[j]
            x1 = a ^ col[j + 1]
            x2 = a ^ col[j + 2]
            x3 = a ^ col[j + 3]
            h[0, popcount64((((x0 & low) + low) | x0) & high)] += 1
            h[1, popcount64((((x1 & low) + low) | x1) & high)] += 1
            h[2, popcount64((((x2 & low) + low) | x2) & high)] += 1
            h[3, popcount64((((x3 & low) + low) | x3) & high)] += 1
            j += 4
        while j < m:
            x0 = a ^ col[j]
            h[0, popcount64((((x0 & low) + low) | x0) & high)] += 1
            j += 1


@nb.njit(nb.int64[::1](nb.uint64[::1], nb.uint64, nb.uint64, nb.int64), cache=True,
         parallel=True)
def distance_distribution_interleaved(col, low, high, n):
    """Pairs at each distance 0..n for a q-ary code packed by :func:`pack_interleaved`.

    One 64-bit load per pair instead of one per plane: the fast path for short q-ary codes.
    ``low`` and ``high`` come from :func:`interleaved_masks`.
    """
    m = col.shape[0]
    chunks = min(m, 64)
    hist = np.zeros((max(chunks, 1), n + 1), dtype=np.int64)
    for c in nb.prange(chunks):
        h = np.zeros((4, n + 1), dtype=np.int64)
        _interleaved_rows(col, low, high, c, chunks, h)
        hist[c] = h.sum(axis=0)
    return hist.sum(axis=0)


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
    return hist.sum(axis=0)


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
    return hist.sum(axis=0)


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


@nb.njit(nb.int64(nb.uint64[:, ::1], nb.int64, nb.int64), cache=True, parallel=True)
def least_weight_of_row_sums_binary(gen, w, best):
    """Least weight among the sums of exactly ``w`` distinct rows of ``gen`` (binary, packed).

    ``gen`` is (k, L) uint64 (one plane). Returns ``best`` when no sum is lighter. The
    combinations are visited depth first keeping the partial sums of every prefix, so each
    costs one row XOR; the first row of a combination is spread over 64 interleaved chunks
    (the number of combinations falls with the first row, so a contiguous split would not
    balance).
    """
    k, limbs = gen.shape
    chunks = 64
    out = np.full(chunks, best, dtype=np.int64)
    if w < 1 or w > k:
        return best
    for c in nb.prange(chunks):
        idx = np.zeros(w, dtype=np.int64)
        acc = np.zeros((w + 1, limbs), dtype=np.uint64)  # acc[t]: sum of rows idx[0..t-1]
        local = best
        for i0 in range(k - w + 1):
            if i0 % chunks != c:
                continue
            idx[0] = i0
            for l in range(limbs):
                acc[1, l] = gen[i0, l]
            if w == 1:
                wt = 0
                for l in range(limbs):
                    wt += popcount64(acc[1, l])
                local = min(local, wt)
                continue
            t = 1
            idx[1] = i0
            while t >= 1:
                idx[t] += 1
                if idx[t] > k - w + t:  # too few rows left after it: back up
                    t -= 1
                    continue
                r = idx[t]
                for l in range(limbs):
                    acc[t + 1, l] = acc[t, l] ^ gen[r, l]
                if t + 1 == w:
                    wt = 0
                    for l in range(limbs):
                        wt += popcount64(acc[w, l])
                    if wt < local:
                        local = wt
                else:
                    t += 1
                    idx[t] = idx[t - 1]
        out[c] = local
    return out.min()


@nb.njit(nb.int64(nb.int64[:, ::1], nb.int64, nb.int64, nb.int64), cache=True, parallel=True)
def least_weight_of_row_sums_prime(gen, p, w, best):
    """Least weight among the combinations of exactly ``w`` distinct rows of ``gen`` over GF(p)
    with nonzero coefficients, the first coefficient 1 (the others are its scalar multiples,
    of the same weight). Returns ``best`` when none is lighter. As
    :func:`least_weight_of_row_sums_binary`, depth first with the partial sums of prefixes.
    """
    k, n = gen.shape
    chunks = 64
    out = np.full(chunks, best, dtype=np.int64)
    if w < 1 or w > k:
        return best
    for c in nb.prange(chunks):
        idx = np.zeros(w, dtype=np.int64)
        coef = np.zeros(w, dtype=np.int64)
        acc = np.zeros((w + 1, n), dtype=np.int64)
        local = best
        for i0 in range(k - w + 1):
            if i0 % chunks != c:
                continue
            idx[0] = i0
            for x in range(n):
                acc[1, x] = gen[i0, x]
            if w == 1:
                wt = 0
                for x in range(n):
                    if acc[1, x] != 0:
                        wt += 1
                local = min(local, wt)
                continue
            t = 1
            idx[1] = i0
            coef[1] = p - 1  # so that the first step moves on to the next row
            while t >= 1:
                coef[t] += 1
                if coef[t] == p:
                    coef[t] = 1
                    idx[t] += 1
                    if idx[t] > k - w + t:
                        t -= 1
                        continue
                r = idx[t]
                a = coef[t]
                for x in range(n):
                    acc[t + 1, x] = (acc[t, x] + a * gen[r, x]) % p
                if t + 1 == w:
                    wt = 0
                    for x in range(n):
                        if acc[w, x] != 0:
                            wt += 1
                    if wt < local:
                        local = wt
                else:
                    t += 1
                    idx[t] = idx[t - 1]
                    coef[t] = p - 1
        out[c] = local
    return out.min()


# ======================================================================= large binary codes
# Checks of binary codes of up to 2^24+ words (n <= 64) in time linear in M: the word as one
# uint64 (bit j = position j).


@nb.njit(nb.types.UniTuple(nb.int64, 3)(nb.uint64[::1], nb.uint64[::1]), cache=True)
def binary_span_check(words, basis):
    """Rank of the rows over GF(2), whether they are pairwise distinct *given* that there are
    exactly 2^rank of them, and the least weight of a nonzero row.

    Returns ``(rank, distinct, min_weight)``: ``distinct`` is 1 when ``M == 2^rank`` and no two
    rows are equal (then the rows are exactly their span, a linear code), else 0;
    ``min_weight`` is 65 when every row is zero. ``basis`` (64 entries) receives a reduced
    basis of the span in its first ``rank`` entries: pivot bits cleared in the other basis
    rows, so the coordinates of a span element are read off its pivot bits, and
    distinctness is a table of 2^rank flags.
    """
    m = words.shape[0]
    basis[:] = 0
    piv = np.zeros(64, dtype=np.uint64)
    r = 0
    one = np.uint64(1)
    zero = np.uint64(0)
    minw = 65
    for i in range(m):
        w = words[i]
        if w != zero:
            c = popcount64(w)
            if c < minw:
                minw = c
        for b in range(r):
            if w & piv[b]:
                w ^= basis[b]
        if w == zero:
            continue
        low = w & (~w + one)  # lowest set bit: the new pivot
        for b in range(r):
            if basis[b] & low:
                basis[b] ^= w
        basis[r] = w
        piv[r] = low
        r += 1
    if r > 40 or m != (1 << r):
        return r, 0, minw
    seen = np.zeros(1 << r, dtype=np.uint8)
    for i in range(m):
        w = words[i]
        idx = 0
        for b in range(r):
            if w & piv[b]:
                idx |= 1 << b
        if seen[idx]:
            return r, 0, minw
        seen[idx] = 1
    return r, 1, minw


@nb.njit(nb.int64(nb.uint64[::1], nb.int64, nb.uint64[::1], nb.uint64[::1]), cache=True)
def binary_ball_clash(words, nbits, ball, probe):
    """First row index whose ball meets another row's ball, or -1 (bitmap of 2^nbits bits).

    Each row ``w`` marks ``w ^ m`` for the masks ``m`` in ``ball`` (weights <= r), stopping at
    a word already marked (two rows within 2r). Then each row probes ``w ^ m`` for ``m`` in
    ``probe`` (weight r + 1): a marked word there lies within r of another row, so the two rows
    are within 2r + 1.
    """
    m = words.shape[0]
    bitmap = np.zeros(((np.int64(1) << nbits) + 63) >> 6, dtype=np.uint64)
    one = np.uint64(1)
    six = np.uint64(6)
    low6 = np.uint64(63)
    for i in range(m):
        for t in range(ball.shape[0]):
            x = words[i] ^ ball[t]
            slot = x >> six
            bit = one << (x & low6)
            if bitmap[slot] & bit:
                return i
            bitmap[slot] |= bit
    for i in range(m):
        for t in range(probe.shape[0]):
            x = words[i] ^ probe[t]
            if bitmap[x >> six] & (one << (x & low6)):
                return i
    return -1


@nb.njit(nb.int64(nb.int64[::1], nb.int64, nb.int64, nb.int64[::1], nb.int64[::1],
                  nb.int64[::1], nb.int64), cache=True)
def qary_ball_clash(idx, q, n, pat_ptr, pat_pos, pat_add, probe_from):
    """First row whose ball meets another row's ball, or -1; words given by their base-q
    index (digit j = coordinate j), a bitmap of q^n bits.

    Pattern t changes the digits ``pat_pos[pat_ptr[t]:pat_ptr[t+1]]`` by adding
    ``pat_add[...]`` mod q. Patterns ``0..probe_from-1`` (the radius-r ball) are marked, a
    word found marked means two rows within 2r; patterns ``probe_from..`` (the radius-(r+1)
    sphere, for even d) are then probed: a marked word there means two rows within 2r + 1.
    """
    m = idx.shape[0]
    total = 1
    for _ in range(n):
        total *= q
    pw = np.ones(n, dtype=np.int64)
    for j in range(1, n):
        pw[j] = pw[j - 1] * q
    bitmap = np.zeros((total + 63) >> 6, dtype=np.uint64)
    one = np.uint64(1)
    npat = pat_ptr.shape[0] - 1
    for phase in range(2):
        lo = 0 if phase == 0 else probe_from
        hi = probe_from if phase == 0 else npat
        for i in range(m):
            x = idx[i]
            for t in range(lo, hi):
                y = x
                for e in range(pat_ptr[t], pat_ptr[t + 1]):
                    j = pat_pos[e]
                    dig = (x // pw[j]) % q
                    y += (((dig + pat_add[e]) % q) - dig) * pw[j]
                slot = y >> 6
                bit = one << np.uint64(y & 63)
                if bitmap[slot] & bit:
                    return i
                if phase == 0:
                    bitmap[slot] |= bit
    return -1


# ======================================================================= clique engine (exact search)
#
# Bitset branch and bound for the maximum (weight) clique, after BBMC (San Segundo, Rodriguez-Losada
# and Jimenez 2011) with the colouring bound of Tomita's MCQ/MCS and Kumlander's weighted variant
# (the bound of a colour class is its heaviest vertex; unit weights give the colour count).
#
# Graphs are (N, W) uint64 arrays: bit j of row i (limb j >> 6, bit j & 63) says i ~ j. The
# search is iterative over an explicit stack held in caller-owned arrays, so it can stop after a
# node budget and resume exactly where it was (the Python driver loops in chunks to honour a
# wall-clock limit; numba cannot read the clock cheaply).
#
# Stack layout, level k (the clique has k vertices, clique[0..k)):
#   pst[k]          candidate bitset P_k (vertices adjacent to all of clique[0..k))
#   lst[k, 0..cnt)  branching list: vertices of P_k in colour-class order, only those whose
#                   cumulative class bound can still beat the incumbent
#   bst[k, 0..cnt)  cumulative bound of each listed vertex's class (non-decreasing)
#   pos[k]          next list index to branch on (the list is consumed from the end)
#   cw[k]           weight of clique[0..k)
# state = [depth, best weight, best size, nodes, phase (0 fresh, 1 running, 2 done), goal]
# where a positive goal stops the search as soon as the incumbent weighs at least that much.


@nb.njit(nb.int64(nb.uint64[:], nb.int64), cache=True)
def _bitset_count(row, nwords):
    c = 0
    for j in range(nwords):
        c += popcount64(row[j])
    return c


@nb.njit(cache=True)
def clique_colour_level(adj, weights, pst, lst, bst, cnt, pos, k, thr, scratch_q, scratch_c):
    """Colour P_k greedily and fill the branching list of level k.

    Classes are built one at a time as maximal independent sets taken in vertex order (lowest
    index first, which is the initial ordering after renumbering). A class enters the list
    only when its cumulative bound exceeds ``thr`` (= incumbent weight - clique weight);
    earlier classes stay in P_k but are never branched on, because every clique inside them
    weighs at most ``thr`` more than the current one. Returns the number of classes formed
    before stopping, for diagnostics.
    """
    nwords = pst.shape[1]
    for j in range(nwords):
        scratch_q[j] = pst[k, j]
    n_listed = 0
    cum = 0
    classes = 0
    while True:
        empty = True
        for j in range(nwords):
            if scratch_q[j] != 0:
                empty = False
                break
        if empty:
            break
        classes += 1
        for j in range(nwords):
            scratch_c[j] = scratch_q[j]
        start = n_listed
        heaviest = 0
        j = 0
        while j < nwords:
            word = scratch_c[j]
            if word == 0:
                j += 1
                continue
            low = word & (~word + np.uint64(1))
            b = popcount64(low - np.uint64(1))
            v = (j << 6) + b
            # v leaves the uncoloured set and takes its neighbours out of this class.
            scratch_q[j] &= ~low
            scratch_c[j] &= ~low
            for t in range(j, nwords):
                scratch_c[t] &= ~adj[v, t]
            w = weights[v]
            if w > heaviest:
                heaviest = w
            lst[k, n_listed] = v
            n_listed += 1
        cum += heaviest
        if cum <= thr:
            n_listed = start  # the whole class is pruned: drop it from the list
        else:
            for t in range(start, n_listed):
                bst[k, t] = cum
    cnt[k] = n_listed
    pos[k] = n_listed - 1
    return classes


@nb.njit(cache=True)
def clique_search(adj, weights, pst, lst, bst, cnt, pos, cw, clique, best_clique, state,
                  node_budget, scratch_q, scratch_c):
    """Run (or resume) the branch and bound until done or ``state[3] >= node_budget``.

    Returns 1 when the search space is exhausted (the incumbent in ``best_clique[:state[2]]``
    is then optimal among cliques heavier than the initial ``state[1]``), 0 when the node
    budget ran out first (call again to resume), 2 when the incumbent reached the goal
    ``state[5] > 0`` (resumable as well).
    """
    nwords = pst.shape[1]
    if state[4] == 2:
        return 1
    if state[4] == 0:
        cw[0] = 0
        clique_colour_level(adj, weights, pst, lst, bst, cnt, pos, 0, state[1], scratch_q,
                            scratch_c)
        state[0] = 0
        state[4] = 1
    depth = state[0]
    best = state[1]
    nodes = state[3]
    while True:
        if nodes >= node_budget:
            state[0] = depth
            state[1] = best
            state[3] = nodes
            return 0
        k = depth
        i = pos[k]
        if i < 0 or cw[k] + bst[k, i] <= best:
            # Level k is finished: every remaining listed vertex has a bound no better than
            # the incumbent (bounds decrease towards the front of the list).
            if k == 0:
                state[0] = 0
                state[1] = best
                state[3] = nodes
                state[4] = 2
                return 1
            depth = k - 1
            u = clique[depth]
            pst[depth, u >> 6] &= ~(np.uint64(1) << np.uint64(u & 63))
            pos[depth] -= 1
            continue
        v = lst[k, i]
        clique[k] = v
        nodes += 1
        wk = cw[k] + weights[v]
        nonempty = False
        for j in range(nwords):
            x = pst[k, j] & adj[v, j]
            pst[k + 1, j] = x
            if x != 0:
                nonempty = True
        if wk > best:
            # clique[0..k] is itself a clique heavier than the incumbent (weights > 0 make
            # every extension heavier still, but record it now: it is a valid witness).
            best = wk
            state[2] = k + 1
            for t in range(k + 1):
                best_clique[t] = clique[t]
            if state[5] > 0 and best >= state[5]:
                # Goal met. Leave v on the stack as if not yet expanded (pos unchanged), so a
                # resumed call branches on it again; the incumbent only grows.
                nodes -= 1
                state[0] = depth
                state[1] = best
                state[3] = nodes
                return 2
        if nonempty:
            cw[k + 1] = wk
            clique_colour_level(adj, weights, pst, lst, bst, cnt, pos, k + 1, best - wk,
                                scratch_q, scratch_c)
            if cnt[k + 1] > 0:
                depth = k + 1
                continue
        # Leaf or nothing worth branching below v: v is done at this level.
        pst[k, v >> 6] &= ~(np.uint64(1) << np.uint64(v & 63))
        pos[k] -= 1


@nb.njit(cache=True)
def clique_degeneracy_order(adj, n):
    """Vertices in smallest-last order, reversed: the returned order starts with the vertex
    removed last when repeatedly deleting a vertex of least remaining degree (ties: lowest
    index). Branch and bound colours in this order (Matula-Beck; Tomita's MCS uses it)."""
    nwords = adj.shape[1]
    deg = np.zeros(n, np.int64)
    for v in range(n):
        deg[v] = _bitset_count(adj[v], nwords)
    removed = np.zeros(n, np.bool_)
    out = np.empty(n, np.int64)
    for step in range(n - 1, -1, -1):
        bestv = -1
        bestd = n + 1
        for v in range(n):
            if not removed[v] and deg[v] < bestd:
                bestd = deg[v]
                bestv = v
        removed[bestv] = True
        out[step] = bestv
        for u in range(n):
            if not removed[u] and (adj[bestv, u >> 6] >> np.uint64(u & 63)) & np.uint64(1):
                deg[u] -= 1
    return out


@nb.njit(cache=True)
def clique_permute(adj, order, n):
    """Relabel the graph: new vertex i is old vertex ``order[i]``."""
    nwords = adj.shape[1]
    out = np.zeros((n, nwords), np.uint64)
    for i in range(n):
        a = order[i]
        for j in range(n):
            b = order[j]
            if (adj[a, b >> 6] >> np.uint64(b & 63)) & np.uint64(1):
                out[i, j >> 6] |= np.uint64(1) << np.uint64(j & 63)
    return out


@nb.njit(cache=True)
def clique_greedy(adj, weights, n, starts):
    """Best of ``starts`` greedy cliques: start at vertex s (s = 0..starts-1), then add
    vertices in index order when adjacent to all chosen. Returns (weight, size, vertices)."""
    nwords = adj.shape[1]
    cand = np.empty(nwords, np.uint64)
    best_w = 0
    best = np.empty(0, np.int64)
    chosen = np.empty(n, np.int64)
    for s in range(min(starts, n)):
        for j in range(nwords):
            cand[j] = adj[s, j]
        chosen[0] = s
        m = 1
        w = weights[s]
        for v in range(n):
            if (cand[v >> 6] >> np.uint64(v & 63)) & np.uint64(1):
                chosen[m] = v
                m += 1
                w += weights[v]
                for j in range(nwords):
                    cand[j] &= adj[v, j]
        if w > best_w:
            best_w = w
            best = chosen[:m].copy()
    return best_w, best


@nb.njit(cache=True)
def clique_prepare(adj, weights, n, starts):
    """Set-up of a search in one call (one cache load instead of four): degeneracy order,
    relabelled graph and weights, best greedy clique (relabelled vertices) and the number of
    greedy colour classes of the whole relabelled graph (which bounds the clique size, hence
    the stack depth)."""
    order = clique_degeneracy_order(adj, n)
    padj = clique_permute(adj, order, n)
    pw = np.empty(n, np.int64)
    for i in range(n):
        pw[i] = weights[order[i]]
    gw, gclique = clique_greedy(padj, pw, n, starts)
    nwords = padj.shape[1]
    root = np.zeros((1, nwords), np.uint64)
    for v in range(n):
        root[0, v >> 6] |= np.uint64(1) << np.uint64(v & 63)
    classes = clique_colour_level(padj, np.ones(n, np.int64), root, np.empty((1, n), np.int64),
                                  np.empty((1, n), np.int64), np.empty(1, np.int64),
                                  np.empty(1, np.int64), 0, -1, np.empty(nwords, np.uint64),
                                  np.empty(nwords, np.uint64))
    return order, padj, pw, gw, gclique, classes


@nb.njit(cache=True)
def code_adjacency(packed, planes, limbs, d):
    """Bitset graph on packed words: i ~ j iff i != j and their Hamming distance is >= d.

    ``packed`` is (N, planes * limbs) uint64 in the package's packed-word layout (planes
    contiguous); two words differ at a position iff some plane differs there.
    """
    n = packed.shape[0]
    nwords = (n + 63) >> 6
    out = np.zeros((n, nwords), np.uint64)
    for i in range(n):
        for j in range(i + 1, n):
            dist = 0
            for l in range(limbs):
                x = np.uint64(0)
                for p in range(planes):
                    x |= packed[i, p * limbs + l] ^ packed[j, p * limbs + l]
                dist += popcount64(x)
            if dist >= d:
                out[i, j >> 6] |= np.uint64(1) << np.uint64(j & 63)
                out[j, i >> 6] |= np.uint64(1) << np.uint64(i & 63)
    return out




# ======================================================================= heuristics (greedy, local search)
#
# Words are handled here as integer indices: the word (x_0, ..., x_{n-1}) over 0..q-1 has index
# sum_j x_j q^(n-1-j), so index order is lexicographic order.  ``pw[j] = q^(n-1-j)``.  A Hamming
# ball is stored once as patterns relative to its centre: for q = 2 as XOR masks, otherwise in
# CSR form (``pat_ptr``, ``pat_pos``, ``pat_add``): pattern k changes coordinate
# ``pat_pos[t]`` by adding ``pat_add[t]`` (mod q) for t in ``pat_ptr[k]:pat_ptr[k+1]``.
# Random numbers come from a xorshift64* generator whose state lives in a caller's uint64[1]
# array, so every run is reproducible from its seed and no process-wide state is touched.


@nb.njit(nb.uint64(nb.uint64[:]), cache=True)
def heur_rand(state):
    """Next 64-bit output of the xorshift64* generator held in ``state[0]`` (never 0)."""
    x = state[0]
    x ^= x >> np.uint64(12)
    x ^= x << np.uint64(25)
    x ^= x >> np.uint64(27)
    state[0] = x
    return x * np.uint64(0x2545F4914F6CDD1D)


@nb.njit(nb.int64(nb.uint64[:], nb.int64), cache=True)
def heur_randint(state, bound):
    """Uniform-enough integer in ``0..bound-1`` (bound < 2**62; bias below 2**-2)."""
    return np.int64((heur_rand(state) >> np.uint64(2)) % np.uint64(bound))


@nb.njit(nb.int64(nb.int64, nb.int64, nb.int64, nb.int64), cache=True)
def heur_index_dist(x, y, q, n):
    """Hamming distance between the words with indices ``x`` and ``y``."""
    if q == 2:
        return np.int64(popcount64(np.uint64(x ^ y)))
    dist = 0
    for _ in range(n):
        if x % q != y % q:
            dist += 1
        x //= q
        y //= q
    return dist


@nb.njit(nb.int64(nb.int64, nb.int64, nb.int64, nb.int64, nb.int64[:]), cache=True)
def heur_order_at(t, kind, q, n, perm):
    """The ``t``-th word index in a scan order.

    kind 0: lexicographic (``t`` itself); kind 1: q-ary Gray code (consecutive words differ in
    one coordinate; digits ``g_0 = b_0``, ``g_j = b_j - b_{j-1} mod q`` of ``t = (b_0 ... b_{n-1})``,
    the binary reflected Gray code when q = 2); kind 2: ``perm[t]``.
    """
    if kind == 0:
        return t
    if kind == 2:
        return perm[t]
    if q == 2:
        return t ^ (t >> 1)
    # digits from least significant: g_j depends on b_j and the more significant b_{j-1}
    out = 0
    place = 1
    rest = t
    for _ in range(n):
        b = rest % q
        rest //= q
        prev = rest % q  # next more significant digit (0 beyond the top)
        out += ((b - prev) % q) * place
        place *= q
    return out


@nb.njit(
    nb.int64(nb.int64, nb.int64, nb.int64, nb.int64, nb.int64[:], nb.int64[:], nb.uint64[:],
             nb.int64[:], nb.int64),
    cache=True,
)
def heur_greedy_mark_binary(t0, t1, kind, n, perm, masks, blocked, out, count):
    """Greedy packing over scan positions ``t0..t1-1`` for q = 2 by ball marking.

    Invariant: bit ``y`` of ``blocked`` is set iff ``y`` lies within distance d-1 of a word in
    ``out[:count]`` (``masks`` = every word of weight <= d-1).  A scanned word is taken iff its
    bit is clear, which is exactly the greedy rule "no codeword closer than d".  Returns the
    new count; memory is one bit per word and no pair of words is ever compared.
    """
    for t in range(t0, t1):
        x = heur_order_at(t, kind, 2, n, perm)
        if (blocked[x >> 6] >> np.uint64(x & 63)) & np.uint64(1):
            continue
        out[count] = x
        count += 1
        for k in range(masks.shape[0]):
            y = x ^ masks[k]
            blocked[y >> 6] |= np.uint64(1) << np.uint64(y & 63)
    return count


@nb.njit(nb.void(nb.int64, nb.int64, nb.int64, nb.int64[:]), cache=True)
def _heur_digits(x, q, n, dig):
    for j in range(n - 1, -1, -1):
        dig[j] = x % q
        x //= q


@nb.njit(
    nb.int64(nb.int64, nb.int64[:], nb.int64[:], nb.int64, nb.int64[:], nb.int64[:],
             nb.int64[:], nb.int64[:]),
    cache=True,
)
def heur_pattern_apply(x, dig, pw, q, pat_ptr, pat_pos, pat_add, k):
    """Index of the word obtained from ``x`` (digits ``dig``) by ball pattern ``k[0]``."""
    y = x
    for t in range(pat_ptr[k[0]], pat_ptr[k[0] + 1]):
        j = pat_pos[t]
        y += ((dig[j] + pat_add[t]) % q - dig[j]) * pw[j]
    return y


@nb.njit(
    nb.int64(nb.int64, nb.int64, nb.int64, nb.int64, nb.int64, nb.int64[:], nb.int64[:],
             nb.int64[:], nb.int64[:], nb.int64[:], nb.uint64[:], nb.int64[:], nb.int64),
    cache=True,
)
def heur_greedy_mark_qary(t0, t1, kind, q, n, pw, perm, pat_ptr, pat_pos, pat_add, blocked,
                          out, count):
    """Greedy packing by ball marking for any q (same invariant as the binary kernel)."""
    dig = np.zeros(n, dtype=np.int64)
    kk = np.zeros(1, dtype=np.int64)
    npat = pat_ptr.shape[0] - 1
    for t in range(t0, t1):
        x = heur_order_at(t, kind, q, n, perm)
        if (blocked[x >> 6] >> np.uint64(x & 63)) & np.uint64(1):
            continue
        out[count] = x
        count += 1
        _heur_digits(x, q, n, dig)
        for k in range(npat):
            kk[0] = k
            y = heur_pattern_apply(x, dig, pw, q, pat_ptr, pat_pos, pat_add, kk)
            blocked[y >> 6] |= np.uint64(1) << np.uint64(y & 63)
    return count


@nb.njit(
    nb.int64(nb.int64, nb.int64, nb.int64, nb.int64, nb.int64, nb.int64, nb.int64[:],
             nb.uint64[:], nb.int64[:], nb.int64),
    cache=True,
)
def heur_greedy_sample(q, n, d, space, max_fail, max_draws, fail_state, rng, out, count):
    """Random greedy for spaces too large to mark: draw words, keep those at distance >= d.

    Stops after ``max_fail`` consecutive rejected draws (counted in ``fail_state[0]`` across
    calls), when ``out`` is full, or after ``max_draws`` draws in this call (so the caller can
    check a clock). Pairwise checks only: memory is the code itself.
    """
    fails = fail_state[0]
    draws = 0
    while fails < max_fail and count < out.shape[0] and draws < max_draws:
        draws += 1
        x = heur_randint(rng, space)
        ok = True
        for i in range(count):
            if heur_index_dist(x, out[i], q, n) < d:
                ok = False
                break
        if ok:
            out[count] = x
            count += 1
            fails = 0
        else:
            fails += 1
    fail_state[0] = fails
    return count


@nb.njit(cache=True)
def _heur_ball_add(x, delta, q, n, pw, masks, pat_ptr, pat_pos, pat_add, counts, dig, kk):
    if q == 2:
        for k in range(masks.shape[0]):
            y = x ^ masks[k]
            counts[y] += delta
    else:
        _heur_digits(x, q, n, dig)
        for k in range(pat_ptr.shape[0] - 1):
            kk[0] = k
            y = heur_pattern_apply(x, dig, pw, q, pat_ptr, pat_pos, pat_add, kk)
            counts[y] += delta


@nb.njit(cache=True)
def heur_local_add_balls(q, n, start, stop, words, pw, masks, pat_ptr, pat_pos, pat_add, counts):
    """Add the balls of radius d-1 around ``words[start:stop]`` to ``counts`` (mode 1).

    The start of a local search (its ball counts) in slices, so that a caller can read the
    clock between slices (the counts of 10^3 words with balls of 10^4-10^5 words over a space
    of 10^7 take seconds: one random memory access per word of each ball).
    """
    dig = np.zeros(n, dtype=np.int64)
    kk = np.zeros(1, dtype=np.int64)
    for i in range(start, stop):
        _heur_ball_add(words[i], 1, q, n, pw, masks, pat_ptr, pat_pos, pat_add, counts, dig, kk)


@nb.njit(cache=True)
def _heur_score(y, s, q, n, d, M, words, mode, counts):
    # conflicts y would have with the code after removing slot s
    if mode == 1:
        return np.int64(counts[y]) - (1 if heur_index_dist(y, words[s], q, n) < d else 0)
    c = 0
    for i in range(M):
        if i != s and heur_index_dist(y, words[i], q, n) < d:
            c += 1
    return c


@nb.njit(cache=True)
def _heur_replace(s, y, q, n, d, M, words, conf, mode, pw, masks, pat_ptr, pat_pos, pat_add,
                  counts, dig, kk):
    # move slot s to word y, keeping counts/conf exact; returns the change in conflicting pairs
    x = words[s]
    before = conf[s]
    if mode == 1:
        _heur_ball_add(x, -1, q, n, pw, masks, pat_ptr, pat_pos, pat_add, counts, dig, kk)
        _heur_ball_add(y, 1, q, n, pw, masks, pat_ptr, pat_pos, pat_add, counts, dig, kk)
        words[s] = y
        for i in range(M):
            conf[i] = counts[words[i]] - 1
    else:
        after = 0
        for i in range(M):
            if i == s:
                continue
            w = words[i]
            if heur_index_dist(x, w, q, n) < d:
                conf[i] -= 1
            if heur_index_dist(y, w, q, n) < d:
                conf[i] += 1
                after += 1
        words[s] = y
        conf[s] = after
    return conf[s] - before


@nb.njit(cache=True)
def heur_local_steps(q, n, d, space, M, words, conf, total, mode, pw, masks, pat_ptr, pat_pos,
                     pat_add, counts, tabu, rng, n_random, steps):
    """Tabu search on conflicts at fixed size ``M``: at most ``steps`` moves.

    A move replaces one codeword in conflict by another word. Every codeword in conflict is
    tried with its n(q-1) neighbours at distance 1 and ``n_random`` uniform random words; the
    move with the largest drop in conflicting pairs is made (ties at random), even when it
    raises the count, except that recently removed words (``tabu`` ring, ``tabu[0]`` is the
    write position) may not come back unless the move reaches fewer conflicts than ever seen
    in this call (aspiration). Returns ``(total_conflicting_pairs, moves_done)``; stops early
    when the code is conflict-free. Invariant: ``conf`` (and ``counts`` in mode 1) stay exact.
    """
    dig = np.zeros(n, dtype=np.int64)
    cdig = np.zeros(n, dtype=np.int64)
    kk = np.zeros(1, dtype=np.int64)
    ntabu = tabu.shape[0] - 1
    done = 0
    n_nb = n * (q - 1)
    best_total = total
    while done < steps and total > 0:
        done += 1
        best_s = -1
        best_y = -1
        best = np.int64(1) << 40
        ties = 0
        for s in range(M):
            if conf[s] == 0:
                continue
            x = words[s]
            _heur_digits(x, q, n, cdig)
            for c in range(n_nb + n_random):
                if c < n_nb:
                    j = c // (q - 1)
                    a = c % (q - 1) + 1
                    y = x + ((cdig[j] + a) % q - cdig[j]) * pw[j]
                else:
                    y = heur_randint(rng, space)
                gain = _heur_score(y, s, q, n, d, M, words, mode, counts) - conf[s]
                if gain > best:
                    continue
                if total + gain >= best_total:
                    is_tabu = False
                    for t in range(ntabu):
                        if tabu[1 + t] == y:
                            is_tabu = True
                            break
                    if is_tabu:
                        continue
                if gain < best:
                    best = gain
                    best_s = s
                    best_y = y
                    ties = 1
                else:
                    ties += 1
                    if heur_randint(rng, ties) == 0:
                        best_s = s
                        best_y = y
        if best_s < 0:
            continue
        if ntabu > 0:
            tabu[1 + tabu[0]] = words[best_s]
            tabu[0] = (tabu[0] + 1) % ntabu
        total += _heur_replace(best_s, best_y, q, n, d, M, words, conf, mode, pw, masks, pat_ptr,
                               pat_pos, pat_add, counts, dig, kk)
        if total < best_total:
            best_total = total
    return total, done


@nb.njit(cache=True)
def heur_local_grow(q, n, d, space, M, words, conf, mode, pw, masks, pat_ptr, pat_pos, pat_add,
                    counts, rng, n_random):
    """Append one word (the fewest-conflict of ``n_random`` random draws) as slot ``M``.

    Returns the new number of conflicting pairs contributed by that word.
    """
    dig = np.zeros(n, dtype=np.int64)
    kk = np.zeros(1, dtype=np.int64)
    best = np.int64(1) << 40
    best_y = 0
    for _ in range(n_random):
        y = heur_randint(rng, space)
        # slot M is beyond the code, so _heur_score counts conflicts with all M words
        if mode == 1:
            sc = np.int64(counts[y])
        else:
            sc = _heur_score(y, M, q, n, d, M, words, mode, counts)
        if sc < best:
            best = sc
            best_y = y
            if sc == 0:
                break
    words[M] = best_y
    if mode == 1:
        _heur_ball_add(best_y, 1, q, n, pw, masks, pat_ptr, pat_pos, pat_add, counts, dig, kk)
        for i in range(M + 1):
            conf[i] = counts[words[i]] - 1
    else:
        c = 0
        for i in range(M):
            if heur_index_dist(best_y, words[i], q, n) < d:
                conf[i] += 1
                c += 1
        conf[M] = c
    return best


# ======================================================================= orbits (orbit search)
@nb.njit(cache=True)
def _union_root(parent, a):
    """Root of ``a`` in the union-find forest, halving the path on the way."""
    while parent[a] != a:
        parent[a] = parent[parent[a]]
        a = parent[a]
    return a


@nb.njit(cache=True)
def _union_link(parent, r, s):
    """Join the trees of r and s, the larger root under the smaller."""
    a = _union_root(parent, r)
    b = _union_root(parent, s)
    if a < b:
        parent[b] = a
    elif b < a:
        parent[a] = b


@nb.njit(nb.void(nb.int64[::1], nb.int64[::1]), cache=True)
def orbit_union(parent, image):
    """Join every index r with ``image[r]`` in the union-find forest ``parent``.

    Roots are always the least index of their tree (the larger root is linked under the
    smaller), so after :func:`orbit_flatten` each index points at the least index of its
    orbit. Path halving keeps the trees shallow.
    """
    for r in range(parent.shape[0]):
        _union_link(parent, r, image[r])


@nb.njit(cache=True)
def _index_image(tables, mask, r):
    """Image of the binary word with index r under a coordinate permutation followed by a
    translation: ``tables[k, b]`` is the image of byte value b at coordinates 8k .. 8k + 7,
    ``mask`` the translation (bit i = coordinate i)."""
    out = mask
    for k in range(tables.shape[0]):
        out ^= tables[k, (r >> (8 * k)) & 255]
    return out


@nb.njit(nb.void(nb.int64[:, ::1], nb.int64, nb.int64[::1]), cache=True)
def binary_image(tables, mask, out):
    """``out[r]`` = index of the image of binary word r (see :func:`_index_image`)."""
    for r in range(out.shape[0]):
        out[r] = _index_image(tables, mask, r)


@nb.njit(nb.void(nb.int64[::1], nb.int64[:, ::1], nb.int64), cache=True)
def orbit_union_binary(parent, tables, mask):
    """:func:`orbit_union` with the image of each binary word computed on the fly
    (:func:`_index_image`), so no image array is held."""
    for r in range(parent.shape[0]):
        _union_link(parent, r, _index_image(tables, mask, r))


@nb.njit(nb.types.UniTuple(nb.int64[::1], 3)(nb.int64[::1]), cache=True)
def orbit_flatten(parent):
    """Point every index at its root (in place) and group the indices by root.

    Returns ``order`` (indices grouped by orbit, orbits by increasing root, indices increasing
    within an orbit), ``starts`` (orbit k is ``order[starts[k]:starts[k+1]]``) and ``reps``
    (the roots, increasing). Relies on ``parent[r] <= r`` (see :func:`orbit_union`): in
    increasing r, ``parent[parent[r]]`` is already a root.
    """
    total = parent.shape[0]
    count = 0
    for r in range(total):
        parent[r] = parent[parent[r]]
        if parent[r] == r:
            count += 1
    reps = np.empty(count, dtype=np.int64)
    slot = np.empty(total, dtype=np.int64)  # slot[root] = orbit number of that root
    sizes = np.zeros(count + 1, dtype=np.int64)
    k = 0
    for r in range(total):
        if parent[r] == r:
            reps[k] = r
            slot[r] = k
            k += 1
        sizes[slot[parent[r]] + 1] += 1
    starts = np.cumsum(sizes)
    fill = starts[:-1].copy()
    order = np.empty(total, dtype=np.int64)
    for r in range(total):
        o = slot[parent[r]]
        order[fill[o]] = r
        fill[o] += 1
    return order, starts, reps


@nb.njit(nb.int64[::1](nb.int64[::1], nb.int64[::1], nb.int64[::1]), cache=True)
def orbit_vertex_of(order, starts, kept):
    """``out[x]`` = v when word x lies in orbit ``kept[v]``, else -1 (orbit k is
    ``order[starts[k]:starts[k+1]]``)."""
    out = np.full(order.shape[0], -1, dtype=np.int64)
    for v in range(kept.shape[0]):
        k = kept[v]
        for t in range(starts[k], starts[k + 1]):
            out[order[t]] = v
    return out


@nb.njit(nb.int64[::1](nb.uint64[:, ::1], nb.int64[::1], nb.int64[::1], nb.int64), cache=True)
def orbit_inner_distance(planes, order, starts, n):
    """Minimum distance inside each orbit, ``n + 1`` for an orbit of one word.

    Orbit k is ``order[starts[k]:starts[k+1]]``, its least index first (its representative).
    Distances are taken from the representative, which is the orbit's own minimum distance
    (the group acts by isometries). ``planes[p, w]`` is bit plane p of word w as in
    :func:`orbit_adjacency_rows`; with no planes (``planes.shape[0] == 0``) the words are
    binary and their indices are the words themselves.
    """
    count = starts.shape[0] - 1
    nplanes = planes.shape[0]
    out = np.empty(count, dtype=np.int64)
    for k in range(count):
        r = order[starts[k]]
        best = n + 1
        for t in range(starts[k] + 1, starts[k + 1]):
            w = order[t]
            if nplanes == 0:
                diff = np.uint64(r ^ w)
            else:
                diff = np.uint64(0)
                for p in range(nplanes):
                    diff |= planes[p, r] ^ planes[p, w]
            dist = popcount64(diff)
            if dist < best:
                best = dist
        out[k] = best
    return out


@nb.njit(
    nb.void(nb.uint64[:, ::1], nb.int64[::1], nb.int64[::1], nb.int64[::1], nb.int64,
            nb.int64, nb.int64, nb.uint8[:, ::1]),
    cache=True,
)
def orbit_adjacency_rows(planes, reps, words, starts, d, lo, hi, adj):
    """Fill rows ``lo..hi-1`` (upper triangle) of the orbit compatibility matrix.

    ``planes[p, w]`` is bit plane p of word w (bit i = bit p of symbol i, n <= 64); orbit k has
    representative ``reps[k]`` and words ``words[starts[k]:starts[k+1]]``. Orbits i < j are
    compatible (``adj[i, j] = 1``) iff every word of orbit j is at distance >= d from the
    representative of orbit i; the scan of orbit j stops at the first close word.
    """
    nplanes = planes.shape[0]
    k = reps.shape[0]
    for i in range(lo, hi):
        r = reps[i]
        for j in range(i + 1, k):
            ok = 1
            for t in range(starts[j], starts[j + 1]):
                w = words[t]
                diff = np.uint64(0)
                for p in range(nplanes):
                    diff |= planes[p, r] ^ planes[p, w]
                if popcount64(diff) < d:
                    ok = 0
                    break
            adj[i, j] = ok


@nb.njit(cache=True)
def orbit_sparse_moves(vertex_of, reps, weight, masks, in_set, conflicts, xor_ids, tabu_until,
                       stamp, start_move, moves, tenure, rng_state, stop_weight, best_weight,
                       best_set):
    """Moves of the implicit-adjacency tabu search on orbits (binary words as integers).

    ``vertex_of[x]`` is the vertex (admissible orbit) of word x, or -1; ``reps[v]`` its
    representative; two vertices u != v conflict iff some word of v lies within distance
    d - 1 of ``reps[u]``, i.e. ``vertex_of[reps[u] ^ m] == v`` for a mask m of ``masks``
    (the weights 1 .. d-1). State: ``in_set``, ``conflicts[v]`` = members of the set in
    conflict with v, ``xor_ids[v]`` = XOR of their ids (the one member when there is one),
    ``tabu_until``. Each move adds the heaviest free non-tabu vertex, or else makes the best
    1-swap (add v, drop its single conflicting member, which turns tabu), or else drops a
    random member. ``rng_state`` is one int64 (xorshift). Returns the move count, the new
    best weight (``best_set`` updated) and the final rng state.
    """
    k = reps.shape[0]
    total = 0
    for v in range(k):
        if in_set[v]:
            total += weight[v]
    r = rng_state
    done = 0
    for it in range(start_move, start_move + moves):
        done += 1
        # the heaviest free vertex, else the best 1-swap (ties broken at random)
        best_v = -1
        best_gain = -(1 << 62)
        best_free = False
        ties = 0
        for v in range(k):
            if in_set[v] or tabu_until[v] > it:
                continue
            c = conflicts[v]
            if c == 0:
                g = weight[v]
                if (not best_free) or g > best_gain:
                    best_v, best_gain, best_free, ties = v, g, True, 1
                elif g == best_gain:
                    ties += 1
                    r ^= r << 13; r ^= r >> 7; r ^= r << 17
                    if (r & 0x7FFFFFFF) % ties == 0:
                        best_v = v
            elif c == 1 and not best_free:
                g = weight[v] - weight[xor_ids[v]]
                if g > best_gain:
                    best_v, best_gain, ties = v, g, 1
                elif g == best_gain:
                    ties += 1
                    r ^= r << 13; r ^= r >> 7; r ^= r << 17
                    if (r & 0x7FFFFFFF) % ties == 0:
                        best_v = v
        drop = -1
        add = best_v
        if best_v >= 0 and not best_free:
            drop = xor_ids[best_v]
        elif best_v < 0:
            # no move: drop a random member
            members = 0
            for v in range(k):
                if in_set[v]:
                    members += 1
            if members == 0:
                break
            r ^= r << 13; r ^= r >> 7; r ^= r << 17
            pick = (r & 0x7FFFFFFF) % members
            for v in range(k):
                if in_set[v]:
                    if pick == 0:
                        drop = v
                        break
                    pick -= 1
        for sign, u in ((-1, drop), (1, add)):
            if u < 0:
                continue
            in_set[u] = sign > 0
            total += sign * weight[u]
            if sign < 0:
                tabu_until[u] = it + tenure
            for m in masks:
                v = vertex_of[reps[u] ^ m]
                if v < 0 or v == u or stamp[v] == 2 * it + (sign > 0):
                    continue
                stamp[v] = 2 * it + (sign > 0)
                conflicts[v] += sign
                xor_ids[v] ^= u
        if total > best_weight:
            best_weight = total
            best_set[:] = in_set
            if best_weight >= stop_weight:
                break
    return done, best_weight, r


# ======================================================================= DRAT proof checking
# Used by codesearch.verify.drat (see its docstring for the algorithm and references). Literals are
# encoded as ``2 * (v - 1) + (1 if negative else 0)`` so that ``l ^ 1`` is the negation.
# Clauses live in one flat array ``lits`` with offsets ``start``; the formula's clauses come
# first, then one clause per proof line (additions and deletions alike), in proof order.


@nb.njit(cache=True)
def drat_tokens(buf, allow_delete, max_lits, max_clauses):
    """Split DIMACS clause text into clauses.

    ``buf`` is the text (uint8). Integers separated by white space, each clause closed by 0;
    a line starting with ``c`` is a comment (only between clauses); with ``allow_delete`` a
    token ``d`` opens a deletion. Returns ``(raw, start, isdel, err)``: the literals (int64,
    zeros dropped), clause offsets, deletion flags, and ``err = [code, byte offset]`` with
    code 0 (fine), 1 (unexpected character), 2 (number too large: |lit| >= 2^31),
    3 (``d`` or a comment inside a clause), 4 (clause not closed by 0 at the end),
    5 (a lone ``-``), 6 (more than ``max_lits`` literals or ``max_clauses`` clauses: nothing
    is allocated; ``err[1]`` is then the offset where the count passed the cap).
    """
    n = buf.size
    err = np.zeros(2, np.int64)
    # pass 1: count literals and clauses
    nlits = 0
    ncl = 0
    i = 0
    pending = 0
    while i < n:
        ch = buf[i]
        if ch == 32 or ch == 9 or ch == 10 or ch == 13:
            i += 1
            continue
        if ch == 99:  # 'c'
            if pending > 0:
                err[0], err[1] = 3, i
                return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8),
                        err)
            while i < n and buf[i] != 10:
                i += 1
            continue
        if ch == 100 and allow_delete:  # 'd'
            if pending > 0 or i + 1 >= n or not (buf[i + 1] == 32 or buf[i + 1] == 9
                                                 or buf[i + 1] == 10 or buf[i + 1] == 13):
                err[0], err[1] = 3, i
                return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8),
                        err)
            pending = 1
            i += 1
            continue
        neg = False
        if ch == 45:  # '-'
            neg = True
            i += 1
            if i >= n or buf[i] < 48 or buf[i] > 57:
                err[0], err[1] = 5, i - 1
                return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8),
                        err)
        if buf[i] < 48 or buf[i] > 57:
            err[0], err[1] = 1, i
            return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8), err)
        val = 0
        s = i
        while i < n and buf[i] >= 48 and buf[i] <= 57:
            val = val * 10 + (buf[i] - 48)
            if val >= 2147483648:
                err[0], err[1] = 2, s
                return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8),
                        err)
            i += 1
        if i < n and not (buf[i] == 32 or buf[i] == 9 or buf[i] == 10 or buf[i] == 13):
            err[0], err[1] = 1, i
            return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8), err)
        if val == 0:
            if neg:
                err[0], err[1] = 1, s
                return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8),
                        err)
            ncl += 1
            pending = 0
        else:
            nlits += 1
            pending = 1
        if nlits > max_lits or ncl > max_clauses:
            err[0], err[1] = 6, s
            return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8), err)
    if pending > 0:
        err[0], err[1] = 4, n
        return (np.empty(0, np.int64), np.zeros(1, np.int64), np.empty(0, np.uint8), err)
    # pass 2: fill (the text is known to be well formed)
    raw = np.empty(nlits, np.int64)
    start = np.empty(ncl + 1, np.int64)
    isdel = np.zeros(ncl, np.uint8)
    k = 0
    c = 0
    start[0] = 0
    i = 0
    while i < n:
        ch = buf[i]
        if ch == 32 or ch == 9 or ch == 10 or ch == 13:
            i += 1
            continue
        if ch == 99:
            while i < n and buf[i] != 10:
                i += 1
            continue
        if ch == 100:
            isdel[c] = 1
            i += 1
            continue
        sign = 1
        if ch == 45:
            sign = -1
            i += 1
        val = 0
        while i < n and buf[i] >= 48 and buf[i] <= 57:
            val = val * 10 + (buf[i] - 48)
            i += 1
        if val == 0:
            c += 1
            start[c] = k
        else:
            raw[k] = sign * val
            k += 1
    return raw, start, isdel, err


@nb.njit(cache=True)
def drat_encode(raw, start, nvars):
    """Encode literals (``v -> 2(v-1)``, ``-v -> 2(v-1)+1``) and drop repeated literals in
    each clause, keeping the first occurrence (the RAT pivot is a clause's first literal).
    Returns ``(lits int32, start int64)``."""
    out = np.empty(raw.size, np.int32)
    st = np.empty(start.size, np.int64)
    stamp = np.zeros(2 * nvars, np.int64)
    k = 0
    for c in range(start.size - 1):
        st[c] = k
        for i in range(start[c], start[c + 1]):
            v = raw[i]
            code = 2 * (v - 1) if v > 0 else 2 * (-v - 1) + 1
            if stamp[code] != c + 1:
                stamp[code] = c + 1
                out[k] = code
                k += 1
    st[start.size - 1] = k
    return out[:k].copy(), st


@nb.njit(cache=True)
def _drat_mix(x):
    z = np.uint64(x) + np.uint64(0x9E3779B97F4A7C15)
    z = (z ^ (z >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
    z = (z ^ (z >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
    return z ^ (z >> np.uint64(31))


@nb.njit(cache=True)
def drat_match_deletions(lits, start, nform, isdel, nlits):
    """For each proof line: the clause a deletion removes (-1 for additions and for
    deletions of a clause not present). Clauses are compared as literal sets; of several
    equal present clauses the most recently added is removed."""
    ncl = start.size - 1
    S = ncl - nform
    target = np.full(S, -1, np.int64)
    hashes = np.empty(ncl, np.uint64)
    for c in range(ncl):
        h = _drat_mix(start[c + 1] - start[c])
        for i in range(start[c], start[c + 1]):
            h += _drat_mix(lits[i] + 1)
        hashes[c] = h
    size = 1
    while size < 2 * ncl + 2:
        size *= 2
    mask = np.uint64(size - 1)
    bhead = np.full(size, -1, np.int64)
    bnext = np.full(ncl, -1, np.int64)
    mark = np.zeros(nlits, np.int64)
    for c in range(nform):
        b = np.int64(hashes[c] & mask)
        bnext[c] = bhead[b]
        bhead[b] = c
    for s in range(S):
        c = nform + s
        b = np.int64(hashes[c] & mask)
        if isdel[s] == 0:
            bnext[c] = bhead[b]
            bhead[b] = c
            continue
        for i in range(start[c], start[c + 1]):
            mark[lits[i]] = c + 1
        length = start[c + 1] - start[c]
        prev = -1
        e = bhead[b]
        while e != -1:
            if hashes[e] == hashes[c] and start[e + 1] - start[e] == length:
                same = True
                for i in range(start[e], start[e + 1]):
                    if mark[lits[i]] != c + 1:
                        same = False
                        break
                if same:
                    if prev == -1:
                        bhead[b] = bnext[e]
                    else:
                        bnext[prev] = bnext[e]
                    target[s] = e
                    break
            prev = e
            e = bnext[e]
    return target


@nb.njit(cache=True)
def _drat_assign(l, c, val, reason, tpos, trail, st):
    v = l >> 1
    val[l] = 1
    val[l ^ 1] = -1
    reason[v] = c
    tpos[v] = st[0]
    trail[st[0]] = l
    st[0] += 1


@nb.njit(cache=True)
def _drat_unassign_to(t0, val, reason, trail, st):
    for i in range(t0, st[0]):
        l = trail[i]
        val[l] = 0
        val[l ^ 1] = 0
        reason[l >> 1] = -1
    st[0] = t0
    if st[1] > t0:
        st[1] = t0


@nb.njit(cache=True)
def _drat_link(e, lit, wlit, nxt, prv, whead):
    wlit[e] = lit
    h = whead[lit]
    nxt[e] = h
    prv[e] = -1
    if h != -1:
        prv[h] = e
    whead[lit] = e


@nb.njit(cache=True)
def _drat_unlink(e, wlit, nxt, prv, whead):
    p = prv[e]
    q = nxt[e]
    if p == -1:
        whead[wlit[e]] = q
    else:
        nxt[p] = q
    if q != -1:
        prv[q] = p


@nb.njit(cache=True)
def _drat_attach(c, lits, start, val, tpos, wlit, nxt, prv, whead):
    """Watch clause c (length >= 2) on its two best literals (true, then unassigned, then the
    most recently falsified). Returns 0 (fine), 1 (unit: first watch is implied), 2 (all
    literals false)."""
    best0 = -1
    best1 = -1
    r0 = -1
    r1 = -1
    for i in range(start[c], start[c + 1]):
        l = lits[i]
        x = val[l]
        if x == 1:
            r = 1 << 62
        elif x == 0:
            r = (1 << 62) - 1
        else:
            r = tpos[l >> 1]
        if r > r0:
            best1, r1 = best0, r0
            best0, r0 = l, r
        elif r > r1:
            best1, r1 = l, r
    _drat_link(2 * c, best0, wlit, nxt, prv, whead)
    _drat_link(2 * c + 1, best1, wlit, nxt, prv, whead)
    if val[best0] == -1:
        return 2
    if val[best0] == 0 and val[best1] == -1:
        return 1
    return 0


@nb.njit(cache=True)
def _drat_propagate(lits, start, val, reason, tpos, trail, st, wlit, nxt, prv, whead):
    """Unit propagation from the trail head; returns a falsified clause or -1. On a conflict
    the head stays on the literal being processed, so the next call finds it again."""
    while st[1] < st[0]:
        fl = trail[st[1]] ^ 1  # the literal made false
        st[1] += 1
        e = whead[fl]
        while e != -1:
            en = nxt[e]
            c = e >> 1
            other = wlit[e ^ 1]
            if val[other] == 1:
                e = en
                continue
            found = -1
            for i in range(start[c], start[c + 1]):
                l2 = lits[i]
                if l2 != fl and l2 != other and val[l2] != -1:
                    found = l2
                    break
            if found != -1:
                _drat_unlink(e, wlit, nxt, prv, whead)
                _drat_link(e, found, wlit, nxt, prv, whead)
            elif val[other] == 0:
                _drat_assign(other, c, val, reason, tpos, trail, st)
            else:
                st[1] -= 1
                return c
            e = en
    return -1


@nb.njit(cache=True)
def _drat_push(stack, top, v):
    """``stack[top] = v``, doubling the array when full; returns the (possibly new) array."""
    if top == stack.size:
        stack = np.concatenate((stack, np.empty(stack.size, np.int64)))
    stack[top] = v
    return stack


@nb.njit(cache=True)
def _drat_mark(c, lits, start, seen, stamp, core, stack, top):
    """Mark clause c core and push its variables not yet seen; returns (stack, top, 1 if c
    was newly marked else 0)."""
    new = 0
    if core[c] == 0:
        core[c] = 1
        new = 1
    for i in range(start[c], start[c + 1]):
        u = lits[i] >> 1
        if seen[u] != stamp:
            seen[u] = stamp
            stack = _drat_push(stack, top, u)
            top += 1
    return stack, top, new


@nb.njit(cache=True)
def _drat_analyze(cc, clit, lits, start, reason, seen, core, st):
    """Mark as core the clause ``cc`` (if >= 0) and the reasons of every literal the conflict
    depends on (``clit``: a literal whose truth is the conflict, or -1). Returns the number of
    clauses newly marked."""
    st[3] += 1
    stamp = st[3]
    stack = np.empty(16, np.int64)
    top = 0
    marked = 0
    if cc >= 0:
        stack, top, marked = _drat_mark(cc, lits, start, seen, stamp, core, stack, top)
    if clit >= 0 and seen[clit >> 1] != stamp:
        seen[clit >> 1] = stamp
        stack = _drat_push(stack, top, clit >> 1)
        top += 1
    while top > 0:
        top -= 1
        r = reason[stack[top]]
        if r >= 0:
            stack, top, new = _drat_mark(r, lits, start, seen, stamp, core, stack, top)
            marked += new
    return marked


@nb.njit(cache=True)
def _drat_rup(clause, lits, start, val, reason, tpos, trail, st, wlit, nxt, prv, whead,
              seen, core):
    """Is ``clause`` (encoded literals) implied by unit propagation? Marks what it used."""
    cc = _drat_propagate(lits, start, val, reason, tpos, trail, st, wlit, nxt, prv, whead)
    if cc >= 0:  # the formula itself is in conflict at the top level
        _drat_analyze(cc, -1, lits, start, reason, seen, core, st)
        return True
    t0 = st[0]
    clit = -1
    for l in clause:
        if val[l] == 1:
            clit = l
            break
        if val[l] == 0:
            _drat_assign(l ^ 1, -1, val, reason, tpos, trail, st)
    if clit < 0:
        cc = _drat_propagate(lits, start, val, reason, tpos, trail, st, wlit, nxt, prv, whead)
    ok = clit >= 0 or cc >= 0
    if ok:
        _drat_analyze(cc, clit, lits, start, reason, seen, core, st)
    _drat_unassign_to(t0, val, reason, trail, st)
    return ok


@nb.njit(cache=True)
def _drat_reprocess(nunits, units, active, lits, start, val, reason, tpos, trail, st, wlit,
                    nxt, prv, whead):
    """Restore the full top-level closure (after literals were withdrawn); returns a
    falsified clause or -1."""
    st[2] = 0
    for k in range(nunits):
        u = units[k]
        if active[u] == 0:
            continue
        l = lits[start[u]]
        if val[l] == -1:
            return u
        if val[l] == 0:
            _drat_assign(l, u, val, reason, tpos, trail, st)
    st[1] = 0
    return _drat_propagate(lits, start, val, reason, tpos, trail, st, wlit, nxt, prv, whead)


@nb.njit(cache=True)
def _drat_withdraw(c, lits, start, val, reason, tpos, trail, st, seen):
    """If clause c is the reason of a trail literal, take that literal off the trail with
    every later literal whose reason depends on a withdrawn one. Returns True if it was."""
    v0 = -1
    for i in range(start[c], start[c + 1]):
        l = lits[i]
        if val[l] == 1 and reason[l >> 1] == c:
            v0 = l >> 1
            break
    if v0 < 0:
        return False
    st[3] += 1
    stamp = st[3]
    p = tpos[v0]
    j = p
    for i in range(p, st[0]):
        l = trail[i]
        v = l >> 1
        drop = v == v0
        if not drop:
            r = reason[v]
            if r >= 0:
                for k in range(start[r], start[r + 1]):
                    u = lits[k] >> 1
                    if u != v and seen[u] == stamp:
                        drop = True
                        break
        if drop:
            seen[v] = stamp
            val[l] = 0
            val[l ^ 1] = 0
            reason[v] = -1
        else:
            trail[j] = l
            tpos[v] = j
            j += 1
    st[0] = j
    if st[1] > p:
        st[1] = p
    st[2] = 1
    return True


@nb.njit(cache=True)
def _drat_rat(c, lits, start, active, nactive, val, reason, tpos, trail, st, wlit, nxt, prv,
              whead, seen, core, mark):
    """RAT on the first literal p of lemma c: every resolvent with an active clause holding
    -p is a tautology or implied by unit propagation."""
    if start[c + 1] == start[c]:
        return False
    p = lits[start[c]]
    np_ = p ^ 1
    length = start[c + 1] - start[c]
    buf = np.empty(16, np.int32)
    for d in range(nactive):
        if active[d] == 0:
            continue
        has = False
        for i in range(start[d], start[d + 1]):
            if lits[i] == np_:
                has = True
                break
        if not has:
            continue
        st[3] += 1
        stamp = st[3]
        need = length + (start[d + 1] - start[d])
        if buf.size < need:
            buf = np.empty(need, np.int32)
        k = 0
        for i in range(start[c], start[c + 1]):
            mark[lits[i]] = stamp
            buf[k] = lits[i]
            k += 1
        taut = False
        for i in range(start[d], start[d + 1]):
            l = lits[i]
            if l == np_:
                continue
            if mark[l ^ 1] == stamp:
                taut = True
                break
            if mark[l] != stamp:
                mark[l] = stamp
                buf[k] = l
                k += 1
        if taut:
            continue
        if not _drat_rup(buf[:k], lits, start, val, reason, tpos, trail, st, wlit, nxt, prv,
                         whead, seen, core):
            return False
        core[d] = 1
    return True


@nb.njit(cache=True)
def drat_check(lits, start, nform, isdel, target, nvars, core, stats):
    """Backward DRAT check of the proof lines against the formula (clauses ``0..nform-1``).

    ``core`` (uint8, one per clause) receives the clauses the refutation uses. ``stats``
    (int64, 10) receives: [0] status (0 refuted, 1 a needed lemma fails, 2 no empty clause,
    3 no conflict reached), [1] the failing proof line (0-based) or -1, [2] the line where
    the conflict was reached (-1: the formula alone), [3] lemmas, [4] lemmas checked,
    [5] lemmas accepted by RAT, [6] deletions of a clause not present, [7] deletions of a
    reason clause, [8] full re-propagations, [9] deletions.
    """
    ncl = start.size - 1
    S = ncl - nform
    val = np.zeros(2 * nvars, np.int8)
    reason = np.full(nvars, -1, np.int64)
    tpos = np.zeros(nvars, np.int64)
    trail = np.empty(nvars, np.int32)
    st = np.zeros(4, np.int64)  # trail length, head, dirty flag, stamp counter
    wlit = np.zeros(2 * ncl, np.int32)
    nxt = np.full(2 * ncl, -1, np.int64)
    prv = np.full(2 * ncl, -1, np.int64)
    whead = np.full(2 * nvars, -1, np.int64)
    seen = np.zeros(nvars, np.int64)
    mark = np.zeros(2 * nvars, np.int64)
    active = np.zeros(ncl, np.uint8)
    units = np.empty(ncl, np.int64)
    nunits = 0
    for k in range(10):
        stats[k] = 0
    stats[1] = -1
    stats[2] = -1
    has_empty = False
    for s in range(S):
        if isdel[s] == 0:
            stats[3] += 1
            if start[nform + s + 1] == start[nform + s]:
                has_empty = True
        else:
            stats[9] += 1
            if target[s] < 0:
                stats[6] += 1
    # ---- forward: the formula, then the proof lines until unit propagation conflicts
    cc = -1
    clit = -1
    conflict_step = -2
    for c in range(nform):
        active[c] = 1
        length = start[c + 1] - start[c]
        if length == 0:
            if cc < 0:
                cc = c
                has_empty = True
        elif length == 1:
            units[nunits] = c
            nunits += 1
        else:
            _drat_link(2 * c, lits[start[c]], wlit, nxt, prv, whead)
            _drat_link(2 * c + 1, lits[start[c] + 1], wlit, nxt, prv, whead)
    if not has_empty:
        stats[0] = 2
        return
    if cc < 0:
        cc = _drat_reprocess(nunits, units, active, lits, start, val, reason, tpos, trail, st,
                             wlit, nxt, prv, whead)
    if cc >= 0:
        conflict_step = -1
    else:
        for s in range(S):
            c = nform + s
            if isdel[s] == 1:
                d = target[s]
                if d < 0:
                    continue
                active[d] = 0
                if start[d + 1] - start[d] >= 2:
                    _drat_unlink(2 * d, wlit, nxt, prv, whead)
                    _drat_unlink(2 * d + 1, wlit, nxt, prv, whead)
                if _drat_withdraw(d, lits, start, val, reason, tpos, trail, st, seen):
                    stats[7] += 1
                continue
            active[c] = 1
            length = start[c + 1] - start[c]
            if length == 0:
                cc = _drat_propagate(lits, start, val, reason, tpos, trail, st, wlit, nxt,
                                     prv, whead)
                if cc < 0 and st[2] == 1:
                    stats[8] += 1
                    cc = _drat_reprocess(nunits, units, active, lits, start, val, reason,
                                         tpos, trail, st, wlit, nxt, prv, whead)
                if cc < 0:
                    stats[0] = 1
                    stats[1] = s
                    return
                conflict_step = s
                break
            if length == 1:
                units[nunits] = c
                nunits += 1
                l = lits[start[c]]
                if val[l] == -1:
                    cc = c
                    conflict_step = s
                    break
                if val[l] == 0:
                    _drat_assign(l, c, val, reason, tpos, trail, st)
                else:
                    reason[l >> 1] = c  # a unit clause is the simplest reason
            else:
                state = _drat_attach(c, lits, start, val, tpos, wlit, nxt, prv, whead)
                if state == 2:
                    cc = c
                    conflict_step = s
                    break
                if state == 1:
                    _drat_assign(wlit[2 * c], c, val, reason, tpos, trail, st)
            cc = _drat_propagate(lits, start, val, reason, tpos, trail, st, wlit, nxt, prv,
                                 whead)
            if cc >= 0:
                conflict_step = s
                break
    if conflict_step == -2:
        stats[0] = 3
        return
    stats[2] = conflict_step
    # ---- backward: undo the lines from the conflict down, checking each lemma marked core
    _drat_analyze(cc, clit, lits, start, reason, seen, core, st)
    for s in range(conflict_step, -1, -1):
        c = nform + s
        if isdel[s] == 1:
            d = target[s]
            if d < 0:
                continue
            active[d] = 1
            length = start[d + 1] - start[d]
            if length >= 2:
                if _drat_attach(d, lits, start, val, tpos, wlit, nxt, prv, whead) != 0:
                    st[2] = 1
            elif length == 1 and val[lits[start[d]]] != 1:
                st[2] = 1
            continue
        active[c] = 0
        length = start[c + 1] - start[c]
        if length >= 2:
            _drat_unlink(2 * c, wlit, nxt, prv, whead)
            _drat_unlink(2 * c + 1, wlit, nxt, prv, whead)
        _drat_withdraw(c, lits, start, val, reason, tpos, trail, st, seen)
        if core[c] == 0:
            continue
        stats[4] += 1
        clause = lits[start[c]:start[c + 1]]
        ok = _drat_rup(clause, lits, start, val, reason, tpos, trail, st, wlit, nxt, prv,
                       whead, seen, core)
        if not ok and st[2] == 1:
            stats[8] += 1
            cc = _drat_reprocess(nunits, units, active, lits, start, val, reason, tpos, trail,
                                 st, wlit, nxt, prv, whead)
            if cc >= 0:  # the formula at this line is itself in conflict
                _drat_analyze(cc, -1, lits, start, reason, seen, core, st)
                ok = True
            else:
                ok = _drat_rup(clause, lits, start, val, reason, tpos, trail, st, wlit, nxt,
                               prv, whead, seen, core)
        if not ok:
            ok = _drat_rat(c, lits, start, active, c, val, reason, tpos, trail, st, wlit, nxt,
                           prv, whead, seen, core, mark)
            if ok:
                stats[5] += 1
        if not ok:
            stats[0] = 1
            stats[1] = s
            return
    stats[0] = 0
