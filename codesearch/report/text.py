"""Plain-text renderings of results for the command line: the check report of a code, the
one-line summaries of ``find`` and ``table``, and the grid of bounds.

Every function returns text; only :mod:`codesearch.cli` prints. The JSON forms are the
objects' own ``to_json()`` / ``to_dict()``.
"""

from __future__ import annotations

from typing import Any, Mapping, Sequence

__all__ = ["format_value", "exact_text", "FULL_DIGITS", "ABBREVIATION_NOTE", "code_report",
           "find_summary", "table_summary", "bounds_table",
           "BOUND_LABELS"]

#: Column label of each bound in :func:`bounds_table`, in column order (a bound not listed
#: gets a column under its own name after these).
BOUND_LABELS = {
    "singleton": "singleton",
    "hamming": "hamming",
    "plotkin": "plotkin",
    "johnson": "johnson",
    "elias": "elias",
    "delsarte-lp": "lp",
    "delsarte-lp-plus": "lp+",
    "lp-odd-size": "lp-odd",
    "lp-size-mod-4": "lp-mod4",
    "distance-enumeration": "lp-int",
    "three-point-sdp": "sdp",
    "qary-three-point-sdp": "sdp-q",
    "four-point-sdp": "sdp4",
    "four-point-size-cut": "sdp4-cut",
}


#: Values of more digits than this are abbreviated in the text columns (marked ``~``).
FULL_DIGITS = 15
#: The footnote every table with an abbreviated value carries.
ABBREVIATION_NOTE = ("~ = abbreviated to 5 significant digits, rounded away from what was "
                     "proved (up for upper bounds, down for gv); --json prints every value "
                     "exactly")


def exact_text(v: int) -> str:
    """The decimal digits of ``v``, exactly, however long (Python's own ``str`` refuses past
    4300 digits; q^n reaches 6375 digits at q = 36, n = 4096)."""
    if v < 0:
        return "-" + exact_text(-v)
    if v.bit_length() < 10_000:
        return str(v)
    k = v.bit_length() * 3 // 20  # about half the digits
    hi, lo = divmod(v, 10**k)
    return exact_text(hi) + exact_text(lo).rjust(k, "0")


def _digits(v: int) -> int:
    """Number of decimal digits of ``v >= 0``, without converting it to a string."""
    e = max(int(v.bit_length() * 0.30102999566398120) - 1, 0)
    while 10 ** (e + 1) <= v:
        e += 1
    return e + 1


def format_value(v: int, *, round_up: bool = True) -> str:
    """A value for a text column: exact up to :data:`FULL_DIGITS` digits, else ``~m.mmmmeE``
    with five significant digits rounded up (``round_up``, for upper bounds) or down (for
    lower bounds), so the abbreviation never claims more than was proved. Tables that show
    an abbreviated value say so (:data:`ABBREVIATION_NOTE`)."""
    if v < 0 or _digits(v) <= FULL_DIGITS:
        return exact_text(v)
    e = _digits(v) - 1
    lead, rest = divmod(v, 10 ** (e - 4))
    if round_up and rest:
        lead += 1
        if lead == 10**5:
            lead, e = 10**4, e + 1
    digits = str(lead)
    return f"~{digits[0]}.{digits[1:]}e{e}"


def _aligned(rows: Sequence[Sequence[str]]) -> list[str]:
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return ["  ".join(c.rjust(w) for c, w in zip(r, widths)) for r in rows]


