"""Tests of propagation between cells: constructions checked against theorems, fixed point."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from codesearch.errors import VerificationError
from codesearch.model import Code, Params
from codesearch.constructions.operations import (
    raw_direct_sum as direct_sum, raw_pad as pad, raw_parity_extend as parity_extend,
    raw_puncture as puncture, raw_u_u_plus_v as u_u_plus_v,
)
from codesearch.propagate import propagate, shorten_best as shorten
from codesearch.results import BoundResult
from codesearch.store import Store
from codesearch.verify import min_distance
from codesearch.verify.relations import relation_value
from table_helpers import even_weight_code, hamming_code, repetition_code


def test_parity_extension_of_hamming_code():
    # Extended Hamming [8,4,4] code: parity extension of [7,4,3] (MacWilliams-Sloane Ch. 1).
    ext = parity_extend(hamming_code(3))
    assert ext.size == 16 and ext.n == 8 and min_distance(ext) == 4


def test_u_u_plus_v_gives_reed_muller():
    # RM(1,3) = (u|u+v) with u in the even-weight [4,3,2] code and v in the repetition
    # [4,1,4] code: [8,4,4] (MacWilliams-Sloane Ch. 13 section 3).
    c = u_u_plus_v(even_weight_code(4), repetition_code(2, 4))
    assert (c.size, c.n, min_distance(c)) == (16, 8, 4)


@settings(max_examples=25, deadline=None, derandomize=True)
@given(q=st.integers(2, 5), n=st.integers(2, 6), m1=st.integers(2, 6), m2=st.integers(2, 6),
       seed=st.integers(0, 10**6))
def test_constructions_meet_their_distance_claims(q, n, m1, m2, seed):
    rng = np.random.default_rng(seed)
    a = Code(np.unique(rng.integers(0, q, (m1, n)), axis=0), q)
    b = Code(np.unique(rng.integers(0, q, (m2, n)), axis=0), q)
    if a.size < 2 or b.size < 2:
        return
    da, db = min_distance(a), min_distance(b)
    if True:
        # (u|u+v): distance >= min(2 d1, d2) (MacWilliams-Sloane Ch. 2 Thm 33, over Z_q).
        assert min_distance(u_u_plus_v(a, b)) >= min(2 * da, db)
        assert min_distance(direct_sum(a, b)) == min(da, db)
    s = shorten(a)
    assert s.size >= -(-a.size // q) and s.n == n - 1
    if s.size >= 2:
        assert min_distance(s) >= da
    if da >= 2:
        assert puncture(a).size == a.size and min_distance(puncture(a)) >= da - 1
    assert min_distance(pad(a)) == da


def test_relation_value_rules():
    p = Params(2, 8, 3)
    assert relation_value("times-q-shorter", p, [(Params(2, 7, 3), 16)]) == 32
    assert relation_value("times-q-shorter", p, [(Params(2, 6, 3), 16)]) is None
    assert relation_value("parity-odd", Params(2, 7, 3), [(Params(2, 8, 4), 16)]) == 16
    assert relation_value("parity-odd", Params(3, 7, 3), [(Params(3, 8, 4), 16)]) is None


def test_fixed_point_from_hamming(tmp_path):
    cells = [Params(2, n, d) for n in range(5, 9) for d in range(3, 5) if d <= n]
    with Store(tmp_path / "s.sqlite") as s:
        s.add_code(hamming_code(3), Params(2, 7, 3), method="exact")
        # Hamming bound 2^7/8 = 16: the Hamming code is perfect (common practice).
        s.add_bound(BoundResult(Params(2, 7, 3), 16, "hamming"))
        out = propagate(s, cells)
        assert out.codes > 0 and out.bounds > 0
        # A(8,4) = 16 and A(6,3) = 8 (MacWilliams-Sloane, table of A(n,d); from memory).
        assert s.summary(Params(2, 8, 4)).exact and s.summary(Params(2, 8, 4)).lower == 16
        assert s.summary(Params(2, 6, 3)).lower == 8
        assert s.summary(Params(2, 6, 3)).upper == 16  # punctured/longer relations only
        assert s.summary(Params(2, 8, 4)).lower_provenance["rule"] == "parity"
        assert s.audit() == []
        again = propagate(s, cells)
        assert (again.codes, again.bounds) == (0, 0)


def test_relation_certificate_is_checked_against_store(tmp_path):
    with Store(tmp_path / "s.sqlite") as s:
        bid = s.add_bound(BoundResult(Params(2, 7, 3), 16, "hamming"))
        cert = {"kind": "cell-relation", "rule": "punctured",
                "cites": [{"q": 2, "n": 7, "d": 3, "bound_id": bid, "value": 16}]}
        with pytest.raises(VerificationError):
            s.add_bound(BoundResult(Params(2, 8, 4), 15, "relation:punctured", certificate=cert))
        bad = dict(cert, cites=[dict(cert["cites"][0], value=12)])
        with pytest.raises(VerificationError):
            s.add_bound(BoundResult(Params(2, 8, 4), 12, "relation:punctured", certificate=bad))
        s.add_bound(BoundResult(Params(2, 8, 4), 16, "relation:punctured", certificate=cert))
        assert s.summary(Params(2, 8, 4)).upper == 16


def _hamming_bound(n: int, d: int) -> int:
    # Sphere-packing bound floor(2^n / V(n, floor((d-1)/2))) (common practice).
    from math import comb

    t = (d - 1) // 2
    return 2**n // sum(comb(n, i) for i in range(t + 1))


@settings(max_examples=8, deadline=None, derandomize=True)
@given(seeds=st.lists(st.tuples(st.integers(3, 8), st.integers(2, 5)), min_size=1, max_size=4,
                      unique=True),
       bounded=st.lists(st.tuples(st.integers(3, 8), st.integers(2, 5)), min_size=1, max_size=8,
                        unique=True))
def test_fixed_point_properties(tmp_path_factory, seeds, bounded):
    import table_stub_lex

    cells = [Params(2, n, d) for n in range(3, 9) for d in range(2, 6) if d <= n]
    path = tmp_path_factory.mktemp("fp") / "s.sqlite"
    with Store(path) as s:
        for n, d in seeds:
            if d <= n:
                p = Params(2, n, d)
                s.add_code(table_stub_lex.lexicode(p), p, method="stub-lex")
        for n, d in bounded:
            if d <= n:
                s.add_bound(BoundResult(Params(2, n, d), _hamming_bound(n, d), "hamming"))
        propagate(s, cells)
        lo = {p: s.summary(p).lower for p in cells}
        up = {p: s.summary(p).upper for p in cells}
        assert s.audit() == []
    for p in cells:
        if up[p] is not None:
            assert lo[p] <= up[p]
        for other, rel in (((p.n, p.d + 1), "relax"), ((p.n - 1, p.d), "pad")):
            o = Params(2, *other) if 1 <= other[1] <= other[0] else None
            if o in lo:
                assert lo[p] >= lo[o], (p, o, rel)
        o = Params(2, p.n + 1, p.d)
        if o in up and up[o] is not None:
            assert up[p] is not None and up[p] <= up[o]
        if p.n - 1 >= p.d:
            o = Params(2, p.n - 1, p.d)
            if up.get(o) is not None:
                assert up[p] is not None and up[p] <= 2 * up[o]


def test_derived_codes_cite_family_and_operations(tmp_path):
    # Extended Golay [24,12,8] (MacWilliams-Sloane Ch. 20) stored as a generator matrix:
    # shortening three times gives a [21,9,8] code, 512 words; each derived code is kept as a
    # generator and labelled with the operations applied.
    from codesearch.constructions import build_family
    from codesearch.model import LinearCode

    golay = build_family("golay", q=2, extended=1)
    assert isinstance(golay.code, LinearCode)
    cells = [Params(2, n, 8) for n in range(20, 25)]
    with Store(tmp_path / "s.sqlite") as s:
        s.add_code(golay.code, Params(2, 24, 8), method="construction",
                   provenance={"construction": golay.provenance})
        propagate(s, cells)
        summ = s.summary(Params(2, 21, 8))
        assert summ.lower == 512
        assert summ.lower_provenance["label"] == "3x shortened extended Golay(24,12)"
        assert isinstance(s.get_stored(summ.code_id)[1], LinearCode)
        # never A(n+1, d) < A(n, d) in the table
        lows = [s.summary(p).lower for p in cells]
        assert lows == sorted(lows)
    from codesearch.report import write_report

    page = write_report(str(tmp_path / "s.sqlite"), "html")
    assert "3x shortened extended Golay(24,12)" in page
