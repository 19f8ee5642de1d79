"""A brief's chart: the department's goal shares with intervals, the institution's share marked beside each."""

from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

import pandas as pd

from reporter.render.charts import remembered, to_svg
from reporter.render.context import Chart
from reporter.render.filters import fmt_share
from reporter.render.themes import Theme

if TYPE_CHECKING:  # brief_context imports this module
    from reporter.render.brief_context import BriefGoalRow

INSTITUTION = "institution"


@remembered
def draw_brief_profile(rows: Sequence[BriefGoalRow], department: str, theme: Theme) -> Chart:
    """Columns of the department's shares per goal with interval rules; a tick per goal for the institution.

    Goals run along the bottom by number (the table beside it names them), so the chart stays small
    enough to share the first page with the key figures.
    """
    import altair as alt

    order = [r.goal for r in rows]
    own = pd.DataFrame([{"goal": r.goal, "who": department, "share": r.department.share,
                         "low": r.department.share_low, "high": r.department.share_high} for r in rows])
    whole = pd.DataFrame([{"goal": r.goal, "who": INSTITUTION, "share": r.institution.share} for r in rows])
    cat, ink = theme.palette["categorical"], theme.palette["ink"]
    x = alt.X("goal:N", sort=order, title="goal", axis=alt.Axis(labelAngle=0))
    y = alt.Y("share:Q", title="share of publications", axis=alt.Axis(format="%", tickCount=5))
    # One colour scale across the layers gives one legend naming the department and the institution.
    colour = alt.Color("who:N", scale=alt.Scale(domain=[department, INSTITUTION], range=[cat[2], cat[1]]),
                       legend=alt.Legend(orient="top", title=None, labelLimit=320))
    bars = alt.Chart(own).mark_bar(width=11).encode(x=x, y=y, color=colour)
    rules = alt.Chart(own).mark_errorbar(ticks=alt.TickConfig(size=5), color=ink, thickness=1).encode(
        x=x, y=alt.Y("low:Q", title="share of publications"), y2="high:Q")
    ticks = alt.Chart(whole).mark_tick(thickness=2.5, size=15, opacity=1).encode(x=x, y=y, color=colour)
    chart = alt.layer(bars, rules, ticks).properties(width=alt.Step(21), height=120)
    top = max(rows, key=lambda r: r.department.share)
    alt_text = (
        f"Column chart of the share of {department}'s publications aligned with each of {len(rows)} goals, with "
        f"interval bars; a tick marks the institution's share for each goal. Largest: goal {top.goal} at "
        f"{fmt_share(top.department.share)} (institution {fmt_share(top.institution.share)})."
    )
    return to_svg(chart, theme, alt_text, "brief-profile")
