"""Exporters: the same Summary objects as the terminal report, written as JSON, JUnit XML,
Markdown or one self-contained HTML page. Nothing here computes a statistic.

Every function takes one :class:`~pairflip.report.summary.Summary` or a list of them, and
``gate``: None, or the gate's :class:`~pairflip.report.gate.LimitOutcome` objects — one list per
summary (a single flat list is accepted for a single summary).

JSON shapes (``show --json``):

- one results file: ``Summary.to_dict()`` — ``{"version": 1, "families": {...}, "model",
  "suite", "labels", "accuracy", "interval"}`` — plus ``"gate": [LIMIT, ...]`` when limits were
  given;
- several results files: ``{"version": 1, "kind": "pairflip-summaries", "models": [SUMMARY, ...]}``,
  each SUMMARY the single-file object above, in the order the files were given.

LIMIT is ``{"limit": "negation.violation <= 0.1", "target", "metric", "op", "threshold",
"value", "passed"}``: ``threshold`` is the limit's number, ``value`` the rate it was judged on.

JUnit XML: ``<testsuites>`` holds one ``<testsuite>`` per family (per model and family when
several summaries are given). Each rule is a ``<testcase>`` that passes and carries its numbers
in ``<properties>`` and ``<system-out>``; each gate limit is a ``<testcase>`` named
``limit: TEXT`` in its family's suite, with a ``<failure>`` when the limit is crossed.
"""

from __future__ import annotations

import html
import json
import re
import xml.etree.ElementTree as ET
from typing import Any, Sequence

from pairflip.report.diff import DEL_CLOSE, DEL_OPEN, INS_CLOSE, INS_OPEN, word_diff
from pairflip.report.diff import render as render_diff
from pairflip.report.terminal import describe_interval, header_facts, pct, short_rule, should_words, total_pairs, when
from pairflip.report.summary import SUMMARY_VERSION, Example, GroupStats, Summary, accuracy_words

MULTI_KIND = "pairflip-summaries"


# --------------------------------------------------------------------------- argument shapes


def _normalise(summary_or_list: Summary | Sequence[Summary], gate: Any) -> tuple[list[Summary], list[list[Any]] | None, bool]:
    """(summaries, one gate list per summary or None, was a single summary given)."""
    single = isinstance(summary_or_list, Summary)
    items = [summary_or_list] if single else list(summary_or_list)  # type: ignore[list-item]
    if not items:
        raise ValueError("nothing to export: no summaries given")
    if gate is None:
        return items, None, single
    gate = list(gate)
    if single and (not gate or hasattr(gate[0], "limit")):
        gate = [gate]  # a flat list of outcomes for a single summary
    if len(gate) != len(items):
        raise ValueError(f"gate needs one list of outcomes per summary: got {len(gate)} for {len(items)}")
    return items, [list(x) for x in gate], single


def _limit_dict(o: Any) -> dict[str, Any]:
    lim = o.limit
    return {"limit": lim.text, "target": lim.target, "metric": lim.metric, "op": lim.op,
            "threshold": lim.value, "value": o.value, "passed": bool(o.passed)}


def _family_of(target: str) -> str:
    return target.split("/", 1)[0]


# --------------------------------------------------------------------------- JSON


def to_json(summary_or_list: Summary | Sequence[Summary], gate: Any = None) -> str:
    """The summary (or summaries) as JSON text; see the module docstring for the shapes."""
    items, gates, single = _normalise(summary_or_list, gate)
    docs = []
    for i, s in enumerate(items):
        d = s.to_dict()
        if gates is not None:
            d["gate"] = [_limit_dict(o) for o in gates[i]]
        docs.append(d)
    doc: dict[str, Any] = docs[0] if single else {"version": SUMMARY_VERSION, "kind": MULTI_KIND, "models": docs}
    return json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


# --------------------------------------------------------------------------- JUnit XML

_XML_BAD = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")


def _x(text: Any) -> str:
    """Text XML 1.0 can hold (ElementTree escapes markup; control characters must go)."""
    return _XML_BAD.sub("\ufffd", str(text))


def _numbers(s: GroupStats) -> str:
    if s.applicable:
        viol = (f"violations {s.violations}/{s.applicable} = {pct(s.violation_rate)} % "
                f"(95 % CI {pct(s.ci95[0])}-{pct(s.ci95[1])})")
    else:
        viol = "no expectation applies (diagnostic rule or all n/a)"
    return (f"should {s.should}; {viol}; flips {s.flips}/{s.pairs} = {pct(s.flip_rate)} %; "
            f"n/a {s.not_applicable}")


