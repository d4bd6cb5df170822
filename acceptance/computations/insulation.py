"""Insulation resistance: minimum values, test voltages, temperature correction, PI and DAR.

Two bases, kept apart. The insulation of a machine's power circuits (IEC 60204-1
18.3) and of an installation circuit (IEC 60364-6 Table 6.1) is judged on the
value as measured at the stated test voltage: neither clause corrects it to a
temperature. The correction to 40 °C belongs to windings (IEEE 43, whose minimum
values are stated at 40 °C) and to trending a reading over the years.

Sources
-------
- IEEE 43-2000, cl. 6.4: correction to 40 °C by halving the resistance per 10 K
  rise, the approximation for windings whose own curve is unknown [M].
- IEEE 43-2013: replaced the single halving rule by a correction determined by
  test on the winding (readings at several temperatures), with approximate
  factors that depend on the insulation system; the halving interval of a
  winding found by test is applied here by :func:`halving_interval_from_readings`
  [M]. Table 1, d.c. test voltage by the winding's rated voltage [M]; minimum
  1-min values at 40 °C (kV + 1 MΩ, 100 MΩ, 5 MΩ; Table 3 M), minimum
  polarization index by thermal class (Table 2 M) and the 5000 MΩ rule [S].
- IEC 60204-1:2016, cl. 18.3: 500 V d.c., power circuits to the protective
  bonding circuit, ≥ 1 MΩ; sections such as busbars or slip-ring assemblies
  not below 50 kΩ [S].
- IEC 60364-6:2016, cl. 6.4.3.3, Table 6.1: SELV/PELV 250 V 0.5 MΩ, up to
  500 V 500 V 1 MΩ, above 500 V 1000 V 1 MΩ [M]; the earlier IEC 60364-6-61
  values 0.25 / 0.5 / 1.0 MΩ [M]. Which edition is in force depends on the
  national adoption, and the record says so.
- IEC 61557-2:2019, cl. 4: the open-circuit voltage of an insulation tester may
  reach 1.5 × its nominal test voltage [M].
- Dielectric absorption ratio bands: common trade practice, no single source [P].
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

from ._checks import finite as _finite
from ._checks import positive as _positive
from ._checks import temperature as _temperature
from ._errors import ComputationError
from .temperature_rise import ThermalClass, thermal_class

__all__ = [
    "PI_NOT_MEANINGFUL_ABOVE",
    "AbsorptionRatioReading",
    "InsulationMinimum",
    "InsulationTestVoltage",
    "PolarizationIndexAssessment",
    "WindingInsulationKind",
    "assess_polarization_index",
    "check_test_voltage",
    "dielectric_absorption_ratio",
    "halving_interval_from_readings",
    "iec_60204_1_insulation_minimum",
    "iec_60364_6_insulation_minimum",
    "ieee_43_insulation_minimum",
    "ieee_43_test_voltage",
    "insulation_resistance_at_40c",
    "insulation_resistance_at_temperature",
    "interpret_dielectric_absorption_ratio",
    "polarization_index",
    "polarization_index_minimum",
]

PI_NOT_MEANINGFUL_ABOVE = 5e9
"""1-min insulation resistance above which IEEE 43 deems the PI possibly not meaningful [Ω]."""

_MEGA = 1e6





def _megohms(value: float) -> str:
    return f"{value / _MEGA:g} MΩ" if value >= _MEGA else f"{value / 1e3:g} kΩ"


# --------------------------------------------------------------------------- correction


def insulation_resistance_at_temperature(
    resistance: float,
    measured_temperature_c: float,
    base_temperature_c: float = 40.0,
    halving_interval: float = 10.0,
) -> float:
    """Correct an insulation resistance to a base temperature, halving per interval.

    Parameters
    ----------
    resistance : float
        Insulation resistance as read [Ω].
    measured_temperature_c : float
        Winding temperature during the test [°C].
    base_temperature_c : float
        Temperature to correct to; IEEE 43 uses 40 °C [°C].
    halving_interval : float
        Temperature rise that halves the resistance; 10 K by the rule of thumb [K].

    Returns
    -------
    float
        Resistance at ``base_temperature_c`` [Ω].

    Notes
    -----
    R_base = R_t · 0.5^((T_base − T) / ΔT_half). A reading taken colder than the
    base is reduced: 180 MΩ at 30 °C is 90 MΩ at 40 °C.

    References
    ----------
    IEEE 43-2000, cl. 6.4, halving per 10 K [M]; IEEE 43-2013 asks for the
    interval found by test on the winding (see :func:`halving_interval_from_readings`) [M].
    """
    resistance = _positive("resistance", resistance, "Ω")
    measured = _temperature("measured_temperature_c", measured_temperature_c)
    base = _temperature("base_temperature_c", base_temperature_c)
    interval = _positive("halving_interval", halving_interval, "K")
    return resistance * 0.5 ** ((base - measured) / interval)


def insulation_resistance_at_40c(resistance: float, winding_temperature_c: float) -> float:
    """Insulation resistance corrected to 40 °C by the IEEE 43 halving-per-10-K rule.

    Parameters
    ----------
    resistance : float
        Insulation resistance as read [Ω].
    winding_temperature_c : float
        Winding temperature during the test [°C].

    Returns
    -------
    float
        R40 [Ω].

    Notes
    -----
    R40 = R_t · 0.5^((40 − T)/10). For windings and for trending only: IEC 60204-1
    18.3 and IEC 60364-6 judge the value as measured.

    References
    ----------
    IEEE 43-2000, cl. 6.4, halving per 10 K [M]; IEEE 43-2013 replaced it by a
    correction found by test [M].
    """
    return insulation_resistance_at_temperature(resistance, winding_temperature_c, 40.0, 10.0)


def halving_interval_from_readings(
    resistance_1: float, temperature_1_c: float, resistance_2: float, temperature_2_c: float
) -> float:
    """The temperature change that halves a winding's insulation resistance, by test.

    Parameters
    ----------
    resistance_1, resistance_2 : float
        Insulation resistance of the same winding at two temperatures, same test
        voltage and duration [Ω].
    temperature_1_c, temperature_2_c : float
        Winding temperatures of the two readings [°C].

    Returns
    -------
    float
        ΔT_half [K], for :func:`insulation_resistance_at_temperature`.

    Notes
    -----
    With R = R₀ · 0.5^(T/ΔT_half): ΔT_half = (T₂ − T₁) · ln 2 / ln(R₁/R₂).
    200 MΩ at 20 °C and 50 MΩ at 40 °C give 10 K, the IEEE 43-2000 figure.

    References
    ----------
    IEEE 43-2013, temperature correction determined by test on the winding (IR
    plotted on a log scale against temperature) [M].
    """
    r1 = _positive("resistance_1", resistance_1, "Ω")
    r2 = _positive("resistance_2", resistance_2, "Ω")
    t1 = _temperature("temperature_1_c", temperature_1_c)
    t2 = _temperature("temperature_2_c", temperature_2_c)
    if abs(t2 - t1) < 5.0:
        raise ComputationError(
            f"the two readings are {abs(t2 - t1):g} K apart; take them at least 5 K apart "
            "so the slope means something"
        )
    if (r1 - r2) * (t2 - t1) <= 0:
        raise ComputationError(
            "the insulation resistance did not fall as the temperature rose; the readings "
            "do not describe one winding's temperature dependence"
        )
    return (t2 - t1) * math.log(2.0) / math.log(r1 / r2)


# --------------------------------------------------------------------------- test voltage


@dataclass(frozen=True)
class InsulationTestVoltage:
    """A d.c. test voltage against the one its source asks for."""


    test_voltage: float
    """[V]"""
    lowest: float
    """[V]"""
    highest: float
    """[V]"""
    source: str
    suitable: bool
    message: str


def ieee_43_test_voltage(rated_voltage: float) -> tuple[float, float]:
    """d.c. test voltage range for a winding by its rated voltage (IEEE 43 Table 1).

    Parameters
    ----------
    rated_voltage : float
        Winding rated line-to-line voltage [V].

    Returns
    -------
    tuple of float
        Lowest and highest d.c. test voltage [V].

    Notes
    -----
    < 1000 V: 500 V; 1000–2500 V: 500–1000 V; 2501–5000 V: 1000–2500 V;
    5001–12 000 V: 2500–5000 V; > 12 000 V: 5000–10 000 V.

    References
    ----------
    IEEE 43-2013, Table 1 [M].
    """
    voltage = _positive("rated_voltage", rated_voltage, "V")
    for upper, low, high in _IEEE_43_TABLE_1:
        if voltage <= upper:
            return low, high
    return 5000.0, 10000.0


# IEEE 43-2013 Table 1: (rated voltage up to, lowest, highest test voltage) [V] [M]
_IEEE_43_TABLE_1 = ((999.0, 500.0, 500.0), (2500.0, 500.0, 1000.0), (5000.0, 1000.0, 2500.0),
                    (12000.0, 2500.0, 5000.0))

# IEC 61557-2: open-circuit voltage up to 1.5 × the nominal test voltage [M]
_TESTER_OPEN_CIRCUIT_FACTOR = 1.5


def check_test_voltage(test_voltage: float, lowest: float, highest: float,
                       source: str) -> InsulationTestVoltage:
    """Whether a recorded d.c. test voltage is the one the source asks for.

    Parameters
    ----------
    test_voltage : float
        Test voltage recorded with the reading [V].
    lowest, highest : float
        The source's test voltage (or its range) [V].
    source : str
        The clause or table, for the message.

    Returns
    -------
    InsulationTestVoltage

    Notes
    -----
    Accepted: lowest ≤ U ≤ 1.5 · highest. A tester's output at its nominal setting
    may be read higher than nominal up to its open-circuit voltage; below the
    source's voltage the minimum does not apply.

    References
    ----------
    IEC 61557-2:2019, cl. 4 (open-circuit voltage ≤ 1.5 × nominal) [M].
    """
    voltage = _positive("test_voltage", test_voltage, "V")
    top = highest * _TESTER_OPEN_CIRCUIT_FACTOR
    span = f"{lowest:g} V d.c." if lowest == highest else f"{lowest:g} … {highest:g} V d.c."
    if voltage < lowest - 1e-9:
        return InsulationTestVoltage(voltage, lowest, highest, source, False,
                                f"tested at {voltage:g} V; {source} sets the minimum at "
                                f"{span}: repeat at that voltage")
    if voltage > top + 1e-9:
        return InsulationTestVoltage(voltage, lowest, highest, source, False,
                                f"tested at {voltage:g} V, above the {span} of {source}: "
                                "repeat at that voltage")
    return InsulationTestVoltage(voltage, lowest, highest, source, True,
                            f"{voltage:g} V against {span} ({source})")


# --------------------------------------------------------------------------- minimum values


@dataclass(frozen=True)
class InsulationMinimum:
    """A minimum insulation resistance with its test voltage and its source."""

    minimum_resistance: float
    """[Ω]"""
    test_voltage: float | None
    """d.c. test voltage the minimum applies at [V]; ``None`` where the standard leaves it open."""
    scope: str
    standard: str
    clause: str
    edition: str
    status: str
    note: str = ""

    def describe(self) -> str:
        """E.g. ``R ≥ 1 MΩ at 500 V d.c.``."""
        at = f" at {self.test_voltage:g} V d.c." if self.test_voltage is not None else ""
        return f"R ≥ {_megohms(self.minimum_resistance)}{at}"

    def passes(self, resistance: float) -> bool:
        """Whether a (temperature-corrected where required) reading meets the minimum."""
        return _finite("resistance", resistance, "Ω") >= self.minimum_resistance


def iec_60204_1_insulation_minimum(reduced_section: bool = False) -> InsulationMinimum:
    """Minimum insulation resistance of a machine's power circuits (IEC 60204-1).

    Parameters
    ----------
    reduced_section : bool
        ``True`` for sections such as busbars, conductor wire or bar systems or
        slip-ring assemblies, for which a lower value is permitted.

    Returns
    -------
    InsulationMinimum
        1 MΩ (or 50 kΩ for a reduced section) at 500 V d.c.

    References
    ----------
    IEC 60204-1:2016, cl. 18.3 [S].
    """
    if reduced_section:
        return InsulationMinimum(
            50e3, 500.0, "busbar, conductor bar or slip-ring section to protective bonding",
            "IEC 60204-1", "cl. 18.3", "2016", "S",
            note="lower value permitted for such sections; never below 50 kΩ",
        )
    return InsulationMinimum(
        1.0 * _MEGA, 500.0, "power circuit conductors to protective bonding circuit",
        "IEC 60204-1", "cl. 18.3", "2016", "S",
    )


# IEC 60364-6 Table 6.1: (test voltage, current minimum, earlier minimum) [S, reference values §5]
_IEC_60364_6 = {
    "SELV/PELV": (250.0, 0.5 * _MEGA, 0.25 * _MEGA),
    "up to 500 V": (500.0, 1.0 * _MEGA, 0.5 * _MEGA),
    "above 500 V": (1000.0, 1.0 * _MEGA, 1.0 * _MEGA),
}
_IEC_60364_6_EDITIONS = {"current": "2016", "earlier": "IEC 60364-6-61 (earlier editions)"}
_IEC_60364_6_DOUBT = ("values from memory; the edition in force depends on the national "
                      "adoption: earlier editions give 0.25 / 0.5 / 1.0 MΩ")


def iec_60364_6_insulation_minimum(
    circuit_nominal_voltage: float, selv_or_pelv: bool = False, edition: str = "current"
) -> InsulationMinimum:
    """Minimum insulation resistance of an installation circuit (IEC 60364-6 Table 6.1).

    Parameters
    ----------
    circuit_nominal_voltage : float
        Nominal voltage of the circuit, up to 1000 V a.c. [V].
    selv_or_pelv : bool
        ``True`` for a SELV or PELV circuit.
    edition : str
        ``"current"`` (IEC 60364-6:2016) or ``"earlier"`` (IEC 60364-6-61 values).

    Returns
    -------
    InsulationMinimum

    Notes
    -----
    Current: SELV/PELV 250 V → 0.5 MΩ; up to 500 V (incl. FELV) 500 V → 1.0 MΩ;
    above 500 V 1000 V → 1.0 MΩ. Earlier: 0.25 / 0.5 / 1.0 MΩ. The record must
    say which edition was applied.

    References
    ----------
    IEC 60364-6:2016, cl. 6.4.3.3, Table 6.1 [M].
    """
    voltage = _positive("circuit_nominal_voltage", circuit_nominal_voltage, "V")
    if edition not in _IEC_60364_6_EDITIONS:
        raise ComputationError(f"edition {edition!r} must be 'current' or 'earlier'")
    if voltage > 1000.0:
        raise ComputationError(
            f"circuit_nominal_voltage {voltage:g} V is above 1000 V, outside the low-voltage "
            "scope of IEC 60364-6"
        )
    if selv_or_pelv:
        row = "SELV/PELV"
    elif voltage <= 500.0:
        row = "up to 500 V"
    else:
        row = "above 500 V"
    test_voltage, current, earlier = _IEC_60364_6[row]
    return InsulationMinimum(
        minimum_resistance=current if edition == "current" else earlier,
        test_voltage=test_voltage,
        scope=f"installation circuit, {row}",
        standard="IEC 60364-6",
        clause="cl. 6.4.3.3, Table 6.1",
        edition=_IEC_60364_6_EDITIONS[edition],
        status="M",
        note=_IEC_60364_6_DOUBT,
    )


class WindingInsulationKind(StrEnum):
    """Winding categories of IEEE 43's minimum insulation resistance table."""

    PRE_1970 = "pre_1970"
    """Most windings made before about 1970, all field windings, others not listed: kV + 1."""
    FORM_WOUND = "form_wound"
    """Most d.c. armature and a.c. windings built after about 1970 (form-wound): 100 MΩ."""
    RANDOM_WOUND = "random_wound"
    """Random-wound stator coils, and form-wound coils rated below 1 kV: 5 MΩ."""


