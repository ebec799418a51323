"""Benchmarks of the kernels' preparation and of the portfolio (method ``auto``).

Sections (choose with ``--section``; default all):

``fresh``   a fresh machine, simulated by an empty numba cache (``NUMBA_CACHE_DIR`` set to a
            new directory each repeat): wall and CPU seconds of ``codesearch prepare`` (the
            cold compile of every kernel), of ``codesearch find 8 3 --method auto --time 2``
            right after it (the "fresh install" of the issue: install, prepare, run), of the
            same command as the very first run (it compiles first, after a one-line notice),
            and of ``codesearch --version``. Medians over ``--repeat`` runs.
``peer``    the same first run on the main tree (the installed package, whose kernels compile
            inside the search budget), empty cache each repeat: the peer of ``fresh``.
``small``   cells whose space is small: auto against the exact search alone with the same
            budget (a peer measured in the same process), and against the previous portfolio
            (the ``auto`` of the installed main tree, run in a process of its own, kernels
            loaded first), size / proven upper bound / wall seconds.
``large``   cells n = 20..28: auto against the construction library alone
            (``constructions.best``) and against the lexicode, same process.

Published values quoted (from memory; the table of A(n,d) in MacWilliams & Sloane and the
tables that continue it): A(8,3) = 20, A(9,3) = 40, A(10,3) = 72, A(11,3) = 144,
A(9,4) = 20, A(10,4) = 40, A(11,4) = 72, A(10,5) = 12, A(12,5) = 32, A_3(5,3) = 18,
A_4(5,3) = 64; A(23,7) = 4096 and A(24,8) = 4096 (Golay codes, perfect / extended).

Run: ``PYTHONPATH=. python benchmarks/bench_portfolio.py --out benchmarks/results_portfolio.md``
(about 15 minutes on 2 loaded cores; the fresh section dominates).
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))

SMALL = [  # (q, n, d, published value)
    (2, 8, 3, 20), (2, 9, 4, 20), (2, 10, 5, 12), (3, 5, 3, 18), (2, 9, 3, 40),
    (2, 10, 3, 72), (2, 10, 4, 40), (2, 11, 4, 72), (2, 12, 5, 32), (4, 5, 3, 64),
]
LARGE = [  # (q, n, d)
    (2, 20, 5), (2, 20, 8), (2, 21, 7), (2, 22, 6), (2, 23, 7), (2, 24, 8), (2, 24, 10),
    (2, 25, 9), (2, 26, 10), (2, 27, 11), (2, 28, 10), (2, 28, 12),
]


def _run(argv: list[str], env: dict[str, str]) -> tuple[float, float, str, str]:
    """Wall and CPU seconds (children's user + sys) of one command, its stdout and stderr."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    proc = subprocess.run(argv, env=env, cwd=ROOT, capture_output=True, text=True, timeout=1800)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    if proc.returncode != 0:
        raise RuntimeError(f"{' '.join(argv)} failed: {proc.stderr.strip()[-400:]}")
    return wall, cpu, proc.stdout, proc.stderr


def _env(**extra: str) -> dict[str, str]:
    env = {**os.environ, "PYTHONPATH": ROOT, **extra}
    return env


def _median(xs: list[float]) -> float:
    return statistics.median(xs) if xs else float("nan")


def section_fresh(repeat: int) -> list[str]:
    cs = [sys.executable, "-m", "codesearch"]
    find = cs + ["find", "8", "3", "--method", "auto", "--time", "2", "--json"]
    rows: dict[str, list[tuple[float, float]]] = {}
    results = []
    for _ in range(repeat):
        # install + prepare + run
        cache = tempfile.mkdtemp(prefix="numba-cold-")
        try:
            env = _env(NUMBA_CACHE_DIR=cache)
            wall, cpu, out, _ = _run(cs + ["prepare", "--json"], env)
            rows.setdefault("prepare (cold compile, all kernels)", []).append((wall, cpu))
            kernels = json.loads(out)["kernels"]
            wall, cpu, out, _ = _run(find, env)
            rows.setdefault("find 8 3 auto 2 s, after prepare", []).append((wall, cpu))
            results.append(json.loads(out.splitlines()[-1]))
            wall, cpu, out, _ = _run(find, env)
            rows.setdefault("find 8 3 auto 2 s, again", []).append((wall, cpu))
        finally:
            shutil.rmtree(cache, ignore_errors=True)
        # first run on an empty cache: the notice, the compile, the search
        cache = tempfile.mkdtemp(prefix="numba-cold-")
        try:
            wall, cpu, out, err = _run(find, _env(NUMBA_CACHE_DIR=cache))
            rows.setdefault("find 8 3 auto 2 s, first run (compiles first)", []).append(
                (wall, cpu))
            results.append(json.loads(out.splitlines()[-1]))
            notice = [line for line in err.splitlines() if "compiling" in line]
        finally:
            shutil.rmtree(cache, ignore_errors=True)
        wall, cpu, _, _ = _run(cs + ["--version"], _env())
        rows.setdefault("codesearch --version", []).append((wall, cpu))
    lines = ["## Fresh machine (empty numba cache each repeat)", "",
             f"{repeat} repeats, medians; CPU = user + sys of the process. {kernels} public "
             "kernels. The machine is shared and loaded, so wall exceeds CPU.", "",
             "| command | wall s | CPU s |", "|---|---:|---:|"]
    for name, xs in rows.items():
        lines.append(f"| {name} | {_median([w for w, _ in xs]):.2f} | "
                     f"{_median([c for _, c in xs]):.2f} |")
    sizes = sorted({(r["size"], r["status"], r["seconds"]) for r in results})
    lines += ["", "Results of the find runs (size, status, search seconds): "
              + ", ".join(f"{s} {st} {sec:.2f} s" for s, st, sec in sizes),
              f"First-run notice: `{notice[0] if notice else '(none)'}`", ""]
    return lines


_MAIN_AUTO = r"""
import json, sys, time
from codesearch.model import Params
from codesearch.search import search
budget = float(sys.argv[1])
cells = json.loads(sys.argv[2])
# load the kernels first, as the previous portfolio had no preparation of its own
for m in ("exact", "lexicode", "greedy", "local", "orbit"):
    search(Params(2, 7, 3), m, time_limit=1, **({"group": "cyclic"} if m == "orbit" else {}))
out = []
for q, n, d in cells:
    t0 = time.perf_counter()
    r = search(Params(q, n, d), "auto", time_limit=budget)
    out.append([r.size, r.upper, r.status.value, time.perf_counter() - t0])
print(json.dumps(out))
"""


def _main_tree_auto(cells: list[tuple[int, int, int]], budget: float) -> list | None:
    """The installed tree's (main's) portfolio on the cells, or None if it is this tree."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    probe = subprocess.run([sys.executable, "-c", "import codesearch; print(codesearch.__file__)"],
                           env=env, cwd=tempfile.gettempdir(), capture_output=True, text=True)
    if probe.returncode != 0 or probe.stdout.strip().startswith(ROOT):
        return None
    proc = subprocess.run([sys.executable, "-c", _MAIN_AUTO, str(budget), json.dumps(cells)],
                          env=env, cwd=tempfile.gettempdir(), capture_output=True, text=True,
                          timeout=3600)
    if proc.returncode != 0:
        return None
    return json.loads(proc.stdout.splitlines()[-1])


def section_peer(repeat: int) -> list[str]:
    """The same fresh-machine command on the main tree (the installed package), empty cache."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    cwd = tempfile.gettempdir()
    probe = subprocess.run([sys.executable, "-c", "import codesearch; print(codesearch.__file__)"],
                           env=env, cwd=cwd, capture_output=True, text=True)
    where = probe.stdout.strip()
    if probe.returncode != 0 or where.startswith(ROOT):
        return ["## Peer: main tree on an empty cache", "", "not available (no other tree "
                "installed)", ""]
    walls, cpus, results = [], [], []
    for _ in range(repeat):
        cache = tempfile.mkdtemp(prefix="numba-cold-")
        try:
            before = resource.getrusage(resource.RUSAGE_CHILDREN)
            t0 = time.perf_counter()
            proc = subprocess.run([sys.executable, "-m", "codesearch", "find", "8", "3",
                                   "--method", "auto", "--time", "2", "--json"],
                                  env={**env, "NUMBA_CACHE_DIR": cache}, cwd=cwd,
                                  capture_output=True, text=True, timeout=1800)
            walls.append(time.perf_counter() - t0)
            after = resource.getrusage(resource.RUSAGE_CHILDREN)
            cpus.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
            last = json.loads(proc.stdout.splitlines()[-1])
            results.append(f"{last['size']} {last['status']} {last['seconds']:.2f} s")
        finally:
            shutil.rmtree(cache, ignore_errors=True)
    return ["## Peer: the main tree's `find 8 3 --method auto --time 2` on an empty cache", "",
            f"Package at `{os.path.dirname(where)}` (kernels compiled inside the search), "
            f"{repeat} repeats: median wall {_median(walls):.2f} s, CPU {_median(cpus):.2f} s; "
            f"results (size, status, search seconds): {', '.join(results)}.", ""]


def section_small(budget: float) -> list[str]:
    from codesearch.model import Params
    from codesearch.search import prepare_method, search

    prepare_method("auto")
    cells = [(q, n, d) for q, n, d, _ in SMALL]
    peer = _main_tree_auto(cells, budget)
    lines = [f"## Small spaces: auto against the exact search alone ({budget:g} s each)", "",
             "size / proven upper (`-`: none) / wall seconds of the call; `opt` marks a proof "
             "of optimality. Previous auto: the portfolio of the main tree (steps in a fixed "
             "order, exact after the heuristics), same budget, its own process with kernels "
             "loaded first.", "",
             "| cell | published | auto | exact alone | previous auto |",
             "|---|---:|---|---|---|"]
    for i, (q, n, d, known) in enumerate(SMALL):
        p = Params(q, n, d)
        row = []
        for method in ("auto", "exact"):
            t0 = time.perf_counter()
            r = search(p, method, time_limit=budget)
            wall = time.perf_counter() - t0
            row.append(f"{r.size} / {r.upper if r.upper is not None else '-'} / {wall:.2f}"
                       + (" opt" if r.optimal else ""))
        if peer is not None:
            size, upper, status, wall = peer[i]
            row.append(f"{size} / {upper if upper is not None else '-'} / {wall:.2f}"
                       + (" opt" if status == "optimal" else ""))
        else:
            row.append("n/a")
        lines.append(f"| {p} | {known} | " + " | ".join(row) + " |")
    return lines + [""]


def section_large(budget: float) -> list[str]:
    from codesearch import constructions
    from codesearch.model import Params
    from codesearch.search import prepare_method, search

    prepare_method("auto")
    prepare_method("lexicode")
    constructions.candidates(Params(2, 20, 5))  # tabulate once, outside every timing
    lines = [f"## Large spaces: auto against the construction library alone ({budget:g} s)",
             "", "size and wall seconds. Constructions: `constructions.best` (largest "
             "construction built and verified, no budget). Lexicode: same budget. auto's "
             "`by`: the step that gave its code.", "",
             "| cell | auto | by | constructions | lexicode |", "|---|---|---|---|---|"]
    for q, n, d in LARGE:
        p = Params(q, n, d)
        t0 = time.perf_counter()
        r = search(p, "auto", time_limit=budget)
        auto_cell = f"{r.size} / {time.perf_counter() - t0:.2f}" + (" opt" if r.optimal else "")
        t0 = time.perf_counter()
        try:
            code, _prov = constructions.best(p)
            c_cell = f"{code.size} / {time.perf_counter() - t0:.2f}"
        except Exception as exc:  # no construction fits
            c_cell = f"none ({type(exc).__name__})"
        t0 = time.perf_counter()
        try:
            lx = search(p, "lexicode", time_limit=budget)
            l_cell = f"{lx.size} / {time.perf_counter() - t0:.2f}"
        except Exception as exc:
            l_cell = f"refused ({type(exc).__name__})"
        lines.append(f"| {p} | {auto_cell} | {r.settings.get('lower_method')} | {c_cell} | "
                     f"{l_cell} |")
    return lines + [""]


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--section", choices=["fresh", "peer", "small", "large", "all"],
                    default="all")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--budget", type=float, default=3.0, help="small section budget")
    ap.add_argument("--large-budget", type=float, default=5.0)
    ap.add_argument("--out", help="also write the Markdown here")
    args = ap.parse_args()
    lines = ["# Portfolio and kernel preparation benchmarks", "",
             f"Machine: {os.cpu_count()} cores, shared (other jobs running); "
             f"Python {sys.version.split()[0]}; `{' '.join(sys.argv)}`.", ""]
    if args.section in ("fresh", "all"):
        lines += section_fresh(args.repeat)
    if args.section in ("peer", "all"):
        lines += section_peer(args.repeat)
    if args.section in ("small", "all"):
        lines += section_small(args.budget)
    if args.section in ("large", "all"):
        lines += section_large(args.large_budget)
    text = "\n".join(lines) + "\n"
    print(text)
    if args.out:
        with open(args.out, "w") as fh:
            fh.write(text)
    return 0


if __name__ == "__main__":
    sys.exit(main())
