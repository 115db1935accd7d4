"""The built-in lexicons: large, well-formed, and their opinion polarities agree with two published
lexicons; the loader's formats; multiword expressions and context-marked words in the rules.

External references (both shipped in registry packages, both independent of the sources of
``opinion.tsv``, which are a hand list and the pattern project's adjective lexicon in TextBlob):

- AFINN-111 (Nielsen 2011, "A new ANEW: evaluation of a word list for sentiment analysis in
  microblogs", ESWC workshop), the file ``afinn/data/AFINN-111.txt`` in the PyPI package ``afinn``:
  word or phrase, integer valence in [-5, 5].
- The VADER lexicon (Hutto & Gilbert 2014, "VADER: A Parsimonious Rule-based Model for Sentiment
  Analysis of Social Media Text", ICWSM), ``vaderSentiment/vader_lexicon.txt`` in the PyPI package
  ``vaderSentiment`` 3.3.2: token, mean valence in [-4, 4], standard deviation, ten human ratings.
"""

from __future__ import annotations

import random
from importlib import resources
from pathlib import Path

import pytest

from pairflip import cli
from pairflip.perturb import intensifier, negation
from pairflip.perturb.base import Context, apply_edits, phrase_spans
from pairflip.perturb.lexicon import (CONTEXTS, GRADES, POS_TAGS, Lexicon, OpinionWord, load_lexicon,
                                      phrase_words)
from pairflip.records import PairflipError

# Every entry where our polarity and the published valence disagree in sign (or the published
# valence is 0), with the reason we keep ours. The same reason stands as a comment on the entry's
# line in opinion.tsv. A new disagreement fails the test until it is reviewed and listed here.
REVIEWED_AFINN = {
    ("exasperated", "ADJ"): "AFINN-111 lists +2, corrected to -2 in AFINN-en-165 (same package)",
    ("irresponsible", "ADJ"): "AFINN-111 lists +2, corrected to -2 in AFINN-en-165 (same package)",
    ("joke", "NOUN"): "'this product is a joke' is a complaint; AFINN rates the humour sense",
    ("steal", "NOUN"): "'a steal at this price' is a bargain; AFINN rates the theft sense",
}
REVIEWED_VADER = {
    ("excuse", "NOUN"): "'excuses instead of a fix' complains; VADER's raters split (-2 to +4)",
    ("freeze", "VERB"): "reviews mean 'the app freezes' (a fault); VADER's raters saw the neutral verb",
    ("joke", "NOUN"): "'this product is a joke' is a complaint; VADER rates the humour sense",
    ("laughable", "ADJ"): "'laughable quality' mocks; VADER's raters split between funny and ridiculous",
    ("silly", "ADJ"): "'a silly design' criticises; VADER rates the playful sense (+0.1)",
    ("steal", "NOUN"): "'a steal at this price' is a bargain; VADER rates the theft sense",
    ("tough", "ADJ"): "gear that is tough is durable; VADER rates the 'difficult' sense",
    ("unmatched", "ADJ"): "'unmatched comfort' praises; VADER's raters split (-4 to +3)",
}

# Copular (linking) verbs: a handbook fact of English grammar (Quirk et al. 1985, A Comprehensive
# Grammar of the English Language, on copular verbs; list from memory).
LINKING_VERBS = ("look", "feel", "seem", "sound", "smell", "taste", "stay", "remain", "get", "become")


def _published(path: Path) -> dict[str, float]:
    out: dict[str, float] = {}
    for line in path.read_text(encoding="utf-8", errors="replace").splitlines():
        cols = line.split("\t")
        if len(cols) >= 2:
            try:
                out[cols[0].strip()] = float(cols[1])
            except ValueError:
                continue
    return out


def _afinn() -> dict[str, float]:
    afinn = pytest.importorskip("afinn")
    return _published(Path(afinn.__file__).parent / "data" / "AFINN-111.txt")


def _vader() -> dict[str, float]:
    vader = pytest.importorskip("vaderSentiment")
    return _published(Path(vader.__file__).parent / "vader_lexicon.txt")


def _tsv(name: str) -> str:
    return resources.files("pairflip.perturb").joinpath("lexicons", name).read_text(encoding="utf-8")


def _data_rows(name: str) -> list[tuple[list[str], str]]:
    """(columns, trailing comment) of each entry of a lexicon file, header left out."""
    rows = []
    for line in _tsv(name).splitlines():
        body, _, comment = line.partition("#")
        if body.strip() and not body.startswith("word\t"):
            rows.append(([c.strip() for c in body.rstrip().split("\t")], comment.strip()))
    return rows


