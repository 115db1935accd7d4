"""Applying a person's decisions (``--vetted FILE``) to a results file before it is reported.

Rejected pairs are left out; a changed expectation is applied and the pair judged again from the
predictions the results file keeps (``probes.expectations.rejudge``); every kept pair that a
person looked at is marked ``extra["vetted"]`` (``accept`` or ``change``), so the summary can
count *confirmed* violations: violations on pairs a person accepted.
"""

from __future__ import annotations

import os
from typing import Any

from pairflip.decisions import apply_decisions, read_decisions
from pairflip.records import Results


def vet_results(results: Results, vetted: str | os.PathLike[str] | None) -> Results:
    """``results`` with the decisions of ``vetted`` applied (unchanged when ``vetted`` is None).

    The header gets ``"vetted": {"path", "total", "vetted", "rejected", "changed", "accepted"}``.
    A results file scored with ``score --vetted`` already had the decisions applied; applying the
    same file again changes nothing (rejected pairs are gone, changed ones already carry the new
    expectation).
    """
    if vetted is None:
        return results
    from pairflip.probes.expectations import rejudge

    decisions = read_decisions(vetted)
    before = {v.id: v.should for v in results.verdicts}
    kept, counts = apply_decisions(results.verdicts, decisions)
    labels = results.header.get("labels")
    margin = float(results.header.get("margin") or 0.0)
    for v in kept:
        if v.should != before[v.id]:
            v.verdict = rejudge(v, labels, margin)
    header: dict[str, Any] = dict(results.header)
    info = counts.to_dict()
    earlier = header.get("vetted") or {}
    if earlier:  # scored with --vetted: the pairs rejected then are already gone; count them too
        for k in ("total", "vetted", "rejected"):
            info[k] += int(earlier.get("rejected", 0))
        for rule, n in (earlier.get("rejected_by_rule") or {}).items():
            info["rejected_by_rule"][rule] = info["rejected_by_rule"].get(rule, 0) + int(n)
    info["path"] = str(vetted)
    header["vetted"] = info
    return Results(header=header, verdicts=kept)
