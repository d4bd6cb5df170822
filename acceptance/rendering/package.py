"""Archival records: what each visit's PDF embeds, and the site package PDF.

The package (``package.pdf``) is a cover and a contents list followed by every visit's record,
the deficiencies and the instrument register. WeasyPrint keeps a whole laid-out document in
memory (about 2.4 MB a page), so the package is never laid out as one document: each part is
rendered on its own (the visit records are the PDFs the build has already written; the
deficiencies and the register are laid out beside them, in the same workers), and the parts
are joined by :mod:`.pdfjoin`, which writes each part out before it reads the next. The
contents are therefore numbered from the page counts of the rendered parts rather than with
``target-counter()``, which cannot see across separately rendered documents; the cover and
contents are laid out again if their own length changes those numbers. Each part keeps its
outline, nested under one entry per part. The laid-out parts are kept in
:data:`PARTS_FOLDER` so that the next build lays out only those whose page changed.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import shutil
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from pypdf import PdfReader

from ..clock import source_date_epoch
from ..integrity import signature_path, visit_inputs
from ..sitefiles import PARTS_FOLDER as _PARTS_FOLDER
from .pdf import PdfInfo, PdfSource, render_document, write_archival
from .pdfjoin import join_pdfs

if TYPE_CHECKING:
    from ..loading import Job, LoadedMachine, LoadedVisit
    from ..results import JobResult, VisitResult

__all__ = ["PACKAGE_NAME", "PARTS_FOLDER", "BACK_PARTS", "PackagePart", "KeptPart",
           "back_part_pdf", "build_moment", "visit_sources", "visit_pdf_info", "package_parts",
           "page_count", "render_package", "lay_out_part"]

PACKAGE_NAME = "package.pdf"
#: The package's own parts, kept in the site between builds but outside its manifest, so
#: that a part whose page has not changed is not laid out again.
PARTS_FOLDER = _PARTS_FOLDER
FRONT_NAME = "front.pdf"
#: The parts after the records: (title, page of the site they are laid out from).
BACK_PARTS = (("Deficiencies", "deficiencies.html"), ("Instruments", "instruments.html"))


def back_part_pdf(page: str) -> str:
    """Where the part laid out from ``page`` is kept, relative to the site."""
    return f"{PARTS_FOLDER}/{page.removesuffix('.html')}.pdf"


def build_moment(fallback: _dt.date) -> _dt.datetime:
    """``SOURCE_DATE_EPOCH`` when set (reproducible-builds.org), else midnight UTC of
    ``fallback``: never the clock, so two builds of the same inputs are byte-identical."""
    moment = source_date_epoch()
    if moment is not None:
        return moment
    return _dt.datetime(fallback.year, fallback.month, fallback.day, tzinfo=_dt.UTC)


def _shown(path: Path, job: Job) -> str:
    try:
        return path.resolve().relative_to(job.root.resolve()).as_posix()
    except ValueError:
        return f"built-in/{path.parent.name}/{path.name}"


def visit_sources(job: Job, machine: LoadedMachine, visit: LoadedVisit) -> list[PdfSource]:
    """The files the visit's verdicts were computed from, and its sign-off record."""
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


def page_count(path: Path) -> int:
    return len(PdfReader(path).pages)


@dataclass(frozen=True)
class KeptPart:
    """A part of the package laid out by the previous build: its key and page count, and
    the file, already checked against the digest the build recorded."""

    key: str
    pages: int
    pdf: Path


def lay_out_part(html: Path, target: Path, site: Path, info: PdfInfo,
                 pages: int | None = None) -> int:
    """Lay out one part of the package and, unless it does not come to ``pages`` pages, write
    it to ``target`` as PDF/A-3b; return the page count. Reads its files itself, so it can
    run in a process of its own."""
    document = render_document(html, [site])
    count = len(document.pages)
    if pages is None or count == pages:
        write_archival(document, target, (), info, site_root=site, links_from=site)
    return count


def render_package(env: Any, result: JobResult, staging: Path, signatures: Mapping[str, Any],
                   attachments: Sequence[PdfSource], info: PdfInfo, counts: Mapping[str, int],
                   key_prefix: bytes, kept_front: KeptPart | None = None,
                   progress: Callable[[str], None] | None = None,
                   lay_out: Callable[..., int] = lay_out_part) -> tuple[int, KeptPart]:
    """Write ``package.pdf`` into ``staging``; return its page count and its front part.

    ``env`` is the site's Jinja2 environment (with the review globals). Every record and the
    back parts (:data:`BACK_PARTS`) must already be in ``staging``, with their page counts in
    ``counts`` (keyed by site path). The cover and contents are laid out again only when
    their page differs from ``kept_front``'s (keyed ``key_prefix`` + page), through
    ``lay_out`` (called as :func:`lay_out_part`), which the build runs in a process that exits
    afterwards. ``attachments`` are embedded by the join, so a change to them alone does not
    lay out the front again.
    """
    work = staging / PARTS_FOLDER
    work.mkdir(exist_ok=True)
    parts = package_parts(result, staging, [(title, staging / back_part_pdf(page))
                                            for title, page in BACK_PARTS], signatures)
    part_counts = [counts[part.pdf.relative_to(staging).as_posix()] for part in parts]
    front_pdf, front_html = work / FRONT_NAME, work / "front.html"
    template = env.get_template("package.html")
    front_pages = kept_front.pages if kept_front is not None else 1
    try:
        for _attempt in range(4):
            starts, page = [], front_pages + 1
            for count in part_counts:
                starts.append(page)
                page += count
            html = template.render(root="../", parts=list(zip(parts, starts, part_counts,
                                                               strict=True)),
                                   total_pages=page - 1, built=info.modified)
            key = hashlib.sha256(key_prefix + html.encode()).hexdigest()
            if kept_front is not None and key == kept_front.key:
                shutil.copy2(kept_front.pdf, front_pdf)
                break
            if progress:
                progress(f"{PACKAGE_NAME}: cover and contents")
            front_html.write_text(html, encoding="utf-8")
            laid_out = lay_out(front_html, front_pdf, staging, info, front_pages)
            if laid_out == front_pages:
                break
            front_pages = laid_out
        else:  # pragma: no cover - the contents would have to grow with every pass
            raise RuntimeError("the package contents did not settle on a page count")
    finally:
        front_html.unlink(missing_ok=True)
    if progress:
        progress(f"{PACKAGE_NAME}: joining {len(parts)} parts")
    join_pdfs(staging / PACKAGE_NAME, front_pdf, [(part.title, part.pdf) for part in parts],
              attachments, info.modified)
    return front_pages + sum(part_counts), KeptPart(key, front_pages, front_pdf)
