"""Schrijver's three-point semidefinite upper bound on A(n, d), proved in exact arithmetic.

Problem
-------
Bound the size of every binary code of length ``n`` and minimum distance ``d`` by the
optimum of Schrijver's semidefinite program in the variables ``x[i,j,t]`` (one per triangle
of distances, see :mod:`codesearch.bounds.terwilliger`):

    maximise   sum_i C(n,i) x[i,0,0]
    subject to x[0,0,0] = 1,  0 <= x[i,j,t] <= x[i,0,0],
               x[i,0,0] + x[j,0,0] <= 1 + x[i,j,t],
               x[i,j,t] = 0 when a distance among {i, j, i+j-2t} lies in 1..d-1,
               for k = 0..n/2:  ( sum_t beta[i,j,k,t] x[i,j,t] )_{i,j=k}^{n-k}            PSD,
                                ( sum_t beta[i,j,k,t] (x[i+j-2t,0,0] - x[i,j,t]) )_{i,j}     PSD,

with the named additions used in the literature where they are valid: Delsarte's linear
inequalities, ``A_i <= A(n, d, i)`` with Johnson's bound for constant-weight codes and the
two antipodal inequalities of the strengthened LP (at most one codeword near the complement
of a codeword, see :func:`codesearch.bounds.delsarte.extra_inequalities`), all valid for
every code, and for even ``d`` the restriction to even distances (some largest code has
only even distances). For odd ``d`` the cell is bounded through
``A(n, d) = A(n + 1, d + 1)``.

Rigorous rounding
-----------------
The program is solved in floating point (Clarabel, interior point) on a rescaled copy,
then re-solved with the block rows rebalanced at the solution (the first solve often
stalls short of the optimum). Its dual gives PSD matrices ``Z`` for the blocks and
multipliers ``mu >= 0`` for the linear rows. They are rounded to dyadic rationals, each
``Z`` is shifted by ``eps * I`` until an exact LDL^T in rationals proves it positive
definite, negative ``mu`` are set to zero. For
every code the corresponding ``x`` satisfies all constraints and ``0 <= x_v <= u_v``, hence

    |C| <= 1 + sum <Z, B_const> + mu . rhs + sum_v max(r_v, 0) u_v,
    r_v = c_v + sum <Z, B_v> - (G^T mu)_v,

where the last sum absorbs whatever dual infeasibility rounding left, ``u_v`` being a
proven cap (:func:`~codesearch.bounds.terwilliger.variable_cap`, from Johnson's bound on
constant-weight codes; the plain cap 1 cost thousands on cells like A(28,12)). Everything
on the right is computed with integers; the certified bound is its floor. With ``Z`` fixed
the right-hand side is a linear program in ``mu``, so after rounding the multipliers are
chosen once more by HiGHS (:func:`_refit_multipliers`) and kept when they bound lower.
:func:`codesearch.verify.check_certificate` redoes this from the certificate alone.
The dual of Delsarte's LP (with the constant-weight rows) is a dual solution of the same
program (those rows only, no blocks); it is certified the same way and kept when the
semidefinite dual certifies less.

Solver choice (measured on this machine, see benchmarks/bench_sdp.py)
------------------------------------------------------------------
Clarabel (interior point) through its own conic interface. SCS (first order) on the same
conic data took 45 s and stopped at its iteration limit with a 1e-4 relative error on
A(13,6), where Clarabel needs 0.1 s and reaches ~1e-9; through cvxpy, SCS needed 33 s on
A(20,8) and 189 s on A(28,12) and still reported an inaccurate solution. What made
Clarabel fail at first (numerical errors on most cells with n >= 20) was its automatic
equilibration, not the modelling layer: with equilibration off, the cvxpy model solves too
(A(20,8), A(28,12), A(21,4) checked). The direct conic form is kept because the rebalanced
passes rebuild it cheaply and it returns the dual blocks in the layout the rounding reads
(upper triangles, known scaling). ``solver="scs"`` is kept for comparisons.

References
----------
A. Schrijver, "New code upper bounds from the Terwilliger algebra and semidefinite
programming", IEEE Trans. Inform. Theory 51 (2005) 2859-2866.
P. Delsarte, "An algebraic approach to the association schemes of coding theory", Philips
Res. Rep. Suppl. 10 (1973) (the linear inequalities).
F. J. MacWilliams and N. J. A. Sloane, The Theory of Error-Correcting Codes, North-Holland
1977, Ch. 2 (A(n, d) = A(n+1, d+1) for odd d; even-weight extension).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from fractions import Fraction
from functools import lru_cache
from typing import Any

from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.bounds.terwilliger import shape_count
from codesearch.results import BoundResult

__all__ = ["three_point_bound", "three_point_cost", "solve_three_point", "SOLVERS",
           "SdpProgram", "solve_program"]

#: Solvers understood by :func:`three_point_bound`.
SOLVERS = ("clarabel", "scs")

#: Bits kept when rounding the scaled dual matrices and multipliers.
_ROUND_BITS = 52
#: Interior-point tolerances (relative); tighter values only made Clarabel stall earlier.
_TOL = 1e-9
#: Numerical passes per cell: pass 1 fixed scaling, later passes rebalance the block rows
#: at the previous solution (measured: pass 2 gains most, pass 3 a little, pass 4 nothing).
_PASSES = 3


def three_point_cost(params: Params) -> float:
    """Estimated CPU seconds of :func:`three_point_bound` on this machine (one core).

    Fitted on benchmarks/bench_sdp.py (binary grid n <= 28, d = 4..12, all passes
    included): about 0.17 s at n = 17, 0.8 s at n = 22, 1.9 s at n = 26, 2.9 s at n = 29,
    i.e. roughly ``3 (n / 29)^5.3``, with ``n + 1`` for odd ``d``. Wall time on a loaded
    machine is larger (x2-4 measured while other jobs ran). ``inf`` where the bound does not
    apply.
    """
    if params.q != 2 or params.d < 3:
        return math.inf
    n = params.n + (params.d % 2)
    return 0.02 + 3.0 * (n / 29.0) ** 5.3


def _sdp_cell(params: Params) -> tuple[int, int]:
    """The (n, d) for which the program is solved: even d, via A(n,d) = A(n+1,d+1)."""
    if params.d % 2:
        return params.n + 1, params.d + 1
    return params.n, params.d


def three_point_bound(
    params: Params, *, solver: str | None = None, time_limit: float | None = None
) -> BoundResult | None:
    """Schrijver's three-point bound on ``A(n, d)`` with an exact certificate.

    Parameters
    ----------
    params : Params
        The cell; the bound applies to binary cells with ``d >= 3``.
    solver : str, optional
        ``"clarabel"`` (default) or ``"scs"`` (kept for comparison; see the module notes).
    time_limit : float, optional
        Seconds allowed to the numerical solver.

    Returns
    -------
    BoundResult or None
        ``method="three-point-sdp"``; ``certified=False`` when the rounded dual could not be
        made exactly feasible (the value is then the solver's float estimate and must not
        be used). None when the bound does not apply: ``q != 2`` (the q-ary version is not
        implemented) or ``d < 3`` (``A(n,1) = 2^n``, ``A(n,2) = 2^(n-1)``).

    Raises
    ------
    ParameterError
        For an unknown solver.
    """
    solver = (solver or "clarabel").lower()
    if solver not in SOLVERS:
        raise ParameterError(f"unknown solver {solver!r}; choose from {', '.join(SOLVERS)}")
    if params.q != 2 or params.d < 3:
        return None  # not applicable: q-ary version not implemented; A(n,1), A(n,2) known
    sn, sd = _sdp_cell(params)
    res = solve_three_point(sn, sd, time_limit=time_limit, solver=solver)
    cert = dict(res["certificate"]) if res["certificate"] is not None else None
    value = res["value"]
    if cert is not None:
        cert.update({"q": 2, "n": params.n, "d": params.d})
    elif math.isfinite(res["float_value"]):
        value = math.floor(res["float_value"] + 1e-6)  # informative only: not usable
    via = "" if (sn, sd) == (params.n, params.d) else f" via A({sn},{sd})"
    note = (
        f"Schrijver three-point SDP{via}; float optimum {res['float_value']:.6f}, "
        f"exact dual bound {res['exact_float']:.6f}"
    )
    if not res["certified"]:
        note += f"; uncertified: {res['reason']}"
    return BoundResult(
        params=params,
        value=value,
        method="three-point-sdp",
        certificate=cert,
        certified=res["certified"],
        note=note,
    )


# --------------------------------------------------------------------------------------------
# Numerical solve.


def _pow2_exponent(x: float) -> int:
    """Exponent e with 2**e the power of two nearest to x (x > 0)."""
    return int(round(math.log2(x)))


@lru_cache(maxsize=256)
def solve_three_point(
    n: int, d: int, *, time_limit: float | None = None, solver: str = "clarabel"
) -> dict[str, Any]:
    """Solve and certify the three-point program of the binary cell ``(n, d)``.

    Up to ``_PASSES`` numerical passes: the first with a fixed scaling, each later one with
    the block rows rebalanced at the previous pass's primal and dual. Each pass's dual is
    rounded and bounded exactly; the smallest certified bound is kept. Passes stop early
    when two passes in a row certify the same integer. (The solver's primal objective is
    no stopping signal: on stalled solves it overshoots the optimum, e.g. A(21,4).)

    Returns a dict with ``value`` (int, floor of the exact bound), ``certified`` (bool),
    ``certificate`` (JSON-ready, without the target cell), ``float_value`` (the solver's
    primal objective in the kept pass), ``exact_float`` (the exact bound as a float),
    ``gap`` (relative primal-dual gap reported by the solver), ``passes`` (per-pass
    summaries), ``seconds``, ``check_seconds`` (the independent re-check in
    :mod:`codesearch.verify`, run before returning) and ``reason``.
    """
    from codesearch.bounds.terwilliger import three_point_data, variable_cap

    t0 = time.perf_counter()
    even = d % 2 == 0
    data = three_point_data(n, d, even)
    radius = (d - 1) // 2
    # M0: the sphere-packing size, the unit in which the solver sees the objective.
    m0 = 2.0**n / sum(math.comb(n, i) for i in range(radius + 1))
    exps = {}
    for family, k, size, const, coef in data.blocks:
        e = [_pow2_exponent(math.comb(n - 2 * k, r)) // 2 for r in range(size)]
        mult = math.comb(n, k) - (math.comb(n, k - 1) if k else 0)
        # block scale 2**-g: the blocks' traces, weighted by multiplicity, add up to |C| / M0
        exps[(family, k)] = (e, _pow2_exponent(m0 / mult))
    prog = SdpProgram(
        data=data,
        caps=tuple(variable_cap(n, d, tri) for tri in data.triangles),
        shapes=tuple(shape_count(n, *tri) for tri in data.triangles),
        m0=m0, kind="three-point-sdp", exps=exps,
        offsets={k: k for _f, k, *_ in data.blocks},
        labels={k: {"k": k} for _f, k, *_ in data.blocks},
    )
    best = solve_program(prog, time_limit=time_limit, solver=solver)
    best["seconds"] = time.perf_counter() - t0
    if best["certificate"] is not None:
        best["certificate"]["sdp_n"] = n
        best["certificate"]["sdp_d"] = d
        best["certificate"]["even"] = even
        # The independent checker re-derives everything; disagreement is a bug here.
        from codesearch.errors import VerificationError
        from codesearch.verify import check_certificate

        t_check = time.perf_counter()
        valid, bound, reason = check_certificate(dict(best["certificate"], q=2, n=n, d=d))
        best["check_seconds"] = time.perf_counter() - t_check
        if not valid or bound != best["value"]:
            raise VerificationError(f"three-point certificate for ({n},{d}) rejected: {reason}")
    return best


@dataclass(frozen=True)
class SdpProgram:
    """A symmetry-reduced semidefinite program of the three-point kind, ready to solve.

    Attributes
    ----------
    data : object
        The exact program: ``n, d, triangles, objective, blocks, rows`` as in
        :class:`codesearch.bounds.terwilliger.ThreePointData`; a block is
        ``(family, key, size, const, coef)`` with any hashable ``key``.
    caps : tuple of Fraction
        Proven upper bounds on each variable for every code (they absorb rounding residuals).
    shapes : tuple of int
        Number of word pairs of each variable's shape around a fixed word (scaling only).
    m0 : float
        Unit of the objective seen by the solver (about the expected optimum).
    kind : str
        Certificate kind written.
    exps : dict
        ``(family, key) -> (row exponents, block exponent)``: the first scaling.
    offsets : dict
        ``key -> weight of the block's first row`` (row r has weight ``offset + r``).
    labels : dict
        ``key -> fields naming the block in the certificate``.
    row_labels : dict
        ``(family, key) -> names of the block's rows`` for blocks whose rows are not single
        weights: the certificate lists them as ``rows`` instead of ``weights``.
    """

    data: Any
    caps: tuple
    shapes: tuple
    m0: float
    kind: str
    exps: dict = field(hash=False)
    offsets: dict = field(hash=False)
    labels: dict = field(hash=False)
    row_labels: dict = field(default_factory=dict, hash=False)


def solve_program(prog: SdpProgram, *, time_limit: float | None = None,
                  solver: str = "clarabel", passes: int | None = None,
                  solver_options: dict[str, Any] | None = None) -> dict[str, Any]:
    """Solve ``prog`` in floating point and certify the best dual pass exactly.

    The Delsarte-rows LP dual is certified first (never weaker than the LP); then up to
    ``passes`` (default ``_PASSES``) semidefinite passes, each rounded and bounded exactly (see
    :func:`solve_three_point`). ``solver_options`` overrides Clarabel settings by name after
    this module's own (for example ``{"max_iter": 600}``; see :func:`clarabel_options`);
    they change only the numerical search for a dual, never what is certified. Returns the
    result dict of the best certified pass (the certificate carries ``kind``, ``blocks``,
    ``multipliers``, ``bound``, ``value``, ``settings``; the caller adds the cell).
    """
    import numpy as np

    n_passes = _PASSES if passes is None else passes
    if n_passes < 1:
        raise ParameterError(f"numerical passes must be at least 1, not {passes}")
    options = clarabel_options(solver_options, solver)
    t0 = time.perf_counter()
    data, m0 = prog.data, prog.m0
    cap = np.array([float(c) for c in prog.caps])
    shape = np.array([float(c) for c in prog.shapes])
    # Pass 1: x_v = w_v / sv_v with sv the geometric mean of 1/cap (w <= 1) and the count of
    # word pairs of the triangle's shape over M0 (w ~ codeword pairs of that shape / M0);
    # either alone left Clarabel stalling far from the optimum on some cells.
    sv = np.sqrt(shape / m0 / cap)
    exps = dict(prog.exps)
    res = _delsarte_pass(prog)
    log = [{k_: res[k_] for k_ in ("status", "float_value", "exact_float", "seconds")}]
    best = res if res["certified"] else None
    remaining = time_limit
    for attempt in range(n_passes):
        t_pass = time.perf_counter()
        try:
            sol = _solve_scaled(data, m0, sv, exps, remaining, solver, options)
        except (KeyboardInterrupt, SystemExit):
            raise
        except BaseException as exc:  # noqa: BLE001
            # Clarabel reports some internal failures as a Rust panic, which reaches Python
            # as pyo3's PanicException, a BaseException (seen: "SVD error: SVD(1)" in a PSD
            # cone update after 72 minutes of A(19,6) with the pair blocks). The passes
            # already certified stand; the failure is recorded and the passes stop.
            log.append({"status": f"solver failure: {type(exc).__name__}: {exc}"[:200],
                        "float_value": None, "exact_float": None,
                        "seconds": time.perf_counter() - t_pass})
            break
        res = _certify(prog, sol)
        res["seconds"] = time.perf_counter() - t_pass
        log.append({k_: res[k_] for k_ in ("status", "float_value", "exact_float", "seconds")})
        if res["certified"] and (best is None or res["exact"] < best["exact"]):
            best = res
        if remaining is not None:
            remaining = max(0.1, remaining - res["seconds"])
        if len(log) >= 3 and res["certified"] and best is not None:
            if math.floor(log[-2]["exact_float"]) == res["value"] == best["value"]:
                break  # rebalancing no longer moves the certified integer
        if attempt + 1 < n_passes and sol["w"] is not None:
            sv, exps = _rescale(data, sol, sv, exps, cap)
    if best is None:
        best = res
    best["passes"] = log
    best["seconds"] = time.perf_counter() - t0
    if best["certificate"] is not None:
        best["certificate"]["settings"] = {
            "tolerance": _TOL,
            "passes": len(log),
            "round_bits": _ROUND_BITS,
        }
        if options:
            best["certificate"]["settings"]["solver_options"] = dict(options)
    return best


def _delsarte_pass(prog: SdpProgram) -> dict:
    """Certify Delsarte's LP inside the same program (no PSD blocks; the Delsarte rows, the
    constant-weight rows ``A_i <= A(n,d,i)`` and the antipodal rows, i.e. the LP
    strengthened as usual).

    The three-point program contains Delsarte's inequalities, so the LP dual is a dual
    solution of it too; certifying it the same way guarantees the result is never weaker
    than the LP (up to rounding), even where the semidefinite solve is less accurate
    (measured: A(23,4)).
    """
    import numpy as np
    from scipy.optimize import linprog

    t0 = time.perf_counter()
    data, m0 = prog.data, prog.m0
    kinds = ("delsarte", "weight", "antipodal-ball", "antipodal-shell")
    rows = [a for a, (label, _cv, _rhs) in enumerate(data.rows) if label[0] in kinds]
    # x[i,0,0]: the variables of the objective (the only ones in the Delsarte and weight rows)
    single = [v for v, c in enumerate(data.objective) if c]
    col = {v: c for c, v in enumerate(single)}
    a_ub = np.zeros((len(rows), len(single)))
    b_ub = np.zeros(len(rows))
    for r, a in enumerate(rows):
        label, cv, rhs = data.rows[a]
        for v, c in cv.items():
            a_ub[r, col[v]] = c / m0
        b_ub[r] = rhs / m0
    cvec = -np.array([data.objective[v] for v in single], dtype=float) / m0
    # x[i,0,0] <= 1 helps HiGHS; its multipliers are not needed (absorbed by the caps)
    res = linprog(cvec, A_ub=a_ub, b_ub=b_ub, bounds=[(0, 1)] * len(single), method="highs")
    sol = {"status": f"lp:{res.status}", "float_value": float("nan"), "gap": 0.0}
    out = _certify_parts(prog, [], [], sol)
    if res.status == 0:
        out["float_value"] = 1.0 - res.fun * m0
        mus = []
        for r, a in enumerate(rows):
            mu = -float(res.ineqlin.marginals[r])  # >= 0 for a minimisation with <= rows
            if mu > 0.0:
                mus.append((a, Fraction(mu)))
        out = _certify_parts(prog, [], mus, dict(sol, float_value=out["float_value"]))
    out["seconds"] = time.perf_counter() - t0
    return out


def clarabel_options(options: dict[str, Any] | None, solver: str = "clarabel") -> dict[str, Any]:
    """Check Clarabel setting overrides: known setting names with number or bool values.

    Raises
    ------
    ParameterError
        For an unknown name, a value of another type, or options given to another solver.
    """
    if not options:
        return {}
    if solver != "clarabel":
        raise ParameterError(f"solver options apply to clarabel only, not {solver!r}")
    import clarabel

    defaults = clarabel.DefaultSettings()
    out: dict[str, Any] = {}
    for name, value in options.items():
        if name.startswith("_") or not hasattr(defaults, name):
            raise ParameterError(f"unknown clarabel setting {name!r}")
        kind = type(getattr(defaults, name))
        if kind is bool:
            if not isinstance(value, bool):
                raise ParameterError(f"clarabel setting {name!r} takes true or false, "
                                     f"not {value!r}")
        elif kind in (int, float):
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise ParameterError(f"clarabel setting {name!r} takes a number, not {value!r}")
            value = kind(value)
        else:
            raise ParameterError(f"clarabel setting {name!r} cannot be set here")
        out[name] = value
    return out


def _solve_scaled(
    data: Any, m0: float, sv: Any, exps: dict, time_limit: float | None,
    solver: str = "clarabel", options: dict[str, Any] | None = None,
) -> dict:
    """One Clarabel solve of the program in scaled variables ``w = x * sv`` (``options``:
    checked overrides of the settings below, :func:`clarabel_options`)."""
    import clarabel
    import numpy as np
    import scipy.sparse as sp

    nv = len(data.triangles)
    a_rows: list[int] = []
    a_cols: list[int] = []
    a_vals: list[float] = []
    b_vec: list[float] = []
    cones = []
    block_meta = []
    row0 = 0
    sqrt2 = math.sqrt(2.0)
    for family, k, size, const, coef in data.blocks:
        keep = [r for r in range(size) if (r, r) in const or (r, r) in coef]
        if not keep:
            continue  # identically zero rows (forced-zero variables) are dropped
        e, g = exps[(family, k)]
        m = len(keep)
        # Clarabel's PSD triangle: upper triangle by columns, off-diagonals times sqrt(2);
        # the cone holds s = b - A w. Scaled block = 2**-g D B D, D = diag(2**-e_r).
        pos = 0
        for cj, s_ in enumerate(keep):
            for ci in range(cj + 1):
                r_ = keep[ci]
                key = (r_, s_)
                f = 2.0 ** (-e[r_] - e[s_] - g) * (1.0 if r_ == s_ else sqrt2)
                b_vec.append(const.get(key, 0) * f)
                for v, c in coef.get(key, {}).items():
                    a_rows.append(row0 + pos)
                    a_cols.append(v)
                    a_vals.append(-c * f / sv[v])
                pos += 1
        cones.append(clarabel.PSDTriangleConeT(m))
        block_meta.append((family, k, keep, list(e), g, row0, m))
        row0 += pos
    lin_row0 = row0
    row_scale = []
    for label, cv, rhs in data.rows:
        nu = max(abs(c / sv[v]) for v, c in cv.items()) or 1.0
        row_scale.append(nu)
        for v, c in cv.items():
            a_rows.append(row0)
            a_cols.append(v)
            a_vals.append(c / sv[v] / nu)
        b_vec.append(rhs / nu)
        row0 += 1
    for v in range(nv):
        a_rows.append(row0)
        a_cols.append(v)
        a_vals.append(-1.0)
        b_vec.append(0.0)
        row0 += 1
    cones.append(clarabel.NonnegativeConeT(row0 - lin_row0))
    A = sp.csc_matrix((a_vals, (a_rows, a_cols)), shape=(row0, nv))
    b = np.array(b_vec)
    # maximise sum c_v x_v = sum (c_v / sv_v) w_v; Clarabel minimises; objective / M0
    qvec = -np.array(data.objective, dtype=float) / sv / m0
    psd_sizes = [meta[6] for meta in block_meta]
    if solver == "scs":
        z, s_, w, status, obj_p, obj_d, version = _run_scs(
            A, b, qvec, psd_sizes, lin_row0, time_limit
        )
    else:
        settings = clarabel.DefaultSettings()
        settings.verbose = False
        settings.tol_gap_abs = _TOL
        settings.tol_gap_rel = _TOL
        settings.tol_feas = _TOL
        settings.max_iter = 300
        # Equilibration off: with it on, Clarabel stopped on numerical errors in many cells
        # (measured on n <= 28); the problem is scaled by hand above.
        settings.equilibrate_enable = False
        if time_limit is not None:
            settings.time_limit = float(time_limit)
        for name, value in (options or {}).items():
            setattr(settings, name, value)
        solution = clarabel.DefaultSolver(
            sp.csc_matrix((nv, nv)), qvec, A, b, cones, settings
        ).solve()
        z = np.array(solution.z)
        s_ = np.array(solution.s)
        w = np.array(solution.x)
        status = str(solution.status)
        obj_p, obj_d = float(solution.obj_val), float(solution.obj_val_dual)
        version = f"clarabel {clarabel.__version__}"
    ok = bool(np.all(np.isfinite(z)) and np.all(np.isfinite(w)))
    return {
        "status": status,
        "z": z if ok else None,
        "s": s_ if ok else None,
        "w": w if ok else None,
        "float_value": 1.0 - obj_p * m0,
        "gap": abs(obj_p - obj_d) / max(1.0, abs(obj_p)),
        "block_meta": block_meta,
        "lin_row0": lin_row0,
        "row_scale": row_scale,
        "sv": sv,
        "solver": version,
    }


def _run_scs(A: Any, b: Any, qvec: Any, psd_sizes: list, lin_row0: int,
             time_limit: float | None) -> tuple:
    """Solve the same conic program with SCS (kept for the solver comparison).

    SCS wants the nonnegative rows first and each PSD block as its lower triangle by
    columns; Clarabel's rows (PSD blocks first, upper triangle by columns) are permuted in
    and the dual and slack permuted back.
    """
    import numpy as np
    import scs

    perm = []  # SCS row -> Clarabel row
    start = 0
    blocks = []
    for m in psd_sizes:
        order = []
        for c in range(m):
            for r in range(c, m):
                order.append(start + r * (r + 1) // 2 + c)  # Clarabel index of (c, r), c <= r
        blocks.append(order)
        start += m * (m + 1) // 2
    perm = list(range(lin_row0, A.shape[0])) + [i for order in blocks for i in order]
    perm = np.array(perm)
    data = {"A": A[perm].tocsc(), "b": b[perm], "c": qvec}
    cone = {"l": A.shape[0] - lin_row0, "s": psd_sizes}
    kw = {"eps_abs": 1e-9, "eps_rel": 1e-9, "max_iters": 100000, "verbose": False}
    if time_limit is not None:
        kw["time_limit_secs"] = float(time_limit)
    sol = scs.SCS(data, cone, **kw).solve()
    z = np.empty(A.shape[0])
    s_ = np.empty(A.shape[0])
    z[perm] = sol["y"]
    s_[perm] = sol["s"]
    info = sol["info"]
    return (z, s_, np.array(sol["x"]), str(info["status"]), float(info["pobj"]),
            float(info["dobj"]), f"scs {scs.__version__}")


def _unpack_block(vec: Any, start: int, m: int) -> Any:
    import numpy as np

    mat = np.zeros((m, m))
    pos = start
    for cj in range(m):
        for ci in range(cj + 1):
            val = vec[pos] if ci == cj else vec[pos] / math.sqrt(2.0)
            mat[ci, cj] = mat[cj, ci] = val
            pos += 1
    return mat


def _rescale(data: Any, sol: dict, sv: Any, exps: dict, cap: Any) -> tuple[Any, dict]:
    """Balance the block rows at the previous solution (powers of two).

    The variable scaling is kept: rescaling variables by their solved values helped the
    float optimum but multiplied the dual residuals of tiny variables, which the exact
    bound must absorb (measured on A(22,10), A(28,6)).
    """
    import numpy as np

    new_sv = sv
    new_exps = dict(exps)
    for family, k, keep, e, g, start, m in sol["block_meta"]:
        S = _unpack_block(sol["s"], start, m)
        Z = _unpack_block(sol["z"], start, m)
        ds = np.abs(np.diag(S))
        dz = np.abs(np.diag(Z))
        ds = np.maximum(ds, 1e-12 * max(float(ds.max()), 1e-100))
        dz = np.maximum(dz, 1e-12 * max(float(dz.max()), 1e-100))
        e2 = list(e)
        for r, rr in enumerate(keep):
            # D_r = (Z_rr / S_rr)^(1/4) balances the primal and dual diagonals; the shift is
            # bounded so one bad pass cannot push the scaling out of range
            ratio = math.log2(dz[r]) - math.log2(ds[r])
            if math.isfinite(ratio):
                e2[rr] = e[rr] - max(-30, min(30, int(round(0.25 * ratio))))
        new_exps[(family, k)] = (e2, g)
    return new_sv, new_exps


def _certify(prog: SdpProgram, sol: dict) -> dict:
    """Round one pass's dual to an exactly feasible one and bound |C| exactly."""
    data, m0 = prog.data, prog.m0
    out: dict[str, Any] = {
        "float_value": sol["float_value"],
        "gap": sol["gap"],
        "status": sol["status"],
        "certificate": None,
        "certified": False,
        "value": 2**data.n,
        "exact": None,
        "exact_float": float("nan"),
        "reason": "",
    }
    # Any status with a finite dual is worth rounding: the exact check decides its worth.
    if sol["z"] is None:
        out["reason"] = f"solver status {sol['status']}"
        return out
    z = sol["z"]
    zmats = []  # (family, k, weights, integer matrix, row exponents, g)
    for family, k, keep, e, g, start, m in sol["block_meta"]:
        zt = _unpack_block(z, start, m)
        zint = _round_psd(zt * m0)  # the solver's objective was divided by M0
        if zint is None:
            out["reason"] = f"could not round the dual block (family {family}, k={k})"
            return out
        # Z_B = 2**-g D zt D, D = diag(2**-e_r): entry (r, s) is
        # zint[r][s] / 2**(_ROUND_BITS + g + e_r + e_s).
        zmats.append((family, k, [keep[r] + prog.offsets[k] for r in range(m)], zint,
                      [e[keep[r]] for r in range(m)], g))
    zl = z[sol["lin_row0"] : sol["lin_row0"] + len(data.rows)]
    mus = []
    for a in range(len(data.rows)):
        mu = float(zl[a]) * m0 / sol["row_scale"][a]  # x-space multiplier of row a
        if mu > 0.0:
            mus.append((a, Fraction(mu)))  # exact dyadic value of the float
    parts = _block_parts(prog, zmats)  # the blocks' share, priced once for both candidates
    out = _certify_parts(prog, zmats, mus, sol, parts)
    refit = _refit_multipliers(prog, parts)
    if refit is not None:
        better = _certify_parts(prog, zmats, refit, sol, parts)
        if better["exact"] < out["exact"]:
            out = better
    return out


