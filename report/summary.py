"""Numbers only: turn verdicts into per-family and per-rule rates with intervals.

Nothing here renders or prints. :class:`Summary` is the one object every renderer and exporter
reads, and :meth:`Summary.to_dict` is the ``show --json`` schema.

Decisions recorded here:

- ``pairs`` counts every scored pair of a group; ``applicable`` those whose expectation applies
  (verdict not ``n/a`` and should not ``none``); ``not_applicable`` counts the ``n/a`` verdicts
  (a neutral source under a ``flip`` expectation). ``flip_rate = flips / pairs``,
  ``violation_rate = violations / applicable``. A family whose only rules are ``none`` has
  ``applicable == 0`` and no violation rate to speak of.
- ``ci95`` is the 95 % Wilson interval of the violation rate, ``flip_ci95`` that of the flip rate;
  with ``cluster="source"`` both are a seeded percentile bootstrap over source texts
  (:func:`cluster_key`: the sentences of one text, ``build --unit sentence``, are one cluster), widened
  to contain the Wilson interval of the same rate at the effective sample size (the number of
  clusters with at least one pair counted in that rate: applicable pairs for ``ci95``, scored
  pairs for ``flip_ci95``), so a rate of 0 or 1 still gets an interval of width
  (:func:`pairflip.report.stats.cluster_bootstrap_ci`). A group with no pairs to count gets
  ``(0.0, 1.0)``: nothing is known.
- A family's own numbers leave out its diagnostic rules (should ``none``, e.g.
  ``reorder/shuffle``): they carry no expectation, and mixing a random word order into the
  family's flip rate would blur the rate that gates read. Each diagnostic rule keeps its own row
  in ``rules`` (gate it as ``reorder/shuffle.flip``). A family made only of diagnostic rules
  reports them.
- ``by_label`` breaks a family down by the *gold* label of the source, when the suite carries
  gold labels (sources without one go under ``"(none)"``); it is empty otherwise.
  ``by_prediction`` breaks it down by the model's own label on the source, always: expectations
  are judged against that label, so this is where "it negates positives but not negatives"
  shows.
- ``examples`` are the most confident violations: ordered by how far the polarity score moved
  the wrong way (:func:`severity`), ties (and label-only models, severity 0) by pair id.
- ``accuracy`` is the model's accuracy on the sources that carry a gold label, each source
  counted once, with its Wilson interval.
- With ``--vetted`` (a person's decisions, :mod:`pairflip.report.vetted`): ``vetted`` counts the
  kept pairs a person looked at (accepted, or accepted with a changed expectation), ``rejected``
  the pairs of the group a person rejected (left out of every other count), ``validity`` =
  vetted / (vetted + rejected), the measured share of right pairs of that rule on this suite, and
  ``confirmed`` holds the same counts and rates over the vetted pairs only: its ``violations`` are
  *confirmed* violations (``gate --on confirmed`` judges them).
"""

from __future__ import annotations

import re
from collections import defaultdict
from dataclasses import dataclass, field
from typing import Any, Iterable, Sequence

from pairflip.labels import LabelMap
from pairflip.records import PairflipError, Results, Verdict
from pairflip.report.stats import cluster_bootstrap_ci, wilson_interval

SUMMARY_VERSION = 1


@dataclass
class Example:
    """One violated pair, for the report's worst-examples list."""

    id: str
    rule: str
    should: str
    source: str
    variant: str
    source_pred: str
    variant_pred: str
    source_score: float | None
    variant_score: float | None
    severity: float  # how confident the violation is; higher is worse

    def to_dict(self) -> dict[str, Any]:
        return dict(self.__dict__)


