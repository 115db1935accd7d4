"""Opinion words learned from the user's labelled text (``pairflip lexicon``).

The words and two-word phrases that separate the positive from the negative texts of a labelled
corpus, found with the weighted log-odds ratio with an informative Dirichlet prior (Monroe,
Colaresi & Quinn 2008, "Fightin' Words", Political Analysis 16(4)), written as a TSV in the
format of ``lexicons/opinion.tsv`` that ``build --lexicon`` takes.

How it counts:

- A *term* is a token's lemma for verbs and nouns (``broke`` -> ``break``: the rules look verbs
  and nouns up by lemma) and its lowercased form for every other word (the intensifier rules look
  adjectives and adverbs up by their form). Only alphabetic tokens count.
- A *phrase* is two adjacent terms joined by a dependency inside a phrase (compound, modifier,
  particle, object, complement: "battery life", "break down", "poor quality"), not any two
  neighbours ("good but"). Phrases are their own vocabulary, with their own totals and prior.
- Words in a negated clause ("won't close properly", "not trailworthy", "no problems") are not
  counted at all: the negation reverses what they say about the text's polarity. (Common practice
  in sentiment lexicon work; from memory, Pang, Lee & Vaithyanathan 2002 mark such words apart.)
- Positive texts are compared with negative ones; neutral texts are left out of the comparison but
  counted in the prior, which is the whole corpus.

The estimator (:func:`weighted_log_odds`): with ``y`` a term's count in the positive (i) and
negative (j) texts, ``n`` each side's total, and the prior ``alpha_w = alpha_0 * c_w / N`` (the
term's share of the whole corpus, ``c_w`` of ``N`` tokens, scaled to ``alpha_0`` pseudo-counts)::

    delta = log((y_i + a) / (n_i + a0 - y_i - a)) - log((y_j + a) / (n_j + a0 - y_j - a))
    var   = 1 / (y_i + a) + 1 / (y_j + a)
    z     = delta / sqrt(var)

``alpha_0 = prior_weight * N``: the prior counts as ``prior_weight`` times the corpus itself
(:data:`DEFAULT_PRIOR_WEIGHT`, 0.2). With balanced classes a term seen ``c`` times on one side only
has ``z ~ sqrt(c) * log((1+w)/w) * sqrt(w(1+w)/(1+2w))`` for weight ``w``, largest (``0.74 sqrt(c)``)
near ``w = 0.17``: no prior lets a word seen fewer than 7 times reach ``z = 1.96``, and a larger
weight shrinks rare terms harder (at ``w = 1`` such a word needs 12 occurrences).

What is kept: ``|z| >= min_z`` and a count (positive + negative texts) ``>= min_count``. Every
other term gets one reason, the first that applies:

- ``stop word``: spaCy's English list, plus the degree words of the built-in intensifier lexicon
  and the negators (they grade or negate an opinion rather than carry one) and the linking verbs
  (they take the polarity of their complement); a phrase with such a word too, except the particle
  of a phrasal verb ("break down");
- ``too rare``: under ``min_count``, or seen on one side only and too few times to reach ``min_z``;
- ``both polarities``: seen on both sides with ``|z| < min_z``;
- ``no opinion POS``: the majority spaCy coarse tag of the term (of a phrase: of its head word) is
  not among the tags asked for, ADJ, ADV, VERB and NOUN unless ``--pos`` says fewer.
  ``--pos ADJ,ADV,VERB`` leaves out the topic nouns ("camera", "price") that separate the classes
  of a review corpus only because some products are rated better than others.

A kept adjective or adverb is ``gradable`` when the corpus has a degree word that only scalar words
take (:data:`DEGREE_WORDS`) right before it and modifying it, else ``-``; verbs and nouns are never
graded (as in the built-in lexicon). A kept word the built-in lexicon already has with the same
polarity is reported but not written: as a ``--lexicon`` entry it would only replace the hand-made
grade (``extreme`` for "perfect", which the negation rules skip on purpose) by the corpus's.

Nothing here prints; ``report/lexicon_view.py`` renders an :class:`InducedLexicon`.
"""

from __future__ import annotations

import math
from collections import Counter
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Iterable, Iterator, Mapping

from pairflip.records import PairflipError

