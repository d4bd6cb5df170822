"""The input model: job, instrument register, machines, visits and checklists.

Each class documents one file kind; the JSON Schemas that editors use are
generated from these classes (``acceptance schema``). Field validation happens
here (types, units, dates, names); checks that need several files at once
(a reading's instrument exists, an item belongs to a checklist) happen in
:mod:`acceptance.loading`.
"""

from __future__ import annotations

import datetime as _dt
import re
from enum import Enum
from typing import Annotated, Any, Literal

from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    Field,
    PlainValidator,
    WithJsonSchema,
    model_validator,
)

from .units import Basis, Dimension, Quantity, UnitError, parse_quantity

__all__ = [
    "AccuracyEntry", "BondingPoint", "CapacitorSpec", "CheckSpec", "Checklist", "ChecklistItem",
    "CompareAdjustment", "CompareSpec", "Conductor", "PartReplaced",
    "Instrument",
    "InstrumentRegister", "JobFile", "LimitOverride", "MachineFile", "Nameplate",
    "ProtectiveDevice", "PunchEntry", "PunchListFile", "SignOff", "Source",
    "StandardInForce", "SupplyCable", "SurveyPoint",
    "VisitFile", "VisitKind", "WindingSpec", "Attachment", "parse_date", "ELEMENT_KINDS",
]


def _parsed(*dimensions: Dimension) -> PlainValidator:
    """A field read as a quantity of one of ``dimensions``."""
    def validate(value: Any) -> Quantity:
        if isinstance(value, Quantity):
            return value
        try:
            return parse_quantity(value, *dimensions)
        except UnitError as error:
            raise ValueError(str(error)) from None

    return PlainValidator(validate)


def _described(example: str, *dimensions: Dimension) -> WithJsonSchema:
    """How such a field looks to an editor: a string with a unit."""
    return WithJsonSchema({"type": "string", "examples": [example],
                           "description": " or ".join(d.value for d in dimensions)
                           + " with unit"})


# Written out as Annotated aliases, not built by a function, so that a type checker sees a
# Quantity in every field of these types.
Voltage = Annotated[Quantity, _parsed(Dimension.VOLTAGE),
                    _described("230 V", Dimension.VOLTAGE)]
Current = Annotated[Quantity, _parsed(Dimension.CURRENT),
                    _described("9.5 A", Dimension.CURRENT)]
Resistance = Annotated[Quantity, _parsed(Dimension.RESISTANCE),
                       _described("34.0 Ω", Dimension.RESISTANCE)]
Capacitance = Annotated[Quantity, _parsed(Dimension.CAPACITANCE),
                        _described("1000 µF", Dimension.CAPACITANCE)]
Frequency = Annotated[Quantity, _parsed(Dimension.FREQUENCY),
                      _described("50 Hz", Dimension.FREQUENCY)]
Temperature = Annotated[Quantity, _parsed(Dimension.TEMPERATURE),
                        _described("20 °C", Dimension.TEMPERATURE)]
TemperatureDifference = Annotated[Quantity, _parsed(Dimension.TEMPERATURE_DIFFERENCE),
                                  _described("80 K", Dimension.TEMPERATURE_DIFFERENCE)]
Ratio = Annotated[Quantity, _parsed(Dimension.RATIO), _described("5 %", Dimension.RATIO)]
Length = Annotated[Quantity, _parsed(Dimension.LENGTH), _described("18 m", Dimension.LENGTH)]
Area = Annotated[Quantity, _parsed(Dimension.AREA), _described("2.5 mm²", Dimension.AREA)]
Power = Annotated[Quantity, _parsed(Dimension.POWER), _described("2.2 kW", Dimension.POWER)]



def _positive(value: Quantity) -> Quantity:
    """A rating, nominal, resistance, length, cross-section or frequency: above zero."""
    if not value.value > 0:
        raise ValueError(f"'{value.text}' must be greater than zero; write the value the "
                         "nameplate or drawing states")
    return value


def _share(value: Quantity) -> Quantity:
    """A duty cycle: a share of the cycle time, above 0 % and at most 100 %."""
    if not 0 < value.in_unit("%") <= 100:
        raise ValueError(f"'{value.text}' is not a duty cycle; write a share above 0 % and "
                         "at most 100 %, e.g. 40 %")
    return value


