"""reorder: move words without changing what is said (should hold; shuffle is a diagnostic)."""

from __future__ import annotations

from typing import Iterator

from pairflip.perturb.base import Candidate, Context

FAMILY = "reorder"
RULES = {
    "reorder/coordination": "hold",
    "reorder/adverbial": "hold",
    "reorder/clauses": "hold",
    "reorder/shuffle": "none",
}


def candidates(doc, ctx: Context) -> Iterator[Candidate]:  # placeholder until the rules land
    return iter(())
