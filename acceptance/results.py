"""Results of evaluation: verdicts with every value they rest on.

These objects are computed once, in :mod:`acceptance.evaluation`, and only
displayed afterwards (terminal, HTML, PDF, JSON). ``to_json`` writes the
versioned results schema documented in README.md.
"""

from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass, field
from enum import Enum
from typing import Any

__all__ = [
    "RESULTS_SCHEMA", "Change", "ChangeClass", "CheckResult", "ElementResult", "ItemResult",
    "ChecklistResult", "MachineResult", "JobResult", "PartReplacement", "Step", "Verdict",
    "VisitResult", "VisitState", "machine_to_json", "to_json", "worst",
]

RESULTS_SCHEMA = "acceptance-results/1"


class Verdict(str, Enum):
    """Outcome of one check or item. Conditional statements follow ILAC-G8:09/2019 cl. 4.2."""

    PASS = "pass"
    CONDITIONAL_PASS = "conditional pass"
    CONDITIONAL_FAIL = "conditional fail"
    FAIL = "fail"
    UNDETERMINED = "undetermined"  # the data cannot decide (e.g. no nameplate value)
    NOT_TESTED = "not tested"
    NOT_APPLICABLE = "not applicable"
    RECORDED = "recorded"  # value kept for the record; no criterion applies

    @property
    def is_failure(self) -> bool:
        return self in (Verdict.FAIL, Verdict.CONDITIONAL_FAIL)

    @property
    def is_open(self) -> bool:
        """Needs someone's attention before the item can be closed."""
        return self in (Verdict.FAIL, Verdict.CONDITIONAL_FAIL, Verdict.UNDETERMINED,
                        Verdict.NOT_TESTED, Verdict.CONDITIONAL_PASS)

    @property
    def slug(self) -> str:
        return self.value.replace(" ", "-")


# Worst first: a list of verdicts rolls up to the earliest that occurs.
_ORDER = [Verdict.FAIL, Verdict.CONDITIONAL_FAIL, Verdict.UNDETERMINED, Verdict.NOT_TESTED,
          Verdict.CONDITIONAL_PASS, Verdict.PASS, Verdict.RECORDED, Verdict.NOT_APPLICABLE]


def worst(verdicts: list[Verdict], empty: Verdict = Verdict.NOT_APPLICABLE) -> Verdict:
    if not verdicts:
        return empty
    return min(verdicts, key=_ORDER.index)


class VisitState(str, Enum):
    """A visit as a whole."""

    PASS = "pass"
    PASS_WITH_DEFICIENCIES = "pass with deficiencies"
    INCOMPLETE = "incomplete"
    FAIL = "fail"

    @property
    def slug(self) -> str:
        return self.value.replace(" ", "-")


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
    capture: Any = None  # CaptureAnalysis of an attached scope capture (JSON: its own schema)
    # Basis of the reading as written ('RMS', 'avg', 'd.c.') or else from the instrument.
    effective_basis: str | None = None


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
    compare: Any = None  # history.CompareRule: how later visits compare with the baseline

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


class ChangeClass(str, Enum):
    """How far a value has moved from the baseline, against the item's thresholds."""

    STEADY = "steady"
    WATCH = "watch"
    ACT = "act"
    NOT_COMPARABLE = "not comparable"

    @property
    def slug(self) -> str:
        return self.value.replace(" ", "-")


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
    sign_off: tuple[dict[str, str], ...]
    source_file: str
    baseline: str | None = None  # id of the visit this one is compared with
    changes: tuple[Change, ...] = ()
    as_left: tuple[ItemResult, ...] = ()  # items re-measured after adjustment or repair
    as_found_state: VisitState | None = None  # state before adjustment, when as_left exists
    parts_replaced: tuple[PartReplacement, ...] = ()

    @property
    def items(self) -> list[ItemResult]:
        return [item for checklist in self.checklists for item in checklist.items]


@dataclass(frozen=True)
class MachineResult:
    id: str
    name: str
    kind: str
    area: str | None
    nameplate: dict[str, Any]
    visits: tuple[VisitResult, ...]
    baseline: str | None = None  # id of the visit later visits are compared with

    @property
    def latest(self) -> VisitResult | None:
        return self.visits[-1] if self.visits else None


@dataclass(frozen=True)
class JobResult:
    title: str
    site: str
    contractor: str
    reference_temperature: str
    standards: tuple[str, ...]
    overrides: tuple[dict[str, str], ...]
    machines: tuple[MachineResult, ...]
    tool_version: str
    instruments: tuple[dict[str, Any], ...] = field(default=())
    decision_rule: str = "simple acceptance"
    coverage_factor: float = 2.0

    @property
    def visits(self) -> list[VisitResult]:
        return [visit for machine in self.machines for visit in machine.visits]


def _plain(value: Any) -> Any:
    if type(value).__name__ == "CaptureAnalysis":
        from .captures import capture_to_json

        return capture_to_json(value)
    if isinstance(value, Enum):
        return value.value
    if isinstance(value, _dt.date):
        return value.isoformat()
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_plain(v) for v in value]
    if hasattr(value, "__dataclass_fields__"):
        return {name: _plain(getattr(value, name)) for name in value.__dataclass_fields__}
    return value


def machine_to_json(machine: MachineResult) -> dict[str, Any]:
    """One machine's entry of :func:`to_json`'s ``machines`` list."""
    data = _plain(machine)
    data["latest_state"] = data["visits"][-1]["state"] if data["visits"] else None
    return data


def to_json(result: JobResult) -> dict[str, Any]:
    """The machine-readable results (schema ``acceptance-results/1``, see README)."""
    data = {name: (_plain(getattr(result, name)) if name != "machines"
                   else [machine_to_json(m) for m in result.machines])
            for name in result.__dataclass_fields__}
    return {"schema": RESULTS_SCHEMA, **data}