@pytest.fixture(scope="module")
def lex():
    return load_lexicon()


def _entries(lex: Lexicon) -> list[OpinionWord]:
    return list(lex.opinion.values()) + list(lex.phrases.values())


# --- size and form ------------------------------------------------------------------------------


def test_opinion_lexicon_has_3000_entries_of_every_kind(lex):
    entries = _entries(lex)
    assert len(entries) >= 3000
    assert len(_data_rows("opinion.tsv")) == len(entries), "an entry of opinion.tsv overwrote another"
    by_pos = {p: sum(1 for e in entries if e.pos == p) for p in POS_TAGS}
    assert by_pos["ADJ"] >= 1000 and by_pos["ADV"] >= 150 and by_pos["VERB"] >= 400 and by_pos["NOUN"] >= 400, by_pos
    assert len(lex.phrases) >= 500
    assert {e.pos for e in lex.phrases.values()} == set(POS_TAGS)  # expressions of every part of speech
    pos = sum(1 for e in entries if e.polarity > 0)
    assert 0.3 < pos / len(entries) < 0.7  # both polarities are well represented


def test_opinion_entries_are_well_formed(lex):
    for (word, pos), e in lex.opinion.items():
        assert word == word.lower() and word.strip() == word and " " not in word and "-" not in word
        assert e.word == word and e.pos == pos
    for key, e in lex.phrases.items():
        assert len(key) >= 2 and key == phrase_words(e.word)
    for e in _entries(lex):
        assert e.pos in POS_TAGS and e.polarity in (-1, 1) and e.grade in GRADES and e.context in CONTEXTS
        if e.pos in ("VERB", "NOUN"):
            assert e.grade == "-", f"{e.word}/{e.pos}: verbs and nouns are not graded"
        assert not {"not", "n't", "never", "no", "cannot"} & set(phrase_words(e.word)), e.word  # the rules toggle negators


def test_no_expression_holds_a_degree_word_the_intensifier_rules_edit(lex):
    """An expression hides its words from the intensifier rules, so none may hold a degree word
    before an opinion word they could grade ("highly recommend" stays the rules' own)."""
    degree = {w for w in lex.intensifiers if " " not in w}
    clash = []
    for key, e in lex.phrases.items():
        for i, w in enumerate(key[:-1]):
            if w in degree and any(lex.lookup(x) is not None for x in key[i + 1:]):
                clash.append(e.word)  # "reasonably priced" is fine: "priced" is no opinion word
    assert clash == [], clash


@pytest.mark.parametrize("word,pos,polarity", [
    # verbs of failure and success
    ("crash", "VERB", -1), ("freeze", "VERB", -1), ("leak", "VERB", -1), ("break down", "VERB", -1),
    ("keep logging me out", "VERB", -1), ("stop working", "VERB", -1), ("work", "VERB", 1),
    ("save me time", "VERB", 1), ("save the day", "VERB", 1), ("do the job", "VERB", 1),
    # nouns
    ("refund", "NOUN", -1), ("bargain", "NOUN", 1), ("rip-off", "NOUN", -1), ("glitch", "NOUN", -1),
    # fixed phrases
    ("on time", "ADV", 1), ("value for money", "NOUN", 1), ("waste of money", "NOUN", -1), ("worth it", "ADJ", 1),
    # adjectives and adverbs of the three domains
    ("laggy", "ADJ", -1), ("unresponsive", "ADJ", -1), ("overcrowded", "ADJ", -1), ("spotless", "ADJ", 1),
    ("unhelpful", "ADJ", -1), ("reliably", "ADV", 1), ("rudely", "ADV", -1),
])
def test_customer_vocabulary(lex, word, pos, polarity):
    words = phrase_words(word)
    e = lex.lookup(word, pos) if len(words) == 1 else lex.phrases.get(words)
    assert e is not None and e.pos == pos and e.polarity == polarity, (word, e)


@pytest.mark.parametrize("word", ["perfect", "flawless", "terrible", "awful", "useless", "amazing", "stunning",
                                  "horrible", "fantastic", "freezing", "impossible"])
def test_extreme_adjectives(lex, word):
    assert lex.lookup(word, "ADJ").grade == "extreme"


