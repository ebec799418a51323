"""Exclude a size with the four-point program and its pair moment blocks; keep the certificate.

Run: ``PYTHONPATH=$PWD python benchmarks/fourpoint_targets.py N,D,U [N,D,U ...]
[--keep benchmarks/certificates] [--passes P] [--solver-option NAME=VALUE ...]``; ``U = 0``
solves the plain four-point program (no pair blocks, no corner); ``--passes 1`` stops after
the first numerical pass (at distance 6 with the pair blocks the later passes took over an
hour and moved nothing); ``--solver-option`` overrides a Clarabel setting (for example
``static_regularization_constant=1e-10``; recorded in the certificate).

For each cell (even ``D``) the four-point program with the moment matrix of word pairs and
the corner of a code of ``U`` words (:func:`codesearch.bounds.fourpoint.solve_four_point`
with ``target=U``) is solved in its own process under ``/usr/bin/time -v`` (wall time, CPU
time, peak memory of the whole run: build, numerical passes, exact rounding and the
independent re-check). When the certified bound falls below ``U`` the size ``U`` is
excluded, ``A(N, D) <= U - 1``; otherwise the certified value is still a bound (the floor
of the exact bound). With ``--keep`` a certified certificate is written gzipped to
``DIR/fourpoint_N_D.json.gz`` unless a file there already proves a value as small; there
``bench_bounds_published.py --certificates DIR`` re-checks it and uses its bound (the solves
take minutes to hours; the re-check seconds to minutes). One markdown row per cell is
printed.

``--size-cut`` (with ``--keep DIR``): for each ``N,D`` (``U`` is read from the stored
certificate) the stored ``DIR/fourpoint_N_D.json.gz`` proves ``A(N, D) <= U``; the size ``U``
is then attacked with the size cuts (:func:`codesearch.bounds.fourpoint.four_point_size_cut`:
one solve for odd ``U``; for ``U = 2 mod 4`` one solve with the least cut over ``s``, then one
per even ``s``). When every needed solve excludes ``U``, the certificate of ``A(N, D) <= U - 1``
(kind ``four-point-size-cut``, the stored one nested in it) is written to
``DIR/sizecut_N_D.json.gz``. Each solve is logged on stderr; the row gives the whole run.
"""

from __future__ import annotations

import argparse
import json
import pathlib
import re
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parent.parent

_CHILD = """
import gzip, json, os, sys
from codesearch.bounds.fourpoint import solve_four_point
n, d, target, keep = int(sys.argv[1]), int(sys.argv[2]), int(sys.argv[3]), sys.argv[4]
passes = int(sys.argv[5]) or None
options = json.loads(sys.argv[6])
res = solve_four_point(n, d, target=target or None, passes=passes, solver_options=options)
path = f"{keep}/fourpoint_{n}_{d}.json.gz"
if keep and res["certificate"] is not None and res["certified"]:
    old = None
    if os.path.exists(path):
        with gzip.open(path, "rt", encoding="utf-8") as fh:
            old = json.load(fh)["value"]
    if old is None or res["value"] < old:  # never replace a stronger stored bound
        with gzip.open(path, "wt", encoding="utf-8") as fh:
            json.dump(res["certificate"], fh, allow_nan=False)
print(json.dumps({"value": res["value"], "exact": res["exact_float"],
                  "float": res["float_value"], "certified": res["certified"],
                  "build_s": res["build_seconds"], "check_s": res.get("check_seconds")}))
"""

_CUT_CHILD = """
import gzip, json, sys
from codesearch.bounds.fourpoint import four_point_size_cut
n, d, keep = int(sys.argv[1]), int(sys.argv[2]), sys.argv[3]
passes = int(sys.argv[4]) or None
options = json.loads(sys.argv[5])
with gzip.open(f"{keep}/fourpoint_{n}_{d}.json.gz", "rt", encoding="utf-8") as fh:
    upper = json.load(fh)
res = four_point_size_cut(n, d, upper, passes=passes, solver_options=options,
                          log=lambda line: print(line, file=sys.stderr, flush=True))
if res["certified"]:
    with gzip.open(f"{keep}/sizecut_{n}_{d}.json.gz", "wt", encoding="utf-8") as fh:
        json.dump(res["certificate"], fh, allow_nan=False)
print(json.dumps({"value": res["value"], "size": upper["value"], "solves": res["solves"],
                  "certified": res["certified"]}))
"""


