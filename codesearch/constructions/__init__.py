"""Code families built from their definitions, operations between codes, and the lookup of the
best construction for a cell.

Public API
----------
FAMILIES                      registry: name -> :class:`Family` (cheap instances, builder)
build_family(name, **params)  build one family code, verified -> :class:`Built`
candidates(params)            the routes to a cell, largest first (nothing built)
best(params, max_words=...)   build the largest that fits, verified -> (code, provenance)
table(q, nmax)                the cached per-alphabet table behind both
operations                    parity_extend, puncture, shorten, pad, u_u_plus_v,
                              construction_x, construction_xx, juxtapose, direct_sum,
                              concatenate, translate, coset_union (each verified)

Importing this package loads no numba kernel; building or verifying a code does.
"""

from __future__ import annotations

from codesearch.constructions.lookup import (
    DEFAULT_NMAX, Candidate, ConstructionTable, best, candidates, table,
)
from codesearch.constructions.operations import (
    Built, coset_union, concatenate, construction_x, construction_xx, direct_sum, juxtapose,
    pad, parity_extend, puncture, shorten, translate, u_u_plus_v, verified,
)
from codesearch.constructions.registry import (
    FAMILIES, Family, Instance, build_family, family_instances,
)

__all__ = [
    "DEFAULT_NMAX", "Candidate", "ConstructionTable", "best", "candidates", "table",
    "Built", "verified", "coset_union", "concatenate", "construction_x", "construction_xx",
    "direct_sum", "juxtapose", "pad", "parity_extend", "puncture", "shorten", "translate",
    "u_u_plus_v", "FAMILIES", "Family", "Instance", "build_family", "family_instances",
]
