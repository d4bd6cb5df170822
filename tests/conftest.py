"""Shared fixtures: small job folders written into ``tmp_path``.

A test names only what it varies. ``make_job(machine={"nameplate": {...}})`` merges
the given mapping into the default machine; a string is written verbatim, so a test
that asserts a line and column controls every byte of the file it is about.
"""

from __future__ import annotations

import copy
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest
import yaml

from acceptance.evaluation import evaluate_job
from acceptance.loading import load_job
from acceptance.results import CheckResult, ElementResult, ItemResult, JobResult, VisitResult

REPO = Path(__file__).resolve().parents[1]
DEMO_JOB = REPO / "demo_job"

#: Removes a key from a default mapping when given as its value.
DROP = object()

DEFAULT_JOB: dict[str, Any] = {
    "title": "Test job",
    "site": {"name": "Test site"},
    "contractor": {"name": "Test contractor"},
}

# In calibration on the default visit date, with no accuracy stated: under simple acceptance
# (ILAC-G8:09/2019, guard band 0) the verdict is the plain comparison with the limit.
_CALIBRATED = {"calibrated": "2026-01-05", "calibration_due": "2027-01-05"}

DEFAULT_INSTRUMENTS: dict[str, Any] = {
    "instruments": [
        {"id": "dmm-1", "kind": "multimeter", "response": "true-rms",
         "category": "CAT III 600 V", **_CALIBRATED},
        {"id": "clamp-avg", "kind": "clamp meter", "response": "average-responding",
         "category": "CAT III 600 V", **_CALIBRATED},
        {"id": "clamp-trms", "kind": "clamp meter", "response": "true-rms",
         "category": "CAT III 600 V", **_CALIBRATED},
        {"id": "ohm-1", "kind": "low-resistance ohmmeter", "response": "not applicable",
         **_CALIBRATED},
        {"id": "lcr-1", "kind": "LCR meter", "response": "not applicable", **_CALIBRATED},
        {"id": "thermo-1", "kind": "contact thermometer", "response": "not applicable",
         **_CALIBRATED},
    ]
}

DEFAULT_MACHINE: dict[str, Any] = {
    "name": "Test machine",
    "kind": "test rig",
    "nameplate": {"rated_voltage": "400 V", "phases": 3, "frequency": "50 Hz"},
    "checklists": ["supply"],
}

DEFAULT_VISIT: dict[str, Any] = {
    "kind": "commissioning",
    "date": "2026-03-10",
    "performed_by": ["Test person"],
    "default_instrument": "dmm-1",
    "readings": {},
}

#: Supply readings that pass the built-in supply checklist for the default 400 V 50 Hz
#: machine: IEC 60204-1 cl. 4.3.2 window 360–440 V, 49.5–50.5 Hz (reference values §3) [M].
PASSING_SUPPLY: dict[str, Any] = {
    "voltage": {"L1-L2": "401 V", "L2-L3": "399 V", "L3-L1": "400 V"},
    "frequency": "50.0 Hz",
    "voltage_under_load": {"L1-L2": "396 V", "L2-L3": "395 V", "L3-L1": "397 V"},
}


def merge(base: Any, change: Any) -> Any:
    """``change`` laid over ``base``: mappings merge key by key, anything else replaces."""
    if isinstance(base, dict) and isinstance(change, dict):
        result = dict(base)
        for key, value in change.items():
            if value is DROP:
                result.pop(key, None)
            else:
                result[key] = merge(result.get(key), value)
        return result
    return copy.deepcopy(change)


def _write(path: Path, content: Any) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    if isinstance(content, bytes):
        path.write_bytes(content)
    elif isinstance(content, str):
        path.write_text(content, encoding="utf-8")
    else:
        path.write_text(yaml.safe_dump(content, sort_keys=False, allow_unicode=True),
                        encoding="utf-8")


