"""The terminal report: rich renderables built from Summary objects, printed once.

Nothing here computes a statistic: every count, rate and interval is read from the
:class:`~pairflip.report.summary.Summary`. Layout decisions (column widths, bar length, stacked
or side-by-side comparison) follow the console's width, so no line is longer than the console.

Without colour (not a terminal, or ``NO_COLOR`` set) nothing is lost: the bars use different
block characters for the parts of the interval, and diffs mark words as ``[-removed-]`` and
``[+inserted+]``.
"""

from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass
from typing import Any, Iterable, Sequence

from rich import box
from rich.cells import cell_len
from rich.console import Console, Group, RenderableType
from rich.padding import Padding
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from pairflip.records import PairflipError
from pairflip.report.diff import DEL, DEL_CLOSE, DEL_OPEN, INS, INS_CLOSE, INS_OPEN, join_chunks, word_diff
from pairflip.report.summary import Example, GroupStats, Summary, accuracy_words

BAR_MIN, BAR_MAX = 6, 40
NAME_MAX = 12  # model names longer than this are shortened in column headers

# styles
S_FAMILY = "bold"
S_DIM = "dim"
S_FAIL = "bold red"
S_PASS = "green"
S_BAR = "cyan"
S_DEL = "red strike"
S_INS = "bold green"


@dataclass(frozen=True)
class Glyphs:
    """Characters for bars and markers; an ASCII set for consoles that cannot show blocks."""

    low: str  # 0 .. lower end of the interval
    mid: str  # lower end .. the rate
    high: str  # the rate .. upper end
    track: str  # beyond the upper end
    dash: str
    pass_: str
    fail: str
    arrow: str
    range_: str


UNICODE = Glyphs("█", "▓", "░", "·", "—", "✓ pass", "✗ FAIL", "→", "–")
ASCII = Glyphs("#", "=", "-", ".", "-", "pass", "FAIL", "->", "-")


def glyphs_for(console: Console) -> Glyphs:
    return UNICODE if console.encoding.replace("_", "-").startswith("utf") else ASCII


# --------------------------------------------------------------------------- small formatters


def pct(x: float) -> str:
    """A rate as a percentage with one decimal, without the sign (the header says %)."""
    return f"{100 * x:.1f}"


def interval(ci: Sequence[float], g: Glyphs) -> str:
    return f"{pct(ci[0])}{g.range_}{pct(ci[1])}"


def has_expectation(s: GroupStats) -> bool:
    return s.applicable > 0


def bar(rate: float, ci: Sequence[float], width: int, g: Glyphs, style: str = S_BAR) -> Text:
    """A bar on a 0-100 % scale: solid to the interval's lower end, darker shade to the rate,
    light shade to the upper end, a faint track after it. Whole cells, rounded; a rate above 0
    always shows at least one cell."""
    lo, hi = ci[0], ci[1]
    n_lo = round(lo * width)
    n_pt = round(rate * width)
    n_hi = round(hi * width)
    if rate > 0:
        n_pt = max(n_pt, 1)
    if hi > 0:
        n_hi = max(n_hi, 1)
    n_pt = min(max(n_pt, n_lo), width)
    n_hi = min(max(n_hi, n_pt), width)
    t = Text(no_wrap=True, overflow="crop")
    t.append(g.low * n_lo, style=style)
    t.append(g.mid * (n_pt - n_lo), style=style)
    t.append(g.high * (n_hi - n_pt), style=style)
    t.append(g.track * (width - n_hi), style=S_DIM)
    return t


def legend(g: Glyphs, diagnostic: bool) -> Text:
    t = Text(style=S_DIM)
    t.append(f"bar 0-100 %: {g.low} up to the CI's low end, {g.mid} up to the rate, {g.high} up to its high end")
    if diagnostic:
        t.append(f"\n{g.dash} no expectation (a diagnostic rule): read its flip rate")
    return t


def short_rule(rule: str, family: str) -> str:
    return rule[len(family) + 1:] if rule.startswith(family + "/") else rule


def short_name(name: str, n: int = NAME_MAX) -> str:
    return name if len(name) <= n else name[: n - 1] + "…"


