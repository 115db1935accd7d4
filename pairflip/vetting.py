"""``pairflip vet``: which pairs a person looks at, and what each answer does.

This is the session without any screen: :class:`VetSession` walks a list of :class:`VetItem`
(from a suite or a results file), takes answers (accept, reject with a reason, change the
expectation, skip, undo, quit) and writes each to the :class:`~pairflip.decisions.DecisionLog`
at once. The full-screen app (``report/vet_app.py``) and the line-by-line ``--plain`` mode
(``report/vet_view.py``) are two faces of the same session.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pairflip.decisions import REASONS, Decision, DecisionLog
from pairflip.records import SHOULDS, PairflipError

ONLY = ("unvetted", "violations", "all")

# The expectation in plain words, as the scoring judges it (DESIGN.md, Expectations).
PLAIN_SHOULD = {
    "flip": "should not keep the opinion (reversed, or gone)",
    "hold": "should keep the same label",
    "strengthen": "should keep the opinion, at least as strongly",
    "weaken": "should keep the opinion's direction, not more strongly",
    "rise": "should score higher (more positive)",
    "fall": "should score lower (more negative)",
    "none": "diagnostic: no expectation (only flips are counted)",
}

# One key per reason and per expectation, shown on screen and accepted by --plain.
REASON_KEYS = {"g": "ungrammatical", "x": "expectation-wrong", "n": "no-opinion", "o": "other"}
SHOULD_KEYS = {k: v for k, v in {"f": "flip", "h": "hold", "+": "strengthen", "-": "weaken", ">": "rise",
                                  "<": "fall", "0": "none"}.items() if v in SHOULDS}


@dataclass
class VetItem:
    """One pair as a person sees it; predictions only when it comes from a results file."""

    id: str
    source: str
    variant: str
    family: str
    rule: str
    should: str
    source_pred: str | None = None
    variant_pred: str | None = None
    source_score: float | None = None
    variant_score: float | None = None
    verdict: str | None = None


def load_items(path: str | Path) -> tuple[str, list[VetItem]]:
    """``("suite"|"results", items)`` from a suite or a results file (told apart by its header)."""
    from pairflip.files import RESULTS_KIND, SUITE_KIND, iter_suite, read_results

    p = Path(path)
    kind = _kind_of(p)
    if kind == RESULTS_KIND:
        res = read_results(p)
        items = [VetItem(v.id, v.source, v.variant, v.family, v.rule, v.should, v.source_pred, v.variant_pred,
                         v.source_score, v.variant_score, v.verdict) for v in res.verdicts]
        if items and not any(i.source for i in items):
            raise PairflipError(f"{p}: the results records carry no texts; expected results written by `pairflip score`")
        return "results", items
    if kind == SUITE_KIND:
        _, pairs = iter_suite(p)
        return "suite", [VetItem(x.id, x.source, x.variant, x.family, x.rule, x.should) for x in pairs]
    # Let the suite reader say what is wrong with the file (empty, not JSON, wrong kind).
    _, pairs = iter_suite(p)
    list(pairs)
    raise PairflipError(f"{p}: expected a suite or a results file")  # pragma: no cover


def _kind_of(p: Path) -> str | None:
    import json

    if not p.is_file():
        return None
    try:
        with open(p, encoding="utf-8-sig") as fh:
            head = json.loads(fh.readline() or "null")
    except (UnicodeDecodeError, json.JSONDecodeError):
        return None
    return head.get("kind") if isinstance(head, dict) else None


def select(items: list[VetItem], decisions: dict[str, Decision], *, only: str = "unvetted",
           rule: list[str] | None = None, sample: int | None = None, seed: int = 0, kind: str = "suite") -> list[VetItem]:
    """The pairs to show, in order.

    ``only``: ``unvetted`` (no standing decision), ``violations`` (results files: the pairs the
    model failed, vetted or not), ``all``. ``rule``: family or family/rule names. ``sample``: a
    seeded random sample spread evenly over the rules (round robin over the rules, each rule's
    pairs shuffled), for estimating a suite's validity.
    """
    if only not in ONLY:
        raise PairflipError(f"--only {only!r}: expected one of {', '.join(ONLY)}")
    if only == "violations" and kind != "results":
        raise PairflipError("--only violations needs a results file (made by `pairflip score`); this is a suite")
    if sample is not None and sample < 1:
        raise PairflipError(f"--sample {sample}: expected a whole number of at least 1")
    chosen = items
    if rule:
        known = {i.rule for i in items} | {i.family for i in items}
        unknown = [r for r in rule if r not in known]
        if unknown:
            raise PairflipError(f"--rule {unknown[0]!r}: no pair of that rule or family in this file; "
                                f"it has {', '.join(sorted({i.rule for i in items})) or 'no pairs'}")
        chosen = [i for i in chosen if i.rule in rule or i.family in rule]
    if only == "unvetted":
        chosen = [i for i in chosen if i.id not in decisions]
    elif only == "violations":
        chosen = [i for i in chosen if i.verdict == "violation"]
    if sample is not None:
        rng = random.Random(seed)
        by_rule: dict[str, list[VetItem]] = {}
        for i in chosen:
            by_rule.setdefault(i.rule, []).append(i)
        queues = []
        for r in sorted(by_rule):
            q = list(by_rule[r])
            rng.shuffle(q)
            queues.append(q)
        rng.shuffle(queues)
        spread: list[VetItem] = []
        while len(spread) < sample and any(queues):
            for q in queues:
                if q and len(spread) < sample:
                    spread.append(q.pop())
        chosen = spread
    return chosen


@dataclass
class VetSession:
    """A walk through ``items`` that records every answer in ``log`` as it is given."""

    items: list[VetItem]
    log: DecisionLog
    pos: int = 0
    answered: list[int] = field(default_factory=list)  # positions answered, for undo
    accepted: int = 0
    rejected: int = 0
    changed: int = 0
    skipped: int = 0
    quit: bool = False

    @property
    def done(self) -> bool:
        return self.quit or self.pos >= len(self.items)

    @property
    def current(self) -> VetItem | None:
        return None if self.done else self.items[self.pos]

    def progress(self) -> str:
        n = min(self.pos + 1, len(self.items))
        return (f"{n} of {len(self.items)}  ·  accepted {self.accepted}, rejected {self.rejected}, "
                f"changed {self.changed}, skipped {self.skipped}")

    def standing(self, item: VetItem) -> Decision | None:
        return self.log.standing.get(item.id)

    def _answer(self, decision: str, **kw: Any) -> None:
        item = self.current
        if item is None:
            return
        self.log.add(item.id, decision, **kw)
        self.answered.append(self.pos)
        if decision == "accept":
            self.accepted += 1
        elif decision == "reject":
            self.rejected += 1
        else:
            self.changed += 1
        self.pos += 1

    def accept(self) -> None:
        self._answer("accept")

    def reject(self, reason: str, note: str = "") -> None:
        reason = REASON_KEYS.get(reason, reason)
        if reason not in REASONS:
            raise ValueError(f"reason {reason!r}: expected one of {', '.join(REASONS)} (keys {', '.join(REASON_KEYS)})")
        self._answer("reject", reason=reason, note=note)

    def change(self, should: str) -> None:
        should = SHOULD_KEYS.get(should, should)
        if should not in SHOULDS:
            raise ValueError(f"expectation {should!r}: expected one of {', '.join(SHOULDS)} (keys {' '.join(SHOULD_KEYS)})")
        item = self.current
        if item is not None and should == item.should:
            self.accept()  # "changed" to what it already was: an accept
            return
        self._answer("change", should=should, was=item.should if item else None)

    def skip(self) -> None:
        if self.current is not None:
            self.skipped += 1
            self.answered.append(-1 - self.pos)  # a skip is undone by stepping back only
            self.pos += 1

    def undo(self) -> bool:
        """Take back the last answer (or skip) and show that pair again; False if none."""
        if not self.answered:
            return False
        last = self.answered.pop()
        if last < 0:
            self.pos = -1 - last
            self.skipped -= 1
            return True
        self.pos = last
        d = self.log.standing.get(self.items[last].id)
        self.log.undo(self.items[last].id)
        if d is not None:
            if d.decision == "accept":
                self.accepted -= 1
            elif d.decision == "reject":
                self.rejected -= 1
            else:
                self.changed -= 1
        return True

    def stop(self) -> None:
        self.quit = True