@pytest.mark.parametrize("word", ["comfortable", "sturdy", "flimsy", "noisy", "laggy", "overpriced"])
def test_gradable_adjectives(lex, word):
    assert lex.lookup(word, "ADJ").grade == "gradable"


@pytest.mark.parametrize("word", ["broken", "defective", "waterproof", "corrupt"])
def test_ungraded_adjectives(lex, word):
    assert lex.lookup(word, "ADJ").grade == "-"  # "very broken", "slightly waterproof": no degree


def test_hand_entries_survive_in_the_generated_file():
    """opinion.tsv is generated from opinion_hand.tsv (which wins) plus imported and derived words;
    every hand entry stands in it unchanged, with its comment, and nothing opinion_drop.tsv lists
    was imported or derived."""
    out = {(c[0], c[1]): (c, note) for c, note in _data_rows("opinion.tsv")}
    hand = _data_rows("opinion_hand.tsv")
    assert len(hand) >= 2000
    for cols, note in hand:
        assert out.get((cols[0], cols[1])) == (cols, note), cols
    dropped = {(c[0], c[1]) for c, _ in _data_rows("opinion_drop.tsv")}
    hand_keys = {(c[0], c[1]) for c, _ in hand}
    assert not (dropped & (set(out) - hand_keys))
    header = _tsv("opinion.tsv").split("\nword\t", 1)[0]
    assert "TextBlob" in header and "PDDL" in header  # the imported source and its licence are credited


# --- agreement with published lexicons -----------------------------------------------------------


def _disagreements(lex: Lexicon, ref: dict[str, float]) -> tuple[int, dict[tuple[str, str], float]]:
    overlap = 0
    found: dict[tuple[str, str], float] = {}
    for e in _entries(lex):
        v = ref.get(e.word)
        if v is None:
            continue
        overlap += 1
        if v == 0 or (v > 0) != (e.polarity > 0):
            found[(e.word, e.pos)] = v
    return overlap, found


def _commented(keys) -> list[tuple[str, str]]:
    notes = {(c[0], c[1]): note for c, note in _data_rows("opinion.tsv")}
    return [k for k in keys if not notes.get(k)]


@pytest.mark.parametrize("name,load,reviewed,min_overlap", [
    ("AFINN-111", _afinn, REVIEWED_AFINN, 500),
    ("VADER", _vader, REVIEWED_VADER, 700),
])
def test_polarity_agrees_with_published_lexicon(lex, name, load, reviewed, min_overlap):
    ref = load()
    assert len(ref) > 2400  # the full published lexicon (AFINN-111: 2,477 entries; VADER: 7,517)
    overlap, found = _disagreements(lex, ref)
    assert overlap >= min_overlap, f"only {overlap} entries are in {name}"
    agreement = 1 - len(found) / overlap
    assert agreement >= 0.95, f"sign agreement with {name}: {agreement:.3f} on {overlap} entries"
    assert set(found) == set(reviewed), (
        f"new: {sorted(set(found) - set(reviewed))}; no longer disagreeing: {sorted(set(reviewed) - set(found))}"
    )
    assert _commented(reviewed) == [], "each reviewed disagreement is justified on its line in opinion.tsv"


def test_antonyms_are_well_formed(lex):
    assert len(lex.antonyms) >= 120
    kinds = {k for (_, k) in lex.antonyms.values()}
    assert kinds == {"antonym", "prefix"}
    for (word, pos), (opp, kind) in lex.antonyms.items():
        assert opp != word
        assert lex.lookup(word, pos) is not None, f"{word}/{pos} has an antonym but no opinion entry"
        if kind == "prefix":
            assert any(opp == p + word for p in ("un", "in", "im", "dis")), f"{word} -> {opp} is no prefix pair"
    # opposites of opinion words have the opposite polarity where both are in the lexicon
    for (word, pos), (opp, _kind) in lex.antonyms.items():
        a, b = lex.lookup(word, pos), lex.lookup(opp, pos)
        if a and b:
            assert a.polarity == -b.polarity, f"{word} / {opp}"
    n_pairs = len({frozenset((w, o)) for (w, _), (o, _) in lex.antonyms.items()})
    assert n_pairs >= 120


def test_antonym_polarity_agrees_with_vader(lex):
    """Where VADER rates both members of a pair, it rates them with opposite signs."""
    vader = _vader()
    both = [(w, o) for (w, _), (o, _) in lex.antonyms.items() if vader.get(w) and vader.get(o)]
    assert len(both) >= 40
    wrong = [(w, o) for w, o in both if (vader[w] > 0) == (vader[o] > 0)]
    assert wrong == [], wrong