@dataclass
class GroupStats:
    """Counts and rates for one family, one rule, or one source label."""

    should: str
    pairs: int = 0
    applicable: int = 0
    flips: int = 0
    violations: int = 0
    not_applicable: int = 0
    ci95: tuple[float, float] = (0.0, 0.0)
    flip_ci95: tuple[float, float] = (0.0, 0.0)
    rules: dict[str, "GroupStats"] = field(default_factory=dict)
    by_label: dict[str, "GroupStats"] = field(default_factory=dict)  # by gold source label
    examples: list[Example] = field(default_factory=list)
    by_prediction: dict[str, "GroupStats"] = field(default_factory=dict)  # by predicted source label
    rejected: int = 0  # pairs of this group a person rejected (--vetted); left out of the counts above
    confirmed: "GroupStats | None" = None  # the same numbers over the pairs a person kept (--vetted)
    shoulds: list[str] = field(default_factory=list)  # the distinct expectations of its pairs (when "mixed")

    @property
    def vetted(self) -> int:
        return self.confirmed.pairs if self.confirmed is not None else 0

    @property
    def validity(self) -> float | None:
        """Share of this group's vetted pairs that a person kept; None when none was vetted."""
        seen = self.vetted + self.rejected
        return self.vetted / seen if seen else None

    @property
    def flip_rate(self) -> float:
        return self.flips / self.pairs if self.pairs else 0.0

    @property
    def violation_rate(self) -> float:
        return self.violations / self.applicable if self.applicable else 0.0

    def to_dict(self, *, with_rules: bool = True) -> dict[str, Any]:
        out: dict[str, Any] = {
            "should": self.should,
            "pairs": self.pairs,
            "applicable": self.applicable,
            "flips": self.flips,
            "flip_rate": self.flip_rate,
            "violations": self.violations,
            "violation_rate": self.violation_rate,
            "ci95": [self.ci95[0], self.ci95[1]],
            "not_applicable": self.not_applicable,
            "flip_ci95": [self.flip_ci95[0], self.flip_ci95[1]],
        }
        if self.confirmed is not None or self.rejected:
            out["vetted"] = self.vetted
            out["rejected"] = self.rejected
            out["validity"] = self.validity
            if self.confirmed is not None:
                out["confirmed"] = self.confirmed.to_dict(with_rules=False)
        if with_rules:
            out["rules"] = {r: g.to_dict(with_rules=False) for r, g in self.rules.items()}
            if self.by_label:
                out["by_label"] = {lab: g.to_dict(with_rules=False) for lab, g in self.by_label.items()}
            if self.by_prediction:
                out["by_prediction"] = {lab: g.to_dict(with_rules=False) for lab, g in self.by_prediction.items()}
            out["examples"] = [e.to_dict() for e in self.examples]
        return out


@dataclass
class Summary:
    """Everything the report shows, computed once from one results file."""

    families: dict[str, GroupStats]
    model: dict[str, Any]
    suite: dict[str, Any]
    labels: dict[str, Any] = field(default_factory=dict)
    accuracy: dict[str, Any] | None = None  # {"correct", "sources", "rate", "ci95"} when gold labels exist
    interval: str = "wilson"  # or "cluster-bootstrap"
    header: dict[str, Any] = field(default_factory=dict)

    @property
    def vetted(self) -> dict[str, Any] | None:
        """What ``--vetted`` did: total, vetted, rejected, changed, accepted, path (None without it)."""
        v = self.header.get("vetted")
        return dict(v) if isinstance(v, dict) else None

    @property
    def labels_only_unjudged(self) -> int | None:
        """With a model that gave labels only (no score on any text): how many strengthen/weaken
        pairs could not be judged (one label on both sides shows no change of strength); None
        when the model gave scores."""
        return self.header.get("labels_only_unjudged")

    def vetted_sentence(self) -> str | None:
        v = self.vetted
        if not v:
            return None
        changed = v.get("changed", 0)
        return (f"vetted {v.get('vetted', 0)} of {v.get('total', 0)} pairs: {v.get('rejected', 0)} rejected and left out, "
                f"{changed} expectation{'s' if changed != 1 else ''} changed")

    @property
    def model_name(self) -> str:
        return str(self.model.get("name") or self.model.get("spec") or "model")

    def to_dict(self) -> dict[str, Any]:
        return {
            "version": SUMMARY_VERSION,
            "families": {f: g.to_dict() for f, g in self.families.items()},
            "model": self.model,
            "suite": self.suite,
            "labels": self.labels,
            "accuracy": self.accuracy,
            "interval": self.interval,
            **({"vetted": self.vetted} if self.vetted else {}),
        }


def severity(v: Verdict) -> float:
    """How confident a violation is: the polarity-score movement in the wrong direction."""
    if v.source_score is None or v.variant_score is None:
        return 0.0
    s, t = v.source_score, v.variant_score
    if v.should == "flip":
        return abs(t) if (s > 0) == (t > 0) else 0.0  # confidently kept the same side
    if v.should == "hold":
        return abs(t - s)
    if v.should == "strengthen":
        return max(0.0, abs(s) - abs(t)) + (1.0 if s * t < 0 else 0.0)
    if v.should == "weaken":
        return max(0.0, abs(t) - abs(s)) + (1.0 if s * t < 0 else 0.0)
    if v.should == "rise":
        return max(0.0, s - t)  # the score fell instead
    if v.should == "fall":
        return max(0.0, t - s)
    return 0.0


