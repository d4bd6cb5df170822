"""The instrument register as the results show it: each entry, and its calibration state on
each visit that used it (:func:`acceptance.computations.uncertainty.calibration_state`), decided
here so that no page re-reads the dates.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

from ..computations.uncertainty import calibration_state
from ..model import Instrument as RegisterEntry
from ..results import Instrument, InstrumentUse, VisitResult

__all__ = ["instrument_entries", "instrument_uses"]


def instrument_uses(visit: VisitResult,
                    register: Mapping[str, RegisterEntry]) -> tuple[InstrumentUse, ...]:
    """Each instrument a reading of ``visit`` names (as found), by id, with its calibration
    state on the visit's date; an instrument with no dates is never in calibration."""
    used = sorted({e.instrument for item in visit.items for e in item.elements
                   if e.instrument})
    uses = []
    for instrument in used:
        entry = register.get(instrument)
        state = calibration_state(entry.calibrated if entry else None,
                                  entry.calibration_due if entry else None, visit.date)
        uses.append(InstrumentUse(machine=visit.machine, visit=visit.id, instrument=instrument,
                                  state=state.phrase, valid=state.valid))
    return tuple(uses)


def _functions(entry: RegisterEntry) -> tuple[str, ...]:
    return tuple(f"{f.measures}" + (f", range {f.range}" if f.range else "") + f": {f.accuracy}"
                 + (f", resolution {f.resolution}" if f.resolution else "")
                 for f in entry.functions)


def instrument_entries(register: Mapping[str, RegisterEntry],
                       visits: Iterable[VisitResult]) -> tuple[Instrument, ...]:
    """The register by id, each entry with its uses in machine and visit order."""
    uses: dict[str, list[InstrumentUse]] = {}
    for visit in visits:
        for use in visit.instrument_uses:
            uses.setdefault(use.instrument, []).append(use)
    entries = []
    for entry in sorted(register.values(), key=lambda i: i.id):
        mine = tuple(uses.get(entry.id, ()))
        entries.append(Instrument(
            id=entry.id, kind=entry.kind, model=entry.model or "", serial=entry.serial or "",
            response=entry.response, category=entry.category or "",
            calibrated=entry.calibrated, calibration_due=entry.calibration_due,
            functions=_functions(entry), uses=mine,
            lapsed_uses=sum(1 for use in mine if not use.valid)))
    return tuple(entries)
