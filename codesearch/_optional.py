"""Optional dependencies: heavy packages that only some commands use are extras.

``pip install codesearch`` installs what finding codes, the closed-form and LP bounds,
checking, tables on local processes and the reports need. The rest comes with an extra:

========  ==========================  =============================================
extra     packages                    used by
========  ==========================  =============================================
cluster   distributed                 ``table --scheduler`` (a Dask cluster)
plot      matplotlib                  ``plot`` (the rate-distance picture)
sdp       clarabel, scs               ``bounds --sdp``, ``table --sdp`` (SDP bounds)
all       all of the above
========  ==========================  =============================================

:func:`require` imports one of them or raises :class:`~codesearch.errors.MissingDependency`
with one line naming the extra (exit status 2 on the command line).
"""

from __future__ import annotations

import importlib
from types import ModuleType

from codesearch.errors import MissingDependency

__all__ = ["EXTRAS", "require"]

#: Top-level package -> the extra that installs it.
EXTRAS = {"distributed": "cluster", "matplotlib": "plot", "clarabel": "sdp", "scs": "sdp"}


def require(module: str, feature: str) -> ModuleType:
    """Import ``module`` (an optional package, or a submodule of one) for ``feature``.

    Raises
    ------
    MissingDependency
        When it is not installed: ``FEATURE needs PACKAGE: pip install 'codesearch[EXTRA]'``.
    """
    top = module.split(".")[0]
    try:
        return importlib.import_module(module)
    except ImportError:
        raise MissingDependency(
            f"{feature} needs the optional package {top}: "
            f"pip install 'codesearch[{EXTRAS[top]}]'") from None