DEFAULT_MIN_Z = 1.96  # two-sided 5 % for a standard normal z (common practice)
DEFAULT_MIN_COUNT = 5
# alpha_0 = 0.2 x the corpus size: near the weight (0.17) at which a term seen on one side only gets
# its largest z for its count (see the module doc); at 1.0 such a term needs 12 occurrences, not 7.
DEFAULT_PRIOR_WEIGHT = 0.2
OPINION_POS = ("ADJ", "ADV", "VERB", "NOUN")
GRADED_POS = ("ADJ", "ADV")  # as in the built-in lexicon, verbs and nouns are never graded
REASONS = ("stop word", "too rare", "both polarities", "no opinion POS")

# Degree words that attest a scalar (gradable) word when they modify it. "really" and "so" are
# left out on purpose: they go with extreme words too ("really perfect", "so amazing"), while
# extreme (limit) adjectives resist "very" and "slightly" (a handbook fact of English grammar, from
# memory: Paradis 2001, "Adjectives and boundedness", Cognitive Linguistics 12(1)).
DEGREE_WORDS = frozenset({
    "very", "extremely", "slightly", "somewhat", "fairly", "too", "pretty", "rather",
    "mildly", "moderately", "reasonably", "relatively", "quite",
})
# Dependencies that make two adjacent words one phrase (spaCy's English labels).
PHRASE_DEPS = frozenset({"compound", "amod", "prt", "advmod", "dobj", "acomp", "npadvmod"})
NEGATORS = frozenset({"not", "never", "no", "nothing", "nobody", "none", "nowhere", "neither", "nor",
                      "without", "hardly", "barely", "scarcely", "cannot"})
# Linking verbs take the polarity of their complement ("smells fresh"): never an opinion of their
# own (a handbook fact of English grammar, from memory: the copular verbs in Quirk et al. 1985, A
# Comprehensive Grammar of the English Language).
LINKING_VERBS = frozenset({"look", "feel", "seem", "sound", "smell", "taste", "stay", "remain", "get",
                           "become", "appear", "turn", "grow"})


# --------------------------------------------------------------------------- the estimator


@dataclass(frozen=True)
class TermScore:
    """One term's weighted log-odds ratio, positive (i) against negative (j)."""

    term: str
    count_pos: int
    count_neg: int
    prior: float  # alpha_w
    delta: float
    variance: float
    z: float


def weighted_log_odds(
    pos: Mapping[str, int], neg: Mapping[str, int], background: Mapping[str, int], alpha0: float,
) -> dict[str, TermScore]:
    """Log-odds ratio of every term of ``pos`` or ``neg`` with an informative Dirichlet prior.

    ``background`` holds the counts that set the prior's shape (every term of ``pos`` and ``neg``
    must be in it with a count > 0); ``alpha0`` is the prior's total pseudo-count.
    """
    if not alpha0 > 0 or not math.isfinite(alpha0):
        raise PairflipError(f"alpha0={alpha0!r}: expected a finite number > 0")
    if len(background) < 2:
        raise PairflipError(f"the background counts hold {len(background)} term(s); expected at least 2 to compare")
    total = sum(background.values())
    n_i, n_j = sum(pos.values()), sum(neg.values())
    out: dict[str, TermScore] = {}
    for term in sorted(set(pos) | set(neg)):
        c = background.get(term, 0)
        if c <= 0:
            raise PairflipError(f"term {term!r} is counted in a class but not in the background counts")
        a = alpha0 * c / total
        y_i, y_j = pos.get(term, 0), neg.get(term, 0)
        delta = math.log((y_i + a) / (n_i + alpha0 - y_i - a)) - math.log((y_j + a) / (n_j + alpha0 - y_j - a))
        var = 1.0 / (y_i + a) + 1.0 / (y_j + a)
        out[term] = TermScore(term, y_i, y_j, a, delta, var, delta / math.sqrt(var))
    return out


# --------------------------------------------------------------------------- counting


