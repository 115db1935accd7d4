"""``pairflip build --engine ray``: the corpus parsed and perturbed by Ray actors, the suite the
same as a one-process build.

The driver (this process) reads the corpus lazily, drops repeated and empty texts and texts
beyond the pipeline's ``max_length`` as the one-process build does, and cuts what is left into
shards of consecutive texts. Each actor loads spaCy and the lexicon once and runs every shard it
gets through the same per-text code as the one-process build (:func:`~pairflip.perturb.build.unit_items`,
:func:`~pairflip.perturb.build.pairs_for_unit`). Randomness needs nothing more: every choice
a rule makes is drawn from ``random.Random(seed, family, source text)``, so it does not depend
on which process handles a source or what it handled before.

What an actor cannot know is which sentences earlier shards already made sources (a sentence
seen before is not a source again). So an actor returns, for every sentence of its shard not
seen earlier *in that shard*, its de-duplication key, its pairs and its counts; the driver
replays the shards in corpus order against one set of keys, keeps the pairs and counts of the
first occurrence only, and writes the pairs in corpus order. The suite is then byte-identical to
a one-process build apart from the header's creation time; the build counts are the same.

At most two shards per actor are out at once (results that arrive early wait for the earlier
shards), so the driver's memory does not grow with the corpus beyond the keys of the sentences
seen, as in the one-process build.
"""

from __future__ import annotations

import math
import os
from typing import Any, Callable, Iterable, Iterator, Sequence

from pairflip.perturb.build import (
    DEFAULT_UNIT, GENERATOR_VERSION, TOO_LONG, BuildStats, TextCounter, _as_sources, _family_modules,
    beyond_max_length, check_unit, pairs_for_unit, precounted_too_long, resolve_rules, unit_items,
)
from pairflip.perturb.lexicon import Lexicon, load_lexicon
from pairflip.perturb.nlp import load_nlp, model_name
from pairflip.records import Interrupted, Pair, PairflipError, SourceText

# Shards out at once per actor: one being built, one waiting in the actor's queue.
IN_FLIGHT_PER_ACTOR = 2
# Without --shards: about this many shards per actor, each of 16 to 1,000 texts (a shard's
# round trip costs milliseconds; more shards balance the actors better and stream sooner).
SHARDS_PER_ACTOR = 4
MIN_SHARD, MAX_SHARD = 16, 1_000
WAIT_SECONDS = 0.5  # ray.wait wakes up this often, so a Ctrl-C is handled at once


# One unit (a source) of a text, as an actor returns it:
#   (key, skip, pairs, made, dropped)  key: bytes | None; skip: reason | None;
#   made: {rule: n}; dropped: {rule: {reason: n}}
# One text: TOO_LONG (skipped before the parse) or a list of units.


class BuildWorker:
    """A Ray actor's state: spaCy, the lexicon and the build options, loaded once."""

    def __init__(self, spacy_model: str | None, lexicon: Lexicon, families: Any, seed: int, max_per_rule: int,
                 recheck: bool, unit: str) -> None:
        self.error: str | None = None
        try:
            self.nlp = load_nlp(spacy_model)
        except PairflipError as err:
            self.error = str(err)
            return
        self.lexicon = lexicon
        self.selected = resolve_rules(families)
        self.modules = _family_modules()
        self.seed = seed
        self.max_per_rule = max_per_rule
        self.recheck_nlp = self.nlp if recheck else None
        self.unit = unit

    def ready(self) -> dict[str, Any]:
        """What this actor loaded (the driver checks every actor builds as it would)."""
        if self.error is not None:
            return {"error": self.error}
        from pairflip import __version__

        return {"spacy_model": model_name(self.nlp), "pairflip": __version__, "rules_version": GENERATOR_VERSION,
                "rules_code": rules_code(), "node": os.uname().nodename, "pid": os.getpid()}

    def shard(self, sources: list[SourceText], batch_size: int) -> list[Any]:
        """Every text of a shard, in order: TOO_LONG or its units (see the module doc)."""
        nlp, unit = self.nlp, self.unit
        seen: set[bytes] = set()  # a sentence seen earlier in this shard was seen earlier in the corpus too
        out: list[Any] = [None] * len(sources)
        parsed: list[tuple[str, int]] = []
        for i, st in enumerate(sources):
            if precounted_too_long(st.text, unit, nlp):
                out[i] = TOO_LONG
            else:
                parsed.append((st.text, i))
        for doc, i in nlp.pipe(parsed, batch_size=batch_size, as_tuples=True):
            st = sources[i]
            doc.user_data["pairflip.text"] = st.text
            units = []
            for key, skip, udoc, ust in unit_items(doc, st, unit, seen):
                if skip is not None:
                    units.append((key, skip, None, None, None))
                    continue
                stats = BuildStats()
                pairs = pairs_for_unit(udoc, ust, self.selected, self.modules, self.seed, self.lexicon,
                                       self.max_per_rule, stats, self.recheck_nlp)
                units.append((key, None, pairs, dict(stats.made), {r: dict(c) for r, c in stats.dropped.items()}))
            out[i] = units
        return out


