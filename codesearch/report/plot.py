"""The rate-distance picture: asymptotic bounds on R(delta) with finite cells on top.

Problem
-------
For q-ary codes of relative distance delta = d/n, draw the classical asymptotic upper bounds
on the rate R = log_q(A_q(n,d)) / n (Singleton, Hamming, Plotkin, Elias-Bassalygo and the
first linear-programming bound of McEliece-Rodemich-Rumsey-Welch) and the Gilbert-Varshamov
lower bound, and optionally finite cells (n, d, lower, upper) as points log_q(value)/n at
d/n with a bar from the lower to the upper value. The curves are floats (a picture, not a
proof); the finite values come in as exact integers.

References
----------
F. J. MacWilliams and N. J. A. Sloane, "The Theory of Error-Correcting Codes" (1977),
ch. 17 section 7 (asymptotic bounds).
R. J. McEliece, E. R. Rodemich, H. Rumsey and L. R. Welch, "New upper bounds on the rate of
a code via the Delsarte-MacWilliams inequalities", IEEE Trans. Inform. Theory 23 (1977)
157-166 (first LP bound; q-ary form as in M. Aaltonen, 1979/1990).
R. M. Roth, "Introduction to Coding Theory" (2006), ch. 4 (q-ary forms of the curves).
"""

from __future__ import annotations

import math
from typing import Iterable, Sequence

import numpy as np

from codesearch.errors import ParameterError

__all__ = ["entropy", "asymptotic_curves", "rate_distance_figure", "save_rate_distance"]

#: Curve name -> legend label, in drawing order.
CURVES = {
    "singleton": "Singleton",
    "hamming": "Hamming (sphere packing)",
    "plotkin": "Plotkin",
    "elias": "Elias-Bassalygo",
    "mrrw": "first LP bound (MRRW)",
    "gv": "Gilbert-Varshamov (lower)",
}


def entropy(q: int, x: np.ndarray) -> np.ndarray:
    """q-ary entropy H_q(x) = x log_q(q-1) - x log_q x - (1-x) log_q(1-x), with 0 log 0 = 0."""
    x = np.asarray(x, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        h = x * math.log(q - 1) - np.where(x > 0, x * np.log(x), 0.0)
        h -= np.where(x < 1, (1 - x) * np.log1p(-x), 0.0)
    return h / math.log(q)


def asymptotic_curves(q: int, delta: np.ndarray) -> dict[str, np.ndarray]:
    """Rates of each asymptotic curve at relative distances ``delta`` (0 <= delta <= 1).

    Beyond theta = 1 - 1/q every upper bound except Singleton is 0 (the Plotkin range) and so
    is the GV rate.
    """
    if q < 2:
        raise ParameterError(f"alphabet size q={q} must be at least 2")
    d = np.clip(np.asarray(delta, dtype=float), 0.0, 1.0)
    theta = 1.0 - 1.0 / q
    inside = d < theta
    dt = np.minimum(d, theta)
    out = {
        "singleton": 1.0 - d,
        "hamming": np.maximum(0.0, 1.0 - entropy(q, d / 2)),
        "plotkin": np.where(inside, 1.0 - dt / theta, 0.0),
        "elias": np.where(inside, 1.0 - entropy(q, theta - np.sqrt(np.maximum(theta * (theta - dt), 0))), 0.0),
        "gv": np.where(inside, np.maximum(0.0, 1.0 - entropy(q, dt)), 0.0),
    }
    arg = (q - 1 - (q - 2) * dt - 2 * np.sqrt(np.maximum((q - 1) * dt * (1 - dt), 0))) / q
    out["mrrw"] = np.where(inside, entropy(q, np.clip(arg, 0.0, 1.0)), 0.0)
    return out


def rate_distance_figure(q: int, points: Iterable[Sequence[int]] | None = None, *,
                         title: str | None = None):
    """A matplotlib Figure of the rate-distance picture for alphabet size q.

    Parameters
    ----------
    q : int
        Alphabet size.
    points : iterable of (n, d, lower, upper), optional
        Finite cells: lower and upper bounds on A_q(n,d) (integers; lower may be None).
        Drawn at d/n with a bar from log_q(lower)/n to log_q(upper)/n.
    title : str, optional
        Figure title (default names q).
    """
    from codesearch._optional import require

    require("matplotlib", "the rate-distance picture").use("Agg")
    import matplotlib.pyplot as plt

    delta = np.linspace(0.0, 1.0, 801)
    curves = asymptotic_curves(q, delta)
    fig, ax = plt.subplots(figsize=(7, 5))
    styles = {"gv": dict(color="black", linestyle="--")}
    for name, label in CURVES.items():
        ax.plot(delta, curves[name], label=label, **styles.get(name, {}))
    pts = [tuple(p) for p in (points or [])]
    if pts:
        xs, lo, hi = [], [], []
        for n, d, lower, upper in pts:
            xs.append(d / n)
            hi.append(_log_rate(q, n, upper))
            lo.append(_log_rate(q, n, lower) if lower else hi[-1])
        xs, lo, hi = map(np.asarray, (xs, lo, hi))
        ax.vlines(xs, lo, hi, color="tab:gray", linewidth=0.8, alpha=0.7)
        ax.scatter(xs, hi, s=8, color="tab:red", zorder=3, label="finite cells: upper bound")
        ax.scatter(xs, lo, s=8, color="tab:blue", zorder=3, label="finite cells: lower bound")
    ax.set_xlabel("relative distance  δ = d / n")
    ax.set_ylabel("rate  R = log_q(A_q(n,d)) / n")
    ax.set_xlim(0, 1)
    ax.set_ylim(0, 1.02)
    ax.set_title(title or f"Rate-distance bounds, q = {q}")
    ax.grid(alpha=0.3)
    ax.legend(fontsize=8)
    fig.tight_layout()
    return fig


def _log_rate(q: int, n: int, value: int) -> float:
    # Exact int -> float through bit length so huge values do not overflow.
    value = int(value)
    shift = max(0, value.bit_length() - 60)
    return (math.log(value >> shift) + shift * math.log(2)) / (n * math.log(q))


def save_rate_distance(path: str, q: int, points: Iterable[Sequence[int]] | None = None, *,
                       title: str | None = None) -> str:
    """Draw and write the picture; the format (png, svg, pdf) follows the file extension."""
    suffix = path.rsplit(".", 1)[-1].lower() if "." in path else ""
    if suffix not in ("png", "svg", "pdf"):
        raise ParameterError(f"{path}: plot file must end in .png, .svg or .pdf")
    fig = rate_distance_figure(q, points, title=title)
    import matplotlib.pyplot as plt

    try:
        fig.savefig(path, dpi=150)
    except OSError as exc:
        raise ParameterError(f"{path}: cannot write ({exc.strerror})") from None
    finally:
        plt.close(fig)
    return path
