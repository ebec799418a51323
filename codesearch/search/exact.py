"""Method ``"exact"``: prove A_q(n,d) by maximum clique search with symmetry reduction.

Problem
-------
Find a largest q-ary code of length n and minimum distance d and prove that no larger one
exists (or, with ``size``, decide whether a code of that size exists). A code is a clique
of the code graph (:mod:`codesearch.search.graph`); the search is a tree of subproblems (fixed
words + candidates) produced by isomorph rejection on orbits of fixed words, whose small
leaves are solved by the bit-parallel clique engine (:mod:`codesearch.search.clique`).

Outline
-------
0. Binary cells with even d search only even-weight words (:func:`graph.even_weight_suffices`).
1. Root: the zero word is fixed (one orbit under the full isometry group).
2. Second word: split by weight, weight d first. When the best code found there reaches an
   upper bound on ``A_q(n,d+1)`` (the bounds module, else a recursive exact search on
   ``(n, d+1)``), the other weights are skipped (:func:`graph.distance_d_pair_suffices`).
3. Further words: split by orbits of the stabiliser of the fixed words while a node has more
   than ``leaf_size`` candidates and fewer than ``max_fixed`` fixed words (nodes too large
   for one graph, over :data:`graph.MAX_LEAF` candidates, are always split).
4. Leaves: maximum clique on the candidates, seeking only cliques that beat the incumbent.
The incumbent is shared by the whole tree. Unless ``use_bounds=False`` the search stops when
the incumbent meets a usable bound from :mod:`codesearch.bounds` (recorded in ``settings``).

Anytime: on the time limit the best code is returned with the largest bound still possible
among the unfinished nodes (each pending node bounded by its fixed words plus a greedy colour
bound of its candidates; the running leaf by its proved bound).

References
----------
.. [1] P. R. J. Ostergard, T. Baicheva, E. Kolev, "Optimal binary one-error-correcting codes of
   length 10 have 72 codewords", IEEE Trans. Inform. Theory 45 (1999) 1229-1231.
.. [2] P. Kaski, P. R. J. Ostergard, "Classification Algorithms for Codes and Designs",
   Springer 2006.
.. [3] P. San Segundo, D. Rodriguez-Losada, A. Jimenez, "An exact bit-parallel algorithm for
   the maximum clique problem", Computers & Operations Research 38 (2011) 571-581.
"""

from __future__ import annotations

import time
from typing import Any, Callable

import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import Code, Params
from codesearch.search.base import Context, Outcome

__all__ = ["OPTIONS", "SEEDING", "run", "load_kernels"]

OPTIONS = frozenset({"size", "reduce", "leaf_size", "max_fixed", "use_bounds"})
SEEDING = "none"
#: Tiny runs through every kernel path (binary, q-ary, even-weight reduction), for
#: :func:`codesearch.search.prepare_method`.
WARM_UP = (((2, 5, 3), {"use_bounds": False}), ((2, 6, 4), {"use_bounds": False}),
           ((3, 4, 3), {"use_bounds": False}), ((2, 6, 3), {"size": 9, "use_bounds": False}))

_DEFAULT_LEAF = 96
_DEFAULT_MAX_FIXED = 4
#: A space (or zero-word node) with at most this many candidates, and no more than the leaf
#: size, is searched as one clique: quicker than splitting it. Independent of ``leaf_size``,
#: since a large leaf size must not turn a real search into an unreduced one.
_WHOLE_SPACE = 96
#: Seconds past the deadline during which abandoned nodes still get their colour bound;
#: later ones get the plain count, so that stopping stays prompt.
_ABANDON_GRACE = 0.05


