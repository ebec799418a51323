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