def column_names(summaries: Sequence[Summary], n: int = NAME_MAX) -> list[str]:
    """Column headers for models side by side: their names when all fit in ``n`` characters and
    differ, else the letters A, B, C... that the header spells out in full (never a cut name)."""
    names = [s.model_name for s in summaries]
    if all(len(x) <= n for x in names) and len(set(names)) == len(names):
        return names
    return [_letter(i) for i in range(len(names))]


def _letter(i: int) -> str:
    return chr(ord("A") + i) if i < 26 else f"M{i + 1}"


def when(created: Any) -> str:
    if not created:
        return ""
    try:
        d = _dt.datetime.fromisoformat(str(created))
    except ValueError:
        return str(created)
    if d.tzinfo is not None:
        d = d.astimezone(_dt.timezone.utc)
        return d.strftime("%Y-%m-%d %H:%M UTC")
    return d.strftime("%Y-%m-%d %H:%M")


def signed(x: float | None) -> str:
    return "n/a" if x is None else f"{x:+.2f}"


def _width_of(cells: Iterable[str]) -> int:
    return max((cell_len(line) for c in cells for line in str(c).split("\n")), default=0)


# --------------------------------------------------------------------------- header


def describe_labels(labels: dict[str, Any]) -> str:
    pol = labels.get("polarity") or {}
    if not pol:
        return "unknown"
    order = labels.get("order") or list(pol)
    text = ", ".join(f"{lab} {int(pol[lab]):+d}" for lab in order if lab in pol)
    src = labels.get("source")
    return f"{text} ({src})" if src else text


def describe_interval(summary: Summary) -> str:
    if summary.interval == "cluster-bootstrap":
        return "95 % percentile bootstrap over source sentences"
    return "95 % Wilson score"


def should_words(g: GroupStats) -> str:
    """A family's expectation as a reader needs it: its rules' expectations when they differ."""
    if g.should != "mixed":
        return g.should
    seen = [x for x in getattr(g, "shoulds", None) or [] if x != "none"]
    return "/".join(seen) or g.should


def diagnostic_pairs(summary: Summary) -> int:
    """Pairs of diagnostic rules (no expectation, such as reorder/shuffle): shown apart."""
    return sum(r.pairs for g in summary.families.values() if g.should != "none"
               for r in g.rules.values() if r.should == "none")


def total_pairs(summary: Summary) -> int:
    """Every scored pair, diagnostic rules included (a family's own count leaves them out)."""
    total = 0
    for g in summary.families.values():
        diagnostic = sum(r.pairs for r in g.rules.values() if r.should == "none")
        total += g.pairs + (diagnostic if g.should != "none" else 0)
    return total


# How each adapter's ``kind`` (in the results header's model) is named in the report's header.
FORMAT_WORDS = {
    "joblib": "joblib/pickle file (scikit-learn-like object; unpickling runs code)",
    "skops": "skops file (scikit-learn-like object; types checked before loading)",
    "onnx": "ONNX model with tokenizer.json (onnxruntime, CPU)",
    "python": "Python object in this process",
    "command": "command speaking JSON Lines",
    "http": "HTTP endpoint",
}


def header_facts(summary: Summary) -> list[tuple[str, str]]:
    """The header as (key, value) lines; exporters use the same facts."""
    s = summary
    facts: list[tuple[str, str]] = []
    spec = s.model.get("spec")
    model = s.model_name + (f" ({spec})" if spec and spec != s.model_name else "")
    facts.append(("model", model))
    kind = s.model.get("kind")
    if isinstance(kind, str) and kind and kind != "model":
        facts.append(("format", FORMAT_WORDS.get(kind, kind)))
    suite_bits = []
    if s.suite.get("path"):
        suite_bits.append(str(s.suite["path"]))
    if s.suite.get("sha256"):
        suite_bits.append(f"sha256 {str(s.suite['sha256'])[:12]}")
    gen = s.suite.get("generator") or {}
    if "seed" in gen:
        suite_bits.append(f"seed {gen['seed']}")
    facts.append(("suite", " · ".join(suite_bits) or "unknown"))
    counts = f"{total_pairs(s)} pairs"
    diag = diagnostic_pairs(s)
    if diag:
        counts += f" ({total_pairs(s) - diag} with an expectation, counted in the families; {diag} diagnostic, shown apart)"
    texts = s.header.get("texts_predicted")
    if texts is not None:
        counts += f" · {texts} distinct texts"
    counts += f" · {len(s.families)} famil{'y' if len(s.families) == 1 else 'ies'}"
    facts.append(("scored", counts))
    facts.append(("labels", describe_labels(s.labels)))
    iv = describe_interval(s)
    margin = s.header.get("margin")
    if margin is not None and s.labels_only_unjudged is None:  # the margin matters only with scores
        iv += f" · margin {margin:g} (score change tolerated by strengthen/weaken/rise/fall)"
    facts.append(("interval", iv))
    if s.accuracy:
        facts.append(("accuracy", accuracy_words(s.accuracy)))
    unjudged = s.labels_only_unjudged
    if unjudged is not None:
        facts.append(("scores", f"model gives labels only: {unjudged} strengthen/weaken pairs could not be judged (n/a)"))
    vs = s.vetted_sentence()
    if vs:
        facts.append(("vetted", vs.removeprefix("vetted ")))
    created = when(s.header.get("created"))
    if created:
        facts.append(("created", created))
    return facts


