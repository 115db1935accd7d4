"""compare(): discordant counts, McNemar exact and Holm against statsmodels, refusals, CLI."""

from __future__ import annotations

import json
import random

import numpy as np
import pytest

from pairflip.files import write_results
from pairflip.records import PairflipError, Results, Verdict
from pairflip.report.compare import compare
from pairflip.report.gate_view import render_comparison


def V(i, family, rule, violated, should="flip", verdict=None):
    return Verdict(id=f"{family}-{i}", source_pred="positive", variant_pred="positive" if violated else "negative",
                   verdict=verdict or ("violation" if violated else "ok"), family=family, rule=rule, should=should,
                   source=f"{family} text {i}", variant=f"{family} variant {i}", source_id=f"s{i}")


def R(vs, sha="c" * 64, name="m", path=None):
    h = {"suite": {"sha256": sha, "path": "suite.jsonl"}, "model": {"name": name}}
    if path:
        h["path"] = path
    return Results(header=h, verdicts=list(vs))


def _pair_results(seed=0):
    """Three families with known joint outcomes; returns old, new and the 2x2 tables."""
    r = random.Random(seed)
    plan = {"negation": (40, 5, 30, 10), "intensifier": (50, 9, 11, 4), "double-negation": (30, 2, 3, 1)}
    # per family: (both-ok, only_old, only_new, both violated)
    old, new, tables = [], [], {}
    for fam, (ok, oo, on, bb) in plan.items():
        cells = [(False, False)] * ok + [(True, False)] * oo + [(False, True)] * on + [(True, True)] * bb
        r.shuffle(cells)
        for i, (a, b) in enumerate(cells):
            rule = f"{fam}/r{i % 2}"
            old.append(V(i, fam, rule, a))
            new.append(V(i, fam, rule, b))
        tables[fam] = np.array([[bb, oo], [on, ok]])
    r.shuffle(new)  # order of the records does not matter, ids do
    return R(old, name="old"), R(new, name="new"), tables, plan


def test_discordant_counts_and_tests_match_statsmodels():
    # References: statsmodels.stats.contingency_tables.mcnemar(table, exact=True) (McNemar 1947)
    # and statsmodels.stats.multitest.multipletests(method="holm") (Holm 1979).
    from statsmodels.stats.contingency_tables import mcnemar
    from statsmodels.stats.multitest import multipletests

    old, new, tables, plan = _pair_results()
    comp = compare(old, new)
    fams = list(plan)
    assert list(comp.families) == fams
    for fam, (ok, oo, on, bb) in plan.items():
        fc = comp.families[fam]
        assert (fc.only_old, fc.only_new, fc.both, fc.paired, fc.pairs) == (oo, on, bb, ok + oo + on + bb, ok + oo + on + bb)
        assert fc.p_value == pytest.approx(mcnemar(tables[fam], exact=True).pvalue, rel=1e-10)
        assert sum(rc.only_new for rc in fc.rules.values()) == on
    ref = multipletests([mcnemar(tables[f], exact=True).pvalue for f in fams], method="holm")[1]
    assert [comp.families[f].p_holm for f in fams] == pytest.approx(list(ref), rel=1e-10)
    assert comp.families["negation"].direction == "worse"
    assert comp.regressions(0.05) == ["negation"]
    assert comp.families["intensifier"].regressed(0.05) is False


def test_newly_broken_examples_are_the_new_only_violations():
    old, new, _, plan = _pair_results()
    comp = compare(old, new, examples=4)
    fc = comp.families["negation"]
    assert len(fc.newly_broken) == 4
    old_by = {v.id: v for v in old.verdicts}
    new_by = {v.id: v for v in new.verdicts}
    for b in fc.newly_broken:
        assert new_by[b.id].verdict == "violation" and old_by[b.id].verdict == "ok"
        assert b.new_variant_pred == "positive" and b.old_variant_pred == "negative"


def test_to_dict_schema():
    old, new, _, _ = _pair_results()
    d = compare(old, new).to_dict()
    json.dumps(d)
    assert d["version"] == 1
    assert d["old"]["name"] == "old" and d["new"]["name"] == "new"
    f = d["families"]["negation"]
    for key in ("only_old", "only_new", "both", "p_value", "p_holm", "paired", "old_violations",
                "new_violations", "direction", "rules", "newly_broken"):
        assert key in f


def test_na_and_none_pairs_are_not_paired():
    old = R([V(0, "negation", "negation/copula", False, verdict="n/a"), V(1, "negation", "negation/copula", True),
             V(2, "reorder", "reorder/shuffle", False, should="none")])
    new = R([V(0, "negation", "negation/copula", True), V(1, "negation", "negation/copula", False),
             V(2, "reorder", "reorder/shuffle", False, should="none")])
    comp = compare(old, new)
    neg = comp.families["negation"]
    assert (neg.pairs, neg.paired, neg.only_old, neg.only_new) == (2, 1, 1, 0)
    sh = comp.families["reorder"]
    assert sh.paired == 0 and sh.p_value is None and sh.p_holm is None
    # only one family was tested, so Holm leaves its p-value as it is
    assert neg.p_holm == neg.p_value == 1.0


def test_refuses_different_suites_naming_both_hashes():
    a = R([V(0, "negation", "negation/copula", False)], sha="1" * 64, path="old.jsonl")
    b = R([V(0, "negation", "negation/copula", False)], sha="2" * 64, path="new.jsonl")
    with pytest.raises(PairflipError) as ei:
        compare(a, b)
    msg = str(ei.value)
    assert "1" * 64 in msg and "2" * 64 in msg and "old.jsonl" in msg and "new.jsonl" in msg


def test_refuses_different_pair_ids():
    a = R([V(0, "negation", "negation/copula", False), V(1, "negation", "negation/copula", False)])
    b = R([V(0, "negation", "negation/copula", False), V(2, "negation", "negation/copula", False)])
    with pytest.raises(PairflipError, match="different pairs.*negation-1.*negation-2"):
        compare(a, b)
    dup = R([V(0, "negation", "negation/copula", False), V(0, "negation", "negation/copula", False)])
    with pytest.raises(PairflipError, match="more than once"):
        compare(dup, dup)


def test_render_comparison_prints_table_and_examples():
    from rich.console import Console

    old, new, _, _ = _pair_results()
    console = Console(record=True, width=120, color_system=None)
    render_comparison(compare(old, new), console, examples=2)
    text = console.export_text()
    assert "negation" in text and "worse" in text and "newly broken" in text
    assert "negation variant" in text


def test_cli_compare_writes_json(tmp_path):
    from typer.testing import CliRunner

    from pairflip.cli import app

    old, new, _, _ = _pair_results()
    po, pn, out = tmp_path / "old.jsonl", tmp_path / "new.jsonl", tmp_path / "cmp.json"
    write_results(old, po)
    write_results(new, pn)
    res = CliRunner().invoke(app, ["compare", str(po), str(pn), "--json", str(out), "--examples", "1"])
    assert res.exit_code == 0, res.output
    d = json.loads(out.read_text())
    assert d["families"]["negation"]["only_new"] == 30
    other = R([V(0, "negation", "negation/copula", False)], sha="9" * 64)
    write_results(other, tmp_path / "other.jsonl")
    res = CliRunner().invoke(app, ["compare", str(po), str(tmp_path / "other.jsonl")])
    assert res.exit_code == 2 and "not made on the same suite" in res.output
