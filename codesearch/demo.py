"""``codesearch demo``: a small table of our own scenario, end to end, in a minute or two.

Scenario: a seed bank labels its storage envelopes with binary punch tags, a row of n holes
punched or not. Holes get clogged or torn, so two tags must differ in at least d positions:
d = 3 lets the reader correct one bad hole, d = 4 also flags a second, d = 5 corrects two.
How many envelopes can tags of 5 to 10 holes tell apart? The demo fills that table with a
short budget per cell, derives what follows between cells, prints the report, writes the
HTML report and exports the best 8-hole, distance-3 tag set, re-checked by the verifier.
"""

from __future__ import annotations

import os
import tempfile
import time

__all__ = ["run", "SCENARIO"]

#: The demo table: q, lengths, distances and the search seconds per cell.
SCENARIO = {"q": 2, "n": range(5, 11), "d": range(3, 6), "budget": 2.0, "workers": 2}


def _methods() -> list[str] | None:
    from codesearch.batch import default_methods
    from codesearch.search import METHODS

    names = default_methods()
    if names:
        return names
    return list(METHODS)[:1] or []


def run(workdir: str | None = None) -> int:
    """Run the demo in ``workdir`` (a new temporary directory when None); return 0.

    Prints progress lines, the Markdown report and where the files went.
    """
    from codesearch import batch, report
    from codesearch.model import Params
    from codesearch.store import Store

    workdir = workdir or tempfile.mkdtemp(prefix="codesearch-demo-")
    os.makedirs(workdir, exist_ok=True)
    store_path = os.path.join(workdir, "punch-tags.sqlite")
    cells = batch.table_cells(SCENARIO["q"], SCENARIO["n"], SCENARIO["d"])
    methods = _methods()
    print(f"Punch tags for seed envelopes: binary tags of 5..10 holes, distance 3..5, "
          f"{SCENARIO['budget']:g} s per cell, methods: {', '.join(methods) or 'none (bounds only)'}")
    print(f"store: {store_path}")
    t0 = time.perf_counter()
    state = {"done": 0}

    def progress(ev: dict) -> None:
        if ev.get("event") == "done":
            state["done"] += 1
            up = "?" if ev["upper"] is None else ev["upper"]
            print(f"  [{state['done']:2d}/{len(cells)}] {ev['cell']}: {ev['lower']}..{up} "
                  f"({ev['seconds']:.1f} s)", flush=True)

    summary = batch.run_table(store_path, cells, budget=SCENARIO["budget"], methods=methods,
                              workers=SCENARIO["workers"], progress=progress)
    print(f"table filled in {time.perf_counter() - t0:.1f} s: {summary.ran} cells run, "
          f"{summary.skipped} already settled, {summary.derived_codes} codes and "
          f"{summary.derived_bounds} bounds derived between cells")
    for err in summary.errors[:5]:
        print(f"  note: {err}")
    print()
    print(report.write_report(store_path, "md"))
    html_path = os.path.join(workdir, "punch-tags.html")
    report.write_report(store_path, "html", out=html_path)
    with Store(store_path) as st:
        has_code = st.summary(Params(2, 8, 3)).code_id is not None
    if has_code:
        tag_path = os.path.join(workdir, "tags-8-holes-d3.code")
        size = report.export_code(store_path, Params(2, 8, 3), tag_path)
        print(f"{size} tags of 8 holes, any two differing in 3 or more holes: {tag_path}")
    print(f"HTML report: {html_path}")
    print(f"Next: codesearch report --store {store_path} --format html --out table.html")
    return 0
