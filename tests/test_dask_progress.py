"""A table run on a real Dask scheduler and worker (started here on localhost), its progress
read through a pipe: plain lines, one per cell, and a final summary."""

from __future__ import annotations

import json
import os
import pathlib
import shutil
import subprocess
import sys
import time

import pytest

ROOT = pathlib.Path(__file__).resolve().parent.parent
_BOX = {chr(c) for c in range(0x2500, 0x2580)}


def _wait_for(predicate, seconds: float, what: str) -> None:
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        if predicate():
            return
        time.sleep(0.2)
    pytest.fail(f"{what} did not come up within {seconds:.0f} s")


def _stop(proc: subprocess.Popen) -> None:
    if proc.poll() is None:
        proc.terminate()
        try:
            proc.wait(timeout=15)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait(timeout=5)


def _scheduler_address(info) -> str | None:
    """The address in the scheduler file, or None while the file is missing or half-written
    (the scheduler creates it before it writes the JSON)."""
    try:
        return json.loads(info.read_text())["address"]
    except (OSError, ValueError, KeyError):
        return None


@pytest.fixture
def dask_scheduler(tmp_path):
    """Address of a scheduler with one single-threaded worker, both stopped afterwards."""
    pytest.importorskip("distributed")
    dask = shutil.which("dask")
    if dask is None:
        pytest.skip("the dask command line is not installed")
    env = {**os.environ, "PYTHONPATH": os.pathsep.join(
        [str(ROOT)] + ([os.environ["PYTHONPATH"]] if os.environ.get("PYTHONPATH") else []))}
    info = tmp_path / "scheduler.json"
    log = open(tmp_path / "dask.log", "w")
    procs = [subprocess.Popen([dask, "scheduler", "--host", "127.0.0.1", "--port", "0",
                               "--no-dashboard", "--scheduler-file", str(info)],
                              stdout=log, stderr=subprocess.STDOUT, env=env, cwd=tmp_path)]
    try:
        _wait_for(lambda: _scheduler_address(info) is not None, 60, "the Dask scheduler")
        address = _scheduler_address(info)
        procs.append(subprocess.Popen([dask, "worker", address, "--nworkers", "1",
                                       "--nthreads", "1", "--no-dashboard", "--host",
                                       "127.0.0.1"],
                                      stdout=log, stderr=subprocess.STDOUT, env=env,
                                      cwd=tmp_path))
        from distributed import Client

        with Client(address, timeout="30s") as client:
            _wait_for(lambda: len(client.scheduler_info()["workers"]) >= 1, 60,
                      "the Dask worker")
        yield address, env
    finally:
        for proc in reversed(procs):
            _stop(proc)
        log.close()


def test_table_on_dask_writes_plain_lines_to_a_pipe(dask_scheduler, tmp_path):
    address, env = dask_scheduler
    store = tmp_path / "t.sqlite"
    run = subprocess.run(
        [sys.executable, "-m", "codesearch", "table", "--q", "2", "--n", "5..7", "--d", "3",
         "--budget", "0.5", "--methods", "lexicode", "--no-propagate", "--scheduler",
         address, "--store", str(store)],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env, cwd=ROOT,
        timeout=300)
    assert run.returncode == 0, run.stderr
    err = run.stderr
    assert not (_BOX & set(err)) and "\x1b[" not in err and "\r" not in err
    lines = [line for line in err.splitlines() if "compiling the search kernels" not in line]
    cells = [line for line in lines if "] A(" in line]
    # A(5,3) = 4, A(6,3) = 8, A(7,3) = 16 (the lexicodes are optimal here: shortened
    # Hamming codes and the Hamming code; common practice)
    assert len(cells) == 3
    assert any("A(7,3): 16" in line for line in cells)
    assert "table: 3 cells" in lines[0] and "table finished: 3 run" in lines[-1]
