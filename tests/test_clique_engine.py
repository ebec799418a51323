"""The bitset clique engine against outside oracles (networkx) and its slow reference twins."""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from codesearch import _kernels as K
from codesearch import _reference as R
from codesearch.errors import ParameterError
from codesearch.search.clique import (
    bitsets_from_dense,
    bitsets_from_edges,
    bitsets_to_dense,
    is_clique,
    max_clique,
    max_weight_clique,
)


@st.composite
def graphs(draw, max_n: int = 70):
    """A random graph (dense 0/1 matrix) with a random edge density, plus positive weights."""
    n = draw(st.integers(0, max_n))
    density = draw(st.floats(0.05, 0.95))
    seed = draw(st.integers(0, 2**32 - 1))
    rng = np.random.default_rng(seed)
    upper = np.triu(rng.random((n, n)) < density, 1)
    weights = rng.integers(1, 12, size=n)
    return upper | upper.T, weights


def _nx_graph(a: np.ndarray, weights=None) -> nx.Graph:
    g = nx.from_numpy_array(a.astype(int))
    if weights is not None:
        for v, w in enumerate(weights):
            g.nodes[v]["w"] = int(w)
    return g


@given(graphs())
def test_max_clique_matches_networkx(gw):
    # Oracle: networkx.max_weight_clique with weight=None (an independent exact algorithm).
    a, _ = gw
    adj = bitsets_from_dense(a)
    res = max_clique(adj)
    expected = len(nx.max_weight_clique(_nx_graph(a), weight=None)[0]) if a.shape[0] else 0
    assert res.complete and res.optimal
    assert res.size == res.weight == res.upper == expected
    assert is_clique(adj, res.vertices)


@given(graphs(max_n=50))
def test_max_weight_clique_matches_networkx(gw):
    # Oracle: networkx.max_weight_clique with integer node weights.
    a, w = gw
    adj = bitsets_from_dense(a)
    res = max_weight_clique(adj, w)
    expected = nx.max_weight_clique(_nx_graph(a, w), weight="w")[1] if a.shape[0] else 0
    assert res.optimal and res.weight == expected == res.upper
    assert res.weight == int(np.asarray(w)[res.vertices].sum())
    assert is_clique(adj, res.vertices)


@given(graphs(max_n=18))
def test_weighted_engine_matches_reference_enumeration(gw):
    a, w = gw
    adj = bitsets_from_dense(a)
    sets = R.bitset_rows_to_sets(adj, a.shape[0])
    assert max_weight_clique(adj, w).weight == R.max_weight_clique_value(sets, w)


@given(graphs(max_n=40), st.integers(0, 1000), st.integers(-1, 30))
def test_colour_level_matches_twin(gw, seed, thr):
    a, w = gw
    n = a.shape[0]
    if n == 0:
        return
    adj = bitsets_from_dense(a)
    rng = np.random.default_rng(seed)
    cand = sorted(set(rng.choice(n, size=rng.integers(1, n + 1), replace=False).tolist()))
    nw = adj.shape[1]
    p = np.zeros((1, nw), np.uint64)
    for v in cand:
        p[0, v >> 6] |= np.uint64(1) << np.uint64(v & 63)
    lst = np.zeros((1, n), np.int64)
    bst = np.zeros((1, n), np.int64)
    cnt = np.zeros(1, np.int64)
    pos = np.zeros(1, np.int64)
    classes = K.clique_colour_level(adj, np.asarray(w, np.int64), p, lst, bst, cnt, pos, 0, thr,
                                    np.empty(nw, np.uint64), np.empty(nw, np.uint64))
    listed, bounds, nclasses = R.colour_level(R.bitset_rows_to_sets(adj, n), w, set(cand), thr)
    assert classes == nclasses
    assert lst[0, : cnt[0]].tolist() == listed
    assert bst[0, : cnt[0]].tolist() == bounds
    assert pos[0] == cnt[0] - 1


@given(graphs(max_n=70))
def test_order_permute_greedy_match_twins(gw):
    a, w = gw
    n = a.shape[0]
    if n == 0:
        return
    adj = bitsets_from_dense(a)
    sets = R.bitset_rows_to_sets(adj, n)
    order = K.clique_degeneracy_order(adj, n)
    assert order.tolist() == R.degeneracy_order(sets)
    padj = K.clique_permute(adj, order, n)
    assert R.bitset_rows_to_sets(padj, n) == R.permute(sets, order)
    gw_, verts = K.clique_greedy(adj, np.asarray(w, np.int64), n, 5)
    assert gw_ == R.greedy_clique(sets, w, 5)
    assert is_clique(adj, verts)


@given(graphs(max_n=70))
def test_prepare_matches_twins(gw):
    a, w = gw
    n = a.shape[0]
    if n == 0:
        return
    adj = bitsets_from_dense(a)
    sets = R.bitset_rows_to_sets(adj, n)
    order, padj, pw, gwt, gclique, classes = K.clique_prepare(adj, np.asarray(w, np.int64), n, 7)
    assert order.tolist() == R.degeneracy_order(sets)
    psets = R.permute(sets, order)
    assert R.bitset_rows_to_sets(padj, n) == psets
    assert pw.tolist() == [int(w[v]) for v in order]
    assert gwt == R.greedy_clique(psets, pw, 7) == int(pw[gclique].sum())
    assert classes == R.colour_level(psets, np.ones(n), set(range(n)), -1)[2]


