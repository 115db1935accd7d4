"""The terminal report: widths, colour rules, contents, side by side, filters, and the word diff."""

from __future__ import annotations

import io
import random
import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from rich.console import Console

from pairflip.records import PairflipError, Results, Verdict
from pairflip.report import render, summarize
from pairflip.report.diff import DEL, INS, SAME, plain, word_diff
from pairflip.report.gate import check, parse_limit

ESC = "\x1b"

# Invented review sentences of a fictional outdoor-gear shop; (family, rule, should, source, variant).
RULES = [
    ("negation", "negation/do-support", "flip", "The tent kept us dry through the storm.",
     "The tent did not keep us dry through the storm."),
    ("negation", "negation/copula", "flip", "The sleeping bag is warm enough for late autumn.",
     "The sleeping bag is not warm enough for late autumn."),
    ("double-negation", "double-negation/litotes", "hold", "The headlamp is not bad at all.",
     "The headlamp is not bad at all, honestly."),
    ("intensifier", "intensifier/amplify", "strengthen", "The boots are comfortable on long trails.",
     "The boots are extremely comfortable on long trails."),
    ("intensifier", "intensifier/soften", "weaken", "The jacket is heavy for a summer hike.",
     "The jacket is slightly heavy for a summer hike."),
    ("reorder", "reorder/coordination", "hold", "The poles are light and the grips are soft.",
     "The grips are soft and the poles are light."),
    ("reorder", "reorder/shuffle", "none", "The rain cover fits the pack snugly.",
     "Snugly the rain cover fits the pack."),
]
FAMILIES = ["negation", "double-negation", "intensifier", "reorder"]
MODELS = ["unigram", "bigram", "deep-bow"]


def make_results(name: str = "unigram", seed: int = 0, p_violation: float = 0.25, n: int = 24,
                 gold: bool = True) -> Results:
    """Verdict records made here (not by a model), with scores, n/a verdicts and gold labels."""
    rng = random.Random(seed)
    vs = []
    for fam, rule, should, src, var in RULES:
        for i in range(n):
            s = rng.uniform(0.2, 0.95) * (1 if rng.random() < 0.6 else -1)
            bad = rng.random() < p_violation and should != "none"
            t = (s * 0.8 if bad else -s * 0.8) if should == "flip" else (-s if bad else s)
            verdict = "violation" if bad else "ok"
            if should == "flip" and i % 11 == 5:
                verdict = "n/a"
            vs.append(Verdict(
                id=f"{name}-{rule}-{i}", source_pred="positive" if s > 0 else "negative",
                variant_pred="positive" if t > 0 else "negative", verdict=verdict,
                source_score=s, variant_score=t, family=fam, rule=rule, should=should,
                source=src, variant=var, source_id=f"{fam}-{i % 9}",
                label=(("positive" if rng.random() < 0.5 else "negative") if gold and i % 4 else None)))
    header = {"kind": "pairflip-results", "version": 1, "created": "2025-03-04T10:20:30+00:00",
              "suite": {"sha256": "ab12" * 16, "path": "gear-suite.jsonl", "generator": {"seed": 3}},
              "model": {"name": name, "spec": f"models/{name}.joblib"},
              "labels": {"order": ["negative", "positive"], "polarity": {"negative": -1, "positive": 1},
                         "source": "recognised"},
              "margin": 0.0, "texts_predicted": 2 * len(RULES)}
    return Results(header=header, verdicts=vs)


def summaries(k: int = 1):
    return [summarize(make_results(m, seed=i, p_violation=0.15 + 0.1 * i)) for i, m in enumerate(MODELS[:k])]


def draw(items, width: int, *, terminal: bool = False, **kw) -> str:
    buf = io.StringIO()
    console = Console(file=buf, width=width, force_terminal=terminal, color_system="truecolor" if terminal else None)
    render(items, console, **kw)
    return buf.getvalue()


def strip_ansi(text: str) -> str:
    return re.sub(r"\x1b\[[0-9;]*m", "", text)


def assert_fits(text: str, width: int) -> None:
    from rich.cells import cell_len

    long = [line for line in strip_ansi(text).splitlines() if cell_len(line) > width]
    assert not long, f"{len(long)} lines longer than {width}: {long[:2]}"


