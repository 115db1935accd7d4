"""Counterfactual training rows from minimal pairs (``pairflip augment``). Pure logic: no files.

A pair whose expectation fixes the variant's label gives one new training row: the variant's
text with the label it should carry, and where it came from (the source's id and the rule).
Training on minimally edited copies whose label follows the edit is counterfactually augmented
data (Kaushik, Hovy & Lipton 2020, "Learning the Difference that Makes a Difference with
Counterfactually-Augmented Data", ICLR); here the edits are the build's rules.

How each expectation sets the new label (the source's own label on ``scale``, most negative
first):

- ``flip``: the mirror label, the same distance from the other end of the scale: negative <->
  positive, 0 <-> 1, and on five stars 1 <-> 5, 2 <-> 4. A neutral source has no opposite: skipped.
- ``hold``: the source's label.
- ``strengthen`` / ``weaken``: the source's label (the polarity is kept). With ``ordinal_steps``
  on a scale with more than one label per polarity (five stars), one step away from the middle for
  strengthen (4 -> 5, 2 -> 1) and one step toward it for weaken (5 -> 4, 1 -> 2), never onto the
  neutral middle (4 stays 4 under weaken): the expectation keeps the polarity, so the label does.
- ``rise`` / ``fall`` (the contrast family): the expectation says which way the score moves, not
  which label the variant has, so no row is written; they are counted as skipped, with the reason.
- ``none`` (diagnostic rules such as ``reorder/shuffle``, ungrammatical on purpose): no row.
"""

from __future__ import annotations

from collections import Counter, defaultdict
from dataclasses import dataclass, field
from typing import Any, Iterable, Iterator, Mapping

from pairflip.labels import LabelMap
from pairflip.records import Pair, PairflipError, text_digest

# Why a pair gave no row (the keys of AugmentStats.skipped).
NO_FIXED_LABEL = "no fixed label (should rise/fall)"
DIAGNOSTIC = "diagnostic rule (should none)"
NEUTRAL_SOURCE = "neutral source (flip has no opposite)"
REJECTED = "rejected when vetted"
NO_LABEL = "source without a label"
DUPLICATE = "text already written"
IN_CORPUS = "text already in the corpus"

LABEL_FIXED = ("flip", "hold", "strengthen", "weaken")


@dataclass(frozen=True)
class AugmentedRow:
    """One new training row: the variant's text, its label, and where it came from."""

    text: str
    label: str
    source: str  # the labelled text the pair was made from
    source_id: str
    rule: str
    should: str
    pair_id: str


@dataclass
class AugmentStats:
    """What augmenting did: rows written per rule, pairs skipped per rule and reason."""

    written: Counter = field(default_factory=Counter)  # rule -> rows
    skipped: dict[str, Counter] = field(default_factory=lambda: defaultdict(Counter))  # rule -> reason -> n
    excluded_texts: int = 0  # corpus texts left out because an --exclude suite holds them
    labels: dict[str, int] = field(default_factory=Counter)  # new label -> rows

    @property
    def rows(self) -> int:
        return sum(self.written.values())

    def to_dict(self) -> dict[str, Any]:
        return {
            "rows": self.rows,
            "written": dict(self.written),
            "skipped": {r: dict(c) for r, c in self.skipped.items()},
            "excluded_texts": self.excluded_texts,
            "labels": dict(self.labels),
        }


def mirror(label: str, scale: LabelMap) -> str | None:
    """The label as far from the positive end as ``label`` is from the negative end; None for
    the neutral middle (which is its own mirror)."""
    i = scale.rank(label)
    j = len(scale.order) - 1 - i
    return None if i == j else scale.order[j]


def step(label: str, scale: LabelMap, outward: bool) -> str:
    """One step away from (``outward``) or toward the middle of the scale, when that step keeps
    the label's polarity; else the label itself (the ends and the last label before neutral)."""
    i = scale.rank(label)
    pol = scale.polarity_of(label)
    if pol == 0:
        return scale.canonical(label)
    towards_end = 1 if pol > 0 else -1
    j = i + (towards_end if outward else -towards_end)
    if not 0 <= j < len(scale.order) or scale.polarity[scale.order[j]] != pol:
        return scale.canonical(label)
    return scale.order[j]


def new_label(should: str, label: str, scale: LabelMap, *, ordinal_steps: bool = False) -> tuple[str | None, str]:
    """The variant's label for a pair with this expectation on a source labelled ``label``.

    Returns ``(label, "")``, or ``(None, reason)`` when the expectation fixes no label.
    """
    if should == "flip":
        m = mirror(label, scale)
        return (m, "") if m is not None else (None, NEUTRAL_SOURCE)
    if should == "hold":
        return scale.canonical(label), ""
    if should in ("strengthen", "weaken"):
        if ordinal_steps:
            return step(label, scale, outward=should == "strengthen"), ""
        return scale.canonical(label), ""
    if should in ("rise", "fall"):
        return None, NO_FIXED_LABEL
    if should == "none":
        return None, DIAGNOSTIC
    raise PairflipError(f"unknown expectation {should!r} (expected one of flip, hold, strengthen, weaken, rise, fall, none)")