def load_kernels() -> float:
    """Load the exact search's compiled kernels now; return the seconds it took.

    numba loads (or, on a first run, compiles) each kernel at its first call. Solving one tiny
    cell, A(5,3) = 4 without outside bounds, touches every kernel the search and its
    verification use, so later searches in the process start at once (benchmarks call this
    to time the search apart from loading machine code, as importing a compiled library
    would). About 30 ms when numba's cache is warm.
    """
    from codesearch.search import search

    start = time.perf_counter()
    search(Params(2, 5, 3), "exact", use_bounds=False)
    return time.perf_counter() - start


class _Search:
    """State shared by the subproblem tree: incumbent, clock, counters."""

    def __init__(self, params: Params, deadline: float | None, start: float,
                 progress: Callable[[dict[str, Any]], None] | None, stop_at: int | None,
                 best: int, leaf_size: int, max_fixed: int) -> None:
        self.params = params
        self.deadline = deadline
        self.start = start
        self.progress = progress
        self.stop_at = stop_at
        self.best = best  # size the search must beat (incumbent size or target - 1)
        self.code: np.ndarray | None = None
        self.nodes = 0
        self.leaves = 0
        self.leaf_size = leaf_size
        self.max_fixed = max_fixed
        self.stopped = False  # time limit hit or goal met: the rest of the tree is abandoned
        self.pending_upper = 0  # bound over abandoned nodes (valid once stopped)
        self.known_upper: int | None = None  # a bound from the bounds module, when usable
        self.last_report = start

    def time_left(self) -> float | None:
        if self.deadline is None:
            return None
        return self.deadline - time.perf_counter()

    def goal_met(self) -> bool:
        return self.stop_at is not None and self.best >= self.stop_at

    def abandon(self, sub: Any) -> None:
        """Account for a node left unsearched: its bound joins the proved upper bound, unless
        the incumbent already meets a known bound (then the answer is settled anyway)."""
        if self.known_upper is not None and self.best >= self.known_upper:
            return
        left = self.time_left()
        if left is not None and left < -_ABANDON_GRACE:
            # past the deadline: the plain count (fixed words + candidates) still bounds the
            # node, without building its code graph
            self.pending_upper = max(self.pending_upper,
                                     sub.fixed.shape[0] + sub.candidates.shape[0])
            return
        self.pending_upper = max(self.pending_upper, _node_bound(sub, self.params))

    def report(self, force: bool = False) -> None:
        if self.progress is None:
            return
        now = time.perf_counter()
        if force or now - self.last_report >= 0.25:
            self.last_report = now
            self.progress({"nodes": self.nodes, "incumbent": self.best if self.code is not None
                           else 0, "leaves": self.leaves, "elapsed": now - self.start})

    def solve_leaf(self, sub: Any) -> None:
        """Maximum clique of the leaf's candidates beating the incumbent."""
        from codesearch.search import clique, graph

        k = sub.fixed.shape[0]
        need = self.best - k  # the clique must have more than this many vertices
        if sub.candidates.shape[0] <= need:
            return
        adj = graph.code_graph(sub.candidates, self.params.q, self.params.d)
        left = self.time_left()
        prog = None
        if self.progress is not None:
            def prog(info: dict[str, Any]) -> None:
                self.progress({"nodes": self.nodes + info["nodes"],
                               "incumbent": max(self.best, k + info["incumbent"]),
                               "leaves": self.leaves,
                               "elapsed": time.perf_counter() - self.start})
        goal = None if self.stop_at is None else max(1, self.stop_at - k)
        res = clique.max_clique(adj, time_limit=left, lower=max(need, 0), progress=prog,
                                goal=goal)
        self.nodes += res.nodes
        self.leaves += 1
        if res.size > need:
            self.best = k + res.size
            self.code = np.vstack([sub.fixed, sub.candidates[res.vertices]])
        if not res.complete:
            # Stopped by the clock or by the goal: only the bound proved so far holds here.
            self.stopped = True
            self.pending_upper = max(self.pending_upper, k + res.upper)
        self.report()

    def walk(self, sub: Any, first_weight: int | None = None) -> None:
        """Depth-first over the subproblem tree below ``sub``."""
        from codesearch.search import graph

        k = sub.fixed.shape[0]
        if k > self.best:
            self.best = k
            self.code = sub.fixed.copy()
            if self.goal_met():
                self.stopped = True
        if self.stopped:
            self.abandon(sub)
            return
        if k + sub.candidates.shape[0] <= self.best:
            return
        m = sub.candidates.shape[0]
        if m <= self.leaf_size or (k >= self.max_fixed and m <= graph.MAX_LEAF):
            self.solve_leaf(sub)
            return
        for child in graph.orbit_split(sub, self.params.q, self.params.d,
                                       first_weight=first_weight):
            left = self.time_left()
            if left is not None and left <= 0:
                self.stopped = True
            self.walk(child)


