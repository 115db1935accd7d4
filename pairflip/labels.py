"""Label -> polarity (-1, 0, +1) and, for ordinal scales, a rank.

Expectations are judged on polarity, so every label a model emits must map to one. Common label
sets are recognised; anything else needs an explicit order from most negative to most positive
(``--labels bad,meh,good``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Iterable, Mapping, Sequence

from pairflip.records import PairflipError

# Recognised label sets, each from most negative to most positive (common practice).
KNOWN_SCALES: tuple[tuple[str, ...], ...] = (
    ("negative", "neutral", "positive"),
    ("negative", "positive"),
    ("neg", "neu", "pos"),
    ("neg", "neutral", "pos"),
    ("neg", "pos"),
    ("0", "1"),
    ("-1", "0", "1"),
    ("1", "2", "3", "4", "5"),  # star ratings, 3 is neutral
)


def _norm(label: Any) -> str:
    """Labels are compared as strings; 1.0 and True from numpy/JSON become '1'."""
    if isinstance(label, bool):
        return "1" if label else "0"
    if isinstance(label, float) and label.is_integer():
        return str(int(label))
    try:  # numpy scalars
        import numpy as np

        if isinstance(label, np.generic):
            return _norm(label.item())
    except ImportError:  # pragma: no cover
        pass
    return str(label).strip()


@dataclass
class LabelMap:
    """An ordered label scale with a polarity for each label.

    With an odd number of labels the middle one is neutral (polarity 0); labels below it are
    negative, above it positive. With an even number there is no neutral label.
    """

    order: tuple[str, ...]
    polarity: dict[str, int] = field(default_factory=dict)
    source: str = "given"  # "given" (--labels), "recognised", or "model classes"

    def __post_init__(self) -> None:
        if len(self.order) < 2:
            raise PairflipError(f"a label scale needs at least two labels, got {list(self.order)}")
        if len(set(self.order)) != len(self.order):
            raise PairflipError(f"the label scale repeats a label: {list(self.order)}")
        if not self.polarity:
            n = len(self.order)
            mid = (n - 1) / 2
            self.polarity = {lab: (0 if i == mid else (-1 if i < mid else 1)) for i, lab in enumerate(self.order)}

    @classmethod
    def from_labels(cls, labels: Sequence[Any] | str) -> "LabelMap":
        if isinstance(labels, str):
            labels = [s for s in (x.strip() for x in labels.split(",")) if s]
        return cls(order=tuple(_norm(x) for x in labels), source="given")

    @classmethod
    def recognise(cls, seen: Iterable[Any]) -> "LabelMap":
        """Pick the smallest known scale that holds every label seen (case-insensitive)."""
        seen_n = {_norm(s) for s in seen}
        lower = {s.lower(): s for s in seen_n}
        for scale in KNOWN_SCALES:
            if set(lower) <= set(scale):
                # keep the model's own spelling ("Positive" stays "Positive")
                order = tuple(lower.get(s, s) for s in scale)
                m = cls(order=order, source="recognised")
                return m
        raise PairflipError(
            f"cannot tell the polarity of the labels {sorted(seen_n)}; "
            f"pass --labels from most negative to most positive, for example --labels {','.join(sorted(seen_n))}"
        )

    def rank(self, label: Any) -> int:
        return self.order.index(self._lookup(label))

    def _lookup(self, label: Any) -> str:
        lab = _norm(label)
        if lab in self.polarity:
            return lab
        for k in self.polarity:
            if k.lower() == lab.lower():
                return k
        raise PairflipError(
            f"the model returned the label {lab!r}, which is not in the label mapping in force "
            f"({self.describe()}); pass --labels from most negative to most positive"
        )

    def polarity_of(self, label: Any) -> int:
        return self.polarity[self._lookup(label)]

    def canonical(self, label: Any) -> str:
        return self._lookup(label)

    def score_from_probabilities(self, probabilities: Mapping[Any, float], *, where: str = "") -> float:
        """Expected polarity: sum of p(label) x polarity(label), in [-1, 1].

        Probabilities must be finite, non-negative and sum to 1 (within 1e-3).
        """
        total = 0.0
        score = 0.0
        for lab, p in probabilities.items():
            p = float(p)
            if not math.isfinite(p) or p < 0:
                raise PairflipError(f"{where}probability {p!r} for label {_norm(lab)!r} is not a finite number >= 0")
            total += p
            score += p * self.polarity_of(lab)
        if abs(total - 1.0) > 1e-3:
            raise PairflipError(f"{where}probabilities sum to {total:.6g}, expected 1")
        return max(-1.0, min(1.0, score))

    def describe(self) -> str:
        return ", ".join(f"{k}={v:+d}" for k, v in self.polarity.items())

    def to_dict(self) -> dict[str, Any]:
        return {"order": list(self.order), "polarity": dict(self.polarity), "source": self.source}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> "LabelMap":
        return cls(order=tuple(d["order"]), polarity={str(k): int(v) for k, v in d["polarity"].items()},
                   source=str(d.get("source", "given")))
