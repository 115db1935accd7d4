"""Plain records that the four stages pass to each other.

Every stage talks to the next only through these dataclasses and the two JSON Lines files
(see :mod:`pairflip.files`). Each record keeps the keys it does not know in ``extra`` so that a
file written by a newer pairflip survives a round trip through an older one.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass, field
from typing import Any, Iterable, Iterator

FAMILIES = ("negation", "double-negation", "intensifier", "reorder", "contrast")
SHOULDS = ("flip", "hold", "strengthen", "weaken", "rise", "fall", "none")
VERDICTS = ("ok", "violation", "n/a")


class PairflipError(Exception):
    """A problem with the user's input: the CLI prints the message and exits with code 2.

    The message must say what was wrong and where (file, line, field), and what was expected.
    The CLI prints it on one line unless ``keep_lines`` is set (a limit with its caret line).
    """

    keep_lines = False


class Interrupted(KeyboardInterrupt):
    """A real SIGINT/SIGTERM received by the command line (raised by its signal handler).

    A plain ``KeyboardInterrupt`` (or ``SystemExit``) raised by *model code* is a model failure,
    not a user's interrupt; adapters tell the two apart by this class.
    """


def stable_id(*parts: str, length: int = 16) -> str:
    """A content hash: the same parts always give the same id, on every machine."""
    digest = hashlib.sha256("\x1f".join(parts).encode("utf-8")).hexdigest()
    return digest[:length]


@dataclass(frozen=True)
class Edit:
    """A character-span replacement in the *source* text: ``source[start:end]`` became ``text``."""

    start: int
    end: int
    text: str

    def to_dict(self) -> dict[str, Any]:
        return {"start": self.start, "end": self.end, "text": self.text}


@dataclass(frozen=True)
class SourceText:
    """One text of a corpus, with where it came from (for error messages) and its gold label."""

    text: str
    label: str | None = None
    where: str = ""  # "corpus.csv:12", used in messages

    @property
    def id(self) -> str:
        return stable_id("source", self.text)


@dataclass(slots=True)  # slots: scoring reads every pair's fields, and suites hold millions
class Pair:
    """A minimal pair: a source, a rule-made variant, and what the label *should* do."""

    source: str
    variant: str
    family: str
    rule: str
    should: str
    edits: list[Edit] = field(default_factory=list)
    source_id: str = ""
    label: str | None = None
    meta: dict[str, Any] = field(default_factory=dict)
    id: str = ""
    extra: dict[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if not self.source_id:
            self.source_id = stable_id("source", self.source)
        if not self.id:
            self.id = stable_id("pair", self.rule, self.source, self.variant)

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = dict(self.extra)
        out.update(
            {
                "id": self.id,
                "source": self.source,
                "variant": self.variant,
                "family": self.family,
                "rule": self.rule,
                "should": self.should,
                "edits": [e.to_dict() for e in self.edits],
                "source_id": self.source_id,
            }
        )
        if self.label is not None:
            out["label"] = self.label
        if self.meta:
            out["meta"] = self.meta
        return out

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> "Pair":
        known = {"id", "source", "variant", "family", "rule", "should", "edits", "source_id", "label", "meta"}
        return cls(
            id=str(d["id"]),
            source=d["source"],
            variant=d["variant"],
            family=d["family"],
            rule=d["rule"],
            should=d["should"],
            edits=[Edit(int(e["start"]), int(e["end"]), str(e["text"])) for e in d.get("edits", [])],
            source_id=str(d.get("source_id", "")),
            label=None if d.get("label") is None else str(d["label"]),
            meta=dict(d.get("meta") or {}),
            extra={k: v for k, v in d.items() if k not in known},
        )


@dataclass
class Suite:
    """A header saying how the suite was made, and its pairs (a list, or a lazy iterable)."""

    header: dict[str, Any]
    pairs: list[Pair]
    stats: Any = None  # the build's per-rule made/dropped counts (perturb.BuildStats), if built here

    def __iter__(self) -> Iterator[Pair]:
        return iter(self.pairs)

    def __len__(self) -> int:
        return len(self.pairs)

    def sha256(self) -> str:
        """Hash of the pairs' content (not of the header's date), so a rebuilt suite matches.

        Pair ids are already content hashes of rule, source and variant; the expectation and
        family are added so a changed expectation changes the suite hash.
        """
        return suite_sha256(self.pairs)


def suite_sha256(pairs: Iterable["Pair"]) -> str:
    """SHA-256 of every pair's ``id TAB family TAB should`` line, in order."""
    return hashlib.sha256("".join([f"{p.id}\t{p.family}\t{p.should}\n" for p in pairs]).encode("utf-8")).hexdigest()


