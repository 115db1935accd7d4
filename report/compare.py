"""Paired comparison of two results files made on the same suite. Numbers only; nothing prints.

Each pair is judged under both models, so the two violation rates are paired data: per family we
count the pairs violated by the old model only (``only_old``), by the new one only
(``only_new``) and by both (``both``), and test the discordant counts with McNemar's exact test
(McNemar 1947). With several families tested at once the p-values are Holm-adjusted (Holm 1979)
across the families that have any pair to compare.

Which pairs are compared: those whose expectation applies under *both* models (neither verdict
``n/a``, should not ``none``). A pair that is ``n/a`` under one model (it called the source
neutral) has no violation outcome there, so it cannot be paired; ``pairs`` still counts it and
``paired`` says how many were compared. A family with no paired pair has ``p_value = None``.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from typing import Any

from pairflip.records import PairflipError, Results, Verdict
from pairflip.report.stats import holm, mcnemar_exact
from pairflip.report.summary import severity

COMPARE_VERSION = 1


@dataclass
class BrokenPair:
    """A pair the new model violates and the old one kept."""

    id: str
    rule: str
    should: str
    source: str
    variant: str
    old_source_pred: str
    old_variant_pred: str
    new_source_pred: str
    new_variant_pred: str
    severity: float  # of the new model's violation (see summary.severity)
    # Polarity scores (-1..1) when the models give them: a strengthen/weaken regression keeps the
    # labels and moves only the scores.
    old_source_score: float | None = None
    old_variant_score: float | None = None
    new_source_score: float | None = None
    new_variant_score: float | None = None

    def to_dict(self) -> dict[str, Any]:
        return dict(self.__dict__)


@dataclass
class RuleComparison:
    should: str
    pairs: int = 0
    paired: int = 0
    only_old: int = 0
    only_new: int = 0
    both: int = 0
    p_value: float | None = None  # unadjusted

    @property
    def old_violations(self) -> int:
        return self.only_old + self.both

    @property
    def new_violations(self) -> int:
        return self.only_new + self.both

    def to_dict(self) -> dict[str, Any]:
        return {
            "should": self.should,
            "pairs": self.pairs,
            "paired": self.paired,
            "only_old": self.only_old,
            "only_new": self.only_new,
            "both": self.both,
            "old_violations": self.old_violations,
            "new_violations": self.new_violations,
            "p_value": self.p_value,
        }


@dataclass
class FamilyComparison(RuleComparison):
    p_holm: float | None = None
    rules: dict[str, RuleComparison] = field(default_factory=dict)
    newly_broken: list[BrokenPair] = field(default_factory=list)  # most confident first, at most ``examples``
    broken: int = 0  # every pair violated by the new model only (newly_broken holds the first ones)

    @property
    def old_rate(self) -> float:
        return self.old_violations / self.paired if self.paired else 0.0

    @property
    def new_rate(self) -> float:
        return self.new_violations / self.paired if self.paired else 0.0

    @property
    def direction(self) -> str:
        """``worse``, ``better`` or ``same``: which way the violation count moved."""
        if self.only_new > self.only_old:
            return "worse"
        if self.only_new < self.only_old:
            return "better"
        return "same"

    def regressed(self, alpha: float) -> bool:
        """More violations under the new model and a Holm-adjusted p below ``alpha``."""
        return self.direction == "worse" and self.p_holm is not None and self.p_holm < alpha

    def to_dict(self) -> dict[str, Any]:
        out = super().to_dict()
        out.update(
            {
                "old_rate": self.old_rate,
                "new_rate": self.new_rate,
                "direction": self.direction,
                "p_holm": self.p_holm,
                "rules": {r: rc.to_dict() for r, rc in self.rules.items()},
                "newly_broken": [b.to_dict() for b in self.newly_broken],
                "newly_broken_total": self.broken,
            }
        )
        return out


@dataclass
class Comparison:
    old: dict[str, Any]  # model description and path of each results file
    new: dict[str, Any]
    suite: dict[str, Any]
    families: dict[str, FamilyComparison]

    def regressions(self, alpha: float = 0.05) -> list[str]:
        """Families that got significantly worse at level ``alpha`` (Holm-adjusted)."""
        return [f for f, fc in self.families.items() if fc.regressed(alpha)]

    def to_dict(self) -> dict[str, Any]:
        return {
            "version": COMPARE_VERSION,
            "old": self.old,
            "new": self.new,
            "suite": self.suite,
            "families": {f: fc.to_dict() for f, fc in self.families.items()},
        }


def _describe(results: Results) -> dict[str, Any]:
    out = dict(results.header.get("model") or {})
    out.setdefault("name", results.model_name)
    if results.header.get("path"):
        out["path"] = str(results.header["path"])
    return out


def _where(results: Results, name: str) -> str:
    return str(results.header.get("path") or f"the {name} results")


def _check_same_suite(old: Results, new: Results) -> None:
    a, b = old.suite_sha256, new.suite_sha256
    if not a or not b or a != b:
        raise PairflipError(
            f"compare: the two results files were not made on the same suite: "
            f"{_where(old, 'old')} has suite sha256 {a or '(none)'}, "
            f"{_where(new, 'new')} has suite sha256 {b or '(none)'}; "
            f"score both models on one suite file"
        )
    ids_old = [v.id for v in old.verdicts]
    ids_new = [v.id for v in new.verdicts]
    set_old, set_new = set(ids_old), set(ids_new)
    for name, ids, res in (("old", ids_old, old), ("new", ids_new, new)):
        if len(set(ids)) != len(ids):
            dup = next(i for i, n in Counter(ids).items() if n > 1)
            raise PairflipError(f"compare: {_where(res, name)} holds pair id {dup} more than once")
    if set_old != set_new:
        missing = sorted(set_old - set_new)
        extra = sorted(set_new - set_old)
        parts = []
        if missing:
            parts.append(f"{len(missing)} pair ids of {_where(old, 'old')} are missing from {_where(new, 'new')} (first: {missing[0]})")
        if extra:
            parts.append(f"{len(extra)} pair ids of {_where(new, 'new')} are not in {_where(old, 'old')} (first: {extra[0]})")
        raise PairflipError("compare: the results files hold different pairs although their suite hashes match: " + "; ".join(parts))


def _judged(v: Verdict) -> bool:
    return v.verdict != "n/a" and v.should != "none"


def _count(rc: RuleComparison, a: Verdict, b: Verdict) -> None:
    rc.pairs += 1
    if not (_judged(a) and _judged(b)):
        return
    rc.paired += 1
    va, vb = a.verdict == "violation", b.verdict == "violation"
    if va and vb:
        rc.both += 1
    elif va:
        rc.only_old += 1
    elif vb:
        rc.only_new += 1


def _should(values: set[str]) -> str:
    return values.pop() if len(values) == 1 else "mixed"


def compare(old: Results, new: Results, *, examples: int = 10) -> Comparison:
    """Compare two results files on the same suite, family by family.

    Raises :class:`PairflipError` when the suites differ (naming both suite sha256 hashes) or
    when the two files hold different pair ids. ``examples`` bounds the newly broken pairs kept
    per family (most confident first).
    """
    _check_same_suite(old, new)
    by_id = {v.id: v for v in new.verdicts}
    families: dict[str, FamilyComparison] = {}
    shoulds: dict[str, set[str]] = {}
    rule_shoulds: dict[tuple[str, str], set[str]] = {}
    broken: dict[str, list[tuple[Verdict, Verdict]]] = {}
    for a in old.verdicts:
        b = by_id[a.id]
        fam = a.family
        fc = families.setdefault(fam, FamilyComparison(should=""))
        rc = fc.rules.setdefault(a.rule, RuleComparison(should=""))
        shoulds.setdefault(fam, set()).add(a.should)
        rule_shoulds.setdefault((fam, a.rule), set()).add(a.should)
        _count(fc, a, b)
        _count(rc, a, b)
        if _judged(a) and _judged(b) and b.verdict == "violation" and a.verdict != "violation":
            broken.setdefault(fam, []).append((a, b))
    for fam, fc in families.items():
        fc.should = _should(shoulds[fam])
        fc.rules = dict(sorted(fc.rules.items()))
        for rule, rc in fc.rules.items():
            rc.should = _should(rule_shoulds[(fam, rule)])
            rc.p_value = mcnemar_exact(rc.only_old, rc.only_new) if rc.paired else None
        fc.p_value = mcnemar_exact(fc.only_old, fc.only_new) if fc.paired else None
        pairs = sorted(broken.get(fam, []), key=lambda ab: (-severity(ab[1]), ab[1].id))
        fc.broken = len(pairs)
        fc.newly_broken = [
            BrokenPair(b.id, b.rule, b.should, b.source, b.variant, a.source_pred, a.variant_pred,
                       b.source_pred, b.variant_pred, severity(b), a.source_score, a.variant_score,
                       b.source_score, b.variant_score)
            for a, b in pairs[: max(0, examples)]
        ]
    tested = [f for f, fc in families.items() if fc.p_value is not None]
    for f, p in zip(tested, holm([families[f].p_value for f in tested])):  # type: ignore[misc]
        families[f].p_holm = p
    return Comparison(
        old=_describe(old),
        new=_describe(new),
        suite={"sha256": new.suite_sha256, "path": (new.header.get("suite") or {}).get("path")},
        families=families,
    )
