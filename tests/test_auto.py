"""The portfolio method 'auto': verified codes, and OPTIMAL only when a proof backs it."""

from __future__ import annotations

import sys
import types

import numpy as np
import pytest

from codesearch import bounds, verify
from codesearch.errors import VerificationError
from codesearch.model import Params
from codesearch.results import BoundResult, Status
from codesearch.search import METHODS, MethodSpec, Outcome, auto, search

import known_codes as kc

HAMMING = Params(2, 7, 3)


def _no_bounds(monkeypatch):
    # no usable bound: the front end finds only an uncertified value
    monkeypatch.setattr(bounds, "upper_bound", _fake_bound(10**6, certified=False))


def _only(monkeypatch, names):
    """Keep only the named methods registered (plus any fakes added by the test)."""
    for name in list(METHODS):
        if name not in names:
            monkeypatch.delitem(METHODS, name)


def test_without_proof_auto_reports_feasible(monkeypatch):
    _no_bounds(monkeypatch)
    _only(monkeypatch, {"orbit", "auto"})
    res = search(HAMMING, "auto", time_limit=20, seed=3)
    verify.assert_code(res.code, HAMMING)
    # The [7,4] Hamming code is cyclic (MacWilliams & Sloane ch. 7, from memory): found by orbits.
    assert res.size == 16
    assert res.status is Status.FEASIBLE and res.upper is None and not res.optimal
    assert res.settings["lower_method"].startswith("orbit[")
    assert res.settings["upper_method"] is None
    assert res.seed == 3
    assert any("not registered" in s for s in res.settings["steps"])


def _fake_bound(value, certified=True, scope="all", method="sphere-packing"):
    def upper_bound(params, **_):
        return BoundResult(params, value, method, certified=certified, scope=scope)
    return upper_bound


def test_code_meeting_a_usable_bound_is_optimal(monkeypatch):
    # Sphere packing: A(7,3) <= 2^7 / (1 + 7) = 16 (Hamming bound, a theorem; common practice).
    _only(monkeypatch, {"orbit", "auto"})
    monkeypatch.setattr(bounds, "upper_bound", _fake_bound(16), raising=False)
    res = search(HAMMING, "auto", time_limit=20)
    assert res.status is Status.OPTIMAL and res.size == res.upper == 16
    assert res.settings["upper_method"] == "bound:sphere-packing"
    # it stops as soon as the bound is met: no orbit step after the one that met it
    orbit_steps = [s for s in res.settings["steps"] if s.startswith("orbit[")]
    assert orbit_steps[-1].startswith(res.settings["lower_method"])


@pytest.mark.parametrize("certified,scope", [(False, "all"), (True, "linear")])
def test_unusable_bounds_never_make_optimal(monkeypatch, certified, scope):
    _only(monkeypatch, {"orbit", "auto"})
    monkeypatch.setattr(bounds, "upper_bound", _fake_bound(16, certified, scope), raising=False)
    res = search(HAMMING, "auto", time_limit=10)
    assert res.status is Status.FEASIBLE and res.upper is None


def test_bound_below_a_verified_code_is_a_bug(monkeypatch):
    _only(monkeypatch, {"orbit", "auto"})
    monkeypatch.setattr(bounds, "upper_bound", _fake_bound(15), raising=False)
    with pytest.raises(VerificationError):
        search(HAMMING, "auto", time_limit=10)


def _register_fake(monkeypatch, name, exhaustive, run):
    module = types.ModuleType(f"fake_{name}")
    module.OPTIONS = frozenset({"size"})
    module.SEEDING = "none"
    module.run = run
    monkeypatch.setitem(sys.modules, module.__name__, module)
    monkeypatch.setitem(METHODS, name, MethodSpec(name, module.__name__, exhaustive, "fake"))


def test_exhaustive_step_proof_is_used(monkeypatch):
    _no_bounds(monkeypatch)
    _only(monkeypatch, {"auto"})
    calls = []

    def exact_run(ctx, **options):
        calls.append(options)
        return Outcome(kc.hamming_7_4(), 16)

    _register_fake(monkeypatch, "exact", True, exact_run)
    res = search(HAMMING, "auto", time_limit=10)
    assert res.status is Status.OPTIMAL and res.upper == 16
    assert res.settings["upper_method"] == "exact" and res.settings["lower_method"] == "exact"