def header_block(summary: Summary) -> RenderableType:
    grid = Table.grid(padding=(0, 2))
    grid.add_column(style=S_DIM, no_wrap=True)
    grid.add_column(overflow="fold")
    for k, v in header_facts(summary):
        grid.add_row(k, Text(v))
    title = Text("pairflip report · ", style="bold")
    title.append(summary.model_name, style="bold cyan")
    return Group(title, grid)


# --------------------------------------------------------------------------- gate lookups


def gate_by_target(outcomes: Sequence[Any] | None) -> dict[str, list[Any]]:
    out: dict[str, list[Any]] = {}
    for o in outcomes or []:
        out.setdefault(o.limit.target, []).append(o)
    return out


def gate_cell(outs: list[Any] | None, g: Glyphs) -> Text:
    if not outs:
        return Text("")
    if all(o.passed for o in outs):
        return Text(g.pass_, style=S_PASS)
    return Text(g.fail, style=S_FAIL)


# --------------------------------------------------------------------------- the family table


def _stat_cells(s: GroupStats, g: Glyphs) -> list[str]:
    """pairs, flip %, violation %, 95 % CI, n/a: the numbers every table shows."""
    if has_expectation(s):
        viol, ci = pct(s.violation_rate), interval(s.ci95, g)
    else:
        viol, ci = g.dash, ""
    return [str(s.pairs), pct(s.flip_rate), viol, ci, str(s.not_applicable)]


STAT_HEADERS = ["pairs", "flip %", "viol %", "95% CI", "n/a"]


def _table(headers: Sequence[str], justify: Sequence[str]) -> Table:
    t = Table(box=box.SIMPLE_HEAD, show_edge=False, padding=(0, 0), pad_edge=False,
              header_style="bold", expand=False)
    for h, j in zip(headers, justify):
        t.add_column(h, justify=j, no_wrap=(h != "bar"), overflow="fold")  # type: ignore[arg-type]
    return t


def _bar_width(console_width: int, fixed: list[int]) -> int:
    used = sum(fixed) + len(fixed)  # one separator per column
    return max(BAR_MIN, min(BAR_MAX, console_width - used))


def family_table(
    summary: Summary, families: Sequence[str], width: int, g: Glyphs, gate: Sequence[Any] | None
) -> tuple[Table, bool]:
    """One table: a bold row per family, a row per rule under it. Returns (table, any diagnostic rows)."""
    gates = gate_by_target(gate)
    rows: list[tuple[str, GroupStats, str, bool]] = []  # (name, stats, target, is_family)
    for fam in families:
        fg = summary.families[fam]
        rows.append((fam, fg, fam, True))
        if len(fg.rules) > 1 or any(r in gates for r in fg.rules):
            for rule, rg in fg.rules.items():
                rows.append(("  " + short_rule(rule, fam), rg, rule, False))
        elif len(fg.rules) == 1:
            pass  # a single rule says the same as its family
    headers = ["family / rule", "should"] + STAT_HEADERS
    cells = [[name, should_words(s)] + _stat_cells(s, g) for name, s, _, _ in rows]
    fixed = [_width_of([h] + [c[i] for c in cells]) for i, h in enumerate(headers)]
    with_gate = gate is not None
    if with_gate:
        fixed.append(_width_of(["gate", g.pass_, g.fail]))
    bw = _bar_width(width, fixed)
    justify = ["left", "left", "right", "right", "right", "left", "right"]
    t = _table(headers[:6] + ["bar"] + headers[6:] + (["gate"] if with_gate else []),
               justify[:6] + ["left"] + justify[6:] + (["left"] if with_gate else []))
    diagnostic = False
    for (name, s, target, is_family), c in zip(rows, cells):
        b = bar(s.violation_rate, s.ci95, bw, g) if has_expectation(s) else Text(" " * bw)
        diagnostic |= not has_expectation(s)
        outs = gates.get(target)
        style = S_FAMILY if is_family else ""
        if outs and not all(o.passed for o in outs):
            b.stylize(S_FAIL)
        row: list[Any] = [Text(x, style=style) for x in c[:6]] + [b, Text(c[6], style=S_DIM)]
        if with_gate:
            row.append(gate_cell(outs, g))
        last_of_family = True
        idx = rows.index((name, s, target, is_family))
        if idx + 1 < len(rows) and not rows[idx + 1][3]:
            last_of_family = False
        t.add_row(*row, end_section=last_of_family and idx + 1 < len(rows))
    return t, diagnostic