def _fill(g: GroupStats, vs: Sequence[Verdict], cluster: str | None, seed: int, n_boot: int, *,
          vetted_run: bool = False, confirmed_pass: bool = False) -> None:
    g.pairs = len(vs)
    g.flips = sum(1 for v in vs if v.flipped)
    appl = [v for v in vs if v.verdict != "n/a" and v.should != "none"]
    g.applicable = len(appl)
    g.violations = sum(1 for v in appl if v.verdict == "violation")
    g.not_applicable = sum(1 for v in vs if v.verdict == "n/a")
    if cluster == "source":
        g.ci95 = cluster_bootstrap_ci(
            [(cluster_key(v), v.verdict == "violation") for v in appl], seed=seed, n_boot=n_boot
        )
        g.flip_ci95 = cluster_bootstrap_ci(
            [(cluster_key(v), v.flipped) for v in vs], seed=seed, n_boot=n_boot
        )
    else:
        g.ci95 = wilson_interval(g.violations, g.applicable)
        g.flip_ci95 = wilson_interval(g.flips, g.pairs)
    if vetted_run and not confirmed_pass:
        kept = [v for v in vs if v.extra.get("vetted") in ("accept", "change")]
        g.confirmed = GroupStats(should=g.should)
        _fill(g.confirmed, kept, cluster, seed, n_boot, vetted_run=True, confirmed_pass=True)


# A sentence unit's source_id (``build --unit sentence``): its text's id, ":", the sentence index.
_SENTENCE_ID = re.compile(r"([0-9a-f]{16}):[0-9]+")


def cluster_key(v: Verdict) -> str:
    """What ``cluster="source"`` resamples: the text a pair's source came from.

    A sentence unit's ``source_id`` is ``TEXT_ID:INDEX`` and clusters by ``TEXT_ID``, so the
    sentences of one review stay together; any other ``source_id`` (a whole text's, or one of a
    hand-made suite) is its own cluster, and pairs without one cluster by their source text.
    """
    sid = v.source_id
    if not sid:
        return v.source
    m = _SENTENCE_ID.fullmatch(sid)
    return m.group(1) if m else sid


_SHOULD_ORDER = ("flip", "hold", "strengthen", "weaken", "rise", "fall", "none")


def _shoulds(vs: Iterable[Verdict]) -> list[str]:
    """The distinct expectations of a group's pairs, in a fixed order (for "mixed" groups)."""
    seen = {v.should for v in vs}
    return [x for x in _SHOULD_ORDER if x in seen] + sorted(seen - set(_SHOULD_ORDER))


def _should_of(vs: Iterable[Verdict]) -> str:
    s = {v.should for v in vs}
    return s.pop() if len(s) == 1 else "mixed"


