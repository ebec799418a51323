"""Contract suite: every registered search method through the same small cells.

Reference values are theorems or published table values: A(6,3) = 8 and A(7,4) = 8 (the
shortened and extended Hamming codes are optimal; MacWilliams & Sloane, App. A, from memory),
A(5,3) = 4 (Plotkin range: Levenshtein's theorem), A_3(4,3) = 9 (the ternary [4,2,3] Hamming
code is perfect: sphere packing gives 81 / 9 = 9).
"""

from __future__ import annotations

import pytest

from codesearch import verify
from codesearch.model import Params
from codesearch.results import SearchResult, Status
from codesearch.search import METHODS, search

CELLS = {Params(2, 6, 3): 8, Params(2, 7, 4): 8, Params(2, 5, 3): 4, Params(3, 4, 3): 9}
JSON_KEYS = {"q", "n", "d", "size", "optimal", "upper", "method", "seconds", "nodes", "file"}


@pytest.mark.parametrize("method", sorted(METHODS))
@pytest.mark.parametrize("params", sorted(CELLS), ids=str)
def test_every_method_on_small_cells(method, params):
    result = search(params, method, time_limit=3, seed=1)
    assert isinstance(result, SearchResult) and result.method == method
    known = CELLS[params]
    assert result.code is not None and 1 <= result.size <= known
    verify.assert_code(result.code, params)
    if result.upper is not None:  # a proven bound can never fall below a known code
        assert result.upper >= known
    if not METHODS[method].exhaustive:
        assert result.status is Status.FEASIBLE
    if result.status is Status.OPTIMAL:
        assert result.size == known == result.upper
    assert JSON_KEYS <= set(result.to_json())


@pytest.mark.parametrize("method", [m for m, spec in METHODS.items() if spec.exhaustive])
def test_exhaustive_methods_prove_small_cells(method):
    params = Params(2, 6, 3)
    result = search(params, method, time_limit=60, seed=1)
    assert result.status is Status.OPTIMAL and result.size == 8


@pytest.mark.parametrize("method", sorted(METHODS))
def test_unknown_option_is_refused(method):
    from codesearch.errors import ParameterError

    with pytest.raises(ParameterError):
        search(Params(2, 5, 3), method, no_such_option=1)
