"""PDF records from the same HTML as the site, rendered by WeasyPrint.

WeasyPrint would otherwise fetch any URL a page names, and its protocol filter
still reads any local file. :class:`ConfinedFetcher` only serves files inside
the folders it is given (the staged site and the templates), never the network,
and refuses files above a size limit.

Records are PDF/A-3b (ISO 19005-3): the one PDF/A part that keeps embedded files of any
kind, so each record carries the source files it was computed from (relationship
``Source``). WeasyPrint removes attachments without a word for PDF/A-1 and keeps only PDF
attachments for PDF/A-2, so the variant is fixed here. The file identifier and every date
are set from the record, never from the clock, so the same inputs give the same bytes.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import io
import mimetypes
import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import partial
from pathlib import Path
from typing import Any
from urllib.parse import unquote, urlsplit

import pydyf
from weasyprint import HTML, Attachment
from weasyprint.urls import URLFetcher, URLFetcherResponse

from ..text import url_path, xml_text

__all__ = ["ConfinedFetcher", "RefusedFetch", "render_pdf", "render_document", "MAX_FETCH_BYTES",
           "PDF_VARIANT", "PdfSource", "PdfInfo", "write_archival"]

MAX_FETCH_BYTES = 20 * 1024 * 1024
PDF_VARIANT = "pdf/a-3b"


@dataclass(frozen=True)
class PdfSource:
    """A source file embedded in a record (PDF/A-3 associated file, relationship Source)."""

    name: str  # as the job names it, e.g. machines/press-brake-1/machine.yaml
    data: bytes
    description: str


@dataclass(frozen=True)
class PdfInfo:
    """Document metadata that does not come from the page's own <title> and <meta>."""

    identifier: str  # stable for the same record across builds, e.g. machine/visit
    created: _dt.datetime
    modified: _dt.datetime
    keywords: Sequence[str] = ()
    title: str | None = None
    subject: str | None = None
    authors: Sequence[str] = field(default_factory=tuple)


def _metadata_as_xml_text(metadata: Any) -> None:
    """Remove from the document's metadata (written as XMP, which is XML) every character
    XML 1.0 does not allow: a control character in a title or a name would make it ill-formed."""
    for name in ("title", "description", "generator", "lang"):
        value = getattr(metadata, name, None)
        if isinstance(value, str):
            setattr(metadata, name, xml_text(value))
    for name in ("authors", "keywords"):
        values = getattr(metadata, name, None)
        if isinstance(values, list):
            setattr(metadata, name, [xml_text(v) if isinstance(v, str) else v
                                     for v in values])


def _w3c(moment: _dt.datetime) -> str:
    return moment.astimezone(_dt.UTC).strftime("%Y-%m-%dT%H:%M:%SZ")


class RefusedFetch(ValueError):
    """A page asked for something outside the site; WeasyPrint skips it and logs why."""


class ConfinedFetcher(URLFetcher):
    def __init__(self, roots: list[Path], max_bytes: int = MAX_FETCH_BYTES) -> None:
        super().__init__(allowed_protocols=("file",), allow_redirects=False)
        self.roots = [root.resolve() for root in roots]
        self.max_bytes = max_bytes
        self.refused: list[str] = []

    def fetch(self, url: str, headers: dict[str, str] | None = None) -> URLFetcherResponse:
        parts = urlsplit(url)
        if parts.scheme != "file" or parts.netloc not in ("", "localhost"):
            self.refused.append(url)
            raise RefusedFetch(f"refused to fetch {url!r}: only files inside the site are used")
        path = Path(unquote(parts.path)).resolve()
        if not any(path.is_relative_to(root) for root in self.roots):
            self.refused.append(url)
            raise RefusedFetch(f"refused to read {path}: outside the site folder")
        if not path.is_file():
            raise RefusedFetch(f"{path} not found")
        size = path.stat().st_size
        if size > self.max_bytes:
            self.refused.append(url)
            raise RefusedFetch(f"refused {path}: {size} bytes is above {self.max_bytes}")
        content_type = mimetypes.guess_type(path.name)[0] or "application/octet-stream"
        return URLFetcherResponse(path.as_uri(), path.read_bytes(),
                                  {"Content-Type": content_type})


