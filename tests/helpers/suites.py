"""Hand-made suites of invented outdoor-gear review pairs (no perturbation rules needed)."""

from __future__ import annotations

from pathlib import Path

from pairflip.files import write_suite
from pairflip.records import Pair, Suite

# (source, variant, family, rule, should)
PAIRS = [
    ("The tent is great.", "The tent is not great.", "negation", "negation/copula", "flip"),
    ("The tent is great.", "The tent is really great.", "intensifier", "intensifier/amplify", "strengthen"),
    ("The stove is reliable.", "The stove is not reliable.", "negation", "negation/copula", "flip"),
    ("The jacket leaks.", "The jacket never leaks.", "negation", "negation/do-support", "flip"),
    ("The jacket leaks.", "The jacket leaks a little.", "intensifier", "intensifier/soften", "weaken"),
    ("The lantern is bright and light.", "The lantern is light and bright.", "reorder", "reorder/coordination", "hold"),
    ("The poles are flimsy.", "The poles are not flimsy.", "negation", "negation/copula", "flip"),
    ("The sleeping bag is warm.", "The sleeping bag is not warm.", "negation", "negation/copula", "flip"),
    ("The boots are heavy but sturdy.", "The boots are sturdy but heavy.", "reorder", "reorder/coordination", "hold"),
    ("The pad is comfortable.", "The pad is very comfortable.", "intensifier", "intensifier/amplify", "strengthen"),
    ("The mug is dim.", "mug dim the is.", "reorder", "reorder/shuffle", "none"),
    ("The rope is cosy.", "The rope is not cosy.", "negation", "negation/copula", "flip"),
]


def make_pairs(n_extra: int = 0) -> list[Pair]:
    """The pairs above, plus ``n_extra`` generated ones over numbered trail names."""
    pairs = [Pair(source=s, variant=v, family=f, rule=r, should=sh) for s, v, f, r, sh in PAIRS]
    words = ["warm", "dry", "sturdy", "leaky", "cold", "wobbly", "soggy", "bright"]
    for i in range(n_extra):
        w = words[i % len(words)]
        src = f"The shelter at trail camp {i} was {w}."
        pairs.append(Pair(source=src, variant=f"The shelter at trail camp {i} was not {w}.",
                          family="negation", rule="negation/copula", should="flip"))
    return pairs


def write_test_suite(path: Path, n_extra: int = 0) -> Path:
    write_suite(Suite(header={"generator": {"name": "hand-made test pairs"}}, pairs=make_pairs(n_extra)), path)
    return path


def texts_of(pairs: list[Pair]) -> list[str]:
    seen: dict[str, None] = {}
    for p in pairs:
        seen.setdefault(p.source, None)
        seen.setdefault(p.variant, None)
    return list(seen)