Positive = AfterValidator(_positive)

# Lists of a visit are typed by hand: a crew and its sign-offs fit in 50 names, replaced
# parts and attachments in 500 entries. Far beyond is a mistake or an attack, and every
# page and PDF that lists them lays them out (README "Limits").
MAX_PEOPLE_PER_VISIT = 50
MAX_LIST_PER_VISIT = 500

_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


def parse_date(value: Any) -> _dt.date:
    if isinstance(value, _dt.date):
        return value
    if not isinstance(value, str) or not _DATE_RE.match(value.strip()):
        raise ValueError(f"{value!r} is not a date; write it as YYYY-MM-DD, e.g. 2026-03-10")
    try:
        return _dt.date.fromisoformat(value.strip())
    except ValueError:
        raise ValueError(f"{value!r} is not a calendar date; check the month and day") from None


Date = Annotated[
    _dt.date,
    PlainValidator(parse_date),
    WithJsonSchema({"type": "string", "format": "date", "examples": ["2026-03-10"]}),
]

Identifier = Annotated[str, Field(pattern=r"^[a-z0-9][a-z0-9_-]*$", max_length=64)]


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, arbitrary_types_allowed=True,
                              str_strip_whitespace=True)


# ---------------------------------------------------------------- sources


class Source(_Strict):
    """Where an acceptance criterion comes from."""

    kind: Literal["standard", "regulation", "manufacturer", "common practice", "job"] = Field(
        description="standard, regulation, manufacturer's data, common practice, or a job rule")
    document: str | None = Field(None, description="e.g. 'IEC 60204-1'")
    edition: str | None = Field(None, description="e.g. '2016'")
    clause: str | None = Field(None, description="clause or table, e.g. '4.3.2'")
    note: str | None = None

    def describe(self) -> str:
        if self.kind in ("standard", "regulation") and self.document:
            text = self.document + (f":{self.edition}" if self.edition else "")
            if self.clause:
                text += f", {self.clause if self.clause[:1].isalpha() else 'clause ' + self.clause}"
        elif self.kind == "manufacturer":
            text = "manufacturer's data" + (f" ({self.document})" if self.document else "")
        elif self.kind == "job":
            text = "job rule" + (f": {self.document}" if self.document else "")
        else:
            text = "common practice (no single published source)"
        if self.note:
            text += f" — {self.note}"
        return text


# ---------------------------------------------------------------- checklists

#: What an item is recorded for: one reading, or one per element of the machine.
ELEMENT_KINDS = ("single", "line", "phase", "isolation_point", "winding", "capacitor",
                 "survey_point", "bonding_point")


class CheckSpec(_Strict):
    """One acceptance criterion applied to an item's reading."""

    id: Identifier = "limit"
    rule: str = Field(description="name of the rule, e.g. 'at_most', 'relative_to'")
    params: dict[str, Any] = Field(default_factory=dict)
    source: Source
    element: str | None = Field(
        None, description="apply this check to one element only (e.g. L3-L1): for a check "
                          "that needs the readings of every element, such as voltage unbalance")


AnyQuantity = Annotated[Quantity, _parsed(*Dimension), _described("5 %", *Dimension)]


