"""A person's decisions about pairs (``pairflip vet``), kept in a decisions file, and applying them.

The decisions file is JSON Lines in UTF-8, like the suite and results files: a header line
``{"kind": "pairflip-decisions", "version": 1, "created": ...}``, then one record per answer,
appended (and fsynced) the moment it is given, so a killed session loses nothing answered::

    {"id": "3f2a...", "decision": "accept", "time": "2026-12-02T18:40:11+00:00"}
    {"id": "9b1c...", "decision": "reject", "reason": "ungrammatical", "time": ...}
    {"id": "77de...", "decision": "change", "should": "hold", "was": "flip", "time": ...}
    {"id": "3f2a...", "decision": "undo", "time": ...}

``decision`` is ``accept``, ``reject`` (with ``reason``: one of :data:`REASONS`, and an optional
``note``), ``change`` (the pair is right but its expectation is ``should``; ``was`` records the
old one) or ``undo`` (forget the last decision on that pair). The last record for a pair id wins.
Pair ids are content hashes of rule, source and variant, so decisions carry over to a suite
rebuilt with the same seed and to every model's results on it.
"""

from __future__ import annotations

import json
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Iterable, TypeVar

from pairflip.records import SHOULDS, PairflipError

DECISIONS_KIND = "pairflip-decisions"
DECISIONS_VERSION = 1
KINDS = ("accept", "reject", "change", "undo")
REASONS = ("ungrammatical", "expectation-wrong", "no-opinion", "other")


@dataclass(frozen=True)
class Decision:
    """What a person decided about one pair (the last word on it)."""

    id: str
    decision: str  # "accept" | "reject" | "change"
    should: str | None = None  # the new expectation, for "change"
    reason: str | None = None  # for "reject"
    note: str = ""
    time: str = ""

    @property
    def kept(self) -> bool:
        """Whether the pair stays in the counts (accepted, or accepted with a new expectation)."""
        return self.decision != "reject"

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = {"id": self.id, "decision": self.decision}
        if self.should is not None:
            out["should"] = self.should
        if self.reason is not None:
            out["reason"] = self.reason
        if self.note:
            out["note"] = self.note
        out["time"] = self.time
        return out


def _check_record(path: Path, lineno: int, obj: Any) -> None:
    where = f"{path}:{lineno}"
    if not isinstance(obj, dict):
        raise PairflipError(f"{where}: expected a JSON object (a decision), got {type(obj).__name__}")
    if not isinstance(obj.get("id"), str) or not obj["id"]:
        raise PairflipError(f"{where}: field 'id' is {obj.get('id')!r}; expected a pair id (a string)")
    kind = obj.get("decision")
    if kind not in KINDS:
        raise PairflipError(f"{where}: field 'decision' is {kind!r}; expected one of {', '.join(KINDS)}")
    if kind == "reject" and obj.get("reason") not in REASONS:
        raise PairflipError(f"{where}: field 'reason' is {obj.get('reason')!r}; expected one of {', '.join(REASONS)}")
    if kind == "change" and obj.get("should") not in SHOULDS:
        raise PairflipError(f"{where}: field 'should' is {obj.get('should')!r}; expected one of {', '.join(SHOULDS)}")


def read_decisions(path: str | os.PathLike[str]) -> dict[str, Decision]:
    """The standing decision per pair id (undone ones removed). A missing file is an error."""
    p = Path(path)
    if not p.exists():
        raise PairflipError(f"--vetted {p}: no such file; expected a decisions file made by `pairflip vet`")
    if p.is_dir():
        raise PairflipError(f"--vetted {p}: is a folder; expected a decisions file made by `pairflip vet`")
    return _read(p)


def _read(p: Path) -> dict[str, Decision]:
    out: dict[str, Decision] = {}
    history: dict[str, list[Decision]] = {}
    try:
        lines = p.read_text(encoding="utf-8").splitlines()
    except UnicodeDecodeError as err:
        raise PairflipError(f"{p}: not valid UTF-8 ({err.reason}); expected a decisions file made by `pairflip vet`") from None
    for lineno, line in enumerate(lines, 1):
        if not line.strip():
            continue
        try:
            obj = json.loads(line)
        except json.JSONDecodeError as err:
            if lineno == len(lines) and not p.read_bytes().endswith(b"\n"):
                break  # the last answer was being written when the session was killed: drop it
            raise PairflipError(f"{p}:{lineno}: malformed JSON ({err.msg} at column {err.colno}); expected one decision per line") from None
        if lineno == 1:
            if not isinstance(obj, dict) or obj.get("kind") != DECISIONS_KIND:
                raise PairflipError(
                    f"{p}:1: not a decisions file (its first line has no \"kind\": {DECISIONS_KIND!r}); "
                    f"expected a file made by `pairflip vet --decisions FILE`"
                )
            if obj.get("version") != DECISIONS_VERSION:
                raise PairflipError(f"{p}:1: decisions file version {obj.get('version')!r}; this pairflip reads version {DECISIONS_VERSION}")
            continue
        _check_record(p, lineno, obj)
        pid = obj["id"]
        if obj["decision"] == "undo":
            stack = history.get(pid, [])
            if stack:
                stack.pop()
            if stack:
                out[pid] = stack[-1]
            else:
                out.pop(pid, None)
            continue
        d = Decision(pid, obj["decision"], obj.get("should"), obj.get("reason"), str(obj.get("note") or ""), str(obj.get("time", "")))
        history.setdefault(pid, []).append(d)
        out[pid] = d
    return out


