"""What the instrument that took a reading does to its verdict.

Every reading's expanded uncertainty comes from the instrument register
(JCGM 100:2008); the job's decision rule (ILAC-G8:09/2019) turns a comparison
with a tolerance into pass, conditional pass, conditional fail or fail; an
instrument out of calibration on the visit date cannot give a plain pass; a
measurement category below the point's is a safety finding; an
average-responding instrument where true RMS is needed is flagged.
"""

from __future__ import annotations

import datetime as _dt
import functools
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from ..computations import ComputationError
from ..computations import uncertainty as unc
from ..model import AccuracyEntry, ChecklistItem, Instrument
from ..results import Verdict
from ..tolerance import Tolerance
from ..units import Dimension, Quantity, format_value, parse_quantity
from .rules import Outcome

if TYPE_CHECKING:  # numpy only when a capture is attached
    from ..captures import CaptureAnalysis

__all__ = ["Assessment", "ReadingUncertainty", "assess", "reading_uncertainty"]

_STATEMENT_VERDICT = {
    unc.Statement.PASS: Verdict.PASS,
    unc.Statement.CONDITIONAL_PASS: Verdict.CONDITIONAL_PASS,
    unc.Statement.CONDITIONAL_FAIL: Verdict.CONDITIONAL_FAIL,
    unc.Statement.FAIL: Verdict.FAIL,
}


@dataclass(frozen=True)
class ReadingUncertainty:
    expanded: float  # U in the reading's base unit
    standard: float  # u
    coverage_factor: float
    phrase: str  # "U = 1.6 V (k = 2), from ±(0.5 % of reading + 2 digits), range 600 V"


@dataclass(frozen=True)
class Assessment:
    verdict: Verdict
    decision: str | None
    conformance: float | None
    message: str | None
    # The decision rule's guard band w and the acceptance limits (each tolerance limit moved
    # inward by w, ILAC-G8:09/2019 cl. 4.2.2); w = 0 under simple acceptance.
    guard_band: float | None = None
    acceptance_lower: float | None = None
    acceptance_upper: float | None = None
    acceptance: str | None = None  # the acceptance limits as a phrase, e.g. "U ≤ 252.2 V"
    conformance_basis: str | None = None  # the distribution the probability assumes


# JCGM 106:2012 cl. 9.2: with a normal PDF for the measurand, the probability of conformity
# is computed from the best estimate and its standard uncertainty u (not U = k·u) [M].
def conformance_basis(standard: float, dimension: Dimension, unit: str) -> str:
    return (f"normal distribution with the standard uncertainty u = "
            f"{format_value(standard, dimension, unit, 2)} about the compared value, "
            f"JCGM 106:2012 cl. 9.2 [M]")


def _entry_for(instrument: Instrument, reading: Quantity,
               chosen_range: Quantity | None) -> tuple[AccuracyEntry, Quantity | None] | None:
    candidates: list[tuple[AccuracyEntry, Quantity | None]] = []
    for entry in instrument.functions:
        try:
            dimension = parse_quantity(f"1 {entry.measures}", *Dimension).dimension
        except ValueError:
            continue
        if dimension is not reading.dimension:
            continue
        full_scale = parse_quantity(entry.range, dimension) if entry.range else None
        candidates.append((entry, full_scale))
    if not candidates:
        return None
    if chosen_range is not None:
        for entry, full_scale in candidates:
            if full_scale is not None and abs(full_scale.value - chosen_range.value) <= (
                    1e-9 * abs(chosen_range.value)):
                return entry, full_scale
        return None
    # An auto-ranging meter settles on the smallest range that holds the reading.
    fitting = [(e, fs) for e, fs in candidates if fs is None or fs.value >= abs(reading.value)]
    if not fitting:
        return None
    return min(fitting, key=lambda c: float("inf") if c[1] is None else c[1].value)


@functools.lru_cache(maxsize=1024)
def _specification(text: str) -> unc.AccuracySpec:
    return unc.parse_accuracy_specification(text)


