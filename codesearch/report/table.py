"""Reports of the stored table: Markdown, CSV, LaTeX, HTML, JSON, export and plot.

Part of the presentation layer (:mod:`codesearch.report`).

Everything here reads the results store only; nothing runs a search or a bound. Per cell the
report gives the best code size (lower), the best certified upper bound (upper), the gap, where
each came from (method, time, certificate kind), and the comparison with imported published
values, which stay apart from what this tool proved:

``matched``   our lower equals the best published lower and our upper the best published upper;
``improved``  at least one side is better than published (and neither is worse);
``short``     at least one side falls short of the published value.

Each upper bound also says what backs it (:data:`BASES`, strongest first): a closed form
(``closed form``), a certificate anyone can re-check with ``codesearch check``
(``certificate``), a SAT refutation bundle that ``codesearch check`` re-checked before it was
stored (``re-checked``), or an exhaustive search whose run is recorded (method, version,
nodes, seed) but leaves nothing to re-check (``exhaustive search``). A bound derived from
other cells inherits the weakest basis among those it cites.
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
#: What can back an upper bound, strongest first (see the module docstring).
BASES = ("closed form", "certificate", "re-checked", "exhaustive search")
#: The mark of each basis in the text formats (none for the re-checkable ones).
_BASIS_MARK = {"re-checked": "r", "exhaustive search": "s"}
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
    upper_basis: str | None = None
    upper_detail: str | None = None

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
    def trust(self) -> str:
        """``s`` when the upper bound rests on an exhaustive search (nothing to re-check),
        ``r`` on a re-checked SAT refutation; empty for closed forms and certificates."""
        return _BASIS_MARK.get(self.upper_basis or "", "")

    @property
    def mark(self) -> str:
        """``=`` matched, ``+`` improved, ``<`` short vs published; empty when none imported."""
        return {"matched": "=", "improved": "+", "short": "<"}.get(self.compare or "", "")

    @property
    def lower_detail(self) -> str | None:
        """How the best code was made, as its provenance names it ("3x shortened extended
        Golay(24,12)"); None when the store records no construction or derivation."""
        return _made_by(self)

    def to_json(self) -> dict[str, Any]:
        out = {f.name: getattr(self, f.name) for f in fields(self) if f.name not in _ROW_IDS}
        out["exact"] = self.exact
        out["lower_detail"] = self.lower_detail
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


def _record_detail(method: str, record: dict) -> str:
    """One line of what an exhaustive search ran (its stored record)."""
    seed = record.get("seed")
    return (f"{record.get('method', method)}, codesearch {record.get('version', '?')}, "
            f"{record.get('nodes', '?')} nodes, "
            f"{'no seed (deterministic)' if seed is None else f'seed {seed}'}, "
            f"{record.get('seconds', '?')} s")


class _Bases:
    """What backs each stored bound (``bound id -> (basis, detail)``), derived bounds
    following their citations to the weakest basis among them. A citation cycle is cut
    (that path counts as the weakest basis), so a label is never stronger than the truth."""

    def __init__(self, store: Any) -> None:
        self.rows = {int(r[0]): r for r in store.rows("bounds")}
        self.by_cell: dict[tuple[int, int, int], list[int]] = {}
        for bid, r in self.rows.items():
            self.by_cell.setdefault((r[1], r[2], r[3]), []).append(bid)
        self.memo: dict[int, tuple[str, str]] = {}
        self.active: set[int] = set()

    def of(self, bid: int, depth: int = 0) -> tuple[str, str]:
        if bid in self.memo:
            return self.memo[bid]
        row = self.rows.get(bid)
        if row is None or depth > 500 or bid in self.active:
            return "exhaustive search", "cited bound missing or circular"
        self.active.add(bid)
        try:
            out = self._of(row, depth)
        finally:
            self.active.discard(bid)
        self.memo[bid] = out
        return out

    def _of(self, row: tuple, depth: int) -> tuple[str, str]:
        method, kind, cert = row[5], row[6], row[7]
        try:
            record = json.loads(cert) if cert else {}
        except ValueError:
            record = {}
        record = record if isinstance(record, dict) else {}
        if kind == "cell-relation":
            # a relation needs only the cited value: any certified bound of that value backs it
            cited = [self._best(c["q"], c["n"], c["d"], c["value"], depth + 1)
                     for c in record.get("cites", []) if isinstance(c, dict)
                     and all(isinstance(c.get(k), int) for k in ("q", "n", "d", "value"))]
            basis = max((b for b, _ in cited), key=BASES.index, default="exhaustive search")
            inner = next((t for b, t in cited if b == basis), "")
            out = (basis, f"{record.get('rule', 'relation')} from a neighbour: {inner}")
        elif kind == "exhaustive-search" or (kind == "theorem" and method.startswith("search:")):
            out = ("exhaustive search", _record_detail(method.removeprefix("search:"), record)
                   if record else f"{method} (run not recorded)")
        elif kind == "sat-refutation":
            out = ("re-checked", f"SAT refutation bundle {record.get('manifest', '?')} "
                   f"re-checked by {record.get('checker', '?')} on {record.get('checked', '?')}")
        elif kind == "theorem":
            out = ("closed form", method)
        else:
            out = ("certificate", f"{kind} certificate (codesearch check re-checks it)")
        return out

    def best(self, p: Params, value: int) -> tuple[str, str]:
        """The strongest basis among the certified bounds of value ``value`` of cell ``p``."""
        return self._best(p.q, p.n, p.d, value, 0)

    def _best(self, q: int, n: int, d: int, value: int, depth: int) -> tuple[str, str]:
        found = [self.of(bid, depth) for bid in self.by_cell.get((q, n, d), [])
                 if self.rows[bid][4] <= value and self.rows[bid][8]]
        return min(found, key=lambda b: BASES.index(b[0]),
                   default=("exhaustive search", "cited bound missing"))


def collect(store: Any, q: int | None = None) -> list[CellRow]:
    """The report rows: every cell with stored or imported values, sorted by (q, n, d)."""
    cells = sorted(set(store.cells(q)) | set(store.published_cells(q)))
    bases = _Bases(store)
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
        basis, detail = (None, None) if s.upper is None else bases.best(p, s.upper)
        rows.append(CellRow(
            **{**stored, "lower": lower}, published_lower=pl, published_upper=pu,
            published_source="; ".join(sorted({r.source for r in pubs})) or None,
            compare=_compare(lower, s.upper, pl, pu) if pubs else None,
            upper_basis=basis, upper_detail=detail,
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
                                                     else r.text) + r.trust + r.mark)
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
    marks = r.trust + r.mark
    return t + (f"$^{{{marks}}}$" if marks else "")


def _pub_text(r: CellRow) -> str:
    if r.published_lower is None and r.published_upper is None:
        return "?"
    lo = "?" if r.published_lower is None else str(r.published_lower)
    up = "?" if r.published_upper is None else str(r.published_upper)
    return lo if lo == up else f"{lo}-{up}"


def _legend() -> str:
    return ("Entries are proven by this tool: a single number is exact (bold), `lo-up` gives the "
            "best code found and the best certified upper bound. `[x]` is an imported published "
            "value only. Against imported values: `=` matched, `+` improved, `<` short. "
            + _TRUST_LEGEND)


_TRUST_LEGEND = ("Upper bounds marked `s` rest on an exhaustive search: its run (method, "
                 "version, nodes, seed) is recorded in the JSON/CSV/HTML reports, but there is "
                 "nothing to re-check; `r` marks a SAT refutation re-checked by `codesearch "
                 "check`. Unmarked upper bounds are closed forms or certificates that `codesearch "
                 "check` re-checks.")


def render_csv(rows: Sequence[CellRow]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["q", "n", "d", "lower", "upper", "exact", "gap", "lower_method", "upper_method",
                "upper_kind", "published_lower", "published_upper", "published_source",
                "compare", "upper_basis", "upper_detail", "lower_detail"])
    for r in rows:
        gap = "" if r.upper is None else r.upper - (r.lower or 0)
        w.writerow([r.q, r.n, r.d, _e(r.lower), _e(r.upper), int(r.exact), gap,
                    _e(r.lower_method), _e(r.upper_method), _e(r.upper_kind),
                    _e(r.published_lower), _e(r.published_upper), _e(r.published_source),
                    _e(r.compare), _e(r.upper_basis), _e(r.upper_detail),
                    _e(r.lower_detail)])
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
                   r"imported values ($=$ matched, $+$ improved, $<$ short); $s$: the upper "
                   r"bound rests on an exhaustive search (nothing to re-check), $r$: on a "
                   r"re-checked SAT refutation.}" %
                   (_tex_escape(_name(q)).replace("A\\_", "A_"), q))
        out.append(r"\end{table}")
    return "\n".join(out) + "\n"


