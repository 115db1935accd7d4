"""Bad options and wrong files on the command line: exit 2, one line that says what and where, no
traceback, and no output file (nor temp file) left behind."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from pairflip import cli
from pairflip.files import write_results, write_suite
from pairflip.perturb.build import known_rules
from pairflip.records import Edit, Pair, Results, Suite, Verdict


@pytest.fixture(autouse=True)
def _one_pipeline(nlp, monkeypatch):
    """The in-process CLI gets the session's pipeline (load_nlp() and load_nlp(None) are cached apart)."""
    import pairflip.perturb.nlp as nlp_mod

    real = nlp_mod.load_nlp
    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp if name is None else real(name))


def run(args: list[str], capsys) -> tuple[int, str, str]:
    try:
        cli.main([str(a) for a in args])
        code = 0
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else (0 if e.code is None else 2)
    out, err = capsys.readouterr()
    return code, out, err


def leftovers(out: Path) -> list[str]:
    return sorted(p.name for p in out.parent.iterdir() if p.name == out.name or p.name.startswith(f".{out.name}."))


def assert_clean_failure(code: int, err: str, out: Path | None, *needles: str) -> str:
    assert code == 2, err
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, f"expected one line, got: {err!r}"
    for n in needles:
        assert n in err, f"{n!r} not in {err!r}"
    if out is not None:
        assert leftovers(out) == []
    return lines[0]


@pytest.fixture()
def corpus(tmp_path) -> Path:
    p = tmp_path / "reviews.txt"
    p.write_text("The tent is roomy.\nThe stove works well.\n", encoding="utf-8")
    return p


def _pair() -> Pair:
    src = "The tent is roomy."
    return Pair(source=src, variant="The tent is not roomy.", family="negation", rule="negation/copula",
                should="flip", edits=[Edit(12, 12, "not ")])


@pytest.fixture()
def suite_file(tmp_path) -> Path:
    p = tmp_path / "suite.jsonl"
    write_suite(Suite(header={"generator": {"name": "pairflip"}}, pairs=[_pair(), _pair()]), p)
    return p


@pytest.fixture()
def results_file(tmp_path) -> Path:
    p = tmp_path / "results.jsonl"
    v = Verdict(id=_pair().id, source_pred="positive", variant_pred="negative", verdict="ok",
                family="negation", rule="negation/copula", should="flip")
    write_results(Results(header={"model": {"name": "toy"}}, verdicts=[v]), p)
    return p


@pytest.fixture()
def model_spec(tmp_path, monkeypatch) -> str:
    """A plain python callable as the model (probes/ has the other model kinds)."""
    (tmp_path / "fe_toy_model.py").write_text(
        "def predict(texts):\n    return ['negative' if ' not ' in f' {t} ' else 'positive' for t in texts]\n",
        encoding="utf-8",
    )
    monkeypatch.syspath_prepend(str(tmp_path))
    return "fe_toy_model:predict"


# --------------------------------------------------------------------------- build options


def test_unknown_family_lists_the_known_ones(tmp_path, capsys, corpus):
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--families", "negation,sarcasm"], capsys)
    assert_clean_failure(code, err, out, "--families", "'sarcasm'", *known_rules())


def test_unknown_rule_lists_the_rules_of_its_family(tmp_path, capsys, corpus):
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--families", "negation/passive"], capsys)
    assert_clean_failure(code, err, out, "--families", "'negation/passive'", *known_rules()["negation"])


def test_empty_families_option(tmp_path, capsys, corpus):
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--families", " , "], capsys)
    assert_clean_failure(code, err, out, "--families", *known_rules())


def test_output_equal_to_input(tmp_path, capsys, corpus):
    before = corpus.read_bytes()
    code, _, err = run(["build", corpus, "-o", corpus, "--force"], capsys)
    assert_clean_failure(code, err, None, str(corpus), "also an input")
    assert corpus.read_bytes() == before


def test_output_equal_to_input_through_another_spelling(tmp_path, capsys, corpus, monkeypatch):
    monkeypatch.chdir(tmp_path)
    before = corpus.read_bytes()
    (tmp_path / "sub").mkdir()
    code, _, err = run(["build", "reviews.txt", "-o", "sub/../reviews.txt", "--force"], capsys)
    assert_clean_failure(code, err, None, "also an input")
    link = tmp_path / "link.txt"
    link.symlink_to(corpus)
    code, _, err = run(["build", "reviews.txt", "-o", "link.txt", "--force"], capsys)
    assert_clean_failure(code, err, None, "also an input")
    assert corpus.read_bytes() == before


