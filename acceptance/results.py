"""Results of evaluation: verdicts with every value they rest on.

These objects are computed once, in :mod:`acceptance.evaluation` (and
:mod:`acceptance.history` for changes and trends), and only displayed afterwards
(terminal, HTML, PDF, JSON): every fact an output shows is a field here, decided
there. The verdicts, states and change classes, each with its one word and mark,
are defined in :mod:`acceptance.verdicts` and re-exported here. ``to_json`` writes
the versioned results schema documented in README.md with one encoder per record.
"""

from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from .verdicts import (
    ChangeClass,
    DeficiencyState,
    Severity,
    Verdict,
    VisitState,
    count_states,
    worst,
)

if TYPE_CHECKING:  # numpy stays out of check's start-up unless a capture is attached
    from .captures import CaptureAnalysis

__all__ = [
    "RESULTS_SCHEMA", "Acceptance", "Change", "DeficiencyState", "Handover", "PunchItem",
    "ChangeClass", "CheckResult", "CompareRule", "Deficiency",
    "ElementResult", "Instrument", "InstrumentUse", "ItemResult", "ChecklistResult",
    "MachineResult", "JobResult", "NameplateRow", "Override", "PartReplacement", "Severity",
    "SignOff", "Step", "TrendPoint", "TrendSeries", "TrendTrace", "Verdict", "VisitResult",
    "VisitState", "count_states", "machine_to_json", "to_json", "worst",
]

RESULTS_SCHEMA = "acceptance-results/1"


@dataclass(frozen=True)
class Step:
    """One intermediate value of a computation, as the record shows it."""

    label: str
    text: str  # formatted with its unit, e.g. "28.34 Ω"
    value: float | None = None
    unit: str = ""
    formula: str | None = None


@dataclass(frozen=True)
class CheckResult:
    id: str
    rule: str
    verdict: Verdict
    limit: str  # the tolerance phrase, e.g. "207.0 V ≤ U ≤ 253.0 V"
    source: str
    steps: tuple[Step, ...] = ()
    message: str | None = None
    override: str | None = None  # reason, when a job rule replaced the default limit
    compared: str | None = None  # which value was compared, when not the reading itself
    decision: str | None = None  # the decision rule applied and the guard band used
    conformance: float | None = None  # JCGM 106 probability of conformity, near a limit
    # The value compared with the limit (e.g. R at 20 °C) and the limits, in base units:
    # what later visits compare and what a trend plot draws as the limit band.
    compared_value: float | None = None
    compared_unit: str = ""
    limit_lower: float | None = None
    limit_upper: float | None = None
    # The decision rule's guard band w and the acceptance limits (each tolerance limit moved
    # inward by w; equal to the tolerance limits under simple acceptance), in base units.
    guard_band: float | None = None
    acceptance_lower: float | None = None
    acceptance_upper: float | None = None
    acceptance: str | None = None  # the acceptance limits as a phrase
    conformance_basis: str | None = None  # the distribution behind ``conformance``


@dataclass(frozen=True)
class ElementResult:
    element: str | None
    verdict: Verdict
    reading: str | None  # as written, e.g. "229.8 V" or "yes"
    value: float | None
    unit: str
    basis: str | None
    instrument: str | None
    extras: dict[str, str]
    note: str | None
    checks: tuple[CheckResult, ...]
    line: int | None = None
    uncertainty: str | None = None  # "U = 1.6 V (k = 2), from …", or why it is unknown
    findings: tuple[str, ...] = ()  # about the instrument: category, response, calibration
    capture: CaptureAnalysis | None = None  # an attached scope capture (JSON: its own schema)
    # Basis of the reading as written ('RMS', 'avg', 'd.c.') or else from the instrument.
    effective_basis: str | None = None


