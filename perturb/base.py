"""The shape every rule shares: candidates of token edits, one function that applies them, one
validator that judges the result.

A rule is a generator over one parsed spaCy ``Doc`` (like spaCy's ``noun_chunks`` iterator): it
yields :class:`Candidate` objects made of :class:`TokenEdit` replacements and never glues strings
itself. :func:`apply_edits` turns a candidate into the variant text and the character-level edits
stored in the suite; :func:`validate` says why a variant must be dropped, or ``None``.
"""

from __future__ import annotations

import random
import re
from functools import lru_cache
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Callable, Iterator

from pairflip.records import Edit

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc, Token

    from pairflip.perturb.lexicon import Lexicon


@dataclass(frozen=True)
class TokenEdit:
    """Replace tokens ``doc[start:end]`` by ``text``.

    ``start == end`` inserts ``text`` before token ``start`` (at the end of the text when
    ``start == len(doc)``); an empty ``text`` deletes the tokens. The replaced span runs from the
    first token's first character to the last token's last character: the whitespace after the
    last token is kept, so ``text`` never carries leading or trailing spaces.
    """

    start: int
    end: int
    text: str


@dataclass(frozen=True)
class Candidate:
    """One variant a rule proposes: its rule name, expectation and edits."""

    rule: str  # "negation/do-support"
    should: str  # "flip" | "hold" | "strengthen" | "weaken" | "none"
    edits: tuple[TokenEdit, ...]
    meta: dict[str, Any] = field(default_factory=dict, hash=False, compare=False)


@dataclass
class Context:
    """What a rule may consult besides the parse: the lexicons and a seeded random source."""

    lexicon: "Lexicon"
    rng: random.Random
    seed: int = 0


Rule = Callable[["Doc", Context], Iterator[Candidate]]

PUNCT_CLOSE = set(",.;:!?)]}%")
NEGATORS = {"not", "n't", "never", "no", "cannot", "nothing", "nobody", "none", "nowhere", "neither", "nor"}


def lemma(tok: "Token") -> str:
    """The token's lemma; from lemminflect when the pipeline runs without a lemmatizer."""
    if tok.lemma_:
        return tok.lemma_
    return _lemma(tok.text, tok.tag_, tok.pos_)


_UPOS = {"VERB": "VERB", "AUX": "AUX", "ADJ": "ADJ", "ADV": "ADV", "NOUN": "NOUN", "PROPN": "PROPN"}


@lru_cache(maxsize=100_000)
def _lemma(text: str, tag: str, pos: str) -> str:
    if text == "I":
        return "I"
    low = text.lower()
    if pos == "PRON" or pos not in _UPOS:
        return {"n't": "not", "'m": "be", "'re": "be", "'s": "be" if pos == "AUX" else "'s",
                "'ve": "have", "'ll": "will", "'d": "would", "wo": "will", "ca": "can"}.get(low, low)
    from lemminflect import getLemma

    if pos == "AUX":
        special = {"'m": "be", "'re": "be", "'s": "be", "'ve": "have", "'ll": "will", "'d": "would",
                   "wo": "will", "ca": "can", "sha": "shall", "n't": "not"}
        if low in special:
            return special[low]
    cands = getLemma(low, upos=_UPOS[pos])
    return cands[0] if cands else low


def match_case(new: str, old: str) -> str:
    """Give ``new`` the capitalisation style of ``old`` (ALL CAPS, Title, or as is)."""
    if old.isupper() and len(old) > 1:
        return new.upper()
    if old[:1].isupper():
        return new[:1].upper() + new[1:]
    return new


def _starts_upper(text: str) -> bool:
    for ch in text:
        if ch.isalpha():
            return ch.isupper()
    return False


