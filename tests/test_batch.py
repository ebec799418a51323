"""Tests of batch runs: local pool, skipping and resuming, Dask LocalCluster."""

from __future__ import annotations

import os
import pathlib

import pytest

from codesearch.batch import FOUR_POINT_DONE, FOUR_POINT_TASK, run_table, table_cells
from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.store import Store
TESTS = str(pathlib.Path(__file__).parent)


@pytest.fixture(autouse=True)
def _stubs(stub_methods):
    pass


def test_table_cells():
    cells = table_cells(2, range(3, 6), range(3, 5))
    assert cells == [Params(2, 3, 3), Params(2, 4, 3), Params(2, 4, 4), Params(2, 5, 3),
                     Params(2, 5, 4)]


def test_local_run_fills_skips_and_resumes(tmp_path):
    path = tmp_path / "t.sqlite"
    cells = table_cells(2, range(3, 8), range(3, 5))
    events = []
    # Without the bounds stage no cell settles, so the budget logic alone decides what reruns.
    out = run_table(str(path), cells, budget=1.0, methods=["stub-lex"], workers=1,
                    bounds=False, progress=events.append)
    assert out.ran + out.skipped == len(cells) and not out.failed
    assert {"start", "submit", "done", "finish"} <= {e["event"] for e in events}
    with Store(path) as s:
        # The lexicode of length 7, distance 3 is the Hamming code: 16 words (Conway-Sloane 1986).
        assert s.summary(Params(2, 7, 3)).lower == 16
        # Parity extension gives the [8,4,4]-like sizes for even d: A(7,4) >= A(6,3) = 8.
        assert s.summary(Params(2, 7, 4)).lower >= 8
        counts = s.counts()
        assert s.audit() == []
    again = run_table(str(path), cells, budget=1.0, methods=["stub-lex"], workers=1,
                      bounds=False)
    assert again.ran == 0 and again.skipped == len(cells)
    with Store(path) as s:
        assert s.counts() == counts
    # A larger budget reruns the searches (and adds no duplicate codes).
    more = run_table(str(path), cells, budget=2.0, methods=["stub-lex"], workers=1,
                     bounds=False)
    assert more.ran > 0
    with Store(path) as s:
        assert s.counts()["codes"] == counts["codes"]


def test_exhaustive_method_settles_cells(tmp_path):
    path = tmp_path / "t.sqlite"
    cells = table_cells(2, range(2, 6), range(2, 4))
    run_table(str(path), cells, budget=2.0, methods=["stub-clique"], workers=1)
    with Store(path) as s:
        # A(n,2) = 2^(n-1) (common practice); A(5,3) = 4 (from memory).
        assert s.summary(Params(2, 5, 2)).exact and s.summary(Params(2, 5, 2)).lower == 16
        assert s.summary(Params(2, 5, 3)).exact and s.summary(Params(2, 5, 3)).lower == 4
        assert s.audit() == []


def test_bad_arguments():
    with pytest.raises(ParameterError):
        run_table(":memory:", [Params(2, 3, 3)], methods=["no-such-method"])
    with pytest.raises(ParameterError):
        run_table(":memory:", [Params(2, 3, 3)], budget=0)


def test_dask_local_cluster(tmp_path, monkeypatch):
    distributed = pytest.importorskip("distributed")
    # Worker processes need the stub methods importable.
    monkeypatch.setenv("PYTHONPATH", os.pathsep.join([TESTS, os.environ.get("PYTHONPATH", "")]))
    path = tmp_path / "t.sqlite"
    cells = table_cells(2, range(3, 7), range(3, 4))
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  host="127.0.0.1", dashboard_address=None) as cluster:
        out = run_table(str(path), cells, budget=1.0, methods=["stub-lex"],
                        scheduler=cluster.scheduler_address)
    assert out.ran == len(cells) and not out.failed and not out.errors
    with Store(path) as s:
        # Lexicode sizes: A(6,3) >= 8 (shortened Hamming code; from memory).
        assert s.summary(Params(2, 6, 3)).lower == 8
        assert s.audit() == []


def test_cell_bounds_stage_in_process(tmp_path, monkeypatch):
    import codesearch.bounds
    from codesearch.batch import CellTask, _store_outcome, run_cell
    from codesearch.results import BoundResult
    from codesearch.search import METHODS

    def fake_all_bounds(p, sdp=False):
        # Hamming bound for A(7,3): 2^7 / 8 = 16 (common practice); a certificate nobody can
        # re-check; a linear-only bound that must not enter the table.
        return {"hamming": BoundResult(p, 16, "hamming"),
                "weird": BoundResult(p, 3, "weird", certificate={"kind": "unknown-kind"}),
                "griesmer": BoundResult(p, 1, "griesmer", scope="linear")}

    monkeypatch.setattr(codesearch.bounds, "all_bounds", fake_all_bounds, raising=False)
    p = Params(2, 7, 3)
    task = CellTask(p, 1.0, (METHODS["stub-lex"],), True, 5)
    out = run_cell(task)
    assert [b.method for b in out.bounds] == ["hamming", "weird", "griesmer"]
    assert out.searches[0].status.value == "feasible" and not out.errors
    with Store(tmp_path / "s.sqlite") as s:
        _store_outcome(s, task, out)
        summ = s.summary(p)
        # The lexicode (7,3) is the Hamming code (Conway-Sloane 1986), meeting the bound.
        assert (summ.lower, summ.upper, summ.upper_method) == (16, 16, "hamming")
        assert s.run_budget(p, "bounds") is not None and s.run_budget(p, "stub-lex") == 1.0
        assert s.counts()["bounds"] == 2  # hamming and the uncertified one; griesmer dropped


