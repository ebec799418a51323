"""Batch runs: fill a table of cells into the results store, locally or on a Dask cluster.

Problem
-------
Every cell (q, n, d) of a table is a task: prove upper bounds, then run the chosen searches
within a per-cell time budget. Tasks run in worker processes (a local process pool, or the
workers of a Dask ``distributed`` scheduler); only the driver writes to the store, one
transaction per finished cell, so a crash loses at most the cells in flight. Work already done
at the same or a larger budget is skipped, cells whose lower and upper bounds meet are skipped,
and after each finished cell the driver propagates the new entries across the table
(:mod:`codesearch.propagate`). Rerunning the same command resumes where a run stopped.

The worker runs :func:`run_cell` and hands back a :class:`CellOutcome` holding the typed
results themselves (:class:`~codesearch.results.BoundResult`,
:class:`~codesearch.results.SearchResult`); the driver (:func:`run_table`) stores them.
Library functions never print: live figures go to an optional ``progress`` callback
(:class:`codesearch.report.live.TableProgress` renders them for the command line).

References
----------
Dask ``distributed`` documentation, "Futures" and "Setup" (https://distributed.dask.org).
"""

from __future__ import annotations

import concurrent.futures as cf
import dataclasses
import multiprocessing
import os
import signal
import time
from dataclasses import dataclass, field
from typing import Any, Callable, Iterable, Sequence

import numpy as np

from codesearch import verify
from codesearch.errors import InputError, ParameterError, VerificationError
from codesearch.model import MAX_LISTED_WORDS, Code, LinearCode, Params, grid
from codesearch.results import BoundResult, SearchResult, Status

__all__ = [
    "CellTask",
    "CellOutcome",
    "CellCode",
    "TableSummary",
    "table_cells",
    "run_cell",
    "run_table",
    "default_methods",
]

Progress = Callable[[dict[str, Any]], None]

#: Name of the bounds stage in the store's ``runs`` table.
BOUNDS_TASK = "bounds"
#: Name of the construction stage in the store's ``runs`` table (and the method of its codes).
CONSTRUCTION_TASK = "construction"
#: Name of the four-point bound stage in the store's ``runs`` table; its ``budget`` is the
#: estimated-time cap the stage ran under (:data:`FOUR_POINT_DONE` once it has solved, or
#: found the bound not applicable).
FOUR_POINT_TASK = "bounds:four-point"
#: ``budget`` recorded for a four-point stage that needs no rerun at any cap.
FOUR_POINT_DONE = 1.0e9
#: Codes with more words than this travel from the worker compactly (see :class:`CellCode`).
SHIP_WORDS = 4096
#: Seconds per word set aside for checking a code a search may return (the linear-time
#: checks of :mod:`codesearch.verify` run at roughly 10^7 words per second; twice that is kept).
VERIFY_SECONDS_PER_WORD = 2e-7
#: Largest best stored code a record hunt hands its searches to start from
#: (:attr:`codesearch.search.base.Context.incumbent`).
INCUMBENT_WORDS = 1 << 16
#: Least time limit a search is given, even when the budget is spent (so that every search
#: named runs once per budget; a cell may overrun by this much per search).
MIN_SEARCH_SECONDS = 0.05


def table_cells(q: int, ns: Iterable[int], ds: Iterable[int]) -> list[Params]:
    """The cells ``(q, n, d)`` of a rectangular range, keeping only ``d <= n``
    (:func:`codesearch.model.grid`)."""
    return grid(q, ns, ds)


def default_methods() -> list[str]:
    """Methods used when none are named: ``auto`` when registered, else ``exact``."""
    from codesearch.search import METHODS

    for name in ("auto", "exact"):
        if name in METHODS:
            return [name]
    return []


def cell_seed(seed: int, p: Params) -> int:
    """A per-cell seed fixed by the run seed and the cell (recorded with every result)."""
    return (seed * 1_000_003 + p.q * 10_007 + p.n * 101 + p.d) % 2**31


# ---------------------------------------------------------------------------- the worker
@dataclass(frozen=True)
class CellTask:
    """Everything a worker needs to run one cell (picklable).

    ``methods`` carries the registry entries resolved by the driver, so that a method
    registered at run time in the driver runs in the workers without touching their registry.
    """

    params: Params
    budget: float
    methods: tuple[Any, ...]
    run_bounds: bool
    seed: int
    known_lower: int = 0
    known_upper: int | None = None
    sdp: bool = False
    constructions: bool = False
    hunt: bool = False
    incumbent: Code | None = None
    four_point: float = 0.0