@dataclass(frozen=True)
class CompareRule:
    """An item's comparison, resolved from its checklist and the machine file.

    ``watch`` and ``act`` are in ``threshold_unit``: ``%`` of the baseline value when
    ``relative``, else an amount in the compared value's unit (e.g. ``K``).
    """

    quantity: str  # "corrected" or "reading"
    watch: float
    act: float
    relative: bool
    threshold_unit: str
    direction: str = "both"  # "both", "up" or "down"
    check: str | None = None
    step: str | None = None
    note_up: str | None = None
    note_down: str | None = None
    normalise_to_voltage: str | None = None
    source: str = "common practice (no single published source)"
    adjusted: str | None = None  # the machine file's reason, when it changed the checklist's

    def describe(self) -> str:
        """The thresholds in one phrase, e.g. ``watch ≥ 5 %, act ≥ 10 %, either direction``."""
        way = {"both": "either direction", "up": "rises only", "down": "falls only"}[
            self.direction]
        return (f"watch ≥ {self.watch:g} {self.threshold_unit}, "
                f"act ≥ {self.act:g} {self.threshold_unit}, {way}")


@dataclass(frozen=True)
class ItemResult:
    checklist: str
    id: str
    title: str
    unit: str | None
    safety_critical: bool
    required: bool
    verdict: Verdict
    elements: tuple[ElementResult, ...]
    guidance: str | None
    caution: str | None
    compare: CompareRule | None = None  # how later visits compare with the baseline

    @property
    def key(self) -> str:
        return f"{self.checklist}.{self.id}"


@dataclass(frozen=True)
class ChecklistResult:
    id: str
    title: str
    purpose: str | None  # what the checklist proves, in one sentence
    version: int
    origin: str
    caution: str | None
    verdict: Verdict
    items: tuple[ItemResult, ...]


@dataclass(frozen=True)
class Change:
    """One value of one item and element, baseline against a later visit."""

    item: str  # checklist.item
    title: str
    element: str | None
    quantity: str  # what was compared, e.g. "R at 20 °C" or "reading (RMS)"
    unit: str  # base unit of the values
    baseline_value: float | None
    value: float | None
    baseline_text: str
    text: str
    change: float | None  # in change_unit: % of the baseline, or an amount in unit
    change_unit: str
    change_text: str
    classification: ChangeClass
    thresholds: str  # e.g. "watch ≥ 5 %, act ≥ 10 %, either direction"
    source: str
    note: str | None = None  # what the change suggests (the item's note_up / note_down)
    adjustments: tuple[str, ...] = ()  # corrections, conversions and normalisation, in words
    reason: str | None = None  # why the values are not comparable


@dataclass(frozen=True)
class PartReplacement:
    """A part replaced on a visit, with its element's values before and after the swap."""

    part: str
    reason: str
    old: str | None
    new: str | None
    element: str | None
    items: tuple[str, ...]
    before: str | None = None  # "as found" or the id of the visit before
    behaviour: tuple[Change, ...] = ()
    steady: bool = False  # every value of behaviour is steady: the swap changed nothing seen
    repaired: bool = False  # some value was restored and none is left to act on


@dataclass(frozen=True)
class SignOff:
    """One line of a visit's sign-off, as the visit file gives it."""

    name: str
    role: str
    date: str  # ISO 8601
    statement: str = ""


@dataclass(frozen=True)
class Deficiency:
    """An open point of a visit: an element that failed, could not be decided or is missing."""

    machine: str
    visit: str  # the visit that raised it
    item: str  # checklist.item
    title: str
    element: str | None
    reading: str | None
    verdict: Verdict
    severity: Severity
    anchor: str  # the item's anchor on the visit's page


@dataclass(frozen=True)
class Acceptance:
    """A deficiency the client accepts as an exception: who, when, why and until when."""

    by: str
    date: _dt.date
    reason: str
    until: _dt.date | None = None


