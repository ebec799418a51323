"""Benchmark: table runs at research scale (budgets that hold, reached published values).

Fills a grid into a fresh store per run and prints, for each run, one JSON line with:

* the wall time of the table against the planning figure
  ``1.3 x (cells run x budget / workers) + 60 s``, and the machine load (1-minute load
  average from ``os.getloadavg``) before and after;
* the slowest cells from the store's cell log (the worker's wall time per cell and the
  seconds of each stage), the cells over ``budget + 2 s``, and the one-time warm-up of the
  worker processes (outside the cells' clocks);
* how many cells reach the published lower and upper values: binary values from
  ``data/published_binary.csv`` (sources in the file), q-ary from ``data/published_qary.csv``
  plus the q-ary Hamming cells A_q((q^r-1)/(q-1), 3) = q^(n-r) (perfect codes meet the
  sphere-packing bound; MacWilliams-Sloane 1977 Ch. 6), with the cells still short listed;
  for binary grids, the Plotkin-range cells (2d > n) apart.

``--executor both`` runs the same grid on the local pool and on a ``distributed.LocalCluster``
of the same number of worker processes (one thread each) and prints the ratio of the median
wall times (cluster / local). ``--repeat R`` alternates the executors R times.

Usage::

    PYTHONPATH=. python benchmarks/bench_table.py --q 2 --n 4..28 --d 3..10 --budget 10 \
        [--workers 2] [--executor local|dask|both] [--repeat 1] [--keep DIR]
    PYTHONPATH=. python benchmarks/bench_table.py --q 3 --n 3..12 --d 3..12 --budget 10
    PYTHONPATH=. /usr/bin/time -v python benchmarks/bench_table.py --big-cell 29   # 2^24 words
"""

from __future__ import annotations

import argparse
import json
import os
import pathlib
import platform
import statistics
import tempfile
import time

from codesearch import __version__
from codesearch.batch import run_table, table_cells
from codesearch.model import Params
from codesearch.store import Store, read_published_file

DATA = pathlib.Path(__file__).resolve().parents[1] / "data"


def _range(text: str) -> range:
    a, _, b = text.partition("..")
    return range(int(a), int(b or a) + 1)


def _load() -> float:
    return round(os.getloadavg()[0], 2)


def _published(q: int) -> dict[Params, tuple[int | None, int | None, str]]:
    """Published (lower, upper, source) per cell of alphabet q."""
    path = DATA / ("published_binary.csv" if q == 2 else "published_qary.csv")
    out = {Params(r.q, r.n, r.d): (r.lower, r.upper, r.source)
           for r in read_published_file(str(path)) if r.q == q}
    if q > 2:
        r = 2
        while (q**r - 1) // (q - 1) <= 40:
            n = (q**r - 1) // (q - 1)
            # perfect Hamming codes meet the sphere-packing bound (MacWilliams-Sloane Ch. 6)
            out.setdefault(Params(q, n, 3), (q ** (n - r), q ** (n - r),
                                             "Hamming code, perfect (MacWilliams-Sloane Ch. 6)"))
            r += 1
    return out


def _kind(source: str) -> str:
    s = source.lower()
    for word in ("hamming", "golay", "mds", "hexacode", "repetition"):
        if word in s:
            return "MDS" if word in ("mds", "hexacode") else word.capitalize()
    return "other"


def _score(store_path: str, cells: list[Params]) -> dict:
    """Reached counts against the published values, cells still short, Plotkin range."""
    q = cells[0].q
    pub = _published(q)
    reached_lo = reached_up = with_pub = 0
    short: list[str] = []
    plotkin = plotkin_short = 0
    by_kind: dict[str, list[int]] = {}
    with Store(store_path) as st:
        for p in cells:
            if p not in pub:
                continue
            lo, up, source = pub[p]
            s = st.summary(p)
            with_pub += 1
            ok_lo = lo is None or s.lower >= lo
            ok_up = up is None or (s.upper is not None and s.upper <= up)
            reached_lo += ok_lo
            reached_up += ok_up
            if not ok_lo:
                short.append(f"A_{q}({p.n},{p.d}) {s.lower} < {lo}")
            if q == 2 and 2 * p.d > p.n:
                plotkin += 1
                plotkin_short += not ok_lo
            if q > 2:
                k = by_kind.setdefault(_kind(source), [0, 0])
                k[0] += 1
                k[1] += ok_lo
    out = {"published_cells": with_pub, "lower_reached": reached_lo,
           "upper_reached": reached_up,
           "lower_reached_pct": round(100 * reached_lo / max(1, with_pub), 1),
           "short": short}
    if q == 2:
        out.update(plotkin_cells=plotkin, plotkin_short=plotkin_short)
    else:
        out["by_kind"] = {k: f"{v[1]}/{v[0]}" for k, v in sorted(by_kind.items())}
    return out