@dataclass(frozen=True)
class CellCode:
    """A code a worker hands back for storing, with what the store records beside it.

    Large binary codes travel compactly: a linear one as its generator matrix (a
    :class:`~codesearch.model.LinearCode`), others packed 8 words to the byte per position
    (:func:`codesearch.store.pack_code`) when pickled.
    """

    code: Code | LinearCode
    method: str
    status: str
    seed: int | None = None
    settings: dict[str, Any] = field(default_factory=dict)
    seconds: float = 0.0
    provenance: dict[str, Any] | None = None

    def __reduce__(self) -> tuple:
        c = self.code
        if isinstance(c, Code) and c.size > SHIP_WORDS:
            from codesearch.store import pack_code

            return (_unship, (pack_code(c), c.q, c.n, c.size, self.method, self.status,
                              self.seed, self.settings, self.seconds, self.provenance))
        return (CellCode, (c, self.method, self.status, self.seed, self.settings,
                           self.seconds, self.provenance))


def _unship(blob: bytes, q: int, n: int, size: int, *rest: Any) -> CellCode:
    from codesearch.store import unpack_code

    return CellCode(unpack_code(blob, q, n, size), *rest)


def compact(code: Code) -> Code | LinearCode:
    """A large binary code that is a linear space as its generator matrix; others unchanged."""
    if code.size > SHIP_WORDS:
        basis = verify.binary_linear_basis(code)
        if basis is not None:
            return LinearCode(basis, 2)
    return code


@dataclass(frozen=True)
class CellOutcome:
    """What a worker hands back for one cell: the results themselves, ready to store.

    Attributes
    ----------
    params : Params
        The cell.
    bounds : tuple of BoundResult, or None
        Every bound of the bounds stage; None when the stage did not run (or failed).
    bounds_seconds : float
        Time of the bounds stage.
    searches : tuple of SearchResult
        One per search that ran (settings stamped with the cell budget and the time limit).
    refused : tuple of (method, seconds)
        Searches that refused the cell (bad input for them): marked done, never retried.
    errors : tuple of (stage, message)
        Failures, reported; the stage is retried by the next run.
    seconds : float
        Wall time of the whole cell.
    codes : tuple of CellCode
        Codes to store apart from the searches' own: the construction stage's, and the large
        codes of searches (moved here from their ``SearchResult``, which then holds None).
    stages : dict
        Seconds of each stage: ``bounds``, ``bounds:four-point``, ``construction``,
        ``search:NAME`` (the search and the check of its code), and ``skipped:NAME`` (0.0)
        for a search left without time.
    four_point : tuple or None
        The four-point stage when it ran: ``(bound or None, budget to record or None, note)``
        (see :func:`_four_point_stage`).
    """

    params: Params
    bounds: tuple[BoundResult, ...] | None
    bounds_seconds: float
    searches: tuple[SearchResult, ...]
    refused: tuple[tuple[str, float], ...]
    errors: tuple[tuple[str, str], ...]
    seconds: float
    codes: tuple[CellCode, ...] = ()
    stages: dict[str, float] = field(default_factory=dict)
    four_point: tuple[BoundResult | None, float | None, str] | None = None


def _one_line(exc: BaseException) -> str:
    return f"{type(exc).__name__}: {exc}".splitlines()[0]


def _bounds_stage(task: CellTask, errors: list[tuple[str, str]]
                  ) -> tuple[tuple[BoundResult, ...] | None, float]:
    from codesearch.bounds import all_bounds

    t0 = time.perf_counter()
    try:
        found = all_bounds(task.params, sdp=task.sdp)
    except Exception as exc:  # a failing bound must not lose the cell's searches
        errors.append((BOUNDS_TASK, _one_line(exc)))
        return None, time.perf_counter() - t0
    return tuple(found.values()), time.perf_counter() - t0


