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


def _pair(noun: str = "tent") -> Pair:
    src = f"The {noun} is roomy."
    at = len(f"The {noun} is ")
    return Pair(source=src, variant=f"The {noun} is not roomy.", family="negation", rule="negation/copula",
                should="flip", edits=[Edit(at, at, "not ")])


@pytest.fixture()
def suite_file(tmp_path) -> Path:
    p = tmp_path / "suite.jsonl"
    write_suite(Suite(header={"generator": {"name": "pairflip"}}, pairs=[_pair(), _pair("yurt")]), p)
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
        ("should", "flipp", ["'should'", "'flipp'", "flip, hold, strengthen, weaken, rise, fall, none"]),
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


# --------------------------------------------------------------------------- issue 12: nothing lost
# Each test below failed before the fix it names (run against the code of 04cd824).


def _unwritable_folder(tmp_path: Path) -> Path:
    """A folder that exists but takes no new file, for root too (permission bits do not stop root)."""
    import os
    import tempfile

    if os.geteuid() != 0:
        d = tmp_path / "locked"
        d.mkdir()
        d.chmod(0o500)
        return d
    try:  # sysfs refuses new files even to root (EACCES)
        fd, name = tempfile.mkstemp(dir="/sys")
    except OSError:
        return Path("/sys")
    os.close(fd)
    os.unlink(name)
    pytest.skip("no folder on this machine refuses root a new file")


@pytest.mark.parametrize("option", ["--json", "--html", "--markdown", "--junit"])
def test_show_refuses_to_export_onto_its_input(results_file, capsys, option):
    before = results_file.read_bytes()
    code, _, err = run(["show", results_file, option, results_file], capsys)
    assert_clean_failure(code, err, None, option, "also an input")
    assert results_file.read_bytes() == before


def test_show_refuses_to_overwrite_an_export_without_force(results_file, tmp_path, capsys):
    out = tmp_path / "summary.json"
    out.write_text("keep me", encoding="utf-8")
    code, _, err = run(["show", results_file, "--json", out], capsys)
    assert_clean_failure(code, err, None, "--json", "already exists", "--force")
    assert out.read_text(encoding="utf-8") == "keep me"
    code, _, err = run(["show", results_file, "--json", out, "--force"], capsys)
    assert code == 0, err
    assert json.loads(out.read_text(encoding="utf-8"))["version"] == 1


def test_show_refuses_two_exports_to_one_path(results_file, tmp_path, capsys):
    out = tmp_path / "report.txt"
    code, _, err = run(["show", results_file, "--json", out, "--markdown", out], capsys)
    assert_clean_failure(code, err, out, "--markdown", "same file as --json")


def test_compare_refuses_to_write_onto_an_input(results_file, capsys):
    before = results_file.read_bytes()
    code, _, err = run(["compare", results_file, results_file, "--json", results_file], capsys)
    assert_clean_failure(code, err, None, "--json", "also an input")
    assert results_file.read_bytes() == before


def test_compare_refuses_to_overwrite_without_force(results_file, tmp_path, capsys):
    out = tmp_path / "comparison.json"
    out.write_text("keep me", encoding="utf-8")
    code, _, err = run(["compare", results_file, results_file, "--json", out], capsys)
    assert_clean_failure(code, err, None, "--json", "already exists", "--force")
    assert out.read_text(encoding="utf-8") == "keep me"


def _dup_suite(suite_file: Path) -> Path:
    lines = suite_file.read_text(encoding="utf-8").splitlines()
    suite_file.write_text("\n".join(lines + [lines[1]]) + "\n", encoding="utf-8")
    return suite_file


def test_score_rejects_a_suite_with_a_repeated_pair_id(suite_file, tmp_path, capsys, model_spec):
    _dup_suite(suite_file)
    out = tmp_path / "results.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{suite_file}:4", "already appears on line 2")


@pytest.mark.parametrize("command", [["show"], ["gate", "--limit", "negation.violation <= 1"], ["compare", None]])
def test_show_gate_compare_reject_a_results_file_with_a_repeated_id(results_file, tmp_path, capsys, command):
    lines = results_file.read_text(encoding="utf-8").splitlines()
    dup = tmp_path / "dup.jsonl"
    dup.write_text("\n".join(lines + [lines[1]]) + "\n", encoding="utf-8")
    args = [command[0], dup] + [x if x is not None else dup for x in command[1:]]
    code, _, err = run(args, capsys)
    assert_clean_failure(code, err, None, f"{dup}:3", "already appears on line 2")


@pytest.mark.parametrize("how", ["sys.exit(0)", "sys.exit('model crashed: no GPU')", "raise KeyboardInterrupt"])
def test_audit_with_limits_fails_when_the_model_exits(corpus, tmp_path, capsys, monkeypatch, how):
    module = f"fe_exiting_model_{abs(hash(how))}"  # one module per case: imports are cached
    (tmp_path / f"{module}.py").write_text(f"import sys\ndef predict(texts):\n    {how}\n", encoding="utf-8")
    monkeypatch.syspath_prepend(str(tmp_path))
    out = tmp_path / "audit"
    code, _, err = run(["audit", corpus, "--model", f"{module}:predict", "--out-dir", out,
                        "--limit", "negation.violation <= 0.5"], capsys)
    assert code == 2, err
    assert "Traceback" not in err
    if "crashed" in how:
        assert "model crashed: no GPU" in err
    assert not (out / "results.jsonl").exists()