def _node_bound(sub: Any, params: Params) -> int:
    """Fixed words plus the greedy colour count of the candidates' code graph."""
    from codesearch import _kernels as K
    from codesearch.search import graph

    k = sub.fixed.shape[0]
    m = sub.candidates.shape[0]
    if m == 0:
        return k
    if m > 4096:
        return k + m
    adj = graph.code_graph(sub.candidates, params.q, params.d)
    nwords = adj.shape[1]
    p = np.zeros((1, nwords), np.uint64)
    for v in range(m):
        p[0, v >> 6] |= np.uint64(1) << np.uint64(v & 63)
    classes = K.clique_colour_level(adj, np.ones(m, np.int64), p, np.empty((1, m), np.int64),
                                    np.empty((1, m), np.int64), np.empty(1, np.int64),
                                    np.empty(1, np.int64), 0, -1, np.empty(nwords, np.uint64),
                                    np.empty(nwords, np.uint64))
    return k + int(classes)


def run(ctx: Context, *, reduce: bool = True, leaf_size: int = _DEFAULT_LEAF,
        max_fixed: int = _DEFAULT_MAX_FIXED, use_bounds: bool = True) -> Outcome:
    """Exact search of one cell (see the module docstring).

    Parameters
    ----------
    ctx : Context
        The cell and clock. On the time limit the best code and the bound proved so far are
        returned. With a target size (option ``size``), decide whether a code of that size
        exists instead of maximising: stop at the first such code or prove none exists
        (``upper = size - 1``).
    reduce : bool
        Apply the symmetry reductions (default). ``False`` runs the plain clique search on
        all ``q^n`` words (for tests and comparisons).
    leaf_size, max_fixed : int
        Split a node by orbits while it has more than ``leaf_size`` candidates and fewer than
        ``max_fixed`` fixed words.
    use_bounds : bool
        Use the cell's known upper bound (default): stop when the incumbent meets it, and use
        the bound on ``A_q(n,d+1)`` first. ``False`` makes the search prove everything by
        itself (benchmarks, independent cross-checks).
    """
    from codesearch.search import graph

    q, n = ctx.params.q, ctx.params.n
    if int(leaf_size) < 1 or int(max_fixed) < 1:
        raise ParameterError("leaf_size and max_fixed must be positive")
    if q**n > graph.MAX_SPACE:
        raise ParameterError(
            f"exact search enumerates all q^n = {q}^{n} words; limit is {graph.MAX_SPACE}"
        )
    if not reduce and q**n > graph.MAX_LEAF:
        raise ParameterError(
            f"the unreduced search takes all q^n = {q}^{n} words as one graph; limit is "
            f"{graph.MAX_LEAF} (use the reductions)"
        )
    return _solve(ctx, bool(reduce), int(leaf_size), int(max_fixed), bool(use_bounds))