def summarize(
    results: Results,
    *,
    cluster: str | None = None,
    seed: int = 0,
    examples: int = 5,
    n_boot: int = 2000,
    gold_labels: str | dict | LabelMap | None = None,
) -> Summary:
    """Per family and per rule: pairs, applicable, flips, violations, rates and 95 % intervals.

    ``cluster="source"`` replaces the Wilson interval by a seeded bootstrap over source
    sentences (pairs made from one sentence are not independent), never narrower than the Wilson
    interval at the number of sources.
    """
    if cluster not in (None, "none", "source"):
        raise PairflipError(f"--cluster {cluster!r}: expected 'source' (bootstrap over source sentences) or 'none'")
    cluster = None if cluster == "none" else cluster
    if examples < 0:
        raise PairflipError(f"--examples {examples}: expected a count >= 0")
    labels = dict(results.header.get("labels") or {})
    vetted_info = results.header.get("vetted") if isinstance(results.header.get("vetted"), dict) else None
    vetted_run = vetted_info is not None
    rejected_by_rule: dict[str, int] = dict((vetted_info or {}).get("rejected_by_rule") or {})
    by_family: dict[str, list[Verdict]] = defaultdict(list)
    for v in results.verdicts:
        by_family[v.family].append(v)
    families: dict[str, GroupStats] = {}
    for fam, all_vs in by_family.items():
        # Diagnostic rules (should "none", e.g. reorder/shuffle) stay out of the family's numbers
        # (and so out of family-level gates); each still has its own row under ``rules``.
        vs = [v for v in all_vs if v.should != "none"] or all_vs
        g = GroupStats(should=_should_of(vs), shoulds=_shoulds(vs))
        _fill(g, vs, cluster, seed, n_boot, vetted_run=vetted_run)
        g.rejected = sum(n for r, n in rejected_by_rule.items() if r.split("/", 1)[0] == fam)
        by_rule: dict[str, list[Verdict]] = defaultdict(list)
        if len(vs) != len(all_vs):
            for v in all_vs:
                if v.should == "none":
                    by_rule[v.rule].append(v)
        by_gold: dict[str, list[Verdict]] = defaultdict(list)
        by_pred: dict[str, list[Verdict]] = defaultdict(list)
        has_gold = any(v.label is not None for v in vs)
        for v in vs:
            by_rule[v.rule].append(v)
            by_pred[v.source_pred].append(v)
            if has_gold:
                by_gold[_gold_name(v.label, labels)].append(v)
        for rule in sorted(by_rule):
            rg = GroupStats(should=_should_of(by_rule[rule]), shoulds=_shoulds(by_rule[rule]))
            _fill(rg, by_rule[rule], cluster, seed, n_boot, vetted_run=vetted_run)
            rg.rejected = int(rejected_by_rule.get(rule, 0))
            g.rules[rule] = rg
        for target, groups in ((g.by_label, by_gold), (g.by_prediction, by_pred)):
            for lab in _label_order(groups, labels):
                lg = GroupStats(should=_should_of(groups[lab]))
                _fill(lg, groups[lab], cluster, seed, n_boot)
                target[lab] = lg
        viol = [v for v in vs if v.verdict == "violation"]
        viol.sort(key=lambda v: (-severity(v), v.id))
        g.examples = [
            Example(v.id, v.rule, v.should, v.source, v.variant, v.source_pred, v.variant_pred,
                    v.source_score, v.variant_score, severity(v))
            for v in viol[:examples]
        ]
        families[fam] = g
    accuracy = _accuracy(results, gold_labels)
    header = dict(results.header)
    if results.verdicts and all(v.source_score is None and v.variant_score is None for v in results.verdicts):
        header["labels_only_unjudged"] = sum(1 for v in results.verdicts
                                             if v.verdict == "n/a" and v.should in ("strengthen", "weaken"))
    return Summary(
        families=families,
        model=dict(results.header.get("model") or {}),
        suite=dict(results.header.get("suite") or {}),
        labels=labels,
        accuracy=accuracy,
        interval="cluster-bootstrap" if cluster == "source" else "wilson",
        header=header,
    )


def _gold_name(label: str | None, labels: dict[str, Any]) -> str:
    """A gold label spelled as on the model's scale when it matches one case-insensitively."""
    if label is None:
        return "(none)"
    for name in labels.get("order") or []:
        if str(name).lower() == label.strip().lower():
            return str(name)
    return label.strip()


def _label_order(groups: dict[str, list[Verdict]], labels: dict[str, Any]) -> list[str]:
    """Labels from most negative to most positive when the scale is known, else sorted."""
    order = [str(x) for x in labels.get("order") or []]
    rank = {lab.lower(): i for i, lab in enumerate(order)}
    return sorted(groups, key=lambda lab: (rank.get(lab.lower(), len(rank)), lab))


def parse_gold_labels(spec: str) -> dict[str, int] | LabelMap:
    """``--gold-labels``: how the suite's gold labels map to polarity.

    Either a map, ``"1=negative,2=negative,3=neutral,4=positive,5=positive"`` (each gold label to
    ``negative``/``neutral``/``positive`` or to -1/0/1), or an order from most negative to most
    positive, ``"bad,meh,good"`` (read like ``--labels``: the middle of an odd scale is neutral).
    """
    items = [x.strip() for x in spec.split(",")]
    if not spec.strip() or any(not x for x in items):
        raise PairflipError(
            f"--gold-labels {spec!r}: an empty item; expected GOLD=POLARITY pairs separated by commas "
            f"(for example --gold-labels 1=negative,2=negative,3=neutral,4=positive,5=positive) "
            f"or an order from most negative to most positive (for example --gold-labels bad,meh,good)"
        )
    if not any("=" in x for x in items):
        return LabelMap.from_labels(items)
    words = {"negative": -1, "neg": -1, "-1": -1, "neutral": 0, "neu": 0, "0": 0, "positive": 1, "pos": 1, "1": 1, "+1": 1}
    out: dict[str, int] = {}
    for i, item in enumerate(items, 1):
        gold, sep, pol = (part.strip() for part in item.partition("="))
        if not sep or not gold or pol.lower() not in words:
            raise PairflipError(
                f"--gold-labels {spec!r}: item {i} {item!r} is not GOLD=POLARITY with POLARITY one of "
                f"negative, neutral, positive (or -1, 0, 1)"
            )
        if gold.lower() in out:
            raise PairflipError(f"--gold-labels {spec!r}: the gold label {gold!r} is given twice")
        out[gold.lower()] = words[pol.lower()]
    return out


