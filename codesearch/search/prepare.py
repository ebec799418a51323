"""Kernels compiled before the clock starts: load or compile every numba kernel once.

Problem
-------
numba compiles a kernel when it is first called (or, for a kernel with an explicit signature,
when :mod:`codesearch._kernels` is imported) and keeps the machine code in an on-disk cache
(``cache=True``). On a machine whose cache is empty (a fresh install, a new container, a
Dask worker on another host) compiling every kernel takes about a minute. A search that
triggers this inside its time limit spends its budget in the compiler and returns a poor
code; a table run whose first cells do the same stores poor values for them.

What this module does
---------------------
:func:`prepare_kernels`
    runs every method's declared warm-up (the front end's :func:`~codesearch.search.prepare_method`
    on all registered methods: tiny cells through the real code paths, so the signatures
    compiled are the ones the searches use) and the checker's paths (binary, q-ary and
    interleaved distances, generator matrices, DRAT), then writes a stamp next to numba's
    cache. ``codesearch prepare`` calls it; the command line calls it itself, with a one-line
    notice, the first time a command that searches or verifies runs on a machine whose stamp
    is missing (:func:`kernels_ready`).
:func:`kernels_ready`
    True when the stamp matches this machine's cache: same cache directory, same kernel
    source (numba's own source stamp of ``_kernels.py``), numba, Python and CPU.
:func:`kernel_status`
    the public kernels and whether each has machine code in this process (the tests use it
    to check that :func:`prepare_kernels` reaches every kernel).

The stamp only decides whether to print the notice and compile everything at once; numba's
own cache decides what is actually reused, so a wrong stamp costs time, never correctness.

References
----------
numba documentation, "Notes on caching" (cache invalidation by source stamp and CPU) and
"Environment variables" (``NUMBA_CACHE_DIR``).
"""

from __future__ import annotations

import importlib.util
import json
import os
import platform
import time
from dataclasses import dataclass
from typing import Callable

import numpy as np

__all__ = ["KernelReport", "prepare_kernels", "kernels_ready", "kernel_status", "cache_dir",
           "STAMP_NAME"]

#: File written next to numba's cache of ``_kernels.py`` once every kernel is compiled.
STAMP_NAME = "codesearch-kernels.json"
#: Raised when the warm-up workload changes (new kernels, new paths), to re-prepare.
_WORKLOAD_VERSION = 1


@dataclass(frozen=True)
class KernelReport:
    """What :func:`prepare_kernels` did.

    Attributes
    ----------
    seconds : float
        Wall time of the preparation (compiling on a cold cache, loading on a warm one).
    kernels : int
        Public kernels of :mod:`codesearch._kernels`.
    missing : tuple of str
        Public kernels the warm-up did not reach (empty unless a new kernel lacks a path).
    cache_dir : str or None
        numba's cache directory for the kernels (None if it cannot be found).
    """

    seconds: float
    kernels: int
    missing: tuple[str, ...]
    cache_dir: str | None


def _kernels_file() -> str | None:
    spec = importlib.util.find_spec("codesearch._kernels")
    return None if spec is None else spec.origin


def _locator():
    """numba's cache locator for ``_kernels.py`` (its own choice of directory), or None.

    Built through numba's ``CompileResultCacheImpl`` (what ``cache=True`` uses) on a stand-in function whose code claims to live in
    ``_kernels.py``, so that ``NUMBA_CACHE_DIR``, an unwritable install tree and the other
    cases are resolved exactly as numba resolves them. Importing numba is enough: the kernels
    module itself is not imported (that would compile its eager kernels before any notice).
    """
    path = _kernels_file()
    if path is None:
        return None
    try:
        from numba.core.caching import CompileResultCacheImpl

        namespace: dict = {}
        exec(compile("def _probe():\n    pass\n", path, "exec"), namespace)
        return CompileResultCacheImpl(namespace["_probe"])._locator
    except Exception:  # a numba without this internal API: no stamp, nothing breaks
        return None


def cache_dir() -> str | None:
    """The directory where numba caches the kernels on this machine (None if unknown)."""
    loc = _locator()
    return None if loc is None else loc.get_cache_path()


def _stamp_key(loc) -> dict:
    import numba
    from numba.core.registry import cpu_target

    triple, cpu, features = cpu_target.target_context.codegen().magic_tuple()
    return {"workload": _WORKLOAD_VERSION, "source": repr(loc.get_source_stamp()),
            "numba": numba.__version__, "python": platform.python_version(),
            "cpu": f"{triple} {cpu}", "features": features}


