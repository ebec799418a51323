"""Benchmarks of the SAT search and the heuristics against peers measured in the same run.

Sections (choose with ``--section``; default all):

``heur``  size reached within a budget on the target cells of issue 5, for our lexicode,
          restarted random greedy and tabu local search, next to networkx's random greedy
          maximal independent set and its Boppana-Halldorsson approximation
          (``approximation.maximum_independent_set``) on the conflict graph (edges = pairs at
          distance < d), when that graph is small enough to build.
``sat``   seconds to find the A(8,3) = 20 and A(9,4) = 20 codes and to refute 9 words for
          A(6,3) and 17 for A(7,3): our encoding (symmetry breaking "lex") against plain
          python-sat (same solver, no symmetry breaking); medians over ``--repeat`` runs and
          their ratio.
``enc``   the cardinality encodings compared on the same four questions (medians).
``hard``  how far SAT gets on "A(8,3) <= 20" (refuting 21 words) within ``--hard`` seconds:
          which minimum-distance branches are refuted, with and without symmetry breaking.

Best-known values quoted as targets (published; MacWilliams & Sloane table of A(n,d) and the
Brouwer-style table summaries they cite, from memory): A(10,4) = 40, A(11,4) = 72,
A(12,4) = 144, A(12,3) = 256, A(11,5) = 24, A(12,5) = 32, A(13,5) = 64, A(15,5) = 256,
A(16,8) = 32, A(20,10) = 40, A(24,8) = 4096, A_4(5,3) = 64 (Singleton bound met by an MDS
code), A_3(6,3) = 38 (from memory; the sphere-packing bound 729 / 13 gives <= 56).

Run: ``PYTHONPATH=. python benchmarks/bench_find.py --section heur --budget 60``.
"""

from __future__ import annotations

import argparse
import multiprocessing as mp
import statistics
import sys
import time

import numpy as np

from codesearch import verify
from codesearch.model import Code, Params
from codesearch.search import search
from codesearch.search import _wordspace as ws

TARGETS = [  # (q, n, d, best known, source)
    (2, 10, 4, 40, "published, from memory"),
    (2, 11, 4, 72, "published, from memory"),
    (2, 12, 4, 144, "published, from memory"),
    (2, 12, 3, 256, "published, from memory"),
    (2, 11, 5, 24, "published, from memory"),
    (2, 12, 5, 32, "published, from memory"),
    (2, 13, 5, 64, "published, from memory"),
    (2, 15, 5, 256, "published, from memory"),
    (2, 16, 8, 32, "Reed-Muller RM(1,4); Plotkin bound"),
    (2, 20, 10, 40, "Hadamard matrix of order 20; Plotkin bound"),
    (2, 24, 8, 4096, "extended Golay code"),
    (4, 5, 3, 64, "MDS, Singleton bound"),
    (3, 6, 3, 38, "from memory; sphere packing <= 56"),
]

#: Largest conflict graph handed to networkx (edges).
NX_MAX_EDGES = 2_000_000


def _conflict_graph(q: int, n: int, d: int):
    import networkx as nx

    from codesearch.search.sat import _close_pairs

    g = nx.Graph()
    g.add_nodes_from(range(q**n))
    g.add_edges_from(_close_pairs(q, n, d - 1).tolist())
    return g


def _nx_job(kind: str, q: int, n: int, d: int, seed: int, conn) -> None:
    import networkx as nx

    sys.setrecursionlimit(100_000)  # the approximation recurses once per vertex removed
    t = time.perf_counter()
    g = _conflict_graph(q, n, d)
    if kind == "nx-greedy-mis":
        best = []
        rng = np.random.default_rng(seed)
        # restarted random greedy maximal independent sets, for the caller's budget
        while True:
            s = nx.maximal_independent_set(g, seed=int(rng.integers(2**31)))
            if len(s) > len(best):
                best = s
                conn.send((sorted(best), time.perf_counter() - t))
    else:
        s = nx.approximation.maximum_independent_set(g)
        conn.send((sorted(s), time.perf_counter() - t))
    conn.send(None)


def run_nx(kind: str, q: int, n: int, d: int, budget: float, seed: int = 1):
    """Best independent set of the conflict graph a networkx routine returns within budget."""
    edges = q**n * (ws.ball_size(q, n, d - 1) - 1) // 2
    if edges > NX_MAX_EDGES:
        return None, f"graph too large ({edges} edges)"
    ctx = mp.get_context("fork")
    recv, send = ctx.Pipe(duplex=False)
    proc = ctx.Process(target=_nx_job, args=(kind, q, n, d, seed, send), daemon=True)
    proc.start()
    best, note = None, "timeout"
    deadline = time.perf_counter() + budget
    while True:
        left = deadline - time.perf_counter()
        if left <= 0 or not recv.poll(left):
            break
        try:
            msg = recv.recv()
        except EOFError:  # the routine failed (e.g. recursion depth on a large graph)
            note = "failed"
            break
        if msg is None:
            note = "done"
            break
        best = msg
    if proc.is_alive():
        proc.terminate()
    proc.join()
    if best is None:
        return None, note
    code = Code(ws.indices_to_words(np.array(best[0], dtype=np.int64), q, n), q)
    verify.assert_code(code, Params(q, n, d))
    return code.size, f"{note}, best at {best[1]:.1f}s"


