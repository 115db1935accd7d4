"""Run a model on every distinct text of a suite once, then judge every pair."""

from __future__ import annotations

import math
from typing import Any, Callable, Iterable, Sequence

from pairflip.labels import LabelMap
from pairflip.probes.expectations import judge
from pairflip.records import Pair, PairflipError, Prediction, Results, Suite, Verdict


def distinct_texts(pairs: Iterable[Pair]) -> list[str]:
    """Every text the suite needs predicted, once each, in first-seen order."""
    seen: dict[str, None] = {}
    for p in pairs:
        seen.setdefault(p.source, None)
        seen.setdefault(p.variant, None)
    return list(seen)


def predict_all(
    model: Any,
    texts: Sequence[str],
    *,
    batch_size: int = 64,
    cache: Any = None,
    concurrency: int = 1,
    on_batch: Callable[[int, int], None] | None = None,
) -> dict[str, Prediction]:
    """Predict each text once, in batches; texts already in ``cache`` are not sent again.

    The cache (see :mod:`pairflip.probes.cache`) is written batch by batch, so an interrupted
    run keeps every finished batch. ``on_batch(done, total)`` reports progress.
    """
    if batch_size < 1:
        raise PairflipError(f"--batch-size must be at least 1, got {batch_size}")
    preds: dict[str, Prediction] = {}
    if cache is not None:
        preds.update(cache.get_many(model.fingerprint(), texts))
    todo = [t for t in texts if t not in preds]
    total = len(texts)
    done = total - len(todo)
    if on_batch:
        on_batch(done, total)
    batches = [todo[i : i + batch_size] for i in range(0, len(todo), batch_size)]
    from pairflip.probes.batching import run_batches

    for batch, out in run_batches(model, batches, concurrency=concurrency):
        if cache is not None:
            cache.put_many(model.fingerprint(), list(zip(batch, out)))
        preds.update(zip(batch, out))
        done += len(batch)
        if on_batch:
            on_batch(done, total)
    return preds


def _label_map(labels: LabelMap | Sequence[str] | str | None, model: Any, preds: dict[str, Prediction]) -> LabelMap:
    if isinstance(labels, LabelMap):
        return labels
    if labels:
        return LabelMap.from_labels(labels)
    classes = getattr(model, "classes", None)
    if classes:
        try:
            return LabelMap.recognise(classes)
        except PairflipError:
            pass
    seen: set[str] = {p.label for p in preds.values()}
    for p in preds.values():
        if p.probabilities:
            seen.update(p.probabilities)
    if not seen:
        raise PairflipError("the model produced no labels")
    return LabelMap.recognise(seen)


def polarity_score(pred: Prediction, lm: LabelMap, where: str = "") -> float | None:
    """Expected polarity from probabilities, else the model's own scalar score, else None."""
    if pred.probabilities:
        return lm.score_from_probabilities(pred.probabilities, where=where)
    if pred.score is not None:
        s = float(pred.score)
        if not math.isfinite(s) or not -1.0 <= s <= 1.0:
            raise PairflipError(f"{where}score {pred.score!r} is not a number in [-1, 1]")
        return s
    return None


def score(
    suite: Suite | Iterable[Pair],
    model: Any,
    *,
    labels: LabelMap | Sequence[str] | str | None = None,
    margin: float = 0.0,
    batch_size: int = 64,
    cache: Any = None,
    concurrency: int = 1,
    on_batch: Callable[[int, int], None] | None = None,
    suite_path: str | None = None,
) -> Results:
    """Score a suite: ``pairflip.score(suite, model)``, model a callable, sklearn-like object or SPEC.

    Returns :class:`~pairflip.records.Results` with one verdict per pair and a header naming the
    suite (content hash), the model and the label mapping used.
    """
    from pairflip.probes.adapters import as_model

    if margin < 0 or not math.isfinite(margin):
        raise PairflipError(f"--margin must be a number >= 0, got {margin}")
    m = as_model(model)
    pairs = list(suite)
    if not pairs:
        raise PairflipError("the suite holds no pairs; nothing to score")
    texts = distinct_texts(pairs)
    preds = predict_all(m, texts, batch_size=batch_size, cache=cache, concurrency=concurrency, on_batch=on_batch)
    lm = _label_map(labels, m, preds)
    where = f"model {m.spec}: "
    polar: dict[str, tuple[str, int, float | None]] = {}
    for t in texts:
        p = preds[t]
        lab = lm.canonical(p.label)
        polar[t] = (lab, lm.polarity_of(lab), polarity_score(p, lm, where))
    verdicts = []
    for pair in pairs:
        sl, sp, ss = polar[pair.source]
        vl, vp, vs = polar[pair.variant]
        verdicts.append(
            Verdict(
                id=pair.id,
                source_pred=sl,
                variant_pred=vl,
                verdict=judge(pair.should, sp, vp, sl, vl, ss, vs, margin),
                source_score=ss,
                variant_score=vs,
                family=pair.family,
                rule=pair.rule,
                should=pair.should,
                source=pair.source,
                variant=pair.variant,
                source_id=pair.source_id,
                label=pair.label,
            )
        )
    suite_info: dict[str, Any] = {"sha256": Suite(header={}, pairs=pairs).sha256()}
    if isinstance(suite, Suite):
        suite_info["path"] = suite_path or suite.header.get("path")
        gen = suite.header.get("generator")
        if gen:
            suite_info["generator"] = gen
    elif suite_path:
        suite_info["path"] = suite_path
    from pairflip.files import FORMAT_VERSION, RESULTS_KIND, now_iso

    header = {
        "kind": RESULTS_KIND,
        "version": FORMAT_VERSION,
        "created": now_iso(),
        "suite": suite_info,
        "model": m.describe(),
        "labels": lm.to_dict(),
        "margin": margin,
        "texts_predicted": len(texts),
    }
    return Results(header=header, verdicts=verdicts)
