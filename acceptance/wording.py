"""Counts in printed messages: "1 visit", "2 visits" — never "1 visits"."""

from __future__ import annotations


def counted(count: int, singular: str, plural: str | None = None) -> str:
    """``count`` followed by the noun in the number it agrees with.

    >>> counted(1, "visit"), counted(3, "visit"), counted(1, "mismatch", "mismatches")
    ('1 visit', '3 visits', '1 mismatch')
    """
    word = singular if count == 1 else (plural if plural is not None else singular + "s")
    return f"{count} {word}"
