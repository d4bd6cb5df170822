"""Evaluation: a pure function from a loaded job to results.

Nothing here reads or writes files. ``check``, ``build`` and every other command
call :func:`evaluate_job` and get the same verdicts for the same inputs.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
from collections import Counter
from collections.abc import Sequence

from .. import __version__
from ..computations import ComputationError
from ..history import (
    COMPARISON_SCHEMA,
    VisitComparison,
    compare_rule,
    compare_visits,
    comparison_to_json,
    part_behaviour,
    select_baseline,
    trend_series,
    visit_comparison,
)
from ..loading import Job, LoadedChecklist, LoadedMachine, LoadedVisit, Reading, element_names
from ..model import (
    BondingPoint,
    CapacitorSpec,
    ChecklistItem,
    LimitOverride,
    SurveyPoint,
    WindingSpec,
)
from ..results import (
    ChecklistResult,
    CheckResult,
    ElementResult,
    ItemResult,
    JobResult,
    MachineResult,
    NameplateRow,
    Override,
    PartReplacement,
    PunchItem,
    SignOff,
    Verdict,
    VisitResult,
    VisitState,
    count_states,
    worst,
)
from ..units import Dimension, Quantity
from .instruments import (
    ReadingUncertainty,
    assess,
    capture_findings,
    capture_uncertainty,
    instrument_findings,
    reading_uncertainty,
)
from .punch_list import (
    build_date,
    deficiencies,
    entries_by_key,
    handover,
    open_required,
    punch_list,
    sign_off_roles,
    unmatched,
)
from .register import instrument_entries, instrument_uses
from .registry import RULES
from .rules import Context, Outcome, _captured_current

# The comparison of two visits, for ``compare`` against a baseline of the user's choice: it
# is a judgement, so commands reach it through evaluation, never history itself.
__all__ = ["COMPARISON_SCHEMA", "VisitComparison", "comparison_to_json", "evaluate_job",
           "select_baseline", "visit_comparison", "visit_state"]

ElementSpec = WindingSpec | CapacitorSpec | SurveyPoint | BondingPoint


def _applies(item: ChecklistItem, machine: LoadedMachine) -> bool:
    nameplate = machine.model.nameplate
    return {
        "always": True,
        "capacitors": bool(nameplate.capacitors),
        "windings": bool(nameplate.windings),
        "three_phase": nameplate.phases == 3,
        "survey_points": bool(machine.model.survey_points),
        "rated_current": nameplate.rated_current is not None,
        "protective_device": nameplate.protective_device is not None,
        "stored_energy": any(c.working_voltage is not None for c in nameplate.capacitors),
        "bonding_points": bool(machine.model.bonding_points),
        # NEC 630.11(A) sizes for the duty cycle only when it is below 100 %.
        "intermittent_duty": (nameplate.duty_cycle is not None
                              and nameplate.duty_cycle.value < 100.0),
        "supply_cable": nameplate.supply_cable is not None,
    }[item.applies_when]


def _element_spec(item: ChecklistItem, machine: LoadedMachine,
                  element: str | None) -> ElementSpec | None:
    nameplate = machine.model.nameplate
    pools: dict[str, Sequence[ElementSpec]] = {
        "winding": nameplate.windings, "capacitor": nameplate.capacitors,
        "survey_point": machine.model.survey_points,
        "bonding_point": machine.model.bonding_points}
    return next((entry for entry in pools.get(item.per, ()) if entry.id == element), None)


def _override(job: Job, key: str, check_id: str) -> LimitOverride | None:
    return next((o for o in job.model.overrides if o.item == key and o.check == check_id), None)


def _evaluate_element(item: ChecklistItem, checklist: LoadedChecklist, element: str | None,
                      reading: Reading | None, job: Job, machine: LoadedMachine,
                      visit: LoadedVisit) -> ElementResult:
    def empty(verdict: Verdict) -> ElementResult:
        return ElementResult(element, verdict, None, None, item.unit or "", None,
                             reading.instrument if reading else None, {},
                             reading.note if reading else None, (),
                             reading.line if reading else None)

    if reading is None or reading.value is None:
        if reading is not None and reading.not_applicable:
            return empty(Verdict.NOT_APPLICABLE)
        return empty(Verdict.NOT_TESTED)
    context = Context(job, machine, visit, item, _element_spec(item, machine, element))
    instrument = job.instruments.get(reading.instrument or "")
    uncertainty: ReadingUncertainty | str | None = None
    if isinstance(reading.value, Quantity) and instrument is not None:
        uncertainty = reading_uncertainty(instrument, reading.value, reading.range,
                                          job.model.coverage_factor)
    nameplate = machine.model.nameplate
    # Measurement categories are rated to earth (IEC 61010-1): line voltage / √3 on three phases.
    rated = nameplate.rated_voltage
    to_earth = (Quantity(rated.value / 3 ** 0.5, rated.dimension) if nameplate.phases == 3
                else rated)
    findings = instrument_findings(instrument, item, to_earth, visit.model.date)
    findings += capture_findings(instrument, reading.capture)
    checks: list[CheckResult] = []
    for spec in item.checks:
        if spec.element is not None and spec.element != element:
            continue
        key = f"{checklist.id}.{item.id}"
        override = _override(job, key, spec.id)
        params = {**spec.params, **(override.params if override else {})}
        outcome = _run_rule(spec.rule, reading, context, params)
        source = override.source.describe() if override else spec.source.describe()
        if outcome.source_note and not override:
            source = (outcome.source_note if outcome.source_replaces
                      else f"{source}; {outcome.source_note}")
        if outcome.capture_sensitivity is not None and reading.capture is not None:
            # Judged on the capture's value: the scope and its probe give U, not the meter.
            captured = _captured_current(reading)
            capture_u = capture_uncertainty(
                job.instruments, reading.capture_setup, reading.capture.current_channel,
                captured.rms if captured is not None else 0.0, Dimension.CURRENT,
                job.model.coverage_factor)
            setup = reading.capture_setup
            scope = (job.instruments.get(setup.scope) if setup is not None and setup.scope
                     else None)
            from_capture = dataclasses.replace(outcome, sensitivity=outcome.capture_sensitivity)
            assessment = assess(from_capture, capture_u, job.model.decision_rule, scope,
                                visit.model.date, item)
            if isinstance(capture_u, ReadingUncertainty) and assessment.decision:
                assessment = dataclasses.replace(
                    assessment, decision=f"{assessment.decision}; {capture_u.phrase}")
        else:
            assessment = assess(outcome, uncertainty if uncertainty is not None else
                                "no instrument named", job.model.decision_rule, instrument,
                                visit.model.date, item)
        message = "; ".join(m for m in (outcome.message, assessment.message) if m) or None
        compared_value, compared_unit = _compared(outcome)
        tolerance = outcome.tolerance
        checks.append(CheckResult(
            id=spec.id, rule=spec.rule, verdict=assessment.verdict, limit=outcome.limit,
            source=source, steps=outcome.steps, message=message,
            override=override.reason if override else None, compared=outcome.compared,
            decision=assessment.decision, conformance=assessment.conformance,
            compared_value=compared_value, compared_unit=compared_unit,
            limit_lower=tolerance.lower if tolerance else None,
            limit_upper=tolerance.upper if tolerance else None,
            guard_band=assessment.guard_band, acceptance_lower=assessment.acceptance_lower,
            acceptance_upper=assessment.acceptance_upper, acceptance=assessment.acceptance,
            conformance_basis=assessment.conformance_basis))
    verdict = worst([c.verdict for c in checks], empty=Verdict.RECORDED)
    value = reading.value
    if isinstance(value, Quantity):
        shown, number, unit = value.text or value.format(), value.value, value.base_unit
        basis = value.basis.value if value.basis else None
    else:
        shown, number, unit, basis = ("yes" if value else "no"), None, "", None
    extras = {name: (q.text or q.format()) for name, q in reading.extras.items()}
    if reading.range is not None:
        extras["range"] = reading.range.text or reading.range.format()
    return ElementResult(element, verdict, shown, number, unit, basis, reading.instrument,
                         extras, reading.note, tuple(checks), reading.line,
                         uncertainty=(uncertainty.phrase if isinstance(uncertainty,
                                      ReadingUncertainty) else uncertainty),
                         findings=tuple(findings), capture=reading.capture,
                         effective_basis=_basis(context, reading))


def _run_rule(name: str, reading: Reading, context: Context,
              params: dict[str, object]) -> Outcome:
    """Evaluate one check; the one place where a computation that cannot be done (a
    formula refusing its inputs, e.g. a winding temperature at or below −k) becomes an
    undetermined check that says why, instead of stopping the whole evaluation."""
    rule = RULES[name]
    try:
        return rule.evaluate(reading, context, params)
    except (ComputationError, ValueError, ZeroDivisionError, OverflowError) as error:
        reason = str(error) or type(error).__name__
        return Outcome(Verdict.UNDETERMINED, rule.summary,
                       message=f"cannot be computed from these values: {reason}; "
                               f"check the reading and the nameplate")


def _compared(outcome: Outcome) -> tuple[float | None, str]:
    """The value a check compared with its limit, and its base unit, for later visits."""
    if outcome.compared_value is not None and outcome.tolerance is not None:
        return outcome.compared_value, Quantity(0.0, outcome.tolerance.dimension).base_unit
    # A check with no limit (e.g. no nameplate value) still shows the value it would compare.
    step = next((s for s in outcome.steps if outcome.compared and s.label == outcome.compared
                 and s.value is not None), None)
    return (step.value, step.unit) if step else (None, "")


def _basis(context: Context, reading: Reading) -> str | None:
    # A basis says how an a.c. voltage or current was read; other quantities have none.
    if not isinstance(reading.value, Quantity) or reading.value.dimension not in (
            Dimension.VOLTAGE, Dimension.CURRENT):
        return None
    basis = context.instrument_basis(reading)
    return basis.value if basis else None


def _evaluate_item(item: ChecklistItem, checklist: LoadedChecklist, job: Job,
                   machine: LoadedMachine, visit: LoadedVisit) -> ItemResult:
    readings = visit.readings.get((checklist.id, item.id), [])
    if not _applies(item, machine):
        elements: tuple[ElementResult, ...] = ()
        verdict = Verdict.NOT_APPLICABLE
    else:
        survey_ids = [p.id for p in machine.model.survey_points]
        bonding_ids = [p.id for p in machine.model.bonding_points]
        names = element_names(item.per, machine.model.nameplate, survey_ids, bonding_ids)
        by_element = {r.element: r for r in readings}
        elements = tuple(
            _evaluate_element(item, checklist, name, by_element.get(name), job, machine, visit)
            for name in names)
        verdict = worst([e.verdict for e in elements], empty=Verdict.NOT_APPLICABLE)
    rule = None
    if item.compare is not None:
        rule = compare_rule(item.compare, machine.model.compare.get(f"{checklist.id}.{item.id}"))
    return ItemResult(checklist=checklist.id, id=item.id, title=item.title, unit=item.unit,
                      safety_critical=item.safety_critical, required=item.required,
                      verdict=verdict, elements=elements, guidance=item.guidance,
                      caution=item.caution, compare=rule)


def visit_state(items: list[ItemResult]) -> VisitState:
    """Roll a visit's items up into one state.

    A failed safety-critical item fails the visit; a required item not tested or
    undecidable leaves it incomplete; any other failure leaves open deficiencies.
    """
    if any(i.safety_critical and i.verdict.is_failure for i in items):
        return VisitState.FAIL
    def undecided(item: ItemResult) -> bool:
        return item.verdict in (Verdict.NOT_TESTED, Verdict.UNDETERMINED) or any(
            element.verdict is Verdict.NOT_TESTED
            or any(check.verdict is Verdict.UNDETERMINED for check in element.checks)
            for element in item.elements)

    if any(i.required and undecided(i) for i in items):
        return VisitState.INCOMPLETE
    if any(i.verdict.is_failure for i in items):
        return VisitState.PASS_WITH_DEFICIENCIES
    return VisitState.PASS


def _as_left_view(visit: LoadedVisit) -> LoadedVisit:
    """The visit as left: each re-measured element's as-left reading in place of as-found."""
    merged = dict(visit.readings)
    for key, readings in visit.as_left.items():
        replaced = {r.element for r in readings}
        merged[key] = [r for r in visit.readings.get(key, []) if r.element not in replaced]
        merged[key] += readings
    return dataclasses.replace(visit, readings=merged, as_left={})