def _gap_share(r: CellRow) -> float | None:
    """How open the cell is, 0 (exact) to 1 (a factor 4 or more between the sides), on a log
    scale; None when a side is unknown."""
    if r.lower is None or r.upper is None or r.lower == 0:
        return None
    if r.upper <= r.lower:
        return 0.0
    return min(math.log2(r.upper / r.lower) / 2.0, 1.0)


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


_HTML_STYLE = """
:root{--paper:#f6f4ee;--ink:#1f2630;--rule:#cfc9bb;--accent:#34458f;--soft:#e6e2d6;
--search:#a0522d;--open:#7a8599}
*{box-sizing:border-box}
body{margin:0;background:var(--paper);color:var(--ink);font:14px/1.45 Georgia,'DejaVu Serif',serif}
header{padding:18px 28px 12px;border-bottom:3px double var(--rule)}
header h1{margin:0;font-size:22px;font-weight:normal;letter-spacing:.04em}
header p{margin:6px 0 0;max-width:70em;color:#4a5361}
main{padding:8px 28px 40px}
section{margin-top:26px}
section h2{font-size:17px;font-weight:normal;border-bottom:1px solid var(--rule);padding-bottom:3px}
.grid{border-collapse:separate;border-spacing:3px}
.grid th{font:12px/1 monospace;color:#5b6472;padding:3px 6px;text-align:right}
.grid td{min-width:64px;height:40px;padding:0;vertical-align:top;background:#fffdf8;
border:1px solid var(--rule);border-radius:3px}
.grid td.none{background:transparent;border-color:transparent}
.grid td a{display:block;padding:4px 6px 0;color:inherit;text-decoration:none;
font:13px/1.2 monospace;text-align:right;white-space:nowrap}
.grid td a:hover,.grid td a:focus{background:var(--soft);outline:none}
.grid td.exact a{font-weight:bold;color:var(--accent)}
.grid td.pub a{color:#8c8578;font-style:italic}
.grid td sup{font:10px monospace;margin-left:1px}
.grid td sup.s{color:var(--search)}.grid td sup.r{color:var(--accent)}
.meter{display:block;height:5px;margin:4px 6px 5px;background:var(--soft);border-radius:2px}
.meter i{display:block;height:5px;border-radius:2px;background:var(--open)}
td.exact .meter{background:var(--accent);height:2px;margin-top:6px}
td.exact .meter i{display:none}
.ledger{border-collapse:collapse;margin-top:14px;width:100%;max-width:78em;font-size:13px}
.ledger th{text-align:left;font-weight:normal;color:#5b6472;border-bottom:1px solid var(--rule);
padding:4px 8px}
.ledger td{border-bottom:1px dotted var(--rule);padding:4px 8px;vertical-align:top}
.ledger tr:target{background:#fff3c9}
.ledger .basis{font:12px monospace;padding:1px 4px;border:1px solid var(--rule);border-radius:2px}
.ledger .b-search{color:var(--search);border-color:var(--search)}
.ledger .b-rechecked{color:var(--accent);border-color:var(--accent)}
.key{display:flex;flex-wrap:wrap;gap:18px;margin-top:10px;font-size:12px;color:#4a5361}
.key span{display:inline-flex;align-items:center;gap:6px}
.key .meter{width:48px;margin:0}
a.dl{color:var(--accent)}
"""