def rules_code() -> str:
    """A digest of the rule code as found on disk: every module of :mod:`pairflip.perturb` and the
    records module (pair ids). Two installs of one pairflip version that differ in a rule differ
    here. (The lexicon needs no check: the driver sends its own to the actors.)"""
    import hashlib
    from pathlib import Path

    import pairflip.records

    h = hashlib.sha256()
    folder = Path(__file__).resolve().parent
    for path in sorted(folder.glob("*.py")) + [Path(pairflip.records.__file__)]:
        h.update(path.name.encode("utf-8") + b"\x1f" + path.read_bytes() + b"\x1e")
    return h.hexdigest()


def shard_size(total: int | None, replicas: int, shards: int | None) -> int:
    """Texts per shard: ``total / shards`` with ``--shards``, else about
    :data:`SHARDS_PER_ACTOR` shards per actor within [:data:`MIN_SHARD`, :data:`MAX_SHARD`]."""
    if shards is not None:
        if total is None:
            raise PairflipError("--shards: the number of texts is not known (a stream); leave --shards out")
        return max(1, math.ceil(total / shards))
    if total is None:
        return MAX_SHARD // 2
    return min(MAX_SHARD, max(MIN_SHARD, math.ceil(total / (replicas * SHARDS_PER_ACTOR))))


def iter_pairs_ray(
    texts: Iterable[Any],
    *,
    families: Sequence[str] | str | None = None,
    seed: int = 0,
    nlp: Any = None,
    spacy_model: str | None = None,
    lexicon: Lexicon | None = None,
    max_per_rule: int = 1,
    recheck: bool = False,
    stats: BuildStats | None = None,
    on_source: Callable[[int], None] | None = None,
    unit: str = DEFAULT_UNIT,
    replicas: int | None = None,
    shards: int | None = None,
    total: int | None = None,
    address: str | None = None,
    batch_size: int = 256,
) -> Iterator[Pair]:
    """:func:`~pairflip.perturb.build.iter_pairs` on Ray: the same pairs in the same order.

    ``replicas`` actors (default: one per CPU of the Ray instance) each load spaCy
    (``spacy_model``, by name: installed on every node) once; ``shards`` cuts the ``total``
    texts into that many shards (default: see :func:`shard_size`). ``address`` joins a Ray
    cluster; without it a local instance is started (see :mod:`pairflip.engines`).
    ``on_source(n)`` gets the number of corpus records read and finished so far.
    """
    from pairflip.engines import check_engine, cluster_cpus, ray_session

    check_unit(unit)
    check_engine("ray", address=address, replicas=replicas, shards=shards)
    resolve_rules(families)  # an unknown family fails before Ray starts
    nlp = nlp if nlp is not None else load_nlp(spacy_model)
    lexicon = lexicon if lexicon is not None else load_lexicon()
    stats = stats if stats is not None else BuildStats()
    stats.learned_lexicon = lexicon.has_learned
    if total is None and hasattr(texts, "__len__"):
        total = len(texts)  # type: ignore[arg-type]
    max_len = getattr(nlp, "max_length", 1_000_000)
    expected = model_name(nlp)

    with ray_session(address) as ray:
        cpus = cluster_cpus(ray)
        n = replicas if replicas is not None else cpus
        if n > cpus:
            raise PairflipError(f"--replicas {n}: the Ray instance has {cpus} CPUs, and each build actor takes one; "
                                f"use at most --replicas {cpus}")
        size = shard_size(total, n, shards)
        Actor = ray.remote(num_cpus=1, max_restarts=0)(BuildWorker)
        lex_ref = ray.put(lexicon)
        families = list(families) if families is not None and not isinstance(families, str) else families
        actors = [Actor.remote(spacy_model, lex_ref, families, seed, max_per_rule, recheck, unit) for _ in range(n)]
        try:
            _check_actors(ray, actors, expected)
            yield from _run(ray, actors, texts, size, batch_size, max_len, stats, on_source)
        finally:
            for a in actors:
                ray.kill(a)


