"""Charts: figures from analyse -> Altair specs -> SVG strings via vl-convert (no browser, no network).

Colours and the chart font come from the theme. Charts only draw what analyse
computed; the few divisions here split a bar into its explicit and content-only parts.
"""

from __future__ import annotations

import functools
import re
from typing import TYPE_CHECKING, Any, Callable, Sequence

import pandas as pd
from markupsafe import Markup

from reporter.render.chart_memo import active_memo
from reporter.render.context import Chart, GoalRow, GroupRow
from reporter.render.filters import fmt_share
from reporter.render.themes import Theme

if TYPE_CHECKING:
    import altair as alt

WIDTH = 560  # px; fits the A4 text block (170 mm) with axis labels beside it
_FORBIDDEN_SVG = ("<script", "<foreignobject", "javascript:", "href=\"http", "href='http")


def _local_ids(svg: str, prefix: str) -> str:
    """Rename the SVG's ids (vl-convert numbers gradients and clip paths per process) to chart-local ones.

    Keeps the HTML identical from run to run and the ids unique when several SVGs share one page.
    """
    ids = list(dict.fromkeys(re.findall(r'\bid="([^"]+)"', svg)))
    for number, old in enumerate(ids):
        new = f"{prefix}-{number}"
        svg = re.sub(rf'(\bid="|url\(#|href="#){re.escape(old)}(?=[")])', rf"\g<1>{new}", svg)
    return svg


_GRADIENT = re.compile(r'<linearGradient id="([^"]+)" x1="([\d.]+)" x2="([\d.]+)" y1="([\d.]+)" y2="([\d.]+)">')
_BOX_PATH = r'd="M0,0h([\d.]+)v([\d.]+)h-[\d.]+Z" fill="url\(#{}\)"'


def _user_space_gradients(svg: str) -> str:
    """Give legend gradients absolute coordinates: WeasyPrint leaves bounding-box gradients unpainted.

    Vega draws a gradient legend as one rectangle path from the origin, so its width and height
    turn the 0-1 bounding-box coordinates into user-space ones; browsers draw both forms alike.
    """
    def fix(match: re.Match) -> str:
        gradient, x1, x2, y1, y2 = match.groups()
        box = re.search(_BOX_PATH.format(re.escape(gradient)), svg)
        if box is None:
            return match.group(0)
        w, h = float(box.group(1)), float(box.group(2))
        return (f'<linearGradient id="{gradient}" gradientUnits="userSpaceOnUse" x1="{float(x1) * w:g}" '
                f'x2="{float(x2) * w:g}" y1="{float(y1) * h:g}" y2="{float(y2) * h:g}">')

    return _GRADIENT.sub(fix, svg)


def remembered(draw: Callable[..., Chart]) -> Callable[..., Chart]:
    """Read back a chart drawn before with the same arguments (chart_memo.py), without building its spec.

    Altair is imported inside each chart function, so a rebuild that finds every chart never loads it.
    """
    @functools.wraps(draw)
    def drawn(*args, **kwargs) -> Chart:
        memo = active_memo()
        if memo is None:
            return draw(*args, **kwargs)
        key = memo.call_key(f"{draw.__module__}.{draw.__qualname__}", args, kwargs)
        found = memo.drawing(key)
        if found is not None:
            return Chart(svg=Markup(found[0]), alt=found[1])
        chart = draw(*args, **kwargs)
        memo.keep_drawing(key, str(chart.svg), chart.alt)
        return chart

    return drawn


