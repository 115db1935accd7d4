"""What a newcomer misread: accuracy across label scales, JUnit without limits, audit = gate."""

from __future__ import annotations

import json
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from pairflip import cli
from pairflip.labels import LabelMap
from pairflip.records import PairflipError, Results, Verdict
from pairflip.report.summary import parse_gold_labels, summarize


def V(i, sp, label, family="negation", rule="negation/copula", should="flip", vp=None, verdict="ok"):
    return Verdict(id=f"p{i}", source_pred=sp, variant_pred=vp or sp, verdict=verdict, source_score=None,
                   variant_score=None, family=family, rule=rule, should=should, source=f"source {i}",
                   variant=f"variant {i}", source_id=f"s{i}", label=label)


def R(verdicts, order=("negative", "positive")):
    return Results(header={"suite": {"sha256": "x" * 64}, "model": {"name": "toy"},
                           "labels": LabelMap(order=tuple(order), source="recognised").to_dict()},
                   verdicts=list(verdicts))


# --------------------------------------------------------------------------- accuracy


def test_star_gold_labels_are_read_as_polarity_not_compared_as_strings():
    # A model right on every text: stars 4-5 are positive, 1-2 negative (the common reading of a
    # five-star scale; 3 is neutral).
    vs = [V(1, "positive", "5"), V(2, "positive", "4"), V(3, "negative", "1"), V(4, "negative", "2")]
    a = summarize(R(vs)).accuracy
    assert a["rate"] == 1.0 and a["correct"] == 4 and a["sources"] == 4
    assert "by polarity" in a["mapped"] and "1=-1" in a["mapped"]


def test_pos_neg_gold_against_negative_positive_predictions():
    vs = [V(1, "positive", "pos"), V(2, "negative", "neg"), V(3, "negative", "pos")]
    a = summarize(R(vs)).accuracy
    assert (a["correct"], a["sources"]) == (2, 3)


def test_gold_on_the_models_own_scale_is_said_so():
    a = summarize(R([V(1, "positive", "Positive"), V(2, "negative", "positive")])).accuracy
    assert (a["correct"], a["sources"]) == (1, 2) and a["mapped"] == "on the model's own label scale"


def test_unmappable_gold_labels_are_reported_not_counted_as_wrong():
    a = summarize(R([V(1, "positive", "thumbs up"), V(2, "negative", "thumbs down")])).accuracy
    assert a["rate"] is None
    assert "'thumbs down', 'thumbs up'" in a["problem"] and "--gold-labels" in a["problem"]


def test_gold_labels_option_as_a_map_and_as_an_order():
    vs = [V(1, "positive", "thumbs up"), V(2, "negative", "thumbs down"), V(3, "negative", "thumbs up")]
    a = summarize(R(vs), gold_labels="thumbs down=negative,thumbs up=positive").accuracy
    assert (a["correct"], a["sources"], a["mapped"]) == (2, 3, "through --gold-labels")
    a = summarize(R(vs), gold_labels=parse_gold_labels("thumbs down,thumbs up")).accuracy
    assert (a["correct"], a["sources"]) == (2, 3)
    # A label the map does not hold is named.
    a = summarize(R(vs), gold_labels="thumbs up=positive").accuracy
    assert a["rate"] is None and "'thumbs down'" in a["problem"]


@pytest.mark.parametrize("spec,words", [
    ("", "empty item"), ("1=negative,,2=positive", "empty item"), ("1=bad", "item 1 '1=bad'"),
    ("1=negative,1=positive", "given twice"),
])
def test_malformed_gold_labels_name_the_item(spec, words):
    with pytest.raises(PairflipError, match=words):
        parse_gold_labels(spec)


def run(args, capsys):
    try:
        cli.main([str(a) for a in args])
        code = 0
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else 2
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture()
def star_results(tmp_path) -> Path:
    from pairflip.files import write_results

    vs = [V(1, "positive", "5"), V(2, "positive", "4"), V(3, "negative", "1"),
          V(4, "negative", "2", vp="negative", verdict="violation")]
    p = tmp_path / "results.jsonl"
    write_results(R(vs), p)
    return p


def test_show_prints_the_mapping_and_the_problem(star_results, capsys):
    code, out, err = run(["show", star_results], capsys)
    flat = " ".join(out.split())
    assert code == 0 and "100.0 % on 4 sources with a gold label" in flat and "by polarity" in flat
    code, out, _ = run(["show", star_results, "--gold-labels", "1=negative,2=positive,4=positive,5=positive"], capsys)
    assert code == 0 and "75.0 % on 4 sources" in " ".join(out.split())
    code, out, _ = run(["show", star_results, "--gold-labels", "4=positive"], capsys)
    flat = " ".join(out.split())
    assert code == 0 and "accuracy not computed: --gold-labels does not map the gold label(s) '1', '2'" in flat
    code, _, err = run(["show", star_results, "--gold-labels", "1=great"], capsys)
    assert code == 2 and "--gold-labels '1=great': item 1" in err


# --------------------------------------------------------------------------- JUnit without limits