# --------------------------------------------------------------------------- by label


def label_table(summary: Summary, families: Sequence[str], g: Glyphs) -> RenderableType | None:
    """Per family and source label: the pairs whose source has that gold label, and the pairs
    whose source the model gave that label (expectations are judged against the latter)."""
    groups = [(attr, head) for attr, head in (("by_label", "gold"), ("by_prediction", "model"))
              if any(getattr(summary.families[f], attr, None) for f in families)]
    if not groups:
        return None
    headers, justify = ["family", "label"], ["left", "left"]
    for _, head in groups:
        headers += ["│", f"{head}\npairs", "\nviol %", "\n95% CI"]
        justify += ["left", "right", "right", "left"]
    t = _table(headers, justify)
    for fam in families:
        fg = summary.families[fam]
        labels: dict[str, None] = {}
        for attr, _ in groups:
            for lab in getattr(fg, attr, None) or {}:
                labels.setdefault(lab, None)
        for i, lab in enumerate(labels):
            row: list[Any] = [Text(fam if i == 0 else "", style=S_FAMILY), lab]
            for attr, _ in groups:
                ls = (getattr(fg, attr, None) or {}).get(lab)
                c = _stat_cells(ls, g) if ls is not None else ["", "", "", ""]
                row += [Text("│", style=S_DIM), c[0], c[2], Text(c[3], style=S_DIM)]
            t.add_row(*row)
    title = Text("by source label", style="bold")
    title.append(" · " + "; ".join(
        {"by_label": "gold: the source's gold label", "by_prediction": "model: the model's label on it"}[a]
        for a, _ in groups), style=S_DIM)
    return Group(title, t)


def vetted_table(summary: Summary, families: Sequence[str], g: Glyphs) -> RenderableType | None:
    """With --vetted: per rule, how many pairs a person kept and rejected (the rule's measured
    validity on this suite) and the violations on kept pairs (confirmed)."""
    if summary.vetted is None:
        return None
    t = _table(["family", "rule", "vetted", "rejected", "valid %", "confirmed", "conf %", "95% CI"],
               ["left", "left", "right", "right", "right", "right", "right", "left"])
    for fam in families:
        fg = summary.families[fam]
        seen = [(rule, rg) for rule, rg in sorted(fg.rules.items()) if rg.vetted or rg.rejected]
        for i, (rule, rg) in enumerate(seen):
            c = rg.confirmed
            validity = rg.validity
            if c is not None and has_expectation(rg) and c.applicable:
                conf, rate, ci = f"{c.violations} of {c.applicable}", pct(c.violation_rate), interval(c.ci95, g)
            else:
                conf, rate, ci = g.dash, g.dash, ""
            t.add_row(Text(fam if i == 0 else "", style=S_FAMILY), short_rule(rule, fam), str(rg.vetted), str(rg.rejected),
                      pct(validity) if validity is not None else g.dash, conf, rate, Text(ci, style=S_DIM))
    title = Text("vetted pairs", style="bold")
    title.append(" · valid % = kept / (kept + rejected) of the pairs a person vetted; confirmed = violations "
                 "on pairs a person accepted", style=S_DIM)
    return Group(title, t)


# --------------------------------------------------------------------------- examples


