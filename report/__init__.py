"""Stage 3: statistics, gate rules, terminal rendering and exporters."""

from pairflip.report.summary import Example, GroupStats, Summary, summarize

__all__ = ["Example", "GroupStats", "Summary", "summarize", "render"]


def render(summaries, console=None, **kwargs):
    """Render one summary (or a list, side by side) to a rich console."""
    from pairflip.report.terminal import render as _render

    return _render(summaries, console=console, **kwargs)
