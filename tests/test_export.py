"""Exporters: JSON, JUnit XML, Markdown and HTML from the same Summary objects."""

from __future__ import annotations

import json
import random
import subprocess
import sys
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

import pytest

from pairflip.records import Results, Verdict
from pairflip.report import export, summarize
from pairflip.report.gate import check, parse_limit

# Invented review sentences of a fictional outdoor-gear shop.
RULES = [
    ("negation", "negation/do-support", "flip", "The tent kept us dry.", "The tent did not keep us dry."),
    ("negation", "negation/copula", "flip", "The mug is sturdy.", "The mug is not sturdy."),
    ("intensifier", "intensifier/amplify", "strengthen", "The boots are comfortable.", "The boots are very comfortable."),
    ("reorder", "reorder/coordination", "hold", "The poles are light and the grips are soft.",
     "The grips are soft and the poles are light."),
    ("reorder", "reorder/shuffle", "none", "The cover fits the pack.", "The pack fits the cover."),
]
FAMILIES = ["negation", "intensifier", "reorder"]


def make_results(name: str = "unigram", seed: int = 0, p: float = 0.3, n: int = 20) -> Results:
    rng = random.Random(seed)
    vs = []
    for fam, rule, should, src, var in RULES:
        for i in range(n):
            s = rng.uniform(0.2, 0.9) * (1 if rng.random() < 0.5 else -1)
            bad = rng.random() < p and should != "none"
            t = (s if bad else -s) if should == "flip" else (-s if bad else s)
            vs.append(Verdict(id=f"{rule}-{i}", source_pred="positive" if s > 0 else "negative",
                              variant_pred="positive" if t > 0 else "negative",
                              verdict="violation" if bad else "ok", source_score=s, variant_score=t,
                              family=fam, rule=rule, should=should, source=src, variant=var,
                              source_id=f"{fam}{i}", label="positive" if i % 2 else "negative"))
    header = {"kind": "pairflip-results", "version": 1, "created": "2025-03-04T10:20:30+00:00",
              "suite": {"sha256": "cd34" * 16, "path": "gear-suite.jsonl"},
              "model": {"name": name, "spec": f"{name}.joblib"},
              "labels": {"order": ["negative", "positive"], "polarity": {"negative": -1, "positive": 1}}}
    return Results(header=header, verdicts=vs)


@pytest.fixture(scope="module")
def one():
    return summarize(make_results())


@pytest.fixture(scope="module")
def three():
    return [summarize(make_results(m, seed=i, p=0.1 + 0.15 * i)) for i, m in enumerate(["unigram", "bigram", "deep-bow"])]


def limits():
    # negation is built with ~30 % violations: a 1 % limit is crossed, a 99 % limit holds
    return [parse_limit("negation.violation <= 0.01"), parse_limit("negation/copula.violation <= 0.99"),
            parse_limit("reorder/shuffle.flip <= 1.0")]


# --------------------------------------------------------------------------- JSON


def test_json_single_is_the_design_schema(one) -> None:
    doc = json.loads(export.to_json(one))
    assert doc["version"] == 1 and set(doc["families"]) == set(FAMILIES)
    neg = doc["families"]["negation"]
    for key in ("should", "pairs", "applicable", "flips", "flip_rate", "violations", "violation_rate", "ci95", "rules"):
        assert key in neg
    assert neg["violation_rate"] == pytest.approx(neg["violations"] / neg["applicable"])
    assert neg["flip_rate"] == pytest.approx(neg["flips"] / neg["pairs"])
    assert set(neg["rules"]) == {"negation/copula", "negation/do-support"}
    assert doc["model"]["name"] == "unigram" and doc["suite"]["sha256"] == "cd34" * 16
    assert "gate" not in doc
    # the ci95 is the Wilson interval: external reference statsmodels proportion_confint(method="wilson")
    from statsmodels.stats.proportion import proportion_confint

    lo, hi = proportion_confint(neg["violations"], neg["applicable"], method="wilson")
    assert neg["ci95"] == pytest.approx([lo, hi])


