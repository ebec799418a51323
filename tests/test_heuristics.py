"""Heuristic searchers (lexicode, greedy, local) through the search front end.

References: closed forms A_q(n,1) = q^n and A_q(n,2) = q^(n-1) (the even-sum / parity code is
optimal: puncturing shows A_q(n,2) <= q^(n-1); MacWilliams & Sloane ch. 1, from memory);
perfect Hamming codes meet the sphere-packing bound 2^n / (n+1); the Singleton bound
A_q(n,d) <= q^(n-d+1) met by MDS codes; binary lexicodes are linear (Conway & Sloane 1986,
"Lexicographic codes", Thm. 1); the length-24 distance-8 lexicode is the extended Golay code
(Conway & Sloane 1986); published A(8,3) = 20, A(10,4) = A(9,3) = 40 (MacWilliams & Sloane,
table of A(n,d), from memory).
"""

from __future__ import annotations

import numpy as np
import pytest

from codesearch import verify
from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.results import Status
from codesearch.search import METHODS, search


def _closed_under_addition(words: np.ndarray) -> bool:
    rows = {r.tobytes() for r in words}
    return all((np.bitwise_xor(a, b)).tobytes() in rows for a in words for b in words)


@pytest.mark.parametrize("method", ["lexicode", "greedy", "local"])
def test_registered_as_heuristics(method):
    assert METHODS[method].exhaustive is False


@pytest.mark.parametrize("n,d", [(5, 3), (7, 3), (8, 4), (9, 3), (10, 5), (12, 6)])
def test_binary_lexicode_is_linear(n, d):
    res = search(Params(2, n, d), "lexicode")
    verify.assert_code(res.code, Params(2, n, d))
    assert _closed_under_addition(res.code.words)
    # a linear code has a power-of-two size and contains 0
    assert res.size & (res.size - 1) == 0
    assert not res.code.words[0].any()


def test_lexicode_reaches_hamming_code():
    # n = 2^m - 1, d = 3: the lexicode is a perfect Hamming code, 2^n / (n + 1) words
    for m in (3, 4):
        n = 2**m - 1
        res = search(Params(2, n, 3), "lexicode")
        assert res.size == 2**n // (n + 1)
        # a perfect code is still only reported FEASIBLE by a heuristic
        assert res.status is Status.FEASIBLE and res.upper is None and not res.optimal


@pytest.mark.parametrize("q,n", [(2, 6), (3, 4), (4, 3), (5, 3)])
def test_closed_forms_d1_d2(q, n):
    assert search(Params(q, n, 1), "lexicode").size == q**n
    if q == 2:
        # the binary lexicode and Gray-order greedy code for d = 2 are the even-weight code
        # (q-ary lexicodes are not linear and fall short of q^(n-1) for d = 2)
        for order in ("lex", "gray"):
            assert search(Params(q, n, 2), "greedy", order=order).size == q ** (n - 1)


def test_lexicode_quaternary_mds():
    # 4^(5-3+1) = 64 words meets the Singleton bound for (q, n, d) = (4, 5, 3)
    res = search(Params(4, 5, 3), "lexicode")
    verify.assert_code(res.code, Params(4, 5, 3))
    assert res.size == 64


@pytest.mark.parametrize("method,opts", [
    ("greedy", {"order": "random", "restarts": 3}),
    ("greedy", {"order": "gray"}),
    ("local", {"steps": 3000}),
])
@pytest.mark.parametrize("q,n,d", [(2, 9, 4), (3, 5, 3), (2, 13, 5), (5, 4, 3)])
def test_codes_verify_and_are_feasible_only(method, opts, q, n, d):
    p = Params(q, n, d)
    res = search(p, method, seed=7, **opts)
    verify.assert_code(res.code, p)
    assert verify.min_distance(res.code) >= d
    assert res.status is Status.FEASIBLE
    assert res.upper is None


@pytest.mark.parametrize("method,opts", [
    ("greedy", {"order": "random", "restarts": 4}),
    ("local", {"steps": 20000}),
])
def test_seed_reproduces_exactly(method, opts):
    p = Params(2, 10, 4)
    a = search(p, method, seed=123, **opts)
    b = search(p, method, seed=123, **opts)
    assert a.seed == b.seed == 123
    assert a.code == b.code
    assert a.nodes == b.nodes


def test_random_greedy_on_large_space_samples():
    # 2^26 words: beyond the stored-permutation limit, the sampling path runs
    p = Params(2, 26, 11)
    res = search(p, "greedy", order="random", restarts=1, seed=3)
    verify.assert_code(res.code, p)
    assert res.size >= 2


def test_local_search_finds_known_sizes():
    # A(8,3) = 20 and A(10,4) = 40 (published, MacWilliams & Sloane table, from memory)
    r = search(Params(2, 8, 3), "local", seed=1, steps=200_000, size=20)
    verify.assert_code(r.code, Params(2, 8, 3))
    assert r.size == 20 and r.exists is True and r.status is Status.FEASIBLE
    r = search(Params(2, 10, 4), "local", seed=1, steps=400_000, size=40)
    verify.assert_code(r.code, Params(2, 10, 4))
    assert r.size == 40 and r.settings["parity"] is True


def test_size_target_stops_early():
    res = search(Params(2, 12, 4), "greedy", order="random", size=2, seed=0)
    assert res.target == 2 and res.exists is True


@pytest.mark.parametrize("method,opts", [
    ("lexicode", {"size": 0}),
    ("greedy", {"order": "spiral"}),
    ("greedy", {"restarts": 0}),
    ("local", {"tenure": -1}),
    ("local", {"steps": 0}),
])
def test_bad_options_raise_parameter_error(method, opts):
    with pytest.raises(ParameterError):
        search(Params(2, 8, 3), method, **opts)


def test_too_large_to_mark_is_a_parameter_error():
    with pytest.raises(ParameterError):
        search(Params(2, 40, 5), "lexicode")


@pytest.mark.slow
def test_lexicode_24_8_is_extended_golay():
    # 2^24 candidate words: the lexicode is the [24,12,8] extended Golay code (Conway & Sloane
    # 1986), weight distribution 1, 759, 2576, 759, 1 (MacWilliams & Sloane ch. 2, from memory)
    p = Params(2, 24, 8)
    res = search(p, "lexicode")
    verify.assert_code(res.code, p)
    assert res.size == 4096
    weights = np.bincount(res.code.words.sum(axis=1), minlength=25)
    assert weights[[0, 8, 12, 16, 24]].tolist() == [1, 759, 2576, 759, 1]
    assert weights.sum() == 4096
    report = verify.check_code(res.code, 8)
    assert report.linear


@pytest.mark.parametrize("q,n,d", [(2, 6, 3), (2, 7, 4), (3, 4, 3), (2, 8, 5)])
def test_heuristics_never_exceed_the_sat_optimum(q, n, d):
    # lower <= upper: every heuristic code is at most the size SAT proves optimal
    p = Params(q, n, d)
    best = search(p, "sat")
    assert best.status is Status.OPTIMAL
    for method, opts in (("lexicode", {}), ("greedy", {"restarts": 3}), ("local", {"steps": 5000})):
        res = search(p, method, seed=5, **opts)
        assert res.size <= best.size
        assert res.status is Status.FEASIBLE
