"""Label -> polarity (-1, 0, +1) and, for ordinal scales, a rank.

Expectations are judged on polarity, so every label a model emits must map to one. These label
sets are recognised, case-insensitively, each listed from most negative to most positive:

- ``negative, neutral, positive`` and ``negative, positive``
- ``neg, neu, pos``, ``neg, neutral, pos`` and ``neg, pos``
- ``0, 1`` (1 is positive), ``-1, 0, 1``
- ``1, 2, 3, 4, 5`` (star ratings; 3 is neutral)

Anything else needs an explicit order from most negative to most positive
(``--labels bad,meh,good``). With an odd number of labels the middle one is neutral.

The *polarity score* of a prediction with probabilities is the expected polarity,
``sum(p(label) * polarity(label))``, always in [-1, 1]; a scalar score given by the model itself
must already lie in [-1, 1].
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from collections.abc import Mapping
from typing import Any, Iterable, Sequence

from pairflip.records import PairflipError

# Recognised label sets, each from most negative to most positive (common practice: these are
# the label names scikit-learn examples, sentiment corpora and star-rated review sites use).
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

# Probabilities may be rounded by the model (three classes at 0.33 each); a larger gap is a bug.
PROBABILITY_TOLERANCE = 0.01


def normalise_label(label: Any) -> str:
    """Labels are compared as strings; 1.0, numpy.int64(1) and True all become ``'1'``."""
    if type(label) is str:  # the common case, first
        return label.strip()
    if isinstance(label, bool):
        return "1" if label else "0"
    if isinstance(label, float) and label.is_integer():
        return str(int(label))
    try:  # numpy scalars
        import numpy as np

        if isinstance(label, np.generic):
            return normalise_label(label.item())
    except ImportError:  # pragma: no cover
        pass
    return str(label).strip()


_norm = normalise_label  # short alias used inside the package


def _show(labels: Iterable[str]) -> str:
    return "[" + ", ".join(repr(x) for x in labels) + "]"


@dataclass
class LabelMap:
    """An ordered label scale with a polarity for each label.

    With an odd number of labels the middle one is neutral (polarity 0); labels below it are
    negative, above it positive. With an even number there is no neutral label.
    """

    order: tuple[str, ...]
    polarity: dict[str, int] = field(default_factory=dict)
    source: str = "given"  # "given" (--labels) or "recognised"

    def __post_init__(self) -> None:
        self.order = tuple(self.order)
        if len(self.order) < 2:
            raise PairflipError(f"a label scale needs at least two labels, got {list(self.order)}")
        if any(not lab for lab in self.order):
            raise PairflipError(f"the label scale {list(self.order)} holds an empty label")
        lowered = [lab.lower() for lab in self.order]
        if len(set(lowered)) != len(lowered):
            raise PairflipError(f"the label scale repeats a label (labels are case-insensitive): {list(self.order)}")
        if not self.polarity:
            n = len(self.order)
            mid = (n - 1) / 2
            self.polarity = {lab: (0 if i == mid else (-1 if i < mid else 1)) for i, lab in enumerate(self.order)}
        self._lower = {k.lower(): k for k in self.order}

    # ------------------------------------------------------------------ construction

    @classmethod
    def from_labels(cls, labels: Sequence[Any] | str) -> "LabelMap":
        """An explicit scale, most negative first: ``"bad,meh,good"`` or ``["bad", "meh", "good"]``."""
        if isinstance(labels, str):
            items = [x.strip() for x in labels.split(",")]
            for i, x in enumerate(items, 1):
                if not x:
                    raise PairflipError(
                        f"--labels {labels!r}: item {i} is empty; expected labels separated by commas, "
                        f"most negative first, for example --labels bad,meh,good"
                    )
            labels = items
        return cls(order=tuple(normalise_label(x) for x in labels), source="given")

    @classmethod
    def recognise(cls, seen: Iterable[Any]) -> "LabelMap":
        """The smallest known scale that holds every label seen (case-insensitive).

        When the labels seen fit several known scales that disagree on a label's polarity (a model
        that only ever said ``"1"``: positive on a 0/1 scale, negative in star ratings), and they
        are not exactly one scale, the labels are ambiguous and ``--labels`` is required.
        """
        seen_n = sorted({normalise_label(s) for s in seen})
        if not seen_n:
            raise PairflipError("the model produced no labels, so there is no label scale to recognise")
        lower = {s.lower(): s for s in seen_n}
        fits = sorted((s for s in KNOWN_SCALES if set(lower) <= set(s)), key=len)
        hint = f"pass --labels from most negative to most positive, for example --labels {','.join(seen_n)}"
        if not fits:
            raise PairflipError(f"cannot tell the polarity of the labels {_show(seen_n)}; {hint}")
        best = fits[0]
        if set(lower) != set(best):
            polar = [cls(order=s).polarity for s in fits]
            for lab in lower:
                if len({p[lab] for p in polar}) > 1:
                    raise PairflipError(
                        f"the labels {_show(seen_n)} fit several known scales that disagree on the polarity of "
                        f"{lower[lab]!r} ({' or '.join(','.join(s) for s in fits)}); {hint}"
                    )
        order = tuple(lower.get(s, s) for s in best)  # keep the model's spelling ("Positive" stays)
        return cls(order=order, source="recognised")

    # ------------------------------------------------------------------ lookups

    def _lookup(self, label: Any) -> str | None:
        if type(label) is str and label in self.polarity:  # fast path: already canonical
            return label
        lab = normalise_label(label)
        if lab in self.polarity:
            return lab
        return self._lower.get(lab.lower())

    def canonical(self, label: Any) -> str:
        """The label as the scale spells it; raises for a label outside the scale."""
        found = self._lookup(label)
        if found is None:
            raise PairflipError(
                f"the model returned the label {normalise_label(label)!r}, which is not in the label mapping "
                f"in force ({self.describe()}); pass --labels from most negative to most positive"
            )
        return found

    def polarity_of(self, label: Any) -> int:
        return self.polarity[self.canonical(label)]

    def rank(self, label: Any) -> int:
        """Position on the scale, 0 = most negative."""
        return self.order.index(self.canonical(label))

    def strength(self, label: Any) -> float:
        """Distance of the label from the middle of the scale (5 stars: 2.0, 4 stars: 1.0, 3: 0.0)."""
        return abs(self.rank(label) - (len(self.order) - 1) / 2)

    def check(self, seen: Iterable[Any], *, where: str = "") -> None:
        """Raise one error naming every label seen that the scale does not hold."""
        seen_n = sorted({normalise_label(s) for s in seen})
        unknown = [s for s in seen_n if self._lookup(s) is None]
        if unknown:
            raise PairflipError(
                f"{where}the label{'s' if len(unknown) > 1 else ''} {_show(unknown)} "
                f"{'are' if len(unknown) > 1 else 'is'} not in the label mapping in force ({self.describe()}, "
                f"{'from --labels' if self.source == 'given' else self.source}); the model's labels seen: "
                f"{_show(seen_n)}; pass --labels with every one of them, from most negative to most positive"
            )

    # ------------------------------------------------------------------ scores

    def score_from_probabilities(self, probabilities: Mapping[Any, float], *, where: str = "") -> float:
        """Expected polarity: ``sum(p(label) * polarity(label))``, in [-1, 1].

        Probabilities must be finite, non-negative and sum to 1 (within
        :data:`PROBABILITY_TOLERANCE`; the score is computed from the renormalised values).
        """
        if not all(type(k) is str and k in self.polarity for k in probabilities):
            self.check(probabilities, where=where)
        total = 0.0
        score = 0.0
        for lab, p in probabilities.items():
            p = _finite(p)
            if p is None or p < 0:
                raise PairflipError(
                    f"{where}probability {probabilities[lab]!r} for label {normalise_label(lab)!r} is not a finite number >= 0"
                )
            total += p
            score += p * self.polarity_of(lab)
        if abs(total - 1.0) > PROBABILITY_TOLERANCE:
            raise PairflipError(f"{where}probabilities sum to {total:.6g}, expected 1")
        return max(-1.0, min(1.0, score / total))

    def check_score(self, score: Any, *, where: str = "") -> float:
        """A model's own scalar score: a finite number in [-1, 1]."""
        s = _finite(score)
        if s is None or not -1.0 <= s <= 1.0:
            raise PairflipError(f"{where}score {score!r} is not a number in [-1, 1]")
        return s

    # ------------------------------------------------------------------ description

    def describe(self) -> str:
        return ", ".join(f"{k}={v:+d}" for k, v in self.polarity.items())

    def to_dict(self) -> dict[str, Any]:
        return {"order": list(self.order), "polarity": dict(self.polarity), "source": self.source}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> "LabelMap":
        return cls(order=tuple(d["order"]), polarity={str(k): int(v) for k, v in d["polarity"].items()},
                   source=str(d.get("source", "given")))


