"""Benchmark: every bound on the binary grid with certified LPs, next to a plain float HiGHS loop.

Run from the repository root::

    PYTHONPATH=$PWD python benchmarks/bench_bounds.py            # n = 1..128, 3 repeats
    PYTHONPATH=$PWD python benchmarks/bench_bounds.py --nmax 40 --repeat 5

What is measured, in the same process and run (every run starts cold: the LP caches, the
high-precision chains and the Krawtchouk tables are cleared first):

``certified, 1 core``
    ``codesearch.bounds.all_bounds(params)`` on every cell n = 1..nmax, d = 1..n in row order
    (Singleton, Hamming, Plotkin, Johnson, Elias, Griesmer, Delsarte LP and the LP with extra
    inequalities, each LP with an exact certificate re-checked by ``codesearch.verify``, the
    high-precision fallback included), plus GV.
``certified, 2 cores``
    The same cells on a pool of two processes (forked after every cache is emptied, so they
    inherit imports but no result), one task per LP length L: the cells (L, even d) and
    (L - 1, odd d), which share their LPs. Wall time includes starting the pool.
``float``
    The peer: the same Delsarte LPs (scaled dual; plain, and with the extra inequalities),
    one ``scipy.optimize.linprog(method="highs")`` call each per cell, floored; no
    certificate.

Printed: median wall time of each over the repeats and their ratios; the number of cells whose
LP is left uncertified (goal 0); how many cells the float loop gets wrong (no answer, or a
floor that differs from the certified value: "below" claims a bound no certificate backs);
and the cells where the LP beats every classical bound. Timings vary with machine load;
compare ratios measured in the same run.
"""

from __future__ import annotations

import argparse
import statistics
import time

import numpy as np

CLASSICAL = ("singleton", "hamming", "plotkin", "johnson", "elias")
LPS = ("delsarte-lp", "delsarte-lp-plus")


def _cold() -> None:
    from codesearch import verify
    from codesearch.bounds import delsarte

    delsarte.clear_caches()
    verify.lp._kraw_columns.cache_clear()


def _float_lp_value(n: int, d: int, plus: bool) -> float | None:
    """The same LP as the certified path (scaled, even distances, folded degrees), solved by
    ``scipy.optimize.linprog(method="highs")``, value taken as is. (The unscaled textbook
    primal is no usable peer beyond n ~ 40: HiGHS stalls on it, e.g. over 100 s on A(50,3).)
    """
    from scipy.optimize import linprog

    from codesearch.bounds.delsarte import _problem, lp_cell
    from codesearch.model import Params

    n2, d2, even = lp_cell(Params(2, n, d))
    rows, _, _, G = _problem(2, n2, d2, even, plus)
    res = linprog(np.ones(G.shape[1]), A_ub=G, b_ub=-np.ones(len(rows)), bounds=(0, None),
                  method="highs")
    return 1.0 + res.fun if res.status == 0 else None


def _cells(nmax: int) -> list[tuple[int, int]]:
    return [(n, d) for n in range(1, nmax + 1) for d in range(1, n + 1)]


def _summary(bounds: dict) -> dict:
    """Picklable essentials of one cell's ``all_bounds`` result."""
    out = {k: (b.value, b.certified, b.usable) for k, b in bounds.items()}
    return out


def _one_cell(n: int, d: int) -> dict:
    from codesearch.bounds import all_bounds, gv_lower_bound
    from codesearch.model import Params

    p = Params(2, n, d)
    s = _summary(all_bounds(p))
    gv_lower_bound(p)
    return s


def _lp_length_task(args: tuple[int, int]) -> dict:
    """Cells sharing LP length L, d ascending: (L, even d) and (L - 1, odd d)."""
    import os

    L, nmax = args
    c0 = time.process_time()
    out = {}
    for d in range(1, L + 1):
        if L <= nmax and d % 2 == 0:
            out[(L, d)] = _one_cell(L, d)
        if d % 2 == 1 and d <= L - 1 and L - 1 <= nmax:
            out[(L - 1, d)] = _one_cell(L - 1, d)
    return os.getpid(), time.process_time() - c0, out


def run_certified(nmax: int) -> tuple[tuple[float, float], dict]:
    _cold()
    out = {}
    t0, c0 = time.perf_counter(), time.process_time()
    for n, d in _cells(nmax):
        out[(n, d)] = _one_cell(n, d)
    return (time.perf_counter() - t0, time.process_time() - c0), out


def _children_cpu() -> float:
    import resource

    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def run_certified_pool(nmax: int, workers: int) -> tuple[tuple[float, float, float], dict]:
    """Wall time, total CPU of the workers, and CPU of the busiest worker (what the wall
    time would be on idle cores: the work is split by LP length, nothing is shared)."""
    import multiprocessing as mp

    # Forked workers inherit the imported modules (as the 1-core run has them after its
    # warm-up) but no result: every cache is emptied before the fork.
    _cold()
    c0 = _children_cpu()
    t0 = time.perf_counter()
    ctx = mp.get_context("fork")
    out = {}
    # Largest LP lengths first so the two workers finish together.
    tasks = [(L, nmax) for L in range(nmax + 1, 1, -1)]
    per_worker: dict[int, float] = {}
    with ctx.Pool(workers) as pool:
        for pid, cpu, part in pool.imap_unordered(_lp_length_task, tasks):
            out.update(part)
            per_worker[pid] = per_worker.get(pid, 0.0) + cpu
    return (time.perf_counter() - t0, _children_cpu() - c0, max(per_worker.values())), out