def apply_edits(doc: "Doc", edits: tuple[TokenEdit, ...] | list[TokenEdit]) -> tuple[str, list[Edit]]:
    """Apply token edits to ``doc_text(doc)``; return the variant and its character-level edits.

    Keeps each untouched token's own whitespace, removes the whitespace a deletion leaves behind,
    closes up space before punctuation that an edit put at a join, and gives the variant a capital
    at the start when the source had one. Edits must not overlap.
    """
    text = doc_text(doc)
    spans: list[tuple[int, int, str]] = []
    for e in sorted(edits, key=lambda e: (e.start, e.end)):
        if e.start < 0 or e.end > len(doc) or e.start > e.end:
            raise ValueError(f"token edit {e} out of range for a doc of {len(doc)} tokens")
        if e.start == e.end:  # insertion
            if e.start < len(doc):
                pos = doc[e.start].idx
                tok = doc[e.start]
                if e.start > 0 and tok.text[:1] in PUNCT_CLOSE and not doc[e.start - 1].whitespace_:
                    # before closing punctuation: "quickly." -> "quickly in the morning."
                    spans.append((pos, pos, " " + e.text))
                else:
                    spans.append((pos, pos, e.text + " "))
            else:
                last = doc[-1]
                pos = last.idx + len(last.text)
                spans.append((pos, pos, " " + e.text))
            continue
        first, last = doc[e.start], doc[e.end - 1]
        s, t = first.idx, last.idx + len(last.text)
        if e.text == "":  # deletion: take one side's whitespace with it
            if last.whitespace_:
                t += len(last.whitespace_)
            elif s > 0 and text[s - 1].isspace():
                s -= 1
        spans.append((s, t, e.text))
    spans.sort()
    for (s1, t1, _), (s2, _t2, _) in zip(spans, spans[1:]):
        if s2 < t1:
            raise ValueError("token edits overlap")

    # Segments: ("keep", start, end, text) for untouched source text, ("edit", start, end, text)
    # for replacements. Every fix below changes an edit's text or span, never the kept text, so
    # the stored character edits replay exactly to the variant.
    segs: list[list[Any]] = []
    cursor = 0
    for s, t, new in spans:
        before = text[cursor:s]
        if new[:1] in PUNCT_CLOSE and before.endswith(" ") and s != t:
            # "great , and" -> "great, and" when an edit starts with punctuation
            stripped = before.rstrip(" ")
            s -= len(before) - len(stripped)
            before = stripped
        if before:
            segs.append(["keep", cursor, s, before])
        prev = segs[-1][3] if segs else ""
        if new.startswith(" ") and (prev.endswith(" ") or not prev):
            new = new.lstrip(" ")  # no double space (or leading space) at the join
        segs.append(["edit", s, t, new])
        cursor = t
    if cursor < len(text):
        segs.append(["keep", cursor, len(text), text[cursor:]])
    for i, seg in enumerate(segs):  # an edit ending in a space before a space, or at the end
        if seg[0] == "edit" and seg[3].endswith(" "):
            nxt = segs[i + 1][3] if i + 1 < len(segs) else ""
            if not nxt or nxt[:1].isspace():
                seg[3] = seg[3].rstrip(" ")
    if _starts_upper(text):
        _capitalise_start(segs)
    variant = "".join(seg[3] for seg in segs)
    char_edits = [Edit(a, b, t) for kind, a, b, t in segs if kind == "edit"]
    return variant, char_edits


def _capitalise_start(segs: list[list[Any]]) -> None:
    """Give the first letter a capital, recording the change as (part of) an edit."""
    for i, seg in enumerate(segs):
        kind, a, b, t = seg
        for j, ch in enumerate(t):
            if not ch.isalpha():
                continue
            if ch.isupper():
                return
            if kind == "edit":
                seg[3] = t[:j] + ch.upper() + t[j + 1 :]
                return
            # split the kept text: [a, a+j) kept, one capitalised character as an edit, rest kept
            pieces = []
            if j:
                pieces.append(["keep", a, a + j, t[:j]])
            pieces.append(["edit", a + j, a + j + 1, ch.upper()])
            if j + 1 < len(t):
                pieces.append(["keep", a + j + 1, b, t[j + 1 :]])
            segs[i : i + 1] = pieces
            return


_WORD = re.compile(r"[^\W_]+(?:['’][^\W_]+)*", re.UNICODE)


def words(text: str) -> list[str]:
    """Lower-cased words, punctuation dropped (used by the reorder multiset check)."""
    return [w.lower() for w in _WORD.findall(text)]


_DOUBLED_NEG = re.compile(
    r"\b(?:not|never|no|cannot)\s+(?:not|never|no)\b|n't\s+(?:not|never)\b|\bnot\s+\w+n't\b", re.IGNORECASE
)
_DO_PLUS = re.compile(r"\b(?:do|does|did)(?:n't|\s+not)\s+([a-z]+)\b", re.IGNORECASE)


_SPACE_PUNCT = re.compile(r" [,.;:!?]")
_DOUBLED_PUNCT = re.compile(r",\s*,|\.\s*,|,\s*\.")