def _four_point_stage(task: CellTask, errors: list[tuple[str, str]]
                      ) -> tuple[BoundResult | None, float | None, str]:
    """The four-point bound on the cell when its estimated time is at most ``task.four_point``
    seconds: ``(bound or None, budget to record in the runs table or None, note)``.

    A cell the bound does not apply to, or whose program does not fit this machine, is
    recorded as done for good (:data:`FOUR_POINT_DONE`); one over the cap is recorded with
    the cap, so that a later run with a larger cap tries it; a failure is reported in
    ``errors`` and recorded nowhere (the next run retries it).
    """
    from codesearch.bounds import fourpoint

    p = task.params
    if p.q != 2 or p.d < 3:
        return None, FOUR_POINT_DONE, "not applicable"
    try:
        size = fourpoint.check_four_point_fits(p)
    except ParameterError as exc:
        return None, FOUR_POINT_DONE, str(exc)
    if size.seconds > task.four_point:
        return None, task.four_point, (f"estimated {size.seconds:,.0f} s, above the cap of "
                                       f"{task.four_point:,.0f} s")
    try:
        # as many solves with the pair moment blocks as fit under the cap (at least one:
        # the plain estimate fits), then a size-cut solve if one more fits
        cap = min(task.four_point, fourpoint.MAX_SECONDS)
        pairs = size.pair_solves_within(cap)
        found = fourpoint.four_point_bound(
            p, pair_solves=pairs, size_cut=size.size_cut_fits(pairs, cap))
    except Exception as exc:  # a failing bound must not lose the cell's other work
        errors.append((FOUR_POINT_TASK, _one_line(exc)))
        return None, None, _one_line(exc)
    note = "solved" if found is not None and found.certified else "not certified"
    return found, FOUR_POINT_DONE, note


def _construction_stage(task: CellTask, lower: int, errors: list[tuple[str, str]]
                        ) -> CellCode | None:
    """The largest code of the construction library for the cell, if it beats ``lower``:
    linear codes as generator matrices whatever their size, others up to the listing cap."""
    from codesearch import constructions

    p = task.params
    t0 = time.perf_counter()
    try:
        for cand in constructions.candidates(p):
            if cand.size <= lower:
                return None
            if not cand.linear and cand.size > MAX_LISTED_WORDS:
                continue
            built = cand.build(MAX_LISTED_WORDS)
            return CellCode(built.code, CONSTRUCTION_TASK, Status.FEASIBLE.value,
                            settings={"steps": cand.steps},
                            seconds=time.perf_counter() - t0,
                            provenance={"construction": built.provenance, "family": cand.root,
                                        "steps": cand.steps})
    except Exception as exc:  # a failing construction must not lose the cell's searches
        errors.append((CONSTRUCTION_TASK, _one_line(exc)))
    return None


_WARM: set[tuple[int, bool]] = set()


def _warm_up(q: int, constructions: bool) -> float:
    """Once per worker process and alphabet, before the cell's clock starts: load the
    checker's compiled kernels and tabulate the construction library (about 1-3 s the first
    time). Returns the seconds spent (0.0 when already done); the cell reports them apart."""
    if (q, constructions) in _WARM:
        return 0.0
    t0 = time.perf_counter()
    from codesearch.bounds import all_bounds

    verify.prepare()
    verify.assert_code(Code(np.eye(3, dtype=np.uint8), 2), Params(2, 3, 2))
    all_bounds(Params(q, 4, 3))
    if constructions:
        from codesearch import constructions as lib

        try:
            lib.candidates(Params(q, 3, 3))[0].build()
        except Exception:  # the construction stage reports its own failures
            pass
    _WARM.add((q, constructions))
    return time.perf_counter() - t0


def _check_reserve(p: Params, upper: int | None) -> float:
    """Seconds kept back from a search for checking the largest code it could return."""
    words = min(upper if upper is not None else p.q**p.n, p.q**p.n, 1 << 26)
    return words * VERIFY_SECONDS_PER_WORD if words > SHIP_WORDS else 0.0


