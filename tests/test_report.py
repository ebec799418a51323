"""Tests of reports, export, import and plot from the store (and the HTML in headless Chromium)."""

from __future__ import annotations

import csv
import io
import json
import os
import pathlib
import re
import shutil
import subprocess

import pytest

from codesearch.cli import main
from codesearch.codefile import read_code
from codesearch.model import Params
from codesearch.report import collect, render
from codesearch.results import BoundResult
from codesearch.store import PublishedRow, Store
from codesearch.verify import min_distance
from table_helpers import hamming_code, repetition_code

REPO = pathlib.Path(__file__).resolve().parents[1]


@pytest.fixture
def store_path(tmp_path):
    path = tmp_path / "r.sqlite"
    with Store(path) as s:
        # Hamming [7,4,3], perfect: meets the Hamming bound 16 (common practice).
        s.add_code(hamming_code(3), Params(2, 7, 3), method="exact", seconds=0.25)
        s.add_bound(BoundResult(Params(2, 7, 3), 16, "hamming"))
        # Repetition code (5 words? no: 2 words) at (6,6) with a loose bound.
        s.add_code(repetition_code(2, 6), Params(2, 6, 6), method="lexicode")
        s.add_bound(BoundResult(Params(2, 6, 6), 4, "loose-test-bound"))
        # Published values: A(7,3) = 16, A(6,6) = 2, A(8,3) = 20 (MacWilliams-Sloane table
        # of A(n,d); from memory).
        s.import_published([PublishedRow(2, 7, 3, 16, 16, "MS77"),
                            PublishedRow(2, 6, 6, 2, 2, "MS77"),
                            PublishedRow(2, 8, 3, 20, 20, "MS77")])
    return str(path)


def test_collect_and_compare(store_path):
    with Store(store_path) as s:
        rows = {(r.n, r.d): r for r in collect(s)}
    assert rows[(7, 3)].exact and rows[(7, 3)].compare == "matched"
    assert rows[(6, 6)].text == "2-4" and rows[(6, 6)].compare == "short"
    assert rows[(8, 3)].lower is None and rows[(8, 3)].published_lower == 20


def test_json_csv_md_tex(store_path):
    with Store(store_path) as s:
        data = json.loads(render(s, "json"))
        text_csv = render(s, "csv")
        md = render(s, "md")
        tex = render(s, "tex")
    cell = next(c for c in data if (c["n"], c["d"]) == (7, 3))
    assert {"q", "n", "d", "lower", "upper", "exact", "lower_method", "upper_method"} <= set(cell)
    assert cell["lower"] == cell["upper"] == 16 and cell["exact"] is True
    assert cell["lower_method"] == "exact" and cell["upper_method"] == "hamming"
    rows = list(csv.DictReader(io.StringIO(text_csv)))
    assert {(r["n"], r["d"], r["gap"]) for r in rows} >= {("7", "3", "0"), ("6", "6", "2")}
    assert "**16**=" in md and "2-4<" in md and "[20]" in md
    assert r"\textbf{16}" in tex and "2--4" in tex and r"\begin{tabular}" in tex


def test_cli_report_export_check_plot(store_path, tmp_path, capsys):
    assert main(["report", "--store", store_path, "--format", "json"]) == 0
    assert len(json.loads(capsys.readouterr().out)) == 3
    out = tmp_path / "best.code"
    assert main(["export", "7", "3", "--store", store_path, "--out", str(out)]) == 0
    cf = read_code(str(out))
    assert cf.code.size == 16 and min_distance(cf.code) == 3
    assert main(["check", str(out), "--d", "3"]) == 0
    assert main(["export", "9", "3", "--store", store_path, "--out", str(out)]) == 2
    png = tmp_path / "t.png"
    assert main(["plot", "--store", store_path, "--out", str(png)]) == 0
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_cli_errors_leave_store_unchanged(store_path, tmp_path, capsys):
    before = Store(store_path).counts()
    bad = tmp_path / "bad.csv"
    bad.write_text("q,n,d,lower,upper,source\n2,7,3,17,18,wrong\n")  # above the proven 16
    assert main(["import", str(bad), "--store", store_path]) == 2
    err = capsys.readouterr().err
    assert "contradiction" in err and len(err.strip().splitlines()) == 1
    inverted = tmp_path / "inv.csv"
    inverted.write_text("q,n,d,lower,upper,source\n2,9,3,40,30,wrong\n")
    assert main(["import", str(inverted), "--store", store_path]) == 2
    assert main(["import", str(tmp_path / "missing.csv"), "--store", store_path]) == 2
    unreadable = tmp_path / "unreadable.csv"
    unreadable.write_text("q,n,d,lower\n2,9,3,40\n")
    os.chmod(unreadable, 0)
    if not os.access(unreadable, os.R_OK):  # root can read anything
        assert main(["import", str(unreadable), "--store", store_path]) == 2
    assert Store(store_path).counts() == before
    foreign = tmp_path / "foreign.sqlite"
    foreign.write_bytes(b"this is not a database at all" * 100)
    assert main(["report", "--store", str(foreign)]) == 2
    assert "not a codesearch store" in capsys.readouterr().err
    assert foreign.read_bytes() == b"this is not a database at all" * 100
    good = tmp_path / "good.csv"
    good.write_text("q,n,d,lower,upper,source\n2,9,3,40,40,book\n")
    assert main(["import", str(good), "--store", store_path]) == 0


