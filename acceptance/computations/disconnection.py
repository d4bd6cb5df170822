"""Automatic disconnection of supply: loop impedance against U0/Ia, times, fault current.

The operating current Ia of the protective device comes from
:mod:`.protective_device`.

Sources
-------
- IEC 60364-4-41:2005, 411.4.4 (TN systems: Zs × Ia ≤ U0), 411.3.2.2 and
  Table 41.1 (maximum disconnection times of final circuits not exceeding 32 A),
  411.3.2.3 (TN: 5 s for distribution circuits and the other circuits),
  411.3.2.4 (TT: 1 s) [M]. Amendment 1 (2017) is recalled to widen Table 41.1 to
  final circuits up to 63 A with socket-outlets; that scope is not encoded, and
  which text is in force locally must be confirmed [M].
- IEC 60204-1:2016, Annex A: protection by automatic disconnection of a machine's
  circuits in TN systems, with the same times and the 2/3 allowance for a loop
  measured cold [M].
- IEC 60364-6:2016, Annex C (informative): a loop impedance measured at ambient
  temperature must satisfy Zs(m) ≤ 2/3 × U0/Ia [M].
- BS 7671:2018 Appendix 3: measured Zs not above 0.8 of the tabulated maximum
  (a national rule of thumb) [P]; its minimum voltage factor Cmin = 0.95 [M].
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

from ._checks import finite as _finite
from ._checks import non_negative as _non_negative
from ._checks import positive as _positive
from ._errors import ComputationError

__all__ = [
    "ColdMeasurementAllowance",
    "DisconnectionTime",
    "LoopImpedanceCheck",
    "cold_measurement_factor",
    "iec_60364_4_41_disconnection_time",
    "loop_impedance_check",
    "loop_impedance_from_parts",
    "maximum_loop_impedance",
    "prospective_fault_current",
]


def _three_figures(value: float) -> str:
    """Three significant figures without an exponent: 0.958, 1.09, 1667."""
    decimals = max(0, 2 - math.floor(math.log10(abs(value)))) if value else 0
    return f"{value:.{decimals}f}"


# --------------------------------------------------------------------------- loop impedance


class ColdMeasurementAllowance(StrEnum):
    """How a loop impedance measured cold is compared with U0/Ia."""

    TWO_THIRDS = "two_thirds"
    """Zs(m) ≤ 2/3 × U0/Ia: IEC 60364-6:2016 Annex C; IEC 60204-1:2016 Annex A [M]."""
    RULE_OF_THUMB_0_8 = "rule_of_thumb_0_8"
    """Zs(m) ≤ 0.8 × the maximum: BS 7671:2018 Appendix 3, a national rule of thumb [P]."""
    NONE = "none"
    """Zs ≤ U0/Ia: the value is at operating temperature or was corrected by calculation."""


@dataclass(frozen=True)
class _Allowance:
    factor: float
    label: str
    source: str
    status: str


_ALLOWANCES = {
    ColdMeasurementAllowance.TWO_THIRDS: _Allowance(
        2.0 / 3.0, "2/3", "IEC 60364-6:2016 Annex C; IEC 60204-1:2016 Annex A", "M"
    ),
    ColdMeasurementAllowance.RULE_OF_THUMB_0_8: _Allowance(
        0.8, "0.8", "BS 7671:2018 Appendix 3 (rule of thumb)", "P"
    ),
    ColdMeasurementAllowance.NONE: _Allowance(
        1.0, "1", "IEC 60364-4-41:2005 411.4.4 (no allowance: value at operating temperature)",
        "M",
    ),
}


def _allowance(allowance: ColdMeasurementAllowance | str) -> _Allowance:
    try:
        return _ALLOWANCES[ColdMeasurementAllowance(allowance)]
    except ValueError:
        allowed = ", ".join(a.value for a in ColdMeasurementAllowance)
        raise ComputationError(
            f"allowance {allowance!r} is not a known cold-measurement allowance; use {allowed}"
        ) from None


def cold_measurement_factor(allowance: ColdMeasurementAllowance | str) -> float:
    """Factor applied to U0/Ia for a loop impedance measured with the conductors cold.

    Parameters
    ----------
    allowance : ColdMeasurementAllowance or str
        ``"two_thirds"``, ``"rule_of_thumb_0_8"`` or ``"none"``.

    Returns
    -------
    float
        2/3, 0.8 or 1 [unitless].

    Notes
    -----
    A fault heats the conductors, and their resistance rises with them, so a loop
    measured at ambient temperature with a small test current is compared with a
    reduced limit. For copper, R(20 °C)/R(θ) = (234.5 + 20)/(234.5 + θ) is 0.836 at
    the 70 °C of a thermoplastic-insulated conductor in service and 0.645 at the
    160 °C it may reach in a fault, which is where the two factors sit [P]. The
    0.8 is a national guidance's rule of thumb on its own tabulated maxima (which
    already carry Cmin 0.95); local codes govern which one applies.

    Editions: the 2/3 is recalled from IEC 60364-6:2016 Annex C, an informative
    annex, and from IEC 60204-1:2016 Annex A; the 0.8 from BS 7671:2018 Appendix 3.
    Later amendments of either have not been compared, so the record names the
    allowance and its source, and the user confirms which text is in force.

    References
    ----------
    IEC 60364-6:2016, Annex C (informative) [M]; IEC 60204-1:2016, Annex A [M];
    BS 7671:2018, Appendix 3 [P].
    """
    return _allowance(allowance).factor


def maximum_loop_impedance(
    nominal_voltage_to_earth: float,
    operating_current: float,
    allowance: ColdMeasurementAllowance | str = ColdMeasurementAllowance.TWO_THIRDS,
    voltage_factor: float = 1.0,
) -> float:
    """Largest earth-fault loop impedance that still disconnects in time.

    Parameters
    ----------
    nominal_voltage_to_earth : float
        Nominal a.c. r.m.s. line voltage to earth U0 [V].
    operating_current : float
        Current Ia that operates the device within the required time [A].
    allowance : ColdMeasurementAllowance or str
        Allowance for a measurement taken cold; see :func:`cold_measurement_factor`.
    voltage_factor : float
        Minimum voltage factor Cmin where the local rule applies one (0.95 in
        BS 7671:2018 411.4.4 [M]); 1 for IEC 60364-4-41:2005, which has none
        [unitless].

    Returns
    -------
    float
        Zmax = factor × Cmin × U0 / Ia [Ω].

    Notes
    -----
    From Zs × Ia ≤ U0 (411.4.4). Example: a C-type 16 A breaker at U0 = 230 V
    gives Ia = 160 A, U0/Ia = 1.4375 Ω, and 0.958 Ω for a cold measurement.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4 [M]; IEC 60364-6:2016, Annex C [M].
    """
    voltage = _positive("nominal_voltage_to_earth", nominal_voltage_to_earth, "V")
    current = _positive("operating_current", operating_current, "A")
    factor = _allowance(allowance).factor
    cmin = _finite("voltage_factor", voltage_factor, "")
    if not 0.0 < cmin <= 1.0:
        raise ComputationError(f"voltage_factor {cmin:g} must be in 0 < Cmin ≤ 1")
    return factor * cmin * voltage / current


def loop_impedance_from_parts(external_loop_impedance: float, r1_plus_r2: float) -> float:
    """Earth-fault loop impedance from the external part and the circuit's conductors.

    Parameters
    ----------
    external_loop_impedance : float
        Ze, the part of the loop outside the installation, at its origin [Ω].
    r1_plus_r2 : float
        Resistance of the line conductor plus the protective conductor from the
        origin to the point, measured end to end [Ω].

    Returns
    -------
    float
        Zs = Ze + (R1 + R2) [Ω].

    Notes
    -----
    Adding a resistance to an impedance arithmetically over-states Zs slightly
    (the loop's reactance is small at these sections), which errs on the safe side.

    References
    ----------
    IEC 60364-6:2016, 6.4.3.7 (fault-loop impedance by measurement or calculation)
    [clause M]; common practice [P].
    """
    external = _positive("external_loop_impedance", external_loop_impedance, "Ω")
    conductors = _non_negative("r1_plus_r2", r1_plus_r2, "Ω")
    return external + conductors


def prospective_fault_current(nominal_voltage_to_earth: float, loop_impedance: float) -> float:
    """Prospective earth-fault current at a point, from U0 and the loop impedance there.

    Parameters
    ----------
    nominal_voltage_to_earth : float
        U0 [V].
    loop_impedance : float
        Zs at the point [Ω].

    Returns
    -------
    float
        Ipf = U0 / Zs [A].

    Notes
    -----
    This is the line-to-earth fault current. At the origin the line-to-line or
    three-phase fault can be larger: with line and neutral of equal impedance Z,
    the three-phase current U0/Z is twice the line-to-neutral U0/(2Z), which is
    where the trade's "double it" comes from [P].

    References
    ----------
    Ohm's law on the fault loop [P]; IEC 60364-4-43 (breaking capacity not below
    the prospective fault current) [M].
    """
    voltage = _positive("nominal_voltage_to_earth", nominal_voltage_to_earth, "V")
    impedance = _positive("loop_impedance", loop_impedance, "Ω")
    return voltage / impedance


@dataclass(frozen=True)
class LoopImpedanceCheck:
    """The disconnection condition Zs × Ia ≤ U0 for one measured loop."""

    loop_impedance: float
    """Zs as measured [Ω]"""
    maximum_impedance: float
    """Limit for the measured value, allowance included [Ω]"""
    nominal_voltage_to_earth: float
    """U0 [V]"""
    operating_current: float
    """Ia [A]"""
    allowance: str
    """:class:`ColdMeasurementAllowance` value"""
    allowance_factor: float
    """[unitless]"""
    allowance_source: str
    allowance_status: str
    voltage_factor: float
    """Cmin [unitless]"""
    passes: bool
    margin: float
    """(Zmax − Zs) / Zmax; negative when the loop is too high [unitless]"""
    prospective_fault_current: float
    """U0 / Zs [A]"""
    formula: str
    standard: str = "IEC 60364-4-41"
    clause: str = "411.4.4"
    edition: str = "2005"
    status: str = "M"

    def describe(self) -> str:
        """E.g. ``Zs ≤ 2/3 × 230 V / 160 A = 0.958 Ω``."""
        return f"Zs ≤ {self.formula} = {_three_figures(self.maximum_impedance)} Ω"


def loop_impedance_check(
    loop_impedance: float,
    nominal_voltage_to_earth: float,
    operating_current: float,
    allowance: ColdMeasurementAllowance | str = ColdMeasurementAllowance.TWO_THIRDS,
    voltage_factor: float = 1.0,
) -> LoopImpedanceCheck:
    """Check a measured earth-fault loop impedance against the disconnection condition.

    Parameters
    ----------
    loop_impedance : float
        Zs measured line to protective conductor at the point [Ω].
    nominal_voltage_to_earth : float
        U0 [V].
    operating_current : float
        Ia of the device for the required time, from
        :mod:`.protective_device` [A].
    allowance : ColdMeasurementAllowance or str
        Allowance for a cold measurement, ``"two_thirds"`` by default.
    voltage_factor : float
        Cmin where the local rule applies one; 1 otherwise [unitless].

    Returns
    -------
    LoopImpedanceCheck
        Passes when Zs ≤ Zmax (at the limit exactly it passes).

    Notes
    -----
    Zmax = factor × Cmin × U0 / Ia; margin = (Zmax − Zs) / Zmax;
    Ipf = U0 / Zs.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4 [M]; IEC 60364-6:2016, Annex C [M];
    IEC 60204-1:2016, Annex A [M].
    """
    measured = _positive("loop_impedance", loop_impedance, "Ω")
    basis = _allowance(allowance)
    limit = maximum_loop_impedance(
        nominal_voltage_to_earth, operating_current, allowance, voltage_factor
    )
    voltage = float(nominal_voltage_to_earth)
    current = float(operating_current)
    factors = "" if basis.factor == 1.0 else f"{basis.label} × "
    if voltage_factor != 1.0:
        factors += f"{voltage_factor:g} × "
    return LoopImpedanceCheck(
        loop_impedance=measured,
        maximum_impedance=limit,
        nominal_voltage_to_earth=voltage,
        operating_current=current,
        allowance=ColdMeasurementAllowance(allowance).value,
        allowance_factor=basis.factor,
        allowance_source=basis.source,
        allowance_status=basis.status,
        voltage_factor=float(voltage_factor),
        passes=measured <= limit,
        margin=(limit - measured) / limit,
        prospective_fault_current=voltage / measured,
        formula=f"{factors}{voltage:g} V / {current:g} A",
    )


# --------------------------------------------------------------------------- disconnection time


@dataclass(frozen=True)
class DisconnectionTime:
    """A maximum disconnection time with the circuit it applies to and its source."""

    time: float
    """[s]"""
    earthing_system: str
    """``"TN"`` or ``"TT"``"""
    scope: str
    standard: str
    clause: str
    edition: str
    status: str
    note: str = ""

    def describe(self) -> str:
        """E.g. ``t ≤ 0.4 s``."""
        return f"t ≤ {self.time:g} s"

    def met_by(self, operating_time: float) -> bool:
        """Whether a device operating within ``operating_time`` [s] disconnects in time."""
        return _non_negative("operating_time", operating_time, "s") <= self.time


# IEC 60364-4-41:2005 Table 41.1, a.c. [M, reference values §16]: upper bound of U0 band → time
_TABLE_41_1 = {
    "TN": ((120.0, 0.8), (230.0, 0.4), (400.0, 0.2), (math.inf, 0.1)),
    "TT": ((120.0, 0.3), (230.0, 0.2), (400.0, 0.07), (math.inf, 0.04)),
}
_OTHER_CIRCUITS = {"TN": (5.0, "411.3.2.3"), "TT": (1.0, "411.3.2.4")}
_TABLE_41_1_LIMIT = 32.0  # A, 411.3.2.2 (2005)
_SYSTEMS = {"TN": "TN", "TN-S": "TN", "TN-C": "TN", "TN-C-S": "TN", "TT": "TT"}


def _earthing_system(earthing_system: str) -> str:
    key = str(earthing_system).strip().upper().replace(" ", "")
    if key == "IT":
        raise ComputationError(
            "earthing_system 'IT': on a second fault the TN times apply where the exposed-"
            "conductive-parts are interconnected and the TT times where they are earthed "
            "separately (IEC 60364-4-41 411.6.4); give 'TN' or 'TT' accordingly"
        )
    if key not in _SYSTEMS:
        raise ComputationError(
            f"earthing_system {earthing_system!r} is not known; use TN-S, TN-C, TN-C-S or TT"
        )
    return _SYSTEMS[key]


def _band(voltage: float) -> str:
    if voltage <= 120.0:
        return "50 V < U0 ≤ 120 V"
    if voltage <= 230.0:
        return "120 V < U0 ≤ 230 V"
    if voltage <= 400.0:
        return "230 V < U0 ≤ 400 V"
    return "U0 > 400 V"


def iec_60364_4_41_disconnection_time(
    earthing_system: str,
    nominal_voltage_to_earth: float,
    rated_current: float,
    final_circuit: bool = True,
) -> DisconnectionTime:
    """Maximum disconnection time for protection by automatic disconnection (a.c.).

    Parameters
    ----------
    earthing_system : str
        ``"TN-S"``, ``"TN-C"``, ``"TN-C-S"`` (or ``"TN"``) or ``"TT"``. An IT system
        is refused with a message saying which to give for its second fault.
    nominal_voltage_to_earth : float
        Nominal a.c. r.m.s. line voltage to earth U0, above 50 V [V].
    rated_current : float
        Rated current of the circuit's protective device [A].
    final_circuit : bool
        ``False`` for a distribution circuit.

    Returns
    -------
    DisconnectionTime
        Table 41.1 for final circuits up to 32 A; otherwise 5 s (TN) or 1 s (TT).

    Notes
    -----
    Table 41.1, a.c., by U0: 50–120 V, 120–230 V, 230–400 V, above 400 V (each
    band closed at its upper end): TN 0.8, 0.4, 0.2, 0.1 s; TT 0.3, 0.2, 0.07,
    0.04 s. In a TT system disconnected by an overcurrent device with protective
    equipotential bonding to every extraneous-conductive-part, the TN times may be
    used (note to the table); give ``"TN"`` for that case. The d.c. column is not
    encoded. IEC 60204-1:2016 Annex A applies the TN times to a machine's circuits.
    The 2017 amendment's wider scope (63 A with socket-outlets) is not encoded.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2.2, Table 41.1; 411.3.2.3; 411.3.2.4 [M];
    IEC 60204-1:2016, Annex A [M].
    """
    system = _earthing_system(earthing_system)
    voltage = _positive("nominal_voltage_to_earth", nominal_voltage_to_earth, "V")
    if voltage <= 50.0:
        raise ComputationError(
            f"nominal_voltage_to_earth {voltage:g} V is extra-low voltage: Table 41.1 "
            "starts above 50 V a.c."
        )
    rated = _positive("rated_current", rated_current, "A")
    if final_circuit and rated <= _TABLE_41_1_LIMIT:
        time = next(t for upper, t in _TABLE_41_1[system] if voltage <= upper)
        return DisconnectionTime(
            time=time,
            earthing_system=system,
            scope=f"final circuit ≤ 32 A, {system}, {_band(voltage)}, a.c.",
            standard="IEC 60364-4-41",
            clause="411.3.2.2, Table 41.1",
            edition="2005",
            status="M",
            note="the 2017 amendment widens the scope to 63 A socket-outlet circuits; "
                 "confirm the edition in force",
        )
    time, clause = _OTHER_CIRCUITS[system]
    scope = "distribution circuit" if not final_circuit else f"final circuit of {rated:g} A > 32 A"
    return DisconnectionTime(
        time=time,
        earthing_system=system,
        scope=f"{scope}, {system}",
        standard="IEC 60364-4-41",
        clause=clause,
        edition="2005",
        status="M",
    )