def section_heur(budget: float, seed: int) -> None:
    print(f"\n== heuristics: size reached within {budget:.0f} s (seed {seed}) ==")
    head = ("cell", "target", "lexicode", "greedy", "local", "t_local", "nx-greedy", "nx-approx")
    print("{:<10} {:>6} {:>8} {:>7} {:>6} {:>8}  {:>9}  {}".format(*head))
    for q, n, d, best, source in TARGETS:
        p = Params(q, n, d)
        row = [str(p), str(best)]
        try:
            r = search(p, "lexicode", time_limit=budget)
            row.append(f"{r.size}")
        except Exception:  # too large to mark: say so
            row.append("n/a")
        try:
            r = search(p, "greedy", order="random", time_limit=budget / 4, seed=seed)
            row.append(f"{r.size}")
        except Exception:
            row.append("n/a")
        try:
            r = search(p, "local", time_limit=budget, seed=seed, size=best)
            row += [f"{r.size}", f"{r.seconds:.1f}"]
        except Exception:
            row += ["n/a", "-"]
        for kind in ("nx-greedy-mis", "nx-approx-mis"):
            size, note = run_nx(kind, q, n, d, budget, seed)
            row.append(f"{size}" if size is not None else f"- ({note})")
        print("{:<10} {:>6} {:>8} {:>7} {:>6} {:>8}  {:>9}  {}".format(*row), flush=True)


SAT_QUESTIONS = [((2, 8, 3), 20), ((2, 9, 4), 20), ((2, 6, 3), 9), ((2, 7, 3), 17)]


def _time_sat(p: Params, size: int, repeat: int, **opts) -> tuple[float, str]:
    times, answer = [], None
    for _ in range(repeat):
        t = time.perf_counter()
        r = search(p, "sat", size=size, time_limit=120, **opts)
        times.append(time.perf_counter() - t)
        answer = {True: "found", False: "refuted", None: "unknown"}[r.exists]
    return statistics.median(times), answer


def section_sat(repeat: int) -> None:
    print(f"\n== SAT: seconds (median of {repeat}), ours (lex symmetry breaking) vs plain "
          "python-sat ==")
    print(f"{'question':<18} {'answer':>8} {'ours':>8} {'plain':>8} {'plain/ours':>10}")
    for (q, n, d), size in SAT_QUESTIONS:
        p = Params(q, n, d)
        ours, ans = _time_sat(p, size, repeat, symmetry="lex")
        plain, ans2 = _time_sat(p, size, repeat, symmetry="none")
        print(f"{str(p) + ' M=' + str(size):<18} {ans:>8} {ours:8.2f} {plain:8.2f} "
              f"{plain / ours:10.2f}", flush=True)


def section_enc(repeat: int) -> None:
    from codesearch.search.sat import ENCODINGS

    print(f"\n== cardinality encodings: seconds (median of {repeat}), symmetry 'lex' ==")
    print(f"{'encoding':<12} " + " ".join(f"{f'{n},{d} M={m}':>12}" for (_, n, d), m in
                                         SAT_QUESTIONS) + f" {'total':>8}")
    for enc in ENCODINGS:
        cells = [_time_sat(Params(*c), m, repeat, encoding=enc)[0] for c, m in SAT_QUESTIONS]
        print(f"{enc:<12} " + " ".join(f"{t:12.2f}" for t in cells) + f" {sum(cells):8.2f}",
              flush=True)


def section_hard(seconds: float) -> None:
    from codesearch.search import sat

    print(f"\n== SAT on A(8,3) <= 20 (refute 21 words), {seconds:.0f} s per branch ==")
    p = Params(2, 8, 3)
    for symmetry in ("lex", "none"):
        for w in (range(3, 9) if symmetry == "lex" else [None]):
            t = time.perf_counter()
            deadline = t + seconds
            state = {"answer": "timeout"}

            def on(msg, state=state):
                if msg[0] in ("unsat", "refuted"):
                    state["answer"] = "refuted"
                elif msg[0] == "sat":
                    state["answer"] = "sat"

            def job(params, M, sym, weight, emit):
                br = sat._Branch(params, sym, weight, sat.DEFAULT_ENCODING, sat.DEFAULT_SOLVER,
                                 False)
                emit(("unsat", M) if not br.solve(M, guard=False) else ("sat", M, None))

            sat._drive(job, (p, 21, symmetry, w), deadline, on)
            label = f"branch w={w}" if w is not None else "plain"
            print(f"{symmetry:<5} {label:<12} {state['answer']:<8} "
                  f"{time.perf_counter() - t:8.1f} s", flush=True)
    # the exact max-clique search on the same cell, same run, twice the per-branch budget
    try:
        t = time.perf_counter()
        r = search(p, "exact", time_limit=2 * seconds)
        print(f"exact search: size {r.size}, upper {r.upper}, {r.status.value}, "
              f"{time.perf_counter() - t:.1f} s, {r.nodes} nodes", flush=True)
    except Exception as exc:  # the exact method may be absent in a partial checkout
        print(f"exact search unavailable: {exc}")


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--section", choices=["heur", "sat", "enc", "hard", "all"], default="all")
    ap.add_argument("--budget", type=float, default=60.0, help="seconds per heuristic run")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--hard", type=float, default=120.0, help="seconds per A(8,3) branch")
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args(argv)
    print(f"python {sys.version.split()[0]}; numpy {np.__version__}")
    if args.section in ("sat", "all"):
        section_sat(args.repeat)
    if args.section in ("enc", "all"):
        section_enc(args.repeat)
    if args.section in ("hard", "all"):
        section_hard(args.hard)
    if args.section in ("heur", "all"):
        section_heur(args.budget, args.seed)
    return 0


if __name__ == "__main__":
    sys.exit(main())