def reading_uncertainty(instrument: Instrument | None, reading: Quantity,
                        chosen_range: Quantity | None,
                        coverage_factor: float) -> ReadingUncertainty | str:
    """The reading's uncertainty, or a phrase saying why it is not known."""
    if instrument is None:
        return "no instrument named"
    found = _entry_for(instrument, reading, chosen_range)
    if found is None:
        if chosen_range is not None:
            return (f"the register gives no {chosen_range.format()} range for "
                    f"{instrument.id}")
        return f"the register gives no accuracy for {instrument.id} on this function"
    entry, full_scale = found
    unit = entry.measures
    specification = _specification(entry.accuracy)
    resolution = (parse_quantity(entry.resolution, reading.dimension).in_unit(unit)
                  if entry.resolution else None)
    try:
        budget = unc.instrument_uncertainty(
            reading.in_unit(unit), specification, resolution=resolution,
            range_full_scale=full_scale.in_unit(unit) if full_scale else None,
            coverage_factor=coverage_factor, reading_unit=unit)
    except ComputationError as error:
        return f"uncertainty not computed: {error}"
    factor = parse_quantity(f"1 {unit}", reading.dimension).value
    expanded = budget.expanded_uncertainty * factor
    phrase = (f"U = {format_value(expanded, reading.dimension, unit, 2)} (k = "
              f"{coverage_factor:g}), from {specification.describe()}"
              + (f", range {full_scale.format()}" if full_scale else ""))
    return ReadingUncertainty(expanded, budget.combined_standard_uncertainty * factor,
                              coverage_factor, phrase)


def capture_uncertainty(instruments: dict[str, Instrument], setup: Any, channel: str | None,
                        value: float, dimension: Dimension,
                        coverage_factor: float) -> ReadingUncertainty | str:
    """The uncertainty of a value taken from a capture's channel, from the register.

    The scope's accuracy applies to the voltage at its input (the value over the channel's
    scaling factor) and is scaled back; the probe's ratio or sensitivity accuracy applies to
    the value itself. Both standard uncertainties are combined in quadrature (JCGM 100:2008
    5.1.2, uncorrelated inputs) [S] and expanded with the job's coverage factor.
    """
    if setup is None or setup.scope is None:
        return ("the capture names no scope ('instrument:' under capture), so its "
                "uncertainty is not known")
    if channel is None or channel not in setup.factors:
        return "the capture's channel has no scaling"
    scope = instruments[setup.scope]
    factor = setup.factors[channel]
    at_input = reading_uncertainty(scope, Quantity(value / factor, Dimension.VOLTAGE), None,
                                   coverage_factor)
    if isinstance(at_input, str):
        return f"{setup.scope}: {at_input} (volts at the scope's input)"
    standard = at_input.standard * abs(factor)
    parts = [f"{setup.scope} {at_input.phrase.split(', from ', 1)[-1]}"]
    probe_id = setup.probes.get(channel)
    if probe_id is not None:
        by_probe = reading_uncertainty(instruments[probe_id], Quantity(value, dimension), None,
                                       coverage_factor)
        if isinstance(by_probe, str):
            return f"{probe_id}: {by_probe}"
        standard = (standard**2 + by_probe.standard**2) ** 0.5
        parts.append(f"{probe_id} {by_probe.phrase.split(', from ', 1)[-1]}")
    else:
        parts.append(f"no probe named for {channel}: its accuracy is not included")
    expanded = coverage_factor * standard
    unit = {Dimension.CURRENT: "A", Dimension.VOLTAGE: "V"}.get(dimension)
    phrase = (f"U = {format_value(expanded, dimension, unit, 2)} (k = {coverage_factor:g}) "
              f"of the capture's {channel}, from " + " and ".join(parts))
    return ReadingUncertainty(expanded, standard, coverage_factor, phrase)


