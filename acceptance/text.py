"""Characters that act instead of showing: direction overrides and zero-width characters.

A right-to-left override (U+202E) makes "fdp.exe" display as "exe.pdf"; a zero-width space
makes two different names look alike. The Unicode general category Cf ("format", Unicode
Standard, chapter 4.5 and UAX #9 for the bidirectional ones) holds every such character.
Ids refuse them (:func:`hidden_characters`); names and notes are shown with each one
spelt out visibly (:func:`visible`) wherever text is shown.
"""

from __future__ import annotations

import re

__all__ = ["hidden_characters", "visible", "describe_hidden"]

# The code points of category Cf (Unicode 15.1, UnicodeData.txt), as ranges: building the
# set from unicodedata at import would cost check 0.7 s. A test compares it with the running
# Python's tables; U+13439-1343F are Cf from Unicode 15.0 on.
FORMAT_RANGES: tuple[tuple[int, int], ...] = (
    (0x00AD, 0x00AD), (0x0600, 0x0605), (0x061C, 0x061C), (0x06DD, 0x06DD),
    (0x070F, 0x070F), (0x0890, 0x0891), (0x08E2, 0x08E2), (0x180E, 0x180E),
    (0x200B, 0x200F), (0x202A, 0x202E), (0x2060, 0x2064), (0x2066, 0x206F),
    (0xFEFF, 0xFEFF), (0xFFF9, 0xFFFB), (0x110BD, 0x110BD), (0x110CD, 0x110CD),
    (0x13430, 0x1343F), (0x1BCA0, 0x1BCA3), (0x1D173, 0x1D17A), (0xE0001, 0xE0001),
    (0xE0020, 0xE007F),
)
_FORMAT_RE = re.compile("[" + "".join(
    re.escape(chr(low)) + ("" if low == high else "-" + re.escape(chr(high)))
    for low, high in FORMAT_RANGES) + "]")


def hidden_characters(text: str) -> list[str]:
    """The format characters in ``text``, each as ``U+XXXX``, in order, once each."""
    seen: dict[str, None] = {}
    for match in _FORMAT_RE.finditer(text):
        seen.setdefault(f"U+{ord(match.group()):04X}", None)
    return list(seen)


def describe_hidden(text: str) -> str | None:
    """Why ``text`` may not be an id, or None: it holds an invisible or direction-changing
    character."""
    found = hidden_characters(text)
    if not found:
        return None
    return (f"holds an invisible or direction-changing character ({', '.join(found)}); "
            "retype the name without it")


def visible(text: str) -> str:
    """``text`` with each format character written out as ``[U+XXXX]``."""
    if _FORMAT_RE.search(text) is None:
        return text
    return _FORMAT_RE.sub(lambda m: f"[U+{ord(m.group()):04X}]", text)