def _props(parent: ET.Element, values: dict[str, Any]) -> None:
    props = ET.SubElement(parent, "properties")
    for k, v in values.items():
        ET.SubElement(props, "property", name=_x(k), value=_x(v))


def _stat_props(s: GroupStats) -> dict[str, Any]:
    return {
        "should": s.should, "pairs": s.pairs, "applicable": s.applicable, "violations": s.violations,
        "violation_rate": f"{s.violation_rate:.6f}", "ci95_low": f"{s.ci95[0]:.6f}", "ci95_high": f"{s.ci95[1]:.6f}",
        "flips": s.flips, "flip_rate": f"{s.flip_rate:.6f}", "not_applicable": s.not_applicable,
        **({"vetted": s.vetted, "rejected": s.rejected,
            "confirmed_violations": s.confirmed.violations if s.confirmed is not None else 0,
            "confirmed_applicable": s.confirmed.applicable if s.confirmed is not None else 0}
           if s.confirmed is not None or s.rejected else {}),
    }


def to_junit(summary_or_list: Summary | Sequence[Summary], gate: Any = None) -> str:
    """JUnit XML: a testsuite per family, a testcase per rule and per gate limit."""
    items, gates, _ = _normalise(summary_or_list, gate)
    many = len(items) > 1
    root = ET.Element("testsuites", name="pairflip")
    # Without limits nothing is judged: each rule's test case is marked skipped (with the reason),
    # never passed, so a CI dashboard does not show green for a model with 100 % violations.
    unjudged = gates is None or not any(gates)
    total_tests = total_fail = total_skipped = 0
    for i, s in enumerate(items):
        outs = gates[i] if gates is not None else []
        for fam, fg in s.families.items():
            suite_name = f"{s.model_name}:{fam}" if many else fam
            classname = f"pairflip.{s.model_name}.{fam}"
            ts = ET.SubElement(root, "testsuite", name=_x(suite_name))
            created = s.header.get("created")
            if created:
                ts.set("timestamp", _x(str(created)))
            _props(ts, {"model": s.model_name, "model_spec": s.model.get("spec", ""),
                        "suite_sha256": s.suite.get("sha256", ""), "interval": describe_interval(s),
                        **_stat_props(fg),
                        **({"limits": "none set: every test case is skipped; pass --limit to judge the rates"}
                           if unjudged else {})})
            n = fails = skipped = 0
            for rule, rg in fg.rules.items():
                tc = ET.SubElement(ts, "testcase", classname=_x(classname), name=_x(rule), time="0")
                _props(tc, _stat_props(rg))
                if unjudged:
                    ET.SubElement(tc, "skipped", message="no limit set: the numbers are recorded, not judged")
                    skipped += 1
                ET.SubElement(tc, "system-out").text = _x(f"{rule}: {_numbers(rg)}")
                n += 1
            for o in outs:
                if _family_of(o.limit.target) != fam:
                    continue
                tc = ET.SubElement(ts, "testcase", classname=_x(classname), name=_x(f"limit: {o.limit.text}"), time="0")
                metric = "violation rate" if o.limit.metric == "violation" else "flip rate"
                line = (f"{o.limit.target} {metric} = {o.value:.4f} ({pct(o.value)} %), "
                        f"limit {o.limit.op} {o.limit.value:g}")
                target = fg if o.limit.target == fam else fg.rules.get(o.limit.target)
                detail = line + (f"\n{o.limit.target}: {_numbers(target)}" if target is not None else "")
                if not o.passed:
                    f = ET.SubElement(tc, "failure", message=_x(f"limit crossed: {line}"))
                    f.text = _x(detail)
                    fails += 1
                else:
                    ET.SubElement(tc, "system-out").text = _x(detail)
                n += 1
            ts.set("tests", str(n))
            ts.set("failures", str(fails))
            ts.set("errors", "0")
            ts.set("skipped", str(skipped))
            ts.set("time", "0")
            total_tests += n
            total_fail += fails
            total_skipped += skipped
    root.set("tests", str(total_tests))
    root.set("failures", str(total_fail))
    root.set("errors", "0")
    root.set("skipped", str(total_skipped))
    ET.indent(root)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(root, encoding="unicode") + "\n"