# --------------------------------------------------------------------------- one model


@pytest.mark.parametrize("width", [80, 100, 120, 200])
def test_single_report_fits_and_holds_every_family(width: int) -> None:
    s = summaries(1)[0]
    out = draw(s, width)
    assert_fits(out, width)
    for fam in FAMILIES:
        assert re.search(rf"^{re.escape(fam)}\s", out, re.M), f"no table row for {fam}"
        assert f"worst examples · {fam}" in out or fam == "reorder" and s.families[fam].violations == 0
    for rule in ("do-support", "copula", "amplify", "soften", "coordination", "shuffle"):
        assert re.search(rf"^  {rule}\s", out, re.M), rule
    assert "unigram" in out and "gear-suite.jsonl" in out and "seed 3" in out
    assert "accuracy" in out and "by source label" in out
    assert ESC not in out  # not a terminal: no escape codes at all


def test_rendered_numbers_are_the_summary_numbers_and_match_statsmodels_wilson() -> None:
    s = summaries(1)[0]
    out = draw(s, 120)
    # External reference: statsmodels.stats.proportion.proportion_confint(count, nobs, method="wilson")
    # (Wilson 1927 score interval, as documented in statsmodels).
    from statsmodels.stats.proportion import proportion_confint

    for fam in FAMILIES:
        g = s.families[fam]
        if not g.applicable:
            continue
        lo, hi = proportion_confint(g.violations, g.applicable, alpha=0.05, method="wilson")
        row = next(line for line in out.splitlines() if line.startswith(fam + " "))
        assert f"{100 * lo:.1f}–{100 * hi:.1f}" in row, (fam, row)
        assert f" {100 * g.violations / g.applicable:.1f} " in row
        assert f" {g.pairs} " in row


def test_bar_draws_the_interval_from_data() -> None:
    from pairflip.report.terminal import UNICODE, bar

    b = bar(0.25, (0.10, 0.50), 20, UNICODE).plain
    assert len(b) == 20
    assert b == "██" + "▓▓▓" + "░" * 5 + "·" * 10
    assert bar(0.0, (0.0, 0.0), 10, UNICODE).plain == "·" * 10
    tiny = bar(0.004, (0.001, 0.02), 10, UNICODE).plain
    assert tiny.startswith("▓") and len(tiny) == 10  # a rate above 0 never vanishes


def test_no_color_env_means_no_escape_codes_on_a_terminal(monkeypatch: pytest.MonkeyPatch) -> None:
    s = summaries(1)[0]
    coloured = draw(s, 100, terminal=True)
    assert ESC in coloured  # the check below can fail: a terminal console does colour
    assert_fits(coloured, 100)
    monkeypatch.setenv("NO_COLOR", "1")
    plain_out = draw(s, 100, terminal=True)
    assert ESC not in plain_out
    assert strip_ansi(coloured) == plain_out  # colour is decoration only; the text is the same


def test_diff_markers_read_without_colour() -> None:
    s = summaries(1)[0]
    out = draw(s, 80)
    assert "[+not+]" in out or "[-kept-] [+did not keep+]" in out
    assert "source positive (+" in out or "source negative (-" in out


def test_family_filter_and_examples_count() -> None:
    s = summaries(1)[0]
    out = draw(s, 100, families=["intensifier"], examples=1)
    assert "intensifier" in out and "negation" not in out and "reorder" not in out
    assert "worst examples · intensifier" in out
    assert "\n   1. " not in out and len(re.findall(r"^1\. ", out, re.M)) == 1
    assert not re.search(r"^2\. ", out, re.M)
    none = draw(s, 100, examples=0)
    assert "worst examples" not in none


def test_unknown_family_is_a_clear_error() -> None:
    with pytest.raises(PairflipError, match=r"--family negaton: not in the results; the families are negation"):
        draw(summaries(1)[0], 80, families=["negaton"])