def test_heuristic_upper_is_ignored_and_sat_gets_the_next_size(monkeypatch):
    _no_bounds(monkeypatch)
    _only(monkeypatch, {"auto"})
    asked = []

    def local_run(ctx, **options):
        # a heuristic that (wrongly) fills 'upper': it must not be trusted
        return Outcome(kc.hamming_7_4(), 16)

    def sat_run(ctx):
        asked.append(ctx.target)
        return Outcome(None, ctx.target - 1)

    _register_fake(monkeypatch, "local", False, local_run)
    _register_fake(monkeypatch, "sat", True, sat_run)
    res = search(HAMMING, "auto", time_limit=10)
    assert asked == [17]
    assert res.status is Status.OPTIMAL and res.upper == 16
    assert res.settings["lower_method"] == "local" and res.settings["upper_method"] == "sat"


def test_failing_step_is_skipped(monkeypatch):
    _no_bounds(monkeypatch)
    _only(monkeypatch, {"orbit", "auto"})
    monkeypatch.setitem(METHODS, "greedy", MethodSpec("greedy", "codesearch.no_such_module",
                                                      False, "missing"))
    res = search(HAMMING, "auto", time_limit=10, group="cyclic")
    assert res.size == 16
    assert any(s.startswith("greedy: skipped") for s in res.settings["steps"])


def test_natural_groups_parse_for_many_cells():
    from codesearch.search import groups

    for q, n in [(2, 7), (2, 8), (2, 15), (2, 16), (3, 6), (4, 5), (2, 3), (5, 4)]:
        for spec in auto.natural_groups(q, n):
            groups.parse_group(spec, q, n)


# ------------------------------------------------------------------------------ with the real
# methods and bounds of the merged tree (steps missing from a checkout are skipped by auto)
from hypothesis import given, settings, strategies as st  # noqa: E402


def test_real_portfolio_on_perfect_and_mds_cells():
    # A(7,3) = 16 (Hamming code, perfect: sphere-packing bound met) and A_4(5,3) = 64
    # (MDS [5,3,3] over GF(4): Singleton bound met); closed forms, common practice.
    for params, value in ((HAMMING, 16), (Params(4, 5, 3), 64)):
        res = search(params, "auto", time_limit=30)
        verify.assert_code(res.code, params)
        assert res.size == value
        if res.optimal:
            assert res.upper == value and res.settings["upper_method"] is not None


def _clique_number(params: Params) -> int:
    # networkx's exact max clique on the code graph, as the outside oracle (tiny cells only)
    import itertools
    import networkx as nx

    words = list(itertools.product(range(params.q), repeat=params.n))
    graph = nx.Graph()
    graph.add_nodes_from(range(len(words)))
    graph.add_edges_from((i, j) for i in range(len(words)) for j in range(i + 1, len(words))
                         if sum(a != b for a, b in zip(words[i], words[j])) >= params.d)
    return max(len(c) for c in nx.find_cliques(graph))


@settings(max_examples=8)
@given(q=st.sampled_from([2, 3]), n=st.integers(2, 5), d=st.integers(2, 5))
def test_auto_is_sound_on_tiny_cells(q, n, d):
    if q == 3:
        n = min(n, 4)
    d = min(d, n)
    params = Params(q, n, d)
    res = search(params, "auto", time_limit=10)
    truth = _clique_number(params)
    assert res.size <= truth
    if res.upper is not None:
        assert res.upper >= truth
    if res.optimal:
        assert res.size == truth == res.upper


def test_progress_reports_portfolio_totals(monkeypatch):
    _only(monkeypatch, {"orbit", "auto"})
    monkeypatch.setattr(bounds, "upper_bound", _fake_bound(16), raising=False)
    seen = []
    res = search(HAMMING, "auto", time_limit=20, progress=seen.append)
    steps = [e for e in seen if "step" in e]
    assert steps and steps[-1]["best"] == res.size == 16 and steps[-1]["upper"] == 16


