"""How close the certified upper bounds come to the published tables.

Run: ``PYTHONPATH=$PWD python benchmarks/bench_bounds_published.py [--binary] [--qary]
[--nmax 28] [--qnmax 12] [--certificates benchmarks/certificates]``.

Binary part: every cell n = 4..nmax, d = 3..10 through the ``codesearch bounds --sdp``
path (closed forms, Delsarte LPs, the three-point SDP, the integer refinements and the
relations between cells of the grid), compared with the published upper values of
data/published_binary.csv: how many cells reach the published value, the cells still above
(with the ratio), and a soundness check (no bound below a published lower value; a bound
below a published *upper* value is printed, since the published values are recalled from
memory). The peer measured in the same run is the plain Delsarte LP (HiGHS, certified):
how many cells it alone reaches.

q-ary part: q = 3, 4, n <= qnmax, d = 3..n, the q-ary three-point SDP against the
Delsarte LP with constant-weight rows and the published values of data/published_qary.csv;
prints the cells where the SDP is below the LP, with the time per cell.
"""

from __future__ import annotations

import argparse
import csv
import os
import time

from codesearch.model import Params

_DATA = os.path.join(os.path.dirname(__file__), "..", "data")


def published(name: str) -> dict[Params, tuple[int | None, int | None, str]]:
    out = {}
    with open(os.path.join(_DATA, name), encoding="utf-8") as fh:
        for row in csv.DictReader(line for line in fh if not line.startswith("#")):
            p = Params(int(row["q"]), int(row["n"]), int(row["d"]))
            out[p] = (int(row["lower"]) if row["lower"] else None,
                      int(row["upper"]) if row["upper"] else None, row["source"])
    return out


def stored_certificates(folder: str) -> dict[Params, list]:
    """Every certificate file of ``folder`` (``*.json`` or ``*.json.gz``), re-checked in exact
    arithmetic by ``codesearch.verify.check_certificate``: the valid ones as
    BoundResults per cell (the four-point runs take minutes to hours, so they are solved
    once by ``benchmarks/bench_fourpoint.py --target`` and re-checked here)."""
    import gzip
    import json

    from codesearch.results import BoundResult
    from codesearch.verify import check_certificate

    out: dict[Params, list] = {}
    for name in sorted(os.listdir(folder)):
        if not name.endswith((".json", ".json.gz")):
            continue
        opener = gzip.open if name.endswith(".gz") else open
        with opener(os.path.join(folder, name), "rt", encoding="utf-8") as fh:
            cert = json.load(fh)
        t0 = time.perf_counter()
        ok, bound, reason = check_certificate(cert)
        print(f"  certificate {name}: {'re-checked' if ok else 'REJECTED'}, {reason} "
              f"({time.perf_counter() - t0:.0f} s)")
        if ok:
            p = Params(2, cert["n"], cert["d"])
            out.setdefault(p, []).append(BoundResult(p, bound, cert["kind"], certificate=cert))
    return out


