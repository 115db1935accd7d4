"""Gate limits: a small grammar of our own, parsed (never evaluated), and the gate itself.

A limit::

    LIMIT  := TARGET "." METRIC OP NUMBER ["%"]
    TARGET := FAMILY ["/" RULE]          e.g. negation, double-negation, negation/copula
    METRIC := "flip" | "violation"
    OP     := "<=" | "<" | ">=" | ">"
    NUMBER := digits ["." digits] | "." digits     a rate in [0, 1], or 0-100 with "%"

Spaces between tokens are optional. A rule is named by its full name (``negation/copula``, the
name the reports show). Errors name the bad token and point at it with its column and a caret.

Where limits come from: ``--limit`` (repeatable), and a TOML file given with ``--limits FILE``;
without either, the CLI reads ``pyproject.toml`` in the current folder when it has a
``[tool.pairflip.gate]`` table. The TOML shape, in a ``pyproject.toml`` or a file of its own::

    [tool.pairflip.gate]
    limits = [
        "negation.violation <= 0.10",
        "reorder/shuffle.flip < 20%",
    ]
    on = "upper"     # optional: point (default), upper or lower
    alpha = 0.05     # optional: significance level for --baseline

A file of its own may also hold ``limits`` (and ``on``, ``alpha``) at its top level. Options given
on the command line win over the file's ``on`` and ``alpha``; limits from both are all checked.

What is judged: ``--on point`` the rate itself, ``--on upper``/``lower`` the bound of its 95 %
interval (Wilson, or with ``--cluster source`` the source-cluster bootstrap, which is never
narrower than the Wilson interval at the number of sources, so never less cautious). ``upper`` is the
cautious choice for ``<=`` limits on small suites: the gate passes only when the data show the
rate is below the limit. ``--on confirmed`` (with ``--vetted``) judges the rate over the pairs a
person accepted only: violations there are the model's, not the suite's.

Errors, not silent passes: a family or rule that is not in the results; a ``violation`` limit on
a diagnostic rule (should ``none``, e.g. ``reorder/shuffle``) or on a family whose rules are all
diagnostic, since such pairs carry no expectation and so have no violations. A violation limit on
a group whose pairs are all ``n/a`` (every source judged neutral) fails: nothing was shown.

With ``--baseline OLD`` the gate also fails for every family that got significantly worse than
in the old results: more violations, and a Holm-adjusted exact McNemar p-value below ``alpha``
(see :mod:`pairflip.report.compare`).
"""

from __future__ import annotations

import re
import sys
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Sequence

from pairflip.records import PairflipError
from pairflip.report.summary import GroupStats, Summary

OPS = ("<=", ">=", "<", ">")
METRICS = ("flip", "violation")
ON = ("point", "upper", "lower", "confirmed")
TOML_TABLE = "[tool.pairflip.gate]"
TOML_KEYS = ("limits", "on", "alpha")


class LimitSyntaxError(PairflipError):
    """A malformed limit: the message echoes it with a caret under the bad token (three lines)."""

    keep_lines = True

    def __init__(self, text: str, column: int, what: str) -> None:
        self.text = text
        self.column = column  # 1-based
        self.what = what
        super().__init__(f"limit {text!r}: {what} at column {column}\n  {text}\n  {' ' * (column - 1)}^")


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

    @property
    def rule(self) -> str | None:
        return self.target if "/" in self.target else None

    def holds(self, x: float) -> bool:
        if self.op == "<=":
            return x <= self.value
        if self.op == "<":
            return x < self.value
        if self.op == ">=":
            return x >= self.value
        return x > self.value


# --------------------------------------------------------------------------- parsing

_TOKENS = re.compile(
    r"(?P<op><=|>=|<|>)"
    r"|(?P<num>(?:\d+(?:\.\d*)?|\.\d+)%?)"
    r"|(?P<name>[A-Za-z][A-Za-z0-9_]*(?:-[A-Za-z0-9_]+)*)"
    r"|(?P<dot>\.)"
    r"|(?P<slash>/)"
)
_WHAT = {
    "name": "a name",
    "dot": "'.'",
    "slash": "'/'",
    "op": "one of <=, <, >=, >",
    "num": "a number",
    "end": "the end of the limit",
}


def _tokenize(text: str) -> list[tuple[str, str, int]]:
    toks: list[tuple[str, str, int]] = []
    pos = 0
    while pos < len(text):
        if text[pos].isspace():
            pos += 1
            continue
        m = _TOKENS.match(text, pos)
        if m is None:  # the parser reports it when it gets there, so earlier errors come first
            toks.append(("bad", text[pos], pos))
            return toks
        kind = m.lastgroup or "bad"
        toks.append((kind, m.group(0), pos))
        pos = m.end()
    toks.append(("end", "", len(text.rstrip())))
    return toks


