"""Python models for ``--model helpers.toy_models:NAME`` (tests put tests/ on the path)."""

from __future__ import annotations

from helpers.keyword_rules import CLASSES, label, probabilities, raw_score

received: list[str] = []  # every text any toy model here was asked about


def keyword_labels(texts: list[str]) -> list[str]:
    received.extend(texts)
    return [label(t) for t in texts]


def keyword_dicts(texts: list[str]) -> list[dict]:
    received.extend(texts)
    return [{"label": label(t), "probabilities": dict(zip(CLASSES, probabilities(t)))} for t in texts]


def keyword_scores(texts: list[str]) -> list[dict]:
    received.extend(texts)
    return [{"label": label(t), "score": max(-1.0, min(1.0, raw_score(t) / 2))} for t in texts]


class KeywordClassifier:
    """An object with predict / predict_proba / classes_, made without arguments."""

    classes_ = list(CLASSES)

    def predict(self, texts: list[str]) -> list[str]:
        received.extend(texts)
        return [label(t) for t in texts]

    def predict_proba(self, texts: list[str]) -> list[list[float]]:
        return [probabilities(t) for t in texts]


def star_ratings(texts: list[str]) -> list[int]:
    received.extend(texts)
    return [max(1, min(5, 3 + raw_score(t))) for t in texts]


def odd_labels(texts: list[str]) -> list[str]:
    return ["thumbs-up" if raw_score(t) >= 0 else "thumbs-down" for t in texts]


def one_too_few(texts: list[str]) -> list[str]:
    return [label(t) for t in texts][:-1]


def none_output(texts: list[str]) -> list:
    return [None if "lantern" in t else label(t) for t in texts]


def nan_output(texts: list[str]) -> list:
    return [float("nan") for _ in texts]


def bad_sum(texts: list[str]) -> list[dict]:
    return [{"probabilities": {"negative": 0.7, "positive": 0.7}} for _ in texts]


def score_out_of_range(texts: list[str]) -> list[dict]:
    return [{"label": "positive", "score": 3.5} for _ in texts]


def raises(texts: list[str]) -> list[str]:
    if any("stove" in t for t in texts):
        raise RuntimeError("the stove model ran out of fuel")
    received.extend(texts)
    return [label(t) for t in texts]


not_a_model = 42


class NeedsArguments:
    def __init__(self, path: str) -> None:
        self.path = path

    def predict(self, texts: list[str]) -> list[str]:  # pragma: no cover - never made
        return []


interrupt_at_call: int | None = None  # set by a test: that call raises KeyboardInterrupt
_calls = 0


def interruptible(texts: list[str]) -> list[str]:
    """Keyword labels; the ``interrupt_at_call``-th call raises KeyboardInterrupt (Ctrl-C)."""
    global _calls
    _calls += 1
    if interrupt_at_call is not None and _calls == interrupt_at_call:
        raise KeyboardInterrupt
    received.extend(texts)
    return [label(t) for t in texts]
