"""Progress of a long batch on stderr, only when stderr is a terminal.

The line (``sheetlint: 120/950 files  motors/b/x.yaml``) is redrawn in place at most every
``interval`` seconds and only once the batch has run for ``delay`` seconds, so a short check
prints nothing; it is wiped before the report is written. When the stream is not a terminal
(a pipe, a file, CI logs, a pre-commit hook) nothing is written at all.
"""

from __future__ import annotations

import os
import sys
import time
from collections.abc import Callable, Iterable, Iterator
from typing import Any, TextIO, TypeVar

T = TypeVar("T")

DEFAULT_DELAY = 0.5  # seconds before the first line
DEFAULT_INTERVAL = 0.1  # seconds between redraws


def is_terminal(stream: TextIO) -> bool:
    try:
        return stream.isatty()
    except (AttributeError, ValueError, OSError):
        return False


def with_progress(items: Iterable[T], *, total: int | Callable[[], int] | None = None,
                  label: Callable[[T], str] | None = None, stream: TextIO | None = None,
                  enabled: bool | None = None, delay: float = DEFAULT_DELAY,
                  interval: float = DEFAULT_INTERVAL,
                  clock: Callable[[], float] = time.monotonic) -> Iterator[T]:
    """Yield ``items`` unchanged while drawing a progress line on ``stream`` (default stderr).

    Parameters
    ----------
    items
        The results iterator (e.g. ``check_paths(...)``).
    total
        Number of items, or a function computing it (called only when progress is shown).
    label
        Text for the item just finished (e.g. its path).
    enabled
        ``None``: draw only when ``stream`` is a terminal and ``TERM`` is not ``dumb``.
    delay, interval
        Seconds before the first line; least seconds between two redraws.
    """
    out = stream if stream is not None else sys.stderr
    if enabled is None:
        enabled = is_terminal(out) and os.environ.get("TERM") != "dumb"
    if not enabled:
        yield from items
        return
    start = clock()
    last_draw = -1.0
    count = 0
    known_total: int | None = None
    width = 0
    try:
        for item in items:
            count += 1
            now = clock()
            if now - start >= delay and now - last_draw >= interval:
                if known_total is None and total is not None:
                    known_total = total() if callable(total) else total
                line = _line(count, known_total, label(item) if label else "")
                out.write("\r" + line.ljust(width))
                out.flush()
                width = len(line)
                last_draw = now
            yield item
    finally:
        if width:
            out.write("\r" + " " * width + "\r")
            out.flush()


def _line(count: int, total: int | None, label: str, columns: int = 78) -> str:
    done = f"{count}/{total}" if total else str(count)
    text = f"sheetlint: {done} files"
    if label:
        room = columns - len(text) - 2
        if room > 8:
            if len(label) > room:
                label = "..." + label[-(room - 3):]
            text += "  " + label
    return text


def file_label(result: Any) -> str:
    """The path of a ``FileResult`` (what the progress line names)."""
    return str(getattr(result, "path", ""))
