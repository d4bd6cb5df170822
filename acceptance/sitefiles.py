"""What a built site holds: its files, its manifest, and the build's own bookkeeping.

The one list of names that are not part of the site (:data:`BOOKKEEPING_NAMES`) lives here,
with the one function that lists a site's files (:func:`site_files`) and the one reader of
``MANIFEST.sha256`` (:func:`read_manifest`). The build writes the manifest with them,
``verify`` checks a site with them and a rebuild checks the site it would replace with them,
so the three never disagree on what a site is.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from pathlib import Path

__all__ = ["MANIFEST_NAME", "MANIFEST_SIGNATURE_NAME", "MARKER_NAME", "BUILD_STATE_NAME",
           "PARTS_FOLDER", "BOOKKEEPING_NAMES", "Manifest", "site_files", "read_manifest",
           "file_sha256", "read_text_file"]

MANIFEST_NAME = "MANIFEST.sha256"
MANIFEST_SIGNATURE_NAME = "MANIFEST.sha256.sig"
#: Says that a folder was written by this tool, so a later build may replace it.
MARKER_NAME = ".acceptance-site"
#: What a build records about its site for the next one.
BUILD_STATE_NAME = ".acceptance-build.json"
#: The package's kept parts, so the next build lays out only those whose page changed.
PARTS_FOLDER = ".acceptance-package"

#: The build's own bookkeeping: these exact names at the site's top level, and nothing else,
#: stay out of the manifest. A file of the same name deeper in the site is a site file.
BOOKKEEPING_NAMES = frozenset({MANIFEST_NAME, MANIFEST_SIGNATURE_NAME, MARKER_NAME,
                               BUILD_STATE_NAME, PARTS_FOLDER})


def site_files(root: Path) -> list[str]:
    """Every file of the site at ``root`` but the bookkeeping, '/'-separated, sorted.

    A symbolic link counts as a file of the site (whatever it points to), so one planted in
    a site is reported, never followed out of it.
    """
    root = Path(root)
    names = []
    for path in root.rglob("*"):
        relative = path.relative_to(root)
        if relative.parts[0] in BOOKKEEPING_NAMES:
            continue
        if path.is_symlink() or path.is_file():
            names.append(relative.as_posix())
    return sorted(names)


def read_text_file(path: Path, what: str) -> str:
    """The UTF-8 text of ``path``; a ``ValueError`` naming the file and what to do if it is
    not UTF-8 text."""
    data = Path(path).read_bytes()
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise ValueError(f"{path}: the {what} is not UTF-8 text (byte {error.start}); it was "
                         "damaged or replaced. Build the site again to rewrite it") from None


@dataclass
class Manifest:
    """The lines of a ``MANIFEST.sha256``: file → SHA-256, and the lines that are not
    ``sha256sum`` lines (by number)."""

    digests: dict[str, str] = field(default_factory=dict)
    bad_lines: list[int] = field(default_factory=list)


def read_manifest(path: Path) -> Manifest:
    """Read a ``MANIFEST.sha256``; ``ValueError`` if it is not UTF-8 text."""
    manifest = Manifest()
    for number, line in enumerate(read_text_file(path, "manifest").splitlines(), 1):
        digest, separator, name = line.partition("  ")
        if (not separator or len(digest) != 64 or not name
                or any(c not in "0123456789abcdef" for c in digest)):
            manifest.bad_lines.append(number)
            continue
        manifest.digests[name] = digest
    return manifest


def file_sha256(path: Path) -> str | None:
    """The SHA-256 of a file, read in blocks; None when it cannot be read as a file."""
    try:
        if Path(path).is_symlink():
            return None
        with open(path, "rb") as handle:
            return hashlib.file_digest(handle, "sha256").hexdigest()
    except OSError:
        return None
