"""Run a model on every distinct text of a suite once, then judge every pair.

Many pairs share a source sentence, so the suite's texts are collected first (each once, in
first-seen order) and sent to the model in batches of ``batch_size``. With a prediction cache
the texts it already holds for this model are not sent again, and each finished batch is
committed at once, so an interrupted run resumes where it stopped.

Outputs stay column-wise (:mod:`pairflip.probes.outputs`): probability matrices as arrays,
polarity scores computed per run of batches, every expectation judged on arrays
(:func:`~pairflip.probes.expectations.judge_many`); the only per-pair Python work left is making
the Verdict records themselves.
"""

from __future__ import annotations

import hashlib
import math
import sqlite3
from typing import Any, Callable, Iterable, Sequence

import numpy as np

from pairflip.labels import PROBABILITY_TOLERANCE, LabelMap
from pairflip.probes.batching import ModelError, check_run_options, paused_gc, run_batches, settled_records
from pairflip.probes.expectations import OUTCOMES, SHOULD_CODES, judge_many
from pairflip.probes.outputs import Outputs, Resolved, TextTable
from pairflip.records import SHOULDS, Pair, PairflipError, Prediction, Results, Suite, Verdict, suite_sha256


def distinct_texts(pairs: Iterable[Pair]) -> list[str]:
    """Every text the suite needs predicted, once each, in first-seen order."""
    seen: dict[str, None] = {}
    for p in pairs:
        seen.setdefault(p.source, None)
        seen.setdefault(p.variant, None)
    return list(seen)


def _index_pairs(pairs: list[Pair]) -> tuple[list[str], np.ndarray, np.ndarray, np.ndarray]:
    """The distinct texts (first-seen order), each pair's source and variant position among them,
    and each pair's expectation as a code (an unknown expectation is named)."""
    index: dict[str, int] = {}
    put = index.setdefault
    si: list[int] = []
    vi: list[int] = []
    for p in pairs:  # len() is read before the text goes in
        si.append(put(p.source, len(index)))
        vi.append(put(p.variant, len(index)))
    try:
        should = [SHOULD_CODES[p.should] for p in pairs]
    except KeyError:
        _check_pairs(pairs)
        raise
    return list(index), np.array(si, dtype=np.intp), np.array(vi, dtype=np.intp), np.array(should, dtype=np.int8)


def predict_all(model: Any, texts: Sequence[str], **options: Any) -> dict[str, Prediction]:
    """Predict each text once, in batches; texts already in ``cache`` are not sent again.
    Returns ``{text: Prediction}``; the options are :func:`predict_table`'s."""
    return predict_table(model, list(dict.fromkeys(texts)), **options).as_dict()


def cache_fingerprint(model: Any, cache_key: str | None = None) -> str:
    """The key the model's predictions are cached under: its fingerprint, tied to ``cache_key``
    (``--cache-key``, e.g. a model version) when one is given."""
    fp = model.fingerprint()
    if cache_key is None:
        return fp
    return hashlib.sha256(f"{fp}\x1f--cache-key\x1f{cache_key}".encode("utf-8")).hexdigest()


def check_cache_key(cache_key: Any) -> None:
    if cache_key is not None and (not isinstance(cache_key, str) or not cache_key.strip()):
        raise PairflipError(f"--cache-key {cache_key!r}: empty; expected a text such as a model version (v3, 2024-05-retrain)")


