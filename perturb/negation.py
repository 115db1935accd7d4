"""negation: insert or remove a negation on the predicate that carries the opinion (should flip)."""

from __future__ import annotations

from typing import Iterator

from pairflip.perturb.base import Candidate, Context

FAMILY = "negation"
RULES = {
    "negation/copula": "flip",
    "negation/modal": "flip",
    "negation/do-support": "flip",
    "negation/removal": "flip",
}


def candidates(doc, ctx: Context) -> Iterator[Candidate]:  # placeholder until the rules land
    return iter(())
