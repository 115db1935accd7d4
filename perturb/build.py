"""The build driver: stream texts through spaCy, run the selected rules, validate, yield pairs."""

from __future__ import annotations

import random
from collections import Counter, defaultdict
from dataclasses import dataclass, field
from typing import Any, Callable, Iterable, Iterator, Sequence

from pairflip.perturb.base import Candidate, Context, apply_edits, doc_text, validate
from pairflip.perturb.lexicon import Lexicon, load_lexicon
from pairflip.perturb.nlp import load_nlp, model_name
from pairflip.records import Pair, PairflipError, SourceText, Suite, stable_id, text_digest

GENERATOR_VERSION = 1


def _family_modules() -> dict[str, Any]:
    from pairflip.perturb import FAMILY_MODULES

    return FAMILY_MODULES


def known_rules() -> dict[str, dict[str, str]]:
    """family -> {rule -> should}, for every family pairflip has."""
    return {name: dict(mod.RULES) for name, mod in _family_modules().items()}


def resolve_rules(families: Sequence[str] | str | None) -> dict[str, set[str]]:
    """Turn ``["negation", "reorder/shuffle"]`` (or a comma-separated string) into family -> rules.

    Raises :class:`PairflipError` listing the known names when one is unknown.
    """
    known = known_rules()
    if families is None:
        return {f: set(r) for f, r in known.items()}
    if isinstance(families, str):
        families = [x.strip() for x in families.split(",") if x.strip()]
    if not families:
        raise PairflipError(f"--families is empty; the families are {', '.join(known)}")
    out: dict[str, set[str]] = {}
    for name in families:
        name = name.strip()
        fam = name.split("/", 1)[0]
        if fam not in known:
            raise PairflipError(f"unknown family {name!r}; the families are {', '.join(known)}")
        if "/" in name:
            if name not in known[fam]:
                raise PairflipError(f"unknown rule {name!r}; the rules of {fam} are {', '.join(known[fam])}")
            out.setdefault(fam, set()).add(name)
        else:
            out.setdefault(fam, set()).update(known[fam])
    return out


@dataclass
class BuildStats:
    """What the build did, per rule: pairs made, and variants dropped with the reason."""

    sources: int = 0
    sources_with_pairs: int = 0
    skipped: dict[str, int] = field(default_factory=lambda: Counter())  # reason -> count of sources
    made: Counter = field(default_factory=Counter)  # rule -> pairs
    dropped: dict[str, Counter] = field(default_factory=lambda: defaultdict(Counter))  # rule -> reason -> n
    warnings: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        return {
            "sources": self.sources,
            "sources_with_pairs": self.sources_with_pairs,
            "skipped": dict(self.skipped),
            "made": dict(self.made),
            "dropped": {r: dict(c) for r, c in self.dropped.items()},
        }

    @property
    def pairs(self) -> int:
        return sum(self.made.values())


def _as_sources(texts: Iterable[Any]) -> Iterator[SourceText]:
    seen: set[bytes] = set()
    for i, t in enumerate(texts):
        if isinstance(t, SourceText):
            st = t
        elif isinstance(t, str):
            st = SourceText(text=t.strip(), where=f"text {i}")
        elif isinstance(t, (tuple, list)) and len(t) == 2:
            st = SourceText(text=str(t[0]).strip(), label=None if t[1] is None else str(t[1]), where=f"text {i}")
        else:
            raise PairflipError(f"text {i}: expected a string or a (text, label) pair, got {type(t).__name__}")
        if not st.text:
            continue
        key = text_digest(st.text)
        if key in seen:
            continue
        seen.add(key)
        yield st


