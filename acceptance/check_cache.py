"""What ``check`` printed for each machine last time, reused while its inputs are unchanged.

Every check of a machine reads the job-level files (job file, register, checklists) and
its own folder, nothing else (:func:`acceptance.loading.load_job`). Evaluation is
deterministic, so a machine whose folder and job-level files are byte for byte the same
prints the same section. The cache keeps, in one file per output variant, the job-level
head and each machine's printed section under a digest of

- the job level: the tool version, the code, the built-in checklists and every file of
  the job folder outside ``machines/``;
- each machine: every file inside its folder.

A change to the job level misses every machine; an edited visit misses its machine only,
which ``check`` then loads and evaluates alone. The cache holds text and JSON only (no
pickles), lives in the user's cache folder (never in the job folder, which may be a shared
stick), and is written only after a clean evaluation, so a machine with input problems is
always loaded and reported again.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import os
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from . import __version__
from .resources import checklists_dir

__all__ = ["CheckCache", "Fingerprint", "fingerprint", "open_cache"]

FORMAT = 3
# loading.loaded.MACHINES_DIR, not imported from there: that would load the model.
MACHINES_DIR = "machines"


@dataclass(frozen=True)
class Fingerprint:
    """Digests of the job level and of each machine folder (by folder name)."""

    job: str
    machines: dict[str, str]


def _cache_file(job: Path, variant: str) -> Path:
    # One file per variant: the --json sections are large, and reading them must not slow
    # the summary an installer reruns after every edit.
    base = Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache")
    name = hashlib.sha256(str(job.resolve()).encode()).hexdigest()[:32]
    return base / "acceptance" / f"check-{name}-{variant}.json"


def _digest_tree(digest: Any, root: str, skip: str | None = None,
                 keep: Callable[[str], bool] | None = None) -> None:
    """Feed every file under ``root`` (relative names and contents, in a stable order) to
    ``digest``. ``skip`` names a top-level folder to leave out; hidden top-level folders
    (.git, a staging site) are left out with it, since nothing reads them."""
    for dirpath, dirnames, filenames in os.walk(root):
        if skip is not None and dirpath == root:
            dirnames[:] = [d for d in dirnames if d != skip and not d.startswith(".")]
        dirnames.sort()
        relative = os.path.relpath(dirpath, root)
        for filename in sorted(filenames):
            if keep is not None and not keep(filename):
                continue
            path = os.path.join(dirpath, filename)
            with open(path, "rb") as handle:
                content = handle.read()
            digest.update(os.path.join(relative, filename).encode("utf-8", "surrogateescape")
                          + b"\0" + hashlib.sha256(content).digest())


def fingerprint(job: Path) -> Fingerprint | None:
    """Digest the job's inputs; None when a file cannot be read (let ``check`` report it)."""
    job = Path(job)
    digest = hashlib.sha256(f"acceptance {__version__}\n".encode())
    # A deficiency becomes overdue as the days pass: the date it is judged against is an
    # input (evaluation.punch_list.build_date, repeated here to keep pydantic out).
    epoch = os.environ.get("SOURCE_DATE_EPOCH", "")
    today = (_dt.datetime.fromtimestamp(int(epoch), _dt.UTC) if epoch.isdigit()
             else _dt.datetime.now(_dt.UTC)).date()
    digest.update(f"as of {today.isoformat()}\n".encode())
    package = Path(__file__).resolve().parent
    try:
        # The code is an input too: an edited checkout must not print a stale result.
        _digest_tree(digest, str(package), keep=lambda name: name.endswith(".py"))
        digest.update(b"\1checklists\0")
        _digest_tree(digest, str(checklists_dir()))
        digest.update(b"\1job\0")
        _digest_tree(digest, str(job), skip=MACHINES_DIR)
        machines: dict[str, str] = {}
        machines_root = job / MACHINES_DIR
        if machines_root.is_dir():
            # The folders load_job reads: every directory in machines/, by name.
            folders = sorted(entry.name for entry in os.scandir(machines_root)
                             if entry.is_dir())
            for name in folders:
                machine_digest = hashlib.sha256()
                _digest_tree(machine_digest, os.path.join(machines_root, name))
                machines[name] = machine_digest.hexdigest()
    except OSError:
        return None
    return Fingerprint(job=digest.hexdigest(), machines=machines)


@dataclass
class CheckCache:
    """One output variant's cached head and machine sections for one job folder.

    ``reusable`` holds the sections whose machine is unchanged; ``stale`` names the
    machines to load and evaluate again.
    """

    job: Path
    variant: str
    current: Fingerprint
    head: Any = None
    reusable: dict[str, dict[str, Any]] = field(default_factory=dict)

    @property
    def stale(self) -> list[str]:
        return [m for m in self.current.machines if m not in self.reusable]

    @property
    def complete(self) -> bool:
        return self.head is not None and not self.stale

    def sections(self, fresh: dict[str, dict[str, Any]]) -> list[dict[str, Any]]:
        """Every machine's section in folder order: the fresh ones and the reused ones."""
        merged = {**self.reusable, **fresh}
        return [merged[m] for m in sorted(merged)]

    def store(self, head: Any, fresh: dict[str, dict[str, Any]]) -> None:
        """Keep the head and the fresh sections beside the reused ones."""
        keys = self.current.machines
        sections = {m: s for m, s in {**self.reusable, **fresh}.items() if m in keys}
        for machine, section in sections.items():
            section["key"] = keys[machine]
        data = {"format": FORMAT, "job": self.current.job, "head": head, "machines": sections}
        target = _cache_file(self.job, self.variant)
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
            temporary = target.with_name(f".{target.name}.{os.getpid()}")
            temporary.write_text(json.dumps(data, ensure_ascii=False), encoding="utf-8")
            os.replace(temporary, target)
        except OSError:
            pass  # a read-only home is no reason to fail a check


def _read(target: Path) -> dict[str, Any]:
    try:
        data = json.loads(target.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    if not isinstance(data, dict) or data.get("format") != FORMAT:
        return {}
    return data


def open_cache(job: Path, variant: str) -> CheckCache | None:
    """The cache of ``variant`` for ``job`` as far as it still holds; None if the job's files
    cannot be read."""
    current = fingerprint(job)
    if current is None:
        return None
    cache = CheckCache(job=job, variant=variant, current=current)
    data = _read(_cache_file(job, variant))
    if data.get("job") != current.job:
        return cache
    cache.head = data.get("head")
    cache.reusable = {machine: section for machine, section in
                      (data.get("machines") or {}).items()
                      if current.machines.get(machine) == section.get("key")}
    return cache
