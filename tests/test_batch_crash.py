"""Reliability of table runs: kill -9 at random moments and resume; two writers at once.

The runs use the test-only lexicode method (tests/table_stub_lex.py), registered in the
driver process before the command line runs; the driver ships the registry entry to its
workers.
"""

from __future__ import annotations

import os
import pathlib
import random
import signal
import sqlite3
import subprocess
import sys
import time


from codesearch.batch import table_cells
from codesearch.model import Params
from codesearch.store import Store

TESTS = pathlib.Path(__file__).resolve().parent
REPO = TESTS.parent


def _table_cmd(store: pathlib.Path, *extra: str, n: str = "3..9", workers: str = "2") -> list[str]:
    script = ("import sys, table_stub_lex; table_stub_lex.register(); "
              "from codesearch.cli import main; raise SystemExit(main(sys.argv[1:]))")
    return [sys.executable, "-c", script, "table", "--q", "2", "--n", n, "--d", "3..4",
            "--budget", "0.5", "--methods", "stub-lex", "--workers", workers, "--quiet",
            "--store", str(store), *extra]


def _env() -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join([str(REPO), str(TESTS), env.get("PYTHONPATH", "")])
    return env


def _check_store(path: pathlib.Path) -> None:
    con = sqlite3.connect(path)
    assert con.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    # No duplicate rows: the same code at most once per cell, one run row per (cell, task).
    assert con.execute("SELECT count(*) FROM (SELECT q,n,d,digest FROM codes GROUP BY 1,2,3,4 "
                       "HAVING count(*) > 1)").fetchone()[0] == 0
    assert con.execute("SELECT count(*) FROM (SELECT q,n,d,method,value FROM bounds "
                       "GROUP BY 1,2,3,4,5 HAVING count(*) > 1)").fetchone()[0] == 0
    con.close()
    with Store(path) as s:
        assert s.audit() == []  # every stored code re-verifies


def test_kill_nine_and_resume(tmp_path):
    store = tmp_path / "crash.sqlite"
    rng = random.Random(20261202)
    cells = table_cells(2, range(3, 10), range(3, 5))
    for _ in range(3):
        proc = subprocess.Popen(_table_cmd(store), env=_env(), cwd=tmp_path,
                                stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                                start_new_session=True)
        time.sleep(rng.uniform(1.0, 3.5))
        # kill -9 the driver and its workers (its own process group, started above)
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait()
        if store.exists():
            _check_store(store)
    done = subprocess.run(_table_cmd(store, "--json"), env=_env(), cwd=tmp_path,
                          capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    _check_store(store)
    with Store(store) as s:
        for p in cells:
            assert s.run_budget(p, "stub-lex") == 0.5 or s.summary(p).exact, p
        # Lexicode (7,3) is the Hamming code (Conway-Sloane 1986): 16 words.
        assert s.summary(Params(2, 7, 3)).lower == 16
    again = subprocess.run(_table_cmd(store, "--json"), env=_env(), cwd=tmp_path,
                           capture_output=True, text=True, timeout=300)
    assert '"ran": 0' in again.stdout


def test_two_writers_at_once(tmp_path):
    store = tmp_path / "two.sqlite"
    procs = [subprocess.Popen(_table_cmd(store, "--seed", str(i), n="3..7", workers="1"),
                              env=_env(), cwd=tmp_path,
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
             for i in range(2)]
    for proc in procs:
        out, err = proc.communicate(timeout=300)
        assert proc.returncode == 0, err
    _check_store(store)
    with Store(store) as s:
        for p in table_cells(2, range(3, 8), range(3, 5)):
            assert s.summary(p).lower >= 1


def test_corrupt_store_cli_exit_2(tmp_path):
    store = tmp_path / "junk.sqlite"
    store.write_bytes(os.urandom(8192))
    before = store.read_bytes()
    res = subprocess.run(_table_cmd(store), env=_env(), cwd=tmp_path, capture_output=True,
                         text=True, timeout=120)
    assert res.returncode == 2
    assert len(res.stderr.strip().splitlines()) == 1 and "Traceback" not in res.stderr
    assert store.read_bytes() == before


def _children(pid: int) -> list[int]:
    out = subprocess.run(["pgrep", "-P", str(pid)], capture_output=True, text=True).stdout
    return [int(x) for x in out.split()]


def _alive(pid: int) -> bool:
    try:
        with open(f"/proc/{pid}/stat") as fh:
            return fh.read().split()[2] != "Z"
    except OSError:
        return False


def test_ctrl_c_stops_cleanly(tmp_path):
    store = tmp_path / "int.sqlite"
    cmd = _table_cmd(store)
    # most cells are settled at once by bounds and constructions; A(9,3) goes to a worker,
    # which pauses there for 20 s, so that a loaded machine cannot end the run first
    cmd[cmd.index("--budget") + 1] = "60"
    env = dict(_env(), CODESEARCH_STUB_PAUSE="20")
    # A shell starts background jobs with SIGINT ignored, the child inherits that and Python
    # then installs no KeyboardInterrupt handler: give the run the default disposition, as an
    # interactive terminal does.
    proc = subprocess.Popen(cmd, env=env, cwd=tmp_path, stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True,
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    deadline = time.time() + 60
    while time.time() < deadline and len(_children(proc.pid)) < 2:
        time.sleep(0.2)
    time.sleep(1.0)
    kids = _children(proc.pid)
    assert proc.poll() is None, "the run ended before it could be interrupted"
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=60)
    assert proc.returncode == 130, err
    assert "interrupted" in err and "Traceback" not in err
    time.sleep(0.5)
    assert not [k for k in kids if _alive(k)]  # the workers were stopped too
    if store.exists():
        _check_store(store)
