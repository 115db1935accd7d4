"""A command-line model speaking pairflip's JSON Lines protocol (``cmd:python line_model.py``).

Options (for tests): ``--log FILE`` appends every text received, one per line; ``--mode``:

- ``ok``: answer with labels, probabilities and classes
- ``labels``: answer with labels only
- ``garbage``: print a line that is not JSON
- ``short``: answer one label too few
- ``crash-after N``: after N batches, write to stderr and exit with code 3
- ``hang``: read the batch and never answer (sleeps, bounded by --hang-seconds)
- ``error``: answer {"error": ...}

``--delay S`` waits S seconds before each answer (a slow model, for interrupting a run).
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

from keyword_rules import answer  # noqa: E402


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--mode", default="ok")
    ap.add_argument("--after", type=int, default=0)
    ap.add_argument("--log")
    ap.add_argument("--hang-seconds", type=float, default=20.0)
    ap.add_argument("--delay", type=float, default=0.0, help="seconds to think before each answer")
    args = ap.parse_args()
    print(f"line_model starting in mode {args.mode}", file=sys.stderr, flush=True)
    batches = 0
    for line in sys.stdin:
        if not line.strip():
            continue
        texts = json.loads(line)["texts"]
        if args.log:
            with open(args.log, "a", encoding="utf-8") as fh:
                fh.writelines(t + "\n" for t in texts)
        if args.mode == "crash-after" and batches >= args.after:
            print("line_model: ran out of tent pegs (simulated crash)", file=sys.stderr, flush=True)
            return 3
        batches += 1
        time.sleep(args.delay)
        if args.mode == "garbage":
            print("loading weights... done", flush=True)
        elif args.mode == "short":
            print(json.dumps({"labels": answer(texts, False)["labels"][:-1]}), flush=True)
        elif args.mode == "hang":
            time.sleep(args.hang_seconds)
            return 0
        elif args.mode == "error":
            print(json.dumps({"error": "the lantern model is not warmed up"}), flush=True)
        else:
            print(json.dumps(answer(texts, args.mode == "ok")), flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
