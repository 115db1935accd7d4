"""What one source is: ``--unit sentence`` (each sentence of a text, the default) or ``--unit text``.

Sentence units are cut from the build's own spaCy parse; each pair keeps its text's id and the
sentence index, and ``--cluster source`` resamples whole texts. ``--unit text`` is the build as it
was before units existed, checked byte for byte against a suite written by that build.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

import pairflip
from pairflip import cli
from pairflip.files import read_suite
from pairflip.records import Results, Verdict, stable_id
from pairflip.report.summary import cluster_key, summarize

ROOT = Path(__file__).resolve().parents[1]
DATA = Path(__file__).with_name("data") / "units"

# Invented outdoor-gear shop reviews (demo scenario); each of the three sentences gives pairs.
THREE = "The tent is roomy and warm. The stove lights quickly on cold mornings. These boots are comfortable."
TWO = "The lantern is bright. The strap feels flimsy."


@pytest.fixture(autouse=True)
def _one_pipeline(nlp, monkeypatch):
    """The in-process CLI gets the session's pipeline (load_nlp() and load_nlp(None) are cached apart)."""
    import pairflip.perturb.nlp as nlp_mod

    real = nlp_mod.load_nlp
    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp if name is None else real(name))


def run(args: list, capsys) -> tuple[int, str, str]:
    try:
        cli.main([str(a) for a in args])
        code = 0
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else (0 if e.code is None else 2)
    out, err = capsys.readouterr()
    return code, out, err


def _applied(source: str, edits) -> str:
    """The source with the pair's character edits applied (right to left)."""
    text = source
    for e in sorted(edits, key=lambda e: e.start, reverse=True):
        text = text[: e.start] + e.text + text[e.end:]
    return text


# --------------------------------------------------------------------------- sentence units


def test_three_sentence_text_gives_one_source_per_sentence(nlp):
    suite = pairflip.build_suite([THREE], seed=0, nlp=nlp)  # the default unit
    text_id = stable_id("source", THREE)
    # spaCy's own sentence split of the text is the reference
    expected = [s.text for s in nlp(THREE).sents]
    assert len(expected) == 3
    assert suite.pairs
    by_index: dict[int, set[str]] = {}
    for p in suite.pairs:
        i = p.extra["sentence"]
        assert p.extra["text_id"] == text_id
        assert p.source_id == f"{text_id}:{i}"
        assert p.source == expected[i]
        assert _applied(p.source, p.edits) == p.variant  # offsets are the sentence's own
        by_index.setdefault(i, set()).add(p.source)
    assert sorted(by_index) == [0, 1, 2]
    assert suite.stats.sources == 1 and suite.stats.sentences == 3 and suite.stats.sources_with_pairs == 1
    assert suite.header["generator"]["unit"] == "sentence"


def test_sentence_keys_survive_the_suite_file(tmp_path, capsys):
    corpus = tmp_path / "r.txt"
    corpus.write_text(f"{THREE}\n{TWO}\n", encoding="utf-8")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--unit", "sentence"], capsys)
    assert code == 0, err
    suite = read_suite(out)
    assert suite.header["generator"]["unit"] == "sentence"
    ids = {p.extra["text_id"] for p in suite.pairs}
    assert ids == {stable_id("source", THREE), stable_id("source", TWO)}
    for p in suite.pairs:
        assert p.source_id == f"{p.extra['text_id']}:{p.extra['sentence']}"
    # the default is the same
    out2 = tmp_path / "default.jsonl"
    code, _, err = run(["build", corpus, "-o", out2], capsys)
    assert code == 0, err
    assert [p.to_dict() for p in read_suite(out2).pairs] == [p.to_dict() for p in suite.pairs]


def test_one_sentence_texts_give_the_same_suite_under_both_units(nlp):
    from pairflip.demo.models import load_sentences

    texts = load_sentences()[:80]
    by_sentence = pairflip.build_suite(texts, seed=0, nlp=nlp, unit="sentence")
    by_text = pairflip.build_suite(texts, seed=0, nlp=nlp, unit="text")
    assert len(by_text.pairs) > 100
    assert [p.to_dict() for p in by_sentence.pairs] == [p.to_dict() for p in by_text.pairs]