def iter_pairs(
    texts: Iterable[Any],
    *,
    families: Sequence[str] | str | None = None,
    seed: int = 0,
    nlp: Any = None,
    spacy_model: str | None = None,
    lexicon: Lexicon | None = None,
    workers: int = 1,
    batch_size: int = 256,
    max_per_rule: int = 1,
    recheck: bool = False,
    stats: BuildStats | None = None,
    on_source: Callable[[int], None] | None = None,
    overlap: bool = True,
) -> Iterator[Pair]:
    """Yield pairs lazily from ``texts`` (strings, ``(text, label)`` tuples or SourceText).

    Each source is parsed once. For each selected rule, at most ``max_per_rule`` valid variants
    are kept per source, chosen with a random source seeded by ``seed`` and the source text, so the
    output is the same for the same inputs and seed whatever ``workers`` is. With ``overlap``
    (and one parser process, two or more cores, no ``recheck``) the rules run in a second process
    while this one parses (:mod:`pairflip.perturb.overlap`); the output is the same.
    """
    selected = resolve_rules(families)
    modules = _family_modules()
    nlp = nlp if nlp is not None else load_nlp(spacy_model)
    lexicon = lexicon if lexicon is not None else load_lexicon()
    stats = stats if stats is not None else BuildStats()
    max_len = getattr(nlp, "max_length", 1_000_000)

    def admitted() -> Iterator[tuple[str, SourceText]]:
        for st in _as_sources(texts):
            stats.sources += 1
            if len(st.text) > max_len:
                stats.skipped["longer than the spaCy pipeline's max_length"] += 1
                if len(stats.warnings) < 20:  # the count is in stats.skipped; keep only the first few
                    stats.warnings.append(f"{st.where}: skipped a text of {len(st.text)} characters (max {max_len})")
                continue
            yield st.text, st

    pipe_kwargs: dict[str, Any] = {"batch_size": batch_size, "as_tuples": True}
    if workers and workers > 1:
        pipe_kwargs["n_process"] = workers
    recheck_nlp = nlp if recheck else None

    def run_doc(doc: Any, st: SourceText, into: BuildStats) -> list[Pair]:
        out: list[Pair] = []
        for fam, rules in selected.items():
            out.extend(_pairs_for_doc(doc, st, modules[fam], rules, seed, lexicon, max_per_rule, into, recheck_nlp))
        if out:
            into.sources_with_pairs += 1
        return out

    from pairflip.perturb import overlap as _overlap

    use_overlap = overlap and not recheck and not (workers and workers > 1) and _overlap.available()
    docs = iter(nlp.pipe(admitted(), **pipe_kwargs))
    n_done = 0
    for doc, st in docs:
        n_done += 1
        # spaCy keeps the text verbatim, so doc.text == st.text; give the rules the string we
        # already hold rather than have spaCy rebuild it from every token
        doc.user_data["pairflip.text"] = st.text
        yield from run_doc(doc, st, stats)
        if on_source is not None:
            on_source(n_done)
        if use_overlap and n_done >= OVERLAP_AFTER:
            break  # a big input: the rest goes through the overlapped path
    else:
        return

    def merge(w: BuildStats) -> None:
        stats.made.update(w.made)
        for rule, reasons in w.dropped.items():
            stats.dropped[rule].update(reasons)
        stats.sources_with_pairs += w.sources_with_pairs

    progress = (lambda k: on_source(n_done + k)) if on_source is not None else None
    for pairs in _overlap.overlapped(docs, run_doc, nlp.vocab, BuildStats, merge, progress):
        yield from pairs


# Inputs up to this many texts are built in one process; past it the rules move to a second
# process (starting one costs more than it saves on a small input).
OVERLAP_AFTER = 512


