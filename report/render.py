"""Terminal rendering with rich: renderables built from a Summary, printed once."""

from __future__ import annotations

from typing import Any, Sequence

from rich.console import Console, Group
from rich.table import Table

from pairflip.report.summary import Summary


def _pct(x: float) -> str:
    return f"{100 * x:5.1f}%"


def family_table(summaries: Sequence[Summary]) -> Table:
    t = Table(title="pairflip report", show_lines=False)
    t.add_column("family")
    t.add_column("should")
    for s in summaries:
        t.add_column(f"{s.model_name}\nflip / violation [95% CI]", justify="right")
    fams: dict[str, None] = {}
    for s in summaries:
        for f in s.families:
            fams.setdefault(f, None)
    for f in fams:
        row = [f, next((s.families[f].should for s in summaries if f in s.families), "")]
        for s in summaries:
            g = s.families.get(f)
            if g is None:
                row.append("-")
                continue
            row.append(
                f"{g.pairs} pairs  flip {_pct(g.flip_rate)}  viol {_pct(g.violation_rate)} "
                f"[{_pct(g.ci95[0]).strip()}, {_pct(g.ci95[1]).strip()}]"
            )
        t.add_row(*row)
    return t


def render(summaries: Summary | Sequence[Summary], console: Console | None = None, **_: Any) -> None:
    if isinstance(summaries, Summary):
        summaries = [summaries]
    console = console or Console()
    console.print(Group(family_table(summaries)))


def render_gate(outcome: Any, console: Console) -> None:
    t = Table(title="gate")
    for c in ("limit", "value", "result"):
        t.add_column(c)
    for o in outcome.limits:
        t.add_row(o.limit.text, _pct(o.value), "pass" if o.passed else "FAIL")
    console.print(t)
    console.print("gate passed" if outcome.passed else "gate FAILED")


def render_comparison(comp: Any, console: Console, examples: int = 3) -> None:
    raise NotImplementedError("compare lands with the statistics work")
