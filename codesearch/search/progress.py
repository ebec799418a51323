"""Live progress display on stderr for long searches (rich), used by the command line.

The searchers only call a plain ``progress(dict)`` callback; this module turns those calls
into one refreshing status line (nodes, nodes per second, incumbent, bound, elapsed).
"""

from __future__ import annotations

import contextlib
import sys
from typing import Any, Callable, Iterator

__all__ = ["live_progress"]


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