@dataclass
class SourceSet:
    """The sources of a suite (or of a training file), to keep test and training data apart.

    A source matches by id (a pair's ``source_id``, the ``text_id`` of a sentence source, and the
    text id before ``:INDEX``) or by its text (exactly, after stripping).
    """

    ids: set[str] = field(default_factory=set)
    texts: set[bytes] = field(default_factory=set)

    def add_id(self, sid: Any) -> None:
        if isinstance(sid, str) and sid:
            self.ids.add(sid)
            head = sid.split(":", 1)[0]
            if head != sid:
                self.ids.add(head)

    def add_text(self, text: Any) -> None:
        if isinstance(text, str) and text.strip():
            self.texts.add(text_digest(text.strip()))

    def add_item(self, item: Any) -> None:
        """A pair or a verdict: its source id, the id of the text it was cut from, its source text."""
        self.add_id(getattr(item, "source_id", ""))
        self.add_id((getattr(item, "extra", None) or {}).get("text_id", ""))
        self.add_text(getattr(item, "source", ""))

    def holds_text(self, text: str) -> bool:
        from pairflip.records import stable_id

        return stable_id("source", text) in self.ids or text_digest(text.strip()) in self.texts

    def holds_item(self, item: Any) -> bool:
        ids = [getattr(item, "source_id", ""), (getattr(item, "extra", None) or {}).get("text_id", "")]
        for sid in ids:
            if isinstance(sid, str) and sid and (sid in self.ids or sid.split(":", 1)[0] in self.ids):
                return True
        src = getattr(item, "source", "")
        return isinstance(src, str) and bool(src.strip()) and text_digest(src.strip()) in self.texts

    def __len__(self) -> int:
        return len(self.ids) + len(self.texts)


def suite_sources(pairs: Iterable[Any]) -> SourceSet:
    """Every source of these pairs (or verdicts)."""
    out = SourceSet()
    for p in pairs:
        out.add_item(p)
    return out


def leaked_sources(items: Iterable[Any], training: SourceSet) -> tuple[int, int]:
    """``(sources found in the training data, distinct sources)`` of these pairs or verdicts,
    a source counted once (by its id, else its text)."""
    seen: dict[str, bool] = {}
    for it in items:
        key = getattr(it, "source_id", "") or getattr(it, "source", "")
        if key not in seen:
            seen[key] = training.holds_item(it)
    return sum(seen.values()), len(seen)


def augment_rows(
    pairs: Iterable[Pair],
    scale: LabelMap,
    *,
    ordinal_steps: bool = False,
    decisions: Mapping[str, Any] | None = None,
    known_texts: set[bytes] | None = None,
    stats: AugmentStats | None = None,
) -> Iterator[AugmentedRow]:
    """New training rows from ``pairs`` (each carrying its source's gold ``label``), lazily.

    ``decisions`` (from :func:`pairflip.decisions.read_decisions`): rejected pairs give no row,
    a changed expectation is the one applied. ``known_texts`` (digests of the corpus's texts,
    :func:`pairflip.records.text_digest`): a variant that is already a text of the corpus is not
    written again (it has its own label there). A variant already written (two rules, or two
    sources, making the same text) is written once, with the first label.
    """
    from pairflip.decisions import apply_decisions

    stats = stats if stats is not None else AugmentStats()
    written: set[bytes] = set()
    for pair in pairs:
        if decisions:
            kept, _ = apply_decisions([pair], decisions)  # type: ignore[arg-type]
            if not kept:
                stats.skipped[pair.rule][REJECTED] += 1
                continue
        if pair.label is None:
            stats.skipped[pair.rule][NO_LABEL] += 1
            continue
        label, reason = new_label(pair.should, pair.label, scale, ordinal_steps=ordinal_steps)
        if label is None:
            stats.skipped[pair.rule][reason] += 1
            continue
        key = text_digest(pair.variant.strip())
        if known_texts is not None and key in known_texts:
            stats.skipped[pair.rule][IN_CORPUS] += 1
            continue
        if key in written:
            stats.skipped[pair.rule][DUPLICATE] += 1
            continue
        written.add(key)
        stats.written[pair.rule] += 1
        stats.labels[label] += 1
        yield AugmentedRow(text=pair.variant, label=label, source=pair.source, source_id=pair.source_id,
                           rule=pair.rule, should=pair.should, pair_id=pair.id)