def test_gate_marks_rows_and_ends_with_the_verdict() -> None:
    s = summaries(1)[0]
    lims = [parse_limit("negation.violation <= 0.01"), parse_limit("intensifier/soften.violation <= 0.99")]
    out = draw(s, 80, gate=[check(s, lims)])
    assert_fits(out, 80)
    neg = next(line for line in out.splitlines() if line.startswith("negation "))
    assert neg.rstrip().endswith("✗ FAIL")
    soften = next(line for line in out.splitlines() if line.startswith("  soften "))
    assert soften.rstrip().endswith("✓ pass")
    assert out.rstrip().splitlines()[-1].strip() == "gate: 1 of 2 limits crossed"


def test_results_without_scores_or_gold_labels() -> None:
    r = make_results(gold=False)
    for v in r.verdicts:
        v.source_score = v.variant_score = None
    s = summarize(r)
    out = draw(s, 80)
    assert_fits(out, 80)
    assert "accuracy" not in out and "(n/a)" in out


def test_ascii_console_gets_ascii_bars() -> None:
    s = summaries(1)[0]
    buf = io.TextIOWrapper(io.BytesIO(), encoding="ascii", errors="strict")
    console = Console(file=buf, width=80, color_system=None)
    render(s, console)  # would raise UnicodeEncodeError on a block character
    buf.flush()
    text = buf.buffer.getvalue().decode("ascii")
    assert "#" in text and "FAIL" not in text


# --------------------------------------------------------------------------- side by side


@pytest.mark.parametrize("width", [80, 120, 160])
def test_three_models_side_by_side(width: int) -> None:
    items = summaries(3)
    lims = [parse_limit("negation.violation <= 0.2")]
    out = draw(items, width, gate=[check(s, lims) for s in items], examples=1)
    assert_fits(out, width)
    assert "3 models side by side" in out
    for m in MODELS:
        assert m in out
        assert f"{m}: " in out  # each model's worst examples
    for fam in FAMILIES:
        assert re.search(rf"^{re.escape(fam)}\s", out, re.M), fam


def test_side_by_side_picks_column_groups_when_wide_and_stacks_when_narrow() -> None:
    items = summaries(3)
    wide = draw(items, 160)
    narrow = draw(items, 80)
    # wide: one row per family holding all three models' numbers (three column groups)
    neg = next(line for line in wide.splitlines() if line.startswith("negation "))
    assert neg.count("│") == 3
    rates = [f"{100 * s.families['negation'].violation_rate:.1f}" for s in items]
    assert all(r in neg for r in rates)
    # narrow: a row per family and model, with bars
    rows = [line for line in narrow.splitlines() if re.match(r"^(negation|should flip|)\s+(unigram|bigram|deep-bow)\s", line)]
    assert len(rows) >= 3 and all("·" in r or "█" in r or "▓" in r for r in rows[:3])


def test_different_suites_are_flagged() -> None:
    a, b = make_results("unigram"), make_results("bigram", seed=1)
    b.header["suite"] = dict(b.header["suite"], sha256="ff" * 32)
    out = draw([summarize(a), summarize(b)], 100)
    assert "different suites" in out


# --------------------------------------------------------------------------- word diff


def test_word_diff_marks_inserted_and_removed_words() -> None:
    assert plain(word_diff("The tent kept us dry.", "The tent did not keep us dry.")) == \
        "The tent [-kept-] [+did not keep+] us dry."
    assert plain(word_diff("I do not like it.", "I like it.")) == "I [-do not-] like it."
    assert plain(word_diff("I like it", "I like it a lot")) == "I like it [+a lot+]"
    assert plain(word_diff("It doesn't leak.", "It leaks.")) == "It [-doesn't leak-] [+leaks+]."
    same = word_diff("Same text here.", "Same text here.")
    assert [c.kind for c in same] == [SAME]


WORDS = st.lists(st.sampled_from(["the", "tent", "not", "is", "warm", "very", "stove", ",", ".", "don't"]),
                 min_size=0, max_size=12)


@settings(max_examples=200, deadline=None)
@given(WORDS, WORDS)
def test_word_diff_gives_back_both_texts(a: list[str], b: list[str]) -> None:
    src, var = " ".join(a), " ".join(b)
    chunks = word_diff(src, var)
    src_words = " ".join(c.text for c in chunks if c.kind in (SAME, DEL) and c.text).split()
    var_words = " ".join(c.text for c in chunks if c.kind in (SAME, INS) and c.text).split()
    assert src_words == src.split() and var_words == var.split()