def run_cell(task: CellTask) -> CellOutcome:
    """Run one cell in a worker: bounds, the construction library, then each search with its
    share of what is left of the budget; last, outside the budget, the four-point bound when
    the run asks for it and the cell is still open.

    Every stage runs under the cell's deadline ``start + budget``: the bounds and the
    construction are short and accounted first; each search is given its share of the time
    left minus a reserve for checking the code it returns (:func:`_check_reserve`), at least
    :data:`MIN_SEARCH_SECONDS`. One-time costs of a worker process (loading kernels,
    tabulating the constructions) come before the clock starts and are reported apart
    (``stages["warm-up"]``).
    Never raises for a failing bound or search: the failure is reported in ``errors``.
    """
    from codesearch.search import run_method

    p = task.params
    stages: dict[str, float] = {}
    warm = _warm_up(p.q, task.constructions)
    if warm:
        stages["warm-up"] = warm
    start = time.perf_counter()
    deadline = start + task.budget
    errors: list[tuple[str, str]] = []
    found, bounds_seconds = _bounds_stage(task, errors) if task.run_bounds else (None, 0.0)
    if task.run_bounds:
        stages[BOUNDS_TASK] = bounds_seconds
    usable = sorted((b for b in found or () if b.usable), key=lambda b: b.value)
    known = {"bound": usable[0]} if usable else {}  # else each method asks when it needs it
    upper = task.known_upper
    if usable and (upper is None or usable[0].value < upper):
        upper = usable[0].value
    lower = task.known_lower
    codes: list[CellCode] = []
    if task.constructions and (upper is None or lower < upper):
        t0 = time.perf_counter()
        built = _construction_stage(task, lower, errors)
        stages[CONSTRUCTION_TASK] = time.perf_counter() - t0
        if built is not None:
            codes.append(built)
            lower = max(lower, built.code.size)
    searches: list[SearchResult] = []
    refused: list[tuple[str, float]] = []
    reserve = _check_reserve(p, upper)
    for i, spec in enumerate(task.methods):
        if upper is not None and lower >= upper:
            break  # settled: no search can improve the cell
        remaining = deadline - time.perf_counter()
        share = max((remaining - reserve) / (len(task.methods) - i), MIN_SEARCH_SECONDS)
        options = {}
        if task.hunt and lower > 0 and spec.exhaustive and "size" in _options_of(spec):
            options["size"] = lower + 1  # a record hunt asks for one word more than held
        t0 = time.perf_counter()
        try:
            res = run_method(spec, p, time_limit=share, seed=task.seed, options=options,
                             incumbent=task.incumbent, **known)
        except Exception as exc:
            stages[f"search:{spec.name}"] = time.perf_counter() - t0
            errors.append((spec.name, _one_line(exc)))
            # A method refusing the cell (bad input for it) will refuse again: mark it done.
            # Anything else (a missing module, a bug) is retried by the next run.
            if isinstance(exc, InputError):
                refused.append((spec.name, time.perf_counter() - start))
            continue
        settings = {**res.settings, "cell_budget": task.budget, "nodes": res.nodes}
        res = dataclasses.replace(res, settings=settings,
                                  seed=task.seed if res.seed is None else res.seed)
        if res.code is not None and res.code.size > SHIP_WORDS:
            codes.append(CellCode(compact(res.code), res.method, res.status.value, res.seed,
                                  dict(settings), res.seconds))
            lower = max(lower, res.code.size)
            res = dataclasses.replace(res, code=None)
        stages[f"search:{spec.name}"] = time.perf_counter() - t0
        searches.append(res)
        lower = max(lower, res.size)
        if spec.exhaustive and res.upper is not None and res.status in (
                Status.OPTIMAL, Status.INFEASIBLE):
            upper = res.upper if upper is None else min(upper, res.upper)
    four = None
    if task.four_point > 0 and (upper is None or lower < upper):
        # last, outside the budget, and only where the cell is still open
        t0 = time.perf_counter()
        four = _four_point_stage(task, errors)
        stages[FOUR_POINT_TASK] = time.perf_counter() - t0
    return CellOutcome(p, found, bounds_seconds, tuple(searches), tuple(refused),
                       tuple(errors), time.perf_counter() - start, tuple(codes), stages, four)


def _options_of(spec: Any) -> frozenset[str]:
    from codesearch.search import _load

    try:
        return frozenset(_load(spec).OPTIONS)
    except Exception:  # run_method reports the failure to load
        return frozenset()