@dataclass
class TermCounts:
    """What the corpus says about one vocabulary (words, or phrases)."""

    pos: Counter = field(default_factory=Counter)
    neg: Counter = field(default_factory=Counter)
    every: Counter = field(default_factory=Counter)  # all texts, neutral ones too: the prior
    tags: dict[str, Counter] = field(default_factory=dict)  # coarse tag of the term (a phrase: its head)
    graded: set[str] = field(default_factory=set)  # a degree word attested right before it
    particle: set[str] = field(default_factory=set)  # phrases seen as verb + particle

    def add(self, term: str, polarity: int, tag: str) -> None:
        self.every[term] += 1
        if polarity > 0:
            self.pos[term] += 1
        elif polarity < 0:
            self.neg[term] += 1
        self.tags.setdefault(term, Counter())[tag] += 1


def term_of(tok: Any) -> str | None:
    """The counted form of a token (see the module doc), or None for a token that is not a word."""
    if not tok.is_alpha:
        return None
    if tok.pos_ in ("VERB", "NOUN"):
        from pairflip.perturb.base import lemma

        return lemma(tok).lower()
    return tok.lower_


_NEGATING = frozenset({"not", "n't", "never", "no", "nothing", "none", "neither", "nor"})


def _negated(tok: Any) -> bool:
    """Inside a negated clause: the token, or a head up to its clause's verb, has a negating child
    ("won't close", "no problems", "nothing is wrong"), or a head is "without"."""
    t = tok
    for _ in range(len(tok.doc)):  # bounded walk up the tree
        if t.lower_ in _NEGATING or t.lower_ == "without":
            return True
        if any(c.dep_ == "neg" or (c.lower_ in _NEGATING and c.dep_ != "intj") for c in t.children):
            return True
        if t.pos_ in ("VERB", "AUX") or t.head.i == t.i:
            return False
        t = t.head
    return False


def _degree_before(tok: Any, doc: Any) -> bool:
    if tok.i == 0:
        return False
    prev = doc[tok.i - 1]
    return prev.lower_ in DEGREE_WORDS and prev.head.i == tok.i and prev.dep_ == "advmod"


def count_doc(doc: Any, polarity: int, words: TermCounts, phrases: TermCounts) -> None:
    """Add one parsed text's words and phrases to the counts."""
    toks = list(doc)
    terms = [None if _negated(t) else term_of(t) for t in toks]
    for tok, term in zip(toks, terms):
        if term is None:
            continue
        words.add(term, polarity, tok.pos_)
        if _degree_before(tok, doc):
            words.graded.add(term)
    for k in range(len(toks) - 1):
        a, b = toks[k], toks[k + 1]
        if terms[k] is None or terms[k + 1] is None:
            continue
        if b.head.i == a.i and b.dep_ in PHRASE_DEPS:
            head = a
        elif a.head.i == b.i and a.dep_ in PHRASE_DEPS:
            head = b
        else:
            continue
        phrase = f"{terms[k]} {terms[k + 1]}"
        phrases.add(phrase, polarity, head.pos_)
        if b.dep_ == "prt" and head is a:
            phrases.particle.add(phrase)
        if _degree_before(a, doc):
            phrases.graded.add(phrase)


# --------------------------------------------------------------------------- choosing


@dataclass(frozen=True)
class LearnedWord:
    """One row of the learned lexicon, with the evidence for it."""

    word: str
    pos: str
    polarity: int
    grade: str
    z: float
    count_pos: int
    count_neg: int
    builtin: str = ""  # against the lexicon the rules already have: "new", "same", "opposite" ("": not compared)

    @property
    def written(self) -> bool:
        """In the file: everything but words the built-in lexicon already has with this polarity."""
        return self.builtin != "same"


@dataclass(frozen=True)
class LeftOutTerm:
    term: str
    count: int  # in positive + negative texts
    z: float
    detail: str = ""  # e.g. the majority tag for "no opinion POS"


@dataclass
class InducedLexicon:
    """The result of :func:`induce_lexicon`: kept words, what was left out and why, and how."""

    words: list[LearnedWord]
    left_out: dict[str, list[LeftOutTerm]]  # reason -> terms, most frequent first
    texts: dict[str, int]  # positive / negative / neutral
    tokens: dict[str, int]  # counted words in positive / negative / all texts
    settings: dict[str, Any]

    def top(self, polarity: int, n: int) -> list[LearnedWord]:
        return [w for w in self.words if w.polarity == polarity][:n]

    @property
    def written(self) -> list[LearnedWord]:
        return [w for w in self.words if w.written]


