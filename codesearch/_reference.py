"""Slow, obviously correct pure-Python twins of the kernels in :mod:`codesearch._kernels`.

Each function here computes the same thing as its kernel, by the definition and without any
cleverness; the tests compare the two on random inputs.
"""

from __future__ import annotations

import itertools

import numpy as np

# ======================================================================= distances (foundation)


def hamming(x, y) -> int:
    """Number of positions where the two words differ."""
    return sum(1 for a, b in zip(x, y) if a != b)


def distance_distribution(words: np.ndarray) -> list[int]:
    """Number of unordered pairs at each distance 0..n."""
    rows = [tuple(int(s) for s in r) for r in words]
    n = words.shape[1]
    out = [0] * (n + 1)
    for i in range(len(rows)):
        for j in range(i + 1, len(rows)):
            out[hamming(rows[i], rows[j])] += 1
    return out


def first_close_pair(words: np.ndarray, below: int) -> tuple[int, int, int] | None:
    """First pair (i, j) in row order with distance < ``below``, or None."""
    rows = [tuple(int(s) for s in r) for r in words]
    for i in range(len(rows)):
        for j in range(i + 1, len(rows)):
            dist = hamming(rows[i], rows[j])
            if dist < below:
                return i, j, dist
    return None


def linear_weight_distribution(gen: np.ndarray, p: int) -> list[int]:
    """Weight distribution of the span of ``gen``'s rows over GF(p), by listing all combinations."""
    k, n = gen.shape
    out = [0] * (n + 1)
    for coeffs in itertools.product(range(p), repeat=k):
        word = [sum(c * int(gen[r, x]) for r, c in enumerate(coeffs)) % p for x in range(n)]
        out[sum(1 for s in word if s)] += 1
    return out


def least_weight_of_row_sums(gen: np.ndarray, p: int, w: int, best: int) -> int:
    """Least weight of the combinations of exactly ``w`` distinct rows, all coefficients
    nonzero (``best`` if none is lighter); twin of ``least_weight_of_row_sums_*``."""
    k, n = gen.shape
    out = best
    for rows in itertools.combinations(range(k), w):
        for coeffs in itertools.product(range(1, p), repeat=w):
            word = [sum(c * int(gen[r, x]) for r, c in zip(rows, coeffs)) % p for x in range(n)]
            out = min(out, sum(1 for s in word if s))
    return out


def gf_rank(words: np.ndarray, p: int) -> int:
    """Rank over GF(p) by textbook Gaussian elimination on a list of lists."""
    rows = [[int(s) % p for s in r] for r in words]
    rank, n = 0, (len(rows[0]) if rows else 0)
    for col in range(n):
        pivot = next((i for i in range(rank, len(rows)) if rows[i][col]), None)
        if pivot is None:
            continue
        rows[rank], rows[pivot] = rows[pivot], rows[rank]
        inv = pow(rows[rank][col], p - 2, p)
        rows[rank] = [(v * inv) % p for v in rows[rank]]
        for i in range(len(rows)):
            if i != rank and rows[i][col]:
                f = rows[i][col]
                rows[i] = [(a - f * b) % p for a, b in zip(rows[i], rows[rank])]
        rank += 1
    return rank


# ======================================================================= large binary codes


def binary_span_check(words: list[int]) -> tuple[int, int, int]:
    """Twin of the kernel: rank by :func:`gf_rank`, distinctness by a set, weights by bin()."""
    n = max((int(w).bit_length() for w in words), default=0) or 1
    rows = np.array([[(int(w) >> j) & 1 for j in range(n)] for w in words], dtype=np.uint8)
    r = gf_rank(rows, 2) if len(words) else 0
    distinct = int(len(words) == 2**r and len(set(int(w) for w in words)) == len(words))
    minw = min((bin(int(w)).count("1") for w in words if int(w)), default=65)
    return r, distinct, minw


def qary_ball_clash(words: np.ndarray, r: int, probe: bool) -> bool:
    """Twin of the q-ary kernel's verdict: two rows within 2r (2r + 1 with ``probe``)?"""
    limit = 2 * r + (1 if probe else 0)
    rows = [tuple(int(s) for s in w) for w in words]
    return any(hamming(rows[i], rows[j]) <= limit
               for i in range(len(rows)) for j in range(i + 1, len(rows)))


def binary_ball_clash(words: list[int], r: int, probe: bool) -> bool:
    """Twin of the kernel's verdict: do two rows lie within 2r (2r + 1 with ``probe``)?"""
    limit = 2 * r + (1 if probe else 0)
    ws = [int(w) for w in words]
    return any(bin(ws[i] ^ ws[j]).count("1") <= limit
               for i in range(len(ws)) for j in range(i + 1, len(ws)))