def _store_outcome(store: Any, task: CellTask, out: CellOutcome) -> None:
    """Write one finished cell in one transaction (codes verified, certificates re-checked)."""
    p = task.params
    exhaustive = {spec.name: spec.exhaustive for spec in task.methods}
    with store.transaction():
        if out.bounds is not None:
            for b in out.bounds:
                store.add_bound(b, seconds=out.bounds_seconds)
            store.mark_run(p, BOUNDS_TASK, budget=0.0, seconds=out.seconds, status="done")
        if out.four_point is not None:
            bound, mark, note = out.four_point
            seconds = out.stages.get(FOUR_POINT_TASK, 0.0)
            if bound is not None:
                store.add_bound(bound, seconds=seconds)
            if mark is not None:
                store.mark_run(p, FOUR_POINT_TASK, budget=mark, seconds=seconds,
                               status="done" if mark >= FOUR_POINT_DONE else "over cap")
        if task.constructions:
            store.mark_run(p, CONSTRUCTION_TASK, budget=0.0,
                           seconds=out.stages.get(CONSTRUCTION_TASK, 0.0), status="done")
        for c in out.codes:
            store.add_code(c.code, p, method=c.method, status=c.status, seed=c.seed,
                           settings=c.settings, seconds=c.seconds, provenance=c.provenance)
        for method, seconds in out.refused:
            store.mark_run(p, method, budget=task.budget, seconds=seconds, status="error",
                           seed=task.seed)
        for res in out.searches:
            store.add_search_result(res, exhaustive=exhaustive[res.method])
            store.mark_run(p, res.method, budget=task.budget, seconds=res.seconds,
                           status=res.status.value, seed=task.seed)


# ------------------------------------------------------------------------------ executors
def _ignore_sigint() -> None:
    # Ctrl-C is the driver's business: it cancels the run and stops the workers itself.
    signal.signal(signal.SIGINT, signal.SIG_IGN)


class _LocalExecutor:
    def __init__(self, workers: int, per_worker: int = 1) -> None:
        self.workers = workers
        self.per_worker = per_worker
        self._new()

    def _new(self) -> None:
        # spawn, not fork: the driver may run a display thread, and forking threads is unsafe.
        self.pool = cf.ProcessPoolExecutor(
            max_workers=self.workers, mp_context=multiprocessing.get_context("spawn"),
            initializer=_ignore_sigint,
        )

    def capacity(self) -> int:
        return self.per_worker * self.workers

    def submit(self, task: CellTask) -> Any:
        return self.pool.submit(run_cell, task)

    def wait(self, futures: set[Any], timeout: float) -> set[Any]:
        done, _ = cf.wait(futures, timeout=timeout, return_when=cf.FIRST_COMPLETED)
        return set(done)

    @staticmethod
    def result(fut: Any) -> dict[str, Any]:
        return fut.result()

    def broken(self, exc: BaseException) -> bool:
        if isinstance(exc, cf.process.BrokenProcessPool):
            self.pool.shutdown(wait=False, cancel_futures=True)
            self._new()
            return True
        return False

    def close(self, cancel: bool = False) -> None:
        if cancel:
            procs = list(getattr(self.pool, "_processes", {}).values())
            self.pool.shutdown(wait=False, cancel_futures=True)
            for proc in procs:  # only the pool's own worker processes
                if proc.is_alive():
                    proc.terminate()
            for proc in procs:
                proc.join(timeout=5)
        else:
            self.pool.shutdown(wait=True)


class _DaskExecutor:
    def __init__(self, address: str, per_worker: int = 2) -> None:
        self.per_worker = per_worker
        from codesearch._optional import require

        Client = require("distributed", "a Dask cluster (--scheduler)").Client
        try:
            self.client = Client(address, timeout="15s", set_as_default=False)
        except (OSError, TimeoutError, ValueError) as exc:
            raise InputError(f"cannot reach Dask scheduler {address}: {exc}".splitlines()[0]) from None
        self.workers = max(1, len(self.client.scheduler_info().get("workers", {})))

    def capacity(self) -> int:
        # Two cells per worker keep workers busy while the driver stores results; workers
        # that join later (a cluster scaling up under SLURM) raise it as they arrive.
        try:
            self.workers = max(1, len(self.client.scheduler_info().get("workers", {})))
        except Exception:  # keep the last known size if the scheduler is briefly unreachable
            pass
        return self.per_worker * self.workers

    def submit(self, task: CellTask) -> Any:
        p = task.params
        return self.client.submit(run_cell, task, pure=False,
                                  key=f"cell-{p.q}-{p.n}-{p.d}-{time.time_ns()}")

    def wait(self, futures: set[Any], timeout: float) -> set[Any]:
        # Polling keeps this independent of a process-wide default client.
        deadline = time.perf_counter() + timeout
        while True:
            done = {f for f in futures if f.done()}
            if done or time.perf_counter() >= deadline:
                return done
            time.sleep(0.05)

    @staticmethod
    def result(fut: Any) -> dict[str, Any]:
        return fut.result()

    def broken(self, exc: BaseException) -> bool:
        return False

    def close(self, cancel: bool = False) -> None:
        # Closing the client releases its futures; the scheduler cancels what is still queued.
        self.client.close()


