"""The rate-distance curves against their defining properties (theorems named beside each)."""

from __future__ import annotations

import pathlib

import numpy as np
import pytest

from codesearch.cli import main
from codesearch.report.plot import asymptotic_curves, entropy, save_rate_distance


@pytest.mark.parametrize("q", [2, 3, 4, 8])
def test_gv_below_every_upper_curve(q):
    # GV is an achievable rate, so it lies below every asymptotic upper bound (MacWilliams-
    # Sloane ch. 17 section 7).
    delta = np.linspace(0, 1, 2001)
    c = asymptotic_curves(q, delta)
    for name in ("singleton", "hamming", "plotkin", "elias", "mrrw"):
        assert np.all(c["gv"] <= c[name] + 1e-12), name


@pytest.mark.parametrize("q", [2, 3, 5])
def test_plotkin_reaches_zero_at_theta(q):
    theta = 1 - 1 / q
    c = asymptotic_curves(q, np.array([0.0, theta / 2, theta, (1 + theta) / 2]))
    assert c["plotkin"][0] == pytest.approx(1.0)
    assert c["plotkin"][1] == pytest.approx(0.5)
    assert c["plotkin"][2] == pytest.approx(0.0, abs=1e-12)
    assert c["plotkin"][3] == 0.0
    # The first LP bound and Elias also vanish from theta on (same source).
    assert c["mrrw"][2] == pytest.approx(0.0, abs=1e-9) and c["elias"][2] == pytest.approx(0.0, abs=1e-9)


@pytest.mark.parametrize("q", [2, 3, 4])
def test_hamming_and_singleton_coincide_only_where_they_must(q):
    # Both start at rate 1 at delta = 0. For q = 2 the sphere-packing curve stays strictly
    # below Singleton on (0, 1) and they meet again at delta = 1 (both 0). For q > 2 they
    # cross exactly once inside (0, 1): 1 - H_q(1/2) > 0 at delta = 1 (direct computation
    # from the entropy; common practice).
    delta = np.linspace(0, 1, 4001)
    c = asymptotic_curves(q, delta)
    gap = c["singleton"] - c["hamming"]
    assert abs(gap[0]) < 1e-12
    inner = gap[1:-1]
    if q == 2:
        assert np.all(inner > 0) and abs(gap[-1]) < 1e-12
    else:
        assert gap[-1] < 0
        assert int(np.sum(np.diff(np.sign(inner)) != 0)) == 1


def test_binary_mrrw_below_elias_for_large_delta():
    # The first LP bound beats Elias-Bassalygo for larger delta (MRRW 1977; from memory the
    # crossover is near delta = 0.15), and both vanish at 1/2.
    delta = np.linspace(0.3, 0.49, 100)
    c = asymptotic_curves(2, delta)
    assert np.all(c["mrrw"] < c["elias"])


def test_entropy_values():
    # H_2(1/2) = 1 and H_q(1 - 1/q) = 1 (maximum of the q-ary entropy; common practice).
    assert entropy(2, np.array(0.5)) == pytest.approx(1.0)
    assert entropy(4, np.array(0.75)) == pytest.approx(1.0)
    assert entropy(3, np.array(0.0)) == 0.0


def test_save_png_and_svg(tmp_path):
    png = save_rate_distance(str(tmp_path / "a.png"), 2, [(10, 3, 64, 72), (10, 5, 8, 12)])
    svg = save_rate_distance(str(tmp_path / "a.svg"), 3)
    assert pathlib.Path(png).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert "<svg" in pathlib.Path(svg).read_text()[:2000]


def test_plot_command(tmp_path, capsys):
    out = tmp_path / "rd.svg"
    assert main(["plot", "--q", "2", "--n", "6..8", "--no-lp", "--out", str(out)]) == 0
    assert out.exists()
    assert main(["plot", "--out", str(tmp_path / "x.txt")]) == 2
    assert main(["plot", "--q", "1", "--out", str(tmp_path / "y.png")]) == 2
