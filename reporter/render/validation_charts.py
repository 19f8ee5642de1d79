"""Validation charts: the labelled x predicted goal heat map and precision/recall across thresholds.

Both draw `Findings.extra["validation"]` as given (matrix and curve rows) with the theme's palette,
through the same Altair -> SVG path as `charts.py`.
"""

from __future__ import annotations

from typing import Sequence

import pandas as pd

from reporter.render.charts import remembered, to_svg
from reporter.render.context import Chart
from reporter.render.themes import Theme

NO_GOAL = "none"  # the matrix's "no goal" row and column (analyse.validation.NONE); short enough for a column


@remembered
def draw_goal_matrix(cells: pd.DataFrame, goal_order: Sequence[str], theme: Theme, alt_text: str) -> Chart:
    """Heat map: rows = goal people gave, columns = goal the machine gave, counts written in the cells.

    `cells` has labelled, predicted, n with goal codes or NO_GOAL; `goal_order` lists them all.
    """
    import altair as alt

    pal = theme.palette
    order = list(goal_order)
    x = alt.X("predicted:N", sort=order, title="goal given by the machine", axis=alt.Axis(labelAngle=0, orient="top"))
    y = alt.Y("labelled:N", sort=order, title="goal given by people")
    filled = cells.loc[cells["n"] > 0]
    # "none" by "none" (publications nobody gave a goal) can dwarf every goal cell; the colour
    # scale spans the goal cells and that one cell takes the darkest colour.
    goal_cells = filled.loc[(filled["labelled"] != NO_GOAL) | (filled["predicted"] != NO_GOAL), "n"]
    top = max(int(goal_cells.max()), 1) if not goal_cells.empty else 1
    rects = alt.Chart(filled).mark_rect(stroke=pal["paper"], strokeWidth=1).encode(
        x=x, y=y,
        color=alt.Color("n:Q", scale=alt.Scale(range=pal["sequential"], zero=True, domain=[0, top], clamp=True),
                        legend=alt.Legend(title="labelled publications", orient="bottom", direction="horizontal",
                                          gradientLength=160, tickMinStep=1)),
    )
    # Light text on the darker half of the ramp, dark text on the lighter half, so every count stays legible.
    text = alt.Chart(filled).mark_text(fontSize=7).encode(
        x=x, y=y, text="n:Q",
        color=alt.condition(alt.datum.n > top / 2, alt.value(pal["paper"]), alt.value(pal["ink"])),
    )
    # An empty frame keeps every goal on both axes even where no publication sits.
    axes = alt.Chart(pd.DataFrame({"labelled": order, "predicted": order})).mark_rect(opacity=0).encode(x=x, y=y)
    chart = alt.layer(axes, rects, text).properties(width=alt.Step(22), height=alt.Step(17))
    return to_svg(chart, theme, alt_text, "validation-matrix")


@remembered
def draw_threshold_curves(
    curve: pd.DataFrame, current: dict[str, float], goals: Sequence[tuple[str, str]], theme: Theme, alt_text: str,
) -> Chart:
    """Small multiples, one per goal: precision and recall on the labelled sample at each threshold.

    `curve` has goal, threshold, precision, recall; a rule marks the threshold used (`current`).
    """
    import altair as alt

    labels = {code: f"{code}  {title}" for code, title in goals}
    long = curve.loc[curve["goal"].isin(labels)].melt(
        id_vars=["goal", "threshold"], value_vars=["precision", "recall"], var_name="measure", value_name="value",
    ).dropna(subset=["value"])
    long = long.assign(label=long["goal"].map(labels), current=long["goal"].map(current))
    cat = theme.palette["categorical"]
    x = alt.X("threshold:Q", title=None, scale=alt.Scale(domain=[0, 1]), axis=alt.Axis(tickCount=3, format=".1f"))
    lines = alt.Chart().mark_line(strokeWidth=1.4).encode(
        x=x, y=alt.Y("value:Q", title=None, scale=alt.Scale(domain=[0, 1]), axis=alt.Axis(tickCount=3, format="%")),
        color=alt.Color("measure:N", scale=alt.Scale(domain=["precision", "recall"], range=[cat[0], cat[1]]),
                        legend=alt.Legend(orient="bottom", title=None)),
        strokeDash=alt.StrokeDash("measure:N", scale=alt.Scale(domain=["precision", "recall"], range=[[1, 0], [4, 2]]),
                                  legend=None),
    )
    rule = alt.Chart().mark_rule(color=theme.palette["muted"], strokeDash=[2, 2]).encode(x="mean(current):Q")
    chart = alt.layer(lines, rule, data=long).properties(width=78, height=58).facet(
        facet=alt.Facet("label:N", sort=[labels[c] for c, _ in goals if c in set(long["goal"])], title=None,
                        header=alt.Header(labelLimit=95, labelFontSize=8)),
        columns=6,
    )
    return to_svg(chart, theme, alt_text, "validation-curves")