@dataclass(frozen=True)
class _SourceFacts:
    """What validate needs to know about a source, computed once per source text."""

    doubled_neg: bool
    space_punct: bool
    double_space: bool
    doubled_punct: bool
    starts_upper: bool
    words: tuple[str, ...]
    joined: str
    multiset: tuple[str, ...]
    negations: int


@lru_cache(maxsize=4096)
def _source_facts(source: str) -> _SourceFacts:
    sw = words(source)
    return _SourceFacts(
        doubled_neg=bool(_DOUBLED_NEG.search(source)),
        space_punct=bool(_SPACE_PUNCT.search(source)),
        double_space="  " in source,
        doubled_punct=bool(_DOUBLED_PUNCT.search(source)),
        starts_upper=_starts_upper(source),
        words=tuple(sw),
        joined=" ".join(sw),
        multiset=tuple(sorted(_article_as_a(sw))),
        negations=_count_negations(sw),
    )


def validate(doc: "Doc", cand: Candidate, variant: str) -> str | None:
    """Why the variant must be dropped, or ``None``. Judged from the source and the edit only."""
    source = doc_text(doc)
    if not variant.strip():
        return "empty variant"
    if variant == source:
        return "unchanged"
    src = _source_facts(source)
    if not src.doubled_neg and _DOUBLED_NEG.search(variant):
        return "doubled negation"
    if not src.space_punct and _SPACE_PUNCT.search(variant):
        return "space before punctuation"
    if not src.double_space and "  " in variant:
        return "double space"
    if not src.doubled_punct and _DOUBLED_PUNCT.search(variant):
        return "doubled punctuation"
    if src.starts_upper and not _starts_upper(variant):
        return "no capital at the start"
    vw = words(variant)
    for a, b in zip(vw, vw[1:]):
        if a == b and a.isalpha() and f"{a} {b}" not in src.joined:
            return "repeated word"
    if cand.rule.startswith("reorder/") and tuple(sorted(_article_as_a(vw))) != src.multiset:
        # "a"/"an" count as one word: a reorder may fix the article ("an easy and quick" -> "a quick and easy")
        return "reorder changed the words"
    want = _negation_change(cand)
    if want is not None:
        delta = _count_negations(vw) - src.negations
        if delta != want:
            return f"negation count changed by {delta:+d}, expected {want:+d}"
    if cand.rule != "reorder/shuffle" and ("do" in variant.lower() or "did" in variant.lower()):
        # a shuffle is ungrammatical on purpose (a diagnostic): only its word multiset is checked
        for m in _DO_PLUS.finditer(variant):
            if m.group(0) in source:
                continue
            verb = m.group(1).lower()
            if not _is_base_form(verb):
                return "agreement: do-support needs the base form"
    return None


def _article_as_a(ws: list[str]) -> list[str]:
    return ["a" if w == "an" else w for w in ws]


# Negative auxiliaries written without the apostrophe in informal text ("i dont like it").
_BARE_NT = frozenset("dont doesnt didnt isnt arent wasnt werent cant wont couldnt shouldnt wouldnt "
                     "hasnt havent hadnt aint mustnt neednt".split())


def _count_negations(ws: "list[str] | tuple[str, ...]") -> int:
    return sum(1 for w in ws if w in NEGATORS or w in _BARE_NT or w.replace("’", "'").endswith("n't"))


def _negation_change(cand: Candidate) -> int | None:
    """How many negations the edit must add (+) or remove (-): double negation adds exactly one;
    a negation candidate states its own counts in ``meta`` ("inserted", "removed")."""
    if cand.rule.startswith("double-negation/"):
        return 1
    if cand.rule.startswith("negation/") and "inserted" in cand.meta:
        ins, rem = int(cand.meta.get("inserted", 0)), int(cand.meta.get("removed", 0))
        if ins and rem:
            return None  # toggled both ways: no fixed count
        return ins - rem
    return None


_BASE_CACHE: dict[str, bool] = {}


def _is_base_form(word: str) -> bool:
    """True when ``word`` can be a verb's base form (lemminflect), or is not a verb at all."""
    if word in _BASE_CACHE:
        return _BASE_CACHE[word]
    from lemminflect import getAllLemmas

    lemmas = getAllLemmas(word, upos="VERB")
    ok = not lemmas or word in {l for ls in lemmas.values() for l in ls}
    _BASE_CACHE[word] = ok
    return ok


# --------------------------------------------------------------------------- cached sentence lookups
# ``doc.sents`` and ``token.sent`` rescan the whole doc on every call; rules ask often, so the
# sentence spans are computed once per doc and kept in ``doc.user_data``.

