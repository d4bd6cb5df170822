"""Load a job folder into the model, collecting every problem before giving up.

Validation runs in two stages, as a reader checks a form: first each file on its
own (types, units, dates, names), then across files (a reading names a known
instrument, a checklist item, a machine element). Problems from every file are
reported together, each as ``file:line:column: key.path: message``.
"""

from __future__ import annotations

import dataclasses
import difflib
import types
import typing
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ValidationError

from .errors import InputError, Problem
from .model import (
    Checklist,
    ChecklistItem,
    Instrument,
    InstrumentRegister,
    JobFile,
    MachineFile,
    Nameplate,
    VisitFile,
)
from .resources import checklists_dir
from .units import Dimension, Quantity, UnitError, parse_quantity
from .units import unit_dimension as _unit_dimension
from .yamlfile import Document, KeyPath, format_key_path, load_yaml

__all__ = [
    "Job", "LoadedChecklist", "LoadedMachine", "LoadedVisit", "Reading", "load_job",
    "element_names", "unit_dimension", "MAX_MACHINES", "MAX_VISITS_PER_MACHINE",
]

JOB_FILE = "job.yaml"
INSTRUMENTS_FILE = "instruments.yaml"
MACHINES_DIR = "machines"
VISITS_DIR = "visits"
MAX_MACHINES = 2000
MAX_VISITS_PER_MACHINE = 200

_UNVALIDATED: Any = None  # placeholder for an instrument whose entry has problems


class _UnreadRegister(dict[str, Instrument]):
    """Stands for a register that could not be read: it may hold any id."""

    def __contains__(self, key: object) -> bool:
        return True

_CONFIRM_TRUE = {"yes", "y", "done", "confirmed", "true"}
_CONFIRM_FALSE = {"no", "n", "not done", "false"}
_NOT_APPLICABLE = {"n/a", "na", "not applicable"}


@dataclass(frozen=True)
class Reading:
    """One recorded value of one checklist item (one element of it, where per-element)."""

    checklist: str
    item: str
    element: str | None
    value: Quantity | bool | None  # None: left blank (not tested)
    not_applicable: bool
    instrument: str | None
    extras: dict[str, Quantity]
    note: str | None
    file: str
    line: int
    range: Quantity | None = None  # the instrument range, when the reading names one
    capture: Any = None  # a CaptureAnalysis when a scope capture is attached


@dataclass
class LoadedChecklist:
    model: Checklist
    document: Document
    origin: str  # "built-in" or the job-relative path

    @property
    def id(self) -> str:
        return self.model.checklist

    def item(self, item_id: str) -> ChecklistItem | None:
        return next((i for i in self.model.items if i.id == item_id), None)


@dataclass
class LoadedVisit:
    id: str
    machine_id: str
    path: Path
    document: Document
    model: VisitFile
    readings: dict[tuple[str, str], list[Reading]] = field(default_factory=dict)
    # Sign-off records (integrity.SignatureFile), kept outside the files they cover.
    signatures: list[Any] = field(default_factory=list)
    # Readings after adjustment or repair on the same visit (VisitFile.as_left).
    as_left: dict[tuple[str, str], list[Reading]] = field(default_factory=dict)


@dataclass
class LoadedMachine:
    id: str
    folder: Path
    document: Document
    model: MachineFile
    visits: list[LoadedVisit] = field(default_factory=list)


@dataclass
class Job:
    root: Path
    document: Document
    model: JobFile
    instruments: dict[str, Instrument]
    instruments_document: Document | None
    checklists: dict[str, LoadedChecklist]
    machines: list[LoadedMachine]


# ------------------------------------------------------------------ helpers


def unit_dimension(unit: str) -> Dimension:
    return _unit_dimension(unit)


def element_names(kind: str, nameplate: Nameplate, survey_ids: list[str],
                  bonding_ids: list[str] | None = None) -> list[str | None]:
    three = nameplate.phases == 3
    if kind == "single":
        return [None]
    if kind == "line":
        return ["L1-L2", "L2-L3", "L3-L1"] if three else ["L-N"]
    if kind == "phase":
        return ["L1", "L2", "L3"] if three else ["L"]
    if kind == "isolation_point":
        if three:
            points = ["L1-L2", "L2-L3", "L3-L1", "L1-PE", "L2-PE", "L3-PE"]
            return [*points, "N-PE"] if nameplate.neutral else points
        return ["L-N", "L-PE", "N-PE"]
    if kind == "winding":
        return [w.id for w in nameplate.windings]
    if kind == "capacitor":
        return [c.id for c in nameplate.capacitors]
    if kind == "survey_point":
        return list(survey_ids)
    if kind == "bonding_point":
        return list(bonding_ids or [])
    raise ValueError(kind)  # pragma: no cover - guarded by the model's Literal


def _suggest(word: str, known: list[str]) -> str:
    close = difflib.get_close_matches(word, known, n=1, cutoff=0.6)
    if close:
        return f"; did you mean '{close[0]}'?"
    if known and len(known) <= 12:
        return "; known: " + ", ".join(known)
    return ""


def _unwrap(annotation: Any) -> Any:
    origin = typing.get_origin(annotation)
    if origin is typing.Annotated:
        return _unwrap(typing.get_args(annotation)[0])
    if origin in (typing.Union, types.UnionType):
        options = [a for a in typing.get_args(annotation) if a is not type(None)]
        return _unwrap(options[0]) if len(options) == 1 else annotation
    return annotation


