"""Rich renderables for the gate's and compare's outcomes. Built from data, printed once.

:func:`gate_table`/:func:`comparison_table` build renderables; :func:`render_gate` and
:func:`render_comparison` print them to a console; :func:`gate_text` gives the gate's table as
plain text (for an AssertionError message in :mod:`pairflip.testing`).
"""

from __future__ import annotations

import io
from typing import Any

from rich import box
from rich.console import Console, Group, RenderableType
from rich.markup import escape
from rich.table import Table
from rich.text import Text

_ON_WORDS = {
    "point": "each limit judged on the observed rate",
    "upper": "each limit judged on the upper bound of the rate's 95% interval",
    "lower": "each limit judged on the lower bound of the rate's 95% interval",
    "confirmed": "each limit judged on the confirmed rate (violations among the pairs a person accepted)",
}


def _pct(x: float | None) -> str:
    return "-" if x is None else f"{100 * x:.1f}%"


def _p(x: float | None) -> str:
    if x is None:
        return "-"
    if x < 1e-3:
        return f"{x:.1e}"
    return f"{x:.3f}"


def _row(t: Table, *cells: Any) -> None:
    """Add a row; plain strings become Text, so user text is never read as rich markup."""
    t.add_row(*(c if isinstance(c, Text) else Text(str(c)) for c in cells))


def _interval(ci: tuple[float, float]) -> str:
    return f"{100 * ci[0]:.1f}-{100 * ci[1]:.1f}%"


def limits_heading(outcome: Any) -> Text:
    """What the limits table judges, as a line that wraps at word boundaries."""
    interval = "bootstrap over source texts" if outcome.interval == "cluster-bootstrap" else "Wilson"
    judged_on = _ON_WORDS.get(outcome.on, f"each limit judged on {outcome.on}")
    return Text(f"gate on {outcome.model or 'model'}: {judged_on}; 95% intervals: {interval}", style="bold")


def limits_table(outcome: Any) -> Table:
    t = Table(box=box.SIMPLE_HEAD)
    # A limit is one expression: it never wraps (the result column wraps instead).
    t.add_column("limit", no_wrap=True, min_width=max((len(o.limit.text) for o in outcome.limits), default=5))
    t.add_column("n", justify="right", no_wrap=True)
    t.add_column("rate", justify="right", no_wrap=True)
    t.add_column("95% CI", justify="right", no_wrap=True)
    judged = outcome.on != "point"
    if judged:
        t.add_column(outcome.on, justify="right", no_wrap=True)
    t.add_column("result", overflow="fold", min_width=8)
    for o in outcome.limits:
        if o.passed:
            result = Text("pass", style="green")
        elif o.note:
            result = Text(f"FAIL: {o.note}", style="bold red")
        else:
            side = "over" if o.limit.op in ("<", "<=") else "under"
            result = Text(f"FAIL, {100 * o.by:.1f} pts {side}", style="bold red")
        cells: list[Any] = [o.limit.text, str(o.count), _pct(o.point), _interval(o.ci95)]
        if judged:
            cells.append(_pct(o.value))
        _row(t, *cells, result)
    return t


def regressions_table(outcome: Any) -> Table:
    t = Table(
        title=f"regression against the baseline {escape(outcome.baseline_model or '')} "
        f"(exact McNemar, Holm-adjusted, alpha {outcome.alpha:g})",
        title_justify="left",
        box=box.SIMPLE_HEAD,
    )
    t.add_column("family", no_wrap=True)
    t.add_column("paired", justify="right")
    t.add_column("violations\nold -> new", justify="right", no_wrap=True)
    t.add_column("only\nold / new", justify="right", no_wrap=True)
    t.add_column("p (Holm)", justify="right", no_wrap=True)
    t.add_column("result")
    for r in outcome.regressions or []:
        fc = r.comparison
        if r.regressed:
            result = Text(f"FAIL: {fc.only_new - fc.only_old} more violations", style="bold red")
        elif fc.direction == "worse":
            result = Text("worse, not significant", style="yellow")
        else:
            result = Text("pass" if fc.direction == "same" else "pass (better)", style="green")
        _row(t, r.family, str(fc.paired), f"{fc.old_violations} -> {fc.new_violations}",
             f"{fc.only_old} / {fc.only_new}", _p(fc.p_holm), result)
    return t