def to_svg(chart: alt.TopLevelMixin, theme: Theme, alt_text: str, name: str) -> Chart:
    import vl_convert  # heavy; imported when a chart is actually drawn

    pal = theme.palette
    spec = (
        chart.configure(font=theme.fonts["chart"], background=pal["paper"])
        .configure_view(stroke=None)
        .configure_axis(
            labelColor=pal["ink"], titleColor=pal["muted"], domainColor=pal["rule"],
            tickColor=pal["rule"], gridColor=pal["rule"], labelFontSize=10, titleFontSize=10,
            titleFontWeight="normal",
        )
        .configure_legend(labelColor=pal["ink"], titleColor=pal["muted"], labelFontSize=10, titleFontSize=10)
        .configure_header(labelColor=pal["ink"], labelFontSize=10, titleFontSize=10)
        .to_dict()
    )
    spec.pop("$schema", None)  # a URL only; vl-convert bundles its own schema
    spec["description"] = alt_text
    memo = active_memo()
    if memo is None:
        drawn = vl_convert.vegalite_to_svg(spec)
    else:  # a rebuild finds most charts drawn before (chart_memo.py)
        key = memo.key(spec, _renderer_version(vl_convert))
        drawn = memo.svg(key, lambda: vl_convert.vegalite_to_svg(spec))
    svg = _user_space_gradients(_local_ids(drawn, f"chart-{name}"))
    lowered = svg.lower()
    # vl-convert escapes data values; this guards against a spec change that would embed active content.
    bad = [token for token in _FORBIDDEN_SVG if token in lowered]
    if bad:
        raise RuntimeError(f"chart SVG contains {bad}; refusing to inline it")
    # role/aria-label make the inline SVG an image with the text alternative for screen readers.
    svg = svg.replace("<svg ", f'<svg role="img" aria-label="{_attr(alt_text)}" ', 1)
    return Chart(svg=Markup(svg), alt=alt_text)


def _renderer_version(vl_convert) -> str:
    """What the SVG depends on besides the spec: the vl-convert release (with the Vega-Lite and fonts it bundles)."""
    return f"vl-convert {vl_convert.__version__}"


def _attr(text: str) -> str:
    return text.replace("&", "&amp;").replace('"', "&quot;").replace("<", "&lt;").replace(">", "&gt;")


def _goal_label(code: str, title: str) -> str:
    return f"{code}  {title}"


@remembered
def draw_goal_profile(rows: Sequence[GoalRow], theme: Theme) -> Chart:
    """Horizontal bars per goal: explicit-mention part + content-only part, with the interval as a rule."""
    import altair as alt

    order = [_goal_label(r.goal, r.title) for r in rows]
    parts, bounds = [], []
    for r in rows:
        label = _goal_label(r.goal, r.title)
        n = r.n or float("nan")
        parts.append({"goal": label, "part": "explicit mention", "order": 0, "share": (r.n_aligned - r.n_content_only) / n})
        parts.append({"goal": label, "part": "content only", "order": 1, "share": r.n_content_only / n})
        bounds.append({"goal": label, "low": r.share_low, "high": r.share_high})
    cat = theme.palette["categorical"]
    y = alt.Y("goal:N", sort=order, title=None, axis=alt.Axis(labelLimit=230))
    bars = alt.Chart(pd.DataFrame(parts)).mark_bar(height=11).encode(
        y=y,
        x=alt.X("sum(share):Q", title="share of publications", axis=alt.Axis(format="%")),
        color=alt.Color(
            "part:N", scale=alt.Scale(domain=["explicit mention", "content only"], range=[cat[0], cat[2]]),
            legend=alt.Legend(orient="bottom", title=None),
        ),
        order=alt.Order("order:Q"),
    )
    rules = alt.Chart(pd.DataFrame(bounds)).mark_errorbar(ticks=alt.TickConfig(size=7), color=theme.palette["ink"],
                                                          thickness=1.1).encode(
        y=y, x=alt.X("low:Q", title="share of publications"), x2="high:Q"
    )
    chart = alt.layer(bars, rules).properties(width=WIDTH - 200, height=alt.Step(17))
    top = max(rows, key=lambda r: r.share, default=None)
    alt_text = (
        f"Bar chart of the share of publications aligned with each of {len(rows)} goals, "
        f"split into explicit mentions and content alone, with interval bars."
        + (f" Largest: goal {top.goal} at {fmt_share(top.share)}." if top is not None else "")
    )
    return to_svg(chart, theme, alt_text, "goal-profile")