# ------------------------------------------------------------------- the plan by the cell
def test_plan_puts_exact_up_front_on_small_spaces():
    steps = auto.plan(Params(2, 8, 3))
    assert [s.method for s in steps][:2] == ["lexicode", "exact"]
    assert [s.method for s in steps][-1] == "sat"


def test_plan_starts_with_constructions_then_orbits_on_large_spaces():
    methods = [s.method for s in auto.plan(Params(2, 16, 3))]
    assert methods[0] == "constructions"
    assert methods[1] == "orbit"
    assert "exact" not in methods and "sat" not in methods
    # orbit enumeration is linear in q^n: past its limit only constructions and scans remain
    big = [s.method for s in auto.plan(Params(2, 24, 8))]
    assert big[0] == "constructions" and "orbit" not in big


def test_step_needs_grow_with_the_space():
    small, large = Params(2, 12, 3), Params(2, 20, 3)
    for method in ("lexicode", "local"):
        assert auto.step_need(method, small) < auto.step_need(method, large)
    assert auto.step_need("orbit", small, order=12) < auto.step_need("orbit", large, order=20)
    # a group far too small for the space is not tried at all
    assert auto.step_need("orbit", Params(2, 22, 3), order=2) == float("inf")


def test_a_step_never_starts_when_the_time_left_cannot_hold_it(monkeypatch):
    _no_bounds(monkeypatch)
    _only(monkeypatch, {"auto"})
    calls = []

    def slow_run(ctx, **options):
        calls.append(ctx.time_limit)
        return Outcome(kc.hamming_7_4())

    _register_fake(monkeypatch, "local", False, slow_run)
    real_need = auto.step_need
    monkeypatch.setattr(auto, "step_need", lambda method, params, **kw: 5.0 if method == "local"
                        else real_need(method, params, **kw))
    res = search(HAMMING, "auto", time_limit=1.0)
    assert calls == []
    assert any(s.startswith("local: skipped (needs ~5.00 s") for s in res.settings["steps"])


def test_large_cell_gets_the_construction_first():
    # The binary Golay code [23,12,7] is perfect: 2^12 words meet the sphere-packing bound,
    # so A(23,7) = 4096 (MacWilliams & Sloane ch. 20, from memory).
    params = Params(2, 23, 7)
    res = search(params, "auto", time_limit=10)
    verify.assert_code(res.code, params)
    assert res.size == 4096 and res.status is Status.OPTIMAL
    assert res.settings["lower_method"].startswith("constructions[")
    assert res.settings["plan"][0] == "constructions"


def test_large_linear_construction_is_priced_by_its_span_check():
    # The shortened extended Hamming code [27,21,4] (2^21 words; MacWilliams & Sloane ch. 1,
    # common practice) is the library's code at A(27,4). Its re-check reduces each word on a
    # basis, so the portfolio builds it instead of a smaller one priced by the ball bitmap.
    params = Params(2, 27, 4)
    res = search(params, "auto", time_limit=12)
    assert res.size == 1 << 21
    assert res.settings["lower_method"].startswith("constructions[")
    assert verify.check_cost(res.code, 4)[0] == "linear"
    assert auto.recheck_seconds(params, 1 << 21, linear=True) < auto.recheck_seconds(
        params, 1 << 21)


def test_progress_reports_each_step(monkeypatch):
    _only(monkeypatch, {"orbit", "auto"})
    _no_bounds(monkeypatch)
    seen = []
    search(HAMMING, "auto", time_limit=5, group="cyclic;cyclic*rev", progress=seen.append)
    ends = [e for e in seen if "size" in e and "step" in e]
    assert [e["step"] for e in ends][:2] == ["orbit[cyclic]", "orbit[cyclic*rev]"]
    assert all({"best", "upper", "seconds", "nodes", "elapsed"} <= set(e) for e in ends)


def test_groups_given_by_the_user_are_always_planned():
    steps = auto.plan(Params(2, 20, 10), groups=[("cyclic:0-18*rep", None)])
    assert "orbit[cyclic:0-18*rep]" in [s.name for s in steps]