def ieee_43_insulation_minimum(
    winding_kind: WindingInsulationKind | str, rated_voltage: float | None = None
) -> InsulationMinimum:
    """IEEE 43 recommended minimum 1-min insulation resistance at 40 °C.

    Parameters
    ----------
    winding_kind : WindingInsulationKind or str
        ``"pre_1970"``, ``"form_wound"`` or ``"random_wound"``.
    rated_voltage : float, optional
        Rated line-to-line voltage, needed for ``pre_1970`` [V].

    Returns
    -------
    InsulationMinimum
        Compare with a reading corrected to 40 °C.

    Notes
    -----
    IR1min ≥ kV + 1 MΩ (kV the rated voltage in kV); 100 MΩ; 5 MΩ.

    References
    ----------
    IEEE 43-2013, Table 3 [values S, table number M].
    """
    try:
        kind = WindingInsulationKind(winding_kind)
    except ValueError:
        allowed = ", ".join(k.value for k in WindingInsulationKind)
        raise ComputationError(
            f"winding_kind {winding_kind!r} is not an IEEE 43 category; use {allowed}"
        ) from None
    if kind is WindingInsulationKind.PRE_1970:
        if rated_voltage is None:
            raise ComputationError(
                "rated_voltage is missing; the IEEE 43 kV + 1 minimum needs the rated voltage"
            )
        voltage = _positive("rated_voltage", rated_voltage, "V")
        minimum = (voltage / 1000.0 + 1.0) * _MEGA
        scope = "windings made before about 1970, field windings, others (kV + 1)"
    elif kind is WindingInsulationKind.FORM_WOUND:
        minimum, scope = 100.0 * _MEGA, "form-wound windings built after about 1970"
    else:
        minimum, scope = 5.0 * _MEGA, "random-wound windings; form-wound coils below 1 kV"
    return InsulationMinimum(
        minimum_resistance=minimum,
        test_voltage=None,
        scope=scope + ", 1-min reading at 40 °C",
        standard="IEEE 43",
        clause="Table 3",
        edition="2013",
        status="S",
    )


