"""intensifier: amplify, soften or remove the degree word of an opinion (strengthen / weaken)."""

from __future__ import annotations

from typing import Iterator

from pairflip.perturb.base import Candidate, Context

FAMILY = "intensifier"
RULES = {
    "intensifier/amplify": "strengthen",
    "intensifier/soften": "weaken",
    "intensifier/remove": "weaken",
}


def candidates(doc, ctx: Context) -> Iterator[Candidate]:  # placeholder until the rules land
    return iter(())