# --- context-marked words: linking verbs ----------------------------------------------------------


def _ctx(lexicon: Lexicon) -> Context:
    return Context(lexicon=lexicon, rng=random.Random(0))


def _negated(nlp, lexicon: Lexicon, text: str) -> str:
    doc = nlp(text)
    res = negation.plan(doc, _ctx(lexicon))
    return res if isinstance(res, str) else apply_edits(doc, res.edits)[0]


def test_linking_verbs_have_no_fixed_polarity(lex):
    for verb in LINKING_VERBS:
        e = lex.lookup(verb, "VERB")
        assert e is None or e.context == "alone", f"{verb}: a linking verb takes its complement's polarity"
    assert lex.lookup("smell", "VERB").context == "alone" and lex.lookup("smell", "VERB").polarity == -1


def test_a_linking_verb_takes_the_polarity_of_its_complement(nlp, lex):
    # "smells fresh": the verb carries no opinion of its own, so the predicate is not mixed
    assert _negated(nlp, lex, "The cabin smells fresh.") == "The cabin doesn't smell fresh."
    doc = nlp("The cabin smells fresh.")
    assert [apply_edits(doc, c.edits)[0] for c in intensifier.candidates(doc, _ctx(lex))] == [
        "The cabin smells very fresh.", "The cabin smells fairly fresh."]
    # the same lexicon with "smell" forced negative reads the predicate as mixed
    forced = Lexicon(dict(lex.opinion), dict(lex.intensifiers), dict(lex.antonyms), phrases=dict(lex.phrases))
    forced.opinion[("smell", "VERB")] = OpinionWord("smell", "VERB", -1, "-")
    assert _negated(nlp, forced, "The cabin smells fresh.") == "mixed polarity in one predicate"


def test_a_context_marked_word_alone_keeps_its_polarity(nlp, lex):
    assert _negated(nlp, lex, "The cabin smells.") == "The cabin doesn't smell."
    # a complement without an opinion word leaves the verb its own polarity
    assert _negated(nlp, lex, "It doesn't smell like burning plastic.") == "It smells like burning plastic."


# --- multiword expressions ---------------------------------------------------------------------------


@pytest.mark.parametrize("text,span,head", [
    ("The app kept logging me out again.", "kept logging me out", "kept"),
    ("My boots broke down after a week.", "broke down", "broke"),
    ("This tent is a rip-off.", "rip-off", None),
    ("It was a total waste of money and time.", "waste of money", "waste"),
    ("The whole booking was a dog's dinner.", "dog's dinner", "dinner"),
])
def test_expressions_are_found_in_a_parse(nlp, lex, text, span, head):
    doc = nlp(text)
    found = phrase_spans(doc, lex)
    assert [doc[s.start:s.end].text for s in found] == [span]
    if head is not None:
        assert doc[found[0].head].text == head


def test_every_expression_is_split_as_the_parser_splits_it(nlp, lex):
    """An expression is found only if spaCy's tokenizer cuts it into the words it is keyed by."""
    texts = [f"It was {e.word} ." for e in lex.phrases.values()]
    unmatched = []
    for (key, e), doc in zip(lex.phrases.items(), nlp.pipe(texts)):
        if tuple(t.lower_ for t in doc)[2:-1] != key:
            unmatched.append(e.word)
    assert unmatched == []


@pytest.mark.parametrize("text", [
    "I rely on time-saving tools.",  # "on time" is not one constituent here
    "You can't find it on high priced units.",  # "priced" is a verb: no "high price" (a noun)
])
def test_words_of_an_expression_that_are_not_the_expression(nlp, lex, text):
    assert phrase_spans(nlp(text), lex) == []


@pytest.mark.parametrize("text,variant", [
    ("The tent arrived on time.", "The tent didn't arrive on time."),
    ("It was a waste of money.", "It wasn't a waste of money."),
    ("The app keeps logging me out.", "The app doesn't keep logging me out."),
    ("It was worth it.", "It wasn't worth it."),
    ("This tent is a rip-off.", "This tent isn't a rip-off."),
    ("The instructions were hard to follow.", "The instructions weren't hard to follow."),
])
def test_negation_toggles_a_clause_whose_opinion_is_an_expression(nlp, lex, text, variant):
    assert _negated(nlp, lex, text) == variant


