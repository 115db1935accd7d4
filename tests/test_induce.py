"""`pairflip lexicon`: opinion words learned from labelled text (perturb/induce.py).

The estimator is checked against a worked example computed by hand from the equations of Monroe,
Colaresi & Quinn 2008 ("Fightin' Words", Political Analysis 16(4)); the command end to end on an
invented outdoor-gear shop's reviews; and, with PAIRFLIP_EXTERNAL_DATA=1, the learned words
against AFINN-111 (Nielsen 2011, the lexicon file shipped in the `afinn` package) on the
human-rated product-review snippets of the vaderSentiment 3.3.2 sdist.
"""

from __future__ import annotations

import csv
import re
from collections import Counter
from pathlib import Path

import pytest

from helpers import external_data
from helpers.cli import run_cli
from pairflip.perturb.induce import (
    TermCounts,
    count_doc,
    induce_lexicon,
    open_labelled_corpus,
    weighted_log_odds,
)
from pairflip.records import PairflipError


@pytest.fixture(autouse=True)
def _one_pipeline(nlp, monkeypatch):
    """The in-process CLI gets the session's pipeline (load_nlp() and load_nlp(None) are cached apart)."""
    import pairflip.perturb.nlp as nlp_mod

    real = nlp_mod.load_nlp
    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp if name is None else real(name))


# --- the estimator, by hand ---------------------------------------------------------------------
#
# The paper's notation: y_w^(i) the count of word w in group i, n^(i) = sum_w y_w^(i), and the
# informative Dirichlet prior alpha_w = alpha_0 * pi_w with pi_w the word's share of a background
# corpus (here: both groups together). Equation numbers as we recall them from the paper (from
# memory, not checked against the printed page):
#   (16) delta_w = log[(y_w^i + a_w) / (n^i + a_0 - y_w^i - a_w)] - log[(y_w^j + a_w) / (n^j + a_0 - y_w^j - a_w)]
#   (20) var(delta_w) ~ 1 / (y_w^i + a_w) + 1 / (y_w^j + a_w)
#   (22) z_w = delta_w / sqrt(var(delta_w))
#
# Two corpora of three words each:  i (positive) = "good good tent",  j (negative) = "bad tent tent".
#   n^i = 3, n^j = 3; background = both: good 2, bad 1, tent 3 of 6.
POS = {"good": 2, "tent": 1}
NEG = {"bad": 1, "tent": 2}
BACKGROUND = {"good": 2, "bad": 1, "tent": 3}

