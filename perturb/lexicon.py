"""Lexicons kept as data: opinion words, intensifiers, antonyms (``perturb/lexicons/*.tsv``).

File formats (tab-separated, ``#`` starts a comment, also after an entry):

``opinion.tsv``       word  pos  polarity  grade  [context]
    ``word`` is a word or a multiword expression ("break down", "waste of money", "rip-off");
    pos is ADJ, ADV, VERB or NOUN (for an expression, that of the whole); polarity is -1 or 1;
    grade is ``gradable`` (takes *very*, *slightly*), ``extreme`` (takes *absolutely*, *truly*,
    *utterly*; never *very*), or ``-``. The optional fifth column ``context`` says when the
    polarity holds: ``-`` (default) always; ``alone`` only when the word stands alone: a verb
    with a predicative complement or a *like* phrase ("smells fresh", "smells like pine") is a
    linking verb and takes the polarity of its complement (none of its own), and a noun with an
    adjective ("a fresh smell") takes the adjective's ("it smells", "the smell" keep theirs).
    Linking verbs without a polarity of their own (look, feel, seem, sound, taste, stay, remain,
    get, become) are simply not listed: their complement carries the opinion.
``intensifiers.tsv``  word  kind
    kind is ``amplifier``, ``extreme-amplifier`` or ``softener``.
``antonyms.tsv``      word  pos  opposite  kind
    kind is ``antonym`` (clean/dirty) or ``prefix`` (comfortable/uncomfortable).

The header line is optional and recognised by its column names (``word  pos  polarity  grade``,
with or without ``context``); a file without one starts with its first entry.

A user's ``--lexicon FILE`` has the format of ``opinion.tsv`` (four or five columns) and adds to
(or overrides) it.

Multiword expressions are kept apart, in :attr:`Lexicon.phrases`, keyed by their words as matched
against a parse: words split at spaces, a hyphen its own word ("rip-off" -> ``("rip", "-", "off")``),
as spaCy's English tokenizer splits them. Each word of an expression matches a token whose
lower-cased text or lemma it equals ("keep logging me out" matches "kept logging me out");
:func:`pairflip.perturb.base.phrase_spans` finds them in a parse.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Iterable, Iterator

from pairflip.records import PairflipError

POS_TAGS = ("ADJ", "ADV", "VERB", "NOUN")
GRADES = ("gradable", "extreme", "-")
CONTEXTS = ("-", "alone")
INTENSIFIER_KINDS = ("amplifier", "extreme-amplifier", "softener")
ANTONYM_KINDS = ("antonym", "prefix")

# The first line of a lexicon written by ``pairflip lexicon`` (perturb/induce.py). Its new words
# are "learned": they count only where no other lexicon word gives the sentence an opinion, so a
# topic word the corpus ties to one side ("dvd", "camera": a product the reviews liked or not)
# cannot make an opinion sentence mixed, and still gives a sentence with no other opinion word one.
LEARNED_MARK = "# Opinion words learned by `pairflip lexicon`"

OPINION_COLUMNS = ("word", "pos", "polarity", "grade", "context")
INTENSIFIER_COLUMNS = ("word", "kind")
ANTONYM_COLUMNS = ("word", "pos", "opposite", "kind")


@dataclass(frozen=True)
class OpinionWord:
    word: str
    pos: str
    polarity: int
    grade: str
    context: str = "-"
    # A word a learned lexicon (``pairflip lexicon``) adds to the built-in one: it counts as an
    # opinion only in a sentence where no other lexicon word does (see ``LEARNED_MARK``).
    learned: bool = field(default=False, compare=False)


@dataclass
class Lexicon:
    opinion: dict[tuple[str, str], OpinionWord] = field(default_factory=dict)
    intensifiers: dict[str, str] = field(default_factory=dict)
    antonyms: dict[tuple[str, str], tuple[str, str]] = field(default_factory=dict)  # (word,pos)->(opposite,kind)
    sources: list[str] = field(default_factory=list)
    # multiword expressions, keyed by their words (see phrase_words); one entry per key
    phrases: dict[tuple[str, ...], OpinionWord] = field(default_factory=dict)

    def lookup(self, word: str, pos: str | None = None) -> OpinionWord | None:
        w = word.lower()
        if pos is not None:
            return self.opinion.get((w, pos))
        for p in POS_TAGS:
            hit = self.opinion.get((w, p))
            if hit:
                return hit
        return None

    @property
    def has_learned(self) -> bool:
        """Does any entry come from a learned lexicon (see :data:`LEARNED_MARK`)? Asked once per
        text by the build, so the answer is kept until an entry is added."""
        size = (len(self.opinion), len(self.phrases))
        cached = self.__dict__.get("_has_learned")
        if cached is None or cached[0] != size:
            found = any(e.learned for e in self.opinion.values()) or any(e.learned for e in self.phrases.values())
            cached = self.__dict__["_has_learned"] = (size, found)
        return cached[1]

    def polarity(self, word: str, pos: str | None = None) -> int:
        hit = self.lookup(word, pos)
        return hit.polarity if hit else 0

    def opposite(self, word: str, pos: str) -> tuple[str, str] | None:
        return self.antonyms.get((word.lower(), pos))

    def words_of_kind(self, kind: str) -> list[str]:
        return [w for w, k in self.intensifiers.items() if k == kind]

    def add(self, entry: OpinionWord) -> None:
        """Add (or replace) one entry: a single word in :attr:`opinion`, an expression in
        :attr:`phrases`."""
        words = phrase_words(entry.word)
        if len(words) == 1:
            self.opinion[(entry.word, entry.pos)] = entry
        else:
            self.phrases[words] = entry
            self.__dict__.pop("_phrase_starts", None)

    @property
    def phrase_starts(self) -> dict[str, list[tuple[str, ...]]]:
        """The expressions by their first word, longest first (for the matcher)."""
        cached = self.__dict__.get("_phrase_starts")
        if cached is None or cached[0] != len(self.phrases):
            starts: dict[str, list[tuple[str, ...]]] = {}
            for key in sorted(self.phrases, key=len, reverse=True):
                starts.setdefault(key[0], []).append(key)
            cached = self.__dict__["_phrase_starts"] = (len(self.phrases), starts)
        return cached[1]

    def extend(self, path: str | Path) -> None:
        """Add a user's ``opinion.tsv``-format file. The words of a learned lexicon (its first line
        is :data:`LEARNED_MARK`) that the lexicon does not yet have are marked ``learned``; the
        ones it has are corrections and replace the entry as any user's word does."""
        text = Path(path).read_text(encoding="utf-8")
        learned = text.startswith(LEARNED_MARK)
        for entry in _read_opinion(text, str(path)):
            if learned and self.lookup(entry.word, entry.pos) is None and phrase_words(entry.word) not in self.phrases:
                entry = OpinionWord(entry.word, entry.pos, entry.polarity, entry.grade, entry.context, learned=True)
            self.add(entry)
        self.sources.append(str(path))


