"""pairflip: test sentiment classifiers on minimal pairs.

The four stages, each usable from Python without files::

    import pairflip
    suite   = pairflip.build_suite(texts, families=["negation", "reorder"], seed=0)
    results = pairflip.score(suite, model)      # callable, sklearn-like object, or a SPEC string
    summary = pairflip.summarize(results)       # numbers only
    pairflip.report.render(summary)             # rich terminal output
"""

from __future__ import annotations

__version__ = "0.1.0"

from typing import Any

from pairflip.records import Edit, Pair, PairflipError, Prediction, Results, SourceText, Suite, Verdict

__all__ = [
    "__version__",
    "build_suite",
    "score",
    "summarize",
    "report",
    "Edit",
    "Pair",
    "PairflipError",
    "Prediction",
    "Results",
    "SourceText",
    "Suite",
    "Verdict",
]


def build_suite(texts: Any, families: Any = None, seed: int = 0, **kwargs: Any) -> Suite:
    """Stage 1: parse ``texts`` and make minimal pairs (see :func:`pairflip.perturb.build_suite`)."""
    from pairflip.perturb import build_suite as _build

    return _build(texts, families=families, seed=seed, **kwargs)


def score(suite: Any, model: Any, **kwargs: Any) -> Results:
    """Stage 2: run ``model`` on both sides of every pair (see :func:`pairflip.probes.score`)."""
    from pairflip.probes import score as _score

    return _score(suite, model, **kwargs)


def summarize(results: Results, **kwargs: Any) -> Any:
    """Stage 3: rates and intervals per family and rule (see :func:`pairflip.report.summarize`)."""
    from pairflip.report import summarize as _summarize

    return _summarize(results, **kwargs)


def __getattr__(name: str) -> Any:
    if name == "report":
        import importlib

        return importlib.import_module("pairflip.report")
    raise AttributeError(name)