@given(st.integers(2, 4), st.integers(1, 7), st.integers(1, 7), st.integers(0, 2**32 - 1))
def test_code_adjacency_matches_twin(q, n, d, seed):
    from codesearch.search.graph import code_graph

    rng = np.random.default_rng(seed)
    words = rng.integers(0, q, size=(int(rng.integers(1, 40)), n)).astype(np.uint8)
    adj = code_graph(words, q, d)
    assert R.bitset_rows_to_sets(adj, words.shape[0]) == R.code_adjacency(words, d)


def test_bitset_conversions_round_trip():
    rng = np.random.default_rng(7)
    for n in (1, 63, 64, 65, 130):
        upper = np.triu(rng.random((n, n)) < 0.3, 1)
        a = upper | upper.T
        adj = bitsets_from_dense(a)
        assert adj.shape == (n, (n + 63) // 64)
        assert np.array_equal(bitsets_to_dense(adj, n), a)
        edges = list(zip(*np.nonzero(upper)))
        assert np.array_equal(bitsets_from_edges(n, edges), adj)


@given(graphs(max_n=80))
def test_packbits_rows_are_accepted(gw):
    # Same answer from np.packbits byte rows as from uint64 limbs (networkx as the oracle).
    a, w = gw
    if a.shape[0] == 0:
        return
    res = max_weight_clique(np.packbits(a, axis=1, bitorder="little"), w)
    expected = nx.max_weight_clique(_nx_graph(a, w), weight="w")[1]
    assert res.optimal and res.weight == expected
    assert is_clique(bitsets_from_dense(a), res.vertices)


@given(graphs(max_n=60), st.integers(0, 200))
def test_stopped_search_bounds_bracket_the_optimum(gw, budget):
    # Oracle: networkx max_weight_clique; a search cut after `budget` nodes must return a
    # real clique no heavier than the optimum and an upper bound no lighter.
    a, w = gw
    if a.shape[0] == 0:
        return
    adj = bitsets_from_dense(a)
    res = max_weight_clique(adj, w, node_limit=budget)
    opt = nx.max_weight_clique(_nx_graph(a, w), weight="w")[1]
    assert is_clique(adj, res.vertices)
    assert res.weight <= opt <= res.upper
    if res.complete:
        assert res.weight == opt


def test_anytime_node_limit_gives_valid_bound():
    # A random graph hard enough not to finish in 50 nodes; the bound must still hold.
    rng = np.random.default_rng(3)
    n = 120
    upper = np.triu(rng.random((n, n)) < 0.8, 1)
    a = upper | upper.T
    adj = bitsets_from_dense(a)
    exact = max_clique(adj)
    partial = max_clique(adj, node_limit=50)
    assert not partial.complete
    assert partial.weight <= exact.weight <= partial.upper
    assert is_clique(adj, partial.vertices)


def test_lower_bound_semantics():
    # Complete graph K_5 (clique number 5, by definition).
    a = ~np.eye(5, dtype=bool)
    adj = bitsets_from_dense(a)
    res = max_clique(adj, lower=5)
    assert res.complete and res.upper == 5
    res = max_clique(adj, lower=4)
    assert res.optimal and res.size == 5


def test_empty_and_edgeless_graphs():
    assert max_clique(np.zeros((0, 1), np.uint64)).weight == 0
    res = max_clique(bitsets_from_edges(3, []))
    assert res.optimal and res.size == 1


def test_bad_inputs():
    adj = bitsets_from_edges(3, [(0, 1)])
    with pytest.raises(ParameterError):
        max_weight_clique(adj, [1, 0, 1])
    with pytest.raises(ParameterError):
        max_weight_clique(adj, [1, 1])
    with pytest.raises(ParameterError):
        max_clique(adj.astype(np.int64))
    with pytest.raises(ParameterError):
        bitsets_from_dense(np.array([[0, 1], [0, 0]]))


def test_goal_stops_early_with_a_valid_clique():
    # Complete graph K_40 minus a perfect matching: clique number 20 (one vertex per pair).
    n = 40
    a = ~np.eye(n, dtype=bool)
    for i in range(0, n, 2):
        a[i, i + 1] = a[i + 1, i] = False
    adj = bitsets_from_dense(a)
    full = max_clique(adj)
    assert full.optimal and full.size == 20
    res = max_clique(adj, goal=15)
    assert res.size >= 15 and is_clique(adj, res.vertices) and res.upper >= 20


def test_importing_search_modules_loads_no_numba():
    import subprocess
    import sys

    code = ("import sys, codesearch, codesearch.search.clique, codesearch.search.graph, "
            "codesearch.search.exact, codesearch.report.live; "
            "assert 'numba' not in sys.modules, 'numba imported'")
    subprocess.run([sys.executable, "-c", code], check=True)


def test_public_api_of_the_clique_module():
    import codesearch.search.clique as C

    assert sorted(C.__all__) == sorted([
        "CliqueResult", "bitsets_from_dense", "bitsets_from_edges", "bitsets_to_dense",
        "is_clique", "max_clique", "max_weight_clique",
    ])
    import inspect

    params = inspect.signature(C.max_weight_clique).parameters
    assert list(params)[:2] == ["adj_bits", "weights"]
    assert {"time_limit", "lower", "progress", "node_limit", "goal"} <= set(params)
