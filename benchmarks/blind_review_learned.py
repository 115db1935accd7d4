"""Draw a blind-review sample of the pairs that come from learned words only (issue 13).

Learns a lexicon (``pairflip lexicon``'s estimator, default settings) from every other
human-rated product-review snippet of the vaderSentiment 3.3.2 sdist (Hutto & Gilbert 2014; the
mean human rating is the label: >= 0.5 positive, <= -0.5 negative, else neutral), builds the other
half with it at sentence unit, and writes the pairs whose opinion comes from learned words only
(``meta.learned``) as a sheet for the judges, in the format of blind_review_sample.py:

    python benchmarks/blind_review_learned.py --seed 11 --n 50 --out benchmarks/blind_review/round10l
"""

from __future__ import annotations

import argparse
import csv
import json
import random
import tempfile
from pathlib import Path

import _corpus  # noqa: F401  (puts tests/ on the path and fetches the sdist on first use)
from blind_review_sample import PLAIN
from helpers.external_data import load

NEAR_ZERO = 0.5  # |mean rating| below this: neutral (the same split as tests/test_induce.py)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=11)
    ap.add_argument("--n", type=int, default=50)
    ap.add_argument("--out", type=Path, required=True)
    args = ap.parse_args()

    import pairflip
    from pairflip.perturb.induce import induce_lexicon, open_labelled_corpus, write_lexicon
    from pairflip.perturb.lexicon import load_lexicon
    from pairflip.perturb.nlp import load_nlp

    rows = load("product")
    learn, build = rows[0::2], rows[1::2]
    nlp = load_nlp()
    with tempfile.TemporaryDirectory() as tmp:
        corpus = Path(tmp) / "learn.csv"
        with corpus.open("w", newline="", encoding="utf-8") as fh:
            w = csv.writer(fh)
            w.writerow(["text", "label"])
            for rating, text in learn:
                w.writerow([text, "positive" if rating >= NEAR_ZERO else "negative" if rating <= -NEAR_ZERO else "neutral"])
        labelled = open_labelled_corpus(corpus, label_column="label", label_field=None)
        lex = induce_lexicon(labelled.texts(), nlp=nlp, known=load_lexicon())
        tsv = Path(tmp) / "induced.tsv"
        write_lexicon(lex, tsv, corpus="vader product snippets, learning half")
        suite = pairflip.build_suite([t for _, t in build], seed=0, nlp=nlp, lexicon_files=[str(tsv)])
    pool = [p for p in suite if p.meta.get("learned") and p.should in PLAIN]
    sample = random.Random(args.seed).sample(pool, min(args.n, len(pool)))
    args.out.mkdir(parents=True, exist_ok=True)
    with open(args.out / "sheet.jsonl", "w", encoding="utf-8") as sheet, open(args.out / "key.jsonl", "w", encoding="utf-8") as key:
        for i, p in enumerate(sample, 1):
            sheet.write(json.dumps({"item": i, "first": p.source, "second": p.variant, "expectation": PLAIN[p.should]}, ensure_ascii=False) + "\n")
            key.write(json.dumps({"item": i, "id": p.id, "family": p.family, "rule": p.rule, "should": p.should,
                                  "learned": p.meta["learned"]}) + "\n")
    counts = {f: sum(p.family == f for p in sample) for f in sorted({p.family for p in sample})}
    print(f"learned {len(lex.written)} words written of {len(lex.words)} kept; {len(pool)} pairs from learned words only "
          f"of {len(suite)}; wrote {len(sample)} items {counts} to {args.out}")


if __name__ == "__main__":
    main()
