"""Gate limits: a small grammar of our own, parsed (never evaluated).

    LIMIT  := TARGET "." METRIC OP NUMBER ["%"]
    TARGET := FAMILY ["/" RULE]
    METRIC := "flip" | "violation"
    OP     := "<=" | "<" | ">=" | ">"
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any, Sequence

from pairflip.records import PairflipError
from pairflip.report.summary import GroupStats, Summary

OPS = ("<=", ">=", "<", ">")
METRICS = ("flip", "violation")


@dataclass(frozen=True)
class Limit:
    target: str  # "negation" or "negation/copula"
    metric: str  # "flip" | "violation"
    op: str
    value: float  # a rate in [0, 1]
    text: str

    @property
    def family(self) -> str:
        return self.target.split("/", 1)[0]

    def holds(self, x: float) -> bool:
        return {"<=": x <= self.value, "<": x < self.value, ">=": x >= self.value, ">": x > self.value}[self.op]


_TOKEN = re.compile(r"\s*(?:(?P<op><=|>=|<|>)|(?P<num>\d+(?:\.\d*)?|\.\d+)(?P<pct>%)?|(?P<name>[A-Za-z][\w\-]*(?:/[A-Za-z][\w\-]*)?)|(?P<dot>\.)|(?P<bad>\S))")


def parse_limit(text: str) -> Limit:
    """Parse ``"negation.violation <= 0.10"``; errors point at the bad token."""
    def fail(pos: int, what: str) -> PairflipError:
        return PairflipError(f"limit {text!r}: {what} at column {pos + 1}\n  {text}\n  {' ' * pos}^")

    pos = 0
    toks: list[tuple[str, str, int]] = []
    while pos < len(text):
        m = _TOKEN.match(text, pos)
        if not m or m.end() == pos:
            break
        kind = m.lastgroup if m.lastgroup != "pct" else "num"
        start = m.start(kind if kind != "num" else "num")
        if kind == "bad":
            raise fail(start, f"unexpected character {m.group('bad')!r}")
        val = m.group(0).strip()
        toks.append((kind, val, start))
        pos = m.end()
    expect = ["name", "dot", "name", "op", "num"]
    names = {"name": "a family name", "dot": "'.'", "op": "one of <=, <, >=, >", "num": "a number"}
    for i, kind in enumerate(expect):
        if i >= len(toks):
            raise fail(len(text.rstrip()), f"expected {names[kind]}")
        if toks[i][0] != kind:
            raise fail(toks[i][2], f"expected {names[kind] if i != 2 else 'flip or violation'}, got {toks[i][1]!r}")
    if len(toks) > len(expect):
        raise fail(toks[len(expect)][2], f"unexpected {toks[len(expect)][1]!r} after the number")
    target, metric, op, num = toks[0][1], toks[2][1], toks[3][1], toks[4][1]
    if metric not in METRICS:
        raise fail(toks[2][2], f"expected flip or violation, got {metric!r}")
    value = float(num.rstrip("%")) / (100 if num.endswith("%") else 1)
    if not 0 <= value <= 1:
        raise fail(toks[4][2], f"a rate must lie in [0, 1] (or 0-100%), got {num}")
    return Limit(target, metric, op, value, text.strip())


@dataclass
class LimitOutcome:
    limit: Limit
    value: float
    passed: bool
    group: GroupStats


def _group(summary: Summary, target: str) -> GroupStats:
    fam, _, _ = target.partition("/")
    if fam not in summary.families:
        raise PairflipError(f"limit on {target!r}: no family {fam!r} in the results (families: {', '.join(summary.families)})")
    g = summary.families[fam]
    if "/" in target:
        if target not in g.rules:
            raise PairflipError(f"limit on {target!r}: no rule {target!r} in the results (rules: {', '.join(g.rules)})")
        g = g.rules[target]
    return g


def check(summary: Summary, limits: Sequence[Limit], *, on: str = "point") -> list[LimitOutcome]:
    if on not in ("point", "upper", "lower"):
        raise PairflipError(f"--on {on!r}: expected point, upper or lower")
    out = []
    for lim in limits:
        g = _group(summary, lim.target)
        if lim.metric == "violation":
            point, (lo, hi) = g.violation_rate, g.ci95
        else:
            point, (lo, hi) = g.flip_rate, g.flip_ci95
        x = {"point": point, "upper": hi, "lower": lo}[on]
        out.append(LimitOutcome(lim, x, lim.holds(x), g))
    return out


@dataclass
class GateOutcome:
    """Everything the gate decided: each limit's outcome and any regression against a baseline."""

    limits: list[LimitOutcome]
    on: str = "point"
    regressions: list[Any] | None = None  # filled when a baseline is given
    alpha: float = 0.05

    @property
    def passed(self) -> bool:
        return all(o.passed for o in self.limits) and not any(getattr(r, "regressed", False) for r in (self.regressions or []))


def run_gate(
    results: Any,
    limits: Sequence[str | Limit],
    *,
    limits_file: Any = None,
    on: str = "point",
    baseline: Any = None,
    alpha: float = 0.05,
    cluster: str | None = None,
) -> GateOutcome:
    from pairflip.report.summary import summarize

    parsed = [x if isinstance(x, Limit) else parse_limit(x) for x in limits]
    if not parsed and baseline is None:
        raise PairflipError("gate: no limits given; pass --limit \"FAMILY.violation <= 0.10\" (or --limits FILE, or --baseline)")
    summary = summarize(results, cluster=cluster)
    return GateOutcome(limits=check(summary, parsed, on=on), on=on, alpha=alpha)
