"""Verification of absence of voltage at the point of work.

A conductor is proven dead by a reading of no voltage, not by a reading below an
extra-low-voltage band: IEC 60449's band I says which installations count as
extra-low voltage, not that a conductor is isolated. None of the sources below
puts a number on "absence"; the default here is therefore near zero, and any
reading above zero must be explained (induced voltage from a parallel live
cable, the meter's own pick-up on an open conductor, a capacitor still
discharging) before the point is accepted as dead.

Sources
-------
- NFPA 70E:2024, 120.6(7): test each phase conductor or circuit part, phase to
  phase and phase to ground, to verify it is de-energized; no numeric threshold
  [M].
- EN 50110-1:2013, cl. 6.2.4, verification of the absence of voltage on all
  poles; no numeric threshold [M].
- Near-zero default and the note asked for any non-zero reading: common trade
  practice [P].
"""

from __future__ import annotations

from dataclasses import dataclass

from ._checks import finite as _finite
from ._checks import non_negative as _non_negative

__all__ = ["ABSENCE_OF_VOLTAGE_DEFAULT_LIMIT", "AbsenceOfVoltage", "assess_absence_of_voltage"]

ABSENCE_OF_VOLTAGE_DEFAULT_LIMIT = 1.0
"""Largest explained reading accepted as absence of voltage by default [V] [P].

Ghost readings of a high-impedance meter on an isolated conductor beside live
cables stay around a volt or below; a job sets its own figure by override."""


@dataclass(frozen=True)
class AbsenceOfVoltage:
    """A reading at the point of work judged as absence of voltage."""

    reading: float
    """[V]"""
    limit: float
    """Largest reading accepted once explained [V]."""
    dead: bool | None
    """``True`` proven dead, ``False`` a voltage is present, ``None`` a non-zero
    reading that needs its explanation first."""
    message: str


def assess_absence_of_voltage(
    reading: float, limit: float = ABSENCE_OF_VOLTAGE_DEFAULT_LIMIT, explained: bool = False
) -> AbsenceOfVoltage:
    """Judge a voltage reading at an isolated point as absence of voltage.

    Parameters
    ----------
    reading : float
        Magnitude read between the conductors (or conductor and PE) [V].
    limit : float
        Largest reading that may be accepted once explained [V].
    explained : bool
        Whether the reading carries a note that explains a non-zero value.

    Returns
    -------
    AbsenceOfVoltage

    Notes
    -----
    0 V: dead. 0 < U ≤ limit: dead only when explained, otherwise open.
    U > limit: a voltage is present; the point is not dead.

    References
    ----------
    NFPA 70E:2024, 120.6(7) [M]; EN 50110-1:2013, cl. 6.2.4 [M]; near-zero
    default and the explanation asked for any non-zero reading [P].
    """
    value = abs(_finite("reading", reading, "V"))
    threshold = _non_negative("limit", limit, "V")
    if value > threshold:
        return AbsenceOfVoltage(value, threshold, False,
                                f"{value:g} V is above {threshold:g} V: treat the point as live "
                                "and find the source (back-feed, second supply, stored charge)")
    if value == 0.0:
        return AbsenceOfVoltage(value, threshold, True, "no voltage read")
    if explained:
        return AbsenceOfVoltage(value, threshold, True,
                                f"{value:g} V read and explained in the reading's note")
    return AbsenceOfVoltage(value, threshold, None,
                            f"{value:g} V is not zero: explain it in the reading's note "
                            "(note: induced from the parallel feeder, for example) or find its "
                            "source; a low reading alone does not prove the point dead")