def predict_table(
    model: Any,
    texts: Sequence[str],
    *,
    batch_size: int = 64,
    cache: Any = None,
    concurrency: int = 1,
    on_batch: Callable[[int, int], None] | None = None,
    cache_key: str | None = None,
) -> TextTable:
    """Predict each of the distinct ``texts`` once, in batches of ``batch_size``; texts already in
    ``cache`` are not sent again. Returns the outputs column-wise (:class:`TextTable`).

    The cache (see :mod:`pairflip.probes.cache`) is written batch by batch, so an interrupted
    or failed run keeps every finished batch, except predictions the model's own checks later
    find untrustworthy (a ``cmd:`` process out of step with its requests: :class:`ModelError`
    ``retract``), which are removed again. After the last batch the model's ``finish()`` (when it
    has one) checks the end of its answers. ``on_batch(done, total)`` reports progress in texts.
    """
    check_run_options(batch_size=batch_size, concurrency=concurrency)
    check_cache_key(cache_key)
    table = TextTable(texts)
    total = len(texts)
    fp = cache_fingerprint(model, cache_key) if cache is not None else ""
    todo = np.arange(total, dtype=np.intp)
    if cache is not None:
        hits = cache.get_many(fp, texts)
        if hits:
            known = np.fromiter((t in hits for t in texts), dtype=bool, count=total)
            table.add(todo[known], Outputs.of([hits[texts[i]] for i in np.flatnonzero(known).tolist()]))
            todo = todo[~known]
    done = total - len(todo)
    if on_batch:
        on_batch(done, total)
    spans = [todo[i : i + batch_size] for i in range(0, len(todo), batch_size)]
    batches = [[texts[j] for j in span.tolist()] for span in spans]
    finished = False
    with settled_records() as settle:
        try:
            for i, batch, out in run_batches(model, batches, concurrency=concurrency):
                if cache is not None:
                    try:
                        cache.put_many(fp, list(zip(batch, out)))
                    except sqlite3.Error as err:
                        raise PairflipError(f"--cache {getattr(cache, 'path', '')}: cannot write predictions ({err})") from None
                table.add(spans[i], out)
                done += len(batch)
                settle()
                if on_batch:
                    on_batch(done, total)
            finish = getattr(model, "finish", None)
            finished = True
            if finish is not None:
                try:
                    finish()
                except ModelError as err:
                    raise ModelError(f"model {model.spec}: at the end of the run: {err}", retract=err.retract) from None
        except BaseException as err:
            retract = list(getattr(err, "retract", ()))
            doubtful = getattr(model, "doubtful", None)
            if not finished and doubtful is not None:  # other processes may be out of step too
                retract += doubtful()
            if retract and isinstance(err, ModelError):
                raise _retracted(err, cache, fp, retract) from None
            if retract:
                _retracted(err, cache, fp, retract)  # an interrupt or another error stays what it was
            raise
    return table


def _retracted(err: BaseException, cache: Any, fp: str, retract: list[str]) -> BaseException:
    """Remove the predictions of ``retract`` (texts that can no longer be trusted) from the
    cache; the error, saying so."""
    if cache is None:
        return err
    try:
        n = cache.delete_many(fp, retract)
    except sqlite3.Error as db_err:
        return ModelError(f"{err}; removing its untrustworthy predictions from --cache {getattr(cache, 'path', '')} "
                          f"failed ({db_err}): delete that file before the next run")
    if not n:
        return err
    text = str(err)
    rule = "" if "one line per request" in text else " (a cmd: model prints exactly one line per request)"
    return ModelError(
        f"{text}; {n} prediction{'s' if n != 1 else ''} given earlier in the run by processes out of step with "
        f"their requests were removed from --cache{rule}; echo each request's \"id\" in its answer to have "
        f"every answer checked"
    )


def label_map(labels: LabelMap | Sequence[str] | str | None, model: Any,
              preds: dict[str, Prediction] | TextTable) -> LabelMap:
    """The mapping in force: ``labels`` when given, else recognised from the model's classes and
    every label it produced. Every label seen must be on the scale."""
    if isinstance(preds, TextTable):
        seen = preds.labels_seen()
    else:
        seen = Outputs.of(list(preds.values())).labels_seen()
    classes = list(getattr(model, "classes", None) or [])
    if isinstance(labels, LabelMap):
        lm = labels
    elif labels:
        lm = LabelMap.from_labels(labels)
    else:
        lm = LabelMap.recognise(set(classes) | seen)
    lm.check(seen | set(classes), where=f"model {model.spec}: ")
    return lm


def polarity_score(pred: Prediction, lm: LabelMap, where: str = "") -> float | None:
    """The model's own scalar score when it gives one, else the expected polarity under its
    probabilities, else None (label-only model).

    Predictions reach here checked (batching.check_outputs); the fast paths below only skip
    re-checking well-formed values, anything else goes through the LabelMap's own checks.
    """
    sc = pred.score
    if sc is not None:
        if type(sc) is float and -1.0 <= sc <= 1.0:  # NaN fails the comparison and is checked below
            return sc
        return lm.check_score(sc, where=where)
    probs = pred.probabilities
    if probs:
        pol = lm.polarity
        try:
            total = 0.0
            acc = 0.0
            for k, v in probs.items():
                total += v
                acc += v * pol[k]
        except (KeyError, TypeError):
            return lm.score_from_probabilities(probs, where=where)
        if total > 0 and abs(total - 1.0) <= PROBABILITY_TOLERANCE:
            return max(-1.0, min(1.0, acc / total))
        return lm.score_from_probabilities(probs, where=where)
    return None


# The polarity-score change (on [-1, 1]) that strengthen/weaken/rise/fall tolerate unless told
# otherwise: 0.05, a move of 2.5 % of the score's range. With 0, any wobble of a probability (a
# retrained model moves scores of untouched texts by a few hundredths) became a violation.
# The value is a documented choice, not a measured property of any model; see the README.
DEFAULT_MARGIN = 0.05


