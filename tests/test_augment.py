"""`pairflip augment`: counterfactual training rows, the leakage guard, and the demo loop."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import pytest

from helpers import external_data
from helpers.cli import run_cli
from pairflip.labels import LabelMap
from pairflip.perturb.augment import (
    DIAGNOSTIC, NEUTRAL_SOURCE, NO_FIXED_LABEL, SourceSet, augment_rows, leaked_sources, mirror, new_label, step,
)
from pairflip.records import Pair

# Invented outdoor-gear reviews (the demo's scenario), one opinion each, so every family has work.
REVIEWS = [
    ("r1", "tent", "The tent is roomy.", "positive"),
    ("r2", "stove", "The stove is flimsy.", "negative"),
    ("r3", "lantern", "The lantern is very bright.", "positive"),
    ("r4", "bag", "The bag is blue.", "neutral"),
    ("r5", "boots", "The boots are comfortable and the laces are sturdy.", "positive"),
    ("r6", "filter", "The filter clogs quickly.", "negative"),
    ("r7", "chair", "The chair is sturdy.", "positive"),
    ("r8", "pack", "The pack is heavy.", "negative"),
]


def write_corpus(path: Path, rows=REVIEWS, sep: str = ",") -> Path:
    with path.open("w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh, delimiter=sep)
        w.writerow(["id", "product", "text", "label"])
        w.writerows(rows)
    return path


def read_csv(path: Path, sep: str = ",") -> list[dict[str, str]]:
    with path.open(encoding="utf-8", newline="") as fh:
        return list(csv.DictReader(fh, delimiter=sep))


# --------------------------------------------------------------------------- label mapping
# The mapping is the definition: flip gives the label as far from the other end of the
# scale (negative<->positive, 1<->5, 2<->4), neutral has no opposite; hold/strengthen/weaken keep
# the polarity. That a 3 of 5 stars is neutral is common practice (the star scale's middle).

BINARY = LabelMap.from_labels("0,1")
NEGPOS = LabelMap.from_labels("negative,positive")
THREE = LabelMap.from_labels("negative,neutral,positive")
STARS = LabelMap.from_labels("1,2,3,4,5")


@pytest.mark.parametrize("scale,label,expected", [
    (BINARY, "0", "1"), (BINARY, "1", "0"),
    (NEGPOS, "negative", "positive"), (NEGPOS, "Positive", "negative"),
    (THREE, "negative", "positive"), (THREE, "positive", "negative"), (THREE, "neutral", None),
    (STARS, "1", "5"), (STARS, "2", "4"), (STARS, "3", None), (STARS, "4", "2"), (STARS, "5", "1"),
])
def test_flip_gives_the_mirror_label(scale, label, expected):
    got, reason = new_label("flip", label, scale)
    assert got == expected
    assert reason == ("" if expected is not None else NEUTRAL_SOURCE)
    assert mirror(label, scale) == expected


@pytest.mark.parametrize("scale", [BINARY, THREE, STARS])
def test_hold_strengthen_weaken_keep_the_label(scale):
    for label in scale.order:
        for should in ("hold", "strengthen", "weaken"):
            assert new_label(should, label, scale) == (label, "")


@pytest.mark.parametrize("should,label,expected", [
    ("strengthen", "4", "5"), ("strengthen", "2", "1"), ("strengthen", "5", "5"), ("strengthen", "1", "1"),
    ("weaken", "5", "4"), ("weaken", "1", "2"),
    ("weaken", "4", "4"), ("weaken", "2", "2"),  # one step more would be neutral: the polarity stays
    ("strengthen", "3", "3"), ("weaken", "3", "3"), ("hold", "4", "4"),
])
def test_ordinal_steps_on_five_stars(should, label, expected):
    assert new_label(should, label, STARS, ordinal_steps=True) == (expected, "")


def test_ordinal_steps_change_nothing_on_three_labels_or_two():
    for scale in (THREE, BINARY):
        for label in scale.order:
            assert step(label, scale, outward=True) == label
            assert step(label, scale, outward=False) == label


def test_rise_fall_and_diagnostic_rules_fix_no_label():
    for should in ("rise", "fall"):
        assert new_label(should, "positive", THREE) == (None, NO_FIXED_LABEL)
    assert new_label("none", "positive", THREE) == (None, DIAGNOSTIC)


def _pair(source, variant, rule, should, label):
    return Pair(source=source, variant=variant, family=rule.split("/")[0], rule=rule, should=should, label=label)


def test_rows_from_pairs_count_what_was_skipped_and_why():
    from pairflip.perturb.augment import AugmentStats

    pairs = [
        _pair("The tent is roomy.", "The tent isn't roomy.", "negation/copula", "flip", "5"),
        _pair("The bag is blue.", "The bag isn't blue.", "negation/copula", "flip", "3"),
        _pair("The tent is roomy but damp.", "The tent is damp but roomy.", "contrast/swap", "rise", "4"),
        _pair("The tent is roomy.", "roomy tent The is.", "reorder/shuffle", "none", "5"),
        _pair("The stove is good.", "The stove is very good.", "intensifier/amplify", "strengthen", "4"),
    ]
    stats = AugmentStats()
    rows = list(augment_rows(pairs, STARS, ordinal_steps=True, stats=stats))
    assert [(r.text, r.label, r.rule) for r in rows] == [
        ("The tent isn't roomy.", "1", "negation/copula"),
        ("The stove is very good.", "5", "intensifier/amplify"),
    ]
    assert stats.written == {"negation/copula": 1, "intensifier/amplify": 1}
    assert stats.skipped["negation/copula"] == {NEUTRAL_SOURCE: 1}
    assert stats.skipped["contrast/swap"] == {NO_FIXED_LABEL: 1}
    assert stats.skipped["reorder/shuffle"] == {DIAGNOSTIC: 1}
    assert rows[0].source_id == pairs[0].source_id and rows[0].pair_id == pairs[0].id


# --------------------------------------------------------------------------- the command


def augment(tmp_path: Path, *args: str, corpus: Path | None = None, out: str = "extra.csv"):
    corpus = corpus or write_corpus(tmp_path / "reviews.csv")
    return run_cli(["augment", str(corpus), "--label-column", "label", "-o", str(tmp_path / out), *args])


def test_csv_output_has_the_inputs_columns_plus_two_and_reads_back(tmp_path):
    import pandas as pd

    res = augment(tmp_path)
    assert res.code == 0, res.stderr
    out = tmp_path / "extra.csv"
    frame = pd.read_csv(out)
    assert list(frame.columns) == ["id", "product", "text", "label", "source_id", "rule"]
    rows = read_csv(out)
    assert rows and len(rows) == len(frame)
    by_text = {r[2]: r for r in REVIEWS}
    from pairflip.records import stable_id

    for row in rows:
        src = next(r for r in REVIEWS if stable_id("source", r[2]) == row["source_id"])
        assert row["id"] == src[0] and row["product"] == src[1]  # the other columns are the source's
        assert row["text"] not in by_text  # a new text, never a copy of a corpus text
        if row["rule"].startswith("negation/"):
            assert row["label"] == {"positive": "negative", "negative": "positive"}[src[3]]
        else:
            assert row["label"] == src[3]
        assert not row["rule"].startswith(("contrast/", "reorder/shuffle"))
    rules = {r["rule"] for r in rows}
    assert "negation/copula" in rules
    # the summary names every rule with its count, and says why contrast gave nothing
    assert "negation/copula" in res.stderr and f"wrote {len(rows)} rows" in res.stderr
    # the neutral review gave no flipped row
    assert not any(r["source_id"] == stable_id("source", "The bag is blue.") and r["rule"].startswith("negation/")
                   for r in rows)


def test_written_file_is_a_corpus_for_build(tmp_path):
    assert augment(tmp_path).code == 0
    res = run_cli(["build", str(tmp_path / "extra.csv"), "--label-column", "label", "-o", str(tmp_path / "s.jsonl")])
    assert res.code == 0, res.stderr
    from pairflip.files import read_suite

    suite = read_suite(tmp_path / "s.jsonl")
    labels = {r["text"]: r["label"] for r in read_csv(tmp_path / "extra.csv")}
    assert suite.pairs and all(p.label == labels[p.source] for p in suite.pairs if p.source in labels)


def test_tsv_and_jsonl_keep_their_format_and_number_labels(tmp_path):
    tsv = write_corpus(tmp_path / "reviews.tsv", sep="\t")
    assert augment(tmp_path, corpus=tsv, out="extra.tsv").code == 0
    rows = read_csv(tmp_path / "extra.tsv", sep="\t")
    assert rows and set(rows[0]) == {"id", "product", "text", "label", "source_id", "rule"}

    stars = {"positive": 5, "negative": 2, "neutral": 3}
    jl = tmp_path / "reviews.jsonl"
    jl.write_text("".join(json.dumps({"id": i, "body": t, "stars": stars[lab], "shop": p}) + "\n"
                          for i, p, t, lab in REVIEWS), encoding="utf-8")
    res = run_cli(["augment", str(jl), "--text-field", "body", "--label-field", "stars", "-o", str(tmp_path / "x.jsonl")])
    assert res.code == 0, res.stderr
    objs = [json.loads(line) for line in (tmp_path / "x.jsonl").read_text(encoding="utf-8").splitlines()]
    assert objs
    for o in objs:
        assert set(o) == {"id", "body", "stars", "shop", "source_id", "rule"}
        assert isinstance(o["stars"], int)  # a number stays a number
        src = next(r for r in REVIEWS if r[0] == o["id"])
        want = {5: 1, 2: 4}[stars[src[3]]] if o["rule"].startswith("negation/") else stars[src[3]]
        assert o["stars"] == want, o


def test_same_seed_same_bytes(tmp_path):
    corpus = write_corpus(tmp_path / "reviews.csv")
    assert augment(tmp_path, "--seed", "3", corpus=corpus, out="a.csv").code == 0
    assert augment(tmp_path, "--seed", "3", corpus=corpus, out="b.csv").code == 0
    assert (tmp_path / "a.csv").read_bytes() == (tmp_path / "b.csv").read_bytes()


def test_families_choose_the_rules(tmp_path):
    assert augment(tmp_path, "--families", "negation").code == 0
    rules = {r["rule"] for r in read_csv(tmp_path / "extra.csv")}
    assert rules and all(r.startswith("negation/") for r in rules)


def test_vetted_rejections_are_never_written(tmp_path):
    assert augment(tmp_path, out="all.csv").code == 0
    rows = read_csv(tmp_path / "all.csv")
    from pairflip.records import stable_id

    negated = [r for r in rows if r["rule"].startswith("negation/")]
    assert len(negated) >= 2
    reject, change = negated[0], negated[1]
    src = {stable_id("source", r[2]): r[2] for r in REVIEWS}
    pid = lambda r: stable_id("pair", r["rule"], src[r["source_id"]], r["text"])  # noqa: E731
    dec = tmp_path / "vetted.jsonl"
    dec.write_text("\n".join(json.dumps(x) for x in [
        {"kind": "pairflip-decisions", "version": 1, "created": "2026-01-01T00:00:00+00:00"},
        {"id": pid(reject), "decision": "reject", "reason": "ungrammatical", "time": ""},
        {"id": pid(change), "decision": "change", "should": "hold", "was": "flip", "time": ""},
    ]) + "\n", encoding="utf-8")
    res = augment(tmp_path, "--vetted", str(dec), out="vetted.csv")
    assert res.code == 0, res.stderr
    kept = read_csv(tmp_path / "vetted.csv")
    texts = {r["text"]: r for r in kept}
    assert reject["text"] not in texts
    assert texts[change["text"]]["label"] != change["label"]  # now a hold: the source's own label
    assert "1 pair rejected when vetted gave no row" in res.stderr
    assert len(kept) == len(rows) - 1


# --------------------------------------------------------------------------- leakage guard


def test_exclude_leaves_out_every_source_of_the_suite(tmp_path):
    test_part = write_corpus(tmp_path / "test.csv", rows=REVIEWS[:4])
    assert run_cli(["build", str(test_part), "-o", str(tmp_path / "suite.jsonl")]).code == 0
    res = augment(tmp_path, "--exclude", str(tmp_path / "suite.jsonl"))
    assert res.code == 0, res.stderr
    from pairflip.files import read_suite
    from pairflip.records import stable_id

    suite = read_suite(tmp_path / "suite.jsonl")
    held = {p.source for p in suite.pairs}
    assert held
    rows = read_csv(tmp_path / "extra.csv")
    assert rows
    written_sources = {r["source_id"] for r in rows}
    assert not written_sources & {stable_id("source", t) for t in held}
    assert not written_sources & {p.source_id for p in suite.pairs}
    n_held = sum(1 for r in REVIEWS if r[2] in held)
    assert f"left out {n_held} texts whose source is in" in res.stderr


def test_trained_on_warns_with_a_count(tmp_path):
    assert augment(tmp_path).code == 0
    corpus = tmp_path / "reviews.csv"
    assert run_cli(["build", str(corpus), "-o", str(tmp_path / "suite.jsonl")]).code == 0
    model = "pairflip.demo.models:bigram"
    res = run_cli(["score", str(tmp_path / "suite.jsonl"), "--model", model, "-o", str(tmp_path / "r.jsonl"),
                   "--trained-on", str(tmp_path / "extra.csv")])
    assert res.code == 0, res.stderr
    from pairflip.files import read_results

    results = read_results(tmp_path / "r.jsonl")
    rows = read_csv(tmp_path / "extra.csv")
    sources = {v.source_id for v in results.verdicts}
    leaked = sources & {r["source_id"] for r in rows}
    assert leaked
    warning = [ln for ln in res.stderr.splitlines() if "warning" in ln]
    assert len(warning) == 1
    assert f"{len(leaked)} of {len(sources)} sources" in warning[0]
    # show says the same; by text, the original training corpus matches every source
    shown = run_cli(["show", str(tmp_path / "r.jsonl"), "--trained-on", str(corpus)])
    assert shown.code == 0
    assert f"{len(sources)} of {len(sources)} sources" in shown.stderr
    # training data that shares nothing: no warning
    other = write_corpus(tmp_path / "other.csv", rows=[("x", "cup", "The cup is dented.", "negative")])
    quiet = run_cli(["show", str(tmp_path / "r.jsonl"), "--trained-on", str(other)])
    assert quiet.code == 0 and "warning" not in quiet.stderr


def test_source_sets_match_sentence_sources_by_their_text_id():
    whole = "The tent is roomy. The stove is flimsy."
    from pairflip.records import stable_id

    train = SourceSet()
    train.add_id(stable_id("source", whole))
    sentence = _pair("The stove is flimsy.", "The stove isn't flimsy.", "negation/copula", "flip", "negative")
    sentence.source_id = f"{stable_id('source', whole)}:1"
    unrelated = _pair("The cup is dented.", "The cup isn't dented.", "negation/copula", "flip", "negative")
    assert leaked_sources([sentence, unrelated], train) == (1, 2)


# --------------------------------------------------------------------------- bad input


def test_bad_input_exits_2_with_a_message(tmp_path):
    corpus = write_corpus(tmp_path / "reviews.csv")
    out = tmp_path / "extra.csv"
    res = run_cli(["augment", str(corpus), "-o", str(out)])
    assert res.code == 2 and "--label-column" in res.stderr and not out.exists()

    res = run_cli(["augment", str(corpus), "--label-column", "stars", "-o", str(out)])
    assert res.code == 2 and "no column 'stars'" in res.stderr

    odd = write_corpus(tmp_path / "odd.csv", rows=[("1", "tent", "The tent is roomy.", "great"),
                                                    ("2", "stove", "The stove is flimsy.", "awful")])
    res = run_cli(["augment", str(odd), "--label-column", "label", "-o", str(out)])
    assert res.code == 2 and "'awful'" in res.stderr and "--labels" in res.stderr

    res = run_cli(["augment", str(corpus), "--label-column", "label", "--labels", "negative,positive", "-o", str(out)])
    assert res.code == 2 and "reviews.csv:5" in res.stderr and "'neutral'" in res.stderr

    txt = tmp_path / "reviews.txt"
    txt.write_text("The tent is roomy.\n", encoding="utf-8")
    res = run_cli(["augment", str(txt), "-o", str(tmp_path / "x.txt")])
    assert res.code == 2 and "holds no labels" in res.stderr

    res = run_cli(["augment", str(corpus), "--label-column", "label", "-o", str(tmp_path / "x.jsonl")])
    assert res.code == 2 and "own format (.csv" in res.stderr

    res = run_cli(["augment", str(corpus), "--label-column", "label", "-o", str(corpus), "--force"])
    assert res.code == 2 and "also an input" in res.stderr
    assert not out.exists()
    for line in res.stderr.strip().splitlines():
        assert line.startswith("pairflip: error:")


def test_existing_output_needs_force_and_stays_untouched(tmp_path):
    out = tmp_path / "extra.csv"
    out.write_text("keep me\n", encoding="utf-8")
    res = augment(tmp_path)
    assert res.code == 2 and "--force" in res.stderr
    assert out.read_text(encoding="utf-8") == "keep me\n"
    assert augment(tmp_path, "--force").code == 0
    assert out.read_text(encoding="utf-8").startswith("id,product,text,label,source_id,rule")


def test_a_column_named_like_an_added_one_is_refused(tmp_path):
    p = tmp_path / "c.csv"
    p.write_text("text,label,rule\nThe tent is roomy.,positive,x\n", encoding="utf-8")
    res = run_cli(["augment", str(p), "--label-column", "label", "-o", str(tmp_path / "o.csv")])
    assert res.code == 2 and "already has a column 'rule'" in res.stderr


# --------------------------------------------------------------------------- against published work


@pytest.mark.external
@pytest.mark.skipif(not external_data.enabled(), reason="set PAIRFLIP_EXTERNAL_DATA=1 to fetch the vaderSentiment sdist")
def test_flipped_labels_agree_with_vader_on_human_rated_reviews(nlp):
    # Source texts and their labels: the human-rated product-review snippets in the vaderSentiment
    # 3.3.2 sdist (Hutto & Gilbert 2014, ICWSM), mean rating >= 1 positive, <= -1 negative.
    # Reference: VADER (vaderSentiment 3.3.2 on PyPI), whose rules reverse a word's valence after a
    # negator. Where VADER agrees with the humans on the source and is not neutral on the variant,
    # it must agree with the label augment wrote. Measured: 227 of 262 (86.6 %); the rest are
    # mostly VADER's own limits (a negator more than three words before the opinion word).
    from vaderSentiment.vaderSentiment import SentimentIntensityAnalyzer

    from pairflip.perturb import build_suite

    snippets = [(t, "positive" if m >= 1 else "negative") for m, t in external_data.load("product") if abs(m) >= 1]
    suite = build_suite(snippets, families="negation", unit="text", nlp=nlp)
    rows = list(augment_rows(suite.pairs, NEGPOS))
    an = SentimentIntensityAnalyzer()

    def sign(text: str) -> str:
        c = an.polarity_scores(text)["compound"]  # +-0.05: the thresholds VADER's README gives
        return "positive" if c >= 0.05 else "negative" if c <= -0.05 else "neutral"

    gold = {p.id: p.label for p in suite.pairs}
    judged = [(sign(r.text), r.label) for r in rows if sign(r.source) == gold[r.pair_id] and sign(r.text) != "neutral"]
    assert len(judged) >= 200
    agree = sum(v == lab for v, lab in judged) / len(judged)
    assert agree >= 0.80, agree


# --------------------------------------------------------------------------- the demo loop


@pytest.mark.slow
def test_demo_loop_fixes_the_bigram_models_negation_on_held_out_sources():
    import io

    from rich.console import Console

    from pairflip.demo.loop import run_loop

    quiet = Console(file=io.StringIO(), width=120)
    out = run_loop(seed=0, console=quiet, log=quiet)
    assert out.leaked == 0 and out.heldout_sources > 0
    assert out.augmented_rows > 100
    bigram = out.models["bigram"]
    before, after = bigram.violation["negation"]
    assert before - after >= 0.20, (before, after)  # the target: at least 20 points
    assert bigram.accuracy_before - bigram.accuracy_after <= 0.01, (bigram.accuracy_before, bigram.accuracy_after)
    # The unigram model cannot learn to negate a complaint: under the copula and modal rules the
    # pair differs only by the negator's tokens, whose weights move every sentence the same way.
    (vb, nb), (va, na) = out.models["unigram"].by_source["negative"]
    assert na >= 10 and va / na >= 0.8, (va, na)
    # while the bigram model learns it in part ("not flimsy" is a feature of its own)
    (bvb, bnb), (bva, bna) = bigram.by_source["negative"]
    assert bva / bna < va / na


def test_demo_loop_command_prints_before_and_after(tmp_path):
    res = run_cli(["demo", "--loop", "--out-dir", str(tmp_path), "--examples", "0"])
    assert res.code == 0, res.stderr
    for name in ("unigram", "bigram", "deep-bow"):
        assert name in res.stdout and f"{name}+aug" in res.stdout
        assert (tmp_path / f"loop-results-{name}+aug.jsonl").exists()
    assert "accuracy" in res.stdout and "0 of them in the training data" in res.stderr
    # the files it keeps are what the CLI would have made: the rows read as a corpus
    rows = read_csv(tmp_path / "loop-augmented.csv")
    assert rows and set(rows[0]) == {"text", "label", "source_id", "rule"}
    again = run_cli(["demo", "--loop", "--out-dir", str(tmp_path)])
    assert again.code == 2 and "--force" in again.stderr


def test_trained_on_file_is_an_input_never_an_output(tmp_path):
    assert augment(tmp_path).code == 0
    extra = tmp_path / "extra.csv"
    before = extra.read_bytes()
    assert run_cli(["build", str(tmp_path / "reviews.csv"), "-o", str(tmp_path / "suite.jsonl")]).code == 0
    res = run_cli(["score", str(tmp_path / "suite.jsonl"), "--model", "pairflip.demo.models:bigram",
                   "-o", str(extra), "--force", "--trained-on", str(extra)])
    assert res.code == 2 and "also an input" in res.stderr
    bad = run_cli(["score", str(tmp_path / "suite.jsonl"), "--model", "pairflip.demo.models:bigram",
                   "-o", str(tmp_path / "r.jsonl"), "--trained-on", str(tmp_path / "missing.csv")])
    assert bad.code == 2 and "--trained-on" in bad.stderr and not (tmp_path / "r.jsonl").exists()
    assert extra.read_bytes() == before
