"""Progress bars: rich on a terminal, nothing at all when stderr is not a terminal."""

from __future__ import annotations

import os
import sys
from contextlib import contextmanager
from typing import Iterator, Optional


class _Bar:
    def __init__(self, progress, task) -> None:
        self._p, self._t = progress, task

    def update(self, done: int, total: Optional[int] = None) -> None:
        self._p.update(self._t, completed=done, total=total)


@contextmanager
def progress_bar(description: str) -> Iterator[Optional[_Bar]]:
    """Yield an object with ``update(done, total=None)``, or ``None`` when output is not a terminal."""
    if not sys.stderr.isatty() or os.environ.get("PAIRFLIP_NO_PROGRESS"):
        yield None
        return
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn

    with Progress(
        TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(),
        console=Console(stderr=True), transient=True,
    ) as p:
        yield _Bar(p, p.add_task(description, total=None))