def test_bad_outcome_rolls_back_the_whole_cell(tmp_path):
    import numpy as np

    from codesearch.batch import CellOutcome, CellTask, _store_outcome
    from codesearch.errors import VerificationError
    from codesearch.model import Code
    from codesearch.results import BoundResult, SearchResult, Status
    from codesearch.search import METHODS

    p = Params(2, 5, 3)
    task = CellTask(p, 1.0, (METHODS["stub-lex"],), True, 0)
    # A Hamming-bound value (2^5 / 6 -> 5; common practice) and a "code" of two equal words.
    bad = SearchResult(p, Status.FEASIBLE, Code(np.zeros((2, 5), np.uint8), 2), None,
                       "stub-lex", 0.1, seed=0)
    out = CellOutcome(p, (BoundResult(p, 5, "hamming"),), 0.0, (bad,), (), (), 0.1)
    with Store(tmp_path / "s.sqlite") as s:
        with pytest.raises(VerificationError):
            _store_outcome(s, task, out)
        assert s.counts() == {"codes": 0, "bounds": 0, "runs": 0, "published": 0,
                              "improvements": 0, "cell_log": 0}


def test_constructions_first_and_monotone_in_n(tmp_path):
    # The binary Golay code [23,12,7] and its extension [24,12,8] (MacWilliams-Sloane Ch. 20)
    # come from the construction library alone (no search named); shortening and padding keep
    # A(n+1, d) >= A(n, d) across the table.
    path = tmp_path / "t.sqlite"
    cells = table_cells(2, range(20, 25), range(7, 9))
    out = run_table(str(path), cells, budget=1.0, methods=[], workers=1, bounds=False)
    assert not out.failed and not out.errors
    with Store(path) as s:
        from codesearch.propagate import code_label

        top = s.summary(Params(2, 24, 8))  # built, or derived from the cell (23, 7) first
        assert top.lower == 4096
        assert "Golay" in code_label(top.lower_provenance, top.lower_method)
        for d in (7, 8):
            lows = [s.summary(Params(2, n, d)).lower for n in range(20, 25)]
            assert lows == sorted(lows)
        logged = {(r["n"], r["d"]) for r in s.cell_log()}
        assert logged == {(p.n, p.d) for p in cells}
        assert {r["side"] for r in s.improvements()} == {"lower"}
        assert s.audit() == []


def test_rerun_with_larger_budget_continues_open_cells_only(tmp_path):
    path = tmp_path / "t.sqlite"
    cells = table_cells(2, range(8, 12), range(3, 4))
    run_table(str(path), cells, budget=0.5, methods=["stub-lex"], workers=1)
    with Store(path) as s:
        still_open = [p for p in cells if not s.summary(p).exact]
    # A(10,3) = 72..79 and A(11,3) = 144..158 are open (from memory of the published
    # tables); neither the library, the lexicode nor the bounds settle them
    assert still_open
    events = []
    again = run_table(str(path), cells, budget=1.0, methods=["stub-lex"], workers=1,
                      progress=events.append)
    assert again.ran == len(still_open)
    done = [e for e in events if e["event"] == "done"]
    assert all(e["budget"] == 1.0 and "search:stub-lex" in e["stages"] for e in done)


def test_four_point_stage_runs_once_on_open_cells_and_respects_its_cap(tmp_path):
    # Best (1980) proved A(11,4) = A(10,3) = 72 (from memory); the four-point bound is a
    # valid upper bound, so it may not go below that, and its certificate re-checks exactly.
    path = tmp_path / "t.sqlite"
    open_cell, big_cell = Params(2, 11, 4), Params(2, 17, 8)
    out = run_table(str(path), [open_cell, big_cell], budget=1.0, methods=[], workers=1,
                    bounds=False, constructions=False, propagate=False, four_point=120)
    assert not out.failed and not out.errors
    with Store(path) as s:
        top = s.summary(open_cell)
        assert top.upper_method == "four-point-sdp" and 72 <= top.upper <= 81
        assert s.run_budget(open_cell, FOUR_POINT_TASK) == FOUR_POINT_DONE
        # A(17,8): its program is estimated at minutes, above the cap; recorded with the cap
        assert s.summary(big_cell).upper is None
        assert s.run_budget(big_cell, FOUR_POINT_TASK) == 120
        kinds = {r[5] for r in s.rows("bounds")}
        assert kinds == {"four-point-sdp"}
    # the same cap again: nothing left to do
    again = run_table(str(path), [open_cell, big_cell], budget=1.0, methods=[], workers=1,
                      bounds=False, constructions=False, propagate=False, four_point=120)
    assert again.ran == 0


def test_four_point_cap_must_not_be_negative(tmp_path):
    with pytest.raises(ParameterError):
        run_table(str(tmp_path / "t.sqlite"), [Params(2, 11, 4)], four_point=-1)
