"""Tests of the results store: round trips, verification on write, dedup, errors."""

from __future__ import annotations

import os
import sqlite3

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from codesearch.errors import InputError, VerificationError
from codesearch.model import Code, Params
from codesearch.results import BoundResult, SearchResult, Status
from codesearch.store import (
    APPLICATION_ID, SCHEMA_VERSION, PublishedRow, Store, pack_code, read_published_file,
    unpack_code,
)
from table_helpers import hamming_code, repetition_code


@settings(max_examples=60, deadline=None, derandomize=True)
@given(q=st.integers(2, 36), n=st.integers(1, 40), m=st.integers(0, 20), seed=st.integers(0, 2**31))
def test_pack_round_trip(q, n, m, seed):
    rng = np.random.default_rng(seed)
    code = Code(rng.integers(0, q, size=(m, n)), q)
    assert unpack_code(pack_code(code), q, n, m) == code


def test_new_store_has_schema(tmp_path):
    path = tmp_path / "s.sqlite"
    with Store(path) as s:
        assert s.counts() == {"codes": 0, "bounds": 0, "runs": 0, "published": 0,
                              "improvements": 0, "cell_log": 0}
    con = sqlite3.connect(path)
    assert con.execute("PRAGMA application_id").fetchone()[0] == APPLICATION_ID
    assert con.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    assert con.execute("PRAGMA journal_mode").fetchone()[0] == "wal"


def test_code_round_trip_and_dedup(tmp_path):
    # Hamming [7,4,3]: 16 words, distance 3 (MacWilliams-Sloane Ch. 1).
    code = hamming_code(3)
    p = Params(2, 7, 3)
    with Store(tmp_path / "s.sqlite") as s:
        a = s.add_code(code, p, method="exact", status=Status.OPTIMAL, seed=1, seconds=0.5)
        b = s.add_code(code.canonical(), p, method="sat")  # same code: no new row
        assert a == b and s.counts()["codes"] == 1
        assert s.best_code(p).canonical() == code.canonical()
        summ = s.summary(p)
        assert (summ.lower, summ.upper, summ.lower_method) == (16, None, "exact")


def test_bad_code_is_rejected_and_nothing_stored(tmp_path):
    code = hamming_code(3)
    with Store(tmp_path / "s.sqlite") as s:
        with pytest.raises(VerificationError):
            s.add_code(code, Params(2, 7, 4), method="exact")
        with pytest.raises(VerificationError):
            s.add_code(code, Params(2, 8, 3), method="exact")
        assert s.counts()["codes"] == 0


def test_bounds_theorem_and_uncheckable_certificate(tmp_path):
    p = Params(2, 7, 3)
    with Store(tmp_path / "s.sqlite") as s:
        # Sphere-packing bound 2^7 / (1 + 7) = 16 (Hamming bound, common practice).
        s.add_bound(BoundResult(p, 16, "hamming"))
        # A certificate that does not re-check is kept but never used.
        s.add_bound(BoundResult(p, 10, "fake-lp", certificate={"kind": "bogus"}))
        # Bounds for linear codes only never enter the table.
        assert s.add_bound(BoundResult(p, 9, "griesmer", scope="linear")) is None
        summ = s.summary(p)
        assert summ.upper == 16 and summ.upper_method == "hamming"
        assert s.counts()["bounds"] == 2


def test_search_result_stores_code_and_exhaustive_bound(tmp_path):
    p = Params(2, 5, 5)
    code = repetition_code(2, 5)
    res = SearchResult(p, Status.OPTIMAL, code, 2, "exact", 0.1, seed=3, settings={"x": 1})
    with Store(tmp_path / "s.sqlite") as s:
        cid, bid = s.add_search_result(res, exhaustive=True)
        assert cid is not None and bid is not None
        summ = s.summary(p)
        assert summ.exact and summ.lower == 2 and summ.upper_method == "search:exact"
        # A heuristic's result never becomes a bound.
        res2 = SearchResult(p, Status.FEASIBLE, code, None, "greedy", 0.1)
        assert s.add_search_result(res2, exhaustive=False)[1] is None


