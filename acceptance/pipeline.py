"""The build: load → evaluate → plan the site → render HTML → render PDFs → swap in atomically.

Everything is written into a staging folder beside the output; only when every
page and PDF is complete is the staging folder exchanged with the previous site
in one rename, so a failed or interrupted build leaves the previous site intact.
"""

from __future__ import annotations

import contextlib
import ctypes
import ctypes.util
import fcntl
import hashlib
import json
import os
import shutil
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

from . import __version__
from .errors import BuildError
from .evaluation import evaluate_job
from .loading import Job, load_job
from .rendering.html import make_environment
from .resources import templates_dir
from .results import RESULTS_SCHEMA, JobResult, VisitResult, VisitState, to_json

__all__ = ["BuildReport", "SitePage", "build_site", "plan_site", "MANIFEST_NAME"]

MANIFEST_NAME = "MANIFEST.sha256"
_MARKER = ".acceptance-site"


@dataclass(frozen=True)
class SitePage:
    """One page of the site: where it goes, which template draws it, and with what."""

    path: str  # relative to the site root, '/'-separated
    template: str
    context: dict[str, object]
    pdf: str | None = None  # the PDF rendered from this page, if any

    @property
    def root(self) -> str:
        return "../" * self.path.count("/")


@dataclass
class BuildReport:
    output: Path
    pages: int = 0
    pdfs: int = 0
    pdf_pages: int = 0
    files: list[str] = field(default_factory=list)
    result: JobResult | None = None


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
    from .computations.uncertainty import calibration_state
    from .model import parse_date

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


def _capture_plots(env: object, visit: VisitResult) -> dict[str, dict[str, object]]:
    """SVG plots of every capture attached to a visit's readings, keyed item/element."""
    from markupsafe import Markup

    from .rendering.plots import PlotTrace, render_spectrum_svg, render_waveform_svg

    plots: dict[str, dict[str, object]] = {}
    for item in visit.items:
        for element in item.elements:
            capture = element.capture
            if capture is None:
                continue
            # A few cycles are enough to see the shape; the analysis used the whole capture.
            cycles = 3 / capture.frequency
            mask = capture.time - capture.time[0] <= cycles
            traces = [PlotTrace(f"{c.name} ({'voltage' if c.unit == 'V' else 'current'})",
                               c.unit, capture.signals[c.name][mask]) for c in capture.channels]
            waveform = render_waveform_svg(env, capture.time[mask] - capture.time[0], traces)
            spectra = []
            for channel in capture.channels:
                spectrum = channel.spectrum
                spectra.append((channel.name, Markup(render_spectrum_svg(
                    env, list(spectrum.orders), list(spectrum.percent_of_fundamental)))))
            plots[f"{item.key}/{element.element or ''}"] = {
                "waveform": Markup(waveform), "spectra": spectra}
    return plots


def _render_pages(result: JobResult, pages: list[SitePage], staging: Path) -> None:
    env = make_environment({"job": result, "tool_version": __version__})
    for page in pages:
        template = env.get_template(page.template)
        extra = {}
        if page.template == "visit.html":
            extra["plots"] = _capture_plots(env, page.context["visit"])  # type: ignore[arg-type]
        html = template.render(root=page.root, **page.context, **extra)
        target = staging / page.path
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_text(html, encoding="utf-8")


def _copy_assets(staging: Path) -> None:
    shutil.copytree(templates_dir() / "assets", staging / "assets")


def _copy_attachments(job: Job, staging: Path) -> None:
    for machine in job.machines:
        for visit in machine.visits:
            for attachment in visit.model.attachments:
                source = (machine.folder / attachment.path).resolve()
                target = staging / "machines" / machine.id / "attachments" / attachment.path
                target.parent.mkdir(parents=True, exist_ok=True)
                shutil.copyfile(source, target)