def test_json_list_shape_and_gate(three) -> None:
    gate = [check(s, limits()) for s in three]
    doc = json.loads(export.to_json(three, gate=gate))
    assert doc["version"] == 1 and doc["kind"] == "pairflip-summaries"
    assert [m["model"]["name"] for m in doc["models"]] == ["unigram", "bigram", "deep-bow"]
    g0 = doc["models"][0]["gate"]
    assert [x["limit"] for x in g0] == [x.text for x in limits()]
    assert g0[0]["passed"] is False and g0[0]["threshold"] == 0.01 and g0[0]["metric"] == "violation"
    assert g0[1]["passed"] is True


def test_json_flat_gate_list_for_one_summary(one) -> None:
    doc = json.loads(export.to_json(one, gate=check(one, limits())))
    assert len(doc["gate"]) == 3


# --------------------------------------------------------------------------- JUnit


def test_junit_parses_one_testcase_per_rule_and_a_failure_per_crossed_limit(one) -> None:
    root = ET.fromstring(export.to_junit(one, gate=[check(one, limits())]))
    assert root.tag == "testsuites"
    suites = {ts.get("name"): ts for ts in root.findall("testsuite")}
    assert set(suites) == set(FAMILIES)
    rule_cases = [tc for tc in root.iter("testcase") if not tc.get("name", "").startswith("limit: ")]
    assert sorted(tc.get("name") for tc in rule_cases) == sorted(r for _, r, *_ in RULES)
    for tc in rule_cases:
        assert tc.find("failure") is None
        assert "violations" in tc.findtext("system-out") or "no expectation" in tc.findtext("system-out")
        props = {p.get("name"): p.get("value") for p in tc.find("properties")}
        assert {"pairs", "violation_rate", "ci95_low", "ci95_high"} <= set(props)
    neg = suites["negation"]
    crossed = [tc for tc in neg.findall("testcase") if tc.get("name") == "limit: negation.violation <= 0.01"]
    assert len(crossed) == 1
    fail = crossed[0].find("failure")
    assert fail is not None and "limit crossed" in fail.get("message") and "<= 0.01" in fail.get("message")
    held = [tc for tc in neg.findall("testcase") if tc.get("name") == "limit: negation/copula.violation <= 0.99"]
    assert held and held[0].find("failure") is None
    assert neg.get("failures") == "1" and neg.get("tests") == "4"
    assert root.get("failures") == "1"
    shuffle_limit = [tc for tc in suites["reorder"].findall("testcase") if tc.get("name", "").startswith("limit: ")]
    assert len(shuffle_limit) == 1 and shuffle_limit[0].find("failure") is None


def test_junit_without_limits_passes_and_several_models(three) -> None:
    root = ET.fromstring(export.to_junit(three))
    assert root.get("failures") == "0"
    names = [ts.get("name") for ts in root.findall("testsuite")]
    assert len(names) == 3 * len(FAMILIES) and "deep-bow:negation" in names
    assert not list(root.iter("failure"))


def test_junit_uses_only_elements_and_attributes_pytest_itself_writes(one, tmp_path: Path) -> None:
    """External reference: pytest's own --junitxml output (the JUnit dialect CI servers read)."""
    (tmp_path / "test_probe.py").write_text(
        "def test_ok(record_property):\n    record_property('k', 'v')\n    print('out')\n"
        "def test_bad():\n    assert 0, 'boom'\n", encoding="utf-8")
    ref = tmp_path / "ref.xml"
    subprocess.run([sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", f"--junitxml={ref}",
                    "-o", "junit_family=xunit1", "-o", "junit_logging=system-out", str(tmp_path / "test_probe.py")],
                   cwd=tmp_path, capture_output=True, check=False)
    allowed: dict[str, set[str]] = {}
    for el in ET.parse(ref).getroot().iter():
        allowed.setdefault(el.tag, set()).update(el.attrib)
    ours = ET.fromstring(export.to_junit(one, gate=[check(one, limits())]))
    for el in ours.iter():
        if el.tag == "testsuites":
            continue  # pytest writes a bare <testsuites>; "name"/"tests"/"failures" on it are common practice
        assert el.tag in allowed, el.tag
        assert set(el.attrib) <= allowed[el.tag], (el.tag, set(el.attrib) - allowed[el.tag])


