"""Stopping time and the minimum distance of a protective device from a hazard zone.

Distances here are in millimetres, as the standard gives them; parameter names
that end in ``_mm`` say so. Times are in seconds.

Sources
-------
- ISO 13855:2010, Safety of machinery — Positioning of safeguards with respect to
  the approach speeds of parts of the human body: S = K × T + C; for
  electro-sensitive protective equipment with detection capability d ≤ 40 mm,
  K = 2000 mm/s and C = 8 (d − 14) mm (not below 0), S not below 100 mm, and where
  S exceeds 500 mm it is computed again with K = 1600 mm/s, not below 500 mm; for
  40 mm < d ≤ 70 mm, S = 1600 × T + 850 mm [M; clause numbers not recalled].
  ISO 13855:2024 replaces that edition; its formulas and conditions have not
  been compared and may differ, so the edition used is recorded with every
  distance.
- The overall stopping time T is the protective device's response time plus the
  machine's stopping time (ISO 13855:2010, the definition of T) [M]; taking the
  maximum of repeated trials as the machine's stopping time is practice [P].
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from ._checks import non_negative as _non_negative
from ._checks import positive as _positive
from ._errors import ComputationError

__all__ = [
    "MinimumDistance",
    "StoppingTimeTrials",
    "intrusion_distance",
    "iso_13855_maximum_stopping_time",
    "iso_13855_minimum_distance",
    "overall_stopping_time",
    "stopping_time_trials",
]

_HAND_SPEED = 2000.0  # mm/s, ISO 13855:2010 [M]
_BODY_SPEED = 1600.0  # mm/s, ISO 13855:2010 [M]
_HAND_FLOOR = 100.0  # mm
_HAND_CEILING = 500.0  # mm: above it, K = 1600 mm/s and S not below 500 mm
_ARM_INTRUSION = 850.0  # mm, for 40 mm < d ≤ 70 mm
_EDITION_NOTE = "ISO 13855:2024 replaces this edition; its conditions may differ"


def overall_stopping_time(machine_stopping_time: float, device_response_time: float) -> float:
    """Overall system stopping performance T for the minimum-distance formula.

    Parameters
    ----------
    machine_stopping_time : float
        Time from the stop signal to the end of the hazardous motion, the largest
        of the trials [s].
    device_response_time : float
        Response time of the protective device (and of the safety controller
        between it and the machine, where it is not in the measured time) [s].

    Returns
    -------
    float
        T = t_device + t_machine [s].

    References
    ----------
    ISO 13855:2010, definition of T (overall system stopping performance) [M].
    """
    machine = _non_negative("machine_stopping_time", machine_stopping_time, "s")
    device = _non_negative("device_response_time", device_response_time, "s")
    return machine + device


def intrusion_distance(detection_capability_mm: float) -> float:
    """Intrusion distance C of an electro-sensitive device with detection capability d ≤ 40 mm.

    Parameters
    ----------
    detection_capability_mm : float
        Detection capability (resolution) d of the device [mm].

    Returns
    -------
    float
        C = 8 (d − 14), not below 0 [mm].

    References
    ----------
    ISO 13855:2010, electro-sensitive protective equipment, d ≤ 40 mm [M].
    """
    capability = _positive("detection_capability_mm", detection_capability_mm, "mm")
    if capability > 40.0:
        raise ComputationError(
            f"detection_capability_mm {capability:g} mm is above 40 mm: the formula "
            "C = 8 (d − 14) applies to d ≤ 40 mm"
        )
    return max(0.0, 8.0 * (capability - 14.0))


@dataclass(frozen=True)
class MinimumDistance:
    """The minimum distance S with the constants and the steps that gave it."""

    distance_mm: float
    """S [mm]"""
    approach_speed: float
    """K used for the result [mm/s]"""
    overall_stopping_time: float
    """T [s]"""
    intrusion_distance_mm: float
    """C [mm]"""
    steps: tuple[str, ...]
    """The calculation as written out, one step per line."""
    standard: str = "ISO 13855"
    clause: str = "minimum distance, electro-sensitive protective equipment"
    edition: str = "2010"
    status: str = "M"
    note: str = _EDITION_NOTE

    def allows(self, installed_distance_mm: float) -> bool:
        """Whether a device installed at this distance from the hazard zone is far enough.

        Parameters
        ----------
        installed_distance_mm : float
            Distance measured from the detection zone to the hazard zone [mm].
        """
        installed = _non_negative("installed_distance_mm", installed_distance_mm, "mm")
        return installed >= self.distance_mm

    def describe(self) -> str:
        """E.g. ``S ≥ 608 mm``."""
        return f"S ≥ {self.distance_mm:g} mm"


def iso_13855_minimum_distance(
    overall_stopping_time: float, detection_capability_mm: float
) -> MinimumDistance:
    """Minimum distance of an electro-sensitive protective device, normal approach.

    Parameters
    ----------
    overall_stopping_time : float
        T: device response time plus machine stopping time [s].
    detection_capability_mm : float
        Detection capability d of the device, at most 70 mm [mm].

    Returns
    -------
    MinimumDistance

    Notes
    -----
    For d ≤ 40 mm: S = 2000 × T + 8 (d − 14). Below 100 mm, S = 100 mm; up to
    500 mm that S stands; above 500 mm, S = 1600 × T + 8 (d − 14), not below
    500 mm. For 40 mm < d ≤ 70 mm: S = 1600 × T + 850. Worked by hand: T = 0.3 s,
    d = 30 mm gives C = 128 mm, 2000 × 0.3 + 128 = 728 mm > 500 mm, so
    S = 1600 × 0.3 + 128 = 608 mm. Approach parallel to or at an angle to the
    detection zone, reaching over the device and multi-beam devices (d > 70 mm)
    need other formulas and are not encoded.

    References
    ----------
    ISO 13855:2010, S = K × T + C for electro-sensitive protective equipment
    [M]; ISO 13855:2024 may differ and has not been compared.
    """
    time = _non_negative("overall_stopping_time", overall_stopping_time, "s")
    capability = _positive("detection_capability_mm", detection_capability_mm, "mm")
    if capability > 70.0:
        raise ComputationError(
            f"detection_capability_mm {capability:g} mm is above 70 mm: multi-beam devices "
            "are placed by the number and heights of their beams, which is not encoded"
        )
    if capability > 40.0:
        distance = _BODY_SPEED * time + _ARM_INTRUSION
        return MinimumDistance(
            distance_mm=distance,
            approach_speed=_BODY_SPEED,
            overall_stopping_time=time,
            intrusion_distance_mm=_ARM_INTRUSION,
            steps=(f"d = {capability:g} mm > 40 mm: S = 1600 × {time:g} + 850 = {distance:g} mm",),
        )
    intrusion = intrusion_distance(capability)
    first = _HAND_SPEED * time + intrusion
    steps = [f"C = 8 × ({capability:g} − 14) = {intrusion:g} mm" if capability > 14.0
             else f"C = 0 mm (d = {capability:g} mm ≤ 14 mm)",
             f"S = 2000 × {time:g} + {intrusion:g} = {first:g} mm"]
    if first < _HAND_FLOOR:
        steps.append(f"{first:g} mm < 100 mm: S = 100 mm")
        return MinimumDistance(_HAND_FLOOR, _HAND_SPEED, time, intrusion, tuple(steps))
    if first <= _HAND_CEILING:
        return MinimumDistance(first, _HAND_SPEED, time, intrusion, tuple(steps))
    second = _BODY_SPEED * time + intrusion
    steps.append(f"{first:g} mm > 500 mm: S = 1600 × {time:g} + {intrusion:g} = {second:g} mm")
    if second < _HAND_CEILING:
        steps.append(f"{second:g} mm < 500 mm: S = 500 mm")
        second = _HAND_CEILING
    return MinimumDistance(second, _BODY_SPEED, time, intrusion, tuple(steps))


def iso_13855_maximum_stopping_time(
    installed_distance_mm: float, detection_capability_mm: float
) -> float | None:
    """Largest overall stopping time T for which a device's installed distance suffices.

    Parameters
    ----------
    installed_distance_mm : float
        Distance from the detection zone to the hazard zone as installed [mm].
    detection_capability_mm : float
        Detection capability d of the device, at most 70 mm [mm].

    Returns
    -------
    float or None
        T_max [s], the inverse of :func:`iso_13855_minimum_distance`; ``None``
        when no stopping time is short enough (below 100 mm or below C for
        d ≤ 40 mm, below 850 mm for d > 40 mm).

    Notes
    -----
    S(T) never decreases with T. For d ≤ 40 mm it is 100 mm up to
    2000 T + C = 100, then 2000 T + C up to 500 mm, then stays at 500 mm until
    1600 T + C reaches 500 mm, then 1600 T + C. Hence T_max = (S − C)/2000 for
    100 ≤ S < 500 mm and (S − C)/1600 for S ≥ 500 mm. For 40 < d ≤ 70 mm,
    T_max = (S − 850)/1600.

    References
    ----------
    ISO 13855:2010, S = K × T + C [M].
    """
    installed = _non_negative("installed_distance_mm", installed_distance_mm, "mm")
    capability = _positive("detection_capability_mm", detection_capability_mm, "mm")
    if capability > 70.0:
        # Same refusal and wording as the forward formula.
        iso_13855_minimum_distance(0.0, capability)
    if capability > 40.0:
        if installed < _ARM_INTRUSION:
            return None
        return (installed - _ARM_INTRUSION) / _BODY_SPEED
    intrusion = intrusion_distance(capability)
    if installed < max(_HAND_FLOOR, intrusion):
        return None
    if installed < _HAND_CEILING:
        return (installed - intrusion) / _HAND_SPEED
    return (installed - intrusion) / _BODY_SPEED


@dataclass(frozen=True)
class StoppingTimeTrials:
    """Statistics of repeated stopping-time trials, and the maximum against a limit."""

    trials: tuple[float, ...]
    """Each trial [s]"""
    maximum: float
    """[s]"""
    mean: float
    """[s]"""
    standard_deviation: float | None
    """Sample standard deviation [s]; ``None`` for a single trial"""
    limit: float | None
    """Largest allowed stopping time [s]; ``None`` when none is given"""
    passes: bool | None
    """Maximum ≤ limit; ``None`` without a limit"""
    margin: float | None
    """(limit − maximum) / limit [unitless]; ``None`` without a limit"""

    def describe(self) -> str:
        """E.g. ``t_max ≤ 0.25 s``."""
        return "no limit given" if self.limit is None else f"t_max ≤ {self.limit:g} s"


def stopping_time_trials(
    stopping_times: Sequence[float], limit: float | None = None
) -> StoppingTimeTrials:
    """Summarise repeated stopping-time trials and compare the slowest with a limit.

    Parameters
    ----------
    stopping_times : sequence of float
        The measured stopping time of each trial [s].
    limit : float, optional
        Largest stopping time allowed, from the risk assessment or from the
        distance the device is installed at [s].

    Returns
    -------
    StoppingTimeTrials
        The maximum decides; at the limit exactly it passes.

    Notes
    -----
    mean = Σt/n; s = √(Σ(t − mean)² / (n − 1)). The maximum, not the mean, is
    compared because the distance must hold for the slowest stop; the spread
    shows whether more trials or a brake check are warranted.

    References
    ----------
    ISO 13855:2010, T as the overall system stopping performance [M]; the
    maximum of repeated trials [P].
    """
    if isinstance(stopping_times, str | bytes) or not isinstance(stopping_times, Sequence):
        raise ComputationError("stopping_times must be a list of times in s")
    if not stopping_times:
        raise ComputationError("stopping_times is empty; give at least one trial")
    trials = tuple(
        _non_negative(f"stopping_times[{i}]", t, "s") for i, t in enumerate(stopping_times)
    )
    count = len(trials)
    mean = math.fsum(trials) / count
    deviation = (
        math.sqrt(math.fsum((t - mean) ** 2 for t in trials) / (count - 1)) if count > 1 else None
    )
    maximum = max(trials)
    if limit is None:
        return StoppingTimeTrials(trials, maximum, mean, deviation, None, None, None)
    allowed = _positive("limit", limit, "s")
    return StoppingTimeTrials(
        trials, maximum, mean, deviation, allowed, maximum <= allowed, (allowed - maximum) / allowed
    )
