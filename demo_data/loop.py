"""``pairflip demo --loop``: augment, retrain, and measure the fix on sources no model saw.

1. The labelled demo reviews are split by source (each review one source, its sentences with it)
   into two halves, seeded: the *training half* and the *held-out half*.
2. ``pairflip augment`` logic makes counterfactual rows from the training half's pairs
   (:mod:`pairflip.perturb.augment`, every family whose expectation fixes a label).
3. Each demo model is trained twice: on the training half (*before*), and on the training half
   plus the new rows (*after*, named ``NAME+aug``).
4. A suite is built on the held-out half; no source of it is in either training set (checked
   with the same test as ``--trained-on``). Both versions of each model are scored on it, and
   their plain accuracy is measured on the held-out half's labelled reviews.
"""

from __future__ import annotations

import csv
import random
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from rich.console import Console
from rich.table import Table

from pairflip.demo.models import MODEL_NAMES, load_reviews, make_model
from pairflip.records import PairflipError

AFTER = "+aug"  # suffix of a model retrained with the augmented rows

# The families whose rows the loop adds. negation is the family the demo models fail; reorder's
# rows keep their label and more text. intensifier and double-negation are left out: on three
# labels a weakened copy keeps the full label, which teaches the models that "fairly roomy" is as
# positive as "roomy" (measured with every family: the bigram model's intensifier violations rose
# from 19.9 to 58.6 %, see DEVELOPERS.md).
LOOP_FAMILIES = "negation,reorder"


def loop_files() -> list[str]:
    """The files ``run_loop`` writes into ``--out-dir`` (checked by the CLI before any work)."""
    names = [n + s for n in MODEL_NAMES for s in ("", AFTER)]
    return ["loop-train.csv", "loop-augmented.csv", "loop-heldout.csv", "loop-suite.jsonl"] + [
        f"loop-results-{n}.jsonl" for n in names]


def split_by_source(texts: list[str], seed: int) -> tuple[list[int], list[int]]:
    """Indices of the training half and the held-out half, each text (source) in one of them.

    The texts are ordered by their source id, shuffled with ``seed``, and cut in the middle, so
    the split depends only on the texts and the seed, not on the file's order."""
    from pairflip.records import stable_id

    order = sorted(range(len(texts)), key=lambda i: stable_id("source", texts[i]))
    random.Random(seed).shuffle(order)
    half = len(order) // 2
    return sorted(order[:half]), sorted(order[half:])


@dataclass
class ModelOutcome:
    name: str
    accuracy_before: float
    accuracy_after: float
    summary_before: Any
    summary_after: Any
    violation: dict[str, tuple[float, float]] = field(default_factory=dict)  # family -> (before, after)
    # negation pairs by the polarity the model gave the source: (violations, judged) before and after
    by_source: dict[str, tuple[tuple[int, int], tuple[int, int]]] = field(default_factory=dict)


@dataclass
class LoopOutcome:
    seed: int
    train_texts: int
    heldout_texts: int
    augmented_rows: int
    augment_stats: Any
    leaked: int  # held-out sources found in the training data (must be 0)
    heldout_sources: int
    models: dict[str, ModelOutcome]


def accuracy(model: Any, texts: list[str], labels: list[str]) -> float:
    pred = model.predict(texts)
    return sum(1 for p, g in zip(pred, labels) if str(p) == g) / len(labels)