@remembered
def draw_change(by_year: pd.DataFrame, goals: Sequence[tuple[str, str]], theme: Theme) -> Chart:
    """Small multiples: one panel per goal, share per year as a line inside its interval band."""
    import altair as alt

    labels = {code: _goal_label(code, title) for code, title in goals}
    data = by_year.loc[by_year["goal"].isin(labels)].assign(
        label=lambda f: f["goal"].map(labels),
        status=lambda f: f["is_too_small"].map({True: "too small", False: "reported"}),
    )[["label", "year", "share", "share_low", "share_high", "status"]]
    cat = theme.palette["categorical"]
    years = sorted(int(y) for y in data["year"].unique())
    # A panel is 78 px wide: four-digit labels for every year would run together, so only the first and
    # last year are labelled (ticks mark the rest); decades of years stay legible the same way.
    axis = alt.Axis(labelAngle=0, values=[years[0], years[-1]], labelFontSize=8, labelOverlap=True)
    base = alt.Chart().encode(x=alt.X("year:O", title=None, axis=axis))
    band = base.mark_area(color=cat[2], opacity=0.55).encode(
        y=alt.Y("share_low:Q", title=None, axis=alt.Axis(format="%", tickCount=3)), y2="share_high:Q"
    )
    line = base.mark_line(color=cat[0], strokeWidth=1.5).encode(y="share:Q")
    points = base.mark_point(filled=True, size=22, color=cat[0]).encode(
        y="share:Q",
        shape=alt.Shape(
            "status:N", scale=alt.Scale(domain=["reported", "too small"], range=["circle", "cross"]),
            legend=alt.Legend(orient="bottom", title=None),
        ),
    )
    chart = alt.layer(band, line, points, data=data).properties(width=78, height=60).facet(
        facet=alt.Facet("label:N", sort=[labels[c] for c, _ in goals], title=None,
                        header=alt.Header(labelLimit=95, labelFontSize=8)),
        columns=6,
    )
    alt_text = (
        f"Small multiples, one per goal: goal share per year from {years[0]} to {years[-1]} "
        "as a line inside its interval band; crosses mark years with too few publications."
    )
    return to_svg(chart, theme, alt_text, "change")


def _cells_frame(rows: Sequence[GroupRow], value: str) -> pd.DataFrame:
    records = []
    for row in rows:
        for cell in row.cells:
            records.append({"group": row.label, "goal": cell.goal, "value": getattr(cell, value),
                            "too_small": cell.is_too_small})
    return pd.DataFrame(records, columns=["group", "goal", "value", "too_small"])


@remembered
def draw_group_heatmap(
    rows: Sequence[GroupRow], goals: Sequence[tuple[str, str]], theme: Theme, *, what: str, name: str,
    min_group_size: int, value: str = "share",
) -> Chart:
    """Group x goal heat map; cells of too-small groups are grey and labelled "n<k" instead of coloured."""
    import altair as alt

    data = _cells_frame(rows, value)
    goal_order = [code for code, _ in goals]
    group_order = [row.label for row in rows]
    x = alt.X("goal:N", sort=goal_order, title="goal", axis=alt.Axis(labelAngle=0, orient="top"))
    y = alt.Y("group:N", sort=group_order, title=None, axis=alt.Axis(labelLimit=180))
    fmt = "%" if value == "share" else "d"
    steps = {} if value == "share" else {"tickMinStep": 1}  # whole publications only
    shown = data.loc[~data["too_small"]]
    small = data.loc[data["too_small"]].assign(mark=f"n<{min_group_size}")
    pal = theme.palette
    coloured = alt.Chart(shown).mark_rect(stroke=pal["paper"], strokeWidth=1).encode(
        x=x, y=y,
        color=alt.Color("value:Q", scale=alt.Scale(range=pal["sequential"], zero=True),
                        legend=alt.Legend(title="share" if value == "share" else "aligned publications",
                                          format=fmt, orient="bottom", direction="horizontal", gradientLength=160,
                                          **steps)),
    )
    grey = alt.Chart(small).mark_rect(color=pal["too_small"], stroke=pal["paper"], strokeWidth=1).encode(x=x, y=y)
    label = alt.Chart(small).mark_text(fontSize=7, color=pal["muted"]).encode(x=x, y=y, text="mark:N")
    chart = alt.layer(coloured, grey, label).properties(width=alt.Step(24), height=alt.Step(18))
    n_small = len({row.label for row in rows if row.is_too_small})
    alt_text = (
        f"Heat map of {len(rows)} {what} by {len(goal_order)} goals; darker cells mean a larger "
        f"{'share' if value == 'share' else 'number of aligned publications'}."
        + (f" Groups with fewer than {min_group_size} publications ({n_small} of {len(rows)}) are grey and "
           f"marked n<{min_group_size}." if n_small else "")
    )
    return to_svg(chart, theme, alt_text, name)


