"""``pairflip vet --plain`` and ``--list``: the vet session line by line, for pipes and scripts.

Each pair is printed as a few plain lines (no JSON): the progress, the rule and its expectation in
words, the source, the variant, the word diff (``[-removed-]`` ``[+inserted+]``) and, for results
files, both predictions. Then one answer is read per line:

``a``               accept
``r REASON``        reject; REASON is g (ungrammatical), x (expectation wrong), n (no opinion in
                    the source), o (other), or the full word; anything after it is a note
``e SHOULD``        the pair is right but its expectation is SHOULD (f flip, h hold, + strengthen,
                    - weaken, 0 none, or the word)
``s`` skip   ``u`` undo the last answer   ``q`` quit (end of input quits too)
"""

from __future__ import annotations

from typing import TextIO

from rich.console import Console

from pairflip.report.diff import plain, word_diff
from pairflip.vetting import PLAIN_SHOULD, REASON_KEYS, SHOULD_KEYS, VetItem, VetSession

HELP = ("answer: a accept · r REASON reject (" + ", ".join(f"{k} {v}" for k, v in REASON_KEYS.items())
        + ") · e SHOULD change (" + ", ".join(f"{k} {v}" for k, v in SHOULD_KEYS.items())
        + ") · s skip · u undo · q quit")


def _pred(label: str | None, score: float | None) -> str:
    if label is None:
        return "-"
    return label if score is None else f"{label} ({score:+.2f})"


def item_lines(item: VetItem, standing: str | None = None) -> list[str]:
    """The plain lines that show one pair."""
    lines = [
        f"rule: {item.rule} — {PLAIN_SHOULD.get(item.should, item.should)}",
        f"  source:  {item.source}",
        f"  variant: {item.variant}",
        f"  diff:    {plain(word_diff(item.source, item.variant))}",
    ]
    if item.source_pred is not None:
        verdict = f"  [{item.verdict}]" if item.verdict else ""
        lines.append(f"  model:   {_pred(item.source_pred, item.source_score)} -> "
                     f"{_pred(item.variant_pred, item.variant_score)}{verdict}")
    if standing:
        lines.append(f"  decided before: {standing}")
    lines.append(f"  id:      {item.id}")
    return lines


def list_items(items: list[VetItem], n: int, console: Console) -> None:
    for k, item in enumerate(items[:n], 1):
        console.print(f"[{k}/{min(n, len(items))}]", markup=False)
        for line in item_lines(item):
            console.print(line, markup=False, soft_wrap=True)
        console.print()


def run_plain(session: VetSession, answers: TextIO, console: Console) -> None:
    """Drive ``session`` from ``answers`` (one per line) until the pairs run out or ``q``."""
    console.print(HELP, markup=False, soft_wrap=True)
    while not session.done:
        item = session.current
        assert item is not None
        d = session.standing(item)
        console.print(f"\n[{session.progress()}]", markup=False)
        for line in item_lines(item, d.decision if d else None):
            console.print(line, markup=False, soft_wrap=True)
        while True:
            console.print("> ", end="", markup=False)
            line = answers.readline()
            if not line:  # end of input
                session.stop()
                break
            if not answers.isatty():
                console.print(line.strip(), markup=False)  # the answer shows in a log of the session
            if _answer(session, line.strip(), console):
                break
    console.print(f"\n{session.progress()}; decisions in {session.log.path}", markup=False, soft_wrap=True)


def _answer(session: VetSession, text: str, console: Console) -> bool:
    """Apply one answer line; False (after saying why) when it must be asked again."""
    key, _, rest = text.partition(" ")
    rest = rest.strip()
    try:
        if key == "a":
            session.accept()
        elif key == "r":
            reason, _, note = rest.partition(" ")
            if not reason:
                raise ValueError("r needs a reason: " + ", ".join(f"{k} ({v})" for k, v in REASON_KEYS.items()))
            session.reject(reason, note.strip())
        elif key == "e":
            if not rest:
                raise ValueError("e needs the new expectation: " + ", ".join(f"{k} ({v})" for k, v in SHOULD_KEYS.items()))
            session.change(rest)
        elif key == "s":
            session.skip()
        elif key == "u":
            if not session.undo():
                raise ValueError("nothing to undo yet")
        elif key == "q":
            session.stop()
        else:
            raise ValueError(f"unknown answer {text!r}; {HELP}")
    except ValueError as err:
        console.print(f"  ? {err}", markup=False, soft_wrap=True)
        return False
    return True
