"""The gate: limit grammar, TOML limits, --on, unknown targets, diagnostic rules, baseline, CLI."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from pairflip.files import write_results
from pairflip.records import PairflipError, Results, Verdict
from pairflip.report.gate import Limit, parse_limit, read_limits_file, run_gate
from pairflip.report.gate_view import gate_text
from pairflip.report.stats import wilson_interval

# --------------------------------------------------------------------------- grammar


@pytest.mark.parametrize(
    "text,target,metric,op,value",
    [
        ("negation.violation <= 0.10", "negation", "violation", "<=", 0.10),
        ("negation.violation<=0.1", "negation", "violation", "<=", 0.1),
        ("negation.violation < 10%", "negation", "violation", "<", 0.10),
        ("negation/copula.violation >= .5", "negation/copula", "violation", ">=", 0.5),
        ("reorder/shuffle.flip > 2.5%", "reorder/shuffle", "flip", ">", 0.025),
        ("double-negation.flip <= 1", "double-negation", "flip", "<=", 1.0),
        ("  intensifier/amplify.violation   <   0  ", "intensifier/amplify", "violation", "<", 0.0),
        ("negation/do-support.flip >= 100%", "negation/do-support", "flip", ">=", 1.0),
        ("negation.flip<=5.%", "negation", "flip", "<=", 0.05),
    ],
)
def test_valid_limits(text, target, metric, op, value):
    lim = parse_limit(text)
    assert (lim.target, lim.metric, lim.op) == (target, metric, op)
    assert lim.value == pytest.approx(value)
    assert lim.text == text.strip()


def test_ops_compare_as_written():
    assert Limit("n", "flip", "<=", 0.1, "").holds(0.1) and not Limit("n", "flip", "<", 0.1, "").holds(0.1)
    assert Limit("n", "flip", ">=", 0.1, "").holds(0.1) and not Limit("n", "flip", ">", 0.1, "").holds(0.1)
    assert Limit("n", "flip", ">", 0.1, "").holds(0.2) and not Limit("n", "flip", "<", 0.1, "").holds(0.2)


@pytest.mark.parametrize(
    "text,column,words",
    [
        ("negation.violations <= 0.1", 10, "expected flip or violation, got 'violations'"),
        ("negation violation <= 0.1", 10, "expected '.'"),
        ("negation.violation = 0.1", 20, "unexpected character '='"),
        ("negation.violation == 0.1", 20, "unexpected character '='"),
        ("negation.violation <= abc", 23, "expected a number"),
        ("negation.violation <= 0.1 extra", 27, "expected the end of the limit"),
        ("negation.violation <= 1.5", 23, "a rate must lie in [0, 1]"),
        ("negation.violation <= 150%", 23, "a rate must lie in [0, 1]"),
        ("negation.violation <= -0.1", 23, "a rate cannot be negative"),
        ("negation.violation <=", 22, "expected a number"),
        ("negation.violation 0.1", 20, "expected one of <=, <, >=, >"),
        ("<= 0.1", 1, "expected a family name"),
        ("negation/.flip <= 0.1", 10, "expected a rule name after 'negation/'"),
        ("negation.violation <= 0.1;", 26, "unexpected character ';'"),
        ("", 1, "expected a family name"),
        ("negation.violation <= eval('1')", 23, "expected a number"),
    ],
)
def test_malformed_limits_point_at_the_bad_token(text, column, words):
    with pytest.raises(PairflipError) as ei:
        parse_limit(text)
    msg = str(ei.value)
    assert words in msg
    assert f"at column {column}" in msg
    lines = msg.splitlines()
    # the limit is echoed and a caret sits under the bad token (two spaces of indent each)
    assert lines[1] == "  " + text
    assert lines[2] == "  " + " " * (column - 1) + "^"


# --------------------------------------------------------------------------- results to gate


def V(i, family="negation", rule="negation/copula", should="flip", violated=False, flipped=True, verdict=None,
      src=None):
    sp = "positive"
    vp = "negative" if flipped else "positive"
    return Verdict(id=f"p{i}", source_pred=sp, variant_pred=vp,
                   verdict=verdict or ("violation" if violated else "ok"), family=family, rule=rule,
                   should=should, source=f"text {i}", variant=f"variant {i}", source_id=src or f"s{i}")


def R(verdicts, sha="a" * 64, name="toy"):
    return Results(header={"suite": {"sha256": sha}, "model": {"name": name}, "labels": {}}, verdicts=list(verdicts))


def _results(neg_viol=3, neg_n=20, shuffle_flips=2, shuffle_n=10, sha="a" * 64, name="toy"):
    vs = [V(i, violated=i < neg_viol, flipped=not i < neg_viol) for i in range(neg_n)]
    vs += [V(100 + i, family="reorder", rule="reorder/shuffle", should="none", flipped=i < shuffle_flips)
           for i in range(shuffle_n)]
    vs += [V(200 + i, family="reorder", rule="reorder/coordination", should="hold", flipped=False)
           for i in range(5)]
    return R(vs, sha=sha, name=name)


def test_point_upper_lower():
    res = _results(neg_viol=3, neg_n=20)  # 15 % violations
    lo, hi = wilson_interval(3, 20)
    out = run_gate(res, ["negation.violation <= 0.2"])
    assert out.passed and out.limits[0].value == pytest.approx(0.15)
    up = run_gate(res, ["negation.violation <= 0.2"], on="upper")
    assert not up.passed and up.limits[0].value == pytest.approx(hi)
    assert up.limits[0].by == pytest.approx(hi - 0.2)
    low = run_gate(res, ["negation.violation <= 0.02"], on="lower")
    assert low.limits[0].value == pytest.approx(lo) and low.passed == (lo <= 0.02)
    assert run_gate(res, ["negation.violation >= 10%"]).passed
    assert not run_gate(res, ["negation.violation > 15%"]).passed
    assert run_gate(res, ["negation.violation >= 15%"]).passed


def test_rule_level_and_flip_limits():
    res = _results()
    out = run_gate(res, ["reorder/shuffle.flip <= 20%", "reorder/coordination.violation <= 0", "reorder.flip < 0.2"])
    assert [o.passed for o in out.limits] == [True, True, True]
    assert out.limits[0].value == pytest.approx(0.2)
    # the family's flip rate leaves out the diagnostic shuffle pairs: 0 flips in 5 coordination pairs
    assert out.limits[2].value == pytest.approx(0.0)
    bad = run_gate(res, ["reorder/shuffle.flip < 20%"])
    assert not bad.passed


def test_unknown_family_or_rule_is_an_error():
    res = _results()
    with pytest.raises(PairflipError, match=r"no family 'intensifier' in the results \(the families are negation, reorder\)"):
        run_gate(res, ["intensifier.violation <= 0.1"])
    with pytest.raises(PairflipError, match="no rule 'negation/modal'.*negation/copula"):
        run_gate(res, ["negation/modal.violation <= 0.1"])
    with pytest.raises(PairflipError, match="no family 'negatoin'"):
        run_gate(res, ["negation.violation <= 0.5", "negatoin.violation <= 0.1"])


def test_violation_limit_on_a_diagnostic_rule_is_an_error():
    res = _results()
    with pytest.raises(PairflipError, match=r"reorder/shuffle is a diagnostic rule \(should: none\).*no violations.*reorder/shuffle.flip"):
        run_gate(res, ["reorder/shuffle.violation <= 0.1"])
    only_shuffle = R([V(i, family="reorder", rule="reorder/shuffle", should="none") for i in range(4)])
    with pytest.raises(PairflipError, match="every rule of reorder .* is diagnostic"):
        run_gate(only_shuffle, ["reorder.violation <= 0.1"])
    # a family with one real rule takes a violation limit; its rate leaves the none rule out
    out = run_gate(_results(), ["reorder.violation <= 0"])
    assert out.passed and out.limits[0].count == 5


def test_all_na_group_fails_with_a_reason():
    res = R([V(i, verdict="n/a", flipped=False) for i in range(4)])
    out = run_gate(res, ["negation.violation <= 0.5"])
    assert not out.passed
    assert "no applicable pairs (4 n/a)" in out.limits[0].note
    assert "no applicable pairs" in gate_text(out)


def test_no_limits_is_an_error():
    with pytest.raises(PairflipError, match="no limits given"):
        run_gate(_results(), [])
    with pytest.raises(PairflipError, match="--on 'middle'"):
        run_gate(_results(), ["negation.flip <= 1"], on="middle")


def test_table_says_which_limit_failed_and_by_how_much():
    res = _results(neg_viol=6, neg_n=20)  # 30 %
    out = run_gate(res, ["negation.violation <= 0.10", "reorder/shuffle.flip <= 50%"])
    text = gate_text(out)
    assert "negation.violation <= 0.10" in text
    assert "FAIL, 20.0 pts over" in text and "30.0%" in text
    assert "pass" in text
    assert "gate FAILED: 1 of 2 limits crossed" in text
    assert "\x1b[" not in text  # plain text


@pytest.mark.parametrize("on", ["point", "upper", "lower"])
def test_a_limit_never_wraps_mid_expression_at_80_columns(on):
    res = _results(neg_viol=6, neg_n=20)
    limits = ["negation/copula.violation <= 0.10", "reorder/shuffle.flip <= 50%"]
    text = gate_text(run_gate(res, limits, on=on), width=80)
    for limit in limits:
        assert limit in text, text
    assert max(len(line) for line in text.splitlines()) <= 80
    # The heading says what is judged in words, not "judged on the point estimate (Wilson)".
    words = {"point": "judged on the observed rate", "upper": "upper bound", "lower": "lower bound"}[on]
    assert words in " ".join(text.split()) and "95% intervals: Wilson" in " ".join(text.split())


# --------------------------------------------------------------------------- TOML


def test_limits_from_pyproject_table(tmp_path):
    p = tmp_path / "pyproject.toml"
    p.write_text('[project]\nname = "x"\n\n[tool.pairflip.gate]\nlimits = [\n  "negation.violation <= 0.10",\n'
                 '  "reorder/shuffle.flip < 20%",\n]\non = "upper"\nalpha = 0.01\n', encoding="utf-8")
    lf = read_limits_file(p)
    assert [x.text for x in lf.limits] == ["negation.violation <= 0.10", "reorder/shuffle.flip < 20%"]
    assert lf.on == "upper" and lf.alpha == 0.01
    res = _results(neg_viol=1, neg_n=40, shuffle_flips=1)
    out = run_gate(res, [], limits_file=p)
    assert out.on == "upper" and out.alpha == 0.01
    assert len(out.limits) == 2
    # the argument wins over the file's setting; limits from both are checked
    out = run_gate(res, ["negation.flip >= 0.5"], limits_file=p, on="point")
    assert out.on == "point" and len(out.limits) == 3 and out.passed


def test_limits_file_top_level_and_errors(tmp_path):
    p = tmp_path / "limits.toml"
    p.write_text('limits = ["negation.violation <= 0.5"]\n', encoding="utf-8")
    assert read_limits_file(p).limits[0].value == 0.5
    bad = tmp_path / "bad.toml"
    bad.write_text('[tool.pairflip.gate]\nlimits = ["negation.violation <= 0.1", "negation.violatoin <= 1"]\n')
    with pytest.raises(PairflipError) as ei:
        read_limits_file(bad)
    assert str(bad) in str(ei.value) and "limits[1]" in str(ei.value) and "column 10" in str(ei.value)
    bad.write_text('[tool.pairflip.gate]\nlimit = ["negation.violation <= 0.1"]\n')
    with pytest.raises(PairflipError, match="unknown key 'limit'; the keys are limits, on, alpha"):
        read_limits_file(bad)
    bad.write_text('[tool.pairflip.gate]\nlimits = [0.1]\n')
    with pytest.raises(PairflipError, match=r"limits\[0\] must be a string"):
        read_limits_file(bad)
    bad.write_text('[tool.pairflip.gate]\nlimits = ["negation.flip < 1"]\non = "top"\n')
    with pytest.raises(PairflipError, match="on = 'top'"):
        read_limits_file(bad)
    bad.write_text('[tool.pairflip.gate\nlimits = 1\n')
    with pytest.raises(PairflipError, match="not valid TOML"):
        read_limits_file(bad)
    bad.write_text('[project]\nname = "x"\n')
    with pytest.raises(PairflipError, match=r"no \[tool.pairflip.gate\] table"):
        read_limits_file(bad)
    with pytest.raises(PairflipError, match="no such file"):
        read_limits_file(tmp_path / "missing.toml")


# --------------------------------------------------------------------------- baseline


def test_baseline_regression_fails_the_gate():
    old = _results(neg_viol=2, neg_n=60, name="old")
    worse = _results(neg_viol=20, neg_n=60, name="new")  # 18 more violations on the same pairs
    out = run_gate(worse, ["negation.violation <= 0.5"], baseline=old)
    assert out.limits[0].passed  # the limit alone would pass
    assert not out.passed
    assert [r.family for r in out.regressed] == ["negation"]
    fc = out.regressed[0].comparison
    assert (fc.only_old, fc.only_new, fc.both) == (0, 18, 2)
    # exact McNemar on 0 vs 18 discordant pairs: 2 * 0.5**18; with two families tested, Holm
    # doubles the smaller p-value (statsmodels' multipletests agrees; see test_compare.py)
    assert fc.p_value == pytest.approx(2 * 0.5**18)
    assert fc.p_holm == pytest.approx(2 * 2 * 0.5**18)
    text = gate_text(out)
    assert "18 more violations" in text and "gate FAILED" in text and "1 family regressed: negation" in text


def test_baseline_small_change_is_not_a_regression():
    old = _results(neg_viol=2, neg_n=60)
    new = _results(neg_viol=3, neg_n=60)
    out = run_gate(new, [], baseline=old)
    assert out.passed and out.regressions and not out.regressed
    assert "worse, not significant" in gate_text(out)
    # a looser alpha does not make 1 discordant pair significant (p = 1.0)
    assert run_gate(new, [], baseline=old, alpha=0.5).passed


def test_baseline_improvement_passes():
    old = _results(neg_viol=20, neg_n=60)
    new = _results(neg_viol=2, neg_n=60)
    out = run_gate(new, [], baseline=old)
    assert out.passed and out.regressions[0].comparison.direction == "better"


def test_baseline_on_another_suite_is_an_error():
    with pytest.raises(PairflipError, match="not made on the same suite.*" + "a" * 64 + ".*" + "b" * 64):
        run_gate(_results(sha="b" * 64), [], baseline=_results(sha="a" * 64))


# --------------------------------------------------------------------------- CLI


def _cli(args, cwd=None, monkeypatch=None):
    from typer.testing import CliRunner

    from pairflip.cli import app

    # a wide console, as in a CI log viewer, so table cells are not wrapped mid-limit
    return CliRunner().invoke(app, args, env={"COLUMNS": "150"})


def test_cli_gate_exit_codes(tmp_path, monkeypatch):
    path = tmp_path / "results.jsonl"
    write_results(_results(neg_viol=6, neg_n=20), path)
    ok = _cli(["gate", str(path), "--limit", "negation.violation <= 0.5"])
    assert ok.exit_code == 0, ok.output
    assert "gate passed" in ok.output
    failed = _cli(["gate", str(path), "--limit", "negation.violation <= 0.1", "-l", "reorder/shuffle.flip <= 1"])
    assert failed.exit_code == 1
    assert "FAIL" in failed.output and "negation.violation <= 0.1" in failed.output
    bad = _cli(["gate", str(path), "--limit", "negation.violation =< 0.1"])
    assert bad.exit_code == 2 and "column 20" in bad.output
    unknown = _cli(["gate", str(path), "--limit", "intensifier.violation <= 0.1"])
    assert unknown.exit_code == 2 and "no family 'intensifier'" in unknown.output
    upper = _cli(["gate", str(path), "--limit", "negation.violation <= 0.4", "--on", "upper"])
    assert upper.exit_code == 1  # 30 % of 20: the Wilson upper bound is above 40 %


def test_cli_gate_reads_pyproject_in_the_current_folder(tmp_path, monkeypatch):
    path = tmp_path / "results.jsonl"
    write_results(_results(neg_viol=6, neg_n=20), path)
    (tmp_path / "pyproject.toml").write_text('[tool.pairflip.gate]\nlimits = ["negation.violation <= 0.1"]\n')
    monkeypatch.chdir(tmp_path)
    res = _cli(["gate", str(path)])
    assert res.exit_code == 1 and "negation.violation <= 0.1" in res.output
    (tmp_path / "pyproject.toml").write_text('[project]\nname = "x"\n')
    res = _cli(["gate", str(path)])
    assert res.exit_code == 2 and "no limits given" in res.output


def test_cli_gate_baseline(tmp_path):
    old, new = tmp_path / "old.jsonl", tmp_path / "new.jsonl"
    write_results(_results(neg_viol=2, neg_n=60, name="old"), old)
    write_results(_results(neg_viol=20, neg_n=60, name="new"), new)
    res = _cli(["gate", str(new), "--baseline", str(old)])
    assert res.exit_code == 1 and "regressed" in res.output
    res = _cli(["gate", str(old), "--baseline", str(new)])
    assert res.exit_code == 0


# --------------------------------------------------------------------------- issue 12: --cluster source


@pytest.mark.parametrize("violated, limit", [
    (False, "negation.violation <= 0.05"),  # no violation in 40 pairs: Wilson's upper bound is 8.8 %
    (True, "negation.violation >= 0.95"),   # every pair violated: Wilson's lower bound is 91.2 %
])
def test_cli_gate_cluster_source_is_never_less_cautious(tmp_path, violated, limit):
    # 8 sources of 5 pairs each. Before the fix the cluster bootstrap collapsed to a point (0 or 1),
    # so `--on upper --cluster source` (`--on lower` for a ">=" limit) passed what plain Wilson fails.
    path = tmp_path / "results.jsonl"
    vs = [V(s * 5 + j, violated=violated, flipped=not violated, src=f"src{s}") for s in range(8) for j in range(5)]
    write_results(R(vs), path)
    on = "upper" if "<=" in limit else "lower"
    plain = _cli(["gate", str(path), "--on", on, "--limit", limit])
    assert plain.exit_code == 1, plain.output
    clustered = _cli(["gate", str(path), "--on", on, "--cluster", "source", "--limit", limit])
    assert clustered.exit_code == 1, clustered.output
    assert "FAIL" in clustered.output
    # the bound judged is Wilson at the 8 sources (statsmodels' proportion_confint, method="wilson")
    from statsmodels.stats.proportion import proportion_confint

    res = run_gate(R(vs), [limit], on=on, cluster="source")
    lo, hi = proportion_confint(40 if violated else 0, 40, method="wilson")
    lo8, hi8 = proportion_confint(8 if violated else 0, 8, method="wilson")
    assert res.limits[0].value == pytest.approx(lo8 if violated else hi8, abs=1e-12)
    assert (res.limits[0].value < lo) if violated else (res.limits[0].value > hi)