def _gold_reader(golds: set[str], labels: dict[str, Any], gold_labels: str | dict | LabelMap | None):
    """``(polarity_of_gold, polarity_of_prediction, how)`` or ``(None, None, problem)``.

    Gold labels are compared with the model's labels by polarity, each through its own scale: the
    model's through the label mapping in force, the gold labels through ``--gold-labels``, or the
    model's own scale when every gold label is on it, or a recognised scale of their own (star
    ratings, pos/neg, 0/1). Labels that none of these maps are reported, never counted as wrong.
    """
    try:
        order = tuple(str(x) for x in labels.get("order") or ())
        polarity = {str(k): int(v) for k, v in (labels.get("polarity") or {}).items()}
        model_map = LabelMap(order=order, polarity=polarity) if order else None
    except (PairflipError, KeyError, TypeError, ValueError):
        model_map = None
    if model_map is None:
        return None, None, "the results name no label mapping for the model"
    pred_pol = model_map.polarity_of
    if isinstance(gold_labels, str):
        gold_labels = parse_gold_labels(gold_labels)
    if isinstance(gold_labels, dict):
        missing = sorted(g for g in golds if g.lower() not in gold_labels)
        if missing:
            return None, None, f"--gold-labels does not map the gold label(s) {_quoted(missing)}"
        return (lambda g: gold_labels[g.strip().lower()]), pred_pol, "through --gold-labels"
    if isinstance(gold_labels, LabelMap):
        missing = sorted(g for g in golds if gold_labels._lookup(g) is None)
        if missing:
            return None, None, f"--gold-labels does not hold the gold label(s) {_quoted(missing)}"
        return gold_labels.polarity_of, pred_pol, f"through --gold-labels ({gold_labels.describe()})"
    if all(model_map._lookup(g) is not None for g in golds):
        return model_map.polarity_of, pred_pol, "on the model's own label scale"
    try:
        gold_map = LabelMap.recognise(golds)
    except PairflipError:
        return None, None, (
            f"gold labels {_quoted(sorted(golds))} could not be mapped to the model's scale "
            f"({model_map.describe()}); pass --gold-labels"
        )
    return gold_map.polarity_of, pred_pol, f"by polarity, gold labels read as {gold_map.describe()}"


def accuracy_words(a: dict[str, Any] | None, *, short: bool = False) -> str | None:
    """The accuracy fact as a reader sees it, or why there is none; None without gold labels."""
    if not a:
        return None
    if a.get("rate") is None:
        return f"not computed: {a.get('problem')}"
    pct = lambda x: f"{100 * x:.1f}"  # noqa: E731
    if short:
        return f"accuracy {pct(a['rate'])} % on {a['sources']} sources"
    how = f"; gold labels compared {a['mapped']}" if a.get("mapped") else ""
    return (f"{pct(a['rate'])} % on {a['sources']} sources with a gold label ({a['correct']} right; "
            f"95 % CI {pct(a['ci95'][0])}-{pct(a['ci95'][1])}{how})")


def _quoted(items: list[str], most: int = 5) -> str:
    shown = ", ".join(repr(x) for x in items[:most])
    return shown + (f" and {len(items) - most} more" if len(items) > most else "")


def _accuracy(results: Results, gold_labels: str | dict | LabelMap | None = None) -> dict[str, Any] | None:
    """Accuracy of the model on sources that carry a gold label (each source counted once).

    Right means the same polarity (see :func:`_gold_reader`); ``"mapped"`` says how gold labels
    were read. When they cannot be read, ``rate`` is None and ``"problem"`` says why.
    """
    labels = dict(results.header.get("labels") or {})
    firsts: dict[str, tuple[str, str]] = {}
    for v in results.verdicts:
        key = v.source_id or v.source
        if v.label is None or key in firsts:
            continue
        firsts[key] = (v.label.strip(), v.source_pred)
    if not firsts and gold_labels is None:
        return None
    if not firsts:
        return {"correct": 0, "sources": 0, "rate": None, "ci95": None, "mapped": None,
                "problem": "--gold-labels was given but no source carries a gold label"}
    gold_pol, pred_pol, how = _gold_reader({g for g, _ in firsts.values()}, labels, gold_labels)
    if gold_pol is None:
        return {"correct": 0, "sources": len(firsts), "rate": None, "ci95": None, "mapped": None, "problem": how}
    correct = sum(gold_pol(g) == pred_pol(p) for g, p in firsts.values())
    lo, hi = wilson_interval(correct, len(firsts))
    return {"correct": correct, "sources": len(firsts), "rate": correct / len(firsts), "ci95": [lo, hi],
            "mapped": how, "problem": None}
