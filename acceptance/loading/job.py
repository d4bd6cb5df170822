"""Loading the whole job folder: job file, register, checklists, machines and visits."""

from __future__ import annotations

from collections.abc import Collection, Sequence
from pathlib import Path

from ..capacitor_codes import tolerance_window_error
from ..computations import ComputationError
from ..computations.uncertainty import ACCURACY_FORMS, parse_accuracy_specification
from ..errors import InputError, Problem
from ..model import (
    BondingPoint,
    CapacitorSpec,
    Instrument,
    InstrumentRegister,
    JobFile,
    MachineFile,
    PunchListFile,
    SurveyPoint,
    VisitFile,
    WindingSpec,
)
from ..rule_specs import SPECS
from ..signature_records import SIGNATURES_DIR, SignatureFile
from ..text import describe_hidden
from ..units import UnitError, parse_quantity
from ..yamlfile import Document, KeyPath
from . import loaded
from .checklists import _bounds_order, _load_checklists, _voltage_item_problem
from .loaded import (
    _UNPRINTABLE_PATH,
    _UNVALIDATED,
    INSTRUMENTS_FILE,
    JOB_FILE,
    MACHINES_DIR,
    MAX_MACHINES,
    MAX_VISITS_PER_MACHINE,
    PUNCH_LIST_FILE,
    VISITS_DIR,
    Job,
    LoadedChecklist,
    LoadedMachine,
    LoadedVisit,
    _shown,
    _suggest,
    _unprintable,
    _UnreadRegister,
    confine,
    unit_dimension,
)
from .readings import _parse_readings
from .validation import _display, _load_document, _validate

# ------------------------------------------------------------------ the job


