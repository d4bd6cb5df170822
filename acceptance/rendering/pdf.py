"""PDF records from the same HTML as the site, rendered by WeasyPrint.

WeasyPrint would otherwise fetch any URL a page names, and its protocol filter
still reads any local file. :class:`ConfinedFetcher` only serves files inside
the folders it is given (the staged site and the templates), never the network,
and refuses files above a size limit.
"""

from __future__ import annotations

import mimetypes
from pathlib import Path
from urllib.parse import unquote, urlsplit

from weasyprint import HTML
from weasyprint.urls import URLFetcher, URLFetcherResponse

__all__ = ["ConfinedFetcher", "RefusedFetch", "render_pdf", "MAX_FETCH_BYTES"]

MAX_FETCH_BYTES = 20 * 1024 * 1024


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


def render_pdf(html_path: Path, pdf_path: Path, roots: list[Path],
               attachments: list[Path] | None = None) -> int:
    """Render ``html_path`` (with its print styles) to ``pdf_path``; return the page count."""
    fetcher = ConfinedFetcher(roots)
    document = HTML(filename=str(html_path), url_fetcher=fetcher, media_type="print").render()
    document.write_pdf(str(pdf_path), uncompressed_pdf=False)
    return len(document.pages)