def code_report(report: Any, file: str) -> str:
    """The ``check`` report of a code (a :class:`codesearch.verify.CodeReport`)."""
    if report.distance_distribution is None:
        dist = "not computed (minimum distance by information sets)"
    else:
        dist = ", ".join(f"{i}:{c}" for i, c in enumerate(report.distance_distribution) if c)
    rows = [
        ("file", file),
        ("length n", report.n),
        ("alphabet q", report.q),
        ("size M", report.size),
        ("min distance", "-" if report.min_distance is None else report.min_distance),
        ("distance distribution", dist or "-"),
        ("duplicate pairs", report.duplicates),
    ]
    if report.linear is None:
        rows.append(("linear", "not tested (q is not prime)"))
    elif report.linear:
        rows.append(("linear", f"yes, dimension {report.dimension}"))
        wd = ("not computed" if report.weight_distribution is None else
              ", ".join(f"{i}:{c}" for i, c in enumerate(report.weight_distribution) if c))
        rows.append(("weight distribution", wd))
    else:
        rows.append(("linear", "no"))
    if report.claimed_d is not None:
        rows.append((f"claim d >= {report.claimed_d}", "holds" if report.valid else "FAILS"))
    width = max(len(k) for k, _ in rows)
    return "\n".join(f"{key:<{width}}  {value}" for key, value in rows)


def find_summary(result: Any) -> str:
    """One line for a :class:`~codesearch.results.SearchResult`."""
    # an exhaustive search leaves nothing to re-check unless it wrote a refutation bundle;
    # a code that meets a certified bound is optimal by that bound, not by the search
    by = str(result.settings.get("upper_method") or "")
    how = (f"optimal: meets the {by[len('bound:'):]} bound" if by.startswith("bound:")
           else "proved optimal by exhaustive search")
    verdict = how if result.optimal else (
        f"{result.status.value}; upper bound {result.upper}")
    return (f"{result.params}: code of size {result.size} ({verdict}) by {result.method} in "
            f"{result.seconds:.2f} s, {result.nodes} nodes")


def table_summary(summary: Any, store: str) -> str:
    """One line for a :class:`~codesearch.batch.TableSummary`."""
    return (f"{summary.ran} cells run, {summary.skipped} skipped, {summary.failed} failed, "
            f"{summary.derived_codes} codes and {summary.derived_bounds} bounds derived in "
            f"{summary.seconds:.1f} s; store {store}")


def bounds_table(summaries: Sequence[Mapping[str, Any]], *, lp: bool = True,
                 sdp: bool = False) -> str:
    """The aligned table of :func:`codesearch.bounds.summarize` rows, one line a cell.

    ``kind`` is the certificate kind of the upper bound (``theorem`` for a closed form);
    bounds derived from other cells of the grid are listed under the table with the rule and
    the cells they cite.
    """
    names = [k for k in BOUND_LABELS if (lp or not k.startswith(("delsarte", "dist", "lp-")))
             and (sdp or "sdp" not in k)]
    names += sorted({k for s in summaries for k in s["bounds"]
                     if ":" not in k} - set(names))
    header = ["q", "n", "d", "upper", "by", "kind", "gv"] + [BOUND_LABELS.get(k, k)
                                                              for k in names]
    rows = [header + ["griesmer*"]]
    notes = []
    for s in summaries:
        row = [str(s["q"]), str(s["n"]), str(s["d"]), format_value(s["upper"]),
               s["upper_method"], s.get("upper_kind", "-"),
               format_value(s["gv"], round_up=False)]
        row += ["-" if s["bounds"].get(k) is None else format_value(s["bounds"][k])
                for k in names]
        g = s["linear"].get("griesmer")
        rows.append(row + ["-" if g is None else format_value(g)])
        if "relation" in s:
            cited = ", ".join(f"A({c[1]},{c[2]}) <= {exact_text(c[3])}"
                              for c in s["relation"]["cites"])
            notes.append(f"  A({s['n']},{s['d']}) <= {exact_text(s['upper'])}: "
                         f"{s['relation']['rule']} from {cited}")
    lines = _aligned(rows) + [
        "* griesmer bounds linear codes only; gv is an existential lower bound; "
        "'-' = not applicable or not certified"]
    if any(c.startswith("~") for r in rows[1:] for c in r):
        lines.append(ABBREVIATION_NOTE)
    if notes:
        lines += ["relations between cells of the grid:"] + notes
    return "\n".join(lines)
