"""Write the site's manifest (``MANIFEST.sha256``: every file with its SHA-256) and, with a
key, its signature."""

from __future__ import annotations

import os
from pathlib import Path

from ..integrity import (
    MANIFEST_SIGNATURE_NAME,
    load_private_key,
    manifest_signature,
    sign_manifest,
)
from ..sitefiles import file_sha256, site_files
from .context import MANIFEST_NAME, BuildContext

__all__ = ["MANIFEST_NAME", "write_manifest", "sign_unchanged_manifest"]


def write_manifest(ctx: BuildContext) -> None:
    """List every file of the staged site with its SHA-256, but the build's own bookkeeping
    (:data:`~acceptance.sitefiles.BOOKKEEPING_NAMES`); sign the list with ``ctx.key`` when
    given. The manifest is written by the build itself here, so it may be signed."""
    staging = ctx.staging
    files = site_files(staging)
    lines = []
    for name in files:
        lines.append(f"{file_sha256(staging / name)}  {name}")
    (staging / MANIFEST_NAME).write_text("\n".join(lines) + "\n", encoding="utf-8")
    ctx.report.files = files
    if ctx.key is not None:
        sign_manifest(staging / MANIFEST_NAME, load_private_key(ctx.key))


def sign_unchanged_manifest(output: Path, key: Path) -> None:
    """Sign the manifest of a site that needs no rebuild, as a build with ``--key`` promises.

    The signature file is not listed in the manifest, so it may change alone; it is written
    only when its text differs (another key, or none yet), so a signed site rebuilt with the
    same key still writes nothing.
    """
    text = manifest_signature((output / MANIFEST_NAME).read_bytes(), load_private_key(key))
    target = output / MANIFEST_SIGNATURE_NAME
    if target.is_file() and target.read_text(encoding="utf-8") == text:
        return
    temporary = target.with_name(f".{target.name}.{os.getpid()}")
    temporary.write_text(text, encoding="utf-8")
    os.replace(temporary, target)
