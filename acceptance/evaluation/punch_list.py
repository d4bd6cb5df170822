"""The punch list: each visit's open points with their severity, and its open required items.

Decided here once, from the evaluated items, so the site, the CSV and ``results.json`` show the
same list and no page or build step judges a point again.
"""

from __future__ import annotations

from collections.abc import Iterable

from ..results import Deficiency, ElementResult, ItemResult, Severity, Verdict, VisitResult

__all__ = ["deficiencies", "open_required", "severity"]


def severity(item: ItemResult, verdict: Verdict) -> Severity:
    """How an open ``verdict`` of ``item`` weighs on handover."""
    if item.safety_critical and verdict.is_failure:
        return Severity.SAFETY_CRITICAL
    if verdict.is_failure or item.required:
        return Severity.BLOCKS_ACCEPTANCE
    return Severity.ADVISORY


def _is_open(item: ItemResult, element: ElementResult) -> bool:
    # A reading that an optional item leaves out is not a point to close.
    return element.verdict.is_open and (item.required
                                        or element.verdict is not Verdict.NOT_TESTED)


def deficiencies(visit: VisitResult,
                 items: Iterable[ItemResult] | None = None) -> tuple[Deficiency, ...]:
    """Every open element of ``visit`` as found (or of ``items``), in checklist order."""
    return tuple(
        Deficiency(machine=visit.machine, visit=visit.id, item=item.key, title=item.title,
                   element=element.element, reading=element.reading, verdict=element.verdict,
                   severity=severity(item, element.verdict),
                   anchor=f"{item.checklist}-{item.id}")
        for item in (visit.items if items is None else items) for element in item.elements
        if _is_open(item, element))


def open_required(visit: VisitResult) -> int:
    """How many required items of ``visit`` (as found) are still open."""
    return sum(1 for item in visit.items if item.verdict.is_open and item.required)