def _basis_class(basis: str | None) -> str:
    return {"exhaustive search": "b-search", "re-checked": "b-rechecked"}.get(basis or "", "")


def _html_cell(r: CellRow | None, q: int, n: int, d: int) -> str:
    e = html.escape
    if r is None:
        return '<td class="none"></td>'
    attrs = (f'id="c-{q}-{n}-{d}" data-lower="{_e(r.lower)}" data-upper="{_e(r.upper)}" '
             f'data-exact="{int(r.exact)}" data-compare="{_e(r.compare)}" '
             f'data-basis="{e(r.upper_basis or "")}"')
    if r.lower is None and r.upper is None:
        return (f'<td class="pub" {attrs}><a href="#p-{q}-{n}-{d}" title="published only">'
                f"[{e(_pub_text(r))}]</a></td>")
    share = _gap_share(r)
    meter = ('<span class="meter"><i style="width:100%;background:repeating-linear-gradient('
             '90deg,#7a8599 0 3px,transparent 3px 6px)"></i></span>' if share is None else
             f'<span class="meter"><i style="width:{max(share, 0.04) * 100:.0f}%"></i></span>')
    sup = f'<sup class="{r.trust}">{r.trust}</sup>' if r.trust else ""
    tip = f"upper: {r.upper_method or '-'}" + (f" ({r.upper_basis})" if r.upper_basis else "")
    cls = "exact" if r.exact else "open"
    return (f'<td class="{cls}" {attrs}><a href="#p-{q}-{n}-{d}" title="{e(tip)}">'
            f"{e(r.text)}{sup}{e(r.mark)}</a>{meter}</td>")