def _solve(ctx: Context, reduce: bool, leaf_size: int, max_fixed: int,
           use_bounds: bool) -> Outcome:
    """The search behind :func:`run` (options checked)."""
    from codesearch.search import graph

    params, target = ctx.params, ctx.target
    ext = ctx.known_upper if use_bounds else None
    settings: dict[str, Any] = {"reduce": reduce, "leaf_size": leaf_size,
                                "max_fixed": max_fixed, "numba": _numba_version(),
                                "known_upper": ext, "use_bounds": use_bounds}
    if target is not None and ext is not None and ext < target:
        # A usable bound already refutes the requested size: nothing to search.
        return Outcome(None, ext, 0, settings)
    stop_at = target if target is not None else ext
    best0 = (target - 1) if target is not None else 0
    s = _Search(params, ctx.deadline, ctx.start, ctx.progress, stop_at, best0, leaf_size,
                max_fixed)
    s.known_upper = ext
    even = reduce and graph.even_weight_suffices(params.q, params.d)
    settings["even_weight_only"] = even
    skipped_bound = _walk_from_root(s, ctx, graph.root(params.q, params.n, params.d, even=even),
                                    reduce, settings)
    s.report(force=True)
    if s.stopped:
        upper = max(s.best, s.pending_upper)
    else:
        upper = s.best if skipped_bound is None else max(s.best, skipped_bound)
    if ext is not None:
        upper = min(upper, ext)
    code = None if s.code is None else Code(s.code, params.q)
    return Outcome(code, int(upper), int(s.nodes), settings)


def _walk_from_root(s: _Search, ctx: Context, root: Any, reduce: bool,
                    settings: dict[str, Any]) -> int | None:
    """Search the tree below the root; returns the bound on ``A_q(n,d+1)`` that made the
    other second-word weights unnecessary, if it did."""
    from codesearch.search import graph

    q, d = ctx.params.q, ctx.params.d
    whole = min(s.leaf_size, _WHOLE_SPACE)
    if not reduce or root.candidates.shape[0] <= whole:
        # No reductions, or a space so small that one clique search of all of it is quicker
        # than splitting it by orbits (and equally exhaustive).
        s.max_fixed = 0
        s.walk(root)
        return None
    zero_node = graph.orbit_split(root, q, d)[0]  # one orbit: the zero word
    if zero_node.candidates.shape[0] <= whole:
        children = [zero_node]  # small enough to be one leaf: no split by weight
    else:
        children = graph.orbit_split(zero_node, q, d, first_weight=d)
    if zero_node.fixed.shape[0] > s.best:
        s.best, s.code = 1, zero_node.fixed.copy()
        s.stopped = s.goal_met()
    for idx, child in enumerate(children):
        s.walk(child)
        if idx == 0 and not s.stopped and len(children) > 1:
            # Weight-d child done: is the rest needed? Only if the incumbent does not
            # exceed an upper bound on A_q(n,d+1) (distance_d_pair_suffices).
            u_next = _upper_next(ctx, s, settings)
            if u_next is not None and s.best >= u_next:
                settings["skipped_by_pair_argument"] = True
                return u_next
    return None


def _numba_version() -> str:
    import numba

    return str(numba.__version__)


def _upper_next(ctx: Context, s: _Search, settings: dict[str, Any]) -> int | None:
    """An upper bound on ``A_q(n, d+1)``: 1 past the length, else the known bound of that
    cell, else a recursive exact search on ``(n, d+1)`` within the remaining time (its proved
    ``upper``)."""
    q, n, d = ctx.params.q, ctx.params.n, ctx.params.d
    if d + 1 > n:
        return 1
    sub = ctx.for_cell(Params(q, n, d + 1))
    use_bounds = settings["use_bounds"]
    ext = sub.known_upper if use_bounds else None
    if ext is not None and s.best >= ext:
        settings["upper_next"] = {"value": ext, "source": "bounds"}
        return ext
    res = _solve(sub, True, _DEFAULT_LEAF, _DEFAULT_MAX_FIXED, use_bounds)
    s.nodes += res.nodes
    value = res.upper if ext is None else min(ext, res.upper)
    settings["upper_next"] = {"value": value, "source": "exact",
                              "optimal": res.code is not None and res.upper == res.code.size}
    return value