def test_existing_output_without_force_is_kept(tmp_path, capsys, corpus):
    out = tmp_path / "suite.jsonl"
    out.write_text("precious\n", encoding="utf-8")
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert code == 2 and "Traceback" not in err
    assert str(out) in err and "--force" in err and "already exists" in err
    assert out.read_text(encoding="utf-8") == "precious\n"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".suite.jsonl.")] == []
    code, _, err = run(["build", corpus, "-o", out, "--force"], capsys)
    assert code == 0, err
    assert json.loads(out.read_text(encoding="utf-8").splitlines()[0])["kind"] == "pairflip-suite"


def test_output_is_a_folder_or_in_a_missing_folder(tmp_path, capsys, corpus):
    (tmp_path / "out").mkdir()
    code, _, err = run(["build", corpus, "-o", tmp_path / "out", "--force"], capsys)
    assert_clean_failure(code, err, None, "is a folder")
    out = tmp_path / "nowhere" / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, None, "nowhere", "does not exist")
    assert not (tmp_path / "nowhere").exists()


def test_failed_build_keeps_an_existing_output_file(tmp_path, capsys):
    # --force, then the corpus turns out bad: the old suite must survive untouched.
    bad = tmp_path / "reviews.jsonl"
    bad.write_text('{"text": "The tent is roomy."}\n{"text": \n', encoding="utf-8")
    out = tmp_path / "suite.jsonl"
    out.write_text("old suite\n", encoding="utf-8")
    code, _, err = run(["build", bad, "-o", out, "--force"], capsys)
    assert_clean_failure(code, err, None, "reviews.jsonl:2")
    assert out.read_text(encoding="utf-8") == "old suite\n"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".suite.jsonl.")] == []


def test_usage_error_exits_2_without_traceback(tmp_path, capsys, corpus):
    code, _, err = run(["build", corpus], capsys)  # no -o
    assert code == 2 and "Traceback" not in err and "-o" in err


# --------------------------------------------------------------------------- the wrong file kind or version


def test_results_file_where_a_suite_is_expected(tmp_path, capsys, results_file, model_spec):
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", results_file, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, str(results_file), "results file", "pairflip score", "suite file", "pairflip build")


@pytest.mark.parametrize("command", ["show", "gate", "compare"])
def test_suite_file_where_results_are_expected(tmp_path, capsys, suite_file, results_file, command):
    args = {"show": ["show", suite_file], "gate": ["gate", suite_file, "--limit", "negation.violation <= 0.10"],
            "compare": ["compare", results_file, suite_file]}[command]
    code, _, err = run(args, capsys)
    assert_clean_failure(code, err, None, str(suite_file), "suite file", "results file", "pairflip score")


def test_corpus_where_a_suite_is_expected(tmp_path, capsys, corpus, model_spec):
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", corpus, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{corpus}:1", "not JSON", "suite file")


def _rewrite_header(path: Path, **changes) -> None:
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    head = json.loads(lines[0])
    head.update(changes)
    lines[0] = json.dumps(head) + "\n"
    path.write_text("".join(lines), encoding="utf-8")


@pytest.mark.parametrize("version, extra", [(2, "newer pairflip"), (0, None), ("1", None), (None, None)])
def test_suite_of_unknown_version(tmp_path, capsys, suite_file, model_spec, version, extra):
    _rewrite_header(suite_file, version=version)
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out], capsys)
    needles = [f"{suite_file}:1", "'version'", "reads version 1"] + ([extra] if extra else [])
    assert_clean_failure(code, err, out, *needles)


def test_results_of_unknown_version(tmp_path, capsys, results_file):
    _rewrite_header(results_file, version=7)
    code, _, err = run(["show", results_file], capsys)
    assert_clean_failure(code, err, None, f"{results_file}:1", "'version'", "7", "reads version 1")


def test_header_of_an_unknown_kind(tmp_path, capsys, results_file):
    _rewrite_header(results_file, kind="someone-elses-file")
    code, _, err = run(["show", results_file], capsys)
    assert_clean_failure(code, err, None, f"{results_file}:1", "'someone-elses-file'", "pairflip-results")