def _write_manifest(staging: Path) -> list[str]:
    files = sorted(p.relative_to(staging).as_posix() for p in staging.rglob("*")
                   if p.is_file() and p.name not in (MANIFEST_NAME, _MARKER))
    lines = []
    for name in files:
        digest = hashlib.sha256((staging / name).read_bytes()).hexdigest()
        lines.append(f"{digest}  {name}")
    (staging / MANIFEST_NAME).write_text("\n".join(lines) + "\n", encoding="utf-8")
    return files


def _exchange(staging: Path, output: Path) -> None:
    """Put ``staging`` where ``output`` is, atomically where the system allows."""
    if not output.exists():
        os.rename(staging, output)
        return
    libc_name = ctypes.util.find_library("c")
    renameat2 = getattr(ctypes.CDLL(libc_name, use_errno=True), "renameat2", None) \
        if libc_name else None
    if renameat2 is not None:
        at_fdcwd, rename_exchange = -100, 2
        if renameat2(at_fdcwd, os.fsencode(staging), at_fdcwd, os.fsencode(output),
                     rename_exchange) == 0:
            shutil.rmtree(staging)  # now holds the previous site
            return
    # No atomic exchange here (another OS or file system): two renames, the old site kept
    # under a side name until the new one is in place.
    previous = output.with_name(f".{output.name}.previous-{os.getpid()}")
    os.rename(output, previous)
    os.rename(staging, output)
    shutil.rmtree(previous)


@contextlib.contextmanager
def _build_lock(output: Path) -> Iterator[None]:
    lock_path = output.with_name(f".{output.name}.lock")
    lock_path.parent.mkdir(parents=True, exist_ok=True)
    with open(lock_path, "w") as handle:
        try:
            fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            raise BuildError(f"another build is writing {output} right now; wait for it to "
                             "finish and run the build again") from None
        try:
            yield
        finally:
            fcntl.flock(handle, fcntl.LOCK_UN)


def _check_output(output: Path, job_root: Path) -> None:
    if output.resolve() == job_root.resolve() or job_root.resolve().is_relative_to(
            output.resolve()):
        raise BuildError(f"the output folder {output} would replace the job folder; "
                         "choose a folder outside it")
    if output.exists():
        if not output.is_dir():
            raise BuildError(f"{output} exists and is not a folder; choose another output")
        if any(output.iterdir()) and not (output / _MARKER).exists():
            raise BuildError(f"{output} exists and was not written by acceptance; it is left "
                             "untouched. Choose an empty or new folder")


def build_site(job_root: Path, output: Path, with_pdf: bool = True,
               progress: Callable[[str], None] | None = None) -> BuildReport:
    """Build the site for the job at ``job_root`` into ``output``."""
    job_root, output = Path(job_root), Path(output)
    job = load_job(job_root)  # raises InputError before anything is written
    result = evaluate_job(job)
    _check_output(output, job_root)
    report = BuildReport(output=output, result=result)
    with _build_lock(output):
        staging = output.with_name(f".{output.name}.staging-{os.getpid()}")
        if staging.exists():
            shutil.rmtree(staging)
        staging.mkdir(parents=True)
        try:
            pages = plan_site(result)
            _render_pages(result, pages, staging)
            _copy_assets(staging)
            _copy_attachments(job, staging)
            (staging / "results.json").write_text(
                json.dumps(to_json(result), ensure_ascii=False, indent=2) + "\n",
                encoding="utf-8")
            report.pages = len(pages)
            if with_pdf:
                from .rendering.pdf import render_pdf  # the PDF stack loads only when needed

                for page in pages:
                    if page.pdf is None:
                        continue
                    if progress:
                        progress(page.pdf)
                    report.pdf_pages += render_pdf(staging / page.path, staging / page.pdf,
                                                   roots=[staging])
                    report.pdfs += 1
            (staging / _MARKER).write_text(f"acceptance {__version__}\n", encoding="utf-8")
            report.files = _write_manifest(staging)
            _exchange(staging, output)
        except BaseException:
            shutil.rmtree(staging, ignore_errors=True)
            raise
    return report


def visit_pdf_path(visit: VisitResult) -> str:
    return f"machines/{visit.machine}/{visit.id}.pdf"
