"""Python models for the Ray engine tests (``--model helpers.ray_models:NAME``).

Each runs in a Ray actor, so what it does there must show up in this process as the same
one-line errors as when it runs here."""

from __future__ import annotations

import os
import time

from helpers.keyword_rules import label


def slow_labels(texts: list[str]) -> list[str]:
    """Keyword labels, 0.25 s per batch: slow enough to interrupt a run in the middle."""
    time.sleep(0.25)
    return [label(t) for t in texts]


def dies(texts: list[str]) -> list[str]:
    """Ends its own process (the actor) on a batch about the stove: a crash, not an exception."""
    if any("stove" in t.lower() for t in texts):
        os._exit(3)
    return [label(t) for t in texts]


def exits(texts: list[str]) -> list[str]:
    """Calls sys.exit on a batch about the stove."""
    if any("stove" in t.lower() for t in texts):
        raise SystemExit(4)
    return [label(t) for t in texts]
