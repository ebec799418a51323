"""Benchmark: fill the binary table n = 4..16, d = 3..8 with a budget per cell on 2 workers.

Runs the same table twice in one process, each into a fresh store: on a local process pool and
on a ``distributed.LocalCluster`` of the same size (2 worker processes, one thread each), and
prints for each the wall time, cells per minute, and how many cells reach the published values
of ``data/published_binary.csv`` (binary A(n,d) from MacWilliams-Sloane 1977 Appendix A and
Agrell-Vardy-Zeger 2001, written from memory). The overhead ratio is cluster / local wall time.
With ``--repeat R`` both runs are repeated R times (alternating) and medians are quoted.

Usage::

    PYTHONPATH=. python benchmarks/bench_table.py [--budget 10] [--workers 2] \
        [--n 4..16] [--d 3..8] [--methods auto] [--repeat 1] [--keep DIR]
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
from codesearch.report import collect
from codesearch.store import Store, read_published_file

DATA = pathlib.Path(__file__).resolve().parents[1] / "data" / "published_binary.csv"


def _range(text: str) -> range:
    a, _, b = text.partition("..")
    return range(int(a), int(b or a) + 1)


def _score(store_path: str) -> dict[str, int]:
    """Cells whose lower / upper / both reach the published values."""
    published = {(r.n, r.d): r for r in read_published_file(str(DATA))}
    lower = upper = both = exact = 0
    with Store(store_path) as st:
        for row in collect(st, 2):
            pub = published.get((row.n, row.d))
            if pub is None:
                continue
            lo_ok = (row.lower or 0) >= pub.lower
            up_ok = row.upper is not None and pub.upper is not None and row.upper <= pub.upper
            lower += lo_ok
            upper += up_ok
            both += lo_ok and up_ok
            exact += row.exact
    return {"lower_reached": lower, "upper_reached": upper, "both_reached": both,
            "exact_cells": exact}


def _one(kind: str, cells, args, workdir: str, rep: int) -> dict:
    store = os.path.join(workdir, f"{kind}-{rep}.sqlite")
    # Same scheduling policy on both executors (cells in flight per worker), so the ratio
    # measures the executor, not the policy.
    kwargs = dict(budget=args.budget, methods=args.methods, seed=args.seed,
                  per_worker=args.per_worker)
    t0 = time.perf_counter()
    if kind == "local":
        summary = run_table(store, cells, workers=args.workers, **kwargs)
    else:
        import dask
        from distributed import LocalCluster

        # Searches such as "auto" start processes of their own, which daemonic workers may not.
        with dask.config.set({"distributed.worker.daemon": False}), LocalCluster(n_workers=args.workers, threads_per_worker=1, processes=True,
                          host="127.0.0.1", dashboard_address=None) as cluster:
            t0 = time.perf_counter()  # cluster start-up is not part of the table run
            summary = run_table(store, cells, scheduler=cluster.scheduler_address, **kwargs)
    wall = time.perf_counter() - t0
    out = {"kind": kind, "rep": rep, "wall": wall, "cells_per_min": len(cells) / wall * 60,
           "ran": summary.ran, "skipped": summary.skipped, "failed": summary.failed,
           "errors": len(summary.errors), "first_errors": summary.errors[:3]}
    out.update(_score(store))
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--budget", type=float, default=10.0)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--n", type=_range, default=range(4, 17))
    ap.add_argument("--d", type=_range, default=range(3, 9))
    ap.add_argument("--methods", type=lambda s: s.split(","), default=None)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--repeat", type=int, default=1)
    ap.add_argument("--per-worker", type=int, default=1,
                    help="cells in flight per worker on both executors (default 1)")
    ap.add_argument("--keep", help="keep the stores in this directory")
    ap.add_argument("--only", choices=["local", "dask"], help="run one executor only")
    args = ap.parse_args()
    cells = table_cells(2, args.n, args.d)
    workdir = args.keep or tempfile.mkdtemp(prefix="bench-table-")
    os.makedirs(workdir, exist_ok=True)
    kinds = [args.only] if args.only else ["local", "dask"]
    print(f"codesearch {__version__} on {platform.node()} ({os.cpu_count()} CPUs): "
          f"{len(cells)} cells, budget {args.budget:g} s, {args.workers} workers, "
          f"methods {args.methods or 'default'}; published values: {DATA.name}")
    results = []
    for rep in range(args.repeat):
        order = kinds if rep % 2 == 0 else kinds[::-1]
        for kind in order:
            r = _one(kind, cells, args, workdir, rep)
            results.append(r)
            print(json.dumps({k: round(v, 2) if isinstance(v, float) else v
                              for k, v in r.items()}), flush=True)
    med = {k: statistics.median(r["wall"] for r in results if r["kind"] == k) for k in kinds}
    for k in kinds:
        last = [r for r in results if r["kind"] == k][-1]
        print(f"{k:6s} median wall {med[k]:7.1f} s  {len(cells) / med[k] * 60:6.1f} cells/min  "
              f"lower reached {last['lower_reached']}/{len(cells)}, upper reached "
              f"{last['upper_reached']}/{len(cells)}, both {last['both_reached']}, "
              f"exact {last['exact_cells']}")
    if len(kinds) == 2:
        print(f"overhead ratio LocalCluster / local pool (median wall): "
              f"{med['dask'] / med['local']:.3f}")
    print(f"stores in {workdir}")


if __name__ == "__main__":
    main()
