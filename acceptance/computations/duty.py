"""Intermittent duty: equivalent thermal current and NEC welder multipliers.

A load that draws a current I for a fraction D of each period heats a
conductor, on average, as a steady current I·√D does, provided the period is
short against the conductor's thermal time constant.

Sources
-------
- Joule heating averaged over a period: I_eq = I·√D.
- NFPA 70 (NEC), 630.11(A) and Table 630.11(A), duty-cycle multipliers for
  arc welders (non-motor-generator S; motor-generator M).
- NFPA 70 (NEC), 430.22(E) and Table 430.22(E): conductors of motors on
  short-time, intermittent, periodic or varying duty, as a percentage of the
  nameplate current by duty class and the motor's time rating [M].
- NFPA 70 (NEC), 630.12(A) and (B): overcurrent protection of a welder not
  above 200 % of its rated primary current, and of its conductors not above
  200 % of their ampacity [M].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ._checks import finite as _finite
from ._checks import positive as _positive
from ._errors import ComputationError

__all__ = [
    "DutyAssessment",
    "DutyMultiplier",
    "assess_intermittent_duty",
    "duty_cycle_from_times",
    "equivalent_thermal_current",
    "MotorDutyPercent",
    "nec_430_22_e_percent",
    "nec_630_11_multiplier",
]




def _duty_cycle(duty_cycle: float) -> float:
    value = _finite("duty_cycle", duty_cycle, "")
    if not 0.0 < value <= 1.0:
        raise ComputationError(
            f"duty_cycle {value:g} must be a fraction in 0 < D ≤ 1 (1.0 = 100 %)"
        )
    return value


def duty_cycle_from_times(on_time: float, period: float) -> float:
    """Duty cycle from the on-time within a period.

    Parameters
    ----------
    on_time : float
        Time the load is on within each period [s].
    period : float
        Length of the period, e.g. 600 s for a 10-min welding rating [s].

    Returns
    -------
    float
        D as a fraction [unitless].

    Notes
    -----
    D = t_on / T.
    """
    on = _positive("on_time", on_time, "s")
    whole = _positive("period", period, "s")
    if on > whole:
        raise ComputationError(f"on_time {on:g} s is longer than period {whole:g} s")
    return on / whole


def equivalent_thermal_current(current: float, duty_cycle: float) -> float:
    """Steady current with the same heating as an intermittent one.

    Parameters
    ----------
    current : float
        r.m.s. current while on [A].
    duty_cycle : float
        Fraction of time on, 0 < D ≤ 1 [unitless].

    Returns
    -------
    float
        I_eq [A].

    Notes
    -----
    I_eq = I · √D, from equal I²R·t over a period.
    """
    current = _finite("current", current, "A")
    if current < 0:
        raise ComputationError(f"current {current:g} A must not be negative")
    return current * math.sqrt(_duty_cycle(duty_cycle))


@dataclass(frozen=True)
class DutyMultiplier:
    """A duty-cycle multiplier from NEC Table 630.11(A) and the row it came from."""

    multiplier: float
    """[unitless]"""
    table_row: str
    welder_kind: str
    standard: str
    clause: str
    edition: str
    status: str


# NEC Table 630.11(A): duty cycle % → multiplier; the last row is "20 or less".
# Non-motor-generator [S, reference values §10]; motor-generator [M].
_NEC_630_11 = {
    "nonmotor_generator": ((100, 1.00), (90, 0.95), (80, 0.89), (70, 0.84), (60, 0.78),
                           (50, 0.71), (40, 0.63), (30, 0.55), (20, 0.45)),
    "motor_generator": ((100, 1.00), (90, 0.96), (80, 0.91), (70, 0.86), (60, 0.81),
                        (50, 0.75), (40, 0.69), (30, 0.62), (20, 0.55)),
}


def nec_630_11_multiplier(
    duty_cycle: float, welder_kind: str = "nonmotor_generator"
) -> DutyMultiplier:
    """Supply-conductor multiplier for an arc welder by its duty cycle.

    Parameters
    ----------
    duty_cycle : float
        Rated duty cycle as a fraction, 0 < D ≤ 1 [unitless].
    welder_kind : str
        ``"nonmotor_generator"`` or ``"motor_generator"``.

    Returns
    -------
    DutyMultiplier

    Notes
    -----
    A duty cycle between rows takes the next higher tabulated row (the larger,
    safer multiplier); 20 % or less reads the last row. The non-motor-generator
    column is √D to two decimals, except 0.78 at 60 % (√0.6 = 0.775).

    References
    ----------
    NFPA 70 (NEC), Table 630.11(A) [non-motor-generator S, motor-generator M].
    """
    value = _duty_cycle(duty_cycle)
    if welder_kind not in _NEC_630_11:
        raise ComputationError(
            f"welder_kind {welder_kind!r} must be 'nonmotor_generator' or 'motor_generator'"
        )
    rows = _NEC_630_11[welder_kind]
    percent = value * 100.0
    row_percent, multiplier = rows[-1]
    for tabulated, factor in reversed(rows):
        if percent <= tabulated + 1e-9:
            row_percent, multiplier = tabulated, factor
            break
    row = "20 % or less" if row_percent == 20 else f"{row_percent} %"
    return DutyMultiplier(
        multiplier=multiplier,
        table_row=row,
        welder_kind=welder_kind,
        standard="NFPA 70 (NEC)",
        clause="Table 630.11(A)",
        edition="2017-2023",
        status="S" if welder_kind == "nonmotor_generator" else "M",
    )


@dataclass(frozen=True)
class MotorDutyPercent:
    """A percentage of a motor's nameplate current from NEC Table 430.22(E)."""

    percent: float
    """[%]"""
    duty_class: str
    time_rating: str
    standard: str
    clause: str
    edition: str
    status: str


