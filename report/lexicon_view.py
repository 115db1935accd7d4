"""The report of `pairflip lexicon`: the top learned words per polarity, and what was left out and why."""

from __future__ import annotations

from collections import Counter
from pathlib import Path
from typing import Any, Iterable

from rich.console import Console, Group
from rich.table import Table
from rich.text import Text

EXAMPLES = 5  # left-out terms named per reason


def top_words_table(words: Iterable[Any], title: str) -> Table:
    """One polarity's learned words, largest |z| first, each marked against the built-in lexicon
    (``new``; ``same`` polarity there, so not written; ``opposite`` there, so the file overrides it)."""
    words = list(words)
    compared = any(w.builtin for w in words)
    t = Table(title=title, title_justify="left", show_edge=False, pad_edge=False)
    t.add_column("word")
    t.add_column("pos")
    t.add_column("grade")
    t.add_column("z", justify="right")
    t.add_column("in positive", justify="right")
    t.add_column("in negative", justify="right")
    if compared:
        t.add_column("built-in")
    for w in words:
        row = [w.word, w.pos, w.grade, f"{w.z:+.2f}", str(w.count_pos), str(w.count_neg)]
        if compared:
            row.append(w.builtin)
        t.add_row(*row)
    return t


def left_out_table(left_out: dict[str, list[Any]], examples: int = EXAMPLES) -> Table:
    t = Table(title="left out", title_justify="left", show_edge=False, pad_edge=False)
    t.add_column("why")
    t.add_column("terms", justify="right")
    t.add_column("most frequent")
    for reason, terms in left_out.items():
        shown = ", ".join(_left(x) for x in terms[:examples])
        t.add_row(reason, str(len(terms)), shown)
    return t


def _left(x: Any) -> str:
    return f"{x.term} {x.count}" + (f" ({x.detail})" if x.detail else "")


def summary_line(lex: Any, output: Path | str | None) -> str:
    pos = sum(1 for w in lex.words if w.polarity > 0)
    neg = len(lex.words) - pos
    t = lex.texts
    line = (f"learned {len(lex.words)} opinion words and phrases ({pos} positive, {neg} negative) from "
            f"{t['positive']} positive and {t['negative']} negative texts"
            + (f" ({t['neutral']} neutral, only in the prior)" if t["neutral"] else ""))
    n = Counter(w.builtin for w in lex.words)
    if any(n.values()) and "" not in n:
        line += f"; {n['new']} new to the built-in lexicon"
        if n["opposite"]:
            line += f", {n['opposite']} of the opposite polarity there (the file overrides them)"
        if n["same"]:
            line += f", {n['same']} already there with this polarity (not written)"
    if output is not None:
        line += f"; wrote {len(lex.written)} to {output}"
    return line


def lexicon_report(lex: Any, output: Path | str | None = None, *, top: int = 15) -> Group:
    parts: list[Any] = []
    for polarity, name in ((1, "positive"), (-1, "negative")):
        words = lex.top(polarity, top)
        n = sum(1 for w in lex.words if w.polarity == polarity)
        title = f"{name}: top {len(words)} of {n} by |z|" if words else f"{name}: none kept"
        parts.append(top_words_table(words, title))
        parts.append(Text(""))
    parts.append(left_out_table(lex.left_out))
    parts.append(Text(""))
    parts.append(Text(summary_line(lex, output)))
    if not lex.words:
        parts.append(Text(f"no word reached |z| >= {lex.settings['min_z']:g} with at least "
                          f"{lex.settings['min_count']} occurrences: more labelled texts, or a lower --min-z"))
    return Group(*parts)


def render_lexicon(lex: Any, output: Path | str | None, console: Console, *, top: int = 15) -> None:
    console.print(lexicon_report(lex, output, top=top))
