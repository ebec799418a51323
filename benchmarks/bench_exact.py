"""Side by side: proving A_q(n,d) with ``codesearch find --method exact`` and with general tools.

Every run is a fresh subprocess timed by wall clock from launch to exit, so interpreter
start-up, imports and graph construction are counted for every tool. Tools:

ours        ``python -m codesearch find N D --q Q --json`` (symmetry-reduced exact search)
ours-plain  the same engine on the full code graph, no reductions (``reduce=False``)
igraph      ``Graph.clique_number()`` (Cliquer) on the full code graph of all q^n words
igraph-0    the same with the zero word fixed, the reduction a researcher applies first with a
            general tool (common practice: Hamming space is transitive, so some optimal code
            holds the zero word): the graph of the words at distance >= d from zero, plus one
networkx    ``max_weight_clique(G, weight=None)`` on the full code graph
sat         python-sat, CaDiCaL: one variable per word, a clause per pair at distance < d,
            "at least k" as a totalizer (CardEnc); k raised past each model found until UNSAT

Two times per run: ``wall`` from launch to exit, and ``solve`` after the tool's library and
its machine code are loaded (igraph's C library loads with ``import igraph``; ours loads its
numba kernels from the cache through ``codesearch.search.exact.load_kernels()``, reported as
``load``). ``solve`` includes graph construction, search and (for ours) verification.

Each tool gets the same time limit (default 120 s). Instances that finish are repeated
(``--repeat``, default 3) and the median is quoted; ratios are medians measured in this run.
Usage: ``python benchmarks/bench_exact.py [--limit 120] [--repeat 3] [--cells 2-8-3,3-5-3]``.
Long stretch runs (not CI): ``--stretch 3600`` attempts A(10,4) = 40 and A(10,3) = 72 with the
exact method alone (no outside bound) and reports the code size and the bound proved.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)

# (q, n, d, A_q(n,d)): published values, see tests/test_exact_search.py for sources.
CELLS = [
    (2, 6, 3, 8), (2, 7, 3, 16), (2, 8, 3, 20), (2, 8, 4, 16), (2, 9, 4, 20), (2, 8, 5, 4),
    (2, 9, 5, 6), (2, 10, 5, 12), (2, 10, 6, 6), (2, 11, 6, 12), (3, 4, 3, 9), (3, 5, 3, 18),
    (3, 6, 4, 18),
]
TOOLS = ["ours", "ours-plain", "igraph", "igraph-0", "networkx", "sat"]


# ----------------------------------------------------------------------------- one run
def _code_graph_edges(q: int, n: int, d: int, zero_fixed: bool = False):
    import numpy as np

    idx = np.arange(q**n)
    words = np.stack([(idx // q ** (n - 1 - i)) % q for i in range(n)], axis=1).astype(np.uint8)
    if zero_fixed:
        words = words[(words != 0).sum(axis=1) >= d]
    dist = (words[:, None, :] != words[None, :, :]).sum(axis=2)
    iu, ju = np.nonzero(np.triu(dist >= d, 1))
    close_i, close_j = np.nonzero(np.triu(dist < d, 1))
    return len(words), list(zip(iu.tolist(), ju.tolist())), list(zip(close_i.tolist(),
                                                                     close_j.tolist()))


def run_one(tool: str, q: int, n: int, d: int) -> dict:
    """Body of a child process: solve the cell with one tool, return its claim.

    ``solve`` is the time after the tool's library and its machine code are loaded: graph
    construction and the search itself (for ours: building code graphs, searching and
    verifying the code; loading the cached numba kernels is timed apart as ``load``).
    """
    if tool in ("ours", "ours-plain"):
        import codesearch._kernels  # noqa: F401  (library import, like `import igraph`)
        from codesearch.model import Params
        from codesearch.search import search
        from codesearch.search.exact import load_kernels

        load = load_kernels()  # machine code from numba's cache, like a C extension loading
        t0 = time.perf_counter()
        # use_bounds=False: the search proves everything itself (no bound from the library).
        res = search(Params(q, n, d), "exact", reduce=(tool == "ours"), use_bounds=False)
        return {"value": res.size, "proved": res.optimal, "nodes": res.nodes,
                "solve": time.perf_counter() - t0, "load": load}
    if tool in ("igraph", "igraph-0"):
        import igraph

        t0 = time.perf_counter()
        zero = tool == "igraph-0"
        nverts, edges, close = _code_graph_edges(q, n, d, zero_fixed=zero)
        g = igraph.Graph(n=nverts, edges=edges)
        return {"value": int(g.clique_number()) + int(zero), "proved": True,
                "solve": time.perf_counter() - t0}
    if tool == "networkx":
        import networkx as nx

        t0 = time.perf_counter()
        nverts, edges, close = _code_graph_edges(q, n, d)
        g = nx.Graph()
        g.add_nodes_from(range(nverts))
        g.add_edges_from(edges)
        clique, _ = nx.max_weight_clique(g, weight=None)
        return {"value": len(clique), "proved": True, "solve": time.perf_counter() - t0}
    if tool == "sat":
        from pysat.card import CardEnc, EncType
        from pysat.formula import IDPool
        from pysat.solvers import Solver

        t0 = time.perf_counter()
        nverts, edges, close = _code_graph_edges(q, n, d)
        best = 1
        while True:
            k = best + 1
            pool = IDPool(start_from=nverts + 1)
            card = CardEnc.atleast(list(range(1, nverts + 1)), bound=k, vpool=pool,
                                   encoding=EncType.totalizer)
            with Solver(name="cadical153", bootstrap_with=card.clauses) as s:
                for i, j in close:
                    s.add_clause([-(i + 1), -(j + 1)])
                if not s.solve():
                    return {"value": best, "proved": True, "solve": time.perf_counter() - t0}
                model = s.get_model()
                best = sum(1 for v in model[:nverts] if v > 0)
    raise SystemExit(f"unknown tool {tool}")


def timed(tool: str, cell: tuple[int, int, int], limit: float) -> dict:
    """Launch a child, wait up to ``limit`` seconds, return time and claim (or timeout)."""
    q, n, d = cell
    cmd = [sys.executable, os.path.abspath(__file__), "--one", tool, str(q), str(n), str(d)]
    env = dict(os.environ, PYTHONPATH=ROOT)
    t0 = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env,
                            text=True)
    try:
        out, err = proc.communicate(timeout=limit)
    except subprocess.TimeoutExpired:
        proc.kill()
        proc.communicate()
        return {"seconds": None, "timeout": True}
    secs = time.perf_counter() - t0
    if proc.returncode != 0:
        return {"seconds": secs, "timeout": False, "error": err.strip().splitlines()[-1:]}
    claim = json.loads(out.strip().splitlines()[-1])
    return {"seconds": secs, "timeout": False, **claim}


def random_graphs(repeat: int, limit: float) -> None:
    """Engine against igraph's clique_number on G(N, p), both in this process, graph already
    built (igraph from an edge list, ours from bitset rows); median of ``repeat`` runs (one
    igraph run when it takes over 10 s)."""
    import igraph
    import numpy as np

    from codesearch.search.clique import bitsets_from_dense, max_clique

    max_clique(bitsets_from_dense(np.ones((3, 3), bool) ^ np.eye(3, dtype=bool)))  # warm cache
    print(f"{'graph':<16}{'omega':>6}{'ours s':>10}{'igraph s':>10}{'ratio':>8}")
    ratios = []
    for n, p in ((200, 0.5), (300, 0.5), (150, 0.7), (100, 0.9), (120, 0.9), (100, 0.95)):
        rng = np.random.default_rng(n * 1000 + int(p * 100))
        upper = np.triu(rng.random((n, n)) < p, 1)
        a = upper | upper.T
        adj = bitsets_from_dense(a)
        g = igraph.Graph(n=n, edges=list(zip(*[x.tolist() for x in np.nonzero(upper)])))
        ours, theirs, omega = [], [], None
        for _ in range(repeat):
            t0 = time.perf_counter()
            res = max_clique(adj, time_limit=limit)
            ours.append(time.perf_counter() - t0)
            if not theirs or theirs[0] < 10:  # repeat the peer only when it is quick
                t0 = time.perf_counter()
                w = g.clique_number()
                theirs.append(time.perf_counter() - t0)
            assert res.optimal and res.size == w, (n, p, res.size, w)
            omega = w
        mo, mt = statistics.median(ours), statistics.median(theirs)
        ratios.append(mt / mo)
        print(f"G({n},{p})".ljust(16) + f"{omega:>6}{mo:>10.4f}{mt:>10.4f}{mt / mo:>8.1f}",
              flush=True)
    print(f"median ratio igraph/ours: {statistics.median(ratios):.1f}x")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--one", nargs=4, metavar=("TOOL", "Q", "N", "D"), help=argparse.SUPPRESS)
    ap.add_argument("--limit", type=float, default=120.0)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--cells", help="comma-separated q-n-d list (default: all)")
    ap.add_argument("--tools", default=",".join(TOOLS))
    ap.add_argument("--json", help="also write the raw results to this file")
    ap.add_argument("--random", action="store_true",
                    help="engine only: random graphs G(N, p), in-process solve times vs igraph")
    ap.add_argument("--stretch", type=float, metavar="SECONDS",
                    help="only run the stretch cells A(10,4), A(10,3) for this long each")
    args = ap.parse_args()
    if args.random:
        random_graphs(args.repeat, args.limit)
        return
    if args.stretch:
        from codesearch.model import Params
        from codesearch.search import search

        # A(10,4) = 40, A(10,3) = 72 (published; MacWilliams & Sloane Appendix A and
        # Ostergard-Baicheva-Kolev 1999, from memory).
        for q, n, d, value in ((2, 10, 4, 40), (2, 10, 3, 72)):
            res = search(Params(q, n, d), "exact", time_limit=args.stretch, use_bounds=False)
            print(f"A({n},{d}) = {value}: size {res.size}, upper {res.upper}, "
                  f"{res.status.value}, {res.seconds:.0f} s, {res.nodes} nodes", flush=True)
        return
    if args.one:
        tool, q, n, d = args.one[0], *map(int, args.one[1:])
        print(json.dumps(run_one(tool, q, n, d)))
        return
    cells = CELLS
    if args.cells:
        want = {tuple(map(int, c.split("-"))) for c in args.cells.split(",")}
        cells = [c for c in CELLS if c[:3] in want]
    tools = args.tools.split(",")
    # Warm the numba cache once so no run pays for compilation.
    timed("ours", (2, 6, 3), args.limit)
    raw = []
    loads: list[float] = []
    print(f"limit {args.limit:.0f} s per run, median of {args.repeat} for finished runs; "
          "each entry: wall seconds (launch to exit) / solve seconds (after library import)")
    header = f"{'cell':<10}{'value':>6}" + "".join(f"{t:>16}" for t in tools)
    print(header)
    for q, n, d, value in cells:
        row = {}
        for tool in tools:
            runs = [timed(tool, (q, n, d), args.limit)]
            if not runs[0]["timeout"] and "error" not in runs[0]:
                runs += [timed(tool, (q, n, d), args.limit) for _ in range(args.repeat - 1)]
            ok = [r for r in runs if not r["timeout"] and "error" not in r]
            if ok:
                med = statistics.median(r["seconds"] for r in ok)
                solve = statistics.median(r["solve"] for r in ok)
                if tool == "ours":
                    loads.append(statistics.median(r["load"] for r in ok))
                claim = ok[0]
                if claim["value"] != value or not claim["proved"]:
                    row[tool] = {"seconds": med, "solve": solve, "value": claim["value"],
                                 "wrong": True}
                else:
                    row[tool] = {"seconds": med, "solve": solve, "value": claim["value"]}
            else:
                row[tool] = {"seconds": None, "error": runs[0].get("error")}
            raw.append({"cell": [q, n, d], "tool": tool, "runs": runs})
        label = f"A_{q}({n},{d})" if q != 2 else f"A({n},{d})"
        cells_txt = []
        for tool in tools:
            r = row[tool]
            if r["seconds"] is None:
                cells_txt.append("error" if r.get("error") else "timeout")
            else:
                mark = "" if not r.get("wrong") else f" (={r['value']}?)"
                cells_txt.append(f"{r['seconds']:.2f}/{r['solve']:.4f}{mark}")
        print(f"{label:<10}{value:>6}" + "".join(f"{c:>16}" for c in cells_txt), flush=True)
        row["cell"] = (q, n, d)
        raw.append({"row": {k: v for k, v in row.items()}})
    if loads:
        print(f"ours: loading the cached kernels took {statistics.median(loads):.3f} s "
              f"(median over cells; counted in wall, not in solve)")
    # Ratio against each peer over cells both finished.
    for peer in [t for t in tools if t != "ours"]:
        for key, what in (("seconds", "wall, start-up included"), ("solve", "solve only")):
            ratios = []
            for item in raw:
                if "row" in item:
                    r = item["row"]
                    if r.get("ours", {}).get(key) and r.get(peer, {}).get(key):
                        ratios.append(r[peer][key] / r["ours"][key])
            if ratios:
                print(f"median speed ratio {peer}/ours over {len(ratios)} cells both finished "
                      f"({what}): {statistics.median(ratios):.1f}x")
    if args.json:
        with open(args.json, "w") as fh:
            json.dump(raw, fh, indent=1, default=str)


if __name__ == "__main__":
    main()