def test_score_checks_the_output_folder_before_predicting(suite_file, tmp_path, capsys, monkeypatch):
    calls = tmp_path / "calls.txt"
    (tmp_path / "fe_counting_model.py").write_text(
        f"def predict(texts):\n    open({str(calls)!r}, 'a').write('called\\n')\n    return ['positive'] * len(texts)\n",
        encoding="utf-8",
    )
    monkeypatch.syspath_prepend(str(tmp_path))
    locked = _unwritable_folder(tmp_path)
    out = locked / "results.jsonl"
    code, _, err = run(["score", suite_file, "--model", "fe_counting_model:predict", "-o", out], capsys)
    assert_clean_failure(code, err, None, f"-o {out}", "cannot write in folder")
    assert not calls.exists(), "the model ran although the results could never be written"


def test_build_checks_the_output_folder_before_parsing(corpus, tmp_path, capsys):
    out = _unwritable_folder(tmp_path) / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, None, f"-o {out}", "cannot write in folder")


def test_show_checks_export_folders_before_reading(results_file, tmp_path, capsys):
    out = _unwritable_folder(tmp_path) / "report.html"
    code, _, err = run(["show", results_file, "--html", out], capsys)
    assert_clean_failure(code, err, None, f"--html {out}", "cannot write in folder")


def test_audit_and_demo_name_an_out_dir_they_cannot_create(corpus, tmp_path, capsys, model_spec):
    out = _unwritable_folder(tmp_path) / "new"
    code, _, err = run(["audit", corpus, "--model", model_spec, "--out-dir", out], capsys)
    assert_clean_failure(code, err, None, f"--out-dir {out}", "cannot create the folder")
    code, _, err = run(["demo", "--out-dir", out], capsys)
    assert_clean_failure(code, err, None, f"--out-dir {out}", "cannot create the folder")


def test_rerun_of_audit_on_its_out_dir_names_out_dir_not_o(corpus, tmp_path, capsys, model_spec):
    out = tmp_path / "audit"
    code, _, err = run(["audit", corpus, "--model", model_spec, "--out-dir", out], capsys)
    assert code == 0, err
    before = (out / "results.jsonl").read_bytes()
    code, _, err = run(["audit", corpus, "--model", model_spec, "--out-dir", out], capsys)
    line = assert_clean_failure(code, err, None, "--out-dir", "already exists", "--force", "another --out-dir")
    assert "-o " not in line
    assert (out / "results.jsonl").read_bytes() == before
    code, _, err = run(["audit", corpus, "--model", model_spec, "--out-dir", out, "--force"], capsys)
    assert code == 0, err


def test_a_full_disk_is_named_with_the_path_and_leaves_nothing(results_file, tmp_path, capsys, monkeypatch):
    import errno
    import os

    real_fsync = os.fsync

    def full(fd):  # what a full disk does to the last flush of a file
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(os, "fsync", full)
    out = tmp_path / "summary.json"
    code, _, err = run(["show", results_file, "--json", out], capsys)
    monkeypatch.setattr(os, "fsync", real_fsync)
    assert_clean_failure(code, err, out, str(out), "no space left on device")


@pytest.mark.parametrize("args, needle", [
    (["build", "{corpus}", "-o", "{out}", "--workers", "0"], "--workers 0"),
    (["build", "{corpus}", "-o", "{out}", "--workers", "-3"], "--workers -3"),
    (["build", "{corpus}", "-o", "{out}", "--max-per-rule", "0"], "--max-per-rule 0"),
    (["show", "{results}", "--examples", "-1"], "--examples -1"),
    (["compare", "{results}", "{results}", "--examples", "-1"], "--examples -1"),
])
def test_counts_below_their_minimum_are_refused(corpus, results_file, tmp_path, capsys, args, needle):
    out = tmp_path / "suite.jsonl"
    filled = [a.format(corpus=corpus, out=out, results=results_file) for a in args]
    code, _, err = run(filled, capsys)
    assert_clean_failure(code, err, out, needle, "expected")


def test_show_limit_keeps_the_caret_under_the_bad_token(results_file, capsys):
    code, _, err = run(["show", results_file, "--limit", "negation.violation <== 0.1"], capsys)
    assert code == 2
    lines = err.splitlines()
    assert len(lines) == 3, err
    caret = lines[2].index("^")
    assert lines[1][caret] == "=", err  # the caret stands under the stray "="


def test_gate_names_a_malformed_pyproject_instead_of_no_limits(results_file, tmp_path, capsys, monkeypatch):
    (tmp_path / "pyproject.toml").write_text("[tool.pairflip.gate\nlimits = [\n", encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    code, _, err = run(["gate", results_file], capsys)
    line = assert_clean_failure(code, err, None, "pyproject.toml", "not valid TOML")
    assert "no limits" not in line


def test_score_refuses_the_suite_as_its_cache(suite_file, tmp_path, capsys, model_spec):
    before = suite_file.read_bytes()
    out = tmp_path / "results.jsonl"
    code, _, err = run(["score", suite_file, "--model", model_spec, "-o", out, "--cache", suite_file], capsys)
    assert_clean_failure(code, err, out, f"--cache {suite_file}", "suite file itself")
    assert suite_file.read_bytes() == before


@pytest.mark.parametrize("option, value", [("--timeout", "inf"), ("--batch-size", "0"), ("--retries", "-1")])
def test_audit_checks_run_options_before_building(corpus, tmp_path, capsys, model_spec, option, value):
    out = tmp_path / "audit"
    code, _, err = run(["audit", corpus, "--model", model_spec, "--out-dir", out, option, value], capsys)
    assert_clean_failure(code, err, None, option)
    assert not (out / "suite.jsonl").exists()
