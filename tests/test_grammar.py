"""Grammar helpers against handbook facts of English grammar."""

from __future__ import annotations

import pytest

from pairflip.perturb import grammar as g
from pairflip.perturb.nlp import load_nlp

# English irregular verbs: base, simple past, 3rd person singular present, past participle.
# From memory, standard English grammar handbooks (the principal parts of irregular verbs).
IRREGULAR = [
    ("go", "went", "goes", "gone"),
    ("break", "broke", "breaks", "broken"),
    ("tear", "tore", "tears", "torn"),
    ("wear", "wore", "wears", "worn"),
    ("buy", "bought", "buys", "bought"),
    ("bring", "brought", "brings", "brought"),
    ("feel", "felt", "feels", "felt"),
    ("keep", "kept", "keeps", "kept"),
    ("sleep", "slept", "sleeps", "slept"),
    ("hold", "held", "holds", "held"),
    ("fall", "fell", "falls", "fallen"),
    ("freeze", "froze", "freezes", "frozen"),
    ("shrink", "shrank", "shrinks", "shrunk"),
    ("sink", "sank", "sinks", "sunk"),
    ("stink", "stank", "stinks", "stunk"),
    ("ride", "rode", "rides", "ridden"),
    ("take", "took", "takes", "taken"),
    ("give", "gave", "gives", "given"),
    ("get", "got", "gets", "got|gotten"),  # British "got", American "gotten"
    ("make", "made", "makes", "made"),
    ("run", "ran", "runs", "run"),
    ("come", "came", "comes", "come"),
    ("do", "did", "does", "done"),
    ("have", "had", "has", "had"),
    ("fly", "flew", "flies", "flown"),
    ("hurt", "hurt", "hurts", "hurt"),
    ("set", "set", "sets", "set"),
    ("cut", "cut", "cuts", "cut"),
    ("split", "split", "splits", "split"),
    ("stick", "stuck", "sticks", "stuck"),
    ("leave", "left", "leaves", "left"),
    ("lose", "lost", "loses", "lost"),
    ("find", "found", "finds", "found"),
    ("sell", "sold", "sells", "sold"),
    ("fit", "fit|fitted", "fits", "fit|fitted"),  # American "fit", British "fitted"
]


@pytest.mark.parametrize("base,past,third,participle", IRREGULAR)
def test_irregular_verbs(base, past, third, participle):
    # a|b: the handbooks give both forms (American / British usage)
    assert g.past(base) in past.split("|")
    assert g.third_singular(base) == third
    assert g.past_participle(base) in participle.split("|")


# Regular spelling rules (handbook: -es after sibilants and -o, y -> ies after a consonant,
# final e takes -d, consonant doubling after a short stressed vowel).
REGULAR = [
    ("leak", "leaked", "leaks"), ("fix", "fixed", "fixes"), ("carry", "carried", "carries"),
    ("stay", "stayed", "stays"), ("love", "loved", "loves"), ("rip", "ripped", "rips"),
    ("flicker", "flickered", "flickers"), ("wobble", "wobbled", "wobbles"), ("crash", "crashed", "crashes"),
]


@pytest.mark.parametrize("base,past,third", REGULAR)
def test_regular_verbs(base, past, third):
    assert g.past(base) == past and g.third_singular(base) == third


def test_fallback_for_unknown_verbs():
    assert g.inflect("blorp", "VBZ") == "blorps"
    assert g.inflect("blorpy", "VBD") == "blorpied"
    assert g.inflect("blorpe", "VBD") == "blorped"


@pytest.mark.parametrize("word,contracted,full", [
    ("is", "isn't", "is not"), ("are", "aren't", "are not"), ("was", "wasn't", "was not"),
    ("were", "weren't", "were not"), ("am", "am not", "am not"),  # no standard "amn't"
    ("has", "hasn't", "has not"), ("do", "don't", "do not"), ("does", "doesn't", "does not"),
    ("did", "didn't", "did not"), ("will", "won't", "will not"), ("can", "can't", "cannot"),
    ("would", "wouldn't", "would not"), ("should", "shouldn't", "should not"),
    ("could", "couldn't", "could not"), ("must", "mustn't", "must not"), ("might", "might not", "might not"),
])
def test_negative_auxiliaries(word, contracted, full):
    assert g.negative_aux(word, g.CONTRACTED) == contracted
    assert g.negative_aux(word, g.FULL) == full


def test_do_forms():
    assert g.do_form("VBZ", g.CONTRACTED) == "doesn't"
    assert g.do_form("VBD", g.FULL) == "did not"
    assert g.do_form("VBP", g.CONTRACTED) == "don't"
    assert g.do_form("VB", g.CONTRACTED, subject_third_singular=False) == "don't"
    assert g.do_form("VBN", g.CONTRACTED) is None
    assert g.negative_aux("seem", g.CONTRACTED) is None


@pytest.fixture(scope="module")
def nlp():
    return load_nlp()


@pytest.mark.parametrize("text,subject,third,past_be,present_be", [
    ("I like it.", "I", False, "was", "am"),
    ("She likes it.", "She", True, "was", "is"),
    ("They like it.", "They", False, "were", "are"),
    ("The tent leaks.", "tent", True, "was", "is"),
    ("The poles bend.", "poles", False, "were", "are"),
    ("The tent and the stove work.", "tent", False, "were", "are"),
    ("You like it.", "You", False, "were", "are"),
])
def test_agreement(nlp, text, subject, third, past_be, present_be):
    doc = nlp(text)
    subj = next(t for t in doc if t.text == subject)
    assert g.third_singular_subject(subj) is third
    assert g.be_form("VBD", subj) == past_be
    assert g.be_form("VBP" if not third else "VBZ", subj) == present_be


@pytest.mark.parametrize("text,style", [
    ("It doesn't leak.", g.CONTRACTED), ("It does not leak.", g.FULL), ("I cannot say.", g.FULL),
    ("It's great.", g.CONTRACTED), ("I've used it.", g.CONTRACTED), ("It is great.", None),
    ("It isn't bad and it is not cheap.", g.CONTRACTED),
])
def test_text_style(nlp, text, style):
    assert g.text_style(nlp(text)) == style


@pytest.mark.parametrize("text,index,word,kind", [
    ("It's great.", 1, "is", "be"), ("It's been great.", 1, "has", "have"),
    ("I'd buy it.", 1, "would", "modal"), ("I'd used it.", 1, "had", "have"),
    ("They're fine.", 1, "are", "be"), ("I'll return it.", 1, "will", "modal"),
    ("I can't say.", 1, "can", "modal"), ("It won't last.", 1, "will", "modal"),
    ("It doesn't leak.", 1, "does", "do"),
])
def test_aux_words(nlp, text, index, word, kind):
    tok = nlp(text)[index]
    assert g.aux_word(tok) == word and g.aux_kind(tok) == kind