def test_records_without_a_header(tmp_path, capsys, model_spec):
    p = tmp_path / "pairs.jsonl"
    p.write_text(json.dumps(_pair().to_dict()) + "\n", encoding="utf-8")
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", p, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{p}:1", "without a header", "pairflip build")


def test_truncated_suite_names_the_cut_line(tmp_path, capsys, suite_file, model_spec):
    data = suite_file.read_text(encoding="utf-8")
    n_lines = data.count("\n")
    suite_file.write_text(data[: len(data) - 25], encoding="utf-8")  # the last line loses its tail
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{suite_file}:{n_lines}", "truncated")


def test_truncated_results_file(tmp_path, capsys, results_file):
    data = results_file.read_text(encoding="utf-8")
    results_file.write_text(data[: len(data) - 10], encoding="utf-8")
    code, _, err = run(["show", results_file], capsys)
    assert_clean_failure(code, err, None, f"{results_file}:2", "truncated")


def test_malformed_line_in_the_middle_is_not_called_truncated(tmp_path, capsys, suite_file, model_spec):
    lines = suite_file.read_text(encoding="utf-8").splitlines(keepends=True)
    lines[1] = lines[1][:40] + "\n"
    suite_file.write_text("".join(lines), encoding="utf-8")
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out], capsys)
    line = assert_clean_failure(code, err, out, f"{suite_file}:2", "malformed JSON")
    assert "truncated" not in line


@pytest.mark.parametrize(
    "field, value, needles",
    [
        ("should", "flipp", ["'should'", "'flipp'", "flip, hold, strengthen, weaken, none"]),
        ("source", None, ["'source'", "None", "a string"]),
        ("edits", {"start": 1}, ["'edits'", "an object", "array"]),
        ("edits", [{"start": 12, "end": 99, "text": "not "}], ["edits[0]", "12..99", "18 characters"]),
        ("edits", [{"start": "12", "end": 12, "text": "not "}], ["edits[0]", "'start'", "an integer"]),
    ],
)
def test_bad_pair_record_names_line_and_field(tmp_path, capsys, suite_file, model_spec, field, value, needles):
    lines = suite_file.read_text(encoding="utf-8").splitlines(keepends=True)
    rec = json.loads(lines[2])
    rec[field] = value
    lines[2] = json.dumps(rec) + "\n"
    suite_file.write_text("".join(lines), encoding="utf-8")
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{suite_file}:3", *needles)


def test_missing_pair_field(tmp_path, capsys, suite_file, model_spec):
    lines = suite_file.read_text(encoding="utf-8").splitlines(keepends=True)
    rec = json.loads(lines[1])
    del rec["variant"]
    lines[1] = json.dumps(rec) + "\n"
    suite_file.write_text("".join(lines), encoding="utf-8")
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{suite_file}:2", "missing field 'variant'")


def test_bad_verdict_record(tmp_path, capsys, results_file):
    lines = results_file.read_text(encoding="utf-8").splitlines(keepends=True)
    rec = json.loads(lines[1])
    rec["verdict"] = "maybe"
    lines[1] = json.dumps(rec) + "\n"
    results_file.write_text("".join(lines), encoding="utf-8")
    code, _, err = run(["show", results_file], capsys)
    assert_clean_failure(code, err, None, f"{results_file}:2", "'verdict'", "'maybe'", "ok, violation, n/a")


@pytest.mark.parametrize("content", [b"", b"\n\n"], ids=["empty", "blank"])
def test_empty_suite_file(tmp_path, capsys, model_spec, content):
    p = tmp_path / "suite.jsonl"
    p.write_bytes(content)
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", p, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, str(p), "empty file", "header")


def test_missing_suite_and_results_files(tmp_path, capsys, model_spec):
    out = tmp_path / "out.jsonl"
    code, _, err = run(["score", tmp_path / "none.jsonl", "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, "none.jsonl", "no such file", "pairflip build")
    code, _, err = run(["show", tmp_path / "none.jsonl"], capsys)
    assert_clean_failure(code, err, None, "none.jsonl", "no such file", "pairflip score")


def test_suite_with_a_bom_still_reads(tmp_path, capsys, suite_file):
    from pairflip.files import read_suite

    suite_file.write_bytes(b"\xef\xbb\xbf" + suite_file.read_bytes())
    assert len(read_suite(suite_file).pairs) == 2
