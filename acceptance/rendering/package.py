"""Archival records: what each visit's PDF embeds, and the site package PDF.

The package (``package.pdf``) is a cover and a contents list followed by every visit's record,
the deficiencies and the instrument register. WeasyPrint keeps a whole laid-out document in
memory (about 2.4 MB a page), so the package is never laid out as one document: each part is
rendered on its own (the visit records are the PDFs the build has already written), and the
parts are joined by :mod:`.pdfjoin`, which writes each part out before it reads the next. The
contents are therefore numbered from the page counts of the rendered parts rather than with
``target-counter()``, which cannot see across separately rendered documents; the cover and
contents are laid out again if their own length changes those numbers. Each part keeps its
outline, nested under one entry per part.
"""

from __future__ import annotations

import datetime as _dt
import os
import shutil
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .pdf import PdfInfo, PdfSource

if TYPE_CHECKING:
    from ..loading import Job, LoadedMachine, LoadedVisit
    from ..results import JobResult, VisitResult

__all__ = ["PACKAGE_NAME", "PackagePart", "build_moment", "visit_sources", "visit_pdf_info",
           "package_parts", "render_package", "lay_out_part"]

PACKAGE_NAME = "package.pdf"
_WORK = ".package-work"


def build_moment(fallback: _dt.date) -> _dt.datetime:
    """``SOURCE_DATE_EPOCH`` when set (reproducible-builds.org), else midnight UTC of
    ``fallback``: never the clock, so two builds of the same inputs are byte-identical."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch:
        return _dt.datetime.fromtimestamp(int(epoch), _dt.UTC)
    return _dt.datetime(fallback.year, fallback.month, fallback.day, tzinfo=_dt.UTC)


def _shown(path: Path, job: Job) -> str:
    try:
        return path.resolve().relative_to(job.root.resolve()).as_posix()
    except ValueError:
        return f"built-in/{path.parent.name}/{path.name}"


def visit_sources(job: Job, machine: LoadedMachine, visit: LoadedVisit) -> list[PdfSource]:
    """The files the visit's verdicts were computed from, and its sign-off record."""
    from ..integrity import signature_path, visit_inputs

    paths: dict[Path, str] = {}
    for signed in visit_inputs(job, machine, visit):
        if signed.path.is_file():
            paths.setdefault(signed.path, signed.description)
    record = signature_path(machine.folder, visit.id)
    if record.is_file():
        paths[record] = "sign-off record (outside the files it covers)"
    sources = [PdfSource(_shown(path, job), path.read_bytes(), description)
               for path, description in paths.items()]
    return sorted(sources, key=lambda s: s.name)


def visit_pdf_info(machine: LoadedMachine, visit: VisitResult, state_phrase: str) -> PdfInfo:
    created = _dt.datetime(visit.date.year, visit.date.month, visit.date.day, tzinfo=_dt.UTC)
    checklists = [c.id for c in visit.checklists]
    return PdfInfo(
        identifier=f"acceptance record {machine.id}/{visit.id}", created=created,
        modified=build_moment(visit.date),
        keywords=[machine.id, visit.kind, visit.state.value, state_phrase, *checklists],
        title=f"{visit.kind.capitalize()} record: {machine.model.name} — {visit.id}",
        subject=(f"{visit.kind} record of {machine.model.name} ({machine.id}), "
                 f"{visit.date.isoformat()}: {visit.state.value}"),
        authors=list(visit.performed_by))


@dataclass(frozen=True)
class PackagePart:
    """One part of the package: a PDF already written, and how the contents list it."""

    title: str
    pdf: Path
    machine: str = ""
    visit: str = ""
    state: str = ""
    signature: str = ""


def package_parts(result: JobResult, staging: Path, extra: Sequence[tuple[str, Path]],
                  signatures: Mapping[str, Any]) -> list[PackagePart]:
    parts = []
    for machine in result.machines:
        for visit in machine.visits:
            status = signatures.get(f"{machine.id}/{visit.id}")
            parts.append(PackagePart(
                f"{machine.name} — {visit.id}",
                staging / "machines" / machine.id / f"{visit.id}.pdf", machine.id, visit.id,
                visit.state.value, status.phrase if status is not None else "not signed"))
    parts += [PackagePart(title, path) for title, path in extra]
    return parts


def _page_count(path: Path) -> int:
    from pypdf import PdfReader

    return len(PdfReader(path).pages)


def lay_out_part(html: Path, target: Path, site: Path, info: PdfInfo,
                 sources: Sequence[tuple[str, Path, str]] = (), pages: int | None = None) -> int:
    """Lay out one part of the package and, unless it does not come to ``pages`` pages, write
    it to ``target`` as PDF/A-3b with ``sources`` (name, file, description) embedded; return
    the page count. Reads its files itself, so it can run in a process of its own."""
    from .pdf import render_document, write_archival

    document = render_document(html, [site])
    count = len(document.pages)
    if pages is None or count == pages:
        embedded = [PdfSource(name, path.read_bytes(), description)
                    for name, path, description in sources]
        write_archival(document, target, embedded, info, site_root=site, links_from=site)
    return count


def render_package(env: Any, result: JobResult, staging: Path, signatures: Mapping[str, Any],
                   sources: Sequence[tuple[str, Path, str]], info: PdfInfo,
                   progress: Callable[[str], None] | None = None,
                   lay_out: Callable[..., int] = lay_out_part) -> int:
    """Write ``package.pdf`` into ``staging``; return its page count.

    ``env`` is the site's Jinja2 environment (with the review globals); the deficiencies and
    instruments pages must already be in ``staging``. Each laid-out part goes through
    ``lay_out`` (called as :func:`lay_out_part`), which the build runs in a process that exits
    afterwards: WeasyPrint does not give back what a long register held.
    """
    from .pdfjoin import join_pdfs

    work = staging / _WORK
    work.mkdir()
    try:
        extra = []
        for title, page in (("Deficiencies", "deficiencies.html"),
                            ("Instruments", "instruments.html")):
            target = work / page.replace(".html", ".pdf")
            if progress:
                progress(f"{PACKAGE_NAME}: {title.lower()}")
            lay_out(staging / page, target, staging, info)
            extra.append((title, target))
        parts = package_parts(result, staging, extra, signatures)
        counts = [_page_count(part.pdf) for part in parts]
        front_pages, front_pdf = 1, work / "front.pdf"
        template = env.get_template("package.html")
        for _attempt in range(4):
            starts, page = [], front_pages + 1
            for count in counts:
                starts.append(page)
                page += count
            html = template.render(root="../", parts=list(zip(parts, starts, counts,
                                                               strict=True)),
                                   total_pages=page - 1, built=info.modified)
            front_html = work / "front.html"
            front_html.write_text(html, encoding="utf-8")
            laid_out = lay_out(front_html, front_pdf, staging, info, sources, front_pages)
            if laid_out == front_pages:
                break
            front_pages = laid_out
        else:  # pragma: no cover - the contents would have to grow with every pass
            raise RuntimeError("the package contents did not settle on a page count")
        if progress:
            progress(f"{PACKAGE_NAME}: joining {len(parts)} parts")
        join_pdfs(staging / PACKAGE_NAME, front_pdf, [(part.title, part.pdf) for part in parts])
        return front_pages + sum(counts)
    finally:
        shutil.rmtree(work, ignore_errors=True)
