"""What a loaded job folder is made of: the loaded files, readings, element names."""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, NamedTuple

from ..model import (
    Checklist,
    ChecklistItem,
    Instrument,
    JobFile,
    MachineFile,
    Nameplate,
    PunchListFile,
    VisitFile,
)
from ..units import Dimension, Quantity
from ..units import unit_dimension as _unit_dimension
from ..yamlfile import Document

JOB_FILE = "job.yaml"
INSTRUMENTS_FILE = "instruments.yaml"
PUNCH_LIST_FILE = "punch_list.yaml"
MACHINES_DIR = "machines"
VISITS_DIR = "visits"
MAX_MACHINES = 2000
MAX_VISITS_PER_MACHINE = 200
# A photo, a data sheet or a drawing: far larger is a video or a disk image, which the site
# would copy and every PDF build would hash (README "Limits").
MAX_ATTACHMENT_BYTES = 100 * 1024 * 1024

_UNVALIDATED: Any = None  # placeholder for an instrument whose entry has problems


class _UnreadRegister(dict[str, Instrument]):
    """Stands for a register that could not be read: it may hold any id."""

    def __contains__(self, key: object) -> bool:
        return True

# Exactly the words README.md documents for a confirmation, in any letter case.
_CONFIRM_TRUE = {"yes"}
_CONFIRM_FALSE = {"no"}
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
    # The capture's instruments: the scope (register id), each channel's probe (register id)
    # and each channel's scaling (physical units per recorded volt), for its uncertainty.
    capture_setup: CaptureSetup | None = None


@dataclass(frozen=True)
class CaptureSetup:
    scope: str | None
    probes: dict[str, str]
    factors: dict[str, float]


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
    # Sign-off records (signature_records.SignatureFile), kept outside the files they cover.
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
    # punch_list.yaml, when the job has one: owners, due dates, accepted exceptions.
    punch_list: PunchListFile | None = None
    punch_list_document: Document | None = None


# ------------------------------------------------------------------ helpers


def unit_dimension(unit: str) -> Dimension:
    return _unit_dimension(unit)


def element_names(kind: str, nameplate: Nameplate, survey_ids: list[str],
                  bonding_ids: list[str]) -> list[str | None]:
    three = nameplate.phases == 3
    if kind == "single":
        return [None]
    if kind == "line":
        return ["L1-L2", "L2-L3", "L3-L1"] if three else ["L-N"]
    if kind == "phase":
        return ["L1", "L2", "L3"] if three else ["L"]
    if kind == "isolation_point":
        if three:
            points: list[str | None] = ["L1-L2", "L2-L3", "L3-L1", "L1-PE", "L2-PE", "L3-PE"]
            return [*points, "N-PE"] if nameplate.neutral else points
        return ["L-N", "L-PE", "N-PE"]
    if kind == "winding":
        return [w.id for w in nameplate.windings]
    if kind == "capacitor":
        return [c.id for c in nameplate.capacitors]
    if kind == "survey_point":
        return list(survey_ids)
    if kind == "bonding_point":
        return list(bonding_ids)
    raise ValueError(kind)  # pragma: no cover - guarded by the model's Literal


def _suggest(word: str, known: list[str]) -> str:
    close = difflib.get_close_matches(word, known, n=1, cutoff=0.6)
    if close:
        return f"; did you mean '{close[0]}'?"
    if known and len(known) <= 12:
        return "; known: " + ", ".join(known)
    return ""

class Confined(NamedTuple):
    """A path the tool may read (``reason`` None), or why it may not."""

    path: Path
    reason: str | None
    outside: bool = False


def confine(path: Path, bound: Path, bound_name: str) -> Confined:
    """``path`` with every link resolved, refused unless it stays inside ``bound``.

    The one gate of every file the tool reads — the job file, the register, checklists,
    machine folders, visits, signature records, attachments and captures: a symbolic link
    may point anywhere, and what it reaches would be copied into the site and the PDFs as
    if it were part of the job. ``bound_name`` names ``bound`` in the reason ("job folder",
    "machine folder"). A link that stays inside is followed.
    """
    try:
        resolved = path.resolve()
        resolved.is_file()  # a name too long for the file system fails here, not above
        inside = resolved.is_relative_to(bound.resolve())
    except (OSError, RuntimeError) as error:  # RuntimeError: a loop of links (Python < 3.13)
        strerror = getattr(error, "strerror", None) or "a loop of links"
        return Confined(path, f"cannot be looked up: {strerror}; check the file name")
    if not inside:
        return Confined(resolved, f"resolves outside the {bound_name} (a link?); copy the "
                                  f"file into the {bound_name}", outside=True)
    return Confined(resolved, None)


def _shown(path: str) -> str:
    return path if len(path) <= 80 else path[:77] + "..."

_UNPRINTABLE_PATH = ("the path holds a control character (a NUL, tab or line break); "
                     "write the file name as it appears in the folder")

def _unprintable(path: str) -> bool:
    return any(ord(character) < 32 or ord(character) == 127 for character in str(path))
