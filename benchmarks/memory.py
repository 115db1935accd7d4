"""(c) Peak memory of generation on 1x and 3x the corpus (streaming, not loading all).

Runs ``pairflip build`` as a child process on a corpus of N real texts and on one of 3N (the 1x
corpus is the first third of the 3x one), and reads each child's peak resident set size from
``resource.getrusage`` — one fresh process per measurement; its peak plus that of the rule
process it forks (perturb/overlap.py), an upper bound on what the two hold at once. Prints 3x/1x
(target <= 1.3).

    python benchmarks/memory.py
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys
import tempfile
from pathlib import Path

from _corpus import real_texts


def peak_rss_mb(corpus: Path, out: Path) -> float:
    code = (
        "import resource, sys\n"
        "from pairflip.cli import main\n"
        "try:\n"
        f"    main(['build', {str(corpus)!r}, '-o', {str(out)!r}, '--force'])\n"
        "except SystemExit as e:\n"
        "    assert e.code == 0, e.code\n"
        "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss + resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)\n"
    )
    env = dict(os.environ, PAIRFLIP_NO_PROGRESS="1")
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, check=True)
    return int(r.stdout.strip().splitlines()[-1]) / 1024  # ru_maxrss is in KiB on Linux


def main() -> None:
    texts = real_texts()
    n = len(texts) // 3
    with tempfile.TemporaryDirectory() as d:
        small, big = Path(d, "1x.txt"), Path(d, "3x.txt")
        small.write_text("\n".join(texts[:n]) + "\n", encoding="utf-8")
        big.write_text("\n".join(texts[: 3 * n]) + "\n", encoding="utf-8")
        m1 = peak_rss_mb(small, Path(d, "s1.jsonl"))
        m3 = peak_rss_mb(big, Path(d, "s3.jsonl"))
    print(f"1x: {n} texts, peak {m1:.0f} MiB   3x: {3 * n} texts, peak {m3:.0f} MiB")
    print(f"3x/1x = {m3 / m1:.3f}  (target <= 1.3)")


if __name__ == "__main__":
    main()