def stop_words() -> frozenset[str]:
    """spaCy's English stop words, the built-in degree words, the negators and the linking verbs."""
    from spacy.lang.en.stop_words import STOP_WORDS

    from pairflip.perturb.lexicon import load_lexicon

    degree = {w for w in load_lexicon().intensifiers if " " not in w}
    return frozenset(STOP_WORDS) | frozenset(degree) | DEGREE_WORDS | NEGATORS | LINKING_VERBS


def _is_stop(term: str, counts: TermCounts, stops: frozenset[str]) -> bool:
    parts = term.split(" ")
    if len(parts) == 2 and term in counts.particle:
        parts = parts[:1]  # "break down": the particle belongs to the verb
    return any(p in stops for p in parts)


def _majority_tag(tags: Counter) -> str:
    """The most frequent tag; a tie goes to the opinion tags, in the order of OPINION_POS."""
    rank = {t: k for k, t in enumerate(OPINION_POS)}
    return min(tags.items(), key=lambda kv: (-kv[1], rank.get(kv[0], len(rank)), kv[0]))[0]


def _against(word: str, pos: str, polarity: int, known: Any) -> str:
    if known is None:
        return ""
    if " " in word:  # an expression: kept apart from single words, keyed by its words
        hit = getattr(known, "phrases", {}).get(tuple(word.split(" ")))
    else:
        hit = known.lookup(word, pos)
    if hit is None:
        return "new"
    return "same" if hit.polarity == polarity else "opposite"


def choose(
    counts: TermCounts, *, min_z: float, min_count: int, prior_weight: float, stops: frozenset[str],
    known: Any = None, pos_tags: tuple[str, ...] = OPINION_POS,
) -> tuple[list[LearnedWord], dict[str, list[LeftOutTerm]], float]:
    """Score one vocabulary and sort its terms into kept words and left-out terms by reason."""
    alpha0 = prior_weight * sum(counts.every.values())
    if len(counts.every) < 2:  # one term (or none): nothing to compare it with
        left = {r: [] for r in REASONS}
        left["too rare"] = [LeftOutTerm(t, counts.pos[t] + counts.neg[t], 0.0) for t in sorted(counts.pos.keys() | counts.neg.keys())]
        return [], left, alpha0
    scores = weighted_log_odds(counts.pos, counts.neg, counts.every, alpha0)
    kept: list[LearnedWord] = []
    left: dict[str, list[LeftOutTerm]] = {r: [] for r in REASONS}
    for term, s in scores.items():
        n = s.count_pos + s.count_neg
        reason, detail = None, ""
        if _is_stop(term, counts, stops):
            reason = "stop word"
        elif n < min_count or (abs(s.z) < min_z and not (s.count_pos and s.count_neg)):
            reason = "too rare"
        elif abs(s.z) < min_z:
            reason = "both polarities"
        else:
            tag = _majority_tag(counts.tags[term])
            if tag not in pos_tags:
                reason, detail = "no opinion POS", tag
        if reason is not None:
            left[reason].append(LeftOutTerm(term, n, s.z, detail))
            continue
        grade = "gradable" if term in counts.graded and tag in GRADED_POS else "-"
        polarity = 1 if s.z > 0 else -1
        kept.append(LearnedWord(term, tag, polarity, grade, s.z, s.count_pos, s.count_neg,
                                _against(term, tag, polarity, known)))
    for items in left.values():
        items.sort(key=lambda t: (-t.count, t.term))
    return kept, left, alpha0


