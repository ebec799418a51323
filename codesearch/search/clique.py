"""Maximum clique and maximum weight clique on bitset graphs, exactly.

Problem
-------
Given a simple graph on vertices ``0..N-1`` (adjacency as bitsets) and positive integer vertex
weights, find a clique of largest total weight, and prove that none is heavier. With unit
weights this is the maximum clique problem; a code of minimum distance ``d`` is exactly a clique
of the graph "Hamming distance >= d" on words, which is how the exact code search uses it
(:mod:`codesearch.search.graph`), and orbit graphs use the weighted form.

The engine is a bit-parallel branch and bound: at each node the candidate set is greedily
coloured (each class an independent set, so a clique takes at most one vertex per class) and
the vertices are branched on from the last class to the first, pruning as soon as the weight
of the current clique plus the cumulative bound of the remaining classes cannot beat the
incumbent. Vertices are first renumbered in degeneracy order so colouring is done in that
order. The search is anytime: it starts from a greedy clique, keeps the best clique found,
and when stopped by the time limit also returns the upper bound it has proved.

The kernels are in :mod:`codesearch._kernels` (section "clique engine"); this module is the
generic Python API.

References
----------
.. [1] P. San Segundo, D. Rodriguez-Losada, A. Jimenez, "An exact bit-parallel algorithm for
   the maximum clique problem", Computers & Operations Research 38 (2011) 571-581.
.. [2] E. Tomita, Y. Sutani, T. Higashi, S. Takahashi, M. Wakatsuki, "A simple and faster
   branch-and-bound algorithm for finding a maximum clique", WALCOM 2010, LNCS 5942, 191-203.
.. [3] D. Kumlander, "A new exact algorithm for the maximum-weight clique problem based on a
   heuristic vertex-coloring and a backtrack search", 2004.
.. [4] D. W. Matula, L. L. Beck, "Smallest-last ordering and clustering and graph coloring
   algorithms", J. ACM 30 (1983) 417-427.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from typing import Any, Callable, Iterable

import numpy as np

from codesearch.errors import ParameterError

__all__ = [
    "CliqueResult",
    "bitsets_from_dense",
    "bitsets_from_edges",
    "bitsets_to_dense",
    "is_clique",
    "max_clique",
    "max_weight_clique",
]

#: Nodes per kernel call at first; the driver adapts it so a call takes about 0.2 s.
_FIRST_CHUNK = 20_000


@dataclass(frozen=True)
class CliqueResult:
    """Outcome of a clique search.

    Attributes
    ----------
    vertices : numpy.ndarray
        The best clique found (sorted int64 vertex labels of the input graph); may be empty
        when a ``lower`` bound was given and nothing heavier exists.
    weight : int
        Its total weight (its size for unit weights).
    upper : int
        Proved upper bound on the maximum clique weight. Equals ``max(weight, lower)`` when
        ``complete``.
    complete : bool
        True when the search space was exhausted: then no clique is heavier than
        ``max(weight, lower)``.
    nodes : int
        Branch-and-bound nodes expanded.
    seconds : float
        Wall time, including renumbering and compilation-free set-up.
    """

    vertices: np.ndarray
    weight: int
    upper: int
    complete: bool
    nodes: int
    seconds: float

    @property
    def size(self) -> int:
        """Number of vertices in the clique found."""
        return int(self.vertices.size)

    @property
    def clique(self) -> list[int]:
        """The clique's vertices as a list of ints (the form the orbit search consumes)."""
        return [int(v) for v in self.vertices]

    @property
    def optimal(self) -> bool:
        """True when the clique found is proved to be of maximum weight."""
        return self.complete and self.upper == self.weight


def _nwords(n: int) -> int:
    return max(1, (n + 63) >> 6)


def bitsets_from_dense(matrix: Any) -> np.ndarray:
    """Bitset rows from a dense symmetric 0/1 adjacency matrix (diagonal ignored)."""
    a = np.asarray(matrix).astype(bool)
    if a.ndim != 2 or a.shape[0] != a.shape[1]:
        raise ParameterError(f"adjacency matrix must be square, got shape {a.shape}")
    n = a.shape[0]
    a = a.copy()
    np.fill_diagonal(a, False)
    if not np.array_equal(a, a.T):
        raise ParameterError("adjacency matrix must be symmetric")
    w = _nwords(n)
    padded = np.zeros((n, w * 64), dtype=bool)
    padded[:, :n] = a
    # bit b of limb j is column 64 j + b: little-endian bit order within each limb.
    packed = np.packbits(padded.reshape(n, w, 64), axis=2, bitorder="little")
    return np.ascontiguousarray(packed.view("<u8").reshape(n, w)).astype(np.uint64)


