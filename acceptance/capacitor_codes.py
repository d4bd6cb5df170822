"""Capacitor tolerance as written on a nameplate: an IEC 60062 letter or '±5 %'.

The letters themselves are :func:`acceptance.computations.capacitors.tolerance_code`;
this module only reads the nameplate's spelling.
"""

from __future__ import annotations

import re

from .computations import ComputationError
from .computations.capacitors import tolerance_code

__all__ = ["tolerance_window", "tolerance_window_error"]

_PERCENT_RE = re.compile(r"^(?:±|\+/-|\+-)\s*(\d+(?:\.\d+)?)\s*%$")
_ASYM_RE = re.compile(r"^-\s*(\d+(?:\.\d+)?)\s*%\s*/\s*\+\s*(\d+(?:\.\d+)?)\s*%$")


def tolerance_window(code: str) -> tuple[float, float, str]:
    """(lower %, upper %, description) for a tolerance code or a written percentage."""
    text = code.strip()
    if len(text) == 1 and text.isalpha():
        try:
            letter = tolerance_code(text)
        except ComputationError as error:
            raise ValueError(
                f"'{code}' is not a capacitance tolerance: {error}, or write a percentage "
                "such as '±5 %' or '-10 %/+50 %'") from None
        return 100 * letter.lower, 100 * letter.upper, f"IEC 60062 letter {letter.letter}"
    match = _PERCENT_RE.match(text)
    if match:
        value = float(match.group(1))
        return -value, value, f"±{match.group(1)} %"
    match = _ASYM_RE.match(text)
    if match:
        return -float(match.group(1)), float(match.group(2)), text
    raise ValueError(
        f"'{code}' is not a capacitance tolerance; write an IEC 60062 letter "
        "(B, C, D, F, G, J, K, M, N, Z) or a percentage such as '±5 %' or '-10 %/+50 %'"
    )


def tolerance_window_error(code: str) -> str | None:
    try:
        tolerance_window(code)
    except ValueError as error:
        return str(error)
    return None