# ======================================================================= clique engine (exact search)
#
# Graphs here are lists of Python sets (adj[v] = neighbours of v), converted from the kernels'
# bitset rows by ``bitset_rows_to_sets``.


def bitset_rows_to_sets(adj: np.ndarray, n: int) -> list[set[int]]:
    """Neighbour sets from bitset rows, one bit at a time."""
    return [{j for j in range(n) if (int(adj[i, j >> 6]) >> (j & 63)) & 1} for i in range(n)]


def max_weight_clique_value(adj: list[set[int]], weights) -> int:
    """Largest clique weight, by plain recursive enumeration of cliques (no bound at all)."""
    n = len(adj)
    best = 0

    def grow(clique_weight: int, candidates: list[int]) -> None:
        nonlocal best
        best = max(best, clique_weight)
        for i, v in enumerate(candidates):
            grow(clique_weight + int(weights[v]), [u for u in candidates[i + 1 :] if u in adj[v]])

    grow(0, list(range(n)))
    return best


def colour_level(adj: list[set[int]], weights, candidates: set[int], thr: int
                 ) -> tuple[list[int], list[int], int]:
    """Greedy sequential colouring of ``candidates`` in increasing vertex order.

    Each class takes, in order, every uncoloured vertex not adjacent to one already in the
    class. A class's bound is its heaviest weight; cumulative bounds are summed. Returns the
    listed vertices (classes whose cumulative bound exceeds ``thr``, in class order), their
    cumulative bounds, and the number of classes.
    """
    uncoloured = sorted(candidates)
    listed: list[int] = []
    bounds: list[int] = []
    cum = 0
    classes = 0
    while uncoloured:
        classes += 1
        cls: list[int] = []
        for v in uncoloured:
            if all(u not in adj[v] for u in cls):
                cls.append(v)
        uncoloured = [v for v in uncoloured if v not in cls]
        cum += max(int(weights[v]) for v in cls)
        if cum > thr:
            listed += cls
            bounds += [cum] * len(cls)
    return listed, bounds, classes


def degeneracy_order(adj: list[set[int]]) -> list[int]:
    """Repeatedly delete a vertex of least remaining degree (lowest index on ties); return
    the deletion sequence reversed."""
    alive = set(range(len(adj)))
    removed: list[int] = []
    while alive:
        v = min(alive, key=lambda x: (len(adj[x] & alive), x))
        removed.append(v)
        alive.remove(v)
    return removed[::-1]


def permute(adj: list[set[int]], order) -> list[set[int]]:
    """New vertex i is old vertex order[i]."""
    where = {int(old): new for new, old in enumerate(order)}
    return [{where[u] for u in adj[int(old)]} for old in order]


def greedy_clique(adj: list[set[int]], weights, starts: int) -> int:
    """Best weight of the greedy cliques started at vertices 0..starts-1, adding vertices in
    increasing order when adjacent to all chosen."""
    best = 0
    for s in range(min(starts, len(adj))):
        chosen = [s]
        for v in range(len(adj)):
            if v != s and all(v in adj[u] for u in chosen):
                chosen.append(v)
        best = max(best, sum(int(weights[v]) for v in chosen))
    return best


def code_adjacency(words: np.ndarray, d: int) -> list[set[int]]:
    """Neighbour sets of the code graph: distinct words at Hamming distance >= d."""
    rows = [tuple(int(s) for s in r) for r in words]
    return [{j for j in range(len(rows)) if j != i and hamming(rows[i], rows[j]) >= d}
            for i in range(len(rows))]
# ======================================================================= heuristics (greedy, local search)
# Twins of the ``heur_*`` kernels. Words are integer indices in base q (first coordinate most
# significant), as in the kernels; everything here goes through explicit digit tuples.

_MASK64 = (1 << 64) - 1


def heur_digits(x: int, q: int, n: int) -> tuple[int, ...]:
    """Digits of word index ``x`` (first coordinate first)."""
    out = []
    for _ in range(n):
        out.append(x % q)
        x //= q
    return tuple(reversed(out))


def heur_index(digits, q: int) -> int:
    """Inverse of :func:`heur_digits`."""
    x = 0
    for s in digits:
        x = x * q + int(s)
    return x