def write_job(root: Path, *, job: Any = None, instruments: Any = None, machine: Any = None,
              visit: Any = None, machine_id: str = "m1", visit_id: str = "v1",
              visits: dict[str, Any] | None = None, checklists: dict[str, Any] | None = None,
              files: dict[str, Any] | None = None) -> Path:
    """Write a job folder at ``root`` and return it.

    ``job``, ``instruments``, ``machine`` and ``visit`` are merged into the defaults when
    mappings and written as they are when strings or bytes. ``visits`` replaces the single
    visit by several (id → content merged into the default visit). ``checklists`` are the
    job's own checklists (file name → content); ``files`` any other file (relative path →
    content).
    """
    def content(default: dict[str, Any], given: Any) -> Any:
        if given is None:
            return default
        if isinstance(given, str | bytes):
            return given
        return merge(default, given)

    root.mkdir(parents=True, exist_ok=True)
    _write(root / "job.yaml", content(DEFAULT_JOB, job))
    _write(root / "instruments.yaml", content(DEFAULT_INSTRUMENTS, instruments))
    machine_folder = root / "machines" / machine_id
    _write(machine_folder / "machine.yaml", content(DEFAULT_MACHINE, machine))
    for name, given in (visits or {visit_id: visit}).items():
        _write(machine_folder / "visits" / f"{name}.yaml", content(DEFAULT_VISIT, given))
    for name, given in (checklists or {}).items():
        _write(root / "checklists" / name, given)
    for name, given in (files or {}).items():
        _write(root / name, given)
    return root


@pytest.fixture(autouse=True)
def _private_cache(tmp_path_factory: pytest.TempPathFactory,
                   monkeypatch: pytest.MonkeyPatch) -> None:
    """Keep check's output cache out of the user's home and apart between tests."""
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path_factory.mktemp("cache")))


@pytest.fixture
def make_job(tmp_path: Path) -> Callable[..., Path]:
    """``make_job(**parts)`` writes a job folder named ``job`` under ``tmp_path``."""
    counter = iter(range(1_000_000))

    def make(**parts: Any) -> Path:
        number = next(counter)
        return write_job(tmp_path / ("job" if number == 0 else f"job{number}"), **parts)

    return make


@dataclass
class Evaluated:
    """A job's results with lookups by checklist item key and element."""

    result: JobResult

    def visit(self, machine: str = "m1", visit: str = "v1") -> VisitResult:
        found = next(m for m in self.result.machines if m.id == machine)
        return next(v for v in found.visits if v.id == visit)

    def item(self, key: str, machine: str = "m1", visit: str = "v1") -> ItemResult:
        return next(i for i in self.visit(machine, visit).items if i.key == key)

    def element(self, key: str, element: str | None = None, machine: str = "m1",
                visit: str = "v1") -> ElementResult:
        return next(e for e in self.item(key, machine, visit).elements
                    if e.element == element)

    def check(self, key: str, element: str | None = None, check: str | None = None,
              machine: str = "m1", visit: str = "v1") -> CheckResult:
        checks = self.element(key, element, machine, visit).checks
        return checks[0] if check is None else next(c for c in checks if c.id == check)


def step_value(check: CheckResult, label_start: str) -> float:
    """The value of the step whose label starts with ``label_start``."""
    step = next(s for s in check.steps if s.label.startswith(label_start))
    assert step.value is not None
    return step.value


@pytest.fixture
def evaluate() -> Callable[[Path], Evaluated]:
    """``evaluate(root)`` loads and evaluates a job folder."""
    return lambda root: Evaluated(evaluate_job(load_job(root)))


@pytest.fixture
def step() -> Callable[[CheckResult, str], float]:
    return step_value


@pytest.fixture(scope="session")
def demo_site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo job built once per test session, PDFs included."""
    from acceptance.build import build_site

    output = tmp_path_factory.mktemp("site") / "demo_site"
    report = build_site(DEMO_JOB, output)
    visits = len(list(DEMO_JOB.glob("machines/*/visits/*.yaml")))
    assert report.pdfs == visits + 1  # one record per visit, and package.pdf
    return output
