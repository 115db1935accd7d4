"""The build driver: stream texts through spaCy, run the selected rules, validate, yield pairs.

What one source is (``unit``):

- ``"sentence"`` (the default): each sentence of a text is its own source, cut from the parse
  the build makes anyway (``doc.sents``; where the parser puts a boundary with no final
  punctuation or line break before it, the parts stay one source, see :func:`sentence_spans`).
  The pair keeps where it came from: ``source_id`` is
  ``TEXT_ID:INDEX`` (the text's own id, ``stable_id("source", text)``, and the 0-based index of
  the sentence in the text), and the extra keys ``text_id`` and ``sentence`` say the same, so
  results can be grouped back by text and ``--cluster source`` clusters by text. A text of one
  sentence is its own source either way, with the text's ids, so a corpus of one sentence per
  line gives the same suite under both units. A sentence already seen (in this text or an
  earlier one) is not a source again, as a repeated text is not.
- ``"text"``: the whole text is one source.

Long sources are skipped by every family (the README's "long texts"): a source of more than
``MAX_WORDS`` words (alphabetic tokens, the measure and limit of :mod:`pairflip.perturb.negation`)
is counted under ``BuildStats.skipped`` and makes no pairs. With ``unit="sentence"`` the limit
applies to each sentence, so a long review still gives pairs from its sentences.
"""

from __future__ import annotations

import random
from collections import Counter, defaultdict, deque
from dataclasses import dataclass, field
from typing import Any, Callable, Iterable, Iterator, Sequence

from pairflip.perturb.base import Candidate, Context, apply_edits, doc_text, sents, validate
from pairflip.perturb.lexicon import Lexicon, load_lexicon
from pairflip.perturb.negation import MAX_WORDS
from pairflip.perturb.nlp import load_nlp, model_name
from pairflip.records import Pair, PairflipError, SourceText, Suite, text_digest

GENERATOR_VERSION = 1

UNITS = ("sentence", "text")
DEFAULT_UNIT = "sentence"

# A source of more than MAX_WORDS words is skipped by every family (negation's own limit: a
# negated clause in a long text rarely carries all of its opinion).
TOO_LONG = f"more than {MAX_WORDS} words"
TOO_LONG_SENTENCE = f"a sentence of more than {MAX_WORDS} words"  # counted per sentence
# With unit "text", a text longer than this many characters has its words counted by the
# tokenizer alone before the parse, so a long line is skipped without the parse's time and memory
# (measured on this machine for 200,000 characters of review sentences: tokenizer 0.24 s, parse
# 9.3 s and 640 MB). Only the cost depends on it: shorter texts are counted after the parse, with
# the same tokens, and a long text within the limit (numbers, symbols) is parsed as any other.
PRECOUNT_CHARS = 1_000


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

    sources: int = 0  # distinct non-empty texts read
    sources_with_pairs: int = 0  # texts that gave at least one pair
    sources_with_tested_pairs: int = 0  # texts that gave a pair with an expectation (not only diagnostic ones)
    diagnostic_pairs: int = 0  # pairs of diagnostic rules (should "none", e.g. reorder/shuffle)
    learned_pairs: int = 0  # pairs whose sentence has its opinion from a learned lexicon's words only
    learned_lexicon: bool = False  # a learned lexicon (``pairflip lexicon``) was in use
    sentences: int = 0  # with unit "sentence": the distinct sentences made sources (or skipped)
    skipped: dict[str, int] = field(default_factory=lambda: Counter())  # reason -> count of sources
    made: Counter = field(default_factory=Counter)  # rule -> pairs
    dropped: dict[str, Counter] = field(default_factory=lambda: defaultdict(Counter))  # rule -> reason -> n
    warnings: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        return {
            "sources": self.sources,
            "sources_with_pairs": self.sources_with_pairs,
            "sources_with_tested_pairs": self.sources_with_tested_pairs,
            "diagnostic_pairs": self.diagnostic_pairs,
            "learned_pairs": self.learned_pairs,
            "sentences": self.sentences,
            "skipped": dict(self.skipped),
            "made": dict(self.made),
            "dropped": {r: dict(c) for r, c in self.dropped.items()},
        }

    @property
    def pairs(self) -> int:
        return sum(self.made.values())


@dataclass(frozen=True)
class SentenceSource(SourceText):
    """One sentence of a text as a source (``unit="sentence"``): the text's id and its index."""

    text_id: str = ""
    index: int = 0

    @property
    def id(self) -> str:
        return f"{self.text_id}:{self.index}"


def check_unit(unit: str) -> str:
    if unit not in UNITS:
        raise PairflipError(f"--unit {unit!r}: expected 'sentence' (each sentence a source) or 'text' (each text)")
    return unit