def _fields_at(model: type[BaseModel], loc: tuple[Any, ...]) -> list[str]:
    """Names of the fields allowed in the mapping at ``loc`` (for 'did you mean')."""
    current: Any = model
    for part in loc:
        current = _unwrap(current)
        if isinstance(current, type) and issubclass(current, BaseModel):
            info = current.model_fields.get(str(part))
            if info is None:
                return []
            current = info.annotation
        elif typing.get_origin(current) in (list, tuple) and isinstance(part, int):
            current = typing.get_args(current)[0]
        elif typing.get_origin(current) is dict:
            current = typing.get_args(current)[1]
        else:
            return []
    current = _unwrap(current)
    if isinstance(current, type) and issubclass(current, BaseModel):
        return list(current.model_fields)
    return []


# Pydantic's type errors in the words of the file: what was expected, what was written.
_TYPE_WORDS = {
    "string_type": "text", "model_type": "a mapping of fields", "dict_type": "a mapping",
    "list_type": "a list", "int_type": "a whole number", "int_parsing": "a whole number",
    "int_from_float": "a whole number", "float_type": "a number", "float_parsing": "a number",
    "bool_type": "true or false", "bool_parsing": "true or false",
}
_BOUND_WORDS = {"greater_than": "greater than", "greater_than_equal": "at least",
                "less_than": "less than", "less_than_equal": "at most"}


def _got(value: Any) -> str:
    if value is None:
        return "nothing (the value is empty)"
    if isinstance(value, bool):
        return str(value).lower()
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, int | float):
        return f"the number {value!r}"
    text = str(value)
    return repr(text if len(text) <= 60 else text[:57] + "...")


def _validate(model: type[BaseModel], document: Document, problems: list[Problem]) -> Any:
    data = document.data
    if not isinstance(data, dict):
        fields = ", ".join(list(model.model_fields)[:4])
        if data is None:
            message = f"the file is empty; write its fields ({fields}, …)"
        else:
            message = (f"the file holds {_got(data)}; it must hold a mapping of fields "
                       f"({fields}, …), one 'name: value' per line")
        problems.append(document.problem((), message))
        return None
    try:
        return model.model_validate(data)
    except ValidationError as error:
        for detail in error.errors(include_url=False):
            loc = tuple(detail["loc"])
            kind = detail["type"]
            if kind == "extra_forbidden":
                name = str(loc[-1])
                known = _fields_at(model, loc[:-1])
                message = f"unknown field '{name}'{_suggest(name, known)}"
            elif kind == "missing":
                message = f"required field '{loc[-1]}' is missing; add it"
                loc = loc  # the parent mapping is located by Document.where
            elif kind in ("value_error", "assertion_error"):
                message = str(detail.get("ctx", {}).get("error", detail["msg"]))
            elif kind == "too_short":
                wanted = detail.get("ctx", {}).get("min_length", 1)
                message = (f"needs at least {wanted} entr{'y' if wanted == 1 else 'ies'}; "
                           f"for example {loc[-1]}: [R. Name]" if loc and loc[-1] ==
                           "performed_by" else
                           f"needs at least {wanted} entr{'y' if wanted == 1 else 'ies'}")
            elif kind in ("literal_error", "enum"):
                expected = detail.get("ctx", {}).get("expected", "")
                message = f"{detail['input']!r} is not allowed; use one of {expected}"
                options = [o.strip("'") for o in expected.replace(" or ", ", ").split(", ")]
                close = difflib.get_close_matches(str(detail["input"]), options, n=1,
                                                  cutoff=0.6)
                if not close:
                    close = [o for o in options
                             if o.lower() == str(detail["input"]).lower()][:1]
                if close and close[0] != str(detail["input"]):
                    message += f"; did you mean '{close[0]}'?"
            elif kind == "string_too_long":
                wanted = detail.get("ctx", {}).get("max_length", "")
                message = (f"{_got(detail['input'])} is longer than {wanted} characters; "
                           "shorten it")
            elif kind == "string_pattern_mismatch" and loc and loc[-1] == "category":
                message = (f"{detail['input']!r} is not a measurement category; write it as "
                           f"'CAT III 600 V' (IEC 61010-1)")
            elif kind == "string_pattern_mismatch":
                message = (f"{detail['input']!r} is not a valid id; use lower-case letters, "
                           f"digits, '-' and '_'")
            elif kind in _TYPE_WORDS:
                message = f"expected {_TYPE_WORDS[kind]}, got {_got(detail.get('input'))}"
                if kind in ("model_type", "dict_type"):
                    fields = _fields_at(model, loc)
                    if fields:
                        message += f"; write its fields ({', '.join(fields[:4])}, …)"
                elif kind == "string_type" and isinstance(detail.get("input"), int | float):
                    message += f"; quote it if it is meant as text: '{detail['input']}'"
            elif kind in _BOUND_WORDS:
                bound = next(iter(detail.get("ctx", {}).values()), "")
                message = f"must be {_BOUND_WORDS[kind]} {bound}, got {_got(detail['input'])}"
            else:
                message = detail["msg"][:1].lower() + detail["msg"][1:]
                if "input" in detail and not isinstance(detail["input"], dict | list):
                    message += f" (got {detail['input']!r})"
            problems.append(document.problem(loc, message))
        return None


def _load_document(path: Path, root: Path, problems: list[Problem]) -> Document | None:
    try:
        return load_yaml(path, display_name=_display(path, root))
    except InputError as error:
        problems.extend(error.problems)
        return None


def _display(path: Path, root: Path) -> str:
    try:
        return str(path.relative_to(root.parent if root.parent != root else root))
    except ValueError:
        return str(path)


# ------------------------------------------------------------------ checklists


