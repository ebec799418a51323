"""Independent checks of codes and of bound certificates: the project's referee.

Every code a search returns, a file holds or the store keeps passes through
:func:`assert_code`, and every computed bound's certificate through
:func:`check_certificate`. The package depends on nothing it checks: it imports
:mod:`codesearch.model` and :mod:`codesearch.errors`, and the packed distance kernels of
:mod:`codesearch._kernels` (themselves tested against the definitions in
:mod:`codesearch._reference`), never :mod:`codesearch.search`, :mod:`codesearch.bounds`,
:mod:`codesearch.codefile` or :mod:`codesearch.store`. Certificates are checked with Python
integers and :class:`fractions.Fraction` only.

Modules
-------
codes         explicit codes: distance distribution, minimum distance, linearity, claims
linear        generator matrices over GF(p): enumeration, or information sets for the minimum
              distance
certificates  the table kind -> checker and :func:`check_certificate`
lp            Delsarte LP certificates (``delsarte-lp``, ``delsarte-lp-qcw``)
three_point   Schrijver's three-point SDP certificates (``three-point-sdp``)
four_point    four-point SDP certificates (``four-point-sdp``)
relations     bounds derived between cells of a table (``cell-relation``)
exact         exact rationals read from certificates
"""

from __future__ import annotations

from codesearch.verify.certificates import CERTIFICATE_CHECKERS, check_certificate
from codesearch.verify.codes import (
    CodeReport,
    assert_code,
    assert_code_by_balls,
    assert_large_binary,
    assert_large_qary,
    ball_check_cost,
    binary_linear_basis,
    check_cost,
    assert_min_distance,
    check_code,
    distance_distribution,
    first_close_pair,
    is_prime,
    min_distance,
    prepare,
)
from codesearch.verify.exact import parse_fraction
from codesearch.verify.linear import (
    ENUMERATION_LIMIT,
    assert_linear_code,
    check_additive_generator,
    check_generator,
    information_set_forms,
    linear_min_distance,
)
from codesearch.verify.relations import check_cell_relation

__all__ = [
    "CodeReport",
    "check_code",
    "check_generator",
    "linear_min_distance",
    "information_set_forms",
    "ENUMERATION_LIMIT",
    "assert_code",
    "assert_min_distance",
    "min_distance",
    "distance_distribution",
    "first_close_pair",
    "is_prime",
    "check_certificate",
    "CERTIFICATE_CHECKERS",
    "check_cell_relation",
    "parse_fraction",
    "prepare",
    "assert_linear_code",
    "check_additive_generator",
    "assert_code_by_balls",
    "ball_check_cost",
    "check_cost",
    "assert_large_binary",
    "binary_linear_basis",
    "assert_large_qary",
]