# ------------------------------------------------------------------------------- driver
@dataclass
class TableSummary:
    """Outcome of :func:`run_table`."""

    cells: int
    skipped: int = 0
    ran: int = 0
    failed: int = 0
    derived_codes: int = 0
    derived_bounds: int = 0
    seconds: float = 0.0
    interrupted: bool = False
    errors: list[str] = field(default_factory=list)
    store_seconds: float = 0.0
    propagate_seconds: float = 0.0
    slowest: list[tuple[float, str]] = field(default_factory=list)

    def to_json(self) -> dict[str, Any]:
        return {"cells": self.cells, "skipped": self.skipped, "ran": self.ran,
                "failed": self.failed, "derived_codes": self.derived_codes,
                "derived_bounds": self.derived_bounds, "seconds": round(self.seconds, 3),
                "store_seconds": round(self.store_seconds, 3),
                "propagate_seconds": round(self.propagate_seconds, 3),
                "slowest": [[round(t, 3), c] for t, c in self.slowest],
                "interrupted": self.interrupted, "errors": list(self.errors)}


def _resolve_methods(methods: Sequence[str] | None) -> tuple[Any, ...]:
    from codesearch.search import METHODS

    names = default_methods() if methods is None else list(methods)
    unknown = [m for m in names if m not in METHODS]
    if unknown:
        raise ParameterError(
            f"unknown search method(s) {', '.join(unknown)}; choose from {', '.join(METHODS)}"
        )
    return tuple(METHODS[m] for m in names)


@dataclass(frozen=True)
class _Plan:
    """What every cell of one table run gets."""

    budget: float
    specs: tuple[Any, ...]
    bounds: bool
    sdp: bool
    seed: int
    propagate: bool
    constructions: bool = True
    four_point: float = 0.0

    def task(self, st: Any, p: Params) -> CellTask | None:
        """The work left on cell ``p`` (None when nothing is left): only open cells
        (lower < upper) run, and only the stages not yet run at this budget or a larger one.
        A search that ran before with a smaller budget runs again as a record hunt: it gets
        the best stored code to start from (methods declaring ``INCUMBENT``) and, for an
        exhaustive method taking a target size, the question "one word more?"."""
        s = st.summary(p)
        if s.exact:
            return None
        run_bounds = self.bounds and st.run_budget(p, BOUNDS_TASK) is None
        build = self.constructions and st.run_budget(p, CONSTRUCTION_TASK) is None
        before = {spec.name: st.run_budget(p, spec.name) for spec in self.specs}
        todo = tuple(spec for spec in self.specs if (before[spec.name] or 0.0) < self.budget)
        four = (self.four_point > 0 and p.q == 2
                and (st.run_budget(p, FOUR_POINT_TASK) or 0.0) < self.four_point)
        if not run_bounds and not todo and not build and not four:
            return None
        hunt = any(b is not None for b in before.values())
        incumbent = None
        if hunt and todo and s.code_id is not None and 2 <= s.lower <= INCUMBENT_WORDS:
            incumbent = st.get_code(s.code_id)[1]
        return CellTask(p, float(self.budget), todo, run_bounds, cell_seed(self.seed, p),
                        s.lower, s.upper, self.sdp, build, hunt, incumbent,
                        self.four_point if four else 0.0)


