"""Argument checks shared by the computations: one wording for every module's errors."""

from __future__ import annotations

import math
import numbers

from ._errors import ComputationError

__all__ = ["ABSOLUTE_ZERO_C", "finite", "non_negative", "positive", "temperature"]

ABSOLUTE_ZERO_C = -273.15
"""Absolute zero on the Celsius scale [°C]."""


def finite(name: str, value: float, unit: str) -> float:
    if not isinstance(value, numbers.Real) or isinstance(value, bool):
        raise ComputationError(f"{name} {value!r} must be a number in {unit}")
    if not math.isfinite(value):
        raise ComputationError(f"{name} {value} {unit} must be a finite number")
    return float(value)


def positive(name: str, value: float, unit: str) -> float:
    value = finite(name, value, unit)
    if value <= 0:
        unit = f" {unit}" if unit else ""
        raise ComputationError(f"{name} {value:g}{unit} must be greater than 0{unit}")
    return value


def non_negative(name: str, value: float, unit: str) -> float:
    value = finite(name, value, unit)
    if value < 0:
        unit = f" {unit}" if unit else ""
        raise ComputationError(f"{name} {value:g}{unit} must not be negative")
    return value


def temperature(name: str, value: float) -> float:
    value = finite(name, value, "°C")
    if value < ABSOLUTE_ZERO_C:
        raise ComputationError(
            f"{name} {value:g} °C is below absolute zero ({ABSOLUTE_ZERO_C} °C)"
        )
    return value