def diff_text(source: str, variant: str) -> Text:
    """The variant drawn over the source: removed words red and struck through inside [- -],
    inserted words green inside [+ +]."""
    chunks = word_diff(source, variant)
    pieces: list[Text] = []
    for c in chunks:
        if c.kind == DEL:
            pieces.append(Text(f"{DEL_OPEN}{c.text}{DEL_CLOSE}", style=S_DEL))
        elif c.kind == INS:
            pieces.append(Text(f"{INS_OPEN}{c.text}{INS_CLOSE}", style=S_INS))
        else:
            pieces.append(Text(c.text))
    # join with the spacing the chunks ask for
    plain_pieces = [p.plain for p in pieces]
    joined = join_chunks(chunks, plain_pieces)
    out = Text(overflow="fold")
    pos = 0
    for p in pieces:
        at = joined.index(p.plain, pos)
        out.append(joined[pos:at])
        out.append_text(p)
        pos = at + len(p.plain)
    out.append(joined[pos:])
    return out


def example_block(i: int, e: Example, g: Glyphs) -> RenderableType:
    head = Text(f"{i}. ", style="bold")
    head.append(e.rule, style="bold")
    head.append(f" · should {e.should}", style=S_DIM)
    if e.severity:
        head.append(f" · severity {e.severity:.2f}", style=S_DIM)
    preds = Text(style="")
    preds.append("source ", style=S_DIM)
    preds.append(f"{e.source_pred} ({signed(e.source_score)})")
    preds.append(f"  {g.arrow}  ", style=S_DIM)
    preds.append("variant ", style=S_DIM)
    preds.append(f"{e.variant_pred} ({signed(e.variant_score)})", style="bold")
    return Group(head, Padding(Group(diff_text(e.source, e.variant), preds), (0, 0, 0, 3)))


def examples_section(
    summaries: Sequence[Summary], families: Sequence[str], n: int, g: Glyphs
) -> list[RenderableType]:
    parts: list[RenderableType] = []
    if n <= 0:
        return parts
    many = len(summaries) > 1
    explained = False
    for fam in families:
        blocks: list[RenderableType] = []
        for s in summaries:
            fg = s.families.get(fam)
            if fg is None or not has_expectation(fg):
                continue
            shown = fg.examples[:n]
            if many:
                lead = Text(f"{s.model_name}: ", style="bold cyan")
            else:
                lead = Text("")
            if not shown:
                lead.append(f"no violations in {fg.applicable} judged pairs", style=S_DIM)
                blocks.append(lead)
                continue
            most = f"the {len(shown)} most confident" if len(shown) > 1 else "the most confident"
            why = ""
            if not explained and any(e.severity for e in shown):
                explained = True  # said once, at the first severity shown
                why = (" (severity: how far the polarity score, on -1..1, moved against the expectation; "
                       "+1 when it crossed to the other side)")
            lead.append(f"{fg.violations} violation{'s' if fg.violations != 1 else ''} in {fg.applicable} judged pairs; "
                        f"{most}{why}:", style=S_DIM)
            blocks.append(lead)
            for i, e in enumerate(shown, 1):
                blocks.append(example_block(i, e, g))
        if blocks:
            rule = Rule(Text(f"worst examples · {fam}", style="bold"), align="left", style=S_DIM,
                        characters="─" if g is UNICODE else "-")
            parts.append(Group(rule, *blocks))
    return parts


# --------------------------------------------------------------------------- gate


def gate_table(summaries: Sequence[Summary], gate: Sequence[Sequence[Any]], g: Glyphs) -> Table:
    many = len(summaries) > 1
    headers = (["model"] if many else []) + ["limit", "value %", "result"]
    t = _table(headers, (["left"] if many else []) + ["left", "right", "left"])
    for s, outs in zip(summaries, gate):
        for o in outs:
            row: list[Any] = ([Text(short_name(s.model_name))] if many else []) + [
                Text(o.limit.text, overflow="fold"), pct(o.value), gate_cell([o], g)]
            t.add_row(*row)
    return t


def gate_verdict(gate: Sequence[Sequence[Any]]) -> Text:
    crossed = sum(1 for outs in gate for o in outs if not o.passed)
    total = sum(len(outs) for outs in gate)
    if crossed:
        return Text(f"gate: {crossed} of {total} limit{'s' if total != 1 else ''} crossed", style=S_FAIL)
    return Text(f"gate: all {total} limits hold" if total != 1 else "gate: the limit holds", style=S_PASS)