def _finite(x: Any) -> float | None:
    if isinstance(x, bool):
        return None
    try:
        f = float(x)
    except (TypeError, ValueError):
        return None
    return f if math.isfinite(f) else None


# More distinct values than this in a label column: it is not a class label (common practice: a
# sentiment scale has a handful of classes; 50 leaves room for fine-grained ratings).
MAX_LABELS = 50


def count_corpus_labels(
    items: Iterable[Any], *, path: Any, given: "LabelMap | None", name: str, opt: str, each: Any = None,
) -> tuple["LabelMap", dict[str, int]]:
    """Count the labels of a labelled corpus's items (each with ``.label`` and ``.where``).

    ``given`` (from ``--labels``) maps every label or fails on the first it does not know; without
    it the labels seen must form a known scale (else the error names ``path``). ``name`` says where the labels come from ("column
    'stars'") and ``opt`` the option that named it, for the messages. ``each(item)``, if given, is
    called on every item. Returns the label map and the counts of the labels as written."""
    counts: dict[str, int] = {}
    for item in items:
        if each is not None:
            each(item)
        lab = normalise_label(item.label)
        if given is not None:
            try:
                lab = given.canonical(lab)
            except PairflipError:
                raise PairflipError(
                    f"{item.where}: label {lab!r} ({name}) is not among --labels ({given.describe()}); "
                    f"expected one of {', '.join(given.order)}, or add it to --labels"
                ) from None
        elif lab not in counts and len(counts) >= MAX_LABELS:
            raise PairflipError(
                f"{item.where}: {name} holds more than {MAX_LABELS} distinct values; expected class labels "
                f"(is {opt} the right one?)"
            )
        counts[lab] = counts.get(lab, 0) + 1
    if given is None:
        try:
            given = LabelMap.recognise(counts)
        except PairflipError as err:
            raise PairflipError(f"{path}: {name}: {err}") from None
    return given, counts