def word_count(tokens: Iterable[Any]) -> int:
    """Words as the long-source limit counts them: alphabetic tokens."""
    return sum(1 for t in tokens if t.is_alpha)


def _sentence_doc(doc: Any, span: Any) -> Any:
    """A sentence of ``doc`` as a doc of its own, keeping the parse, without trailing whitespace."""
    from pairflip.perturb.overlap import unpack, _attrs

    words = [t.text for t in span]
    spaces = [bool(t.whitespace_) for t in span]
    spaces[-1] = False
    return unpack(doc.vocab, words, spaces, span.as_doc().to_array(_attrs()))


_FINAL = frozenset(".!?…")
_CLOSERS = frozenset({")", "]", '"', "'", "”", "’", "»"})


def _ends_a_sentence(doc: Any, start: int, end: int) -> bool:
    """The parser's sentence ``doc[start:end]`` ends as sentences do: with final punctuation
    (. ! ? …, also "!!" or "?!", then any closing quotes or brackets), or a line break."""
    i = end - 1
    while i >= start and doc[i].is_space:
        if "\n" in doc[i].text:
            return True
        i -= 1
    if i >= start and "\n" in doc[i].whitespace_:
        return True
    while i >= start and doc[i].text in _CLOSERS:
        i -= 1
    return i >= start and doc[i].text[-1:] in _FINAL


def sentence_spans(doc: Any) -> list[Any]:
    """The sentences of ``doc`` as sources: the parser's sentences (``doc.sents``), without
    whitespace tokens at their ends. A boundary the parser puts where no sentence ends (no final
    punctuation or line break before it: "I'm cooking for four with this set | and it works
    perfectly.") is not a cut; the parts stay one source."""
    spans: list[tuple[int, int]] = []
    cut = True
    for sp in sents(doc):
        if cut:
            spans.append((sp.start, sp.end))
        else:
            spans[-1] = (spans[-1][0], sp.end)
        cut = _ends_a_sentence(doc, sp.start, sp.end)
    out = []
    for start, end in spans:
        while start < end and doc[start].is_space:
            start += 1
        while end > start and doc[end - 1].is_space:
            end -= 1
        if end > start:
            out.append(doc[start:end])
    return out


def unit_items(
    doc: Any, st: SourceText, unit: str, seen: set[bytes]
) -> Iterator[tuple[bytes | None, str | None, Any, SourceText | None]]:
    """The sources of one parsed text (see the module doc), as ``(key, skip, doc, source)``.

    ``key`` is the digest a sentence source is de-duplicated by (None with unit "text"): a source
    whose key is in ``seen`` is left out, and every key given is added to ``seen``. ``skip`` is
    the reason the source makes no pairs (too long; then ``doc`` and ``source`` are None), else
    None. The build counts ``stats.sentences`` once per key and ``stats.skipped`` per skip; the
    Ray build (:mod:`pairflip.perturb.ray_build`) calls this in its workers and replays the keys
    in corpus order."""
    spans = [] if unit == "text" else sentence_spans(doc)
    if len(spans) <= 1:
        key = None
        if unit == "sentence":
            key = text_digest(st.text)
            if key in seen:
                return
            seen.add(key)
        if word_count(doc) > MAX_WORDS:
            yield key, TOO_LONG if unit == "text" else TOO_LONG_SENTENCE, None, None
            return
        yield key, None, doc, st
        return
    text_id = st.id
    for i, span in enumerate(spans):
        text = span.text
        key = text_digest(text)
        if key in seen:
            continue
        seen.add(key)
        if word_count(span) > MAX_WORDS:
            yield key, TOO_LONG_SENTENCE, None, None
            continue
        sdoc = _sentence_doc(doc, span)
        sdoc.user_data["pairflip.text"] = text
        where = f"{st.where}, sentence {i + 1}" if st.where else f"sentence {i + 1}"
        yield key, None, sdoc, SentenceSource(text=text, label=st.label, where=where, text_id=text_id, index=i)


def _units(doc: Any, st: SourceText, unit: str, seen: set[bytes], stats: "BuildStats") -> Iterator[tuple[Any, SourceText]]:
    """The sources of one parsed text that make pairs, counted in ``stats`` (:func:`unit_items`)."""
    for key, skip, udoc, ust in unit_items(doc, st, unit, seen):
        if key is not None:
            stats.sentences += 1
        if skip is not None:
            stats.skipped[skip] += 1
            continue
        yield udoc, ust  # type: ignore[misc]