#: Largest linear program (rows + variables) the multiplier refit solves.
_REFIT_MAX = 400_000


def _refit_multipliers(prog: SdpProgram, parts: tuple) -> list | None:
    """Multipliers of the linear rows chosen again for the rounded blocks (``parts``, their
    share of the bound from :func:`_block_parts`).

    With the blocks fixed, the exact bound is ``const + mu.rhs + sum_v max(r_v, 0) cap_v``
    with ``r_v`` linear in ``mu``: a linear program in ``mu >= 0``. Solving it (HiGHS) after
    rounding recovers most of what the solver's inaccurate multipliers and the rounding of
    the blocks cost (measured: A(28,8) 32152.12 -> 32151.89, A(28,6) 291272.2 ->
    291271.3). The result is only a candidate: :func:`_exact_bound` prices it exactly, and
    the caller keeps whichever multipliers bound lower. None when the program is too large
    or the solve fails.
    """
    import numpy as np
    import scipy.sparse as sp
    from scipy.optimize import linprog

    data = prog.data
    rows = data.rows
    nv, nr = len(data.triangles), len(rows)
    if nv + nr > _REFIT_MAX:
        return None
    _total, r0, scale = parts
    r0f = np.array([float(Fraction(x) / scale) for x in r0])
    ii, jj, vv = [], [], []
    for a, (_label, cv, _rhs) in enumerate(rows):
        for v, c in cv.items():
            ii.append(v)
            jj.append(a)
            vv.append(-float(c))
    # variables (mu, s): minimise rhs.mu + cap.s subject to s_v >= r0_v - (G^T mu)_v, s >= 0
    a_ub = sp.hstack([sp.csr_matrix((vv, (ii, jj)), shape=(nv, nr)), -sp.identity(nv)])
    cost = np.array([float(rhs) for _l, _c, rhs in rows] + [float(c) for c in prog.caps])
    res = linprog(cost, A_ub=a_ub.tocsr(), b_ub=-r0f, bounds=(0, None), method="highs")
    if res.status != 0:
        return None
    return [(a, Fraction(float(m))) for a, m in enumerate(res.x[:nr]) if m > 0.0]


