"""``pairflip vet``: the full-screen app (Textual), one pair per screen, one key per answer.

Keys: ``a`` accept, ``r`` reject (then a reason key), ``e`` change the expectation (then an
expectation key), ``s`` skip, ``u`` undo, ``q`` quit; ``Esc`` cancels a half-given answer. Every
answer goes to the decisions file at once (the session writes and fsyncs it), so closing the
terminal or killing the process loses at most the pair on screen. The layout is made to fit and
stay readable at 80x24: one column, texts wrapped, no boxes wider than the screen.
"""

from __future__ import annotations

from rich.console import Group
from rich.text import Text
from textual import events
from textual.app import App, ComposeResult
from textual.widgets import Static

from pairflip.report.terminal import diff_text
from pairflip.vetting import PLAIN_SHOULD, REASON_KEYS, SHOULD_KEYS, VetSession

_KEYS = {
    "main": "a accept  r reject  e change expectation  s skip  u undo  q quit",
    "reject": "why?  " + "  ".join(f"{k} {v.replace('-', ' ')}" for k, v in REASON_KEYS.items()) + "  esc back",
    "change": "should:  " + "  ".join(f"{k} {v}" for k, v in SHOULD_KEYS.items()) + "  esc back",
}


def _pred(label: str | None, score: float | None) -> str:
    if label is None:
        return "-"
    return label if score is None else f"{label} ({score:+.2f})"


class VetApp(App[None]):
    """One pair per screen; the session does the bookkeeping."""

    CSS = """
    Screen { layout: vertical; }
    #top { height: 1; background: $primary; color: $text; padding: 0 1; }
    #progress { height: 1; padding: 0 1; color: $text-muted; }
    #pair { height: 1fr; padding: 1 1 0 1; }
    #keys { height: 2; background: $panel; padding: 0 1; }
    """

    def __init__(self, session: VetSession, title: str) -> None:
        super().__init__()
        self.session = session
        self.file_title = title
        self.mode = "main"
        self.message = ""

    def compose(self) -> ComposeResult:
        yield Static(id="top")
        yield Static(id="progress")
        yield Static(id="pair")
        yield Static(id="keys")

    def on_mount(self) -> None:
        self.refresh_view()

    def refresh_view(self) -> None:
        s = self.session
        self.query_one("#top", Static).update(Text(f"pairflip vet · {self.file_title}", no_wrap=True, overflow="ellipsis"))
        self.query_one("#progress", Static).update(Text(s.progress(), no_wrap=True, overflow="ellipsis"))
        item = s.current
        if item is None:
            body: Group | Text = Text("All pairs of this selection are answered. Press q to quit.")
        else:
            d = s.standing(item)
            parts = [
                Text.assemble((item.rule, "bold"), "  ", (PLAIN_SHOULD.get(item.should, item.should), "italic")),
                Text(""),
                Text.assemble(("source   ", "dim"), item.source),
                Text.assemble(("variant  ", "dim"), item.variant),
                Text(""),
                Text.assemble(("diff     ", "dim"), diff_text(item.source, item.variant)),
            ]
            if item.source_pred is not None:
                parts.append(Text.assemble(("model    ", "dim"), _pred(item.source_pred, item.source_score), " -> ",
                                           _pred(item.variant_pred, item.variant_score),
                                           (f"   {item.verdict}", "bold red" if item.verdict == "violation" else "")))
            if d is not None:
                parts.append(Text(f"decided before: {d.decision}" + (f" ({d.reason or d.should})" if d.reason or d.should else ""),
                                  style="yellow"))
            body = Group(*parts)
        self.query_one("#pair", Static).update(body)
        keys = Text(_KEYS[self.mode], style="bold")
        if self.message:
            keys = Text.assemble(keys, "\n", (self.message, "yellow"))
        self.query_one("#keys", Static).update(keys)

    def on_key(self, event: events.Key) -> None:
        ch = event.character or ""
        s = self.session
        self.message = ""
        if event.key == "escape":
            self.mode = "main"
        elif self.mode == "reject":
            if ch in REASON_KEYS:
                s.reject(ch)
                self.mode = "main"
            else:
                self.message = "press one of the reason keys, or esc"
        elif self.mode == "change":
            if ch in SHOULD_KEYS:
                s.change(ch)
                self.mode = "main"
            else:
                self.message = "press one of the expectation keys, or esc"
        elif ch == "q":
            s.stop()
            self.exit()
            return
        elif s.current is None:
            if ch == "u" and s.undo():
                pass
            else:
                self.message = "nothing left to answer: u undo, q quit"
        elif ch == "a":
            s.accept()
        elif ch == "r":
            self.mode = "reject"
        elif ch == "e":
            self.mode = "change"
        elif ch == "s":
            s.skip()
        elif ch == "u":
            if not s.undo():
                self.message = "nothing to undo yet"
        else:
            return
        event.stop()
        self.refresh_view()