def binary(nmax: int, folder: str | None = None) -> None:
    from codesearch.bounds import all_bounds, grid_bounds

    pub = published("published_binary.csv")
    cells = [Params(2, n, d) for n in range(4, nmax + 1) for d in range(3, 11) if d <= n]
    stored = stored_certificates(folder) if folder else {}

    def cell_bounds(p: Params) -> dict:
        found = all_bounds(p, sdp=True)
        for extra in stored.get(p, []):
            name = extra.method
            if name not in found or extra.value < found[name].value:
                found[name] = extra
        return found

    t0 = time.perf_counter()
    cpu0 = time.process_time()
    result = grid_bounds(cells, cell_bounds)
    wall, cpu = time.perf_counter() - t0, time.process_time() - cpu0
    target = [p for p in cells if p in pub and pub[p][1] is not None]
    reached, above, below, lp_reached, unsound = [], [], [], [], []
    kinds: dict[str, int] = {}
    for p in target:
        lo, up, src = pub[p]
        mine = result[p].upper.value
        lp = result[p].bounds.get("delsarte-lp")
        if lp is not None and lp.usable and lp.value <= up:
            lp_reached.append(p)
        if lo is not None and mine < lo:
            unsound.append((p, mine, lo))
        if mine == up:
            reached.append(p)
            kinds[result[p].upper.method] = kinds.get(result[p].upper.method, 0) + 1
        elif mine > up:
            above.append((p, mine, up, "uncertain" in src))
        else:
            below.append((p, mine, up, "uncertain" in src))
    certain = [p for p in target if "uncertain" not in pub[p][2]]
    print(f"binary n=4..{nmax}, d=3..10: {len(cells)} cells, {len(target)} with a published "
          f"upper value ({len(certain)} not marked uncertain); wall {wall:.0f} s, CPU {cpu:.0f} s")
    print(f"  reach the published upper value: {len(reached)} of {len(target)} "
          f"({sum(1 for p in reached if p in certain)} of {len(certain)} certain rows)")
    met = reached + [b[0] for b in below]
    print(f"  at or below it (a bound below the recalled value meets it too): {len(met)} of "
          f"{len(target)} ({sum(1 for p in met if p in certain)} of {len(certain)} certain rows)")
    print(f"  peer: the plain Delsarte LP alone reaches {len(lp_reached)}")
    print("  winning bound in the reached cells: "
          + ", ".join(f"{k} {v}" for k, v in sorted(kinds.items(), key=lambda kv: -kv[1])))
    print(f"  below a published LOWER value (must be none): {unsound}")
    print(f"  below the published upper value ({len(below)}; the recalled value is weaker):")
    for p, mine, up, unc in below:
        print(f"    A({p.n},{p.d}) <= {mine} (published {up}{', uncertain' if unc else ''}) "
              f"by {result[p].upper.method}")
    print(f"  still above the published value ({len(above)}):")
    for p, mine, up, unc in sorted(above, key=lambda r: (r[0].d, r[0].n)):
        print(f"    A({p.n},{p.d}): {mine} vs {up} (+{mine - up}, x{mine / up:.3f})"
              f"{' uncertain' if unc else ''} by {result[p].upper.method}")


def qary(nmax: int, qs: tuple[int, ...] = (3, 4)) -> None:
    from codesearch.bounds import all_bounds

    pub = published("published_qary.csv")
    for q in qs:
        better, rows = 0, []
        total = 0.0
        for n in range(3, nmax + 1):
            for d in range(3, n + 1):
                p = Params(q, n, d)
                t0 = time.perf_counter()
                found = all_bounds(p, sdp=True)
                sec = time.perf_counter() - t0
                total += sec
                sdp = found.get("qary-three-point-sdp")
                lp = min(b.value for k, b in found.items()
                         if k.startswith("delsarte") and b.usable)
                own = min(b.value for b in found.values() if b.usable)
                lo, up, _src = pub.get(p, (None, None, ""))
                if lo is not None and own < lo:
                    rows.append(f"  UNSOUND A_{q}({n},{d}) <= {own} < published lower {lo}")
                if sdp is not None and sdp.usable and sdp.value < lp:
                    better += 1
                    rows.append(f"  A_{q}({n},{d}): sdp {sdp.value} < lp {lp}"
                                + (f"  published {lo}..{up}" if up or lo else "")
                                + f"  ({sec:.1f} s)")
                elif up is not None and own > up:
                    rows.append(f"  A_{q}({n},{d}): {own} above published {up}")
        print(f"q={q}, n <= {nmax}: the three-point SDP beats the LP in {better} cells "
              f"(total {total:.0f} s)")
        print("\n".join(rows))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--binary", action="store_true")
    ap.add_argument("--qary", action="store_true")
    ap.add_argument("--nmax", type=int, default=28)
    ap.add_argument("--qnmax", type=int, default=12)
    ap.add_argument("--certificates", metavar="DIR",
                    help="also offer the bounds of the certificates stored in DIR (each "
                    "re-checked first), e.g. benchmarks/certificates")
    args = ap.parse_args()
    if args.binary or not args.qary:
        binary(args.nmax, args.certificates)
    if args.qary or not args.binary:
        qary(args.qnmax)


if __name__ == "__main__":
    main()
