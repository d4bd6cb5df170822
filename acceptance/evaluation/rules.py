"""The rules a checklist item's check can name, and what each computes.

A checklist says *which* rule applies and with which parameters (declarative
YAML); the rule here does the arithmetic, returns the verdict, the tolerance
phrase and every intermediate value. Rules call the pure functions in
:mod:`acceptance.computations` for the engineering; they never format HTML.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from ..capacitor_codes import tolerance_window
from ..computations import isolation
from ..results import Step, Verdict
from ..rule_specs import REFERENCES, RuleSpec
from ..tolerance import Tolerance
from ..units import Basis, Dimension, Quantity, format_value, parse_quantity
from . import engineering as eng

if TYPE_CHECKING:
    from ..computations.waveform import WaveformMetrics
    from ..loading import Job, LoadedMachine, LoadedVisit, Reading
    from ..model import ChecklistItem, Nameplate

__all__ = ["EVALUATORS", "Context", "Evaluate", "Outcome", "Rule", "SYMBOLS"]

SYMBOLS = {
    Dimension.VOLTAGE: "U", Dimension.CURRENT: "I", Dimension.RESISTANCE: "R",
    Dimension.CAPACITANCE: "C", Dimension.FREQUENCY: "f", Dimension.TEMPERATURE: "θ",
    Dimension.TEMPERATURE_DIFFERENCE: "Δθ", Dimension.RATIO: "x", Dimension.TIME: "t",
    Dimension.POWER: "P", Dimension.APPARENT_POWER: "S", Dimension.REACTIVE_POWER: "Q",
    Dimension.LENGTH: "l", Dimension.AREA: "A", Dimension.ENERGY: "E", Dimension.CHARGE: "Q",
    Dimension.NUMBER: "n",
}


@dataclass(frozen=True)
class Context:
    """Everything a rule may look at besides the reading itself."""

    job: Job
    machine: LoadedMachine
    visit: LoadedVisit
    item: ChecklistItem
    element: Any  # WindingSpec | CapacitorSpec | SurveyPoint | None

    @property
    def nameplate(self) -> Nameplate:
        return self.machine.model.nameplate

    def reading_of(self, key: str, element: str | None) -> Reading | None:
        checklist, _, item = key.partition(".")
        for reading in self.visit.readings.get((checklist, item), []):
            if reading.element == element:
                return reading
        return None

    def instrument_basis(self, reading: Reading) -> Basis | None:
        if isinstance(reading.value, Quantity) and reading.value.basis is not None:
            return reading.value.basis
        instrument = self.job.instruments.get(reading.instrument or "")
        if instrument is None:
            return None
        return {"true-rms": Basis.RMS, "average-responding": Basis.AVERAGE}.get(
            instrument.response)


@dataclass(frozen=True)
class Outcome:
    verdict: Verdict
    limit: str
    steps: tuple[Step, ...] = ()
    message: str | None = None
    compared: str | None = None
    source_note: str | None = None
    source_replaces: bool = False  # source_note names the criterion's real source
    # For decision rules that account for the instrument: the tolerance, the value compared
    # with it, and how much that value moves per unit of the reading (∂compared/∂reading).
    tolerance: Tolerance | None = None
    compared_value: float | None = None
    sensitivity: float = 1.0
    # A value taken from an attached capture's current channel: ∂compared/∂captured value,
    # so the scope's and probe's uncertainty is propagated instead of the reading's.
    capture_sensitivity: float | None = None


def _compare(tolerance: Tolerance, value: float, steps: tuple[Step, ...] | list[Step] = (),
             sensitivity: float = 1.0, **fields: Any) -> Outcome:
    return Outcome(_judge(tolerance, value), tolerance.describe(), tuple(steps),
                   tolerance=tolerance, compared_value=value, sensitivity=sensitivity, **fields)


Evaluate = Callable[["Reading", Context, dict[str, Any]], Outcome]


@dataclass(frozen=True)
class Rule:
    """A rule's specification (name, parameters) with the function that evaluates it."""

    spec: RuleSpec
    evaluate: Evaluate

    @property
    def name(self) -> str:
        return self.spec.name

    @property
    def summary(self) -> str:
        return self.spec.summary