def induce_lexicon(
    texts: Iterable[tuple[str, int]],
    *,
    nlp: Any,
    min_z: float = DEFAULT_MIN_Z,
    min_count: int = DEFAULT_MIN_COUNT,
    prior_weight: float = DEFAULT_PRIOR_WEIGHT,
    pos_tags: Iterable[str] = OPINION_POS,
    known: Any = None,
    batch_size: int = 256,
    on_text: Callable[[int], None] | None = None,
) -> InducedLexicon:
    """Learn opinion words from ``(text, polarity)`` pairs (polarity -1, 0 or +1).

    ``pos_tags`` are the opinion parts of speech kept (a subset of :data:`OPINION_POS`; others
    go to ``no opinion POS``). ``known`` (a :class:`~pairflip.perturb.lexicon.Lexicon`, normally the built-in one) marks each
    kept word ``new``, ``same`` or ``opposite``; words it already has with the same polarity are
    not written to the file (a ``--lexicon`` entry would only replace their hand-made grade, as
    ``extreme`` for "perfect", by the corpus's). Texts are parsed in a stream (``nlp.pipe``); only
    the counts stay in memory.
    """
    if not (math.isfinite(min_z) and min_z >= 0):
        raise PairflipError(f"min_z={min_z!r}: expected a number of at least 0")
    if min_count < 1:
        raise PairflipError(f"min_count={min_count!r}: expected a whole number of at least 1")
    if not (math.isfinite(prior_weight) and prior_weight > 0):
        raise PairflipError(f"prior_weight={prior_weight!r}: expected a number > 0")
    pos_tags = tuple(pos_tags)
    wrong = [t for t in pos_tags if t not in OPINION_POS]
    if wrong or not pos_tags:
        raise PairflipError(f"pos_tags={list(pos_tags)!r}: expected one or more of {', '.join(OPINION_POS)}")
    words, phrases = TermCounts(), TermCounts()
    n_texts = Counter()
    for k, (doc, polarity) in enumerate(nlp.pipe(texts, as_tuples=True, batch_size=batch_size), 1):
        n_texts[_POLARITY_NAME[polarity]] += 1
        count_doc(doc, polarity, words, phrases)
        if on_text is not None:
            on_text(k)
    if not n_texts["positive"] or not n_texts["negative"]:
        raise PairflipError(
            f"the texts hold {n_texts['positive']} positive and {n_texts['negative']} negative texts "
            f"({n_texts['neutral']} neutral); expected texts of both polarities to learn from"
        )
    stops = stop_words()
    kw = dict(min_z=min_z, min_count=min_count, prior_weight=prior_weight, stops=stops, known=known, pos_tags=pos_tags)
    kept_w, left_w, a0_w = choose(words, **kw)
    kept_p, left_p, a0_p = choose(phrases, **kw)
    kept = sorted(kept_w + kept_p, key=lambda w: (-w.polarity, -abs(w.z), w.word))
    left = {r: sorted(left_w[r] + left_p[r], key=lambda t: (-t.count, t.term)) for r in REASONS}
    from pairflip.perturb.nlp import model_name

    settings = {
        "min_z": min_z, "min_count": min_count, "prior_weight": prior_weight, "pos_tags": list(pos_tags),
        "alpha0_words": a0_w, "alpha0_phrases": a0_p, "spacy_model": model_name(nlp),
        "words_scored": len(words.pos.keys() | words.neg.keys()),
        "phrases_scored": len(phrases.pos.keys() | phrases.neg.keys()),
    }
    tokens = {"positive": sum(words.pos.values()), "negative": sum(words.neg.values()),
              "all": sum(words.every.values())}
    return InducedLexicon(kept, left, {k: n_texts[k] for k in ("positive", "negative", "neutral")}, tokens, settings)


_POLARITY_NAME = {1: "positive", -1: "negative", 0: "neutral"}


# --------------------------------------------------------------------------- a labelled corpus


@dataclass
class LabelledCorpus:
    """A corpus file whose label column (or field) maps to polarities; read twice, never held."""

    path: Path
    label_map: Any  # pairflip.labels.LabelMap
    label_name: str  # "column 'label'" / "field 'stars'"
    counts: dict[str, int]  # label -> texts
    read: Callable[[], Iterator[Any]]

    def polarity_counts(self) -> dict[str, int]:
        out = {"positive": 0, "negative": 0, "neutral": 0}
        for lab, n in self.counts.items():
            out[_POLARITY_NAME[self.label_map.polarity_of(lab)]] += n
        return out

    def texts(self) -> Iterator[tuple[str, int]]:
        for item in self.read():
            yield item.text, self.label_map.polarity_of(item.label)


