"""Winding temperature rise by the resistance method, thermal classes and rise limits.

The resistance method gives the average temperature of a winding from its
resistance cold (at a known temperature) and hot (at the end of a heat run).
The rise is that temperature less the coolant temperature.

Sources
-------
One edition of IEC 60034-1 throughout, with its own clause and table numbers:

- IEC 60034-1:2010, cl. 8.6.2 (resistance method; k = 235 copper, 225
  aluminium) [M]; cl. 8.3, Table 7 (limits of temperature rise of windings
  indirectly cooled by air, 40 °C coolant; the table holds thermal classes
  130 (B), 155 (F) and 180 (H) only; items 1d and 1e, a.c. windings of
  machines below 600 W and of self-cooled machines without a fan (IC 40)
  and/or with encapsulated windings, allow 5 K more) [M]; Table 10 (adjustment
  for a coolant above 40 °C) [M]. Its limits apply to rotating machines only.
- IEC 60076-2, cl. 7 (same form of the resistance method for transformers).
- IEC 60076-11:2018 (dry-type transformers), limits of average winding
  temperature rise by thermal class: 105 (A) 60 K, 120 (E) 75 K, 130 (B) 80 K,
  155 (F) 100 K, 180 (H) 125 K, 200 (N) 135 K, 220 (R) 150 K [M; table number
  not recalled, confirm against the edition in force].
- IEC 60085:2007, cl. 5, Table 1 (thermal classes and letters; the class is the
  highest temperature the insulation system is rated for). A d.c. magnet coil has
  no rise table of its own here: its limit is the class temperature less the
  40 °C reference coolant and the allowance for its hot spot above the average
  the resistance method gives, or the manufacturer's figure [P].
- NEMA MG 1, Part 12, 12.43 (temperature rise of medium motors, service factor
  1.0 and 1.15; values S, clause number M).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ._checks import positive as _positive
from ._checks import temperature as _temperature
from ._errors import ComputationError
from .resistance import ConductorConstant

__all__ = [
    "THERMAL_CLASSES",
    "RiseLimit",
    "ThermalClass",
    "coil_rise_limit",
    "iec_60034_1_rise_limit",
    "nema_mg_1_rise_limit",
    "temperature_rise_by_resistance",
    "thermal_class",
    "transformer_rise_limit",
    "winding_temperature_by_resistance",
]





def _k(constant: ConductorConstant | float) -> float:
    if isinstance(constant, ConductorConstant):
        return constant.temperature_constant
    return _positive("constant", constant, "°C")


def winding_temperature_by_resistance(
    cold_resistance: float,
    hot_resistance: float,
    cold_temperature_c: float,
    constant: ConductorConstant | float,
) -> float:
    """Average winding temperature from its hot and cold resistance.

    Parameters
    ----------
    cold_resistance : float
        Winding resistance at ``cold_temperature_c`` [Ω].
    hot_resistance : float
        Winding resistance at the end of the test, extrapolated to shutdown [Ω].
    cold_temperature_c : float
        Winding temperature when ``cold_resistance`` was measured [°C].
    constant : ConductorConstant or float
        Temperature constant ``k`` of the winding material [°C].

    Returns
    -------
    float
        Average winding temperature when ``hot_resistance`` was measured [°C].

    Notes
    -----
    θ2 = R2/R1 · (k + θ1) − k.

    References
    ----------
    IEC 60034-1, cl. 8.6.2; IEC 60076-2, cl. 7.
    """
    cold = _positive("cold_resistance", cold_resistance, "Ω")
    hot = _positive("hot_resistance", hot_resistance, "Ω")
    theta_1 = _temperature("cold_temperature_c", cold_temperature_c)
    k = _k(constant)
    if theta_1 <= -k:
        raise ComputationError(
            f"cold_temperature_c {theta_1:g} °C is at or below -k ({-k:g} °C), "
            "where the linear resistance model does not hold"
        )
    return hot / cold * (k + theta_1) - k


def temperature_rise_by_resistance(
    cold_resistance: float,
    hot_resistance: float,
    cold_temperature_c: float,
    coolant_temperature_c: float,
    constant: ConductorConstant | float,
) -> float:
    """Temperature rise of a winding by the resistance method.

    Parameters
    ----------
    cold_resistance : float
        Winding resistance at ``cold_temperature_c`` [Ω].
    hot_resistance : float
        Winding resistance at the end of the test [Ω].
    cold_temperature_c : float
        Winding temperature when ``cold_resistance`` was measured [°C].
    coolant_temperature_c : float
        Coolant (ambient air) temperature at the end of the test [°C].
    constant : ConductorConstant or float
        Temperature constant ``k`` of the winding material [°C].

    Returns
    -------
    float
        Temperature rise over the coolant [K].

    Notes
    -----
    Δθ = (R2 − R1)/R1 · (k + θ1) + θ1 − θa.

    References
    ----------
    IEC 60034-1, cl. 8.6.2; IEC 60076-2, cl. 7.
    """
    theta_a = _temperature("coolant_temperature_c", coolant_temperature_c)
    return (
        winding_temperature_by_resistance(
            cold_resistance, hot_resistance, cold_temperature_c, constant
        )
        - theta_a
    )


# --------------------------------------------------------------------------- classes


@dataclass(frozen=True, order=True)
class ThermalClass:
    """An IEC 60085 thermal class: its temperature and its letter, if it has one."""

    temperature_c: int
    """[°C]"""
    letter: str | None

    def describe(self) -> str:
        """``155 (F)``, or ``250`` for a class with no letter."""
        return f"{self.temperature_c} ({self.letter})" if self.letter else str(self.temperature_c)

    def __str__(self) -> str:
        return self.describe()


# IEC 60085:2007 Table 1 [S, reference values §2]
THERMAL_CLASSES: tuple[ThermalClass, ...] = (
    ThermalClass(90, "Y"),
    ThermalClass(105, "A"),
    ThermalClass(120, "E"),
    ThermalClass(130, "B"),
    ThermalClass(155, "F"),
    ThermalClass(180, "H"),
    ThermalClass(200, "N"),
    ThermalClass(220, "R"),
    ThermalClass(250, None),
)


def thermal_class(designation: str | int | ThermalClass) -> ThermalClass:
    """Look up a thermal class by number or letter.

    Parameters
    ----------
    designation : str, int or ThermalClass
        ``155``, ``"155"``, ``"F"``, ``"155 (F)"`` or ``"class F"``.

    Returns
    -------
    ThermalClass

    References
    ----------
    IEC 60085:2007, Table 1.
    """
    if isinstance(designation, ThermalClass):
        return designation
    text = str(designation).strip().upper().removeprefix("CLASS").strip()
    number, _, rest = text.partition("(")
    number = number.strip()
    letter = rest.rstrip(")").strip() or None
    for candidate in THERMAL_CLASSES:
        if number == str(candidate.temperature_c) and letter in (None, candidate.letter):
            return candidate
        if not rest and candidate.letter is not None and number == candidate.letter:
            return candidate
    known = ", ".join(c.describe() for c in THERMAL_CLASSES)
    raise ComputationError(
        f"thermal_class {designation!r} is not an IEC 60085 thermal class; use one of {known}"
    )


# --------------------------------------------------------------------------- limits


@dataclass(frozen=True)
class RiseLimit:
    """A temperature-rise limit with the standard, clause and edition it comes from."""

    limit: float
    """Maximum rise over the coolant [K]."""
    thermal_class: ThermalClass
    coolant_temperature_c: float
    """Coolant temperature the limit applies to [°C]."""
    method: str
    standard: str
    clause: str
    edition: str
    status: str
    note: str = ""

    def describe(self) -> str:
        """E.g. ``Δθ ≤ 105 K (class 155 (F), IEC 60034-1:2010 cl. 8.3, Table 7 …)``."""
        return (
            f"Δθ ≤ {self.limit:g} K (class {self.thermal_class.describe()}, "
            f"{self.standard}:{self.edition} {self.clause})"
        )


# IEC 60034-1:2010 Table 7, resistance method, 40 °C coolant [K] [M] (reference values §2):
# items 1a–1c and the other windings of the table; items 1d/1e (below 600 W; IC 40 or
# encapsulated) 5 K more. The table holds no class 105 (A) or 120 (E) column.
_IEC_60034_1_RISE = {"B": 80.0, "F": 105.0, "H": 125.0}
_IEC_60034_1_SMALL_OR_ENCAPSULATED = 5.0

# IEC 60076-11:2018, average winding rise of dry-type transformers [K] [M]
_IEC_60076_11_RISE = {105: 60.0, 120: 75.0, 130: 80.0, 155: 100.0, 180: 125.0,
                      200: 135.0, 220: 150.0}

# NEMA MG 1 12.43 at 40 °C [K] (reference values §2, S); SF 1.15 has no class H row.
_NEMA_MG_1_RISE = {
    "1.0": {"A": 60.0, "B": 80.0, "F": 105.0, "H": 125.0},
    "1.15": {"A": 70.0, "B": 90.0, "F": 115.0},
}


def iec_60034_1_rise_limit(
    designation: str | int | ThermalClass, coolant_temperature_c: float = 40.0,
    small_or_encapsulated: bool = False,
) -> RiseLimit:
    """IEC 60034-1 limit of winding temperature rise by resistance, air-cooled rotating machine.

    Parameters
    ----------
    designation : str, int or ThermalClass
        Thermal class of the insulation system: 130 (B), 155 (F) or 180 (H).
    coolant_temperature_c : float
        Maximum coolant temperature at the operating site, 0 … 60 °C [°C].
    small_or_encapsulated : bool
        ``True`` for Table 7 items 1d and 1e: a.c. windings of machines rated below
        600 W, or of self-cooled machines without a fan (IC 40) and/or with
        encapsulated windings.

    Returns
    -------
    RiseLimit

    Notes
    -----
    Table 7: B 80 K, F 105 K, H 125 K; items 1d/1e 85, 110, 130 K. At a coolant of
    40 °C or below (down to 0 °C) the Table 7 value applies. Between 40 °C and
    60 °C the limit is reduced by the excess of the coolant over 40 °C (Table 10).
    Above 60 °C, below 0 °C, or above 1000 m altitude the limit is by agreement
    and is not computed here. The table holds no other thermal class: a winding of
    class 105 (A) or 120 (E) needs the manufacturer's limit. For rotating machines
    only: a transformer or a d.c. magnet coil has its own basis.

    References
    ----------
    IEC 60034-1:2010, cl. 8.3, Table 7 (resistance method) and Table 10 [M].
    """
    klass = thermal_class(designation)
    coolant = _temperature("coolant_temperature_c", coolant_temperature_c)
    if klass.letter not in _IEC_60034_1_RISE:
        raise ComputationError(
            f"thermal_class {klass.describe()} is not in IEC 60034-1:2010 Table 7, which "
            "holds 130 (B), 155 (F) and 180 (H) only"
        )
    if not 0.0 <= coolant <= 60.0:
        raise ComputationError(
            f"coolant_temperature_c {coolant:g} °C is outside 0 … 60 °C; "
            "IEC 60034-1 leaves the limit to agreement there"
        )
    base = _IEC_60034_1_RISE[klass.letter]
    clause = "cl. 8.3, Table 7 (resistance method"
    notes = []
    if small_or_encapsulated:
        base += _IEC_60034_1_SMALL_OR_ENCAPSULATED
        clause += ", items 1d/1e"
        notes.append("below 600 W, or IC 40 / encapsulated: 5 K above items 1a–1c")
    clause += ")"
    reduction = max(0.0, coolant - 40.0)
    if reduction:
        clause += " and Table 10"
        notes.append(f"reduced by {reduction:g} K for a coolant of {coolant:g} °C")
    return RiseLimit(
        limit=base - reduction,
        thermal_class=klass,
        coolant_temperature_c=max(coolant, 40.0),
        method="resistance",
        standard="IEC 60034-1",
        clause=clause,
        edition="2010",
        # the values B, F, H are published figures (reference values §2); items 1d/1e and
        # the Table 10 adjustment are from memory
        status="M" if notes else "S",
        note="; ".join(notes),
    )


def transformer_rise_limit(designation: str | int | ThermalClass) -> RiseLimit:
    """Average winding temperature-rise limit of a dry-type transformer (IEC 60076-11).

    Parameters
    ----------
    designation : str, int or ThermalClass
        Thermal class of the winding's insulation system.

    Returns
    -------
    RiseLimit

    Notes
    -----
    105 (A) 60 K, 120 (E) 75 K, 130 (B) 80 K, 155 (F) 100 K, 180 (H) 125 K,
    200 (N) 135 K, 220 (R) 150 K, by resistance at a 40 °C ambient.

    References
    ----------
    IEC 60076-11:2018, winding temperature-rise limits [M; table number not
    recalled, confirm against the edition in force].
    """
    klass = thermal_class(designation)
    if klass.temperature_c not in _IEC_60076_11_RISE:
        raise ComputationError(
            f"thermal_class {klass.describe()} has no IEC 60076-11 rise limit here; "
            "encoded: 105 … 220"
        )
    return RiseLimit(
        limit=_IEC_60076_11_RISE[klass.temperature_c],
        thermal_class=klass,
        coolant_temperature_c=40.0,
        method="resistance",
        standard="IEC 60076-11",
        clause="winding temperature-rise limits (table number to be confirmed)",
        edition="2018",
        status="M",
        note="dry-type transformer, average winding rise",
    )


def coil_rise_limit(
    designation: str | int | ThermalClass, hot_spot_allowance: float,
    reference_coolant_c: float = 40.0,
) -> RiseLimit:
    """Rise limit of a d.c. magnet coil from its thermal class and hot-spot allowance.

    Parameters
    ----------
    designation : str, int or ThermalClass
        Thermal class of the coil's insulation system.
    hot_spot_allowance : float
        How far the hottest spot runs above the average the resistance method
        measures; from the coil's manufacturer [K].
    reference_coolant_c : float
        Coolant (ambient) temperature the limit is stated for [°C].

    Returns
    -------
    RiseLimit

    Notes
    -----
    Δθ_max = θ_class − θ_coolant − Δθ_hot-spot. Class 155 (F), 40 °C and a 15 K
    allowance give 100 K.

    References
    ----------
    IEC 60085:2007, Table 1 (the class temperature) [S]; the subtraction of the
    coolant and the hot-spot allowance is common practice [P].
    """
    klass = thermal_class(designation)
    allowance = _positive("hot_spot_allowance", hot_spot_allowance, "K")
    coolant = _temperature("reference_coolant_c", reference_coolant_c)
    limit = klass.temperature_c - coolant - allowance
    if limit <= 0:
        raise ComputationError(
            f"class {klass.describe()} less {coolant:g} °C and a {allowance:g} K hot-spot "
            "allowance leaves no rise"
        )
    return RiseLimit(
        limit=limit,
        thermal_class=klass,
        coolant_temperature_c=coolant,
        method="resistance",
        standard="IEC 60085",
        clause="Table 1 (class temperature)",
        edition="2007",
        status="P",
        note=(f"d.c. coil: {klass.temperature_c} °C − {coolant:g} °C coolant − "
              f"{allowance:g} K hot-spot allowance (manufacturer)"),
    )


def nema_mg_1_rise_limit(
    designation: str | int | ThermalClass, service_factor: float = 1.0
) -> RiseLimit:
    """NEMA MG 1 limit of winding temperature rise by resistance, 40 °C ambient.

    Parameters
    ----------
    designation : str, int or ThermalClass
        Insulation class, e.g. ``"B"`` or ``130``.
    service_factor : float
        Nameplate service factor: 1.0, or 1.15 and above [unitless].

    Returns
    -------
    RiseLimit

    Notes
    -----
    Service factor 1.0: A 60, B 80, F 105, H 125 K; 1.15 or higher: A 70, B 90,
    F 115 K. The reduction for an ambient above 40 °C is not encoded: take it
    from the edition of MG 1 in force and enter it as an override.

    References
    ----------
    NEMA MG 1, Part 12, 12.43 (medium motors) [values S, clause M].
    """
    klass = thermal_class(designation)
    service_factor = _positive("service_factor", service_factor, "")
    if math.isclose(service_factor, 1.0):
        row = "1.0"
    elif service_factor >= 1.15 - 1e-9:
        row = "1.15"
    else:
        raise ComputationError(
            f"service_factor {service_factor:g} is not tabulated; "
            "NEMA MG 1 gives rows for 1.0 and for 1.15 or higher"
        )
    limits = _NEMA_MG_1_RISE[row]
    if klass.letter not in limits:
        raise ComputationError(
            f"thermal_class {klass.describe()} has no NEMA MG 1 rise limit for service "
            f"factor {row}; tabulated classes: {', '.join(limits)}"
        )
    return RiseLimit(
        limit=limits[klass.letter],
        thermal_class=klass,
        coolant_temperature_c=40.0,
        method="resistance",
        standard="NEMA MG 1",
        clause=f"Part 12, 12.43 (service factor {row})",
        edition="2016",
        status="S",
        note="" if row == "1.0" else "row for a service factor of 1.15 or higher",
    )
