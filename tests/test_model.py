"""Params and Code validation, and the public API."""

import numpy as np
import pytest

import codesearch
from codesearch.errors import ParameterError
from codesearch.model import Code, Params


@pytest.mark.parametrize("q,n,d", [(1, 5, 3), (37, 5, 3), (2, 0, 1), (2, 5, 6), (2, 5, 0)])
def test_bad_params(q, n, d):
    with pytest.raises(ParameterError):
        Params(q, n, d)


def test_params_str():
    assert str(Params(2, 7, 3)) == "A(7,3)" and str(Params(3, 5, 3)) == "A_3(5,3)"


def test_code_is_immutable_and_canonical():
    code = Code(np.array([[1, 0], [0, 1], [0, 0]]), 2)
    with pytest.raises(ValueError):
        code.words[0, 0] = 1
    assert code.canonical().to_strings() == ["00", "01", "10"]
    assert Code.from_strings(["0a", "z1"], 36).words.tolist() == [[0, 10], [35, 1]]


def test_code_rejects_symbols_outside_alphabet():
    with pytest.raises(ParameterError):
        Code(np.array([[0, 2]]), 2)


def test_public_api_pinned():
    assert set(codesearch.__all__) >= {
        "Code", "Params", "SearchResult", "BoundResult", "Status", "InputError",
        "ParameterError", "VerificationError", "__version__"}