def _unexpected(tok: tuple[str, str, int], fail: Any) -> PairflipError:
    ch = tok[1]
    hint = ""
    if ch == "=":
        hint = " (the comparisons are <=, <, >=, >)"
    elif ch == "-":
        hint = " (a rate cannot be negative)"
    return fail(tok[2], f"unexpected character {ch!r}{hint}")


def parse_limit(text: str) -> Limit:
    """Parse ``"negation.violation <= 0.10"`` into a :class:`Limit`; errors point at the bad token."""
    if not isinstance(text, str):
        raise PairflipError(f"a limit must be a string such as \"negation.violation <= 0.10\", got {type(text).__name__}")

    def fail(pos: int, what: str) -> PairflipError:
        return LimitSyntaxError(text, pos + 1, what)

    toks = _tokenize(text)
    i = 0

    def take(kind: str, what: str | None = None) -> tuple[str, str, int]:
        nonlocal i
        tok = toks[i]
        if tok[0] == "bad":
            raise _unexpected(tok, fail)
        if tok[0] != kind:
            got = "the end" if tok[0] == "end" else repr(tok[1])
            raise fail(tok[2], f"expected {what or _WHAT[kind]}, got {got}")
        i += 1
        return tok

    family = take("name", "a family name such as negation")[1]
    target = family
    if toks[i][0] == "slash":
        i += 1
        rule = take("name", f"a rule name after '{family}/'")[1]
        target = f"{family}/{rule}"
    nxt = toks[i]
    if nxt[0] == "bad":
        raise _unexpected(nxt, fail)
    if nxt[0] != "dot":
        raise fail(nxt[2], f"expected '.' and then flip or violation after {target!r}, got "
                   f"{'the end' if nxt[0] == 'end' else repr(nxt[1])}")
    i += 1
    mtok = take("name", "flip or violation")
    if mtok[1] not in METRICS:
        raise fail(mtok[2], f"expected flip or violation, got {mtok[1]!r}")
    op = take("op")[1]
    ntok = take("num", "a number (a rate such as 0.10, or a percentage such as 10%)")
    take("end", "the end of the limit after the number")
    num = ntok[1]
    pct = num.endswith("%")
    value = float(num.rstrip("%")) / (100.0 if pct else 1.0)
    if not 0.0 <= value <= 1.0:
        raise fail(ntok[2], f"a rate must lie in [0, 1] (or 0-100%), got {num}")
    return Limit(target, mtok[1], op, value, text.strip())


# --------------------------------------------------------------------------- TOML limits


@dataclass
class LimitsFile:
    """What a TOML limits file holds: its limits (already parsed) and optional settings."""

    path: Path
    limits: list[Limit]
    on: str | None = None
    alpha: float | None = None


def _load_toml(path: Path) -> dict[str, Any]:
    if sys.version_info >= (3, 11):
        import tomllib
    else:  # pragma: no cover
        import tomli as tomllib
    if not path.exists():
        raise PairflipError(f"--limits {path}: no such file")
    try:
        with open(path, "rb") as fh:
            return tomllib.load(fh)
    except tomllib.TOMLDecodeError as err:
        raise PairflipError(f"{path}: not valid TOML: {err}") from None
    except UnicodeDecodeError as err:
        raise PairflipError(f"{path}: not valid UTF-8 ({err.reason})") from None


def _gate_table(data: dict[str, Any]) -> tuple[dict[str, Any] | None, str]:
    tool = data.get("tool")
    if isinstance(tool, dict) and isinstance(tool.get("pairflip"), dict) and "gate" in tool["pairflip"]:
        table = tool["pairflip"]["gate"]
        if not isinstance(table, dict):
            raise PairflipError(f"tool.pairflip.gate must be a table ({TOML_TABLE}), got {type(table).__name__}")
        return table, TOML_TABLE
    if "limits" in data:
        return {k: v for k, v in data.items() if k != "tool"}, "top level"
    return None, ""


