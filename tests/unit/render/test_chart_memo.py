"""Charts drawn before are read back from the cache file: the same report, without drawing them again."""

from __future__ import annotations

import sqlite3

import pytest

from reporter.render import chart_memo
from reporter.render.chart_memo import ChartMemo, remembered_charts
from reporter.render.html import render_html
from reporter.render.sections import build_context
from reporter.render.themes import build_environment, load_theme
from tests.unit.render.render_inputs import make_inputs, make_report


def _html(cache=None) -> str:
    theme = load_theme("default")
    with remembered_charts(cache):
        context = build_context(make_inputs(), make_report(), theme)
    return render_html(context, build_environment(theme), theme)


@pytest.fixture(scope="module")
def drawn():
    return _html()


def test_a_remembered_chart_is_the_chart_drawn_afresh(tmp_path, drawn, monkeypatch):
    cache = tmp_path / "cache.sqlite"
    assert _html(cache) == drawn, "the first build with a memo draws every chart"
    import vl_convert

    def refuse(spec):
        raise AssertionError("a chart was drawn again although it was drawn before")

    monkeypatch.setattr(vl_convert, "vegalite_to_svg", refuse)
    assert _html(cache) == drawn


def test_a_changed_chart_is_drawn_again(tmp_path):
    memo = ChartMemo(tmp_path / "cache.sqlite")
    try:
        spec = {"mark": "bar", "data": {"values": [{"a": 1}]}}
        first = memo.svg(memo.key(spec, "vl-convert 1"), lambda: "<svg>one</svg>")
        changed = {**spec, "data": {"values": [{"a": 2}]}}
        assert memo.svg(memo.key(changed, "vl-convert 1"), lambda: "<svg>two</svg>") == "<svg>two</svg>"
        assert memo.svg(memo.key(spec, "vl-convert 2"), lambda: "<svg>new</svg>") == "<svg>new</svg>"
        assert memo.svg(memo.key(spec, "vl-convert 1"), lambda: "<svg>not drawn</svg>") == first
    finally:
        memo.close()


def test_only_the_most_recently_used_charts_are_kept(tmp_path, monkeypatch):
    monkeypatch.setattr(chart_memo, "KEEP", 3)
    path = tmp_path / "cache.sqlite"
    memo = ChartMemo(path)
    for n in range(5):
        memo.svg(memo.key({"n": n}, "v"), lambda n=n: f"<svg>{n}</svg>")
    memo.close()
    with sqlite3.connect(path) as db:
        kept = sorted(row[0] for row in db.execute("SELECT svg FROM charts"))
    assert kept == ["<svg>2</svg>", "<svg>3</svg>", "<svg>4</svg>"]


def test_without_a_cache_file_nothing_is_kept(drawn):
    assert chart_memo.active_memo() is None
    assert _html(None) == drawn


def test_a_rebuild_finds_each_chart_by_its_arguments_without_building_a_spec(tmp_path, drawn, monkeypatch):
    cache = tmp_path / "cache.sqlite"
    assert _html(cache) == drawn
    import altair

    def refuse(*args, **kwargs):
        raise AssertionError("an Altair chart was built although the call was drawn before")

    for name in ("Chart", "layer"):
        monkeypatch.setattr(altair, name, refuse)
    assert _html(cache) == drawn


def test_a_call_key_covers_the_function_its_arguments_and_the_drawing_code(tmp_path, monkeypatch):
    memo = ChartMemo(tmp_path / "cache.sqlite")
    try:
        key = memo.call_key("charts.draw_a", (1, [0.5]), {"name": "x"})
        assert key == memo.call_key("charts.draw_a", (1, [0.5]), {"name": "x"})
        assert key != memo.call_key("charts.draw_b", (1, [0.5]), {"name": "x"})
        assert key != memo.call_key("charts.draw_a", (1, [0.25]), {"name": "x"})
        assert key != memo.call_key("charts.draw_a", (1, [0.5]), {"name": "y"})
    finally:
        memo.close()
    # Another release of a library that shapes the spec (or other render code) is other drawing code.
    monkeypatch.setattr(chart_memo, "_SPEC_LIBRARIES", ("altair", "pandas"))
    other = ChartMemo(tmp_path / "cache.sqlite")
    try:
        assert other.call_key("charts.draw_a", (1, [0.5]), {"name": "x"}) != key
    finally:
        other.close()