def kernels_ready() -> bool:
    """True when :func:`prepare_kernels` ran against this cache and nothing changed since.

    Unknown cache locations count as ready (numba then compiles on first use, as before).
    """
    loc = _locator()
    if loc is None:
        return True
    try:
        with open(os.path.join(loc.get_cache_path(), STAMP_NAME)) as fh:
            stamp = json.load(fh)
        return stamp.get("key") == _stamp_key(loc)
    except (OSError, ValueError):
        return False


def kernel_status() -> dict[str, bool]:
    """Public kernel name -> whether it has machine code: compiled or loaded in this process,
    or present in numba's cache (a kernel called only by other kernels is loaded inside
    their machine code, never by itself)."""
    from numba.core.registry import CPUDispatcher

    from codesearch import _kernels

    def cached(disp) -> bool:
        try:
            return bool(disp._cache._cache_file._load_index())
        except Exception:  # no cache, or a numba without this internal API
            return False

    return {name: bool(obj.signatures) or cached(obj)
            for name, obj in sorted(vars(_kernels).items())
            if isinstance(obj, CPUDispatcher) and not name.startswith("_")}


def _checker_workload() -> None:
    """The checker's kernel paths on tiny inputs (codes, generator matrices, DRAT)."""
    from codesearch import verify
    from codesearch.model import Code
    from codesearch.verify import drat

    rng = np.random.default_rng(0)
    # binary, q-ary interleaved (P * n <= 64), q-ary planes, more than one limb
    for q, n in ((2, 9), (2, 70), (3, 6), (4, 40)):
        words = np.unique(rng.integers(0, q, (12, n), dtype=np.uint8), axis=0)
        code = Code(words, q)
        verify.check_code(code, 1)
        verify.first_close_pair(code, n + 1)
    # generator matrices: Gray-code enumeration (binary), odometer (prime), information sets
    hamming = np.array([[1, 0, 0, 0, 0, 1, 1], [0, 1, 0, 0, 1, 0, 1],
                        [0, 0, 1, 0, 1, 1, 0], [0, 0, 0, 1, 1, 1, 1]], dtype=np.uint8)
    ternary = np.array([[1, 0, 1, 1], [0, 1, 1, 2]], dtype=np.uint8)
    for rows, q in ((hamming, 2), (ternary, 3)):
        verify.check_generator(rows, q, None, "auto")
        verify.check_generator(rows, q, None, "information-sets")
    # DRAT: (x1 | x2), (-x1 | x2), (x1 | -x2), (-x1 | -x2) refuted by the unit x2
    cnf = drat.parse_cnf(b"p cnf 2 4\n1 2 0\n-1 2 0\n1 -2 0\n-1 -2 0\n")
    drat.check_proof(cnf, drat.parse_proof(b"2 0\n0\n"))


def prepare_kernels(notice: Callable[[str], None] | None = None) -> KernelReport:
    """Compile (cold cache) or load (warm cache) every kernel, then write the stamp.

    Parameters
    ----------
    notice : callable, optional
        Called with one line before the work starts (the command line prints it).

    Returns
    -------
    KernelReport
    """
    from codesearch.search import METHODS, prepare_method

    start = time.perf_counter()
    loc = _locator()
    if notice is not None:
        notice("compiling the search kernels for this machine, once (about a minute; "
               "'codesearch prepare' does it ahead)")
    from codesearch import _kernels  # noqa: F401  (eager kernels compile or load here)

    for spec in METHODS.values():
        try:
            prepare_method(spec)
        except ImportError:  # a method whose extra is missing says so when it is used
            pass
    _checker_workload()
    status = kernel_status()
    missing = tuple(name for name, ok in status.items() if not ok)
    seconds = time.perf_counter() - start
    where = None if loc is None else loc.get_cache_path()
    if loc is not None and not missing:
        try:
            tmp = os.path.join(where, f"{STAMP_NAME}.{os.getpid()}")
            with open(tmp, "w") as fh:
                json.dump({"key": _stamp_key(loc), "seconds": round(seconds, 2),
                           "kernels": len(status)}, fh)
            os.replace(tmp, os.path.join(where, STAMP_NAME))
        except OSError:  # a read-only cache: numba itself falls back the same way
            pass
    return KernelReport(seconds, len(status), missing, where)
