"""Results travel whole: to_dict / from_dict and pickling give back equal objects."""

from __future__ import annotations

import json
import pickle

import numpy as np

from codesearch.bounds import all_bounds
from codesearch.model import Code, Params
from codesearch.results import BoundResult, SearchResult, Status, plain
from codesearch.search import search

import known_codes as kc


def test_search_result_round_trips_through_json_and_pickle():
    # The exact search proves A(6,3) = 8 (the shortened Hamming code; MacWilliams-Sloane
    # ch. 1, from memory).
    res = search(Params(2, 6, 3), "exact", time_limit=30)
    assert res.status is Status.OPTIMAL and res.size == 8
    again = SearchResult.from_dict(json.loads(json.dumps(res.to_dict())))
    assert again == res and again.code == res.code
    assert pickle.loads(pickle.dumps(res)) == res


def test_search_result_without_code_and_with_target():
    p = Params(3, 4, 3)
    res = SearchResult(p, Status.INFEASIBLE, None, 9, "sat", 0.5, 12, None,
                       {"history": ((10, "unsat"),), "n": np.int64(3)}, 10)
    # settings are held JSON-ready, so the round trip is exact
    assert res.settings["history"] == [[10, "unsat"]] and type(res.settings["n"]) is int
    assert SearchResult.from_dict(json.loads(json.dumps(res.to_dict()))) == res
    assert pickle.loads(pickle.dumps(res)).exists is False


def test_bound_results_round_trip():
    for b in all_bounds(Params(2, 17, 6)).values():
        obj = json.loads(json.dumps(b.to_dict()))
        again = BoundResult.from_dict(obj)
        assert again.to_dict() == b.to_dict() and again.usable == b.usable
        assert pickle.loads(pickle.dumps(b)).to_dict() == b.to_dict()


def test_code_pickles_read_only():
    code = kc.hamming_7_4()
    back = pickle.loads(pickle.dumps(code))
    assert back == code and not back.words.flags.writeable
    assert Code.from_strings(code.to_strings(), 2) == code


def test_plain_makes_json_ready_copies():
    from fractions import Fraction

    obj = plain({"a": (1, np.int32(2)), 3: Fraction(1, 3), "v": np.arange(2)})
    assert obj == {"a": [1, 2], "3": "1/3", "v": [0, 1]}
    json.dumps(obj)
