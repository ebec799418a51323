"""Record hunts: a search handed the best stored code starts from it."""

from __future__ import annotations

from codesearch.model import Params
from codesearch.search import METHODS, run_method

import known_codes as kc


def test_local_search_starts_from_the_incumbent():
    # The Hamming [7,4,3] code is perfect (MacWilliams-Sloane Ch. 1): 16 words = A(7,3), so a
    # search started from it returns it (nothing larger exists) and says where it started.
    res = run_method(METHODS["local"], Params(2, 7, 3), time_limit=0.3, seed=1,
                     incumbent=kc.hamming_7_4())
    assert res.size == 16 and res.settings["started_from"] == "incumbent"
    assert res.settings["incumbent_size"] == 16


def test_incumbent_ignored_by_methods_that_do_not_declare_it():
    res = run_method(METHODS["lexicode"], Params(2, 7, 3), time_limit=0.3,
                     incumbent=kc.hamming_7_4())
    assert "incumbent_size" not in res.settings


def test_local_search_with_a_start_past_the_count_limit():
    # A(23,4): the greedy start has more than 65534 words, past the ball-count scoring's
    # uint16 counters; the search switches to pairwise scoring instead of failing. The
    # shortened extended Hamming code gives 2^17 words (common practice), so any result is
    # a real code of the cell, checked by the front end.
    res = run_method(METHODS["local"], Params(2, 23, 4), time_limit=0.5, seed=0)
    assert res.size > 65534
