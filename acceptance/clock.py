"""The build's notion of today: the clock, or ``SOURCE_DATE_EPOCH`` when it is set.

``SOURCE_DATE_EPOCH`` (reproducible-builds.org, "SOURCE_DATE_EPOCH specification") is a
whole number of seconds since 1970-01-01 00:00:00 UTC. Every reader of it goes through
:func:`source_date_epoch`, so a malformed value is one clear error, never a traceback.
"""

from __future__ import annotations

import datetime as _dt
import os

from .errors import AcceptanceError

__all__ = ["source_date_epoch", "today"]

_LATEST = int(_dt.datetime(9999, 12, 31, tzinfo=_dt.UTC).timestamp())


def source_date_epoch() -> _dt.datetime | None:
    """The moment ``SOURCE_DATE_EPOCH`` names, or None when it is unset or empty."""
    text = os.environ.get("SOURCE_DATE_EPOCH", "").strip()
    if not text:
        return None
    if not text.isascii() or not text.isdigit() or int(text) > _LATEST:
        shown = text if len(text) <= 40 and text.isprintable() else repr(text[:40])
        raise AcceptanceError(
            f"SOURCE_DATE_EPOCH={shown} is not a time: set it to a whole number of seconds "
            "since 1970-01-01 UTC (for 2026-03-10, 1773100800), or unset it")
    return _dt.datetime.fromtimestamp(int(text), _dt.UTC)


def today() -> _dt.date:
    """The build date: ``SOURCE_DATE_EPOCH``'s day when set, else today's in UTC."""
    moment = source_date_epoch()
    return (moment or _dt.datetime.now(_dt.UTC)).date()