def _certify_parts(prog: SdpProgram, zmats: list, mus: list, sol: dict,
                   parts: tuple | None = None) -> dict:
    """Exact bound and certificate from rounded dual blocks and multipliers (``parts``: the
    blocks' share from :func:`_block_parts`, when already computed)."""
    out: dict[str, Any] = {
        "float_value": sol["float_value"],
        "gap": sol["gap"],
        "status": sol["status"],
        "reason": "",
    }
    data = prog.data
    exact = _exact_bound(prog, mus, parts if parts is not None else _block_parts(prog, zmats))
    blocks_cert = []
    for family, k, weights, zint, es, g in zmats:
        m = len(weights)
        names = prog.row_labels.get((family, k))
        rows_field = ({"rows": [list(names[w - prog.offsets[k]]) for w in weights]}
                      if names is not None else {"weights": weights})
        blocks_cert.append(
            {
                "family": family,
                **prog.labels[k],
                **rows_field,
                "matrix": [
                    [
                        _frac_str(
                            Fraction(zint[r][s]) / Fraction(2) ** (_ROUND_BITS + g + es[r] + es[s])
                        )
                        for s in range(m)
                    ]
                    for r in range(m)
                ],
            }
        )
    value = math.floor(exact)
    out.update(
        certified=True,
        value=value,
        exact=exact,
        exact_float=float(exact),
        certificate={
            "kind": prog.kind,
            "blocks": blocks_cert,
            "multipliers": [
                {"row": list(data.rows[a][0]), "value": _frac_str(mu)} for a, mu in mus
            ],
            "bound": _frac_str(exact),
            "value": value,
            "solver": sol.get("solver", "scipy-highs (Delsarte LP dual)"),
            # informative only; an infeasible pass has no float optimum, and NaN is no JSON
            "float_value": (sol["float_value"] if math.isfinite(sol["float_value"])
                            else None),
        },
    )
    return out


