"""double-negation: negate the opposite of an opinion word (should weaken)."""

from __future__ import annotations

from typing import Iterator

from pairflip.perturb.base import Candidate, Context

FAMILY = "double-negation"
RULES = {
    "double-negation/antonym": "weaken",
    "double-negation/prefix": "weaken",
    "double-negation/verb": "weaken",
}


def candidates(doc, ctx: Context) -> Iterator[Candidate]:  # placeholder until the rules land
    return iter(())
