"""Shared fixtures. spaCy loads once per test session."""

from __future__ import annotations

import pytest


@pytest.fixture(scope="session")
def nlp():
    from pairflip.perturb.nlp import load_nlp

    return load_nlp()


@pytest.fixture(scope="session")
def demo_suite(nlp):
    """The suite `pairflip demo` builds: every family over the bundled demo sentences."""
    import pairflip
    from pairflip.demo.models import load_sentences

    return pairflip.build_suite(load_sentences(), seed=0, nlp=nlp)