def render_document(html_path: Path, roots: list[Path]) -> Any:  # a WeasyPrint Document
    """Lay out ``html_path`` with its print styles, reading only inside ``roots``."""
    fetcher = ConfinedFetcher(roots)
    return HTML(filename=str(html_path), url_fetcher=fetcher, media_type="print").render(
        pdf_variant=PDF_VARIANT)


def render_pdf(html_path: Path, pdf_path: Path, roots: list[Path],
               attachments: Sequence[PdfSource] | None = None,
               info: PdfInfo | None = None, links_from: Path | None = None) -> int:
    """Render ``html_path`` (with its print styles) to ``pdf_path`` as PDF/A-3b, embedding
    ``attachments``; return the page count. Links into the site are made relative to
    ``links_from`` (by default the PDF's own folder)."""
    document = render_document(html_path, roots)
    write_archival(document, pdf_path, attachments or (), info, site_root=roots[0],
                   links_from=links_from)
    return len(document.pages)


def write_archival(document: Any, pdf_path: Path, attachments: Sequence[PdfSource],
                   info: PdfInfo | None, site_root: Path | None = None,
                   links_from: Path | None = None) -> None:
    """Write a laid-out document as PDF/A-3b with deterministic identifier and dates.

    Links into ``site_root`` are made relative to ``links_from`` (the folder the PDF will be
    read from; by default its own).
    """
    identifier = None
    embedded = []
    if info is not None:
        metadata = document.metadata
        metadata.created = _w3c(info.created)
        metadata.modified = _w3c(info.modified)
        metadata.keywords = list(info.keywords)
        if info.title:
            metadata.title = info.title
        if info.subject:
            metadata.description = info.subject
        if info.authors:
            metadata.authors = list(info.authors)
        # ISO 32000-1 14.4: the first part of /ID is permanent for the document; it is
        # derived from the record's identity, the second (a digest of the content) by pydyf.
        identifier = hashlib.sha256(info.identifier.encode("utf-8")).hexdigest()[:32].encode()
        moment = info.modified.astimezone(_dt.UTC).replace(tzinfo=None)
        for source in attachments:
            embedded.append(Attachment(file_obj=io.BytesIO(source.data), name=source.name,
                                       description=source.description, created=moment,
                                       modified=moment, relationship="Source"))
    _metadata_as_xml_text(document.metadata)
    document.write_pdf(str(pdf_path), uncompressed_pdf=False, pdf_variant=PDF_VARIANT,
                       pdf_identifier=identifier, attachments=embedded or None,
                       finisher=partial(_finish, site_root=site_root,
                                        base=Path(links_from or Path(pdf_path).parent)))


def _finish(document: Any, pdf: Any, site_root: Path | None, base: Path) -> None:
    _associated_files_once(document, pdf)
    if site_root is not None:
        _relative_links(pdf, site_root, base)


def _relative_links(pdf: Any, site_root: Path, base: Path) -> None:  # a pydyf PDF
    """Links to other pages of the site become relative to the PDF, as in the HTML: the
    absolute address of the folder the site was staged in neither exists after the build
    nor is the same twice."""
    prefix = site_root.resolve().as_uri() + "/"
    base = base.resolve()
    for pdf_object in pdf.objects:
        if not isinstance(pdf_object, dict) or pdf_object.get("Type") != "/Annot":
            continue
        action = pdf_object.get("A")
        target = action.get("URI") if isinstance(action, dict) else None
        text = getattr(target, "string", None)
        if isinstance(action, dict) and isinstance(text, str) and text.startswith(prefix):
            path, _, fragment = text[len(prefix):].partition("#")
            relative = os.path.relpath(site_root.resolve() / unquote(path), base)
            # Percent-encoded again (RFC 3986 §2.1): a name with a space, '#', '?' or '%'
            # still links to its file.
            action["URI"] = pydyf.String(url_path(Path(relative).as_posix())
                                         + (f"#{fragment}" if fragment else ""))


def _associated_files_once(document: Any, pdf: Any) -> None:  # WeasyPrint, pydyf
    """Name each embedded file once in the catalog's /AF (ISO 19005-3 6.8): WeasyPrint 70
    lists each file spec twice, once from the name tree and once from the object."""
    associated = pdf.catalog.get("AF")
    if associated:
        unique = list(dict.fromkeys(associated))
        associated.clear()
        associated.extend(unique)