def assess(outcome: Outcome, uncertainty: ReadingUncertainty | str, rule_name: str,
           instrument: Instrument | None, visit_date: _dt.date, item: ChecklistItem,
           ) -> Assessment:
    """Apply the decision rule and the calibration state to one check's outcome."""
    verdict = outcome.verdict
    decision = None
    conformance = None
    basis = None
    guard: tuple[float, float | None, float | None, str] | None = None
    messages: list[str] = []
    rule = unc.DecisionRule(rule_name)
    tolerance = outcome.tolerance
    if (tolerance is not None and outcome.compared_value is not None
            and verdict in (Verdict.PASS, Verdict.FAIL)):
        if isinstance(uncertainty, ReadingUncertainty):
            expanded = uncertainty.expanded * abs(outcome.sensitivity)
            standard = uncertainty.standard * abs(outcome.sensitivity)
            result = unc.decide_conformity(
                outcome.compared_value, lower_limit=tolerance.lower, upper_limit=tolerance.upper,
                expanded_uncertainty=expanded, rule=rule)
            verdict = _STATEMENT_VERDICT[result.statement]
            decision = (f"{rule.value}; U = "
                        f"{format_value(expanded, tolerance.dimension, tolerance.unit, 2)}"
                        + (" (propagated to the compared value)"
                           if abs(outcome.sensitivity - 1.0) > 1e-12 else ""))
            accepted = Tolerance(tolerance.dimension, tolerance.symbol, tolerance.unit,
                                 result.acceptance_lower, result.acceptance_upper,
                                 tolerance.digits)
            guard = (result.guard_band, result.acceptance_lower, result.acceptance_upper,
                     accepted.describe())
            distance = tolerance.distance_outside(outcome.compared_value)
            if standard > 0 and abs(distance) <= 2 * expanded:
                conformance = unc.conformance_probability(
                    outcome.compared_value, standard, tolerance.lower, tolerance.upper)
                basis = conformance_basis(standard, tolerance.dimension, tolerance.unit)
        else:
            decision = f"{rule.value} could not account for the instrument: {uncertainty}"
            if rule is unc.DecisionRule.GUARDED and verdict is Verdict.PASS:
                verdict = Verdict.CONDITIONAL_PASS
                messages.append("no instrument accuracy: the guard band is unknown")
    # A value taken from an attached capture does not rest on this instrument's reading.
    from_reading = outcome.sensitivity != 0.0 or outcome.compared_value is None
    if (instrument is not None and from_reading
            and verdict in (Verdict.PASS, Verdict.CONDITIONAL_PASS)):
        state = unc.calibration_state(instrument.calibrated, instrument.calibration_due,
                                      visit_date)
        if not state.valid:
            verdict = Verdict.UNDETERMINED
            messages.append(f"{instrument.id}: {state.phrase} on the visit date "
                            f"({visit_date.isoformat()}); repeat with a calibrated instrument")
    if guard is None:
        return Assessment(verdict, decision, conformance, "; ".join(messages) or None,
                          conformance_basis=basis)
    return Assessment(verdict, decision, conformance, "; ".join(messages) or None,
                      guard_band=guard[0], acceptance_lower=guard[1],
                      acceptance_upper=guard[2], acceptance=guard[3], conformance_basis=basis)


def capture_findings(instrument: Instrument | None,
                     capture: CaptureAnalysis | None) -> list[str]:
    """What the capture says about the instrument's reading on this waveform."""
    if capture is None:
        return []
    findings = []
    for channel in capture.channels:
        metrics = channel.metrics
        response = unc.average_responding_finding(
            instrument_true_rms=instrument is None or instrument.response != "average-responding",
            crest_factor=metrics.crest_factor, form_factor=metrics.form_factor)
        if response.flagged and instrument is not None:
            unit = channel.unit
            findings.append(
                f"{instrument.id} is average-responding and the {channel.name} waveform is not "
                f"sinusoidal (crest factor {metrics.crest_factor:.2f}): true RMS "
                f"{metrics.rms:.4g} {unit} from the capture, this meter would show "
                f"{metrics.average_responding_ac:.4g} {unit}")
        if channel.clipped:
            findings.append(f"capture channel {channel.name} clips: its RMS and peak are "
                            "under-estimated")
    return findings


def instrument_findings(instrument: Instrument | None, item: ChecklistItem,
                        working_voltage: Quantity | None, visit_date: _dt.date) -> list[str]:
    """Safety and suitability findings about the instrument itself (not the reading)."""
    findings: list[str] = []
    if instrument is None:
        return findings
    if item.category is not None and working_voltage is not None:
        if instrument.category_rank is None:
            findings.append(f"safety: {instrument.id} has no measurement category in the "
                            f"register; the point is CAT {item.category}")
        else:
            roman = {1: "I", 2: "II", 3: "III", 4: "IV"}[instrument.category_rank]
            category = unc.measurement_category_finding(
                unc.parse_measurement_category(f"CAT {roman}"),
                instrument.category_voltage or 0.0,
                unc.parse_measurement_category(f"CAT {item.category}"),
                working_voltage.value)
            if not category.adequate:
                findings.append(f"safety: {category.phrase}")
    if item.needs_true_rms and instrument.response == "average-responding":
        findings.append(f"{instrument.id} is average-responding; this item needs a true-RMS "
                        "reading (distorted currents are under-read)")
    return findings