# --------------------------------------------------------------------------- Markdown

_MD_SPECIAL = re.compile(r"([\\`*_{}\[\]<>|~#!&])")


def md(text: Any) -> str:
    """Escape text for a Markdown table cell or paragraph (CommonMark backslash escapes)."""
    return _MD_SPECIAL.sub(r"\\\1", str(text)).replace("\n", " ")


def _md_diff(source: str, variant: str) -> str:
    return render_diff(word_diff(source, variant), same=md, removed=lambda t: f"~~{md(t)}~~",
                       inserted=lambda t: f"**{md(t)}**")


def _md_gate(outs: list[Any] | None) -> str:
    if not outs:
        return ""
    return "✅ pass" if all(o.passed for o in outs) else "❌ **FAIL**"


def _gate_map(outs: Sequence[Any] | None) -> dict[str, list[Any]]:
    m: dict[str, list[Any]] = {}
    for o in outs or []:
        m.setdefault(o.limit.target, []).append(o)
    return m


def _viol_md(g: GroupStats) -> tuple[str, str]:
    if not g.applicable:
        return "—", ""
    return pct(g.violation_rate), f"{pct(g.ci95[0])}–{pct(g.ci95[1])}"


def to_markdown(summary_or_list: Summary | Sequence[Summary], gate: Any = None, *, examples: int = 3) -> str:
    """A compact Markdown report for a pull-request comment: one table, the gate, details folded."""
    items, gates, _ = _normalise(summary_or_list, gate)
    out: list[str] = []
    fams: dict[str, None] = {}
    for s in items:
        for f in s.families:
            fams.setdefault(f, None)
    if len(items) == 1:
        s = items[0]
        gm = _gate_map(gates[0]) if gates else {}
        out.append(f"### pairflip · {md(s.model_name)}")
        out.append("")
        out.append(" · ".join(f"{k} {md(v)}" for k, v in header_facts(s) if k in ("suite", "scored", "interval", "accuracy", "vetted")))
        out.append("")
        head = "| family | should | pairs | flip % | violation % | 95 % CI | n/a |" + (" gate |" if gates else "")
        out.append(head)
        out.append("|:--|:--|--:|--:|--:|:--|--:|" + (":--|" if gates else ""))
        for fam in fams:
            fg = s.families[fam]
            rows = [(f"**{md(fam)}**", fg, fam)] + [
                (f"{md(fam)}/{md(short_rule(r, fam))}", rg, r) for r, rg in fg.rules.items() if len(fg.rules) > 1 or r in gm]
            for name, g, target in rows:
                v, ci = _viol_md(g)
                line = f"| {name} | {md(should_words(g))} | {g.pairs} | {pct(g.flip_rate)} | {v} | {ci} | {g.not_applicable} |"
                if gates:
                    line += f" {_md_gate(gm.get(target))} |"
                out.append(line)
    else:
        gms = [_gate_map(x) for x in gates] if gates else [{} for _ in items]
        out.append(f"### pairflip · {len(items)} models")
        out.append("")
        out.append("violation % (95 % CI) per family; " + " · ".join(
            f"**{md(s.model_name)}** {total_pairs(s)} pairs" for s in items))
        out.append("")
        out.append("| family | should | " + " | ".join(md(s.model_name) for s in items) + " |")
        out.append("|:--|:--|" + "--:|" * len(items))
        for fam in fams:
            should = next((should_words(s.families[fam]) for s in items if fam in s.families), "")
            cells = []
            for s, gm in zip(items, gms):
                fg = s.families.get(fam)
                if fg is None:
                    cells.append("—")
                    continue
                v, ci = _viol_md(fg)
                cell = v + (f" ({ci})" if ci else "")
                if gm.get(fam):
                    cell += " " + ("✅" if all(o.passed for o in gm[fam]) else "❌")
                cells.append(cell)
            out.append(f"| **{md(fam)}** | {md(should)} | " + " | ".join(cells) + " |")
    if gates:
        crossed = [(s, o) for s, outs in zip(items, gates) for o in outs if not o.passed]
        total = sum(len(x) for x in gates)
        out.append("")
        if crossed:
            out.append(f"**gate: {len(crossed)} of {total} limit{'s' if total != 1 else ''} crossed**")
            out.append("")
            for s, o in crossed:
                who = f"{md(s.model_name)}: " if len(items) > 1 else ""
                out.append(f"- ❌ {who}`{o.limit.text.replace('`', '')}` — value {pct(o.value)} %")
        else:
            out.append(f"**gate: all {total} limits hold** ✅")
    if examples > 0:
        ex_lines: list[str] = []
        for s in items:
            for fam, fg in s.families.items():
                for e in fg.examples[:examples]:
                    who = f"{md(s.model_name)} · " if len(items) > 1 else ""
                    ex_lines.append(
                        f"- {who}`{e.rule}` (should {md(e.should)}): {_md_diff(e.source, e.variant)} — "
                        f"{md(e.source_pred)} → {md(e.variant_pred)}")
        if ex_lines:
            out += ["", "<details><summary>worst examples (~~removed~~, **inserted**)</summary>", ""]
            out += ex_lines
            out += ["", "</details>"]
    return "\n".join(out) + "\n"


