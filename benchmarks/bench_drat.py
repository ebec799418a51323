"""Re-checking SAT refutations: our DRAT checker against the solver that wrote the proofs.

Run: ``python benchmarks/bench_drat.py [--repeat 3] [--out benchmarks/results_drat.md]``.

For each cell question "a code of M words?" (refuted), the bundle is written once by
``search(..., method="sat", size=M, proof=...)``. Then, in each round, for every cell:

* peer: CaDiCaL 1.9.5 through plain python-sat solving every branch formula with proof
  logging on (the work that wrote the proofs), formulas built before the clock starts;
* ours, proof only: :func:`codesearch.verify.drat.check_files` on every branch (parsing included);
* ours, whole bundle: :func:`codesearch.proofbundle.check_bundle` (digests, every formula
  rebuilt from the claim and compared, the distance-clause audit, the proof checks).

Figures are medians over the rounds; ratios are ours / peer measured in the same run. Peak
memory: ``/usr/bin/time -v`` maximum RSS of one process doing the peer's solve and of one
doing ``python -m codesearch check BUNDLE`` (one run each, after the timing rounds).
"""

from __future__ import annotations

import argparse
import datetime
import os
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
sys.path.insert(0, ROOT)

from codesearch import drat, proofbundle  # noqa: E402
from codesearch.model import Params  # noqa: E402
from codesearch.search import search  # noqa: E402
from codesearch.search import sat  # noqa: E402

#: (q, n, d, M): M is one above the cell's value (from memory), so the question is refuted.
CELLS = [(2, 6, 3, 9), (3, 5, 3, 19), (2, 8, 3, 21), (2, 9, 4, 21), (2, 10, 5, 13)]

_SOLVE = """
import sys, time
sys.path.insert(0, {root!r})
from pysat.solvers import Solver
from codesearch.search import sat
q, n, d, M = {cell}
for w in range(d, n + 1):
    enc = sat.encode(q, n, d, M, "lex", w)
    with Solver(name="cadical195", bootstrap_with=enc.clauses, with_proof=True) as s:
        assert not s.solve()
"""


def cell_name(q, n, d, M):
    return (f"A({n},{d})" if q == 2 else f"A_{q}({n},{d})") + f" >= {M}"


def solve_peer(cell):
    from pysat.solvers import Solver

    q, n, d, M = cell
    total = 0.0
    for w in range(d, n + 1):
        enc = sat.encode(q, n, d, M, "lex", w)
        with Solver(name="cadical195", bootstrap_with=enc.clauses, with_proof=True) as s:
            t0 = time.perf_counter()
            assert not s.solve()
            total += time.perf_counter() - t0
    return total


def check_proofs(manifest):
    import json

    base = os.path.dirname(manifest)
    with open(manifest) as fh:
        branches = json.load(fh)["branches"]
    t0 = time.perf_counter()
    lines = checked = 0
    for b in branches:
        res = drat.check_files(os.path.join(base, b["formula"]), os.path.join(base, b["proof"]))
        assert res.valid, res.reason
        lines += res.lemmas + res.deletions
        checked += res.checked
    return time.perf_counter() - t0, lines, checked


def check_bundle(manifest):
    t0 = time.perf_counter()
    res = proofbundle.check_bundle(manifest)
    assert res.valid, res.reason
    return time.perf_counter() - t0


def peak_rss_mb(argv):
    out = subprocess.run(["/usr/bin/time", "-v"] + argv, capture_output=True, text=True,
                         cwd=ROOT)
    assert out.returncode == 0, out.stderr[-500:]
    for line in out.stderr.splitlines():
        if "Maximum resident set size" in line:
            return int(line.split()[-1]) / 1024
    return float("nan")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--out", help="write the markdown results here")
    ap.add_argument("--cells", type=int, default=len(CELLS), help="first K cells only")
    args = ap.parse_args()
    cells = CELLS[: args.cells]
    work = tempfile.mkdtemp(prefix="bench_drat_")
    manifests = {}
    for cell in cells:
        q, n, d, M = cell
        res = search(Params(q, n, d), "sat", size=M, proof=os.path.join(work, f"p{q}_{n}_{d}"))
        assert res.upper == M - 1
        manifests[cell] = res.settings["proof_bundle"]
    check_proofs(manifests[cells[0]])  # compile the kernels outside the clock
    times = {cell: {"peer": [], "proofs": [], "bundle": []} for cell in cells}
    info = {}
    for r in range(args.repeat):
        for cell in cells:
            times[cell]["peer"].append(solve_peer(cell))
            t, lines, checked = check_proofs(manifests[cell])
            times[cell]["proofs"].append(t)
            info[cell] = (lines, checked)
            times[cell]["bundle"].append(check_bundle(manifests[cell]))
        print(f"round {r + 1} done", file=sys.stderr)
    mem = {}
    for cell in cells:
        peer = peak_rss_mb([sys.executable, "-c", _SOLVE.format(root=ROOT, cell=cell)])
        ours = peak_rss_mb([sys.executable, "-m", "codesearch", "check", manifests[cell]])
        mem[cell] = (peer, ours)
    rows = []
    head = (f"{'question (refuted)':<18} {'proof lines':>11} {'checked':>8} "
            f"{'CaDiCaL s':>9} {'proofs s':>9} {'bundle s':>9} {'proofs/peer':>11} "
            f"{'peak MB peer':>12} {'peak MB ours':>12}")
    rows.append(head)
    for cell in cells:
        med = {k: statistics.median(v) for k, v in times[cell].items()}
        lines, checked = info[cell]
        ratio = med["proofs"] / med["peer"] if med["peer"] > 0 else float("nan")
        rows.append(f"{cell_name(*cell):<18} {lines:>11} {checked:>8} {med['peer']:>9.2f} "
                    f"{med['proofs']:>9.2f} {med['bundle']:>9.2f} {ratio:>10.2f}x "
                    f"{mem[cell][0]:>12.0f} {mem[cell][1]:>12.0f}")
    table = "\n".join(rows)
    print(table)
    if args.out:
        stamp = datetime.datetime.now(datetime.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
        with open(args.out, "w") as fh:
            fh.write(f"# DRAT re-check benchmark (measured {stamp}, "
                     f"`python benchmarks/bench_drat.py --repeat {args.repeat}`)\n\n")
            fh.write(__doc__.split("\n\n", 1)[1].split("Figures are")[0].strip() + "\n\n")
            fh.write(f"Medians of {args.repeat} rounds in one run; \"proofs/peer\" is our "
                     "proof check (parsing included) over CaDiCaL's solve with proof "
                     "logging. Peak memory is one run each.\n\n")
            fh.write("```\n" + table + "\n```\n")


if __name__ == "__main__":
    main()