def _made_by(r: CellRow) -> str | None:
    """How the cell's best code was made, when the store says ("3x shortened extended
    Golay(24,12)"): the construction or derivation label in its provenance."""
    prov = r.lower_provenance or {}
    label = prov.get("label") or prov.get("construction")
    return str(label) if label else None


def _html_ledger_row(r: CellRow, store: Any) -> str:
    e = html.escape
    cell = f"A({r.n},{r.d})" if r.q == 2 else f"A<sub>{r.q}</sub>({r.n},{r.d})"
    made = _made_by(r)
    lower = "-" if r.lower is None else (
        f"{r.lower} by {e(r.lower_method or '-')}" + (f" ({e(made)})" if made else "")
        + (f", {r.lower_seconds:.2f} s" if r.lower_seconds is not None else ""))
    dl = _code_download(store, r)
    if dl:
        lower += f" &middot; {dl}"
    if r.upper is None:
        upper = "-"
    else:
        basis = (f' <span class="basis {_basis_class(r.upper_basis)}">{e(r.upper_basis)}</span>'
                 if r.upper_basis else "")
        upper = (f"{r.upper} by {e(r.upper_method or '-')}"
                 + (f" [{e(r.upper_kind)}]" if r.upper_kind else "")
                 + (f", {r.upper_seconds:.2f} s" if r.upper_seconds is not None else "")
                 + basis + (f"<br><small>{e(r.upper_detail)}</small>"
                            if r.upper_detail and r.upper_detail != r.upper_method else ""))
    pub = "-" if not r.published_source else (
        f"{e(_pub_text(r))} ({e(r.published_source)})"
        + (f", {e(r.compare)}" if r.compare else ""))
    return (f'<tr id="p-{r.q}-{r.n}-{r.d}"><td>{cell}</td><td>{lower}</td><td>{upper}</td>'
            f"<td>{pub}</td></tr>")


def render_html(rows: Sequence[CellRow], store: Any, title: str = "codesearch table") -> str:
    """One static HTML file, no script and nothing fetched: per alphabet a grid of cells (the
    value, a meter under it showing the gap on a log scale, a mark for upper bounds that
    rest on a search) and below it the provenance ledger, one row per cell, which each cell
    links to (the linked row is highlighted)."""
    e = html.escape
    parts = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{e(title)}</title>", f"<style>{_HTML_STYLE}</style></head><body>",
        f"<header><h1>{e(title)}</h1><p>Each cell gives the best code found and the best "
        "proven upper bound (one number when they meet); the bar under it shows the gap, "
        "from none (a rule) to a factor of four or more (full); a hatched bar means a side is "
        "unknown. Click a cell for its provenance in the ledger under the grid. "
        "[x]: an imported published value only. Against imported values: = matched, "
        "+ improved, &lt; short. Upper bounds marked <b>s</b> rest on an exhaustive search "
        "(its run is recorded; nothing to re-check), <b>r</b> on a SAT refutation re-checked "
        "by <code>codesearch check</code>; unmarked ones are closed forms or certificates "
        "that <code>codesearch check</code> re-checks.</p>",
        '<div class="key"><span><span class="meter" style="background:#34458f;height:2px">'
        "</span>exact</span>"
        '<span><span class="meter"><i style="width:25%"></i></span>within a factor 1.4</span>'
        '<span><span class="meter"><i style="width:100%"></i></span>factor 4 or more</span>'
        "</div></header><main>",
    ]
    for q, (ns, ds, cells) in _layout(rows).items():
        parts.append(f'<section><h2>{e(_name(q))}, q = {q}</h2><table class="grid" '
                     f'id="table-q{q}">')
        parts.append("<tr><th>n \\ d</th>" + "".join(f"<th>{d}</th>" for d in ds) + "</tr>")
        for n in ns:
            parts.append(f"<tr><th>{n}</th>"
                         + "".join(_html_cell(cells.get((n, d)), q, n, d) for d in ds) + "</tr>")
        parts.append("</table>")
        parts.append('<table class="ledger"><tr><th>cell</th><th>lower (code)</th>'
                     "<th>upper (what backs it)</th><th>published</th></tr>")
        parts.extend(_html_ledger_row(cells[key], store) for key in sorted(cells))
        parts.append("</table></section>")
    parts.append("</main></body></html>")
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
