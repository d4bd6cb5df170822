"""What a supervisor reviews: the index filters' data and the deficiencies as CSV.

The site opens from ``file://``, where a page may not fetch a JSON file from disk; the
filter options therefore travel in a script file the build writes (``assets/index-data.js``),
and each row of the index carries its own ``data-*`` attributes. Without JavaScript the index
is the plain table.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Iterable, Mapping
from typing import Any

from ..integrity import SignatureStatus
from ..results import JobResult, PunchItem, VisitResult
from ..text import csv_cell, url_segment

__all__ = ["INDEX_DATA_NAME", "DEFICIENCIES_CSV_NAME", "index_options", "index_data_script",
           "deficiencies_csv", "review_globals", "verdict_counts"]

INDEX_DATA_NAME = "assets/index-data.js"
DEFICIENCIES_CSV_NAME = "deficiencies.csv"

_CSV_COLUMNS = ("state", "machine", "machine_name", "area", "visit", "date", "item", "title",
                "point", "reading", "verdict", "severity", "signature", "owner", "due",
                "overdue", "closed_by", "closed_reading", "accepted_by", "accepted_on",
                "accepted_until", "accepted_reason", "note", "link")


def index_options(result: JobResult) -> dict[str, Any]:
    """The choices each index filter offers, in a stable order, with how many visits match."""
    visits = result.visits
    areas = sorted({m.area for m in result.machines if m.area})
    checklists: dict[str, str] = {}
    for visit in visits:
        for checklist in visit.checklists:
            checklists.setdefault(checklist.id, checklist.title)
    return {
        "states": [{"value": state.slug, "label": state.word, "mark": state.mark,
                    "count": count} for state, count in result.state_counts],
        "areas": [{"value": area, "label": area,
                   "count": sum(len(m.visits) for m in result.machines if m.area == area)}
                  for area in areas],
        "checklists": [{"value": key, "label": f"{title} ({key})"}
                       for key, title in sorted(checklists.items())],
        "visits": len(visits),
    }


def index_data_script(result: JobResult) -> str:
    """``assets/index-data.js``: the filter options as one assignment a page loads by <script>."""
    payload = json.dumps(index_options(result), ensure_ascii=False, sort_keys=True, indent=1)
    # "</" cannot end a script early when the file is loaded as a classic script; escaping it
    # keeps a label such as "</script>" inert (HTML Living Standard, script data state).
    payload = payload.replace("</", "<\\/")
    return ("// Written by acceptance build: the choices of the index filters.\n"
            f"window.acceptanceIndex = {payload};\n")


def verdict_counts(counts: Mapping[str, int]) -> list[tuple[str, int]]:
    """A visit's non-zero verdict counts, in the order the results list them."""
    return [(word, count) for word, count in counts.items() if count]


def deficiencies_csv(rows: Iterable[PunchItem], result: JobResult,
                     signatures: Mapping[str, Any] | None = None) -> str:
    """The punch list as CSV with a header row (RFC 4180), one line per deficiency in the
    punch list's order (open, accepted, closed); visit, date, reading and verdict are those
    of the finding that raised it.

    Every cell is text: one a spreadsheet would run as a formula gets a leading apostrophe
    (:func:`acceptance.text.csv_cell`)."""
    machines = {m.id: m for m in result.machines}
    dates = {(v.machine, v.id): v.date.isoformat() for v in result.visits}
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(_CSV_COLUMNS)
    for item in rows:
        row = item.raised
        machine = machines[row.machine]
        status = (signatures or {}).get(f"{row.machine}/{row.visit}")
        accepted = item.acceptance
        writer.writerow([csv_cell(cell) for cell in (
            item.state.value, row.machine, machine.name, machine.area or "", row.visit,
            dates[(row.machine, row.visit)], row.item, row.title, row.element or "",
            row.reading or "", row.verdict.word, row.severity.value,
            status.phrase if status is not None else "not signed",
            item.owner or "", item.due.isoformat() if item.due else "",
            "yes" if item.overdue else "", item.closed_by or "", item.closed_reading or "",
            accepted.by if accepted else "", accepted.date.isoformat() if accepted else "",
            accepted.until.isoformat() if accepted and accepted.until else "",
            accepted.reason if accepted else "", item.note or "",
            f"machines/{url_segment(row.machine)}/{url_segment(row.visit)}.html"
            f"#{row.anchor}")])
    return buffer.getvalue()


def review_globals(signatures: Mapping[str, Any], package_pdf: bool) -> dict[str, Any]:
    """Template globals for sign-off states and the index: ``signature_of(thing)`` takes a
    visit result, a record with ``machine`` and ``visit`` (a deficiency, an instrument use) or
    a mapping with those keys."""
    unsigned = SignatureStatus("unsigned")

    def signature_of(thing: Any) -> Any:
        if isinstance(thing, Mapping):
            key = f"{thing['machine']}/{thing['visit']}"
        elif isinstance(thing, VisitResult):
            key = f"{thing.machine}/{thing.id}"
        else:
            key = f"{thing.machine}/{thing.visit}"
        return signatures.get(key, unsigned)

    return {"signature_of": signature_of, "verdict_counts": verdict_counts,
            "altered_total": sum(1 for s in signatures.values()
                                 if s.state in ("altered", "invalid")),
            "package_pdf": package_pdf}