def test_a_sentence_seen_before_is_not_a_source_again(nlp):
    # "The lantern is bright." opens TWO and is a text of its own too: one source, kept where it
    # was first seen; the other sentence of TWO keeps its index 1.
    texts = [TWO, "The lantern is bright.", "The strap feels flimsy. The stove is loud."]
    suite = pairflip.build_suite(texts, seed=0, nlp=nlp, families="reorder/shuffle")
    sources = [(p.source, p.source_id) for p in suite.pairs]
    two_id, third_id = stable_id("source", TWO), stable_id("source", texts[2])
    assert sources == [("The lantern is bright.", f"{two_id}:0"), ("The strap feels flimsy.", f"{two_id}:1"),
                       ("The stove is loud.", f"{third_id}:1")]
    assert suite.stats.sources == 3 and suite.stats.sentences == 3


def test_a_parser_boundary_without_final_punctuation_is_not_a_cut(nlp):
    from pairflip.perturb.build import sentence_spans

    # The small English model puts a sentence boundary before "and" here (checked first); a
    # sentence ends with final punctuation (or a line break), so the text stays one source.
    misplit = "I'm cooking for four with this set and it works perfectly."
    assert [s.text for s in nlp(misplit).sents] == ["I'm cooking for four with this set", "and it works perfectly."]
    assert [s.text for s in sentence_spans(nlp(misplit))] == [misplit]
    suite = pairflip.build_suite([misplit], seed=0, nlp=nlp)
    assert suite.pairs and {p.source for p in suite.pairs} == {misplit}
    assert all(p.source_id == stable_id("source", misplit) and not p.extra for p in suite.pairs)
    # Boundaries after "!!", after a closing quote or bracket, and runs of spaces are cuts; the
    # spaces are left out of the sources.
    for text, parts in [
        ("Great tent!! Love it.  Would buy again", ["Great tent!!", "Love it.", "Would buy again"]),
        ('He said "It\'s great." Then he left.', ['He said "It\'s great."', "Then he left."]),
    ]:
        assert [s.text for s in sentence_spans(nlp(text))] == parts


def test_progress_counts_texts_once_each_whatever_they_give(nlp):
    # 3 sentences, a text whose only sentence was seen, one sentence: on_source(1), (2), (3).
    seen: list[int] = []
    pairflip.build_suite([THREE, "These boots are comfortable.", TWO], seed=0, nlp=nlp, on_source=seen.append,
                         overlap=False)
    assert seen == [1, 2, 3]


# --------------------------------------------------------------------------- clusters by text


def _verdict(i: int, source_id: str, violated: bool = False) -> Verdict:
    return Verdict(id=f"p{i}", source_pred="positive", variant_pred="positive" if violated else "negative",
                   verdict="violation" if violated else "ok", family="negation", rule="negation/copula",
                   should="flip", source=f"sentence {i}", variant=f"variant {i}", source_id=source_id)


def test_cluster_bootstrap_resamples_texts_not_sentences():
    # 8 texts of 3 sentence sources each, no violation: the effective sample size is 8 texts, so
    # the interval is Wilson at 8 (statsmodels' proportion_confint, method="wilson"), not at 24.
    from statsmodels.stats.proportion import proportion_confint

    vs = [_verdict(t * 3 + i, f"{stable_id('source', f'text {t}')}:{i}") for t in range(8) for i in range(3)]
    res = Results(header={"suite": {"sha256": "x" * 64}, "model": {"name": "toy"}, "labels": {}}, verdicts=vs)
    g = summarize(res, cluster="source").families["negation"]
    assert g.ci95 == pytest.approx(proportion_confint(0, 8, method="wilson"), abs=1e-12)
    assert g.ci95[1] > proportion_confint(0, 24, method="wilson")[1] + 0.1
    assert {cluster_key(v) for v in vs} == {stable_id("source", f"text {t}") for t in range(8)}


def test_cluster_key_leaves_other_source_ids_alone():
    # Only TEXT_ID:INDEX (16 hex digits, a colon, digits) is a sentence unit's id.
    assert cluster_key(_verdict(0, "reviews.csv:12")) == "reviews.csv:12"
    assert cluster_key(_verdict(0, "0123456789abcdef")) == "0123456789abcdef"
    assert cluster_key(_verdict(0, "0123456789abcdef:7")) == "0123456789abcdef"
    assert cluster_key(_verdict(0, "")) == "sentence 0"