# --------------------------------------------------------------------------- PI and DAR


def polarization_index(resistance_1min: float, resistance_10min: float) -> float:
    """Polarization index, the ratio of the 10-min to the 1-min insulation resistance.

    Parameters
    ----------
    resistance_1min : float
        Insulation resistance after 1 min [Ω].
    resistance_10min : float
        Insulation resistance after 10 min [Ω].

    Returns
    -------
    float
        PI [unitless].

    Notes
    -----
    PI = IR10 / IR1.

    References
    ----------
    IEEE 43-2013 (definition of the polarization index) [S].
    """
    one = _positive("resistance_1min", resistance_1min, "Ω")
    ten = _positive("resistance_10min", resistance_10min, "Ω")
    return ten / one


# IEEE 43 Table 2, minimum PI by thermal class [S, reference values §5]
_PI_MINIMUM = {"A": 1.5, "B": 2.0, "F": 2.0, "H": 2.0}


def polarization_index_minimum(designation: str | int | ThermalClass) -> float:
    """IEEE 43 recommended minimum polarization index for a thermal class.

    Parameters
    ----------
    designation : str, int or ThermalClass
        Thermal class: 105 (A), 130 (B), 155 (F) or 180 (H).

    Returns
    -------
    float
        Minimum PI [unitless]: A 1.5; B, F, H 2.0.

    References
    ----------
    IEEE 43-2013, Table 2 [values S, table M].
    """
    klass = thermal_class(designation)
    if klass.letter not in _PI_MINIMUM:
        raise ComputationError(
            f"thermal_class {klass.describe()} has no IEEE 43 minimum polarization index; "
            "tabulated: 105 (A), 130 (B), 155 (F), 180 (H)"
        )
    return _PI_MINIMUM[klass.letter]


