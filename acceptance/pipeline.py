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
import io
import json
import os
import shutil
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING

from . import __version__
from .errors import BuildError
from .evaluation import evaluate_job
from .loading import Job, load_job
from .rendering.html import make_environment
from .resources import templates_dir
from .results import RESULTS_SCHEMA, JobResult, VisitResult, to_json

if TYPE_CHECKING:  # the PDF stack loads only when a build renders PDFs
    from .rendering.package import KeptPart
    from .rendering.pdf import PdfInfo

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
    pdf_pages: int = 0  # pages of the PDFs rendered in this build
    rendered: int = 0  # PDFs rendered in this build (the others were unchanged)
    unchanged: bool = False  # nothing changed: nothing was written
    files: list[str] = field(default_factory=list)
    result: JobResult | None = None


def plan_site(result: JobResult) -> list[SitePage]:
    """Every page with its template and data; links between them are relative."""
    pages = [
        SitePage("index.html", "index.html",
                 {"visit_total": len(result.visits), "results_schema": RESULTS_SCHEMA}),
        SitePage("instruments.html", "instruments.html", {}),
        SitePage("deficiencies.html", "deficiencies.html",
                 {"deficiencies": result.deficiencies}),
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


def _write_manifest(staging: Path) -> list[str]:
    """List every file of the site with its SHA-256, but the build's own bookkeeping: the
    marker, the build state and the package's kept parts (all named ``.acceptance-*``)."""
    files = sorted(p.relative_to(staging).as_posix() for p in staging.rglob("*")
                   if p.is_file() and p.name != MANIFEST_NAME
                   and not p.relative_to(staging).parts[0].startswith(".acceptance-"))
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


def _clear_leftovers(output: Path) -> None:
    """Remove what a killed build left beside ``output``; only called under the lock.

    A build killed while staging leaves ``.<name>.staging-<pid>``; one killed between the
    two renames of the fallback exchange leaves the previous site as
    ``.<name>.previous-<pid>`` and no ``output``, which is put back first.
    """
    previous = sorted(output.parent.glob(f".{output.name}.previous-*"))
    if not output.exists() and previous:
        os.rename(previous.pop(), output)
    for leftover in [*output.parent.glob(f".{output.name}.staging-*"), *previous]:
        if leftover.is_dir() and not leftover.is_symlink():
            shutil.rmtree(leftover, ignore_errors=True)


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


@dataclass(frozen=True)
class PdfTask:
    """One PDF to render from one staged HTML page, and the key that says when it is stale."""

    html: str  # site-relative path of the page
    pdf: str  # site-relative path of the PDF
    key: str  # digest of everything the PDF is made from
    sources: tuple[Path, ...] = ()  # input files the PDF depends on (e.g. embedded ones)
    attachments: tuple[object, ...] = ()  # rendering.pdf.PdfSource: files embedded (PDF/A-3)
    info: object = None  # rendering.pdf.PdfInfo: identifier, dates, keywords
    part: bool = False  # a part of package.pdf: its links are relative to the site root


_BUILD_STATE = ".acceptance-build.json"


def _site_files(job: Job, result: JobResult, pages: list[SitePage],
                signatures: dict[str, object]) -> dict[str, bytes]:
    """Every output file but the PDFs, in memory: rendering HTML is cheap, PDFs are not."""
    files: dict[str, bytes] = {}
    env = _review_environment(result, signatures)
    for page in pages:
        template = env.get_template(page.template)
        extra = {}
        if page.template == "visit.html":
            extra["plots"] = _capture_plots(env, page.context["visit"])  # type: ignore[arg-type]
        elif page.template == "machine.html":
            from .rendering.plots import render_machine_trends

            extra["trends"] = render_machine_trends(env, page.context["machine"])
        files[page.path] = template.render(root=page.root, **page.context, **extra).encode()
    assets = templates_dir() / "assets"
    for path in sorted(assets.rglob("*")):
        if path.is_file():
            files[f"assets/{path.relative_to(assets).as_posix()}"] = path.read_bytes()
    for machine in job.machines:
        for visit in machine.visits:
            for attachment in visit.model.attachments:
                source = (machine.folder / attachment.path).resolve()
                files[f"machines/{machine.id}/attachments/{attachment.path}"] = \
                    source.read_bytes()
    files["results.json"] = _results_json(result)
    files.update(_review_files(result, signatures))
    return files


def _results_json(result: JobResult) -> bytes:
    """``results.json``, encoded as it is serialised: ``json.dumps`` with an indent joins a
    list of every token first, over 300 MB for a 46 MB file of 600 visits."""
    buffer = io.BytesIO()
    with io.TextIOWrapper(buffer, encoding="utf-8", newline="\n", write_through=True) as text:
        json.dump(to_json(result), text, ensure_ascii=False, indent=2)
        text.write("\n")
        text.flush()
        return buffer.getvalue()


def _signature_states(job: Job) -> dict[str, object]:
    from .integrity import signature_statuses

    return dict(signature_statuses(job))


def _review_environment(result: JobResult, signatures: dict[str, object]):  # noqa: ANN202
    from .rendering.review import review_globals

    return make_environment({"job": result, "tool_version": __version__,
                             **review_globals(signatures, package_pdf=True)})


def _review_files(result: JobResult, signatures: dict[str, object]) -> dict[str, bytes]:
    """The index filters' data and the punch list as CSV (acceptance.rendering.review)."""
    from .rendering.review import (
        DEFICIENCIES_CSV_NAME,
        INDEX_DATA_NAME,
        deficiencies_csv,
        index_data_script,
    )

    return {INDEX_DATA_NAME: index_data_script(result).encode(),
            DEFICIENCIES_CSV_NAME: deficiencies_csv(result.deficiencies, result,
                                                    signatures).encode()}


def _archival_tasks(job: Job, result: JobResult, pages: list[SitePage],
                    files: dict[str, bytes], signatures: dict[str, object],
                    shared: bytes, info: PdfInfo) -> list[PdfTask]:
    """The record PDFs with the sources they embed and their metadata, then the package.

    A task's key covers the embedded files and the dates as well as the page, so a change
    to a comment in a visit file (not shown, but embedded) renders the record again.
    """
    import dataclasses

    from .rendering.package import (
        BACK_PARTS,
        PACKAGE_NAME,
        back_part_pdf,
        visit_pdf_info,
        visit_sources,
    )

    visits = {f"machines/{m.id}/{v.id}.pdf": (m, v) for m in job.machines for v in m.visits}
    results = {f"machines/{v.machine}/{v.id}.pdf": v for v in result.visits}
    tasks = []
    for task in _pdf_tasks(pages, files, shared):
        if task.pdf in visits:
            machine, visit = visits[task.pdf]
            sources = tuple(visit_sources(job, machine, visit))
            signature = signatures[f"{machine.id}/{visit.id}"]
            info = visit_pdf_info(machine, results[task.pdf],
                                  signature.phrase)  # type: ignore[attr-defined]
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
    import datetime as _dt

    from .rendering.package import build_moment
    from .rendering.pdf import PdfInfo

    latest = max((v.date for v in result.visits), default=_dt.date(1970, 1, 1))
    moment = build_moment(latest)
    return PdfInfo(identifier=f"acceptance package {job.root.resolve().name}",
                   created=moment, modified=moment, keywords=["site package", result.site],
                   title=f"Site package: {result.title}",
                   subject=f"Every visit record of {result.site}, the deficiencies and "
                           "the instruments", authors=[result.contractor])


def _documents(tasks: list[PdfTask], package: bool) -> list[PdfTask]:
    """The package's task when ``package``, else every other one (records, back parts)."""
    from .rendering.package import PACKAGE_NAME

    return [t for t in tasks if (t.pdf == PACKAGE_NAME) is package]


def _render_package(result: JobResult, tasks: list[PdfTask], staging: Path,
                    signatures: dict[str, object], info: PdfInfo, counts: dict[str, int],
                    front_prefix: bytes, kept_front: KeptPart | None,
                    progress: Callable[[str], None] | None, jobs: int = 1
                    ) -> tuple[int, KeptPart | None]:
    """Write package.pdf when its task is among ``tasks``, every other PDF being in place
    with its page count in ``counts``; return its page count and its front part (or
    ``kept_front`` when the package was not written)."""
    from .rendering.package import lay_out_part, render_package
    from .rendering.pdf import PdfSource

    if not _documents(tasks, package=True):
        return 0, kept_front
    results = PdfSource("results.json", (staging / "results.json").read_bytes(),
                        "the computed results (schema " + RESULTS_SCHEMA + ")")
    lay_out = partial(_in_worker, lay_out_part) if jobs > 1 else lay_out_part
    return render_package(_review_environment(result, signatures), result, staging,
                          signatures, [results], info, counts, front_prefix,
                          kept_front, progress, lay_out)


def _in_worker(function: Callable[..., int], *arguments: object) -> int:
    """``function(*arguments)`` in a PDF worker that exits afterwards, so what WeasyPrint
    held is given back rather than added to this process, which lives to the end."""
    with _pdf_context().Pool(processes=1, maxtasksperchild=1) as pool:
        return pool.apply(function, arguments)


def _pdf_context():  # noqa: ANN202 - multiprocessing context
    import multiprocessing

    # forkserver: workers start from a process that has already imported WeasyPrint.
    context = multiprocessing.get_context("forkserver")
    context.set_forkserver_preload(["acceptance.rendering.pdf"])
    return context


def _sign_manifest(staging: Path, key: Path | None) -> None:
    if key is not None:
        from .integrity import load_private_key, sign_manifest

        sign_manifest(staging / MANIFEST_NAME, load_private_key(key))


def _sign_unchanged_manifest(output: Path, key: Path) -> None:
    """Sign the manifest of a site that needs no rebuild, as a build with ``--key`` promises.

    The signature file is not listed in the manifest, so it may change alone; it is written
    only when its text differs (another key, or none yet), so a signed site rebuilt with the
    same key still writes nothing.
    """
    from .integrity import MANIFEST_SIGNATURE_NAME, load_private_key, manifest_signature

    text = manifest_signature((output / MANIFEST_NAME).read_bytes(), load_private_key(key))
    target = output / MANIFEST_SIGNATURE_NAME
    if target.is_file() and target.read_text(encoding="utf-8") == text:
        return
    temporary = target.with_name(f".{target.name}.{os.getpid()}")
    temporary.write_text(text, encoding="utf-8")
    os.replace(temporary, target)


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


@dataclass
class _BuildState:
    """What a build records about its site for the next one (``.acceptance-build.json``)."""

    digests: dict[str, str] = field(default_factory=dict)  # file → sha256, from the manifest
    keys: dict[str, str] = field(default_factory=dict)  # pdf → key of what it was made from
    pages: dict[str, int] = field(default_factory=dict)  # pdf → page count
    kept: dict[str, str] = field(default_factory=dict)  # kept part → sha256 (not listed)

    def digest(self, name: str) -> str | None:
        return self.digests.get(name) or self.kept.get(name)

    def to_json(self) -> str:
        return json.dumps({"tool_version": __version__, "pdfs": self.keys, "pages": self.pages,
                           "kept": self.kept}, indent=1, sort_keys=True) + "\n"


def _previous_state(output: Path) -> _BuildState:
    """The state of the site at ``output``, if ours; an empty one otherwise."""
    manifest, path = output / MANIFEST_NAME, output / _BUILD_STATE
    if not (output / _MARKER).is_file() or not manifest.is_file() or not path.is_file():
        return _BuildState()
    state = _BuildState()
    for line in manifest.read_text(encoding="utf-8").splitlines():
        digest, _, name = line.partition("  ")
        if name:
            state.digests[name] = digest
    try:
        recorded = json.loads(path.read_text(encoding="utf-8"))
        state.keys = dict(recorded.get("pdfs", {}))
        state.pages = {name: int(count) for name, count in recorded.get("pages", {}).items()}
        state.kept = dict(recorded.get("kept", {}))
    except (ValueError, TypeError, AttributeError):
        return _BuildState(digests=state.digests)
    return state


def _count_missing_pages(tasks: list[PdfTask], staging: Path, state: _BuildState) -> None:
    """Count the pages of PDFs reused from a site built before page counts were recorded."""
    from .rendering.package import page_count

    for task in tasks:
        if task.pdf not in state.pages and (staging / task.pdf).is_file():
            state.pages[task.pdf] = page_count(staging / task.pdf)


def _keep_front(front: KeptPart | None, staging: Path, state: _BuildState) -> None:
    """Record the package's front (and every kept part's digest) for the next build; a
    front kept from the previous build when the package was not joined again is carried
    over."""
    from .rendering.package import FRONT_NAME, PARTS_FOLDER

    name = f"{PARTS_FOLDER}/{FRONT_NAME}"
    if front is not None:
        target = staging / name
        if not target.exists():
            _link_or_copy(front.pdf, target)
        state.keys[name] = front.key
        state.pages[name] = front.pages
    folder = staging / PARTS_FOLDER
    if folder.is_dir():
        state.kept = {path.relative_to(staging).as_posix(): _file_digest(path) or ""
                      for path in sorted(folder.iterdir()) if path.is_file()}


def _kept_front(output: Path, state: _BuildState) -> KeptPart | None:
    """The previous build's package front, if it is still the file that build recorded."""
    from .rendering.package import FRONT_NAME, PARTS_FOLDER, KeptPart

    name = f"{PARTS_FOLDER}/{FRONT_NAME}"
    key, pages, digest = state.keys.get(name), state.pages.get(name), state.kept.get(name)
    if key is None or pages is None or digest is None \
            or _file_digest(output / name) != digest:
        return None
    return KeptPart(key, pages, output / name)


def _render_one(task: PdfTask, staging: str) -> tuple[str, int]:
    from .rendering.pdf import render_pdf  # the PDF stack loads only when needed

    root = Path(staging)
    (root / task.pdf).parent.mkdir(parents=True, exist_ok=True)
    pages = render_pdf(root / task.html, root / task.pdf, roots=[root],
                       attachments=task.attachments,  # type: ignore[arg-type]
                       info=task.info,  # type: ignore[arg-type]
                       links_from=root if task.part else None)
    if task.part:  # a long document: give back what its layout held before the next one
        _release_memory()
    return task.pdf, pages


#: Documents a PDF worker renders before it is replaced (WeasyPrint keeps what it loaded).
TASKS_PER_WORKER = 16


def _render_star(arguments: tuple[PdfTask, str]) -> tuple[str, int]:
    return _render_one(*arguments)


def _render_pdfs(tasks: list[PdfTask], staging: Path, jobs: int,
                 progress: Callable[[str], None] | None) -> dict[str, int]:
    """Render ``tasks`` into ``staging``, in worker processes when ``jobs`` > 1; return the
    page count of each PDF."""
    pages: dict[str, int] = {}
    if jobs <= 1 or len(tasks) <= 1:
        for number, task in enumerate(tasks, start=1):
            pages[task.pdf] = _render_one(task, str(staging))[1]
            if progress:
                progress(f"[{number}/{len(tasks)}] {task.pdf}")
        return pages
    # Each worker is replaced after a few documents so the memory it held is given back;
    # the older multiprocessing.Pool is used because ProcessPoolExecutor's
    # max_tasks_per_child can stop replacing workers on Python 3.11 and hang the build.
    with _pdf_context().Pool(processes=jobs, maxtasksperchild=TASKS_PER_WORKER) as pool:
        work = [(task, str(staging)) for task in tasks]
        for number, (name, count) in enumerate(
                pool.imap_unordered(_render_star, work, chunksize=1), start=1):
            pages[name] = count
            if progress:
                progress(f"[{number}/{len(tasks)}] {name}")
    return pages


def _file_digest(path: Path) -> str | None:
    try:
        with open(path, "rb") as handle:
            return hashlib.file_digest(handle, "sha256").hexdigest()
    except OSError:
        return None


def _release_memory() -> None:
    """Give freed memory back to the system: CPython's allocator and glibc keep it otherwise,
    and the build's peak is summed over this process and its PDF workers."""
    import gc

    gc.collect()
    libc_name = ctypes.util.find_library("c")
    trim = getattr(ctypes.CDLL(libc_name), "malloc_trim", None) if libc_name else None
    if trim is not None:
        trim(0)


def _link_or_copy(source: Path, target: Path) -> None:
    target.parent.mkdir(parents=True, exist_ok=True)
    try:
        os.link(source, target)
    except OSError:
        shutil.copy2(source, target)


def build_site(job_root: Path, output: Path, with_pdf: bool = True,
               progress: Callable[[str], None] | None = None, jobs: int = 1,
               key: Path | None = None) -> BuildReport:
    """Build the site for the job at ``job_root`` into ``output``.

    Only what changed is rendered again: a PDF whose page, styles and tool version are
    unchanged is taken from the previous site, and a rebuild that changes nothing writes
    nothing at all.
    """
    job_root, output = Path(job_root), Path(output)
    job = load_job(job_root)  # raises InputError before anything is written
    result = evaluate_job(job)
    _check_output(output, job_root)
    report = BuildReport(output=output, result=result)
    with _build_lock(output):
        _clear_leftovers(output)
        pages = plan_site(result)
        signatures = _signature_states(job)
        files = _site_files(job, result, pages, signatures)
        shared, package_info = _shared_key(files), _package_info(job, result)
        tasks = _archival_tasks(job, result, pages, files, signatures, shared,
                                package_info) if with_pdf else []
        report.pages = len(pages)
        previous = _previous_state(output)
        digests = {name: hashlib.sha256(data).hexdigest() for name, data in files.items()}
        # A previous PDF is reused only if it is still the file the previous build recorded:
        # one replaced in the output folder is rendered again, never carried forward.
        reusable = [t for t in tasks if previous.keys.get(t.pdf) == t.key
                    and previous.digest(t.pdf) is not None
                    and _file_digest(output / t.pdf) == previous.digest(t.pdf)]
        documents = [t for t in tasks if not t.part]  # the back parts are kept, not listed
        listed = set(digests) | {t.pdf for t in documents}
        if (all(t in reusable for t in documents) and set(previous.digests) == listed
                and all(previous.digests.get(n) == d for n, d in digests.items())):
            report.unchanged = True
            report.pdfs = len(documents)
            report.files = sorted(listed)
            if key is not None:
                _sign_unchanged_manifest(output, key)
            return report
        front_prefix = shared + repr(package_info).encode()
        kept_front = _kept_front(output, previous) if with_pdf else None
        staging = output.with_name(f".{output.name}.staging-{os.getpid()}")
        if staging.exists():
            shutil.rmtree(staging)
        staging.mkdir(parents=True)
        try:
            for name, data in files.items():
                target = staging / name
                target.parent.mkdir(parents=True, exist_ok=True)
                target.write_bytes(data)
            # The pages are read back from staging from here on; a large job's HTML is tens
            # of megabytes that would otherwise stay with this process through every PDF.
            files.clear()
            _release_memory()
            for task in reusable:
                _link_or_copy(output / task.pdf, staging / task.pdf)
            fresh = [t for t in tasks if t not in reusable]
            if not _documents(fresh, package=True):  # the back parts serve only the package
                fresh = [t for t in fresh if not t.part]
            state = _BuildState(keys={t.pdf: t.key for t in tasks})
            state.pages = {t.pdf: previous.pages[t.pdf] for t in reusable
                           if t.pdf in previous.pages}
            state.pages.update(_render_pdfs(_documents(fresh, package=False), staging, jobs,
                                            progress))
            _count_missing_pages(tasks, staging, state)
            package_pages, front = _render_package(result, fresh, staging, signatures,
                                                   package_info, state.pages, front_prefix,
                                                   kept_front, progress, jobs)
            _keep_front(front, staging, state)
            report.pdfs = len(documents)
            report.rendered = sum(1 for t in fresh if not t.part)
            report.pdf_pages = package_pages + sum(
                state.pages[t.pdf] for t in _documents(fresh, package=False) if not t.part)
            (staging / _BUILD_STATE).write_text(state.to_json(), encoding="utf-8")
            (staging / _MARKER).write_text(f"acceptance {__version__}\n", encoding="utf-8")
            report.files = _write_manifest(staging)
            _sign_manifest(staging, key)
            _exchange(staging, output)
        except BaseException:
            shutil.rmtree(staging, ignore_errors=True)
            raise
    return report


def visit_pdf_path(visit: VisitResult) -> str:
    return f"machines/{visit.machine}/{visit.id}.pdf"