def pairs_for_unit(
    doc: Any, st: SourceText, selected: dict[str, set[str]], modules: dict[str, Any], seed: int, lexicon: Lexicon,
    max_per_rule: int, stats: "BuildStats", recheck_nlp: Any,
) -> list[Pair]:
    """Every selected family's pairs of one source, in family order; made and dropped counted in ``stats``."""
    out: list[Pair] = []
    for fam, rules in selected.items():
        out.extend(_pairs_for_doc(doc, st, modules[fam], rules, seed, lexicon, max_per_rule, stats, recheck_nlp))
    return out


class TextCounter:
    """Counts, as pairs go out in corpus order, the texts that gave a pair and a pair with an
    expectation, and the diagnostic pairs (a text's sources come in a row)."""

    def __init__(self, stats: "BuildStats") -> None:
        self.stats = stats
        self.last = ["", ""]  # the texts counted last, any pair / a tested pair

    def __call__(self, pairs: list[Pair]) -> list[Pair]:
        if pairs:
            stats = self.stats
            text = pairs[0].extra.get("text_id") or pairs[0].source_id
            if text != self.last[0]:
                self.last[0] = text
                stats.sources_with_pairs += 1
            stats.diagnostic_pairs += sum(1 for p in pairs if p.should == "none")
            stats.learned_pairs += sum(1 for p in pairs if p.meta.get("learned"))
            if text != self.last[1] and any(p.should != "none" for p in pairs):
                self.last[1] = text
                stats.sources_with_tested_pairs += 1
        return pairs


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


def beyond_max_length(st: SourceText, max_len: int, stats: "BuildStats") -> bool:
    """A text longer than the pipeline's ``max_length`` is not parsed: counted and (the first
    few) named in ``stats``."""
    if len(st.text) <= max_len:
        return False
    stats.skipped["longer than the spaCy pipeline's max_length"] += 1
    if len(stats.warnings) < 20:  # the count is in stats.skipped; keep only the first few
        stats.warnings.append(f"{st.where}: skipped a text of {len(st.text)} characters (max {max_len})")
    return True


def precounted_too_long(text: str, unit: str, nlp: Any) -> bool:
    """With unit "text", a long text whose words the tokenizer alone counts over the limit
    (:data:`PRECOUNT_CHARS`): skipped before the parse."""
    return unit == "text" and len(text) > PRECOUNT_CHARS and word_count(nlp.tokenizer(text)) > MAX_WORDS


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
    unit: str = DEFAULT_UNIT,
) -> Iterator[Pair]:
    """Yield pairs lazily from ``texts`` (strings, ``(text, label)`` tuples or SourceText).

    Each text is parsed once; ``unit`` says whether its sentences (``"sentence"``) or the whole
    text (``"text"``) are the sources (see the module doc). For each selected rule, at most
    ``max_per_rule`` valid variants are kept per source, chosen with a random source seeded by
    ``seed`` and the source text, so the output is the same for the same inputs and seed whatever
    ``workers`` is. With ``overlap`` (and one parser process, two or more cores, no ``recheck``)
    the rules run in a second process while this one parses (:mod:`pairflip.perturb.overlap`);
    the output is the same. ``on_source`` gets the number of parsed texts done so far.
    """
    check_unit(unit)
    selected = resolve_rules(families)
    modules = _family_modules()
    nlp = nlp if nlp is not None else load_nlp(spacy_model)
    lexicon = lexicon if lexicon is not None else load_lexicon()
    stats = stats if stats is not None else BuildStats()
    stats.learned_lexicon = lexicon.has_learned
    max_len = getattr(nlp, "max_length", 1_000_000)

    def admitted() -> Iterator[tuple[str, SourceText]]:
        for st in _as_sources(texts):
            stats.sources += 1
            if beyond_max_length(st, max_len, stats):
                continue
            if precounted_too_long(st.text, unit, nlp):
                stats.skipped[TOO_LONG] += 1
                continue
            yield st.text, st

    seen: set[bytes] = set()  # sentences already made sources (unit "sentence")
    progress = _Progress(on_source)

    def units() -> Iterator[tuple[Any, SourceText]]:
        for doc, st in nlp.pipe(admitted(), **pipe_kwargs):
            progress.parsed += 1
            # spaCy keeps the text verbatim, so doc.text == st.text; give the rules the string we
            # already hold rather than have spaCy rebuild it from every token
            doc.user_data["pairflip.text"] = st.text
            for udoc, ust in _units(doc, st, unit, seen, stats):
                progress.handed()
                yield udoc, ust

    pipe_kwargs: dict[str, Any] = {"batch_size": batch_size, "as_tuples": True}
    if workers and workers > 1:
        pipe_kwargs["n_process"] = workers
    recheck_nlp = nlp if recheck else None

    def run_doc(doc: Any, st: SourceText, into: BuildStats) -> list[Pair]:
        return pairs_for_unit(doc, st, selected, modules, seed, lexicon, max_per_rule, into, recheck_nlp)

    counted = TextCounter(stats)

    from pairflip.perturb import overlap as _overlap

    use_overlap = overlap and not recheck and not (workers and workers > 1) and _overlap.available()
    docs = units()
    n_done = 0
    for doc, st in docs:
        n_done += 1
        yield from counted(run_doc(doc, st, stats))
        progress.done()
        if use_overlap and n_done >= OVERLAP_AFTER:
            break  # a big input: the rest goes through the overlapped path
    else:
        progress.finish()
        return

    def merge(w: BuildStats) -> None:
        stats.made.update(w.made)
        for rule, reasons in w.dropped.items():
            stats.dropped[rule].update(reasons)

    # the rule process reports each source as it is done, in order
    for pairs in _overlap.overlapped(docs, run_doc, nlp.vocab, BuildStats, merge,
                                     (lambda _k: progress.done()) if on_source is not None else None):
        yield from counted(pairs)
    progress.finish()


