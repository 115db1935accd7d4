"""(a) Generation time against the floor of spaCy alone parsing the same sources.

The floor is the same pipeline pairflip loads (tok2vec, tagger, parser, attribute_ruler; no
lemmatizer, no NER) running ``nlp.pipe`` over the texts and doing nothing else. The
attribute_ruler is what sets the coarse part of speech in this spaCy package, which the rules
read; a second, stricter floor without it (tok2vec, tagger, parser only) is printed too. pairflip's time is
``iter_pairs`` over the same texts with every family, writing the suite as JSON Lines. Both are
steady state: the pipeline is loaded and warmed on 300 other texts first, and the runs are
interleaved three times to even out a noisy machine. Prints floor/time (wall clock; target >= 0.8)
and, since on two or more cores the rules run in a second process while this one parses
(perturb/overlap.py), the build's CPU time over both processes too.

    python benchmarks/generation.py [--n 13000] [--workers 1]
"""

from __future__ import annotations

import argparse
import io
import json
import os
import time

import spacy

from _corpus import real_texts


def _package(nlp) -> str:
    from pairflip.perturb.nlp import DEFAULT_MODELS
    import importlib.util

    for name in DEFAULT_MODELS:
        if importlib.util.find_spec(name) is not None:
            return name
    raise SystemExit("no spaCy English pipeline installed")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=0, help="texts to use (default: all, about 13,000)")
    ap.add_argument("--workers", type=int, default=1)
    ap.add_argument("--batch-size", type=int, default=256)
    args = ap.parse_args()

    from pairflip.perturb.build import BuildStats, iter_pairs
    from pairflip.perturb.lexicon import load_lexicon
    from pairflip.perturb.nlp import load_nlp

    texts = real_texts()
    warm, texts = texts[:300], texts[300:]
    if args.n:
        texts = texts[: args.n]
    nlp = load_nlp()
    lex = load_lexicon()
    kw = {"batch_size": args.batch_size}
    if args.workers > 1:
        kw["n_process"] = args.workers
    for _ in nlp.pipe(warm, **kw):
        pass
    list(iter_pairs(warm, nlp=nlp, lexicon=lex))

    bare = spacy.load(_package(nlp), exclude=["ner", "lemmatizer", "attribute_ruler"])
    for _ in bare.pipe(warm, **kw):
        pass
    floors, bares, ours, cpus, pairs = [], [], [], [], 0
    for _round in range(3):
        t0 = time.perf_counter()
        for _doc in nlp.pipe(texts, **kw):
            pass
        floors.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        for _doc in bare.pipe(texts, **kw):
            pass
        bares.append(time.perf_counter() - t0)

        stats = BuildStats()
        out = io.StringIO()
        c0 = os.times()
        t0 = time.perf_counter()
        for p in iter_pairs(texts, nlp=nlp, lexicon=lex, stats=stats, workers=args.workers, batch_size=args.batch_size):
            out.write(json.dumps(p.to_dict(), ensure_ascii=False) + "\n")
        ours.append(time.perf_counter() - t0)
        c1 = os.times()
        cpus.append((c1.user - c0.user) + (c1.system - c0.system) + (c1.children_user - c0.children_user)
                    + (c1.children_system - c0.children_system))
        pairs = stats.pairs

    floor, mine, bare_t = min(floors), min(ours), min(bares)
    print(f"texts: {len(texts)}  pairs: {pairs}  workers: {args.workers}  (best of 3 interleaved rounds)")
    print(f"spaCy floor (tok2vec+tagger+parser+attribute_ruler): {floor:.2f}s ({len(texts) / floor:.0f} texts/s)")
    print(f"spaCy floor (tok2vec+tagger+parser only):            {bare_t:.2f}s ({len(texts) / bare_t:.0f} texts/s)")
    print(f"pairflip build (every family, JSON Lines written):    {mine:.2f}s ({len(texts) / mine:.0f} texts/s)")
    print(f"floor/time = {floor / mine:.3f}  (target >= 0.8);  strict floor/time = {bare_t / mine:.3f}")
    cpu = min(cpus)
    print(f"CPU time of the build (both processes when the rules overlap the parse): {cpu:.2f}s; "
          f"floor/CPU = {floor / cpu:.3f}")


if __name__ == "__main__":
    main()