# --------------------------------------------------------------------------- side by side


def compare_header(summaries: Sequence[Summary]) -> RenderableType:
    t = Table.grid(padding=(0, 2))
    t.add_column(style="bold cyan", no_wrap=True)
    t.add_column(overflow="fold")
    hashes = {s.suite.get("sha256") for s in summaries}
    tags = column_names(summaries)
    for i, s in enumerate(summaries):
        bits = [f"{total_pairs(s)} pairs"]
        if s.accuracy:
            bits.append(accuracy_words(s.accuracy, short=True) if s.accuracy.get("rate") is not None
                        else "accuracy " + accuracy_words(s.accuracy))
        if len(hashes) > 1 and s.suite.get("sha256"):
            bits.append(f"suite {str(s.suite['sha256'])[:12]}")
        created = when(s.header.get("created"))
        if created:
            bits.append(created.split(" ")[0])
        label_words = describe_labels(s.labels)
        if len({describe_labels(x.labels) for x in summaries}) > 1:
            bits.append(f"labels {label_words}")  # each model's own mapping when they differ
        tag = tags[i]
        if tag != s.model_name:
            bits.insert(0, s.model_name)
        t.add_row(tag, " · ".join(bits))
    first = summaries[0]
    facts = dict(header_facts(first))
    rows: list[RenderableType] = [Text(f"pairflip report · {len(summaries)} models side by side", style="bold"), t]
    info = Table.grid(padding=(0, 2))
    info.add_column(style=S_DIM, no_wrap=True)
    info.add_column(overflow="fold")
    if len(hashes) == 1:
        info.add_row("suite", facts.get("suite", ""))
    if len({describe_labels(x.labels) for x in summaries}) == 1:
        info.add_row("labels", facts.get("labels", ""))
    info.add_row("interval", facts.get("interval", ""))
    rows.append(info)
    if len(hashes) > 1:
        rows.append(Text("warning: the results come from different suites; rates are not paired and "
                         "differences mix model and suite", style=S_FAIL))
    return Group(*rows)


def all_families(summaries: Sequence[Summary]) -> list[str]:
    seen: dict[str, None] = {}
    for s in summaries:
        for f in s.families:
            seen.setdefault(f, None)
    return list(seen)


def all_rules(summaries: Sequence[Summary], fam: str) -> list[str]:
    seen: dict[str, None] = {}
    for s in summaries:
        fg = s.families.get(fam)
        for r in (fg.rules if fg else {}):
            seen.setdefault(r, None)
    return list(seen)


def _should(summaries: Sequence[Summary], fam: str, rule: str | None = None) -> str:
    for s in summaries:
        fg = s.families.get(fam)
        if fg is None:
            continue
        if rule is None:
            return should_words(fg)
        if rule in fg.rules:
            return should_words(fg.rules[rule])
    return ""


def compare_wide(summaries: Sequence[Summary], families: Sequence[str], g: Glyphs,
                 gate: Sequence[Sequence[Any]] | None) -> Table:
    """One column group per model: violation %, 95 % CI, flip %, (gate)."""
    headers = ["family / rule", "should"]
    justify = ["left", "left"]
    for name in column_names(summaries):
        headers += ["│", f"{name}\nviol %", "\n95% CI", "\nflip %"] + (["\ngate"] if gate else [])
        justify += ["left", "right", "left", "right"] + (["left"] if gate else [])
    t = _table(headers, justify)
    gates = [gate_by_target(x) for x in gate] if gate else [{} for _ in summaries]

    def cells(st: GroupStats | None, gm: dict[str, list[Any]], target: str, style: str) -> list[Any]:
        if st is None:
            out: list[Any] = ["│", g.dash, "", g.dash]
        else:
            c = _stat_cells(st, g)
            fail = any(not o.passed for o in gm.get(target, []))
            out = ["│", Text(c[2], style=S_FAIL if fail else style), Text(c[3], style=S_DIM), Text(c[1], style=style)]
        if gate:
            out.append(gate_cell(gm.get(target), g))
        out[0] = Text("│", style=S_DIM)
        return out

    for fi, fam in enumerate(families):
        row: list[Any] = [Text(fam, style=S_FAMILY), Text(_should(summaries, fam), style=S_FAMILY)]
        for s, gm in zip(summaries, gates):
            row += cells(s.families.get(fam), gm, fam, S_FAMILY)
        rules = all_rules(summaries, fam)
        t.add_row(*row, end_section=len(rules) <= 1 and fi + 1 < len(families))
        if len(rules) > 1:
            for ri, rule in enumerate(rules):
                row = ["  " + short_rule(rule, fam), _should(summaries, fam, rule)]
                for s, gm in zip(summaries, gates):
                    fg = s.families.get(fam)
                    row += cells(fg.rules.get(rule) if fg else None, gm, rule, "")
                t.add_row(*row, end_section=ri + 1 == len(rules) and fi + 1 < len(families))
    return t