def test_runs_keep_largest_budget(tmp_path):
    p = Params(2, 6, 3)
    with Store(tmp_path / "s.sqlite") as s:
        s.mark_run(p, "exact", budget=10, seconds=3, status="feasible")
        s.mark_run(p, "exact", budget=5, seconds=1, status="feasible")
        assert s.run_budget(p, "exact") == 10
        s.mark_run(p, "exact", budget=20, seconds=1, status="optimal")
        assert s.run_budget(p, "exact") == 20
        assert s.counts()["runs"] == 1


def test_foreign_and_corrupt_files(tmp_path):
    junk = tmp_path / "junk.sqlite"
    junk.write_bytes(os.urandom(5000))
    with pytest.raises(InputError, match="not an SQLite database"):
        Store(junk)
    other = tmp_path / "other.sqlite"
    con = sqlite3.connect(other)
    con.execute("CREATE TABLE t(x)")
    con.commit()
    con.close()
    before = other.read_bytes()
    with pytest.raises(InputError, match="another program"):
        Store(other)
    assert other.read_bytes() == before
    # A real store whose pages are overwritten in the middle.
    good = tmp_path / "good.sqlite"
    with Store(good) as s:
        for n in range(3, 12):
            s.add_code(repetition_code(2, n), Params(2, n, n), method="exact")
    con = sqlite3.connect(good)
    con.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    con.close()
    data = bytearray(good.read_bytes())
    data[4096:8192] = os.urandom(4096)
    good.write_bytes(bytes(data))
    with pytest.raises(InputError):
        Store(good)
    with pytest.raises(InputError, match="no such store"):
        Store(tmp_path / "missing.sqlite", create=False)


def test_newer_schema_rejected(tmp_path):
    path = tmp_path / "s.sqlite"
    Store(path).close()
    con = sqlite3.connect(path)
    con.execute("PRAGMA user_version = 99")
    con.close()
    with pytest.raises(InputError, match="schema version 99"):
        Store(path)


def test_import_published_and_contradictions(tmp_path):
    p = Params(2, 7, 3)
    with Store(tmp_path / "s.sqlite") as s:
        s.add_bound(BoundResult(p, 16, "hamming"))
        s.add_code(repetition_code(2, 4), Params(2, 4, 4), method="exact")
        # A(7,3) = 16 (MacWilliams-Sloane, table of A(n,d); from memory).
        assert s.import_published([PublishedRow(2, 7, 3, 16, 16, "ref")]) == 1
        with pytest.raises(InputError, match="contradiction"):
            s.import_published([PublishedRow(2, 6, 3, 8, 8, "ref"),
                                PublishedRow(2, 7, 3, 17, 20, "bad")])
        with pytest.raises(InputError, match="contradiction"):
            s.import_published([PublishedRow(2, 4, 4, 1, 1, "bad")])
        with pytest.raises(InputError, match="lower 5 > upper 4"):
            s.import_published([PublishedRow(2, 5, 3, 5, 4, "bad")])
        # The failed imports left nothing behind, not even their valid rows.
        assert s.counts()["published"] == 1
        assert s.published(p)[0].source == "ref"


def test_read_published_file(tmp_path):
    f = tmp_path / "pub.csv"
    f.write_text("q,n,d,lower,upper,source\n2,7,3,16,16,book\n2,9,4,20,,\n")
    rows = read_published_file(str(f))
    assert rows[0] == PublishedRow(2, 7, 3, 16, 16, "book")
    assert rows[1] == PublishedRow(2, 9, 4, 20, None, "pub.csv")
    bad = tmp_path / "bad.csv"
    bad.write_text("q,n,d,lower,upper\n2,7,x,1,2\n")
    with pytest.raises(InputError, match=r"bad.csv:2: d must be an integer"):
        read_published_file(str(bad))
    binary = tmp_path / "bin.csv"
    binary.write_bytes(b"\xff\xfe\x00garbage")
    with pytest.raises(InputError, match="cannot read"):
        read_published_file(str(binary))
    j = tmp_path / "pub.json"
    j.write_text('[{"q": 2, "n": 8, "d": 4, "lower": 16, "upper": 16, "source": "s"}]')
    assert read_published_file(str(j)) == [PublishedRow(2, 8, 4, 16, 16, "s")]


