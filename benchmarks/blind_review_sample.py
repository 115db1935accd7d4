"""Draw the blind-review sample: 100 random pairs built from real text nobody on the project wrote.

Source text: the human-rated product-review and tweet snippets in the vaderSentiment 3.3.2 sdist
(Hutto & Gilbert 2014), fetched with pip (see tests/helpers/external_data.py). Every family runs;
``reorder/shuffle`` is left out (it is ungrammatical on purpose and carries no expectation).

Writes two files into benchmarks/blind_review/:
- ``sheet.jsonl``: what judges see: an item number, the two texts, and the expectation in plain
  words ("the second text should express the opposite opinion", ...), never the rule's name;
- ``key.jsonl``: item number -> pair id, family, rule, should (kept apart from the judges).

    python benchmarks/blind_review_sample.py [--seed 7] [--n 100]
"""

from __future__ import annotations

import argparse
import json
import random
from pathlib import Path

from _corpus import real_snippets

PLAIN = {
    "flip": "The second text should express the OPPOSITE opinion to the first (positive <-> negative).",
    "hold": "The second text should express the SAME opinion, equally strong, as the first.",
    "strengthen": "The second text should express the same opinion as the first, but MORE strongly.",
    "weaken": "The second text should express the same opinion as the first, but LESS strongly (or become neutral); it must not reverse it.",
}

OUT = Path(__file__).resolve().parent / "blind_review"


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--n", type=int, default=100)
    args = ap.parse_args()

    import pairflip

    texts = real_snippets(("product", "tweets"))
    suite = pairflip.build_suite(texts, seed=0)
    pool = [p for p in suite if p.should in PLAIN]
    rng = random.Random(args.seed)
    sample = rng.sample(pool, args.n)
    OUT.mkdir(exist_ok=True)
    with open(OUT / "sheet.jsonl", "w", encoding="utf-8") as sheet, open(OUT / "key.jsonl", "w", encoding="utf-8") as key:
        for i, p in enumerate(sample, 1):
            sheet.write(json.dumps({"item": i, "first": p.source, "second": p.variant, "expectation": PLAIN[p.should]}, ensure_ascii=False) + "\n")
            key.write(json.dumps({"item": i, "id": p.id, "family": p.family, "rule": p.rule, "should": p.should}) + "\n")
    print(f"pool: {len(pool)} pairs with an expectation from {len(texts)} snippets; wrote {args.n} items to {OUT}")


if __name__ == "__main__":
    main()
