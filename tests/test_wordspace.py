"""Word-space plumbing of the heuristics (codesearch.search._wordspace)."""

from __future__ import annotations

import math
from itertools import combinations

import numpy as np
import pytest

from codesearch.search import _wordspace as ws


@pytest.mark.parametrize("n", range(0, 11))
def test_ball_masks_follow_the_combinations_in_weight_order(n):
    # The definition: weight by weight, the supports in itertools.combinations order, bit
    # n-1-j standing for position j.
    for r in range(0, n + 2):
        expected = [sum(1 << (n - 1 - j) for j in c)
                    for k in range(min(r, n) + 1) for c in combinations(range(n), k)]
        got = ws.ball_masks(n, r)
        assert got.dtype == np.int64 and got.tolist() == expected
        assert got.size == sum(math.comb(n, i) for i in range(min(r, n) + 1))