def _timings(store_path: str, budget: float) -> dict:
    with Store(store_path) as st:
        log = st.cell_log()
    secs = sorted(((r["seconds"], f"A_{r['q']}({r['n']},{r['d']})", r["stages"]) for r in log),
                  key=lambda t: -t[0])
    warm = [r["stages"].get("warm-up", 0.0) for r in log if "warm-up" in r["stages"]]
    over = [(round(s, 2), c, {k: v for k, v in st.items() if v > 0.5})
            for s, c, st in secs if s > budget + 2]
    return {"cells_logged": len(log),
            "median_cell_seconds": round(statistics.median(s for s, _, _ in secs), 2) if secs else None,
            "slowest": [(round(s, 2), c, {k: v for k, v in st.items() if v > 0.2})
                        for s, c, st in secs[:8]],
            "over_budget_plus_2": len(over), "over": over[:12],
            "warm_up": [round(w, 2) for w in warm],
            "store_seconds": round(sum(r["stages"].get("store", 0.0) for r in log), 2),
            "propagate_seconds": round(sum(r["stages"].get("propagate", 0.0) for r in log), 2)}


def _one(kind: str, cells: list[Params], args, workdir: str, rep: int) -> dict:
    store = os.path.join(workdir, f"q{cells[0].q}-{kind}-{rep}.sqlite")
    kwargs = dict(budget=args.budget, methods=args.methods, seed=args.seed,
                  per_worker=args.per_worker)
    load0 = _load()
    if kind == "local":
        t0 = time.perf_counter()
        summary = run_table(store, cells, workers=args.workers, **kwargs)
        wall = time.perf_counter() - t0
    else:
        import dask
        from distributed import LocalCluster

        # Searches such as "auto" start processes of their own, which daemonic workers may not.
        with dask.config.set({"distributed.worker.daemon": False}), \
                LocalCluster(n_workers=args.workers, threads_per_worker=1, processes=True,
                             host="127.0.0.1", dashboard_address=None) as cluster:
            t0 = time.perf_counter()  # cluster start-up is not part of the table run
            summary = run_table(store, cells, scheduler=cluster.scheduler_address, **kwargs)
            wall = time.perf_counter() - t0
    plan = 1.3 * (summary.ran * args.budget / args.workers) + 60
    out = {"kind": kind, "rep": rep, "q": cells[0].q, "cells": len(cells), "ran": summary.ran,
           "skipped": summary.skipped, "failed": summary.failed, "wall": round(wall, 1),
           "plan": round(plan, 1), "wall_over_plan": round(wall / plan, 3),
           "load_before": load0, "load_after": _load(), "errors": summary.errors[:3]}
    out.update(_timings(store, args.budget))
    out.update(_score(store, cells))
    return out


