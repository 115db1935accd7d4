"""(f) The Ray engine on this machine: build and score with 1 and 2 Ray actors against one process.

Everything runs in one process, in one run, so the ratios compare like with like:

- Ray start-up (``ray.init`` of a local instance, and ``ray.shutdown``) is timed once, apart.
- Build: N real sentences (the vaderSentiment sdist snippets, see _corpus.py), every family,
  written to a suite file as ``pairflip build`` writes it: one process with the rules in the
  same process (``--no-overlap``, one core), the one-process default (rules in a second
  process on big inputs, two cores), and ``--engine ray`` with 1 and 2 actors. A Ray run
  includes starting its actors (each loads spaCy); that start is also timed alone (a build of
  one text). The driver's own CPU time during a Ray build is printed per sentence: what one
  driver can feed at most, the basis of the README's cluster estimates.
- Score: the suite just built, with two models loaded from a SPEC as `pairflip score` does: the
  demo's deep-bag-of-words pipeline (about 10 us per text) and a stand-in for a costly model
  (``costly`` below: COSTLY_MS ms of CPU per text), one process against 1 and 2 Ray actors.
  Starting the actors (each loads the model) is timed apart, and the driver's CPU time per
  text is printed. Every Ray result is checked to be the one-process result.

Best of REPEATS for each, runs interleaved.

    python benchmarks/ray_scaling.py [--n 4000]
"""

from __future__ import annotations

import argparse
import hashlib
import logging
import os
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPEATS = 2
COSTLY_MS = 0.5


def costly(texts: list[str]) -> list[str]:
    """A stand-in for an expensive model: COSTLY_MS ms of hashing per text, then a label from
    two keyword lists (the label does not matter here, only the cost)."""
    out = []
    for t in texts:
        end = time.process_time() + COSTLY_MS / 1000
        h = t.encode("utf-8")
        while time.process_time() < end:
            h = hashlib.sha256(h).digest()
        low = t.lower()
        out.append("negative" if any(w in low for w in ("not", "bad", "never", "worst")) else "positive")
    return out


def _best(times: list[float]) -> float:
    return min(times)


def _build(texts, out: Path, nlp, lexicon, engine: str, **kw) -> tuple[float, float, int]:
    """Wall and driver CPU seconds of one build into ``out``; the number of pairs."""
    from pairflip.files import atomic_writer, write_suite_stream
    from pairflip.perturb.build import BuildStats, iter_pairs, suite_header
    from pairflip.perturb.ray_build import iter_pairs_ray

    stats = BuildStats()
    header = suite_header(None, 0, nlp, lexicon, 1, False)
    w0, c0 = time.perf_counter(), time.process_time()
    with atomic_writer(out, force=True) as fh:
        if engine == "ray":
            pairs = iter_pairs_ray(texts, nlp=nlp, lexicon=lexicon, stats=stats, **kw)
        else:
            pairs = iter_pairs(texts, nlp=nlp, lexicon=lexicon, stats=stats, **kw)
        n = write_suite_stream(header, pairs, fh)
    return time.perf_counter() - w0, time.process_time() - c0, n


