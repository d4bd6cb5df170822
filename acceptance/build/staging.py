"""Write the staging folder: every file from memory, then hard links to the PDFs reused
from the previous site. The in-memory copies are dropped once written: the pages are read
back from staging, and a large job's HTML would otherwise stay with the build process
through every PDF."""

from __future__ import annotations

import ctypes
import ctypes.util
import gc
import os
import shutil
from pathlib import Path

from .context import BuildContext

__all__ = ["open_staging", "write_staging", "discard_staging", "release_memory",
           "link_or_copy"]


def open_staging(ctx: BuildContext) -> None:
    """An empty staging folder beside the output (one left by this process id is removed)."""
    if ctx.staging.exists():
        shutil.rmtree(ctx.staging)
    ctx.staging.mkdir(parents=True)


def write_staging(ctx: BuildContext) -> None:
    """Every file of ``ctx.files`` into staging, then the reusable PDFs; ``ctx.files`` is
    emptied."""
    staging = ctx.staging
    for name, data in ctx.files.items():
        target = staging / name
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_bytes(data)
    # The pages are read back from staging from here on; a large job's HTML is tens
    # of megabytes that would otherwise stay with this process through every PDF.
    ctx.files.clear()
    release_memory()
    for task in ctx.reusable:
        link_or_copy(ctx.output / task.pdf, staging / task.pdf)


def discard_staging(ctx: BuildContext) -> None:
    """Remove the staging folder of a build that failed or was interrupted."""
    shutil.rmtree(ctx.staging, ignore_errors=True)


def release_memory() -> None:
    """Give freed memory back to the system: CPython's allocator and glibc keep it otherwise,
    and the build's peak is summed over this process and its PDF workers."""
    gc.collect()
    libc_name = ctypes.util.find_library("c")
    trim = getattr(ctypes.CDLL(libc_name), "malloc_trim", None) if libc_name else None
    if trim is not None:
        trim(0)


def link_or_copy(source: Path, target: Path) -> None:
    target.parent.mkdir(parents=True, exist_ok=True)
    try:
        os.link(source, target)
    except OSError:
        shutil.copy2(source, target)
