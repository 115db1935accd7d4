"""English grammar helpers shared by the rules: inflection, auxiliaries, contractions, agreement.

Everything works on one spaCy parse and lemminflect's tables; nothing here builds a variant
string (rules yield :class:`~pairflip.perturb.base.TokenEdit` objects and ``apply_edits`` glues).

Vocabulary used below:

* *style* — ``"contracted"`` (isn't, don't, won't) or ``"full"`` (is not, do not, will not,
  cannot); :func:`text_style` reads it off the source so a variant keeps the text's own style.
* *aux kind* — ``"be"``, ``"have"``, ``"do"`` or ``"modal"``, from :func:`aux_kind`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Iterable

from pairflip.perturb.base import lemma, match_case

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc, Token

CONTRACTED = "contracted"
FULL = "full"

# Clitic auxiliaries as spaCy tokenises them ("it" + "'s", "I" + "'ve"); both apostrophes.
CLITICS = {"'s", "'re", "'m", "'ve", "'ll", "'d"}
# The stem of an auxiliary before "n't" as spaCy tokenises it: "ca" + "n't", "wo" + "n't".
_NT_STEMS = {"ca": "can", "wo": "will", "sha": "shall"}

MODALS = {"will", "would", "can", "could", "should", "shall", "must", "might", "may"}

# Negative forms of a finite auxiliary, per style. "am" has no contracted negative in standard
# English (handbook fact: *amn't* is dialectal; "I'm not" / "I am not" are used).
_NEG_CONTRACTED = {
    "is": "isn't", "are": "aren't", "was": "wasn't", "were": "weren't", "am": "am not",
    "have": "haven't", "has": "hasn't", "had": "hadn't",
    "do": "don't", "does": "doesn't", "did": "didn't",
    "will": "won't", "would": "wouldn't", "can": "can't", "could": "couldn't",
    "should": "shouldn't", "must": "mustn't", "might": "might not", "may": "may not",
    "shall": "shall not",
}
_NEG_FULL_SPECIAL = {"can": "cannot"}

# What a clitic auxiliary stands for, once its lemma is known.
_CLITIC_FULL = {("'s", "be"): "is", ("'s", "have"): "has", ("'re", "be"): "are", ("'m", "be"): "am",
                ("'ve", "have"): "have", ("'ll", "will"): "will", ("'d", "would"): "would",
                ("'d", "have"): "had"}


def norm(text: str) -> str:
    """Lower case with the typographic apostrophe folded to ASCII."""
    return text.lower().replace("\u2019", "'")


# ---------------------------------------------------------------- inflection


def inflect(base: str, tag: str) -> str:
    """``base`` inflected for a Penn tag (VB, VBD, VBZ, VBP, VBN, VBG), irregulars included.

    ``be`` is left to the caller for VBD/VBP (was/were, am/are depend on the subject).
    """
    if tag in ("VB", "VBP"):
        return base
    from lemminflect import getInflection

    forms = getInflection(base, tag=tag)
    if forms:
        return forms[0]
    # lemminflect knows nearly every verb; this regular fallback is only for unknown words.
    if tag == "VBZ":
        if base.endswith(("s", "sh", "ch", "x", "z", "o")):
            return base + "es"
        if base.endswith("y") and base[-2:-1] not in "aeiou":
            return base[:-1] + "ies"
        return base + "s"
    if tag in ("VBD", "VBN"):
        if base.endswith("e"):
            return base + "d"
        if base.endswith("y") and base[-2:-1] not in "aeiou":
            return base[:-1] + "ied"
        return base + "ed"
    if tag == "VBG":
        return (base[:-1] if base.endswith("e") and not base.endswith("ee") else base) + "ing"
    return base


def past(base: str) -> str:
    return inflect(base, "VBD")


def third_singular(base: str) -> str:
    return inflect(base, "VBZ")


def past_participle(base: str) -> str:
    return inflect(base, "VBN")


def is_known_verb(word: str) -> bool:
    """True when lemminflect's dictionary knows ``word`` as a form of some verb."""
    from lemminflect import getAllLemmas

    return bool(getAllLemmas(norm(word), upos="VERB"))


def base_form(tok: "Token") -> str:
    """The verb's base form (lemma), lower-cased; ``I`` excepted by :func:`lemma`."""
    return lemma(tok).lower()


# ---------------------------------------------------------------- auxiliaries


def aux_word(tok: "Token") -> str:
    """The full word an auxiliary token stands for: 'ca' -> can, "'s" -> is/has, "'d" -> would/had."""
    t = norm(tok.text)
    if t in _NT_STEMS:
        return _NT_STEMS[t]
    if t in CLITICS:
        lem = clitic_lemma(tok)
        return _CLITIC_FULL.get((t, lem), t)
    return t


