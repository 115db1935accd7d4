"""Gate a model from a test: :func:`gate`, and a pytest plugin with the ``pairflip_gate`` fixture.

In a user's own test file (the plugin is registered when pairflip is installed)::

    def test_sentiment_model(pairflip_gate):
        pairflip_gate("mypackage.model:predict", "tests/suite.jsonl", ["negation.violation <= 0.15"])

``model`` is anything :func:`pairflip.score` takes (a callable ``list[str] -> labels``, a
scikit-learn-like object, or a model SPEC string); ``suite`` is a :class:`~pairflip.records.Suite`,
the path of a suite file, or a list of texts to build one from; ``limits`` one limit or a list of
them in the gate grammar (:mod:`pairflip.report.gate`). A crossed limit raises ``AssertionError``
whose message is the gate's table as plain text. With ``limits=None`` the fixture reads
``[tool.pairflip.gate]`` from the ``pyproject.toml`` of the pytest root folder.

This module imports nothing heavy: spaCy and the report code load only when a gate runs.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any, Callable, Sequence

from pairflip.records import PairflipError, Results, Suite

__all__ = ["gate", "pairflip_gate"]


def _as_suite(suite: Any, *, families: Any, seed: int, unit: str = "sentence") -> Suite:
    if isinstance(suite, Suite):
        return suite
    if isinstance(suite, (str, os.PathLike)):
        from pairflip.files import read_suite

        return read_suite(suite)
    if isinstance(suite, (list, tuple)):
        if not suite:
            raise PairflipError("gate: the list of texts to build a suite from is empty")
        from pairflip import build_suite

        return build_suite(list(suite), families=families, seed=seed, unit=unit)
    raise PairflipError(
        f"gate: suite must be a Suite, the path of a suite file, or a list of texts; got {type(suite).__name__}"
    )


def _as_results(baseline: Any) -> Results | None:
    if baseline is None or isinstance(baseline, Results):
        return baseline
    if isinstance(baseline, (str, os.PathLike)):
        from pairflip.files import read_results

        return read_results(baseline)
    raise PairflipError(f"gate: baseline must be Results or the path of a results file; got {type(baseline).__name__}")


def gate(
    model: Any,
    suite: Any,
    limits: str | Sequence[Any] | None,
    *,
    limits_file: str | os.PathLike[str] | None = None,
    on: str | None = None,
    baseline: Any = None,
    alpha: float | None = None,
    cluster: str | None = None,
    families: Any = None,
    seed: int = 0,
    unit: str = "sentence",
    **score_kw: Any,
) -> Any:
    """Score ``model`` on ``suite`` and judge ``limits``; raise ``AssertionError`` when the gate fails.

    Returns the :class:`~pairflip.report.gate.GateOutcome` when it passes. ``families``,
    ``seed`` and ``unit`` (``"sentence"``, the default, or ``"text"``: what one source is, as
    ``pairflip build --unit``) apply when ``suite`` is a list of texts to build from; other keywords
    (``labels``, ``margin``, ``batch_size``) go to :func:`pairflip.score`. Bad input (an unknown
    family in a limit, a malformed limit) raises :class:`~pairflip.records.PairflipError`.
    """
    __tracebackhide__ = True  # pytest: show the user's line, not ours
    from pairflip import score
    from pairflip.report.gate import run_gate
    from pairflip.report.gate_view import gate_text

    if isinstance(limits, str):
        limits = [limits]
    lims = list(limits or [])
    s = _as_suite(suite, families=families, seed=seed, unit=unit)
    results = score(s, model, **score_kw)
    outcome = run_gate(results, lims, limits_file=limits_file, on=on, baseline=_as_results(baseline),
                       alpha=alpha, cluster=cluster, seed=seed)
    if not outcome.passed:
        raise AssertionError("pairflip gate failed\n" + gate_text(outcome))
    return outcome


try:  # the plugin part: only when pytest is there (it always is when pytest loads this module)
    import pytest
except ImportError:  # pragma: no cover
    pytest = None  # type: ignore[assignment]

if pytest is not None:

    @pytest.fixture
    def pairflip_gate(request: Any) -> Callable[..., Any]:
        """``pairflip_gate(model, suite, limits=None, **kw)``: :func:`pairflip.testing.gate`,
        reading ``[tool.pairflip.gate]`` from the pytest root's pyproject.toml when ``limits``
        is None."""

        def _gate(model: Any, suite: Any, limits: Any = None, **kw: Any) -> Any:
            __tracebackhide__ = True
            if limits is None and kw.get("limits_file") is None:
                from pairflip.report.gate import default_limits_file

                found = default_limits_file(Path(str(request.config.rootpath)))
                if found is None:
                    raise PairflipError(
                        "pairflip_gate: no limits given and no [tool.pairflip.gate] table in "
                        f"{Path(str(request.config.rootpath)) / 'pyproject.toml'}"
                    )
                kw["limits_file"] = found
            return gate(model, suite, limits, **kw)

        return _gate