def _measure(args: list[str]) -> tuple[dict, float, float, float, str]:
    """Run a child under ``/usr/bin/time -v``: its last stdout line as JSON, wall s, CPU s,
    peak MB and its stderr."""
    proc = subprocess.run(["/usr/bin/time", "-v", sys.executable, "-c", *args],
                          capture_output=True, text=True, cwd=ROOT,
                          env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    if proc.returncode != 0:
        raise RuntimeError(proc.stderr[-2000:])
    out = json.loads(proc.stdout.strip().splitlines()[-1])
    rss = int(re.search(r"Maximum resident set size \(kbytes\): (\d+)", proc.stderr).group(1))
    wall = re.search(r"Elapsed \(wall clock\) time \(h:mm:ss or m:ss\): ([\d:.]+)",
                     proc.stderr)
    parts = [float(p) for p in wall.group(1).split(":")]
    wall_s = sum(p * 60 ** k for k, p in enumerate(reversed(parts)))
    cpu = sum(float(re.search(rf"{k} time \(seconds\): ([\d.]+)", proc.stderr).group(1))
              for k in ("User", "System"))
    return out, wall_s, cpu, rss / 1024, proc.stderr


def run_size_cut(n: int, d: int, keep: str, passes: int = 0,
                 options: dict | None = None) -> str:
    out, wall_s, cpu, peak, err = _measure([_CUT_CHILD, str(n), str(d), keep, str(passes),
                                            json.dumps(options or {})])
    for line in err.splitlines():
        if line.startswith("A("):
            print(f"  {line}", file=sys.stderr)
    size = out["size"]
    least = min((s["exact_float"] for s in out["solves"] if s["exact_float"] is not None),
                default=float("nan"))
    verdict = (f"size {size} excluded: A({n},{d}) <= {size - 1}" if out["certified"]
               else f"size {size} not excluded")
    return (f"| A({n},{d}) | {size} (size cut, {len(out['solves'])} solves) | {least:.4f} "
            f"| {verdict} | {wall_s:.0f} | {cpu:.0f} | {peak:.0f} | - |")


def run(n: int, d: int, target: int, keep: str, passes: int = 0,
        options: dict | None = None) -> str:
    out, wall_s, cpu, peak, _err = _measure([_CHILD, str(n), str(d), str(target), keep,
                                              str(passes), json.dumps(options or {})])
    if not target:
        verdict = f"plain program: A({n},{d}) <= {out['value']}"
    elif out["value"] < target:
        verdict = f"excluded: A({n},{d}) <= {target - 1}"
    else:
        verdict = f"not excluded; A({n},{d}) <= {out['value']}"
    return (f"| A({n},{d}) | {target} | {out['exact']:.4f} | {verdict} | {wall_s:.0f} "
            f"| {cpu:.0f} | {peak:.0f} | {out['check_s'] or 0:.0f} |")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("cells", nargs="+", help="N,D,U triples (even D; U = 0: the plain program; "
                    "with --size-cut: N,D)")
    ap.add_argument("--size-cut", action="store_true",
                    help="exclude the size the stored certificate proves, with the size cuts")
    ap.add_argument("--keep", default="", metavar="DIR",
                    help="write certified certificates to DIR (never over a stronger one)")
    ap.add_argument("--passes", type=int, default=0, metavar="P",
                    help="numerical passes per solve (default: the library's, three)")
    ap.add_argument("--solver-option", action="append", default=[], metavar="NAME=VALUE",
                    help="override a Clarabel setting (repeatable; VALUE a number, true or "
                         "false)")
    args = ap.parse_args()
    if args.passes < 0:
        ap.error("--passes must be 0 (the default) or more")
    options = {}
    for item in args.solver_option:
        name, sep, text = item.partition("=")
        if not sep:
            ap.error(f"--solver-option expects NAME=VALUE, got {item!r}")
        try:
            options[name.strip()] = json.loads(text.strip())
        except json.JSONDecodeError:
            ap.error(f"--solver-option {name}: {text!r} is not a number, true or false")
    from codesearch.bounds.sdp import clarabel_options
    from codesearch.errors import ParameterError
    try:
        clarabel_options(options)
    except ParameterError as exc:
        ap.error(str(exc))
    if args.size_cut and not args.keep:
        ap.error("--size-cut reads and writes the certificates of --keep DIR")
    print("| cell | target U | exact bound | verdict | wall s | CPU s | peak MB | check s |\n"
          "|---|---|---|---|---|---|---|---|")
    for cell in args.cells:
        if args.size_cut:
            n, d = (int(v) for v in cell.split(",")[:2])
            keep = str(pathlib.Path(args.keep).resolve())
            print(run_size_cut(n, d, keep, args.passes, options), flush=True)
            continue
        n, d, target = (int(v) for v in cell.split(","))
        keep = str(pathlib.Path(args.keep).resolve()) if args.keep else ""
        print(run(n, d, target, keep, args.passes, options), flush=True)


if __name__ == "__main__":
    main()