# Case A: alpha_0 = 6, so a_w = 6 * c_w / 6 = c_w:  a_good = 2, a_bad = 1, a_tent = 3.
#   good: (16) log[(2+2)/(3+6-2-2)] - log[(0+2)/(3+6-0-2)] = log(4/5) - log(2/7) = ln(2.8) = 1.0296194171811581
#         (20) 1/4 + 1/2 = 0.75;  (22) 1.0296194171811581 / 0.8660254037844386 = 1.1889016...
#   bad:  (16) log[(0+1)/(3+6-0-1)] - log[(1+1)/(3+6-1-1)] = log(1/8) - log(2/7) = ln(7/16) = -0.8266785731844679
#         (20) 1/1 + 1/2 = 1.5;  (22) -0.8266785731844679 / 1.224744871391589 = -0.6749...
#   tent: (16) log[(1+3)/(3+6-1-3)] - log[(2+3)/(3+6-2-3)] = log(4/5) - log(5/4) = 2 ln(0.8) = -0.4462871026284195
#         (20) 1/4 + 1/5 = 0.45;  (22) -0.4462871026284195 / 0.6708203932499369 = -0.6652...
# (The logarithms and square roots are a calculator's, to 16 digits; the z values are their ratios.)
CASE_A = {
    "good": (2.0, 1.0296194171811581, 0.75, 1.0296194171811581 / 0.8660254037844386),
    "bad": (1.0, -0.8266785731844679, 1.5, -0.8266785731844679 / 1.224744871391589),
    "tent": (3.0, -0.4462871026284195, 0.45, -0.4462871026284195 / 0.6708203932499369),
}
# Case B: alpha_0 = 3 (half the corpus), so a_w = c_w / 2:  a_good = 1, a_bad = 0.5, a_tent = 1.5.
#   good: (16) log[(2+1)/(3+3-2-1)] - log[(0+1)/(3+3-0-1)] = log(3/3) - log(1/5) = ln 5 = 1.6094379124341003
#         (20) 1/3 + 1/1 = 4/3;  (22) 1.6094379124341003 / 1.1547005383792515
#   bad:  (16) log[0.5/(3+3-0-0.5)] - log[1.5/(3+3-1-0.5)] = log(1/11) - log(1/3) = ln(3/11) = -1.2992829841302609
#         (20) 1/0.5 + 1/1.5 = 8/3;  (22) -1.2992829841302609 / 1.632993161855452
#   tent: (16) log[2.5/(3+3-1-1.5)] - log[3.5/(3+3-2-1.5)] = log(5/7) - log(7/5) = 2 ln(5/7) = -0.6729444732424258
#         (20) 1/2.5 + 1/3.5 = 0.4 + 0.2857142857142857 = 0.6857142857142857
#         (22) -0.6729444732424258 / 0.8280786712108251
CASE_B = {
    "good": (1.0, 1.6094379124341003, 4 / 3, 1.6094379124341003 / 1.1547005383792515),
    "bad": (0.5, -1.2992829841302609, 8 / 3, -1.2992829841302609 / 1.632993161855452),
    "tent": (1.5, -0.6729444732424258, 0.6857142857142857, -0.6729444732424258 / 0.8280786712108251),
}


@pytest.mark.parametrize("alpha0, expected", [(6.0, CASE_A), (3.0, CASE_B)], ids=["alpha0=6", "alpha0=3"])
def test_weighted_log_odds_matches_the_hand_computation(alpha0, expected):
    got = weighted_log_odds(POS, NEG, BACKGROUND, alpha0)
    assert set(got) == set(expected)
    for term, (prior, delta, var, z) in expected.items():
        s = got[term]
        assert (s.count_pos, s.count_neg) == (POS.get(term, 0), NEG.get(term, 0))
        assert s.prior == pytest.approx(prior, abs=1e-9)
        assert s.delta == pytest.approx(delta, abs=1e-9), term
        assert s.variance == pytest.approx(var, abs=1e-9), term
        assert s.z == pytest.approx(z, abs=1e-9), term


def test_swapping_the_groups_negates_every_z():
    a = weighted_log_odds(POS, NEG, BACKGROUND, 4.0)
    b = weighted_log_odds(NEG, POS, BACKGROUND, 4.0)
    for term in a:
        assert b[term].z == pytest.approx(-a[term].z, abs=1e-12)
        assert b[term].variance == pytest.approx(a[term].variance, abs=1e-12)


def test_a_term_missing_from_the_background_is_an_error():
    with pytest.raises(PairflipError, match="'good'.*background"):
        weighted_log_odds(POS, NEG, {"bad": 1, "tent": 3}, 3.0)
    with pytest.raises(PairflipError, match="alpha0"):
        weighted_log_odds(POS, NEG, BACKGROUND, 0.0)


# --- counting on a parse ------------------------------------------------------------------------


def test_terms_are_lemmas_of_verbs_and_nouns_and_phrases_are_linked_words(nlp):
    words, phrases = TermCounts(), TermCounts()
    count_doc(nlp("The zippers broke down and the very trailworthy straps held."), -1, words, phrases)
    assert words.neg["zipper"] == 1 and words.neg["break"] == 1  # lemmas of nouns and verbs
    assert words.neg["trailworthy"] == 1 and "trailworthy" in words.graded  # "very" modifies it
    assert "break down" in phrases.neg and "break down" in phrases.particle
    assert phrases.tags["break down"]["VERB"] == 1  # a phrase's tag is its head's
    assert "down and" not in phrases.neg  # neighbours with no dependency between them are no phrase
    assert not words.pos and sum(words.every.values()) == sum(words.neg.values())