def read_limits_file(path: str | Path, *, required: bool = True) -> LimitsFile | None:
    """Read limits from ``[tool.pairflip.gate]`` (or the top level) of a TOML file.

    With ``required=False`` a file without a gate table gives ``None`` instead of an error
    (used for a ``pyproject.toml`` found in the current folder).
    """
    p = Path(path)
    data = _load_toml(p)
    try:
        table, where = _gate_table(data)
    except PairflipError as err:
        raise PairflipError(f"{p}: {err}") from None
    if table is None:
        if not required:
            return None
        raise PairflipError(
            f"{p}: no {TOML_TABLE} table and no top-level 'limits'; expected for example\n"
            f"  {TOML_TABLE}\n  limits = [\"negation.violation <= 0.10\"]"
        )
    unknown = [k for k in table if k not in TOML_KEYS]
    if unknown:
        raise PairflipError(f"{p}: {where}: unknown key {unknown[0]!r}; the keys are {', '.join(TOML_KEYS)}")
    raw = table.get("limits", [])
    if isinstance(raw, str):
        raw = [raw]
    if not isinstance(raw, list):
        raise PairflipError(f"{p}: {where}: 'limits' must be a list of strings, got {type(raw).__name__}")
    limits = []
    for i, item in enumerate(raw):
        if not isinstance(item, str):
            raise PairflipError(f"{p}: {where}: limits[{i}] must be a string such as \"negation.violation <= 0.10\", got {type(item).__name__} {item!r}")
        try:
            limits.append(parse_limit(item))
        except PairflipError as err:
            raise PairflipError(f"{p}: {where}: limits[{i}]: {err}") from None
    on = table.get("on")
    if on is not None and on not in ON:
        raise PairflipError(f"{p}: {where}: on = {on!r}; expected one of {', '.join(ON)}")
    alpha = table.get("alpha")
    if alpha is not None:
        if isinstance(alpha, bool) or not isinstance(alpha, (int, float)) or not 0 < float(alpha) < 1:
            raise PairflipError(f"{p}: {where}: alpha = {alpha!r}; expected a number between 0 and 1")
        alpha = float(alpha)
    return LimitsFile(p, limits, on, alpha)


def default_limits_file(folder: str | Path = ".") -> Path | None:
    """``pyproject.toml`` in ``folder`` when it has a ``[tool.pairflip.gate]`` table, else None."""
    p = Path(folder) / "pyproject.toml"
    if not p.is_file():
        return None
    try:
        data = _load_toml(p)
    except PairflipError as err:
        # A broken pyproject.toml must not read as "no limits given": the limits may be in it.
        raise PairflipError(
            f"./{err} (gate reads [tool.pairflip.gate] from ./pyproject.toml when no --limit or --limits is given)"
        ) from None
    tool = data.get("tool")
    if isinstance(tool, dict) and isinstance(tool.get("pairflip"), dict) and "gate" in tool["pairflip"]:
        return p
    return None


# --------------------------------------------------------------------------- judging


@dataclass
class LimitOutcome:
    limit: Limit
    value: float  # the number judged: the point estimate or a bound, as ``on`` says
    passed: bool
    group: GroupStats
    point: float = 0.0
    ci95: tuple[float, float] = (0.0, 1.0)
    count: int = 0  # pairs behind the rate: applicable pairs (violation) or pairs (flip)
    note: str = ""  # why a limit failed without a number to judge

    @property
    def by(self) -> float:
        """How far the judged value lies on the wrong side of the limit (0 when it passed)."""
        if self.passed:
            return 0.0
        return abs(self.value - self.limit.value)


def _group(summary: Summary, lim: Limit) -> GroupStats:
    fam = lim.family
    where = f"limit {lim.text!r}"
    if fam not in summary.families:
        raise PairflipError(
            f"{where}: no family {fam!r} in the results (the families are {', '.join(summary.families) or 'none'})"
        )
    g = summary.families[fam]
    if lim.rule is not None:
        if lim.rule not in g.rules:
            raise PairflipError(f"{where}: no rule {lim.rule!r} in the results (the rules of {fam} are {', '.join(g.rules)})")
        g = g.rules[lim.rule]
        if lim.metric == "violation" and g.should == "none":
            raise PairflipError(
                f"{where}: {lim.rule} is a diagnostic rule (should: none): its pairs carry no "
                f"expectation, so it has no violations; limit its flip rate instead, e.g. "
                f"\"{lim.rule}.flip {lim.op} {lim.value:g}\""
            )
    elif lim.metric == "violation" and g.rules and all(r.should == "none" for r in g.rules.values()):
        raise PairflipError(
            f"{where}: every rule of {fam} in the results is diagnostic (should: none), so the family "
            f"has no violations; limit its flip rate instead, e.g. \"{fam}.flip {lim.op} {lim.value:g}\""
        )
    return g