def _evaluate_visit(visit: LoadedVisit, job: Job, machine: LoadedMachine) -> VisitResult:
    found = _evaluate_readings(visit, job, machine)
    # The punch list and the instruments' calibration are those of the visit as found.
    found = dataclasses.replace(found, open_required=open_required(found),
                                deficiencies=deficiencies(found),
                                instrument_uses=instrument_uses(found, job.instruments))
    if not visit.as_left:
        return found
    left = _evaluate_readings(_as_left_view(visit), job, machine)
    # The record keeps every as-found item and shows, beside it, each element re-measured.
    re_measured = {key: {r.element for r in readings} for key, readings in
                   visit.as_left.items()}
    as_left = tuple(
        dataclasses.replace(item, elements=tuple(e for e in item.elements
                                                 if e.element in re_measured[key]))
        for item in left.items if (key := (item.checklist, item.id)) in re_measured)
    return dataclasses.replace(found, state=left.state, as_found_state=found.state,
                               as_left=as_left,
                               as_left_deficiencies=deficiencies(found, as_left))


def _evaluate_readings(visit: LoadedVisit, job: Job, machine: LoadedMachine) -> VisitResult:
    checklists = []
    for checklist_id in machine.model.checklists:
        loaded = job.checklists[checklist_id]
        items = tuple(_evaluate_item(item, loaded, job, machine, visit)
                      for item in loaded.model.items)
        checklists.append(ChecklistResult(
            id=loaded.id, title=loaded.model.title, purpose=loaded.model.purpose,
            version=loaded.model.version,
            origin=loaded.origin, caution=loaded.model.caution,
            verdict=worst([i.verdict for i in items]), items=items))
    all_items = [item for c in checklists for item in c.items]
    counts = Counter(item.verdict.value for item in all_items)
    conditions = {}
    if visit.model.conditions.ambient is not None:
        conditions["ambient"] = visit.model.conditions.ambient.text
    if visit.model.conditions.weather:
        conditions["weather"] = visit.model.conditions.weather
    if visit.model.conditions.note:
        conditions["note"] = visit.model.conditions.note
    return VisitResult(
        id=visit.id, machine=machine.id, kind=visit.model.kind.value, date=visit.model.date,
        performed_by=tuple(visit.model.performed_by), state=visit_state(all_items),
        counts={v.value: counts.get(v.value, 0) for v in Verdict},
        checklists=tuple(checklists), conditions=conditions, notes=visit.model.notes,
        attachments=tuple((a.path, a.title) for a in visit.model.attachments),
        sign_off=tuple(SignOff(name=s.name, role=s.role, date=s.date.isoformat(),
                               statement=s.statement or "") for s in visit.model.sign_off),
        source_file=visit.document.display_name,
        parts_replaced=tuple(PartReplacement(
            part=p.part, reason=p.reason, old=p.old, new=p.new, element=p.element,
            items=tuple(p.items)) for p in visit.model.parts_replaced))


