"""Benchmark: every bound on the binary grid, certified LP, next to a plain float HiGHS loop.

Run from the repository root::

    PYTHONPATH=$PWD python benchmarks/bench_bounds.py            # n = 1..128, 3 repeats
    PYTHONPATH=$PWD python benchmarks/bench_bounds.py --nmax 40 --repeat 5

What is measured, in the same process and run:

``certified``
    ``codesearch.bounds.all_bounds(..., lp_fallback=False)`` on every cell (Singleton,
    Hamming, Plotkin, Johnson, Elias, Griesmer, Delsarte LP and LP with extra inequalities,
    each LP with an exact certificate re-checked by ``codesearch.verify``), plus GV: the
    double-precision path, which leaves the cells beyond its reach uncertified.
``fallback``
    The high-precision simplex on the cells the fast path left uncertified (every
    ``--sample``-th of them; time per cell and the total extrapolated to all of them).
``float``
    The peer: the textbook Delsarte LP (unscaled primal, float Krawtchouk values) solved by
    ``scipy.optimize.linprog(method="highs")`` and floored; no certificate.

Printed: median wall time of each over the repeats and their ratio; how many cells the LP
certified; how many cells the float loop gets wrong (no answer, or a floor that differs from
the certified LP value; "below" means it claims a bound no certificate backs); and the cells
where the LP beats every classical bound. Timings vary with machine load; compare ratios.
"""

from __future__ import annotations

import argparse
import statistics
import time

import numpy as np


def _float_lp_value(n: int, d: int) -> float | None:
    from scipy.optimize import linprog

    from codesearch.bounds.krawtchouk import krawtchouk_table

    if d % 2:
        n, d = n + 1, d + 1
    K = krawtchouk_table(2, n)
    rows = [i for i in range(d, n + 1) if i % 2 == 0]
    A = np.array([[-float(K[k][i]) for i in rows] for k in range(1, n + 1)])
    b = np.array([float(K[k][0]) for k in range(1, n + 1)])
    res = linprog(-np.ones(len(rows)), A_ub=A, b_ub=b, bounds=(0, None), method="highs")
    return 1.0 - res.fun if res.status == 0 else None


def _cells(nmax: int) -> list[tuple[int, int]]:
    return [(n, d) for n in range(1, nmax + 1) for d in range(1, n + 1)]


def run_certified(nmax: int) -> tuple[float, dict]:
    from codesearch.bounds import all_bounds, gv_lower_bound
    from codesearch.model import Params

    out = {}
    t0, c0 = time.perf_counter(), time.process_time()
    for n, d in _cells(nmax):
        p = Params(2, n, d)
        out[(n, d)] = all_bounds(p, lp_fallback=False)
        gv_lower_bound(p)
    return (time.perf_counter() - t0, time.process_time() - c0), out


def run_fallback(cells: list[tuple[int, int]]) -> tuple[list[float], dict]:
    from codesearch.bounds.delsarte import delsarte_lp
    from codesearch.model import Params

    times, out = [], {}
    for n, d in cells:
        c0 = time.process_time()
        out[(n, d)] = delsarte_lp(Params(2, n, d), exact_fallback=True)
        times.append(time.process_time() - c0)
    return times, out


