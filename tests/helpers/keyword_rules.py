"""A toy sentiment scorer over an invented outdoor-gear vocabulary (standard library only).

Shared by the command-line model script, the HTTP model server and the Python toy models, so
all three adapters can be checked against the same expected labels.
"""

from __future__ import annotations

import math
import re

POSITIVE = {"great", "warm", "dry", "sturdy", "comfortable", "light", "bright", "reliable", "cosy"}
NEGATIVE = {"leaks", "leaky", "broke", "cold", "flimsy", "heavy", "torn", "dim", "wobbly", "soggy"}
NEGATORS = {"not", "never", "no", "isn't", "wasn't", "doesn't", "didn't"}
CLASSES = ["negative", "positive"]


def raw_score(text: str) -> int:
    """+1 per positive word, -1 per negative word; a negator flips the next opinion word."""
    total, flip = 0, False
    for w in re.findall(r"[a-z']+", text.lower()):
        if w in NEGATORS:
            flip = True
            continue
        s = 1 if w in POSITIVE else -1 if w in NEGATIVE else 0
        if s:
            total += -s if flip else s
            flip = False
    return total


def probabilities(text: str) -> list[float]:
    """[p(negative), p(positive)] by a logistic of the raw score."""
    p = 1.0 / (1.0 + math.exp(-1.5 * raw_score(text) - 0.1))
    return [1.0 - p, p]


def label(text: str) -> str:
    neg, pos = probabilities(text)
    return "positive" if pos >= neg else "negative"


def answer(texts: list[str], with_probabilities: bool = True) -> dict:
    out: dict = {"labels": [label(t) for t in texts]}
    if with_probabilities:
        out["probabilities"] = [probabilities(t) for t in texts]
        out["classes"] = list(CLASSES)
    return out
