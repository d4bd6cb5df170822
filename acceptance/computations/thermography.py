"""Thermographic survey: classification by temperature difference, terminal ratings.

A hot spot is judged two ways: by its temperature difference over a similar
component under similar load, and over the ambient air. The published table
gives integer ranges with gaps (1-3 then 4-15 K; 1-10 then 11-20 then 21-40 K).
Here every band is closed on the left and runs up to the next published lower
bound, so a reading that falls in a gap takes the less severe band it follows,
and a bound followed by "> x" stays in its band:

- over a similar component: ΔT < 1 K no indication; 1 K ≤ ΔT < 4 K possible
  deficiency; 4 K ≤ ΔT ≤ 15 K probable deficiency; ΔT > 15 K major discrepancy.
- over ambient: ΔT < 1 K no indication; 1 K ≤ ΔT < 11 K possible deficiency;
  11 K ≤ ΔT < 21 K probable deficiency; 21 K ≤ ΔT ≤ 40 K monitor until corrected;
  ΔT > 40 K major discrepancy.

A component cooler than its reference (ΔT < 0) is no hot-spot indication.
The finding is the worse of the two comparisons.

Sources
-------
- ANSI/NETA MTS and ATS, thermographic survey suggested actions based on
  temperature rise (table number M): ranges and actions [S].
- NFPA 70 (NEC), 110.14(C)(1)(a) and (b): temperature limitations of equipment
  terminations [S; sub-item numbering M].
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import IntEnum

from ._checks import finite as _finite
from ._checks import temperature as _temperature
from ._errors import ComputationError
from .resistance import awg_index

__all__ = [
    "AMBIENT_BANDS",
    "SIMILAR_COMPONENT_BANDS",
    "SeverityBand",
    "TerminalRating",
    "ThermalSeverity",
    "ThermographyFinding",
    "classify_thermal_survey",
    "severity_over_ambient",
    "severity_over_similar",
    "terminal_temperature_rating",
]




class ThermalSeverity(IntEnum):
    """Severity of a thermographic finding, ordered so that ``max`` is the worse."""

    NO_INDICATION = 0
    POSSIBLE_DEFICIENCY = 1
    PROBABLE_DEFICIENCY = 2
    MONITOR = 3
    MAJOR_DISCREPANCY = 4

    @property
    def action(self) -> str:
        """The suggested action (NETA MTS/ATS, paraphrased)."""
        return _ACTIONS[self]

    def describe(self) -> str:
        return self.name.replace("_", " ").lower()


_ACTIONS = {
    ThermalSeverity.NO_INDICATION: "no action indicated",
    ThermalSeverity.POSSIBLE_DEFICIENCY: "possible deficiency; warrants investigation",
    ThermalSeverity.PROBABLE_DEFICIENCY: "probable deficiency; repair as time permits",
    ThermalSeverity.MONITOR: "monitor until corrective measures can be accomplished",
    ThermalSeverity.MAJOR_DISCREPANCY: "major discrepancy; repair immediately",
}


@dataclass(frozen=True)
class SeverityBand:
    """One band of temperature difference and its severity."""

    severity: ThermalSeverity
    lower: float
    """[K]; ``-inf`` for the lowest band"""
    lower_inclusive: bool
    upper: float
    """[K]; ``inf`` for the highest band"""
    upper_inclusive: bool

    def contains(self, temperature_difference: float) -> bool:
        """Whether the band holds this temperature difference [K]."""
        delta = temperature_difference
        above = delta >= self.lower if self.lower_inclusive else delta > self.lower
        below = delta <= self.upper if self.upper_inclusive else delta < self.upper
        return above and below

    def describe(self) -> str:
        """E.g. ``1 K ≤ ΔT < 4 K`` or ``ΔT > 15 K``."""
        low = "" if math.isinf(self.lower) else (
            f"{self.lower:g} K {'≤' if self.lower_inclusive else '<'} "
        )
        high = "" if math.isinf(self.upper) else (
            f" {'≤' if self.upper_inclusive else '<'} {self.upper:g} K"
        )
        if low and not high:
            return f"ΔT {'≥' if self.lower_inclusive else '>'} {self.lower:g} K"
        return f"{low}ΔT{high}"


_S = ThermalSeverity
SIMILAR_COMPONENT_BANDS: tuple[SeverityBand, ...] = (
    SeverityBand(_S.NO_INDICATION, -math.inf, False, 1.0, False),
    SeverityBand(_S.POSSIBLE_DEFICIENCY, 1.0, True, 4.0, False),
    SeverityBand(_S.PROBABLE_DEFICIENCY, 4.0, True, 15.0, True),
    SeverityBand(_S.MAJOR_DISCREPANCY, 15.0, False, math.inf, False),
)
"""Bands over a similar component under similar load (NETA MTS/ATS) [S]."""

AMBIENT_BANDS: tuple[SeverityBand, ...] = (
    SeverityBand(_S.NO_INDICATION, -math.inf, False, 1.0, False),
    SeverityBand(_S.POSSIBLE_DEFICIENCY, 1.0, True, 11.0, False),
    SeverityBand(_S.PROBABLE_DEFICIENCY, 11.0, True, 21.0, False),
    SeverityBand(_S.MONITOR, 21.0, True, 40.0, True),
    SeverityBand(_S.MAJOR_DISCREPANCY, 40.0, False, math.inf, False),
)
"""Bands over ambient air (NETA MTS/ATS) [S]."""


def _classify(
    name: str, temperature_difference: float, bands: tuple[SeverityBand, ...]
) -> ThermalSeverity:
    delta = _finite(name, temperature_difference, "K")
    return next(b.severity for b in bands if b.contains(delta))


def severity_over_similar(temperature_difference: float) -> ThermalSeverity:
    """Severity of a hot spot from its temperature over a similar component.

    Parameters
    ----------
    temperature_difference : float
        Component temperature less that of a similar component under similar
        load [K].

    Returns
    -------
    ThermalSeverity

    Notes
    -----
    Bands: see :data:`SIMILAR_COMPONENT_BANDS` and the module docstring.

    References
    ----------
    ANSI/NETA MTS and ATS, thermographic survey table (over similar) [S].
    """
    return _classify("temperature_difference", temperature_difference, SIMILAR_COMPONENT_BANDS)


def severity_over_ambient(temperature_difference: float) -> ThermalSeverity:
    """Severity of a hot spot from its temperature over the ambient air.

    Parameters
    ----------
    temperature_difference : float
        Component temperature less the ambient air temperature [K].

    Returns
    -------
    ThermalSeverity

    Notes
    -----
    Bands: see :data:`AMBIENT_BANDS` and the module docstring.

    References
    ----------
    ANSI/NETA MTS and ATS, thermographic survey table (over ambient) [S].
    """
    return _classify("temperature_difference", temperature_difference, AMBIENT_BANDS)


@dataclass(frozen=True)
class ThermographyFinding:
    """The classification of one surveyed component."""

    severity: ThermalSeverity
    governing_comparison: str
    """``"similar component"`` or ``"ambient"``: which comparison gave the severity."""
    over_similar: float | None
    """[K]"""
    severity_over_similar: ThermalSeverity | None
    over_ambient: float | None
    """[K]"""
    severity_over_ambient: ThermalSeverity | None
    standard: str = "ANSI/NETA MTS and ATS"
    clause: str = "thermographic survey table (table number from memory)"
    status: str = "S"

    @property
    def action(self) -> str:
        return self.severity.action


def classify_thermal_survey(
    component_temperature_c: float,
    similar_component_temperature_c: float | None = None,
    ambient_temperature_c: float | None = None,
) -> ThermographyFinding:
    """Classify a surveyed component by the worse of its two temperature differences.

    Parameters
    ----------
    component_temperature_c : float
        Temperature of the component surveyed [°C].
    similar_component_temperature_c : float, optional
        Temperature of a similar component under similar load [°C].
    ambient_temperature_c : float, optional
        Ambient air temperature [°C].

    Returns
    -------
    ThermographyFinding

    Notes
    -----
    At least one reference is needed. When both comparisons give the same
    severity the similar-component comparison is named as governing, being the
    more specific.

    References
    ----------
    ANSI/NETA MTS and ATS, thermographic survey table [S].
    """
    component = _temperature("component_temperature_c", component_temperature_c)
    if similar_component_temperature_c is None and ambient_temperature_c is None:
        raise ComputationError(
            "similar_component_temperature_c and ambient_temperature_c are both missing; "
            "give at least one reference temperature"
        )
    over_similar = severity_similar = over_ambient = severity_ambient = None
    if similar_component_temperature_c is not None:
        reference = _temperature("similar_component_temperature_c", similar_component_temperature_c)
        over_similar = component - reference
        severity_similar = severity_over_similar(over_similar)
    if ambient_temperature_c is not None:
        ambient = _temperature("ambient_temperature_c", ambient_temperature_c)
        over_ambient = component - ambient
        severity_ambient = severity_over_ambient(over_ambient)
    if severity_similar is not None and (
        severity_ambient is None or severity_similar >= severity_ambient
    ):
        severity, governing = severity_similar, "similar component"
    elif severity_ambient is not None:
        severity, governing = severity_ambient, "ambient"
    return ThermographyFinding(
        severity=severity,
        governing_comparison=governing,
        over_similar=over_similar,
        severity_over_similar=severity_similar,
        over_ambient=over_ambient,
        severity_over_ambient=severity_ambient,
    )


# --------------------------------------------------------------------------- terminals


@dataclass(frozen=True)
class TerminalRating:
    """Temperature rating assumed for a termination, and the rule that gave it."""

    temperature_c: float
    """[°C]"""
    reason: str
    standard: str = "NFPA 70 (NEC)"
    clause: str = "110.14(C)"
    status: str = "S"


def terminal_temperature_rating(
    circuit_rating: float,
    marked_conductor_gauge: str | int | None = None,
    listed_temperature_c: float | None = None,
    motor_design_letter: str | None = None,
) -> TerminalRating:
    """Temperature rating of equipment terminations by NEC 110.14(C).

    Parameters
    ----------
    circuit_rating : float
        Rating of the circuit the terminal serves [A].
    marked_conductor_gauge : str or int, optional
        Conductor size the termination is marked for, e.g. ``"2/0"`` or ``8``.
    listed_temperature_c : float, optional
        Conductor temperature the equipment is listed and identified for [°C].
    motor_design_letter : str, optional
        NEMA design letter of a motor (B, C or D allow 75 °C on small circuits).

    Returns
    -------
    TerminalRating

    Notes
    -----
    Circuits rated 100 A or less, or terminals marked for 14 AWG through 1 AWG:
    60 °C, unless the equipment is listed and identified for a higher rating or
    the motor is of design B, C or D (75 °C). Circuits above 100 A or terminals
    marked for conductors larger than 1 AWG: 75 °C, unless listed higher.

    References
    ----------
    NFPA 70 (NEC), 110.14(C)(1)(a) and (C)(1)(b) [S].
    """
    rating = _finite("circuit_rating", circuit_rating, "A")
    if rating <= 0:
        raise ComputationError(f"circuit_rating {rating:g} A must be greater than 0 A")
    small_gauge = None
    if marked_conductor_gauge is not None:
        index = awg_index(marked_conductor_gauge)
        small_gauge = 1 <= index <= 14
    # A terminal that is both (<= 100 A but marked above 1 AWG, or the reverse) falls
    # under both 110.14(C)(1)(a) and (b); the lower rating is taken.
    small = rating <= 100.0 or small_gauge is True
    if listed_temperature_c is not None:
        listed = _temperature("listed_temperature_c", listed_temperature_c)
        return TerminalRating(listed, "equipment listed and identified for this conductor rating")
    if small:
        letter = (motor_design_letter or "").strip().upper()
        if letter in {"B", "C", "D"}:
            return TerminalRating(75.0, "motor of design letter B, C or D on a small circuit",
                                  clause="110.14(C)(1)(a)(4)")
        why = ("circuit rated 100 A or less" if rating <= 100.0
               else "terminal marked for 14 AWG through 1 AWG")
        return TerminalRating(60.0, why, clause="110.14(C)(1)(a)")
    why = "circuit rated over 100 A" + (
        ", terminal marked for conductors larger than 1 AWG" if small_gauge is False else ""
    )
    return TerminalRating(75.0, why, clause="110.14(C)(1)(b)")