def _load_checklists(root: Path, problems: list[Problem]) -> dict[str, LoadedChecklist]:
    result: dict[str, LoadedChecklist] = {}
    sources = [(p, "built-in") for p in sorted(checklists_dir().glob("*.yaml"))]
    local = root / "checklists"
    if local.is_dir():
        sources += [(p, _display(p, root)) for p in sorted(local.glob("*.yaml"))]
    for path, origin in sources:
        document = _load_document(path, path.parent if origin == "built-in" else root, problems)
        if document is None:
            continue
        model = _validate(Checklist, document, problems)
        if model is None:
            continue
        seen: set[str] = set()
        for index, item in enumerate(model.items):
            if item.id in seen:
                problems.append(document.problem(("items", index, "id"),
                                                 f"item id '{item.id}' is used twice; give "
                                                 "each item its own id"))
            seen.add(item.id)
            if item.record == "quantity":
                if not item.unit:
                    problems.append(document.problem(("items", index),
                                                     "a quantity item needs a 'unit', e.g. "
                                                     "unit: V"))
                else:
                    try:
                        unit_dimension(item.unit)
                    except UnitError as error:
                        problems.append(document.problem(("items", index, "unit"), str(error)))
            for name, unit in item.also_record.items():
                try:
                    unit_dimension(unit)
                except UnitError as error:
                    problems.append(
                        document.problem(("items", index, "also_record", name), str(error)))
        _check_rules(model, document, problems)
        result[model.checklist] = LoadedChecklist(model, document, origin)
    for loaded in result.values():
        _check_compare_specs(loaded, result, problems)
    return result


def _voltage_item_problem(key: str, checklists: dict[str, LoadedChecklist]) -> str | None:
    """Why ``key`` cannot name the supply voltage a current is normalised to, or None."""
    checklist_id, _, item_id = key.partition(".")
    loaded = checklists.get(checklist_id)
    target = loaded.item(item_id) if loaded else None
    if target is None:
        known = [f"{c}.{i.id}" for c, lc in checklists.items() for i in lc.model.items
                 if i.unit and _is_voltage(i.unit)]
        return f"no checklist item '{key}'{_suggest(key, known)}"
    if not (target.unit and _is_voltage(target.unit)):
        return f"'{key}' does not record a voltage"
    return None


def _is_voltage(unit: str) -> bool:
    try:
        return unit_dimension(unit) is Dimension.VOLTAGE
    except UnitError:
        return False


def _check_compare_specs(loaded: LoadedChecklist, checklists: dict[str, LoadedChecklist],
                         problems: list[Problem]) -> None:
    for index, item in enumerate(loaded.model.items):
        spec = item.compare
        if spec is None:
            continue
        path: KeyPath = ("items", index, "compare")
        if item.record != "quantity":
            problems.append(loaded.document.problem(
                path, "only a quantity item can be compared between visits"))
            continue
        if spec.check is not None and spec.check not in [c.id for c in item.checks]:
            problems.append(loaded.document.problem(
                (*path, "check"), f"item '{item.id}' has no check '{spec.check}'"
                                  f"{_suggest(spec.check, [c.id for c in item.checks])}"))
        if spec.quantity == "corrected" and not item.checks:
            problems.append(loaded.document.problem(
                (*path, "quantity"), "'corrected' needs a check that computes the value; "
                                     "use quantity: reading"))
        if spec.quantity == "reading" and spec.watch.dimension is not Dimension.RATIO:
            try:
                dimension = unit_dimension(item.unit or "")
            except UnitError:
                dimension = None
            allowed = (Dimension.TEMPERATURE_DIFFERENCE if dimension is Dimension.TEMPERATURE
                       else dimension)
            if spec.watch.dimension is not allowed:
                problems.append(loaded.document.problem(
                    (*path, "watch"), f"a change of this reading is a percentage or a "
                                      f"{allowed.value if allowed else 'quantity'}, not "
                                      f"{spec.watch.text!r}"))
        if spec.normalise_to_voltage is not None:
            message = _voltage_item_problem(spec.normalise_to_voltage, checklists)
            if message:
                problems.append(loaded.document.problem((*path, "normalise_to_voltage"),
                                                        message))


def _check_rules(model: Checklist, document: Document, problems: list[Problem]) -> None:
    from .evaluation.rules import RULES  # late: evaluation imports loading's types

    for index, item in enumerate(model.items):
        for check_index, check in enumerate(item.checks):
            rule = RULES.get(check.rule)
            path: KeyPath = ("items", index, "checks", check_index)
            if rule is None:
                problems.append(document.problem(
                    (*path, "rule"),
                    f"unknown rule '{check.rule}'{_suggest(check.rule, sorted(RULES))}"))
                continue
            for message in [*rule.validate_params(check.params, item),
                            *_bounds_order(check.params)]:
                problems.append(document.problem((*path, "params"), message))
            fixed = _FIXED_ELEMENTS.get(item.per)
            if check.element is not None and fixed is not None and check.element not in fixed:
                problems.append(document.problem(
                    (*path, "element"),
                    f"'{check.element}' is not a {item.per.replace('_', ' ')}"
                    f"{_suggest(check.element, list(fixed))}"))


def _bounds_order(params: dict[str, Any]) -> list[str]:
    """A window whose lower bound lies above its upper bound passes nothing; say so."""
    if "lower" not in params or "upper" not in params:
        return []
    try:
        lower = parse_quantity(params["lower"], *Dimension)
        upper = parse_quantity(params["upper"], *Dimension)
    except UnitError:
        return []  # reported by the rule's own parameter checks
    if lower.dimension is upper.dimension and lower.value > upper.value:
        return [f"lower ({lower.text}) is above upper ({upper.text}); swap them"]
    return []


