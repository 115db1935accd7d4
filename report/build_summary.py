"""The build's own summary: per rule, pairs made and variants dropped with the reason."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from rich.console import Console
from rich.table import Table


def build_stats_table(stats: Any) -> Table:
    t = Table(title=None, show_edge=False, pad_edge=False)
    t.add_column("rule")
    t.add_column("made", justify="right")
    t.add_column("dropped", justify="right")
    t.add_column("why dropped")
    rules = sorted(set(stats.made) | set(stats.dropped))
    for r in rules:
        drops = stats.dropped.get(r, {})
        why = ", ".join(f"{reason} {n}" for reason, n in sorted(drops.items(), key=lambda kv: -kv[1]))
        t.add_row(r, str(stats.made.get(r, 0)), str(sum(drops.values())), why)
    return t


def render_build_stats(stats: Any, output: Path | str | None, console: Console) -> None:
    console.print(build_stats_table(stats))
    skipped = sum(stats.skipped.values())
    tested = getattr(stats, "sources_with_tested_pairs", stats.sources_with_pairs)
    diagnostic = getattr(stats, "diagnostic_pairs", 0)
    pairs = f"{stats.pairs} pairs"
    if diagnostic:
        pairs += f" ({stats.pairs - diagnostic} with an expectation, {diagnostic} diagnostic)"
    line = (
        f"{stats.sources} source texts, {stats.sources_with_pairs} gave pairs, {tested} gave a pair with an expectation; "
        + pairs + (f"; skipped {skipped} source{'s' if skipped != 1 else ''} ({', '.join(stats.skipped)})" if skipped else "")
    )
    if getattr(stats, "learned_lexicon", False):
        line += f"; {stats.learned_pairs} from learned words only (meta \"learned\")"
    if output is not None:
        line += f"; wrote {output}"
    console.print(line, markup=False, highlight=False, soft_wrap=True)
    if stats.sources and stats.sources_with_pairs == 0:
        console.print("no pairs were made: is the corpus English review-like text?", markup=False)
    elif stats.sources and tested == 0:
        console.print("no pair with an expectation was made (only diagnostic ones): is the corpus English "
                      "review-like text?", markup=False)
    for w in stats.warnings[:5]:
        console.print(f"warning: {w}", markup=False, soft_wrap=True)