def run_float(nmax: int) -> tuple[float, dict]:
    out = {}
    t0, c0 = time.perf_counter(), time.process_time()
    for n, d in _cells(nmax):
        out[(n, d)] = _float_lp_value(n, d)
    return (time.perf_counter() - t0, time.process_time() - c0), out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nmax", type=int, default=128)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--list-n", type=int, default=24, help="list LP-winning cells up to this n")
    ap.add_argument("--sample", type=int, default=10,
                    help="run the high-precision fallback on every k-th uncertified cell")
    args = ap.parse_args()

    # Warm-up outside the timings: imports, scipy/HiGHS start-up.
    run_certified(6)
    run_float(6)
    t_cert, t_float = [], []
    for rep in range(args.repeat):
        t, bounds = run_certified(args.nmax)
        t_cert.append(t)
        print(f"  [repeat {rep + 1}] certified: wall {t[0]:.2f} s, CPU {t[1]:.2f} s", flush=True)
        t, floats = run_float(args.nmax)
        t_float.append(t)
        print(f"  [repeat {rep + 1}] float:     wall {t[0]:.2f} s, CPU {t[1]:.2f} s", flush=True)
    cells = _cells(args.nmax)
    mc = statistics.median(t[0] for t in t_cert)
    mf = statistics.median(t[0] for t in t_float)
    cc = statistics.median(t[1] for t in t_cert)
    cf = statistics.median(t[1] for t in t_float)
    print(f"binary grid n=1..{args.nmax}, {len(cells)} cells, {args.repeat} repeat(s), medians "
          "(wall; CPU of this process in brackets, the better guide on a loaded machine):")
    print(f"  certified (all bounds, exact LP certificates): {mc:8.2f} s [{cc:7.2f} s]  "
          f"({1000 * mc / len(cells):.2f} ms/cell)")
    print(f"  float HiGHS loop (LP only, no certificate):     {mf:8.2f} s [{cf:7.2f} s]  "
          f"({1000 * mf / len(cells):.2f} ms/cell)")
    print(f"  ratio certified / float: wall {mc / mf:.2f}, CPU {cc / cf:.2f}")

    lp_cert = {c: b["delsarte-lp"] for c, b in bounds.items() if "delsarte-lp" in b}
    ok = {c: r.value for c, r in lp_cert.items() if r.certified}
    print(f"  fast path: LP certified in {len(ok)} of {len(cells)} cells "
          f"({len(cells) - len(ok)} uncertified, kept out of 'upper')")
    todo = sorted(c for c in cells if c not in ok)[:: max(1, args.sample)]
    if todo:
        times, extra = run_fallback(todo)
        got = sum(1 for r in extra.values() if r is not None and r.certified)
        missing = len(cells) - len(ok)
        print(f"  fallback on {len(todo)} of those {missing} cells: {got} certified; "
              f"median {statistics.median(times):.2f} CPU s/cell, max {max(times):.2f} s; "
              f"all {missing} extrapolated: {statistics.mean(times) * missing:.0f} s")
        for c, r in extra.items():
            if r is not None and r.certified:
                ok[c] = r.value
    biggest = max((v for v in ok.values()), default=0)
    print(f"  largest certified LP value: 2^{biggest.bit_length() - 1}..2^{biggest.bit_length()}")

    failed = [c for c in cells if floats[c] is None]
    below, above, same = [], [], 0
    for c, v in ok.items():
        f = floats[c]
        if f is None:
            continue
        fl = int(np.floor(f)) if abs(f) < 2**62 else int(f)
        if fl < v:
            below.append(c)
        elif fl > v:
            above.append(c)
        else:
            same += 1
    print(f"  float loop: {len(failed)} cells with no answer; among certified cells "
          f"{same} agree, {len(below)} floor below the certified value (unbacked claims), "
          f"{len(above)} above (weaker)")
    if below:
        print("    first unbacked cells:", below[:12])

    classical = ("singleton", "hamming", "plotkin", "johnson", "elias")
    wins, wins_plus = [], []
    for c, b in bounds.items():
        best_classical = min(b[k].value for k in classical if k in b)
        lp = b.get("delsarte-lp")
        lpp = b.get("delsarte-lp-plus")
        if lp is not None and lp.usable and lp.value < best_classical:
            wins.append(c)
        if lpp is not None and lpp.usable and lpp.value < min(best_classical, lp.value if lp and lp.usable else best_classical):
            wins_plus.append(c)
    print(f"  cells where the plain LP beats every classical bound: {len(wins)}")
    print(f"  cells where the extra inequalities improve on the plain LP and classical: {len(wins_plus)}")
    small = sorted(c for c in wins if c[0] <= args.list_n)
    print(f"  LP-winning cells with n <= {args.list_n}: " + " ".join(f"({n},{d})" for n, d in small))


if __name__ == "__main__":
    main()
