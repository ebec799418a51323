"""Reports of the stored table: Markdown, CSV, LaTeX, HTML, JSON, export and plot.

Part of the presentation layer (:mod:`codesearch.report`).

Everything here reads the results store only; nothing runs a search or a bound. Per cell the
report gives the best code size (lower), the best certified upper bound (upper), the gap, where
each came from (method, time, certificate kind), and the comparison with imported published
values, which stay apart from what this tool proved:

``matched``   our lower equals the best published lower and our upper the best published upper;
``improved``  at least one side is better than published (and neither is worse);
``short``     at least one side falls short of the published value.
"""

from __future__ import annotations

import base64
import csv
import html
import io
import json
import math
from dataclasses import dataclass, fields
from typing import Any, Callable, Sequence

from codesearch.errors import InputError
from codesearch.model import Params
from codesearch.store import CellSummary

__all__ = [
    "FORMATS",
    "CellRow",
    "collect",
    "render",
    "write_report",
    "export_code",
    "plot_store",
]

FORMATS = ("md", "csv", "tex", "html", "json")
#: Codes larger than this are not inlined in the HTML report (export them instead).
MAX_INLINE_WORDS = 4096
#: Row ids and provenance stay out of the JSON report.
_ROW_IDS = ("code_id", "bound_id", "lower_provenance")


@dataclass(frozen=True)
class CellRow(CellSummary):
    """One cell of the report: what the store holds (as :class:`~codesearch.store.CellSummary`,
    but ``lower`` is None when no code is stored) and the imported published values."""

    published_lower: int | None = None
    published_upper: int | None = None
    published_source: str | None = None
    compare: str | None = None

    @property
    def exact(self) -> bool:
        return self.lower is not None and self.upper is not None and self.lower == self.upper

    @property
    def text(self) -> str:
        """``16`` for an exact entry, ``12-16`` otherwise, ``?`` for an unknown side."""
        if self.exact:
            return str(self.lower)
        lo = "?" if self.lower is None else str(self.lower)
        up = "?" if self.upper is None else str(self.upper)
        return f"{lo}-{up}"

    @property
    def mark(self) -> str:
        """``=`` matched, ``+`` improved, ``<`` short vs published; empty when none imported."""
        return {"matched": "=", "improved": "+", "short": "<"}.get(self.compare or "", "")

    def to_json(self) -> dict[str, Any]:
        out = {f.name: getattr(self, f.name) for f in fields(self) if f.name not in _ROW_IDS}
        out["exact"] = self.exact
        return out


def _compare(lower: int | None, upper: int | None, pl: int | None, pu: int | None) -> str | None:
    sides = []
    if pl is not None:
        lo = lower or 0
        sides.append("improved" if lo > pl else "matched" if lo == pl else "short")
    if pu is not None:
        sides.append("short" if upper is None or upper > pu else
                     "matched" if upper == pu else "improved")
    if not sides:
        return None
    if "short" in sides:
        return "short"
    return "improved" if "improved" in sides else "matched"


def collect(store: Any, q: int | None = None) -> list[CellRow]:
    """The report rows: every cell with stored or imported values, sorted by (q, n, d)."""
    cells = sorted(set(store.cells(q)) | set(store.published_cells(q)))
    rows = []
    for p in cells:
        s = store.summary(p)
        pubs = store.published(p)
        lows = [r.lower for r in pubs if r.lower is not None]
        ups = [r.upper for r in pubs if r.upper is not None]
        pl = max(lows) if lows else None
        pu = min(ups) if ups else None
        lower = s.lower if s.code_id is not None else None
        stored = {f.name: getattr(s, f.name) for f in fields(CellSummary)}
        rows.append(CellRow(
            **{**stored, "lower": lower}, published_lower=pl, published_upper=pu,
            published_source="; ".join(sorted({r.source for r in pubs})) or None,
            compare=_compare(lower, s.upper, pl, pu) if pubs else None,
        ))
    return rows