@dataclass(frozen=True)
class PolarizationIndexAssessment:
    """A polarization index, its minimum and whether it is meaningful."""

    index: float
    """[unitless]"""
    minimum: float
    """[unitless]"""
    meaningful: bool
    passes: bool | None
    """``None`` when the index is not meaningful."""
    note: str
    standard: str = "IEEE 43"
    clause: str = "Table 2"
    edition: str = "2013"
    status: str = "S"


def assess_polarization_index(
    resistance_1min: float,
    resistance_10min: float,
    designation: str | int | ThermalClass,
) -> PolarizationIndexAssessment:
    """Compare a polarization index with the IEEE 43 minimum for its thermal class.

    Parameters
    ----------
    resistance_1min : float
        Insulation resistance after 1 min [Ω].
    resistance_10min : float
        Insulation resistance after 10 min [Ω].
    designation : str, int or ThermalClass
        Thermal class of the winding.

    Returns
    -------
    PolarizationIndexAssessment

    Notes
    -----
    When IR1 exceeds 5000 MΩ the PI may not be meaningful and the 1-min value is
    judged on its own; ``passes`` is then ``None``.

    References
    ----------
    IEEE 43-2013, Table 2 and the note on IR1 above 5000 MΩ [S; table number M].
    """
    index = polarization_index(resistance_1min, resistance_10min)
    minimum = polarization_index_minimum(designation)
    if resistance_1min > PI_NOT_MEANINGFUL_ABOVE:
        return PolarizationIndexAssessment(
            index, minimum, False, None,
            f"IR1 {_megohms(resistance_1min)} is above 5000 MΩ: the PI may not be meaningful; "
            "judge the 1-min value instead",
        )
    passes = index >= minimum
    return PolarizationIndexAssessment(
        index, minimum, True, passes, f"PI {index:.2f} {'≥' if passes else '<'} {minimum:g}"
    )


