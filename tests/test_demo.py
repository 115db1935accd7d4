"""The demo end to end, and the bag-of-words property on the demo suite."""

from __future__ import annotations

import numpy as np
import pytest

import pairflip
from pairflip.demo.models import MODEL_NAMES, load_reviews, load_sentences, trained
from pairflip.records import FAMILIES


def test_demo_data_is_big_enough():
    texts, labels = load_reviews()
    assert len(texts) >= 800
    assert set(labels) == {"negative", "neutral", "positive"}
    assert len(set(texts)) == len(texts)
    sentences = load_sentences()
    assert len(sentences) >= 300
    assert not set(sentences) & set(texts), "suite sentences must not be training reviews"


def test_demo_suite_has_every_family(demo_suite):
    fams = {p.family for p in demo_suite}
    assert fams == set(FAMILIES)
    # every family has a real number of pairs, not a token few
    for f in FAMILIES:
        assert sum(1 for p in demo_suite if p.family == f) >= 20, f


def test_demo_models_learn_something():
    texts, labels = load_reviews()
    for name in MODEL_NAMES:
        acc = float(np.mean(trained(name).predict(texts) == np.array(labels)))
        assert acc > 0.8, (name, acc)  # training accuracy; a sanity floor, not a quality claim


def test_unigram_bag_of_words_cannot_flip_under_reorder(demo_suite):
    # A unigram count model sees only the multiset of tokens, and every reorder variant keeps the
    # word multiset, so its predictions cannot change: the reorder flip rate is exactly 0.
    # (A mathematical fact of unigram bag-of-words models; common practice, no source needed.)
    reorder = [p for p in demo_suite if p.family == "reorder"]
    assert len(reorder) >= 20
    res = pairflip.score(reorder, trained("unigram"))
    summary = pairflip.summarize(res)
    g = summary.families["reorder"]
    assert g.pairs == sum(1 for p in reorder if p.should != "none")  # shuffle has its own row
    assert g.flips == 0 and g.flip_rate == 0.0
    shuffle = g.rules["reorder/shuffle"]
    assert shuffle.pairs > 0 and shuffle.flips == 0  # even a random word order cannot move it
    # ...and not just the label: the whole probability vector is unchanged.
    model = trained("unigram")
    src = model.predict_proba([p.source for p in reorder])
    var = model.predict_proba([p.variant for p in reorder])
    assert np.allclose(src, var)


def test_bigram_model_is_not_forced_to_be_order_blind(demo_suite):
    # Word pairs change when words move, so the bigram model's scores do move under reordering.
    reorder = [p for p in demo_suite if p.family == "reorder" and p.should == "hold"]
    model = trained("bigram")
    src = model.predict_proba([p.source for p in reorder])
    var = model.predict_proba([p.variant for p in reorder])
    assert not np.allclose(src, var)


def test_demo_command_prints_all_families_for_each_model(tmp_path, capsys):
    from pairflip.cli import main

    with pytest.raises(SystemExit) as exc:
        main(["demo", "--out-dir", str(tmp_path)])
    assert exc.value.code == 0
    cap = capsys.readouterr()
    out = cap.out
    for name in MODEL_NAMES:
        assert name in out
    for fam in FAMILIES:
        assert fam in out
    for name in MODEL_NAMES:
        assert (tmp_path / f"results-{name}.jsonl").exists()
        assert (tmp_path / f"{name}.joblib").exists()
    assert (tmp_path / "suite.jsonl").exists()
    # the demo learns a domain lexicon from its labelled reviews before it builds, as a user would
    domain = (tmp_path / "domain.tsv").read_text(encoding="utf-8")
    assert domain.startswith("# Opinion words learned by `pairflip lexicon` from demo_data/reviews.csv")
    from pairflip.files import read_suite

    suite = read_suite(tmp_path / "suite.jsonl")
    learned = [p for p in suite if p.meta.get("learned")]
    assert f"{len(learned)} from learned words only" in " ".join(cap.err.split())
    for p in learned:  # each names learned words that stand in its source and in domain.tsv
        for w in p.meta["learned"]:
            assert f"\n{w}\t" in domain and w in p.source.lower()


def test_demo_without_out_dir_names_no_path_in_a_deleted_folder(capsys):
    # The temporary folder is gone when the demo ends: printing a path into it misleads.
    import tempfile

    from pairflip.cli import main

    with pytest.raises(SystemExit) as exc:
        main(["demo", "--examples", "0"])
    assert exc.value.code in (0, None)
    out, err = capsys.readouterr()
    assert tempfile.gettempdir() not in out + err
    assert "--out-dir DIR keeps it" in " ".join(out.split())
    assert "gave a pair with an expectation" in err
    assert "learned words only" in err and "opinion words from demo_data/reviews.csv" in err