def heur_index_dist(x: int, y: int, q: int, n: int) -> int:
    """Hamming distance between two word indices, by their digits."""
    return hamming(heur_digits(x, q, n), heur_digits(y, q, n))


def heur_rand(state: list[int]) -> int:
    """xorshift64* step on ``state[0]`` (Marsaglia 2003; Vigna 2016 multiplier)."""
    x = state[0]
    x ^= x >> 12
    x ^= (x << 25) & _MASK64
    x ^= x >> 27
    state[0] = x
    return (x * 0x2545F4914F6CDD1D) & _MASK64


def heur_randint(state: list[int], bound: int) -> int:
    """Same reduction as the kernel: drop two low bits, then modulo."""
    return (heur_rand(state) >> 2) % bound


def heur_order_at(t: int, kind: int, q: int, n: int, perm) -> int:
    """t-th word of the scan: lexicographic, modular q-ary Gray code, or ``perm[t]``."""
    if kind == 0:
        return t
    if kind == 2:
        return int(perm[t])
    b = heur_digits(t, q, n)
    g = [b[0]] + [(b[j] - b[j - 1]) % q for j in range(1, n)]
    return heur_index(g, q)


def heur_greedy(q: int, n: int, d: int, kind: int, perm=None) -> list[int]:
    """Greedy code of a whole scan, by comparing each word with every codeword kept."""
    code: list[int] = []
    kept_digits: list[tuple[int, ...]] = []
    for t in range(q**n):
        x = heur_order_at(t, kind, q, n, perm)
        dx = heur_digits(x, q, n)
        if all(hamming(dx, c) >= d for c in kept_digits):
            code.append(x)
            kept_digits.append(dx)
    return code


def heur_greedy_sample(q: int, n: int, d: int, space: int, max_fail: int, state: list[int],
                       cap: int) -> list[int]:
    """Random greedy with the kernel's random stream and stop rule."""
    out: list[int] = []
    fails = 0
    while fails < max_fail and len(out) < cap:
        x = heur_randint(state, space)
        if all(heur_index_dist(x, y, q, n) >= d for y in out):
            out.append(x)
            fails = 0
        else:
            fails += 1
    return out


def heur_ball_counts(words, q: int, n: int, d: int) -> list[int]:
    """For every word y of the space: the number of codewords within distance d - 1."""
    return [sum(1 for w in words if heur_index_dist(y, int(w), q, n) < d) for y in range(q**n)]


def heur_conflicts(words, q: int, n: int, d: int) -> list[int]:
    """For each codeword: the number of other codewords closer than d."""
    words = [int(w) for w in words]
    return [sum(1 for j, v in enumerate(words) if j != i and heur_index_dist(u, v, q, n) < d)
            for i, u in enumerate(words)]
# ======================================================================= orbits (orbit search)


def orbit_labels(images: list) -> tuple[list[int], list[int], list[int], list[int]]:
    """Twin of :func:`codesearch._kernels.orbit_union` + :func:`~codesearch._kernels.orbit_flatten`,
    by breadth-first search over the generator graph: ``(label, order, starts, reps)`` with
    ``label[r]`` the least index of the orbit of r."""
    total = len(images[0]) if images else 0
    label = [-1] * total
    members: list[list[int]] = []
    for r in range(total):
        if label[r] >= 0:
            continue
        orbit, queue = [r], [r]
        label[r] = r
        while queue:
            x = queue.pop()
            for img in images:
                y = int(img[x])
                if label[y] < 0:
                    label[y] = r
                    orbit.append(y)
                    queue.append(y)
        members.append(sorted(orbit))
    order = [x for orbit in members for x in orbit]
    starts = [0]
    for orbit in members:
        starts.append(starts[-1] + len(orbit))
    return label, order, starts, [orbit[0] for orbit in members]


def orbit_inner_distance(planes, order, starts, n) -> list[int]:
    """Twin of :func:`codesearch._kernels.orbit_inner_distance`, by the definition: the least
    distance between two words of each orbit (all pairs), ``n + 1`` for one word; with no
    planes the words are their indices."""
    def word(w):
        if planes.shape[0] == 0:
            return [int(w)]
        return [int(planes[p, w]) for p in range(planes.shape[0])]

    out = []
    for k in range(len(starts) - 1):
        members = [int(w) for w in order[int(starts[k]):int(starts[k + 1])]]
        best = n + 1
        for i, a in enumerate(members):
            for b in members[i + 1:]:
                diff = 0
                for x, y in zip(word(a), word(b)):
                    diff |= x ^ y
                best = min(best, bin(diff).count("1"))
        out.append(best)
    return out