def test_junit_without_limits_marks_every_case_skipped_not_passed(star_results, tmp_path, capsys):
    out = tmp_path / "j.xml"
    code, _, err = run(["show", star_results, "--junit", out], capsys)
    assert code == 0, err
    root = ET.parse(out).getroot()
    cases = root.findall(".//testcase")
    assert cases and all(c.find("skipped") is not None for c in cases)
    assert root.get("skipped") == str(len(cases)) and root.get("failures") == "0"
    note = [p.get("value") for p in root.iter("property") if p.get("name") == "limits"]
    assert note and "none set" in note[0]
    # With a limit, the rule cases are records again and the limit is a real test case.
    out2 = tmp_path / "j2.xml"
    code, _, _ = run(["show", star_results, "--junit", out2, "--limit", "negation.violation <= 0.10"], capsys)
    root = ET.parse(out2).getroot()
    assert root.get("skipped") == "0" and root.get("failures") == "1"


# --------------------------------------------------------------------------- audit agrees with gate

CORPUS = """The tent is sturdy.
The stove lights reliably.
The lantern is bright.
The kettle is great.
The staff were helpful.
The rucksack is comfortable.
"""

MODEL = """def predict(texts):
    return ['positive'] * len(texts)
"""


@pytest.fixture()
def project(tmp_path, monkeypatch):
    (tmp_path / "corpus.txt").write_text(CORPUS, encoding="utf-8")
    (tmp_path / "fe_always_positive.py").write_text(MODEL, encoding="utf-8")
    (tmp_path / "pyproject.toml").write_text('[tool.pairflip.gate]\nlimits = ["negation.violation <= 0.10"]\n',
                                             encoding="utf-8")
    monkeypatch.syspath_prepend(str(tmp_path))
    monkeypatch.chdir(tmp_path)
    return tmp_path


def test_audit_reads_pyproject_limits_like_gate_and_exits_the_same(project, capsys):
    # A model that never changes its mind breaks every negation pair: gate fails on the
    # pyproject limit; audit, reading the same table, must fail too (it used to exit 0).
    code, out, err = run(["audit", "corpus.txt", "-m", "fe_always_positive:predict", "--families", "negation",
                          "--json", "s.json", "--junit", "j.xml", "--markdown", "m.md", "--html", "h.html"], capsys)
    assert code == 1, out + err
    assert "negation.violation <= 0.10" in out and "gate FAILED" in out
    code_gate, out_gate, _ = run(["gate", "pairflip-out/results.jsonl"], capsys)
    assert code_gate == code
    for name in ("s.json", "j.xml", "m.md", "h.html"):
        assert (project / name).is_file(), name
    assert json.loads((project / "s.json").read_text(encoding="utf-8"))["gate"][0]["passed"] is False
    assert ET.parse(project / "j.xml").getroot().get("failures") == "1"
    # The exports are outputs like any other: not overwritten without --force.
    code, _, err = run(["audit", "corpus.txt", "-m", "fe_always_positive:predict", "--families", "negation",
                        "--force", "--json", "s.json"], capsys)
    assert code == 1
    code, _, err = run(["audit", "corpus.txt", "-m", "fe_always_positive:predict", "--families", "negation",
                        "--out-dir", "other", "--json", "s.json"], capsys)
    assert code == 2 and "s.json" in err and "--force" in err


def test_audit_baseline_and_cluster_are_the_gates(project, capsys):
    code, _, err = run(["audit", "corpus.txt", "-m", "fe_always_positive:predict", "--families", "negation",
                        "--out-dir", "old"], capsys)
    assert code == 1, err
    (project / "pyproject.toml").unlink()
    code, out, err = run(["audit", "corpus.txt", "-m", "fe_always_positive:predict", "--families", "negation",
                          "--out-dir", "new", "--baseline", "old/results.jsonl", "--cluster", "source"], capsys)
    assert code == 0, out + err
    assert "regression against the baseline" in out and "bootstrap over source" in " ".join(out.split())
    code, _, err = run(["audit", "corpus.txt", "-m", "fe_always_positive:predict", "--out-dir", "x",
                        "--baseline", "missing.jsonl"], capsys)
    assert code == 2 and "missing.jsonl" in err
    assert not (project / "x" / "suite.jsonl").exists()  # failed before the work


def test_every_audit_option_has_a_help_line():
    import typer.main

    command = typer.main.get_command(cli.app)
    audit = command.commands["audit"]
    missing = [p.name for p in audit.params if not getattr(p, "help", None) and p.param_type_name == "option"]
    assert missing == []


# --------------------------------------------------------------------------- compare shows scores


