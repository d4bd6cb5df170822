"""Decide what is stale: give each PDF a key, read what the previous build recorded, and
find the PDFs that can be taken from the previous site and whether anything changed at all.
Records the new build state for the next build.

A PDF's key is SHA-256 over its page's HTML, the assets but the scripts, the tool version
and, for a visit record, the files it embeds and its metadata. A previous PDF is reused only
when its key is unchanged and its file is still the one the previous build recorded.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import hashlib
import json
from pathlib import Path
from typing import TYPE_CHECKING

from .. import __version__
from ..integrity import load_private_key, manifest_signed_by
from ..loading import Job
from ..results import JobResult
from ..sitefiles import file_sha256, read_manifest, read_text_file, site_files
from .context import (
    BUILD_STATE_NAME,
    MANIFEST_NAME,
    MARKER_NAME,
    BuildContext,
    BuildState,
    PdfTask,
    SitePage,
)

if TYPE_CHECKING:  # the PDF stack loads only when a build renders PDFs
    from ..rendering.pdf import PdfInfo

__all__ = ["decide_stale", "write_build_state", "documents", "file_digest"]


def decide_stale(ctx: BuildContext) -> bool:
    """Key every PDF, compare with the previous site and choose what to render; return
    True when the site at ``ctx.output`` already is this build (nothing to write)."""
    if ctx.with_pdf:
        ctx.shared, ctx.package_info = _shared_key(ctx.files), _package_info(ctx.job,
                                                                              ctx.result)
        ctx.tasks = _archival_tasks(ctx, ctx.package_info)
    previous = _previous_state(ctx.output)
    intact = _site_intact(ctx.output, previous, full=ctx.key is not None)
    if ctx.key is not None and not (intact and _signed_by_key(ctx)):
        # A manifest this build neither wrote nor can vouch for is not signed: whatever it
        # lists (a PDF and its line both rewritten) is rendered again, not carried forward.
        previous = BuildState()
    elif ctx.key is not None:
        # The package's kept parts are bookkeeping, outside the signed manifest: a build
        # that signs lays them out again rather than join parts it cannot vouch for.
        previous.kept = {}
    ctx.previous = previous
    digests = {name: hashlib.sha256(data).hexdigest() for name, data in ctx.files.items()}
    # A previous PDF is reused only if it is still the file the previous build recorded:
    # one replaced in the output folder is rendered again, never carried forward.
    ctx.reusable = [t for t in ctx.tasks if previous.keys.get(t.pdf) == t.key
                    and previous.digest(t.pdf) is not None
                    and file_digest(ctx.output / t.pdf) == previous.digest(t.pdf)]
    records = [t for t in ctx.tasks if not t.part]  # the back parts are kept, not listed
    listed = set(digests) | {t.pdf for t in records}
    ctx.report.pdfs = len(records)
    if (intact and all(t in ctx.reusable for t in records) and set(previous.digests) == listed
            and all(previous.digests.get(n) == d for n, d in digests.items())):
        ctx.report.unchanged = True
        ctx.report.files = sorted(listed)
        return True
    fresh = [t for t in ctx.tasks if t not in ctx.reusable]
    if not documents(fresh, package=True):  # the back parts serve only the package
        fresh = [t for t in fresh if not t.part]
    ctx.fresh = fresh
    ctx.state = BuildState(keys={t.pdf: t.key for t in ctx.tasks})
    ctx.state.pages = {t.pdf: previous.pages[t.pdf] for t in ctx.reusable
                       if t.pdf in previous.pages}
    return False


def write_build_state(ctx: BuildContext) -> None:
    """Record the build state and the marker that says the site is ours, in staging, with
    the size, mtime and digest of every file of the staged site."""
    for name in site_files(ctx.staging):
        status = (ctx.staging / name).lstat()
        ctx.state.stats[name] = [status.st_size, status.st_mtime_ns,
                                 file_sha256(ctx.staging / name) or ""]
    (ctx.staging / BUILD_STATE_NAME).write_text(ctx.state.to_json(), encoding="utf-8")
    (ctx.staging / MARKER_NAME).write_text(f"acceptance {__version__}\n", encoding="utf-8")


def documents(tasks: list[PdfTask], package: bool) -> list[PdfTask]:
    """The package's task when ``package``, else every other one (records, back parts)."""
    if not tasks:  # a build without PDFs does not load the PDF stack
        return []
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import PACKAGE_NAME

    return [t for t in tasks if (t.pdf == PACKAGE_NAME) is package]


def file_digest(path: Path) -> str | None:
    return file_sha256(path)


def _site_intact(output: Path, previous: BuildState, full: bool) -> bool:
    """Whether the site at ``output`` is still the one its manifest and the build state
    describe: the same files, none missing, none added, each with its recorded content.

    Size and mtime are compared first; a file whose either differs (or every file, when
    ``full``) is digested. A manifest that disagrees with the build state is not trusted.
    """
    if not previous.digests or not previous.stats:
        return False
    if set(previous.digests) != set(previous.stats):
        return False
    try:
        present = site_files(output)
    except OSError:
        return False
    if set(present) != set(previous.digests):
        return False
    for name, digest in previous.digests.items():
        recorded = previous.stats[name]
        if len(recorded) != 3 or recorded[2] != digest:
            return False
        path = output / name
        try:
            status = path.lstat()
        except OSError:
            return False
        if (not full and not path.is_symlink()
                and [status.st_size, status.st_mtime_ns] == recorded[:2]):
            continue
        if file_sha256(path) != digest:
            return False
    return True


