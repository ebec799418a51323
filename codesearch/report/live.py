"""Live progress on stderr (rich): one status line for a search, a panel for a table run.

The library only calls plain ``progress(dict)`` callbacks; this module turns those calls into
refreshing displays for the command line: :func:`live_progress` (nodes, nodes per second,
incumbent, bound, elapsed) for ``find`` and :class:`TableProgress` (cells done / running /
left, the running cells' bounds, elapsed and estimated time) for ``table``.
"""

from __future__ import annotations

import contextlib
import sys
import time
from typing import Any, Callable, Iterator

from codesearch.model import Params

__all__ = ["live_progress", "TableProgress"]


@contextlib.contextmanager
def live_progress(enabled: bool = True, label: str = "search"
                  ) -> Iterator[Callable[[dict[str, Any]], None] | None]:
    """Context manager yielding a progress callback (or None when disabled)."""
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
            nodes = int(info.get("nodes", 0))
            rate = nodes / elapsed if elapsed > 0 else 0.0
            parts = [f"{label}", f"nodes {nodes:,}", f"{rate:,.0f}/s",
                     f"incumbent {info.get('incumbent', 0)}"]
            if info.get("upper") is not None:
                parts.append(f"upper {info['upper']}")
            if info.get("leaves") is not None:
                parts.append(f"leaves {info['leaves']}")
            parts.append(f"{elapsed:.1f} s")
            live.update(Text("  ".join(parts)))

        yield update


class TableProgress:
    """A progress callback that draws a live rich panel (cells done / running / left, the
    best lower and upper of the running cells, elapsed and estimated time).

    Use as a context manager around :func:`codesearch.batch.run_table`; it writes to the given
    console only.
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
