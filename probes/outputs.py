"""Model outputs kept column-wise: one block per batch, one table for the whole suite.

Scoring's own cost has to stay small beside a fast in-process model (a scikit-learn pipeline
labels a short text in about 13 µs), so outputs are not turned into one object per text:

- a batch of checked outputs is an :class:`Outputs` block. A probability matrix (scikit-learn,
  HTTP and ``cmd:`` models) stays a numpy array with each row's most probable column; labels with
  optional scalar scores (``{"label", "score"}`` dicts, plain labels) stay two lists; anything
  else is kept as checked :class:`~pairflip.records.Prediction` objects. A block is also a
  sequence of Predictions, made on demand, for the cache and for callers of ``model.predict``.
- :class:`TextTable` places every block at the positions of its texts among the suite's distinct
  texts and, once the label mapping is known, gives per-text arrays: label code on the scale,
  polarity, strength and polarity score (NaN where the model gives none).

The expected polarity of a probability row is summed column by column in class order, the same
floating-point operations, in the same order, as :func:`pairflip.probes.scoring.polarity_score`
does for one Prediction, so both paths give the same bits (tests/test_outputs.py checks it).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, Iterator

import numpy as np

from pairflip.labels import LabelMap
from pairflip.records import PairflipError, Prediction


class Outputs(Sequence):
    """One batch of checked model outputs, column-wise; a sequence of Predictions on demand.

    Exactly one of three forms:

    - ``probabilities``: an ``(n, k)`` float64 matrix over ``classes``, already checked (finite,
      >= 0, rows summing to 1); ``labels`` given, or each row's most probable class (``best``);
    - ``labels`` with optional ``scores`` (a list of floats in [-1, 1] or None), already checked;
    - ``predictions``: a list of checked Prediction objects.
    """

    __slots__ = ("_labels", "scores", "probabilities", "classes", "best", "predictions", "_n")

    def __init__(
        self,
        *,
        labels: list[str] | None = None,
        scores: list[float | None] | None = None,
        probabilities: np.ndarray | None = None,
        classes: list[str] | None = None,
        best: np.ndarray | None = None,
        predictions: list[Prediction] | None = None,
    ) -> None:
        self._labels = labels
        self.scores = scores
        self.probabilities = probabilities
        self.classes = classes
        self.best = best
        self.predictions = predictions
        if predictions is not None:
            self._n = len(predictions)
        elif probabilities is not None:
            self._n = probabilities.shape[0]
        else:
            assert labels is not None
            self._n = len(labels)

    @classmethod
    def of(cls, predictions: list[Prediction]) -> "Outputs":
        return cls(predictions=predictions)

    # ------------------------------------------------------------------ the sequence view

    @property
    def labels(self) -> list[str]:
        if self._labels is None:
            if self.predictions is not None:
                return [p.label for p in self.predictions]
            assert self.classes is not None and self.best is not None
            cls = self.classes
            self._labels = [cls[b] for b in self.best.tolist()]
        return self._labels

    def __len__(self) -> int:
        return self._n

    def __getitem__(self, i: Any) -> Any:
        if isinstance(i, slice):
            return [self[j] for j in range(*i.indices(self._n))]
        if self.predictions is not None:
            return self.predictions[i]
        if not -self._n <= i < self._n:
            raise IndexError(i)
        if self.probabilities is not None:
            assert self.classes is not None
            return Prediction(self.labels[i], None, dict(zip(self.classes, self.probabilities[i].tolist())))
        return Prediction(self.labels[i], None if self.scores is None else self.scores[i])

    def __iter__(self) -> Iterator[Prediction]:
        if self.predictions is not None:
            return iter(self.predictions)
        return (self[i] for i in range(self._n))

    def __eq__(self, other: object) -> bool:
        if isinstance(other, (Outputs, list, tuple)):
            return list(self) == list(other)
        return NotImplemented

    __hash__ = None  # type: ignore[assignment]

    def __repr__(self) -> str:
        return f"Outputs({list(self)!r})"

    def labels_seen(self) -> set[str]:
        """Every label this block names: its labels, and its classes or probability keys."""
        if self.predictions is not None:
            seen = {p.label for p in self.predictions}
            for p in self.predictions:
                if p.probabilities:
                    seen.update(p.probabilities)
            return seen
        seen = set(self.classes or ())
        if self._labels is not None:
            seen.update(self._labels)
        return seen


def expected_polarity(probabilities: np.ndarray, polarity: Sequence[float]) -> np.ndarray:
    """Row-wise ``sum(p * polarity) / sum(p)``, clipped to [-1, 1], summed column by column in
    the order of the classes (the operations of the one-Prediction path, in its order)."""
    n = probabilities.shape[0]
    total = np.zeros(n)
    acc = np.zeros(n)
    for j, w in enumerate(polarity):
        col = probabilities[:, j]
        total += col
        acc += col * float(w)
    return np.maximum(-1.0, np.minimum(1.0, acc / total))


class TextTable:
    """Outputs for ``n`` distinct texts, block by block, each block at its texts' positions."""

    def __init__(self, texts: Sequence[str]) -> None:
        self.texts = texts
        self.blocks: list[tuple[np.ndarray, Outputs]] = []

    def add(self, positions: np.ndarray, outputs: Outputs) -> None:
        self.blocks.append((positions, outputs))

    def labels_seen(self) -> set[str]:
        seen: set[str] = set()
        for _, out in self.blocks:
            seen |= out.labels_seen()
        return seen

    def as_dict(self) -> dict[str, Prediction]:
        """``{text: Prediction}`` for every text placed so far."""
        texts = self.texts
        out: dict[str, Prediction] = {}
        for pos, block in self.blocks:
            out.update(zip((texts[i] for i in pos.tolist()), block))
        return out

    def _merged(self) -> list[tuple[np.ndarray, Outputs]]:
        """The blocks, with probability matrices over the same classes (and labels taken from
        them) joined into one, so the arithmetic runs once per run rather than once per batch."""
        joined: dict[tuple[str, ...], list[tuple[np.ndarray, Outputs]]] = {}
        rest: list[tuple[np.ndarray, Outputs]] = []
        for pos, out in self.blocks:
            if out.probabilities is not None and out._labels is None and out.classes is not None:
                joined.setdefault(tuple(out.classes), []).append((pos, out))
            else:
                rest.append((pos, out))
        for cls, group in joined.items():
            if len(group) == 1:
                rest.append(group[0])
                continue
            rest.append((
                np.concatenate([pos for pos, _ in group]),
                Outputs(probabilities=np.concatenate([o.probabilities for _, o in group]), classes=list(cls),
                        best=np.concatenate([o.best for _, o in group])),
            ))
        return rest

    def resolve(self, lm: LabelMap, where: str = "") -> "Resolved":
        """Per-text arrays under the label mapping ``lm`` (every label seen must be on it)."""
        from pairflip.probes.scoring import polarity_score

        n = len(self.texts)
        order = lm.order
        rank_of: dict[str, int] = {}  # raw label -> position on the scale

        def rank(label: str) -> int:
            r = rank_of.get(label)
            if r is None:
                r = rank_of[label] = order.index(lm.canonical(label))
            return r

        code = np.full(n, -1, dtype=np.intp)
        score = np.full(n, np.nan)
        for pos, out in self._merged():
            if out.predictions is not None:
                preds = out.predictions
                code[pos] = [rank(p.label) for p in preds]
                texts = self.texts
                scs = []
                for i, p in zip(pos.tolist(), preds):
                    try:
                        sc = polarity_score(p, lm, where)
                    except PairflipError as err:
                        raise PairflipError(f"{err} (text {texts[i][:60]!r})") from None
                    scs.append(np.nan if sc is None else sc)
                score[pos] = scs
            elif out.probabilities is not None:
                assert out.classes is not None
                cls_rank = np.array([rank(c) for c in out.classes], dtype=np.intp)
                if out._labels is None:
                    code[pos] = cls_rank[out.best]
                else:
                    code[pos] = [rank(lab) for lab in out._labels]
                pol = [lm.polarity_of(c) for c in out.classes]
                score[pos] = expected_polarity(out.probabilities, pol)
            else:
                code[pos] = [rank(lab) for lab in out.labels]
                if out.scores is not None:
                    score[pos] = np.array(out.scores, dtype=float)  # None -> NaN
        if n and code.min() < 0:
            missing = int(np.flatnonzero(code < 0)[0])
            raise PairflipError(f"{where}no prediction for the text {self.texts[missing][:60]!r}")  # a bug, not input
        polarity = np.array([lm.polarity[lab] for lab in order], dtype=np.int8)
        mid = (len(order) - 1) / 2
        strength = np.array([abs(i - mid) for i in range(len(order))])
        return Resolved(order=order, code=code, polarity=polarity[code], strength=strength[code], score=score)


class Resolved:
    """Per-text arrays: ``code`` (position of the label on the scale), ``polarity`` (-1/0/+1),
    ``strength`` (distance of the label from the middle of the scale) and ``score`` (NaN where
    the model gives no polarity score)."""

    __slots__ = ("order", "code", "polarity", "strength", "score")

    def __init__(self, *, order: tuple[str, ...], code: np.ndarray, polarity: np.ndarray,
                 strength: np.ndarray, score: np.ndarray) -> None:
        self.order = order
        self.code = code
        self.polarity = polarity
        self.strength = strength
        self.score = score

    def labels_at(self, idx: np.ndarray) -> list[str]:
        """The canonical label of each text position in ``idx``."""
        return np.array(self.order, dtype=object)[self.code[idx]].tolist()

    def scores_at(self, idx: np.ndarray) -> list[float | None]:
        """The polarity score of each text position in ``idx``, None where there is none."""
        s = self.score[idx]
        out = s.tolist()
        if np.isnan(s).any():
            out = [None if x != x else x for x in out]  # NaN is the only value unequal to itself
        return out
