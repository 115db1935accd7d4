"""Real English text for the benchmarks: the human-rated product-review and tweet snippets in the
vaderSentiment 3.3.2 sdist, fetched with pip into a cache folder the first time (see
tests/helpers/external_data.py), split into sentences (10,673 distinct ones of two words or more)."""

from __future__ import annotations

import os
import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))

from helpers.external_data import load  # noqa: E402


_SENTENCE_END = re.compile(r"(?<=[.!?])\s+")


def real_snippets(kinds: tuple[str, ...] = ("product", "tweets")) -> list[str]:
    """The snippets as they are, whitespace normalised, each once."""
    os.environ.setdefault("PAIRFLIP_EXTERNAL_DATA", "1")
    seen: dict[str, None] = {}
    for k in kinds:
        for _, text in load(k):
            seen.setdefault(" ".join(text.split()), None)
    return list(seen)


def real_texts(kinds: tuple[str, ...] = ("product", "tweets")) -> list[str]:
    """The snippets split at sentence ends: distinct sentences of two words or more."""
    seen: dict[str, None] = {}
    for snippet in real_snippets(kinds):
        for sentence in _SENTENCE_END.split(snippet):
            if len(sentence.split()) >= 2:
                seen.setdefault(sentence, None)
    return list(seen)