def _chromium() -> str | None:
    for name in ("chromium", "chromium-browser", "google-chrome"):
        path = shutil.which(name)
        if path:
            return path
    return None


def test_html_in_headless_chromium(store_path, tmp_path):
    chromium = _chromium()
    if chromium is None:
        pytest.skip("chromium is not installed (.ci/ensure-chromium installs it)")
    page = tmp_path / "table.html"
    assert main(["report", "--store", store_path, "--format", "html", "--out", str(page)]) == 0
    flags = [chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
             f"--user-data-dir={tmp_path / 'profile'}"]
    dom = subprocess.run(flags + ["--dump-dom", page.as_uri()], capture_output=True, text=True,
                         timeout=120).stdout
    cell = re.search(r'<td class="exact" id="c-2-7-3"[^>]*>(.*?)</td>', dom, re.S)
    assert cell is not None, dom[:500]
    assert 'data-exact="1"' in dom and "16=" in cell.group(1)
    # provenance: the cell links to its ledger row, which names the bound and what backs it
    assert 'href="#p-2-7-3"' in cell.group(1)
    ledger = re.search(r'<tr id="p-2-7-3">(.*?)</tr>', dom, re.S).group(1)
    assert "hamming" in ledger and "closed form" in ledger
    assert 'download="A2-7-3.code"' in ledger
    assert re.search(r'id="c-2-6-6"[^>]*data-lower="2" data-upper="4"', dom)
    # a look of our own: no per-cell fold-out, no script, nothing fetched from elsewhere
    assert "<details" not in dom and "<script" not in dom and "http" not in dom.split(
        "<body>", 1)[1]
    shot = tmp_path / "shot.png"
    subprocess.run(flags + [f"--screenshot={shot}", "--window-size=1000,700", page.as_uri()],
                   capture_output=True, timeout=120)
    assert shot.exists() and shot.read_bytes()[:4] == b"\x89PNG"


def test_html_inline_codewords_verify(store_path):
    import base64

    from codesearch.codefile import parse_code_text

    with Store(store_path) as s:
        page = render(s, "html")
    m = re.search(r'download="A2-7-3.code" href="data:text/plain;base64,([A-Za-z0-9+/=]+)"', page)
    code = parse_code_text(base64.b64decode(m.group(1)).decode()).code
    # The inlined words are the stored Hamming code: 16 words at distance 3.
    assert code.size == 16 and min_distance(code) == 3


def test_table_progress_renders():
    from rich.console import Console

    from codesearch.report.live import TableProgress

    console = Console(file=io.StringIO(), force_terminal=False, width=100)
    with TableProgress(console) as prog:
        prog({"event": "start", "cells": 3})
        prog({"event": "submit", "cell": Params(2, 7, 3), "lower": 12, "upper": 16})
        prog({"event": "skip", "cell": None})
        text = io.StringIO()
        Console(file=text, width=100).print(prog._render())
        assert "A(7,3)" in text.getvalue() and "12" in text.getvalue()
        prog({"event": "done", "cell": Params(2, 7, 3), "lower": 16, "upper": 16, "seconds": 1.0})
    assert "1 done, 1 skipped" in console.file.getvalue()


@pytest.mark.slow  # waits for the connection timeout
def test_unreachable_scheduler_is_input_error(tmp_path, capsys, stub_methods):
    import socket

    sock = socket.socket()
    sock.bind(("127.0.0.1", 0))
    port = sock.getsockname()[1]
    sock.close()  # nothing listens on this port now
    code = main(["table", "--n", "3..4", "--d", "3", "--methods", "stub-lex", "--quiet",
                 "--no-propagate", "--store", str(tmp_path / "s.sqlite"),
                 "--scheduler", f"tcp://127.0.0.1:{port}"])
    assert code == 2 and "cannot reach Dask scheduler" in capsys.readouterr().err
