"""Three-point semidefinite bound over the binary grid: time per cell, accuracy, share certified.

Run: ``PYTHONPATH=$PWD python benchmarks/bench_sdp.py [--nmax 28] [--dmin 4] [--dmax 12]``.

For every cell A(n, d) with d <= n <= nmax it calls
:func:`codesearch.bounds.sdp.three_point_bound` (odd d goes through A(n+1, d+1); the shared
program is solved once) and prints one line per cell: seconds, the solver's float optimum,
the exact certified value, the relative primal-dual gap reported by the solver, and the
Delsarte LP value of the same cell (scipy HiGHS, even distances for even d; a float
reference used only for comparison). The peer measured in the same run is that LP solve:
the last lines give the ratio of total SDP time to total LP time.

Times are CPU seconds of this process (``time.process_time``; Clarabel runs one thread),
with wall seconds alongside: the machine is shared, and wall time measures the other
sessions' load as much as this code.
"""

from __future__ import annotations

import argparse
import time
from math import comb

import numpy as np


def _krawtchouk(n: int, k: int, i: int) -> int:
    return sum((-1) ** s * comb(i, s) * comb(n - i, k - s) for s in range(k + 1))


def delsarte_lp_float(n: int, d: int) -> float:
    """Float Delsarte LP optimum (even distances only when d is even)."""
    from scipy.optimize import linprog

    if d % 2:
        n, d = n + 1, d + 1
    idx = [i for i in range(d, n + 1) if i % 2 == 0]
    a_ub = [[-_krawtchouk(n, k, i) for i in idx] for k in range(1, n + 1)]
    b_ub = [comb(n, k) for k in range(1, n + 1)]
    res = linprog(-np.ones(len(idx)), A_ub=a_ub, b_ub=b_ub, bounds=[(0, None)] * len(idx),
                  method="highs")
    return 1.0 - res.fun


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nmax", type=int, default=28)
    ap.add_argument("--dmin", type=int, default=4)
    ap.add_argument("--dmax", type=int, default=12)
    args = ap.parse_args()

    from codesearch.bounds.sdp import solve_three_point, three_point_bound
    from codesearch.model import Params

    t_sdp = t_lp = wall_sdp = 0.0
    rows = []
    print(f"{'cell':>10} {'cpu s':>6} {'wall s':>6} {'float':>14} {'certified':>10} {'gap':>9} "
          f"{'LP':>12} note")
    t_all = time.perf_counter()
    for n in range(args.dmin, args.nmax + 1):
        for d in range(args.dmin, min(args.dmax, n) + 1):
            p = Params(2, n, d)
            w0, t0 = time.perf_counter(), time.process_time()
            res = three_point_bound(p)
            dt, dw = time.process_time() - t0, time.perf_counter() - w0
            t1 = time.process_time()
            lp = delsarte_lp_float(n, d)
            t_lp += time.process_time() - t1
            t_sdp += dt
            wall_sdp += dw
            sn, sd = (n + 1, d + 1) if d % 2 else (n, d)
            info = solve_three_point(sn, sd)
            lp_int = int(np.floor(lp + 1e-9))
            # which dual won: one with PSD blocks (three-point) or the LP pass (Delsarte
            # rows plus A_i <= A(n,d,i), no blocks)
            by = "sdp" if res.certificate and res.certificate["blocks"] else "lp+"
            tag = f"beats LP ({by})" if res.certified and res.value < lp_int else ""
            if not res.certified:
                tag = "UNCERTIFIED"
            rows.append((n, d, dt, res.certified, res.value, lp_int, by))
            print(f"{str(p):>10} {dt:6.2f} {dw:6.2f} {info['float_value']:14.4f} {res.value:>10} "
                  f"{info['gap']:9.1e} {lp:12.3f} {tag}", flush=True)
    total = time.perf_counter() - t_all
    cert = sum(r[3] for r in rows)
    better = [f"A({n},{d})<={v} (LP {lp}, {by})" for n, d, _, c, v, lp, by in rows
              if c and v < lp]
    by_sdp = sum(1 for *_, c, v, lp, by in rows if c and v < lp and by == "sdp")
    print(f"cells {len(rows)}, certified {cert} ({100.0 * cert / len(rows):.1f}%), "
          f"wall total {total:.1f}s (SDP {wall_sdp:.1f}s); CPU: SDP {t_sdp:.1f}s, LP {t_lp:.2f}s, "
          f"ratio SDP/LP {t_sdp / t_lp:.0f}")
    print(f"stronger than the Delsarte LP in {len(better)} cells ({by_sdp} by the three-point "
          f"dual, the rest by the LP with constant-weight rows): " + ", ".join(better))


if __name__ == "__main__":
    main()