def _body(path: Path) -> list[str]:
    return path.read_text(encoding="utf-8").splitlines()[1:]


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=4000)
    args = ap.parse_args()
    sys.path.insert(0, str(HERE))
    from _corpus import real_texts

    texts = real_texts()[: args.n]
    os.environ["PYTHONPATH"] = str(HERE) + os.pathsep + os.environ.get("PYTHONPATH", "")  # workers import this file
    os.environ.setdefault("RAY_USAGE_STATS_ENABLED", "0")
    os.environ.setdefault("PAIRFLIP_NO_PROGRESS", "1")

    import ray

    from pairflip.files import read_suite
    from pairflip.perturb.lexicon import load_lexicon
    from pairflip.perturb.nlp import load_nlp
    from pairflip.probes import load_model
    from pairflip.probes.ray_score import RayModel
    from pairflip.probes.scoring import score

    nlp, lexicon = load_nlp(), load_lexicon()
    cpus = os.cpu_count() or 1
    t0 = time.perf_counter()
    ray.init(address="local", num_cpus=cpus, include_dashboard=False, log_to_driver=False, logging_level=logging.ERROR)
    ray_start = time.perf_counter() - t0

    with tempfile.TemporaryDirectory() as tmp:
        tmp_path = Path(tmp)
        ref = tmp_path / "ref.jsonl"
        # ---- build
        runs = {"one process, one core (--no-overlap)": [], "one process, default (rules in a 2nd process)": [],
                "ray, 1 actor": [], "ray, 2 actors": []}
        cpu: dict[str, list[float]] = {"ray, 1 actor": [], "ray, 2 actors": []}
        _build(texts[:200], ref, nlp, lexicon, "local")  # warm caches
        for _ in range(REPEATS):
            w, _c, n_pairs = _build(texts, ref, nlp, lexicon, "local", overlap=False)
            runs["one process, one core (--no-overlap)"].append(w)
            out = tmp_path / "overlap.jsonl"
            w, _c, _ = _build(texts, out, nlp, lexicon, "local")
            runs["one process, default (rules in a 2nd process)"].append(w)
            assert _body(out) == _body(ref)
            for k in (1, 2):
                out = tmp_path / f"ray{k}.jsonl"
                w, c, _ = _build(texts, out, nlp, lexicon, "ray", replicas=k)
                runs[f"ray, {k} actor{'s' if k > 1 else ''}"].append(w)
                cpu[f"ray, {k} actor{'s' if k > 1 else ''}"].append(c)
                assert _body(out) == _body(ref), "the Ray suite differs from the one-process suite"
        starts = {k: _best([_build(texts[:1], tmp_path / "one.jsonl", nlp, lexicon, "ray", replicas=k)[0]
                            for _ in range(REPEATS)]) for k in (1, 2)}

        n = len(texts)
        base = _best(runs["one process, one core (--no-overlap)"])
        print(f"Ray engine scaling, {cpus} CPUs; best of {REPEATS}; Ray start-up apart")
        print(f"  Ray local instance: ray.init {ray_start:.2f} s")
        print(f"build, every family, {n} real sentences -> {n_pairs} pairs (suite written to a file; spaCy loaded "
              f"once in this process before the timings)")
        for name, ts in runs.items():
            b = _best(ts)
            extra = ""
            if name in cpu:
                extra = f"; driver CPU {1e3 * _best(cpu[name]) / n:.2f} ms per sentence"
            print(f"  {name:<48}: {b:6.2f} s = {n / b:5.0f} sentences/s, speed x{base / b:.2f}{extra}")
        for k, s in starts.items():
            print(f"  ray, {k} actor{'s' if k > 1 else ''}: starting the actors (spaCy loads) and one text: {s:.2f} s")
        print("  the Ray suites are byte-identical to the one-process suite (checked)")

        # ---- score
        suite = read_suite(ref)
        specs = {"deep-bow pipeline (demo)": "pairflip.demo.models:deep_bow",
                 f"costly stand-in ({COSTLY_MS} ms CPU per text)": "ray_scaling:costly"}
        for title, spec in specs.items():
            local_model = load_model(spec)
            expected = [v.to_dict() for v in score(suite, local_model, batch_size=64).verdicts]
            times: dict[str, list[float]] = {"one process": [], "ray, 1 actor": [], "ray, 2 actors": []}
            starts_s: dict[int, float] = {}
            driver_cpu: dict[int, list[float]] = {1: [], 2: []}
            for k in (1, 2):  # one set of actors at a time: each takes a CPU
                t0 = time.perf_counter()
                model = RayModel(spec, replicas=k)
                starts_s[k] = time.perf_counter() - t0
                try:
                    for _ in range(REPEATS):
                        t0 = time.perf_counter()
                        r = score(suite, local_model, batch_size=64)
                        times["one process"].append(time.perf_counter() - t0)
                        t0, c0 = time.perf_counter(), time.process_time()
                        r = score(suite, model, batch_size=64, concurrency=model.replicas)
                        times[f"ray, {k} actor{'s' if k > 1 else ''}"].append(time.perf_counter() - t0)
                        driver_cpu[k].append(time.process_time() - c0)
                        assert [v.to_dict() for v in r.verdicts] == expected, "Ray results differ"
                finally:
                    model.close()
            n_texts = r.header["texts_predicted"]
            print(f"score, {title}, {len(suite.pairs)} pairs, {n_texts} distinct texts, batches of 64")
            b0 = _best(times["one process"])
            for name, ts in times.items():
                b = _best(ts)
                extra = ""
                if name.startswith("ray"):
                    k = int(name.split()[1])
                    extra = f"; driver CPU {1e6 * _best(driver_cpu[k]) / n_texts:.0f} us per text"
                print(f"  {name:<14}: {b:6.2f} s = {n_texts / b:7.0f} texts/s, speed x{b0 / b:.2f}{extra}")
            for k, s in starts_s.items():
                print(f"  ray, {k} actor{'s' if k > 1 else ''}: starting the actors (each loads the model): {s:.2f} s")
            print("  the Ray results are the one-process results (checked)")

    t0 = time.perf_counter()
    ray.shutdown()
    print(f"Ray local instance: ray.shutdown {time.perf_counter() - t0:.2f} s")


if __name__ == "__main__":
    main()