def test_audit_clean(tmp_path):
    with Store(tmp_path / "s.sqlite") as s:
        s.add_code(hamming_code(3), Params(2, 7, 3), method="exact")
        s.add_bound(BoundResult(Params(2, 7, 3), 16, "hamming"))
        assert s.audit() == []


def test_published_reference_file_is_consistent():
    # data/published_binary.csv is written from memory; check it against theorems:
    # A(n,d) <= 2 A(n-1,d) and A(n-1,d) <= A(n,d) (common practice), the Hamming codes
    # (A(2^r - 1, 3) = 2^(2^r - 1 - r)), Levenshtein/Plotkin: A(2d,d) = 4d for even d when a
    # Hadamard matrix of order 2d exists (MacWilliams-Sloane Ch. 2 Thm 8 and Ch. 17).
    import pathlib

    path = pathlib.Path(__file__).resolve().parents[1] / "data" / "published_binary.csv"
    rows = {(r.n, r.d): r for r in read_published_file(str(path))}
    for (n, d), r in rows.items():
        assert r.upper is None or r.lower <= r.upper
        prev = rows.get((n - 1, d))
        if prev is not None:
            assert prev.lower <= r.lower
            if r.upper is not None and prev.upper is not None:
                assert r.upper <= 2 * prev.upper
        if d % 2 == 1 and (n + 1, d + 1) in rows:
            assert (rows[(n + 1, d + 1)].lower, rows[(n + 1, d + 1)].upper) == (r.lower, r.upper)
    for r_ in (3, 4):
        n = 2**r_ - 1
        assert rows[(n, 3)].lower == rows[(n, 3)].upper == 2 ** (n - r_)
    for d in (4, 6, 8, 10, 12):
        assert rows[(2 * d, d)].upper == 4 * d
    # Golay: A(23,7) = A(24,8) = 4096 (MacWilliams-Sloane Ch. 20); Levenshtein in the Plotkin
    # range: A(n,d) = 2 floor(d / (2d - n)) for even d, n < 2d (MacWilliams-Sloane Ch. 2 Thm 8).
    assert rows[(23, 7)].lower == rows[(24, 8)].upper == 4096
    for (n, d), r in rows.items():
        if d % 2 == 0 and n < 2 * d:
            assert r.lower == r.upper == 2 * (d // (2 * d - n))


def _open_and_write(path: str, n: int) -> str:
    from table_helpers import repetition_code as rep

    try:
        with Store(path) as s:
            s.add_code(rep(2, n), Params(2, n, n), method="exact")
        return "ok"
    except Exception as exc:  # reported to the parent, which asserts on it
        return f"{type(exc).__name__}: {exc}"


def test_many_processes_create_one_store_at_once(tmp_path):
    import multiprocessing

    from codesearch.verify import assert_code

    # Load the verifier's kernels once here, so that the forked children start at once.
    assert_code(repetition_code(2, 3), Params(2, 3, 3))
    path = str(tmp_path / "race.sqlite")
    ctx = multiprocessing.get_context("fork")
    for _ in range(2):
        with ctx.Pool(6) as pool:
            assert pool.starmap(_open_and_write, [(path, n) for n in range(3, 9)]) == ["ok"] * 6
        with Store(path) as s:
            assert s.counts()["codes"] == 6 and s.audit() == []
        os.unlink(path)
        for extra in ("-wal", "-shm"):
            if os.path.exists(path + extra):
                os.unlink(path + extra)


def test_tampered_code_is_caught_on_the_way_out(tmp_path):
    path = tmp_path / "s.sqlite"
    with Store(path) as s:
        cid = s.add_code(hamming_code(3), Params(2, 7, 3), method="exact")
    con = sqlite3.connect(path)
    blob = bytearray(con.execute("SELECT words FROM codes WHERE id=?", (cid,)).fetchone()[0])
    blob[1] = blob[0]  # second word := first word: distance 0
    con.execute("UPDATE codes SET words=? WHERE id=?", (bytes(blob), cid))
    con.commit()
    con.close()
    with Store(path) as s:
        with pytest.raises(VerificationError):
            s.best_code(Params(2, 7, 3))
        assert any(f"code #{cid}" in p for p in s.audit())
