"""SAT search: does a code of M words exist? (method ``sat``)

Problem
-------
Decide whether ``A_q(n,d) >= M``: find M words of ``[q]^n`` with pairwise Hamming distance
``>= d``, or prove that none exist. One Boolean variable ``x_v`` per word ``v`` of the space;
a clause ``(not x_u or not x_v)`` for every pair at distance ``< d``; a cardinality constraint
``sum_v x_v >= M`` (python-sat's :class:`~pysat.card.CardEnc`). A satisfying assignment is a
code (verified before it is returned); an unsatisfiable formula proves ``A_q(n,d) <= M - 1``.

Symmetry breaking (each reduction keeps satisfiability; proofs in :func:`encode`)
-------------------------------------------------------------------------------
``none``  plain encoding.
``zero``  the zero word is in the code.
``pair``  in addition, branch on the minimum distance ``w`` of the code (``d <= w <= n``): the
          code contains ``0`` and ``u_w = 1^w 0^(n-w)`` and has all distances ``>= w``. The
          answer is "yes" iff some branch is satisfiable, "no" iff every branch is refuted.
``lex``   in addition, lex-leader constraints ``x >=_lex g(x)`` for generators ``g`` of the
          isometries fixing ``0`` and ``u_w`` (default).

Encoding is a pure function (:func:`encode`, :func:`encode_base`); solving is separate and
incremental over M (the cardinality constraint for each M is guarded by an activation literal
and assumed, so learnt clauses about the conflict graph carry over). CaDiCaL 1.9.5 is the
default solver. Time limits: python-sat's CaDiCaL bindings ignore ``interrupt()`` (measured:
``solve_limited(expect_interrupt=True)`` never returns), so with a time limit the solving runs
in a forked worker process that reports every answer through a pipe and is terminated at the
deadline; without one it runs in this process. With ``proof``
the solver's DRAT proof of each refuted branch is written next to the DIMACS formula it
refutes, with a manifest binding them to the claim (:mod:`codesearch.proofbundle`), which
``codesearch check`` re-checks with the project's own checker (:mod:`codesearch.verify.drat`). The
proof covers the *reduced* formula: its soundness for the cell rests on the
symmetry-breaking arguments above.

References
----------
J. M. Crawford, M. Ginsberg, E. Luks and A. Roy, "Symmetry-breaking predicates for search
problems", KR 1996 (lex-leader constraints).
F. A. Aloul, I. L. Markov and K. A. Sakallah, "Efficient symmetry breaking for Boolean
satisfiability", IJCAI 2003 (linear-size lex-leader encoding).
C. Sinz, "Towards an optimal CNF encoding of Boolean cardinality constraints", CP 2005;
O. Bailleux and Y. Boufkhad, "Efficient CNF encoding of Boolean cardinality constraints",
CP 2003 (cardinality encodings).
A. Biere, T. Faller, K. Fazekas, M. Fleury, N. Froleyks, F. Pollitt, "CaDiCaL 2.0", CAV 2024.
N. Wetzler, M. Heule and W. Hunt, "DRAT-trim: efficient checking and trimming using
expressive clausal proofs", SAT 2014.
"""

from __future__ import annotations

import json
import os
import time
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping, Sequence

import numpy as np

from codesearch.codefile import file_sha256
from codesearch.errors import InputError, ParameterError
from codesearch.model import Params
from codesearch.search import _wordspace as ws
from codesearch.search.base import Context, Outcome

__all__ = ["OPTIONS", "SEEDING", "SYMMETRY", "ENCODINGS", "Encoding", "encode_base", "encode_card",
           "encode", "run", "solve_size", "write_manifest", "rests_on", "MANIFEST_FORMAT",
           "REDUCTION_THEOREMS"]

OPTIONS = frozenset({"size", "proof", "symmetry", "encoding", "solver"})
SEEDING = "none"
#: A tiny refutation (A(5,3) = 4): loads the solver library (:func:`codesearch.search.prepare_method`).
WARM_UP = (((2, 5, 3), {"size": 5}),)

#: Symmetry-breaking levels, each including the previous ones.
SYMMETRY = ("none", "zero", "pair", "lex")

#: Cardinality encodings offered (python-sat names).
ENCODINGS = ("seqcounter", "totalizer", "kmtotalizer", "mtotalizer", "sortnetwrk", "cardnetwrk")

