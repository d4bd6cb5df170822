"""Protective conductor cross-section: by table from the line conductors, or by its fault.

Cross-sections are in mm², as the standards give them; parameter names that
end in ``_mm2`` say so.

Sources
-------
- IEC 60204-1:2016, 5.2, Table 1: minimum cross-section of the external
  protective copper conductor from that of the line conductors: S for
  S ≤ 16 mm², 16 mm² for 16 < S ≤ 35 mm², S/2 above 35 mm² [M]. IEC 60364-5-54:2011
  Table 54.2 gives the same values for a protective conductor of the line
  conductors' material [M].
- IEC 60364-5-54:2011, 543.1.2: S = √(I²t)/k for a disconnection time up to 5 s
  [M]; Annex A: k = √(Qc(β + 20)/ρ20 · ln(1 + (θf − θi)/(β + θi))) with the
  material constants of Table A.54.1 (copper: β 234.5 °C, Qc 3.45 J/(°C·cm³),
  ρ20 17.241 µΩ·mm) [M]; the tabulated copper k of 115, 143 and 176 are
  checked in the tests against that formula [M].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ._checks import positive as _positive
from ._checks import temperature as _temperature
from ._errors import ComputationError

__all__ = [
    "MATERIALS",
    "AdiabaticMaterial",
    "adiabatic_k",
    "adiabatic_minimum_cross_section",
    "iec_60204_1_protective_conductor_minimum",
]


@dataclass(frozen=True)
class AdiabaticMaterial:
    """Constants of a conductor material for the adiabatic k (IEC 60364-5-54 Table A.54.1)."""

    name: str
    beta_c: float
    """Reciprocal of the temperature coefficient of resistivity at 0 °C [°C]"""
    volumetric_heat_capacity: float
    """Qc [J/(°C·mm³)]"""
    resistivity_20c: float
    """ρ20 [Ω·mm]"""

    @property
    def constant(self) -> float:
        """√(Qc(β + 20)/ρ20) [A·s^½/mm²]; about 226 for copper."""
        return math.sqrt(
            self.volumetric_heat_capacity * (self.beta_c + 20.0) / self.resistivity_20c
        )


# IEC 60364-5-54:2011 Table A.54.1 [M, reference values §6]
MATERIALS = {
    "copper": AdiabaticMaterial("copper", 234.5, 3.45e-3, 17.241e-6),
    "aluminium": AdiabaticMaterial("aluminium", 228.0, 2.5e-3, 28.264e-6),
    "steel": AdiabaticMaterial("steel", 202.0, 3.8e-3, 138e-6),
}


def iec_60204_1_protective_conductor_minimum(line_cross_section_mm2: float) -> float:
    """Minimum cross-section of the external protective copper conductor of a machine.

    Parameters
    ----------
    line_cross_section_mm2 : float
        Cross-section of the copper line conductors supplying the machine [mm²].

    Returns
    -------
    float
        S for S ≤ 16 mm²; 16 mm² up to 35 mm²; S/2 above [mm²].

    Notes
    -----
    Where the table gives a size that is not a standard one, the next larger
    standard size is used; the caller rounds, this function does not.

    References
    ----------
    IEC 60204-1:2016, 5.2, Table 1 [M]; IEC 60364-5-54:2011, Table 54.2 [M].
    """
    line = _positive("line_cross_section_mm2", line_cross_section_mm2, "mm²")
    if line <= 16.0:
        return line
    if line <= 35.0:
        return 16.0
    return line / 2.0


def _material(material: str) -> AdiabaticMaterial:
    key = str(material).strip().lower().replace("aluminum", "aluminium")
    if key not in MATERIALS:
        raise ComputationError(
            f"material {material!r} has no encoded constants; use {', '.join(MATERIALS)}"
        )
    return MATERIALS[key]


def adiabatic_k(
    initial_temperature_c: float, final_temperature_c: float, material: str = "copper"
) -> float:
    """Factor k of the adiabatic equation from the conductor's initial and final temperature.

    Parameters
    ----------
    initial_temperature_c : float
        Conductor temperature when the fault begins θi [°C]: 70 for a core of a
        thermoplastic (PVC) cable in service, 30 for a separate conductor.
    final_temperature_c : float
        Highest temperature the insulation allows in a fault θf [°C]: 160 for
        PVC up to 300 mm², 250 for XLPE or EPR.
    material : str
        ``"copper"``, ``"aluminium"`` or ``"steel"``.

    Returns
    -------
    float
        k [A·s^½/mm²].

    Notes
    -----
    k = √(Qc(β + 20)/ρ20 · ln(1 + (θf − θi)/(β + θi))).

    References
    ----------
    IEC 60364-5-54:2011, Annex A, formula and Table A.54.1 [M].
    """
    initial = _temperature("initial_temperature_c", initial_temperature_c)
    final = _temperature("final_temperature_c", final_temperature_c)
    if final <= initial:
        raise ComputationError(
            f"final_temperature_c {final:g} °C must be above initial_temperature_c {initial:g} °C"
        )
    constants = _material(material)
    rise = math.log(1.0 + (final - initial) / (constants.beta_c + initial))
    return constants.constant * math.sqrt(rise)


def adiabatic_minimum_cross_section(
    fault_current: float, disconnection_time: float, k: float
) -> float:
    """Smallest conductor cross-section that carries a fault until the device disconnects it.

    Parameters
    ----------
    fault_current : float
        Prospective fault current I through the conductor, r.m.s. [A].
    disconnection_time : float
        Operating time of the protective device at that current, up to 5 s [s].
    k : float
        Factor of the conductor and its insulation (:func:`adiabatic_k`) [A·s^½/mm²].

    Returns
    -------
    float
        S = √(I²t)/k [mm²].

    Notes
    -----
    The equation assumes no heat leaves the conductor during the fault, which
    holds for times up to about 5 s. Example: 1000 A for 0.1 s through a PVC
    cable core (k = 115) needs √(10⁵)/115 = 2.75 mm².

    References
    ----------
    IEC 60364-5-54:2011, 543.1.2 [M]; IEC 60364-4-43, 434.5.2 (the same form for
    line conductors) [M].
    """
    current = _positive("fault_current", fault_current, "A")
    time = _positive("disconnection_time", disconnection_time, "s")
    factor = _positive("k", k, "A·s^½/mm²")
    if time > 5.0:
        raise ComputationError(
            f"disconnection_time {time:g} s is above 5 s: the adiabatic equation of "
            "IEC 60364-5-54 543.1.2 applies up to 5 s"
        )
    return math.sqrt(current * current * time) / factor