def _frac_str(x: Fraction) -> str:
    return f"{x.numerator}/{x.denominator}"


def _round_psd(zt: "Any") -> list[list[int]] | None:
    """Round a float PSD matrix to integers N (meaning N / 2**_ROUND_BITS) with N exactly PD.

    Rounding is absolute (grid 2**-_ROUND_BITS): the scaled dual blocks have entries of
    order one or larger by construction, so little relative precision is lost. The shift
    ``eps * I`` starts at the size of the most negative eigenvalue of the rounded matrix
    (plus a 1e-12 margin) and grows tenfold until exact LDL^T proves positive definiteness.
    """
    import numpy as np

    m = zt.shape[0]
    scale = 2.0**_ROUND_BITS
    base = np.rint(zt * scale)
    lam = float(np.linalg.eigvalsh(base / scale).min()) if m else 0.0
    top = max(1.0, float(np.abs(zt).max()))
    eps = max(0.0, -lam) + 1e-12 * top
    for _ in range(12):
        shift = int(math.ceil(eps * scale))
        n_int = [[int(base[r, s]) + (shift if r == s else 0) for s in range(m)] for r in range(m)]
        if _is_positive_definite(n_int):
            return n_int
        eps *= 10.0
    return None


def _is_positive_definite(mat: list[list[int]]) -> bool:
    """Exact symmetric Gaussian elimination (LDL^T) in rationals: True iff all pivots > 0."""
    m = len(mat)
    a = [[Fraction(v) for v in row] for row in mat]
    for p in range(m):
        piv = a[p][p]
        if piv <= 0:
            return False
        row_p = a[p]
        for r in range(p + 1, m):
            f = a[r][p] / piv
            if f:
                row_r = a[r]
                for s in range(p + 1, m):
                    row_r[s] -= f * row_p[s]
    return True


