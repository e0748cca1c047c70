"""A progress line on stderr for work that can take more than a second.

Shown only when stderr is a terminal and the answer is not ``--json``: a
spinner, what is being done and the time so far, cleared when the work ends.
Piped output, log files and tests see nothing.  rich is imported only then.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any, TextIO

Update = Callable[[str], None]


def _nothing(_text: str) -> None:
    return None


def wanted(stream: TextIO | None = None, *, quiet: bool = False) -> bool:
    """Whether a progress line belongs on ``stream`` (stderr by default)."""
    if quiet or os.environ.get("SAWPLAN_NO_PROGRESS"):
        return False
    target = sys.stderr if stream is None else stream
    try:
        return bool(target.isatty())
    except (AttributeError, ValueError):  # closed or not a real file
        return False


@contextmanager
def progress(what: str, *, quiet: bool = False, stream: TextIO | None = None) -> Iterator[Update]:
    """``with progress("planning 3 sections", quiet=json_out) as say:`` — ``say(text)`` updates it."""
    if not wanted(stream, quiet=quiet):
        yield _nothing
        return
    from rich.console import Console
    from rich.progress import Progress, SpinnerColumn, TextColumn, TimeElapsedColumn

    target = sys.stderr if stream is None else stream
    console = Console(file=target, force_terminal=True, highlight=False)
    columns: list[Any] = [SpinnerColumn(), TextColumn("{task.description}"), TimeElapsedColumn()]
    with Progress(*columns, console=console, transient=True) as bar:
        task = bar.add_task(what, total=None)
        yield lambda text: bar.update(task, description=text)