# --------------------------------------------------------------------------- HTML

_CSS = """
:root { --ink:#1d2330; --mute:#667085; --line:#e3e6ec; --bar:#2f7dbf; --fail:#c0392b; --pass:#2e7d32;
        --del:#fde8e6; --ins:#e4f4e6; }
* { box-sizing: border-box; }
body { font: 14px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: var(--ink);
       margin: 0 auto; padding: 24px 28px 48px; max-width: 1200px; background: #fff; }
h1 { font-size: 20px; margin: 0 0 8px; } h2 { font-size: 16px; margin: 28px 0 8px; }
h3 { font-size: 14px; margin: 18px 0 6px; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 2px 16px; margin: 0 0 8px; }
dl.facts dt { color: var(--mute); } dl.facts dd { margin: 0; }
table { border-collapse: collapse; margin: 6px 0 4px; font-variant-numeric: tabular-nums; }
th, td { padding: 3px 7px; text-align: left; border-bottom: 1px solid var(--line); white-space: nowrap; }
th { font-weight: 600; border-bottom: 2px solid #c9ced8; }
td.num, th.num { text-align: right; }
tr.family td { font-weight: 600; background: #f6f7f9; }
tr.rule td:first-child { padding-left: 24px; }
th.group { text-align: center; border-left: 2px solid var(--line); }
td.first, th.first { border-left: 2px solid var(--line); }
.pass { color: var(--pass); } .fail { color: var(--fail); font-weight: 600; }
.mute { color: var(--mute); }
svg text { font: 12px system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; fill: var(--ink); }
svg .grid { stroke: var(--line); } svg .whisker { stroke: var(--ink); stroke-width: 1.5; }
svg .axis { fill: var(--mute); }
.example { margin: 8px 0 12px; padding: 8px 12px; border-left: 3px solid var(--line); }
.example .meta { color: var(--mute); font-size: 12px; }
.diff { margin: 4px 0; font-size: 15px; }
del { background: var(--del); color: #8e1b10; text-decoration: line-through; }
ins { background: var(--ins); color: #1b5e20; text-decoration: none; font-weight: 600; }
.mk { color: var(--mute); font-weight: 400; font-size: 11px; }
.warn { color: var(--fail); font-weight: 600; }
.scroll { overflow-x: auto; max-width: 100%; }
"""

PALETTE = ("#2f7dbf", "#e07b39", "#4f9d69", "#8e6bbf", "#c94f7c", "#6b7a8f")


def _e(text: Any) -> str:
    return html.escape(str(text), quote=True)


def _html_diff(source: str, variant: str) -> str:
    return render_diff(
        word_diff(source, variant), same=_e,
        removed=lambda t: f'<del><span class="mk">{_e(DEL_OPEN)}</span>{_e(t)}<span class="mk">{_e(DEL_CLOSE)}</span></del>',
        inserted=lambda t: f'<ins><span class="mk">{_e(INS_OPEN)}</span>{_e(t)}<span class="mk">{_e(INS_CLOSE)}</span></ins>',
    )


