"""(b) Scoring time against calling the model directly on the distinct texts, and
(d) model calls saved by de-duplication and by the prediction cache.

The suite is built once from real text (the vaderSentiment sdist snippets, see _corpus.py). Three
real models: VADER (Hutto & Gilbert 2014, the `vaderSentiment` package; a rule-based model costing
tens of microseconds per text, the slowest here and the closest to the "milliseconds per call"
models pairflip is for), the demo's deep-bag-of-words pipeline (CountVectorizer + tanh MLP), and
the demo's unigram logistic regression — the last two cost about ten microseconds per text, the
hardest case for a thin layer; each line also gives pairflip's own cost per text. "Direct" is the model's own
``predict_proba`` over the suite's distinct texts in batches of the same size; "pairflip" is
``pairflip.score`` on the same suite (collecting distinct texts, predicting, mapping labels,
judging every pair). Each is timed REPEATS (15) times, back to back; two figures are printed,
best against best and the median ratio of the back-to-back pairs (the machines are noisy: single
runs of the same code differ by half, and slow spells last seconds, so a pair mostly shares one). Both sides run under the same
cycle-collector settings (settled_records) and keep their outputs until the timer stops. The
HTTP server runs in its own process. A last line times pairflip.score with a model that costs
nothing, which is pairflip's own cost alone.

    python benchmarks/scoring.py [--n 4000] [--batch-size 64]
"""

from __future__ import annotations

import argparse
import statistics
import tempfile
import time
from pathlib import Path

from _corpus import real_texts

REPEATS = 15


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


class Free:
    """A model that costs nothing: the same uniform probability matrix for every batch."""

    def __init__(self, k: int):
        import numpy as np

        self.classes_ = np.array(["negative", "neutral", "positive"][:k] if k <= 3 else [str(i) for i in range(k)])
        self._rows = np.full((4096, k), 1.0 / k)

    def predict_proba(self, texts):
        return self._rows[: len(texts)]

    def predict(self, texts):
        return self.classes_[self.predict_proba(texts).argmax(axis=1)]


def _vader():
    """VADER as a model: label by the compound score with its README's +-0.05 thresholds,
    and the compound score itself as the polarity score."""
    from vaderSentiment.vaderSentiment import SentimentIntensityAnalyzer

    sia = SentimentIntensityAnalyzer()

    def vader(texts):
        out = []
        for t in texts:
            c = sia.polarity_scores(t)["compound"]
            out.append({"label": "positive" if c >= 0.05 else "negative" if c <= -0.05 else "neutral", "score": c})
        return out

    return vader


def _serve_forever(model, conn) -> None:
    """The model behind a loopback HTTP server speaking pairflip's HTTP protocol (runs in its
    own process, as a model service would, so it does not share the client's interpreter)."""
    import json
    from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer

    classes = [str(c) for c in model.classes_]

    class Handler(BaseHTTPRequestHandler):
        def do_POST(self):  # noqa: N802
            body = json.loads(self.rfile.read(int(self.headers["Content-Length"])))
            proba = model.predict_proba(body["texts"])
            data = json.dumps({"labels": [classes[i] for i in proba.argmax(axis=1)],
                               "probabilities": proba.tolist(), "classes": classes}).encode()
            self.send_response(200)
            self.send_header("Content-Type", "application/json")
            self.send_header("Content-Length", str(len(data)))
            self.end_headers()
            self.wfile.write(data)

        def log_message(self, *args):
            pass

    server = ThreadingHTTPServer(("127.0.0.1", 0), Handler)
    conn.send(server.server_address[1])
    server.serve_forever()


def _serve(model):
    """Start the server process; returns it and the URL."""
    import multiprocessing

    ctx = multiprocessing.get_context("fork")
    ours, theirs = ctx.Pipe()
    proc = ctx.Process(target=_serve_forever, args=(model, theirs), daemon=True)
    proc.start()
    return proc, f"http://127.0.0.1:{ours.recv()}/predict"


