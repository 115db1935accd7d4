"""Post-hoc check of judged blind-review rounds against the rules as they stand now.

For each round folder it rebuilds pairs from the sheet's first texts (sentence unit, seed 0) and
reports, per family: judged pairs the rules still make and how many of those passed both judges,
and judged pairs no longer made, split into passed (a guard that drops these skips right pairs)
and failed (a fix that worked). Run it before and after adding a guard.

    python benchmarks/blind_review_posthoc.py benchmarks/blind_review/round18 benchmarks/blind_review/round18v

A pair counts as passed when every judge file in the folder passes it (grammatical and
expectation right), as in blind_review_score.py. Pairs made only with their whole text around
them (the round was drawn at text level) show as "no longer made" here.
"""

from __future__ import annotations

import argparse
import json
from collections import defaultdict
from pathlib import Path


def _lines(path: Path) -> list[dict]:
    return [json.loads(x) for x in path.read_text(encoding="utf-8").splitlines() if x.strip()]


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("rounds", nargs="+", type=Path, help="round folders with sheet.jsonl, key.jsonl, judge-*.jsonl")
    args = ap.parse_args()

    import pairflip

    for folder in args.rounds:
        sheet = {r["item"]: r for r in _lines(folder / "sheet.jsonl")}
        key = {r["item"]: r for r in _lines(folder / "key.jsonl")}
        passed: dict[int, bool] = {}
        judges = sorted(folder.glob("judge-*.jsonl"))
        if not judges:
            print(f"{folder}: no judge files")
            continue
        for j in judges:
            for r in _lines(j):
                passed[r["item"]] = passed.get(r["item"], True) and bool(r["grammatical"] and r["expectation_right"])
        sources = list(dict.fromkeys(s["first"] for s in sheet.values()))
        made = {(p.source, p.variant) for p in pairflip.build_suite(sources, seed=0, unit="sentence")}
        counts: dict[str, list[int]] = defaultdict(lambda: [0, 0, 0, 0])  # made, made+passed, dropped+passed, dropped+failed
        dropped_passing = []
        for item, s in sorted(sheet.items()):
            fam = key[item]["family"]
            ok = passed.get(item, False)
            c = counts[fam]
            if (s["first"], s["second"]) in made:
                c[0] += 1
                c[1] += ok
            elif ok:
                c[2] += 1
                dropped_passing.append((item, key[item]["rule"], s["first"]))
            else:
                c[3] += 1
        print(folder.name)
        for fam, (m, mp, dp, df) in sorted(counts.items()):
            print(f"  {fam:16s} still made {mp}/{m} passed; no longer made: {dp} passed, {df} failed")
        for item, rule, first in dropped_passing:
            print(f"  passed but no longer made: item {item} ({rule}): {first}")


if __name__ == "__main__":
    main()