def svg_chart(items: Sequence[Summary], families: Sequence[str]) -> str:
    """Horizontal bars of the violation rate per family (one per model), with 95 % interval whiskers."""
    n = len(items)
    label_w, plot_w, right_w = 150, 560, 170  # room for "100.0 % [72.2–100.0]"
    bar_h, gap_in, gap_out, top = 16, 3, 14, 28
    legend_h = 22 if n > 1 else 0
    group_h = n * bar_h + (n - 1) * gap_in
    height = top + legend_h + len(families) * (group_h + gap_out) + 8
    width = label_w + plot_w + right_w
    x0 = label_w
    out = [f'<svg role="img" aria-label="violation rate per family with 95 % intervals" '
           f'width="{width}" height="{height}" viewBox="0 0 {width} {height}">']
    if n > 1:
        x = x0
        for i, s in enumerate(items):
            out.append(f'<rect x="{x}" y="4" width="12" height="12" fill="{PALETTE[i % len(PALETTE)]}"/>')
            out.append(f'<text x="{x + 16}" y="14">{_e(s.model_name)}</text>')
            x += 30 + 8 * len(s.model_name)
    base = top + legend_h
    plot_bottom = height - 8
    for t in range(0, 101, 25):
        gx = x0 + plot_w * t / 100
        out.append(f'<line class="grid" x1="{gx:.1f}" y1="{base - 6}" x2="{gx:.1f}" y2="{plot_bottom}"/>')
        out.append(f'<text class="axis" x="{gx:.1f}" y="{base - 10}" text-anchor="middle">{t} %</text>')
    for fi, fam in enumerate(families):
        gy = base + fi * (group_h + gap_out)
        out.append(f'<text x="{label_w - 10}" y="{gy + group_h / 2 + 4:.1f}" text-anchor="end" font-weight="600">{_e(fam)}</text>')
        for i, s in enumerate(items):
            fg = s.families.get(fam)
            y = gy + i * (bar_h + gap_in)
            colour = PALETTE[i % len(PALETTE)]
            if fg is None:
                continue
            model_attr = f' data-model="{_e(s.model_name)}"'
            if not fg.applicable:
                out.append(f'<rect class="bar none" data-family="{_e(fam)}"{model_attr} x="{x0}" y="{y}" width="0" height="{bar_h}"/>')
                out.append(f'<text class="axis" x="{x0 + 6}" y="{y + bar_h - 4}">no expectation (diagnostic)</text>')
                continue
            w = plot_w * fg.violation_rate
            lo, hi = x0 + plot_w * fg.ci95[0], x0 + plot_w * fg.ci95[1]
            cy = y + bar_h / 2
            title = (f"{s.model_name} · {fam}: {pct(fg.violation_rate)} % violations "
                     f"({fg.violations}/{fg.applicable}), 95 % CI {pct(fg.ci95[0])}–{pct(fg.ci95[1])}")
            out.append(f'<rect class="bar" data-family="{_e(fam)}"{model_attr} x="{x0}" y="{y}" width="{w:.1f}" '
                       f'height="{bar_h}" fill="{colour}" fill-opacity="0.85"><title>{_e(title)}</title></rect>')
            out.append(f'<line class="whisker" x1="{lo:.1f}" y1="{cy:.1f}" x2="{hi:.1f}" y2="{cy:.1f}"/>')
            for xx in (lo, hi):
                out.append(f'<line class="whisker" x1="{xx:.1f}" y1="{y + 3}" x2="{xx:.1f}" y2="{y + bar_h - 3}"/>')
            out.append(f'<text x="{x0 + plot_w + 8}" y="{y + bar_h - 4}">{pct(fg.violation_rate)} % '
                       f'<tspan class="axis">[{pct(fg.ci95[0])}–{pct(fg.ci95[1])}]</tspan></text>')
    out.append("</svg>")
    return "\n".join(out)


def _html_gate_cell(outs: list[Any] | None) -> str:
    if not outs:
        return "<td></td>"
    if all(o.passed for o in outs):
        return '<td class="pass">✓ pass</td>'
    return '<td class="fail">✗ FAIL</td>'


def _html_stats(g: GroupStats | None, many: bool = False) -> str:
    """pairs, flip %, violation %, CI, n/a cells; several models: violation %, CI, flip % only."""
    cls = ' first' if many else ''
    if g is None:
        return f'<td class="num{cls}">—</td><td></td><td class="num">—</td>' + ("" if many else '<td></td><td></td>')
    if g.applicable:
        v = f'<td class="num{cls}">{pct(g.violation_rate)}</td><td class="mute">{pct(g.ci95[0])}–{pct(g.ci95[1])}</td>'
    else:
        v = f'<td class="num{cls}">—</td><td class="mute">no expectation</td>'
    if many:
        return f'{v}<td class="num">{pct(g.flip_rate)}</td>'
    return f'<td class="num">{g.pairs}</td><td class="num">{pct(g.flip_rate)}</td>{v}<td class="num">{g.not_applicable}</td>'


