"""Readings parsed against their checklist items: values, instruments, captures."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

from ..errors import InputError, Problem
from ..model import (
    ChecklistItem,
    Instrument,
)
from ..units import Dimension, Quantity, UnitError, parse_quantity
from ..yamlfile import KeyPath
from .loaded import (
    _CONFIRM_FALSE,
    _CONFIRM_TRUE,
    _NOT_APPLICABLE,
    _UNPRINTABLE_PATH,
    CaptureSetup,
    LoadedChecklist,
    LoadedMachine,
    LoadedVisit,
    Reading,
    _shown,
    _suggest,
    _unprintable,
    confine,
    element_names,
    unit_dimension,
)
from .validation import _got

# ------------------------------------------------------------------ readings


def _confirmation(raw: Any) -> bool:
    if isinstance(raw, bool):  # YAML's true/false: not the words a confirmation takes
        raise UnitError(f"'{str(raw).lower()}' is not a confirmation; write yes or no")
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
    setup_holder: list[CaptureSetup | None] = []
    instrument = visit.model.default_instrument if item.record == "quantity" else None
    note = None
    value_path = path
    if isinstance(raw, dict):
        allowed = {"value", "instrument", "note", "range", "capture", *item.also_record}
        split = _decimal_comma_split(raw)
        if split is not None:
            # In {value: 28,6 Ω, …} the comma ends the value: YAML reads 28 and a key '6 Ω'.
            problems.append(document.problem(
                (*path, "value"), f"'{split}' uses a decimal comma, which splits the value "
                f"inside {{…}}; write the decimal separator as a point, e.g. "
                f"'{split.replace(',', '.', 1)}'"))
        split_key = split.split(",", 1)[1] if split is not None else None
        for key in raw:
            if key not in allowed and key != split_key:
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
            setup_holder.append(_capture_setup(raw["capture"], (*path, "capture"), visit,
                                               instruments, problems))
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
        if split is not None:
            return None  # the other fields are checked; the value itself is reported above
    else:
        value_raw = raw
    line = document.where(value_path)[0]
    common: dict[str, Any] = dict(
        checklist=checklist_id, item=item.id, element=element, instrument=instrument,
        extras=extras, note=note, file=document.display_name, line=line,
        range=range_holder[0] if range_holder else None,
        capture=capture_holder[0] if capture_holder else None,
        capture_setup=setup_holder[0] if setup_holder else None)
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


_CAPTURE_KEYS = ("file", "channels", "voltage", "current", "time_column", "instrument",
                 "probes")


def _capture_setup(raw: Any, path: KeyPath, visit: LoadedVisit,
                   instruments: dict[str, Instrument], problems: list[Problem]
                   ) -> CaptureSetup | None:
    """The scope and probes a capture names, checked against the register."""
    from ..captures import parse_scaling

    if not isinstance(raw, dict) or not isinstance(raw.get("channels"), dict):
        return None  # reported by _load_capture
    document = visit.document
    scope = raw.get("instrument")
    if scope is not None and (not isinstance(scope, str) or scope not in instruments):
        problems.append(document.problem(
            (*path, "instrument"), f"expected the scope's id from instruments.yaml, got "
                                   f"{_got(scope) if not isinstance(scope, str) else repr(scope)}"
                                   + (_suggest(scope, sorted(instruments))
                                      if isinstance(scope, str) else "")))
        scope = None
    probes: dict[str, str] = {}
    raw_probes = raw.get("probes")
    if raw_probes is not None and not isinstance(raw_probes, dict):
        problems.append(document.problem(
            (*path, "probes"), "expected channel → probe id, e.g. {CH2: probe-1}"))
    elif raw_probes:
        for channel, probe in raw_probes.items():
            if str(channel) not in {str(c) for c in raw["channels"]}:
                problems.append(document.problem(
                    (*path, "probes", channel), f"channel '{channel}' is not among the "
                                                f"capture's channels"))
            elif not isinstance(probe, str) or probe not in instruments:
                problems.append(document.problem(
                    (*path, "probes", channel), f"expected a probe id from instruments.yaml, "
                                                f"got {probe!r}"))
            else:
                probes[str(channel)] = probe
    factors: dict[str, float] = {}
    for name, text in raw["channels"].items():
        try:
            factors[str(name)] = parse_scaling(str(text)).factor
        except (ValueError, InputError):
            pass  # reported by _load_capture
    return CaptureSetup(scope, probes, factors)


def _load_capture(raw: Any, path: KeyPath, visit: LoadedVisit, problems: list[Problem]) -> Any:
    """Read and analyse an attached scope capture; None (with problems) when it cannot be."""
    from ..captures import analyse_capture, parse_scaling

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
    resolved, reason, outside = confine(machine_folder / relative, machine_folder,
                                        "machine folder")
    if reason and not outside:
        problems.append(document.problem(
            (*path, "file"), f"capture '{_shown(raw['file'])}' {reason}"))
        return None
    if relative.is_absolute() or ".." in relative.parts:
        problems.append(document.problem(
            (*path, "file"), f"'{raw['file']}' leaves the machine folder; captures must sit "
                             "inside it (write a path relative to the machine folder)"))
        return None
    if reason:
        problems.append(document.problem((*path, "file"), f"'{raw['file']}' {reason}"))
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


def _decimal_comma_split(raw: dict[str, Any]) -> str | None:
    """The reading as written when a decimal comma split it into a number and a key."""
    value = raw.get("value")
    if isinstance(value, bool) or not isinstance(value, int):
        return None
    for key, rest in raw.items():
        if isinstance(key, str) and key[:1].isdigit() and rest is None:
            return f"{value},{key}"
    return None
