"""The exact method: published cells, closed forms, reductions against the plain search, CLI."""

from __future__ import annotations

import json

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from codesearch import verify
from codesearch.cli import main
from codesearch.model import Code, Params
from codesearch.results import Status
from codesearch.search import search
from codesearch.search import graph

# (q, n, d, A_q(n,d)) with the source of each value.
PUBLISHED = [
    (2, 6, 3, 8),    # MacWilliams & Sloane, Appendix A table of A(n,d) (from memory)
    (2, 7, 3, 16),   # perfect Hamming code [7,4,3] meets the sphere-packing bound 2^7/8
    (2, 8, 3, 20),   # MacWilliams & Sloane, Appendix A (from memory); Best et al. 1978
    (2, 8, 4, 16),   # A(n,d) = A(n-1,d-1) for even d (common practice) and A(7,3) = 16
    (2, 9, 4, 20),   # = A(8,3), same rule
    (2, 8, 5, 4),    # Levenshtein/Plotkin range: A(8,5) = A(9,6) = 2*floor(6/3) = 4
    (2, 9, 5, 6),    # A(10,6) = 2*floor(6/(12-10)) = 6 (Plotkin bound, met: Levenshtein)
    (2, 10, 5, 12),  # A(11,6) = 2*floor(6/(12-11)) = 12 (Plotkin bound, met: Levenshtein)
    (2, 10, 6, 6),   # Plotkin/Levenshtein as above
    (2, 11, 6, 12),  # Plotkin/Levenshtein as above
    (3, 4, 3, 9),    # ternary tetracode [4,2,3] is MDS: meets the Singleton bound 3^(4-3+1)
    (3, 5, 3, 18),   # published ternary table value (from memory)
    (3, 6, 4, 18),   # published ternary table value (from memory)
]


@pytest.mark.parametrize("q,n,d,value", PUBLISHED)
def test_published_cells_are_proved(q, n, d, value):
    # The search proves these by itself (no outside bound consulted).
    res = search(Params(q, n, d), "exact", time_limit=120, use_bounds=False)
    assert res.status is Status.OPTIMAL
    assert res.size == res.upper == value
    verify.assert_code(res.code, Params(q, n, d))


@pytest.mark.parametrize("q,n", [(2, 5), (3, 3), (4, 3), (5, 2)])
def test_closed_forms(q, n):
    # A_q(n,1) = q^n, A_q(n,2) = q^(n-1) (single parity check), A_q(n,n) = q (repetition):
    # Singleton bound met by MDS codes (MacWilliams & Sloane ch. 11).
    for d, value in ((1, q**n), (2, q ** (n - 1)), (n, q)):
        res = search(Params(q, n, d), "exact", time_limit=60)
        assert res.optimal and res.size == value, (q, n, d)


SMALL_CELLS = [(2, n, d) for n in range(3, 8) for d in range(2, n + 1)] + [
    (3, 3, 2), (3, 4, 2), (3, 4, 3), (3, 4, 4), (4, 3, 2), (4, 3, 3),
]


@pytest.mark.parametrize("q,n,d", SMALL_CELLS)
def test_reduced_and_unreduced_searches_agree(q, n, d):
    p = Params(q, n, d)
    # leaf_size=8: these spaces are small enough that the default would search them whole
    reduced = search(p, "exact", time_limit=60, use_bounds=False, leaf_size=8)
    plain = search(p, "exact", time_limit=60, reduce=False, use_bounds=False)
    assert reduced.optimal and plain.optimal
    assert reduced.size == plain.size


DEPTHS = [(1, 2), (1, 4), (8, 3), (1000, 1)]


@pytest.mark.parametrize("leaf_size,max_fixed", DEPTHS)
def test_splitting_depth_does_not_change_the_answer(leaf_size, max_fixed):
    # A(7,3) = 16, A_3(5,3) = 18, A(7,4) = 8 (see PUBLISHED) whatever the splitting depth.
    for q, n, d, value in ((2, 7, 3, 16), (3, 5, 3, 18), (2, 7, 4, 8)):
        res = search(Params(q, n, d), "exact", leaf_size=leaf_size, max_fixed=max_fixed,
                     use_bounds=False)
        assert res.optimal and res.size == value, (q, n, d)


@pytest.mark.slow
@pytest.mark.parametrize("leaf_size,max_fixed", DEPTHS)
def test_splitting_depth_a83(leaf_size, max_fixed):
    # A(8,3) = 20 (see PUBLISHED); these depths take 2-30 s each.
    res = search(Params(2, 8, 3), "exact", leaf_size=leaf_size, max_fixed=max_fixed,
                 use_bounds=False)
    assert res.optimal and res.size == 20


@st.composite
def fixed_and_words(draw):
    q = draw(st.integers(2, 4))
    n = draw(st.integers(1, 7))
    seed = draw(st.integers(0, 2**32 - 1))
    k = draw(st.integers(0, 3))
    rng = np.random.default_rng(seed)
    fixed = rng.integers(0, q, size=(k, n)).astype(np.uint8)
    words = rng.integers(0, q, size=(30, n)).astype(np.uint8)
    return q, fixed, words, rng


