"""Plan the site: every page, the template that draws it and the data it is drawn from."""

from __future__ import annotations

from ..results import RESULTS_SCHEMA, JobResult
from .context import SitePage

__all__ = ["SitePage", "plan_site"]


def plan_site(result: JobResult) -> list[SitePage]:
    """Every page with its template and data; links between them are relative."""
    pages = [
        SitePage("index.html", "index.html",
                 {"visit_total": len(result.visits), "results_schema": RESULTS_SCHEMA}),
        SitePage("instruments.html", "instruments.html", {}),
        SitePage("deficiencies.html", "deficiencies.html",
                 {"deficiencies": result.punch_list}),
    ]
    for machine in result.machines:
        base = f"machines/{machine.id}"
        pages.append(SitePage(f"{base}/index.html", "machine.html", {"machine": machine}))
        for visit in machine.visits:
            pages.append(SitePage(f"{base}/{visit.id}.html", "visit.html",
                                  {"machine": machine, "visit": visit},
                                  pdf=f"{base}/{visit.id}.pdf"))
    return pages
