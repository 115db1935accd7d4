"""Draw a blind-review sample of pairs from text nobody on the project tuned the rules on.

Source text (``--source``): ``vader`` (default), the human-rated product-review snippets in the
vaderSentiment 3.3.2 sdist (Hutto & Gilbert 2014), fetched with pip (see
tests/helpers/external_data.py), split into sentences; ``vader-all`` adds its tweets (rounds 1-6
used product and tweet snippets whole); or a path to a corpus file pairflip reads (e.g.
``benchmarks/coverage/larder_texts.jsonl``), built at sentence unit. ``reorder/shuffle`` is left
out (ungrammatical on purpose, no expectation).

``--exclude DIR ...`` leaves out the pairs of earlier rounds' sheets (a fresh draw).
``--per-family negation=30,double-negation=20,...`` draws that many pairs of each family (a
family with fewer pairs gives all it has); without it, ``--n`` pairs at random.

Writes two files into ``--out`` (default benchmarks/blind_review/):
- ``sheet.jsonl``: what judges see: an item number, the two texts, and the expectation in the
  plain words of judge_brief.md (version 2), never the rule's name; items shuffled;
- ``key.jsonl``: item number -> pair id, family, rule, should (kept apart from the judges).

    python benchmarks/blind_review_sample.py --seed 8 --source benchmarks/coverage/larder_texts.jsonl \
        --per-family negation=30,double-negation=20,intensifier=20,reorder=20 --out DIR
"""

from __future__ import annotations

import argparse
import json
import random
from pathlib import Path

# The words of judge_brief.md (version 2): each expectation as the scoring checks it.
PLAIN = {
    "flip": "NOT THE SAME opinion: the second text should not carry the first text's opinion (opposite, or neutral).",
    "hold": "the SAME opinion: both texts should get the same label (positive, negative or neutral).",
    "strengthen": "the same opinion, NOT WEAKER: same direction as the first, at least as strong.",
    "weaken": "the same opinion, NOT STRONGER: weaker, equal or neutral, but not the opposite and not stronger.",
    "rise": "MORE POSITIVE: the second text should read more positive (or less negative) than the first, as a whole.",
    "fall": "MORE NEGATIVE: the second text should read more negative (or less positive) than the first, as a whole.",
}

OUT = Path(__file__).resolve().parent / "blind_review"


def _texts(source: str) -> list[str]:
    from _corpus import real_snippets, real_texts

    if source == "vader":
        return real_texts(("product",))
    if source == "vader-all":
        return real_snippets(("product", "tweets"))
    from pairflip.files import read_corpus

    return [t.text for t in read_corpus(source)]


def write_round(out: Path, items: list[tuple[str, str, str, str, str, str]]) -> None:
    """Write ``sheet.jsonl`` (what judges see) and ``key.jsonl`` (kept apart) into ``out``, item
    numbers in the order given; ``items`` are (pair id, family, rule, should, source, variant)."""
    out.mkdir(parents=True, exist_ok=True)
    with open(out / "sheet.jsonl", "w", encoding="utf-8") as sheet, open(out / "key.jsonl", "w", encoding="utf-8") as key:
        for i, (pid, family, rule, should, source, variant) in enumerate(items, 1):
            sheet.write(json.dumps({"item": i, "first": source, "second": variant, "expectation": PLAIN[should]}, ensure_ascii=False) + "\n")
            key.write(json.dumps({"item": i, "id": pid, "family": family, "rule": rule, "should": should}) + "\n")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--n", type=int, default=100)
    ap.add_argument("--source", default="vader")
    ap.add_argument("--per-family", default="")
    ap.add_argument("--out", type=Path, default=OUT)
    ap.add_argument("--exclude", type=Path, nargs="*", default=[],
                    help="earlier round folders: their sheets' pairs are not drawn again")
    args = ap.parse_args()

    import pairflip

    texts = _texts(args.source)
    kw = {"unit": "sentence"} if "unit" in pairflip.build_suite.__code__.co_varnames else {}
    suite = pairflip.build_suite(texts, seed=0, **kw)
    seen = {(d["first"], d["second"]) for folder in args.exclude
            for d in map(json.loads, (folder / "sheet.jsonl").read_text(encoding="utf-8").splitlines())}
    pool = [p for p in suite if p.should in PLAIN and (p.source, p.variant) not in seen]
    rng = random.Random(args.seed)
    if args.per_family:
        quota = {k: int(v) for k, v in (x.split("=") for x in args.per_family.split(","))}
        sample = []
        for fam, k in quota.items():
            of_family = [p for p in pool if p.family == fam]
            sample += rng.sample(of_family, min(k, len(of_family)))
        rng.shuffle(sample)
    else:
        sample = rng.sample(pool, min(args.n, len(pool)))
    write_round(args.out, [(p.id, p.family, p.rule, p.should, p.source, p.variant) for p in sample])
    counts = {f: sum(p.family == f for p in sample) for f in sorted({p.family for p in sample})}
    print(f"pool: {len(pool)} pairs with an expectation from {len(texts)} texts; wrote {len(sample)} items {counts} to {args.out}")


if __name__ == "__main__":
    main()
