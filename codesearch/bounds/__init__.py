"""One front end for upper bounds on A_q(n,d): :func:`upper_bound` and :func:`all_bounds`.

Each bound is a function ``f(params) -> BoundResult`` registered in :data:`BOUNDS`; closed
forms return no certificate (the theorem's name is the justification), computed bounds
(linear and semidefinite programs) return an exact certificate that
:func:`codesearch.verify.check_certificate` re-checks.
"""

from __future__ import annotations

__all__: list[str] = []
