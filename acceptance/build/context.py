"""What one build knows, passed from stage to stage, and the records the stages share.

:class:`BuildContext` is made once the job has loaded and evaluated; each stage reads what
the stages before it left there and adds its own part (the pages, the files in memory, the
PDF tasks and what is stale, the new build state, the report).
"""

from __future__ import annotations

import json
import os
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

from .. import __version__
from ..integrity import SignatureStatus
from ..loading import Job
from ..results import JobResult
from ..sitefiles import BUILD_STATE_NAME, MANIFEST_NAME, MARKER_NAME

if TYPE_CHECKING:  # the PDF stack loads only when a build renders PDFs
    from ..rendering.package import KeptPart
    from ..rendering.pdf import PdfInfo, PdfSource

__all__ = ["MANIFEST_NAME", "MARKER_NAME", "BUILD_STATE_NAME", "Progress", "SitePage",
           "PdfTask", "BuildState", "BuildReport", "BuildContext"]

#: Called with a short line on each PDF as it is rendered.
Progress = Callable[[str], None]


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


@dataclass(frozen=True)
class PdfTask:
    """One PDF to render from one staged HTML page, and the key that says when it is stale."""

    html: str  # site-relative path of the page
    pdf: str  # site-relative path of the PDF
    key: str  # digest of everything the PDF is made from
    sources: tuple[Path, ...] = ()  # input files the PDF depends on (e.g. embedded ones)
    attachments: tuple[PdfSource, ...] = ()  # files embedded (PDF/A-3)
    info: PdfInfo | None = None  # identifier, dates, keywords
    part: bool = False  # a part of package.pdf: its links are relative to the site root


@dataclass
class BuildState:
    """What a build records about its site for the next one (:data:`BUILD_STATE_NAME`)."""

    digests: dict[str, str] = field(default_factory=dict)  # file → sha256, from the manifest
    keys: dict[str, str] = field(default_factory=dict)  # pdf → key of what it was made from
    pages: dict[str, int] = field(default_factory=dict)  # pdf → page count
    kept: dict[str, str] = field(default_factory=dict)  # kept part → sha256 (not listed)
    # file → [size, mtime in ns, sha256] as written: a file whose size and mtime are
    # unchanged is taken to be unchanged; any other is digested and compared
    stats: dict[str, list[int | str]] = field(default_factory=dict)

    def digest(self, name: str) -> str | None:
        return self.digests.get(name) or self.kept.get(name)

    def to_json(self) -> str:
        return json.dumps({"tool_version": __version__, "pdfs": self.keys, "pages": self.pages,
                           "kept": self.kept, "files": self.stats}, indent=1,
                          sort_keys=True) + "\n"


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
    # signed visits whose inputs changed since sign-off (or whose record does not hold):
    # "machine/visit: state: reasons"
    altered: list[str] = field(default_factory=list)


@dataclass
class BuildContext:
    """One build: its options and inputs, then what each stage found or made."""

    job_root: Path
    output: Path
    job: Job
    result: JobResult
    with_pdf: bool = True
    jobs: int = 1  # PDF worker processes
    key: Path | None = None  # Ed25519 private key that signs the manifest
    strict: bool = False  # refuse to write a site showing a visit altered after sign-off
    progress: Progress | None = None
    report: BuildReport = field(init=False)
    # plan
    pages: list[SitePage] = field(default_factory=list)
    # render pages
    signatures: dict[str, SignatureStatus] = field(default_factory=dict)  # machine/visit →
    files: dict[str, bytes] = field(default_factory=dict)  # every file but the PDFs
    # decide what is stale
    shared: bytes = b""  # what every PDF is made from besides its page
    package_info: PdfInfo | None = None  # package.pdf's metadata
    tasks: list[PdfTask] = field(default_factory=list)  # every PDF of the site
    previous: BuildState = field(default_factory=BuildState)  # of the site at ``output``
    reusable: list[PdfTask] = field(default_factory=list)  # PDFs taken from that site
    fresh: list[PdfTask] = field(default_factory=list)  # PDFs to render
    state: BuildState = field(default_factory=BuildState)  # for the next build
    kept_front: KeptPart | None = None  # package.pdf's cover and contents, if reusable

    def __post_init__(self) -> None:
        self.report = BuildReport(output=self.output, result=self.result)

    @property
    def staging(self) -> Path:
        """The folder beside ``output`` this build writes into before the exchange."""
        return self.output.with_name(f".{self.output.name}.staging-{os.getpid()}")

    @property
    def front_prefix(self) -> bytes:
        """What the package's cover and contents are made from besides their page."""
        return self.shared + repr(self.package_info).encode()