def test_compare_newly_broken_shows_scores_and_how_many_are_shown(tmp_path, capsys):
    from pairflip.files import write_results

    def pair(i, new):
        # strengthen: "very sturdy" must score at least as positive as "sturdy". The new model
        # keeps both labels and lowers the score: only the scores show the regression.
        vs_score = 0.30 if new else 0.80
        return Verdict(id=f"p{i}", source_pred="positive", variant_pred="positive",
                       verdict="violation" if new else "ok", source_score=0.60, variant_score=vs_score,
                       family="intensifier", rule="intensifier/amplify", should="strengthen",
                       source=f"The tent {i} is sturdy.", variant=f"The tent {i} is very sturdy.",
                       source_id=f"s{i}", label=None)

    old = tmp_path / "old.jsonl"
    new = tmp_path / "new.jsonl"
    write_results(R([pair(i, False) for i in range(9)], order=("negative", "neutral", "positive")), old)
    write_results(R([pair(i, True) for i in range(9)], order=("negative", "neutral", "positive")), new)
    code, out, err = run(["compare", old, new, "--examples", "3"], capsys)
    flat = " ".join(out.split())
    assert code == 0, err
    assert "intensifier: 3 of 9 shown" in flat
    assert "old positive +0.60 -> positive +0.80" in flat and "new positive +0.60 -> positive +0.30" in flat


@pytest.mark.parametrize("command,usage", [
    ("build", "Usage: pairflip build [OPTIONS] CORPUS"), ("score", "Usage: pairflip score [OPTIONS] SUITE"),
    ("audit", "Usage: pairflip audit [OPTIONS] CORPUS"), ("show", "Usage: pairflip show [OPTIONS] RESULTS..."),
    ("compare", "Usage: pairflip compare [OPTIONS] OLD_RESULTS NEW_RESULTS"),
])
def test_usage_lines_name_arguments_in_capitals_without_braces(command, usage, capsys):
    code, out, err = run([command], capsys)
    assert code == 2 and usage in out + err and "{" not in (out + err).splitlines()[0]


def test_side_by_side_tells_two_runs_of_one_spec_apart_and_shows_each_label_mapping(tmp_path, capsys):
    from pairflip.files import write_results

    long_name = "my_team.models.sentiment_tfidf:predict"
    vs = [V(1, "positive", None), V(2, "negative", None, vp="negative", verdict="violation")]
    a, b = tmp_path / "monday.jsonl", tmp_path / "friday.jsonl"
    ra = R(vs)
    ra.header["model"] = {"name": long_name}
    rb = R(vs, order=("negative", "neutral", "positive"))
    rb.header["model"] = {"name": long_name}
    write_results(ra, a)
    write_results(rb, b)
    code, out, err = run(["show", a, b, "--examples", "0"], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    assert f"{long_name} (monday.jsonl)" in flat and f"{long_name} (friday.jsonl)" in flat
    assert "…" not in out  # no model name cut
    assert "labels negative -1, positive +1" in flat and "labels negative -1, neutral +0, positive +1" in flat


def test_mixed_family_shows_its_rules_expectations_and_counts_say_what_they_count(tmp_path, capsys):
    from pairflip.files import write_results

    vs = [V(1, "positive", None, family="intensifier", rule="intensifier/amplify", should="strengthen"),
          V(2, "positive", None, family="intensifier", rule="intensifier/soften", should="weaken"),
          V(3, "positive", None, family="reorder", rule="reorder/shuffle", should="none"),
          V(4, "positive", None, family="reorder", rule="reorder/coordination", should="hold")]
    p = tmp_path / "r.jsonl"
    write_results(R(vs), p)
    code, out, err = run(["show", p], capsys)
    flat = " ".join(out.split())
    assert code == 0, err
    assert "strengthen/weaken" in flat and " mixed " not in flat
    assert "4 pairs (3 with an expectation, counted in the families; 1 diagnostic, shown apart)" in flat


def test_gate_writes_the_exports_with_its_limits(star_results, tmp_path, capsys):
    j, js = tmp_path / "gate.xml", tmp_path / "gate.json"
    code, out, err = run(["gate", star_results, "--limit", "negation.violation <= 0.10", "--junit", j, "--json", js], capsys)
    assert code == 1, out + err
    root = ET.parse(j).getroot()
    failed = [c.get("name") for c in root.iter("testcase") if c.find("failure") is not None]
    assert failed == ["limit: negation.violation <= 0.10"]
    assert json.loads(js.read_text(encoding="utf-8"))["gate"][0]["passed"] is False
    # Outputs are checked before the work: an existing file needs --force, an input is never one.
    code, _, err = run(["gate", star_results, "--limit", "negation.violation <= 0.10", "--junit", j], capsys)
    assert code == 2 and "--force" in err
    code, _, err = run(["gate", star_results, "--limit", "negation.violation <= 0.10", "--json", star_results,
                        "--force"], capsys)
    assert code == 2 and "input" in err
    code, _, _ = run(["gate", star_results, "--limit", "negation.violation <= 0.10", "--junit", j, "--force"], capsys)
    assert code == 1


def test_top_level_help_summary_names_every_command():
    # the one-line map of the tool at the top of `pairflip -h` must not leave a command out
    summary = cli.app.info.help.split("\n\n", 1)[1]
    for command in cli.app.registered_commands:
        name = command.name or command.callback.__name__
        assert f"{name}:" in summary, name
