"""Text that stays text wherever the tool writes it: a terminal, a CSV cell, PDF metadata, a
link. Each rule is one function here, used by every writer of that kind.

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

__all__ = ["terminal_text", "csv_cell", "xml_text", "url_segment", "url_path"]

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
