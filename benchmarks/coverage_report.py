"""How far each family reaches on held-out text: the share of clearly opinionated sentences that
get at least one pair of the family (diagnostic rules such as reorder/shuffle left out).

Corpus: benchmarks/coverage/larder_sentences.jsonl (invented, marked sentence by sentence by a
reader: positive / negative / mixed / none; see benchmarks/coverage/README.md). Each sentence is
one source, as ``build --unit sentence`` makes it. "Clear opinion" is a mark of positive, negative
or mixed.

    python benchmarks/coverage_report.py [--sentences FILE] [--lexicon FILE ...] [--json OUT]
"""

from __future__ import annotations

import argparse
import json
from collections import defaultdict
from pathlib import Path

HERE = Path(__file__).resolve().parent
SENTENCES = HERE / "coverage" / "larder_sentences.jsonl"


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--lexicon", action="append", default=[])
    ap.add_argument("--json", type=Path)
    ap.add_argument("--sentences", type=Path, default=SENTENCES,
                    help="a *_sentences.jsonl file (default: the larder corpus; also kestrel_sentences.jsonl)")
    args = ap.parse_args()

    import pairflip

    rows = [json.loads(x) for x in args.sentences.read_text(encoding="utf-8").splitlines()]
    opinionated = {r["sentence"] for r in rows if r["opinion"] != "none"}
    texts = list(dict.fromkeys(r["sentence"] for r in rows))
    suite = pairflip.build_suite(texts, seed=0, lexicon_files=args.lexicon)
    reached: dict[str, set[str]] = defaultdict(set)
    pairs: dict[str, int] = defaultdict(int)
    for p in suite:
        if p.should == "none":
            continue
        pairs[p.family] += 1
        if p.source in opinionated:
            reached[p.family].add(p.source)
            reached["any family"].add(p.source)
    n = len(opinionated)
    out = {"sentences": len(texts), "clear_opinion": n, "families": {}}
    print(f"{len(texts)} distinct sentences, {n} with a clear opinion (reader's marks)")
    for fam in sorted(reached, key=lambda f: (f == "any family", f)):
        k = len(reached[fam])
        out["families"][fam] = {"sentences_reached": k, "share": k / n, "pairs": pairs.get(fam)}
        print(f"  {fam:16s} {k:4d} / {n} = {k / n:6.1%}   ({pairs.get(fam, '-')} pairs in all)")
    if args.json:
        args.json.write_text(json.dumps(out, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
