"""Benchmark of the construction library: build + verify times, and the table cells it reaches.

Run from the repository root: ``python benchmarks/bench_constructions.py [--repeats 3]``.
Writes nothing; the saved output is benchmarks/results_constructions.md.

1. Every family instance with n <= 32 (binary) and n <= 16 (q = 3, 4, 5) is built from its
   definition and verified (codesearch.verify), ``--repeats`` times; the median per instance
   is reported per family (largest and total). Instances with more than 2^22 words: linear ones
   are verified from the generator (information sets for prime q), nonlinear ones are refused
   by the cap and listed. Peer: listing the span of the same generator with numpy
   (itertools product @ G mod q) for the linear codes of at most 2^16 words.
2. Using the published lower values in data/, counts the cells of the binary grid
   n = 4..28, d = 3..10 and of q = 3, 4, 5 (n <= 12, d >= 3) where the construction library
   alone reaches the published value (the best candidate is then built and verified), and
   prints the cells still short.
"""

from __future__ import annotations

import argparse
import csv
import itertools
import statistics
import sys
import time
from collections import defaultdict
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from codesearch.constructions import candidates, family_instances, build_family, table  # noqa
from codesearch.errors import ParameterError  # noqa: E402
from codesearch.model import MAX_LISTED_WORDS, LinearCode, Params  # noqa: E402
from codesearch.verify import prepare  # noqa: E402


def published() -> dict[tuple[int, int, int], int]:
    out = {}
    for name in ("published_binary.csv", "published_qary.csv"):
        path = ROOT / "data" / name
        if not path.exists():
            print(f"(missing {path})")
            continue
        rows = [line for line in path.read_text().splitlines() if not line.startswith("#")]
        for row in csv.DictReader(rows):
            out[(int(row["q"]), int(row["n"]), int(row["d"]))] = int(row["lower"])
    return out


def numpy_span_seconds(code: LinearCode) -> float:
    t = time.perf_counter()
    g = code.generator.astype(np.int64)
    coeffs = np.array(list(itertools.product(range(code.q), repeat=code.k)), dtype=np.int64)
    (coeffs @ g) % code.q
    return time.perf_counter() - t


def bench_families(repeats: int) -> None:
    print("## Build + verify per family (median of repeats per instance)\n")
    print(f"repeats: {repeats}; caps: nonlinear codes listed up to {MAX_LISTED_WORDS} words\n")
    per_family: dict[str, list[tuple[float, str, int]]] = defaultdict(list)
    refused = []
    ratios = []
    grids = [(2, 32), (3, 16), (4, 16), (5, 16)]
    for q, nmax in grids:
        for inst in family_instances(q, nmax):
            if not inst.linear and inst.size > MAX_LISTED_WORDS:
                refused.append(inst)
                continue
            if inst.linear and q > 2 and q not in (3, 5) and inst.size > 1 << 24:
                refused.append(inst)
                continue
            times = []
            for _ in range(repeats):
                t = time.perf_counter()
                built = build_family(inst.family, **inst.kwargs)
                times.append(time.perf_counter() - t)
            med = statistics.median(times)
            per_family[inst.family].append((med, inst.label, inst.size))
            if isinstance(built.code, LinearCode) and inst.q in (2, 3, 5) and inst.size <= 1 << 16 \
                    and inst.size >= 1 << 10:
                ratios.append(med / max(numpy_span_seconds(built.code), 1e-6))
    print("| family | instances | slowest (s) | slowest instance | words | total (s) |")
    print("|---|---:|---:|---|---:|---:|")
    for fam, rows in sorted(per_family.items()):
        worst = max(rows)
        print(f"| {fam} | {len(rows)} | {worst[0]:.3f} | {worst[1]} | {worst[2]} | "
              f"{sum(r[0] for r in rows):.2f} |")
    over = [(t, lab, s) for rows in per_family.values() for (t, lab, s) in rows if t > 1.0]
    print(f"\ninstances over 1 s: {len(over)}")
    for t, lab, s in sorted(over, reverse=True):
        print(f"- {lab}: {t:.2f} s, {s} words" + (" (more than 2^22 words)" if s > 1 << 22 else ""))
    if refused:
        print(f"\nnot built (more than the cap of listed words): "
              + ", ".join(f"{i.label} ({i.size} words)" for i in refused))
    if ratios:
        print(f"\nlinear codes of 2^10..2^16 words: build+verify / numpy span listing, median "
              f"ratio {statistics.median(ratios):.2f} over {len(ratios)} codes")


def bench_reach(values: dict) -> None:
    print("\n## Published lower values reached by the construction library alone\n")
    t = time.perf_counter()
    for q in (2, 3, 4, 5):
        table(q)
    print(f"tables for q = 2, 3, 4, 5 (n <= 32): {time.perf_counter() - t:.2f} s\n")
    grids = {"binary n=4..28, d=3..10": [(2, n, d) for n in range(4, 29) for d in range(3, 11)
                                          if d <= n]}
    for q in (3, 4, 5):
        grids[f"q={q}, n<=12, d>=3"] = [(q, n, d) for n in range(3, 13) for d in range(3, n + 1)]
    build_time = []
    for name, cells in grids.items():
        known = [c for c in cells if c in values]
        reached, short, plotkin_short = 0, [], []
        per_cell = []
        for cell in known:
            t0 = time.perf_counter()
            cs = candidates(Params(*cell))
            per_cell.append(time.perf_counter() - t0)
            got = cs[0].size if cs else 0
            if got >= values[cell]:
                reached += 1
                c0 = next((c for c in cs if c.linear or c.size <= MAX_LISTED_WORDS), None)
                if c0 is not None and c0.size >= values[cell]:
                    t1 = time.perf_counter()
                    c0.build()
                    build_time.append((time.perf_counter() - t1, cell, c0.size))
            else:
                short.append((cell, got, values[cell], cs[0].provenance if cs else "-"))
                if cell[0] == 2 and 2 * cell[2] > cell[1]:
                    plotkin_short.append(cell)
        print(f"### {name}\n")
        print(f"cells with a published value: {len(known)} of {len(cells)}; reached: {reached} "
              f"({100 * reached / max(1, len(known)):.0f}%); lookup per cell: median "
              f"{1000 * statistics.median(per_cell):.2f} ms, max {1000 * max(per_cell):.1f} ms")
        if name.startswith("binary"):
            pl = [c for c in known if 2 * c[2] > c[1]]
            print(f"Plotkin-range cells (2d > n): {len(pl)}, short: {len(plotkin_short)}")
        print()
        if short:
            print("| cell | library | published | best route |")
            print("|---|---:|---:|---|")
            for cell, got, want, prov in short:
                print(f"| A_{cell[0]}({cell[1]},{cell[2]}) | {got} | {want} | {prov} |")
            print()
    slow = sorted(build_time, reverse=True)[:5]
    print(f"building + verifying the best route of every reached cell: "
          f"{sum(t for t, _, _ in build_time):.1f} s in total; slowest: "
          + ", ".join(f"A_{c[0]}({c[1]},{c[2]}) {t:.2f} s ({s} words)" for t, c, s in slow))


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeats", type=int, default=3)
    args = ap.parse_args()
    prepare()
    print("# Construction library benchmark\n")
    import platform
    print(f"python {platform.python_version()}, numpy {np.__version__}, "
          f"{time.strftime('%Y-%m-%d')}\n")
    bench_families(args.repeats)
    bench_reach(published())


if __name__ == "__main__":
    main()