def _random_stabiliser_element(q, fixed, rng):
    """A random isometry fixing every fixed word: permute coordinates of equal column type,
    and at each coordinate permute the symbols absent from its column."""
    n = fixed.shape[1]
    perm = np.arange(n)
    types = {}
    for i in range(n):
        types.setdefault(fixed[:, i].tobytes(), []).append(i)
    for cols in types.values():
        perm[cols] = rng.permutation(cols)
    sym = np.tile(np.arange(q), (n, 1))
    for i in range(n):
        absent = [s for s in range(q) if s not in set(fixed[:, i].tolist())]
        sym[i, absent] = rng.permutation(absent)

    def g(words):
        mapped = sym[np.arange(n)[None, :], words.astype(np.int64)]
        out = np.empty_like(mapped)
        out[:, perm] = mapped  # coordinate i goes to perm[i]
        return out.astype(np.uint8)

    return g


@given(fixed_and_words())
def test_stabiliser_canon_is_an_orbit_invariant_inside_the_orbit(data):
    q, fixed, words, rng = data
    g = _random_stabiliser_element(q, fixed, rng)
    assert np.array_equal(g(fixed), fixed)
    canon = graph.stabiliser_canon(words, fixed, q)
    # Invariant under the group ...
    assert np.array_equal(graph.stabiliser_canon(g(words), fixed, q), canon)
    # ... and an isometry image: distances to every fixed word are kept.
    for f in fixed:
        assert np.array_equal((canon != f).sum(axis=1), (words != f).sum(axis=1))


def test_orbit_split_levels_one_and_two():
    # No fixed word: one orbit, the zero word. Then {0}: one orbit per weight >= d.
    root = graph.root(2, 6, 3)
    (zero,) = graph.orbit_split(root, 2, 3)
    assert zero.fixed.tolist() == [[0] * 6]
    kids = graph.orbit_split(zero, 2, 3, first_weight=3)
    assert [k.orbit_weight for k in kids] == [3, 4, 5, 6]
    assert kids[0].fixed[1].tolist() == [1, 1, 1, 0, 0, 0]
    # Later children exclude earlier orbits: no weight-3 candidate in the weight-4 child.
    assert not np.any((kids[1].candidates != 0).sum(axis=1) == 3)


def test_time_limit_returns_verified_code_and_valid_bound():
    # A(10,4) = 40 (MacWilliams & Sloane Appendix A, from memory): a short run cannot finish,
    # yet its code must verify and its bound must not fall below the true value.
    p = Params(2, 10, 4)
    res = search(p, "exact", time_limit=1.0)
    assert res.status in (Status.FEASIBLE, Status.OPTIMAL)
    verify.assert_code(res.code, p)
    assert res.size <= 40 <= res.upper


@pytest.mark.parametrize("use_bounds", [False, True])
def test_target_decides_existence(use_bounds):
    p = Params(2, 8, 3)  # A(8,3) = 20 (see PUBLISHED)
    yes = search(p, "exact", size=20, use_bounds=use_bounds)
    assert yes.exists is True and yes.size >= 20
    assert yes.upper is not None and yes.upper >= 20
    for small in (1, 2, 5):
        # Meeting a small target proves nothing about optimality.
        res = search(p, "exact", size=small, use_bounds=use_bounds)
        assert res.exists is True and res.status is Status.FEASIBLE
        assert res.upper >= 20
    no = search(p, "exact", size=21, use_bounds=use_bounds)
    assert no.status is Status.INFEASIBLE and no.exists is False and no.upper == 20


def test_cli_find_json_and_code_file(tmp_path, capsys):
    from codesearch.codefile import read_code

    out = tmp_path / "c.txt"
    assert main(["find", "7", "3", "--json", "--out", str(out), "--quiet"]) == 0
    summary = json.loads(capsys.readouterr().out.strip().splitlines()[-1])
    for key in ("q", "n", "d", "size", "optimal", "upper", "method", "seconds", "nodes", "file"):
        assert key in summary
    assert summary["size"] == 16 and summary["optimal"] is True and summary["upper"] == 16
    assert summary["file"] == str(out)
    read = read_code(str(out))
    verify.assert_code(read.code, Params(2, 7, 3))
    assert read.code.size == 16


@pytest.mark.parametrize("argv", [
    ["find", "5", "9"], ["find", "5", "3", "--q", "1"], ["find", "5", "3", "--method", "nope"],
    ["find", "40", "3"],
])
def test_cli_find_bad_input_exits_2(argv, capsys):
    assert main(argv + ["--quiet"]) == 2
    err = capsys.readouterr().err.strip()
    assert err and "\n" not in err and "Traceback" not in err


def test_known_bounds_agree_with_the_search():
    # With the bounds module consulted the answers must not change (published cells above).
    for q, n, d, value in PUBLISHED:
        res = search(Params(q, n, d), "exact", time_limit=120)
        assert res.optimal and res.size == value, (q, n, d)


def test_progress_callback_and_live_display():
    from codesearch.report.live import live_progress

    seen = []
    res = search(Params(2, 8, 3), "exact", progress=seen.append)
    assert res.optimal and seen
    assert {"nodes", "incumbent", "elapsed"} <= set(seen[-1])
    with live_progress(enabled=True, label="A(8,3)") as update:
        for info in seen:
            update(info)
    with live_progress(enabled=False) as update:
        assert update is None