class CompareSpec(_Strict):
    """How a later visit's value of an item is compared with the machine's baseline.

    ``watch`` and ``act`` are changes from the baseline: a percentage of the baseline value
    (``5 %``) or an amount in the compared value's own unit (``5 K``). A change of at least
    ``watch`` is classed *watch*, of at least ``act`` *act*, anything smaller *steady*.
    """

    quantity: Literal["corrected", "reading"] = Field(
        "reading", description="reading: the value as read; corrected: the value the check "
                               "compared (e.g. R at the reference temperature, R at 40 °C)")
    check: Identifier | None = Field(
        None, description="the check whose compared value is used (default: the first that "
                          "has one)")
    step: str | None = Field(
        None, description="compare the value of this step of the check, by its label "
                          "(e.g. 'rise over ambient')")
    watch: AnyQuantity = Field(description="change to watch, e.g. '5 %' or '5 K'")
    act: AnyQuantity = Field(description="change to act on, e.g. '10 %' or '10 K'")
    direction: Literal["both", "up", "down"] = Field(
        "both", description="which changes count: up, down or both")
    note_up: str | None = Field(None, description="what a rise suggests")
    note_down: str | None = Field(None, description="what a fall suggests")
    normalise_to_voltage: str | None = Field(
        None, description="checklist.item of the supply voltage (e.g. "
                          "supply.voltage_under_load): the current is scaled by "
                          "U_baseline / U_visit; only for a resistive or constant-impedance load")
    source: Source = Field(
        default_factory=lambda: Source(kind="common practice"),
        description="where the watch and act thresholds come from")

    @model_validator(mode="after")
    def _thresholds(self) -> CompareSpec:
        if self.watch.dimension is not self.act.dimension:
            raise ValueError(f"watch ({self.watch.text}) and act ({self.act.text}) must be "
                             "of the same kind: both percentages or both in one unit")
        if self.watch.value <= 0 or self.act.value < self.watch.value:
            raise ValueError(f"need 0 < watch ≤ act; got watch {self.watch.text}, "
                             f"act {self.act.text}")
        return self


class ChecklistItem(_Strict):
    id: Identifier
    title: str = Field(description="what to record")
    record: Literal["confirmation", "quantity"]
    unit: str | None = Field(None, description="unit the reading is written in, e.g. 'V'")
    per: Literal["single", "line", "phase", "isolation_point", "winding", "capacitor",
                 "survey_point", "bonding_point"] = "single"
    also_record: dict[str, str] = Field(
        default_factory=dict,
        description="further values recorded with the reading, name → unit (e.g. temperature: °C)")
    required: bool = True
    safety_critical: bool = False
    category: Literal["II", "III", "IV"] | None = Field(
        None, description="measurement category of the point measured (IEC 61010-1)")
    needs_true_rms: bool = Field(
        False, description="an average-responding instrument is flagged on this item")
    applies_when: Literal["always", "capacitors", "windings", "three_phase", "survey_points",
                          "rated_current", "protective_device", "stored_energy",
                          "bonding_points", "intermittent_duty", "supply_cable"] = "always"
    checks: list[CheckSpec] = Field(default_factory=list)
    compare: CompareSpec | None = Field(
        None, description="how later visits are compared with the baseline")
    guidance: str | None = None
    caution: str | None = None


class Checklist(_Strict):
    checklist: Identifier
    title: str
    version: int = 1
    purpose: str | None = None
    caution: str | None = None
    items: list[ChecklistItem]


# ---------------------------------------------------------------- job


class StandardInForce(_Strict):
    document: str
    edition: str
    title: str | None = None


class LimitOverride(_Strict):
    """A local rule replacing a checklist's default limit; the record shows it and why."""

    item: str = Field(description="checklist.item, e.g. 'supply.voltage'")
    check: Identifier = "limit"
    params: dict[str, Any]
    reason: str
    source: Source


class Party(_Strict):
    name: str
    contact: str | None = None


class JobFile(_Strict):
    """``job.yaml``: the site, who does the work, standards and local rules."""

    title: str
    site: Party
    contractor: Party
    client: Party | None = None
    standards: list[StandardInForce] = Field(default_factory=list)
    reference_temperature: Temperature = Field(
        default_factory=lambda: parse_quantity("20 °C", Dimension.TEMPERATURE),
        description="temperature winding resistances are corrected to for comparison")
    overrides: list[LimitOverride] = Field(default_factory=list)
    decision_rule: Literal["simple acceptance", "guarded acceptance"] = Field(
        "simple acceptance",
        description="ILAC-G8:09/2019 decision rule: simple (guard band 0) or guarded (w = U)")
    coverage_factor: float = Field(2.0, gt=0, le=4,
                                   description="k for the expanded uncertainty U = k·u")
    notes: str | None = None


# ---------------------------------------------------------------- instruments

_CATEGORY_RE = re.compile(r"^CAT\s*(?P<cat>I{1,3}|IV)\s+(?P<volts>\d+(?:\.\d+)?)\s*V$")


