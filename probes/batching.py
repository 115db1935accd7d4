"""Sending batches to a model, several in flight at once if asked, and checking what comes back.

Every adapter returns one :class:`~pairflip.records.Prediction` per text, usually as a checked
column-wise :class:`~pairflip.probes.outputs.Outputs` block (a sequence of Predictions made on
demand). :func:`run_batches` checks each batch's outputs (count, missing or NaN labels, probabilities that are not a
distribution, scores outside [-1, 1]) and turns any failure into a
:class:`~pairflip.records.PairflipError` naming the model SPEC and the batch, so the user knows
what failed and where. Batches are yielded as they finish; the caller writes each one to the
prediction cache before the next is yielded, so a failure later on loses nothing finished.
"""

from __future__ import annotations

import gc
import math
import signal
from contextlib import contextmanager
from concurrent.futures import FIRST_COMPLETED, Future, ThreadPoolExecutor, wait
from collections.abc import Mapping
from typing import Any, Callable, Iterator, Sequence

from pairflip.labels import PROBABILITY_TOLERANCE, normalise_label
from pairflip.probes.outputs import Outputs
from pairflip.records import Interrupted, PairflipError, Prediction


class ModelError(PairflipError):
    """A model failed or answered badly. Adapters raise it without context; :func:`run_batches`
    adds the model SPEC and the batch.

    ``retract`` lists texts whose predictions, given earlier in the run, can no longer be trusted
    (a ``cmd:`` process whose answers turned out to be out of step with its requests); the
    caller removes them from the prediction cache.
    """

    def __init__(self, message: str, *, retract: Sequence[str] = ()) -> None:
        super().__init__(message)
        self.retract = list(retract)


def check_run_options(*, batch_size: Any = None, concurrency: Any = None, timeout: Any = None,
                      retries: Any = None) -> None:
    """The options that shape a run, checked before any work (None: not given)."""
    for name, value, least in (("batch-size", batch_size, 1), ("concurrency", concurrency, 1), ("retries", retries, 0)):
        if value is not None and (isinstance(value, bool) or not isinstance(value, int) or value < least):
            raise PairflipError(f"--{name} must be a whole number >= {least}, got {value!r}")
    if timeout is not None and (
        isinstance(timeout, bool) or not isinstance(timeout, (int, float)) or not math.isfinite(timeout) or timeout <= 0
    ):
        shown = f"{timeout:g}" if isinstance(timeout, float) else repr(timeout)
        raise PairflipError(f"--timeout must be a finite number of seconds > 0, got {shown}")


# --------------------------------------------------------------------------- raw output -> Prediction


def as_label(x: Any, i: int) -> str:
    """One output label as a string; None, NaN, empty strings and sequences are refused."""
    if type(x) is str:
        lab = x.strip()
        if lab:
            return lab
        raise ModelError(f"output {i} is an empty label")
    if x is None or (isinstance(x, float) and math.isnan(x)) or (_numpy_nan(x)):
        raise ModelError(f"output {i} is {x!r}, expected a label")
    if isinstance(x, (list, tuple, dict, set)) or (hasattr(x, "shape") and getattr(x, "shape", ()) != ()):
        raise ModelError(f"output {i} is {type(x).__name__} {str(x)[:60]}, expected one label per text")
    lab = normalise_label(x)
    if not lab:
        raise ModelError(f"output {i} is an empty label")
    return lab


def _numpy_nan(x: Any) -> bool:
    if type(x).__module__ != "numpy" or getattr(x, "shape", None) not in ((), None):
        return False
    try:
        return math.isnan(float(x))
    except (TypeError, ValueError):
        return False


def _float(x: Any, what: str) -> float:
    if isinstance(x, bool):
        raise ModelError(f"{what} is {x!r}, expected a number")
    try:
        f = float(x)
    except (TypeError, ValueError):
        raise ModelError(f"{what} is {x!r}, expected a number") from None
    if not math.isfinite(f):
        raise ModelError(f"{what} is {x!r}, expected a finite number")
    return f


