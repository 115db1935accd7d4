"""Run the rules in a second process while this one parses (``--overlap``, the default).

Parsing is the one cost a build cannot avoid; the rules are pure Python over the parse. On a
machine with two or more cores the build hands each parsed doc to a rule process as plain arrays
(token texts, spaces and the tag/POS/dependency/head/sentence/morphology columns: about 20 µs a
doc, against ~300 µs for ``Doc.to_bytes``), which rebuilds the doc against the same vocabulary and
runs the families, while this process parses the next batch. Pairs come back in source order, so
the suite is identical to a build without overlap (tested). The rule process is forked after the
pipeline is loaded, ignores Ctrl-C (this process stops it), and sends its counts back with its
pairs.
"""

from __future__ import annotations

import multiprocessing as mp
import os
import queue
import signal
import traceback
from typing import Any, Callable, Iterator

from pairflip.records import Pair, SourceText

CHUNK = 64  # docs per message
_ATTRS_NAMES = ("TAG", "POS", "DEP", "HEAD", "SENT_START", "MORPH")


def available() -> bool:
    """Overlap needs a second core and the fork start method (Linux)."""
    return (os.cpu_count() or 1) > 1 and "fork" in mp.get_all_start_methods()


def _attrs() -> list[int]:
    from spacy import attrs

    return [getattr(attrs, n) for n in _ATTRS_NAMES]


def pack(doc: Any) -> tuple[list[str], list[bool], Any]:
    return [t.text for t in doc], [bool(t.whitespace_) for t in doc], doc.to_array(_attrs())


def unpack(vocab: Any, words: list[str], spaces: list[bool], arr: Any) -> Any:
    from spacy.tokens import Doc

    doc = Doc(vocab, words=words, spaces=spaces)
    if len(doc):
        doc.from_array(_attrs(), arr)
    return doc


def _warm() -> None:
    """Load lemminflect's tables here, before the fork, so every rule process starts warm."""
    from lemminflect import getAllLemmas, getInflection

    getAllLemmas("works", upos="VERB")
    getInflection("work", tag="VBD")


def _worker(inq: Any, outq: Any, run_doc: Callable[[Any, SourceText, Any], list[Pair]], vocab: Any, new_stats: Callable[[], Any]) -> None:
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # the parent decides when to stop
    # ... and ends it with SIGTERM when it lingers at exit: die quietly then, not through the CLI's
    # handler inherited by fork (which would print a traceback from the queue's finaliser).
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    try:
        while True:
            item = inq.get()
            if item is None:
                outq.put(("done", None, None))
                return
            stats = new_stats()
            out = []
            for (words, spaces, arr), st in item:
                doc = unpack(vocab, words, spaces, arr)
                doc.user_data["pairflip.text"] = st.text
                out.append(run_doc(doc, st, stats))
            outq.put(("pairs", out, stats))
    except BaseException:  # report, never die silently
        outq.put(("error", traceback.format_exc(), None))


def overlapped(
    docs: Iterator[tuple[Any, SourceText]],
    run_doc: Callable[[Any, SourceText, Any], list[Pair]],
    vocab: Any,
    new_stats: Callable[[], Any],
    merge_stats: Callable[[Any], None],
    on_source: Callable[[int], None] | None = None,
) -> Iterator[list[Pair]]:
    """Yield each source's pairs, in order, from ``run_doc`` running in a forked process."""
    _warm()
    ctx = mp.get_context("fork")
    inq = ctx.Queue(maxsize=4)
    outq = ctx.Queue()
    proc = ctx.Process(target=_worker, args=(inq, outq, run_doc, vocab, new_stats), daemon=True)
    proc.start()
    sent = received = 0
    done = 0

    def take(block: bool) -> Iterator[list[Pair]]:
        nonlocal received, done
        while received < sent:
            try:
                kind, payload, stats = outq.get(block=block, timeout=1.0 if block else None)
            except queue.Empty:
                if block and not proc.is_alive():
                    raise RuntimeError("the rule process stopped without a word") from None
                if block:
                    continue
                return
            if kind == "error":
                raise RuntimeError(f"the rule process failed:\n{payload}")
            received += 1
            merge_stats(stats)
            for pairs in payload:
                done += 1
                if on_source is not None:
                    on_source(done)
                yield pairs
            block = False  # after one blocking take, only drain what is ready

    try:
        chunk: list[Any] = []
        for doc, st in docs:
            chunk.append((pack(doc), st))
            if len(chunk) >= CHUNK:
                inq.put(chunk)
                sent += 1
                chunk = []
                yield from take(block=False)
                while sent - received > 3:  # keep memory bounded: at most a few chunks in flight
                    yield from take(block=True)
        if chunk:
            inq.put(chunk)
            sent += 1
        while received < sent:
            yield from take(block=True)
        inq.put(None)
    finally:
        if proc.is_alive():
            proc.terminate()
        proc.join(timeout=5)
        inq.cancel_join_thread()
        outq.cancel_join_thread()