class AccuracyEntry(_Strict):
    """One function and range of an instrument, as its data sheet states it."""

    measures: str = Field(description="unit of the function, e.g. 'V', 'A', 'Ω', 'µF', '°C'")
    range: str | None = Field(None, description="full scale of the range, e.g. '600 V'; "
                              "absent for a single-range function")
    accuracy: str = Field(description="e.g. '±(0.5 % of reading + 2 digits)', '±1 % of range'")
    resolution: str | None = Field(None, description="last digit on this range, e.g. '0.1 V'")


class Instrument(_Strict):
    id: Identifier
    kind: str = Field(description="e.g. multimeter, clamp meter, insulation tester")
    model: str | None = None
    serial: str | None = None
    response: Literal["true-rms", "average-responding", "not applicable"] = Field(
        description="how the instrument responds to a.c.")
    category: str | None = Field(
        None, pattern=r"^CAT\s*(I{1,3}|IV)\s+\d+(\.\d+)?\s*V$",
        description="measurement category and voltage (IEC 61010-1), e.g. 'CAT III 600 V'")
    calibrated: Date | None = None
    calibration_due: Date | None = None
    functions: list[AccuracyEntry] = Field(
        default_factory=list, description="accuracy per function and range")

    @property
    def category_rank(self) -> int | None:
        match = _CATEGORY_RE.match(self.category or "")
        return {"I": 1, "II": 2, "III": 3, "IV": 4}[match["cat"]] if match else None

    @property
    def category_voltage(self) -> float | None:
        match = _CATEGORY_RE.match(self.category or "")
        return float(match["volts"]) if match else None


class InstrumentRegister(_Strict):
    """``instruments.yaml``: every instrument that took a reading."""

    instruments: list[Instrument]


# ---------------------------------------------------------------- machines


class WindingSpec(_Strict):
    id: Identifier
    name: str
    material: Literal["copper", "aluminium"]
    thermal_class: Literal["90", "105", "120", "130", "155", "180", "200", "220", "250",
                           "Y", "A", "E", "B", "F", "H", "N", "R"] = Field(
        description="IEC 60085 thermal class, by number or letter")
    resistance: Annotated[Resistance, Positive] | None = Field(
        None, description="manufacturer's value")
    resistance_tolerance: Ratio | None = None
    resistance_temperature: Temperature | None = Field(
        None, description="temperature the manufacturer's value is stated at")
    rise_limit: Annotated[TemperatureDifference, Positive] | None = Field(
        None, description="manufacturer's rise limit; default by thermal class")
    kind: Literal["rotating_machine", "dc_coil", "transformer"] = Field(
        "rotating_machine",
        description="what the winding belongs to, which chooses the basis of its rise "
                    "limit: rotating_machine (IEC 60034-1 or NEMA MG 1), dc_coil (thermal "
                    "class less 40 °C and hot_spot_allowance) or transformer (IEC 60076-11)")
    small_or_encapsulated: bool = Field(
        False, description="rotating machine below 600 W, or self-cooled without a fan "
                           "(IC 40) or with encapsulated windings: IEC 60034-1:2010 Table 7 "
                           "items 1d/1e, 5 K higher")
    hot_spot_allowance: TemperatureDifference | None = Field(
        None, description="d.c. coil: how far its hottest spot runs above the average "
                          "(manufacturer's figure)")


class CapacitorSpec(_Strict):
    id: Identifier
    name: str
    nominal: Annotated[Capacitance, Positive]
    tolerance: str = Field(description="IEC 60062 letter (J, K, M, …) or '±5 %'")
    rated_voltage: Annotated[Voltage, Positive] | None = None
    working_voltage: Annotated[Voltage, Positive] | None = Field(
        None, description="peak voltage in service")
    bleeder_resistance: Annotated[Resistance, Positive] | None = Field(
        None, description="discharge resistor across the capacitor, from the drawings")
    circuit: Literal["ac", "dc"] = Field(
        "ac", description="'ac' for a run or power-factor capacitor on the supply (the record "
                          "shows its reactance and expected current); 'dc' for a filter "
                          "capacitor after a rectifier")