def test_really_and_so_do_not_make_a_word_gradable(nlp):
    # "really" and "so" also go with extreme words ("really perfect"), so they attest nothing
    # about gradability (common practice in English grammar, see DEGREE_WORDS in perturb/induce.py).
    words, phrases = TermCounts(), TermCounts()
    count_doc(nlp("The stove is really leakprone and so flimsy."), -1, words, phrases)
    assert words.neg["leakprone"] == 1 and "leakprone" not in words.graded and "flimsy" not in words.graded


# --- the command end to end, on an invented outdoor-gear shop's reviews -------------------------

# "trailworthy" and "leakprone" are the shop's customers' own words (invented): no built-in
# lexicon holds them, so a build can only use them through the learned lexicon.
_GEAR = ["tents", "boots", "packs", "stoves", "poles", "jackets", "gloves", "lanterns"]
_POSITIVE = [
    "The {g} are trailworthy and comfortable.",
    "Our new {g} are very trailworthy on long hikes.",
    "Wow, great {g}, trailworthy from the first day.",
    "Wow, these {g} are comfortable and trailworthy.",
]
_NEGATIVE = [
    "The {g} are leakprone.",
    "My {g} were really leakprone after one storm.",
    "The {g} won't close properly and feel leakprone.",
]
_NEUTRAL = ["The {g} came in a cardboard box."]