def bitsets_to_dense(adj: np.ndarray, n: int) -> np.ndarray:
    """Dense boolean adjacency matrix of a bitset graph with ``n`` vertices."""
    bits = np.unpackbits(np.ascontiguousarray(adj, dtype="<u8").view(np.uint8).reshape(
        adj.shape[0], -1), axis=1, bitorder="little")
    return bits[:n, :n].astype(bool)


def bitsets_from_edges(n: int, edges: Iterable[tuple[int, int]]) -> np.ndarray:
    """Bitset rows for a graph on ``0..n-1`` from an edge list (loops ignored)."""
    adj = np.zeros((n, _nwords(n)), dtype=np.uint64)
    for u, v in edges:
        u, v = int(u), int(v)
        if not (0 <= u < n and 0 <= v < n):
            raise ParameterError(f"edge ({u}, {v}) has a vertex outside 0..{n - 1}")
        if u != v:
            adj[u, v >> 6] |= np.uint64(1) << np.uint64(v & 63)
            adj[v, u >> 6] |= np.uint64(1) << np.uint64(u & 63)
    return adj


def is_clique(adj: np.ndarray, vertices: Iterable[int]) -> bool:
    """True when the vertices are distinct and pairwise adjacent (checked bit by bit)."""
    vs = [int(v) for v in vertices]
    if len(set(vs)) != len(vs):
        return False
    for i, u in enumerate(vs):
        for v in vs[i + 1 :]:
            if not (int(adj[u, v >> 6]) >> (v & 63)) & 1:
                return False
    return True


def _check_graph(adj: np.ndarray, n: int | None) -> tuple[np.ndarray, int]:
    adj = np.ascontiguousarray(adj)
    if adj.ndim == 2 and adj.dtype == np.uint8:
        # Rows packed bytewise by ``np.packbits(dense, axis=1, bitorder="little")``: bit j of
        # a row is bit j & 7 of byte j >> 3, the same order as uint64 limbs on little-endian
        # words, so padding each row to whole limbs and viewing it as "<u8" is exact.
        rows = adj.shape[0]
        nbytes = max(1, (rows + 63) >> 6) * 8
        if adj.shape[1] > nbytes:
            raise ParameterError(f"packed rows of {adj.shape[1]} bytes for {rows} vertices")
        padded = np.zeros((rows, nbytes), dtype=np.uint8)
        padded[:, : adj.shape[1]] = adj
        adj = padded.view("<u8").astype(np.uint64)
    if adj.ndim != 2 or adj.dtype != np.uint64:
        raise ParameterError("adjacency must be 2-d uint64 bitset rows (see bitsets_from_dense) "
                             "or uint8 rows from np.packbits(..., bitorder='little')")
    if n is None:
        n = adj.shape[0]
    if adj.shape[0] != n or adj.shape[1] < _nwords(n) or n < 0:
        raise ParameterError(f"bitset array of shape {adj.shape} does not fit {n} vertices")
    return adj[:, : _nwords(n)], n