def orbit_adjacency_rows(planes, reps, words, starts, d, lo, hi, adj) -> None:
    """Twin of :func:`codesearch._kernels.orbit_adjacency_rows`, by the definition.

    Orbits i < j (i in ``lo..hi-1``) are compatible iff the representative of orbit i is at
    distance >= d from every word of orbit j; distance = number of coordinates where some bit
    plane differs.
    """
    nplanes, _ = planes.shape
    k = len(reps)
    for i in range(lo, hi):
        r = int(reps[i])
        for j in range(i + 1, k):
            dists = []
            for t in range(int(starts[j]), int(starts[j + 1])):
                w = int(words[t])
                diff = 0
                for p in range(nplanes):
                    diff |= int(planes[p, r]) ^ int(planes[p, w])
                dists.append(bin(diff).count("1"))
            adj[i, j] = 1 if min(dists) >= d else 0


# ======================================================================= DRAT proof checking


def drat_tokens(data: bytes, allow_delete: bool) -> list[tuple[bool, list[int]]] | None:
    """Twin of :func:`codesearch._kernels.drat_tokens`: the clauses of DIMACS text as
    ``(is_deletion, literals)``, or None when the text is malformed."""
    out: list[tuple[bool, list[int]]] = []
    cur: list[int] = []
    deleting = False
    import re

    text = data.decode("latin-1")
    for line in text.split("\n"):
        toks = [t for t in re.split("[ \t\r]+", line) if t]
        for tok in toks:
            if tok.startswith("c") and not cur and not deleting:
                break  # comment to the end of the line
            if tok == "d" and allow_delete and not cur and not deleting:
                deleting = True
                continue
            body = tok[1:] if tok.startswith("-") else tok
            if not body or any(ch not in "0123456789" for ch in body) or tok == "-0":
                return None
            v = int(tok)
            if abs(v) >= 2**31:
                return None
            if v == 0:
                out.append((deleting, cur))
                cur, deleting = [], False
            else:
                cur.append(v)
    if cur or deleting:
        return None
    return out


def _dedupe(clause: list[int]) -> list[int]:
    out: list[int] = []
    for lit in clause:
        if lit not in out:
            out.append(lit)
    return out


def _propagates_to_conflict(clauses: list[list[int]], assign: dict[int, bool]) -> bool:
    """Unit propagation by repeated scans; True when some clause becomes false."""
    changed = True
    while changed:
        changed = False
        for c in clauses:
            free = []
            sat = False
            for lit in c:
                v = assign.get(abs(lit))
                if v is None:
                    free.append(lit)
                elif v == (lit > 0):
                    sat = True
                    break
            if sat:
                continue
            if not free:
                return True
            if len(free) == 1:
                assign[abs(free[0])] = free[0] > 0
                changed = True
    return False


def drat_rup(clauses: list[list[int]], lemma: list[int]) -> bool:
    """Does unit propagation refute "every literal of ``lemma`` is false"?"""
    assign: dict[int, bool] = {}
    for lit in lemma:
        if assign.get(abs(lit)) == (lit > 0):
            return True  # the lemma holds a literal and its negation
        assign[abs(lit)] = lit < 0
    return _propagates_to_conflict(clauses, assign)


def drat_rat(clauses: list[list[int]], lemma: list[int]) -> bool:
    """RAT on the first literal: every resolvent is a tautology or RUP."""
    if not lemma:
        return False
    p = lemma[0]
    for d in clauses:
        if -p not in d:
            continue
        res = _dedupe(lemma + [x for x in d if x != -p])
        if any(-x in res for x in res):
            continue
        if not drat_rup(clauses, res):
            return False
    return True


def drat_check(formula: list[list[int]], proof: list[tuple[bool, list[int]]]) -> bool:
    """Slow forward DRAT checker with the semantics of :mod:`codesearch.verify.drat`, checking every
    lemma up to the first empty clause (so it accepts a subset of what the backward kernel
    accepts: the kernel skips lemmas no conflict depends on)."""
    active = [_dedupe(c) for c in formula]
    if any(not c for c in active):
        return True
    if not any(not isdel and not c for isdel, c in proof):
        return False
    for isdel, clause in proof:
        clause = _dedupe(clause)
        if isdel:
            key = set(clause)
            for i in range(len(active) - 1, -1, -1):
                if set(active[i]) == key:
                    del active[i]
                    break
            continue
        if not (drat_rup(active, clause) or drat_rat(active, clause)):
            return False
        if not clause:
            return True
        active.append(clause)
    return False