def _layout(rows: Sequence[CellRow]
            ) -> dict[int, tuple[list[int], list[int], dict[tuple[int, int], CellRow]]]:
    """Per alphabet: the lengths and distances that occur, and the rows by ``(n, d)``."""
    out: dict[int, Any] = {}
    for r in rows:
        ns, ds, cells = out.setdefault(r.q, (set(), set(), {}))
        ns.add(r.n)
        ds.add(r.d)
        cells[(r.n, r.d)] = r
    return {q: (sorted(ns), sorted(ds), cells) for q, (ns, ds, cells) in sorted(out.items())}


def _name(q: int) -> str:
    return "A(n,d)" if q == 2 else f"A_{q}(n,d)"


# ------------------------------------------------------------------------------ renderers
def render_md(rows: Sequence[CellRow]) -> str:
    out = []
    for q, (ns, ds, cells) in _layout(rows).items():
        out.append(f"### {_name(q)}, q = {q}\n")
        out.append("| n \\ d | " + " | ".join(str(d) for d in ds) + " |")
        out.append("|---:|" + "---:|" * len(ds))
        for n in ns:
            line = _entries(cells, n, ds, lambda r: ("**" + r.text + "**" if r.exact
                                                     else r.text) + r.mark)
            out.append(f"| {n} | " + " | ".join(line) + " |")
        out.append("")
    out.append(_legend())
    return "\n".join(out) + "\n"


def _entries(cells: dict[tuple[int, int], CellRow], n: int, ds: Sequence[int],
             proven: Callable[[CellRow], str]) -> list[str]:
    """The entries of row n: blank, ``[published]`` only, or ``proven(row)``."""
    out = []
    for d in ds:
        r = cells.get((n, d))
        if r is None:
            out.append("")
        elif r.lower is None and r.upper is None:
            out.append(f"[{_pub_text(r)}]")
        else:
            out.append(proven(r))
    return out


def _tex_entry(r: CellRow) -> str:
    t = r"\textbf{%s}" % r.text if r.exact else r.text.replace("-", "--")
    return t + (f"$^{{{r.mark}}}$" if r.mark else "")


def _pub_text(r: CellRow) -> str:
    if r.published_lower is None and r.published_upper is None:
        return "?"
    lo = "?" if r.published_lower is None else str(r.published_lower)
    up = "?" if r.published_upper is None else str(r.published_upper)
    return lo if lo == up else f"{lo}-{up}"


def _legend() -> str:
    return ("Entries are proven by this tool: a single number is exact (bold), `lo-up` gives the "
            "best code found and the best certified upper bound. `[x]` is an imported published "
            "value only. Against imported values: `=` matched, `+` improved, `<` short.")


def render_csv(rows: Sequence[CellRow]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["q", "n", "d", "lower", "upper", "exact", "gap", "lower_method", "upper_method",
                "upper_kind", "published_lower", "published_upper", "published_source",
                "compare"])
    for r in rows:
        gap = "" if r.upper is None else r.upper - (r.lower or 0)
        w.writerow([r.q, r.n, r.d, _e(r.lower), _e(r.upper), int(r.exact), gap,
                    _e(r.lower_method), _e(r.upper_method), _e(r.upper_kind),
                    _e(r.published_lower), _e(r.published_upper), _e(r.published_source),
                    _e(r.compare)])
    return buf.getvalue()


def _e(v: Any) -> Any:
    return "" if v is None else v


def render_json(rows: Sequence[CellRow]) -> str:
    return json.dumps([r.to_json() for r in rows], indent=1) + "\n"


def _tex_escape(s: str) -> str:
    return s.replace("\\", r"\textbackslash{}").replace("_", r"\_").replace("&", r"\&").replace(
        "%", r"\%").replace("#", r"\#")


def render_tex(rows: Sequence[CellRow]) -> str:
    out = ["% generated by codesearch report; needs no package beyond LaTeX itself"]
    for q, (ns, ds, cells) in _layout(rows).items():
        out.append(r"\begin{table}[ht]\centering")
        out.append(r"\begin{tabular}{r|" + "r" * len(ds) + "}")
        out.append(r"$n \backslash d$ & " + " & ".join(str(d) for d in ds) + r" \\ \hline")
        for n in ns:
            line = _entries(cells, n, ds, _tex_entry)
            out.append(f"{n} & " + " & ".join(line) + r" \\")
        out.append(r"\end{tabular}")
        out.append(r"\caption{Bounds on $%s$ for $q=%d$: bold entries are exact, $a$--$b$ gives "
                   r"the best code found and the best proven upper bound; marks compare with "
                   r"imported values ($=$ matched, $+$ improved, $<$ short).}" %
                   (_tex_escape(_name(q)).replace("A\\_", "A_"), q))
        out.append(r"\end{table}")
    return "\n".join(out) + "\n"


