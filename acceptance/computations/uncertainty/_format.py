"""Number formatting and argument checks shared by the uncertainty phrases."""

from __future__ import annotations

import math

from .._errors import ComputationError

# --------------------------------------------------------------------------------------------
# Formatting shared by the phrases


def _format_number(value: float) -> str:
    """Shortest positional text that reads back as the same float (no exponent)."""
    text = repr(float(value))
    if "e" in text or "n" in text:  # exponent form, inf or nan: let numpy write it out
        import numpy as np  # here only: check's start-up does not pay for numpy

        return str(np.format_float_positional(float(value), trim="-"))
    return text[:-2] if text.endswith(".0") else text


def _format_significant(value: float, digits: int = 2) -> str:
    """Round to ``digits`` significant digits, positional.

    JCGM 100:2008 clause 7.2.6: an uncertainty is usually quoted to at most two
    significant digits [M].
    """
    if value == 0 or not math.isfinite(value):
        return _format_number(value)
    exponent = math.floor(math.log10(abs(value)))
    decimals = digits - 1 - exponent
    rounded = round(value, decimals)
    return f"{rounded:.{max(decimals, 0)}f}"


def _with_unit(text: str, unit: str) -> str:
    return f"{text} {unit}" if unit else text


def _require_finite(name: str, value: float) -> None:
    if not math.isfinite(value):
        raise ComputationError(f"{name} {value!r} is not a finite number")


def _require_positive(name: str, value: float) -> None:
    _require_finite(name, value)
    if value <= 0:
        raise ComputationError(f"{name} {_format_number(value)} must be greater than zero")


def _require_non_negative(name: str, value: float) -> None:
    _require_finite(name, value)
    if value < 0:
        raise ComputationError(f"{name} {_format_number(value)} must be zero or greater")
