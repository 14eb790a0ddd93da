"""The clock is injected everywhere: records never read the wall clock except
through :func:`system_clock`, the default a front end passes in. Tests pass a
fixed or stepping clock so that times in the record are predictable.
"""

from __future__ import annotations

from datetime import datetime
from typing import Callable

Clock = Callable[[], datetime]


def system_clock() -> datetime:
    """The local time now, with the machine's UTC offset attached."""
    return datetime.now().astimezone()


def default_clock() -> Clock:
    """The clock used when none is given: the machine's local time."""
    return system_clock


def timestamp(clock: Clock) -> str:
    """Read ``clock`` once and format it as ISO 8601 with its UTC offset.

    A record time without an offset cannot be compared across sites, so a
    clock that returns a naive datetime is refused.
    """
    now = clock()
    if not isinstance(now, datetime):
        raise TypeError(f"clock: expected a datetime, got {type(now).__name__}")
    if now.tzinfo is None or now.utcoffset() is None:
        raise ValueError(f"clock: expected a time with a UTC offset, got naive {now.isoformat()!r}")
    return now.isoformat(timespec="milliseconds")
