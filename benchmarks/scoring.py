"""(b) Scoring time against calling the model directly on the distinct texts, and
(d) model calls saved by de-duplication and by the prediction cache.

The suite is built once from real text (the vaderSentiment sdist snippets, see _corpus.py). The
model is the demo's deep-bag-of-words pipeline (CountVectorizer + tanh MLP, predict_proba), and,
as a second, faster case, the demo's unigram logistic regression. "Direct" is the model's own
``predict_proba`` over the suite's distinct texts in batches of the same size; "pairflip" is
``pairflip.score`` on the same suite (collecting distinct texts, predicting, mapping labels,
judging every pair). Each is timed three times, interleaved; the minimum counts.

    python benchmarks/scoring.py [--n 4000] [--batch-size 64]
"""

from __future__ import annotations

import argparse
import tempfile
import time
from pathlib import Path

from _corpus import real_texts


class Counting:
    """Wraps a fitted pipeline and counts the texts it is asked to label."""

    def __init__(self, model):
        self.model = model
        self.classes_ = model.classes_
        self.texts = 0
        self.calls = 0

    def predict_proba(self, texts):
        self.texts += len(texts)
        self.calls += 1
        return self.model.predict_proba(texts)

    def predict(self, texts):
        self.texts += len(texts)
        self.calls += 1
        return self.model.predict(texts)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=4000, help="source texts for the suite")
    ap.add_argument("--batch-size", type=int, default=64)
    args = ap.parse_args()

    import pairflip
    from pairflip.demo.models import trained
    from pairflip.probes import PythonModel
    from pairflip.probes.cache import PredictionCache
    from pairflip.probes.scoring import distinct_texts

    texts = real_texts()[: args.n]
    t0 = time.perf_counter()
    suite = pairflip.build_suite(texts, seed=0)
    print(f"suite: {len(suite)} pairs from {len(texts)} texts (built in {time.perf_counter() - t0:.1f}s)")
    distinct = distinct_texts(suite.pairs)
    bs = args.batch_size

    for name in ("deep-bow", "unigram"):
        model = trained(name)
        direct_t, ours_t = [], []
        for _ in range(3):
            t0 = time.perf_counter()
            for i in range(0, len(distinct), bs):
                model.predict_proba(distinct[i : i + bs])
            direct_t.append(time.perf_counter() - t0)
            t0 = time.perf_counter()
            pairflip.score(suite, PythonModel(model, spec=name), batch_size=bs)
            ours_t.append(time.perf_counter() - t0)
        d, o = min(direct_t), min(ours_t)
        print(f"[{name}] direct model calls on {len(distinct)} distinct texts: {d:.3f}s   pairflip.score: {o:.3f}s")
        print(f"[{name}] overhead = {o / d - 1:+.1%}  (target <= +10%)   direct/score = {d / o:.3f}")

    # (d) calls saved
    naive = 2 * len(suite)
    counting = Counting(trained("deep-bow"))
    with tempfile.TemporaryDirectory() as tmp:
        cache = PredictionCache(Path(tmp) / "cache.sqlite")
        m = PythonModel(counting, spec="deep-bow-counting")
        pairflip.score(suite, m, batch_size=bs, cache=cache)
        first = counting.texts
        pairflip.score(suite, m, batch_size=bs, cache=cache)
        second = counting.texts - first
        cache.close()
    print(f"texts sent to the model: naive (both sides of every pair) {naive}, "
          f"de-duplicated {first} ({first / naive:.1%} of naive, {naive - first} calls saved), "
          f"rerun with the cache {second}")


if __name__ == "__main__":
    main()
