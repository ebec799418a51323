"""Greedy codes: lexicodes and greedy packing in other scan orders, with restarts.

Problem
-------
Given a cell ``(q, n, d)``, build a large code quickly by scanning the Hamming space in some
order and keeping every word at distance ``>= d`` from the words kept so far. In lexicographic
order this is the *lexicode*, which for q = 2 is always linear and for several cells is the
best code known (the length-24 distance-8 lexicode is the extended Golay code, 4096 words).
Other orders (a q-ary Gray code, uniformly random orders restarted with fresh seeds) give
different codes; the best is kept. Greedy codes are heuristics: results are FEASIBLE only.

Method
------
Ball marking: a bitset with one bit per word of the space marks every word within distance
``d - 1`` of a codeword; a scanned word is kept iff its bit is clear. The work is
``M * |ball(d-1)|`` bit writes and the memory ``q^n / 8`` bytes, with no pairwise distances, so
the lexicode of length 24 (2^24 candidates, 2 MiB bitset) takes seconds. For random orders on
spaces above 2^22 words, where a stored permutation would be large, words are drawn at random
and checked against the code found so far instead (stopping after many rejected draws).

References
----------
J. H. Conway and N. J. A. Sloane, "Lexicographic codes: error-correcting codes from game
theory", IEEE Trans. Inform. Theory 32 (1986) 337-348 (lexicodes; binary lexicodes are linear;
the Golay code as a lexicode).
F. J. MacWilliams and N. J. A. Sloane, The Theory of Error-Correcting Codes, North-Holland
1977, ch. 1-2 (Hamming balls, Gray codes, the extended Golay code).
"""

from __future__ import annotations

import time
from typing import Any, Callable

import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.search import _wordspace as ws
from codesearch.search.base import Context, Outcome, positive_int

__all__ = ["OPTIONS", "SEEDING", "ORDERS", "run", "greedy_indices"]

#: Options of the ``greedy`` method.
OPTIONS = frozenset({"order", "restarts", "size"})
SEEDING = "random"
#: Tiny runs through every scan order, binary and q-ary (:func:`codesearch.search.prepare_method`).
WARM_UP = tuple(((q, n, 3), {"order": order, "restarts": 1}) for q, n in ((2, 7), (3, 4))
                for order in ("random", "gray", "lex"))

#: Scan orders: name -> kernel order code.
ORDERS = {"lex": 0, "gray": 1, "random": 2}

#: Largest space scanned with a marking bitset (2^28 bits = 32 MiB).
MAX_MARK_SPACE = 2**28
#: Largest space for which a random order is stored as an explicit permutation (32 MiB).
MAX_PERM_SPACE = 2**22
#: Largest code built by random sampling (pairwise checks).
MAX_SAMPLED = 2**16
#: Random sampling stops after this many consecutive rejected draws (common practice: a
#: free region of 1/64 of the space is then missed with probability about e^-8).
_SAMPLE_FAILS = 512
#: Draws per sampling kernel call, between time-limit checks.
_SAMPLE_DRAWS = 4096
#: Largest number of stored ball patterns (memory ~ 8 bytes x radius per pattern).
MAX_BALL = 2**23
#: Scan positions per kernel call, between time-limit checks.
#: Largest q-ary ball (q > 2) a scan is planned over (the portfolio's steps, the local search's
#: lexicode floor): the ball is a table of digit patterns applied one by one; at A_4(12,9)
#: (5.9e6 patterns, 700 MB) the lexicode spent a 10 s share on its first codeword
MAX_QARY_SCAN_BALL = 1 << 20
_CHUNK = 1 << 20


