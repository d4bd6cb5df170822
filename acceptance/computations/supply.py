"""Supply voltage and frequency: tolerance windows, unbalance, cable voltage drop.

Sources
-------
- IEC 60204-1:2016, cl. 4.3.2 (a.c. supplies: voltage 0.9-1.1 Un; frequency
  0.99-1.01 fn continuous, 0.98-1.02 short time; unbalance ≤ 2 %) [M].
- ANSI C84.1, Table 1 (service voltage Range A and Range B; 120 V S, the other
  systems M).
- NEMA MG 1, 14.36 and Figure 14-1 (definition of voltage unbalance; medium
  motor derating factor; not recommended above 5 %) [S; clause and figure M].
  The same definition applied to the three line currents is the trade's
  current unbalance [P].
- IEC 61000-4-30 (negative-sequence unbalance from line-to-line magnitudes:
  β = ΣU⁴/(ΣU²)²) [formula M, checked in the tests against a phasor
  construction by symmetrical components].
- NFPA 70 (NEC), 210.19(A) informational note (3 % branch, 5 % total) [S].
- IEC 60364-5-52:2009, Annex G, Table G.52.1 (3 %/5 % public supply,
  6 %/8 % private supply) [S].
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from itertools import pairwise

from ._checks import finite as _finite
from ._checks import non_negative as _non_negative
from ._checks import positive as _positive
from ._errors import ComputationError
from .resistance import COPPER_234_5, ConductorConstant, resistance_at_temperature

__all__ = [
    "CurrentUnbalance",
    "DeratingFactor",
    "SequenceComponents",
    "SupplyWindow",
    "UnbalanceLimit",
    "VoltageDrop",
    "VoltageDropLimit",
    "VoltageUnbalance",
    "ansi_c84_1_window",
    "cable_voltage_drop",
    "current_unbalance_nema",
    "iec_60204_1_frequency_window",
    "iec_60204_1_unbalance_limit",
    "iec_60204_1_voltage_window",
    "iec_60364_5_52_recommended_drop",
    "nec_210_19_recommended_drop",
    "nema_derating_factor",
    "source_impedance_from_voltage_sag",
    "voltage_unbalance",
    "voltage_unbalance_nema",
    "voltage_unbalance_sequence",
]




def _percent(fraction: float) -> str:
    return f"{fraction * 100:g} %"


# --------------------------------------------------------------------------- windows


@dataclass(frozen=True)
class SupplyWindow:
    """A closed window for a supply voltage or frequency, with its source."""

    quantity: str
    """``"voltage"`` or ``"frequency"``"""
    nominal: float
    lower: float
    upper: float
    unit: str
    """``"V"`` or ``"Hz"``"""
    standard: str
    clause: str
    edition: str
    status: str
    note: str = ""

    def contains(self, value: float) -> bool:
        """Whether a reading lies in the closed window."""
        return self.lower <= _finite(self.quantity, value, self.unit) <= self.upper

    def describe(self) -> str:
        """E.g. ``360.0 V ≤ U ≤ 440.0 V`` or ``49.50 Hz ≤ f ≤ 50.50 Hz``."""
        symbol, digits = ("U", 1) if self.quantity == "voltage" else ("f", 2)
        return (
            f"{self.lower:.{digits}f} {self.unit} ≤ {symbol} ≤ "
            f"{self.upper:.{digits}f} {self.unit}"
        )


def iec_60204_1_voltage_window(nominal_voltage: float) -> SupplyWindow:
    """Steady-state supply voltage window of IEC 60204-1, 0.9 to 1.1 Un.

    Parameters
    ----------
    nominal_voltage : float
        Nominal supply voltage Un [V].

    Returns
    -------
    SupplyWindow

    References
    ----------
    IEC 60204-1:2016, cl. 4.3.2 [M].
    """
    nominal = _positive("nominal_voltage", nominal_voltage, "V")
    return SupplyWindow("voltage", nominal, 0.9 * nominal, 1.1 * nominal, "V",
                        "IEC 60204-1", "cl. 4.3.2", "2016", "M",
                        note="steady-state voltage 0.9 … 1.1 of nominal")


def iec_60204_1_frequency_window(
    nominal_frequency: float, short_time: bool = False
) -> SupplyWindow:
    """Supply frequency window of IEC 60204-1.

    Parameters
    ----------
    nominal_frequency : float
        Nominal frequency fn [Hz].
    short_time : bool
        ``True`` for the short-time window (0.98 … 1.02 fn) instead of the
        continuous one (0.99 … 1.01 fn).

    Returns
    -------
    SupplyWindow

    References
    ----------
    IEC 60204-1:2016, cl. 4.3.2 [M].
    """
    nominal = _positive("nominal_frequency", nominal_frequency, "Hz")
    band = 0.02 if short_time else 0.01
    note = "short time" if short_time else "continuous"
    return SupplyWindow("frequency", nominal, (1 - band) * nominal, (1 + band) * nominal, "Hz",
                        "IEC 60204-1", "cl. 4.3.2", "2016", "M",
                        note=f"{note}: {1 - band:g} … {1 + band:g} of nominal")


# ANSI C84.1 Table 1, service voltage: nominal, range A, range B
# [120 V S; rest M, reference values §3]
_ANSI_C84_1 = {
    "120": (120.0, (114.0, 126.0), (110.0, 127.0), "S"),
    "240": (240.0, (228.0, 252.0), (220.0, 254.0), "M"),
    "480": (480.0, (456.0, 504.0), (440.0, 508.0), "M"),
    "208Y/120": (208.0, (197.0, 218.0), (191.0, 220.0), "M"),
}
# ANSI C84.1 Table 1, minimum utilization voltage (at the terminals of the equipment), range
# A and B; the maximum is the column shared with the service voltage [M, reference values §3].
_ANSI_C84_1_UTILIZATION_MINIMUM = {
    "120": (108.0, 104.0), "240": (216.0, 208.0), "480": (432.0, 416.0),
    "208Y/120": (187.0, 180.0),
}


def ansi_c84_1_window(nominal_system: str | int, voltage_range: str = "A",
                      location: str = "service") -> SupplyWindow:
    """ANSI C84.1 voltage window for a nominal system at the service point or the equipment.

    Parameters
    ----------
    nominal_system : str or int
        ``120``, ``240``, ``480`` or ``"208Y/120"`` (a trailing ``V`` is accepted).
    voltage_range : str
        ``"A"`` (normal) or ``"B"`` (infrequent, corrective action required).
    location : str
        ``"service"`` for a reading at the service point (the service-voltage range);
        ``"utilization"`` for one at the machine's terminals (the utilization-voltage range,
        whose minimum allows for the drop in the premises wiring).

    Returns
    -------
    SupplyWindow

    References
    ----------
    ANSI C84.1, Table 1 [service 120 V S; the rest and the utilization column M; the edition
    in force (2016 or 2020) is not checked against the text].
    """
    key = str(nominal_system).strip().upper().removesuffix("V").strip()
    if key not in _ANSI_C84_1:
        raise ComputationError(
            f"nominal_system {nominal_system!r} is not an encoded ANSI C84.1 system; "
            f"use one of {', '.join(_ANSI_C84_1)}"
        )
    which = str(voltage_range).strip().upper().removeprefix("RANGE").strip()
    if which not in ("A", "B"):
        raise ComputationError(f"voltage_range {voltage_range!r} must be 'A' or 'B'")
    if location not in ("service", "utilization"):
        raise ComputationError(f"location {location!r} must be 'service' (at the service point) "
                               f"or 'utilization' (at the machine's terminals)")
    nominal, range_a, range_b, status = _ANSI_C84_1[key]
    lower, upper = range_a if which == "A" else range_b
    if location == "utilization":
        lower = _ANSI_C84_1_UTILIZATION_MINIMUM[key][0 if which == "A" else 1]
        return SupplyWindow("voltage", nominal, lower, upper, "V", "ANSI C84.1",
                            f"Table 1, Range {which} (utilization voltage, at the "
                            f"equipment's terminals)", "2020", "M", note=f"{key} V system")
    return SupplyWindow("voltage", nominal, lower, upper, "V", "ANSI C84.1",
                        f"Table 1, Range {which} (service voltage, at the service point)",
                        "2020", status, note=f"{key} V system")


# --------------------------------------------------------------------------- unbalance


def _line_voltages(v_ab: float, v_bc: float, v_ca: float) -> tuple[float, float, float]:
    voltages = (
        _positive("v_ab", v_ab, "V"),
        _positive("v_bc", v_bc, "V"),
        _positive("v_ca", v_ca, "V"),
    )
    largest = max(voltages)
    rest = sum(voltages) - largest
    # Line-to-line phasors of any three-wire system sum to zero, so their
    # magnitudes close a triangle; a reading set that cannot is a wrong reading.
    if largest > rest * (1 + 1e-12):
        shown = ", ".join(f"{v:g} V" for v in voltages)
        raise ComputationError(
            f"line voltages {shown} cannot form a triangle: {largest:g} V exceeds the sum "
            f"of the other two ({rest:g} V); check the readings"
        )
    return voltages


def voltage_unbalance_nema(v_ab: float, v_bc: float, v_ca: float) -> float:
    """Voltage unbalance by the NEMA MG 1 definition.

    Parameters
    ----------
    v_ab, v_bc, v_ca : float
        Line-to-line r.m.s. voltages [V].

    Returns
    -------
    float
        Unbalance as a fraction (0.02 = 2 %) [unitless].

    Notes
    -----
    u = max|Ui − Uavg| / Uavg. Not (max − min)/avg.

    References
    ----------
    NEMA MG 1, 14.36 [S].
    """
    voltages = _line_voltages(v_ab, v_bc, v_ca)
    average = sum(voltages) / 3.0
    return max(abs(v - average) for v in voltages) / average


@dataclass(frozen=True)
class SequenceComponents:
    """Positive and negative sequence of three line-to-line voltages."""

    positive_sequence: float
    """[V]"""
    negative_sequence: float
    """[V]"""
    unbalance: float
    """negative / positive [unitless]"""


def voltage_unbalance_sequence(v_ab: float, v_bc: float, v_ca: float) -> SequenceComponents:
    """Negative-to-positive sequence unbalance from three line-to-line magnitudes.

    Parameters
    ----------
    v_ab, v_bc, v_ca : float
        Line-to-line r.m.s. voltages [V].

    Returns
    -------
    SequenceComponents

    Notes
    -----
    β = ΣU⁴ / (ΣU²)², u2 = √((1 − √(3 − 6β)) / (1 + √(3 − 6β))).
    With no zero sequence in line voltages, |U1|² + |U2|² = ΣU²/3, so
    |U1| = √(ΣU² / (3 (1 + u2²))) and |U2| = u2·|U1|.

    References
    ----------
    IEC 61000-4-30, voltage unbalance [M]; IEC 60204-1:2016 cl. 4.3.2 [M].
    """
    voltages = _line_voltages(v_ab, v_bc, v_ca)
    sum_squares = sum(v * v for v in voltages)
    beta = sum(v**4 for v in voltages) / sum_squares**2
    # 3 − 6β lies in [0, 1]: 1 for a balanced set, 0 for a degenerate triangle; clamp
    # the float rounding at both ends.
    root = math.sqrt(min(1.0, max(0.0, 3.0 - 6.0 * beta)))
    unbalance = math.sqrt((1.0 - root) / (1.0 + root))
    positive = math.sqrt(sum_squares / (3.0 * (1.0 + unbalance**2)))
    return SequenceComponents(positive, unbalance * positive, unbalance)


@dataclass(frozen=True)
class VoltageUnbalance:
    """Both definitions of voltage unbalance, reported side by side."""

    nema: float
    """max deviation from average / average [unitless]"""
    sequence: float
    """negative / positive sequence [unitless]"""
    positive_sequence: float
    """[V]"""
    negative_sequence: float
    """[V]"""


def voltage_unbalance(v_ab: float, v_bc: float, v_ca: float) -> VoltageUnbalance:
    """Voltage unbalance by both the NEMA MG 1 and the sequence definition.

    Parameters
    ----------
    v_ab, v_bc, v_ca : float
        Line-to-line r.m.s. voltages [V].

    Returns
    -------
    VoltageUnbalance

    References
    ----------
    NEMA MG 1, 14.36 [S]; IEC 61000-4-30 [M].
    """
    sequence = voltage_unbalance_sequence(v_ab, v_bc, v_ca)
    return VoltageUnbalance(
        nema=voltage_unbalance_nema(v_ab, v_bc, v_ca),
        sequence=sequence.unbalance,
        positive_sequence=sequence.positive_sequence,
        negative_sequence=sequence.negative_sequence,
    )


@dataclass(frozen=True)
class CurrentUnbalance:
    """Current unbalance between the three lines by the NEMA form of the definition."""

    unbalance: float
    """max |Ii − Iavg| / Iavg [unitless]"""
    average_current: float
    """[A]"""
    largest_deviation: float
    """max |Ii − Iavg| [A]"""
    line: str
    """The line that deviates most: ``"L1"``, ``"L2"`` or ``"L3"`` (the first on a tie)"""


def current_unbalance_nema(i_l1: float, i_l2: float, i_l3: float) -> CurrentUnbalance:
    """Current unbalance between phases: largest deviation from the average over the average.

    Parameters
    ----------
    i_l1, i_l2, i_l3 : float
        Line r.m.s. currents, read together under the same load [A]. A line that
        carries nothing (a lost phase) reads 0.

    Returns
    -------
    CurrentUnbalance

    Notes
    -----
    u = max|Ii − Iavg| / Iavg, the NEMA MG 1 definition of voltage unbalance
    applied to currents. An induction motor's current unbalance is several times
    the voltage unbalance that causes it, so the two are reported side by side;
    a current unbalance far above what the voltages explain points at the motor
    or its connections rather than the supply [P].

    References
    ----------
    NEMA MG 1, 14.36 (the definition, written for voltages) [S]; its use for
    currents [P].
    """
    currents = (
        _non_negative("i_l1", i_l1, "A"),
        _non_negative("i_l2", i_l2, "A"),
        _non_negative("i_l3", i_l3, "A"),
    )
    average = sum(currents) / 3.0
    if average == 0.0:
        raise ComputationError(
            "i_l1, i_l2 and i_l3 are all 0 A: current unbalance needs the machine running"
        )
    deviations = [abs(current - average) for current in currents]
    largest = max(deviations)
    return CurrentUnbalance(
        unbalance=largest / average,
        average_current=average,
        largest_deviation=largest,
        line=f"L{deviations.index(largest) + 1}",
    )


@dataclass(frozen=True)
class UnbalanceLimit:
    """A maximum voltage unbalance, with the definition it applies to."""

    limit: float
    """[unitless]"""
    definition: str
    standard: str
    clause: str
    edition: str
    status: str

    def passes(self, unbalance: float) -> bool:
        return _finite("unbalance", unbalance, "") <= self.limit

    def describe(self) -> str:
        return f"unbalance ≤ {_percent(self.limit)} ({self.definition})"


def iec_60204_1_unbalance_limit() -> UnbalanceLimit:
    """IEC 60204-1 supply unbalance limit: negative and zero sequence ≤ 2 % of positive.

    Returns
    -------
    UnbalanceLimit

    References
    ----------
    IEC 60204-1:2016, cl. 4.3.2 [M].
    """
    return UnbalanceLimit(0.02, "negative-to-positive sequence", "IEC 60204-1",
                          "cl. 4.3.2", "2016", "M")


@dataclass(frozen=True)
class DeratingFactor:
    """Motor derating for voltage unbalance read off the NEMA MG 1 curve."""

    factor: float | None
    """[unitless]; ``None`` where operation is not advised"""
    advised: bool
    note: str
    standard: str = "NEMA MG 1"
    clause: str = "14.36, Figure 14-1"
    status: str = "S"


# NEMA MG 1 Figure 14-1 read at these points, ±0.01 [S, reference values §4]: percent → factor.
# The curve starts at 1 %: MG 1 (2016, 12.45 and 14.36 [M]) states that a motor operates
# successfully at rated load with up to 1 % voltage unbalance at its terminals, so there is
# no derating up to 1 %.
NEMA_NO_DERATING_UP_TO = 1.0  # [%]
_NEMA_DERATING = (
    (NEMA_NO_DERATING_UP_TO, 1.00), (1.5, 0.97), (2.0, 0.95), (2.5, 0.93), (3.0, 0.89),
    (3.5, 0.85), (4.0, 0.82), (4.5, 0.78), (5.0, 0.76),
)


def nema_derating_factor(voltage_unbalance: float) -> DeratingFactor:
    """Derating factor of a medium induction motor for a voltage unbalance.

    Parameters
    ----------
    voltage_unbalance : float
        Unbalance by the NEMA definition, as a fraction (0.02 = 2 %) [unitless].

    Returns
    -------
    DeratingFactor
        1.00 up to 1 % (rated load is carried there), linear between the points read off
        the curve, and no factor (``advised`` false) above 5 %.

    References
    ----------
    NEMA MG 1, 14.36, Figure 14-1 [S, points ±0.01]; NEMA MG 1-2016, 12.45 (rated load up
    to 1 % unbalance) [M].
    """
    unbalance = _finite("voltage_unbalance", voltage_unbalance, "")
    if unbalance < 0:
        raise ComputationError(f"voltage_unbalance {unbalance:g} must not be negative")
    percent = unbalance * 100.0
    if percent > _NEMA_DERATING[-1][0] + 1e-9:
        return DeratingFactor(
            None, False, f"unbalance {percent:.2f} % is above 5 %: operation is not advised"
        )
    if percent <= _NEMA_DERATING[0][0]:
        factor = _NEMA_DERATING[0][1]
    else:
        factor = _NEMA_DERATING[-1][1]
        for (x0, y0), (x1, y1) in pairwise(_NEMA_DERATING):
            if percent <= x1:
                factor = y0 + (y1 - y0) * (percent - x0) / (x1 - x0)
                break
    if percent <= NEMA_NO_DERATING_UP_TO + 1e-9:
        return DeratingFactor(1.0, True, f"no derating at {percent:.2f} %: NEMA MG 1-2016 "
                                         f"12.45 — rated load up to 1 % unbalance")
    return DeratingFactor(factor, True, f"factor read off the curve at {percent:.2f} %")


# --------------------------------------------------------------------------- voltage drop


@dataclass(frozen=True)
class VoltageDrop:
    """Voltage drop along a cable and the model used to compute it."""

    voltage_drop: float
    """[V] (line-to-line for three-phase)"""
    fraction_of_nominal: float | None
    """[unitless]; ``None`` without a nominal voltage"""
    resistance_per_length: float
    """Conductor resistance used, after temperature correction [Ω/m]"""
    model: str


def cable_voltage_drop(
    current: float,
    length: float,
    resistance_per_length: float,
    phases: int = 1,
    reactance_per_length: float = 0.0,
    power_factor: float = 1.0,
    nominal_voltage: float | None = None,
    resistance_temperature_c: float | None = None,
    conductor_temperature_c: float | None = None,
    constant: ConductorConstant = COPPER_234_5,
) -> VoltageDrop:
    """Voltage drop of a cable by the usual approximate formula.

    Parameters
    ----------
    current : float
        Load current [A].
    length : float
        One-way cable length [m].
    resistance_per_length : float
        Conductor resistance per metre at ``resistance_temperature_c`` [Ω/m].
    phases : int
        1 (single-phase or d.c., two conductors) or 3 (balanced three-phase).
    reactance_per_length : float
        Conductor reactance per metre [Ω/m].
    power_factor : float
        cos φ of the load, lagging, 0 < cos φ ≤ 1 [unitless].
    nominal_voltage : float, optional
        Nominal voltage (line-to-line for three-phase) to express the drop [V].
    resistance_temperature_c : float, optional
        Temperature at which ``resistance_per_length`` is given [°C].
    conductor_temperature_c : float, optional
        Conductor temperature in service; with ``resistance_temperature_c`` the
        resistance is corrected to it [°C].
    constant : ConductorConstant
        Temperature constant for the correction (copper IEC 60228 by default).

    Returns
    -------
    VoltageDrop

    Notes
    -----
    Single-phase: ΔU = 2·I·L·(R cos φ + X sin φ); three-phase:
    ΔU = √3·I·L·(R cos φ + X sin φ); R corrected by (k + θ)/(k + θ_ref).
    The formula neglects the phase angle between sending and receiving voltages.

    References
    ----------
    IEC 60364-5-52:2009, Annex G, formula G.52.1 [S].
    """
    current = _finite("current", current, "A")
    if current < 0:
        raise ComputationError(f"current {current:g} A must not be negative")
    length = _positive("length", length, "m")
    resistance = _positive("resistance_per_length", resistance_per_length, "Ω/m")
    reactance = _finite("reactance_per_length", reactance_per_length, "Ω/m")
    if reactance < 0:
        raise ComputationError(f"reactance_per_length {reactance:g} Ω/m must not be negative")
    pf = _finite("power_factor", power_factor, "")
    if not 0.0 < pf <= 1.0:
        raise ComputationError(f"power_factor {pf:g} must be in 0 < cos φ ≤ 1")
    if phases not in (1, 3):
        raise ComputationError(
            f"phases {phases!r} must be 1 (single-phase or d.c.) or 3 (three-phase)"
        )
    temperatures = (resistance_temperature_c, conductor_temperature_c)
    if (temperatures[0] is None) != (temperatures[1] is None):
        raise ComputationError(
            "resistance_temperature_c and conductor_temperature_c must be given together"
        )
    correction = ""
    if resistance_temperature_c is not None and conductor_temperature_c is not None:
        resistance = resistance_at_temperature(
            resistance, resistance_temperature_c, conductor_temperature_c, constant
        )
        correction = (
            f"; R corrected from {resistance_temperature_c:g} °C to "
            f"{conductor_temperature_c:g} °C with {constant.describe()}"
        )
    factor, form = (2.0, "single-phase: ΔU = 2·I·L·(R cos φ + X sin φ)") if phases == 1 else (
        math.sqrt(3.0), "three-phase: ΔU = √3·I·L·(R cos φ + X sin φ)"
    )
    sin_phi = math.sqrt(1.0 - pf * pf)
    drop = factor * current * length * (resistance * pf + reactance * sin_phi)
    fraction = None
    if nominal_voltage is not None:
        fraction = drop / _positive("nominal_voltage", nominal_voltage, "V")
    return VoltageDrop(drop, fraction, resistance, form + correction)


@dataclass(frozen=True)
class VoltageDropLimit:
    """A recommended maximum voltage drop, as a fraction of the nominal voltage."""

    limit: float
    """[unitless]"""
    scope: str
    standard: str
    clause: str
    edition: str
    status: str
    advisory: bool = True

    def passes(self, fraction_of_nominal: float) -> bool:
        return _finite("fraction_of_nominal", fraction_of_nominal, "") <= self.limit

    def describe(self) -> str:
        return f"ΔU ≤ {_percent(self.limit)} of nominal ({self.scope})"


def nec_210_19_recommended_drop(portion: str = "branch") -> VoltageDropLimit:
    """NEC recommended voltage drop: 3 % for a branch circuit, 5 % feeder plus branch.

    Parameters
    ----------
    portion : str
        ``"branch"`` or ``"total"`` (feeder and branch circuit together).

    Returns
    -------
    VoltageDropLimit
        Advisory: an informational note, not a requirement.

    References
    ----------
    NFPA 70 (NEC), 210.19(A), informational note [S].
    """
    limits = {"branch": (0.03, "branch circuit"), "total": (0.05, "feeder and branch circuit")}
    if portion not in limits:
        raise ComputationError(f"portion {portion!r} must be 'branch' or 'total'")
    limit, scope = limits[portion]
    return VoltageDropLimit(limit, scope, "NFPA 70 (NEC)", "210.19(A), informational note",
                            "2017-2023", "S")


def iec_60364_5_52_recommended_drop(
    supply: str = "public", load: str = "other"
) -> VoltageDropLimit:
    """IEC 60364-5-52 recommended maximum voltage drop from the origin of the installation.

    Parameters
    ----------
    supply : str
        ``"public"`` (type A: supplied from a public LV network) or ``"private"``
        (type B: own LV supply).
    load : str
        ``"lighting"`` or ``"other"``.

    Returns
    -------
    VoltageDropLimit
        3 % / 5 % (public), 6 % / 8 % (private); Annex G is informative.

    References
    ----------
    IEC 60364-5-52:2009, Annex G, Table G.52.1 [S].
    """
    table = {("public", "lighting"): 0.03, ("public", "other"): 0.05,
             ("private", "lighting"): 0.06, ("private", "other"): 0.08}
    if supply not in ("public", "private"):
        raise ComputationError(f"supply {supply!r} must be 'public' or 'private'")
    if load not in ("lighting", "other"):
        raise ComputationError(f"load {load!r} must be 'lighting' or 'other'")
    return VoltageDropLimit(table[supply, load], f"{supply} LV supply, {load} loads",
                            "IEC 60364-5-52", "Annex G, Table G.52.1", "2009", "S")


def source_impedance_from_voltage_sag(
    no_load_voltage: float, load_voltage: float, load_current: float, phases: int = 1
) -> float:
    """Apparent source impedance from the voltage sag between no load and load.

    Parameters
    ----------
    no_load_voltage : float
        Voltage with the load off (line-to-line for three-phase) [V].
    load_voltage : float
        Voltage with the load on, same points [V].
    load_current : float
        Load current (line current for three-phase) [A].
    phases : int
        1: loop impedance of the two conductors; 3: impedance per phase.

    Returns
    -------
    float
        Z [Ω].

    Notes
    -----
    Single-phase Z = (U0 − U)/I; three-phase Z = (U0 − U)/(√3·I). This is the
    part of the source impedance seen along the load's phase angle
    (R cos φ + X sin φ); it equals |Z| only if the two angles match.

    References
    ----------
    Circuit theory (Thevenin source) [P].
    """
    no_load = _positive("no_load_voltage", no_load_voltage, "V")
    loaded = _positive("load_voltage", load_voltage, "V")
    current = _positive("load_current", load_current, "A")
    if phases not in (1, 3):
        raise ComputationError(
            f"phases {phases!r} must be 1 (single-phase or d.c.) or 3 (three-phase)"
        )
    if loaded > no_load:
        raise ComputationError(
            f"load_voltage {loaded:g} V is above no_load_voltage {no_load:g} V; "
            "the sag model needs a drop (a leading load or a changing supply can cause a rise)"
        )
    divisor = current if phases == 1 else math.sqrt(3.0) * current
    return (no_load - loaded) / divisor