# Element names that do not depend on the machine, for checking a check's 'element'.
_FIXED_ELEMENTS: dict[str, tuple[str, ...]] = {
    "single": (),
    "line": ("L1-L2", "L2-L3", "L3-L1", "L-N"),
    "phase": ("L1", "L2", "L3", "L"),
    "isolation_point": ("L1-L2", "L2-L3", "L3-L1", "L1-PE", "L2-PE", "L3-PE", "N-PE", "L-N",
                        "L-PE"),
}


# ------------------------------------------------------------------ readings


def _confirmation(raw: Any) -> bool | None:
    if isinstance(raw, bool):
        return raw
    if isinstance(raw, str):
        lowered = raw.strip().lower()
        if lowered in _CONFIRM_TRUE:
            return True
        if lowered in _CONFIRM_FALSE:
            return False
    raise UnitError(f"{raw!r} is not a confirmation; write yes or no")


def _parse_reading(item: ChecklistItem, checklist_id: str, element: str | None, raw: Any,
                   path: KeyPath, visit: LoadedVisit, instruments: dict[str, Instrument],
                   problems: list[Problem]) -> Reading | None:
    document = visit.document
    extras: dict[str, Quantity] = {}
    range_holder: list[Quantity] = []
    capture_holder: list[Any] = []
    instrument = visit.model.default_instrument if item.record == "quantity" else None
    note = None
    value_path = path
    if isinstance(raw, dict):
        allowed = {"value", "instrument", "note", "range", "capture", *item.also_record}
        for key in raw:
            if key not in allowed:
                problems.append(document.problem(
                    (*path, key), f"unknown field '{key}'{_suggest(key, sorted(allowed))}"))
        if "value" not in raw:
            problems.append(document.problem(path, "a reading given as a mapping needs "
                                             "'value' (e.g. value: 230 V)"))
            return None
        value_raw = raw.get("value")
        value_path = (*path, "value")
        if raw.get("instrument") is not None and not isinstance(raw["instrument"], str):
            problems.append(document.problem(
                (*path, "instrument"), f"expected an instrument id from instruments.yaml, "
                                       f"got {_got(raw['instrument'])}"))
        elif raw.get("instrument") is not None:
            instrument = str(raw["instrument"])
            if instrument not in instruments:
                problems.append(document.problem(
                    (*path, "instrument"),
                    f"instrument '{instrument}' is not in instruments.yaml"
                    f"{_suggest(instrument, sorted(instruments))}"))
        note = raw.get("note")
        if isinstance(note, int | float) and not isinstance(note, bool):
            note = str(note)
        elif note is not None and not isinstance(note, str):
            problems.append(document.problem(
                (*path, "note"), f"a note is text, got {_got(note)}; quote it if it holds "
                                 "': ' or starts with '[' or '{'"))
            note = None
        if raw.get("capture") is not None and item.record != "quantity":
            problems.append(document.problem(
                (*path, "capture"), "a capture belongs to a measured quantity; this item "
                                    "records a confirmation (list it under attachments)"))
        elif raw.get("capture") is not None:
            capture_holder.append(_load_capture(raw["capture"], (*path, "capture"), visit,
                                                problems))
        if raw.get("range") is not None and item.unit:
            try:
                extras_range = parse_quantity(raw["range"], unit_dimension(item.unit))
            except UnitError as error:
                problems.append(document.problem((*path, "range"), str(error)))
            else:
                range_holder.append(extras_range)
        for name, unit in item.also_record.items():
            if raw.get(name) is None:
                continue
            try:
                extras[name] = parse_quantity(raw[name], unit_dimension(unit))
            except UnitError as error:
                problems.append(document.problem((*path, name), str(error)))
    else:
        value_raw = raw
    line = document.where(value_path)[0]
    common = dict(checklist=checklist_id, item=item.id, element=element, instrument=instrument,
                  extras=extras, note=note, file=document.display_name, line=line,
                  range=range_holder[0] if range_holder else None,
                  capture=capture_holder[0] if capture_holder else None)
    if value_raw is None or (isinstance(value_raw, str) and not value_raw.strip()):
        return Reading(value=None, not_applicable=False, **common)
    if isinstance(value_raw, str) and value_raw.strip().lower() in _NOT_APPLICABLE:
        if item.safety_critical:
            problems.append(document.problem(
                value_path, "a safety-critical item cannot be marked not applicable; record "
                "the reading, or leave it blank and the visit stays incomplete"))
            return None
        return Reading(value=None, not_applicable=True, **common)
    try:
        if item.record == "confirmation":
            value: Quantity | bool = _confirmation(value_raw)
        else:
            value = parse_quantity(value_raw, unit_dimension(item.unit or ""))
            if value.dimension is Dimension.TEMPERATURE and value.value < -273.15:
                raise UnitError("below absolute zero")
    except UnitError as error:
        problems.append(document.problem(value_path, str(error)))
        return None
    if item.record == "quantity" and instrument is None:
        problems.append(document.problem(
            value_path, "no instrument is named for this reading; add 'instrument: <id>' or "
            "set default_instrument for the visit"))
    return Reading(value=value, not_applicable=False, **common)


_CAPTURE_KEYS = ("file", "channels", "voltage", "current", "time_column")