def max_weight_clique(
    adj_bits: np.ndarray,
    weights: Any,
    *,
    time_limit: float | None = None,
    lower: int = 0,
    progress: Callable[[dict[str, Any]], None] | None = None,
    node_limit: int | None = None,
    goal: int | None = None,
) -> CliqueResult:
    """Maximum weight clique of a bitset graph, exactly (or anytime under a time limit).

    Parameters
    ----------
    adj_bits : numpy.ndarray
        ``(N, ceil(N/64))`` uint64; bit ``j & 63`` of ``adj_bits[i, j >> 6]`` is set iff
        ``i ~ j``. Also accepted: ``(N, ceil(N/8))`` uint8 rows as made by
        ``np.packbits(dense, axis=1, bitorder="little")``. Must be symmetric with an empty
        diagonal (not re-checked here).
    weights : array_like of int
        Positive integer weight of each vertex.
    time_limit : float, optional
        Wall-clock budget in seconds (checked between chunks of nodes).
    lower : int
        Only cliques heavier than ``lower`` are sought (a known lower bound). When none
        exists the search completes with ``upper == lower`` and the greedy clique (or
        an empty one) as witness.
    progress : callable, optional
        Called about every 0.2 s with ``{"nodes", "incumbent", "upper", "elapsed"}``.
    node_limit : int, optional
        Stop after this many branch-and-bound nodes (deterministic budget).
    goal : int, optional
        Stop as soon as a clique of at least this weight is found (``complete`` is then
        False unless the bound also closed).

    Returns
    -------
    CliqueResult
    """
    from codesearch import _kernels as K

    start = time.perf_counter()
    adj, n = _check_graph(adj_bits, None)
    w = np.ascontiguousarray(np.asarray(weights, dtype=np.int64).reshape(-1))
    if w.size != n:
        raise ParameterError(f"{w.size} weights for {n} vertices")
    if n and w.min() <= 0:
        raise ParameterError("vertex weights must be positive integers")
    lower = int(lower)
    if n == 0:
        return CliqueResult(np.empty(0, np.int64), 0, max(0, lower), True, 0, 0.0)

    # Renumber in degeneracy order (ties by lowest index): colouring by lowest index then
    # follows it, which is what makes the colour bound tight in practice [2], [4].
    # Depth never exceeds the number of colour classes of the whole graph (a clique meets
    # each class once) plus the empty level.
    order, padj, pw, gw, gclique, classes = K.clique_prepare(adj, w, n, min(n, 64))
    nwords = padj.shape[1]
    scratch_q = np.empty(nwords, np.uint64)
    scratch_c = np.empty(nwords, np.uint64)
    root_p = np.zeros((1, nwords), np.uint64)
    for v in range(n):
        root_p[0, v >> 6] |= np.uint64(1) << np.uint64(v & 63)
    depth = int(classes) + 2
    pst = np.zeros((depth, nwords), np.uint64)
    pst[0] = root_p[0]
    lst = np.zeros((depth, n), np.int64)
    bst = np.zeros((depth, n), np.int64)
    cnt = np.zeros(depth, np.int64)
    pos = np.zeros(depth, np.int64)
    cw = np.zeros(depth, np.int64)
    clique = np.zeros(depth, np.int64)
    best_clique = np.zeros(depth, np.int64)

    best0 = max(int(gw), lower)
    state = np.array([0, best0, 0, 0, 0, 0 if goal is None else max(1, int(goal))],
                     dtype=np.int64)
    if gw > lower:
        best_clique[: gclique.size] = gclique
        state[2] = gclique.size
    reached = goal is not None and state[2] > 0 and gw >= goal

    chunk = _FIRST_CHUNK
    done = False
    deadline = None if time_limit is None else start + float(time_limit)
    last_report = start
    while not reached:
        budget = int(state[3]) + chunk
        if node_limit is not None:
            budget = min(budget, int(node_limit))
        t0 = time.perf_counter()
        before = int(state[3])
        code = int(K.clique_search(padj, pw, pst, lst, bst, cnt, pos, cw, clique, best_clique,
                                   state, budget, scratch_q, scratch_c))
        now = time.perf_counter()
        done = code == 1
        if done or code == 2:
            break
        if node_limit is not None and state[3] >= node_limit:
            break
        if deadline is not None and now >= deadline:
            break
        dt = now - t0
        # Aim for ~0.1 s per call so the clock and progress are checked often enough, and
        # never plan a call past the deadline at the rate just measured.
        if dt < 0.05:
            chunk = min(chunk * 4, 1 << 40)
        elif dt > 0.2:
            chunk = max(1000, int(chunk * 0.1 / dt))
        if deadline is not None and dt > 0 and state[3] > before:
            rate = (int(state[3]) - before) / dt
            chunk = max(1000, min(chunk, int(rate * (deadline - now))))
        if progress is not None and now - last_report >= 0.2:
            last_report = now
            progress({"nodes": int(state[3]), "incumbent": int(state[1]),
                      "upper": _upper(state, pos, bst, False), "elapsed": now - start})

    best_w = int(state[1])
    size = int(state[2])
    verts = np.sort(order[best_clique[:size]]) if size else np.empty(0, np.int64)
    weight = int(w[verts].sum()) if size else 0
    if done:
        upper = best_w
    elif state[4] == 0:
        upper = max(best_w, int(w.sum()))
    else:
        upper = _upper(state, pos, bst, done)
    return CliqueResult(verts.astype(np.int64), weight, int(upper), done, int(state[3]),
                        time.perf_counter() - start)


def _upper(state: np.ndarray, pos: np.ndarray, bst: np.ndarray, done: bool) -> int:
    """Upper bound proved so far: the incumbent, or the bound of the root branch in progress.

    Root branches are taken from the end of the root list; everything not yet finished lies
    in the current root candidate set, whose vertices are all in classes up to that of
    ``pos[0]``, so no clique left to examine can weigh more than ``bst[0, pos[0]]``.
    """
    best = int(state[1])
    if done:
        return best
    i = int(pos[0])
    if i < 0:
        return best
    return max(best, int(bst[0, i]))


def max_clique(
    adj_bits: np.ndarray,
    *,
    time_limit: float | None = None,
    lower: int = 0,
    progress: Callable[[dict[str, Any]], None] | None = None,
    node_limit: int | None = None,
    goal: int | None = None,
) -> CliqueResult:
    """Maximum clique of a bitset graph: :func:`max_weight_clique` with unit weights."""
    adj, n = _check_graph(adj_bits, None)
    return max_weight_clique(adj, np.ones(n, np.int64), time_limit=time_limit, lower=lower,
                             progress=progress, node_limit=node_limit, goal=goal)