def run_loop(*, seed: int, console: Console, log: Console, examples: int = 0, out_dir: Path | None = None,
             families: Any = LOOP_FAMILIES) -> LoopOutcome:
    from pairflip.files import write_results, write_suite
    from pairflip.labels import LabelMap
    from pairflip.perturb import build_suite
    from pairflip.perturb.augment import AugmentStats, SourceSet, augment_rows, leaked_sources
    from pairflip.perturb.nlp import load_nlp
    from pairflip.probes import PythonModel, score
    from pairflip.report import render, summarize

    t0 = time.perf_counter()
    texts, labels = load_reviews()
    train_i, held_i = split_by_source(texts, seed)
    train = [(texts[i], labels[i]) for i in train_i]
    held = [(texts[i], labels[i]) for i in held_i]
    nlp = load_nlp(None)

    # The rows: whole reviews are the sources, since a review's label belongs to the whole text.
    stats = AugmentStats()
    scale = LabelMap.recognise(labels)
    train_suite = build_suite(train, families=families, seed=seed, nlp=nlp, unit="text")
    from pairflip.records import text_digest

    known = {text_digest(t) for t, _ in train + held}
    rows = list(augment_rows(train_suite.pairs, scale, known_texts=known, stats=stats))
    extra = [(r.text, r.label) for r in rows]
    log.print(f"split {len(texts)} labelled demo reviews by source (seed {seed}): {len(train)} to train on, "
              f"{len(held)} held out; augmented the training half with {len(rows)} rows "
              f"({', '.join(f'{lab} {n}' for lab, n in sorted(stats.labels.items()))})", markup=False, soft_wrap=True)

    held_suite = build_suite(held, seed=seed, nlp=nlp)
    held_suite.header["corpus"] = "held-out half of demo_data/reviews.csv"
    seen = SourceSet()
    for t, _ in train + extra:
        seen.add_text(t)
    for r in rows:
        seen.add_id(r.source_id)
    leaked, n_sources = leaked_sources(held_suite.pairs, seen)
    log.print(f"held-out suite: {len(held_suite.pairs)} pairs from {n_sources} sources, {leaked} of them in the "
              f"training data", markup=False, soft_wrap=True)
    if leaked:
        raise PairflipError(f"demo loop: {leaked} held-out sources are in the training data; the split is broken")

    if out_dir is not None:
        _write_csv(out_dir / "loop-train.csv", ["text", "label"], train)
        _write_csv(out_dir / "loop-heldout.csv", ["text", "label"], held)
        _write_csv(out_dir / "loop-augmented.csv", ["text", "label", "source_id", "rule"],
                   [(r.text, r.label, r.source_id, r.rule) for r in rows])
        write_suite(held_suite, out_dir / "loop-suite.jsonl")

    held_texts = [t for t, _ in held]
    held_labels = [lab for _, lab in held]
    outcomes: dict[str, ModelOutcome] = {}
    summaries = []
    for name in MODEL_NAMES:
        pair = []
        for tag, data in ((name, train), (name + AFTER, train + extra)):
            m = make_model(name, seed).fit([t for t, _ in data], [lab for _, lab in data])
            res = score(held_suite, PythonModel(m, spec=f"{tag} (demo loop)", name=tag), suite_path="held-out suite")
            if out_dir is not None:
                write_results(res, out_dir / f"loop-results-{tag}.jsonl")
            s = summarize(res, examples=max(5, examples))
            pair.append((accuracy(m, held_texts, held_labels), s, negation_by_source(res, scale)))
            summaries.append(s)
        (acc_b, s_b, d_b), (acc_a, s_a, d_a) = pair
        viol = {f: (s_b.families[f].violation_rate, s_a.families[f].violation_rate)
                for f in s_b.families if f in s_a.families and s_b.families[f].applicable}
        by_source = {k: (d_b.get(k, (0, 0)), d_a.get(k, (0, 0))) for k in ("positive", "negative")}
        outcomes[name] = ModelOutcome(name, acc_b, acc_a, s_b, s_a, viol, by_source)

    render(summaries, console=console, examples=examples)
    console.print()
    console.print(loop_table(outcomes))
    console.print()
    console.print("copula and modal negations violated, by the model's label for the source, before -> after",
                  markup=False, soft_wrap=True)
    console.print(direction_table(outcomes))
    console.print(
        "accuracy: plain accuracy on the held-out reviews' labels (negative, neutral, positive); violation rates "
        "on the held-out suite; before = trained on the training half, +aug = the same plus the augmented rows",
        markup=False, soft_wrap=True)
    log.print(f"demo loop finished in {time.perf_counter() - t0:.1f}s"
              + (f"; files in {out_dir}" if out_dir is not None else "; rerun with --out-dir DIR to keep its files"),
              markup=False)
    return LoopOutcome(seed, len(train), len(held), len(rows), stats, leaked, n_sources, outcomes)


# Negations whose edit touches only the auxiliary ("is" -> "isn't", "is not"; "will" -> "won't"):
# to a bag of single words the pair differs by the negator's tokens alone.
AUX_ONLY = ("negation/copula", "negation/modal")


def negation_by_source(results: Any, scale: Any) -> dict[str, tuple[int, int]]:
    """Pairs of :data:`AUX_ONLY` judged, by the polarity of the model's label for the source:
    ``{"positive": (violations, judged), "negative": ...}`` (neutral sources are n/a for flip)."""
    out: dict[str, list[int]] = {}
    for v in results.verdicts:
        if v.rule not in AUX_ONLY or v.verdict == "n/a":
            continue
        pol = scale.polarity_of(v.source_pred)
        c = out.setdefault("positive" if pol > 0 else "negative", [0, 0])
        c[0] += v.verdict == "violation"
        c[1] += 1
    return {k: (a, b) for k, (a, b) in out.items()}


def direction_table(outcomes: dict[str, ModelOutcome]) -> Table:
    """Copula and modal negations by the source's polarity: where a bag of single words can learn
    one direction only."""
    t = Table(show_edge=False, pad_edge=False)
    t.add_column("model")
    t.add_column("praise negated", justify="right")
    t.add_column("complaint negated", justify="right")
    for o in outcomes.values():
        cells = []
        for k in ("positive", "negative"):
            (vb, nb), (va, na) = o.by_source[k]
            cells.append(f"{vb}/{nb} -> {va}/{na}")
        t.add_row(o.name, *cells)
    return t


def _pts(before: float, after: float) -> str:
    return f"{(after - before) * 100:+.1f}"


def loop_table(outcomes: dict[str, ModelOutcome]) -> Table:
    """Per model: held-out accuracy and each family's violation rate, before, after, change."""
    t = Table(title="held-out accuracy and violation rates (%), before and after augmenting", box=None,
              pad_edge=False, padding=(0, 1), collapse_padding=True, title_justify="left", header_style="bold")
    t.add_column("model", no_wrap=True, min_width=len("deep-bow" + AFTER))
    t.add_column("accuracy", justify="right", no_wrap=True)
    fams = sorted(next(iter(outcomes.values())).violation, key=lambda f: f != "negation") if outcomes else []
    for f in fams:
        t.add_column(f, justify="right", no_wrap=True)
    for i, o in enumerate(outcomes.values()):
        rates = [o.violation.get(f, (float("nan"), float("nan"))) for f in fams]
        t.add_row(o.name, f"{o.accuracy_before * 100:.1f}", *(f"{b * 100:.1f}" for b, _ in rates))
        t.add_row(o.name + AFTER, f"{o.accuracy_after * 100:.1f}", *(f"{a * 100:.1f}" for _, a in rates))
        t.add_row("  change", _pts(o.accuracy_before, o.accuracy_after), *(_pts(b, a) for b, a in rates),
                  style="dim", end_section=i < len(outcomes) - 1)
    return t


def _write_csv(path: Path, columns: list[str], rows: list[tuple[Any, ...]]) -> None:
    from pairflip.files import atomic_writer

    with atomic_writer(path, force=True) as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(columns)
        w.writerows(rows)
