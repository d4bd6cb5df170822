"""Capacitors: tolerance codes, reactance, field estimates, stored energy, discharge.

Sources
-------
- IEC 60062:2016, cl. 5 (letter codes for tolerance on rated capacitance;
  letters and percentages M, the absolute pF meaning below 10 pF M).
- IEC 60204-1:2016, cl. 6.2.4 (protection against residual voltages: ≤ 60 V
  within 5 s, plug pins within 1 s, exempt if stored charge ≤ 60 µC) [S].
- Circuit theory: Xc = 1/(2πfC); E = ½CV²; Q = CV; RC discharge
  V(t) = V0·exp(−t/RC).
- ESR ≈ tan δ · Xc: common practice for dissipation-factor readings [P].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ._checks import finite as _finite
from ._checks import non_negative as _non_negative
from ._checks import positive as _positive
from ._errors import ComputationError

__all__ = [
    "CapacitanceWindow",
    "ResidualVoltageCheck",
    "ToleranceCode",
    "capacitance_from_current",
    "capacitance_window",
    "capacitive_reactance",
    "capacitor_current",
    "discharge_time",
    "equivalent_series_resistance",
    "iec_60204_1_residual_voltage_check",
    "maximum_bleeder_resistance",
    "residual_voltage",
    "stored_charge",
    "stored_energy",
    "tolerance_code",
]





def _farads(value: float) -> str:
    for scale, prefix in ((1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p")):
        if abs(value) >= scale:
            return f"{value / scale:.4g} {prefix}F"
    return f"{value / 1e-12:.4g} pF"


# --------------------------------------------------------------------------- tolerance


@dataclass(frozen=True)
class ToleranceCode:
    """An IEC 60062 tolerance letter.

    ``lower`` and ``upper`` are signed fractions of the rated value (−0.2 and
    +0.8 for Z), or, when ``absolute`` is true, signed deviations in farads.
    """

    letter: str
    lower: float
    upper: float
    absolute: bool = False
    status: str = "M"

    def describe(self) -> str:
        if self.absolute:
            return f"{self.letter}: ±{self.upper / 1e-12:g} pF"
        if math.isclose(-self.lower, self.upper):
            return f"{self.letter}: ±{self.upper * 100:g} %"
        return f"{self.letter}: {self.lower * 100:+g} / {self.upper * 100:+g} %"


# IEC 60062 [M, reference values §13]
_RELATIVE = {"B": 0.001, "C": 0.0025, "D": 0.005, "F": 0.01, "G": 0.02, "J": 0.05,
             "K": 0.10, "M": 0.20, "N": 0.30}
# IEC 60062: below 10 pF rated capacitance B, C, D, F, G are absolute [M]
_ABSOLUTE_PF = {"B": 0.1, "C": 0.25, "D": 0.5, "F": 1.0, "G": 2.0}
_SMALL_CAPACITANCE = 10e-12


def tolerance_code(letter: str, nominal_capacitance: float | None = None) -> ToleranceCode:
    """The tolerance an IEC 60062 letter stands for.

    Parameters
    ----------
    letter : str
        B, C, D, F, G, J, K, M, N or Z (case ignored).
    nominal_capacitance : float, optional
        Rated capacitance; below 10 pF the letters B to G are absolute [F].

    Returns
    -------
    ToleranceCode

    References
    ----------
    IEC 60062:2016, cl. 5 [M].
    """
    code = str(letter).strip().upper()
    if nominal_capacitance is not None:
        nominal = _positive("nominal_capacitance", nominal_capacitance, "F")
        if nominal < _SMALL_CAPACITANCE and code in _ABSOLUTE_PF:
            value = _ABSOLUTE_PF[code] * 1e-12
            return ToleranceCode(code, -value, value, absolute=True)
    if code == "Z":
        return ToleranceCode("Z", -0.20, 0.80)
    if code in _RELATIVE:
        return ToleranceCode(code, -_RELATIVE[code], _RELATIVE[code])
    raise ComputationError(
        f"letter {letter!r} is not an encoded IEC 60062 tolerance letter; "
        f"use one of {', '.join([*_RELATIVE, 'Z'])}"
    )


@dataclass(frozen=True)
class CapacitanceWindow:
    """Acceptance window for a measured capacitance."""

    nominal: float
    """[F]"""
    lower: float
    """[F]"""
    upper: float
    """[F]"""
    code: ToleranceCode

    def contains(self, capacitance: float) -> bool:
        """Whether a measured capacitance lies in the closed window."""
        return self.lower <= _finite("capacitance", capacitance, "F") <= self.upper

    def describe(self) -> str:
        """E.g. ``17.1 µF ≤ C ≤ 18.9 µF``."""
        return f"{_farads(self.lower)} ≤ C ≤ {_farads(self.upper)}"


def capacitance_window(nominal_capacitance: float, letter: str) -> CapacitanceWindow:
    """The window a rated capacitance and its tolerance letter allow.

    Parameters
    ----------
    nominal_capacitance : float
        Rated capacitance [F].
    letter : str
        IEC 60062 tolerance letter.

    Returns
    -------
    CapacitanceWindow

    Notes
    -----
    C_low = C_N · (1 + lower), C_high = C_N · (1 + upper); absolute codes add
    the deviation in farads.

    References
    ----------
    IEC 60062:2016, cl. 5 [M].
    """
    nominal = _positive("nominal_capacitance", nominal_capacitance, "F")
    code = tolerance_code(letter, nominal)
    if code.absolute:
        lower, upper = nominal + code.lower, nominal + code.upper
    else:
        lower, upper = nominal * (1.0 + code.lower), nominal * (1.0 + code.upper)
    return CapacitanceWindow(nominal, max(lower, 0.0), upper, code)


# --------------------------------------------------------------------------- a.c. behaviour


def capacitive_reactance(capacitance: float, frequency: float) -> float:
    """Reactance of a capacitor.

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    frequency : float
        Supply frequency [Hz].

    Returns
    -------
    float
        Xc [Ω].

    Notes
    -----
    Xc = 1 / (2π f C).
    """
    capacitance = _positive("capacitance", capacitance, "F")
    frequency = _positive("frequency", frequency, "Hz")
    return 1.0 / (2.0 * math.pi * frequency * capacitance)


def capacitor_current(capacitance: float, voltage: float, frequency: float) -> float:
    """Current a capacitor draws from a sinusoidal supply.

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    voltage : float
        r.m.s. voltage across the capacitor [V].
    frequency : float
        Supply frequency [Hz].

    Returns
    -------
    float
        r.m.s. current [A].

    Notes
    -----
    I = V / Xc = 2π f C V.
    """
    voltage = _non_negative("voltage", voltage, "V")
    return voltage / capacitive_reactance(capacitance, frequency)


def capacitance_from_current(current: float, voltage: float, frequency: float) -> float:
    """Capacitance estimated from the current it draws at a known voltage.

    Parameters
    ----------
    current : float
        r.m.s. current through the capacitor [A].
    voltage : float
        r.m.s. voltage across the capacitor [V].
    frequency : float
        Supply frequency [Hz].

    Returns
    -------
    float
        Capacitance [F].

    Notes
    -----
    C = I / (2π f V); in the field C[µF] ≈ 3183·I/V at 50 Hz, 2653·I/V at 60 Hz.
    Assumes a sinusoidal voltage and a capacitor with negligible losses.

    References
    ----------
    Common trade practice [P].
    """
    current = _positive("current", current, "A")
    voltage = _positive("voltage", voltage, "V")
    frequency = _positive("frequency", frequency, "Hz")
    return current / (2.0 * math.pi * frequency * voltage)


def equivalent_series_resistance(
    dissipation_factor: float, capacitance: float, frequency: float
) -> float:
    """Equivalent series resistance from a dissipation factor reading.

    Parameters
    ----------
    dissipation_factor : float
        tan δ at ``frequency`` [unitless].
    capacitance : float
        Capacitance [F].
    frequency : float
        Frequency of the dissipation factor reading [Hz].

    Returns
    -------
    float
        ESR [Ω].

    Notes
    -----
    ESR ≈ tan δ · Xc (series model, small tan δ).

    References
    ----------
    Common practice [P].
    """
    tan_delta = _non_negative("dissipation_factor", dissipation_factor, "")
    return tan_delta * capacitive_reactance(capacitance, frequency)


# --------------------------------------------------------------------------- stored energy


def stored_energy(capacitance: float, voltage: float) -> float:
    """Energy stored in a charged capacitor, E = ½ C V² [J].

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    voltage : float
        Voltage across the capacitor, peak for an a.c. supply [V].

    Returns
    -------
    float
        [J].
    """
    capacitance = _positive("capacitance", capacitance, "F")
    voltage = _finite("voltage", voltage, "V")
    return 0.5 * capacitance * voltage**2


def stored_charge(capacitance: float, voltage: float) -> float:
    """Charge held by a charged capacitor, Q = C V [C].

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    voltage : float
        Voltage across the capacitor, peak for an a.c. supply [V].

    Returns
    -------
    float
        Magnitude of the charge [C].
    """
    capacitance = _positive("capacitance", capacitance, "F")
    voltage = _finite("voltage", voltage, "V")
    return capacitance * abs(voltage)


def residual_voltage(
    capacitance: float, bleeder_resistance: float, initial_voltage: float, time: float
) -> float:
    """Voltage left on a capacitor discharging through a resistor.

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    bleeder_resistance : float
        Discharge resistance across the capacitor [Ω].
    initial_voltage : float
        Voltage at disconnection, peak for an a.c. supply [V].
    time : float
        Time since disconnection [s].

    Returns
    -------
    float
        [V].

    Notes
    -----
    V(t) = V0 · exp(−t / (R C)).
    """
    capacitance = _positive("capacitance", capacitance, "F")
    resistance = _positive("bleeder_resistance", bleeder_resistance, "Ω")
    initial = _non_negative("initial_voltage", initial_voltage, "V")
    time = _non_negative("time", time, "s")
    return initial * math.exp(-time / (resistance * capacitance))


def discharge_time(
    capacitance: float,
    bleeder_resistance: float,
    initial_voltage: float,
    safe_voltage: float = 60.0,
) -> float:
    """Time for a capacitor to fall to a safe voltage through a bleeder resistor.

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    bleeder_resistance : float
        Discharge resistance across the capacitor [Ω].
    initial_voltage : float
        Voltage at disconnection, peak for an a.c. supply [V].
    safe_voltage : float
        Voltage regarded as safe; 60 V in IEC 60204-1 cl. 6.2.4 [V].

    Returns
    -------
    float
        [s]; 0 when the initial voltage is already at or below the safe voltage.

    Notes
    -----
    t = R C · ln(V0 / V_safe).
    """
    capacitance = _positive("capacitance", capacitance, "F")
    resistance = _positive("bleeder_resistance", bleeder_resistance, "Ω")
    initial = _non_negative("initial_voltage", initial_voltage, "V")
    safe = _positive("safe_voltage", safe_voltage, "V")
    if initial <= safe:
        return 0.0
    return resistance * capacitance * math.log(initial / safe)


def maximum_bleeder_resistance(
    capacitance: float,
    initial_voltage: float,
    time_limit: float = 5.0,
    safe_voltage: float = 60.0,
) -> float:
    """Largest bleeder resistance that brings a capacitor to a safe voltage in time.

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    initial_voltage : float
        Voltage at disconnection, peak for an a.c. supply [V].
    time_limit : float
        Time allowed; 5 s (1 s for plug pins) in IEC 60204-1 cl. 6.2.4 [s].
    safe_voltage : float
        Voltage regarded as safe [V].

    Returns
    -------
    float
        R_max [Ω]; ``inf`` when the initial voltage is already safe.

    Notes
    -----
    R_max = t / (C · ln(V0 / V_safe)).
    """
    capacitance = _positive("capacitance", capacitance, "F")
    initial = _non_negative("initial_voltage", initial_voltage, "V")
    time_limit = _positive("time_limit", time_limit, "s")
    safe = _positive("safe_voltage", safe_voltage, "V")
    if initial <= safe:
        return math.inf
    return time_limit / (capacitance * math.log(initial / safe))


@dataclass(frozen=True)
class ResidualVoltageCheck:
    """Outcome of the IEC 60204-1 residual-voltage requirement for one capacitor."""

    passes: bool
    exempt: bool
    """Stored charge at or below 60 µC."""
    residual_voltage: float
    """Voltage at the end of the time limit [V]."""
    time_to_safe_voltage: float
    """[s]; ``inf`` with no discharge path."""
    stored_charge: float
    """[C]"""
    stored_energy: float
    """[J]"""
    time_limit: float
    """[s]"""
    voltage_limit: float = 60.0
    """[V]"""
    charge_limit: float = 60e-6
    """[C]"""
    standard: str = "IEC 60204-1"
    clause: str = "cl. 6.2.4"
    edition: str = "2016"
    status: str = "S"

    def describe(self) -> str:
        """E.g. ``U ≤ 60 V within 5 s, or Q ≤ 60 µC``."""
        return (
            f"U ≤ {self.voltage_limit:g} V within {self.time_limit:g} s, "
            f"or Q ≤ {self.charge_limit * 1e6:g} µC"
        )


def iec_60204_1_residual_voltage_check(
    capacitance: float,
    initial_voltage: float,
    bleeder_resistance: float | None,
    plug_pins: bool = False,
) -> ResidualVoltageCheck:
    """Check a capacitor against the IEC 60204-1 residual voltage requirement.

    Parameters
    ----------
    capacitance : float
        Capacitance [F].
    initial_voltage : float
        Voltage at disconnection, peak for an a.c. supply (√2·U_rms) [V].
    bleeder_resistance : float or None
        Discharge resistance across the capacitor; ``None`` for no discharge path [Ω].
    plug_pins : bool
        ``True`` for parts exposed on withdrawing a plug: 1 s instead of 5 s.

    Returns
    -------
    ResidualVoltageCheck

    Notes
    -----
    Passes when Q = C·V0 ≤ 60 µC (exempt), or V0·exp(−t_lim/RC) ≤ 60 V.

    References
    ----------
    IEC 60204-1:2016, cl. 6.2.4 [S].
    """
    capacitance = _positive("capacitance", capacitance, "F")
    initial = _non_negative("initial_voltage", initial_voltage, "V")
    limit = 1.0 if plug_pins else 5.0
    charge = stored_charge(capacitance, initial)
    energy = stored_energy(capacitance, initial)
    exempt = charge <= 60e-6
    if bleeder_resistance is None:
        left = initial
        time_to_safe = 0.0 if initial <= 60.0 else math.inf
    else:
        left = residual_voltage(capacitance, bleeder_resistance, initial, limit)
        time_to_safe = discharge_time(capacitance, bleeder_resistance, initial, 60.0)
    return ResidualVoltageCheck(
        passes=exempt or left <= 60.0,
        exempt=exempt,
        residual_voltage=left,
        time_to_safe_voltage=time_to_safe,
        stored_charge=charge,
        stored_energy=energy,
        time_limit=limit,
    )