def _write_shop(path: Path) -> Path:
    """About eighty reviews: 5 and 4 stars positive, 1 and 2 negative, 3 neutral."""
    rows = []
    for k, g in enumerate(_GEAR):
        for t in _POSITIVE:
            rows.append((t.format(g=g), "5" if k % 2 else "4"))
        for t in _NEGATIVE:
            rows.append((t.format(g=g), "1" if k % 2 else "2"))
        for t in _NEUTRAL:
            rows.append((t.format(g=g), "3"))
    rows.append(("Bought them for a canyon trip and they are trailworthy.", "5"))  # "canyon": seen once
    with path.open("w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["review", "stars"])
        w.writerows(rows)
    return path


def _rows(tsv: Path) -> dict[str, tuple[str, str, str]]:
    out = {}
    header = None
    for line in tsv.read_text(encoding="utf-8").splitlines():
        body = line.split("#", 1)[0].rstrip()
        if not body:
            continue
        cols = body.split("\t")
        if header is None:
            header = cols
            continue
        out[cols[0]] = tuple(cols[1:])
    assert header == ["word", "pos", "polarity", "grade"]
    return out


@pytest.fixture(scope="module")
def shop(tmp_path_factory):
    return _write_shop(tmp_path_factory.mktemp("shop") / "reviews.csv")


def test_lexicon_command_learns_the_shop_words_and_says_what_it_left_out(shop, tmp_path):
    out = tmp_path / "domain.tsv"
    r = run_cli(["lexicon", str(shop), "--text-column", "review", "--label-column", "stars", "-o", str(out)])
    assert r.code == 0, r.stderr + r.stdout
    rows = _rows(out)
    assert rows["trailworthy"] == ("ADJ", "1", "gradable")  # "very trailworthy" is in the corpus
    assert rows["leakprone"] == ("ADJ", "-1", "-")  # only "really leakprone": no grade
    assert "comfortable" not in rows  # kept, but the built-in lexicon has it with this polarity
    assert "# not written: 1 kept words the built-in lexicon already has with the same polarity (comfortable)" in (
        out.read_text(encoding="utf-8"))
    for gear in ("tent", "boot", "glove"):  # in both polarities with no separation
        assert gear not in rows
    assert not {"the", "are", "feel", "very", "canyon", "wo"} & set(rows)
    text = out.read_text(encoding="utf-8")
    assert "Monroe, Colaresi & Quinn 2008" in text and "# texts: 33 positive, 24 negative, 8 neutral" in text
    # the report: top words per polarity, and each reason for leaving terms out, with counts
    assert "trailworthy" in r.stdout and "leakprone" in r.stdout
    for reason in ("stop word", "too rare", "both polarities", "no opinion POS"):
        assert reason in r.stdout
    assert "wow 16 (INTJ)" in r.stdout and "wo 8 (AUX)" in r.stdout  # separate, but no opinion POS
    assert any(line.split("│")[0].strip() == "comfortable" and line.rstrip().endswith("same")
               for line in r.stdout.splitlines())
    flat = " ".join(r.stdout.split())
    assert "learned 4 opinion words and phrases (2 positive, 2 negative)" in flat
    # "comfortable" is built in; how many of the others are depends on the built-in lexicon of the day
    m = re.search(r"; (\d+) new to the built-in lexicon, (\d+) already there with this polarity \(not written\); "
                  r"wrote (\d+) to", flat)
    assert m, flat
    new, same, wrote = map(int, m.groups())
    assert same >= 1 and new + same == 4 and wrote == new == len(rows)


def test_learned_lexicon_is_taken_by_build_and_changes_the_suite(shop, tmp_path):
    lex = tmp_path / "domain.tsv"
    assert run_cli(["lexicon", str(shop), "--text-column", "review", "--label-column", "stars", "-o", str(lex)]).code == 0
    texts = tmp_path / "texts.txt"
    texts.write_text("The tent is trailworthy.\nThese boots are leakprone.\nThe lantern is bright.\n", encoding="utf-8")
    from pairflip.files import read_suite

    suites = {}
    for name, extra in (("plain", []), ("learned", ["--lexicon", str(lex)])):
        out = tmp_path / f"{name}.jsonl"
        r = run_cli(["build", str(texts), "-o", str(out), "--families", "negation", *extra])
        assert r.code == 0, r.stderr
        suites[name] = read_suite(out)
    plain = {p.source for p in suites["plain"]}
    learned = {p.source: p for p in suites["learned"]}
    assert "The tent is trailworthy." not in plain and "These boots are leakprone." not in plain
    assert "The tent is trailworthy." in learned and "These boots are leakprone." in learned
    assert "trailworthy" in learned["The tent is trailworthy."].variant
    assert learned["The tent is trailworthy."].should == "flip"
    assert str(lex) in suites["learned"].header["generator"]["lexicons"]


def test_learned_words_count_only_in_sentences_without_a_built_in_opinion(tmp_path, nlp):
    import random

    from pairflip.perturb.base import Context
    from pairflip.perturb import negation
    from pairflip.perturb.lexicon import LEARNED_MARK, load_lexicon

    rows = "word\tpos\tpolarity\tgrade\nstove\tNOUN\t-1\t-\nskeevy\tADJ\t-1\tgradable\n"
    learned = tmp_path / "learned.tsv"
    learned.write_text(LEARNED_MARK + " from t.csv\n" + rows, encoding="utf-8")
    hand = tmp_path / "hand.tsv"
    hand.write_text(rows, encoding="utf-8")

    def opinion(text, word, files):
        lex = load_lexicon(files)
        doc = nlp(text)
        return negation.opinion_of(next(t for t in doc if t.text == word), lex)

    def plan(text, files):
        cand = negation.plan(nlp(text), Context(lexicon=load_lexicon(files), rng=random.Random(0)))
        return cand if isinstance(cand, str) else cand.rule

    # a topic word the corpus tied to complaints does not make a praising sentence mixed ...
    assert opinion("The stove is reliable.", "stove", [learned]) is None
    assert opinion("The stove is reliable.", "stove", [hand]).polarity == -1  # a hand lexicon's word counts fully
    assert plan("The stove is reliable.", [learned]) == "negation/copula"
    # ... and a learned word still gives a sentence with no other opinion word its opinion
    assert opinion("The burner is skeevy.", "skeevy", [learned]).polarity == -1
    assert plan("The burner is skeevy.", [learned]) == "negation/copula"
    assert plan("The burner is skeevy.", []) == "no opinion"
    # a build counts and names the pairs that come from learned words only
    import pairflip

    suite = pairflip.build_suite(["The burner is skeevy.", "The stove is reliable."], families=["negation"], nlp=nlp,
                                 lexicon_files=[str(learned)])
    assert [(p.source, p.meta.get("learned")) for p in suite] == [("The burner is skeevy.", ["skeevy"]),
                                                                  ("The stove is reliable.", None)]
    assert suite.stats.learned_pairs == 1 and suite.stats.learned_lexicon
    # a learned noun or verb is a topic or an action of the corpus, never a sentence's opinion alone
    assert opinion("The stove arrived.", "stove", [learned]) is None


def test_pos_option_leaves_out_the_parts_of_speech_not_asked_for(shop, tmp_path):
    out = tmp_path / "adj.tsv"
    r = run_cli(["lexicon", str(shop), "--text-column", "review", "--label-column", "stars", "-o", str(out),
                 "--pos", "ADJ,ADV"])
    assert r.code == 0, r.stderr
    assert set(_rows(out)) == {"trailworthy", "leakprone"}  # "storm" (NOUN) is left out
    assert "storm 8 (NOUN)" in r.stdout
    assert "(kept: ADJ, ADV)" in out.read_text(encoding="utf-8")
    msg = _err(["lexicon", str(shop), "--text-column", "review", "--label-column", "stars", "-o", str(out),
                "--force", "--pos", "ADJ,PROPN"])
    assert "--pos 'ADJ,PROPN': 'PROPN'" in msg and "ADJ,ADV,VERB,NOUN" in msg


def test_jsonl_corpus_with_a_label_field_and_given_labels(tmp_path, nlp):
    import json

    src = _write_shop(tmp_path / "reviews.csv")
    path = tmp_path / "reviews.jsonl"
    with src.open(encoding="utf-8") as fh, path.open("w", encoding="utf-8") as out:
        for row in csv.DictReader(fh):
            mood = {"1": "grim", "2": "grim", "3": "meh", "4": "glad", "5": "glad"}[row["stars"]]
            out.write(json.dumps({"body": row["review"], "mood": mood}) + "\n")
    corpus = open_labelled_corpus(path, label_column=None, label_field="mood", text_field="body",
                                  labels="grim,meh,glad")
    assert corpus.polarity_counts() == {"positive": 33, "negative": 24, "neutral": 8}
    lex = induce_lexicon(corpus.texts(), nlp=nlp)
    assert {(w.word, w.polarity) for w in lex.words} >= {("trailworthy", 1), ("leakprone", -1)}


def test_min_z_and_min_count_decide_what_is_kept(shop, nlp):
    corpus = open_labelled_corpus(shop, label_column="stars", label_field=None, text_column="review")
    texts = list(corpus.texts())
    default = induce_lexicon(texts, nlp=nlp)
    strict = induce_lexicon(texts, nlp=nlp, min_count=40)  # trailworthy: 33, leakprone: 24
    assert {w.word for w in default.words} >= {"trailworthy", "leakprone"}
    assert not {"trailworthy", "leakprone"} & {w.word for w in strict.words}
    assert "trailworthy" in {t.term for t in strict.left_out["too rare"]}
    too_rare = {t.term: t.count for t in default.left_out["too rare"]}
    assert too_rare["canyon"] == 1
    assert {"boot", "glove"} <= {t.term for t in default.left_out["both polarities"]}
    assert {"the", "are trailworthy"} <= {t.term for t in default.left_out["stop word"]}
    # negated words count for neither side: "won't close properly" says nothing against "properly"
    scored = {w.word for w in default.words} | {t.term for reason in default.left_out.values() for t in reason}
    assert "trailworthy" in scored and "close" not in scored and "properly" not in scored
    none = induce_lexicon(texts, nlp=nlp, min_z=50)
    assert not none.words
    every = [w for w in default.words if abs(w.z) < 1.96 or w.count_pos + w.count_neg < 5]
    assert every == []


# --- bad input: one line naming what and where, exit 2, no file -------------------------------


def _err(args: list[str]) -> str:
    r = run_cli(args)
    assert r.code == 2, (r.code, r.stdout, r.stderr)
    lines = [x for x in r.stderr.splitlines() if x.strip()]
    assert len(lines) == 1 and lines[0].startswith("pairflip: error: "), r.stderr
    return lines[0]


def test_bad_input_is_a_clear_one_line_error(shop, tmp_path):
    out = tmp_path / "d.tsv"
    base = ["lexicon", str(shop), "--text-column", "review", "-o", str(out)]
    assert "--label-column" in _err(base)  # no label column named
    msg = _err(base + ["--label-column", "rating"])
    assert "no column 'rating'" in msg and "'stars'" in msg
    one_sided = tmp_path / "happy.csv"
    one_sided.write_text("text,label\nGreat tent.,positive\nLovely boots.,positive\n", encoding="utf-8")
    msg = _err(["lexicon", str(one_sided), "--label-column", "label", "-o", str(out)])
    assert "2 positive and 0 negative" in msg and "both polarities" in msg
    empty = tmp_path / "empty.csv"
    empty.write_text("text,label\n", encoding="utf-8")
    assert "holds no text" in _err(["lexicon", str(empty), "--label-column", "label", "-o", str(out)])
    txt = tmp_path / "plain.txt"
    txt.write_text("Great tent.\n", encoding="utf-8")
    assert "applies to .csv/.tsv" in _err(["lexicon", str(txt), "--label-column", "label", "-o", str(out)])
    assert "holds no labels" in _err(["lexicon", str(txt), "-o", str(out)])
    msg = _err(base + ["--label-column", "stars", "--labels", "1,2,4,5"])
    assert "reviews.csv:" in msg and "label '3'" in msg and "--labels" in msg
    free = tmp_path / "free.csv"
    free.write_text("text,label\n" + "".join(f"Tent number {k}.,note {k}\n" for k in range(60)), encoding="utf-8")
    assert "more than 50 distinct values" in _err(["lexicon", str(free), "--label-column", "label", "-o", str(out)])
    assert "--min-z -1.0" in _err(base + ["--label-column", "stars", "--min-z", "-1"])
    assert "--min-count 0" in _err(base + ["--label-column", "stars", "--min-count", "0"])
    assert not out.exists() and not list(tmp_path.glob(".d.tsv.*"))


def test_output_is_never_overwritten_without_force_nor_written_onto_the_input(shop, tmp_path):
    out = tmp_path / "d.tsv"
    out.write_text("keep me\n", encoding="utf-8")
    args = ["lexicon", str(shop), "--text-column", "review", "--label-column", "stars", "-o", str(out)]
    assert "--force" in _err(args)
    assert out.read_text(encoding="utf-8") == "keep me\n"
    assert "also an input" in _err(["lexicon", str(shop), "--label-column", "stars", "-o", str(shop), "--force"])
    assert run_cli(args + ["--force"]).code == 0
    assert "trailworthy" in out.read_text(encoding="utf-8")


# --- external: the human-rated product-review snippets of vaderSentiment 3.3.2 -----------------

NEAR_ZERO = 0.5  # |mean human rating| < 0.5 on the -4..+4 scale: no clear polarity, neutral (prior only)


def _afinn_111() -> dict[str, int]:
    """AFINN-111 (Nielsen 2011, "A new ANEW", ESWC workshop), the file shipped in `afinn` 0.1:
    ``word <TAB> integer valence in [-5, 5]``."""
    afinn = pytest.importorskip("afinn")
    path = Path(afinn.__file__).parent / "data" / "AFINN-111.txt"
    out = {}
    for line in path.read_text(encoding="utf-8").splitlines():
        word, score = line.rsplit("\t", 1)
        out[word] = int(score)
    return out


@pytest.fixture(scope="module")
def snippet_halves():
    """The product-review snippets in file order, alternately to a learning half and a building half."""
    rows = external_data.load("product")
    return rows[0::2], rows[1::2]


def _learn_from(rows, tmp_path: Path, nlp, **kw):
    from pairflip.perturb.induce import write_lexicon
    from pairflip.perturb.lexicon import load_lexicon

    corpus = tmp_path / "learn.csv"
    with corpus.open("w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["text", "label"])
        for rating, text in rows:
            w.writerow([text, "positive" if rating >= NEAR_ZERO else "negative" if rating <= -NEAR_ZERO else "neutral"])
    labelled = open_labelled_corpus(corpus, label_column="label", label_field=None)
    lex = induce_lexicon(labelled.texts(), nlp=nlp, known=load_lexicon(), **kw)
    tsv = tmp_path / "induced.tsv"
    write_lexicon(lex, tsv, corpus=str(corpus))
    return lex, tsv, labelled.polarity_counts()


@pytest.fixture(scope="module")
def learned(snippet_halves, tmp_path_factory, nlp):
    return _learn_from(snippet_halves[0], tmp_path_factory.mktemp("learned"), nlp)


@pytest.mark.external
@pytest.mark.skipif(not external_data.enabled(), reason="set PAIRFLIP_EXTERNAL_DATA=1 to fetch the vaderSentiment sdist")
def test_words_learned_from_rated_snippets_agree_in_sign_with_afinn(learned):
    lex, _, counts = learned
    afinn = _afinn_111()
    top = sorted(lex.words, key=lambda w: (-abs(w.z), w.word))[:100]
    overlap = [w for w in top if w.word in afinn]
    agree = [w for w in overlap if (afinn[w.word] > 0) == (w.polarity > 0)]
    print(f"learned {len(lex.words)} words from {counts}; of the top {len(top)} by |z|, "
          f"{len(overlap)} are in AFINN-111, {len(agree)} agree in sign ({len(agree) / len(overlap):.1%})")
    print("disagreeing:", [(w.word, w.pos, w.polarity, afinn[w.word]) for w in overlap if w not in agree])
    assert len(overlap) >= 15  # enough overlap for the rate to mean something
    assert len(agree) / len(overlap) >= 0.90


def _pair_counts(texts, nlp, files=()):
    import pairflip

    families = ["negation", "double-negation", "intensifier"]
    suite = pairflip.build_suite(texts, families=families, seed=0, nlp=nlp, lexicon_files=[str(f) for f in files])
    got = Counter(p.family for p in suite)
    return {f: got[f] for f in families}


@pytest.fixture(scope="module")
def other_half_counts(snippet_halves, learned, nlp):
    _, tsv, _ = learned
    texts = [t for _, t in snippet_halves[1]]
    before = _pair_counts(texts, nlp)
    after = _pair_counts(texts, nlp, [tsv])
    print(f"pairs on the other half ({len(texts)} snippets): built-in only {before}; with --lexicon induced.tsv {after}")
    return before, after


@pytest.mark.external
@pytest.mark.skipif(not external_data.enabled(), reason="set PAIRFLIP_EXTERNAL_DATA=1 to fetch the vaderSentiment sdist")
def test_learned_lexicon_raises_negation_and_intensifier_pairs_on_the_other_half(other_half_counts):
    """Measured 2026-12-03: negation 189 -> 190, intensifier 333 -> 335, double negation 86 -> 86.
    Learned adjectives and adverbs count only in sentences with no built-in opinion word, and
    learned nouns and verbs never alone, so the topic words the corpus ties to one side (camera,
    dvd, unit) no longer make opinion sentences mixed, nor factual ones opinionated."""
    before, after = other_half_counts
    assert after["negation"] > before["negation"]
    assert after["intensifier"] > before["intensifier"]
    assert after["double-negation"] >= before["double-negation"]  # never fewer


@pytest.mark.external
@pytest.mark.skipif(not external_data.enabled(), reason="set PAIRFLIP_EXTERNAL_DATA=1 to fetch the vaderSentiment sdist")
@pytest.mark.xfail(
    strict=True,
    reason="known gap, reported as expected-to-fail (not as a pass): a learned word has no antonym, so double "
    "negation (negation + the word's opposite) cannot use it; the learned lexicon leaves its count where it was",
)
def test_learned_lexicon_raises_double_negation_pairs_on_the_other_half(other_half_counts):
    before, after = other_half_counts
    assert after["double-negation"] > before["double-negation"]