def open_labelled_corpus(
    path: Path, *, label_column: str | None, label_field: str | None, text_column: str | None = None,
    text_field: str | None = None, labels: str | None = None, encoding: str = "utf-8",
) -> LabelledCorpus:
    """Read the corpus once without parsing: every input error shows up now, and the labels are
    mapped to polarities (``labels``: most negative first, as ``--labels``; else a known scale)."""
    from pairflip.files import read_corpus
    from pairflip.labels import LabelMap, count_corpus_labels

    suffix = Path(path).suffix.lower()
    if label_column is None and label_field is None:
        if suffix == ".jsonl":
            raise PairflipError(f"{path}: no labels to learn from; name the field holding them with --label-field")
        if suffix == ".txt":
            raise PairflipError(
                f"{path}: a .txt corpus holds no labels; expected a .csv/.tsv with --label-column "
                f"or a .jsonl with --label-field"
            )
        raise PairflipError(f"{path}: no labels to learn from; name the column holding them with --label-column")
    name = f"column {label_column!r}" if label_column is not None else f"field {label_field!r}"
    opt = "--label-column" if label_column is not None else "--label-field"

    def read() -> Iterator[Any]:
        return read_corpus(path, text_column=text_column, label_column=label_column, text_field=text_field,
                           label_field=label_field, encoding=encoding)

    given = LabelMap.from_labels(labels) if labels is not None else None
    given, counts = count_corpus_labels(read(), path=path, given=given, name=name, opt=opt)
    corpus = LabelledCorpus(Path(path), given, name, dict(counts), read)
    pc = corpus.polarity_counts()
    if not pc["positive"] or not pc["negative"]:
        seen = ", ".join(f"{lab!r} x{n}" for lab, n in sorted(counts.items()))
        raise PairflipError(
            f"{path}: {name} gives {pc['positive']} positive and {pc['negative']} negative texts "
            f"({pc['neutral']} neutral; labels seen: {seen}; mapping {given.describe()}); "
            f"expected texts of both polarities to learn from"
        )
    return corpus


# --------------------------------------------------------------------------- the file


def lexicon_lines(lex: InducedLexicon, *, corpus: str = "", label_name: str = "", label_map: str = "") -> Iterator[str]:
    """The learned lexicon as ``opinion.tsv`` lines: comments on how it was made, a header, rows.

    Each row ends with a comment holding its z and its counts on each side.
    """
    s = lex.settings
    t = lex.texts
    from pairflip.perturb.lexicon import LEARNED_MARK

    yield LEARNED_MARK + (f" from {corpus}" if corpus else "") + (
        f" ({label_name})" if label_name else "")
    yield ("# method: weighted log-odds ratio with an informative Dirichlet prior (Monroe, Colaresi & Quinn "
           "2008, Political Analysis 16(4)), positive texts against negative ones")
    yield (f"# texts: {t['positive']} positive, {t['negative']} negative, {t['neutral']} neutral (neutral texts "
           f"count only in the prior)" + (f"; labels {label_map}" if label_map else ""))
    yield (f"# prior: the whole corpus's counts, alpha_0 = {s['prior_weight']:g} x its size "
           f"(words {s['alpha0_words']:g}, phrases {s['alpha0_phrases']:g})")
    yield (f"# kept: |z| >= {s['min_z']:g} and at least {s['min_count']} occurrences in positive + negative texts: "
           f"{len(lex.words)} of {s['words_scored'] + s['phrases_scored']} terms scored "
           f"({s['words_scored']} words, {s['phrases_scored']} phrases)")
    yield (f"# terms: lemmas of verbs and nouns, lowercased forms of other words; pos is the majority "
           f"tag of {s['spacy_model']} (kept: {', '.join(s['pos_tags'])}); grade is gradable when a degree word modifies the adjective or adverb in the corpus")
    same = [w.word for w in lex.words if not w.written]
    if same:
        yield (f"# not written: {len(same)} kept words the built-in lexicon already has with the same polarity "
               f"({', '.join(same[:12])}{', ...' if len(same) > 12 else ''})")
    yield "# after each row: z, then occurrences in positive / negative texts"
    yield "word\tpos\tpolarity\tgrade"
    for w in lex.written:
        yield f"{w.word}\t{w.pos}\t{w.polarity}\t{w.grade}\t# z={w.z:+.2f}, {w.count_pos} / {w.count_neg}"


def write_lexicon(lex: InducedLexicon, path: str | Path, **about: str) -> None:
    """Write :func:`lexicon_lines` atomically to ``path`` (overwriting it: callers check first)."""
    from pairflip.files import atomic_writer

    with atomic_writer(path, force=True) as fh:
        for line in lexicon_lines(lex, **about):
            fh.write(line + "\n")