#: Default cardinality encoding, chosen by measurement (benchmarks/bench_find.py, section enc:
#: sequential counter 2.6 s in total on the four test questions, k-totalizer 7.1 s, totalizer
#: 14.2 s, sorting / cardinality networks 13.9 s, modulo totalizer 11.0 s; medians of 3).
DEFAULT_ENCODING = "seqcounter"
DEFAULT_SOLVER = "cadical195"

#: Format of the refutation manifest written beside the DRAT proofs (read by
#: :mod:`codesearch.proofbundle`).
MANIFEST_FORMAT = "codesearch-refutation/1"

#: The statements each symmetry level rests on (cumulative, by level).
REDUCTION_THEOREMS = {
    "zero": "zero: every code has an isometric copy (a translate) containing the zero word",
    "pair": "pair: a code of >= 2 words with minimum distance w >= d has an isometric copy "
            "containing 0 and 1^w0^(n-w) with all distances >= w, so the branches w = d..n "
            "cover every code",
    "lex": "lex: the lexicographic leader of an orbit of branch solutions under the "
           "generated isometries satisfies x >=_lex g(x) for each generator g",
    "card": "cardinality: the auxiliary-variable encoding of sum x_v >= M extends exactly "
            "the assignments with at least M true word variables",
}

#: Largest space encoded (one variable per word).
MAX_SPACE = 2**15
#: Largest number of conflict clauses built.
MAX_CLAUSES = 30_000_000


@dataclass
class Encoding:
    """A CNF with the meaning of its variables.

    Attributes
    ----------
    clauses : list of list of int
        The clauses (DIMACS literals).
    nvars : int
        Largest variable used.
    space : int
        Number of words; word index ``v`` (lexicographic) is variable ``v + 1``.
    weight : int or None
        The branch: minimum distance ``w`` fixed by the ``pair`` reduction (None otherwise).
    reductions : list of str
        Names of the symmetry reductions applied.
    """

    clauses: list[list[int]]
    nvars: int
    space: int
    weight: int | None
    reductions: list[str] = field(default_factory=list)


def _words(q: int, n: int) -> np.ndarray:
    return ws.indices_to_words(np.arange(q**n, dtype=np.int64), q, n)