def compare_stacked(summaries: Sequence[Summary], families: Sequence[str], width: int, g: Glyphs,
                    gate: Sequence[Sequence[Any]] | None) -> Table:
    """A row per family and model, with bars (for narrow consoles)."""
    gates = [gate_by_target(x) for x in gate] if gate else [{} for _ in summaries]
    headers = ["family", "model"] + STAT_HEADERS
    rows: list[tuple[str, str, GroupStats | None, dict[str, list[Any]], str]] = []
    names = column_names(summaries)
    for fam in families:
        for i, (s, gm) in enumerate(zip(summaries, gates)):
            label = fam if i == 0 else (f"should {_should(summaries, fam)}" if i == 1 else "")
            rows.append((label, names[i], s.families.get(fam), gm, fam))
    cells = [[lab, name] + (_stat_cells(st, g) if st else ["0", g.dash, g.dash, "", "0"])
             for lab, name, st, _, _ in rows]
    if len(summaries) == 1:
        pass
    fixed = [_width_of([h] + [c[i] for c in cells]) for i, h in enumerate(headers)]
    if gate:
        fixed.append(_width_of(["gate", g.pass_, g.fail]))
    bw = _bar_width(width, fixed)
    t = _table(headers[:6] + ["bar"] + headers[6:] + (["gate"] if gate else []),
               ["left", "left", "right", "right", "right", "left", "left", "right"] + (["left"] if gate else []))
    n = len(summaries)
    for i, ((lab, name, st, gm, fam), c) in enumerate(zip(rows, cells)):
        first = i % n == 0
        b = bar(st.violation_rate, st.ci95, bw, g) if st is not None and has_expectation(st) else Text(" " * bw)
        outs = gm.get(fam)
        if outs and not all(o.passed for o in outs):
            b.stylize(S_FAIL)
        row: list[Any] = [Text(lab, style=S_FAMILY if first else S_DIM), Text(name, style="cyan")]
        row += c[2:6] + [b, Text(c[6], style=S_DIM)]
        if gate:
            row.append(gate_cell(outs, g))
        t.add_row(*row, end_section=(i % n == n - 1 and i + 1 < len(rows)))
    return t


def compare_rules_stacked(summaries: Sequence[Summary], families: Sequence[str], g: Glyphs) -> Table | None:
    """Per-rule violation rates, one narrow column per model (for narrow consoles)."""
    rows = [(fam, rule) for fam in families for rule in all_rules(summaries, fam)]
    if not any(len(all_rules(summaries, f)) > 1 for f in families):
        return None
    headers = ["rule", "should"] + [f"{name}\nviol %" for name in column_names(summaries, 9)]
    t = _table(headers, ["left", "left"] + ["right"] * len(summaries))
    for i, (fam, rule) in enumerate(rows):
        row: list[Any] = [rule, _should(summaries, fam, rule)]
        for s in summaries:
            fg = s.families.get(fam)
            rg = fg.rules.get(rule) if fg else None
            row.append(g.dash if rg is None or not has_expectation(rg) else pct(rg.violation_rate))
        t.add_row(*row, end_section=(i + 1 < len(rows) and rows[i + 1][0] != fam))
    return t


# --------------------------------------------------------------------------- entry points


def _plain_console(console: Console) -> Console:
    """NO_COLOR (or no_color=True) must mean no escape codes at all, not only no colours: rich
    alone still writes bold and strike-through; render through a console without a colour system."""
    if console.no_color and console.color_system is not None:
        return Console(file=console.file, width=console.width, color_system=None, highlight=False,
                       emoji=False, soft_wrap=False, force_terminal=False)
    return console