def load_job(root: Path, include_visits: bool = True,
             machines: Collection[str] | None = None) -> Job:
    """Load and validate the job folder at ``root``; raise :class:`InputError` with all problems.

    ``include_visits=False`` loads the job, instruments, checklists and machines only (to
    scaffold a new visit while other visits are still being filled in). ``machines`` names
    the machine folders to load (all when None): every check of a machine reads only the
    job-level files and its own folder, so the others may be left out when their results
    are already known (``check`` re-evaluates only the machines whose files changed).
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
        if register and instruments_document is not None:
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
    loaded = _load_machines(root, checklists, instruments, problems, include_visits, machines)

    if job_model is not None and job_document is not None:
        _check_overrides(job_model, job_document, checklists, problems)

    punch_document = punch_model = None
    if (root / PUNCH_LIST_FILE).is_file():
        punch_document = _load_document(root / PUNCH_LIST_FILE, root, problems)
        punch_model = (_validate(PunchListFile, punch_document, problems)
                       if punch_document else None)
        if punch_model is not None and punch_document is not None:
            _check_punch_list(punch_model, punch_document, root, checklists, problems)

    if problems or job_model is None or job_document is None:
        raise InputError(problems)
    return Job(root=root, document=job_document, model=job_model, instruments=instruments,
               instruments_document=instruments_document, checklists=checklists,
               machines=loaded, punch_list=punch_model, punch_list_document=punch_document)


def _check_punch_list(punch: PunchListFile, document: Document, root: Path,
                      checklists: dict[str, LoadedChecklist], problems: list[Problem]) -> None:
    """What the punch-list file names exists, and no deficiency is named twice. Whether an
    entry matches a deficiency is known only once the visits are evaluated."""
    machines = sorted(p.name for p in (root / MACHINES_DIR).iterdir()
                      if p.is_dir()) if (root / MACHINES_DIR).is_dir() else []
    seen: dict[tuple[str, str, str | None], int] = {}
    for index, entry in enumerate(punch.entries):
        if entry.machine not in machines:
            problems.append(document.problem(
                ("entries", index, "machine"),
                f"no machine '{entry.machine}' in {MACHINES_DIR}/; name a machine folder"
                f"{_suggest(entry.machine, machines)}"))
        checklist, _, item = entry.item.partition(".")
        if checklist not in checklists or checklists[checklist].item(item) is None:
            known = [f"{c.id}.{i.id}" for c in checklists.values() for i in c.model.items]
            problems.append(document.problem(
                ("entries", index, "item"),
                f"no checklist item '{entry.item}'; write checklist.item as the punch "
                f"list shows it{_suggest(entry.item, known)}"))
        key = (entry.machine, entry.item, entry.point)
        if key in seen:
            problems.append(document.problem(
                ("entries", index),
                f"this deficiency is already named by entry {seen[key] + 1}; "
                "merge the two entries"))
        seen.setdefault(key, index)
        accepted = entry.accepted
        if accepted is not None and accepted.until is not None and accepted.until < accepted.date:
            problems.append(document.problem(
                ("entries", index, "accepted", "until"),
                "until is before the date it was accepted; check the dates"))


def _check_accuracy(instrument: Instrument, index: int, document: Document,
                    problems: list[Problem]) -> None:
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
        for message in [*SPECS[check.rule].validate_params(merged, item),
                        *_bounds_order(merged)]:
            problems.append(document.problem((*path, "params"), message))


def _load_machines(root: Path, checklists: dict[str, LoadedChecklist],
                   instruments: dict[str, Instrument], problems: list[Problem],
                   include_visits: bool = True,
                   only: Collection[str] | None = None) -> list[LoadedMachine]:
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
    if only is not None:
        folders = [folder for folder in folders if folder.name in only]
    machines: list[LoadedMachine] = []
    for folder in folders:
        outside = confine(folder, root, "job folder").reason
        if outside is not None:
            problems.append(Problem(_display(folder, root), 1, 1, "", outside))
            continue
        hidden = describe_hidden(folder.name)
        if hidden is not None:  # the folder's name is the machine's id, refused as in files
            problems.append(Problem(_display(folder, root), 1, 1, "",
                                    f"the machine folder's name {hidden}"))
            continue
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
            hidden = describe_hidden(visit_path.stem)
            if hidden is not None:  # the file's name is the visit's id
                problems.append(Problem(_display(visit_path, root), 1, 1, "",
                                        f"the visit file's name {hidden}"))
                continue
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
        machine.visits.sort(key=lambda v: (v.model.date, v.id))
        if include_visits:  # signature records and the baseline name visits
            _load_signatures(machine, root, problems)
            _check_baseline(machine, problems)
        _check_compare_adjustments(machine, checklists, problems)
        machines.append(machine)
    return machines


def _load_signatures(machine: LoadedMachine, root: Path, problems: list[Problem]) -> None:
    """Read ``signatures/<visit>.yaml`` of each visit; what they cover is checked later."""
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
    pools: tuple[tuple[str, KeyPath, Sequence[WindingSpec | CapacitorSpec | SurveyPoint
                                              | BondingPoint]], ...] = (
            ("winding", ("nameplate", "windings"), nameplate.windings),
            ("capacitor", ("nameplate", "capacitors"), nameplate.capacitors),
            ("survey point", ("survey_points",), machine.model.survey_points),
            ("bonding point", ("bonding_points",), machine.model.bonding_points))
    for kind, where, entries in pools:
        seen: dict[str, int] = {}
        for index, entry in enumerate(entries):
            if entry.id in seen:
                problems.append(document.problem(
                    (*where, index, "id"), f"{kind} id '{entry.id}' is used twice (first as "
                                           f"entry {seen[entry.id] + 1}); give each its own id"))
            seen.setdefault(entry.id, index)
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
        resolved, reason, outside = confine(machine_folder / candidate, machine_folder,
                                            "machine folder")
        if reason and not outside:
            problems.append(visit.document.problem(
                path, f"attachment '{_shown(attachment.path)}' {reason}"))
        elif reason:
            problems.append(visit.document.problem(path, f"'{attachment.path}' {reason}"))
        elif not resolved.is_file():
            problems.append(visit.document.problem(
                path, f"attachment '{attachment.path}' not found in {machine_folder.name}/"))
        elif (size := resolved.stat().st_size) > loaded.MAX_ATTACHMENT_BYTES:
            problems.append(visit.document.problem(
                path, f"attachment '{_shown(attachment.path)}' is {size} bytes; the limit is "
                      f"{loaded.MAX_ATTACHMENT_BYTES} bytes: attach a smaller copy (a "
                      "reduced photo, the pages that matter)"))


