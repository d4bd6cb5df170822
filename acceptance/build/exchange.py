"""Put the staged site in place: check the output folder, hold the build lock, clear what a
killed build left, and exchange staging with the output in one rename where the system
allows (``renameat2(RENAME_EXCHANGE)``), so a failed or interrupted build leaves the previous
site intact."""

from __future__ import annotations

import contextlib
import ctypes
import ctypes.util
import fcntl
import os
import shutil
from collections.abc import Iterator
from pathlib import Path

from ..errors import BuildError
from .context import MARKER_NAME

__all__ = ["check_output", "build_lock", "clear_leftovers", "exchange"]


def check_output(output: Path, job_root: Path) -> None:
    """Refuse an output that would replace the job or a folder this tool did not write, and
    an output that is a symbolic link (the build would replace the link, not write where it
    points, and a link could point anywhere)."""
    if output.is_symlink():
        raise BuildError(f"{output} is a symbolic link; a site is written to a real folder. "
                         f"Give the folder it points to ({output.resolve()}) or another path")
    if output.resolve() == job_root.resolve() or job_root.resolve().is_relative_to(
            output.resolve()):
        raise BuildError(f"the output folder {output} would replace the job folder; "
                         "choose a folder outside it")
    if output.exists():
        if not output.is_dir():
            raise BuildError(f"{output} exists and is not a folder; choose another output")
        if any(output.iterdir()) and not (output / MARKER_NAME).exists():
            raise BuildError(f"{output} exists and was not written by acceptance; it is left "
                             "untouched. Choose an empty or new folder")


@contextlib.contextmanager
def build_lock(output: Path) -> Iterator[None]:
    """Hold the lock beside ``output``: one build at a time writes a site."""
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


def clear_leftovers(output: Path) -> None:
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


def exchange(staging: Path, output: Path) -> None:
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