def _reference(name: str, context: Context) -> Quantity | None:
    nameplate = context.nameplate
    if name == "rated_voltage":
        return nameplate.rated_voltage
    if name == "rated_frequency":
        return nameplate.frequency
    if name == "rated_current":
        return nameplate.rated_current
    if name == "protective_device":
        device = nameplate.protective_device
        return device.rating if device else None
    if name == "conductor":
        cable = nameplate.supply_cable
        return cable.ampacity if cable else None
    raise KeyError(name)  # pragma: no cover - validated against REFERENCES


def _symbol(reading: Reading) -> str:
    assert isinstance(reading.value, Quantity)
    return SYMBOLS[reading.value.dimension]


def _judge(tolerance: Tolerance, value: float) -> Verdict:
    return Verdict.PASS if tolerance.contains(value) else Verdict.FAIL


def _display_unit(reading: Reading, context: Context) -> str:
    assert isinstance(reading.value, Quantity)
    return context.item.unit if context.item.unit else reading.value.unit


# ------------------------------------------------------------------ generic rules


def _confirmed(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    verdict = Verdict.PASS if reading.value is True else Verdict.FAIL
    return Outcome(verdict, "confirmed (yes)")


def _bound(kind: str) -> Callable[[Reading, Context, dict[str, Any]], Outcome]:
    def evaluate(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
        assert isinstance(reading.value, Quantity)
        limit = parse_quantity(params["limit"], reading.value.dimension)
        unit = limit.unit or _display_unit(reading, context)
        symbol = _symbol(reading)
        tolerance = (Tolerance(limit.dimension, symbol, unit, None, limit.value) if kind == "max"
                     else Tolerance(limit.dimension, symbol, unit, limit.value, None))
        return _compare(tolerance, reading.value.value)

    return evaluate


def _window(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    lower = parse_quantity(params["lower"], reading.value.dimension)
    upper = parse_quantity(params["upper"], reading.value.dimension)
    tolerance = Tolerance(lower.dimension, _symbol(reading),
                          lower.unit or _display_unit(reading, context), lower.value, upper.value)
    return _compare(tolerance, reading.value.value)


def _absence_of_voltage(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """A reading at an isolated point: zero, or explained in a note and within the limit."""
    assert isinstance(reading.value, Quantity)
    default = f"{isolation.ABSENCE_OF_VOLTAGE_DEFAULT_LIMIT:g} V"
    limit = parse_quantity(params.get("limit", default), Dimension.VOLTAGE)
    unit = limit.unit or _display_unit(reading, context)
    tolerance = Tolerance(Dimension.VOLTAGE, "U", unit, None, limit.value)
    explained = bool(reading.note and reading.note.strip())
    judged = isolation.assess_absence_of_voltage(reading.value.value, limit.value, explained)
    steps = (Step("absence of voltage", judged.message),)
    if judged.dead is None:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(), steps, message=judged.message)
    return _compare(tolerance, reading.value.value, steps)


def _relative_to(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    label, _dimension = REFERENCES[params["reference"]]
    reference = _reference(params["reference"], context)
    if reference is None:
        return Outcome(Verdict.UNDETERMINED, f"{label} ±…",
                       message=f"the nameplate gives no {label}; add it to machine.yaml")
    lower_pct = parse_quantity(params.get("lower", "0 %"), Dimension.RATIO).value
    upper_pct = parse_quantity(params.get("upper", "0 %"), Dimension.RATIO).value
    lower = reference.value * (1 + lower_pct / 100)
    upper = reference.value * (1 + upper_pct / 100)
    unit = reference.unit or _display_unit(reading, context)
    tolerance = Tolerance(reference.dimension, _symbol(reading), unit, lower, upper)
    steps = (
        Step(f"nameplate {label}", reference.format(), reference.value, reference.base_unit),
        Step("window", f"{_pct(lower_pct)} … {_pct(upper_pct)} of {reference.format()}",
             formula=f"{label} × (1 {_signed(lower_pct)}) … {label} × (1 {_signed(upper_pct)})"),
        Step("deviation from nominal",
             f"{_pct(100 * (reading.value.value / reference.value - 1))}",
             100 * (reading.value.value / reference.value - 1), "%"),
    )
    return _compare(tolerance, reading.value.value, steps)


def _article(phrase: str) -> str:
    return "an" if phrase[:1].lower() in "aeiou" or phrase.startswith("RMS") else "a"


def _pct(value: float) -> str:
    return f"{value:+.2f} %".replace("+0.00", "0.00").replace("-0.00", "0.00")


def _signed(percent: float) -> str:
    sign = "+" if percent >= 0 else "−"
    return f"{sign} {abs(percent) / 100:g}"


def _current_against(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    """Current against a rating, on a comparable basis (RMS, average, d.c.)."""
    assert isinstance(reading.value, Quantity)
    reference_name = params["reference"]
    label, _ = REFERENCES[reference_name]
    reference = _reference(reference_name, context)
    factor = float(params.get("factor", 1.0))
    if reference is None and reference_name == "conductor":
        # The designer's Iz is often not on site; the check is kept visible, not failed.
        return Outcome(Verdict.RECORDED, "I ≤ Iz",
                       message="no current-carrying capacity (ampacity) is given for the supply "
                               "cable in machine.yaml; add it to check the conductor")
    if reference is None:
        return Outcome(Verdict.UNDETERMINED, f"I ≤ {label}",
                       message=f"the nameplate gives no {label}; add it to machine.yaml")
    if reference_name == "rated_current":
        needed = context.nameplate.current_basis
    else:
        # A protective device and a conductor heat with the RMS current (IEC 60898-1 and
        # IEC 60364-4-43 rate devices in r.m.s. terms) [M].
        needed = Basis.RMS
    basis = context.instrument_basis(reading)
    limit = reference.value * factor
    tolerance = Tolerance(Dimension.CURRENT, "I", reference.unit or "A", None, limit)
    steps = [Step(label, reference.format(), reference.value, "A")]
    if factor != 1.0:
        steps.append(Step("allowed", f"{factor:g} × {reference.format()} = "
                          f"{format_value(limit, Dimension.CURRENT, 'A')}", limit, "A"))
    steps.append(Step("basis of the reading", basis.phrase if basis else "not stated"))
    steps.append(Step(f"basis of the {label}", needed.phrase))
    captured = _captured_current(reading)
    if captured is not None and basis is not needed and needed in (Basis.RMS, Basis.AVERAGE):
        # The capture settles what flows: compare its value on the rating's own basis.
        value = captured.rms if needed is Basis.RMS else captured.average_responding_ac
        label_value = "true RMS" if needed is Basis.RMS else "average-responding display"
        steps.append(Step(f"{label_value} from the capture",
                          format_value(value, Dimension.CURRENT, "A"), value, "A"))
        steps.append(Step("loading", f"{100 * value / limit:.1f} % of the limit",
                          100 * value / limit, "%"))
        return _compare(tolerance, value, steps, compared=f"{label_value} from the capture",
                        sensitivity=0.0, capture_sensitivity=1.0)
    if basis is None:
        return Outcome(Verdict.UNDETERMINED, tolerance.describe(), tuple(steps),
                       message="the reading's basis is unknown; name the instrument or write "
                               "'RMS', 'avg' or 'd.c.' after the value")
    if basis is not needed:
        advice = ("measure the d.c. current itself (e.g. on the d.c. side, meter on d.c.) and "
                  "write 'd.c.' after the value" if needed is Basis.DC else
                  "measure with a true-RMS instrument or attach a waveform capture")
        return Outcome(
            Verdict.UNDETERMINED, tolerance.describe(), tuple(steps),
            message=f"{_article(basis.phrase)} {basis.phrase} reading cannot be compared with "
                    f"{_article(needed.phrase)} {needed.phrase} {label}; {advice}")
    nameplate = context.nameplate
    welder = (eng.welder_multiplier(nameplate.load_kind, nameplate.duty_cycle.value
                                    if nameplate.duty_cycle is not None else None)
              if reference_name == "conductor" else None)
    if welder is not None:
        # NEC 630.11(A): a welder's supply conductor is sized on the equivalent current, not
        # on the current while welding; judging it on the raw current would fail the same
        # cable the duty check passes.
        value = reading.value.value * welder.multiplier
        steps += [Step("NEC multiplier", f"{welder.multiplier:.2f} ({welder.standard} "
                       f"{welder.clause}, row {welder.table_row})", welder.multiplier, "1"),
                  Step("equivalent current I_eq", format_value(value, Dimension.CURRENT, "A"),
                       value, "A", formula="I_eq = I × multiplier (NEC 630.11(A))"),
                  Step("loading", f"{100 * value / limit:.1f} % of the limit",
                       100 * value / limit, "%")]
        return _compare(Tolerance(Dimension.CURRENT, "I_eq", reference.unit or "A", None, limit),
                        value, steps, sensitivity=welder.multiplier,
                        compared="equivalent current I_eq of NEC 630.11(A)",
                        source_note="a welder's supply conductor: NEC 630.11(A), "
                                    "Table 630.11(A)")
    steps.append(Step("loading", f"{100 * reading.value.value / limit:.1f} % of the limit",
                      100 * reading.value.value / limit, "%"))
    return _compare(tolerance, reading.value.value, steps)


def _captured_current(reading: Reading) -> WaveformMetrics | None:
    capture = reading.capture
    if capture is None or capture.current_channel is None:
        return None
    for channel in capture.channels:
        if channel.name == capture.current_channel:
            metrics: WaveformMetrics = channel.metrics
            return metrics
    return None


# ------------------------------------------------------------------ windings


def _winding_resistance(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    winding = context.element
    measured_at = reading.extras.get("temperature")
    if measured_at is None:
        return Outcome(Verdict.UNDETERMINED, "R at reference temperature",
                       message="record the winding temperature with the reading "
                               "(temperature: 21 °C) so it can be corrected")
    reference_temperature = (winding.resistance_temperature
                             or context.job.model.reference_temperature)
    constant = eng.temperature_constant(winding.material, params.get("constant", "IEC 60034-1"))
    corrected = eng.resistance_at_temperature(
        reading.value.value, temperature=measured_at.value,
        target_temperature=reference_temperature.value, constant=constant)
    steps = [
        Step("winding temperature", measured_at.format(), measured_at.value, "°C"),
        Step("conductor constant k", f"{constant.describe()}, as "
             f"{params.get('constant', 'IEC 60034-1')} adopts for {constant.material}",
             constant.temperature_constant, "°C"),
        Step(f"R at {reference_temperature.format()}", format_value(corrected, Dimension.RESISTANCE,
             reading.value.unit), corrected, "Ω",
             formula="R₂ = R₁ · (k + θ₂) / (k + θ₁)"),
    ]
    if winding.resistance is None:
        return Outcome(Verdict.RECORDED, "no nameplate value", tuple(steps),
                       compared=f"R at {reference_temperature.format()}",
                       message="the nameplate gives no resistance; the corrected value is "
                               "recorded as the baseline")
    tolerance_pct = (winding.resistance_tolerance.value if winding.resistance_tolerance
                     else parse_quantity(params["default_tolerance"], Dimension.RATIO).value)
    nominal = winding.resistance.value
    tolerance = Tolerance(Dimension.RESISTANCE, "R", winding.resistance.unit,
                          nominal * (1 - tolerance_pct / 100), nominal * (1 + tolerance_pct / 100))
    steps.append(Step("nameplate resistance", f"{winding.resistance.format()} ± "
                      f"{tolerance_pct:g} % at {reference_temperature.format()}", nominal, "Ω"))
    steps.append(Step("deviation", _pct(100 * (corrected / nominal - 1)),
                      100 * (corrected / nominal - 1), "%"))
    if winding.resistance_tolerance:
        note, replaces = "manufacturer's data (nameplate resistance and tolerance)", True
    else:
        note = f"default tolerance ±{tolerance_pct:g} % (no tolerance on the nameplate)"
        replaces = False
    return _compare(tolerance, corrected, steps, sensitivity=corrected / reading.value.value,
                    compared=f"R at {reference_temperature.format()}", source_note=note,
                    source_replaces=replaces)


# ------------------------------------------------------------------ capacitors


def _capacitance(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    capacitor = context.element
    lower_pct, upper_pct, description = tolerance_window(capacitor.tolerance)
    nominal = capacitor.nominal
    tolerance = Tolerance(Dimension.CAPACITANCE, "C", nominal.unit,
                          nominal.value * (1 + lower_pct / 100),
                          nominal.value * (1 + upper_pct / 100))
    steps = (
        Step("nominal", nominal.format(), nominal.value, "F"),
        Step("tolerance", f"{description}: {lower_pct:+g} % / {upper_pct:+g} %"),
        Step("deviation", _pct(100 * (reading.value.value / nominal.value - 1)),
             100 * (reading.value.value / nominal.value - 1), "%"),
        *_capacitor_field_check(capacitor, reading.value.value, context),
    )
    return _compare(tolerance, reading.value.value, steps)


def _capacitor_field_check(capacitor: Any, capacitance: float, context: Context) -> list[Step]:
    """The a.c. field check of a run capacitor: its reactance at the supply frequency and the
    current it should draw at its working voltage, from the measured capacitance.

    The working voltage is recorded as a peak (it also gives the stored energy); on a
    sinusoidal supply the r.m.s. voltage across the capacitor is Û/√2. A clamp reading of the
    capacitor's current far from this figure points to a failing capacitor or a wrong
    working voltage [P] (reference values §13).
    """
    frequency = context.nameplate.frequency
    if capacitor.circuit != "ac" or frequency is None or capacitance <= 0:
        return []
    f = frequency.value
    reactance = eng.capacitive_reactance(capacitance, f)
    steps = [Step("Xc at the supply frequency", format_value(reactance, Dimension.RESISTANCE),
                  reactance, "Ω",
                  formula=f"Xc = 1/(2π·f·C), f = {format_value(f, Dimension.FREQUENCY)}, "
                          f"C as measured")]
    if capacitor.working_voltage is not None:
        volts = capacitor.working_voltage.value / math.sqrt(2)
        current = volts / reactance
        steps.append(Step("expected current", format_value(current, Dimension.CURRENT), current,
                          "A", formula=f"I = U/Xc, U = Û/√2 = "
                                       f"{format_value(volts, Dimension.VOLTAGE)} "
                                       f"(working voltage, sinusoidal supply)"))
    return steps


# ------------------------------------------------------------------ temperature


def _rise_by_resistance(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    winding = context.element
    cold = context.reading_of(params["cold_item"], reading.element)
    if cold is None or not isinstance(cold.value, Quantity) or "temperature" not in cold.extras:
        return Outcome(Verdict.UNDETERMINED, "Δθ ≤ class limit",
                       message=f"needs the cold resistance and its temperature "
                               f"({params['cold_item']}) for this winding")
    ambient = reading.extras.get("ambient") or context.visit.model.conditions.ambient
    if ambient is None:
        return Outcome(Verdict.UNDETERMINED, "Δθ ≤ class limit",
                       message="record the ambient (coolant) temperature at the end of the "
                               "test: 'ambient' with the reading or under conditions")
    constant = eng.temperature_constant(winding.material, params.get("constant", "IEC 60034-1"))
    rise = eng.rise_by_resistance(
        cold_resistance=cold.value.value, hot_resistance=reading.value.value,
        cold_temperature=cold.extras["temperature"].value, ambient_temperature=ambient.value,
        constant=constant)
    if winding.rise_limit is not None:
        limit_value = winding.rise_limit.value
        limit_source = "manufacturer's rise limit for this winding"
    else:
        try:
            limit = eng.rise_limit(
                winding.thermal_class, params.get("standard", "IEC 60034-1"), winding.kind,
                winding.small_or_encapsulated,
                winding.hot_spot_allowance.value if winding.hot_spot_allowance else None)
        except ValueError as error:
            return Outcome(Verdict.UNDETERMINED, "Δθ ≤ class limit",
                           message=f"{error}; give the manufacturer's rise_limit for the winding")
        limit_value = limit.limit
        limit_source = eng.limit_source(limit)
    tolerance = Tolerance(Dimension.TEMPERATURE_DIFFERENCE, "Δθ", "K", None, limit_value)
    steps = (
        Step("cold resistance R₁", cold.value.format(), cold.value.value, "Ω"),
        Step("cold winding temperature θ₁", cold.extras["temperature"].format(),
             cold.extras["temperature"].value, "°C"),
        Step("hot resistance R₂", reading.value.format(), reading.value.value, "Ω"),
        Step("ambient θa", ambient.format(), ambient.value, "°C"),
        Step("conductor constant k", constant.describe(), constant.temperature_constant, "°C"),
        Step("temperature rise Δθ", format_value(rise, Dimension.TEMPERATURE_DIFFERENCE, "K"),
             rise, "K", formula="Δθ = (R₂ − R₁)/R₁ · (k + θ₁) + θ₁ − θa"),
        Step("limit", f"{limit_value:g} K — {limit_source}", limit_value, "K"),
    )
    # ∂Δθ/∂R₂ = (k + θ₁)/R₁: how a hot-resistance uncertainty moves the rise.
    sensitivity = (constant.temperature_constant + cold.extras["temperature"].value
                   ) / cold.value.value
    # The checklist cites IEC 60034-1; a coil, a transformer or a manufacturer's figure has
    # another basis, and the record names that one alone.
    replaces = winding.rise_limit is not None or winding.kind != "rotating_machine"
    return _compare(tolerance, rise, steps, sensitivity=sensitivity,
                    compared="temperature rise Δθ", source_note=limit_source,
                    source_replaces=replaces)


def _rise_over_ambient(reading: Reading, context: Context, params: dict[str, Any]) -> Outcome:
    assert isinstance(reading.value, Quantity)
    point = context.element
    ambient = reading.extras.get("ambient") or context.visit.model.conditions.ambient
    if ambient is None:
        return Outcome(Verdict.UNDETERMINED, "θ − θa",
                       message="record the ambient temperature under conditions")
    rise = reading.value.value - ambient.value
    steps = [Step("ambient θa", ambient.format(), ambient.value, "°C"),
             Step("rise over ambient", format_value(rise, Dimension.TEMPERATURE_DIFFERENCE, "K"),
                  rise, "K", formula="Δθ = θ − θa")]
    if point.rise_limit is not None:
        tolerance = Tolerance(Dimension.TEMPERATURE_DIFFERENCE, "Δθ", "K", None,
                              point.rise_limit.value)
        return _compare(tolerance, rise, steps,
                       compared="rise over ambient", source_note="limit for this survey point")
    if point.limit is not None:
        tolerance = Tolerance(Dimension.TEMPERATURE, "θ", "°C", None, point.limit.value)
        return _compare(tolerance, reading.value.value, steps,
                        source_note="limit for this survey point")
    return Outcome(Verdict.RECORDED, "no limit for this point", tuple(steps))


# ------------------------------------------------------------------ evaluate functions

# Each rule's evaluate function by the name of its specification in acceptance.rule_specs;
# acceptance.evaluation.registry joins them.
EVALUATORS: dict[str, Evaluate] = {
    "confirmed": _confirmed,
    "at_most": _bound("max"),
    "at_least": _bound("min"),
    "window": _window,
    "absence_of_voltage": _absence_of_voltage,
    "relative_to": _relative_to,
    "current_against": _current_against,
    "winding_resistance": _winding_resistance,
    "capacitance_tolerance": _capacitance,
    "rise_by_resistance": _rise_by_resistance,
    "rise_over_ambient": _rise_over_ambient,
}