def _colour(r: CellRow) -> str:
    """Background colour by gap: green exact, then yellow to red as upper/lower grows."""
    if r.exact:
        return "#7fd07f"
    if r.lower is None or r.upper is None or r.lower == 0:
        return "#dddddd"
    ratio = math.log(r.upper / r.lower) if r.upper > r.lower else 0.0
    t = min(ratio / math.log(4.0), 1.0)  # a factor 4 or more is full red
    red, green = 240, int(230 - 150 * t)
    return f"#{red:02x}{green:02x}{int(120 - 60 * t):02x}"


def _code_download(store: Any, r: CellRow) -> str:
    from codesearch.codefile import format_code_text

    if r.code_id is None:
        return ""
    if (r.lower or 0) > MAX_INLINE_WORDS:  # large codes are never decoded for the page
        return (f'<span class="big">{r.lower} words: <code>codesearch export {r.n} {r.d} '
                f'--q {r.q}</code></span>')
    p, code = store.get_code(r.code_id)
    if code.size > MAX_INLINE_WORDS:
        return (f'<span class="big">{code.size} words: <code>codesearch export {r.n} {r.d} '
                f'--q {r.q}</code></span>')
    text = format_code_text(code, r.d, {"method": r.lower_method})
    b64 = base64.b64encode(text.encode()).decode()
    fname = f"A{r.q}-{r.n}-{r.d}.code"
    return (f'<a class="dl" download="{fname}" href="data:text/plain;base64,{b64}">'
            f'codewords ({code.size})</a>')


def render_html(rows: Sequence[CellRow], store: Any, title: str = "codesearch table") -> str:
    """One static HTML file: gap by colour, per-cell provenance and inline codewords."""
    e = html.escape
    parts = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{e(title)}</title>",
        "<style>body{font-family:sans-serif;margin:1.5em}table{border-collapse:collapse}"
        "td,th{border:1px solid #999;padding:2px 5px;text-align:right;vertical-align:top;"
        "font-size:13px}th{background:#eee}td details{font-size:11px;text-align:left}"
        "td .v{font-weight:bold;font-size:14px}.legend span{padding:0 6px;margin-right:6px}"
        "</style></head><body>", f"<h1>{e(title)}</h1>",
        '<p class="legend">Gap by colour: <span style="background:#7fd07f">exact</span>'
        '<span style="background:#f0e678">small gap</span>'
        '<span style="background:#f0503c">factor 4 or more</span>'
        '<span style="background:#dddddd">unknown</span>. Values are proven by this tool; '
        "[x] is an imported published value only. Marks vs published: = matched, + improved, "
        "&lt; short.</p>",
    ]
    for q, (ns, ds, cells) in _layout(rows).items():
        parts.append(f'<h2>{e(_name(q))}, q = {q}</h2><table id="table-q{q}">')
        parts.append("<tr><th>n \\ d</th>" + "".join(f"<th>{d}</th>" for d in ds) + "</tr>")
        for n in ns:
            parts.append(f"<tr><th>{n}</th>")
            for d in ds:
                r = cells.get((n, d))
                if r is None:
                    parts.append("<td></td>")
                    continue
                attrs = (f'id="c-{q}-{n}-{d}" data-lower="{_e(r.lower)}" '
                         f'data-upper="{_e(r.upper)}" data-exact="{int(r.exact)}" '
                         f'data-compare="{_e(r.compare)}"')
                if r.lower is None and r.upper is None:
                    parts.append(f'<td {attrs} style="background:#ffffff">'
                                 f'<span class="v">[{e(_pub_text(r))}]</span></td>')
                    continue
                prov = [f"lower: {e(r.lower_method or '-')}"
                        + (f" ({r.lower_seconds:.2f} s)" if r.lower_seconds is not None else ""),
                        f"upper: {e(r.upper_method or '-')}"
                        + (f" [{e(r.upper_kind)}]" if r.upper_kind else "")
                        + (f" ({r.upper_seconds:.2f} s)" if r.upper_seconds is not None else "")]
                if r.published_source:
                    prov.append(f"published: {e(_pub_text(r))} ({e(r.published_source)}), "
                                f"{e(r.compare or '')}")
                dl = _code_download(store, r)
                parts.append(
                    f'<td {attrs} style="background:{_colour(r)}"><span class="v">'
                    f"{e(r.text)}{e(r.mark)}</span><details><summary>info</summary>"
                    + "<br>".join(prov) + (f"<br>{dl}" if dl else "") + "</details></td>"
                )
            parts.append("</tr>")
        parts.append("</table>")
    parts.append("</body></html>")
    return "\n".join(parts) + "\n"