def run_float(nmax: int) -> tuple[tuple[float, float], dict]:
    _cold()
    out = {}
    tp = 0.0
    t0 = time.perf_counter()
    for n, d in _cells(nmax):
        a = time.perf_counter()
        plain = _float_lp_value(n, d, False)
        b = time.perf_counter()
        plus = _float_lp_value(n, d, True)
        tp += time.perf_counter() - b
        out[(n, d)] = (plain, plus)
    total = time.perf_counter() - t0
    return (total, total - tp), out


def _floor(f: float) -> int:
    return int(np.floor(f)) if abs(f) < 2**62 else int(f)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nmax", type=int, default=128)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--workers", type=int, default=2,
                    help="pool size of the parallel run (0 or 1: skip it)")
    ap.add_argument("--list-n", type=int, default=24, help="list LP-winning cells up to this n")
    args = ap.parse_args()

    # Warm-up outside the timings: imports, scipy/HiGHS start-up (caches are cleared after).
    run_certified(6)
    run_float(6)
    t_cert, t_pool, t_float = [], [], []
    for rep in range(args.repeat):
        t, bounds = run_certified(args.nmax)
        t_cert.append(t)
        print(f"  [repeat {rep + 1}] certified, 1 core: wall {t[0]:.2f} s (CPU {t[1]:.2f} s)",
              flush=True)
        if args.workers > 1:
            tp, pooled = run_certified_pool(args.nmax, args.workers)
            t_pool.append(tp)
            print(f"  [repeat {rep + 1}] certified, {args.workers} cores: wall {tp[0]:.2f} s "
                  f"(CPU of the workers {tp[1]:.2f} s, busiest worker {tp[2]:.2f} s)",
                  flush=True)
            assert pooled == bounds, "parallel run disagrees with the sequential one"
        t, floats = run_float(args.nmax)
        t_float.append(t)
        print(f"  [repeat {rep + 1}] float (plain + plus LP): wall {t[0]:.2f} s "
              f"(plain LP alone {t[1]:.2f} s)", flush=True)
    cells = _cells(args.nmax)
    mc = statistics.median(t[0] for t in t_cert)
    mf = statistics.median(t[0] for t in t_float)
    mfp = statistics.median(t[1] for t in t_float)
    print(f"binary grid n=1..{args.nmax}, d=1..n: {len(cells)} cells, {args.repeat} repeat(s), "
          "median wall times:")
    cc = statistics.median(t[1] for t in t_cert)
    print(f"  certified, all bounds, 1 core:          {mc:8.2f} s  "
          f"({1000 * mc / len(cells):.2f} ms/cell; CPU {cc:.2f} s)")
    if t_pool:
        mp_ = statistics.median(t[0] for t in t_pool)
        print(f"  certified, all bounds, {args.workers} cores:         {mp_:8.2f} s  "
              f"(speed-up {mc / mp_:.2f} over 1 core; CPU of the workers "
              f"{statistics.median(t[1] for t in t_pool):.2f} s, of the busiest one "
              f"{statistics.median(t[2] for t in t_pool):.2f} s)")
    print(f"  float HiGHS loop, plain + plus LP:       {mf:8.2f} s  (plain LP alone {mfp:.2f} s)")
    print(f"  ratio certified (1 core) / float loop:  {mc / mf:.2f}"
          + (f"; {args.workers} cores / float loop: "
             f"{statistics.median(t[0] for t in t_pool) / mf:.2f}" if t_pool else ""))

    for idx, name in enumerate(LPS):
        got = {c: b[name] for c, b in bounds.items() if name in b}
        ok = {c: v for c, (v, cert, _) in got.items() if cert}
        print(f"  {name}: certified in {len(ok)} of {len(got)} cells "
              f"({len(got) - len(ok)} uncertified)")
        failed = [c for c in got if floats[c][idx] is None]
        below, above = [], []
        for c, v in ok.items():
            f = floats[c][idx]
            if f is None:
                continue
            fl = _floor(f)
            if fl < v:
                below.append(c)
            elif fl > v:
                above.append(c)
        wrong = len(failed) + len(below) + len(above)
        print(f"    float loop wrong in {wrong} cells: {len(failed)} no answer, {len(below)} "
              f"floor below the certified value (unbacked claims), {len(above)} above (weaker)")
        if below:
            print("      first unbacked:", below[:10])
        if ok:
            big = max(ok.values())
            print(f"    largest certified value: 2^{big.bit_length() - 1}..2^{big.bit_length()}")

    wins, wins_plus = [], []
    for c, b in bounds.items():
        best_classical = min(b[k][0] for k in CLASSICAL if k in b)
        lp = b.get("delsarte-lp")
        lpp = b.get("delsarte-lp-plus")
        lp_ok = lp is not None and lp[2]
        if lp_ok and lp[0] < best_classical:
            wins.append(c)
        ref = min(best_classical, lp[0]) if lp_ok else best_classical
        if lpp is not None and lpp[2] and lpp[0] < ref:
            wins_plus.append(c)
    print(f"  cells where the plain LP beats every classical bound: {len(wins)}")
    print(f"  cells where the extra inequalities improve on the plain LP and classical: "
          f"{len(wins_plus)}")
    small = sorted(c for c in wins if c[0] <= args.list_n)
    print(f"  LP-winning cells with n <= {args.list_n}: "
          + " ".join(f"({n},{d})" for n, d in small))
    small = sorted(c for c in wins_plus if c[0] <= args.list_n)
    print(f"  cells with n <= {args.list_n} where the extra inequalities help: "
          + " ".join(f"({n},{d})" for n, d in small))


if __name__ == "__main__":
    main()
