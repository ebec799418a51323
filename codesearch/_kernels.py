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
            else:
                for j in range(i + 1, m):
                    h[j & 3, _pair_distance(packed, i, j, planes, limbs)] += 1
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
def heur_local_init(q, n, d, M, words, conf, mode, pw, masks, pat_ptr, pat_pos, pat_add, counts):
    """Fill ``counts`` (mode 1) and ``conf`` for ``words[:M]``; return the conflicting pairs.

    ``counts[y]`` = number of codewords within distance d-1 of ``y``; ``conf[i]`` = number of
    other codewords closer than d to ``words[i]``.
    """
    dig = np.zeros(n, dtype=np.int64)
    kk = np.zeros(1, dtype=np.int64)
    if mode == 1:
        counts[:] = 0
        for i in range(M):
            _heur_ball_add(words[i], 1, q, n, pw, masks, pat_ptr, pat_pos, pat_add, counts, dig,
                           kk)
        for i in range(M):
            conf[i] = counts[words[i]] - 1
    else:
        for i in range(M):
            c = 0
            for j in range(M):
                if j != i and heur_index_dist(words[i], words[j], q, n) < d:
                    c += 1
            conf[i] = c
    total = 0
    for i in range(M):
        total += conf[i]
    return total // 2


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
