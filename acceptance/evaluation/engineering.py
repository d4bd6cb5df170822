"""Adapters between checklist rules and the pure computations.

Rules speak in the terms a checklist uses (a material name, a standard name);
the computations take explicit constants. This module translates one into the
other and returns the computations' own value objects, which name the constant,
the table and the clause, so the record says which one was used.
"""

from __future__ import annotations

import functools

from ..computations import ComputationError, capacitors, duty, resistance, temperature_rise
from ..computations.resistance import ConductorConstant
from ..computations.temperature_rise import RiseLimit

__all__ = ["ConductorConstant", "RiseLimit", "capacitive_reactance", "limit_source",
           "welder_multiplier",
           "resistance_at_temperature", "rise_by_resistance", "rise_limit", "temperature_constant"]


def capacitive_reactance(capacitance: float, frequency: float) -> float:
    """Xc = 1/(2π f C), by :func:`capacitors.capacitive_reactance`."""
    return capacitors.capacitive_reactance(capacitance, frequency)


_WELDER_KINDS = {"arc welder": "nonmotor_generator",
                 "motor-generator arc welder": "motor_generator"}


def welder_multiplier(load_kind: str | None, duty_cycle_percent: float | None
                      ) -> duty.DutyMultiplier | None:
    """NEC Table 630.11(A)'s multiplier for a welder's supply conductor, or None when the
    load is no welder or runs continuously."""
    if load_kind not in _WELDER_KINDS or duty_cycle_percent is None or duty_cycle_percent >= 100:
        return None
    return duty.nec_630_11_multiplier(duty_cycle_percent / 100.0, _WELDER_KINDS[load_kind])


@functools.lru_cache(maxsize=64)
def temperature_constant(material: str, standard: str) -> ConductorConstant:
    """The conductor constant ``k`` that ``standard`` adopts for ``material``."""
    return resistance.conductor_constant(material, standard)


def resistance_at_temperature(resistance_value: float, temperature: float,
                              target_temperature: float, constant: ConductorConstant) -> float:
    """R₂ = R₁ · (k + θ₂) / (k + θ₁), by :func:`resistance.resistance_at_temperature`."""
    return resistance.resistance_at_temperature(
        resistance_value, measured_temperature_c=temperature,
        target_temperature_c=target_temperature, constant=constant)


def rise_by_resistance(cold_resistance: float, hot_resistance: float, cold_temperature: float,
                       ambient_temperature: float, constant: ConductorConstant) -> float:
    """Δθ by the resistance method, by :func:`temperature_rise.temperature_rise_by_resistance`."""
    return temperature_rise.temperature_rise_by_resistance(
        cold_resistance, hot_resistance, cold_temperature_c=cold_temperature,
        coolant_temperature_c=ambient_temperature, constant=constant)


def rise_limit(thermal_class: str, standard: str, kind: str = "rotating_machine",
               small_or_encapsulated: bool = False,
               hot_spot_allowance: float | None = None) -> RiseLimit:
    """The rise limit by resistance at 40 °C coolant, by the kind of winding and standard.

    IEC 60034-1 and NEMA MG 1 cover rotating machines only; a transformer takes
    IEC 60076-11, a d.c. magnet coil its class less the coolant and its hot-spot
    allowance."""
    if kind == "transformer":
        return temperature_rise.transformer_rise_limit(thermal_class)
    if kind == "dc_coil":
        if hot_spot_allowance is None:
            raise ComputationError(
                "a d.c. coil is outside IEC 60034-1, which covers rotating machines; give "
                "the coil's hot_spot_allowance or the manufacturer's rise_limit in machine.yaml")
        return temperature_rise.coil_rise_limit(thermal_class, hot_spot_allowance)
    if standard == "NEMA MG 1":
        return temperature_rise.nema_mg_1_rise_limit(thermal_class)
    return temperature_rise.iec_60034_1_rise_limit(
        thermal_class, small_or_encapsulated=small_or_encapsulated)


def limit_source(limit: RiseLimit) -> str:
    """E.g. ``class 155 (F), IEC 60034-1:2010 cl. 8.3, Table 7 (resistance method) [S]``."""
    text = (f"class {limit.thermal_class.describe()}, {limit.standard}:{limit.edition} "
            f"{limit.clause} [{limit.status}]")
    return f"{text} — {limit.note}" if limit.note else text