@dataclass(frozen=True)
class PunchItem:
    """One deficiency followed from the finding that raised it to the re-test that closed it.

    Addressed by machine, item and point, which stay the same from build to build.
    """

    machine: str
    item: str  # checklist.item
    title: str
    element: str | None
    raised: Deficiency  # the finding that raised it (its visit, reading, verdict, severity)
    state: DeficiencyState
    latest: Verdict  # the point's verdict at the last visit that measured it
    closed_by: str | None = None  # the visit whose pass closed it
    closed_as_left: bool = False  # closed by that visit's as-left reading
    closed_reading: str | None = None
    failed_again: tuple[str, ...] = ()  # later visits that found it open again
    owner: str | None = None
    due: _dt.date | None = None
    overdue: bool = False  # open, not accepted, and due before the build's date
    note: str | None = None
    acceptance: Acceptance | None = None

    @property
    def key(self) -> str:
        """``machine/checklist.item[point]``: how the punch-list file names it."""
        return f"{self.machine}/{self.item}" + (f"[{self.element}]" if self.element else "")

    @property
    def blocking(self) -> bool:
        """Open and not accepted: holds up the handover."""
        return self.state is DeficiencyState.OPEN


@dataclass(frozen=True)
class Handover:
    """Whether a machine is ready to hand over, and why not."""

    ready: bool
    reasons: tuple[str, ...] = ()  # empty when ready
    open: int = 0  # deficiencies open and not accepted
    accepted: int = 0
    closed: int = 0
    # The sign-off roles each visit carries, in the job's order of roles.
    sign_offs: tuple[tuple[str, tuple[str, ...]], ...] = ()


@dataclass(frozen=True)
class InstrumentUse:
    """An instrument used on a visit, with its calibration state on the visit's date."""

    machine: str
    visit: str
    instrument: str
    state: str  # the calibration state in words, e.g. "in calibration"
    valid: bool  # False when the calibration had lapsed (or was never recorded)

    @property
    def validity(self) -> str:
        """``ok`` or ``lapsed``: the word the pages' style keys on."""
        return "ok" if self.valid else "lapsed"


@dataclass(frozen=True)
class VisitResult:
    id: str
    machine: str
    kind: str
    date: _dt.date
    performed_by: tuple[str, ...]
    state: VisitState
    counts: dict[str, int]
    checklists: tuple[ChecklistResult, ...]
    conditions: dict[str, str]
    notes: str | None
    attachments: tuple[tuple[str, str], ...]
    sign_off: tuple[SignOff, ...]
    source_file: str
    baseline: str | None = None  # id of the visit this one is compared with
    changes: tuple[Change, ...] = ()
    as_left: tuple[ItemResult, ...] = ()  # items re-measured after adjustment or repair
    as_found_state: VisitState | None = None  # state before adjustment, when as_left exists
    parts_replaced: tuple[PartReplacement, ...] = ()
    open_required: int = 0  # required items whose verdict is open (as found)
    deficiencies: tuple[Deficiency, ...] = ()  # open points as found, in checklist order
    as_left_deficiencies: tuple[Deficiency, ...] = ()  # open points of as_left (not in JSON)
    instrument_uses: tuple[InstrumentUse, ...] = ()  # by instrument id
    # Deficiencies this visit raised that are still open (neither closed nor accepted).
    open_deficiencies: int = 0

    @property
    def items(self) -> list[ItemResult]:
        return [item for checklist in self.checklists for item in checklist.items]


@dataclass(frozen=True)
class NameplateRow:
    label: str  # e.g. "rated voltage" or "winding: main"
    text: str


@dataclass(frozen=True)
class TrendPoint:
    visit: str
    date: _dt.date
    value: float  # in the series' base unit
    text: str
    classification: ChangeClass | None  # None for the baseline and visits before it
    is_baseline: bool = False


@dataclass(frozen=True)
class TrendTrace:
    element: str | None
    points: tuple[TrendPoint, ...]


@dataclass(frozen=True)
class TrendSeries:
    """One compared item over every visit: a trace per element, the limits and the baseline."""

    item: str
    title: str
    quantity: str
    unit: str  # base unit of the values
    display_unit: str | None
    baseline: str
    traces: tuple[TrendTrace, ...]
    limit_lower: float | None = None
    limit_upper: float | None = None