_PHRASE_SPLIT = re.compile(r"\s+|(-)|(?<=\w)('s)(?=\s|$)")


def phrase_words(word: str) -> tuple[str, ...]:
    """The words an entry is matched by, split as spaCy's English tokenizer splits them: at
    spaces, a hyphen and a possessive *'s* as words of their own ("dog's dinner" ->
    ``("dog", "'s", "dinner")``)."""
    return tuple(w for w in _PHRASE_SPLIT.split(word.lower().replace("’", "'").strip()) if w)


def _is_header(cols: list[str], names: tuple[str, ...], optional: int) -> bool:
    low = [c.lower() for c in cols]
    return any(low == list(names[: len(names) - k]) for k in range(optional + 1))


def _rows(text: str, where: str, names: tuple[str, ...], optional: int = 0) -> Iterator[tuple[int, list[str]]]:
    """The data rows of a lexicon file, with their line numbers.

    A first non-comment line made of the column ``names`` is the header and skipped; any other
    first line is data (a file without a header loses nothing). A row has ``len(names)`` columns,
    of which the last ``optional`` may be left out.
    """
    first = True
    lo, hi = len(names) - optional, len(names)
    for lineno, line in enumerate(text.splitlines(), 1):
        line = line.split("#", 1)[0].rstrip()
        if not line.strip():
            continue
        cols = [c.strip() for c in line.split("\t")]
        if first:
            first = False
            if _is_header(cols, names, optional):
                continue
            if any(c.lower() in names[1:] for c in cols):
                raise PairflipError(
                    f"{where}:{lineno}: header line ({', '.join(cols)}) does not name the columns "
                    f"{', '.join(names[:lo])}" + (f" [, {', '.join(names[lo:])}]" if optional else "") + " in that order"
                )
        if not lo <= len(cols) <= hi:
            want = f"{lo}" if lo == hi else f"{lo} or {hi}"
            raise PairflipError(
                f"{where}:{lineno}: expected {want} tab-separated columns ({', '.join(names)}), got {len(cols)}"
            )
        yield lineno, cols