def _html_table(items: Sequence[Summary], families: Sequence[str], gates: list[list[Any]] | None) -> str:
    gms = [_gate_map(x) for x in gates] if gates else [{} for _ in items]
    many = len(items) > 1
    cols = ["viol %", "95 % CI", "flip %"] if many else ["pairs", "flip %", "violation %", "95 % CI", "n/a"]
    h = ['<div class="scroll"><table>', "<thead>"]
    if many:
        h.append("<tr><th></th><th></th>" + "".join(
            f'<th class="group" colspan="{len(cols) + (1 if gates else 0)}">{_e(s.model_name)}</th>' for s in items) + "</tr>")
    row = "<tr><th>family / rule</th><th>should</th>"
    for _ in items:
        row += "".join(f'<th class="{"num" if c not in ("95 % CI",) else ""}{" first" if i == 0 and many else ""}">{c}</th>'
                       for i, c in enumerate(cols))
        if gates:
            row += "<th>gate</th>"
    h.append(row + "</tr></thead><tbody>")
    for fam in families:
        rules: dict[str, None] = {}
        for s in items:
            for r in (s.families[fam].rules if fam in s.families else {}):
                rules.setdefault(r, None)
        should = next((should_words(s.families[fam]) for s in items if fam in s.families), "")
        r = f'<tr class="family"><td>{_e(fam)}</td><td>{_e(should)}</td>'
        for s, gm in zip(items, gms):
            r += _html_stats(s.families.get(fam), many)
            if gates:
                r += _html_gate_cell(gm.get(fam))
        h.append(r + "</tr>")
        if len(rules) > 1 or any(rule in gm for gm in gms for rule in rules):
            for rule in rules:
                rs = next((should_words(s.families[fam].rules[rule]) for s in items
                           if fam in s.families and rule in s.families[fam].rules), "")
                r = f'<tr class="rule"><td>{_e(short_rule(rule, fam))}</td><td>{_e(rs)}</td>'
                for s, gm in zip(items, gms):
                    fg = s.families.get(fam)
                    r += _html_stats(fg.rules.get(rule) if fg else None, many)
                    if gates:
                        r += _html_gate_cell(gm.get(rule))
                h.append(r + "</tr>")
    h.append("</tbody></table></div>")
    return "\n".join(h)


def _html_labels(s: Summary) -> str:
    groups = [(a, t) for a, t in (("by_label", "gold label of the source"), ("by_prediction", "model's label on the source"))
              if any(getattr(g, a, None) for g in s.families.values())]
    if not groups:
        return ""
    h = ['<table><thead><tr><th></th><th></th>' + "".join(
        f'<th class="group" colspan="3">{_e(t)}</th>' for _, t in groups) + "</tr>",
        "<tr><th>family</th><th>label</th>" + '<th class="num first">pairs</th><th class="num">violation %</th><th>95 % CI</th>' * len(groups)
        + "</tr></thead><tbody>"]
    for fam, fg in s.families.items():
        labels: dict[str, None] = {}
        for a, _ in groups:
            for lab in getattr(fg, a, None) or {}:
                labels.setdefault(lab, None)
        for i, lab in enumerate(labels):
            r = f'<tr><td><b>{_e(fam) if i == 0 else ""}</b></td><td>{_e(lab)}</td>'
            for a, _ in groups:
                g = (getattr(fg, a, None) or {}).get(lab)
                if g is None:
                    r += '<td class="first"></td><td></td><td></td>'
                elif g.applicable:
                    r += (f'<td class="num first">{g.pairs}</td><td class="num">{pct(g.violation_rate)}</td>'
                          f'<td class="mute">{pct(g.ci95[0])}–{pct(g.ci95[1])}</td>')
                else:
                    r += f'<td class="num first">{g.pairs}</td><td class="num">—</td><td></td>'
            h.append(r + "</tr>")
    h.append("</tbody></table>")
    return "\n".join(h)


