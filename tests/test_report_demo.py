"""The demo runs end to end (on a shrunken scenario with the test-only lexicode method)."""

from __future__ import annotations


from codesearch import demo
from codesearch.codefile import read_code
from codesearch.verify import min_distance


def test_demo_end_to_end(tmp_path, monkeypatch, capsys, stub_methods):
    # `pip install -e . && codesearch demo` installs no extra: the demo must not need one
    from test_optional import _hide

    _hide(monkeypatch, "matplotlib", "distributed", "clarabel", "scs")
    monkeypatch.setitem(demo.SCENARIO, "n", range(7, 9))
    monkeypatch.setitem(demo.SCENARIO, "d", range(3, 5))
    monkeypatch.setitem(demo.SCENARIO, "budget", 0.5)
    monkeypatch.setattr(demo, "_methods", lambda: ["stub-lex"])
    assert demo.run(str(tmp_path)) == 0
    out = capsys.readouterr().out
    assert "| n \\ d |" in out and "HTML report" in out
    html = (tmp_path / "punch-tags.html").read_text()
    assert 'id="c-2-8-3"' in html
    tags = read_code(str(tmp_path / "tags-8-holes-d3.code")).code
    # The table asks the construction library first: a punctured conference-matrix code of
    # order 10 gives A(8,3) = 20 (MacWilliams-Sloane Ch. 2; the value from memory), more than
    # the lexicode's 2^4 = 16 words (Conway-Sloane 1986).
    assert tags.size == 20 and min_distance(tags) >= 3
