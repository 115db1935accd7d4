"""Lexicons kept as data: opinion words, intensifiers, antonyms (``perturb/lexicons/*.tsv``).

File formats (tab-separated, ``#`` starts a comment, first non-comment line is the header):

``opinion.tsv``       word  pos  polarity  grade
    pos is ADJ, ADV, VERB or NOUN; polarity is -1 or 1; grade is ``gradable`` (takes *very*,
    *slightly*), ``extreme`` (takes *absolutely*, *truly*, *utterly*; never *very*), or ``-``.
``intensifiers.tsv``  word  kind
    kind is ``amplifier``, ``extreme-amplifier`` or ``softener``.
``antonyms.tsv``      word  pos  opposite  kind
    kind is ``antonym`` (clean/dirty) or ``prefix`` (comfortable/uncomfortable).

A user's ``--lexicon FILE`` has the format of ``opinion.tsv`` and adds to (or overrides) it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Iterable, Iterator

from pairflip.records import PairflipError

POS_TAGS = ("ADJ", "ADV", "VERB", "NOUN")
GRADES = ("gradable", "extreme", "-")
INTENSIFIER_KINDS = ("amplifier", "extreme-amplifier", "softener")
ANTONYM_KINDS = ("antonym", "prefix")


@dataclass(frozen=True)
class OpinionWord:
    word: str
    pos: str
    polarity: int
    grade: str


@dataclass
class Lexicon:
    opinion: dict[tuple[str, str], OpinionWord] = field(default_factory=dict)
    intensifiers: dict[str, str] = field(default_factory=dict)
    antonyms: dict[tuple[str, str], tuple[str, str]] = field(default_factory=dict)  # (word,pos)->(opposite,kind)
    sources: list[str] = field(default_factory=list)

    def lookup(self, word: str, pos: str | None = None) -> OpinionWord | None:
        w = word.lower()
        if pos is not None:
            return self.opinion.get((w, pos))
        for p in POS_TAGS:
            hit = self.opinion.get((w, p))
            if hit:
                return hit
        return None

    def polarity(self, word: str, pos: str | None = None) -> int:
        hit = self.lookup(word, pos)
        return hit.polarity if hit else 0

    def opposite(self, word: str, pos: str) -> tuple[str, str] | None:
        return self.antonyms.get((word.lower(), pos))

    def words_of_kind(self, kind: str) -> list[str]:
        return [w for w, k in self.intensifiers.items() if k == kind]

    def extend(self, path: str | Path) -> None:
        for entry in _read_opinion(Path(path).read_text(encoding="utf-8"), str(path)):
            self.opinion[(entry.word, entry.pos)] = entry
        self.sources.append(str(path))


def _rows(text: str, where: str, ncols: int) -> Iterator[tuple[int, list[str]]]:
    header_seen = False
    for lineno, line in enumerate(text.splitlines(), 1):
        line = line.split("#", 1)[0].rstrip()
        if not line.strip():
            continue
        cols = [c.strip() for c in line.split("\t")]
        if not header_seen:
            header_seen = True
            continue
        if len(cols) != ncols:
            raise PairflipError(f"{where}:{lineno}: expected {ncols} tab-separated columns, got {len(cols)}")
        yield lineno, cols


def _read_opinion(text: str, where: str) -> Iterator[OpinionWord]:
    for lineno, (word, pos, pol, grade) in _rows(text, where, 4):
        if pos not in POS_TAGS:
            raise PairflipError(f"{where}:{lineno}: pos {pos!r} is not one of {', '.join(POS_TAGS)}")
        if pol not in ("-1", "1", "+1"):
            raise PairflipError(f"{where}:{lineno}: polarity {pol!r} is not -1 or 1")
        if grade not in GRADES:
            raise PairflipError(f"{where}:{lineno}: grade {grade!r} is not one of {', '.join(GRADES)}")
        yield OpinionWord(word.lower(), pos, int(pol), grade)


def _data(name: str) -> str:
    return resources.files("pairflip.perturb").joinpath("lexicons", name).read_text(encoding="utf-8")


@lru_cache(maxsize=8)
def _default() -> Lexicon:
    lex = Lexicon(sources=["builtin"])
    for e in _read_opinion(_data("opinion.tsv"), "lexicons/opinion.tsv"):
        lex.opinion[(e.word, e.pos)] = e
    for lineno, (word, kind) in _rows(_data("intensifiers.tsv"), "lexicons/intensifiers.tsv", 2):
        if kind not in INTENSIFIER_KINDS:
            raise PairflipError(f"lexicons/intensifiers.tsv:{lineno}: kind {kind!r} unknown")
        lex.intensifiers[word.lower()] = kind
    for lineno, (word, pos, opp, kind) in _rows(_data("antonyms.tsv"), "lexicons/antonyms.tsv", 4):
        if kind not in ANTONYM_KINDS:
            raise PairflipError(f"lexicons/antonyms.tsv:{lineno}: kind {kind!r} unknown")
        lex.antonyms[(word.lower(), pos)] = (opp.lower(), kind)
    return lex


def load_lexicon(extra: Iterable[str | Path] = ()) -> Lexicon:
    """The built-in lexicons, extended by the user's files (each in ``opinion.tsv`` format)."""
    base = _default()
    lex = Lexicon(dict(base.opinion), dict(base.intensifiers), dict(base.antonyms), list(base.sources))
    for path in extra:
        p = Path(path)
        if not p.exists():
            raise PairflipError(f"--lexicon {p}: no such file")
        lex.extend(p)
    return lex