def _html_example(i: int, e: Example) -> str:
    def sc(x: float | None) -> str:
        return "" if x is None else f" ({x:+.2f})"

    sev = f" · severity {e.severity:.2f}" if e.severity else ""
    return (f'<div class="example"><div class="meta">{i}. <b>{_e(e.rule)}</b> · should {_e(e.should)}{sev}</div>'
            f'<div class="diff">{_html_diff(e.source, e.variant)}</div>'
            f'<div class="meta">source: <b>{_e(e.source_pred)}</b>{_e(sc(e.source_score))} → '
            f'variant: <b>{_e(e.variant_pred)}</b>{_e(sc(e.variant_score))}</div></div>')


def to_html(summary_or_list: Summary | Sequence[Summary], gate: Any = None, *, examples: int = 3) -> str:
    """One self-contained HTML page: no scripts, no fonts or images fetched, every text escaped."""
    items, gates, _ = _normalise(summary_or_list, gate)
    fams: dict[str, None] = {}
    for s in items:
        for f in s.families:
            fams.setdefault(f, None)
    families = list(fams)
    title = f"pairflip report · {items[0].model_name}" if len(items) == 1 else f"pairflip report · {len(items)} models"
    b: list[str] = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
                    '<meta name="viewport" content="width=device-width, initial-scale=1">',
                    f"<title>{_e(title)}</title><style>{_CSS}</style></head><body>", f"<h1>{_e(title)}</h1>"]
    if len(items) == 1:
        b.append('<dl class="facts">' + "".join(f"<dt>{_e(k)}</dt><dd>{_e(v)}</dd>" for k, v in header_facts(items[0])) + "</dl>")
    else:
        b.append('<dl class="facts">')
        for s in items:
            acc = ""
            if s.accuracy:
                acc = " · " + (accuracy_words(s.accuracy, short=True) if s.accuracy.get("rate") is not None
                               else "accuracy " + accuracy_words(s.accuracy))
            b.append(f"<dt>{_e(s.model_name)}</dt><dd>{total_pairs(s)} pairs{_e(acc)} · "
                     f"suite {_e(str(s.suite.get('sha256', ''))[:12])} · {_e(when(s.header.get('created')))}</dd>")
        b.append("</dl>")
        if len({s.suite.get("sha256") for s in items}) > 1:
            b.append('<p class="warn">The results come from different suites: rates are not paired.</p>')
    if gates:
        crossed = sum(1 for x in gates for o in x if not o.passed)
        total = sum(len(x) for x in gates)
        b.append(f'<p class="{"fail" if crossed else "pass"}">gate: '
                 + (f"{crossed} of {total} limit{'s' if total != 1 else ''} crossed" if crossed
                    else f"all {total} limits hold" if total != 1 else "the limit holds") + "</p>")
    b.append("<h2>Violation rate per family</h2>")
    b.append(f'<p class="mute">Bars: violation rate; whiskers: {_e(describe_interval(items[0]))} interval.</p>')
    b.append(svg_chart(items, families))
    b.append("<h2>Families and rules</h2>")
    b.append(_html_table(items, families, gates))
    if len(items) == 1:
        lab = _html_labels(items[0])
        if lab:
            b.append("<h2>By source label</h2>")
            b.append(lab)
    if gates:
        b.append("<h2>Gate</h2><table><thead><tr>" + ("<th>model</th>" if len(items) > 1 else "")
                 + '<th>limit</th><th class="num">value %</th><th>result</th></tr></thead><tbody>')
        for s, outs in zip(items, gates):
            for o in outs:
                b.append("<tr>" + (f"<td>{_e(s.model_name)}</td>" if len(items) > 1 else "")
                         + f'<td>{_e(o.limit.text)}</td><td class="num">{pct(o.value)}</td>{_html_gate_cell([o])}</tr>')
        b.append("</tbody></table>")
    if examples > 0:
        b.append("<h2>Worst examples</h2>")
        b.append('<p class="mute">The most confident violations per family: '
                 '<del>removed words</del> and <ins>inserted words</ins> of the variant.</p>')
        for fam in families:
            blocks = []
            for s in items:
                fg = s.families.get(fam)
                if fg is None or not fg.examples:
                    continue
                if len(items) > 1:
                    blocks.append(f"<h3>{_e(fam)} · {_e(s.model_name)}</h3>")
                blocks += [_html_example(i, e) for i, e in enumerate(fg.examples[:examples], 1)]
            if blocks:
                if len(items) == 1:
                    blocks.insert(0, f"<h3>{_e(fam)}</h3>")
                b += blocks
    b.append("</body></html>")
    return "\n".join(b) + "\n"
