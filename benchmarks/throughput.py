"""(e) What a user sees: `pairflip build` sentences per second on one core and on two, end to end.

Runs the real command (`pairflip build CORPUS -o suite.jsonl`, every family, sentence units) as a
child process on N real sentences (the vaderSentiment sdist snippets, see _corpus.py), three times
each way, interleaved: `--no-overlap` (parsing and rules in one process: one core) and the default
(the rules run in a second process while the first parses: two cores). Start-up (loading spaCy) is
inside the time, as it is for a user; a run on a tenth of the corpus gives the start-up alone.
Prints sentences per second (best of three) and the two-core/one-core ratio measured in this run.

    python benchmarks/throughput.py [--n 4000]
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from _corpus import real_texts


def _build(corpus: Path, out: Path, overlap: bool) -> float:
    cmd = [str(Path(sys.executable).with_name("pairflip")), "build", str(corpus), "-o", str(out), "--force"]
    if not overlap:
        cmd.append("--no-overlap")
    env = dict(os.environ, PAIRFLIP_NO_PROGRESS="1")
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, capture_output=True, env=env)
    return time.perf_counter() - t0


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=4000)
    args = ap.parse_args()
    texts = real_texts()[: args.n]
    with tempfile.TemporaryDirectory() as tmp:
        corpus = Path(tmp) / "corpus.txt"
        corpus.write_text("\n".join(texts) + "\n", encoding="utf-8")
        small = Path(tmp) / "small.txt"
        small.write_text("\n".join(texts[: max(1, len(texts) // 10)]) + "\n", encoding="utf-8")
        out = Path(tmp) / "suite.jsonl"
        _build(small, out, True)  # warm the file cache
        one, two = [], []
        for _ in range(3):
            one.append(_build(corpus, out, False))
            two.append(_build(corpus, out, True))
        startup = min(_build(small, out, False) for _ in range(2))
    n = len(texts)
    print(f"pairflip build, every family, {n} real sentences, end to end (start-up included), best of 3")
    print(f"  one core  (--no-overlap): {min(one):.2f} s = {n / min(one):.0f} sentences/s")
    print(f"  two cores (default)     : {min(two):.2f} s = {n / min(two):.0f} sentences/s")
    print(f"  two cores / one core speed: {min(one) / min(two):.2f}")
    print(f"  start-up and a tenth of the corpus, one core: {startup:.2f} s")


if __name__ == "__main__":
    main()