def _pairs_for_doc(
    doc: Any,
    st: SourceText,
    module: Any,
    rules: set[str],
    seed: int,
    lexicon: Lexicon,
    max_per_rule: int,
    stats: BuildStats,
    recheck_nlp: Any,
) -> Iterator[Pair]:
    rng = random.Random(f"{seed}\x1f{module.FAMILY}\x1f{st.text}")
    ctx = Context(lexicon=lexicon, rng=rng, seed=seed)
    by_rule: dict[str, list[Candidate]] = defaultdict(list)
    try:
        for cand in module.candidates(doc, ctx):
            if cand.rule in rules:
                by_rule[cand.rule].append(cand)
    except Exception as err:  # a rule bug must not end a long build; it is counted and reported
        stats.dropped[f"{module.FAMILY}/*"][f"rule error: {type(err).__name__}: {err}"] += 1
        return
    source_id = stable_id("source", doc_text(doc)) if by_rule else ""
    for rule in sorted(by_rule):
        cands = by_rule[rule]
        rng.shuffle(cands)
        kept = 0
        seen_variants: set[str] = set()
        for cand in cands:
            if kept >= max_per_rule:
                break
            try:
                variant, char_edits = apply_edits(doc, cand.edits)
            except ValueError as err:
                stats.dropped[rule][f"bad edit: {err}"] += 1
                continue
            reason = validate(doc, cand, variant)
            if reason is None and recheck_nlp is not None:
                reason = _recheck(recheck_nlp, doc, cand, variant)
            if reason is None and variant in seen_variants:
                continue
            if reason is not None:
                stats.dropped[rule][reason] += 1
                continue
            seen_variants.add(variant)
            kept += 1
            stats.made[rule] += 1
            yield Pair(
                source=doc_text(doc),
                variant=variant,
                family=module.FAMILY,
                rule=rule,
                should=cand.should,
                edits=char_edits,
                source_id=source_id,
                label=st.label,
                meta=dict(cand.meta),
            )


def _recheck(nlp: Any, doc: Any, cand: Candidate, variant: str) -> str | None:
    """Second parse of the variant (``--recheck``): the sentence count must not change."""
    vdoc = nlp(variant)
    if len(list(vdoc.sents)) != len(list(doc.sents)):
        return "recheck: sentence split changed"
    return None


def build_suite(
    texts: Iterable[Any],
    families: Sequence[str] | str | None = None,
    seed: int = 0,
    *,
    spacy_model: str | None = None,
    nlp: Any = None,
    lexicon: Lexicon | None = None,
    lexicon_files: Sequence[str] = (),
    workers: int = 1,
    max_per_rule: int = 1,
    recheck: bool = False,
    on_source: Callable[[int], None] | None = None,
    overlap: bool = True,
) -> Suite:
    """Build a suite in memory: ``pairflip.build_suite(texts, families=["negation"], seed=0)``."""
    if nlp is None:
        nlp = load_nlp(spacy_model)
    if lexicon is None:
        lexicon = load_lexicon(lexicon_files)
    stats = BuildStats()
    pairs = list(
        iter_pairs(
            texts, families=families, seed=seed, nlp=nlp, lexicon=lexicon, workers=workers,
            max_per_rule=max_per_rule, recheck=recheck, stats=stats, on_source=on_source, overlap=overlap,
        )
    )
    header = suite_header(families, seed, nlp, lexicon, max_per_rule, recheck)
    return Suite(header=header, pairs=pairs, stats=stats)


def suite_header(families: Any, seed: int, nlp: Any, lexicon: Lexicon, max_per_rule: int, recheck: bool) -> dict[str, Any]:
    from pairflip import __version__
    from pairflip.files import FORMAT_VERSION, SUITE_KIND, now_iso

    selected = resolve_rules(families)
    return {
        "kind": SUITE_KIND,
        "version": FORMAT_VERSION,
        "created": now_iso(),
        "generator": {
            "name": "pairflip",
            "version": __version__,
            "rules_version": GENERATOR_VERSION,
            "families": sorted(selected),
            "rules": sorted(r for rs in selected.values() for r in rs),
            "seed": seed,
            "spacy_model": model_name(nlp),
            "lexicons": list(lexicon.sources),
            "max_per_rule": max_per_rule,
            "recheck": recheck,
        },
    }