def dielectric_absorption_ratio(resistance_30s: float, resistance_60s: float) -> float:
    """Dielectric absorption ratio, the 60-s over the 30-s insulation resistance.

    Parameters
    ----------
    resistance_30s : float
        Insulation resistance after 30 s [Ω].
    resistance_60s : float
        Insulation resistance after 60 s [Ω].

    Returns
    -------
    float
        DAR [unitless].

    Notes
    -----
    DAR = IR60s / IR30s.

    References
    ----------
    Common trade practice [P].
    """
    thirty = _positive("resistance_30s", resistance_30s, "Ω")
    sixty = _positive("resistance_60s", resistance_60s, "Ω")
    return sixty / thirty


@dataclass(frozen=True)
class AbsorptionRatioReading:
    """A dielectric absorption ratio and the band trade practice puts it in."""

    ratio: float
    """[unitless]"""
    band: str
    status: str = "P"
    note: str = "bands are common trade practice with no single published source"


def interpret_dielectric_absorption_ratio(ratio: float) -> AbsorptionRatioReading:
    """Band a dielectric absorption ratio as trade practice commonly does.

    Parameters
    ----------
    ratio : float
        DAR = IR60s / IR30s [unitless].

    Returns
    -------
    AbsorptionRatioReading
        Band ``"poor"`` (DAR < 1.0), ``"questionable"`` (1.0 ≤ DAR < 1.25),
        ``"acceptable"`` (1.25 ≤ DAR < 1.6) or ``"good"`` (DAR ≥ 1.6).

    References
    ----------
    Common trade practice [P]; no standard sets these bands.
    """
    ratio = _positive("ratio", ratio, "")
    if ratio < 1.0:
        band = "poor"
    elif ratio < 1.25:
        band = "questionable"
    elif ratio < 1.6:
        band = "acceptable"
    else:
        band = "good"
    return AbsorptionRatioReading(ratio, band)