def _load_capture(raw: Any, path: KeyPath, visit: LoadedVisit, problems: list[Problem]) -> Any:
    """Read and analyse an attached scope capture; None (with problems) when it cannot be."""
    from .captures import analyse_capture, parse_scaling

    document = visit.document
    if not isinstance(raw, dict) or "file" not in raw or "channels" not in raw:
        problems.append(document.problem(
            path, "a capture needs 'file' and 'channels', e.g. capture: {file: "
                  "captures/line.csv, channels: {CH1: x100, CH2: 10 mV/A}, current: CH2}"))
        return None
    for key in raw:
        if key not in _CAPTURE_KEYS:
            problems.append(document.problem(
                (*path, key), f"unknown field '{key}'{_suggest(key, list(_CAPTURE_KEYS))}"))
    wrong = [key for key in ("file", "voltage", "current", "time_column")
             if raw.get(key) is not None and not isinstance(raw[key], str)]
    for key in wrong:
        problems.append(document.problem(
            (*path, key), f"expected {'a file name' if key == 'file' else 'a column name'} "
                          f"such as {'captures/line.csv' if key == 'file' else 'CH1'}, got "
                          f"{_got(raw[key])}"))
    if wrong:
        return None
    if _unprintable(raw["file"]):
        problems.append(document.problem((*path, "file"), _UNPRINTABLE_PATH))
        return None
    machine_folder = visit.path.parent.parent
    relative = Path(str(raw["file"]))
    resolved, unreadable = _resolve(machine_folder, relative)
    if unreadable:
        problems.append(document.problem(
            (*path, "file"), f"capture '{_shown(raw['file'])}' {unreadable}"))
        return None
    if relative.is_absolute() or ".." in relative.parts:
        problems.append(document.problem(
            (*path, "file"), f"'{raw['file']}' leaves the machine folder; captures must sit "
                             "inside it (write a path relative to the machine folder)"))
        return None
    if not resolved.is_relative_to(machine_folder.resolve()):
        problems.append(document.problem(
            (*path, "file"), f"'{raw['file']}' resolves outside the machine folder (a link?); "
                             "copy the file into the machine folder"))
        return None
    if not resolved.is_file():
        problems.append(document.problem(
            (*path, "file"), f"capture '{raw['file']}' not found in {machine_folder.name}/"))
        return None
    channels = {}
    if not isinstance(raw["channels"], dict):
        problems.append(document.problem((*path, "channels"),
                                         "expected channel → scaling, e.g. {CH1: x100}"))
        return None
    for name, text in raw["channels"].items():
        try:
            channels[str(name)] = parse_scaling(str(text))
        except (ValueError, InputError) as error:
            problems.append(document.problem((*path, "channels", name), str(error)))
    if len(channels) != len(raw["channels"]):
        return None
    try:
        analysis = analyse_capture(resolved, channels, voltage_channel=raw.get("voltage"),
                                   current_channel=raw.get("current"),
                                   time_column=raw.get("time_column"))
    except InputError as error:
        # Problems name the file as the job names it, never by this computer's absolute path.
        shown = (Path(document.display_name).parent.parent / relative).as_posix()
        problems.extend(dataclasses.replace(p, file=shown) for p in error.problems)
        return None
    # Records name the file as the job names it, never by this computer's absolute path.
    display = Path(document.display_name).parent.parent / relative
    return dataclasses.replace(analysis, source=display.as_posix())


def _parse_readings(visit: LoadedVisit, machine: LoadedMachine,
                    checklists: dict[str, LoadedChecklist], instruments: dict[str, Instrument],
                    problems: list[Problem], section: str = "readings") -> None:
    document = visit.document
    target = visit.readings if section == "readings" else visit.as_left
    applicable = machine.model.checklists
    nameplate = machine.model.nameplate
    survey_ids = [p.id for p in machine.model.survey_points]
    bonding_ids = [p.id for p in machine.model.bonding_points]
    if (section == "readings" and visit.model.default_instrument
            and visit.model.default_instrument not in instruments):
        problems.append(document.problem(
            ("default_instrument",),
            f"instrument '{visit.model.default_instrument}' is not in instruments.yaml"
            f"{_suggest(visit.model.default_instrument, sorted(instruments))}"))
    for checklist_id, items in getattr(visit.model, section).items():
        if checklist_id not in applicable:
            hint = _suggest(checklist_id, applicable)
            problems.append(document.problem(
                (section, checklist_id),
                f"checklist '{checklist_id}' is not listed for this machine{hint}"))
            continue
        loaded = checklists.get(checklist_id)
        if loaded is None:
            continue  # reported against machine.yaml
        if not isinstance(items, dict):
            problems.append(document.problem((section, checklist_id),
                                             "expected a mapping of item id → reading"))
            continue
        for item_id, raw in items.items():
            item = loaded.item(item_id)
            path: KeyPath = (section, checklist_id, item_id)
            if item is None:
                known = [i.id for i in loaded.model.items]
                problems.append(document.problem(
                    path, f"checklist '{checklist_id}' has no item '{item_id}'"
                          f"{_suggest(item_id, known)}"))
                continue
            elements = element_names(item.per, nameplate, survey_ids, bonding_ids)
            parsed: list[Reading] = []
            if item.per == "single":
                reading = _parse_reading(item, checklist_id, None, raw, path, visit,
                                         instruments, problems)
                if reading:
                    parsed.append(reading)
            else:
                if not isinstance(raw, dict) or "value" in raw:
                    names = ", ".join(str(e) for e in elements) or "(none on the nameplate)"
                    problems.append(document.problem(
                        path, f"'{item_id}' is recorded per {item.per.replace('_', ' ')}; "
                              f"give one reading for each of: {names}"))
                    continue
                for element, element_raw in raw.items():
                    if element not in elements:
                        problems.append(document.problem(
                            (*path, element),
                            f"'{element}' is not a {item.per.replace('_', ' ')} of this machine"
                            f"{_suggest(str(element), [str(e) for e in elements])}"))
                        continue
                    reading = _parse_reading(item, checklist_id, element, element_raw,
                                             (*path, element), visit, instruments, problems)
                    if reading:
                        parsed.append(reading)
            target[(checklist_id, item_id)] = parsed


