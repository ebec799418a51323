"""Progress on stderr that fits where it goes: a live display, plain lines, or JSON lines.

The library only calls plain ``progress(dict)`` callbacks; this module turns those calls into
what the reader of stderr can use (:func:`progress_mode` picks one):

``live``
    a terminal: a refreshing rich display, one status line for a search
    (:func:`live_progress`) and a panel of running cells for a table (:class:`TableProgress`).
``lines``
    a pipe or a log file: plain text, no cursor movement, no box drawing; a search writes
    one line per portfolio step and per improvement (at most one a second), a table one
    line per finished cell plus a final summary (:class:`TableLines`).
``json``
    scripts: one JSON object per line (``--json``; the keys are listed below).
``none``
    nothing (``--quiet``).

JSON progress lines
-------------------
Every line is an object with ``"event"`` and ``"elapsed"`` (seconds since the command
started). Cells are written as ``{"q": .., "n": .., "d": ..}``.

``find``:
    ``{"event": "progress", "incumbent", "nodes", "upper", ...}`` live figures of the
    search (method-defined extras such as ``phase``, ``orbits``, ``leaves``);
    ``{"event": "step", "step", "size", "seconds", "best", "upper", "nodes"}`` a portfolio
    step finished (``size``: what the step found; ``best``, ``upper``: the portfolio's);
    ``{"event": "step", "step", "skipped": "time", "best", "upper"}`` a step the time left
    could not hold.
``table`` (events of :func:`codesearch.batch.run_table`):
    ``start`` (``cells``, ``methods``, ``budget``), ``submit`` (``cell``, ``lower``,
    ``upper``), ``skip``, ``done`` (``cell``, ``lower``, ``upper``, ``seconds``), ``derived``
    (``kind``, ``cell``, ``rule``, ...), ``error`` (``cell``, ``error``), ``finish``
    (``summary``); any further keys batch adds are passed through.
"""

from __future__ import annotations

import contextlib
import json
import sys
import time
from typing import IO, Any, Callable, Iterator

from codesearch.model import Params

__all__ = ["MODES", "progress_mode", "live_progress", "find_progress", "table_progress",
           "TableProgress", "TableLines", "JsonLines", "FindLines"]

#: The progress renderings, ``auto`` picking one of the others.
MODES = ("auto", "live", "lines", "json", "none")

Progress = Callable[[dict[str, Any]], None]


def progress_mode(requested: str | None = "auto", *, json_output: bool = False,
                  quiet: bool = False, stream: IO[str] | None = None) -> str:
    """The rendering for a command's progress.

    ``quiet`` wins; an explicit mode comes next; ``auto`` gives ``json`` with ``--json``,
    ``live`` on a terminal and ``lines`` otherwise (a pipe, a log file).
    """
    if quiet:
        return "none"
    if requested not in (None, "auto"):
        if requested not in MODES:
            raise ValueError(f"unknown progress mode {requested!r}")
        return requested
    if json_output:
        return "json"
    stream = sys.stderr if stream is None else stream
    isatty = getattr(stream, "isatty", None)
    return "live" if isatty is not None and isatty() else "lines"


