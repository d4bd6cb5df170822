"""The punch list: each deficiency followed from the finding that raised it to the re-test
that closed it, with what the supervisor adds (owner, due date, accepted exception), and
each machine's readiness for handover.

Decided here once, from the evaluated visits, so the site, the CSV, ``check`` and
``results.json`` show the same list and no page or build step judges a point again.

Which verdicts raise a deficiency: fail and conditional fail (the reading is outside the
limit, or inside the guard band on the wrong side, ILAC-G8:09/2019 cl. 4.2.3), undetermined
(nothing shows the point is safe) and not tested on a required item (the proof is missing).
A conditional pass does not: under the job's decision rule the point is accepted, and the
visit's state counts it as a pass; the record still shows its mark. A point left out of an
optional item is not a deficiency either.
"""

from __future__ import annotations

import datetime as _dt
import os
from collections.abc import Iterable, Sequence

from ..errors import InputError, Problem
from ..model import PunchEntry, PunchListFile
from ..results import (
    Acceptance,
    Deficiency,
    DeficiencyState,
    ElementResult,
    Handover,
    ItemResult,
    MachineResult,
    PunchItem,
    Severity,
    Verdict,
    VisitResult,
    VisitState,
)
from ..yamlfile import Document

__all__ = ["build_date", "deficiencies", "follow", "handover", "open_required",
           "raises", "severity", "sign_off_roles"]

_RAISING = (Verdict.FAIL, Verdict.CONDITIONAL_FAIL, Verdict.UNDETERMINED)


