"""Unions of cosets of a binary linear code: a search over syndromes, and its recorded results.

Problem
-------
Given a binary linear code L = [n, k, d_L] and a target distance d <= d_L, find many words
x_1 = 0, x_2, .., x_m such that the union of the cosets x_i + L has minimum distance >= d.
The union has m 2^k words.

Method
------
Two words of one coset differ by a nonzero word of L (weight >= d_L >= d). A word of x_i + L
and one of x_j + L differ by a word of the coset x_i + x_j + L, so the union has distance
>= d exactly when every coset x_i + x_j + L (i != j) has minimum weight >= d. A coset is
named by its syndrome s = H x^T (H a parity-check matrix, r = n - k rows), and its minimum
weight w(s) is the least number of columns of H summing to s: a breadth-first search over
the 2^r syndromes, adding one column per level, finds every w(s) and a word of that weight
(:func:`coset_weights`, O(2^r n)). The good unions are then exactly the cliques containing 0
of the Cayley graph on F_2^r whose connection set is S = {s : w(s) >= d}; the graph is
vertex-transitive, so fixing 0 loses nothing and the search runs on the subgraph induced by
S (s ~ t when w(s + t) >= d).

:func:`coset_union_search` solves that clique problem with the exact branch and bound of
:mod:`codesearch.search.clique` (only an exhausted search reports the union as the largest for
this L) or, for large S, with seeded heuristics (never optimal): randomised greedy restarts,
and a swap local search (add a syndrome compatible with all chosen ones; else exchange one
chosen syndrome for one compatible with all the others, the removed one tabu for a few
moves; else drop one) that tests compatibility as ``w(v + c) >= d`` on the fly, so it needs
no adjacency matrix and runs on connection sets of 10^5-10^6 syndromes.

:func:`symmetric_coset_union_search` prescribes symmetry: a coordinate permutation that
maps L onto itself acts linearly on the syndromes (:func:`syndrome_action`) and keeps coset
weights, so it is an automorphism of the Cayley graph fixing 0; the unions invariant under a
group G are {0} plus unions of G-orbits that are cliques and pairwise compatible, a maximum
weight clique problem (weights = orbit sizes) on a graph of about 2^r / |G| orbits, which the
exact search solves where the plain clique problem does not finish (the method of prescribed
automorphisms, as in the orbit search of :mod:`codesearch.search`).

Record h7-rep9, (16, 2720, 3)
    L = Hamming(7,4) + repetition(9) (direct sum, [16, 5, 3]). A coset of L is a pair
    (coset of the Hamming code, i.e. a point a of F_2^3; complementary pair {b, b + 1} in
    F_2^9), and a union of cosets is a choice of complement-closed sets B_a in F_2^9 with
    distance >= 3 inside each B_a and >= 2 between B_a and B_a' (the Hamming cosets of a != a'
    differ in at least one place). The local search found 85 cosets (170 words of F_2^9
    split into 8 such sets), 85 * 32 = 2720 words; the parity extension is (17, 2720, 4).

Record rm14-tail4, (20, 2560, 5)
    L = RM(1,4) on coordinates 0..15 and nothing on 16..19 ([20, 5, 8]). A coset is a pair
    (coset of RM(1,4) in F_2^16, of weight 0..6; a tail in F_2^4), and two chosen pairs need
    weight(coset sum) + distance(tails) >= 5. This generalises the Nordstrom-Robinson
    translates with tails (NR is 8 cosets of RM(1,4)): the local search found 80 pairs,
    80 * 32 = 2560 words, where translates of NR stop at 2048; extended, (21, 2560, 6).

Records
-------
:data:`RECORDS` keeps unions found by such searches (the inner code's generator rows and the
coset leaders as integers, bit j = coordinate j, with the search parameters and seed), so the
table rebuilds them in milliseconds; every build is re-verified by the independent checker
(:func:`codesearch.constructions.registry.build_family`).

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977: ch. 1 sections 3-4 (cosets, syndromes, coset leaders), ch. 2 section 7 (nonlinear codes
as unions of cosets of a linear code, e.g. the Nordstrom-Robinson code).
N. J. A. Sloane and D. S. Whitehead, A new family of single-error correcting codes, *IEEE
Trans. Inform. Theory* 16 (1970) 717-719 (unions of cosets of linear codes; from memory).
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from typing import Any

import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import Code, LinearCode

__all__ = ["CosetWeights", "CosetUnionResult", "CosetRecord", "RECORDS", "coset_weights",
           "good_syndromes", "coset_union_search", "coset_union_from_record",
           "union_words", "leading_balance", "random_subcode", "start_syndromes", "to_record",
           "syndrome_action", "symmetric_coset_union_search",
           "MAX_REDUNDANCY"]

#: Largest redundancy r = n - k searched (2^r syndromes held as arrays).
MAX_REDUNDANCY = 24
#: Largest connection set handed to the exact clique search (a dense bitset graph).
MAX_EXACT_VERTICES = 12_000


# ----------------------------------------------------------------------------- bits
def _to_ints(rows: np.ndarray) -> np.ndarray:
    """0/1 rows -> integers, bit j = column j."""
    rows = np.asarray(rows, dtype=np.int64)
    return (rows << np.arange(rows.shape[1], dtype=np.int64)).sum(axis=1)


def _to_rows(ints: Any, n: int) -> np.ndarray:
    ints = np.asarray(list(ints) if not isinstance(ints, np.ndarray) else ints,
                      dtype=np.int64).reshape(-1)
    out = np.empty((ints.size, n), dtype=np.uint8)
    for j in range(n):  # one coordinate at a time: no (M, n) int64 temporary
        out[:, j] = (ints >> j) & 1
    return out


def _parity_columns(code: LinearCode) -> np.ndarray:
    """Columns of a parity-check matrix of ``code`` as integers (bit t = row t)."""
    from codesearch.gf import field

    h = field(2).null_space(code.generator)
    if h.shape[0] == 0:
        return np.zeros(code.n, dtype=np.int64)
    return _to_ints(np.asarray(h, dtype=np.uint8).T)


# ----------------------------------------------------------------------------- weights
@dataclass(frozen=True)
class CosetWeights:
    """Minimum weights of all cosets of a binary linear code.

    Attributes
    ----------
    n, k : int
        Length and dimension of the code.
    columns : numpy.ndarray
        The parity-check columns (int64, bit t = row t), r = n - k rows.
    weight : numpy.ndarray
        ``weight[s]`` = least weight of a word with syndrome s (uint8, length 2^r).
    via : numpy.ndarray
        ``via[s]`` = a column index j such that s + column j has weight ``weight[s] - 1``
        (-1 for s = 0): following it yields a coset leader.
    """

    n: int
    k: int
    columns: np.ndarray
    weight: np.ndarray
    via: np.ndarray

    @property
    def r(self) -> int:
        return self.n - self.k

    @property
    def covering_radius(self) -> int:
        return int(self.weight.max())

    def leader(self, s: int) -> int:
        """A word (integer, bit j = coordinate j) of least weight with syndrome ``s``."""
        word = 0
        s = int(s)
        while s:
            j = int(self.via[s])
            word ^= 1 << j
            s ^= int(self.columns[j])
        return word

    def syndrome(self, word: int) -> int:
        s = 0
        for j in range(self.n):
            if (word >> j) & 1:
                s ^= int(self.columns[j])
        return s


def coset_weights(code: LinearCode) -> CosetWeights:
    """Minimum weight of every coset of a binary linear code (breadth-first over syndromes).

    Raises
    ------
    ParameterError
        For a non-binary code or a redundancy n - k above :data:`MAX_REDUNDANCY`.
    """
    if code.q != 2:
        raise ParameterError("coset unions: the inner code must be binary")
    r = code.n - code.k
    if not 0 <= r <= MAX_REDUNDANCY:
        raise ParameterError(f"coset unions: redundancy n - k = {r} is above {MAX_REDUNDANCY} "
                             f"(2^{r} syndromes)")
    cols = _parity_columns(code)
    size = 1 << r
    weight = np.full(size, 255, dtype=np.uint8)
    via = np.full(size, -1, dtype=np.int8 if code.n < 128 else np.int16)
    weight[0] = 0
    frontier = np.zeros(1, dtype=np.int64)
    level = 0
    # invariant: weight[s] is final for every s reached at a level <= the current one
    while frontier.size:
        level += 1
        for j, c in enumerate(cols.tolist()):
            cand = frontier ^ c
            new = cand[weight[cand] == 255]
            weight[new] = level
            via[new] = j
        frontier = np.flatnonzero(weight == level).astype(np.int64)
    if (weight == 255).any():  # cannot happen: H has full row rank r
        raise ParameterError("coset unions: the parity-check matrix is not of full rank")
    weight.setflags(write=False)
    via.setflags(write=False)
    return CosetWeights(code.n, code.k, cols, weight, via)


def good_syndromes(weights: CosetWeights, d: int) -> np.ndarray:
    """The nonzero syndromes whose cosets have minimum weight >= d (the connection set)."""
    good = np.flatnonzero(weights.weight >= d)
    return good[good != 0]


# ----------------------------------------------------------------------------- search
@dataclass(frozen=True)
class CosetUnionResult:
    """Outcome of a coset-union search.

    Attributes
    ----------
    n, k, d : int
        Inner code length and dimension, target distance.
    syndromes : tuple of int
        Syndromes of the chosen cosets (the first is 0, the inner code itself).
    leaders : tuple of int
        A word of each chosen coset (bit j = coordinate j).
    size : int
        Words of the union: ``len(syndromes) * 2^k``.
    optimal : bool
        True only when the exact search was exhausted: no union of more cosets of this inner
        code has distance >= d (for ``method == "orbit"``: no larger union invariant under
        the prescribed group).
    method : str
        ``"exact"``, ``"greedy"``, ``"local"`` or ``"orbit"`` (a search restricted to unions
        invariant under a permutation group: :func:`symmetric_coset_union_search`; its
        ``optimal`` covers those unions only).
    seed : int
    connection_set : int
        Number of nonzero syndromes with coset weight >= d.
    seconds : float
    """

    n: int
    k: int
    d: int
    syndromes: tuple[int, ...]
    leaders: tuple[int, ...]
    size: int
    optimal: bool
    method: str
    seed: int
    connection_set: int
    seconds: float


def _greedy(good: np.ndarray, sset: np.ndarray, rng: np.random.Generator, deadline: float,
            restarts: int, goal: int | None) -> list[int]:
    """Randomised greedy cliques containing 0: repeatedly add a random remaining candidate,
    keep the candidates adjacent to it (all of them adjacent to every chosen syndrome)."""
    best: list[int] = []
    for _ in range(restarts):
        cand = sset
        chosen: list[int] = []
        while cand.size:
            # take the best of a few random candidates by how many candidates it keeps
            picks = rng.choice(cand, size=min(8, cand.size), replace=False)
            keep = [cand[good[cand ^ p]] for p in picks.tolist()]
            i = int(np.argmax([x.size for x in keep]))
            chosen.append(int(picks[i]))
            cand = keep[i]
        if len(chosen) > len(best):
            best = chosen
        if (goal is not None and len(best) + 1 >= goal) or time.monotonic() > deadline:
            break
    return best


def _local(good: np.ndarray, rng: np.random.Generator, deadline: float, max_moves: int,
           goal: int | None, start: list[int]) -> list[int]:
    """Seeded swap local search for a large clique containing 0 of the Cayley graph.

    ``miss[v]`` counts the chosen syndromes c with w(v + c) < d (0 is always chosen, so
    syndromes outside the connection set are never free). A free syndrome (miss 0) is added;
    otherwise a syndrome missing exactly one chosen c != 0 replaces it (c is then tabu for a
    few moves); with neither, a random chosen syndrome is dropped. The best clique is kept.
    """
    size = good.size
    idx = np.arange(size, dtype=np.int64)
    bad = (~good).astype(np.int32)
    miss = bad[idx].copy()  # chosen = {0}: w(v + 0) = w(v)
    chosen: list[int] = [0]
    inside = np.zeros(size, dtype=bool)
    inside[0] = True
    tabu = np.zeros(size, dtype=np.int64)

    def add(v: int) -> None:
        nonlocal miss
        miss += bad[idx ^ v]
        chosen.append(v)
        inside[v] = True

    def drop(u: int) -> None:
        nonlocal miss
        miss -= bad[idx ^ u]
        chosen.remove(u)
        inside[u] = False

    for v in start:
        if v and miss[v] == 0 and not inside[v]:
            add(v)
    best = list(chosen)
    tenure = 7
    for move in range(1, max_moves + 1):
        free = np.flatnonzero((miss == 0) & ~inside & (tabu <= move))
        if free.size:
            add(int(free[rng.integers(free.size)]))
            if len(chosen) > len(best):
                best = list(chosen)
                if goal is not None and len(best) >= goal:
                    break
        else:
            one = np.flatnonzero((miss == 1) & ~inside & (tabu <= move))
            if one.size:
                v = int(one[rng.integers(one.size)])
                arr = np.asarray(chosen, dtype=np.int64)
                u = int(arr[bad[arr ^ v].astype(bool)][0])
                if u == 0:  # v lies outside the connection set: never
                    tabu[v] = 1 << 40
                    continue
                drop(u)
                tabu[u] = move + tenure + int(rng.integers(3))
                add(v)
            elif len(chosen) > 1:
                u = chosen[1 + int(rng.integers(len(chosen) - 1))]
                drop(u)
                tabu[u] = move + tenure
        if move % 256 == 0 and time.monotonic() > deadline:
            break
    return best[1:]


def coset_union_search(code: LinearCode, d: int, *, method: str = "auto",
                       time_limit: float = 10.0, seed: int = 0, restarts: int = 1000,
                       goal: int | None = None, moves: int = 10**7,
                       weights: CosetWeights | None = None,
                       start: tuple[int, ...] | None = None) -> CosetUnionResult:
    """Largest union of cosets of ``code`` with minimum distance >= d that the search finds.

    Parameters
    ----------
    code : LinearCode
        The binary inner code L; its minimum distance must be >= d (checked).
    d : int
        Target distance.
    method : {"auto", "exact", "greedy", "local"}
        ``exact``: branch and bound on the connection set (at most
        :data:`MAX_EXACT_VERTICES` syndromes); ``greedy``: seeded randomised greedy restarts;
        ``local``: greedy restarts, then a seeded swap local search from the best (both
        heuristics never report optimality); ``auto``: exact when the connection set is
        small enough, greedy otherwise.
    time_limit : float
        Seconds for the clique stage.
    seed : int
        Seed of ``numpy.random.default_rng`` (greedy restarts).
    restarts : int
        Greedy restarts at most.
    goal : int, optional
        Stop as soon as a union of this many cosets is found.
    moves : int
        Local-search moves at most (``local``).
    weights : CosetWeights, optional
        Precomputed :func:`coset_weights` of ``code``.
    start : tuple of int, optional
        ``local`` only: words (bit j = coordinate j) spanning, together with ``code``, a
        linear supercode whose cosets of ``code`` all have weight >= d (e.g. the generator
        rows of a good linear code containing ``code``); the local search starts from those
        cosets instead of the greedy stage.

    Returns
    -------
    CosetUnionResult
    """
    from codesearch import verify
    from codesearch.model import Params

    if method not in ("auto", "exact", "greedy", "local"):
        raise ParameterError(f"coset unions: method is auto, exact, greedy or local, "
                             f"got {method!r}")
    if not 1 <= d <= code.n:
        raise ParameterError(f"coset unions: need 1 <= d <= n = {code.n}, got d={d}")
    t0 = time.monotonic()
    from codesearch.errors import VerificationError

    try:
        verify.assert_linear_code(code, Params(2, code.n, d))
    except VerificationError:
        raise ParameterError(f"coset unions: the inner code has distance < d = {d}") from None
    w = coset_weights(code) if weights is None else weights
    sset = good_syndromes(w, d)
    good = w.weight >= d
    if method == "auto":
        method = "exact" if sset.size <= MAX_EXACT_VERTICES else "greedy"
    if start is not None and method != "local":
        raise ParameterError("coset unions: a start supercode needs the local method")
    optimal = False
    if method == "exact":
        if sset.size > MAX_EXACT_VERTICES:
            raise ParameterError(f"coset unions: {sset.size} syndromes in the connection set, "
                                 f"above {MAX_EXACT_VERTICES} for the exact search")
        chosen: list[int] = []
        if sset.size:
            from codesearch.search.clique import bitsets_from_dense, max_clique

            adj = good[sset[:, None] ^ sset[None, :]]
            res = max_clique(bitsets_from_dense(adj), time_limit=time_limit,
                             goal=None if goal is None else goal - 1)
            chosen = [int(sset[v]) for v in res.vertices]
            optimal = res.optimal
        else:
            optimal = True
    else:
        rng = np.random.default_rng(seed)
        if start is not None:
            span = start_syndromes(w, start)
            if not good[span[1:]].all():
                raise ParameterError(f"coset unions: the start supercode has a coset of "
                                     f"weight below d = {d}")
            chosen = _local(good, rng, t0 + time_limit, moves, goal, span.tolist())
        else:
            share = 0.2 if method == "local" else 1.0
            # the greedy stage draws from the connection set less its least syndrome: an
            # earlier slip of good_syndromes, kept here so that the recorded searches
            # (RECORDS, rerun) still reproduce; the local search that follows and the exact
            # search see every syndrome
            chosen = _greedy(good, sset[1:], rng, t0 + share * time_limit, restarts, goal)
            if method == "local" and (goal is None or len(chosen) + 1 < goal):
                chosen = _local(good, rng, t0 + time_limit, moves, goal, [0, *chosen])
    syn = (0, *sorted(chosen))
    leaders = tuple(w.leader(s) for s in syn)
    return CosetUnionResult(code.n, code.k, d, syn, leaders, len(syn) << code.k, optimal,
                            method, seed, int(sset.size), time.monotonic() - t0)


def start_syndromes(weights: CosetWeights, words: tuple[int, ...]) -> np.ndarray:
    """Sorted syndromes of the span of ``words`` (bit j = coordinate j): the cosets of the
    inner code making up the linear code spanned by it and ``words``; the first is 0."""
    span = np.zeros(1, dtype=np.int64)
    for x in words:
        s = weights.syndrome(int(x))
        if s and not (span == s).any():
            span = np.concatenate([span, span ^ s])
    return np.sort(span)


# ----------------------------------------------------------------------------- symmetry
def syndrome_action(weights: CosetWeights, permutation: Any) -> np.ndarray:
    """The linear map on syndromes induced by a coordinate permutation that preserves L.

    Parameters
    ----------
    weights : CosetWeights
        :func:`coset_weights` of the inner code L.
    permutation : sequence of int
        ``permutation[j]`` = the coordinate that coordinate j moves to. It must map L onto
        itself (checked by the caller, :func:`symmetric_coset_union_search`); then it maps
        cosets of L to cosets of L, linearly, and preserves coset weights.

    Returns
    -------
    numpy.ndarray
        ``image[s]`` = syndrome of the permuted coset s (int64, length 2^r).
    """
    r, n = weights.r, weights.n
    p = [int(x) for x in permutation]
    image = np.zeros(1, dtype=np.int64)
    for t in range(r):
        x = weights.leader(1 << t)
        y = 0
        for j in range(n):
            if (x >> j) & 1:
                y |= 1 << p[j]
        # linearity: the syndromes with top bit t map to image(s - 2^t) + image(2^t)
        image = np.concatenate([image, image ^ weights.syndrome(y)])
    return image


def _permutes_code(code: LinearCode, permutation: list[int]) -> bool:
    from codesearch.gf import field

    gen = np.asarray(code.generator, dtype=np.uint8)
    moved = np.zeros_like(gen)
    moved[:, permutation] = gen
    both = np.concatenate([gen, moved], axis=0)
    return field(2).rank(both) == code.k


def symmetric_coset_union_search(code: LinearCode, d: int, permutations: Any, *,
                                 time_limit: float = 60.0, goal: int | None = None,
                                 weights: CosetWeights | None = None) -> CosetUnionResult:
    """Largest union of cosets of ``code`` with distance >= d that a permutation group fixes.

    A coordinate permutation g mapping L onto itself acts linearly on the syndromes and keeps
    coset weights (:func:`syndrome_action`), so it is an automorphism of the Cayley graph
    that fixes 0. A union invariant under the group G generated by ``permutations`` is {0}
    plus a union of G-orbits of the connection set, each orbit itself a clique and every two
    chosen orbits joined completely. Those orbits and that compatibility make a smaller
    graph, weighted by orbit sizes, and its maximum weight clique
    (:func:`codesearch.search.clique.max_weight_clique`) is the largest G-invariant union
    (prescribed automorphisms, as in the orbit search of :mod:`codesearch.search`).

    Parameters
    ----------
    code : LinearCode
        The binary inner code L (distance >= d, checked).
    d : int
        Target distance.
    permutations : sequence of sequences of int
        Generators of G; each maps coordinate j to ``perm[j]`` and must preserve L.
    time_limit : float
        Seconds for the weighted clique search.
    goal : int, optional
        Stop as soon as a union of this many cosets is found.
    weights : CosetWeights, optional
        Precomputed :func:`coset_weights` of ``code``.

    Returns
    -------
    CosetUnionResult
        ``method`` is ``"orbit"``; ``optimal`` is True only when the search was exhausted,
        and then it means: no union invariant under G has more cosets (a larger union
        without that symmetry may exist).

    Raises
    ------
    ParameterError
        For a permutation that is not one of 0..n-1 or does not map L onto itself.
    """
    from codesearch import verify
    from codesearch.errors import VerificationError
    from codesearch.model import Params
    from codesearch.search.clique import bitsets_from_dense, max_weight_clique

    if not 1 <= d <= code.n:
        raise ParameterError(f"coset unions: need 1 <= d <= n = {code.n}, got d={d}")
    t0 = time.monotonic()
    perms = [[int(x) for x in p] for p in permutations]
    for p in perms:
        if sorted(p) != list(range(code.n)):
            raise ParameterError(f"coset unions: {p} is not a permutation of 0..{code.n - 1}")
        if not _permutes_code(code, p):
            raise ParameterError(f"coset unions: the permutation {p} does not map the inner "
                                 f"code onto itself")
    try:
        verify.assert_linear_code(code, Params(2, code.n, d))
    except VerificationError:
        raise ParameterError(f"coset unions: the inner code has distance < d = {d}") from None
    w = coset_weights(code) if weights is None else weights
    good = w.weight >= d
    sset = good_syndromes(w, d)
    maps = [syndrome_action(w, p) for p in perms]
    # orbits of the connection set (the group keeps it: coset weights are invariant)
    label = np.full(good.size, -1, dtype=np.int64)
    orbits: list[np.ndarray] = []
    for s in sset.tolist():
        if label[s] >= 0:
            continue
        orbit = [s]
        label[s] = len(orbits)
        for x in orbit:  # grows while it is walked: a breadth-first closure
            for m in maps:
                y = int(m[x])
                if label[y] < 0:
                    label[y] = len(orbits)
                    orbit.append(y)
        orbits.append(np.asarray(orbit, dtype=np.int64))
    cliques = [o for o in orbits
               if all(good[o ^ x][o != x].all() for x in o.tolist())]
    k = len(cliques)
    adj = np.zeros((k, k), dtype=bool)
    for i in range(k):
        for j in range(i + 1, k):
            adj[i, j] = adj[j, i] = bool(good[cliques[i][:, None] ^ cliques[j][None, :]].all())
    sizes = np.asarray([o.size for o in cliques], dtype=np.int64)
    chosen: list[int] = []
    optimal = True
    if k:
        res = max_weight_clique(bitsets_from_dense(adj), sizes, time_limit=time_limit,
                                goal=None if goal is None else goal - 1)
        chosen = [int(x) for v in res.vertices.tolist() for x in cliques[v].tolist()]
        optimal = res.optimal
    syn = (0, *sorted(chosen))
    leaders = tuple(w.leader(s) for s in syn)
    return CosetUnionResult(code.n, code.k, d, syn, leaders, len(syn) << code.k, optimal,
                            "orbit", 0, int(sset.size), time.monotonic() - t0)


def random_subcode(code: LinearCode, k: int, seed: int) -> LinearCode:
    """A k-dimensional subcode of a binary linear code: the span of k random combinations of
    its generator rows (``numpy.random.default_rng(seed)``, redrawn until independent)."""
    from codesearch.gf import field

    if not 1 <= k <= code.k:
        raise ParameterError(f"coset unions: subcode dimension must be 1..{code.k}, got {k}")
    if k == code.k:
        return code
    gf = field(2)
    rng = np.random.default_rng(seed)
    while True:
        a = rng.integers(0, 2, (k, code.k), dtype=np.uint8)
        if gf.rank(a) == k:
            return LinearCode(gf.matmul(a, code.generator), 2)


# ----------------------------------------------------------------------------- records
def union_words(generator_rows: tuple[int, ...], leaders: tuple[int, ...], n: int) -> Code:
    """The union of the cosets ``leader + span(generator_rows)`` as an explicit code.

    Raises
    ------
    ParameterError
        When the union would have more than ``codesearch.model.MAX_LISTED_WORDS`` words.
    """
    from codesearch.model import MAX_LISTED_WORDS

    size = len(leaders) << len(generator_rows)
    if size > MAX_LISTED_WORDS:
        raise ParameterError(f"coset unions: the union has {size} words, above the cap of "
                             f"{MAX_LISTED_WORDS} listed words")
    span = np.zeros(1, dtype=np.int64)
    for g in generator_rows:
        span = np.concatenate([span, span ^ int(g)])
    words = (np.asarray(leaders, dtype=np.int64)[:, None] ^ span[None, :]).reshape(-1)
    return Code(_to_rows(np.unique(words), n), 2)


def leading_balance(generator_rows: tuple[int, ...]) -> int:
    """The largest b such that the code's words restricted to coordinates 0..b-1 take every
    value equally often (the generator restricted there has rank b): a union of cosets of
    the code inherits it, so shortening on those coordinates halves the size exactly."""
    b = 0
    while True:
        mask = (1 << (b + 1)) - 1
        rows = [int(g) & mask for g in generator_rows]
        rank = 0
        for bit in range(b + 1):  # Gaussian elimination on b + 1 bits
            piv = next((i for i in range(rank, len(rows)) if (rows[i] >> bit) & 1), None)
            if piv is None:
                continue
            rows[rank], rows[piv] = rows[piv], rows[rank]
            for i in range(len(rows)):
                if i != rank and (rows[i] >> bit) & 1:
                    rows[i] ^= rows[rank]
            rank += 1
        if rank < b + 1:
            return b
        b += 1


@dataclass(frozen=True)
class CosetRecord:
    """One recorded coset union.

    Attributes
    ----------
    key : str
    n, d, size : int
        Length, verified distance, number of words.
    inner : str
        How the inner code was obtained, in words.
    generator : tuple of int
        Generator rows of the inner code (bit j = coordinate j).
    leaders : tuple of int
        One word of each coset in the union (the first is 0).
    params : tuple of (str, value)
        The search that found the union (method, seed, limits).
    """

    key: str
    n: int
    d: int
    inner: str
    generator: tuple[int, ...]
    leaders: tuple[int, ...]
    params: tuple[tuple[str, Any], ...]

    @property
    def k(self) -> int:
        return len(self.generator)

    @property
    def size(self) -> int:
        return len(self.leaders) << self.k

    @property
    def label(self) -> str:
        return f"union of {len(self.leaders)} cosets of the {self.inner} ({self.key})"

    def rerun(self) -> tuple[int, ...]:
        """Run the recorded search again on the recorded inner code; returns the leaders
        found (equal to ``leaders`` when the record is reproducible)."""
        p = dict(self.params)
        code = LinearCode(_to_rows(self.generator, self.n), 2)
        res = coset_union_search(code, self.d, method=p["method"], seed=p["seed"],
                                 restarts=p["restarts"], moves=p["moves"], goal=p["goal"],
                                 time_limit=1e9, start=p.get("start"))
        return res.leaders


def to_record(code: LinearCode, leaders: tuple[int, ...], d: int, key: str, inner: str,
              params: dict[str, Any]) -> CosetRecord:
    """A record of a union of cosets of ``code`` (a search result's ``leaders``); ``params``
    are the settings of :func:`coset_union_search` that reproduce it (see
    :meth:`CosetRecord.rerun`)."""
    gen = tuple(int(g) for g in _to_ints(code.generator))
    return CosetRecord(key, code.n, d, inner, gen, tuple(int(x) for x in leaders),
                       tuple(sorted(params.items())))


def coset_union_from_record(key: str) -> Code:
    """Rebuild a recorded union (unverified; see ``build_family``)."""
    rec = RECORDS.get(key)
    if rec is None:
        raise ParameterError(f"unknown coset union {key!r} (known: {', '.join(RECORDS)})")
    return union_words(rec.generator, rec.leaders, rec.n)


RECORDS: dict[str, CosetRecord] = {r.key: r for r in [
    # (16, 2720, 3): 85 cosets of the direct sum of Hamming(7,4) and repetition(9), found by
    # the local search (seed 0, 20 greedy restarts, <= 200000 moves, no deadline); extended,
    # (17, 2720, 4). Published lower value of A(16,3) = A(17,4): 2720.
    CosetRecord(
        "h7-rep9", 16, 3, "direct sum of Hamming(7,4) and repetition(9)",
        (7, 25, 42, 75, 65408),
        (0, 784, 1568, 2564, 3336, 4610, 5380, 6416, 7168, 57536, 8712, 9473, 10498, 11328,
         53376, 12544, 13344, 51336, 14340, 50336, 49537, 16644, 17410, 18176, 18464, 19201,
         19976, 20488, 21280, 22032, 23040, 41601, 24577, 25346, 26116, 27152, 37536, 29248,
         35472, 34440, 33666, 32900, 33032, 33808, 34561, 34817, 35648, 36354, 36928, 37632,
         38404, 39432, 25248, 40992, 41732, 42560, 43520, 21124, 45584, 19074, 18049, 17288,
         16528, 49665, 50496, 51456, 52228, 12432, 53506, 54273, 10376, 55312, 9348, 8640,
         57616, 58376, 6304, 59394, 5256, 4481, 61444, 3201, 2432, 1440, 704),
        (("goal", 85), ("method", "local"), ("moves", 200000), ("restarts", 20), ("seed", 0))),
    # (20, 2560, 5): 80 cosets of RM(1,4) on the first 16 coordinates (4 free coordinates),
    # found by the local search (seed 0, 20 greedy restarts, <= 200000 moves, no deadline);
    # extended, (21, 2560, 6). Published lower value of A(20,5) = A(21,6): 2560.
    CosetRecord(
        "rm14-tail4", 20, 5, "first-order Reed-Muller code RM(1,4) with 4 free coordinates",
        (65535, 65280, 61680, 52428, 43690),
        (0, 33047, 20627, 25859, 18503, 1619, 8839, 5159, 200840, 198662, 213019, 234499,
         204833, 246272, 229453, 197712, 329824, 331793, 378885, 369664, 360491, 328204,
         335943, 344194, 394400, 401480, 393731, 397357, 395461, 409620, 432128, 426097,
         462336, 491544, 501763, 460853, 462882, 459923, 475201, 467076, 558113, 540993,
         525715, 533009, 561235, 567555, 530561, 524303, 729227, 753730, 733696, 737320,
         721925, 743427, 778257, 723088, 852672, 868529, 853091, 884772, 873472, 860178,
         854025, 856199, 950401, 944128, 925725, 918538, 933927, 919635, 921668, 918064,
         999565, 987211, 985251, 991441, 1008643, 997381, 1015831, 983296),
        (("goal", 80), ("method", "local"), ("moves", 200000), ("restarts", 20), ("seed", 0))),
    # (22, 58, 9): 29 cosets of the repetition code of length 22 (a complement-closed code),
    # found by the local search (seed 5, 20 greedy restarts, goal 29, no deadline; about 60 s);
    # extended, (23, 58, 10). Above the 52 this library reached before; short of the published
    # lower value 76 of A(22,9) (data/published_binary.csv, from memory, marked uncertain).
    CosetRecord(
        "rep22", 22, 9, "repetition code of length 22",
        (4194303,),
        (0, 167222, 3939331, 542442, 3327073, 905648, 3197829, 1418818, 2765475,
         2664985, 2557613, 1762696, 2401745, 2347035, 2187591, 2209064, 1974575,
         2452618, 2495320, 2643734, 3033442, 1115059, 1040901, 3305684, 728261, 3735676,
         299215, 291893, 31593),
        (("goal", 29), ("method", "local"), ("moves", 10000000), ("restarts", 20), ("seed", 5))),
    # (24, 17920, 5): 35 cosets of a 9-dimensional subcode (random_subcode seed 1) of the
    # extended [23,14,5] column-search code, [24,14,6]; the local search (seed 1, no deadline,
    # about 2 s) starts from the 32 cosets making up that [24,14,6] code and adds 3. Extended,
    # (25, 17920, 6). Published lower value of A(24,5) = A(25,6): 17920.
    CosetRecord(
        "c24-sub9", 24, 5, "9-dimensional subcode of the extended [23,14,5] column-search code",
        (7693125, 15445571, 9092884, 6424083, 10259964, 6300636, 6257845, 15402542, 8948900),
        (0, 4202757, 4591621, 98857, 3178520, 4562945, 6359045, 9439269, 413, 525579, 4195367,
         9961987, 16407, 2109465, 1081738, 33378, 2277441, 918161, 2621635, 4456838, 8421390,
         8755, 69925, 4456475, 18475, 8781873, 1197059, 2236423, 1050697, 541197, 8393747,
         41041, 10748421, 2098261, 282754),
        (("goal", 35), ("method", "local"), ("moves", 200000), ("restarts", 20), ("seed", 1),
         ("start", (413, 8389228, 8391900, 8393747, 8396895, 8406263, 34030, 8455339, 8520717,
                    263228, 525462, 1049849, 2098261, 4195367)))),
    # (23, 78, 9): 39 cosets of the repetition code of length 23 (complement-closed), found
    # by the local search (seed 0, 20 greedy restarts, goal 39, no deadline; about 2 min);
    # extended, (24, 78, 10). Above the 64 this library reached before; short of the published
    # lower value 136 of A(23,9) (data/published_binary.csv, from memory, marked uncertain).
    CosetRecord(
        "rep23", 23, 9, "repetition code of length 23",
        (8388607,),
        (0, 204212, 249482, 391248, 549500, 7458821, 1314476, 1491142, 6695001,
         1868094, 5770481, 2982872, 5391001, 3100834, 3169632, 3318892, 4856399,
         3623444, 4557605, 4547625, 4256660, 4621680, 4876034, 2827285, 5583430,
         2737761, 6000840, 2373005, 6113612, 2148687, 6351010, 1891337, 6558266,
         1811241, 1410579, 7247364, 964773, 422753, 8137600),
        (("goal", 39), ("method", "local"), ("moves", 10000000), ("restarts", 20), ("seed", 0))),
]}
