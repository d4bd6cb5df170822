"""Tolerances as value objects that evaluate a reading and describe themselves.

The phrase a tolerance gives (``27.0 Ω ≤ R ≤ 29.4 Ω``, ``U ≥ 1 MΩ``) is the one
the terminal, the HTML page and the PDF all show, so the three never disagree.
"""

from __future__ import annotations

from dataclasses import dataclass

from .units import Dimension, format_value

__all__ = ["Tolerance"]


def _slack(limit: float, value: float) -> float:
    return 1e-12 * max(abs(limit), abs(value))


@dataclass(frozen=True)
class Tolerance:
    """Base: a closed interval, possibly one-sided, in base units of ``dimension``."""

    dimension: Dimension
    symbol: str
    unit: str
    lower: float | None = None
    upper: float | None = None
    digits: int = 4

    def contains(self, value: float) -> bool:
        # Limits are closed. A limit computed as nominal × (1 ± p) carries a rounding error of
        # a few ulps, so a reading written exactly on it must not fall outside by 1e-21 F.
        if self.lower is not None and value < self.lower - _slack(self.lower, value):
            return False
        return not (self.upper is not None and value > self.upper + _slack(self.upper, value))

    def _fmt(self, value: float) -> str:
        return format_value(value, self.dimension, self.unit, self.digits)

    def describe(self) -> str:
        if self.lower is not None and self.upper is not None:
            return f"{self._fmt(self.lower)} ≤ {self.symbol} ≤ {self._fmt(self.upper)}"
        if self.lower is not None:
            return f"{self.symbol} ≥ {self._fmt(self.lower)}"
        if self.upper is not None:
            return f"{self.symbol} ≤ {self._fmt(self.upper)}"
        return "no limit"

    def __str__(self) -> str:
        return self.describe()

    def distance_outside(self, value: float) -> float:
        """How far ``value`` lies outside (positive) or inside (negative) the nearest limit."""
        distances = []
        if self.lower is not None:
            distances.append(self.lower - value)
        if self.upper is not None:
            distances.append(value - self.upper)
        return max(distances) if distances else float("-inf")
