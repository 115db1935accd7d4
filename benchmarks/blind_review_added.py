"""Draw a blind-review sheet of the pairs a rule change adds: every pair the rules in the working
tree make and the rules of an earlier commit did not, over the same sentences.

Sentences: every sentence of ``benchmarks/coverage/*_sentences.jsonl`` and, with
``PAIRFLIP_EXTERNAL_DATA=1``, the vaderSentiment product snippets split into sentences (see
``_corpus.real_texts``). Each sentence is one source; ``reorder/shuffle`` is left out. The earlier
rules run from ``git archive SINCE`` in a temporary folder, in a subprocess, so nothing of the
working tree leaks into them.

Writes ``sheet.jsonl`` and ``key.jsonl`` into ``--out`` with ``blind_review_sample.write_round``
(items shuffled with ``--seed``; the key's ``id`` is a hash of rule, source and variant), and
prints how many pairs each family gained and lost.

    python benchmarks/blind_review_added.py --since 1d19e2f --seed 21 --out benchmarks/blind_review/round21
"""

from __future__ import annotations

import argparse
import hashlib
import json
import os
import random
import shutil
import subprocess
import sys
import tarfile
import tempfile
from collections import Counter
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPO = HERE.parent

# Run as a subprocess: reads sentences on stdin, writes one JSON line per valid pair.
_DUMP = r'''
import json, random, sys
from pairflip.perturb import FAMILY_MODULES
from pairflip.perturb.base import Context, apply_edits, validate
from pairflip.perturb.lexicon import load_lexicon
from pairflip.perturb.nlp import load_nlp
nlp, lex = load_nlp(), load_lexicon()
for line in sys.stdin:
    text = line.rstrip("\n")
    if not text.strip():
        continue
    doc = nlp(text)
    for family, module in FAMILY_MODULES.items():
        for cand in module.candidates(doc, Context(lexicon=lex, rng=random.Random(0))):
            if cand.rule == "reorder/shuffle":
                continue
            variant, _ = apply_edits(doc, cand.edits)
            if validate(doc, cand, variant) is None:
                print(json.dumps({"family": family, "rule": cand.rule, "should": cand.should,
                                  "source": text, "variant": variant}))
'''


def _sentences() -> list[str]:
    seen: dict[str, None] = {}
    for f in sorted((HERE / "coverage").glob("*_sentences.jsonl")):
        for line in f.read_text(encoding="utf-8").splitlines():
            if line.strip():
                seen.setdefault(json.loads(line)["sentence"].replace("\n", " "), None)
    if os.environ.get("PAIRFLIP_EXTERNAL_DATA"):
        sys.path.insert(0, str(HERE))
        from _corpus import real_texts

        for t in real_texts(("product",)):
            seen.setdefault(t.replace("\n", " "), None)
    return list(seen)


def _package_tree(commit: str, dest: Path) -> Path:
    """The commit's files laid out as the installed package (pairflip.perturb = perturb/, ...)."""
    raw = dest / "raw"
    raw.mkdir()
    archive = subprocess.run(["git", "-C", str(REPO), "archive", commit], check=True, capture_output=True).stdout
    tar = dest / "tree.tar"
    tar.write_bytes(archive)
    with tarfile.open(tar) as t:
        t.extractall(raw, filter="data")
    pkg = dest / "pkg"
    shutil.copytree(raw / "pairflip", pkg / "pairflip")
    for sub in ("perturb", "probes", "report"):
        shutil.copytree(raw / sub, pkg / "pairflip" / sub)
    return pkg


def _pairs(sentences: list[str], pythonpath: str | None) -> list[dict]:
    env = dict(os.environ)
    if pythonpath is not None:
        env["PYTHONPATH"] = pythonpath
    cwd = pythonpath or str(REPO)
    out = subprocess.run([sys.executable, "-c", _DUMP], input="\n".join(sentences), text=True,
                         capture_output=True, check=True, env=env, cwd=cwd)
    return [json.loads(x) for x in out.stdout.splitlines() if x.strip()]


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--since", required=True, help="the commit whose rules the change is compared with")
    ap.add_argument("--seed", type=int, required=True)
    ap.add_argument("--out", type=Path, required=True)
    args = ap.parse_args()
    from blind_review_sample import write_round

    sentences = _sentences()
    with tempfile.TemporaryDirectory() as tmp:
        old = _pairs(sentences, str(_package_tree(args.since, Path(tmp))))
    new = _pairs(sentences, None)
    key = lambda r: (r["rule"], r["source"], r["variant"])  # noqa: E731
    old_keys, new_keys = {key(r) for r in old}, {key(r) for r in new}
    added = [r for r in new if key(r) not in old_keys]
    lost = Counter(k[0].split("/")[0] for k in old_keys - new_keys)
    random.Random(args.seed).shuffle(added)
    write_round(args.out, [(hashlib.sha1(f'{r["rule"]}|{r["source"]}|{r["variant"]}'.encode()).hexdigest()[:16],
                            r["family"], r["rule"], r["should"], r["source"], r["variant"]) for r in added])
    print(f"{len(sentences)} sentences; added {len(added)} pairs {dict(Counter(r['family'] for r in added))}; "
          f"lost {sum(lost.values())} {dict(lost)}; wrote {args.out}")


if __name__ == "__main__":
    main()