def _check_actors(ray: Any, actors: list[Any], expected: str) -> None:
    from pairflip import __version__

    try:
        infos = _get(ray, [a.ready.remote() for a in actors])
    except PairflipError:
        raise
    except Exception as err:
        from pairflip.engines import remote_error

        raise PairflipError(f"--engine ray: a build actor failed to start ({remote_error(err)})") from None
    code = rules_code()
    for info in infos:
        if "error" in info:
            raise PairflipError(f"--engine ray: a build actor: {info['error']}")
        if info["spacy_model"] != expected:
            raise PairflipError(
                f"--engine ray: the build actor on {info['node']} loaded spaCy {info['spacy_model']}, this process "
                f"{expected}; install the same pipeline on every node (or pass --spacy-model) so the suite is the same"
            )
        if info["pairflip"] != __version__ or info["rules_version"] != GENERATOR_VERSION or info["rules_code"] != code:
            raise PairflipError(
                f"--engine ray: the build actor on {info['node']} runs pairflip {info['pairflip']} with rule code "
                f"{info['rules_code'][:12]}, this process {__version__} with {code[:12]}; install the same pairflip on "
                f"every node so the suite is the same"
            )


def _get(ray: Any, refs: list[Any]) -> list[Any]:
    """``ray.get`` in short waits, so that a Ctrl-C in this process is handled at once."""
    pending = list(refs)
    while pending:
        _, pending = ray.wait(pending, num_returns=len(pending), timeout=WAIT_SECONDS)
    return ray.get(refs)


def _shards(texts: Iterable[Any], size: int, max_len: int, stats: BuildStats) -> Iterator[tuple[list[SourceText], int]]:
    """Consecutive shards of the texts that reach the parser, each with the number of corpus
    records read up to its end (for progress)."""
    read = [0]

    def counting() -> Iterator[Any]:
        for t in texts:
            read[0] += 1
            yield t

    shard: list[SourceText] = []
    for st in _as_sources(counting()):
        stats.sources += 1
        if beyond_max_length(st, max_len, stats):
            continue
        shard.append(st)
        if len(shard) >= size:
            yield shard, read[0]
            shard = []
    yield shard, read[0]  # the last, maybe empty: it carries the final count


def _run(ray: Any, actors: list[Any], texts: Iterable[Any], size: int, batch_size: int, max_len: int,
         stats: BuildStats, on_source: Callable[[int], None] | None) -> Iterator[Pair]:
    from pairflip.engines import remote_error

    counted = TextCounter(stats)
    seen: set[bytes] = set()
    source = _shards(texts, size, max_len, stats)
    load = [0] * len(actors)
    inflight: dict[Any, tuple[int, int, list[SourceText]]] = {}  # ref -> (shard number, actor, sources)
    done: dict[int, Any] = {}  # shard number -> its texts' outcomes, waiting for the earlier shards
    reads: dict[int, int] = {}
    submitted = next_out = 0
    exhausted = False
    limit = IN_FLIGHT_PER_ACTOR * len(actors)
    while True:
        while not exhausted and len(inflight) + len(done) < limit:
            a = min(range(len(actors)), key=load.__getitem__)
            if load[a] >= IN_FLIGHT_PER_ACTOR:
                break
            item = next(source, None)
            if item is None:
                exhausted = True
                break
            shard, read = item
            reads[submitted] = read
            if shard:
                inflight[actors[a].shard.remote(shard, batch_size)] = (submitted, a, shard)
                load[a] += 1
            else:
                done[submitted] = []
            submitted += 1
        if not inflight and next_out not in done:
            break
        if inflight:
            ready, _ = ray.wait(list(inflight), num_returns=1, timeout=WAIT_SECONDS)
            for ref in ready:
                k, a, shard = inflight.pop(ref)
                load[a] -= 1
                try:
                    done[k] = ray.get(ref)
                except (KeyboardInterrupt, Interrupted):
                    raise
                except Exception as err:
                    raise PairflipError(
                        f"--engine ray: a build actor failed on shard {k + 1} (texts {shard[0].where or 'first'} to "
                        f"{shard[-1].where or 'last'}): {remote_error(err)}"
                    ) from None
        while next_out in done:
            yield from _replay(done.pop(next_out), seen, stats, counted)
            if on_source is not None:
                on_source(reads.pop(next_out))
            else:
                reads.pop(next_out)
            next_out += 1


def _replay(outcomes: list[Any], seen: set[bytes], stats: BuildStats, counted: TextCounter) -> Iterator[Pair]:
    """One shard's outcomes, in order, against the keys of every earlier shard (the counts the
    one-process build makes as it goes)."""
    for units in outcomes:
        if units == TOO_LONG:
            stats.skipped[TOO_LONG] += 1
            continue
        for key, skip, pairs, made, dropped in units:
            if key is not None:
                if key in seen:
                    continue
                seen.add(key)
                stats.sentences += 1
            if skip is not None:
                stats.skipped[skip] += 1
                continue
            stats.made.update(made)
            for rule, reasons in dropped.items():
                stats.dropped[rule].update(reasons)
            yield from counted(pairs)