def test_junit_survives_control_characters(one) -> None:
    s = summarize(make_results(name="bad\x01name"))
    ET.fromstring(export.to_junit(s))


# --------------------------------------------------------------------------- Markdown


def test_markdown_table_parses_with_markdown_it(one, three) -> None:
    # External reference: markdown-it-py (a CommonMark parser; its "table" rule follows GFM tables).
    from markdown_it import MarkdownIt

    mdit = MarkdownIt("commonmark").enable(["table", "strikethrough"])
    text = export.to_markdown(one, gate=[check(one, limits())])
    toks = mdit.parse(text)
    rows = [t for t in toks if t.type == "tr_open"]
    n_rules = sum(len(one.families[f].rules) for f in FAMILIES if len(one.families[f].rules) > 1)
    assert len(rows) == 1 + len(FAMILIES) + n_rules
    assert "gate: 1 of 3 limits crossed" in text
    multi = export.to_markdown(three)
    heads = [t for t in mdit.parse(multi) if t.type == "th_open"]
    assert len(heads) == 2 + 3


def test_markdown_escapes_table_breaking_text() -> None:
    from markdown_it import MarkdownIt

    s = summarize(make_results(name="bi|gram <b>x</b>"))
    text = export.to_markdown(s)
    html_out = MarkdownIt("commonmark").enable("table").render(text)
    assert "<b>x</b>" not in html_out and "bi|gram" in html_out


# --------------------------------------------------------------------------- HTML


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.stack: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_data(self, data):
        self.text.append(data)


def _parse(page: str) -> _Collect:
    p = _Collect()
    p.feed(page)
    p.close()
    return p


def test_html_is_self_contained_with_one_bar_per_family(one) -> None:
    page = export.to_html(one, gate=[check(one, limits())])
    p = _parse(page)
    tags = [t for t, _ in p.tags]
    assert tags.count("svg") == 1
    bars = [a for t, a in p.tags if t == "rect" and "bar" in (a.get("class") or "").split()]
    assert sorted(a["data-family"] for a in bars) == sorted(FAMILIES)
    neg = next(a for a in bars if a["data-family"] == "negation")
    assert float(neg["width"]) > 0
    for t, a in p.tags:
        for key in ("src", "href"):
            v = a.get(key) or ""
            assert not v.lower().startswith(("http:", "https:", "//")), (t, key, v)
    assert "script" not in tags and "link" not in tags and "img" not in tags
    assert "http://" not in page and "https://" not in page
    assert "<del>" in page and "<ins>" in page


def test_html_three_models_has_a_bar_per_family_and_model(three) -> None:
    p = _parse(export.to_html(three))
    bars = [a for t, a in p.tags if t == "rect" and "bar" in (a.get("class") or "").split()]
    assert len(bars) == 3 * len(FAMILIES)
    assert {a["data-model"] for a in bars} == {"unigram", "bigram", "deep-bow"}


def test_html_escapes_all_text() -> None:
    r = make_results(name='<script>alert("x")</script>')
    for v in r.verdicts:
        v.source = "The <b>tent</b> & the fly"
    page = export.to_html(summarize(r))
    p = _parse(page)
    assert "script" not in [t for t, _ in p.tags]
    assert "<b>tent</b>" not in page and "&lt;b&gt;tent&lt;/b&gt;" in page and "&amp; the fly" in page
    assert '<script>alert("x")</script>' in "".join(p.text)
