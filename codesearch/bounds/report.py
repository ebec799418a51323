"""Text and JSON output of the ``codesearch bounds`` command (kept out of the CLI shell).

Problem
-------
Turn a grid of cells into lines: one JSON object per cell, or an aligned plain-text table
naming the winning bound, and optionally write the LP certificate of a single cell.

References
----------
None (presentation only; the bounds are in :mod:`codesearch.bounds`).
"""

from __future__ import annotations

import json
import sys
from typing import Iterable, TextIO

from codesearch.errors import ParameterError
from codesearch.model import Params

__all__ = ["cells", "run_bounds_command", "format_value", "finite_points", "run_plot_command"]

_SHORT = {
    "singleton": "singleton",
    "hamming": "hamming",
    "plotkin": "plotkin",
    "johnson": "johnson",
    "elias": "elias",
    "delsarte-lp": "lp",
    "delsarte-lp-plus": "lp+",
    "lp-odd-size": "lp-odd",
    "distance-enumeration": "lp-int",
    "three-point-sdp": "sdp",
    "qary-three-point-sdp": "sdp-q",
}


def _largest(values: Iterable[int]) -> int | None:
    """Largest value, O(1) for a range (a typo like 1..10**9 must fail fast)."""
    if isinstance(values, range):
        return max(values[0], values[-1]) if len(values) else None
    values = list(values)
    return max(values) if values else None


def cells(q: int, ns: Iterable[int], ds: Iterable[int]) -> list[Params]:
    """Valid cells of the grid ``ns x ds`` (cells with d > n are skipped in a range).

    Raises
    ------
    ParameterError
        If no cell of the grid is valid (the message names the reason for the first one).
    """
    from codesearch.bounds import MAX_N

    top = _largest(ns)
    if top is not None and top > MAX_N:
        raise ParameterError(f"length n={top} is beyond the bounds limit {MAX_N}")
    if isinstance(ds, range) and len(ds) > 1 and top is not None:
        # Distances beyond the longest length can never form a cell.
        ds = range(ds.start, max(ds.start + 1, min(ds.stop, top + 1)))
    ns, ds = list(ns), list(ds)
    out, first_error = [], None
    for n in ns:
        for d in ds:
            try:
                out.append(Params(q, n, d))
            except ParameterError as exc:
                first_error = first_error or exc
                if len(ns) == 1 and len(ds) == 1:
                    raise
    if not out:
        raise first_error or ParameterError("empty grid")
    return out


def format_value(v: int) -> str:
    """Exact, always (a float rounding could show less than was proved)."""
    return str(v)


def run_bounds_command(q: int, ns: Iterable[int], ds: Iterable[int], *, as_json: bool = False,
                       lp: bool = True, lp_fallback: bool = True, sdp: bool = False,
                       certificate: str | None = None, relations: bool = True,
                       out: TextIO | None = None) -> int:
    """Print the bounds of a grid of cells; returns the exit status.

    The cell relations (:func:`codesearch.bounds.grid_bounds`) are applied across the grid
    unless ``relations`` is False. ``certificate``: file name for the certificate of the
    upper bound (whatever its kind); for a grid it must contain ``{n}`` and ``{d}`` (one file
    per cell).
    """
    from codesearch.bounds import MAX_N, all_bounds, certificate_of, grid_bounds, summarize

    out = out or sys.stdout
    grid = cells(q, ns, ds)
    if any(p.n > MAX_N for p in grid):
        raise ParameterError(f"length beyond the bounds limit {MAX_N}")
    if certificate is not None and len(grid) != 1 and not (
            "{n}" in certificate and "{d}" in certificate):
        raise ParameterError("--certificate for a grid needs {n} and {d} in the file name")
    result = grid_bounds(grid, lambda p: all_bounds(p, sdp=sdp, lp=lp, lp_fallback=lp_fallback),
                         relations=relations)
    summaries = {p: summarize(p, c.bounds, c.upper, c.cites) for p, c in result.items()}
    if as_json:
        for p in grid:
            print(json.dumps(summaries[p]), file=out)
    else:
        _print_table(grid, summaries, lp=lp, sdp=sdp, out=out)
    if certificate is not None:
        for p in grid:
            cert = certificate_of(result[p], result)
            if cert is None:
                if len(grid) == 1:
                    raise ParameterError(f"the upper bound of {p} is the closed form "
                                         f"{result[p].upper.method}: no certificate file")
                continue
            with open(certificate.format(n=p.n, d=p.d, q=p.q), "w", encoding="utf-8") as fh:
                json.dump(cert, fh, indent=1)
                fh.write("\n")
    return 0


def _print_table(grid: list[Params], summaries: dict, *, lp: bool, sdp: bool,
                 out: TextIO) -> None:
    names = [k for k in _SHORT if (lp or not k.startswith(("delsarte", "dist", "lp-")))
             and (sdp or "sdp" not in k)]
    header = (["q", "n", "d", "upper", "by", "kind", "gv"] + [_SHORT[k] for k in names]
              + ["griesmer*"])
    rows, notes = [], []
    for p in grid:
        s = summaries[p]
        row = [str(p.q), str(p.n), str(p.d), str(s["upper"]), s["upper_method"],
               s["upper_kind"], format_value(s["gv"])]
        for k in names:
            v = s["bounds"].get(k)
            row.append("-" if v is None else format_value(v))
        g = s["linear"].get("griesmer")
        row.append("-" if g is None else format_value(g))
        rows.append(row)
        if "relation" in s:
            cited = ", ".join(f"A({c[1]},{c[2]}) <= {c[3]}" for c in s["relation"]["cites"])
            notes.append(f"  A({p.n},{p.d}) <= {s['upper']}: {s['relation']['rule']} "
                         f"from {cited}")
    widths = [max(len(r[i]) for r in [header] + rows) for i in range(len(header))]
    for r in [header] + rows:
        print("  ".join(c.rjust(w) for c, w in zip(r, widths)), file=out)
    print("* griesmer bounds linear codes only; gv is an existential lower bound; "
          "'-' = not applicable or not certified", file=out)
    if notes:
        print("relations between cells of the grid:", file=out)
        for line in notes:
            print(line, file=out)


def finite_points(q: int, ns: Iterable[int], *, lp: bool = True) -> list[tuple[int, int, int, int]]:
    """(n, d, gv, upper) for every cell of the given lengths (the plot's finite points)."""
    from codesearch.bounds import gv_lower_bound, upper_bound

    from codesearch.bounds import MAX_N

    top = _largest(ns)
    if top is not None and top > MAX_N:
        raise ParameterError(f"length n={top} is beyond the bounds limit {MAX_N}")
    out = []
    for n in ns:
        for d in range(1, n + 1):
            p = Params(q, n, d)
            out.append((n, d, gv_lower_bound(p), upper_bound(p, lp=lp).value))
    return out


def run_plot_command(q: int, ns: Iterable[int] | None, *, out: str, lp: bool = True) -> str:
    """Draw the rate-distance picture (with the cells of lengths ``ns``) into ``out``."""
    from codesearch.plot import save_rate_distance

    Params(q, 1, 1)  # validates q with the usual one-line error
    points = finite_points(q, ns, lp=lp) if ns is not None else None
    return save_rate_distance(out, q, points)
