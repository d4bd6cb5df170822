"""Text that stays text wherever the tool writes it or reads a name.

Characters that act instead of showing: direction overrides and zero-width characters. A
right-to-left override (U+202E) makes "fdp.exe" display as "exe.pdf"; a zero-width space
makes two different names look alike. The Unicode general category Cf ("format", Unicode
Standard, chapter 4.5 and UAX #9 for the bidirectional ones) holds every such character.
Ids refuse them (:func:`hidden_characters`); names and notes are shown with each one
spelt out visibly (:func:`visible`) wherever text is shown.

Each rule for a kind of output is one function here, used by every writer of that kind:

- :func:`terminal_text`: control characters and escape sequences are shown escaped
  (``\\u001b``, ``\\u202e``), never sent raw to a terminal, where one could clear the screen,
  move the cursor over earlier lines or make a name display as something else.
- :func:`csv_cell`: a cell that a spreadsheet would take as a formula (starting with ``=``,
  ``+``, ``-``, ``@``, a tab or a carriage return) gets a leading apostrophe, the usual
  neutralisation (OWASP, "CSV Injection"); the README states the rule.
- :func:`xml_text`: characters XML 1.0 does not allow (W3C XML 1.0, 5th ed., clause 2.2,
  production [2] Char) are removed, so PDF metadata (XMP is XML) stays well formed.
- :func:`url_segment` / :func:`url_path`: names used in links are percent-encoded (RFC 3986
  clause 2.1), so a space, ``#``, ``?`` or ``%`` in a machine, visit or attachment name still
  links to its file.
"""

from __future__ import annotations

import re
import unicodedata
from urllib.parse import quote

__all__ = ["csv_cell", "describe_hidden", "hidden_characters", "terminal_text", "url_path",
           "url_segment", "visible", "xml_text"]

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")

# XML 1.0 clause 2.2 [2]: #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF]
_XML_INVALID = re.compile("[^\t\n\r\x20-\ud7ff\ue000-\ufffd\U00010000-\U0010ffff]")


def _escaped(char: str) -> str:
    """``\\uNNNN`` (a surrogate pair above the BMP): readable, and valid inside a JSON
    string, so the same escape serves text and JSON output."""
    code = ord(char)
    if code < 0x10000:
        return f"\\u{code:04x}"
    code -= 0x10000
    return f"\\u{0xD800 + (code >> 10):04x}\\u{0xDC00 + (code & 0x3FF):04x}"


def terminal_text(text: str) -> str:
    """``text`` with every control and format character shown escaped, line breaks kept.

    Control characters (Unicode category Cc: C0, DEL, C1, so ESC and CSI sequences) and
    format characters (Cf: bidirectional overrides and isolates, zero-width characters) are
    written as ``\\uNNNN``; a line break stays a line break.
    """
    if text.replace("\n", "").isprintable():  # the usual case, at C speed
        return text
    return "".join(char if char == "\n" or unicodedata.category(char) not in ("Cc", "Cf")
                   else _escaped(char) for char in text)


def csv_cell(value: str) -> str:
    """A CSV cell that no spreadsheet runs as a formula: a leading apostrophe when it starts
    with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return."""
    return f"'{value}" if value.startswith(_FORMULA_START) else value


def xml_text(text: str) -> str:
    """``text`` without the characters XML 1.0 does not allow."""
    return _XML_INVALID.sub("", text)


def url_segment(name: str) -> str:
    """One path segment (a machine, visit or file name) percent-encoded for a link."""
    return quote(name, safe="")


def url_path(path: str) -> str:
    """A '/'-separated relative path with each segment percent-encoded."""
    return "/".join(url_segment(part) for part in path.split("/"))



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