@contextmanager
def paused_gc() -> Iterator[None]:
    """Pause Python's cycle collector while building many small acyclic records (predictions,
    verdicts): each collection walks every live object, the whole suite included, and cost more
    than the records themselves. Reference counting still frees everything; only cycles wait,
    and the collector resumes (if it was on) when the block ends. Common practice for
    allocation-heavy batch loops in CPython."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


@contextmanager
def settled_records() -> Iterator[Callable[[], None]]:
    """Yield ``settle()``: call it after each finished batch to move everything alive so far
    (the suite, the predictions) out of the cycle collector's view, so the model's own
    allocations in the next batch do not trigger collections that walk an ever larger heap
    (measured: that made in-process scikit-learn calls about half again slower). Everything
    returns to the collector when the block ends. Skipped when someone else already uses
    ``gc.freeze`` (the unfreeze at the end would undo theirs)."""
    own = gc.isenabled() and gc.get_freeze_count() == 0
    try:
        yield (gc.freeze if own else (lambda: None))
    finally:
        if own:
            gc.unfreeze()


def build_predictions(
    n: int,
    *,
    labels: Sequence[Any] | None = None,
    probabilities: Sequence[Sequence[Any]] | None = None,
    classes: Sequence[Any] | None = None,
    scores: Sequence[Any] | None = None,
) -> Outputs:
    """Checked outputs from column-wise model outputs (a list of labels, a probability matrix
    over ``classes``, a list of scalar scores), checking every length against ``n`` texts.

    Without labels, each label is the most probable class. A well-formed float matrix is checked
    in one go and kept as it is (an :class:`~pairflip.probes.outputs.Outputs` block); anything
    else is checked value by value, and the first bad value is named.
    """
    if labels is None and probabilities is None:
        raise ModelError("the output holds neither labels nor probabilities")
    cols: dict[str, Sequence[Any]] = {}
    for name, col in (("labels", labels), ("probabilities", probabilities), ("scores", scores)):
        if col is None:
            continue
        if isinstance(col, (str, bytes, Mapping)) or not hasattr(col, "__len__"):
            raise ModelError(f"{name} is {type(col).__name__}, expected a list with one entry per text")
        if len(col) != n:
            raise ModelError(f"the output has {len(col)} {name} for {n} texts; expected one per text")
        cols[name] = col
    cls: list[str] | None = None
    if probabilities is not None:
        if classes is None:
            raise ModelError("probabilities came without the classes they refer to")
        cls = [as_label(c, i) for i, c in enumerate(classes)]
        if len(set(cls)) != len(cls):
            raise ModelError(f"the classes {cls} repeat a label")
    fast = _fast_probabilities(cols.get("probabilities"), n, cls) if cls is not None else None
    if fast is not None and scores is None:
        arr, best = fast
        assert cls is not None
        if type(labels) is list and labels == [cls[b] for b in best.tolist()]:
            labels = None  # the usual answer: each label is its row's most probable class
        if labels is None:
            return Outputs(probabilities=arr, classes=cls, best=best)
        return Outputs(labels=[as_label(lab, i) for i, lab in enumerate(cols["labels"])], probabilities=arr, classes=cls)
    if cls is None and scores is None and labels is not None:
        return Outputs(labels=[as_label(lab, i) for i, lab in enumerate(cols["labels"])])
    with paused_gc():  # one Prediction per text from here on
        return check_outputs(range(n), _per_value(n, cols, cls))


def _per_value(n: int, cols: dict[str, Sequence[Any]], cls: list[str] | None) -> list[Prediction]:
    """One Prediction per text from the columns given, each value checked on its own (the first
    bad one is named)."""
    out = []
    for i in range(n):
        probs = None
        if cls is not None:
            row = cols["probabilities"][i]
            if isinstance(row, (str, bytes, Mapping)) or not hasattr(row, "__len__"):
                raise ModelError(f"probabilities of output {i} are {type(row).__name__}, expected a list of {len(cls)} numbers")
            if len(row) != len(cls):
                raise ModelError(
                    f"output {i} has {len(row)} probabilities for {len(cls)} classes {cls}; expected one per class"
                )
            probs = {c: _float(p, f"probability of {c!r} in output {i}") for c, p in zip(cls, row)}
        if "labels" in cols:
            lab = as_label(cols["labels"][i], i)
        else:
            assert probs is not None
            lab = max(probs, key=probs.__getitem__)  # first class wins a tie
        sc = None
        if "scores" in cols:
            sc = _float(cols["scores"][i], f"score of output {i}")
        out.append(Prediction(label=lab, score=sc, probabilities=probs))
    return out


def _fast_probabilities(col: Any, n: int, cls: list[str]) -> tuple[Any, Any] | None:
    """A well-formed float matrix, checked in one go (finite, >= 0, rows summing to 1): a float64
    copy of it (the model may reuse its buffer) and each row's most probable column; ``None``
    sends the caller down the per-value path, which names the first bad value."""
    import numpy as np

    try:
        arr = np.asarray(col)
    except (TypeError, ValueError):
        return None
    if arr.dtype.kind != "f" or arr.shape != (n, len(cls)):
        return None
    arr = np.array(arr, dtype=np.float64)
    if n == 0:
        return arr, np.zeros(0, dtype=np.intp)
    # NaN fails both comparisons; an infinity makes its row's sum infinite or NaN.
    if not (arr.min() >= 0.0 and np.abs(arr.sum(axis=1) - 1.0).max() <= PROBABILITY_TOLERANCE):
        return None
    return arr, arr.argmax(axis=1)


_LABEL_SCORE = frozenset({"label", "score"})


def prediction_from_item(x: Any, i: int) -> Prediction:
    """One output of a Python callable: a label, or a dict with ``label`` / ``probabilities``
    (label -> p) / ``score``, or a ready :class:`Prediction`."""
    if isinstance(x, Prediction):
        x = {"label": x.label, "score": x.score, "probabilities": x.probabilities}
    if type(x) is str:  # the common case: a plain label
        return Prediction(as_label(x, i))
    if type(x) is dict and x.keys() <= _LABEL_SCORE:  # the other common case: {"label", "score"}
        lab, sc = x.get("label"), x.get("score")
        if type(lab) is str and lab and not lab[0].isspace() and not lab[-1].isspace() and (
            sc is None or (type(sc) is float and -1.0 <= sc <= 1.0)  # NaN fails the comparison
        ):
            return Prediction(lab, sc)
    if type(x) is dict or isinstance(x, Mapping):
        unknown = set(x) - {"label", "probabilities", "score"}
        if unknown:
            raise ModelError(f"output {i} has unknown keys {sorted(map(str, unknown))}; expected label, probabilities, score")
        probs = None
        if x.get("probabilities") is not None:
            raw = x["probabilities"]
            if not isinstance(raw, Mapping):
                raise ModelError(f"probabilities of output {i} are {type(raw).__name__}, expected a mapping label -> probability")
            probs = {as_label(k, i): _float(v, f"probability of {k!r} in output {i}") for k, v in raw.items()}
            if not probs:
                raise ModelError(f"output {i} has an empty probabilities mapping")
        if "label" in x:
            lab = as_label(x["label"], i)
        elif probs:
            lab = max(probs, key=probs.__getitem__)
        else:
            raise ModelError(f"output {i} is a dict without 'label' or 'probabilities'")
        sc = None if x.get("score") is None else _float(x["score"], f"score of output {i}")
        return Prediction(label=lab, score=sc, probabilities=probs)
    return Prediction(label=as_label(x, i))


def outputs_from_items(raw: list[Any]) -> Outputs:
    """Checked outputs from one output per text (see :func:`prediction_from_item`). The common
    forms, plain labels and ``{"label", "score"}`` dicts, are kept as two lists; a batch holding
    anything else is turned into Predictions one by one."""
    labels: list[str] = []
    scores: list[float | None] = []
    scored = False
    add_label, add_score = labels.append, scores.append
    for x in raw:
        if type(x) is str:
            lab, sc = x, None
        elif type(x) is dict and x.keys() <= _LABEL_SCORE:
            lab, sc = x.get("label"), x.get("score")
            if sc is not None:
                if type(sc) is not float or not -1.0 <= sc <= 1.0:  # NaN fails the comparison
                    break
                scored = True
        else:
            break
        if type(lab) is not str or not lab or lab[0].isspace() or lab[-1].isspace():
            break
        add_label(lab)
        add_score(sc)
    else:
        return Outputs(labels=labels, scores=scores if scored else None)
    return check_outputs(raw, [prediction_from_item(x, i) for i, x in enumerate(raw)])


# --------------------------------------------------------------------------- checking a batch


def check_outputs(batch: Sequence[Any], out: Any) -> Outputs:
    """Raise :class:`ModelError` unless ``out`` is one well-formed Prediction per text; return
    the outputs as a checked block (an :class:`Outputs` block from an adapter is checked already)."""
    if type(out) is Outputs:
        if len(out) != len(batch):
            raise ModelError(f"{len(batch)} texts got {len(out)} outputs; expected one output per text")
        return out
    if isinstance(out, (str, bytes, Mapping)) or not hasattr(out, "__len__"):
        raise ModelError(f"the model returned {type(out).__name__}, expected a list with one output per text")
    out = list(out)
    if len(out) != len(batch):
        raise ModelError(f"{len(batch)} texts got {len(out)} outputs; expected one output per text")
    for i, p in enumerate(out):
        if type(p) is Prediction and p.probabilities is None and p.label and type(p.label) is str:
            sc = p.score  # the common label (+ score) output, checked in two comparisons
            if sc is None or (type(sc) is float and -1.0 <= sc <= 1.0):
                continue
        if not isinstance(p, Prediction):
            raise ModelError(f"output {i} is {type(p).__name__}, expected a Prediction")  # adapter bug
        if not p.label:
            raise ModelError(f"output {i} has no label")
        if p.probabilities is not None:
            total = 0.0
            for lab, v in p.probabilities.items():
                if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v < 0:
                    raise ModelError(f"output {i}: probability {v!r} of {lab!r} is not a finite number >= 0")
                total += v
            if abs(total - 1.0) > PROBABILITY_TOLERANCE:
                raise ModelError(
                    f"output {i}: probabilities {dict(p.probabilities)} sum to {total:.6g}, expected 1 "
                    f"(within {PROBABILITY_TOLERANCE})"
                )
        if p.score is not None and (
            isinstance(p.score, bool) or not isinstance(p.score, (int, float))
            or not (math.isfinite(p.score) and -1.0 <= p.score <= 1.0)
        ):
            raise ModelError(f"output {i}: score {p.score!r} is not a number in [-1, 1]")
    return Outputs.of(out)


def _where(model: Any, index: int, total: int, batch: Sequence[str]) -> str:
    first = batch[0] if batch else ""
    return (
        f"model {model.spec}: batch {index + 1} of {total} ({len(batch)} texts, first {first[:50]!r}"
        f"{'...' if len(first) > 50 else ''})"
    )


def call_batch(model: Any, batch: Sequence[str], index: int, total: int) -> Outputs:
    """One checked model call; every failure becomes a PairflipError naming model and batch.

    ``sys.exit()`` and a ``KeyboardInterrupt`` raised by the model's own code are failures of the
    model too (see :func:`exit_from_model`); a real Ctrl-C or SIGTERM passes through."""
    try:
        out = model.predict(list(batch))
        return check_outputs(batch, out)
    except ModelError as err:
        raise ModelError(f"{_where(model, index, total, batch)}: {err}", retract=err.retract) from None
    except PairflipError:
        raise
    except Exception as err:
        raise PairflipError(
            f"{_where(model, index, total, batch)}: the model raised {type(err).__name__}: {err}"
        ) from err
    except (SystemExit, KeyboardInterrupt) as err:
        what = exit_from_model(err)
        if what is None:
            raise
        raise ModelError(f"{_where(model, index, total, batch)}: {what}") from None


def exit_from_model(err: BaseException) -> str | None:
    """What a ``SystemExit`` or ``KeyboardInterrupt`` that came out of model code means: a
    sentence saying what the model did, or None when it is a real interrupt to pass on.

    ``sys.exit()`` in a model is always the model's doing (passing it on would end a CI run with
    exit 0 and nothing checked). A ``KeyboardInterrupt`` is a real interrupt when it is
    :class:`~pairflip.records.Interrupted` (raised by the command line's signal handler), or when
    Python's own SIGINT handler is in force (then a Ctrl-C arrives as a plain KeyboardInterrupt,
    e.g. in a notebook), or when SIGINT is ignored (the command line ignores further signals while
    it cleans up after the first). Under any other handler, such as the command line's, a plain
    KeyboardInterrupt was raised by the model's code."""
    if isinstance(err, SystemExit):
        code = err.code
        if code is None:
            return "the model called sys.exit()"
        if isinstance(code, int):
            return f"the model called sys.exit({code})"
        return f"the model called sys.exit with the message {str(code)!r}"
    if isinstance(err, Interrupted):
        return None
    try:
        handler = signal.getsignal(signal.SIGINT)
    except ValueError:  # pragma: no cover - no signals here
        return None
    if handler is signal.default_int_handler or handler == signal.SIG_IGN:
        return None
    return "the model raised KeyboardInterrupt (pairflip received no Ctrl-C or SIGTERM: the model's own code raised it)"


