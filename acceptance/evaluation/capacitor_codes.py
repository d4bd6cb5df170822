"""Capacitor tolerance as written on a nameplate: an IEC 60062 letter or '±5 %'."""

from __future__ import annotations

import re

__all__ = ["tolerance_window", "tolerance_window_error"]

# IEC 60062:2016, clause 5 (letter code for tolerance on capacitance) [M]
_LETTERS: dict[str, tuple[float, float]] = {
    "B": (-0.1, 0.1), "C": (-0.25, 0.25), "D": (-0.5, 0.5), "F": (-1.0, 1.0),
    "G": (-2.0, 2.0), "J": (-5.0, 5.0), "K": (-10.0, 10.0), "M": (-20.0, 20.0),
    "N": (-30.0, 30.0), "Z": (-20.0, 80.0),
}
_PERCENT_RE = re.compile(r"^(?:±|\+/-|\+-)\s*(\d+(?:\.\d+)?)\s*%$")
_ASYM_RE = re.compile(r"^-\s*(\d+(?:\.\d+)?)\s*%\s*/\s*\+\s*(\d+(?:\.\d+)?)\s*%$")


def tolerance_window(code: str) -> tuple[float, float, str]:
    """(lower %, upper %, description) for a tolerance code or a written percentage."""
    text = code.strip()
    if text.upper() in _LETTERS and len(text) == 1:
        lower, upper = _LETTERS[text.upper()]
        return lower, upper, f"IEC 60062 letter {text.upper()}"
    match = _PERCENT_RE.match(text)
    if match:
        value = float(match.group(1))
        return -value, value, f"±{match.group(1)} %"
    match = _ASYM_RE.match(text)
    if match:
        return -float(match.group(1)), float(match.group(2)), text
    raise ValueError(
        f"'{code}' is not a capacitance tolerance; write an IEC 60062 letter "
        f"({', '.join(_LETTERS)}) or a percentage such as '±5 %' or '-10 %/+50 %'"
    )


def tolerance_window_error(code: str) -> str | None:
    try:
        tolerance_window(code)
    except ValueError as error:
        return str(error)
    return None
