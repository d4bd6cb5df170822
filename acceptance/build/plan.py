"""Plan the site: every page, the template that draws it and the data it is drawn from."""

from __future__ import annotations

from ..computations.uncertainty import calibration_state
from ..model import parse_date
from ..results import RESULTS_SCHEMA, JobResult, VisitState
from .context import SitePage

__all__ = ["SitePage", "plan_site"]


def _deficiencies(result: JobResult) -> list[dict[str, object]]:
    rows: list[dict[str, object]] = []
    for machine in result.machines:
        for visit in machine.visits:
            for item in visit.items:
                for element in item.elements:
                    verdict = element.verdict
                    if not verdict.is_open:
                        continue
                    if not item.required and verdict.value == "not tested":
                        continue
                    severity = ("safety-critical" if item.safety_critical and verdict.is_failure
                                else "blocks acceptance" if verdict.is_failure or item.required
                                else "advisory")
                    rows.append({"machine": machine.id, "visit": visit.id, "item": item.key,
                                 "title": item.title, "element": element.element,
                                 "reading": element.reading, "verdict": verdict,
                                 "severity": severity,
                                 "anchor": f"{item.checklist}-{item.id}"})
    return rows


def plan_site(result: JobResult) -> list[SitePage]:
    """Every page with its template and data; links between them are relative."""
    open_counts = {
        f"{m.id}/{v.id}": sum(1 for i in v.items if i.verdict.is_open and i.required)
        for m in result.machines for v in m.visits}
    state_counts = [(state, sum(1 for v in result.visits if v.state is state))
                    for state in VisitState]

    register = {i["id"]: i for i in result.instruments}
    usage: dict[str, list[dict[str, object]]] = {i["id"]: [] for i in result.instruments}
    for machine in result.machines:
        for visit in machine.visits:
            used = sorted({e.instrument for item in visit.items for e in item.elements
                           if e.instrument})
            for instrument in used:
                entry = register.get(instrument, {})
                state = calibration_state(
                    parse_date(entry["calibrated"]) if entry.get("calibrated") else None,
                    parse_date(entry["calibration_due"]) if entry.get("calibration_due")
                    else None, visit.date)
                usage.setdefault(instrument, []).append(
                    {"machine": machine.id, "visit": visit.id, "state": state.phrase,
                     "valid": "ok" if state.valid else "lapsed"})
    pages = [
        SitePage("index.html", "index.html",
                 {"open_counts": open_counts, "state_counts": state_counts,
                  "visit_total": len(result.visits), "results_schema": RESULTS_SCHEMA}),
        SitePage("instruments.html", "instruments.html", {"usage": usage}),
        SitePage("deficiencies.html", "deficiencies.html",
                 {"deficiencies": _deficiencies(result)}),
    ]
    for machine in result.machines:
        base = f"machines/{machine.id}"
        pages.append(SitePage(f"{base}/index.html", "machine.html", {"machine": machine}))
        for visit in machine.visits:
            pages.append(SitePage(f"{base}/{visit.id}.html", "visit.html",
                                  {"machine": machine, "visit": visit},
                                  pdf=f"{base}/{visit.id}.pdf"))
    return pages