def _check_pairs(pairs: list[Pair]) -> None:
    for p in pairs:
        if p.should not in SHOULDS:
            raise PairflipError(
                f"pair {p.id} ({p.rule}): should {p.should!r} is not one of {', '.join(SHOULDS)}"
            )


def score(
    suite: Suite | Iterable[Pair],
    model: Any,
    *,
    labels: LabelMap | Sequence[str] | str | None = None,
    margin: float = DEFAULT_MARGIN,
    batch_size: int = 64,
    cache: Any = None,
    concurrency: int = 1,
    on_batch: Callable[[int, int], None] | None = None,
    suite_path: str | None = None,
    cache_key: str | None = None,
) -> Results:
    """Score a suite: ``pairflip.score(suite, model)``, model a callable, sklearn-like object or SPEC.

    ``labels`` (most negative first) overrides the recognised label scale; ``margin`` is the
    score change strengthen/weaken tolerate; ``batch_size`` texts go to the model per call, up to
    ``concurrency`` calls at once (HTTP and ``cmd:`` models); ``cache`` is a
    :class:`~pairflip.probes.cache.PredictionCache`, whose key for this model's predictions is
    the model's fingerprint tied to ``cache_key`` when given (``--cache-key``). Returns
    :class:`~pairflip.records.Results`: one verdict per pair and a header naming the suite
    (content hash and path), the model (``describe()``) and the label mapping used.
    """
    from pairflip.probes.adapters import Model, as_model

    if isinstance(margin, bool) or not isinstance(margin, (int, float)) or not math.isfinite(margin) or margin < 0:
        raise PairflipError(f"--margin must be a number >= 0, got {margin!r}")
    given = LabelMap.from_labels(labels) if labels and not isinstance(labels, LabelMap) else labels
    check_run_options(batch_size=batch_size, concurrency=concurrency)
    check_cache_key(cache_key)
    pairs = list(suite)
    if not pairs:
        raise PairflipError("the suite holds no pairs; nothing to score")
    texts, si, vi, should = _index_pairs(pairs)
    m = as_model(model)
    try:
        table = predict_table(m, texts, batch_size=batch_size, cache=cache, concurrency=concurrency, on_batch=on_batch,
                              cache_key=cache_key)
    finally:
        if not isinstance(model, Model):  # made here from a SPEC or object: stop its processes
            m.close()
    lm = label_map(given, m, table)
    with settled_records() as settle, paused_gc():
        verdicts = _judge_all(pairs, si, vi, should, table.resolve(lm, f"model {m.spec}: "), float(margin))
        # The verdicts live as long as the results: put them in the oldest generation at once
        # rather than through two young-generation collections that walk every one of them.
        settle()
    results = _results(suite, suite_path, pairs, texts, m, lm, margin, verdicts)
    if cache is not None:
        results.header["cache"] = {"key_covers": key_covers(m, cache_key)}
    return results


def key_covers(model: Any, cache_key: str | None = None) -> str:
    """In words, what the model's prediction cache key is made of."""
    covers = getattr(model, "key_covers", None) or "the model SPEC"
    return f"{covers} and --cache-key {cache_key!r}" if cache_key is not None else covers


def _judge_all(pairs: list[Pair], si: np.ndarray, vi: np.ndarray, should: np.ndarray, r: Resolved,
               margin: float) -> list[Verdict]:
    """One verdict per pair: the expectations judged on arrays (:func:`judge_many`), then one
    Verdict built per pair from plain lists."""
    outcome = judge_many(should, r.polarity[si], r.polarity[vi], r.code[si], r.code[vi], r.score[si], r.score[vi],
                         margin, r.strength[si], r.strength[vi])
    names = np.array(OUTCOMES, dtype=object)[outcome].tolist()
    return [  # positional Verdict fields: this runs once per pair
        Verdict(p.id, sl, vl, o, ss, vs, p.family, p.rule, p.should, p.source, p.variant, p.source_id, p.label)
        for p, sl, vl, o, ss, vs in zip(pairs, r.labels_at(si), r.labels_at(vi), names, r.scores_at(si), r.scores_at(vi))
    ]


def _results(suite: Any, suite_path: str | None, pairs: list[Pair], texts: list[str], m: Any, lm: LabelMap,
             margin: float, verdicts: list[Verdict]) -> Results:
    suite_info: dict[str, Any] = {"sha256": suite_sha256(pairs)}
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
        "margin": float(margin),
        "texts_predicted": len(texts),
    }
    return Results(header=header, verdicts=verdicts)