def test_built_and_scored_sentence_units_cluster_by_text(nlp):
    texts = [THREE, TWO, "The chair is sturdy. The mug keeps coffee hot. The pot is light."]
    suite = pairflip.build_suite(texts, seed=0, nlp=nlp)
    results = pairflip.score(suite, lambda xs: ["negative" if "n't" in x or " not " in x else "positive" for x in xs])
    keys = {cluster_key(v) for v in results.verdicts}
    assert keys == {stable_id("source", t) for t in texts}
    assert len({v.source_id for v in results.verdicts}) > len(keys)  # more sentences than texts


# --------------------------------------------------------------------------- --unit text


def test_unit_text_is_the_suite_of_the_build_before_units(tmp_path, capsys, monkeypatch):
    # suite_text.jsonl was written from corpus.txt by the build as it was before units existed
    # (perturb/build.py of commit 7b9aba6, same command and families), run from the repository
    # root. The reorder rules other than coordination read no lexicon, so the suite does not move
    # when opinion words are added; rewrite the file only for a change meant to move pairs.
    monkeypatch.chdir(ROOT)
    out = tmp_path / "suite.jsonl"
    families = "reorder/shuffle,reorder/adverbial,reorder/clauses"
    code, _, err = run(["build", "tests/data/units/corpus.txt", "-o", out, "--unit", "text", "--families", families],
                       capsys)
    assert code == 0, err
    got = out.read_bytes().splitlines(keepends=True)
    want = (DATA / "suite_text.jsonl").read_bytes().splitlines(keepends=True)
    assert len(want) > 50
    assert got[1:] == want[1:]
    head_got, head_want = json.loads(got[0]), json.loads(want[0])
    head_got.pop("created"), head_want.pop("created")
    assert head_got == head_want and "unit" not in head_got["generator"]
    assert got[0].replace(json.loads(got[0])["created"].encode(), b"") == \
        want[0].replace(json.loads(want[0])["created"].encode(), b"")


def test_unit_text_keeps_whole_texts_and_their_ids(nlp):
    texts = [THREE, TWO]
    suite = pairflip.build_suite(texts, seed=0, nlp=nlp, unit="text")
    assert suite.pairs and {p.source for p in suite.pairs} <= set(texts)
    assert all(p.source_id == stable_id("source", p.source) and not p.extra for p in suite.pairs)
    assert "unit" not in suite.header["generator"] and suite.stats.sentences == 0


def test_bad_unit_is_a_clear_error(tmp_path, capsys):
    corpus = tmp_path / "r.txt"
    corpus.write_text(f"{THREE}\n", encoding="utf-8")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--unit", "paragraph"], capsys)
    assert code == 2
    line = " ".join(err.split())
    assert "pairflip: error: --unit 'paragraph'" in line and "'sentence'" in line and "'text'" in line
    assert not out.exists() and list(tmp_path.iterdir()) == [corpus]
    with pytest.raises(pairflip.records.PairflipError, match="--unit 'words'"):
        pairflip.build_suite([THREE], unit="words")


@pytest.mark.parametrize("unit", ["text", "sentence"])
def test_audit_takes_the_unit(tmp_path, capsys, monkeypatch, unit):
    (tmp_path / "units_toy_model.py").write_text(
        "def predict(texts):\n    return ['negative' if \"n't\" in t or ' not ' in t else 'positive' for t in texts]\n",
        encoding="utf-8",
    )
    monkeypatch.syspath_prepend(str(tmp_path))
    corpus = tmp_path / "r.txt"
    corpus.write_text(f"{THREE}\n", encoding="utf-8")
    out_dir = tmp_path / "audit"
    code, _, err = run(["audit", corpus, "--model", "units_toy_model:predict", "--out-dir", out_dir, "--unit", unit],
                       capsys)
    assert code == 0, err
    sources = {p.source for p in read_suite(out_dir / "suite.jsonl").pairs}
    assert sources == ({THREE} if unit == "text" else {s for s in sources if s in THREE and s != THREE})
    assert len(sources) == (1 if unit == "text" else 3)