# ------------------------------------------------------------------ the job


def load_job(root: Path, include_visits: bool = True) -> Job:
    """Load and validate the job folder at ``root``; raise :class:`InputError` with all problems.

    ``include_visits=False`` loads the job, instruments, checklists and machines only (to
    scaffold a new visit while other visits are still being filled in).
    """
    root = Path(root)
    problems: list[Problem] = []
    if not root.is_dir():
        raise InputError.single(str(root), "is not a job folder (no such directory)")
    if not (root / JOB_FILE).is_file():
        raise InputError.single(str(root / JOB_FILE),
                                "not found; a job folder starts with job.yaml (see README)")

    job_document = _load_document(root / JOB_FILE, root, problems)
    job_model = _validate(JobFile, job_document, problems) if job_document else None

    instruments: dict[str, Instrument] = {}
    instruments_document = None
    if (root / INSTRUMENTS_FILE).is_file():
        instruments_document = _load_document(root / INSTRUMENTS_FILE, root, problems)
        register = (_validate(InstrumentRegister, instruments_document, problems)
                    if instruments_document else None)
        if register:
            for index, instrument in enumerate(register.instruments):
                if instrument.id in instruments:
                    problems.append(instruments_document.problem(
                        ("instruments", index, "id"),
                        f"instrument id '{instrument.id}' is used twice; give "
                        "each instrument its own id"))
                _check_accuracy(instrument, index, instruments_document, problems)
                if (instrument.calibrated and instrument.calibration_due
                        and instrument.calibration_due < instrument.calibrated):
                    problems.append(instruments_document.problem(
                        ("instruments", index, "calibration_due"),
                        "calibration_due is before calibrated; check the dates"))
                instruments[instrument.id] = instrument

    if (root / INSTRUMENTS_FILE).is_file() and (
            instruments_document is None or not isinstance(instruments_document.data, dict)
            or not isinstance(instruments_document.data.get("instruments"), list)):
        # The register cannot be read: which ids it holds is unknown, so no reading is
        # reported as naming an unknown instrument on top of the register's own problem.
        instruments = _UnreadRegister()
    elif instruments_document is not None and len(instruments) == 0:
        # The register did not validate: still know its ids, so readings that name them are
        # not reported a second time as unknown instruments.
        raw = instruments_document.data if isinstance(instruments_document.data, dict) else {}
        entries = raw.get("instruments") or []
        if any(not (isinstance(e, dict) and isinstance(e.get("id"), str)) for e in entries):
            instruments = _UnreadRegister()  # an entry without a readable id may be any
        for entry in entries:
            if isinstance(entry, dict) and isinstance(entry.get("id"), str):
                instruments.setdefault(entry["id"], _UNVALIDATED)

    checklists = _load_checklists(root, problems)
    machines = _load_machines(root, checklists, instruments, problems, include_visits)

    if job_model is not None and job_document is not None:
        _check_overrides(job_model, job_document, checklists, problems)

    if problems or job_model is None or job_document is None:
        raise InputError(problems)
    return Job(root=root, document=job_document, model=job_model, instruments=instruments,
               instruments_document=instruments_document, checklists=checklists,
               machines=machines)


def _check_accuracy(instrument: Instrument, index: int, document: Document,
                    problems: list[Problem]) -> None:
    from .computations import ComputationError
    from .computations.uncertainty import ACCURACY_FORMS, parse_accuracy_specification

    for number, entry in enumerate(instrument.functions):
        path: KeyPath = ("instruments", index, "functions", number)
        try:
            dimension = unit_dimension(entry.measures)
        except UnitError as error:
            problems.append(document.problem((*path, "measures"), str(error)))
            continue
        for name in ("range", "resolution"):
            text = getattr(entry, name)
            if text is None:
                continue
            try:
                parse_quantity(text, dimension)
            except UnitError as error:
                problems.append(document.problem((*path, name), str(error)))
        try:
            parse_accuracy_specification(entry.accuracy)
        except ComputationError as error:
            message = str(error)
            if "accepted forms" not in message:
                message += "; accepted forms: " + "; ".join(ACCURACY_FORMS)
            problems.append(document.problem(
                (*path, "accuracy"), f"instrument '{instrument.id}': {message}"))


def _check_overrides(job: JobFile, document: Document, checklists: dict[str, LoadedChecklist],
                     problems: list[Problem]) -> None:
    from .evaluation.rules import RULES

    for index, override in enumerate(job.overrides):
        path: KeyPath = ("overrides", index)
        checklist_id, _, item_id = override.item.partition(".")
        loaded = checklists.get(checklist_id)
        item = loaded.item(item_id) if loaded else None
        if item is None:
            known = [f"{c}.{i.id}" for c, lc in checklists.items() for i in lc.model.items]
            problems.append(document.problem(
                (*path, "item"),
                f"no checklist item '{override.item}'{_suggest(override.item, known)}"))
            continue
        check = next((c for c in item.checks if c.id == override.check), None)
        if check is None:
            known = [c.id for c in item.checks]
            problems.append(document.problem(
                (*path, "check"),
                f"item '{override.item}' has no check '{override.check}'"
                f"{_suggest(override.check, known)}"))
            continue
        merged = {**check.params, **override.params}
        for message in [*RULES[check.rule].validate_params(merged, item),
                        *_bounds_order(merged)]:
            problems.append(document.problem((*path, "params"), message))