class _Progress:
    """Calls ``on_source(n)`` for n = 1, 2, ... in order, once each: n texts parsed and their
    sources done. A text that gave no source (skipped, or every sentence seen before) counts
    with the next source done, or at the end."""

    def __init__(self, on_source: Callable[[int], None] | None) -> None:
        self.on_source = on_source
        self.parsed = 0  # texts out of the parser so far
        self.reported = 0
        self.pending: deque[int] = deque()  # the parsed count at each source handed on, until done

    def handed(self) -> None:
        if self.on_source is not None:
            self.pending.append(self.parsed)

    def done(self) -> None:
        if self.on_source is not None:
            self._up_to(self.pending.popleft())

    def finish(self) -> None:
        if self.on_source is not None:
            self._up_to(self.parsed)

    def _up_to(self, n: int) -> None:
        while self.reported < n:
            self.reported += 1
            self.on_source(self.reported)  # type: ignore[misc]


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
    # st.text is the doc's text; a sentence unit's id is its text's id and index
    source_id = st.id if by_rule else ""
    learned = learned_opinions(doc, lexicon) if by_rule and module.FAMILY in OPINION_FAMILIES else []
    unit_keys = {"text_id": st.text_id, "sentence": st.index} if isinstance(st, SentenceSource) else None
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
                meta={**cand.meta, "learned": learned} if learned else dict(cand.meta),
                extra=dict(unit_keys) if unit_keys else {},
            )


# Families whose pairs start from an opinion word (reorder moves words whatever they say).
OPINION_FAMILIES = frozenset({"negation", "double-negation", "intensifier", "contrast"})


def learned_opinions(doc: Any, lexicon: Lexicon) -> list[str]:
    """The learned lexicon's words that carry an opinion in ``doc`` (a learned word counts only
    in a sentence with no other opinion word, so a pair from such a sentence comes from it)."""
    if not lexicon.has_learned:
        return []
    from pairflip.perturb.negation import opinion_of

    return sorted({hit.word for t in doc if (hit := opinion_of(t, lexicon)) is not None and hit.learned})


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
    unit: str = DEFAULT_UNIT,
) -> Suite:
    """Build a suite in memory: ``pairflip.build_suite(texts, families=["negation"], seed=0)``.

    ``unit="sentence"`` (the default) makes each sentence of a text a source, ``"text"`` the whole
    text (see :mod:`pairflip.perturb.build`)."""
    check_unit(unit)
    if nlp is None:
        nlp = load_nlp(spacy_model)
    if lexicon is None:
        lexicon = load_lexicon(lexicon_files)
    stats = BuildStats()
    pairs = list(
        iter_pairs(
            texts, families=families, seed=seed, nlp=nlp, lexicon=lexicon, workers=workers,
            max_per_rule=max_per_rule, recheck=recheck, stats=stats, on_source=on_source, overlap=overlap,
            unit=unit,
        )
    )
    header = suite_header(families, seed, nlp, lexicon, max_per_rule, recheck, unit)
    return Suite(header=header, pairs=pairs, stats=stats)


def suite_header(
    families: Any, seed: int, nlp: Any, lexicon: Lexicon, max_per_rule: int, recheck: bool, unit: str = DEFAULT_UNIT
) -> dict[str, Any]:
    """The suite's header. ``generator.unit`` is written only for ``"sentence"``: a suite without
    it has whole texts as sources, as every suite made before units existed."""
    from pairflip import __version__
    from pairflip.files import FORMAT_VERSION, SUITE_KIND, now_iso

    selected = resolve_rules(families)
    header = {
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
    if check_unit(unit) == "sentence":
        header["generator"]["unit"] = "sentence"
    return header