def _close_pairs(q: int, n: int, r: int) -> np.ndarray:
    """All index pairs ``(u, v)``, ``u < v``, at Hamming distance ``1..r`` (an (E, 2) array)."""
    N = q**n
    if r <= 0:
        return np.empty((0, 2), dtype=np.int64)
    if q == 2:
        masks = ws.ball_masks(n, r)[1:]
        u = np.arange(N, dtype=np.int64)[:, None]
        v = u ^ masks[None, :]
        keep = u < v
        uu = np.broadcast_to(u, v.shape)[keep]
        return np.stack([uu, v[keep]], axis=1)
    words = _words(q, n)
    parts = []
    step = max(1, 2**22 // (N * n))
    for lo in range(0, N, step):
        block = words[lo:lo + step]
        dist = (block[:, None, :] != words[None, :, :]).sum(axis=2)
        i, j = np.nonzero((dist <= r) & (dist > 0))
        i = i + lo
        keep = i < j
        parts.append(np.stack([i[keep], j[keep]], axis=1))
    return np.concatenate(parts).astype(np.int64)


def _lex_leader(perm: np.ndarray, pool_next: int) -> tuple[list[list[int]], int]:
    """Clauses for ``x >=_lex perm(x)`` over variables ``v + 1`` in index order.

    ``perm`` is an involution on word indices; only positions ``v < perm[v]`` matter (at a
    position ``perm[v] < v`` the pair is the mirror of an earlier one, equal once the prefix
    is). ``e_i`` means "the prefix before pair i is equal": ``e_i -> (a_i or not b_i)``,
    ``e_i and b_i -> e_{i+1}`` and ``e_i and not a_i -> e_{i+1}`` (Aloul et al. 2003).
    Returns the clauses and the next free variable.
    """
    idx = np.nonzero(np.arange(perm.size) < perm)[0]
    clauses: list[list[int]] = []
    prev = None  # e_1 is true: omitted from the first clauses
    for t, v in enumerate(idx):
        a, b = int(v) + 1, int(perm[v]) + 1
        guard = [] if prev is None else [-prev]
        clauses.append(guard + [a, -b])
        if t + 1 < idx.size:
            e = pool_next
            pool_next += 1
            clauses.append(guard + [-b, e])
            clauses.append(guard + [a, e])
            prev = e
    return clauses, pool_next


def _branch_generators(q: int, n: int, w: int) -> list[np.ndarray]:
    """Involutions of word indices generating isometries that fix 0 and u_w = 1^w 0^(n-w).

    Adjacent coordinate transpositions inside ``[0, w)`` and inside ``[w, n)``; adjacent
    symbol transpositions at each coordinate fixing 0 (and fixing 1 on ``[0, w)``); and the
    map ``s -> 1 - s (mod q)`` on ``[0, w)``, which swaps 0 and u_w (not a stabiliser element
    but it preserves the set {0, u_w}, so the branch formula is invariant under it).
    """
    words = _words(q, n).astype(np.int64)
    pw = ws.powers(q, n)
    gens = []
    for lo, hi in ((0, w), (w, n)):
        for j in range(lo, hi - 1):
            img = words.copy()
            img[:, [j, j + 1]] = img[:, [j + 1, j]]
            gens.append(img @ pw)
    for j in range(n):
        first = 2 if j < w else 1
        for a in range(first, q - 1):
            img = words.copy()
            col = img[:, j]
            img[:, j] = np.where(col == a, a + 1, np.where(col == a + 1, a, col))
            gens.append(img @ pw)
    if w > 0:
        img = words.copy()
        img[:, :w] = (1 - img[:, :w]) % q
        gens.append(img @ pw)
    return [g for g in gens if not np.array_equal(g, np.arange(g.size))]


def encode_base(q: int, n: int, d: int, symmetry: str = "lex",
                weight: int | None = None) -> Encoding:
    """Clauses of "pairwise distance >= d" plus the symmetry reductions (no cardinality).

    Parameters
    ----------
    q, n, d : int
        The cell.
    symmetry : {"none", "zero", "pair", "lex"}
        Reduction level (cumulative, see the module docstring).
    weight : int, optional
        Required for ``pair`` and ``lex``: the branch ``w`` in ``d..n``.

    Notes
    -----
    Validity of each reduction for "is there a code of size M >= 2 with distance >= d?":

    *zero*: for any codeword c, ``x -> x - c`` (coordinatewise mod q) is an isometry of the
    Hamming space, so every code has an isometric copy containing 0.

    *pair*: let ``w >= d`` be the minimum distance of a code C, reached by codewords c, c'.
    Translate by ``-c``; then ``c' - c`` has weight w. Permute coordinates to move its support
    to ``0..w-1`` and, at each of those coordinates, apply the symbol permutation swapping its
    nonzero symbol with 1 (it fixes 0): all isometries, so the image contains 0 and u_w and has
    minimum distance w. Hence C exists iff the branch formula (0, u_w in C, all distances >= w)
    is satisfiable for some w in ``d..n``; conversely a branch solution has distance >= w >= d.

    *lex*: let H be the group generated by :func:`_branch_generators` (isometries mapping
    {0, u_w} to itself). The branch formula is H-invariant, so the H-orbit of a solution
    consists of solutions, and its lexicographically largest member x satisfies
    ``x >=_lex g(x)`` for every g in H, in particular for each generator. Adding those
    constraints therefore keeps a solution whenever one exists.
    """
    if symmetry not in SYMMETRY:
        raise ParameterError(f"unknown symmetry level {symmetry!r}; choose from {SYMMETRY}")
    level = SYMMETRY.index(symmetry)
    N = q**n
    if N > MAX_SPACE:
        raise ParameterError(f"{q}^{n} = {N} words is too many for the SAT encoding "
                             f"(limit {MAX_SPACE})")
    reductions: list[str] = []
    dist = d
    if level >= 2:
        if weight is None or not d <= weight <= n:
            raise ParameterError(f"symmetry {symmetry!r} needs a branch weight in {d}..{n}")
        dist = weight
    if N * ws.ball_size(q, n, dist - 1) // 2 > MAX_CLAUSES:
        raise ParameterError(f"the SAT encoding of ({q},{n},{d}) would exceed "
                             f"{MAX_CLAUSES} clauses")
    pairs = _close_pairs(q, n, dist - 1) + 1
    clauses = (-pairs).tolist()
    nxt = N + 1
    if level >= 1:
        clauses.append([1])  # the zero word has index 0
        reductions.append("zero word in the code")
    if level >= 2:
        u = int(sum(q ** (n - 1 - j) for j in range(weight)))
        clauses.append([u + 1])
        reductions.append(f"minimum distance {weight} reached by 0 and 1^{weight}0^{n - weight}")
    if level >= 3:
        gens = _branch_generators(q, n, weight)
        for g in gens:
            cl, nxt = _lex_leader(g, nxt)
            clauses.extend(cl)
        reductions.append(f"lex-leader for {len(gens)} isometries fixing {{0, u_{weight}}}")
    return Encoding(clauses, nxt - 1, N, weight if level >= 2 else None, reductions)


def encode_card(M: int, space: int, top: int, encoding: str = DEFAULT_ENCODING
                ) -> tuple[list[list[int]], int]:
    """Clauses of ``sum_{v=1..space} x_v >= M`` with auxiliary variables above ``top``.

    Returns the clauses and the new top variable.
    """
    from pysat.card import CardEnc, EncType
    from pysat.formula import IDPool

    if encoding not in ENCODINGS:
        raise ParameterError(f"unknown cardinality encoding {encoding!r}; choose from "
                             f"{', '.join(ENCODINGS)}")
    if M > space:
        return [[]], top  # the empty clause: more words than the space holds
    pool = IDPool(start_from=top + 1)
    cnf = CardEnc.atleast(list(range(1, space + 1)), bound=M, vpool=pool,
                          encoding=getattr(EncType, encoding))
    return [list(c) for c in cnf.clauses], max(top, pool.top)


def encode(q: int, n: int, d: int, M: int, symmetry: str = "lex", weight: int | None = None,
           encoding: str = DEFAULT_ENCODING) -> Encoding:
    """The full formula "a code of >= M words with distance >= d" (one branch)."""
    enc = encode_base(q, n, d, symmetry, weight)
    card, top = encode_card(M, enc.space, enc.nvars, encoding)
    return Encoding(enc.clauses + card, top, enc.space, enc.weight, enc.reductions)


def _branches(params: Params, symmetry: str) -> list[int | None]:
    if SYMMETRY.index(symmetry) >= 2:
        return list(range(params.d, params.n + 1))
    return [None]


class _Branch:
    """One incremental solver for one branch of the reduced formula."""

    def __init__(self, params: Params, symmetry: str, weight: int | None, encoding: str,
                 solver: str, proof: bool) -> None:
        from pysat.solvers import Solver

        self.enc = encode_base(params.q, params.n, params.d, symmetry, weight)
        self.weight = weight
        self.top = self.enc.nvars
        self.encoding = encoding
        self.solver = Solver(name=solver, bootstrap_with=self.enc.clauses, with_proof=proof)
        self.refuted = False
        self.last_card: list[list[int]] = []

    def solve(self, M: int, guard: bool) -> bool:
        """Is "at least M words" satisfiable in this branch? (guarded: incremental use)."""
        card, self.top = encode_card(M, self.enc.space, self.top, self.encoding)
        assumptions = []
        if guard:
            self.top += 1
            act = self.top
            card = [c + [-act] for c in card]
            assumptions = [act]
        self.solver.append_formula(card)
        self.last_card = card
        answer = bool(self.solver.solve(assumptions=assumptions))
        if not answer:
            self.refuted = True
        return answer

    def code_indices(self) -> np.ndarray:
        model = np.array(self.solver.get_model()[: self.enc.space])
        return np.nonzero(model > 0)[0]

    def decisions(self) -> int:
        try:
            return int(self.solver.accum_stats().get("decisions", 0))
        except Exception:  # some solvers keep no statistics
            return 0

    def close(self) -> None:
        self.solver.delete()


def _write_proof(path: str, branch: _Branch, several: bool) -> list[str]:
    from pysat.formula import CNF

    stem = f"{path}.w{branch.weight}" if several else path
    cnf = CNF(from_clauses=branch.enc.clauses + branch.last_card)
    cnf.to_file(f"{stem}.cnf")
    lines = branch.solver.get_proof() or []
    with open(stem, "w", encoding="ascii") as fh:
        for line in lines:
            fh.write(line if line.endswith("\n") else line + "\n")
    return [f"{stem}.cnf", stem]


# The two solving procedures below report through ``emit`` (messages are tuples), so that they
# run either in this process or in a child process that is terminated at the deadline: the
# CaDiCaL bindings of python-sat ignore ``interrupt()``, a process boundary always works.

def _job_size(params: Params, M: int, symmetry: str, encoding: str, solver: str,
              proof: str | None, emit: Callable[[tuple], None]) -> None:
    """Decide "a code of >= M words" over all branches; emit sat / refuted messages."""
    weights = _branches(params, symmetry)
    for w in weights:
        br = _Branch(params, symmetry, w, encoding, solver, proof is not None)
        try:
            ans = br.solve(M, guard=False)
            emit(("decisions", br.decisions()))
            if ans:
                emit(("sat", M, br.code_indices()))
                return
            files = _write_proof(proof, br, len(weights) > 1) if proof is not None else []
            emit(("refuted", w, files))
        finally:
            br.close()
    emit(("unsat", M))


def _job_raise(params: Params, M: int, symmetry: str, encoding: str, solver: str,
               emit: Callable[[tuple], None]) -> None:
    """Raise M from the given value while satisfiable; emit each code, then the refutation."""
    branches = [_Branch(params, symmetry, w, encoding, solver, False)
                for w in _branches(params, symmetry)]
    try:
        while True:
            found = None
            for br in branches:
                if br.refuted:
                    continue
                if br.solve(M, guard=True):
                    found = br.code_indices()
                    break
            emit(("decisions", sum(b.decisions() for b in branches)))
            if found is None:
                emit(("unsat", M))
                return
            emit(("sat", M, found))
            M = int(found.size) + 1
    finally:
        for b in branches:
            b.close()


def _drive(job: Callable[..., None], args: tuple, deadline: float | None,
           on_message: Callable[[tuple], None]) -> bool:
    """Run ``job(*args, emit)``; returns False if the deadline stopped it first.

    Without a deadline the job runs here. With one it runs in a forked child whose messages
    arrive through a pipe; at the deadline the child (and only it) is terminated.
    """
    if deadline is None:
        job(*args, on_message)
        return True
    import multiprocessing as mp

    if mp.current_process().daemon:
        raise ParameterError(
            "SAT search with a time limit needs a child process, which a daemonic worker may "
            "not start: run Dask workers with DASK_DISTRIBUTED__WORKER__DAEMON=False")
    ctx = mp.get_context("fork")
    recv, send = ctx.Pipe(duplex=False)

    def child() -> None:
        try:
            job(*args, send.send)
            send.send(("end",))
        except BaseException as exc:  # report, never hang the parent
            send.send(("error", f"{type(exc).__name__}: {exc}"))
        finally:
            send.close()

    proc = ctx.Process(target=child, daemon=True)
    proc.start()
    send.close()
    finished = False
    try:
        while True:
            remaining = deadline - time.perf_counter()
            if remaining <= 0 or not recv.poll(remaining):
                break
            try:
                msg = recv.recv()
            except EOFError:
                break
            if msg[0] == "end":
                finished = True
                break
            if msg[0] == "error":
                raise RuntimeError(f"SAT worker failed: {msg[1]}")
            on_message(msg)
    finally:
        if proc.is_alive():
            proc.terminate()
        proc.join(5)
        if proc.is_alive():
            proc.kill()
            proc.join()
        recv.close()
    return finished


def solve_size(
    params: Params,
    M: int,
    *,
    symmetry: str = "lex",
    encoding: str = DEFAULT_ENCODING,
    solver: str = DEFAULT_SOLVER,
    deadline: float | None = None,
    proof: str | None = None,
) -> tuple[bool | None, np.ndarray | None, dict[str, Any]]:
    """Decide "a code of >= M words exists" for one cell (all branches).

    Returns
    -------
    (answer, indices, info)
        ``answer`` True (``indices`` = the code's word indices), False (refuted in every
        branch) or None (time out); ``info`` has the decisions, refuted branches and proof
        files.
    """
    info: dict[str, Any] = {"decisions": 0, "proof_files": [], "branches_refuted": []}
    state: dict[str, Any] = {"answer": None, "indices": None}

    def on_message(msg: tuple) -> None:
        if msg[0] == "decisions":
            info["decisions"] += msg[1]
        elif msg[0] == "sat":
            state["answer"], state["indices"] = True, msg[2]
        elif msg[0] == "refuted":
            info["branches_refuted"].append(msg[1])
            info["proof_files"] += msg[2]
        elif msg[0] == "unsat":
            state["answer"] = False

    _drive(_job_size, (params, M, symmetry, encoding, solver, proof), deadline, on_message)
    return state["answer"], state["indices"], info


def run(ctx: Context, *, proof: str | None = None, symmetry: str = "lex",
        encoding: str = DEFAULT_ENCODING, solver: str = DEFAULT_SOLVER) -> Outcome:
    """SAT search: answer one size question (option ``size``) or raise M until refuted.

    Parameters
    ----------
    ctx : Context
        The cell and clock; with a target size, ask only "is there a code of that many
        words?". Without one, start above the lexicode and raise M while satisfiable; a
        refutation then proves the best code optimal.
    proof : str, optional
        With a target: write the DIMACS formula and DRAT proof of each refuted branch to
        ``PROOF[.wW].cnf`` and ``PROOF[.wW]``; when every branch is refuted, also the
        manifest ``PROOF.json`` that binds them to the claim
        (:mod:`codesearch.proofbundle`; re-check with ``codesearch check PROOF.json``).
    symmetry : {"lex", "pair", "zero", "none"}
        Symmetry-breaking level.
    encoding : str
        Cardinality encoding (see :data:`ENCODINGS`).
    solver : str
        python-sat solver name.
    """
    if symmetry not in SYMMETRY:
        raise ParameterError(f"unknown symmetry level {symmetry!r}; choose from "
                             f"{', '.join(SYMMETRY)}")
    if encoding not in ENCODINGS:
        raise ParameterError(f"unknown cardinality encoding {encoding!r}; choose from "
                             f"{', '.join(ENCODINGS)}")
    if proof is not None and ctx.target is None:
        raise ParameterError("--proof needs --size: a proof refutes one size")
    _check_solver(solver, proof is not None)
    # fail early (here, not in a worker) on cells too large to encode
    encode_base_check(ctx.params)
    settings: dict[str, Any] = {"symmetry": symmetry, "encoding": encoding, "solver": solver,
                                "pysat": _pysat_version(), "reductions": _describe(symmetry)}
    if proof is not None:
        settings["proof_scope"] = ("the DRAT proofs refute the symmetry-reduced formula of "
                                   "each branch; validity for the cell rests on the "
                                   "reductions listed")
    if ctx.target is not None:
        answer, idx, info = solve_size(ctx.params, ctx.target, symmetry=symmetry,
                                       encoding=encoding, solver=solver,
                                       deadline=ctx.deadline, proof=proof)
        settings["proof_files"] = info["proof_files"]
        settings["branches_refuted"] = info["branches_refuted"]
        if answer is False and proof is not None:
            # every branch refuted: bind the proofs to the claim
            from codesearch import __version__

            p = ctx.params
            settings["proof_bundle"] = write_manifest(
                proof, p.q, p.n, p.d, ctx.target, symmetry, encoding, info["proof_files"],
                info["branches_refuted"],
                {"codesearch": __version__, "pysat": settings["pysat"], "solver": solver})
        return Outcome(ws.code_of_indices(idx, ctx.params) if answer else None,
                       ctx.target - 1 if answer is False else None, info["decisions"],
                       settings)
    return _raise_size(ctx, symmetry, encoding, solver, settings)


def _raise_size(ctx: Context, symmetry: str, encoding: str, solver: str,
                settings: dict[str, Any]) -> Outcome:
    """From the lexicode up: ask for one more word until a size is refuted or time is up."""
    from codesearch.search import greedy

    # start from the lexicode: its size is a free lower bound
    base, _, _ = greedy.greedy_indices(ctx.params, "lex", deadline=ctx.deadline)
    settings["start_size"] = int(base.size)
    state: dict[str, Any] = {"code": base, "upper": None, "decisions": 0, "history": []}

    def on_message(msg: tuple) -> None:
        if msg[0] == "decisions":
            state["decisions"] = msg[1]
        elif msg[0] == "sat":
            state["history"].append([msg[1], "sat"])
            state["code"] = msg[2]
            ctx.report(incumbent=int(msg[2].size), nodes=state["decisions"])
        elif msg[0] == "unsat":
            state["history"].append([msg[1], "unsat"])
            state["upper"] = msg[1] - 1

    _drive(_job_raise, (ctx.params, int(base.size) + 1, symmetry, encoding, solver),
           ctx.deadline, on_message)
    settings["history"] = state["history"]
    return Outcome(ws.code_of_indices(state["code"], ctx.params), state["upper"],
                   state["decisions"], settings)


def encode_base_check(params: Params) -> None:
    """Raise :class:`ParameterError` if the cell is too large for the SAT encoding."""
    N = params.space_size
    if N > MAX_SPACE:
        raise ParameterError(f"{params}: {N} words is too many for the SAT encoding "
                             f"(limit {MAX_SPACE})")
    if N * ws.ball_size(params.q, params.n, params.d - 1) // 2 > MAX_CLAUSES:
        raise ParameterError(f"{params}: the SAT encoding would exceed {MAX_CLAUSES} clauses")


def _describe(symmetry: str) -> list[str]:
    level = SYMMETRY.index(symmetry)
    names = ["zero word in the code", "branch on the minimum distance w: 0 and 1^w0^(n-w) "
             "in the code", "lex-leader constraints for isometries fixing {0, 1^w0^(n-w)}"]
    return names[:level]


def _check_solver(name: str, proof: bool) -> None:
    from pysat.solvers import SolverNames

    known = {alias for key, aliases in vars(SolverNames).items() if not key.startswith("_")
             for alias in aliases}
    if name not in known:
        raise ParameterError(f"unknown SAT solver {name!r}")
    if proof and not name.startswith(("cadical", "glucose", "lingeling", "maple")):
        raise ParameterError(f"solver {name!r} cannot write DRAT proofs here; use cadical195")


def _pysat_version() -> str:
    import pysat

    return str(getattr(pysat, "__version__", "unknown"))


# ------------------------------------------------------------------------------ manifest
def rests_on(symmetry: str) -> list[str]:
    """The statements a refutation at this symmetry level rests on."""
    level = SYMMETRY.index(symmetry)
    return ([REDUCTION_THEOREMS[k] for k in ("zero", "pair", "lex")[:level]]
            + [REDUCTION_THEOREMS["card"]])


def write_manifest(proof: str, q: int, n: int, d: int, size: int, symmetry: str,
                   cardinality: str, files: Sequence[str], weights: Sequence[int | None],
                   produced_by: Mapping[str, str]) -> str:
    """Write ``proof + ".json"`` for the refuted branches (``files`` alternates formula and
    proof paths, as the SAT search lists them). Returns the manifest's path."""
    path = proof + ".json"
    cell = f"A({n},{d})" if q == 2 else f"A_{q}({n},{d})"
    base = os.path.dirname(os.path.abspath(path))
    branches = []
    for w, cnf, prf in zip(weights, files[0::2], files[1::2]):
        for f in (cnf, prf):
            if os.path.dirname(os.path.abspath(f)) != base:
                raise InputError(f"{f}: proof files must sit next to the manifest {path}")
        branches.append({"weight": w, "formula": os.path.basename(cnf),
                         "formula_sha256": file_sha256(cnf), "proof": os.path.basename(prf),
                         "proof_sha256": file_sha256(prf)})
    manifest = {
        "format": MANIFEST_FORMAT,
        "claim": {"q": q, "n": n, "d": d, "size": size},
        "statement": f"no code of {size} words with minimum distance >= {d} in length {n} "
                     f"over {q} symbols, so {cell} <= {size - 1}",
        "encoding": {"symmetry": symmetry, "cardinality": cardinality},
        "branches": branches,
        "rests_on": rests_on(symmetry),
        "produced_by": dict(produced_by),
    }
    tmp = path + ".tmp"
    with open(tmp, "w", encoding="utf-8") as fh:
        json.dump(manifest, fh, indent=1)
        fh.write("\n")
    os.replace(tmp, path)
    return path