def select_families(summaries: Sequence[Summary], families: Sequence[str] | None) -> list[str]:
    known = all_families(summaries)
    if not families:
        return known
    wanted = [f.strip() for item in families for f in str(item).split(",") if f.strip()]
    unknown = [f for f in wanted if f not in known]
    if unknown:
        raise PairflipError(
            f"--family {', '.join(unknown)}: not in the results; the families are {', '.join(known) or '(none)'}"
        )
    return [f for f in known if f in wanted]


def build(
    summaries: Sequence[Summary],
    width: int,
    g: Glyphs,
    *,
    examples: int = 3,
    families: Sequence[str] | None = None,
    gate: Sequence[Sequence[Any]] | None = None,
) -> list[RenderableType]:
    """The report as a list of renderables (printed one after another, a blank line between)."""
    if not summaries:
        raise PairflipError("nothing to show: no results given")
    if gate is not None and len(gate) != len(summaries):
        raise ValueError(f"gate needs one list of outcomes per summary: got {len(gate)} for {len(summaries)}")
    fams = select_families(summaries, families)
    parts: list[RenderableType] = []
    if len(summaries) == 1:
        s = summaries[0]
        parts.append(header_block(s))
        if not fams:
            parts.append(Text("the results hold no pairs", style=S_DIM))
            return parts
        table, diagnostic = family_table(s, fams, width, g, gate[0] if gate else None)
        parts.append(Group(table, legend(g, diagnostic)))
        lt = label_table(s, fams, g)
        if lt is not None:
            parts.append(lt)
        vt = vetted_table(s, fams, g)
        if vt is not None:
            parts.append(vt)
    else:
        parts.append(compare_header(summaries))
        if not fams:
            parts.append(Text("the results hold no pairs", style=S_DIM))
            return parts
        wide = compare_wide(summaries, fams, g, gate)
        if Console(width=10_000, file=_NullFile()).measure(wide).maximum <= width:
            parts.append(Group(wide, Text("viol % = violation rate; CI = its 95 % interval", style=S_DIM)))
        else:
            stacked = compare_stacked(summaries, fams, width, g, gate)
            parts.append(Group(stacked, legend(g, any(not has_expectation(st) for s in summaries
                                                      for f, st in s.families.items() if f in fams))))
            rt = compare_rules_stacked(summaries, fams, g)
            if rt is not None:
                parts.append(Group(Text("violation rate by rule", style="bold"), rt))
    parts.extend(examples_section(summaries, fams, examples, g))
    if gate:
        parts.append(Group(gate_table(summaries, gate, g), gate_verdict(gate)))
    return parts


class _NullFile:
    def write(self, _: str) -> int:
        return 0

    def flush(self) -> None:
        pass


def render(
    summaries: Summary | Sequence[Summary],
    console: Console | None = None,
    *,
    examples: int = 3,
    families: Sequence[str] | None = None,
    gate: Sequence[Sequence[Any]] | None = None,
) -> None:
    """Print the report for one summary, or for several side by side.

    ``gate`` is None or one list of :class:`~pairflip.report.gate.LimitOutcome` per summary;
    ``families`` keeps only those families; ``examples`` is the number of worst examples per family.
    """
    items = [summaries] if isinstance(summaries, Summary) else list(summaries)
    console = _plain_console(console or Console(highlight=False))
    g = glyphs_for(console)
    parts = build(items, console.width, g, examples=examples, families=families, gate=gate)
    if g is UNICODE:
        _print_parts(console, parts)
        return
    # A console that cannot encode Unicode: draw to text, then transliterate (one cell for one).
    import io

    buf = io.StringIO()
    capture = Console(file=buf, width=console.width, color_system=console.color_system,
                      force_terminal=console.is_terminal, highlight=False, legacy_windows=False)
    _print_parts(capture, parts)
    text = buf.getvalue().translate(_TO_ASCII).encode("ascii", "replace").decode("ascii")
    console.file.write(text)
    console.file.flush()


_TO_ASCII = str.maketrans({"·": "-", "…": "~", "–": "-", "—": "-", "→": ">", "─": "-", "│": "|",
                           "✓": "v", "✗": "x", "█": "#", "▓": "=", "░": "-"})


def _print_parts(console: Console, parts: Sequence[RenderableType]) -> None:
    for i, p in enumerate(parts):
        if i:
            console.print()
        console.print(p, highlight=False)