def _post(url):
    import json
    import urllib.request

    opener = urllib.request.build_opener(urllib.request.ProxyHandler({}))

    def call(texts):
        req = urllib.request.Request(url, data=json.dumps({"texts": texts}).encode(), headers={"Content-Type": "application/json"})
        with opener.open(req, timeout=30) as r:
            return json.loads(r.read())

    return call


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=4000, help="source texts for the suite")
    ap.add_argument("--batch-size", type=int, default=64)
    args = ap.parse_args()

    import pairflip
    from pairflip.demo.models import trained
    from pairflip.files import read_suite, write_suite
    from pairflip.probes import PythonModel
    from pairflip.probes.batching import settled_records
    from pairflip.probes.cache import PredictionCache
    from pairflip.probes.scoring import distinct_texts

    texts = real_texts()[: args.n]
    t0 = time.perf_counter()
    built = pairflip.build_suite(texts, seed=0)
    print(f"suite: {len(built)} pairs from {len(texts)} texts (built in {time.perf_counter() - t0:.1f}s)")
    with tempfile.TemporaryDirectory() as tmp:  # scored as `pairflip score` does: read from its file
        write_suite(built, Path(tmp) / "suite.jsonl")
        suite = read_suite(Path(tmp) / "suite.jsonl")
    del built
    distinct = distinct_texts(suite.pairs)
    bs = args.batch_size

    vader = _vader()
    cases = [("vader", vader, vader)]
    for name in ("deep-bow", "unigram"):
        model = trained(name)
        cases.append((name, model.predict_proba, PythonModel(model, spec=name)))
    server, url = _serve(trained("deep-bow"))
    cases.append(("deep-bow over HTTP", _post(url), url))
    for name, direct_call, as_model in cases:
        direct_t, ours_t = [], []
        for _ in range(REPEATS):  # interleaved, so both see the same machine
            t0 = time.perf_counter()
            with settled_records() as settle:  # the collector settings pairflip.score runs under
                outputs = []
                for i in range(0, len(distinct), bs):
                    outputs.append(direct_call(distinct[i : i + bs]))
                    settle()
            direct_t.append(time.perf_counter() - t0)
            del outputs  # freed outside the timed region, like the results below
            t0 = time.perf_counter()
            res = pairflip.score(suite, as_model, batch_size=bs)
            ours_t.append(time.perf_counter() - t0)
            del res
        d, o = min(direct_t), min(ours_t)
        per_text = (o - d) / len(distinct) * 1e6
        paired = statistics.median(b / a for a, b in zip(direct_t, ours_t))
        print(f"[{name}] direct model calls on {len(distinct)} distinct texts: {d:.3f}s "
              f"({d / len(distinct) * 1e6:.1f} us per text)   pairflip.score: {o:.3f}s")
        print(f"[{name}] overhead = {o / d - 1:+.1%} best against best; {paired - 1:+.1%} median of the "
              f"{REPEATS} back-to-back pairs  (target <= +10%)   pairflip's own cost: {per_text:.1f} us per distinct text")

    # pairflip's own cost alone: a model that costs nothing (one fixed probability matrix).
    free = PythonModel(Free(len(trained("deep-bow").classes_)), spec="free")
    own = []
    for _ in range(3 * REPEATS):  # cheap, and the noisiest figure
        t0 = time.perf_counter()
        res = pairflip.score(suite, free, batch_size=bs)
        own.append(time.perf_counter() - t0)
        del res
    print(f"[free model] pairflip.score alone: {min(own) * 1e3:.1f} ms = {min(own) / len(distinct) * 1e6:.2f} us per "
          f"distinct text ({len(suite)} pairs); a model costing more than "
          f"{min(own) / len(distinct) * 1e6 * 10:.0f} us per text keeps the overhead within 10%")

    server.terminate()
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
