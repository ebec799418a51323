"""Record hunts: a search handed the best stored code starts from it."""

from __future__ import annotations

import itertools

import numpy as np

from codesearch.model import Code, Params
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


def _odd_column_code_23() -> Code:
    # [23,17,4]: parity checks on 23 distinct odd-weight columns of length 6 (a sum of two or
    # three such columns is never zero, so d >= 4: the shortened extended Hamming code,
    # MacWilliams-Sloane Ch. 1); generator [A^T | I_17] for checks [I_6 | A]
    odd = [c for c in itertools.product((0, 1), repeat=6) if sum(c) % 2 and sum(c) >= 3]
    a = np.array(odd[:17], dtype=np.uint8).T
    return kc.span(np.hstack([a.T, np.eye(17, dtype=np.uint8)]), 2)


def test_local_search_with_a_start_past_the_count_limit():
    # A(23,4): a start of 2^17 words is past the ball-count scoring's uint16 counters; the
    # search switches to pairwise scoring instead of failing, and the start is a code of the
    # cell, so any result is one too (checked by the front end).
    start = _odd_column_code_23()
    assert start.size == 2**17
    res = run_method(METHODS["local"], Params(2, 23, 4), time_limit=0.5, seed=0,
                     incumbent=start)
    assert res.size >= 2**17 and res.settings["started_from"] == "incumbent"