def text_digest(text: str) -> bytes:
    """A short digest of a text, for de-duplicating huge corpora without keeping the texts."""
    return hashlib.blake2b(text.encode("utf-8"), digest_size=12).digest()


@dataclass(slots=True)  # not frozen: a frozen init costs twice as much, and suites hold millions
class Prediction:
    """A model's output on one text.

    ``label`` is the predicted label as a string. ``score`` is the polarity score in [-1, 1]
    (expected polarity under the model's probabilities, or the model's own scalar score) when the
    model gives one; ``probabilities`` maps label -> probability when the model gives them.
    """

    label: str
    score: float | None = None
    probabilities: dict[str, float] | None = None


@dataclass(slots=True)
class Verdict:
    """One scored pair: both predictions and whether the expectation was kept."""

    id: str
    source_pred: str
    variant_pred: str
    verdict: str  # "ok" | "violation" | "n/a"
    source_score: float | None = None
    variant_score: float | None = None
    # Copied from the pair so a results file can be shown without its suite.
    family: str = ""
    rule: str = ""
    should: str = ""
    source: str = ""
    variant: str = ""
    source_id: str = ""
    label: str | None = None
    extra: dict[str, Any] = field(default_factory=dict)

    @property
    def flipped(self) -> bool:
        return self.source_pred != self.variant_pred

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = dict(self.extra)
        out.update(
            {
                "id": self.id,
                "source_pred": self.source_pred,
                "variant_pred": self.variant_pred,
            }
        )
        if self.source_score is not None:
            out["source_score"] = self.source_score
        if self.variant_score is not None:
            out["variant_score"] = self.variant_score
        out["verdict"] = self.verdict
        out.update(
            {
                "family": self.family,
                "rule": self.rule,
                "should": self.should,
                "source": self.source,
                "variant": self.variant,
                "source_id": self.source_id,
            }
        )
        if self.label is not None:
            out["label"] = self.label
        return out

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> "Verdict":
        known = {
            "id", "source_pred", "variant_pred", "verdict", "source_score", "variant_score",
            "family", "rule", "should", "source", "variant", "source_id", "label",
        }
        def _f(x: Any) -> float | None:
            return None if x is None else float(x)
        return cls(
            id=str(d["id"]),
            source_pred=str(d["source_pred"]),
            variant_pred=str(d["variant_pred"]),
            verdict=str(d["verdict"]),
            source_score=_f(d.get("source_score")),
            variant_score=_f(d.get("variant_score")),
            family=str(d.get("family", "")),
            rule=str(d.get("rule", "")),
            should=str(d.get("should", "")),
            source=str(d.get("source", "")),
            variant=str(d.get("variant", "")),
            source_id=str(d.get("source_id", "")),
            label=None if d.get("label") is None else str(d["label"]),
            extra={k: v for k, v in d.items() if k not in known},
        )


@dataclass
class Results:
    """A header (suite hash and path, model description, label mapping) and one verdict per pair."""

    header: dict[str, Any]
    verdicts: list[Verdict]

    def __iter__(self) -> Iterator[Verdict]:
        return iter(self.verdicts)

    def __len__(self) -> int:
        return len(self.verdicts)

    @property
    def suite_sha256(self) -> str:
        return str((self.header.get("suite") or {}).get("sha256", ""))

    @property
    def model_name(self) -> str:
        m = self.header.get("model") or {}
        return str(m.get("name") or m.get("spec") or "model")


def families_of(items: Iterable[Pair | Verdict]) -> list[str]:
    """Family names in first-seen order."""
    seen: dict[str, None] = {}
    for it in items:
        seen.setdefault(it.family, None)
    return list(seen)