class DecisionLog:
    """The decisions file of one vet session, opened for appending.

    Every record is written, flushed and fsynced before :meth:`add` returns.
    """

    def __init__(self, path: str | os.PathLike[str]) -> None:
        from pairflip.files import check_writable, now_iso

        self.path = Path(path)
        self._now = now_iso
        if self.path.is_dir():
            raise PairflipError(f"--decisions {self.path}: is a folder; expected the path of a decisions file")
        if self.path.exists():
            data = self.path.read_bytes()
            if data and not data.endswith(b"\n"):  # a record cut short by a kill: drop it, keep every whole one
                with open(self.path, "r+b") as fh:
                    fh.truncate(data.rfind(b"\n") + 1)
        fresh = not self.path.exists() or self.path.stat().st_size == 0
        if fresh:
            check_writable(self.path, "--decisions")
            self.standing: dict[str, Decision] = {}
        else:
            self.standing = _read(self.path)
        try:
            self._fh = open(self.path, "a", encoding="utf-8", newline="\n")
        except OSError as err:
            raise PairflipError(f"--decisions {self.path}: cannot open for appending ({err.strerror or err})") from None
        if fresh:
            self._write({"kind": DECISIONS_KIND, "version": DECISIONS_VERSION, "created": now_iso()})
        self._history: dict[str, list[Decision]] = {k: [v] for k, v in self.standing.items()}

    def _write(self, obj: dict[str, Any]) -> None:
        try:
            self._fh.write(json.dumps(obj, ensure_ascii=False) + "\n")
            self._fh.flush()
            os.fsync(self._fh.fileno())
        except OSError as err:
            raise PairflipError(f"--decisions {self.path}: writing failed ({err.strerror or err})") from None

    def add(self, pair_id: str, decision: str, *, should: str | None = None, was: str | None = None,
            reason: str | None = None, note: str = "") -> Decision:
        d = Decision(pair_id, decision, should, reason, note, self._now())
        rec = d.to_dict()
        if was is not None:
            rec["was"] = was
        self._write(rec)
        self._history.setdefault(pair_id, []).append(d)
        self.standing[pair_id] = d
        return d

    def undo(self, pair_id: str) -> None:
        self._write({"id": pair_id, "decision": "undo", "time": self._now()})
        stack = self._history.get(pair_id, [])
        if stack:
            stack.pop()
        if stack:
            self.standing[pair_id] = stack[-1]
        else:
            self.standing.pop(pair_id, None)

    def close(self) -> None:
        self._fh.close()


T = TypeVar("T")


@dataclass
class VettedCounts:
    """What applying a decisions file did, for report headers."""

    total: int = 0  # pairs (or results) before applying
    vetted: int = 0  # of them, how many carry a decision
    rejected: int = 0  # left out
    changed: int = 0  # expectation changed
    accepted: int = 0  # accepted as they were
    rejected_by_rule: dict[str, int] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        return {"total": self.total, "vetted": self.vetted, "rejected": self.rejected,
                "changed": self.changed, "accepted": self.accepted, "rejected_by_rule": dict(self.rejected_by_rule)}

    def sentence(self) -> str:
        return (f"vetted {self.vetted} of {self.total} pairs: {self.rejected} rejected and left out, "
                f"{self.changed} expectation{'s' if self.changed != 1 else ''} changed")


def apply_decisions(items: Iterable[T], decisions: dict[str, Decision]) -> tuple[list[T], VettedCounts]:
    """Pairs or verdicts with rejected ones left out and changed expectations applied.

    Items are changed in place (``should``) and marked in ``extra["vetted"]`` with the decision
    (``accept`` or ``change``), so later steps can count confirmed violations.
    """
    counts = VettedCounts()
    kept: list[T] = []
    for item in items:
        counts.total += 1
        d = decisions.get(item.id)  # type: ignore[attr-defined]
        if d is None:
            kept.append(item)
            continue
        counts.vetted += 1
        if d.decision == "reject":
            counts.rejected += 1
            rule = str(getattr(item, "rule", ""))
            counts.rejected_by_rule[rule] = counts.rejected_by_rule.get(rule, 0) + 1
            continue
        if d.decision == "change" and d.should is not None:
            counts.changed += 1
            if d.should != item.should:  # type: ignore[attr-defined]  # (equal: applied before, at scoring)
                item.extra["should_was"] = item.should  # type: ignore[attr-defined]
                item.should = d.should  # type: ignore[attr-defined]
        else:
            counts.accepted += 1
        item.extra["vetted"] = d.decision  # type: ignore[attr-defined]
        kept.append(item)
    return kept, counts