def _with_history(machine: MachineResult, named: str | None) -> MachineResult:
    """Each visit after the baseline with its changes; parts replaced with before and after;
    the trends of the compared items over the visits."""
    baseline = select_baseline(machine.visits, named)
    if baseline is None:
        return machine
    machine = dataclasses.replace(machine, baseline=baseline)
    order = [v.id for v in machine.visits]
    visits = []
    for visit in machine.visits:
        if order.index(visit.id) > order.index(baseline):
            visit = dataclasses.replace(
                visit, baseline=baseline,
                changes=compare_visits(machine, baseline, visit).changes)
        if visit.parts_replaced:
            visit = dataclasses.replace(visit, parts_replaced=part_behaviour(machine, visit))
        visits.append(visit)
    machine = dataclasses.replace(machine, visits=tuple(visits))
    return dataclasses.replace(machine, trends=trend_series(machine))


def _nameplate_summary(machine: LoadedMachine) -> tuple[NameplateRow, ...]:
    nameplate = machine.model.nameplate
    summary: dict[str, str] = {
        "rated voltage": nameplate.rated_voltage.text,
        "phases": str(nameplate.phases) + (" + N" if nameplate.neutral else ""),
        "frequency": nameplate.frequency.text if nameplate.frequency else "d.c.",
    }
    if nameplate.rated_current is not None:
        summary["rated current"] = (f"{nameplate.rated_current.text} "
                                    f"({nameplate.current_basis.phrase})")
    if nameplate.rated_power is not None:
        summary["rated power"] = nameplate.rated_power.text
    if nameplate.duty_cycle is not None:
        summary["duty cycle"] = nameplate.duty_cycle.text
    if nameplate.protective_device is not None:
        device = nameplate.protective_device
        summary["protective device"] = f"{device.description}, {device.rating.text}"
    if nameplate.supply_cable is not None:
        cable = nameplate.supply_cable
        summary["supply cable"] = (f"{cable.cores} × {cable.cross_section.text} {cable.material}, "
                                   f"{cable.length.text}")
    for winding in nameplate.windings:
        text = f"{winding.material}, thermal class {winding.thermal_class}"
        if winding.resistance is not None:
            text += f", {winding.resistance.text}"
            if winding.resistance_tolerance is not None:
                text += f" ± {winding.resistance_tolerance.text}"
            if winding.resistance_temperature is not None:
                text += f" at {winding.resistance_temperature.text}"
        summary[f"winding: {winding.name}"] = text
    for capacitor in nameplate.capacitors:
        text = f"{capacitor.nominal.text}, tolerance {capacitor.tolerance}"
        if capacitor.rated_voltage is not None:
            text += f", {capacitor.rated_voltage.text}"
        summary[f"capacitor: {capacitor.name}"] = text
    return tuple(NameplateRow(label, text) for label, text in summary.items())