def big_cell(n: int, workdir: str) -> None:
    """One 2^(n-5)-word cell, the worst case a table meets at d = 3: the shortened Hamming
    code [n, n-5, 3] (MacWilliams-Sloane Ch. 1) listed as explicit words, as a search would
    return it; then the same words minus one (no longer linear). Each is checked, shipped as
    a worker would (pickled :class:`CellCode`), stored and read back; times and the peak
    resident memory of this process (``resource.getrusage``) are printed. Run it under
    ``/usr/bin/time -v`` for the external figure."""
    import pickle
    import resource

    import numpy as np

    from codesearch import verify
    from codesearch.batch import CellCode, compact
    from codesearch.model import Code, LinearCode

    def rss() -> float:
        return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024

    k = n - 5
    cols = [c for c in range(1, 32) if c & (c - 1)][:k]
    gen = np.zeros((k, n), dtype=np.uint8)
    for i, c in enumerate(cols):
        gen[i, i] = 1
        gen[i, k:] = [(c >> b) & 1 for b in range(5)]
    p = Params(2, n, 3)
    out = {"n": n, "words": 2**k, "load": _load()}
    t = time.perf_counter()
    code = LinearCode(gen, 2).words(1 << 30)
    out["list_s"] = round(time.perf_counter() - t, 2)
    out["rss_listed_MiB"] = round(rss())
    for label, c in (("linear", code), ("nonlinear", Code(code.words[1:], 2))):
        t = time.perf_counter()
        verify.assert_code(c, p)
        out[f"{label}_check_s"] = round(time.perf_counter() - t, 2)
        out[f"{label}_check_method"] = verify.check_cost(c, 3)[0]
        t = time.perf_counter()
        shipped = pickle.dumps(CellCode(compact(c), "bench", "feasible"))
        out[f"{label}_ship_bytes"] = len(shipped)
        back = pickle.loads(shipped)
        out[f"{label}_ship_s"] = round(time.perf_counter() - t, 2)
        path = os.path.join(workdir, f"big-{label}.sqlite")
        with Store(path) as st:
            t = time.perf_counter()
            cid = st.add_code(back.code, p, method="bench")
            out[f"{label}_store_s"] = round(time.perf_counter() - t, 2)
            t = time.perf_counter()
            st.get_stored(cid)
            out[f"{label}_reload_s"] = round(time.perf_counter() - t, 2)
            out[f"{label}_form"] = st.rows("codes")[0][-1]
        out[f"rss_after_{label}_MiB"] = round(rss())
    print(json.dumps(out), flush=True)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--big-cell", type=int, metavar="N",
                    help="only measure one 2^(N-5)-word cell (see big_cell) and exit")
    ap.add_argument("--q", type=int, default=2)
    ap.add_argument("--n", type=_range, default=range(4, 29))
    ap.add_argument("--d", type=_range, default=range(3, 11))
    ap.add_argument("--budget", type=float, default=10.0)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--methods", type=lambda s: s.split(","), default=None)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--repeat", type=int, default=1)
    ap.add_argument("--per-worker", type=int, default=1,
                    help="cells in flight per worker on both executors (default 1)")
    ap.add_argument("--executor", choices=["local", "dask", "both"], default="local")
    ap.add_argument("--keep", help="keep the stores in this directory")
    args = ap.parse_args()
    cells = table_cells(args.q, args.n, args.d)
    workdir = args.keep or tempfile.mkdtemp(prefix="bench-table-")
    os.makedirs(workdir, exist_ok=True)
    if args.big_cell:
        big_cell(args.big_cell, workdir)
        return
    kinds = ["local", "dask"] if args.executor == "both" else [args.executor]
    print(f"codesearch {__version__} on {platform.node()} ({os.cpu_count()} CPUs): q={args.q}, "
          f"{len(cells)} cells, budget {args.budget:g} s, {args.workers} workers, "
          f"methods {args.methods or 'default'}", flush=True)
    results = []
    for rep in range(args.repeat):
        for kind in (kinds if rep % 2 == 0 else kinds[::-1]):
            r = _one(kind, cells, args, workdir, rep)
            results.append(r)
            print(json.dumps(r), flush=True)
    med = {k: statistics.median(r["wall"] for r in results if r["kind"] == k) for k in kinds}
    for k in kinds:
        last = [r for r in results if r["kind"] == k][-1]
        print(f"{k}: median wall {med[k]:.1f} s (plan {last['plan']:.1f} s); lower reached "
              f"{last['lower_reached']}/{last['published_cells']}, upper reached "
              f"{last['upper_reached']}/{last['published_cells']}; cells over budget + 2 s: "
              f"{last['over_budget_plus_2']}")
    if len(kinds) == 2:
        print(f"LocalCluster / local pool (median wall): {med['dask'] / med['local']:.3f}")
    print(f"stores in {workdir}")


if __name__ == "__main__":
    main()