_SENTS_KEY = "pairflip.sents"


def sents(doc: "Doc") -> list[Any]:
    """The doc's sentences (spans), computed once per doc."""
    cached = doc.user_data.get(_SENTS_KEY)
    if cached is None:
        spans = list(doc.sents)
        owner = [0] * len(doc)
        for k, sp in enumerate(spans):
            for i in range(sp.start, sp.end):
                owner[i] = k
        cached = (spans, owner)
        doc.user_data[_SENTS_KEY] = cached
    return cached[0]


def sent_of(tok: "Token") -> Any:
    """The sentence holding ``tok`` (same as ``tok.sent``, without rescanning the doc)."""
    doc = tok.doc
    sents(doc)
    spans, owner = doc.user_data[_SENTS_KEY]
    return spans[owner[tok.i]]


def doc_text(doc: "Doc") -> str:
    """``doc.text``, computed once per doc (spaCy rebuilds it from every token on each call)."""
    text = doc.user_data.get("pairflip.text")
    if text is None:
        text = doc.user_data["pairflip.text"] = doc.text
    return text


_CONTRAST_MARKS = frozenset("but although though however yet whereas while whilst except".split())


def final_though(tok: Any) -> bool:
    """A "though" that ends its one-clause sentence as an adverb ("A little pricey though.",
    "The cafe closes too early, though."): it sets the sentence against an earlier one and leaves
    the sentence itself with one opinion. Not after a comma splice or with another contrast word."""
    rest = [t for t in tok.sent if t.i > tok.i]
    return tok.dep_ == "advmod" and all(t.is_punct for t in rest) and not any(
        t.lower_ in _CONTRAST_MARKS or t.is_punct and t.i < tok.i - 1 for t in tok.sent if t.i != tok.i)


_SHORT_TIME = frozenset("minute minutes hour hours day days week weeks fortnight month months year years".split())


def limited_duration(doc: Any) -> bool:
    """A time span played down ("enjoyed it for just over a week", "lasted only a month", "worked for
    a while"): the text
    implies the product then failed, so its praise is not its opinion (blind review, round 17v)."""
    toks = list(doc)
    for t in toks:
        if t.lower_ in ("just", "only") and any(u.lower_ in _SHORT_TIME for u in toks[t.i + 1 : t.i + 5]):
            near = {u.lower_ for u in toks[max(0, t.i - 2) : t.i + 2]}
            if near & {"for", "last", "lasted", "lasts", "lasting", "survived", "worked"}:
                return True  # not "only took ten minutes": quick, which is praise
        if t.lower_ == "while" and t.i >= 2 and toks[t.i - 1].lower_ == "a" and toks[t.i - 2].lower_ == "for" \
                and toks[t.i - 2].head.tag_ == "VBD" and lemma(toks[t.i - 2].head).lower() in ("work", "last", "run", "hold"):
            return True  # "it worked good for a while": then it stopped (blind review, round 18v)
    return False


def is_question(sent: Any) -> bool:
    """The sentence ends with a question mark (``sent.text.rstrip().endswith("?")``, without
    rebuilding the sentence's text)."""
    doc = sent.doc
    for i in range(sent.end - 1, sent.start - 1, -1):
        t = doc[i]
        if t.is_space:
            continue
        return t.text.rstrip().endswith("?")
    return False


def tokens(doc: "Doc") -> list[Any]:
    """``list(doc)``, made once per doc: ``doc[i]`` and ``for t in doc`` build a new Token object
    on every access, which is most of what the rules cost."""
    toks = doc.user_data.get("pairflip.tokens")
    if toks is None:
        toks = doc.user_data["pairflip.tokens"] = list(doc)
    return toks


# --------------------------------------------------------------------------- lexicon helpers


@dataclass(frozen=True)
class PhraseSpan:
    """A multiword lexicon expression found in a parse: tokens ``start:end``, the token that
    heads them (the only one whose syntactic head lies outside), and the entry."""

    start: int
    end: int
    head: int
    entry: Any


def phrase_spans(doc: "Doc", lexicon: "Lexicon") -> list[PhraseSpan]:
    """The lexicon's multiword expressions in ``doc``, left to right, longest first, never
    overlapping. A word of an expression matches a token whose lower-cased text or lemma it
    equals; a match that is not one constituent (two tokens with heads outside the span) is
    dropped. Memoised per doc and lexicon."""
    key = ("pairflip.phrases", id(lexicon))
    found = doc.user_data.get(key)
    if found is None:
        found = doc.user_data[key] = _phrase_spans(doc, lexicon) if lexicon.phrases else []
    return found