@dataclass(frozen=True)
class MachineResult:
    id: str
    name: str
    kind: str
    area: str | None
    nameplate: tuple[NameplateRow, ...]
    visits: tuple[VisitResult, ...]
    baseline: str | None = None  # id of the visit later visits are compared with
    trends: tuple[TrendSeries, ...] = ()  # each compared item over the visits (not in JSON)
    punch_list: tuple[PunchItem, ...] = ()  # open first, then accepted, then closed
    handover: Handover | None = None

    @property
    def latest(self) -> VisitResult | None:
        return self.visits[-1] if self.visits else None


@dataclass(frozen=True)
class Instrument:
    """An entry of the job's instrument register, with the visits that used it."""

    id: str
    kind: str
    model: str
    serial: str
    response: str
    category: str
    calibrated: _dt.date | None
    calibration_due: _dt.date | None
    functions: tuple[str, ...]  # "measures, range …: accuracy, resolution …"
    # Site-wide facts (not in JSON, whose job head must not depend on which machines
    # were evaluated): every use in machine and visit order, and how many were lapsed.
    uses: tuple[InstrumentUse, ...] = ()
    lapsed_uses: int = 0


@dataclass(frozen=True)
class Override:
    """A job rule replacing a checklist's default limit."""

    item: str
    check: str
    reason: str
    source: str
    params: str  # "name = value, …"


@dataclass(frozen=True)
class JobResult:
    title: str
    site: str
    contractor: str
    reference_temperature: str
    standards: tuple[str, ...]
    overrides: tuple[Override, ...]
    machines: tuple[MachineResult, ...]
    tool_version: str
    instruments: tuple[Instrument, ...] = field(default=())
    decision_rule: str = "simple acceptance"
    coverage_factor: float = 2.0
    # How many visits are in each state, every state listed (not in JSON, see Instrument).
    state_counts: tuple[tuple[VisitState, int], ...] = ()
    build_date: _dt.date | None = None  # what "overdue" is judged against
    sign_off_roles: tuple[str, ...] = ()  # the sign-off matrix's columns
    required_roles: tuple[str, ...] = ()  # the roles a machine's latest visit needs

    @property
    def punch_counts(self) -> tuple[tuple[DeficiencyState, int], ...]:
        """How many deficiencies are in each state, every state in its order."""
        states = [p.state for m in self.machines for p in m.punch_list]
        return tuple((state, states.count(state)) for state in DeficiencyState)

    @property
    def punch_owners(self) -> list[str]:
        """Every owner the punch list names, sorted."""
        return sorted({p.owner for m in self.machines for p in m.punch_list if p.owner})

    @property
    def punch_list(self) -> list[PunchItem]:
        """Every machine's deficiencies: open first, then accepted, then closed."""
        order = list(DeficiencyState)
        return sorted((p for m in self.machines for p in m.punch_list),
                      key=lambda p: order.index(p.state))

    @property
    def visits(self) -> list[VisitResult]:
        return [visit for machine in self.machines for visit in machine.visits]

    @property
    def deficiencies(self) -> list[Deficiency]:
        """Every visit's open points, in machine and visit order."""
        return [d for visit in self.visits for d in visit.deficiencies]


# ------------------------------------------------------------------ JSON
# One encoder per record; the keys and their order are the schema (README, "Results file").

Json = dict[str, Any]


def _date(value: _dt.date | None) -> str | None:
    return value.isoformat() if value is not None else None


def step_to_json(step: Step) -> Json:
    return {"label": step.label, "text": step.text, "value": step.value, "unit": step.unit,
            "formula": step.formula}


def check_to_json(check: CheckResult) -> Json:
    return {
        "id": check.id, "rule": check.rule, "verdict": check.verdict.value,
        "limit": check.limit, "source": check.source,
        "steps": [step_to_json(s) for s in check.steps], "message": check.message,
        "override": check.override, "compared": check.compared, "decision": check.decision,
        "conformance": check.conformance, "compared_value": check.compared_value,
        "compared_unit": check.compared_unit, "limit_lower": check.limit_lower,
        "limit_upper": check.limit_upper,
        "guard_band": check.guard_band, "acceptance_lower": check.acceptance_lower,
        "acceptance_upper": check.acceptance_upper, "acceptance": check.acceptance,
        "conformance_basis": check.conformance_basis,
    }


