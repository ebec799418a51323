"""One front end for upper bounds on A_q(n,d): :func:`upper_bound` and :func:`all_bounds`.

Each bound is a function ``f(params) -> BoundResult | None`` registered in :data:`BOUNDS`
(None: the bound does not apply to this cell); closed forms return no certificate (the
theorem's name is the justification), computed bounds (linear and semidefinite programs)
return an exact certificate that :func:`codesearch.verify.check_certificate` re-checks.
Only bounds with ``usable`` True (certified, scope ``"all"``) may become the cell's upper
bound; Griesmer (linear codes only) and Gilbert-Varshamov (existential lower bound) are
reported beside it, never in it.

Submodules load lazily so that ``import codesearch`` stays cheap (scipy is only needed for
the LP).
"""

from __future__ import annotations

import importlib
from typing import Callable, Iterable

from codesearch.errors import ParameterError
from codesearch.model import Params, grid
from codesearch.results import BoundResult

__all__ = ["BOUNDS", "MAX_N", "bound_names", "compute_bound", "upper_bound", "all_bounds",
           "gv_lower_bound", "least_usable",
           "cell_summary", "summarize", "best_lp_certificate", "finite_points", "grid_bounds",
           "CellBound", "certificate_of"]

#: Canonical bound name -> (module, function). Order is the tie-break for the winning bound:
#: simpler theorems first, so a cell names the plainest argument that reaches its value.
BOUNDS: dict[str, tuple[str, str]] = {
    "singleton": ("codesearch.bounds.classical", "singleton"),
    "hamming": ("codesearch.bounds.classical", "hamming"),
    "plotkin": ("codesearch.bounds.classical", "plotkin"),
    "johnson": ("codesearch.bounds.classical", "johnson"),
    "elias": ("codesearch.bounds.classical", "elias"),
    "delsarte-lp": ("codesearch.bounds.delsarte", "delsarte_lp"),
    "delsarte-lp-plus": ("codesearch.bounds.delsarte", "delsarte_lp_plus"),
    "lp-odd-size": ("codesearch.bounds.integral", "odd_size"),
    "lp-size-mod-4": ("codesearch.bounds.integral", "size_mod_4"),
    "distance-enumeration": ("codesearch.bounds.integral", "distance_enumeration"),
    "profile-lp": ("codesearch.bounds.profiles", "profile_lp"),
    "griesmer": ("codesearch.bounds.classical", "griesmer"),
}

#: Bounds computed by solving an optimisation problem (skipped when ``lp=False``).
_COMPUTED = frozenset({"delsarte-lp", "delsarte-lp-plus", "lp-odd-size", "lp-size-mod-4",
                       "distance-enumeration", "profile-lp"})
#: Computed bounds that take no solver options.
_PLAIN = frozenset({"lp-odd-size", "lp-size-mod-4", "distance-enumeration", "profile-lp"})

#: Longest codes the front end accepts (closed forms stay exact far beyond; this only keeps
#: a typo such as n = 10**9 from hanging the process).
MAX_N = 4096


def bound_names() -> list[str]:
    """Canonical names of the registered bounds, in tie-break order."""
    return list(BOUNDS)


def _check(params: Params) -> None:
    if not isinstance(params, Params):
        raise ParameterError(f"params must be a Params, got {type(params).__name__}")
    if params.n > MAX_N:
        raise ParameterError(f"length n={params.n} is beyond the bounds limit {MAX_N}")


def _function(name: str) -> Callable[[Params], BoundResult | None]:
    if name not in BOUNDS:
        raise ParameterError(f"unknown bound {name!r}; choose from {', '.join(BOUNDS)}")
    module, func = BOUNDS[name]
    return getattr(importlib.import_module(module), func)


def compute_bound(params: Params, name: str) -> BoundResult | None:
    """Compute one registered bound by name (None when it does not apply to the cell)."""
    _check(params)
    return _function(name)(params)


def all_bounds(params: Params, *, sdp: bool = False, lp: bool = True,
               lp_fallback: bool = True, four_point: bool = False) -> dict[str, BoundResult]:
    """Every applicable bound for one cell, by canonical name.

    Parameters
    ----------
    params : Params
        The cell.
    sdp : bool
        Also compute the three-point semidefinite bound (d >= 3): Schrijver's for binary
        codes, Gijswijt-Schrijver-Tanaka's for q >= 3 (seconds to minutes per cell, see
        :func:`codesearch.bounds.sdp.three_point_cost` and
        :func:`codesearch.bounds.qary_sdp.qary_three_point_cost`).
    lp : bool
        Include the Delsarte linear programs (the slow part of a grid run).
    lp_fallback : bool
        Let the LPs fall back to the high-precision simplex when double precision cannot
        certify them (LP values beyond about 2^40; warm-started from the neighbouring
        distance, so a whole binary grid n <= 128 stays well under a minute).
    four_point : bool
        Also compute the four-point semidefinite bound (binary, d >= 3) where its program
        fits this machine (:func:`codesearch.bounds.fourpoint.four_point_size`; minutes per
        cell from n = 17 on). Off by default: no fast path turns it on.

    Returns
    -------
    dict of str to BoundResult
        Includes uncertified results (``certified=False``) and bounds of other scopes; use
        :attr:`BoundResult.usable` to keep the ones that bound every code.
    """
    _check(params)
    out: dict[str, BoundResult] = {}
    for name in BOUNDS:
        if not lp and name in _COMPUTED:
            continue
        func = _function(name)
        result = (func(params, exact_fallback=lp_fallback)
                  if name in _COMPUTED - _PLAIN else func(params))
        if result is not None:
            out[name] = result
    if sdp and params.d >= 3:
        # Schrijver's bound (binary) and Gijswijt-Schrijver-Tanaka's (q >= 3); both need
        # d >= 3 (A_q(n,1), A_q(n,2) are known exactly).
        if params.q == 2:
            from codesearch.bounds.sdp import three_point_bound as semidefinite
        else:
            from codesearch.bounds.qary_sdp import qary_three_point_bound as semidefinite
        result = semidefinite(params)
        if result is not None:
            out[result.method] = result
    if four_point and params.q == 2 and params.d >= 3:
        from codesearch.bounds.fourpoint import four_point_bound

        result = four_point_bound(params)  # None when the program does not fit
        if result is not None:
            out[result.method] = result
    return out


