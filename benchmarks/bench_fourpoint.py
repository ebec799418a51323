"""Four-point SDP bound against the three-point bound and the published upper values.

Run: ``PYTHONPATH=$PWD python benchmarks/bench_fourpoint.py 17,8 18,8 ... [--out FILE]``.

Each cell is solved in its own process under ``/usr/bin/time -v`` (one at a time: the machine
has two cores and other work runs on it), which gives the wall time and the peak memory of
the whole four-point run (build, numerical passes, exact rounding and the independent
re-check of the certificate). The three-point value is this package's
(:func:`codesearch.bounds.sdp.solve_three_point`, same process, timed apart); the published
upper value is the row of ``data/published_binary.csv`` (from memory, see its header).
Appends one markdown table row per cell to ``--out`` (default: print only).
"""

from __future__ import annotations

import argparse
import csv
import json
import pathlib
import re
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parent.parent

_CHILD = """
import json, sys, time
from codesearch.bounds.fourpoint import four_point_size, solve_four_point
from codesearch.bounds.sdp import solve_three_point
n, d = int(sys.argv[1]), int(sys.argv[2])
t0 = time.perf_counter()
three = solve_three_point(n, d)
t3 = time.perf_counter() - t0
t0 = time.perf_counter()
four = solve_four_point(n, d)
t4 = time.perf_counter() - t0
size = four_point_size(n, d)
print(json.dumps({"n": n, "d": d, "three": three["value"], "three_float": three["float_value"],
                  "three_s": t3, "four": four["value"], "four_float": four["float_value"],
                  "four_exact": four["exact_float"], "certified": four["certified"],
                  "four_s": t4, "build_s": four["build_seconds"],
                  "check_s": four.get("check_seconds"), "variables": size.variables,
                  "blocks": size.blocks, "largest": size.largest, "terms": size.terms,
                  "passes": len(four["passes"])}))
"""


def published_upper(n: int, d: int) -> int | None:
    with open(ROOT / "data" / "published_binary.csv") as fh:
        for row in csv.reader(line for line in fh if not line.startswith("#")):
            if row and row[0].isdigit() and (int(row[0]), int(row[1]), int(row[2])) == (2, n, d):
                return int(row[4])
    return None


def run_cell(n: int, d: int) -> dict:
    proc = subprocess.run(["/usr/bin/time", "-v", sys.executable, "-c", _CHILD, str(n), str(d)],
                          capture_output=True, text=True, cwd=ROOT,
                          env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    if proc.returncode != 0:
        raise RuntimeError(proc.stderr[-2000:])
    out = json.loads(proc.stdout.strip().splitlines()[-1])
    rss = re.search(r"Maximum resident set size \(kbytes\): (\d+)", proc.stderr)
    wall = re.search(r"Elapsed \(wall clock\) time \(h:mm:ss or m:ss\): ([\d:.]+)", proc.stderr)
    out["peak_mb"] = int(rss.group(1)) / 1024 if rss else None
    cpu = [re.search(rf"{k} time \(seconds\): ([\d.]+)", proc.stderr) for k in ("User", "System")]
    out["cpu_s"] = sum(float(c.group(1)) for c in cpu if c)
    parts = [float(p) for p in wall.group(1).split(":")] if wall else []
    out["wall_s"] = sum(p * 60 ** k for k, p in enumerate(reversed(parts))) if parts else None
    try:
        out["published"] = published_upper(n, d)
    except (OSError, ValueError):
        out["published"] = None
    print(json.dumps(out), file=sys.stderr, flush=True)  # the raw record, kept in the log
    return out


def row(r: dict) -> str:
    return (f"| A({r['n']},{r['d']}) | {r['four']}{'' if r['certified'] else ' (uncertified)'} "
            f"| {r['four_exact']:.4f} | {r['three']} ({r['three_float']:.4f}) | {r['published']} "
            f"| {r['variables']:,} / {r['blocks']:,} / {r['largest']} | {r['four_s']:.0f} "
            f"(build {r['build_s']:.0f}, check {r['check_s'] or 0:.0f}) | {r['wall_s']:.0f} "
            f"| {r['cpu_s']:.0f} "
            f"| {r['peak_mb']:.0f} |")


HEADER = ("| cell | four-point | exact dual bound | three-point (float) | published upper "
          "| variables / blocks / largest | four-point s | wall s | CPU s | peak MB |\n"
          "|---|---|---|---|---|---|---|---|---|---|")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("cells", nargs="+", help="n,d pairs (even d)")
    ap.add_argument("--out", help="append the table rows to this file")
    args = ap.parse_args()
    print(HEADER)
    for cell in args.cells:
        n, d = (int(v) for v in cell.split(","))
        line = row(run_cell(n, d))
        print(line, flush=True)
        if args.out:
            with open(args.out, "a") as fh:
                fh.write(line + "\n")


if __name__ == "__main__":
    main()