def clitic_lemma(tok: "Token") -> str:
    """Whether a clitic stands for *be*, *have*, *will* or *would*.

    spaCy often calls "'s" in "it's been" a form of *be*; the next verb decides: a past
    participle after "'s"/"'d" means *has*/*had* (handbook: perfect = have + past participle),
    except passives and progressives of *be* ("it's made", "it's broken" stay *is*), which we
    cannot tell apart from the perfect and so only treat "'s been" / "'d been" / "'d had" as *have*.
    """
    t = norm(tok.text)
    if t in ("'re", "'m"):
        return "be"
    if t == "'ve":
        return "have"
    if t == "'ll":
        return "will"
    nxt = _next_word(tok)
    if t == "'s":
        if nxt is not None and norm(nxt.text) in ("been", "got", "gotten", "had"):
            return "have"
        return "be"
    if t == "'d":
        if nxt is not None and (nxt.tag_ == "VBN" or norm(nxt.text) in ("been", "had")):
            return "have"
        return "would"
    return base_form(tok)


def _next_word(tok: "Token") -> "Token | None":
    doc = tok.doc
    for j in range(tok.i + 1, min(len(doc), tok.i + 4)):
        if doc[j].is_alpha and doc[j].pos_ not in ("ADV", "PART"):
            return doc[j]
    return None


def aux_kind(tok: "Token") -> str | None:
    """``be`` / ``have`` / ``do`` / ``modal`` for an auxiliary or copula token, else ``None``."""
    w = aux_word(tok)
    if w in ("is", "are", "was", "were", "am", "be", "been", "being"):
        return "be"
    if w in ("have", "has", "had"):
        return "have"
    if w in ("do", "does", "did"):
        return "do"
    if w in MODALS:
        return "modal"
    return None


def negative_aux(word: str, style: str) -> str | None:
    """'is' -> "isn't" (contracted) or 'is not' (full); 'can' -> "can't" / 'cannot'."""
    w = word.lower()
    if w not in _NEG_CONTRACTED:
        return None
    if style == CONTRACTED:
        return _NEG_CONTRACTED[w]
    return _NEG_FULL_SPECIAL.get(w, f"{w} not")


def positive_aux(tok: "Token") -> str:
    """The positive form of an auxiliary token that carried "n't": 'ca' -> can, 'wo' -> will."""
    t = norm(tok.text)
    if t in _NT_STEMS:
        return match_case(_NT_STEMS[t], tok.text)
    return tok.text


def do_form(tag: str, style: str, subject_third_singular: bool | None = None) -> str | None:
    """The negative *do* for a verb that carried ``tag``: VBZ -> doesn't, VBD -> didn't, VBP -> don't."""
    if tag == "VBZ":
        base = "does"
    elif tag == "VBD":
        base = "did"
    elif tag == "VBP":
        base = "do"
    elif tag == "VB" and subject_third_singular is False:
        base = "do"
    else:
        return None
    return negative_aux(base, style)


def do_tag(do_tok: "Token") -> str | None:
    """The tag a lexical verb takes once its *do* is removed: does -> VBZ, did -> VBD, do -> VBP."""
    return {"does": "VBZ", "did": "VBD", "do": "VBP"}.get(norm(do_tok.text))


# ---------------------------------------------------------------- agreement


def third_singular_subject(subj: "Token | None") -> bool | None:
    """True for he/she/it/this/a singular noun; False for I/you/we/they/plurals; None if unknown."""
    if subj is None:
        return None
    t = norm(subj.text)
    if t in ("he", "she", "it", "this", "that", "everything", "everyone", "nobody", "somebody",
             "someone", "something", "each", "one"):
        return True
    if t in ("i", "you", "we", "they", "these", "those", "both"):
        return False
    if any(c.dep_ == "conj" for c in subj.children):
        return False  # "the tent and the stove"
    if subj.tag_ in ("NNS", "NNPS"):
        return False
    if subj.tag_ in ("NN", "NNP"):
        return True
    num = subj.morph.get("Number")
    person = subj.morph.get("Person")
    if num == ["Sing"] and person in (["3"], []):
        return True
    if num == ["Plur"] or person in (["1"], ["2"]):
        return False
    return None


def be_form(tag: str, subj: "Token | None") -> str | None:
    """The finite form of *be* for a tag and subject: VBD + they -> were; VBZ -> is."""
    if tag == "VBZ":
        return "is"
    s3 = third_singular_subject(subj)
    first_sing = subj is not None and norm(subj.text) == "i"
    if tag == "VBD":
        if first_sing or s3:
            return "was"
        return "were" if s3 is False else None
    if tag == "VBP":
        if first_sing:
            return "am"
        return "are" if s3 is False else None
    return None


# ---------------------------------------------------------------- style


def text_style(doc: "Doc | Iterable[Token]") -> str | None:
    """``contracted`` if the text contracts a negation or an auxiliary, ``full`` if it writes
    "not" / "cannot" out and contracts nothing, ``None`` when it shows neither."""
    has_nt = has_not = has_clitic = False
    for tok in doc:
        t = norm(tok.text)
        if t == "n't":
            has_nt = True
        elif t == "not" or t == "cannot":
            has_not = True
        elif t in CLITICS and tok.pos_ in ("AUX", "VERB"):
            has_clitic = True
    if has_nt:
        return CONTRACTED
    if has_not:
        return FULL
    if has_clitic:
        return CONTRACTED
    return None