def test_an_expression_hides_its_words(nlp, lex):
    """The words inside an expression are not opinions of their own: "without any issues" is no
    complaint, and the expression's opinion sits on its head."""
    doc = nlp("The stove worked without any issues.")
    opinions = {t.text: e.polarity for t in doc for e in [negation.opinion_of(t, lex)] if e is not None}
    assert opinions == {"worked": 1, "without": 1}


# --- the loader and the user's --lexicon file ----------------------------------------------------------


def _write(tmp_path: Path, text: str, name: str = "extra.tsv") -> Path:
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def test_user_lexicon_in_the_four_column_format(tmp_path):
    p = _write(tmp_path, "word\tpos\tpolarity\tgrade\ntrusty\tADJ\t1\tgradable\nhold steady\tVERB\t1\t-\n")
    lex = load_lexicon([p])
    assert lex.lookup("trusty", "ADJ") == OpinionWord("trusty", "ADJ", 1, "gradable", "-")
    assert lex.phrases[("hold", "steady")].polarity == 1
    assert str(p) in lex.sources


def test_user_lexicon_with_the_context_column(tmp_path):
    p = _write(tmp_path, "word\tpos\tpolarity\tgrade\tcontext\nreek\tVERB\t-1\t-\talone\n")
    assert load_lexicon([p]).lookup("reek", "VERB").context == "alone"


def test_user_lexicon_without_a_header_keeps_its_first_entry(tmp_path):
    p = _write(tmp_path, "# my words\ntrusty\tADJ\t1\tgradable\nflaky\tADJ\t-1\tgradable\n")
    lex = load_lexicon([p])
    assert lex.lookup("trusty", "ADJ") is not None and lex.lookup("flaky", "ADJ") is not None


@pytest.mark.parametrize("text,message", [
    ("term\tpos\tpolarity\tgrade\ntrusty\tADJ\t1\tgradable\n",
     "extra.tsv:1: header line (term, pos, polarity, grade) does not name the columns word, pos, polarity, grade"),
    ("trusty\tADJ\t1\n", "extra.tsv:1: expected 4 or 5 tab-separated columns"),
    ("word\tpos\tpolarity\tgrade\ntrusty\tADJ\t1\tgradable\tsometimes\n",
     "extra.tsv:2: context 'sometimes' is not one of -, alone"),
    ("trusty\tADJ\t2\tgradable\n", "extra.tsv:1: polarity '2' is not -1 or 1"),
])
def test_bad_user_lexicon_is_a_clear_error(tmp_path, text, message):
    with pytest.raises(PairflipError) as err:
        load_lexicon([_write(tmp_path, text)])
    assert message in str(err.value)


# --- through the command line (issue 12: a lexicon TSV without a header lost its first word) ----------


@pytest.fixture()
def _one_pipeline(nlp, monkeypatch):
    """The in-process CLI gets the session's pipeline."""
    import pairflip.perturb.nlp as nlp_mod

    real = nlp_mod.load_nlp
    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp if name is None else real(name))


def _build(args: list[str], capsys) -> tuple[int, str]:
    try:
        cli.main([str(a) for a in args])
        code = 0
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else 2
    return code, capsys.readouterr().err


@pytest.mark.usefixtures("_one_pipeline")
def test_build_reads_the_first_entry_of_a_lexicon_without_header(tmp_path, capsys):
    corpus = _write(tmp_path, "The lantern is trusty.\n", "reviews.txt")
    extra = _write(tmp_path, "trusty\tADJ\t1\tgradable\n")  # no header: the first line is an entry
    out = tmp_path / "suite.jsonl"
    code, err = _build(["build", corpus, "-o", out, "--families", "negation", "--lexicon", extra], capsys)
    assert code == 0, err
    assert '"variant": "The lantern isn\'t trusty."' in out.read_text(encoding="utf-8")


@pytest.mark.usefixtures("_one_pipeline")
def test_build_refuses_a_lexicon_whose_header_misnames_a_column(tmp_path, capsys):
    corpus = _write(tmp_path, "The lantern is trusty.\n", "reviews.txt")
    extra = _write(tmp_path, "word\tpart\tpolarity\tgrade\ntrusty\tADJ\t1\tgradable\n")
    out = tmp_path / "suite.jsonl"
    code, err = _build(["build", corpus, "-o", out, "--lexicon", extra], capsys)
    assert code == 2
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("pairflip: error: ") and "extra.tsv:1: header line" in lines[0], err
    assert not out.exists()