class ProtectiveDevice(_Strict):
    description: str
    rating: Annotated[Current, Positive]


class Conductor(_Strict):
    material: Literal["copper", "aluminium"] = "copper"
    cross_section: Annotated[Area, Positive]


class SupplyCable(Conductor):
    length: Annotated[Length, Positive]
    cores: int = Field(ge=1, le=7)
    conductor_class: Literal[1, 2, 5] = Field(
        2, description="IEC 60228 class: 1 solid, 2 stranded, 5 flexible")
    ampacity: Annotated[Current, Positive] | None = Field(
        None, description="current-carrying capacity as installed (IEC 60364-5-52)")
    power_factor: float | None = Field(
        None, gt=0, le=1, description="cos φ of the load for the voltage drop; 1 if absent")


class BondingPoint(Conductor):
    """A point of the protective bonding circuit, tested back to the PE terminal."""

    id: Identifier
    name: str
    length: Annotated[Length, Positive] = Field(
        description="length of the protective conductor path tested")
    conductor_class: Literal[1, 2, 5] | None = Field(
        2, description="IEC 60228 class of a copper conductor; null to use the resistivity")


class SurveyPoint(_Strict):
    id: Identifier
    name: str
    limit: Temperature | None = Field(None, description="highest allowed temperature")
    rise_limit: TemperatureDifference | None = Field(None, description="highest allowed rise")


class Nameplate(_Strict):
    rated_voltage: Annotated[Voltage, Positive]
    phases: Literal[1, 3]
    neutral: bool = Field(False, description="a neutral conductor is connected")
    frequency: Annotated[Frequency, Positive] | None = Field(
        None, description="absent for a d.c. supply")
    rated_current: Annotated[Current, Positive] | None = None
    rated_current_basis: Literal["rms", "average", "dc"] = "rms"
    rated_power: Annotated[Power, Positive] | None = None
    duty_cycle: Annotated[Ratio, AfterValidator(_share)] | None = None
    load_kind: Literal["motor", "arc welder", "motor-generator arc welder", "other"] | None = (
        Field(None, description="what the supply feeds: chooses the intermittent-duty rule "
                                "(NEC 630.11(A) for welders, 430.22(E) for motors)"))
    duty_class: Literal["short-time", "intermittent", "periodic", "varying"] | None = Field(
        None, description="a motor's duty service class (NEC Table 430.22(E))")
    time_rating: Literal["5 min", "15 min", "30 min", "60 min", "continuous"] | None = Field(
        None, description="a motor's time rating on its nameplate (NEC Table 430.22(E))")
    windings: list[WindingSpec] = Field(default_factory=list)
    capacitors: list[CapacitorSpec] = Field(default_factory=list)
    protective_device: ProtectiveDevice | None = None
    supply_cable: SupplyCable | None = None

    @property
    def current_basis(self) -> Basis:
        return Basis(self.rated_current_basis)


class CompareAdjustment(_Strict):
    """This machine's change to a checklist item's comparison, e.g. for its kind of load."""

    watch: AnyQuantity | None = None
    act: AnyQuantity | None = None
    direction: Literal["both", "up", "down"] | None = None
    normalise_to_voltage: str | None = Field(
        None, description="checklist.item of the supply voltage; only for a resistive or "
                          "constant-impedance load")
    reason: str = Field(description="why this machine differs from the checklist's default")


class MachineFile(_Strict):
    """``machines/<id>/machine.yaml``: what is installed and what it should be."""

    name: str
    kind: str = Field(description="e.g. 'magnetic workholding table'")
    area: str | None = Field(None, description="hall, line or area of the site")
    manufacturer: str | None = None
    model: str | None = None
    serial: str | None = None
    nameplate: Nameplate
    survey_points: list[SurveyPoint] = Field(default_factory=list)
    bonding_points: list[BondingPoint] = Field(
        default_factory=list, description="points of the protective bonding continuity test")
    checklists: list[Identifier] = Field(description="checklists that apply to this machine")
    baseline: str | None = Field(
        None, description="id of the visit later visits are compared with (its file name "
                          "without .yaml); default: the earliest commissioning visit")
    compare: dict[str, CompareAdjustment] = Field(
        default_factory=dict,
        description="checklist.item → this machine's change to the item's comparison")
    notes: str | None = None


