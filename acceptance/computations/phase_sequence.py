"""Phase sequence of a three-phase supply and the direction of rotation it gives a motor.

Angles are in degrees, as a phasor diagram draws them: counter-clockwise is
leading, so in the sequence L1-L2-L3 the phasor of L2 lags L1 by 120°.

Sources
-------
- Phase sequence: the order in which the three phases reach their positive
  maxima; L1-L2-L3 is the positive (clockwise) sequence [P]. Checked in the
  tests against the symmetrical components of the three unit phasors
  (Fortescue).
- IEC 60034-8:2007, terminal markings and direction of rotation: with the
  terminals U1, V1, W1 fed in the time sequence of the supply, a three-phase
  motor turns clockwise seen facing the shaft end at the drive end (D-end) [M].
"""

from __future__ import annotations

from dataclasses import dataclass

from ._checks import finite as _finite
from ._errors import ComputationError

__all__ = [
    "NEGATIVE_SEQUENCE",
    "POSITIVE_SEQUENCE",
    "MotorRotation",
    "PhaseSequence",
    "expected_rotation",
    "phase_sequence",
]

POSITIVE_SEQUENCE = "L1-L2-L3"
NEGATIVE_SEQUENCE = "L1-L3-L2"
_LINES = ("L1", "L2", "L3")


@dataclass(frozen=True)
class PhaseSequence:
    """The phase sequence found from three phase angles."""

    sequence: str
    """``"L1-L2-L3"`` (positive) or ``"L1-L3-L2"`` (negative)"""
    positive: bool
    displacements: tuple[float, float, float]
    """How far L2 lags L1, L3 lags L2 and L1 lags L3, each in [0°, 360°) [°]"""
    largest_deviation: float
    """Largest departure of a displacement from 120° (positive) or 240° (negative) [°]"""

    def describe(self) -> str:
        """E.g. ``L1-L2-L3 (positive)``."""
        return f"{self.sequence} ({'positive' if self.positive else 'negative'})"


def phase_sequence(angle_l1: float, angle_l2: float, angle_l3: float) -> PhaseSequence:
    """Phase sequence from the phase angles of the three line voltages.

    Parameters
    ----------
    angle_l1, angle_l2, angle_l3 : float
        Phase angles of the L1, L2 and L3 voltages to neutral (or of L1-L2,
        L2-L3, L3-L1), against any common reference, leading positive [°].

    Returns
    -------
    PhaseSequence

    Notes
    -----
    Each displacement is the lag of one phase behind the one before it,
    d = (a_prev − a_next) mod 360°. The sequence is positive when every lag lies
    between 0° and 180° (they then add up to 360°), negative when every lag lies
    between 180° and 360°. Anything else — two phases in phase or in opposition,
    or a lag on each side — is no three-phase set (a lost phase or a wrong
    connection) and is refused.

    References
    ----------
    Definition of phase sequence [P]; checked against symmetrical components.
    """
    angles = (
        _finite("angle_l1", angle_l1, "°"),
        _finite("angle_l2", angle_l2, "°"),
        _finite("angle_l3", angle_l3, "°"),
    )
    lags = tuple(
        (angles[i] - angles[(i + 1) % 3]) % 360.0 for i in range(3)
    )
    if all(0.0 < lag < 180.0 for lag in lags):
        positive, nominal = True, 120.0
    elif all(180.0 < lag < 360.0 for lag in lags):
        positive, nominal = False, 240.0
    else:
        shown = ", ".join(f"{lag:g}°" for lag in lags)
        raise ComputationError(
            f"angles {angles[0]:g}°, {angles[1]:g}°, {angles[2]:g}° give lags of {shown}: "
            "not a three-phase set (a lost phase or a wrong connection?); check the readings"
        )
    return PhaseSequence(
        sequence=POSITIVE_SEQUENCE if positive else NEGATIVE_SEQUENCE,
        positive=positive,
        displacements=(lags[0], lags[1], lags[2]),
        largest_deviation=max(abs(lag - nominal) for lag in lags),
    )


@dataclass(frozen=True)
class MotorRotation:
    """The direction a motor should turn for a supply sequence and a connection."""

    direction: str
    """``"clockwise"`` or ``"counter-clockwise"``, seen facing the drive-end shaft"""
    terminal_sequence_positive: bool
    """Whether U1, V1, W1 receive the supply in its positive time sequence"""
    standard: str = "IEC 60034-8"
    clause: str = "direction of rotation"
    edition: str = "2007"
    status: str = "M"

    def describe(self) -> str:
        """E.g. ``clockwise, facing the drive-end shaft``."""
        return f"{self.direction}, facing the drive-end shaft"


def _sequence(supply_sequence: PhaseSequence | str) -> bool:
    if isinstance(supply_sequence, PhaseSequence):
        return supply_sequence.positive
    text = str(supply_sequence).strip().upper().replace(" ", "")
    cycles = {
        True: {"L1-L2-L3", "L2-L3-L1", "L3-L1-L2"},
        False: {"L1-L3-L2", "L3-L2-L1", "L2-L1-L3"},
    }
    for positive, spellings in cycles.items():
        if text in spellings:
            return positive
    raise ComputationError(
        f"supply_sequence {supply_sequence!r} is not a phase sequence; use "
        f"{POSITIVE_SEQUENCE} or {NEGATIVE_SEQUENCE}"
    )


def expected_rotation(
    supply_sequence: PhaseSequence | str,
    connection: tuple[str, str, str] = _LINES,
) -> MotorRotation:
    """Direction of rotation a three-phase motor should show.

    Parameters
    ----------
    supply_sequence : PhaseSequence or str
        Phase sequence at the motor's supply, ``"L1-L2-L3"`` or ``"L1-L3-L2"``
        (any rotation of either is accepted).
    connection : tuple of str
        The lines connected to U1, V1 and W1, in that order; ``("L1", "L2", "L3")``
        by default.

    Returns
    -------
    MotorRotation
        Clockwise when the terminals receive the supply in its positive sequence.

    Notes
    -----
    Swapping any two lines reverses the terminals' time sequence and so the
    rotation; a cyclic shift (L2, L3, L1) does not.

    References
    ----------
    IEC 60034-8:2007, direction of rotation [M].
    """
    positive = _sequence(supply_sequence)
    lines = tuple(str(line).strip().upper() for line in connection)
    if sorted(lines) != list(_LINES):
        raise ComputationError(
            f"connection {connection!r} must name L1, L2 and L3 once each "
            "(the lines on U1, V1, W1)"
        )
    order = _LINES if positive else ("L1", "L3", "L2")
    start = order.index(lines[0])
    # U1, V1, W1 receive the supply in its time order exactly when the connection
    # follows the supply's own cycle; any other order is that cycle reversed.
    terminal_positive = lines == tuple(order[(start + k) % 3] for k in range(3))
    return MotorRotation(
        direction="clockwise" if terminal_positive else "counter-clockwise",
        terminal_sequence_positive=terminal_positive,
    )
