"""Score the blind review: combine the judges' verdicts with the key and print the figures.

Each judge file (benchmarks/blind_review/judge-*.jsonl) holds one line per item:
``{"item": N, "grammatical": true|false, "expectation_right": true|false, "note": "..."}``.
A pair passes when it is grammatical AND its expectation is right. Prints each judge's pass rate
(with a 95 % Wilson interval), the rate of pairs both judges pass, and per-family figures.

    python benchmarks/blind_review_score.py [FOLDER]      (default: benchmarks/blind_review/)
"""

from __future__ import annotations

import json
import sys
from collections import defaultdict
from pathlib import Path

from pairflip.report.stats import wilson_interval

OUT = Path(__file__).resolve().parent / "blind_review"


def main() -> None:
    global OUT
    if len(sys.argv) > 1:
        OUT = Path(sys.argv[1])
    key = {r["item"]: r for r in map(json.loads, (OUT / "key.jsonl").read_text(encoding="utf-8").splitlines())}
    judges = {}
    for f in sorted(OUT.glob("judge-*.jsonl")):
        judges[f.stem] = {r["item"]: r for r in map(json.loads, f.read_text(encoding="utf-8").splitlines() if f.stat().st_size else [])}
    n = len(key)
    passed_by = {}
    for name, verdicts in judges.items():
        missing = set(key) - set(verdicts)
        assert not missing, f"{name} did not judge items {sorted(missing)}"
        ok = {i for i, v in verdicts.items() if v["grammatical"] and v["expectation_right"]}
        passed_by[name] = ok
        lo, hi = wilson_interval(len(ok), n)
        gram = sum(v["grammatical"] for v in verdicts.values())
        exp = sum(v["expectation_right"] for v in verdicts.values())
        print(f"{name}: pass {len(ok)}/{n} = {len(ok) / n:.0%} [95% CI {lo:.0%}-{hi:.0%}]; grammatical {gram}/{n}, expectation right {exp}/{n}")
    both = set.intersection(*passed_by.values()) if passed_by else set()
    lo, hi = wilson_interval(len(both), n)
    print(f"passed by every judge: {len(both)}/{n} = {len(both) / n:.0%} [95% CI {lo:.0%}-{hi:.0%}]")
    fam = defaultdict(lambda: [0, 0])
    for i, k in key.items():
        fam[k["family"]][1] += 1
        fam[k["family"]][0] += i in both
    for f, (a, b) in sorted(fam.items()):
        lo, hi = wilson_interval(a, b)
        print(f"  {f}: {a}/{b} = {a / b:.0%} [95% CI {lo:.0%}-{hi:.0%}]")
    for i in sorted(set(key) - both):
        notes = "; ".join(f"{j}: {judges[j][i].get('note', '')}" for j in judges if i not in passed_by[j])
        print(f"  failed item {i} ({key[i]['rule']}): {notes}")


if __name__ == "__main__":
    main()