def _jsonable(value: Any) -> Any:
    if isinstance(value, Params):
        return {"q": value.q, "n": value.n, "d": value.d}
    if isinstance(value, dict):
        return {str(k): _jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    if isinstance(value, float):
        return round(value, 4)
    if value is None or isinstance(value, (str, int, bool)):
        return value
    try:  # numpy scalars
        return value.item()
    except AttributeError:
        return str(value)


class JsonLines:
    """A progress callback writing each event as one JSON object per line.

    ``default_event`` names events that carry no ``event`` key (a search's live figures).
    """

    def __init__(self, stream: IO[str] | None = None, default_event: str = "progress") -> None:
        self.stream = sys.stderr if stream is None else stream
        self.default_event = default_event
        self.t0 = time.perf_counter()

    def __call__(self, ev: dict[str, Any]) -> None:
        out = {"event": ev.get("event", "step" if "step" in ev and (
            "size" in ev or "skipped" in ev) else self.default_event)}
        out.update(_jsonable({k: v for k, v in ev.items() if k != "event"}))
        out["elapsed"] = round(time.perf_counter() - self.t0, 3)
        self.stream.write(json.dumps(out) + "\n")
        self.stream.flush()


class FindLines:
    """Plain progress lines for one search: each portfolio step, and improvements of the
    incumbent at most once every ``every`` seconds."""

    def __init__(self, label: str, stream: IO[str] | None = None, every: float = 1.0) -> None:
        self.label = label
        self.stream = sys.stderr if stream is None else stream
        self.every = every
        self.best = 0
        self.last = -float("inf")
        self.t0 = time.perf_counter()

    def _write(self, text: str) -> None:
        self.stream.write(f"{self.label} {time.perf_counter() - self.t0:6.1f}s  {text}\n")
        self.stream.flush()

    def __call__(self, ev: dict[str, Any]) -> None:
        upper = ev.get("upper")
        bound = "" if upper is None else f", upper {upper}"
        if "step" in ev and "skipped" in ev:
            self._write(f"{ev['step']}: skipped ({ev['skipped']})")
            return
        if "step" in ev and "size" in ev:
            self.best = max(self.best, int(ev.get("best") or 0))
            self._write(f"{ev['step']}: {ev['size']} words in {float(ev.get('seconds', 0)):.2f} s"
                        f" (best {ev.get('best')}{bound})")
            return
        inc = int(ev.get("best", ev.get("incumbent")) or 0)
        now = time.perf_counter()
        if inc > self.best and now - self.last >= self.every:
            self.best, self.last = inc, now
            where = f"{ev['step']}: " if "step" in ev else ""
            self._write(f"{where}{inc} words, {int(ev.get('nodes') or 0):,} nodes{bound}")


@contextlib.contextmanager
def live_progress(enabled: bool = True, label: str = "search"
                  ) -> Iterator[Callable[[dict[str, Any]], None] | None]:
    """Context manager yielding a live one-line status on a terminal (or None when
    disabled)."""
    if not enabled:
        yield None
        return
    from rich.console import Console
    from rich.live import Live
    from rich.text import Text

    console = Console(file=sys.stderr)
    with Live(Text(f"{label}: starting"), console=console, refresh_per_second=4,
              transient=True) as live:

        def update(info: dict[str, Any]) -> None:
            elapsed = float(info.get("elapsed", 0.0))
            nodes = int(info.get("nodes", 0) or 0)
            rate = nodes / elapsed if elapsed > 0 else 0.0
            parts = [f"{label}"]
            if info.get("step"):
                parts.append(str(info["step"]))
            parts += [f"nodes {nodes:,}", f"{rate:,.0f}/s",
                      f"best {info.get('best', info.get('incumbent', 0))}"]
            if info.get("upper") is not None:
                parts.append(f"upper {info['upper']}")
            if info.get("leaves") is not None:
                parts.append(f"leaves {info['leaves']}")
            parts.append(f"{elapsed:.1f} s")
            live.update(Text("  ".join(parts)))

        yield update


@contextlib.contextmanager
def find_progress(mode: str, label: str) -> Iterator[Progress | None]:
    """The progress callback of ``find`` for a mode of :func:`progress_mode`."""
    if mode == "live":
        with live_progress(True, label) as update:
            yield update
    elif mode == "lines":
        yield FindLines(label)
    elif mode == "json":
        yield JsonLines()
    else:
        yield None


class TableLines:
    """Plain lines for a table run: one per finished (or failed) cell, then a summary.

    Nothing is redrawn, so the output reads the same in a pipe, a log file or a batch
    system's job output.
    """

    def __init__(self, stream: IO[str] | None = None) -> None:
        self.stream = sys.stderr if stream is None else stream
        self.total = 0
        self.finished = 0
        self.skipped = 0
        self.derived = 0
        self.t0 = time.perf_counter()

    def _write(self, text: str) -> None:
        self.stream.write(f"{time.perf_counter() - self.t0:7.1f}s  {text}\n")
        self.stream.flush()

    def __enter__(self) -> "TableLines":
        return self

    def __exit__(self, *exc: object) -> None:
        return None

    def __call__(self, ev: dict[str, Any]) -> None:
        kind = ev.get("event")
        width = len(str(self.total or 0))
        if kind == "start":
            self.total = int(ev.get("cells", 0))
            methods = ", ".join(ev.get("methods") or []) or "none"
            self._write(f"table: {self.total} cells, methods {methods}, "
                        f"budget {float(ev.get('budget', 0)):g} s a cell")
        elif kind == "skip":
            self.skipped += 1
        elif kind == "derived":
            self.derived += 1
        elif kind == "done":
            self.finished += 1
            upper = ev.get("upper")
            value = (f"{ev.get('lower')}" if upper is not None and upper == ev.get("lower")
                     else f"{ev.get('lower')}..{'?' if upper is None else upper}")
            extra = "".join(f" {key} {ev[key]}" for key in ("method", "status")
                            if ev.get(key) is not None)
            self._write(f"[{self.finished:{width}d}/{self.total}] {ev.get('cell')}: {value} "
                        f"({float(ev.get('seconds', 0.0)):.1f} s){extra}")
        elif kind == "error":
            self._write(f"error {ev.get('cell')}: {ev.get('error')}")
        elif kind == "finish":
            s = ev.get("summary") or {}
            self._write(f"table finished: {s.get('ran', self.finished)} run, "
                        f"{s.get('skipped', self.skipped)} skipped, {s.get('failed', 0)} failed, "
                        f"{s.get('derived_codes', 0)} codes and {s.get('derived_bounds', 0)} "
                        f"bounds derived, {float(s.get('seconds', 0.0)):.1f} s")


class TableProgress:
    """A progress callback that draws a live rich panel (cells done / running / left, the
    best lower and upper of the running cells, elapsed and estimated time).

    Use as a context manager around :func:`codesearch.batch.run_table`; it writes to the given
    console only, and is meant for a terminal (:class:`TableLines` elsewhere).
    """

    def __init__(self, console: Any = None) -> None:
        from rich.console import Console

        self.console = console or Console(stderr=True)
        self.total = 0
        self.done = 0
        self.skipped = 0
        self.running: dict[Params, tuple[int, int | None]] = {}
        self.derived = 0
        self.errors = 0
        self.durations: list[float] = []
        self.t0 = time.perf_counter()
        self.live: Any = None

    def __enter__(self) -> "TableProgress":
        from rich.live import Live

        self.live = Live(self._render(), console=self.console, refresh_per_second=4,
                         transient=False, get_renderable=self._render)
        self.live.__enter__()
        return self

    def __exit__(self, *exc: object) -> None:
        if self.live is not None:
            self.live.__exit__(*exc)

    def __call__(self, ev: dict[str, Any]) -> None:
        kind = ev.get("event")
        if kind == "start":
            self.total = ev["cells"]
        elif kind == "skip":
            self.skipped += 1
        elif kind == "submit":
            self.running[ev["cell"]] = (ev["lower"], ev["upper"])
        elif kind == "done":
            self.running.pop(ev["cell"], None)
            self.done += 1
            self.durations.append(ev["seconds"])
        elif kind == "derived":
            self.derived += 1
        elif kind == "error":
            self.running.pop(ev.get("cell"), None)
            self.errors += 1

    def _render(self) -> Any:
        from rich.table import Table

        elapsed = time.perf_counter() - self.t0
        left = max(self.total - self.done - self.skipped - len(self.running), 0)
        if self.durations:
            per = sum(self.durations) / len(self.durations)
            width = max(len(self.running), 1)
            eta = f"{per * (left + len(self.running)) / width:.0f}s"
        else:
            eta = "?"
        t = Table(title=f"table: {self.done} done, {self.skipped} skipped, "
                        f"{len(self.running)} running, {left} left | derived {self.derived} | "
                        f"errors {self.errors} | elapsed {elapsed:.0f}s, ETA {eta}",
                  title_justify="left")
        t.add_column("running cell")
        t.add_column("lower", justify="right")
        t.add_column("upper", justify="right")
        for p, (lo, up) in sorted(self.running.items()):
            t.add_row(str(p), str(lo), "?" if up is None else str(up))
        return t


def table_progress(mode: str) -> Any:
    """A context manager that is also the progress callback of ``table`` for a mode of
    :func:`progress_mode` (None for ``none``)."""
    if mode == "live":
        return TableProgress()
    if mode == "lines":
        return TableLines()
    if mode == "json":
        return contextlib.nullcontext(JsonLines(default_event="table"))
    return contextlib.nullcontext(None)