def upper_bound(params: Params, *, sdp: bool = False, lp: bool = True,
                lp_fallback: bool = True, four_point: bool = False) -> BoundResult:
    """The least usable upper bound on ``A_q(n,d)`` (certified, valid for every code).

    Ties go to the earlier bound in :data:`BOUNDS` (the plainest argument). Options as in
    :func:`all_bounds`.
    """
    return least_usable(all_bounds(params, sdp=sdp, lp=lp, lp_fallback=lp_fallback,
                                   four_point=four_point))


def least_usable(bounds: dict[str, BoundResult]) -> BoundResult:
    """Pick the least usable bound from an :func:`all_bounds` dictionary."""
    usable = [b for b in bounds.values() if b.usable]
    # Singleton always applies, so ``usable`` is never empty.
    return min(usable, key=lambda b: b.value)


def gv_lower_bound(params: Params) -> int:
    """Gilbert-Varshamov: some code of this cell has at least this many words (existential)."""
    from codesearch.bounds.classical import gilbert_varshamov

    _check(params)
    return gilbert_varshamov(params).value


def cell_summary(params: Params, *, sdp: bool = False, lp: bool = True,
                 lp_fallback: bool = True, four_point: bool = False) -> dict:
    """The machine-readable summary of one cell (one line of ``codesearch bounds --json``).

    Keys: ``q, n, d``; ``bounds`` (name -> int, usable bounds only); ``upper`` and
    ``upper_method`` (the least usable bound); ``gv`` (existential lower bound);
    ``linear`` (name -> int, bounds valid for linear codes only); ``uncertified`` (names
    whose solver answer failed its exact check; never used).
    """
    found = all_bounds(params, sdp=sdp, lp=lp, lp_fallback=lp_fallback, four_point=four_point)
    return summarize(params, found)


def summarize(params: Params, found: dict[str, BoundResult], upper: BoundResult | None = None,
              cites: tuple = ()) -> dict:
    """The :func:`cell_summary` dictionary from bounds already computed.

    ``upper`` (default: the least usable of ``found``) may be a bound derived from other
    cells (:func:`grid_bounds`); ``cites`` are then its ``(cell, value)`` pairs, listed under
    ``relation``. ``upper_kind`` is the certificate kind of the upper bound (``"theorem"``
    for a closed form).
    """
    best = upper if upper is not None else least_usable(found)
    bounds = {k: b.value for k, b in found.items() if b.usable}
    if best.method not in bounds:
        bounds[best.method] = best.value
    out = {
        "q": params.q,
        "n": params.n,
        "d": params.d,
        "bounds": bounds,
        "upper": best.value,
        "upper_method": best.method,
        "upper_kind": ("theorem" if best.certificate is None
                       else str(best.certificate.get("kind", "certificate"))),
        "gv": gv_lower_bound(params),
        "linear": {k: b.value for k, b in found.items() if b.scope == "linear" and b.certified},
        "uncertified": sorted(k for k, b in found.items() if not b.certified),
    }
    if cites:
        out["relation"] = {"rule": best.method.partition(":")[2],
                           "cites": [[c.q, c.n, c.d, v] for c, v in cites]}
    return out


def __getattr__(name: str):
    # the grid helpers load on first use
    if name in ("grid_bounds", "CellBound", "certificate_of"):
        return getattr(importlib.import_module("codesearch.bounds.grid_relations"), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def finite_points(q: int, ns: Iterable[int], *, lp: bool = True
                  ) -> list[tuple[int, int, int, int]]:
    """``(n, d, gv, upper)`` for every cell of the given lengths (the finite points of the
    rate-distance picture, :mod:`codesearch.report.plot`)."""
    # q and the longest length are checked first: a typo such as 1..10**9 fails at once
    grid(q, ns, [1], max_n=MAX_N, limit="bounds limit")
    return [(p.n, p.d, gv_lower_bound(p), upper_bound(p, lp=lp).value)
            for n in ns for p in grid(q, [n], range(1, n + 1))]


def best_lp_certificate(params: Params) -> BoundResult | None:
    """The certified LP result (plain or with extra inequalities) of least value, or None."""
    _check(params)
    results = [_function(name)(params) for name in ("delsarte-lp", "delsarte-lp-plus")]
    good = [r for r in results if r is not None and r.certified and r.certificate is not None]
    return min(good, key=lambda r: r.value) if good else None
