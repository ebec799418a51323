"""Local search for codes: min-conflicts tabu search at a fixed size, raising the size.

Problem
-------
Find a code of ``M`` words in ``[q]^n`` with minimum distance ``>= d`` by minimising the number
of *conflicts* (pairs of words closer than ``d``) over sets of ``M`` words. A conflict-free set
is a code; the search then adds one word and continues at ``M + 1``. Heuristic: every code it
returns is verified, and it never claims optimality (status FEASIBLE).

Method
------
Start from a random greedy code (the lexicode is returned instead when larger). A move takes a random word in conflict and replaces it by the
best of its ``n(q-1)`` neighbours at distance 1 and a few uniform random words (fewest
conflicts with the rest of the code, ties at random), never moving back to a recently removed
word unless the move clears all its conflicts (tabu list). Conflicts are counted either

* by *ball counts* (``q^n <= 2^24`` and small balls): ``count[y]`` = number of codewords within
  ``d - 1`` of ``y``, updated over two balls per move, so scoring a candidate costs O(1); memory
  2 bytes per word of the space; or
* pairwise against the current ``M`` words (large balls or large spaces); memory O(M).

For binary cells with even ``d`` the search runs on ``(n-1, d-1)`` and appends a parity bit:
a binary code of odd minimum distance ``d-1`` extended by an overall parity bit has minimum
distance ``d``, and puncturing a distance-``d`` code gives distance ``>= d-1``, so both cells
have the same largest size (MacWilliams and Sloane, ch. 1, section 9; common practice).

Randomness comes from one seeded xorshift64* stream, so a seed reproduces a run exactly
(given the same sequence of kernel calls, i.e. a step budget instead of a time limit).

References
----------
F. Glover, "Tabu search - part I", ORSA J. Computing 1 (1989) 190-206.
S. Minton, M. D. Johnston, A. B. Philips and P. Laird, "Minimizing conflicts: a heuristic
repair method for constraint satisfaction", Artificial Intelligence 58 (1992) 161-205.
F. J. MacWilliams and N. J. A. Sloane, The Theory of Error-Correcting Codes, North-Holland 1977.
"""

from __future__ import annotations

import math
import time

from dataclasses import dataclass

import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import Code, Params
from codesearch.search import _wordspace as ws
from codesearch.search import greedy
from codesearch.search.base import Context, Outcome, positive_int

__all__ = ["OPTIONS", "SEEDING", "run"]

OPTIONS = frozenset({"size", "steps", "tenure", "parity"})
SEEDING = "random"
#: Starts from ``ctx.incumbent`` when it is larger than the greedy start (a record hunt).
INCUMBENT = True
#: Tiny runs, binary (with the parity extension) and q-ary (:func:`codesearch.search.prepare_method`).
WARM_UP = (((2, 7, 3), {"steps": 200}), ((2, 8, 4), {"steps": 200}), ((3, 4, 3), {"steps": 200}))

#: Largest space for which the ball-count array is used (2 bytes per word: 32 MiB).
MAX_COUNT_SPACE = 2**24
#: Largest code the local search holds.
MAX_WORDS = 2**20
#: Random candidate words scored per move, besides the distance-1 neighbours.
_N_RANDOM = 8
#: Moves per kernel call, between time-limit checks.
_CHUNK = 4000


def _work_cell(params: Params, parity: bool) -> tuple[Params, bool]:
    if parity and params.q == 2 and params.d % 2 == 0 and params.n >= 2:
        return Params(2, params.n - 1, params.d - 1), True
    return params, False


def _extend_parity(words: np.ndarray) -> np.ndarray:
    parity = (words.sum(axis=1) % 2).astype(np.uint8)
    return np.concatenate([words, parity[:, None]], axis=1)


@dataclass
class _State:
    """The kernels' working arrays for one cell (see :func:`_setup`)."""

    cell: Params
    mode: int  # 1: ball counts, 2: pairwise scoring
    cap: int
    ball: int
    n_cand: int
    pw: np.ndarray
    masks: np.ndarray
    pat_ptr: np.ndarray
    pat_pos: np.ndarray
    pat_add: np.ndarray
    counts: np.ndarray
    words: np.ndarray
    conf: np.ndarray
    tabu: np.ndarray
    rng: np.ndarray

    def kernel_args(self) -> tuple:
        return (self.pw, self.masks, self.pat_ptr, self.pat_pos, self.pat_add, self.counts)


