"""Protective devices: the current that operates them within a time, and what they can break.

Sources
-------
- IEC 60898-1:2015, Table 7: the instantaneous tripping test of B, C and D
  circuit-breakers, tripping within 0.1 s at 5, 10 and 20 In [M].
- IEC 60947-2:2016: an instantaneous release trips within ±20 % of its setting
  [tolerance M, clause number not recalled].
- IEC 60364-4-41:2005, 411.4.4: Ia is the current that operates the device
  within the time required by 411.3.2.2 or 411.3.2.3 [M].
- IEC 60364-4-43, 434.5.1: a device's breaking capacity not below the
  prospective fault current where it is installed, unless backed up [M].
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from enum import StrEnum
from itertools import pairwise

from ._checks import finite as _finite
from ._checks import positive as _positive
from ._errors import ComputationError

__all__ = [
    "MCB_INSTANTANEOUS_TRIP_TIME",
    "BreakingCapacityCheck",
    "CircuitBreakerCurve",
    "OperatingCurrent",
    "breaking_capacity_check",
    "instantaneous_release_operating_current",
    "mcb_operating_current",
    "operating_current_from_curve",
]

MCB_INSTANTANEOUS_TRIP_TIME = 0.1
"""Time within which an IEC 60898-1 circuit-breaker trips at its instantaneous test current [s]."""


# --------------------------------------------------------------------------- operating current


class CircuitBreakerCurve(StrEnum):
    """Instantaneous tripping types of IEC 60898-1 circuit-breakers."""

    B = "B"
    """Instantaneous tripping above 3 In up to and including 5 In."""
    C = "C"
    """Above 5 In up to and including 10 In."""
    D = "D"
    """Above 10 In up to and including 20 In."""


# IEC 60898-1:2015 Table 7, upper limit of the instantaneous range [M, reference values §16]
_MCB_MULTIPLE = {
    CircuitBreakerCurve.B: 5.0, CircuitBreakerCurve.C: 10.0, CircuitBreakerCurve.D: 20.0,
}


@dataclass(frozen=True)
class OperatingCurrent:
    """The current Ia that makes a protective device operate, and on what basis."""

    current: float
    """Ia [A]"""
    operating_time: float | None
    """Time within which the device operates at Ia [s]; ``None`` where the source states none."""
    basis: str
    standard: str
    clause: str
    edition: str
    status: str

    def describe(self) -> str:
        """E.g. ``Ia = 160 A (C-curve circuit-breaker: 10 × In, trips within 0.1 s)``."""
        return f"Ia = {self.current:g} A ({self.basis})"


def _curve(curve: CircuitBreakerCurve | str) -> CircuitBreakerCurve:
    try:
        return CircuitBreakerCurve(str(curve).strip().upper())
    except ValueError:
        raise ComputationError(
            f"curve {curve!r} is not an IEC 60898-1 tripping type; use B, C or D"
        ) from None


def mcb_operating_current(
    curve: CircuitBreakerCurve | str,
    rated_current: float,
    required_time: float | None = None,
) -> OperatingCurrent:
    """Operating current Ia of an IEC 60898-1 circuit-breaker from its tripping type.

    Parameters
    ----------
    curve : CircuitBreakerCurve or str
        Instantaneous tripping type, ``"B"``, ``"C"`` or ``"D"``.
    rated_current : float
        Rated current In [A].
    required_time : float, optional
        Disconnection time the circuit needs [s]. The instantaneous test only
        guarantees tripping within 0.1 s, so a shorter requirement (TT above
        230 V: 0.07 s and 0.04 s) is refused: read Ia off the manufacturer's
        curve with :func:`operating_current_from_curve` instead.

    Returns
    -------
    OperatingCurrent
        Ia = 5, 10 or 20 × In, operating within 0.1 s.

    Notes
    -----
    The upper limit of the instantaneous range is the current at which every
    breaker of the type must trip; the lower limit (3, 5, 10 In) is where it must
    not. The disconnection condition therefore uses the upper limit. Some
    national rules allow D-type breakers up to 50 In; that variant is not encoded.

    References
    ----------
    IEC 60898-1:2015, Table 7, tests d and e (instantaneous tripping) [M];
    IEC 60364-4-41:2005, 411.4.4 [M].
    """
    kind = _curve(curve)
    rated = _positive("rated_current", rated_current, "A")
    if required_time is not None:
        required = _positive("required_time", required_time, "s")
        if required < MCB_INSTANTANEOUS_TRIP_TIME:
            raise ComputationError(
                f"required_time {required:g} s is shorter than the "
                f"{MCB_INSTANTANEOUS_TRIP_TIME:g} s within which IEC 60898-1 makes a "
                f"{kind.value}-type breaker trip; give points of the manufacturer's "
                "time-current curve instead"
            )
    multiple = _MCB_MULTIPLE[kind]
    return OperatingCurrent(
        current=multiple * rated,
        operating_time=MCB_INSTANTANEOUS_TRIP_TIME,
        basis=(
            f"{kind.value}-type circuit-breaker: {multiple:g} × In, "
            f"trips within {MCB_INSTANTANEOUS_TRIP_TIME:g} s"
        ),
        standard="IEC 60898-1",
        clause="Table 7 (instantaneous tripping)",
        edition="2015",
        status="M",
    )


def instantaneous_release_operating_current(
    setting_current: float, tolerance: float = 0.20
) -> OperatingCurrent:
    """Operating current Ia of a breaker with an adjustable instantaneous release.

    Parameters
    ----------
    setting_current : float
        Instantaneous (short-circuit) release setting Ii as set on the breaker [A].
    tolerance : float
        Tripping tolerance of the release as a fraction of the setting; 0.20 by
        IEC 60947-2 unless the manufacturer states a tighter one [unitless].

    Returns
    -------
    OperatingCurrent
        Ia = (1 + tolerance) × Ii. The operating time is ``None``: the release has
        no intentional delay but the standard states no time, so check the
        manufacturer's curve for a required time below about 0.1 s.

    Notes
    -----
    Applies to moulded-case and motor-protective breakers (IEC 60947-2 and the
    motor-protective breakers built to it); a fuse or an overload relay is not
    covered.

    References
    ----------
    IEC 60947-2:2016, instantaneous releases: trips within ±20 % of the setting
    [tolerance M, clause not recalled]; IEC 60364-4-41:2005, 411.4.4 [M].
    """
    setting = _positive("setting_current", setting_current, "A")
    spread = _finite("tolerance", tolerance, "")
    if not 0.0 <= spread < 1.0:
        raise ComputationError(f"tolerance {spread:g} must be in 0 ≤ tolerance < 1 (0.2 = 20 %)")
    return OperatingCurrent(
        current=(1.0 + spread) * setting,
        operating_time=None,
        basis=f"instantaneous release set at {setting:g} A, + {spread * 100:g} % tolerance",
        standard="IEC 60947-2",
        clause="instantaneous release tolerance",
        edition="2016",
        status="M",
    )


def _curve_points(points: Sequence[tuple[float, float]]) -> list[tuple[float, float]]:
    try:
        pairs = [tuple(point) for point in points]
    except TypeError:
        raise ComputationError(
            "points must be a list of (current [A], time [s]) pairs"
        ) from None
    if len(pairs) < 2:
        raise ComputationError(
            f"points has {len(pairs)} pair(s); give at least two (current [A], time [s]) "
            "points of the time-current curve"
        )
    checked = []
    for index, pair in enumerate(pairs, start=1):
        if len(pair) != 2:
            raise ComputationError(
                f"point {index} {pair!r} must be a (current [A], time [s]) pair"
            )
        checked.append((
            _positive(f"point {index} current", pair[0], "A"),
            _positive(f"point {index} time", pair[1], "s"),
        ))
    for index, ((i0, t0), (i1, t1)) in enumerate(pairwise(checked), start=2):
        if not (i1 > i0 and t1 < t0):
            raise ComputationError(
                f"point {index} ({i1:g} A, {t1:g} s) does not follow point {index - 1} "
                f"({i0:g} A, {t0:g} s): give the points by rising current with falling time"
            )
    return checked


def operating_current_from_curve(
    points: Sequence[tuple[float, float]], required_time: float, basis: str = ""
) -> OperatingCurrent:
    """Operating current Ia for a required time, from points of a time-current curve.

    Parameters
    ----------
    points : sequence of (float, float)
        Points (current [A], operating time [s]) of the device's curve, by rising
        current. For a fuse give the total operating (clearing) time, the upper
        edge of the band, not the pre-arcing time alone.
    required_time : float
        Required disconnection time [s]; it must lie within the points' times.
    basis : str
        What the points are, for the record (e.g. ``"gG 32 A, maker's curve"``).

    Returns
    -------
    OperatingCurrent
        The current at which the curve reaches ``required_time``.

    Notes
    -----
    Between two points the curve is taken as a straight line on log-log axes,
    the way published time-current curves are drawn:
    log I = log I₁ + (log t − log t₁) · (log I₂ − log I₁) / (log t₂ − log t₁).
    A power law t = k·I⁻ⁿ through the points is reproduced exactly. The curve is
    not extrapolated beyond its first or last point.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4: Ia operates the device within the time of
    411.3.2.2 or 411.3.2.3 [M]; log-log reading of a time-current curve [P].
    """
    pairs = _curve_points(points)
    required = _positive("required_time", required_time, "s")
    longest, shortest = pairs[0][1], pairs[-1][1]
    if not shortest <= required <= longest:
        raise ComputationError(
            f"required_time {required:g} s is outside the curve's points "
            f"({shortest:g} s … {longest:g} s); add points that bracket it"
        )
    current = pairs[-1][0]
    for (i0, t0), (i1, t1) in pairwise(pairs):
        if t1 <= required <= t0:
            if required == t0:
                current = i0
            elif required == t1:
                current = i1
            else:
                slope = (math.log(i1) - math.log(i0)) / (math.log(t1) - math.log(t0))
                current = math.exp(math.log(i0) + (math.log(required) - math.log(t0)) * slope)
            break
    label = basis.strip() or "time-current curve"
    return OperatingCurrent(
        current=current,
        operating_time=required,
        basis=f"{label}: operates in {required:g} s, log-log between the given points",
        standard="IEC 60364-4-41",
        clause="411.4.4",
        edition="2005",
        status="M",
    )


# --------------------------------------------------------------------------- breaking capacity


@dataclass(frozen=True)
class BreakingCapacityCheck:
    """The prospective fault current at a point against the device's breaking capacity."""

    prospective_fault_current: float
    """[A]"""
    breaking_capacity: float
    """Rated short-circuit (breaking) capacity, Icn or Icu [A]"""
    passes: bool
    margin: float
    """(capacity − Ipf) / capacity; negative when the capacity is exceeded [unitless]"""

    def describe(self) -> str:
        """E.g. ``Ipf ≤ 6000 A``."""
        return f"Ipf ≤ {self.breaking_capacity:g} A"


def breaking_capacity_check(
    prospective_fault_current: float, breaking_capacity: float
) -> BreakingCapacityCheck:
    """Whether a device can break the prospective fault current at its point.

    Parameters
    ----------
    prospective_fault_current : float
        Largest prospective fault current where the device is installed [A].
    breaking_capacity : float
        Rated short-circuit capacity: Icn (IEC 60898-1) or Icu (IEC 60947-2) [A].

    Returns
    -------
    BreakingCapacityCheck
        Passes when Ipf ≤ capacity.

    Notes
    -----
    A device with a lower capacity is allowed where an upstream device protects
    it (back-up protection, coordinated by the manufacturer); that is a design
    judgement the record states, not something computed here.

    References
    ----------
    IEC 60364-4-43, 434.5.1 (breaking capacity not less than the prospective
    fault current; back-up protection) [M].
    """
    current = _positive("prospective_fault_current", prospective_fault_current, "A")
    capacity = _positive("breaking_capacity", breaking_capacity, "A")
    return BreakingCapacityCheck(
        prospective_fault_current=current,
        breaking_capacity=capacity,
        passes=current <= capacity,
        margin=(capacity - current) / capacity,
    )
