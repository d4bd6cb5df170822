"""Rules whose verdict rests on a value derived from the reading and the nameplate.

Each rule here computes something the reading alone does not show — stored energy
and discharge, voltage unbalance, insulation resistance (at 40 °C for windings), the expected
resistance of a bonding conductor, cable voltage drop, the source impedance and
the equivalent current of an intermittent load — by the functions in
:mod:`acceptance.computations`, and records every input, the formula, the result
and its source as :class:`~acceptance.results.Step` values. Their specifications are in
:mod:`acceptance.rule_specs`; :mod:`acceptance.evaluation.registry` joins the two.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from ..computations import ComputationError, duty
from ..computations import capacitors as cap
from ..computations import insulation as ins
from ..computations import resistance as res
from ..computations import supply as sup
from ..results import Step, Verdict
from ..tolerance import Tolerance
from ..units import Basis, Dimension, Quantity, format_value, parse_quantity
from .rules import Context, Evaluate, Outcome, _captured_current, _compare

if TYPE_CHECKING:
    from ..loading import Reading

__all__ = ["EVALUATORS"]


def _fmt(value: float, dimension: Dimension, unit: str | None = None, digits: int = 4) -> str:
    return format_value(value, dimension, unit, digits)


def _quantity_param(params: dict[str, Any], name: str, default: str,
                    dimension: Dimension) -> float:
    return parse_quantity(params.get(name, default), dimension).value


# ------------------------------------------------------------------ stored energy


def _stored_energy_discharge(reading: Reading, context: Context,
                             params: dict[str, Any]) -> Outcome:
    """Measured discharge time against IEC 60204-1 cl. 6.2.4, with the design figures."""
    assert isinstance(reading.value, Quantity)
    capacitor = context.element
    limit = _quantity_param(params, "limit", "5 s", Dimension.TIME)
    tolerance = Tolerance(Dimension.TIME, "t", "s", None, limit)
    if capacitor is None or capacitor.working_voltage is None:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(),
                       message="the nameplate gives no working_voltage for this capacitor; "
                               "add the peak voltage it charges to in service")
    capacitance = capacitor.nominal.value
    initial = capacitor.working_voltage.value
    safe = cap.ResidualVoltageCheck.voltage_limit
    charge_limit = cap.ResidualVoltageCheck.charge_limit
    energy = cap.stored_energy(capacitance, initial)
    charge = cap.stored_charge(capacitance, initial)
    r_max = cap.maximum_bleeder_resistance(capacitance, initial, limit, safe)
    steps = [
        Step("capacitance C (nominal)", capacitor.nominal.format(), capacitance, "F"),
        Step("working voltage U₀ (peak)", capacitor.working_voltage.format(), initial, "V"),
        Step("stored energy E", _fmt(energy, Dimension.ENERGY, "J"), energy, "J",
             formula="E = ½·C·U₀²"),
        Step("stored charge Q", _fmt(charge, Dimension.CHARGE, "C"), charge, "C",
             formula="Q = C·U₀"),
        Step("largest bleeder for the limit R_max",
             "no bleeder needed" if math.isinf(r_max) else _fmt(r_max, Dimension.RESISTANCE,
                                                                "kΩ"),
             None if math.isinf(r_max) else r_max, "Ω",
             formula=f"R_max = t_lim / (C · ln(U₀ / {safe:g} V))"),
    ]
    message = None
    if capacitor.bleeder_resistance is not None:
        bleeder = capacitor.bleeder_resistance.value
        expected = cap.discharge_time(capacitance, bleeder, initial, safe)
        steps.append(Step("bleeder resistance R (nameplate)", capacitor.bleeder_resistance.format(),
                          bleeder, "Ω"))
        steps.append(Step(f"time to {safe:g} V through R", _fmt(expected, Dimension.TIME, "s"),
                          expected, "s", formula=f"t = R·C · ln(U₀ / {safe:g} V)"))
        if bleeder > r_max:
            message = (f"the nameplate bleeder {capacitor.bleeder_resistance.format()} is above "
                       f"R_max {_fmt(r_max, Dimension.RESISTANCE, 'kΩ')}: by design it cannot "
                       f"meet {limit:g} s")
    if charge <= charge_limit:
        steps.append(Step("exemption", f"Q ≤ {charge_limit * 1e6:g} µC: no discharge time "
                          "required"))
        return Outcome(Verdict.PASS, f"{tolerance.describe()}, or Q ≤ {charge_limit * 1e6:g} µC",
                       tuple(steps), message=message, compared="stored charge Q")
    steps.append(Step("exemption", f"Q > {charge_limit * 1e6:g} µC: the discharge time applies"))
    return _compare(tolerance, reading.value.value, steps, message=message,
                    source_note=f"{safe:g} V within the limit unless Q ≤ "
                                f"{charge_limit * 1e6:g} µC")


# ------------------------------------------------------------------ unbalance

_LINES = ("L1-L2", "L2-L3", "L3-L1")


def _voltage_unbalance(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """Both unbalance definitions from the three line voltages of the same item."""
    limit_pct = _quantity_param(params, "limit", "2 %", Dimension.RATIO)
    tolerance = Tolerance(Dimension.RATIO, "u₂", "%", None, limit_pct, digits=3)
    key = f"{reading.checklist}.{reading.item}"
    readings = []
    for line in _LINES:
        found = reading if line == reading.element else context.reading_of(key, line)
        if found is None or not isinstance(found.value, Quantity):
            return Outcome(Verdict.UNDETERMINED, tolerance.describe(),
                           message=f"needs all three line voltages; {line} is not recorded")
        readings.append(found.value.value)
    both = sup.voltage_unbalance(*readings)
    nema_pct, sequence_pct = 100 * both.nema, 100 * both.sequence
    derating = sup.nema_derating_factor(both.nema)
    steps = [
        Step("line voltages", ", ".join(f"{line} {_fmt(v, Dimension.VOLTAGE, 'V')}"
                                        for line, v in zip(_LINES, readings, strict=True))),
        Step("unbalance, NEMA MG 1 definition", f"{nema_pct:.3f} %", nema_pct, "%",
             formula="u = max|Uᵢ − U_avg| / U_avg"),
        Step("positive sequence |U₁|", _fmt(both.positive_sequence, Dimension.VOLTAGE, "V"),
             both.positive_sequence, "V"),
        Step("negative sequence |U₂|", _fmt(both.negative_sequence, Dimension.VOLTAGE, "V"),
             both.negative_sequence, "V"),
        Step("unbalance, sequence definition u₂", f"{sequence_pct:.3f} %", sequence_pct, "%",
             formula="β = ΣU⁴/(ΣU²)², u₂ = √((1 − √(3 − 6β)) / (1 + √(3 − 6β)))"),
        Step("NEMA derating factor",
             (f"{derating.factor:.2f} ({derating.standard} {derating.clause}"
              + ("; " + derating.note if derating.note.startswith("no derating") else "")
              + ")")
             if derating.factor is not None else derating.note,
             derating.factor, "1", formula="read off the curve at the NEMA unbalance; 1.00 "
                                           "up to 1 % (NEMA MG 1-2016 12.45)"),
    ]
    # How far the compared value moves per volt of one reading, combined over the three
    # readings as if independent (GUM 5.1.2): ∂u₂/∂Uᵢ by central differences.
    gradient = []
    for index in range(3):
        shifted = [list(readings), list(readings)]
        shifted[0][index] += 0.01
        shifted[1][index] -= 0.01
        gradient.append(100 * (sup.voltage_unbalance_sequence(*shifted[0]).unbalance
                               - sup.voltage_unbalance_sequence(*shifted[1]).unbalance) / 0.02)
    sensitivity = math.sqrt(sum(g * g for g in gradient))
    return _compare(tolerance, sequence_pct, steps, sensitivity=sensitivity,
                    compared="unbalance, sequence definition u₂",
                    source_note="negative-to-positive sequence; NEMA figure shown for comparison")


# ------------------------------------------------------------------ insulation

def _insulation_minimum(params: dict[str, Any], context: Context) -> ins.InsulationMinimum:
    standard = params.get("standard", "IEC 60204-1")
    if standard == "IEEE 43":
        return ins.ieee_43_insulation_minimum(params.get("winding_kind", "random_wound"),
                                              context.nameplate.rated_voltage.value)
    if standard == "IEC 60364-6":
        return ins.iec_60364_6_insulation_minimum(
            context.nameplate.rated_voltage.value, bool(params.get("selv_or_pelv", False)),
            params.get("edition", "current"))
    return ins.iec_60204_1_insulation_minimum(bool(params.get("reduced_section", False)))


def _insulation_test_voltage(minimum: ins.InsulationMinimum, test_voltage: float,
                             context: Context) -> ins.InsulationTestVoltage:
    if minimum.standard == "IEEE 43":
        low, high = ins.ieee_43_test_voltage(context.nameplate.rated_voltage.value)
        return ins.check_test_voltage(test_voltage, low, high,
                                      "IEEE 43-2013 Table 1 for the rated voltage [M]")
    assert minimum.test_voltage is not None
    return ins.check_test_voltage(test_voltage, minimum.test_voltage, minimum.test_voltage,
                                  f"{minimum.standard}:{minimum.edition} {minimum.clause}")


def _insulation_resistance(reading: Reading, context: Context,
                           params: dict[str, Any]) -> Outcome:
    """Insulation resistance against a standard's minimum, on the basis that standard states.

    IEC 60204-1 18.3 and IEC 60364-6 Table 6.1 judge the value as measured at their
    test voltage; IEEE 43 states its winding minimums at 40 °C, so only there is the
    reading corrected before it is compared. A temperature given with a power-circuit
    reading still yields R at 40 °C, for trending only.
    """
    assert isinstance(reading.value, Quantity)
    minimum = _insulation_minimum(params, context)
    at_40 = minimum.standard == "IEEE 43"
    minimum_value = (parse_quantity(params["minimum"], Dimension.RESISTANCE).value
                     if "minimum" in params else minimum.minimum_resistance)
    tolerance = Tolerance(Dimension.RESISTANCE, "R₄₀" if at_40 else "R", "MΩ",
                          minimum_value, None)
    temperature = reading.extras.get("temperature")
    test_voltage = reading.extras.get("test_voltage")
    if at_40 and temperature is None:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(),
                       message="record the winding temperature with the reading "
                               "(temperature: 25 °C): IEEE 43 states its minimum at 40 °C")
    if test_voltage is None:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(),
                       message="record the d.c. test voltage with the reading (test_voltage: "
                               "500 V)")
    voltage = _insulation_test_voltage(minimum, test_voltage.value, context)
    steps = [Step("test voltage", f"{test_voltage.format()} — {voltage.message}",
                  test_voltage.value, "V")]
    corrected = None
    method = ""
    if temperature is not None:
        interval = (parse_quantity(params["halving_interval"],
                                   Dimension.TEMPERATURE_DIFFERENCE).value
                    if "halving_interval" in params else 10.0)
        method = ("IEEE 43-2000 cl. 6.4, halving per 10 K [M]; IEEE 43-2013 asks for the "
                  "winding's own correction found by test" if "halving_interval" not in params
                  else f"halving per {interval:g} K, the winding's own interval found by test "
                       "(IEEE 43-2013) [M]")
        corrected = ins.insulation_resistance_at_temperature(
            reading.value.value, temperature.value, 40.0, interval)
        steps.append(Step("temperature during the test", temperature.format(),
                          temperature.value, "°C"))
        steps.append(Step("R at 40 °C" + ("" if at_40 else " (for trending, not the verdict)"),
                          _fmt(corrected, Dimension.RESISTANCE, "MΩ"), corrected, "Ω",
                          formula=f"R₄₀ = R_t · 0.5^((40 °C − T)/{interval:g} K) ({method})"))
    note = ("" if minimum.note == "" else f" ({minimum.note})")
    steps.append(Step("minimum", f"{_fmt(minimum_value, Dimension.RESISTANCE, 'MΩ')} — "
                      f"{minimum.standard}:{minimum.edition} {minimum.clause}, {minimum.scope}"
                      + (" (job value)" if "minimum" in params else "") + note,
                      minimum_value, "Ω"))
    if not voltage.suitable:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(), tuple(steps),
                       message=voltage.message)
    status = f" [{minimum.status}]"
    if at_40:
        assert corrected is not None
        return _compare(tolerance, corrected, steps,
                        sensitivity=corrected / reading.value.value, compared="R at 40 °C",
                        source_note=f"minimum {minimum.standard}:{minimum.edition} "
                                    f"{minimum.clause}{status} at 40 °C; reading corrected by "
                                    f"{method}")
    return _compare(tolerance, reading.value.value, steps, compared="R as measured",
                    source_note=f"minimum {minimum.standard}:{minimum.edition} "
                                f"{minimum.clause}{status}, judged as measured at "
                                f"{voltage.lowest:g} V d.c.; no temperature correction")


def _polarization_index(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    winding = context.element
    one_minute = context.reading_of(params["one_minute_item"], reading.element)
    if one_minute is None or not isinstance(one_minute.value, Quantity):
        return Outcome(Verdict.UNDETERMINED, "PI ≥ class minimum",
                       message=f"needs the 1-min reading ({params['one_minute_item']}) for "
                               "this winding")
    assessment = ins.assess_polarization_index(one_minute.value.value, reading.value.value,
                                               winding.thermal_class)
    tolerance = Tolerance(Dimension.NUMBER, "PI", "", assessment.minimum, None, digits=3)
    steps = [
        Step("IR after 1 min", one_minute.value.format(), one_minute.value.value, "Ω"),
        Step("IR after 10 min", reading.value.format(), reading.value.value, "Ω"),
        Step("polarization index PI", f"{assessment.index:.2f}", assessment.index, "1",
             formula="PI = IR₁₀ / IR₁"),
        Step("minimum", f"{assessment.minimum:g} for thermal class {winding.thermal_class} "
             f"({assessment.standard}:{assessment.edition} {assessment.clause})",
             assessment.minimum, "1"),
    ]
    if not assessment.meaningful:
        return Outcome(Verdict.RECORDED, tolerance.describe(), tuple(steps),
                       message=assessment.note)
    return _compare(tolerance, assessment.index, steps,
                    sensitivity=assessment.index / reading.value.value,
                    compared="polarization index PI")


def _absorption_ratio(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    sixty = context.reading_of(params["one_minute_item"], reading.element)
    if sixty is None or not isinstance(sixty.value, Quantity):
        return Outcome(Verdict.UNDETERMINED, "DAR recorded",
                       message=f"needs the 1-min reading ({params['one_minute_item']})")
    ratio = ins.dielectric_absorption_ratio(reading.value.value, sixty.value.value)
    band = ins.interpret_dielectric_absorption_ratio(ratio)
    steps = (
        Step("IR after 30 s", reading.value.format(), reading.value.value, "Ω"),
        Step("IR after 60 s", sixty.value.format(), sixty.value.value, "Ω"),
        Step("dielectric absorption ratio DAR", f"{ratio:.2f} ({band.band})", ratio, "1",
             formula="DAR = IR₆₀ₛ / IR₃₀ₛ"),
    )
    return Outcome(Verdict.RECORDED, "recorded (no standard sets a DAR minimum)", steps,
                   message=band.note)


# ------------------------------------------------------------------ bonding


def _bonding_resistance(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """Measured bonding resistance against the value expected from the conductor."""
    assert isinstance(reading.value, Quantity)
    point = context.element
    margin = _quantity_param(params, "margin", "25 %", Dimension.RATIO)
    ambient = context.visit.model.conditions.ambient
    temperature = ambient.value if ambient is not None else 20.0
    estimate = res.expected_bonding_resistance(
        point.length.value, point.cross_section.value, point.material,
        point.conductor_class, temperature)
    upper = estimate.resistance * (1 + margin / 100)
    tolerance = Tolerance(Dimension.RESISTANCE, "R", "Ω", None, upper)
    steps = [
        Step("conductor", f"{point.length.format()} of {point.cross_section.format()} "
             f"{point.material}", point.length.value, "m"),
        Step("conductor temperature", f"{temperature:g} °C "
             + ("(visit ambient)" if ambient is not None else "(no ambient recorded: 20 °C)"),
             temperature, "°C"),
        Step("resistance per metre", _fmt(estimate.resistance_per_length, Dimension.RESISTANCE,
             "mΩ") + "/m — " + estimate.basis, estimate.resistance_per_length, "Ω/m"),
        Step("expected resistance R_exp", _fmt(estimate.resistance, Dimension.RESISTANCE, "Ω"),
             estimate.resistance, "Ω", formula="R_exp = r₂₀ · L · (k + θ)/(k + 20 °C)"),
        Step("allowed", f"R_exp × (1 + {margin:g} %) = {_fmt(upper, Dimension.RESISTANCE, 'Ω')}",
             upper, "Ω", formula="R ≤ R_exp · (1 + margin)"),
    ]
    test_current = reading.extras.get("test_current")
    if test_current is None:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(), tuple(steps),
                       message="record the test current with the reading (test_current: "
                               "10 A): IEC 60204-1:2016 cl. 18.2.2 asks for 0.2 A to about "
                               "10 A")
    current = res.iec_60204_1_bonding_test_current(test_current.value)
    steps.insert(0, Step("test current", f"{test_current.format()} — {current.describe()} [M]",
                         test_current.value, "A"))
    if not current.within_range:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(), tuple(steps),
                       message=current.message)
    try:
        table_9 = res.iec_60204_1_bonding_voltage_drop(point.cross_section.value)
    except ComputationError:
        table_9 = None
    if table_9 is not None:
        steps.append(Step("for comparison: IEC 60204-1:2005 cl. 18.2.2 Table 9 [M], "
                          "not in the 2016 edition",
                          f"{table_9.describe()} → R ≤ "
                          f"{_fmt(table_9.max_resistance, Dimension.RESISTANCE, 'Ω')}",
                          table_9.max_resistance, "Ω"))
    return _compare(tolerance, reading.value.value, steps,
                    source_note=f"expected value from length, cross-section and material, "
                                f"margin {margin:g} % for connections and test leads")


# ------------------------------------------------------------------ cable and source


def _cable_voltage_drop(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """Voltage drop along the supply cable at the measured load current."""
    assert isinstance(reading.value, Quantity)
    limit_pct = _quantity_param(params, "limit", "5 %", Dimension.RATIO)
    tolerance = Tolerance(Dimension.RATIO, "ΔU", "%", None, limit_pct, digits=3)
    nameplate = context.nameplate
    cable = nameplate.supply_cable
    if cable is None:
        return Outcome(Verdict.NOT_APPLICABLE, tolerance.describe(),
                       message="no supply_cable on the nameplate")
    if cable.material != "copper":
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(),
                       message="the IEC 60228 table encoded here is for copper only")
    basis = context.instrument_basis(reading)
    current, sensitivity_scale, current_label = reading.value.value, 1.0, "load current I"
    captured = _captured_current(reading)
    if basis is not Basis.RMS and captured is not None:
        # The capture gives the true RMS current that heats the cable and drops the voltage.
        current, sensitivity_scale = captured.rms, 0.0
        current_label = "load current I (true RMS from the capture)"
    elif basis is not Basis.RMS:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(),
                       message="the drop follows the r.m.s. current; this reading is "
                               f"{basis.phrase if basis else 'of unknown basis'}")
    conductor_temperature = _quantity_param(params, "conductor_temperature", "70 °C",
                                            Dimension.TEMPERATURE)
    row = res.iec_60228_resistance(cable.cross_section.value, cable.conductor_class)
    power_factor = cable.power_factor if cable.power_factor is not None else 1.0
    drop = sup.cable_voltage_drop(
        current, cable.length.value, row.resistance_per_length,
        phases=nameplate.phases, power_factor=power_factor,
        nominal_voltage=nameplate.rated_voltage.value, resistance_temperature_c=20.0,
        conductor_temperature_c=conductor_temperature)
    assert drop.fraction_of_nominal is not None
    percent = 100 * drop.fraction_of_nominal
    steps = (
        Step(current_label, _fmt(current, Dimension.CURRENT, "A"), current, "A"),
        Step("cable", f"{cable.length.format()} of {cable.cross_section.format()} class "
             f"{cable.conductor_class} copper", cable.length.value, "m"),
        Step("conductor resistance at 20 °C", row.describe(), row.resistance_per_length, "Ω/m"),
        Step(f"resistance at {conductor_temperature:g} °C",
             _fmt(drop.resistance_per_length * 1000, Dimension.RESISTANCE, "Ω") + "/km",
             drop.resistance_per_length, "Ω/m", formula="R_θ = R₂₀ · (k + θ)/(k + 20 °C)"),
        Step("power factor cos φ", f"{power_factor:g}" + ("" if cable.power_factor else
                                                          " (resistive: none given)"),
             power_factor, "1"),
        Step("reactance X", "neglected (0 Ω/m): the drop is resistive only, not IEC 60364-5-52 "
             "Annex G's λ = 0.08 mΩ/m", 0.0, "Ω/m"),
        Step("voltage drop ΔU", _fmt(drop.voltage_drop, Dimension.VOLTAGE, "V"),
             drop.voltage_drop, "V", formula=drop.model),
        Step("of nominal", f"{percent:.3f} % of {nameplate.rated_voltage.format()}", percent,
             "%"),
    )
    return _compare(tolerance, percent, steps,
                    sensitivity=sensitivity_scale * percent / reading.value.value,
                    capture_sensitivity=(percent / current if sensitivity_scale == 0.0
                                         else None),
                    compared="voltage drop ΔU / U_n",
                    source_note="recommended (informative); method: IEC 60228 resistance at "
                                f"{conductor_temperature:g} °C, reactance neglected")


def _source_impedance(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """Apparent source impedance from the no-load → under-load sag; recorded."""
    assert isinstance(reading.value, Quantity)
    no_load = context.reading_of(params["no_load_item"], reading.element)
    phases = context.nameplate.phases
    phase_names = ("L1", "L2", "L3") if phases == 3 else ("L",)
    currents = [context.reading_of(params["current_item"], name) for name in phase_names]
    values = [c.value.value for c in currents if c is not None and isinstance(c.value, Quantity)]
    if no_load is None or not isinstance(no_load.value, Quantity) or not values:
        return Outcome(Verdict.RECORDED, "recorded",
                       message=f"needs the no-load voltage ({params['no_load_item']}) and the "
                               f"load current ({params['current_item']}) to derive the source "
                               "impedance")
    current = sum(values) / len(values)
    try:
        impedance = sup.source_impedance_from_voltage_sag(no_load.value.value,
                                                          reading.value.value, current, phases)
    except ComputationError as error:
        return Outcome(Verdict.RECORDED, "recorded", message=str(error))
    steps = (
        Step("no-load voltage U₀", no_load.value.format(), no_load.value.value, "V"),
        Step("voltage under load U", reading.value.format(), reading.value.value, "V"),
        Step("load current I" + (" (mean of the phases)" if len(values) > 1 else ""),
             _fmt(current, Dimension.CURRENT, "A"), current, "A"),
        Step("source impedance Z", _fmt(impedance, Dimension.RESISTANCE, "Ω"), impedance, "Ω",
             formula="Z = (U₀ − U)/I" if phases == 1 else "Z = (U₀ − U)/(√3·I)"),
    )
    return Outcome(Verdict.RECORDED, "recorded (no criterion)", steps,
                   compared="source impedance Z",
                   message="the part of the impedance along the load's phase angle; "
                           "a baseline for later visits")


# ------------------------------------------------------------------ intermittent duty


_WELDERS = {"arc welder": "nonmotor_generator", "motor-generator arc welder": "motor_generator"}


def _intermittent_duty(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """The supply conductor of an intermittent load, by the rule for the kind of load.

    A welder's conductor is judged on the equivalent current NEC 630.11(A) defines (rated
    current × the Table 630.11(A) multiplier for its duty cycle); a motor's on the percentage
    of its nameplate current NEC Table 430.22(E) gives for its duty class and time rating.
    """
    assert isinstance(reading.value, Quantity)
    nameplate = context.nameplate
    kind = nameplate.load_kind
    if kind == "motor" and nameplate.duty_class is not None:
        return _motor_duty(reading, context)
    if nameplate.duty_cycle is None or nameplate.duty_cycle.value >= 100.0:
        return Outcome(Verdict.NOT_APPLICABLE, "continuous duty",
                       message="the nameplate duty cycle is 100 % or not given")
    if kind is None or kind == "motor":
        what = ("give the motor's duty_class and time_rating (NEC Table 430.22(E))"
                if kind == "motor" else
                "state load_kind in the nameplate (arc welder, motor-generator arc welder, "
                "motor or other): NEC 630.11(A) applies to welders, 430.22(E) to motors")
        return Outcome(Verdict.UNDETERMINED, "I_eq ≤ Iz",
                       message=f"the rule for an intermittent load depends on its kind; {what}")
    fraction = nameplate.duty_cycle.value / 100.0
    by_root = duty.equivalent_thermal_current(reading.value.value, fraction)
    steps = [
        Step("current while on I", reading.value.format(), reading.value.value, "A"),
        Step("duty cycle D", nameplate.duty_cycle.format(), nameplate.duty_cycle.value, "%"),
        Step("equivalent current by √D", _fmt(by_root, Dimension.CURRENT, "A"), by_root, "A",
             formula="I_eq = I · √D"),
    ]
    if kind in _WELDERS:
        multiplier = duty.nec_630_11_multiplier(fraction, _WELDERS[kind])
        compared = reading.value.value * multiplier.multiplier
        sensitivity = multiplier.multiplier
        steps += [
            Step("NEC multiplier", f"{multiplier.multiplier:.2f} ({multiplier.standard} "
                 f"{multiplier.clause}, {kind}, row {multiplier.table_row})",
                 multiplier.multiplier, "1"),
            Step("equivalent current I_eq", _fmt(compared, Dimension.CURRENT, "A"), compared,
                 "A", formula="I_eq = I × multiplier (NEC 630.11(A))"),
        ]
        basis = f"NEC 630.11(A), Table 630.11(A) ({kind})"
    else:
        # Another intermittent load: the Joule heating averaged over a period [P].
        compared, sensitivity = by_root, math.sqrt(fraction)
        basis = "I·√D, the heating averaged over the period [P]"
    cable = nameplate.supply_cable
    if cable is not None and cable.ampacity is not None:
        name, limit = "conductor ampacity", cable.ampacity.value
    elif nameplate.protective_device is not None and kind not in _WELDERS:
        name, limit = "protective device", nameplate.protective_device.rating.value
    else:
        return Outcome(Verdict.RECORDED, "recorded", tuple(steps),
                       message="no conductor ampacity (supply_cable.ampacity) on the nameplate")
    steps.append(Step(name, _fmt(limit, Dimension.CURRENT, "A"), limit, "A"))
    tolerance = Tolerance(Dimension.CURRENT, "I_eq", "A", None, limit)
    return _compare(tolerance, compared, steps, sensitivity=sensitivity,
                    compared="equivalent current I_eq",
                    source_note=f"{basis}; compared with the {name}")


def _motor_duty(reading: Reading, context: Context) -> Outcome:
    nameplate = context.nameplate
    if nameplate.time_rating is None or nameplate.duty_class is None:
        return Outcome(Verdict.UNDETERMINED, "I ≤ Iz",
                       message="give the motor's time_rating with its duty_class "
                               "(NEC Table 430.22(E))")
    row = duty.nec_430_22_e_percent(nameplate.duty_class, nameplate.time_rating)
    rated = nameplate.rated_current
    if rated is None:
        return Outcome(Verdict.UNDETERMINED, "I ≤ Iz",
                       message="NEC 430.22(E) sizes the conductor on the nameplate current; add "
                               "rated_current to machine.yaml")
    needed = rated.value * row.percent / 100.0
    steps = [
        Step("nameplate current", rated.format(), rated.value, "A"),
        Step("duty class and time rating", f"{row.duty_class}, {row.time_rating}"),
        Step("percentage", f"{row.percent:g} % ({row.standard}:{row.edition} {row.clause})",
             row.percent, "%"),
        Step("current for the conductor", _fmt(needed, Dimension.CURRENT, "A"), needed, "A",
             formula="I = nameplate current × percentage"),
    ]
    cable = nameplate.supply_cable
    if cable is None or cable.ampacity is None:
        return Outcome(Verdict.RECORDED, "recorded", tuple(steps),
                       message="no conductor ampacity (supply_cable.ampacity) on the nameplate")
    steps.append(Step("conductor ampacity", cable.ampacity.format(), cable.ampacity.value, "A"))
    tolerance = Tolerance(Dimension.CURRENT, "I", "A", None, cable.ampacity.value)
    return _compare(tolerance, needed, steps, sensitivity=0.0,
                    compared="nameplate current × Table 430.22(E) percentage",
                    source_note=f"{row.standard}:{row.edition} {row.clause} [M]",
                    source_replaces=True)


# ------------------------------------------------------------------ evaluate functions

# Each rule's evaluate function by the name of its specification in acceptance.rule_specs.
EVALUATORS: dict[str, Evaluate] = {
    "stored_energy_discharge": _stored_energy_discharge,
    "voltage_unbalance": _voltage_unbalance,
    "insulation_resistance": _insulation_resistance,
    "polarization_index": _polarization_index,
    "absorption_ratio": _absorption_ratio,
    "bonding_resistance": _bonding_resistance,
    "cable_voltage_drop": _cable_voltage_drop,
    "source_impedance": _source_impedance,
    "intermittent_duty": _intermittent_duty,
}
