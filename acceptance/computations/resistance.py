"""Conductor and winding resistance: temperature correction, resistivity, tables.

The temperature correction of a copper or aluminium resistance uses the linear
model ``R2 = R1 · (k + T2) / (k + T1)``, where ``k`` is the inferred temperature
of zero resistance below 0 °C. Standards differ in the ``k`` they adopt, so the
constant is a value object that names its material and its sources, and every
caller can state in the record which one was used and why.

Sources
-------
- IEC 60228:2004, cl. 5 and Tables 1, 2 and 3 (maximum conductor resistance at
  20 °C); Annex B (temperature correction, copper 234.5, aluminium 228).
- IEC 60028:1925, International standard of resistance for copper (annealed
  copper 1/58 Ω·mm²/m at 20 °C).
- IEC 60889:1987, hard-drawn aluminium wire (0.028264 Ω·mm²/m at 20 °C) [M].
- IEC 60034-1, cl. 8.6.2 (copper 235, aluminium 225).
- IEC 60076-2, cl. 7 (copper 235, aluminium 225).
- IEEE 112 and IEEE C57.12.90 (copper 234.5, aluminium 225).
- NFPA 70 (NEC), Chapter 9, Table 8, conductor properties (d.c. resistance at
  75 °C, uncoated copper).
- ASTM B258 (American Wire Gauge: 36 AWG = 0.0050 in, 4/0 = 0.4600 in).
- IEC 60204-1:2005, cl. 18.2.2 and Table 9 (continuity of the protective
  bonding circuit, maximum voltage drop at 10 A; the table is in the 2005
  edition, the 2016 edition replaced it by the expected-value rule) [M].
- IEC 60204-1:2016, cl. 18.2.2 (continuity test current: at least 0.2 A, up to
  about 10 A, from a PELV source) [M].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ._checks import ABSOLUTE_ZERO_C
from ._checks import positive as _positive
from ._checks import temperature as _temperature
from ._errors import ComputationError

__all__ = [
    "ABSOLUTE_ZERO_C",
    "ALUMINIUM_225",
    "ALUMINIUM_228",
    "ALUMINIUM_RESISTIVITY",
    "ANNEALED_COPPER_RESISTIVITY",
    "CONDUCTOR_CONSTANTS",
    "COPPER_234_5",
    "COPPER_235",
    "BONDING_TEST_CURRENT_RANGE",
    "BondingDropLimit",
    "BondingResistanceEstimate",
    "ConductorConstant",
    "Resistivity",
    "TabulatedResistance",
    "awg_cross_section_mm2",
    "awg_diameter_mm",
    "awg_index",
    "conductor_constant",
    "conductor_resistance",
    "expected_bonding_resistance",
    "iec_60204_1_bonding_test_current",
    "iec_60204_1_bonding_voltage_drop",
    "iec_60228_resistance",
    "nec_table_8_resistance",
    "resistance_at_temperature",
    "temperature_coefficient_at_20c",
]


_FEET = 0.3048  # m per international foot, exact by definition





# --------------------------------------------------------------------------- constants


@dataclass(frozen=True)
class ConductorConstant:
    """Temperature constant ``k`` of a conductor material, with its sources.

    Attributes
    ----------
    material : str
        ``"copper"`` or ``"aluminium"``.
    temperature_constant : float
        Inferred temperature of zero resistance, taken positive [°C].
    standards : tuple of str
        Standards that adopt this value.
    status : str
        ``"S"`` published source, ``"M"`` from memory of the standard,
        ``"P"`` trade practice.
    """

    material: str
    temperature_constant: float
    standards: tuple[str, ...]
    status: str

    @property
    def alpha_20(self) -> float:
        """Temperature coefficient of resistance at 20 °C, ``1/(k + 20)`` [1/K]."""
        return 1.0 / (self.temperature_constant + 20.0)

    def describe(self) -> str:
        """One phrase for the record, e.g. ``copper k = 235 °C (IEC 60034-1, IEC 60076-2)``."""
        return (
            f"{self.material} k = {self.temperature_constant:g} °C "
            f"({', '.join(self.standards)})"
        )

    def __str__(self) -> str:
        return self.describe()


# IEC 60228 Annex B; IEEE 112; IEEE C57.12.90 [S/M, reference values §1]
COPPER_234_5 = ConductorConstant("copper", 234.5, ("IEC 60228", "IEEE 112", "IEEE C57.12.90"), "S")
# IEC 60034-1 cl. 8.6.2; IEC 60076-2 [S/M, reference values §1]
COPPER_235 = ConductorConstant("copper", 235.0, ("IEC 60034-1", "IEC 60076-2"), "S")
# IEC 60034-1; IEC 60076-2; IEEE 112 / C57.12.90 [M, reference values §1]
ALUMINIUM_225 = ConductorConstant(
    "aluminium", 225.0, ("IEC 60034-1", "IEC 60076-2", "IEEE 112", "IEEE C57.12.90"), "M"
)
# IEC 60228 Annex B [S, reference values §1]
ALUMINIUM_228 = ConductorConstant("aluminium", 228.0, ("IEC 60228",), "S")

CONDUCTOR_CONSTANTS: tuple[ConductorConstant, ...] = (
    COPPER_234_5,
    COPPER_235,
    ALUMINIUM_225,
    ALUMINIUM_228,
)

_MATERIAL_ALIASES = {"copper": "copper", "cu": "copper", "aluminium": "aluminium",
                     "aluminum": "aluminium", "al": "aluminium"}


def _material(value: str) -> str:
    key = str(value).strip().lower()
    if key not in _MATERIAL_ALIASES:
        raise ComputationError(
            f"material {value!r} is not known; use 'copper' or 'aluminium'"
        )
    return _MATERIAL_ALIASES[key]


def _standard_key(text: str) -> str:
    return "".join(str(text).lower().split())


def conductor_constant(material: str, standard: str) -> ConductorConstant:
    """The temperature constant a standard adopts for a conductor material.

    Parameters
    ----------
    material : str
        ``"copper"`` or ``"aluminium"`` (``"aluminum"``, ``"Cu"``, ``"Al"`` accepted).
    standard : str
        The standard, e.g. ``"IEC 60034-1"``, ``"IEEE 112"``, ``"IEC 60228"``
        (case and spaces ignored).

    Returns
    -------
    ConductorConstant

    Raises
    ------
    ComputationError
        If the material is unknown or no constant is recorded for that standard.

    References
    ----------
    See the module docstring; reference values §1.
    """
    material_name = _material(material)
    wanted = _standard_key(standard)
    for constant in CONDUCTOR_CONSTANTS:
        if constant.material == material_name and any(
            _standard_key(s) == wanted for s in constant.standards
        ):
            return constant
    known = sorted(
        {s for c in CONDUCTOR_CONSTANTS if c.material == material_name for s in c.standards}
    )
    raise ComputationError(
        f"standard {standard!r} has no recorded {material_name} constant; "
        f"known: {', '.join(known)}"
    )


def _k(constant: ConductorConstant | float) -> float:
    if isinstance(constant, ConductorConstant):
        return constant.temperature_constant
    return _positive("constant", constant, "°C")


def temperature_coefficient_at_20c(constant: ConductorConstant | float) -> float:
    """Temperature coefficient of resistance at 20 °C.

    Parameters
    ----------
    constant : ConductorConstant or float
        Temperature constant ``k`` [°C].

    Returns
    -------
    float
        ``alpha20`` [1/K].

    Notes
    -----
    alpha20 = 1 / (k + 20).

    References
    ----------
    IEC 60228:2004, Annex B (0.00393 /K copper, 0.00403 /K aluminium).
    """
    return 1.0 / (_k(constant) + 20.0)


def resistance_at_temperature(
    resistance: float,
    measured_temperature_c: float,
    target_temperature_c: float,
    constant: ConductorConstant | float,
) -> float:
    """Correct a conductor resistance from one temperature to another.

    Parameters
    ----------
    resistance : float
        Resistance measured at ``measured_temperature_c`` [Ω].
    measured_temperature_c : float
        Conductor temperature during the measurement [°C].
    target_temperature_c : float
        Temperature to correct to, e.g. 20 °C or 75 °C [°C].
    constant : ConductorConstant or float
        Temperature constant ``k`` of the material [°C].

    Returns
    -------
    float
        Resistance at ``target_temperature_c`` [Ω].

    Notes
    -----
    R2 = R1 · (k + T2) / (k + T1). The linearised form 1/(1 + 0.004·ΔT) found in
    some tables is not used: it differs by about 0.3 % over 55 K.

    References
    ----------
    IEC 60228:2004, Annex B; IEC 60034-1, cl. 8.6.2; IEEE 112.
    """
    resistance = _positive("resistance", resistance, "Ω")
    measured = _temperature("measured_temperature_c", measured_temperature_c)
    target = _temperature("target_temperature_c", target_temperature_c)
    k = _k(constant)
    for name, value in (("measured_temperature_c", measured), ("target_temperature_c", target)):
        if value <= -k:
            raise ComputationError(
                f"{name} {value:g} °C is at or below -k ({-k:g} °C), "
                "where the linear resistance model does not hold"
            )
    return resistance * (k + target) / (k + measured)


# --------------------------------------------------------------------------- resistivity


@dataclass(frozen=True)
class Resistivity:
    """Resistivity of a conductor material at a reference temperature, with its source."""

    material: str
    resistivity: float
    """[Ω·m]"""
    reference_temperature_c: float
    """[°C]"""
    source: str
    status: str

    def describe(self) -> str:
        return (
            f"{self.material} {self.resistivity * 1e6:.6f} Ω·mm²/m at "
            f"{self.reference_temperature_c:g} °C ({self.source})"
        )


# IEC 60028: 1/58 Ω·mm²/m = 0.017241 Ω·mm²/m [S, reference values §1]
ANNEALED_COPPER_RESISTIVITY = Resistivity("copper", 1.0 / 58.0 * 1e-6, 20.0, "IEC 60028", "S")
# IEC 60889 hard-drawn aluminium, 61 % IACS; also IEC 60287-1-1 Table 1 [M]
ALUMINIUM_RESISTIVITY = Resistivity(
    "aluminium", 0.028264e-6, 20.0, "IEC 60889; IEC 60287-1-1 Table 1", "M"
)


def conductor_resistance(
    length: float, cross_section_mm2: float, resistivity: Resistivity | float
) -> float:
    """Resistance of a solid conductor from its resistivity.

    Parameters
    ----------
    length : float
        Conductor length [m].
    cross_section_mm2 : float
        Conductor cross-section [mm²].
    resistivity : Resistivity or float
        Material resistivity at the temperature of interest [Ω·m].

    Returns
    -------
    float
        Resistance at the resistivity's reference temperature [Ω].

    Notes
    -----
    R = ρ · L / A. Stranded conductors read a few per cent higher (lay length);
    use :func:`iec_60228_resistance` for a cable's maximum.

    References
    ----------
    IEC 60028 (annealed copper); IEC 60889 (aluminium).
    """
    length = _positive("length", length, "m")
    area = _positive("cross_section_mm2", cross_section_mm2, "mm²") * 1e-6
    rho = resistivity.resistivity if isinstance(resistivity, Resistivity) else _positive(
        "resistivity", resistivity, "Ω·m"
    )
    return rho * length / area


# --------------------------------------------------------------------------- tables


@dataclass(frozen=True)
class TabulatedResistance:
    """One row of a published conductor resistance table.

    ``resistance_per_length`` is in SI [Ω/m]; ``tabulated_value`` and
    ``tabulated_unit`` repeat the table's own figure for the record.
    """

    resistance_per_length: float
    tabulated_value: float
    tabulated_unit: str
    conductor_temperature_c: float
    conductor: str
    standard: str
    clause: str
    edition: str
    status: str

    def describe(self) -> str:
        return (
            f"{self.conductor}: {self.tabulated_value:g} {self.tabulated_unit} at "
            f"{self.conductor_temperature_c:g} °C ({self.standard} {self.clause})"
        )


# NEC Chapter 9 Table 8, uncoated copper, d.c. at 75 °C [Ω/1000 ft]: (solid, stranded).
# 14-8 AWG are reference values §8 [S]; the other rows are from memory [M].
_NEC_TABLE_8: dict[int, tuple[float | None, float, str]] = {
    18: (7.77, 7.95, "M"),
    16: (4.89, 4.99, "M"),
    14: (3.07, 3.14, "S"),
    12: (1.93, 1.98, "S"),
    10: (1.21, 1.24, "S"),
    8: (0.764, 0.778, "S"),
    6: (None, 0.491, "M"),
    4: (None, 0.308, "M"),
    3: (None, 0.245, "M"),
    2: (None, 0.194, "M"),
    1: (None, 0.154, "M"),
    0: (None, 0.122, "M"),
    -1: (None, 0.0967, "M"),
    -2: (None, 0.0766, "M"),
    -3: (None, 0.0608, "M"),
}

# IEC 60228 maximum resistance at 20 °C, plain copper [Ω/km]: (class 1 and 2, class 5).
# 1.5-6 mm² are reference values §8 [S]; the other rows are from memory [M].
_IEC_60228: dict[float, tuple[float, float, str]] = {
    0.5: (36.0, 39.0, "M"),
    0.75: (24.5, 26.0, "M"),
    1.0: (18.1, 19.5, "M"),
    1.5: (12.1, 13.3, "S"),
    2.5: (7.41, 7.98, "S"),
    4.0: (4.61, 4.95, "S"),
    6.0: (3.08, 3.30, "S"),
    10.0: (1.83, 1.91, "M"),
    16.0: (1.15, 1.21, "M"),
    25.0: (0.727, 0.780, "M"),
    35.0: (0.524, 0.554, "M"),
    50.0: (0.387, 0.386, "M"),
    70.0: (0.268, 0.272, "M"),
    95.0: (0.193, 0.206, "M"),
    120.0: (0.153, 0.161, "M"),
}


def awg_index(gauge: str | int) -> int:
    """The AWG number used in the gauge formula: 1/0 → 0, 2/0 → −1, 3/0 → −2, 4/0 → −3.

    Parameters
    ----------
    gauge : str or int
        ``12``, ``"12"``, ``"12 AWG"``, ``"1/0"``, ``"0000"`` [unitless].

    Returns
    -------
    int

    References
    ----------
    ASTM B258.
    """
    text = str(gauge).strip().upper().removesuffix("AWG").strip()
    if "/" in text:
        count, _, zero = text.partition("/")
        if zero == "0" and count.isdigit() and 1 <= int(count) <= 4:
            return 1 - int(count)
    elif set(text) == {"0"} and len(text) <= 4:
        return 1 - len(text)
    elif text.lstrip("-").isdigit() and 1 <= int(text) <= 40:
        return int(text)
    raise ComputationError(
        f"gauge {gauge!r} is not an AWG size; use 40 … 1, 1/0, 2/0, 3/0 or 4/0"
    )


def awg_diameter_mm(gauge: str | int) -> float:
    """Diameter of a solid wire of the given AWG size.

    Parameters
    ----------
    gauge : str or int
        AWG size, see :func:`awg_index` [unitless].

    Returns
    -------
    float
        Diameter [mm].

    Notes
    -----
    d = 0.127 mm · 92^((36 − n)/39), with 1/0 … 4/0 as n = 0 … −3.

    References
    ----------
    ASTM B258 (36 AWG = 0.0050 in, 4/0 = 0.4600 in, geometric progression).
    """
    return 0.127 * 92.0 ** ((36 - awg_index(gauge)) / 39.0)


def awg_cross_section_mm2(gauge: str | int) -> float:
    """Cross-section of a solid wire of the given AWG size, π·d²/4 [mm²].

    Parameters
    ----------
    gauge : str or int
        AWG size, see :func:`awg_index` [unitless].

    Returns
    -------
    float
        Area [mm²].

    References
    ----------
    ASTM B258.
    """
    return math.pi / 4.0 * awg_diameter_mm(gauge) ** 2


def _awg_label(index: int) -> str:
    return f"{1 - index}/0 AWG" if index <= 0 else f"{index} AWG"


def nec_table_8_resistance(gauge: str | int, stranding: str = "stranded") -> TabulatedResistance:
    """D.C. resistance of uncoated copper at 75 °C from NEC Chapter 9 Table 8.

    Parameters
    ----------
    gauge : str or int
        AWG size 18 … 4/0 [unitless].
    stranding : str
        ``"solid"`` (18–8 AWG only) or ``"stranded"``.

    Returns
    -------
    TabulatedResistance
        Tabulated value in Ω/1000 ft and the same in Ω/m.

    References
    ----------
    NFPA 70 (NEC), Chapter 9, Table 8, conductor properties.
    """
    index = awg_index(gauge)
    if index not in _NEC_TABLE_8:
        raise ComputationError(
            f"gauge {gauge!r} is not in the encoded NEC Chapter 9 Table 8 rows (18 AWG … 4/0 AWG)"
        )
    if stranding not in ("solid", "stranded"):
        raise ComputationError(f"stranding {stranding!r} must be 'solid' or 'stranded'")
    solid, stranded, status = _NEC_TABLE_8[index]
    value = stranded if stranding == "stranded" else solid
    if value is None:
        raise ComputationError(
            f"gauge {gauge!r} is tabulated only as stranded in NEC Chapter 9 Table 8"
        )
    return TabulatedResistance(
        resistance_per_length=value / (1000.0 * _FEET),
        tabulated_value=value,
        tabulated_unit="Ω/1000 ft",
        conductor_temperature_c=75.0,
        conductor=f"{_awg_label(index)} {stranding} uncoated copper",
        standard="NFPA 70 (NEC)",
        clause="Chapter 9, Table 8",
        edition="2017-2023 (values unchanged)",
        status=status,
    )


def iec_60228_resistance(cross_section_mm2: float, conductor_class: int = 2) -> TabulatedResistance:
    """Maximum resistance at 20 °C of a plain copper conductor from IEC 60228.

    Parameters
    ----------
    cross_section_mm2 : float
        Nominal cross-section, 0.5 … 120 mm² [mm²].
    conductor_class : int
        1 (solid), 2 (stranded) or 5 (flexible) [unitless].

    Returns
    -------
    TabulatedResistance
        Tabulated maximum in Ω/km and the same in Ω/m.

    References
    ----------
    IEC 60228:2004, Table 1 (class 1), Table 2 (class 2), Table 3 (class 5).
    """
    size = _positive("cross_section_mm2", cross_section_mm2, "mm²")
    row = next((v for s, v in _IEC_60228.items() if math.isclose(s, size)), None)
    if row is None:
        sizes = ", ".join(f"{s:g}" for s in _IEC_60228)
        raise ComputationError(
            f"cross_section_mm2 {size:g} mm² is not a tabulated IEC 60228 size; use one of {sizes}"
        )
    if conductor_class not in (1, 2, 5):
        raise ComputationError(f"conductor_class {conductor_class!r} must be 1, 2 or 5")
    class_12, class_5, status = row
    value = class_5 if conductor_class == 5 else class_12
    table = {1: "Table 1", 2: "Table 2", 5: "Table 3"}[conductor_class]
    return TabulatedResistance(
        resistance_per_length=value / 1000.0,
        tabulated_value=value,
        tabulated_unit="Ω/km",
        conductor_temperature_c=20.0,
        conductor=f"{size:g} mm² class {conductor_class} plain copper",
        standard="IEC 60228",
        clause=f"{table} (maximum resistance at 20 °C)",
        edition="2004",
        status=status,
    )


# --------------------------------------------------------------------------- bonding


@dataclass(frozen=True)
class BondingResistanceEstimate:
    """Expected resistance of a protective bonding conductor and how it was found."""

    resistance: float
    """[Ω]"""
    resistance_per_length: float
    """[Ω/m] at ``conductor_temperature_c``"""
    conductor_temperature_c: float
    basis: str


def expected_bonding_resistance(
    length: float,
    cross_section_mm2: float,
    material: str = "copper",
    conductor_class: int | None = 2,
    conductor_temperature_c: float = 20.0,
    constant: ConductorConstant | None = None,
) -> BondingResistanceEstimate:
    """Resistance expected of a protective bonding conductor of given length and size.

    Parameters
    ----------
    length : float
        Conductor length along the path tested [m].
    cross_section_mm2 : float
        Conductor cross-section [mm²].
    material : str
        ``"copper"`` or ``"aluminium"``.
    conductor_class : int or None
        IEC 60228 class (1, 2 or 5) for a copper cable of a tabulated size: the
        table maximum is used. ``None`` (or aluminium) uses the resistivity.
    conductor_temperature_c : float
        Conductor temperature during the test [°C].
    constant : ConductorConstant, optional
        Temperature constant; by default IEC 60228's (copper 234.5, aluminium 228).

    Returns
    -------
    BondingResistanceEstimate

    Notes
    -----
    R = r20 · L · (k + T)/(k + 20), with r20 from IEC 60228 or ρ/A. IEC 60204-1:2016
    cl. 18.2 asks that the measured resistance lie in the range expected from
    length, cross-section and material; it sets no fixed limit [M].

    References
    ----------
    IEC 60204-1:2016, cl. 18.2 [M]; IEC 60228:2004 Tables 1-3; IEC 60028.
    """
    length = _positive("length", length, "m")
    size = _positive("cross_section_mm2", cross_section_mm2, "mm²")
    temperature = _temperature("conductor_temperature_c", conductor_temperature_c)
    material_name = _material(material)
    if constant is None:
        constant = COPPER_234_5 if material_name == "copper" else ALUMINIUM_228
    if material_name == "copper" and conductor_class is not None:
        row = iec_60228_resistance(size, conductor_class)
        per_length_20 = row.resistance_per_length
        basis = f"{row.describe()}, maximum"
    else:
        resistivity = (
            ANNEALED_COPPER_RESISTIVITY if material_name == "copper" else ALUMINIUM_RESISTIVITY
        )
        per_length_20 = conductor_resistance(1.0, size, resistivity)
        basis = f"resistivity {resistivity.describe()} over {size:g} mm²"
    per_length = resistance_at_temperature(per_length_20, 20.0, temperature, constant)
    if not math.isclose(temperature, 20.0):
        basis += f", corrected to {temperature:g} °C with {constant.describe()}"
    return BondingResistanceEstimate(
        resistance=per_length * length,
        resistance_per_length=per_length,
        conductor_temperature_c=temperature,
        basis=basis,
    )


@dataclass(frozen=True)
class BondingDropLimit:
    """Maximum voltage drop across a protective bonding branch at the test current."""

    max_voltage_drop: float
    """[V]"""
    test_current: float
    """[A]"""
    table_row: str
    standard: str
    clause: str
    edition: str
    status: str

    @property
    def max_resistance(self) -> float:
        """Resistance equivalent to the drop at the test current [Ω]."""
        return self.max_voltage_drop / self.test_current

    def describe(self) -> str:
        return f"ΔU ≤ {self.max_voltage_drop:g} V at {self.test_current:g} A ({self.table_row})"


# IEC 60204-1:2005 Table 9, minimum effective cross-section → max drop at 10 A
# [M, reference values §6]
_IEC_60204_1_TABLE_9 = ((1.0, 3.3), (1.5, 2.6), (2.5, 1.9), (4.0, 1.4))


def iec_60204_1_bonding_voltage_drop(cross_section_mm2: float) -> BondingDropLimit:
    """Maximum voltage drop at 10 A for a protective bonding branch (IEC 60204-1:2005).

    Parameters
    ----------
    cross_section_mm2 : float
        Smallest effective protective conductor cross-section of the branch [mm²].

    Returns
    -------
    BondingDropLimit

    Notes
    -----
    Rows: 1.0 mm² 3.3 V; 1.5 mm² 2.6 V; 2.5 mm² 1.9 V; 4.0 mm² 1.4 V; > 6.0 mm² 1.0 V.
    A size between rows takes the row of the largest tabulated size not above it
    (the branch is at least that size); 6.0 mm² itself is not "> 6.0" and reads
    the 4.0 mm² row. The 2016 edition replaced the table by the expected-value
    rule, see :func:`expected_bonding_resistance`.

    References
    ----------
    IEC 60204-1:2005, cl. 18.2.2, Table 9 [M].
    """
    size = _positive("cross_section_mm2", cross_section_mm2, "mm²")
    if size < 1.0:
        raise ComputationError(
            f"cross_section_mm2 {size:g} mm² is below the smallest row (1.0 mm²) "
            "of IEC 60204-1:2005 Table 9"
        )
    if size > 6.0:
        drop, row = 1.0, "> 6.0 mm²"
    else:
        tabulated, drop = max(r for r in _IEC_60204_1_TABLE_9 if r[0] <= size)
        row = f"{tabulated:.1f} mm²"
    return BondingDropLimit(
        max_voltage_drop=drop,
        test_current=10.0,
        table_row=row,
        standard="IEC 60204-1",
        clause="cl. 18.2.2, Table 9",
        edition="2005",
        status="M",
    )


BONDING_TEST_CURRENT_RANGE = (0.2, 10.0)
"""Test current of the continuity test, IEC 60204-1:2016 cl. 18.2.2: at least 0.2 A,
up to about 10 A, from a PELV (or otherwise separated) source [A] [M]."""


@dataclass(frozen=True)
class BondingTestCurrent:
    """A bonding test current judged against the range the clause gives."""

    test_current: float
    """[A]"""
    within_range: bool
    message: str
    standard: str = "IEC 60204-1"
    clause: str = "cl. 18.2.2"
    edition: str = "2016"
    status: str = "M"

    def describe(self) -> str:
        low, high = BONDING_TEST_CURRENT_RANGE
        return f"{low:g} A ≤ I ≤ {high:g} A ({self.standard}:{self.edition} {self.clause})"


def iec_60204_1_bonding_test_current(test_current: float) -> BondingTestCurrent:
    """Whether a continuity test current is within the range of IEC 60204-1:2016 18.2.2.

    Parameters
    ----------
    test_current : float
        Current the tester drove through the bonding conductor [A].

    Returns
    -------
    BondingTestCurrent

    Notes
    -----
    The clause asks for a current of at least 0.2 A and up to about 10 A, drawn from
    a PELV source; below 0.2 A a single strand or a contact film can carry the test
    and hide a broken conductor. "About 10 A" is read here as at most 10 A: a
    higher current is outside the range as stated, and the tester's own figure
    should be checked against the edition in force.

    References
    ----------
    IEC 60204-1:2016, cl. 18.2.2 (test 1, continuity of the protective bonding
    circuit) [M].
    """
    current = _positive("test_current", test_current, "A")
    low, high = BONDING_TEST_CURRENT_RANGE
    if current < low:
        message = (f"test current {current:g} A is below the {low:g} A that IEC 60204-1:2016 "
                   "cl. 18.2.2 asks for; repeat the test with a low-resistance tester that "
                   "drives at least 0.2 A")
    elif current > high:
        message = (f"test current {current:g} A is above the about {high:g} A that "
                   "IEC 60204-1:2016 cl. 18.2.2 gives; repeat at 0.2 A … 10 A")
    else:
        message = f"test current {current:g} A within {low:g} A … {high:g} A"
    return BondingTestCurrent(current, low <= current <= high, message)