def _load_machines(root: Path, checklists: dict[str, LoadedChecklist],
                   instruments: dict[str, Instrument], problems: list[Problem],
                   include_visits: bool = True) -> list[LoadedMachine]:
    machines_root = root / MACHINES_DIR
    if not machines_root.is_dir():
        problems.append(Problem(_display(machines_root, root), 1, 1, "",
                                "folder not found; put one folder per machine in machines/"))
        return []
    folders = sorted(p for p in machines_root.iterdir() if p.is_dir())
    if len(folders) > MAX_MACHINES:
        problems.append(Problem(_display(machines_root, root), 1, 1, "",
                                f"{len(folders)} machines; the limit is {MAX_MACHINES}: "
                                "split the site into several job folders"))
        return []
    machines: list[LoadedMachine] = []
    for folder in folders:
        machine_path = folder / "machine.yaml"
        if not machine_path.is_file():
            problems.append(Problem(_display(machine_path, root), 1, 1, "",
                                    "not found; every machine folder needs a machine.yaml"))
            continue
        document = _load_document(machine_path, root, problems)
        model = _validate(MachineFile, document, problems) if document else None
        visits_root = folder / VISITS_DIR
        visit_paths = (sorted(visits_root.glob("*.yaml"))
                       if visits_root.is_dir() and include_visits else [])
        if len(visit_paths) > MAX_VISITS_PER_MACHINE:
            problems.append(Problem(
                _display(visits_root, root), 1, 1, "",
                f"{len(visit_paths)} visits; the limit is {MAX_VISITS_PER_MACHINE} per "
                "machine: split the record, or move old visits out of the job"))
            visit_paths = []
        if model is None or document is None:
            # Every problem at once: the visits are still checked on their own, so fixing the
            # machine file does not uncover a second round of problems in them.
            for visit_path in visit_paths:
                _check_visit_alone(visit_path, folder, root, instruments, problems)
            continue
        machine = LoadedMachine(id=folder.name, folder=folder, document=document, model=model)
        _check_machine(machine, checklists, problems)
        for visit_path in visit_paths:
            visit_document = _load_document(visit_path, root, problems)
            visit_model = (_validate(VisitFile, visit_document, problems)
                           if visit_document else None)
            if visit_model is None or visit_document is None:
                continue
            visit = LoadedVisit(id=visit_path.stem, machine_id=machine.id, path=visit_path,
                                document=visit_document, model=visit_model)
            _parse_readings(visit, machine, checklists, instruments, problems)
            _parse_readings(visit, machine, checklists, instruments, problems, "as_left")
            _check_parts(visit, machine, checklists, problems)
            _check_attachments(visit, machine.folder, problems)
            machine.visits.append(visit)
        _load_signatures(machine, root, problems)
        machine.visits.sort(key=lambda v: (v.model.date, v.id))
        _check_baseline(machine, problems)
        _check_compare_adjustments(machine, checklists, problems)
        machines.append(machine)
    return machines


def _load_signatures(machine: LoadedMachine, root: Path, problems: list[Problem]) -> None:
    """Read ``signatures/<visit>.yaml`` of each visit; what they cover is checked later."""
    from .integrity import SIGNATURES_DIR, SignatureFile

    folder = machine.folder / SIGNATURES_DIR
    if not folder.is_dir():
        return
    visits = {v.id: v for v in machine.visits}
    for path in sorted(folder.glob("*.yaml")):
        document = _load_document(path, root, problems)
        if document is None:
            continue
        visit = visits.get(path.stem)
        if visit is None:
            problems.append(document.problem((), f"a signature record for visit '{path.stem}', "
                                                 f"which machine '{machine.id}' does not have"
                                                 f"{_suggest(path.stem, sorted(visits))}"))
            continue
        record = _validate(SignatureFile, document, problems)
        if record is not None:
            visit.signatures.append(record)


def _check_machine(machine: LoadedMachine, checklists: dict[str, LoadedChecklist],
                   problems: list[Problem]) -> None:
    document = machine.document
    for index, checklist_id in enumerate(machine.model.checklists):
        if checklist_id not in checklists:
            problems.append(document.problem(
                ("checklists", index),
                f"no checklist '{checklist_id}'{_suggest(checklist_id, sorted(checklists))}"))
    nameplate = machine.model.nameplate
    for kind, where, entries in (
            ("winding", ("nameplate", "windings"), nameplate.windings),
            ("capacitor", ("nameplate", "capacitors"), nameplate.capacitors),
            ("survey point", ("survey_points",), machine.model.survey_points),
            ("bonding point", ("bonding_points",), machine.model.bonding_points)):
        seen: dict[str, int] = {}
        for index, entry in enumerate(entries):
            if entry.id in seen:
                problems.append(document.problem(
                    (*where, index, "id"), f"{kind} id '{entry.id}' is used twice (first as "
                                           f"entry {seen[entry.id] + 1}); give each its own id"))
            seen.setdefault(entry.id, index)
    from .evaluation.capacitor_codes import tolerance_window_error

    for index, capacitor in enumerate(nameplate.capacitors):
        error = tolerance_window_error(capacitor.tolerance)
        if error:
            problems.append(document.problem(
                ("nameplate", "capacitors", index, "tolerance"), error))
    if nameplate.phases == 1 and nameplate.frequency is None and nameplate.rated_voltage:
        pass  # a d.c. supply: frequency items are not applicable


def _check_baseline(machine: LoadedMachine, problems: list[Problem]) -> None:
    named = machine.model.baseline
    ids = [visit.id for visit in machine.visits]
    if named is not None and named not in ids:
        problems.append(machine.document.problem(
            ("baseline",), f"no visit '{named}' in {machine.id}/visits/{_suggest(named, ids)}"))


