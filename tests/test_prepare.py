"""Kernels compiled before the clock starts (codesearch.search.prepare, the front end's
prepare_method and the command line's first-run notice)."""

from __future__ import annotations

import numpy as np
import pytest

from codesearch import verify
from codesearch.model import Code, Params
from codesearch.search import prepare, prepare_method, search


def test_prepare_reaches_every_kernel_and_marks_the_cache_ready():
    report = prepare.prepare_kernels()
    assert report.missing == ()
    assert report.kernels == len(prepare.kernel_status())
    if report.cache_dir is not None:
        assert prepare.kernels_ready()


def test_nothing_compiles_after_prepare():
    # numba fires "numba:compile" only for a real compilation (a cache load does not), so
    # searches and checks after prepare_kernels() must not fire it: no search budget is
    # spent in the compiler.
    from numba.core import event

    prepare.prepare_kernels()
    compiled = []

    class Listener(event.Listener):
        def on_start(self, ev):
            compiled.append(ev.data["dispatcher"].py_func.__name__)

        def on_end(self, ev):
            pass

    cells = [Params(2, 9, 4), Params(3, 5, 3), Params(4, 4, 3), Params(5, 3, 2),
             Params(2, 17, 5)]
    with event.install_listener("numba:compile", Listener()):
        for p in cells:
            for method, options in (("lexicode", {}), ("greedy", {}), ("local", {}),
                                    ("orbit", {"group": "cyclic"})):
                if method == "orbit" and p.n > 12:
                    continue
                res = search(p, method, time_limit=0.3, seed=1, **options)
                verify.check_code(res.code, p.d)
            if p.space_size <= 1 << 12:
                search(p, "exact", time_limit=0.5)
        rng = np.random.default_rng(1)
        words = np.unique(rng.integers(0, 3, (30, 80), dtype=np.uint8), axis=0)
        verify.check_code(Code(words, 3), 2)
    assert compiled == []


def test_prepare_method_runs_once_per_process():
    prepare_method("lexicode")
    assert prepare_method("lexicode") == 0.0


def test_the_first_run_notice_is_one_line(monkeypatch, capsys):
    from codesearch import cli

    calls = []
    monkeypatch.setattr(prepare, "kernels_ready", lambda: False)
    monkeypatch.setattr(prepare, "prepare_kernels", lambda notice=None: (
        notice("compiling the search kernels"), calls.append(1),
        prepare.KernelReport(12.0, 31, (), None))[-1])
    cli._kernels_first()
    err = capsys.readouterr().err
    assert calls == [1]
    assert err.count("\n") == 1 and "compiling the search kernels" in err and "12 s" in err


def test_bad_input_does_not_wait_for_the_compiler(monkeypatch, capsys):
    from codesearch import cli

    monkeypatch.setattr(prepare, "kernels_ready", lambda: pytest.fail("prepared before the "
                                                                      "input was checked"))
    assert cli.main(["find", "3", "5"]) == 2