def render(store: Any, fmt: str, q: int | None = None) -> str:
    """The report of ``store`` in format ``fmt`` (one of :data:`FORMATS`)."""
    if fmt not in FORMATS:
        raise InputError(f"unknown report format {fmt!r}; choose from {', '.join(FORMATS)}")
    rows = collect(store, q)
    if fmt == "md":
        return render_md(rows)
    if fmt == "csv":
        return render_csv(rows)
    if fmt == "tex":
        return render_tex(rows)
    if fmt == "json":
        return render_json(rows)
    return render_html(rows, store)


def write_report(store_path: str, fmt: str, *, q: int | None = None, out: str | None = None) -> str:
    """Open the store read-only in spirit, render, write ``out`` if given; return the text."""
    from codesearch.store import Store

    with Store(store_path, create=False) as st:
        text = render(st, fmt, q)
    if out:
        try:
            with open(out, "w", encoding="utf-8") as fh:
                fh.write(text)
        except OSError as exc:
            raise InputError(f"{out}: cannot write: {exc.strerror}") from None
    return text


def export_code(store_path: str, params: Params, out: str, *, generator: bool = False) -> int:
    """Write the best stored code of ``params`` to ``out`` (verified first); return the
    number of rows written.

    A code the store keeps as a generator matrix is listed word by word up to
    :data:`codesearch.model.MAX_LISTED_WORDS` words; with ``generator`` (or past that size)
    its generator rows are written instead, the header saying so (``form: generator``).
    """
    from codesearch.codefile import write_code
    from codesearch.model import MAX_LISTED_WORDS, Code, LinearCode
    from codesearch.store import Store

    with Store(store_path, create=False) as st:
        s = st.summary(params)
        if s.code_id is None:
            raise InputError(f"the store holds no code for {params}")
        _, code = st.get_stored(s.code_id)
    meta = {"method": s.lower_method, "store": store_path}
    if isinstance(code, LinearCode) and (generator or code.size > MAX_LISTED_WORDS):
        meta.update({"form": "generator", "dimension": code.k,
                     "words": f"{code.q}^{code.k}", "distance": params.d})
        write_code(out, Code(code.generator, code.q), None, meta)
        return code.k
    if isinstance(code, LinearCode):
        code = code.words(MAX_LISTED_WORDS)
    write_code(out, code, params.d, meta)
    return code.size


def plot_store(store_path: str, out: str, *, q: int = 2) -> int:
    """Draw the stored cells of alphabet ``q`` on the rate-distance picture
    (:func:`codesearch.report.plot.save_rate_distance`): at d/n, a bar from the rate of the best
    stored code to the rate of the best proven upper bound. Returns the number of cells drawn.
    """
    from codesearch.report.plot import save_rate_distance
    from codesearch.store import Store

    with Store(store_path, create=False) as st:
        rows = collect(st, q)
    points = [(r.n, r.d, r.lower, r.upper) for r in rows if r.upper is not None]
    if not points:
        raise InputError(f"{store_path}: no stored cell with q={q} has a proven upper bound")
    save_rate_distance(out, q, points, title=f"Stored table, q = {q}: {store_path}")
    return len(points)
