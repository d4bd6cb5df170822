"""Residual current devices: trip-time limits, test currents, type choice, TT earth electrodes.

Sources
-------
- IEC 61008-1:2010 (RCCBs) and IEC 61009-1:2010 (RCBOs), Table 1: maximum break
  times with sinusoidal residual current, general type 0.3 s at IΔn, 0.15 s at
  2 IΔn, 0.04 s at 5 IΔn; type S between 0.13 and 0.5 s, 0.06 and 0.2 s, 0.05
  and 0.15 s; the tripping current lies between 0.5 IΔn and IΔn, so the device
  must not trip at ½ IΔn [M]. Later editions have not been compared.
- The same standards, type A with half-wave (pulsating d.c.) residual current:
  the test currents are 1.4 IΔn, 2.8 IΔn and 7 IΔn for IΔn > 10 mA (2, 4 and
  10 IΔn for IΔn ≤ 10 mA), with the break times of the sinusoidal rows [M].
- IEC 62423:2009, type F and type B: type B with smooth d.c. residual current
  tested at 2, 4 and 10 IΔn with the same break times [M; recalled less firmly
  than the a.c. rows]. Type F's mixed-frequency test is not encoded.
- IEC 60364-4-41:2005, 411.5.3: in a TT system protected by an RCD,
  RA × IΔn ≤ 50 V [M].
- IEC 60364-5-53: the RCD type is chosen for the residual current the load can
  produce; equipment that can produce smooth d.c. residual current, such as a
  three-phase drive, needs type B [M, clause number not recalled].
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from enum import StrEnum
from typing import TypeVar

from ._checks import finite as _finite
from ._checks import non_negative as _non_negative
from ._checks import positive as _positive
from ._errors import ComputationError

_E = TypeVar("_E", bound=StrEnum)

__all__ = [
    "TOUCH_VOLTAGE_LIMIT",
    "EarthElectrodeCheck",
    "RcdSelectivity",
    "RcdTimeLimit",
    "RcdTripTest",
    "RcdType",
    "ResidualWaveform",
    "maximum_earth_electrode_resistance",
    "rcd_test_current",
    "rcd_time_limit",
    "rcd_trip_test",
    "rcd_type_covers",
    "tt_earth_electrode_check",
]

TOUCH_VOLTAGE_LIMIT = 50.0
"""Conventional touch voltage limit of IEC 60364-4-41 411.5.3, a.c. [V]."""


class RcdType(StrEnum):
    """RCD types by the residual currents they are specified for."""

    AC = "AC"
    """Sinusoidal a.c. residual current."""
    A = "A"
    """As AC, plus pulsating d.c. (half-wave)."""
    F = "F"
    """As A, plus composite currents of mixed frequency (IEC 62423)."""
    B = "B"
    """As F, plus smooth d.c. (IEC 62423)."""


class RcdSelectivity(StrEnum):
    """General (no time delay) or selective (type S, time-delayed)."""

    GENERAL = "general"
    SELECTIVE = "selective"


class ResidualWaveform(StrEnum):
    """Waveform of the residual test current."""

    SINUSOIDAL = "sinusoidal"
    HALF_WAVE = "half_wave"
    """Pulsating d.c.: half-wave rectified."""
    SMOOTH_DC = "smooth_dc"


_LABELS = {
    ResidualWaveform.SINUSOIDAL: "sinusoidal",
    ResidualWaveform.HALF_WAVE: "half-wave (pulsating d.c.)",
    ResidualWaveform.SMOOTH_DC: "smooth d.c.",
}

_COVERS = {
    RcdType.AC: {ResidualWaveform.SINUSOIDAL},
    RcdType.A: {ResidualWaveform.SINUSOIDAL, ResidualWaveform.HALF_WAVE},
    RcdType.F: {ResidualWaveform.SINUSOIDAL, ResidualWaveform.HALF_WAVE},
    RcdType.B: set(ResidualWaveform),
}

# IEC 61008-1:2010 / IEC 61009-1:2010 Table 1, sinusoidal [M, reference values §17]:
# multiple of IΔn → (minimum non-actuating time, maximum break time) [s]
_BREAK_TIMES: dict[RcdSelectivity, dict[float, tuple[float | None, float]]] = {
    RcdSelectivity.GENERAL: {1.0: (None, 0.3), 2.0: (None, 0.15), 5.0: (None, 0.04)},
    RcdSelectivity.SELECTIVE: {1.0: (0.13, 0.5), 2.0: (0.06, 0.2), 5.0: (0.05, 0.15)},
}
_NO_TRIP_MULTIPLE = 0.5


def _enum(kind: type[_E], name: str, value: object) -> _E:
    text = str(value).strip()
    try:
        return kind(text.upper() if kind is RcdType else text.lower())
    except ValueError:
        allowed = ", ".join(member.value for member in kind)
        raise ComputationError(f"{name} {value!r} is not known; use {allowed}") from None


def rcd_type_covers(rcd_type: RcdType | str, waveform: ResidualWaveform | str) -> bool:
    """Whether an RCD type is specified for a residual current waveform.

    Parameters
    ----------
    rcd_type : RcdType or str
        ``"AC"``, ``"A"``, ``"F"`` or ``"B"``.
    waveform : ResidualWaveform or str
        ``"sinusoidal"``, ``"half_wave"`` or ``"smooth_dc"``.

    Returns
    -------
    bool
        ``False`` for a type that is not specified for the waveform, e.g. any type
        but B for the smooth d.c. a three-phase drive can produce: an RCD other
        than type B upstream of such a drive is a finding.

    References
    ----------
    IEC 61008-1:2010 and IEC 61009-1:2010 (types AC, A) [M]; IEC 62423:2009
    (types F, B) [M]; IEC 60364-5-53, choice of RCD type [M].
    """
    kind = _enum(RcdType, "rcd_type", rcd_type)
    form = _enum(ResidualWaveform, "waveform", waveform)
    return form in _COVERS[kind]


def _waveform_factor(form: ResidualWaveform, rated: float) -> float:
    if form is ResidualWaveform.SINUSOIDAL:
        return 1.0
    if form is ResidualWaveform.HALF_WAVE:
        return 2.0 if rated <= 0.010 else 1.4
    return 2.0


# waveform → (standard, edition, what the multiple scales) [M, reference values §17]
_WAVEFORM_SOURCES = {
    ResidualWaveform.SINUSOIDAL: ("IEC 61008-1 / IEC 61009-1", "2010", "Table 1"),
    ResidualWaveform.HALF_WAVE: (
        "IEC 61008-1 / IEC 61009-1", "2010", "type A, half-wave at 1.4 (≤ 10 mA: 2) × the multiple"
    ),
    ResidualWaveform.SMOOTH_DC: ("IEC 62423", "2009", "type B, smooth d.c. at 2 × the multiple"),
}


def rcd_test_current(
    rated_residual_current: float,
    multiple: float,
    waveform: ResidualWaveform | str = ResidualWaveform.SINUSOIDAL,
) -> float:
    """Residual test current for a test at ``multiple`` × IΔn with a given waveform.

    Parameters
    ----------
    rated_residual_current : float
        IΔn [A].
    multiple : float
        The multiple as a test is named: 0.5, 1, 2 or 5 [unitless].
    waveform : ResidualWaveform or str
        ``"sinusoidal"`` (r.m.s.), ``"half_wave"`` (r.m.s. of the pulsating
        current) or ``"smooth_dc"``.

    Returns
    -------
    float
        I = multiple × k × IΔn with k = 1 (sinusoidal), 1.4 (half-wave, IΔn > 10 mA),
        2 (half-wave, IΔn ≤ 10 mA), 2 (smooth d.c.) [A].

    References
    ----------
    IEC 61008-1:2010 / IEC 61009-1:2010, type A test currents [M];
    IEC 62423:2009, type B smooth d.c. test currents [M].
    """
    rated = _positive("rated_residual_current", rated_residual_current, "A")
    factor = _positive("multiple", multiple, "")
    form = _enum(ResidualWaveform, "waveform", waveform)
    return factor * _waveform_factor(form, rated) * rated


@dataclass(frozen=True)
class RcdTimeLimit:
    """What an RCD must do at one test current: not trip, or trip within a time window."""

    multiple: float
    """Test named as a multiple of IΔn [unitless]"""
    waveform: str
    """:class:`ResidualWaveform` value"""
    must_trip: bool
    minimum_time: float | None
    """Non-actuating time (type S) [s]; ``None`` for none"""
    maximum_time: float | None
    """Maximum break time [s]; ``None`` where it must not trip"""
    standard: str
    clause: str
    edition: str
    status: str
    note: str = ""

    def passes(self, trip_time: float | None) -> bool:
        """Whether a result meets the limit; ``None`` means the device did not trip.

        Parameters
        ----------
        trip_time : float or None
            Measured break time [s], or ``None`` when it did not trip.
        """
        if trip_time is None:
            return not self.must_trip
        time = _non_negative("trip_time", trip_time, "s")
        if not self.must_trip:
            return False
        if self.minimum_time is not None and time < self.minimum_time:
            return False
        return self.maximum_time is None or time <= self.maximum_time

    def describe(self) -> str:
        """E.g. ``no trip``, ``t ≤ 300 ms`` or ``130 ms ≤ t ≤ 500 ms``."""
        if not self.must_trip:
            return "no trip"
        if self.maximum_time is None:  # a trip test always has an upper limit
            raise ComputationError("a trip limit without a maximum time cannot be described")
        upper = f"t ≤ {self.maximum_time * 1000:g} ms"
        if self.minimum_time is None:
            return upper
        return f"{self.minimum_time * 1000:g} ms ≤ {upper}"


def rcd_time_limit(
    multiple: float,
    selectivity: RcdSelectivity | str = RcdSelectivity.GENERAL,
    waveform: ResidualWaveform | str = ResidualWaveform.SINUSOIDAL,
    rcd_type: RcdType | str | None = None,
) -> RcdTimeLimit:
    """Trip-time limit of an RCD for a test at ``multiple`` × IΔn.

    Parameters
    ----------
    multiple : float
        0.5 (no trip), 1, 2 or 5 [unitless].
    selectivity : RcdSelectivity or str
        ``"general"`` or ``"selective"`` (type S).
    waveform : ResidualWaveform or str
        Waveform of the test current; the no-trip test at ½ IΔn is encoded for
        sinusoidal current only.
    rcd_type : RcdType or str, optional
        When given, a waveform the type is not specified for is refused.

    Returns
    -------
    RcdTimeLimit

    Notes
    -----
    General type: IΔn 300 ms, 2 IΔn 150 ms, 5 IΔn 40 ms. Type S: 130–500 ms,
    60–200 ms, 50–150 ms. No trip at ½ IΔn because the tripping current of a
    type AC device lies between ½ IΔn and IΔn. With half-wave current the type A
    tripping range starts lower (0.35 IΔn at 0° is recalled), so ½ IΔn may
    legitimately trip: that test is refused for that waveform. The multiples
    of half-wave and smooth d.c. tests scale the current
    (:func:`rcd_test_current`); their break times are recalled to equal the
    sinusoidal rows. The general-type note that 0.25 A may replace 5 IΔn for
    IΔn ≤ 30 mA is recalled and not encoded.

    References
    ----------
    IEC 61008-1:2010 and IEC 61009-1:2010, Table 1 and the type A table [M];
    IEC 62423:2009 for type B smooth d.c. [M].
    """
    factor = _finite("multiple", multiple, "")
    kind = _enum(RcdSelectivity, "selectivity", selectivity)
    form = _enum(ResidualWaveform, "waveform", waveform)
    if rcd_type is not None and not rcd_type_covers(rcd_type, form):
        raise ComputationError(
            f"a type {RcdType(str(rcd_type).strip().upper()).value} RCD is not specified for "
            f"{_LABELS[form]} residual current; test it with a waveform it covers"
        )
    standard, edition, basis = _WAVEFORM_SOURCES[form]
    if factor == _NO_TRIP_MULTIPLE:
        if form is not ResidualWaveform.SINUSOIDAL:
            raise ComputationError(
                f"the no-trip test at ½ IΔn is encoded for sinusoidal current only, not "
                f"{_LABELS[form]}: that tripping range starts lower"
            )
        return RcdTimeLimit(factor, form.value, False, None, None, "IEC 61008-1 / IEC 61009-1",
                            "tripping current between ½ IΔn and IΔn", "2010", "M")
    if factor not in _BREAK_TIMES[kind]:
        raise ComputationError(
            f"multiple {factor:g} has no encoded limit; use 0.5, 1, 2 or 5 (× IΔn)"
        )
    minimum, maximum = _BREAK_TIMES[kind][factor]
    variant = "type S" if kind is RcdSelectivity.SELECTIVE else "general type"
    return RcdTimeLimit(
        multiple=factor,
        waveform=form.value,
        must_trip=True,
        minimum_time=minimum,
        maximum_time=maximum,
        standard=standard,
        clause=f"break time at {factor:g} IΔn, {variant} ({basis})",
        edition=edition,
        status="M",
    )


@dataclass(frozen=True)
class RcdTripTest:
    """One test of an RCD, perhaps at both starting phases, against its limit."""

    limit: RcdTimeLimit
    trip_times: tuple[float | None, ...]
    """Each result [s]; ``None`` where the device did not trip"""
    worst: float | None
    """The result that decides: the slowest trip, or ``None`` if any did not trip
    where it must (or the first trip where it must not) [s]"""
    passes: bool


def rcd_trip_test(limit: RcdTimeLimit, trip_times: Sequence[float | None]) -> RcdTripTest:
    """Judge the results of one RCD test, e.g. at 0° and 180°, against its limit.

    Parameters
    ----------
    limit : RcdTimeLimit
        From :func:`rcd_time_limit`.
    trip_times : sequence of float or None
        Break time of each trial [s]; ``None`` where it did not trip.

    Returns
    -------
    RcdTripTest
        Every trial must meet the limit; the slowest one is reported.

    Notes
    -----
    The test is made starting on both half-cycles (0° and 180°) because the
    break time can differ between them; the longer one decides.

    References
    ----------
    IEC 60364-6:2016, 6.4.3.8 (effectiveness of RCDs) [clause M]; common
    practice of testing at both phase angles [P].
    """
    if not trip_times:
        raise ComputationError("trip_times is empty; give at least one result")
    times = tuple(
        None if t is None else _non_negative(f"trip_times[{i}]", t, "s")
        for i, t in enumerate(trip_times)
    )
    tripped = [t for t in times if t is not None]
    if limit.must_trip:
        worst = None if len(tripped) < len(times) else max(tripped)
    else:
        worst = tripped[0] if tripped else None
    return RcdTripTest(limit, times, worst, all(limit.passes(t) for t in times))


# --------------------------------------------------------------------------- TT earth electrode


def maximum_earth_electrode_resistance(
    rated_residual_current: float, touch_voltage_limit: float = TOUCH_VOLTAGE_LIMIT
) -> float:
    """Largest earth electrode resistance RA for a TT system protected by an RCD.

    Parameters
    ----------
    rated_residual_current : float
        IΔn of the RCD [A].
    touch_voltage_limit : float
        Conventional touch voltage limit, 50 V a.c.; lower where a local rule
        says so [V].

    Returns
    -------
    float
        RA,max = 50 V / IΔn [Ω].

    Notes
    -----
    RA is the sum of the earth electrode's resistance and that of the protective
    conductor to the exposed-conductive-parts. Electrode resistances far below
    this limit are usual practice because they drift with soil moisture and
    frost [P].

    References
    ----------
    IEC 60364-4-41:2005, 411.5.3 [M].
    """
    rated = _positive("rated_residual_current", rated_residual_current, "A")
    limit = _positive("touch_voltage_limit", touch_voltage_limit, "V")
    return limit / rated


@dataclass(frozen=True)
class EarthElectrodeCheck:
    """RA × IΔn ≤ 50 V for one electrode and RCD."""

    earth_resistance: float
    """RA as measured [Ω]"""
    rated_residual_current: float
    """IΔn [A]"""
    touch_voltage: float
    """RA × IΔn [V]"""
    maximum_resistance: float
    """[Ω]"""
    touch_voltage_limit: float
    """[V]"""
    passes: bool
    standard: str = "IEC 60364-4-41"
    clause: str = "411.5.3"
    edition: str = "2005"
    status: str = "M"

    def describe(self) -> str:
        """E.g. ``RA ≤ 50 V / 0.03 A = 1667 Ω``."""
        return (
            f"RA ≤ {self.touch_voltage_limit:g} V / {self.rated_residual_current:g} A = "
            f"{self.maximum_resistance:.4g} Ω"
        )


def tt_earth_electrode_check(
    earth_resistance: float,
    rated_residual_current: float,
    touch_voltage_limit: float = TOUCH_VOLTAGE_LIMIT,
) -> EarthElectrodeCheck:
    """Check a TT earth electrode against RA × IΔn ≤ 50 V.

    Parameters
    ----------
    earth_resistance : float
        RA: electrode plus protective conductor resistance [Ω].
    rated_residual_current : float
        IΔn of the RCD that protects the circuit [A].
    touch_voltage_limit : float
        50 V a.c. unless a local rule sets less [V].

    Returns
    -------
    EarthElectrodeCheck
        Passes when RA × IΔn ≤ the limit (at the limit exactly it passes).

    References
    ----------
    IEC 60364-4-41:2005, 411.5.3 [M].
    """
    resistance = _positive("earth_resistance", earth_resistance, "Ω")
    maximum = maximum_earth_electrode_resistance(rated_residual_current, touch_voltage_limit)
    rated = float(rated_residual_current)
    touch = resistance * rated
    return EarthElectrodeCheck(
        earth_resistance=resistance,
        rated_residual_current=rated,
        touch_voltage=touch,
        maximum_resistance=maximum,
        touch_voltage_limit=float(touch_voltage_limit),
        passes=resistance <= maximum,
    )
