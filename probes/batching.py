"""Sending batches to a model, optionally several in flight at once."""

from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor
from typing import Any, Iterator, Sequence

from pairflip.records import PairflipError, Prediction


def check_outputs(model: Any, batch: Sequence[str], out: Sequence[Prediction], index: int) -> list[Prediction]:
    if len(out) != len(batch):
        raise PairflipError(
            f"model {model.spec}: batch {index} of {len(batch)} texts returned {len(out)} outputs; "
            f"expected one output per text"
        )
    return list(out)


def run_batches(model: Any, batches: Sequence[Sequence[str]], *, concurrency: int = 1) -> Iterator[tuple[Sequence[str], list[Prediction]]]:
    """Yield ``(batch, predictions)`` in order. With ``concurrency > 1`` up to that many batches
    are in flight at once (threads; for HTTP and command models)."""
    if concurrency < 1:
        raise PairflipError(f"--concurrency must be at least 1, got {concurrency}")

    def call(i: int, batch: Sequence[str]) -> list[Prediction]:
        try:
            out = model.predict(list(batch))
        except PairflipError:
            raise
        except Exception as err:
            raise PairflipError(
                f"model {model.spec} raised {type(err).__name__} on batch {i} ({len(batch)} texts, "
                f"first: {batch[0][:60]!r}): {err}"
            ) from err
        return check_outputs(model, batch, out, i)

    if concurrency == 1 or len(batches) <= 1:
        for i, b in enumerate(batches):
            yield b, call(i, b)
        return
    with ThreadPoolExecutor(max_workers=concurrency) as pool:
        pending = []
        it = iter(enumerate(batches))
        for i, b in it:
            pending.append((b, pool.submit(call, i, b)))
            if len(pending) >= concurrency:
                break
        for i, b in it:
            done_b, fut = pending.pop(0)
            yield done_b, fut.result()
            pending.append((b, pool.submit(call, i, b)))
        for done_b, fut in pending:
            yield done_b, fut.result()