# --------------------------------------------------------------------------- running batches


def run_batches(
    model: Any, batches: Sequence[Sequence[str]], *, concurrency: int = 1
) -> Iterator[tuple[int, Sequence[str], Outputs]]:
    """Yield ``(index, batch, predictions)`` for every batch, as each one finishes.

    With ``concurrency > 1`` and a model that allows it (``model.parallel``: HTTP and ``cmd:``
    models), up to that many batches are in flight at once in threads; results may then come in
    any order. In-process Python models always run one batch at a time. On the first failure,
    batches not yet started are cancelled and the error is raised.
    """
    check_run_options(concurrency=concurrency)
    total = len(batches)
    if concurrency == 1 or total <= 1 or not getattr(model, "parallel", False):
        for i, b in enumerate(batches):
            yield i, b, call_batch(model, b, i, total)
        return
    pool = ThreadPoolExecutor(max_workers=concurrency, thread_name_prefix="pairflip-batch")
    running: dict[Future[Outputs], int] = {}
    next_i = 0
    ended = False
    try:
        while next_i < total or running:
            while next_i < total and len(running) < concurrency:
                running[pool.submit(call_batch, model, batches[next_i], next_i, total)] = next_i
                next_i += 1
            done, _ = wait(list(running), return_when=FIRST_COMPLETED)
            failed: BaseException | None = None
            for fut in sorted(done, key=running.__getitem__):
                i = running.pop(fut)
                err = fut.exception()
                if err is not None:
                    failed = failed or err
                    continue
                yield i, batches[i], fut.result()  # finished batches reach the cache first
            if failed is not None:
                raise failed
        ended = True
    finally:
        # On an error, an interrupt or the caller stopping early, do not wait for the batches in
        # flight: cut them off (the model's abort() ends its requests and processes at once), so
        # that the threads end now rather than at --timeout, and Python's exit does not wait
        # for them.
        pool.shutdown(wait=False, cancel_futures=True)
        if not ended and any(not f.done() for f in running):
            abort = getattr(model, "abort", None)
            if abort is not None:
                abort()