def _capture_to_json(capture: CaptureAnalysis | None) -> Json | None:
    if capture is None:
        return None
    from .captures import capture_to_json  # numpy only when a capture is attached

    return capture_to_json(capture)


def element_to_json(element: ElementResult) -> Json:
    return {
        "element": element.element, "verdict": element.verdict.value,
        "reading": element.reading, "value": element.value, "unit": element.unit,
        "basis": element.basis, "instrument": element.instrument,
        "extras": dict(element.extras), "note": element.note,
        "checks": [check_to_json(c) for c in element.checks], "line": element.line,
        "uncertainty": element.uncertainty, "findings": list(element.findings),
        "capture": _capture_to_json(element.capture),
        "effective_basis": element.effective_basis,
    }


def compare_rule_to_json(rule: CompareRule | None) -> Json | None:
    if rule is None:
        return None
    return {
        "quantity": rule.quantity, "watch": rule.watch, "act": rule.act,
        "relative": rule.relative, "threshold_unit": rule.threshold_unit,
        "direction": rule.direction, "check": rule.check, "step": rule.step,
        "note_up": rule.note_up, "note_down": rule.note_down,
        "normalise_to_voltage": rule.normalise_to_voltage, "source": rule.source,
        "adjusted": rule.adjusted,
    }


def item_to_json(item: ItemResult) -> Json:
    return {
        "checklist": item.checklist, "id": item.id, "title": item.title, "unit": item.unit,
        "safety_critical": item.safety_critical, "required": item.required,
        "verdict": item.verdict.value, "elements": [element_to_json(e) for e in item.elements],
        "guidance": item.guidance, "caution": item.caution,
        "compare": compare_rule_to_json(item.compare),
    }


def checklist_to_json(checklist: ChecklistResult) -> Json:
    return {
        "id": checklist.id, "title": checklist.title, "purpose": checklist.purpose,
        "version": checklist.version, "origin": checklist.origin,
        "caution": checklist.caution, "verdict": checklist.verdict.value,
        "items": [item_to_json(i) for i in checklist.items],
    }


def change_to_json(change: Change) -> Json:
    return {
        "item": change.item, "title": change.title, "element": change.element,
        "quantity": change.quantity, "unit": change.unit,
        "baseline_value": change.baseline_value, "value": change.value,
        "baseline_text": change.baseline_text, "text": change.text, "change": change.change,
        "change_unit": change.change_unit, "change_text": change.change_text,
        "classification": change.classification.value, "thresholds": change.thresholds,
        "source": change.source, "note": change.note,
        "adjustments": list(change.adjustments), "reason": change.reason,
    }


def part_to_json(part: PartReplacement) -> Json:
    return {
        "part": part.part, "reason": part.reason, "old": part.old, "new": part.new,
        "element": part.element, "items": list(part.items), "before": part.before,
        "behaviour": [change_to_json(c) for c in part.behaviour],
        "repaired": part.repaired,
    }


def sign_off_to_json(sign_off: SignOff) -> Json:
    return {"name": sign_off.name, "role": sign_off.role, "date": sign_off.date,
            "statement": sign_off.statement}


def deficiency_to_json(deficiency: Deficiency) -> Json:
    # machine and visit are those of the enclosing visit; the anchor is the site's.
    return {"item": deficiency.item, "title": deficiency.title,
            "element": deficiency.element, "reading": deficiency.reading,
            "verdict": deficiency.verdict.value, "severity": deficiency.severity.value}


def acceptance_to_json(acceptance: Acceptance | None) -> Json | None:
    if acceptance is None:
        return None
    return {"by": acceptance.by, "date": acceptance.date.isoformat(),
            "reason": acceptance.reason, "until": _date(acceptance.until)}