def _signed_by_key(ctx: BuildContext) -> bool:
    """Whether the site's manifest carries a signature by ``ctx.key`` that verifies."""
    assert ctx.key is not None
    return manifest_signed_by(ctx.output, load_private_key(ctx.key).public_raw)


def _shared_key(files: dict[str, bytes]) -> bytes:
    """What every PDF is made from besides its page: the tool version and the assets but
    the scripts, which WeasyPrint does not run. (The index's filter data is a script that
    changes with any verdict; were it in the key, one new deficiency would render every
    record again.)"""
    shared = hashlib.sha256(f"acceptance {__version__}\n".encode())
    for name in sorted(files):
        if name.startswith("assets/") and not name.endswith(".js"):
            shared.update(name.encode() + b"\0" + hashlib.sha256(files[name]).digest())
    return shared.digest()


def _pdf_tasks(pages: list[SitePage], files: dict[str, bytes], shared: bytes
               ) -> list[PdfTask]:
    tasks = []
    for page in pages:
        if page.pdf is None:
            continue
        key = hashlib.sha256(shared + page.path.encode() + b"\0" + files[page.path])
        tasks.append(PdfTask(page.path, page.pdf, key.hexdigest()))
    return tasks


def _archival_tasks(ctx: BuildContext, info: PdfInfo) -> list[PdfTask]:
    """The record PDFs with the sources they embed and their metadata, then the package.

    A task's key covers the embedded files and the dates as well as the page, so a change
    to a comment in a visit file (not shown, but embedded) renders the record again.
    """
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import (
        BACK_PARTS,
        PACKAGE_NAME,
        back_part_pdf,
        visit_pdf_info,
        visit_sources,
    )

    job, files, shared = ctx.job, ctx.files, ctx.shared
    visits = {f"machines/{m.id}/{v.id}.pdf": (m, v) for m in job.machines for v in m.visits}
    results = {f"machines/{v.machine}/{v.id}.pdf": v for v in ctx.result.visits}
    tasks = []
    for task in _pdf_tasks(ctx.pages, files, shared):
        if task.pdf in visits:
            machine, visit = visits[task.pdf]
            sources = tuple(visit_sources(job, machine, visit))
            signature = ctx.signatures[f"{machine.id}/{visit.id}"]
            info = visit_pdf_info(machine, results[task.pdf], signature.phrase)
            key = hashlib.sha256(task.key.encode() + repr(info).encode())
            for source in sources:
                key.update(source.name.encode() + b"\0" + hashlib.sha256(source.data).digest())
            task = dataclasses.replace(task, attachments=sources, info=info,
                                       key=key.hexdigest())
        tasks.append(task)
    parts = []
    for _title, page in BACK_PARTS:
        key = hashlib.sha256(shared + page.encode() + b"\0" + files[page] + repr(info).encode())
        parts.append(PdfTask(page, back_part_pdf(page), key.hexdigest(), info=info, part=True))
    package = hashlib.sha256(b"package\0" + "".join(t.key for t in [*tasks, *parts]).encode())
    package.update(b"results.json\0" + hashlib.sha256(files["results.json"]).digest())
    package.update(repr(info).encode())
    # The back parts go first: they are the longest documents, and a long one started last
    # would leave the other workers idle at the end.
    return [*parts, *tasks, PdfTask(PACKAGE_NAME, PACKAGE_NAME, package.hexdigest())]


def _package_info(job: Job, result: JobResult) -> PdfInfo:
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import build_moment
    from ..rendering.pdf import PdfInfo

    latest = max((v.date for v in result.visits), default=_dt.date(1970, 1, 1))
    moment = build_moment(latest)
    return PdfInfo(identifier=f"acceptance package {job.root.resolve().name}",
                   created=moment, modified=moment, keywords=["site package", result.site],
                   title=f"Site package: {result.title}",
                   subject=f"Every visit record of {result.site}, the deficiencies and "
                           "the instruments", authors=[result.contractor])


def _previous_state(output: Path) -> BuildState:
    """The state of the site at ``output``, if ours; an empty one otherwise."""
    manifest, path = output / MANIFEST_NAME, output / BUILD_STATE_NAME
    if not (output / MARKER_NAME).is_file() or not manifest.is_file() or not path.is_file():
        return BuildState()
    state = BuildState()
    try:
        listed = read_manifest(manifest)
    except (ValueError, OSError):  # damaged: the whole site is written again
        return BuildState()
    if listed.bad_lines:
        return BuildState()
    state.digests = listed.digests
    try:
        recorded = json.loads(read_text_file(path, "build state"))
        state.keys = dict(recorded.get("pdfs", {}))
        state.pages = {name: int(count) for name, count in recorded.get("pages", {}).items()}
        state.kept = dict(recorded.get("kept", {}))
        state.stats = {str(name): [int(size), int(mtime), str(digest)]
                       for name, (size, mtime, digest) in recorded.get("files", {}).items()}
    except (ValueError, TypeError, AttributeError, OSError):
        return BuildState(digests=state.digests)
    return state