def greedy_indices(
    params: Params,
    order: str = "lex",
    *,
    seed: int = 0,
    stream: int = 0,
    deadline: float | None = None,
    progress: Callable[[dict[str, Any]], None] | None = None,
) -> tuple[np.ndarray, bool, int]:
    """Greedy code of a cell as sorted-by-scan word indices.

    Parameters
    ----------
    params : Params
        The cell.
    order : {"lex", "gray", "random"}
        Scan order.
    seed, stream : int
        Randomness for ``order="random"`` (ignored otherwise).
    deadline : float, optional
        ``time.perf_counter()`` value after which the scan stops early.
    progress : callable, optional
        Receives ``{"incumbent", "nodes", "elapsed"}`` after each chunk.

    Returns
    -------
    (indices, complete, scanned)
        The kept word indices in scan order, whether the whole space was scanned (only then
        is the code the greedy code of that order) and the number of scan positions done.
    """
    from codesearch import _kernels as K

    if order not in ORDERS:
        raise ParameterError(f"unknown greedy order {order!r}; choose from {', '.join(ORDERS)}")
    q, n, d = params.q, params.n, params.d
    space = q**n
    pw = ws.powers(q, n)
    radius = d - 1
    start = time.perf_counter()
    ball = ws.ball_size(q, n, radius)
    # the code fits in space / ball(floor((d-1)/2)) words (sphere packing), a safe capacity
    cap = max(1, space // ws.ball_size(q, n, radius // 2))
    kind = ORDERS[order]
    if order == "random" and space > MAX_PERM_SPACE:
        # pairwise checks cost O(M^2): stop at MAX_SAMPLED words (the code is still valid)
        rng = ws.xorshift_state(seed, stream)
        out = np.empty(min(cap, MAX_SAMPLED), dtype=np.int64)
        fail_state = np.zeros(1, dtype=np.int64)
        count = 0
        draws = 0
        per_call = _SAMPLE_DRAWS
        while True:
            call = time.perf_counter()
            count = K.heur_greedy_sample(q, n, d, space, _SAMPLE_FAILS, per_call,
                                         fail_state, rng, out, count)
            draws += per_call
            if fail_state[0] >= _SAMPLE_FAILS or count >= out.shape[0]:
                break
            now = time.perf_counter()
            if deadline is not None and now > deadline:
                break
            # a draw costs one distance per word kept so far: calls grow longer with the code
            # (2 s each at 6000 words of A_5(12,4)); aim at 0.1 s a call and never plan one
            # past the deadline at the rate just seen
            rate = per_call / max(now - call, 1e-6)
            per_call = max(1, min(4 * per_call, int(0.1 * rate)))
            if deadline is not None:
                per_call = max(1, min(per_call, int(rate * (deadline - now))))
        return out[:count].copy(), False, draws
    if space > MAX_MARK_SPACE:
        raise ParameterError(
            f"{params}: {space} words is too many to scan in {order} order "
            f"(limit {MAX_MARK_SPACE}); use order 'random'"
        )
    if ball > MAX_BALL:
        raise ParameterError(f"{params}: Hamming ball of {ball} words is too large to mark")
    perm = np.empty(0, dtype=np.int64)
    if kind == 2:
        gen = np.random.Generator(np.random.PCG64(np.random.SeedSequence([seed, stream])))
        perm = gen.permutation(space).astype(np.int64)
    blocked = np.zeros((space + 63) // 64, dtype=np.uint64)
    out = np.empty(min(cap, space), dtype=np.int64)
    if q == 2:
        masks = ws.ball_masks(n, radius)
    else:
        pat_ptr, pat_pos, pat_add = ws.ball_patterns(q, n, radius)
    count = 0
    t = 0
    # the longest kernel call so far: a call that marks the ball of a new codeword costs
    # ball-size memory writes (seconds for q-ary balls of 10^6+ words), so a scan under a
    # deadline stops when the next call, as long as the longest one, would end past it
    longest = 0.0
    # about one codeword per call where balls are large (space / cap words hold one on
    # average at the packing bound), so that the longest call is about one ball's marking
    chunk = min(_CHUNK, max(1 << 16, space // cap))
    while t < space:
        t1 = min(space, t + chunk)
        call = time.perf_counter()
        if q == 2:
            count = K.heur_greedy_mark_binary(t, t1, kind, n, perm, masks, blocked, out, count)
        else:
            count = K.heur_greedy_mark_qary(t, t1, kind, q, n, pw, perm, pat_ptr, pat_pos,
                                            pat_add, blocked, out, count)
        t = t1
        now = time.perf_counter()
        longest = max(longest, now - call)
        if progress is not None:
            progress({"incumbent": count, "nodes": t, "elapsed": now - start})
        if deadline is not None and now + longest > deadline and t < space:
            break
    return out[:count].copy(), t >= space, t


def run(ctx: Context, *, order: str = "random", restarts: int | None = None) -> Outcome:
    """Greedy packing in a scan order, restarted for random orders; keeps the largest code.

    Parameters
    ----------
    ctx : Context
        The cell, clock, seed and target (option ``size``: stop at a code of that size).
    order : {"random", "lex", "gray"}
        Scan order (lex and gray are deterministic: one pass).
    restarts : int, optional
        Number of random-order passes (default: until the time limit, or 10 without one).
    """
    if order not in ORDERS:
        raise ParameterError(f"unknown greedy order {order!r}; choose from {', '.join(ORDERS)}")
    if restarts is not None:
        positive_int(restarts, "restarts")
    passes = 1 if order != "random" else (restarts or (None if ctx.time_limit else 10))
    best = np.empty(0, dtype=np.int64)
    scanned_total = 0
    done = 0
    sizes = []
    while passes is None or done < passes:
        idx, complete, scanned = greedy_indices(ctx.params, order, seed=ctx.seed, stream=done,
                                                deadline=ctx.deadline, progress=None)
        done += 1
        scanned_total += scanned
        sizes.append(int(idx.size))
        if idx.size > best.size:
            best = idx
            ctx.report(incumbent=int(best.size), nodes=scanned_total)
        if (ctx.target is not None and best.size >= ctx.target) or ctx.expired():
            break
    return Outcome(ws.code_of_indices(best, ctx.params), nodes=scanned_total,
                   settings={"order": order, "passes": done, "restarts": restarts,
                             "pass_sizes": sizes[:100]})