def _exact_bound(prog: SdpProgram, mus: list, parts: tuple) -> Fraction:
    """Exact upper bound on |C| from rounded duals (see the module docstring): the blocks'
    share ``parts`` (:func:`_block_parts`) plus the multipliers ``mus``, residuals capped."""
    total, r, scale = parts
    r = list(r)
    for a, mu in mus:
        _label, cv, rhs = prog.data.rows[a]
        mu_s = mu * scale
        total += mu_s * rhs
        for v, c in cv.items():
            r[v] -= mu_s * c
    caps = prog.caps
    absorbed = sum((r[v] * caps[v] for v in range(len(r)) if r[v] > 0), Fraction(0))
    return Fraction(total + absorbed) / scale


def _block_parts(prog: SdpProgram, zmats: list) -> tuple:
    """``(total, r, scale)``: the constant part and the coefficient ``r_v`` of every variable
    of ``1 + sum <Z, B(x)> + c.x``, all times ``scale`` (the multipliers come on top)."""
    data = prog.data
    q_exp = _ROUND_BITS + max(
        [g + 2 * max(es) for _, _, _, _, es, g in zmats] + [0]
    ) + 4
    q_exp = max(q_exp, _ROUND_BITS)
    scale = 1 << q_exp
    r = [c * scale for c in data.objective]
    total = scale  # the empty-distance term x[0,0,0] = 1
    blocks = {(fam, k): (const, coef) for fam, k, _size, const, coef in data.blocks}
    for family, k, weights, zint, es, g in zmats:
        const, coef = blocks[(family, k)]
        m = len(weights)
        for ri in range(m):
            for si in range(ri, m):
                shift = q_exp - (_ROUND_BITS + g + es[ri] + es[si])
                zval = zint[ri][si] << shift if shift >= 0 else None
                if zval is None:
                    raise AssertionError("scale exponent too small")
                if ri != si:
                    zval *= 2
                off = prog.offsets[k]
                key = (weights[ri] - off, weights[si] - off)
                c0 = const.get(key)
                if c0:
                    total += zval * c0
                for v, c in coef.get(key, {}).items():
                    r[v] += zval * c
    return total, r, scale