def gate_verdict(outcome: Any) -> Text:
    if outcome.passed:
        return Text("gate passed", style="bold green")
    parts = []
    if outcome.failed_limits:
        parts.append(f"{len(outcome.failed_limits)} of {len(outcome.limits)} limits crossed")
    if outcome.regressed:
        n = len(outcome.regressed)
        parts.append(f"{n} {'family' if n == 1 else 'families'} regressed: {', '.join(r.family for r in outcome.regressed)}")
    return Text("gate FAILED: " + "; ".join(parts), style="bold red")


def gate_table(outcome: Any) -> RenderableType:
    parts: list[RenderableType] = []
    if outcome.limits:
        parts.append(limits_heading(outcome))
        parts.append(limits_table(outcome))
    if outcome.regressions is not None:
        parts.append(regressions_table(outcome))
    parts.append(gate_verdict(outcome))
    return Group(*parts)


def render_gate(outcome: Any, console: Console) -> None:
    """Print the gate's tables: which limit failed, the value judged against it and by how much."""
    console.print(gate_table(outcome))


def gate_text(outcome: Any, width: int = 120) -> str:
    """The gate's tables as plain text (no colour, no terminal codes)."""
    buf = io.StringIO()
    console = Console(file=buf, width=width, color_system=None, force_terminal=False, highlight=False,
                      emoji=False, legacy_windows=False)
    render_gate(outcome, console)
    return "\n".join(line.rstrip() for line in buf.getvalue().splitlines()) + "\n"


def comparison_table(comp: Any) -> Table:
    old_name = escape(str(comp.old.get("name", "old")))
    new_name = escape(str(comp.new.get("name", "new")))
    t = Table(title=f"compare: old {old_name} vs new {new_name} (exact McNemar, Holm-adjusted across families)",
              title_justify="left", box=box.SIMPLE_HEAD, pad_edge=False)
    t.add_column("family", no_wrap=True)
    t.add_column("pairs", justify="right", no_wrap=True)
    t.add_column("violations\nold -> new", justify="right", no_wrap=True)
    t.add_column("only\nold/new", justify="right", no_wrap=True)
    t.add_column("p", justify="right", no_wrap=True)
    t.add_column("Holm p", justify="right", no_wrap=True)
    t.add_column("change", min_width=6)
    for fam, fc in comp.families.items():
        style = {"worse": "red", "better": "green"}.get(fc.direction, "")
        _row(t, fam, str(fc.paired), f"{fc.old_violations} -> {fc.new_violations}",
             f"{fc.only_old} / {fc.only_new}", _p(fc.p_value), _p(fc.p_holm),
             Text(fc.direction if fc.p_value is not None else "no applicable pairs", style=style))
    return t


def _side(pred_s: str, pred_v: str, score_s: float | None, score_v: float | None) -> str:
    if score_s is None or score_v is None:
        return f"{pred_s} -> {pred_v}"
    return f"{pred_s} {score_s:+.2f} -> {pred_v} {score_v:+.2f}"


def broken_examples(comp: Any, examples: int) -> RenderableType | None:
    rows = [(fam, b) for fam, fc in comp.families.items() for b in fc.newly_broken[: max(0, examples)]]
    if not rows:
        return None
    shown = {fam: min(len(fc.newly_broken), max(0, examples)) for fam, fc in comp.families.items()}
    counts = "; ".join(f"{fam}: {shown[fam]} of {getattr(fc, 'broken', len(fc.newly_broken))} shown"
                       for fam, fc in comp.families.items() if shown[fam])
    scored = any(b.new_source_score is not None for _f, b in rows)
    t = Table(title=f"newly broken pairs (violated by the new model only; {counts})", title_justify="left",
              show_lines=True, box=box.SIMPLE_HEAD)
    t.add_column("rule / should", no_wrap=True)
    t.add_column("source -> variant", ratio=1)
    t.add_column("labels and scores (-1..1)" if scored else "labels", no_wrap=True)
    for _fam, b in rows:
        _row(t, f"{b.rule}\n{b.should}", f"{b.source}\n-> {b.variant}",
             f"old {_side(b.old_source_pred, b.old_variant_pred, b.old_source_score, b.old_variant_score)}\n"
             f"new {_side(b.new_source_pred, b.new_variant_pred, b.new_source_score, b.new_variant_score)}")
    return t


def render_comparison(comp: Any, console: Console, examples: int = 3) -> None:
    """Print the per-family comparison table and up to ``examples`` newly broken pairs per family."""
    parts: list[RenderableType] = [comparison_table(comp)]
    ex = broken_examples(comp, examples)
    if ex is not None:
        parts.append(ex)
    console.print(Group(*parts))
