"""The demo's three sentiment models, trained on ``reviews.csv`` (invented outdoor-gear reviews).

- ``unigram``: word counts -> logistic regression (a bag of words: blind to word order)
- ``bigram``: word and word-pair counts -> logistic regression
- ``deep-bow``: word counts -> a multi-layer perceptron with tanh hidden layers ("deep bag of words")

Each is a fitted scikit-learn ``Pipeline`` (``predict``, ``predict_proba``, ``classes_``), so it
can be saved with joblib and given to ``pairflip score --model path.joblib``.
"""

from __future__ import annotations

import csv
from functools import lru_cache
from importlib import resources
from typing import Any

MODEL_NAMES = ("unigram", "bigram", "deep-bow")


def demo_path(name: str) -> Any:
    """A bundled demo file (``reviews.csv`` or ``sentences.txt``)."""
    return resources.files("pairflip.demo").joinpath(name)


def load_reviews() -> tuple[list[str], list[str]]:
    with demo_path("reviews.csv").open("r", encoding="utf-8", newline="") as fh:
        rows = list(csv.DictReader(fh))
    return [r["text"] for r in rows], [r["label"] for r in rows]


def load_sentences() -> list[str]:
    text = demo_path("sentences.txt").read_text(encoding="utf-8")
    return [line.strip() for line in text.splitlines() if line.strip()]


def make_model(name: str, seed: int = 0) -> Any:
    """An unfitted pipeline for one of :data:`MODEL_NAMES`."""
    from sklearn.feature_extraction.text import CountVectorizer
    from sklearn.linear_model import LogisticRegression
    from sklearn.neural_network import MLPClassifier
    from sklearn.pipeline import Pipeline

    if name == "unigram":
        return Pipeline([("counts", CountVectorizer(ngram_range=(1, 1))), ("clf", LogisticRegression(max_iter=2000, C=1.0))])
    if name == "bigram":
        return Pipeline([("counts", CountVectorizer(ngram_range=(1, 2))), ("clf", LogisticRegression(max_iter=2000, C=1.0))])
    if name == "deep-bow":
        return Pipeline(
            [
                ("counts", CountVectorizer(ngram_range=(1, 1))),
                ("clf", MLPClassifier(hidden_layer_sizes=(64, 32), activation="tanh", max_iter=400,
                                      alpha=1e-3, random_state=seed)),
            ]
        )
    raise ValueError(f"unknown demo model {name!r}; expected one of {', '.join(MODEL_NAMES)}")


@lru_cache(maxsize=8)
def trained(name: str, seed: int = 0) -> Any:
    """A demo model fitted on the bundled reviews (cached for the process)."""
    texts, labels = load_reviews()
    return make_model(name, seed).fit(texts, labels)


def unigram(texts: list[str]) -> list[str]:
    """``pairflip.demo.models:unigram`` as a model SPEC: label texts with the unigram model."""
    return list(trained("unigram").predict(texts))


def unigram_scored(texts: list[str]) -> list[dict[str, Any]]:
    """``pairflip.demo.models:unigram_scored``: the unigram model with its class probabilities.

    A model that gives labels only cannot show a strengthen/weaken pair moving (both sides keep
    one label, so the pair is n/a); this one gives scores, so every intensifier pair is judged.
    """
    model = trained("unigram")
    classes = [str(c) for c in model.classes_]
    out = []
    for row in model.predict_proba(texts):
        probs = {c: float(p) for c, p in zip(classes, row)}
        out.append({"label": max(probs, key=probs.get), "probabilities": probs})
    return out


def bigram(texts: list[str]) -> list[str]:
    return list(trained("bigram").predict(texts))


def deep_bow(texts: list[str]) -> list[str]:
    return list(trained("deep-bow").predict(texts))
