"""The summary names each goal's change once, whatever the number of baselines it held against."""

from reporter.render.context import ChangeRow
from reporter.render.sections import _summary_changes


def _row(goal, baseline, p, is_change=True):
    return ChangeRow(goal=goal, title=f"Goal {goal}", baseline=baseline, year=2025, share_baseline=0.1, share=0.2,
                     diff=0.1, diff_low=0.05, diff_high=0.15, p_adjusted=p, is_change=is_change, verdict="increase")


def test_pooled_baseline_leads_and_the_others_are_listed():
    rows = [_row("3", "2022", 0.01), _row("3", "2023", 0.02), _row("3", "mean 2022-2024", 0.03),
            _row("7", "2022", 0.04), _row("7", "2024", 0.001), _row("9", "2022", 0.5, is_change=False)]
    summary = _summary_changes(rows)
    assert [(r.goal, r.baseline, r.also_against) for r in summary] == [
        ("3", "mean 2022-2024", ("2022", "2023")),
        ("7", "2024", ("2022",)),
    ]
