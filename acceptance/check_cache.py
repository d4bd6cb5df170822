"""What ``check`` printed last time, reused while no input has changed.

Evaluation is deterministic, so the same inputs give the same output: the cache
keys the printed text on a digest of every file of the job folder, the built-in
checklists and the tool version. It holds text only (no pickles), lives in the
user's cache folder (never in the job folder, which may be a shared stick), and
any change to any input makes it miss.
"""

from __future__ import annotations

import hashlib
import json
import os
from pathlib import Path

from . import __version__
from .resources import checklists_dir

__all__ = ["fingerprint", "load", "store"]


def _cache_file(job: Path) -> Path:
    base = Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache")
    name = hashlib.sha256(str(job.resolve()).encode()).hexdigest()[:32]
    return base / "acceptance" / f"check-{name}.json"


def fingerprint(job: Path) -> str | None:
    """Digest of every input; None when the folder cannot be read (let check report it)."""
    digest = hashlib.sha256(f"acceptance {__version__}\n".encode())
    package = Path(__file__).resolve().parent
    try:
        # The code is an input too: an edited checkout must not print a stale result.
        for root in (Path(job), checklists_dir(), package):
            for dirpath, dirnames, filenames in os.walk(root):
                dirnames[:] = sorted(d for d in dirnames if not d.startswith("."))
                for filename in sorted(filenames):
                    if filename.startswith(".") or (root == package
                                                    and not filename.endswith(".py")):
                        continue
                    path = Path(dirpath) / filename
                    digest.update(str(path.relative_to(root)).encode() + b"\0")
                    digest.update(hashlib.sha256(path.read_bytes()).digest())
    except OSError:
        return None
    return digest.hexdigest()


def load(job: Path, key: str, variant: str) -> tuple[int, str] | None:
    try:
        data = json.loads(_cache_file(job).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    if data.get("key") != key or variant not in data.get("outputs", {}):
        return None
    exit_code, text = data["outputs"][variant]
    return int(exit_code), str(text)


def store(job: Path, key: str, variant: str, exit_code: int, text: str) -> None:
    target = _cache_file(job)
    try:
        data = json.loads(target.read_text(encoding="utf-8"))
        if data.get("key") != key:
            data = {}
    except (OSError, ValueError):
        data = {}
    data = {"key": key, "outputs": {**data.get("outputs", {}), variant: [exit_code, text]}}
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        temporary = target.with_name(f".{target.name}.{os.getpid()}")
        temporary.write_text(json.dumps(data, ensure_ascii=False), encoding="utf-8")
        os.replace(temporary, target)
    except OSError:
        pass  # a read-only home is no reason to fail a check
