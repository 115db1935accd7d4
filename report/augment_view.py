"""What ``pairflip augment`` wrote: rows per rule, and the pairs that gave none with the reason."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from rich.console import Console
from rich.table import Table


def augment_table(stats: Any, shoulds: dict[str, str]) -> Table:
    """One row per rule that made a pair: rows written, pairs skipped and why."""
    t = Table(title=None, show_edge=False, pad_edge=False)
    t.add_column("rule")
    t.add_column("should")
    t.add_column("rows written", justify="right")
    t.add_column("skipped", justify="right")
    t.add_column("why skipped")
    for rule in sorted(set(stats.written) | set(stats.skipped)):
        why = stats.skipped.get(rule, {})
        reasons = ", ".join(f"{r} {n}" for r, n in sorted(why.items(), key=lambda kv: -kv[1]))
        t.add_row(rule, shoulds.get(rule, ""), str(stats.written.get(rule, 0)), str(sum(why.values())), reasons)
    return t


def render_augment(stats: Any, shoulds: dict[str, str], output: Path | str, console: Console,
                   excluded_from: list[str] | None = None) -> None:
    console.print(augment_table(stats, shoulds))
    labels = ", ".join(f"{lab} {n}" for lab, n in sorted(stats.labels.items(), key=lambda kv: -kv[1]))
    line = f"wrote {stats.rows} row{'s' if stats.rows != 1 else ''} to {output}" + (f" (labels: {labels})" if labels else "")
    if excluded_from:
        line += (f"; left out {stats.excluded_texts} text{'s' if stats.excluded_texts != 1 else ''} whose source is in "
                 + ", ".join(excluded_from))
    rejected = sum(why.get("rejected when vetted", 0) for why in stats.skipped.values())
    if rejected:
        line += f"; {rejected} pair{'s' if rejected != 1 else ''} rejected when vetted gave no row"
    console.print(line, markup=False, highlight=False, soft_wrap=True)
    skipped_rules = sorted(r for r, why in stats.skipped.items() if any("rise/fall" in k for k in why))
    if skipped_rules:
        console.print(f"no rows from {', '.join(skipped_rules)}: their expectation (rise/fall) says which way the score "
                      f"moves, not which label the variant has", markup=False, highlight=False, soft_wrap=True)
    if stats.rows == 0:
        console.print("no row was written: no pair fixed a label (are the texts English review-like text, "
                      "and labelled with polarities?)", markup=False, soft_wrap=True)
