"""Stage 1: turn texts into a suite of minimal pairs.

One module per family; each exposes ``FAMILY`` (its name) and ``RULES`` (rule name -> rule
generator, see :mod:`pairflip.perturb.base`). :func:`build_suite` runs them over parsed texts.
"""

from __future__ import annotations

from pairflip.perturb import contrast, double_negation, intensifier, negation, reorder
from pairflip.perturb.base import Candidate, Context, TokenEdit, apply_edits, validate
from pairflip.perturb.build import BuildStats, build_suite, iter_pairs, resolve_rules

FAMILY_MODULES = {m.FAMILY: m for m in (negation, double_negation, intensifier, reorder, contrast)}

__all__ = [
    "FAMILY_MODULES",
    "BuildStats",
    "Candidate",
    "Context",
    "TokenEdit",
    "apply_edits",
    "build_suite",
    "iter_pairs",
    "resolve_rules",
    "validate",
]