def check(summary: Summary, limits: Sequence[Limit], *, on: str = "point") -> list[LimitOutcome]:
    """Judge each limit against ``summary``; raises :class:`PairflipError` for a limit that does
    not apply to these results (unknown family or rule, violation limit on a diagnostic rule)."""
    if on not in ON:
        raise PairflipError(f"--on {on!r}: expected one of {', '.join(ON)}")
    if on == "confirmed" and summary.vetted is None:
        raise PairflipError("--on confirmed judges only pairs a person accepted: pass --vetted FILE "
                            "(a decisions file from `pairflip vet`)")
    groups = [_group(summary, lim) for lim in limits]  # every error before any verdict
    out = []
    for lim, g in zip(limits, groups):
        if on == "confirmed":  # the point estimate over the vetted pairs only
            g = g.confirmed if g.confirmed is not None else type(g)(should=g.should)
        if lim.metric == "violation":
            point, (lo, hi), count = g.violation_rate, g.ci95, g.applicable
        else:
            point, (lo, hi), count = g.flip_rate, g.flip_ci95, g.pairs
        x = {"point": point, "upper": hi, "lower": lo, "confirmed": point}[on]
        if count == 0:
            note = f"no applicable pairs ({g.not_applicable} n/a): nothing to judge"
            if on == "confirmed":
                note = "no vetted pair a person accepted: nothing confirmed to judge (vet some with `pairflip vet`)"
            out.append(LimitOutcome(lim, x, False, g, point, (lo, hi), count, note))
            continue
        out.append(LimitOutcome(lim, x, lim.holds(x), g, point, (lo, hi), count))
    return out


@dataclass
class RegressionCheck:
    """One family of the baseline comparison: did it get significantly worse?"""

    family: str
    comparison: Any  # pairflip.report.compare.FamilyComparison
    regressed: bool


@dataclass
class GateOutcome:
    """Everything the gate decided: each limit's outcome and any regression against a baseline."""

    limits: list[LimitOutcome]
    on: str = "point"
    regressions: list[RegressionCheck] | None = None  # filled when a baseline is given
    alpha: float = 0.05
    interval: str = "wilson"
    model: str = ""
    baseline_model: str | None = None
    sources: list[str] = field(default_factory=list)  # where the limits came from

    @property
    def failed_limits(self) -> list[LimitOutcome]:
        return [o for o in self.limits if not o.passed]

    @property
    def regressed(self) -> list[RegressionCheck]:
        return [r for r in (self.regressions or []) if r.regressed]

    @property
    def passed(self) -> bool:
        return not self.failed_limits and not self.regressed


def run_gate(
    results: Any,
    limits: Sequence[str | Limit],
    *,
    limits_file: str | Path | None = None,
    on: str | None = None,
    baseline: Any = None,
    alpha: float | None = None,
    cluster: str | None = None,
    seed: int = 0,
) -> GateOutcome:
    """Judge ``results`` (a :class:`~pairflip.records.Results`) against limits.

    ``limits`` are strings in the grammar above or :class:`Limit` objects; ``limits_file`` adds
    those of a TOML file (its ``on``/``alpha`` apply when the arguments are None). ``on`` is
    ``point``, ``upper`` or ``lower``; ``baseline`` the old model's results on the same suite;
    ``alpha`` its significance level; ``cluster="source"`` switches intervals to the bootstrap.
    """
    from pairflip.report.summary import summarize

    parsed = [x if isinstance(x, Limit) else parse_limit(x) for x in limits]
    sources = ["--limit"] if parsed else []
    if limits_file is not None:
        lf = read_limits_file(limits_file)
        assert lf is not None
        parsed.extend(lf.limits)
        sources.append(str(lf.path))
        on = on if on is not None else lf.on
        alpha = alpha if alpha is not None else lf.alpha
    on = on or "point"
    alpha = 0.05 if alpha is None else float(alpha)
    if on not in ON:
        raise PairflipError(f"--on {on!r}: expected one of {', '.join(ON)}")
    if not 0 < alpha < 1:
        raise PairflipError(f"--alpha {alpha}: expected a number between 0 and 1")
    if not parsed and baseline is None:
        raise PairflipError(
            "gate: no limits given; pass --limit \"FAMILY.violation <= 0.10\", --limits FILE "
            f"(a TOML file with a {TOML_TABLE} table), or --baseline OLD_RESULTS"
        )
    summary = summarize(results, cluster=cluster, seed=seed, examples=0)
    outcomes = check(summary, parsed, on=on)
    regressions = None
    baseline_model = None
    if baseline is not None:
        from pairflip.report.compare import compare

        comp = compare(baseline, results, examples=3)
        regressions = [RegressionCheck(f, fc, fc.regressed(alpha)) for f, fc in comp.families.items()
                       if fc.p_value is not None]
        baseline_model = baseline.model_name
        sources.append("--baseline")
    return GateOutcome(
        limits=outcomes, on=on, regressions=regressions, alpha=alpha, interval=summary.interval,
        model=summary.model_name, baseline_model=baseline_model, sources=sources,
    )