class _Driver:
    """The loop of :func:`run_table`: keep the executor full, store what comes back, derive
    between cells, tell ``emit`` what happens."""

    def __init__(self, st: Any, cells: list[Params], plan: _Plan,
                 new_executor: Callable[[], Any], emit: Progress) -> None:
        self.st, self.cells, self.plan, self.emit = st, cells, plan, emit
        self.new_executor = new_executor
        self.executor: Any = None
        self.summary = TableSummary(cells=len(cells))
        self.pending = list(cells)
        self.running: dict[Any, CellTask] = {}
        self.crashes: dict[Params, int] = {}

    def run(self) -> None:
        self.derive()
        self.emit({"event": "start", "cells": len(self.cells),
                   "methods": [s.name for s in self.plan.specs], "budget": self.plan.budget})
        while self.pending or self.running:
            self.fill()
            if not self.running:
                break
            for fut in self.executor.wait(set(self.running), timeout=0.5):
                if fut in self.running:  # a crash may have requeued the rest already
                    self.collect(fut)

    def fill(self) -> None:
        """Submit cells while the executor has room (skipping cells with nothing left)."""
        while self.pending and len(self.running) < self.capacity():
            task = self.plan.task(self.st, self.pending.pop(0))
            if task is None:
                self.summary.skipped += 1
                self.emit({"event": "skip", "cell": None})
                continue
            if self.executor is None:
                # Started on the first task only: a resumed run with nothing left to do never
                # pays for worker start-up. The driver's checker is loaded first, so that a
                # Ctrl-C during the run never lands inside numba's first import.
                verify.prepare()
                self.executor = self.new_executor()
            self.running[self.executor.submit(task)] = task
            self.emit({"event": "submit", "cell": task.params, "lower": task.known_lower,
                       "upper": task.known_upper})

    def capacity(self) -> int:
        return 1 if self.executor is None else self.executor.capacity()

    def collect(self, fut: Any) -> None:
        task = self.running.pop(fut)
        try:
            out = self.executor.result(fut)
        except Exception as exc:
            if self.executor.broken(exc):
                self.requeue_after_crash(task)
            else:
                self.fail(task.params, _one_line(exc))
            return
        before = self.st.summary(task.params)
        t0 = time.perf_counter()
        try:
            _store_outcome(self.st, task, out)
        except VerificationError as exc:
            # A producer's bug: the cell's transaction rolled back, nothing of it is stored;
            # the run goes on and reports the cell as failed.
            self.fail(task.params, f"verification failed, nothing stored: {exc}")
            return
        stored = time.perf_counter() - t0
        better = self.st.log_improvements(before, seconds=out.seconds, budget=task.budget)
        self.summary.errors += [f"{task.params} {stage}: {msg}" for stage, msg in out.errors]
        self.summary.ran += 1
        t1 = time.perf_counter()
        # Relations first (they may settle the next cells before they are submitted), then
        # the workers get new cells, then the library's chains from the codes found, which
        # may take seconds when a search beat the constructions.
        self.derive(chains=False)
        self.fill()
        self.derive(chains=True)
        derived = time.perf_counter() - t1
        stages = {**out.stages, "store": stored, "propagate": derived}
        self.st.log_cell(task.params, budget=task.budget, seconds=out.seconds, stages=stages)
        self.summary.store_seconds += stored
        self.summary.propagate_seconds += derived
        self.summary.slowest = sorted(self.summary.slowest + [(out.seconds, str(task.params))],
                                      reverse=True)[:10]
        s = self.st.summary(task.params)
        self.emit({"event": "done", "cell": task.params, "lower": s.lower, "upper": s.upper,
                   "seconds": out.seconds, "budget": task.budget, "stages": stages,
                   "improved": [list(c) for c in better]})

    def requeue_after_crash(self, task: CellTask) -> None:
        """A worker died (e.g. out of memory): the executor rebuilt its pool, so every cell in
        flight is requeued; a cell is given up after its second crash."""
        lost = list(self.running.values()) + [task]
        self.running.clear()
        for t in lost:
            self.crashes[t.params] = self.crashes.get(t.params, 0) + 1
            if self.crashes[t.params] >= 2:
                self.summary.failed += 1
                self.summary.errors.append(f"{t.params}: worker process died")
            else:
                self.pending.insert(0, t.params)
            self.emit({"event": "error", "cell": t.params, "error": "worker died"})

    def fail(self, p: Params, message: str) -> None:
        msg = f"{p}: {message}"
        self.summary.failed += 1
        self.summary.errors.append(msg.splitlines()[0])
        self.emit({"event": "error", "cell": p, "error": msg})

    def derive(self, chains: bool = True) -> None:
        """Propagate between the cells of each alphabet (:mod:`codesearch.propagate`)."""
        from codesearch.propagate import propagate

        if not self.plan.propagate:
            return
        by_q: dict[int, list[Params]] = {}
        for p in self.cells:
            by_q.setdefault(p.q, []).append(p)
        for group in by_q.values():
            out = propagate(self.st, group, chains=chains, progress=self.emit)
            self.summary.derived_codes += out.codes
            self.summary.derived_bounds += out.bounds

    def close(self, cancel: bool = False) -> None:
        if self.executor is not None:
            self.executor.close(cancel=cancel)
            self.executor = None


