"""Prescribed-symmetry search: the largest code that is a union of orbits of a given group.

Problem
-------
Given a cell ``(q, n, d)`` and a group G of isometries of Hamming space (parsed from a spec by
:func:`codesearch.search.groups.parse_group`), find a large code C with minimum distance
``>= d`` such that ``g(C) = C`` for every g in G. Such a code is a union of G-orbits, so the
search runs on orbits instead of words:

1. compute the orbits of G on all ``q**n`` words;
2. drop every orbit whose own words are closer than d. Since G acts by isometries and
   transitively on an orbit O with representative r, the distances inside O are exactly
   ``{d(r, g r)}``, so one row of distances per orbit suffices;
3. build the orbit compatibility graph: orbits O1 and O2 are adjacent iff every cross distance
   is ``>= d``. Again by isometry, ``d(g r1, y) = d(r1, g^-1 y)`` and ``g^-1 O2 = O2``, so the
   distances from the representative r1 to the words of O2 are all cross distances;
4. a maximum-weight clique (weight = orbit size) is a largest G-invariant code.

Step 4 runs a randomised greedy with perturbation and a multi-neighbourhood tabu search (fast,
any size) and then, in the default mode, an exact weighted clique search under the time limit. Even a completed exact search
proves only "largest G-invariant code", never ``A_q(n,d)``, so the status is FEASIBLE and the
invariant-optimality is recorded in ``settings["invariant_optimal"]``.

References
----------
.. [1] E. S. Kramer and D. M. Mesner, "t-designs on hypergraphs", Discrete Math. 15 (1976)
   263-296 (prescribed automorphisms: collapse the search onto orbits).
.. [2] P. R. J. Ostergard, "A new algorithm for the maximum-weight clique problem", Nordic J.
   Computing 8 (2001) 424-436 (weighted clique search, as used for codes with prescribed
   automorphisms).
.. [3] F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*,
   North-Holland, 1977 (isometries of Hamming space; Reed-Muller and cyclic codes).
.. [4] Q. Wu, J.-K. Hao and F. Glover, "Multi-neighborhood tabu search for the maximum weight
   clique problem", Annals of Operations Research 196 (2012) 611-634.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

import numpy as np

from codesearch.errors import ParameterError, VerificationError
from codesearch.model import Code, Params
from codesearch.search import groups as _groups
from codesearch.search.base import Context, Outcome

__all__ = ["OPTIONS", "run", "OrbitGraph", "orbit_graph", "heuristic_clique", "tabu_clique",
           "bitsets", "sparse_orbit_search"]

#: Options accepted by :func:`run` (see its docstring).
OPTIONS = frozenset({"group", "mode", "restarts", "iterations", "size", "max_words",
                     "max_orbits"})
SEEDING = "fixed"
#: Tiny runs through the orbit graph and the weighted clique paths, binary and q-ary, and
#: the sparse mode's kernel
#: (:func:`codesearch.search.prepare_method`).
WARM_UP = (((2, 7, 3), {"group": "cyclic"}), ((3, 4, 3), {"group": "cyclic"}),
           ((2, 8, 4), {"group": "cyclic*rep"}),
           ((2, 7, 3), {"group": "cyclic", "mode": "sparse", "iterations": 20}))

_MODES = ("exact", "heuristic", "sparse")
#: Tabu / sparse moves when neither ``iterations`` nor a time limit bounds them.
DEFAULT_ITERATIONS = 20000
#: Move cap standing for "until the deadline" (sparse and heuristic modes with a time limit).
_UNTIL_DEADLINE = 1 << 62
#: Move tenure of a dropped orbit in the sparse search.
_SPARSE_TENURE = 7
DEFAULT_MAX_ORBITS = 12000


@dataclass(frozen=True, eq=False)
class OrbitGraph:
    """The weighted orbit compatibility graph of one cell and group.

    Attributes
    ----------
    orbits : Orbits
        All orbits of the group.
    kept : numpy.ndarray
        Indices (into ``orbits``) of the admissible orbits, the vertices of the graph.
    weights : numpy.ndarray
        Size of each kept orbit (int64).
    adj : numpy.ndarray
        ``(K, K)`` symmetric bool adjacency matrix with a False diagonal.
    """

    orbits: _groups.Orbits
    kept: np.ndarray
    weights: np.ndarray
    adj: np.ndarray

    def code_of(self, vertices: list[int] | np.ndarray, q: int) -> Code:
        """The union of the kept orbits ``vertices`` as a code."""
        return _union_code(self.orbits, self.kept[np.asarray(vertices, int)], q)


def _union_code(o: _groups.Orbits, orbit_ids: np.ndarray, q: int) -> Code:
    """The union of the orbits ``orbit_ids`` (indices into ``o``) as a code."""
    idx = [o.order[o.starts[k]:o.starts[k + 1]] for k in orbit_ids]
    rows = np.concatenate(idx) if idx else np.zeros(0, dtype=np.int64)
    return Code(o.rows(np.sort(rows)), q)


class _GraphTimeout(Exception):
    """The time limit ran out while the orbit graph was being built."""


def _admissible(params: Params, group: _groups.Group, max_words: int
                ) -> tuple[_groups.Orbits, np.ndarray]:
    """The orbits of ``group`` and the admissible ones (their numbers, increasing).

    An orbit is admissible when its own words are pairwise at distance ``>= d``: the distance
    from each word to its orbit's representative, minimised over the orbit (the representative
    excluded), is the orbit's own minimum distance (isometry argument, step 2; kernel
    ``_kernels.orbit_inner_distance``, binary words read from their indices).
    """
    from codesearch import _kernels

    orbits = _groups.compute_orbits(group, max_words=max_words)
    planes = (np.zeros((0, 0), dtype=np.uint64) if orbits.stored is None
              else orbits.planes())
    inner = _kernels.orbit_inner_distance(planes, orbits.order, orbits.starts, params.n)
    return orbits, np.flatnonzero(inner >= params.d)


def orbit_graph(params: Params, group: _groups.Group, *,
                max_words: int = _groups.DEFAULT_MAX_WORDS,
                max_orbits: int = DEFAULT_MAX_ORBITS,
                deadline: float | None = None) -> OrbitGraph:
    """Orbits of ``group``, the admissible ones, and their compatibility graph.

    ``deadline`` (a :func:`time.perf_counter` value) stops the graph construction early by
    raising ``_GraphTimeout``.

    Raises
    ------
    ParameterError
        When the space or the number of admissible orbits exceeds its limit.
    """
    if (group.q, group.n) != (params.q, params.n):
        raise ParameterError(f"group acts on q={group.q}, n={group.n}; cell is {params}")
    if params.n > 64:
        # one uint64 per bit plane holds a word (the space limit keeps n far below this anyway)
        raise ParameterError(f"orbit search handles n <= 64, got n={params.n}")
    orbits, kept = _admissible(params, group, max_words)
    d = params.d
    k = kept.size
    if k > max_orbits:
        raise ParameterError(
            f"group {group.spec!r} leaves {k} admissible orbits, above the limit {max_orbits}"
            + ("; use a larger group, or the sparse mode (find --orbit-mode sparse), which "
               "has no such limit" if params.q == 2 else "; use a larger group"))
    sizes = orbits.sizes[kept].astype(np.int64)
    seg = [orbits.order[orbits.starts[j]:orbits.starts[j + 1]] for j in kept]
    words = np.ascontiguousarray(np.concatenate(seg) if seg else np.zeros(0, dtype=np.int64),
                                 dtype=np.int64)
    starts = np.r_[0, np.cumsum(sizes)].astype(np.int64)
    # The kernel reads bit planes of the kept words only, renumbered 0 .. len(words) - 1;
    # each orbit's representative (its least index) comes first among its words.
    plane_arr = orbits.planes(words)
    words = np.arange(words.size, dtype=np.int64)
    reps = np.ascontiguousarray(starts[:-1])
    adj8 = np.zeros((k, k), dtype=np.uint8)
    if k > 1:
        from codesearch import _kernels

        # Rows in chunks of about equal work (row i scans the words of orbits > i), so the
        # deadline is checked every few tenths of a second at most.
        tail_work = (words.size - starts[1:]).astype(np.float64)
        chunk_work = max(1.0, 2e7 / max(1, params.n))
        lo = 0
        while lo < k:
            cum = np.cumsum(tail_work[lo:])
            hi = lo + 1 + int(np.searchsorted(cum, chunk_work))
            hi = min(hi, k)
            _kernels.orbit_adjacency_rows(plane_arr, reps, words, starts, d, lo, hi, adj8)
            lo = hi
            if deadline is not None and time.perf_counter() > deadline and lo < k:
                raise _GraphTimeout(f"orbit graph incomplete at row {lo} of {k}")
    adj = adj8.astype(bool)
    adj |= adj.T
    return OrbitGraph(orbits=orbits, kept=kept, weights=sizes, adj=adj)


# ------------------------------------------------------------------------------ clique search
def _greedy_clique(adj: np.ndarray, w: np.ndarray, score: np.ndarray, start: list[int],
                   rng: np.random.Generator | None) -> list[int]:
    """Extend the clique ``start`` greedily by ``score`` (with multiplicative noise if rng)."""
    clique = list(start)
    cand = np.ones(w.size, dtype=bool)
    for v in clique:
        cand &= adj[v]
    while True:
        idx = np.flatnonzero(cand)
        if idx.size == 0:
            return clique
        s = score[idx]
        if rng is not None:
            s = s * rng.uniform(0.5, 1.5, idx.size)
        v = int(idx[np.argmax(s)])
        clique.append(v)
        cand &= adj[v]


def heuristic_clique(adj: np.ndarray, w: np.ndarray, *, restarts: int, seed: int,
                     deadline: float | None, stop: int | None = None) -> tuple[list[int], int]:
    """Iterated greedy for a heavy clique: greedy starts, then drop-and-regrow perturbations.

    Returns the best clique found and the number of greedy passes made; stops early once the
    weight reaches ``stop``. Deterministic for a given seed when the deadline does not cut it
    short.
    """
    k = w.size
    if k == 0:
        return [], 0
    rng = np.random.default_rng(seed)
    # Weight times weighted degree favours heavy orbits that leave many heavy neighbours.
    wf = w.astype(np.float64)
    # Row blocks keep the temporary float copy of the matrix small.
    wdeg = np.concatenate([adj[i:i + 1024].astype(np.float64) @ wf for i in range(0, k, 1024)])
    score = wf * (1.0 + wdeg)
    best = _greedy_clique(adj, w, score, [], None)
    best_w = int(w[best].sum())
    passes = 1
    current = best
    for it in range(restarts):
        if deadline is not None and time.perf_counter() > deadline:
            break
        if stop is not None and best_w >= stop:
            break
        if it % 4 == 0 or len(current) <= 1:
            trial = _greedy_clique(adj, w, score, [], rng)
        else:
            drop = max(1, len(current) // 3)
            keep = list(rng.permutation(current)[drop:])
            trial = _greedy_clique(adj, w, score, [int(v) for v in keep], rng)
        passes += 1
        tw = int(w[trial].sum())
        if tw >= int(w[current].sum()):
            current = trial
        if tw > best_w:
            best, best_w = trial, tw
    return best, passes


def tabu_clique(adj: np.ndarray, w: np.ndarray, start: list[int], *, iterations: int,
                seed: int, deadline: float | None, stall: int = 3000,
                stop: int | None = None) -> tuple[list[int], int]:
    """Multi-neighbourhood tabu search for a heavy clique, from the clique ``start``.

    Moves (after Wu, Hao and Glover [4]_): ADD a vertex adjacent to the whole clique; else the
    better of SWAP (add a vertex missing exactly one clique neighbour, drop that neighbour) and
    DROP (the lightest member). A removed vertex is tabu for ``7 + random(|C|)`` iterations; after
    ``stall`` iterations without a new best the search restarts from a randomised greedy clique.

    Invariant: ``miss[v]`` is the number of clique members not adjacent to v (v outside C).
    Returns the best clique and the iterations made (stopping once the weight reaches
    ``stop``); deterministic for a seed when the deadline
    does not cut it short.
    """
    k = w.size
    if k == 0 or iterations <= 0:
        return list(start), 0
    rng = np.random.default_rng(seed)
    nonadj = ~adj
    np.fill_diagonal(nonadj, False)
    wi = w.astype(np.int64)
    score = wi.astype(np.float64)

    def load(clique: list[int]) -> tuple[np.ndarray, np.ndarray]:
        in_c = np.zeros(k, dtype=bool)
        in_c[clique] = True
        miss = nonadj[:, in_c].sum(axis=1).astype(np.int64) if clique else np.zeros(k, np.int64)
        return in_c, miss

    best = list(start)
    best_w = int(wi[best].sum()) if best else 0
    in_c, miss = load(best)
    cur_w = best_w
    tabu = np.zeros(k, dtype=np.int64)
    since = 0
    it = 0
    for it in range(1, iterations + 1):
        if deadline is not None and it % 128 == 0 and time.perf_counter() > deadline:
            break
        if stop is not None and best_w >= stop:
            break
        free = ~in_c & (tabu <= it)
        add = np.flatnonzero(free & (miss == 0))
        if add.size:
            v = int(add[np.argmax(wi[add] + rng.random(add.size) * 0.5)])
            in_c[v] = True
            miss += nonadj[v]
            cur_w += int(wi[v])
        else:
            members = np.flatnonzero(in_c)
            if members.size == 0:
                break
            swap = np.flatnonzero(free & (miss == 1))
            drop_u = int(members[np.argmin(wi[members] + rng.random(members.size) * 0.5)])
            drop_gain = -int(wi[drop_u])
            if swap.size:
                # the unique non-neighbour in C of each swap candidate
                out = members[np.argmax(nonadj[np.ix_(swap, members)], axis=1)]
                gains = wi[swap] - wi[out]
                j = int(np.argmax(gains + rng.random(swap.size) * 0.5))
                if gains[j] >= drop_gain:
                    u, v = int(out[j]), int(swap[j])
                    in_c[u] = False
                    miss -= nonadj[u]
                    in_c[v] = True
                    miss += nonadj[v]
                    cur_w += int(wi[v] - wi[u])
                    tabu[u] = it + 7 + int(rng.integers(0, members.size + 1))
                    drop_u = -1
            if drop_u >= 0:
                in_c[drop_u] = False
                miss -= nonadj[drop_u]
                cur_w += drop_gain
                tabu[drop_u] = it + 7
        if cur_w > best_w:
            best, best_w, since = np.flatnonzero(in_c).tolist(), cur_w, 0
        else:
            since += 1
            if since >= stall:
                since = 0
                tabu[:] = 0
                in_c, miss = load(_greedy_clique(adj, w, score, [], rng))
                cur_w = int(wi[in_c].sum())
    return best, it


def bitsets(adj: np.ndarray) -> np.ndarray:
    """Dense bool adjacency -> ``(K, ceil(K/64))`` uint64 rows; bit ``j & 63`` of word
    ``j >> 6`` of row i is set iff i ~ j (the clique engine's format)."""
    k = adj.shape[0]
    words = max(1, (k + 63) // 64)
    packed = np.packbits(adj, axis=1, bitorder="little")
    out = np.zeros((k, words * 8), dtype=np.uint8)
    out[:, :packed.shape[1]] = packed
    return out.view("<u8").astype(np.uint64)


#: Seconds per vertex pair of the clique engine's set-up (measured 2.2e-8 on a loaded machine).
_PREPARE_S_PER_PAIR = 2.0e-8


def _exact_clique(adj: np.ndarray, w: np.ndarray, incumbent: list[int],
                  deadline: float | None, goal: int | None
                  ) -> tuple[list[int], bool, int, int]:
    """The weighted clique engine (:func:`codesearch.search.clique.max_weight_clique`) seeking
    only cliques heavier than ``incumbent``: ``(clique, complete, nodes, upper)``.

    ``complete`` means no heavier clique exists; ``upper`` is a proven bound on the weight of
    every clique.
    """
    from codesearch.search import clique as engine

    lower = int(w[incumbent].sum()) if incumbent else 0
    limit = None if deadline is None else max(0.01, deadline - time.perf_counter())
    out = engine.max_weight_clique(bitsets(adj), w.astype(np.int64), time_limit=limit,
                                   lower=lower, goal=goal)
    found = [int(v) for v in np.asarray(out.vertices).tolist()]
    # With lower = the incumbent's weight the engine looks only for heavier cliques; when
    # there is none the incumbent is the answer (and proved so if the search completed).
    clique = found if int(w[found].sum()) > lower else list(incumbent)
    return clique, bool(out.complete), int(out.nodes), int(out.upper)


# ------------------------------------------------------------------------------ sparse mode
def sparse_orbit_search(params: Params, group: _groups.Group, *, seed: int,
                        deadline: float | None, stop: int | None = None,
                        max_moves: int = DEFAULT_ITERATIONS,
                        max_words: int = _groups.DEFAULT_MAX_WORDS
                        ) -> tuple[Code | None, int, int]:
    """A large G-invariant binary code without the orbit graph (implicit adjacency).

    For groups that leave more admissible orbits than a dense compatibility matrix holds
    (``max_orbits``), conflicts are found on demand: orbits u and v conflict iff a word of v
    lies within distance ``d - 1`` of the representative of u (the isometry argument of step
    3), so adding or dropping u visits the ball of radius ``d - 1`` around one word and looks
    up the orbit of each ball word. The search (kernel ``_kernels.orbit_sparse_moves``) is a
    tabu search on orbits: add the heaviest free orbit, else the best swap of one orbit for
    its single conflicting member (which turns tabu for a few moves), else drop a random
    member; it starts from the empty set, so its first moves are the greedy by orbit size.
    Heuristic: nothing is proved. Binary only (words are their integer indices).

    Returns
    -------
    (code or None, moves made, admissible orbits)
    """
    if params.q != 2:
        raise ParameterError(f"the sparse orbit search handles q = 2 only, got q = {params.q}")
    orbits, kept = _admissible(params, group, max_words)
    k = int(kept.size)
    if k == 0:
        return None, 0, 0
    from codesearch import _kernels
    from codesearch.search._wordspace import ball_masks

    vertex_of = _kernels.orbit_vertex_of(orbits.order, orbits.starts,
                                         np.ascontiguousarray(kept, dtype=np.int64))
    reps = np.ascontiguousarray(orbits.reps[kept], dtype=np.int64)
    weight = orbits.sizes[kept].astype(np.int64)
    masks = ball_masks(params.n, params.d - 1)[1:]  # weights 1 .. d-1 (the zero mask first)
    in_set = np.zeros(k, dtype=np.bool_)
    best_set = np.zeros(k, dtype=np.bool_)
    conflicts = np.zeros(k, dtype=np.int64)
    xor_ids = np.zeros(k, dtype=np.int64)
    tabu_until = np.zeros(k, dtype=np.int64)
    stamp = np.full(k, -1, dtype=np.int64)
    rng = np.int64(np.random.default_rng(seed).integers(1, 2**62))
    goal = np.iinfo(np.int64).max if stop is None else int(stop)
    best, made, chunk = 0, 0, 4
    while made < max_moves and best < goal:
        if deadline is not None and time.perf_counter() > deadline:
            break
        t0 = time.perf_counter()
        step = min(chunk, max_moves - made)
        done, best, rng = _kernels.orbit_sparse_moves(
            vertex_of, reps, weight, masks, in_set, conflicts, xor_ids, tabu_until, stamp,
            made, step, _SPARSE_TENURE, rng, goal, best, best_set)
        made += int(done)
        if done < step:
            break
        # about 0.2 s per call, so the deadline is checked often
        spent = time.perf_counter() - t0
        chunk = max(1, min(4 * chunk, int(step * 0.2 / max(spent, 1e-4))))
    chosen = np.flatnonzero(best_set)
    if chosen.size == 0:
        return None, made, k
    return _union_code(orbits, kept[chosen], params.q), made, k


# ------------------------------------------------------------------------------ method entry
def run(ctx: Context, *, group: str = "cyclic", mode: str = "exact", restarts: int = 200,
        iterations: int | None = None, max_words: int = _groups.DEFAULT_MAX_WORDS,
        max_orbits: int = DEFAULT_MAX_ORBITS) -> Outcome:
    """Largest code found that is invariant under the group ``group``.

    Parameters
    ----------
    ctx : Context
        The cell, the clock for the whole run (orbits, graph, clique search), the seed of the
        randomised greedy, and the target (option ``size``: stop as soon as a G-invariant
        code of at least that many words is found). Progress receives ``{"phase",
        "orbits", "incumbent", "elapsed"}`` after each phase.
    group : str
        Group spec (see :mod:`codesearch.search.groups`), default ``"cyclic"``.
    mode : {"exact", "heuristic"}
        ``"exact"`` runs the heuristic and then an exact weighted clique search within the
        time limit (proving the largest G-invariant code when it finishes); ``"heuristic"``
        stops after the heuristic; ``"sparse"`` (binary only) skips the orbit graph and runs
        :func:`sparse_orbit_search`, for groups that leave more admissible orbits than
        ``max_orbits`` (heuristic; ``max_orbits`` does not apply).
    restarts : int
        Randomised greedy passes (a deadline may cut them short).
    iterations : int, optional
        Moves of the tabu search that follows the greedy passes (see :func:`tabu_clique`),
        capped at ``50 K + 500`` for a graph of K orbits (the value used is recorded); in
        sparse mode, the moves of :func:`sparse_orbit_search`. Default
        :data:`DEFAULT_ITERATIONS`; but in the sparse and heuristic modes, which have no
        exact phase to hand the time to, a run with a time limit and no ``iterations``
        moves until the deadline (or the target ``size``).
    max_words, max_orbits : int
        Limits on ``q**n`` and on the number of admissible orbits.

    Returns
    -------
    Outcome
        A code (none if no orbit is admissible); ``settings["invariant_optimal"]`` is True when
        the code is proved to be a largest G-invariant code. Even then nothing is proved about
        ``A_q(n,d)``: the status stays FEASIBLE.
    """
    if mode not in _MODES:
        raise ParameterError(f"orbit mode must be one of {', '.join(_MODES)}, got {mode!r}")
    if iterations is None:
        # the heuristic-only modes spend the budget they are given
        until_deadline = mode != "exact" and ctx.deadline is not None
        iterations = _UNTIL_DEADLINE if until_deadline else DEFAULT_ITERATIONS
    for name, value in (("restarts", restarts), ("iterations", iterations)):
        if isinstance(value, bool) or not isinstance(value, int) or value < 0:
            raise ParameterError(f"{name} must be a non-negative integer, got {value!r}")
    params, size = ctx.params, ctx.target
    grp = _groups.parse_group(group, params.q, params.n)
    settings = {"group": grp.spec, "mode": mode, "restarts": restarts}
    if mode == "sparse":
        code, moves, k = sparse_orbit_search(params, grp, seed=ctx.seed, deadline=ctx.deadline,
                                             stop=size, max_moves=iterations,
                                             max_words=max_words)
        if code is not None and not _groups.is_invariant(code, grp):
            raise VerificationError(f"orbit search built a code not invariant under {grp.spec!r}")
        ctx.report(phase="sparse", orbits=k, incumbent=0 if code is None else code.size)
        return Outcome(code, nodes=moves, settings={
            **settings, "generators": len(grp.generators), "admissible_orbits": k,
            "clique_engine": "implicit tabu (sparse)", "invariant_optimal": False,
            "invariant_upper": None, "iterations": moves})
    try:
        graph = orbit_graph(params, grp, max_words=max_words, max_orbits=max_orbits,
                            deadline=ctx.deadline)
    except _GraphTimeout as exc:
        return Outcome(None, settings={**settings, "stopped": str(exc),
                                       "invariant_optimal": False})
    w = graph.weights

    def report(phase: str, clique: list[int]) -> None:
        ctx.report(phase=phase, orbits=int(w.size),
                   incumbent=int(w[clique].sum()) if clique else 0)

    report("graph", [])
    # In exact mode the heuristics get at most half the budget left after the graph.
    heur_deadline = ctx.deadline
    if mode == "exact" and ctx.deadline is not None:
        heur_deadline = time.perf_counter() + 0.5 * max(0.0, ctx.time_left())
    clique, passes = heuristic_clique(graph.adj, w, restarts=restarts, seed=ctx.seed,
                                      deadline=heur_deadline, stop=size)
    # Small graphs need few moves (and the exact search settles them anyway).
    if iterations != _UNTIL_DEADLINE:
        iterations = min(iterations, 50 * int(w.size) + 500)
    clique, moves = tabu_clique(graph.adj, w, clique, iterations=iterations, seed=ctx.seed,
                                deadline=heur_deadline, stop=size)
    report("heuristic", clique)
    complete, nodes, engine, inv_upper = False, passes + moves, "greedy+tabu", None
    reached = size is not None and int(w[clique].sum()) >= size
    left = ctx.time_left()
    if mode == "exact" and left is not None and left < _PREPARE_S_PER_PAIR * w.size**2:
        # the engine's set-up (degeneracy order) is quadratic in the orbits and cannot be cut
        # short: 2.8 s at 11464 orbits (A_4(8,5)), past a deadline already reached
        engine = f"greedy+tabu (exact phase skipped: {left:.2f} s left)"
    elif mode == "exact" and w.size and not reached:
        exact, complete, enodes, inv_upper = _exact_clique(graph.adj, w, clique, ctx.deadline,
                                                           size)
        engine = "codesearch.clique"
        nodes += enodes
        if int(w[exact].sum()) >= int(w[clique].sum()):
            clique = exact
        report("exact", clique)
    code = graph.code_of(sorted(clique), params.q) if clique else None
    if code is not None and not _groups.is_invariant(code, grp):
        raise VerificationError(f"orbit search built a code not invariant under {grp.spec!r}")
    return Outcome(code, nodes=nodes, settings={
        **settings,
        "generators": len(grp.generators),
        "orbits": graph.orbits.count,
        "admissible_orbits": int(w.size),
        "edges": int(graph.adj.sum() // 2),
        "orbits_used": len(clique),
        "clique_engine": engine,
        "invariant_optimal": bool(complete),
        # a proven bound on the size of every G-invariant code (not on A_q(n,d))
        "invariant_upper": inv_upper,
        # the moves made when they ran until the deadline
        "iterations": moves if iterations == _UNTIL_DEADLINE else iterations,
    })