# NEC Table 430.22(E): duty class → percent of nameplate current by the motor's time rating
# (5-minute, 15-minute, 30- and 60-minute, continuous) [M].
_NEC_430_22_E_RATINGS = ("5 min", "15 min", "30 min", "60 min", "continuous")
_NEC_430_22_E = {
    "short-time": (110, 120, 150, 150, None),
    "intermittent": (85, 85, 90, 90, 140),
    "periodic": (85, 90, 95, 95, 140),
    "varying": (110, 120, 150, 150, 200),
}


def nec_430_22_e_percent(duty_class: str, time_rating: str) -> MotorDutyPercent:
    """Conductor sizing percentage for a motor on non-continuous duty.

    Parameters
    ----------
    duty_class : str
        ``"short-time"``, ``"intermittent"``, ``"periodic"`` or ``"varying"``.
    time_rating : str
        The motor's time rating: ``"5 min"``, ``"15 min"``, ``"30 min"``, ``"60 min"`` or
        ``"continuous"``.

    Returns
    -------
    MotorDutyPercent

    Notes
    -----
    The supply conductors' ampacity shall be not less than the percentage of the motor's
    nameplate current rating the table gives. A short-time-duty motor has no continuous
    rating in the table.

    References
    ----------
    NFPA 70 (NEC), 430.22(E), Table 430.22(E) [M].
    """
    if duty_class not in _NEC_430_22_E:
        raise ComputationError(f"duty class {duty_class!r} must be one of "
                               f"{', '.join(_NEC_430_22_E)}")
    if time_rating not in _NEC_430_22_E_RATINGS:
        raise ComputationError(f"time rating {time_rating!r} must be one of "
                               f"{', '.join(_NEC_430_22_E_RATINGS)}")
    percent = _NEC_430_22_E[duty_class][_NEC_430_22_E_RATINGS.index(time_rating)]
    if percent is None:
        raise ComputationError(f"Table 430.22(E) gives no percentage for {duty_class} duty "
                               f"with a {time_rating} rating")
    return MotorDutyPercent(float(percent), duty_class, time_rating, "NFPA 70 (NEC)",
                            "430.22(E), Table 430.22(E)", "2023", "M")


@dataclass(frozen=True)
class DutyAssessment:
    """An intermittent load compared with its conductor and its protective device."""

    equivalent_current: float
    """I·√D [A]"""
    conductor_ampacity: float | None
    """[A]"""
    conductor_adequate: bool | None
    """ampacity ≥ I_eq"""
    device_rating: float | None
    """[A]"""
    device_not_below_equivalent: bool | None
    """device rating ≥ I_eq, so it will not open on the average heating"""
    device_within_200_percent_of_rated: bool | None
    """device rating ≤ 2 × rated current (NEC 630.12(A)) [M]"""
    device_within_200_percent_of_ampacity: bool | None
    """device rating ≤ 2 × conductor ampacity (NEC 630.12(B)) [M]"""


def assess_intermittent_duty(
    current: float,
    duty_cycle: float,
    conductor_ampacity: float | None = None,
    device_rating: float | None = None,
) -> DutyAssessment:
    """Compare an intermittent load with a conductor ampacity and a protective device.

    Parameters
    ----------
    current : float
        Rated (or measured) r.m.s. current while on [A].
    duty_cycle : float
        Fraction of time on, 0 < D ≤ 1 [unitless].
    conductor_ampacity : float, optional
        Ampacity of the supply conductors [A].
    device_rating : float, optional
        Rating or setting of the overcurrent device [A].

    Returns
    -------
    DutyAssessment
        ``None`` for any comparison whose inputs were not given.

    Notes
    -----
    Conductor: ampacity ≥ I·√D. Device: rating ≥ I·√D; for welders NEC 630.12
    also caps the device at 200 % of the rated primary current and at 200 % of
    the conductor ampacity.

    References
    ----------
    NFPA 70 (NEC), 630.11(A) [S] and 630.12(A), (B) [M].
    """
    equivalent = equivalent_thermal_current(current, duty_cycle)
    ampacity = device = None
    if conductor_ampacity is not None:
        ampacity = _positive("conductor_ampacity", conductor_ampacity, "A")
    if device_rating is not None:
        device = _positive("device_rating", device_rating, "A")
    return DutyAssessment(
        equivalent_current=equivalent,
        conductor_ampacity=ampacity,
        conductor_adequate=None if ampacity is None else ampacity >= equivalent,
        device_rating=device,
        device_not_below_equivalent=None if device is None else device >= equivalent,
        device_within_200_percent_of_rated=None if device is None else device <= 2.0 * current,
        device_within_200_percent_of_ampacity=(
            None if device is None or ampacity is None else device <= 2.0 * ampacity
        ),
    )
