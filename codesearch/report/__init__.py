"""The presentation layer: everything that turns results into text, JSON, tables, pictures
and live displays. Nothing here searches or proves; the command line prints what it returns.

Modules
-------
table  the stored table: Markdown, CSV, LaTeX, HTML, JSON (from the store only), export of a
       stored code, the stored cells on the rate-distance picture
text   plain text for the command line: code check reports, one-line summaries, bounds grids
plot   the rate-distance picture (matplotlib, loaded on first use)
live   live progress on stderr (rich): a search's status line, a table run's panel

The stored-table functions are re-exported here (``codesearch.report.write_report`` ...).
"""

from __future__ import annotations

from codesearch.report.table import (
    FORMATS,
    CellRow,
    collect,
    export_code,
    plot_store,
    render,
    write_report,
)

__all__ = ["FORMATS", "CellRow", "collect", "render", "write_report", "export_code",
           "plot_store"]
