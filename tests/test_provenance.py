"""Provenance says what was checked: upper bounds proved by exhaustive search are recorded
(method, version, nodes, seed) and labelled as such, never like a theorem; a SAT refutation
bundle re-checked by ``codesearch check`` is labelled "re-checked"; derived cells inherit the
label of what they rest on.

References: A(5,3) = 4 and A(6,3) = 8 (shortened Hamming codes; MacWilliams-Sloane ch. 1 and
the table of A(n,d) in ch. 17, from memory).
"""

from __future__ import annotations

import json
import sqlite3

import pytest

from codesearch.cli import main
from codesearch.errors import InputError
from codesearch.model import Params
from codesearch.propagate import propagate
from codesearch.report import collect, render
from codesearch.results import BoundResult
from codesearch.search import search
from codesearch.store import Store, search_record

A53 = Params(2, 5, 3)


@pytest.fixture
def searched(tmp_path):
    """A store whose only upper bound on A(5,3) comes from the exhaustive search."""
    path = tmp_path / "s.sqlite"
    res = search(A53, "exact", seed=0)
    assert res.optimal and res.upper == 4
    with Store(path) as s:
        s.add_search_result(res, exhaustive=True)
    return path, res


def _rows(path):
    with Store(path) as s:
        return {(r.n, r.d): r for r in collect(s)}, render(s, "md"), json.loads(render(s, "json"))


def test_search_bound_is_labelled_with_its_run(searched):
    path, res = searched
    rows, md, data = _rows(path)
    r = rows[(5, 3)]
    assert r.upper == 4 and r.upper_kind == "exhaustive-search"
    assert r.upper_basis == "exhaustive search" and r.trust == "s"
    assert "exact" in r.upper_detail and f"{res.nodes} nodes" in r.upper_detail
    seed = "no seed (deterministic)" if res.seed is None else f"seed {res.seed}"
    assert seed in r.upper_detail and "codesearch" in r.upper_detail
    assert "**4**s" in md and "exhaustive search" in md
    assert next(c for c in data if c["n"] == 5)["upper_basis"] == "exhaustive search"
    with Store(path) as s:
        record = json.loads(s.rows("bounds")[0][7])
        assert s.audit() == []
    assert record == {**search_record(res), "seconds": record["seconds"]}


def test_derived_cells_inherit_the_label(searched):
    path, _ = searched
    with Store(path) as s:
        propagate(s, [Params(2, 6, 3), A53])
    rows, _, _ = _rows(path)
    r = rows[(6, 3)]
    # A(6,3) <= 2 A(5,3) = 8 (times-q-shorter) rests on the search below it
    assert r.upper == 8 and r.upper_kind == "cell-relation"
    assert r.upper_basis == "exhaustive search" and r.trust == "s"
    assert "exact" in r.upper_detail


def test_rechecked_refutation_bundle_is_labelled_rechecked(searched, tmp_path, capsys):
    path, _ = searched
    base = tmp_path / "a53"
    assert main(["find", "5", "3", "--method", "sat", "--size", "5", "--proof", str(base),
                 "--quiet"]) == 0
    manifest = f"{base}.json"
    # offered for another cell: refused, nothing stored
    assert main(["check", manifest, "--cell", "2", "6", "3", "--store", str(path)]) == 1
    assert main(["check", manifest, "--cell", "2", "5", "3", "--store", str(path)]) == 0
    capsys.readouterr()
    with Store(path) as s:
        propagate(s, [Params(2, 6, 3), A53])
        assert s.audit() == []
    rows, md, _ = _rows(path)
    for cell in ((5, 3), (6, 3)):  # the strongest basis of the value wins; derived ones follow
        assert rows[cell].upper_basis == "re-checked" and rows[cell].trust == "r", cell
    assert "re-checked" in rows[(5, 3)].upper_detail and "**4**r" in md
    # the manifest changed after the re-check: the audit says so
    with open(manifest, "a") as fh:
        fh.write(" ")
    with Store(path) as s:
        assert any("changed since it was re-checked" in p for p in s.audit())


def test_records_are_bound_to_their_cell(searched):
    path, res = searched
    with Store(path) as s:
        wrong = dict(search_record(res), n=6)
        with pytest.raises(InputError, match="refused"):
            s.add_bound(BoundResult(A53, 4, "search:exact", certificate=wrong))
        with pytest.raises(InputError, match="record states"):
            s.add_bound(BoundResult(A53, 3, "search:other",
                                    certificate=dict(search_record(res))))
    con = sqlite3.connect(path)
    con.execute("UPDATE bounds SET kind = 'delsarte-lp'")
    con.commit()
    con.close()
    with Store(path) as s:
        assert any("kind" in p for p in s.audit())


def test_older_search_bounds_are_not_labelled_as_theorems(tmp_path):
    # stores written before the records: kind "theorem", method "search:..."
    with Store(tmp_path / "old.sqlite") as s:
        s.add_bound(BoundResult(A53, 4, "search:exact", note="proved by exhaustive search"))
        r = collect(s)[0]
    assert r.upper_kind == "theorem" and r.upper_basis == "exhaustive search"
    assert "not recorded" in r.upper_detail


def test_reports_name_the_construction_of_each_lower_value(tmp_path):
    # The binary Golay code [23,12,7] (MacWilliams-Sloane ch. 20) comes from the construction
    # library; the CSV and JSON reports name it in lower_detail, and the padded code one cell
    # over names the operation too (the provenance a reader wants, not just "construction").
    import csv
    import io

    from codesearch.batch import run_table, table_cells

    path = tmp_path / "t.sqlite"
    out = run_table(str(path), table_cells(2, range(23, 25), range(7, 8)), budget=1.0,
                    methods=[], workers=1, bounds=False)
    assert not out.failed and not out.errors
    with Store(path) as s:
        data = {(c["n"], c["d"]): c for c in json.loads(render(s, "json"))}
        rows = csv.DictReader(io.StringIO(render(s, "csv")))
        table = {(int(r["n"]), int(r["d"])): r for r in rows}
    assert data[(23, 7)]["lower"] == 4096 and "Golay" in data[(23, 7)]["lower_detail"]
    assert "Golay" in table[(23, 7)]["lower_detail"]
    assert data[(24, 7)]["lower"] == 4096 and "Golay" in data[(24, 7)]["lower_detail"]
    assert table[(24, 7)]["lower_detail"] == data[(24, 7)]["lower_detail"]
