"""Adapters between checklist rules and the pure computations.

Rules speak in the terms a checklist uses (a material name, a standard name);
the computations take explicit constants. This module translates one into the
other and names the constant used, so the record can say which one it was.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["ConductorConstant", "RiseLimit", "temperature_constant", "resistance_at_temperature",
           "rise_by_resistance", "rise_limit"]


@dataclass(frozen=True)
class ConductorConstant:
    value: float  # k [°C]: the inferred temperature of zero resistance, negated
    material: str
    standard: str

    def describe(self) -> str:
        return f"{self.material}, {self.standard}"


# k per material and standard (REFERENCES §1): copper 235 in IEC 60034-1 / IEC 60076-2 and
# 234.5 in IEC 60228 / IEEE 112; aluminium 225 in IEC 60034-1 / IEEE and 228 in IEC 60228.
_CONSTANTS = {
    ("copper", "IEC 60034-1"): 235.0,
    ("copper", "IEC 60228"): 234.5,
    ("copper", "IEEE 112"): 234.5,
    ("aluminium", "IEC 60034-1"): 225.0,
    ("aluminium", "IEC 60228"): 228.0,
    ("aluminium", "IEEE 112"): 225.0,
}


def temperature_constant(material: str, standard: str) -> ConductorConstant:
    return ConductorConstant(_CONSTANTS[(material, standard)], material, standard)


def resistance_at_temperature(resistance: float, temperature: float, target_temperature: float,
                              material: ConductorConstant) -> float:
    k = material.value
    return resistance * (k + target_temperature) / (k + temperature)


def rise_by_resistance(cold_resistance: float, hot_resistance: float, cold_temperature: float,
                       ambient_temperature: float, material: ConductorConstant) -> float:
    k = material.value
    return ((hot_resistance - cold_resistance) / cold_resistance * (k + cold_temperature)
            + cold_temperature - ambient_temperature)


@dataclass(frozen=True)
class RiseLimit:
    limit: float
    thermal_class: str
    standard: str
    clause: str

    def describe(self) -> str:
        return f"class {self.thermal_class}, {self.standard} {self.clause}"


_LETTER = {"90": "Y", "105": "A", "120": "E", "130": "B", "155": "F", "180": "H", "200": "N",
           "220": "R"}
# Rise by resistance at 40 °C coolant (REFERENCES §2).
_IEC_60034 = {"E": 75.0, "B": 80.0, "F": 105.0, "H": 125.0}
_NEMA = {"A": 60.0, "B": 80.0, "F": 105.0, "H": 125.0}


def rise_limit(thermal_class: str, standard: str) -> RiseLimit:
    letter = _LETTER.get(thermal_class, thermal_class)
    table = _IEC_60034 if standard == "IEC 60034-1" else _NEMA
    if letter not in table:
        raise ValueError(f"{standard} gives no rise limit for thermal class {thermal_class}")
    clause = "Table 8 (rise by resistance, 40 °C coolant)" if standard == "IEC 60034-1" else (
        "Part 12, service factor 1.0, 40 °C ambient")
    return RiseLimit(table[letter], letter, standard, clause)