# ---------------------------------------------------------------- visits


class VisitKind(str, Enum):
    COMMISSIONING = "commissioning"
    PERIODIC = "periodic"
    AFTER_REPAIR = "after-repair"


class Attachment(_Strict):
    path: str = Field(description="relative to the machine folder")
    title: str


class SignOff(_Strict):
    name: str
    role: str
    date: Date
    statement: str | None = None


class Conditions(_Strict):
    ambient: Temperature | None = None
    weather: str | None = None
    note: str | None = None


class PartReplaced(_Strict):
    """A part replaced on a visit: what, why, and what came out and went in."""

    part: str = Field(description="e.g. 'run capacitor', 'line contactor K1'")
    reason: str
    old: str | None = Field(None, description="the part taken out, free text or a value "
                                              "such as '26.1 µF'")
    new: str | None = Field(None, description="the part fitted, free text or a value")
    element: Identifier | None = Field(
        None, description="the machine element the part is (a winding or capacitor id), "
                          "when it is one")
    items: list[str] = Field(
        default_factory=list,
        description="checklist.item keys whose readings show the part's behaviour "
                    "(default: every item of its element)")


class VisitFile(_Strict):
    """``machines/<id>/visits/<visit>.yaml``: one test visit with its readings."""

    kind: VisitKind
    date: Date
    performed_by: list[str] = Field(min_length=1, max_length=MAX_PEOPLE_PER_VISIT)
    default_instrument: Identifier | None = None
    conditions: Conditions = Field(default_factory=Conditions)
    readings: dict[str, dict[str, Any]] = Field(
        default_factory=dict,
        description="checklist → item → reading; a reading is '230 V', yes/no, "
                    "{value, instrument, note, ...} or element → reading")
    as_left: dict[str, dict[str, Any]] = Field(
        default_factory=dict,
        description="readings after adjustment or repair on this visit, the same shape as "
                    "readings (which then hold the as-found values); later visits are "
                    "compared with the as-left values")
    parts_replaced: list[PartReplaced] = Field(default_factory=list,
                                               max_length=MAX_LIST_PER_VISIT)
    notes: str | None = Field(None, description="Markdown")
    attachments: list[Attachment] = Field(default_factory=list, max_length=MAX_LIST_PER_VISIT)
    sign_off: list[SignOff] = Field(default_factory=list, max_length=MAX_PEOPLE_PER_VISIT)


# ---------------------------------------------------------------- the punch list


class AcceptedException(_Strict):
    """The client accepts a deficiency as it stands (a concession): who, when, why, until."""

    by: str = Field(description="who accepted it for the client, e.g. 'J. Doe (client)'")
    date: Date
    reason: str
    until: Date | None = Field(None, description="the date the acceptance runs out, if any")


class PunchEntry(_Strict):
    """What the supervisor adds to one deficiency, addressed by machine, item and point."""

    machine: Identifier
    item: str = Field(pattern=r"^[a-z0-9][a-z0-9_-]*\.[a-z0-9][a-z0-9_-]*$",
                      description="checklist.item, e.g. 'electrical.insulation'")
    point: str | None = Field(None, description="the element (winding, capacitor, point, "
                                                "line) when the item has several")
    owner: str | None = Field(None, description="who is to close it")
    due: Date | None = None
    note: str | None = Field(None, description="the status in a sentence")
    accepted: AcceptedException | None = None


class HandoverRoles(_Strict):
    roles: list[str] = Field(
        default_factory=list,
        description="the sign-off roles the sign-off matrix shows, in order (default: every "
                    "role the visits carry)")
    required: list[str] = Field(
        default_factory=list,
        description="the roles a machine's latest visit must carry to be ready for handover")


class PunchListFile(_Strict):
    """``punch_list.yaml`` (optional): owners, due dates and accepted exceptions."""

    handover: HandoverRoles = Field(default_factory=HandoverRoles)
    entries: list[PunchEntry] = Field(default_factory=list)