def run_table(
    store: Any,
    cells: Sequence[Params],
    *,
    budget: float = 10.0,
    methods: Sequence[str] | None = None,
    workers: int | None = None,
    scheduler: str | None = None,
    seed: int = 0,
    bounds: bool = True,
    sdp: bool = False,
    propagate: bool = True,
    constructions: bool = True,
    four_point: float = 0.0,
    per_worker: int | None = None,
    progress: Progress | None = None,
) -> TableSummary:
    """Fill ``cells`` into ``store``: bounds, searches within ``budget`` seconds per cell.

    Parameters
    ----------
    store : Store or str
        The results store (opened here when a path is given; only this process writes).
    cells : sequence of Params
        The table.
    budget : float
        Seconds of search per cell, shared among ``methods``. A method that already ran on
        a cell with this budget or more is skipped.
    methods : sequence of str, optional
        Search methods in order (default :func:`default_methods`).
    workers : int, optional
        Local worker processes (default: the number of CPUs). Ignored with ``scheduler``.
    scheduler : str, optional
        Address of a Dask ``distributed`` scheduler, e.g. ``tcp://10.0.0.5:8786``.
    seed : int
        Run seed; each cell's seed is :func:`cell_seed` of it and is stored with its results.
    bounds, propagate : bool
        Run the bounds stage; propagate between cells after each finished cell.
    constructions : bool
        Ask the construction library (:mod:`codesearch.constructions`) for each cell before
        the searches, once per cell.
    sdp : bool
        Let the bounds stage try the semidefinite bound too (slow; cells whose bounds
        already ran are not redone).
    four_point : float
        Also solve the four-point SDP bound (:mod:`codesearch.bounds.fourpoint`; binary,
        minutes to hours a cell from n = 17) on every open cell whose estimated solve time
        is at most this many seconds; 0 (default) never. Its own stage
        (:data:`FOUR_POINT_TASK`), outside the search budget: a rerun with a larger cap
        tries the cells left over, a solved cell is never solved again.
    per_worker : int, optional
        Cells in flight per worker: default 1 on the local pool (a queued cell may still be
        settled by propagation before it starts) and 2 on a Dask cluster (hides the round
        trip to remote workers).
    progress : callable, optional
        Receives event dicts (``start``, ``submit``, ``skip``, ``done``, ``derived``,
        ``error``, ``finish``). A ``done`` event has ``cell``, ``lower``, ``upper``,
        ``seconds`` (the worker's wall time for the cell), ``budget``, ``stages`` (seconds per
        stage: ``bounds``, ``construction``, ``search:NAME``, ``skipped:NAME``, and the
        driver's ``store`` and ``propagate``, which run outside the cell's budget) and
        ``improved`` (``[side, old, new]`` for each value the cell improved).

    Returns
    -------
    TableSummary

    Raises
    ------
    KeyboardInterrupt
        After cancelling the tasks in flight; everything finished is already stored.
    """
    from codesearch.store import Store

    if not budget > 0:
        raise ParameterError(f"budget must be positive, got {budget}")
    if workers is not None and workers < 1:
        raise ParameterError(f"workers must be at least 1, got {workers}")
    if per_worker is not None and per_worker < 1:
        raise ParameterError(f"per_worker must be at least 1, got {per_worker}")
    if four_point < 0:
        raise ParameterError(f"four_point must be a number of seconds >= 0, got {four_point}")
    plan = _Plan(float(budget), _resolve_methods(methods), bounds, sdp, seed, propagate,
                 constructions, float(four_point))

    def new_executor() -> Any:
        if scheduler:
            return _DaskExecutor(scheduler, per_worker or 2)
        return _LocalExecutor(workers or os.cpu_count() or 1, per_worker or 1)

    own = not hasattr(store, "transaction")
    st = Store(store) if own else store
    emit = progress or (lambda ev: None)
    driver = _Driver(st, sorted(set(cells)), plan, new_executor, emit)
    t_start = time.perf_counter()
    try:
        driver.run()
    except KeyboardInterrupt:
        driver.summary.interrupted = True
        driver.close(cancel=True)
        raise
    finally:
        driver.close()
        driver.summary.seconds = time.perf_counter() - t_start
        if own:
            st.close()
    emit({"event": "finish", "summary": driver.summary.to_json()})
    return driver.summary
