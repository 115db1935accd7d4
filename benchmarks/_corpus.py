"""Real English text for the benchmarks: the human-rated snippets in the vaderSentiment 3.3.2
sdist (product reviews, tweets, newspaper editorials; never the movie-review file), fetched with
pip into a cache folder the first time (see tests/helpers/external_data.py)."""

from __future__ import annotations

import os
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))

from helpers.external_data import load  # noqa: E402


def real_texts(kinds: tuple[str, ...] = ("product", "tweets", "editorial")) -> list[str]:
    os.environ.setdefault("PAIRFLIP_EXTERNAL_DATA", "1")
    seen: dict[str, None] = {}
    for k in kinds:
        for _, text in load(k):
            seen.setdefault(" ".join(text.split()), None)
    return list(seen)