def _read_opinion(text: str, where: str) -> Iterator[OpinionWord]:
    for lineno, cols in _rows(text, where, OPINION_COLUMNS, optional=1):
        word, pos, pol, grade = cols[:4]
        context = cols[4] if len(cols) > 4 else "-"
        if not phrase_words(word):
            raise PairflipError(f"{where}:{lineno}: word is empty")
        if pos not in POS_TAGS:
            raise PairflipError(f"{where}:{lineno}: pos {pos!r} is not one of {', '.join(POS_TAGS)}")
        if pol not in ("-1", "1", "+1"):
            raise PairflipError(f"{where}:{lineno}: polarity {pol!r} is not -1 or 1")
        if grade not in GRADES:
            raise PairflipError(f"{where}:{lineno}: grade {grade!r} is not one of {', '.join(GRADES)}")
        if context not in CONTEXTS:
            raise PairflipError(f"{where}:{lineno}: context {context!r} is not one of {', '.join(CONTEXTS)}")
        yield OpinionWord(" ".join(word.lower().split()), pos, int(pol), grade, context)


def _data(name: str) -> str:
    return resources.files("pairflip.perturb").joinpath("lexicons", name).read_text(encoding="utf-8")


@lru_cache(maxsize=8)
def _default() -> Lexicon:
    lex = Lexicon(sources=["builtin"])
    for e in _read_opinion(_data("opinion.tsv"), "lexicons/opinion.tsv"):
        lex.add(e)
    for lineno, (word, kind) in _rows(_data("intensifiers.tsv"), "lexicons/intensifiers.tsv", INTENSIFIER_COLUMNS):
        if kind not in INTENSIFIER_KINDS:
            raise PairflipError(f"lexicons/intensifiers.tsv:{lineno}: kind {kind!r} unknown")
        lex.intensifiers[word.lower()] = kind
    for lineno, (word, pos, opp, kind) in _rows(_data("antonyms.tsv"), "lexicons/antonyms.tsv", ANTONYM_COLUMNS):
        if kind not in ANTONYM_KINDS:
            raise PairflipError(f"lexicons/antonyms.tsv:{lineno}: kind {kind!r} unknown")
        lex.antonyms[(word.lower(), pos)] = (opp.lower(), kind)
    return lex


def load_lexicon(extra: Iterable[str | Path] = ()) -> Lexicon:
    """The built-in lexicons, extended by the user's files (each in ``opinion.tsv`` format)."""
    base = _default()
    lex = Lexicon(dict(base.opinion), dict(base.intensifiers), dict(base.antonyms), list(base.sources),
                  dict(base.phrases))
    for path in extra:
        p = Path(path)
        if not p.exists():
            raise PairflipError(f"--lexicon {p}: no such file")
        lex.extend(p)
    return lex