def punch_item_to_json(item: PunchItem) -> Json:
    return {
        "item": item.item, "title": item.title, "element": item.element,
        "state": item.state.value, "raised_by": item.raised.visit,
        "raised_verdict": item.raised.verdict.value, "severity": item.raised.severity.value,
        "latest": item.latest.value, "closed_by": item.closed_by,
        "closed_as_left": item.closed_as_left, "failed_again": list(item.failed_again),
        "owner": item.owner, "due": _date(item.due), "overdue": item.overdue,
        "note": item.note, "acceptance": acceptance_to_json(item.acceptance),
    }


def handover_to_json(handover: Handover | None) -> Json | None:
    if handover is None:
        return None
    return {"ready": handover.ready, "reasons": list(handover.reasons),
            "open": handover.open, "accepted": handover.accepted, "closed": handover.closed,
            "sign_offs": {visit: list(roles) for visit, roles in handover.sign_offs}}


def instrument_use_to_json(use: InstrumentUse) -> Json:
    return {"instrument": use.instrument, "calibration": use.state, "valid": use.valid}


def visit_to_json(visit: VisitResult) -> Json:
    return {
        "id": visit.id, "machine": visit.machine, "kind": visit.kind,
        "date": visit.date.isoformat(), "performed_by": list(visit.performed_by),
        "state": visit.state.value, "counts": dict(visit.counts),
        "checklists": [checklist_to_json(c) for c in visit.checklists],
        "conditions": dict(visit.conditions), "notes": visit.notes,
        "attachments": [list(a) for a in visit.attachments],
        "sign_off": [sign_off_to_json(s) for s in visit.sign_off],
        "source_file": visit.source_file, "baseline": visit.baseline,
        "changes": [change_to_json(c) for c in visit.changes],
        "as_left": [item_to_json(i) for i in visit.as_left],
        "as_found_state": visit.as_found_state.value if visit.as_found_state else None,
        "parts_replaced": [part_to_json(p) for p in visit.parts_replaced],
        "open_required": visit.open_required,
        "deficiencies": [deficiency_to_json(d) for d in visit.deficiencies],
        "instrument_uses": [instrument_use_to_json(u) for u in visit.instrument_uses],
    }


def machine_to_json(machine: MachineResult) -> Json:
    """One machine's entry of :func:`to_json`'s ``machines`` list."""
    visits = [visit_to_json(v) for v in machine.visits]
    return {
        "id": machine.id, "name": machine.name, "kind": machine.kind, "area": machine.area,
        "nameplate": {row.label: row.text for row in machine.nameplate}, "visits": visits,
        "baseline": machine.baseline,
        "latest_state": visits[-1]["state"] if visits else None,
        "punch_list": [punch_item_to_json(p) for p in machine.punch_list],
        "handover": handover_to_json(machine.handover),
    }


def instrument_to_json(instrument: Instrument) -> Json:
    return {
        "id": instrument.id, "kind": instrument.kind, "model": instrument.model,
        "serial": instrument.serial, "response": instrument.response,
        "category": instrument.category,
        "calibrated": _date(instrument.calibrated) or "",
        "calibration_due": _date(instrument.calibration_due) or "",
        "functions": list(instrument.functions),
    }


def override_to_json(override: Override) -> Json:
    return {"item": override.item, "check": override.check, "reason": override.reason,
            "source": override.source, "params": override.params}


def to_json(result: JobResult) -> Json:
    """The machine-readable results (schema ``acceptance-results/1``, see README)."""
    return {
        "schema": RESULTS_SCHEMA, "title": result.title, "site": result.site,
        "contractor": result.contractor,
        "reference_temperature": result.reference_temperature,
        "standards": list(result.standards),
        "overrides": [override_to_json(o) for o in result.overrides],
        "machines": [machine_to_json(m) for m in result.machines],
        "tool_version": result.tool_version,
        "instruments": [instrument_to_json(i) for i in result.instruments],
        "decision_rule": result.decision_rule, "coverage_factor": result.coverage_factor,
    }