def build_date() -> _dt.date:
    """The date overdue is judged against: ``SOURCE_DATE_EPOCH`` when set (the
    reproducible-builds.org convention), else today in UTC."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    moment = (_dt.datetime.fromtimestamp(int(epoch), _dt.UTC) if epoch and epoch.isdigit()
              else _dt.datetime.now(_dt.UTC))
    return moment.date()


def severity(item: ItemResult, verdict: Verdict) -> Severity:
    """How an open ``verdict`` of ``item`` weighs on handover."""
    if item.safety_critical and verdict.is_failure:
        return Severity.SAFETY_CRITICAL
    if verdict.is_failure or item.required:
        return Severity.BLOCKS_ACCEPTANCE
    return Severity.ADVISORY


def raises(item: ItemResult, element: ElementResult) -> bool:
    """Whether this verdict of ``element`` raises (or keeps open) a deficiency."""
    return element.verdict in _RAISING or (item.required
                                           and element.verdict is Verdict.NOT_TESTED)


def deficiencies(visit: VisitResult,
                 items: Iterable[ItemResult] | None = None) -> tuple[Deficiency, ...]:
    """Every point of ``visit`` as found (or of ``items``) that raises a deficiency, in
    checklist order."""
    return tuple(
        Deficiency(machine=visit.machine, visit=visit.id, item=item.key, title=item.title,
                   element=element.element, reading=element.reading, verdict=element.verdict,
                   severity=severity(item, element.verdict),
                   anchor=f"{item.checklist}-{item.id}")
        for item in (visit.items if items is None else items) for element in item.elements
        if raises(item, element))


def open_required(visit: VisitResult) -> int:
    """How many required items of ``visit`` (as found) are still open."""
    return sum(1 for item in visit.items if item.verdict.is_open and item.required)


Key = tuple[str, str | None]  # checklist.item, point


class _Followed:
    """One deficiency while the visits are walked in order."""

    def __init__(self, raised: Deficiency) -> None:
        self.raised = raised
        self.latest = raised.verdict
        self.closed_by: str | None = None
        self.closed_as_left = False
        self.closed_reading: str | None = None
        self.failed_again: list[str] = []


def _walk(visit: VisitResult, items: Sequence[ItemResult], open_now: dict[Key, _Followed],
          followed: list[_Followed], as_left: bool) -> None:
    for item in items:
        for element in item.elements:
            key = (item.key, element.element)
            current = open_now.get(key)
            if current is not None and element.verdict is Verdict.PASS:
                current.closed_by, current.closed_as_left = visit.id, as_left
                current.closed_reading, current.latest = element.reading, element.verdict
                del open_now[key]
            elif current is not None and raises(item, element):
                if element.verdict is not Verdict.NOT_TESTED:
                    current.latest = element.verdict
                    if visit.id != current.raised.visit and visit.id not in current.failed_again:
                        current.failed_again.append(visit.id)
            elif current is None and raises(item, element):
                raised = next((d for d in visit.deficiencies if (d.item, d.element) == key),
                              None)
                if raised is None:  # raised by an as-left reading worse than as found
                    raised = Deficiency(
                        machine=visit.machine, visit=visit.id, item=item.key,
                        title=item.title, element=element.element, reading=element.reading,
                        verdict=element.verdict, severity=severity(item, element.verdict),
                        anchor=f"{item.checklist}-{item.id}")
                open_now[key] = _Followed(raised)
                followed.append(open_now[key])


def follow(machine: MachineResult) -> list[_Followed]:
    """Every deficiency of ``machine``'s visits in the order raised, with the visit that
    closed it: a later pass of the same item and point, as found on a later visit or as left
    on the same or a later one. A later fail keeps it open and is listed."""
    open_now: dict[Key, _Followed] = {}
    followed: list[_Followed] = []
    for visit in machine.visits:
        _walk(visit, visit.items, open_now, followed, as_left=False)
        if visit.as_left:
            _walk(visit, visit.as_left, open_now, followed, as_left=True)
    return followed


def punch_list(machine: MachineResult, entries: dict[tuple[str, str, str | None], PunchEntry],
               today: _dt.date) -> tuple[PunchItem, ...]:
    """``machine``'s deficiencies with what the punch-list file adds, open first, then
    accepted, then closed (each in the order raised)."""
    items = []
    for found in follow(machine):
        raised = found.raised
        entry = entries.get((machine.id, raised.item, raised.element))
        accepted = entry.accepted if entry is not None else None
        acceptance = (Acceptance(by=accepted.by, date=accepted.date, reason=accepted.reason,
                                 until=accepted.until) if accepted is not None else None)
        if found.closed_by is not None:
            state = DeficiencyState.CLOSED
        elif acceptance is not None and (acceptance.until is None or acceptance.until >= today):
            state = DeficiencyState.ACCEPTED
        else:
            state = DeficiencyState.OPEN
        due = entry.due if entry is not None else None
        items.append(PunchItem(
            machine=machine.id, item=raised.item, title=raised.title, element=raised.element,
            raised=raised, state=state, latest=found.latest, closed_by=found.closed_by,
            closed_as_left=found.closed_as_left, closed_reading=found.closed_reading,
            failed_again=tuple(v for v in found.failed_again if v != found.closed_by),
            owner=entry.owner if entry is not None else None, due=due,
            overdue=state is DeficiencyState.OPEN and due is not None and due < today,
            note=entry.note if entry is not None else None, acceptance=acceptance))
    order = list(DeficiencyState)
    return tuple(sorted(items, key=lambda p: order.index(p.state)))


def sign_off_roles(machines: Sequence[MachineResult], punch: PunchListFile | None) -> list[str]:
    """The sign-off matrix's columns: the roles the job names, else every role the visits
    carry, in the order first seen."""
    if punch is not None and punch.handover.roles:
        return list(punch.handover.roles)
    roles: list[str] = []
    for machine in machines:
        for visit in machine.visits:
            for line in visit.sign_off:
                if line.role not in roles:
                    roles.append(line.role)
    return roles


def handover(machine: MachineResult, required: Sequence[str]) -> Handover:
    """Ready when the latest visit passes (as left), no deficiency is open other than
    accepted exceptions, and the latest visit carries every required sign-off role."""
    reasons = []
    latest = machine.latest
    items = machine.punch_list
    count = {state: sum(1 for p in items if p.state is state) for state in DeficiencyState}
    if latest is None:
        reasons.append("no visit recorded")
    else:
        # Deficiencies the client accepted leave a visit "pass with deficiencies" ready; a
        # visit that is incomplete or failed a safety-critical item never is.
        if latest.state in (VisitState.INCOMPLETE, VisitState.FAIL):
            reasons.append(f"latest visit {latest.id} is {latest.state.word}"
                           + (" as left" if latest.as_found_state is not None else ""))
        carried = {line.role for line in latest.sign_off}
        missing = [role for role in required if role not in carried]
        if missing:
            reasons.append(f"latest visit {latest.id} lacks sign-off by "
                           + ", ".join(missing))
    if count[DeficiencyState.OPEN]:
        n = count[DeficiencyState.OPEN]
        reasons.append(f"{n} open deficienc{'y' if n == 1 else 'ies'}")
    return Handover(
        ready=not reasons, reasons=tuple(reasons), open=count[DeficiencyState.OPEN],
        accepted=count[DeficiencyState.ACCEPTED], closed=count[DeficiencyState.CLOSED],
        sign_offs=tuple((visit.id, tuple(line.role for line in visit.sign_off))
                        for visit in machine.visits))


def entries_by_key(punch: PunchListFile | None
                   ) -> dict[tuple[str, str, str | None], PunchEntry]:
    if punch is None:
        return {}
    return {(e.machine, e.item, e.point): e for e in punch.entries}


def unmatched(punch: PunchListFile | None, document: Document | None,
              machines: Sequence[MachineResult]) -> None:
    """Raise :class:`InputError` for each entry that names no deficiency of an evaluated
    machine (machines left out of this evaluation are not judged)."""
    if punch is None or document is None:
        return
    evaluated = {m.id: m for m in machines}
    problems: list[Problem] = []
    for index, entry in enumerate(punch.entries):
        machine = evaluated.get(entry.machine)
        if machine is None:
            continue
        points = [p for p in machine.punch_list if p.item == entry.item]
        if any(p.element == entry.point for p in points):
            continue
        if points:
            named = ", ".join(sorted({p.element or "(no point)" for p in points}))
            hint = f"; its deficiencies are at point {named}"
        else:
            hint = f"; {entry.machine} has no deficiency on {entry.item}"
        problems.append(document.problem(
            ("entries", index, "point" if points and entry.point else "item"),
            f"matches no deficiency of {entry.machine}{hint}; correct the entry or "
            "remove it"))
    if problems:
        raise InputError(problems)