def _with_punch_list(machine: MachineResult, items: tuple[PunchItem, ...]) -> MachineResult:
    """The machine with its punch list, each visit counting what it raised that is open."""
    visits = tuple(dataclasses.replace(visit, open_deficiencies=sum(
        1 for p in items if p.blocking and p.raised.visit == visit.id)) for visit in machine.visits)
    return dataclasses.replace(machine, visits=visits, punch_list=items)


def evaluate_job(job: Job, today: _dt.date | None = None) -> JobResult:
    """Evaluate every visit of every machine. Deterministic for a given ``today``, the date
    overdue deficiencies are judged against (default: :func:`build_date`)."""
    today = today or build_date()
    entries = entries_by_key(job.punch_list)
    required = tuple(job.punch_list.handover.required) if job.punch_list else ()
    machines = tuple(
        _with_history(MachineResult(id=m.id, name=m.model.name, kind=m.model.kind,
                                    area=m.model.area, nameplate=_nameplate_summary(m),
                                    visits=tuple(_evaluate_visit(v, job, m) for v in m.visits)),
                      m.model.baseline)
        for m in job.machines)
    machines = tuple(_with_punch_list(m, punch_list(m, entries, today)) for m in machines)
    unmatched(job.punch_list, job.punch_list_document, machines)
    machines = tuple(dataclasses.replace(m, handover=handover(m, required)) for m in machines)
    overrides = tuple(Override(item=o.item, check=o.check, reason=o.reason,
                               source=o.source.describe(),
                               params=", ".join(f"{k} = {v}" for k, v in o.params.items()))
                      for o in job.model.overrides)
    visits = [visit for machine in machines for visit in machine.visits]
    return JobResult(
        title=job.model.title, site=job.model.site.name, contractor=job.model.contractor.name,
        reference_temperature=job.model.reference_temperature.text or "20 °C",
        standards=tuple(f"{s.document}:{s.edition}" + (f" — {s.title}" if s.title else "")
                        for s in job.model.standards),
        overrides=overrides, machines=machines, tool_version=__version__,
        instruments=instrument_entries(job.instruments, visits),
        decision_rule=job.model.decision_rule, coverage_factor=job.model.coverage_factor,
        state_counts=count_states(visit.state for visit in visits), build_date=today,
        sign_off_roles=tuple(sign_off_roles(machines, job.punch_list)),
        required_roles=required)
