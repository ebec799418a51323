"""Optional packages (extras): a command that needs a missing one says so in one line, exit 2.

The packages are hidden by a ``None`` entry in ``sys.modules`` (Python's documented way to
make an import fail), so the tests run with everything installed.
"""

from __future__ import annotations

import sys

import pytest

from codesearch._optional import EXTRAS, require
from codesearch.cli import main
from codesearch.errors import InputError, MissingDependency


def _hide(monkeypatch, *names):
    for name in names:
        for mod in [m for m in sys.modules if m == name or m.startswith(name + ".")]:
            monkeypatch.delitem(sys.modules, mod)
        monkeypatch.setitem(sys.modules, name, None)


def _one_line_exit_2(capsys, code, extra):
    err = capsys.readouterr().err.strip()
    assert code == 2 and len(err.splitlines()) == 1 and "Traceback" not in err
    assert f"codesearch[{extra}]" in err


def test_require_names_the_extra(monkeypatch):
    _hide(monkeypatch, "scs")
    with pytest.raises(MissingDependency, match=r"pip install 'codesearch\[sdp\]'") as exc:
        require("scs", "the SCS solver")
    # one exception serves both kinds of caller: the CLI (input error) and import fallbacks
    assert isinstance(exc.value, InputError) and isinstance(exc.value, ImportError)
    assert set(EXTRAS.values()) == {"cluster", "plot", "sdp"}


def test_plot_without_matplotlib(monkeypatch, tmp_path, capsys):
    _hide(monkeypatch, "matplotlib")
    _one_line_exit_2(capsys, main(["plot", "--out", str(tmp_path / "p.png")]), "plot")
    assert not (tmp_path / "p.png").exists()


def test_sdp_without_its_solver(monkeypatch, capsys):
    _hide(monkeypatch, "clarabel")
    _one_line_exit_2(capsys, main(["bounds", "12", "4", "--sdp"]), "sdp")


def test_cluster_without_distributed(monkeypatch, tmp_path, capsys):
    _hide(monkeypatch, "distributed")
    code = main(["table", "--n", "4", "--d", "3", "--methods", "lexicode", "--no-bounds",
                 "--no-propagate", "--quiet", "--store", str(tmp_path / "s.sqlite"),
                 "--scheduler", "tcp://127.0.0.1:1"])
    _one_line_exit_2(capsys, code, "cluster")