def _item_keys(machine: LoadedMachine, checklists: dict[str, LoadedChecklist]) -> list[str]:
    return [f"{c}.{i.id}" for c in machine.model.checklists if c in checklists
            for i in checklists[c].model.items]


def _check_compare_adjustments(machine: LoadedMachine, checklists: dict[str, LoadedChecklist],
                               problems: list[Problem]) -> None:
    keys = _item_keys(machine, checklists)
    for key, adjustment in machine.model.compare.items():
        path: KeyPath = ("compare", key)
        checklist_id, _, item_id = key.partition(".")
        item = checklists[checklist_id].item(item_id) if key in keys else None
        if item is None:
            problems.append(machine.document.problem(
                path, f"no checklist item '{key}' for this machine{_suggest(key, keys)}"))
            continue
        if item.compare is None:
            problems.append(machine.document.problem(
                path, f"'{key}' declares no comparison in its checklist; nothing to adjust"))
            continue
        watch = adjustment.watch or item.compare.watch
        act = adjustment.act or item.compare.act
        if watch.dimension is not act.dimension or not 0 < watch.value <= act.value:
            problems.append(machine.document.problem(
                path, f"need 0 < watch ≤ act of one kind; got watch {watch.text}, "
                      f"act {act.text}"))
        if adjustment.normalise_to_voltage is not None:
            message = _voltage_item_problem(adjustment.normalise_to_voltage, checklists)
            if message:
                problems.append(machine.document.problem((*path, "normalise_to_voltage"),
                                                         message))


def _check_parts(visit: LoadedVisit, machine: LoadedMachine,
                 checklists: dict[str, LoadedChecklist], problems: list[Problem]) -> None:
    nameplate = machine.model.nameplate
    elements = [*(w.id for w in nameplate.windings), *(c.id for c in nameplate.capacitors),
                *(p.id for p in machine.model.survey_points),
                *(p.id for p in machine.model.bonding_points)]
    keys = _item_keys(machine, checklists)
    for index, part in enumerate(visit.model.parts_replaced):
        path: KeyPath = ("parts_replaced", index)
        if part.element is not None and part.element not in elements:
            problems.append(visit.document.problem(
                (*path, "element"), f"'{part.element}' is not an element of this machine"
                                    + (_suggest(part.element, elements) if elements else
                                       "; its machine.yaml names no windings, capacitors, "
                                       "survey or bonding points")))
        for number, key in enumerate(part.items):
            if key not in keys:
                problems.append(visit.document.problem(
                    (*path, "items", number),
                    f"no checklist item '{key}' for this machine{_suggest(key, keys)}"))


def _resolve(folder: Path, relative: Path) -> tuple[Path, str | None]:
    """``folder / relative`` with links resolved, or why the system cannot look it up."""
    try:
        resolved = (folder / relative).resolve()
        resolved.is_file()  # a name too long for the file system fails here, not above
    except OSError as error:
        return folder, f"cannot be looked up: {error.strerror}; check the file name"
    return resolved, None


def _shown(path: str) -> str:
    return path if len(path) <= 80 else path[:77] + "..."


_UNPRINTABLE_PATH = ("the path holds a control character (a NUL, tab or line break); "
                     "write the file name as it appears in the folder")


def _unprintable(path: str) -> bool:
    return any(ord(character) < 32 or ord(character) == 127 for character in str(path))


def _check_visit_alone(path: Path, machine_folder: Path, root: Path,
                       instruments: dict[str, Instrument], problems: list[Problem]) -> None:
    """Check a visit whose machine file has problems, as far as it can be without it."""
    document = _load_document(path, root, problems)
    model = _validate(VisitFile, document, problems) if document else None
    if model is None or document is None:
        return
    visit = LoadedVisit(id=path.stem, machine_id=machine_folder.name, path=path,
                        document=document, model=model)
    if model.default_instrument and model.default_instrument not in instruments:
        problems.append(document.problem(
            ("default_instrument",),
            f"instrument '{model.default_instrument}' is not in instruments.yaml"
            f"{_suggest(model.default_instrument, sorted(instruments))}"))
    _check_attachments(visit, machine_folder, problems)
    for section in ("readings", "as_left"):
        if getattr(model, section):
            problems.append(document.problem(
                (section,), f"not checked: the readings are read against "
                            f"{machine_folder.name}/machine.yaml, which has problems; fix "
                            "those and check again"))


def _check_attachments(visit: LoadedVisit, machine_folder: Path,
                       problems: list[Problem]) -> None:
    folder = machine_folder.resolve()
    for index, attachment in enumerate(visit.model.attachments):
        path: KeyPath = ("attachments", index, "path")
        candidate = Path(attachment.path)
        if _unprintable(attachment.path):
            problems.append(visit.document.problem(path, _UNPRINTABLE_PATH))
            continue
        if candidate.is_absolute() or ".." in candidate.parts:
            problems.append(visit.document.problem(
                path, f"'{attachment.path}' leaves the machine folder; attachments must sit "
                      "inside it (write a path relative to the machine folder)"))
            continue
        resolved, unreadable = _resolve(machine_folder, candidate)
        if unreadable:
            problems.append(visit.document.problem(
                path, f"attachment '{_shown(attachment.path)}' {unreadable}"))
        elif not resolved.is_relative_to(folder):
            problems.append(visit.document.problem(
                path, f"'{attachment.path}' resolves outside the machine folder (a link?); "
                      "copy the file into the machine folder"))
        elif not resolved.is_file():
            problems.append(visit.document.problem(
                path, f"attachment '{attachment.path}' not found in {machine_folder.name}/"))


def format_problem_path(path: KeyPath) -> str:  # re-exported for callers
    return format_key_path(path)