def _setup(cell: Params, init: np.ndarray, tenure: int, seed: int) -> _State:
    """Choose the scoring and allocate the arrays, with the initial code as words ``0..M-1``."""
    q, n, d = cell.q, cell.n, cell.d
    space = q**n
    radius = d - 1
    ball = ws.ball_size(q, n, radius)
    # sphere packing: no code exceeds space / |ball(floor((d-1)/2))|; beyond 2^20 words a
    # local search is hopeless anyway, and the cap bounds the memory of the word arrays
    cap = min(space // ws.ball_size(q, n, radius // 2), MAX_WORDS)
    M = int(init.size)
    n_cand = n * (q - 1) + _N_RANDOM
    # per move, ball counts cost two ball updates; pairwise scoring costs about (codewords in
    # conflict, typically a few) x candidates x M distances: take the cheaper
    use_counts = space <= MAX_COUNT_SPACE and 2 * ball <= 4 * n_cand * max(M, 1)
    if M > 65534:
        use_counts = False  # a start this large (a greedy code at n >= 22) overflows the counts
    mode = 1 if use_counts else 2
    if mode == 1:
        cap = min(cap, 65534)  # counts are uint16 and never exceed the code size
    cap = max(cap, M)  # the start is a code: never more words than the packing bound allows
    empty = np.empty(0, dtype=np.int64)
    masks, pat_ptr, pat_pos, pat_add = empty, np.zeros(1, dtype=np.int64), empty, empty
    if mode == 1:
        if q == 2:
            masks = ws.ball_masks(n, radius)
        else:
            pat_ptr, pat_pos, pat_add = ws.ball_patterns(q, n, radius)
    words = np.zeros(cap + 1, dtype=np.int64)
    words[:M] = init
    tabu = np.full(tenure + 1, -1, dtype=np.int64)
    tabu[0] = 0
    return _State(cell, mode, cap, ball, n_cand, ws.powers(q, n), masks, pat_ptr, pat_pos,
                  pat_add, np.zeros(space if mode == 1 else 0, dtype=np.uint16), words,
                  np.zeros(cap + 1, dtype=np.int32), tabu, ws.xorshift_state(seed, 1))


def _share(ctx: Context, left: float | None, fraction: float) -> float | None:
    """Deadline for a preliminary step: ``fraction`` of ``left`` seconds from now."""
    if left is None:
        return ctx.deadline
    return min(ctx.deadline, time.perf_counter() + fraction * max(left, 0.0))


def _finish_seconds(params: Params, M: int) -> float:
    """Generous seconds to list an M-word code of the cell and have it re-checked twice (by
    the front end of this method and by the portfolio's, when it runs inside one): a bitmap
    check marks the radius-r ball of every word and, for even d, probes its radius-(r+1)
    sphere; 2e-8 to 3e-8 s per marked or probed word on a loaded machine (464896 words of
    A(27,4): 379 each, 3.5 s a check)."""
    r = (params.d - 1) // 2
    per = ws.ball_size(params.q, params.n, r)
    if params.d % 2 == 0:
        per += math.comb(params.n, r + 1) * (params.q - 1) ** (r + 1)
    return M * (params.n + 2 * per) * 3e-8 + params.space_size * 1e-9


def _count_balls(st: _State, M: int, ctx: Context) -> bool:
    """Fill ``st.counts`` for the start code ``st.words[:M]``; False if the deadline came first.

    One random access into the q^n counts per word of each ball: 10^3 words with balls of
    46666 words over 4^12 took 10 s in one kernel call (A_4(12,5)), so the balls are added in
    slices of about 2 * 10^6 accesses with the clock read between them.
    """
    from codesearch import _kernels as K

    q, n = st.cell.q, st.cell.n
    per = max(1, 2_000_000 // st.ball)
    st.counts[:] = 0
    for lo in range(0, M, per):
        K.heur_local_add_balls(q, n, lo, min(M, lo + per), st.words, *st.kernel_args())
        if ctx.expired():
            return False
    st.conf[:M] = st.counts[st.words[:M]].astype(np.int32) - 1
    assert not st.conf[:M].any()  # the start is a code
    return True


def _repair(st: _State, M: int, total: int, steps: int | None, ctx: Context
            ) -> tuple[int, int, bool]:
    """Tabu moves at size M until no conflict is left, the step budget or the deadline.

    Returns ``(conflicts left, moves made, stopped by the deadline)``.
    """
    from codesearch import _kernels as K

    q, n, d = st.cell.q, st.cell.n, st.cell.d
    moves = 0
    rate = None  # moves per second measured on the previous call
    while total > 0:
        # about 5e7 elementary operations per kernel call, so the clock is read often
        work = 2 * st.ball + M * st.n_cand if st.mode == 1 else 4 * st.n_cand * M
        chunk = max(1, min(_CHUNK, 50_000_000 // work))
        left = ctx.time_left()
        if rate is None and left is not None:
            # the estimate above can be far off (q-ary balls of 10^5 words, where a move
            # scores every candidate through its ball): measure on a few moves first
            chunk = min(chunk, 8)
        if rate is not None and left is not None:
            # never plan a call past the deadline (nor longer than 0.1 s) at the rate seen
            chunk = max(1, min(chunk, int(rate * min(0.1, max(left, 0.0)))))
        if steps is not None:
            chunk = min(chunk, steps - moves)
        if chunk <= 0:
            break
        t0 = time.perf_counter()
        total, done = K.heur_local_steps(q, n, d, q**n, M, st.words, st.conf, total, st.mode,
                                         *st.kernel_args(), st.tabu, st.rng, _N_RANDOM, chunk)
        dt = time.perf_counter() - t0
        if done > 0 and dt > 0:
            rate = done / dt
        moves += done
        if ctx.expired():
            return total, moves, total > 0
    return total, moves, False


def run(ctx: Context, *, steps: int | None = None, tenure: int = 10,
        parity: bool = True) -> Outcome:
    """Tabu search raising the code size while it succeeds.

    Parameters
    ----------
    ctx : Context
        The cell, clock, seed and target (option ``size``: stop at a code of that size).
    steps : int, optional
        Moves allowed at one size without success before giving up (default 2 000 000 with no
        time limit, unlimited with one). A step budget with no time limit makes a run exactly
        reproducible from its seed.
    tenure : int
        Length of the tabu list of recently removed words.
    parity : bool
        For binary cells with even d, search the punctured cell and extend by parity.
    """
    from codesearch import _kernels as K

    if steps is not None:
        steps = positive_int(steps, "steps")
    if not isinstance(tenure, (int, np.integer)) or not 0 <= tenure <= 10_000:
        raise ParameterError(f"tenure must be an integer in 0..10000, got {tenure!r}")
    if steps is None and ctx.time_limit is None:
        steps = 2_000_000
    cell, extended = _work_cell(ctx.params, bool(parity))
    q, n, d = cell.q, cell.n, cell.d
    # initial code: one random greedy pass (stream 0 of the seed). The lexicode is kept aside
    # as a floor: it is often larger than what the search reaches (A(15,5)), but as a start
    # it is a rigid local optimum (measured: from the lexicode A(12,4) stays at 128, from a
    # random greedy code it reaches 144 in a second)
    # the preliminary steps get shares of the time (a random greedy pass over 4^12 words can
    # take a whole 3 s budget on its own, measured at A_4(12,5))
    left = ctx.time_left()
    init, _, _ = greedy.greedy_indices(cell, "random", seed=ctx.seed, stream=0,
                                       deadline=_share(ctx, left, 0.4))
    if ctx.incumbent is not None and ctx.incumbent.size > init.size:
        # a verified code of the cell; punctured for the parity cell (distance d - 1 there)
        words = ctx.incumbent.words[:, :n].astype(np.int64)
        init = np.unique(words @ ws.powers(q, n))
    floor = np.empty(0, dtype=np.int64)
    # (not where the ball is a table of millions of q-ary patterns: building it alone passes
    # a 10 s budget, measured at A_5(11,8))
    max_ball = greedy.MAX_BALL if q == 2 else greedy.MAX_QARY_SCAN_BALL
    if q**n <= greedy.MAX_MARK_SPACE and ws.ball_size(q, n, d - 1) <= max_ball:
        floor, _, _ = greedy.greedy_indices(cell, "lex", deadline=_share(ctx, left, 0.2))
    st = _setup(cell, init, int(tenure), ctx.seed)
    best, M = init.copy(), int(init.size)
    # the start is a code: no conflicts, so conf = 0 is exact (pairwise scoring needs no
    # O(M^2) recount); ball scoring needs the counts, filled in slices under the clock
    total = 0
    out_of_time = st.mode == 1 and not _count_balls(st, M, ctx)
    moves = 0
    levels: list[int] = []
    while not out_of_time and M < st.cap and (ctx.target is None or max(best.size, floor.size) < ctx.target):
        total += K.heur_local_grow(q, n, d, q**n, M, st.words, st.conf, st.mode,
                                   *st.kernel_args(), st.rng, 4 * _N_RANDOM)
        M += 1
        total, level_moves, out_of_time = _repair(st, M, total, steps, ctx)
        moves += level_moves
        levels.append(level_moves)
        if total > 0:
            break
        best = st.words[:M].copy()
        ctx.report(incumbent=int(best.size), nodes=moves)
        left = ctx.time_left()
        if left is not None and left < _finish_seconds(ctx.params, M):
            # what is left would not even list and re-check the code found (729088 words of
            # A(27,4): 2.5 s), so stop growing it
            out_of_time = True
            break
    returned = "local search"
    if floor.size > best.size:
        best, returned = floor, "lexicode (larger than the local search reached)"
    left = ctx.time_left()
    finish = _finish_seconds(ctx.params, best.size)
    if best is floor and left is not None and best.size > 1 and finish > left:
        # a lexicode prefix the time left cannot list and re-check (460800 words at A(28,4))
        # is cut to one it can: any subset of a code is a code (the search's own codes stop
        # growing in time, and an incumbent is never cut)
        keep = max(1, int(best.size * max(left, 0.0) / finish))
        best = np.sort(best)[:keep]
        returned += f", cut to {keep} words for the time left"
    code = None
    if best.size:
        cwords = ws.indices_to_words(np.sort(best), q, n)
        code = Code(_extend_parity(cwords) if extended else cwords, ctx.params.q)
    return Outcome(code, nodes=moves, settings={
        "steps": steps, "tenure": int(tenure), "parity": extended, "searched_cell": [q, n, d],
        "scoring": "ball-counts" if st.mode == 1 else "pairwise", "start_size": int(init.size),
        "returned": returned, "moves_per_size": levels[-50:], "stopped_by_time": out_of_time,
        "started_from": "incumbent" if ctx.incumbent is not None and int(init.size)
        == ctx.incumbent.size else "greedy"})