@remembered
def draw_collaboration(rows: Sequence[GroupRow], goals: Sequence[tuple[str, str]], theme: Theme) -> Chart:
    """Goal shares side by side for international and domestic publications, with interval rules."""
    import altair as alt

    records: list[dict[str, Any]] = []
    for row in rows:
        for cell in row.cells:
            records.append({"group": row.label, "goal": cell.goal, "share": cell.share,
                            "low": cell.share_low, "high": cell.share_high})
    data = pd.DataFrame(records)
    cat = theme.palette["categorical"]
    domain = [row.label for row in rows]
    goal_order = [code for code, _ in goals]
    x = alt.X("goal:N", sort=goal_order, title="goal", axis=alt.Axis(labelAngle=0))
    offset = alt.XOffset("group:N", sort=domain)
    bars = alt.Chart(data).mark_bar().encode(
        x=x, xOffset=offset, y=alt.Y("share:Q", title="share of publications", axis=alt.Axis(format="%")),
        color=alt.Color("group:N", scale=alt.Scale(domain=domain, range=[cat[1], cat[0]][: len(domain)]),
                        legend=alt.Legend(orient="bottom", title=None)),
    )
    rules = alt.Chart(data).mark_rule(color=theme.palette["ink"]).encode(x=x, xOffset=offset, y="low:Q", y2="high:Q")
    chart = alt.layer(bars, rules).properties(width=WIDTH, height=170)
    alt_text = (f"Grouped bars: goal shares for {' and '.join(domain).lower()} publications, "
                "one pair per goal, with interval bars.")
    return to_svg(chart, theme, alt_text, "collaboration")


@remembered
def draw_cooccurrence(pairs: pd.DataFrame, goals: Sequence[tuple[str, str]], theme: Theme) -> Chart:
    """Symmetric goal x goal heat map of publications aligned with both goals."""
    import altair as alt

    both = pd.concat([pairs, pairs.rename(columns={"goal_a": "goal_b", "goal_b": "goal_a"})], ignore_index=True)
    goal_order = [code for code, _ in goals]
    pal = theme.palette
    chart = alt.Chart(both).mark_rect(stroke=pal["paper"], strokeWidth=1).encode(
        x=alt.X("goal_a:N", sort=goal_order, title="goal", axis=alt.Axis(labelAngle=0, orient="top")),
        y=alt.Y("goal_b:N", sort=goal_order, title="goal"),
        color=alt.Color("n:Q", scale=alt.Scale(range=pal["sequential"], zero=True),
                        legend=alt.Legend(title="publications aligned with both", orient="bottom",
                                          direction="horizontal", gradientLength=160, tickMinStep=1)),
    ).properties(width=alt.Step(22), height=alt.Step(22))
    alt_text = ("Heat map of goal pairs: darker cells mean more publications aligned with both goals; "
                "the most frequent pairs are listed beside it.")
    return to_svg(chart, theme, alt_text, "together")