_OWN_DOINGS = frozenset("pay submit return send renew".split())


def _own_payment(head: "Token") -> bool:
    """Is this phrase on a verb of the writer's own doing ("I paid on time", "we returned it on time")?"""
    verb = head.head
    return lemma(verb).lower() in _OWN_DOINGS and any(
        c.dep_ == "nsubj" and c.lower_ in ("i", "we") for c in verb.children)


def _phrase_spans(doc: "Doc", lexicon: "Lexicon") -> list[PhraseSpan]:
    toks = tokens(doc)
    forms = [(t.lower_.replace("’", "'"), lemma(t).lower()) for t in toks]
    starts = lexicon.phrase_starts
    out: list[PhraseSpan] = []
    i = 0
    while i < len(toks):
        keys = starts.get(forms[i][0], []) + (starts.get(forms[i][1], []) if forms[i][1] != forms[i][0] else [])
        for words in sorted(keys, key=len, reverse=True):
            j = i + len(words)
            if j > len(toks) or not all(w in forms[k] for w, k in zip(words, range(i, j))):
                continue
            heads = [k for k in range(i, j) if not i <= toks[k].head.i < j or toks[k].head.i == k]
            if len(heads) != 1:
                continue  # not one constituent: "worth it" in "worth it, it ..."
            if not _head_fits(toks[heads[0]], lexicon.phrases[words].pos):
                continue  # "high priced" is no "high price"; "rip off" the noun is no verb
            if words == ("on", "time") and _own_payment(toks[heads[0]]):
                continue  # "even though I paid on time": the writer's own doing, not the service's (round 17)
            out.append(PhraseSpan(i, j, heads[0], lexicon.phrases[words]))
            i = j - 1
            break
        i += 1
    return out


def _head_fits(head: "Token", pos: str) -> bool:
    """An expression's head agrees with the entry's part of speech where that is checkable: a verb
    entry needs a verb head, a noun entry a head that is no verb."""
    if pos == "VERB":
        return head.pos_ in ("VERB", "AUX")
    if pos == "NOUN":
        return head.pos_ not in ("VERB", "AUX")
    return True


def phrase_at(tok: "Token", lexicon: "Lexicon") -> PhraseSpan | None:
    """The expression that ``tok`` belongs to, or ``None``."""
    for sp in phrase_spans(tok.doc, lexicon):
        if sp.start <= tok.i < sp.end:
            return sp
    return None


# A linking verb's predicative complement ("smells fresh", "tastes great", "became a hit"),
# or its "like" phrase ("smells like pine"); common practice, from the grammar of copular verbs
# (Quirk et al. 1985, on copular verbs; from memory).
_COMPLEMENT_DEPS = frozenset({"acomp", "attr", "oprd"})


def qualifiers(tok: "Token") -> list["Token"]:
    """The words that qualify ``tok``: a verb's predicative complements and *like* phrases
    ("smells fresh", "smells like burning plastic"), a noun's adjectives ("a fresh smell"), each
    with its subtree."""
    heads: list[Any] = []
    if tok.pos_ in ("VERB", "AUX"):
        for c in tok.children:
            if c.dep_ in _COMPLEMENT_DEPS or (c.dep_ == "xcomp" and c.pos_ == "ADJ") or (
                    c.dep_ == "prep" and c.lower_ == "like"):
                heads.append(c)
    elif tok.pos_ in ("NOUN", "PROPN"):
        heads = [c for c in tok.children if c.dep_ == "amod" and c.pos_ == "ADJ"]
    return [x for h in heads for x in h.subtree if not (x.i == h.i and h.dep_ == "prep")]


def linking_use(tok: "Token", lexicon: "Lexicon") -> bool:
    """``tok`` is qualified by a word of the lexicon, which then sets the polarity: a linking
    verb with an opinion complement ("smells fresh"), a noun with an opinion adjective ("a fresh
    smell"). Used for entries whose context is ``alone``; without such a qualifier ("it smells",
    "smells like burning plastic", "the smell") the entry keeps its own polarity."""
    for x in qualifiers(tok):
        if x.is_alpha and (lexicon.lookup(x.lower_) is not None or lexicon.lookup(lemma(x).lower()) is not None):
            return True
    return False
