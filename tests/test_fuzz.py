"""Mutated job folders: every outcome is a result or a clean InputError, never a crash.

A small but complete job (every file kind, per-element readings, a capture, an
attachment, sign-off) is mutated at random — values replaced by other types, keys
deleted or misspelt, junk inserted, files truncated, random bytes written — and
loaded. Loading may refuse it (``InputError``, each problem located in a file) or
accept it (then evaluation must finish, and ``check`` must exit 0, 1 or 2 without a
traceback). The mutations take a :class:`random.Random`, so ``benchmarks/fuzz_long.py``
runs the same generator for minutes outside CI.
"""

from __future__ import annotations

import contextlib
import io
import math
import random
import shutil
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import Any

import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from acceptance.cli import main
from acceptance.errors import InputError
from acceptance.evaluation import evaluate_job
from acceptance.loading import load_job
from acceptance.results import to_json
from tests.conftest import DEFAULT_INSTRUMENTS, DEFAULT_JOB

CAPTURE = Path(__file__).resolve().parent / "bad_inputs" / "valid_capture.csv"

MACHINE: dict[str, Any] = {
    "name": "Fuzz rig",
    "kind": "test rig",
    "nameplate": {
        "rated_voltage": "400 V", "phases": 3, "frequency": "50 Hz", "rated_current": "10 A",
        "duty_cycle": "60 %",
        "windings": [{"id": "main", "name": "Main winding", "material": "copper",
                      "thermal_class": "F", "resistance": "1.2 Ω",
                      "resistance_tolerance": "5 %", "resistance_temperature": "20 °C"}],
        "capacitors": [{"id": "run", "name": "Run capacitor", "nominal": "20 µF",
                        "tolerance": "J", "rated_voltage": "450 V"}],
        "protective_device": {"description": "MCB type C", "rating": "16 A"},
        "supply_cable": {"material": "copper", "cross_section": "2.5 mm²", "length": "14 m",
                         "cores": 4},
    },
    "survey_points": [{"id": "heat-sink", "name": "Heat sink", "rise_limit": "50 K"}],
    "checklists": ["lockout", "supply", "windings", "capacitors", "current",
                   "temperature_rise"],
}

VISIT: dict[str, Any] = {
    "kind": "commissioning",
    "date": "2026-03-10",
    "performed_by": ["Test person"],
    "default_instrument": "dmm-1",
    "conditions": {"ambient": "20 °C"},
    "readings": {
        "lockout": {"energy_sources": "yes", "tester_proven_before": "yes",
                    "absence_of_voltage": {"L1-L2": "0.2 V", "L1-PE": "0.1 V"}},
        "supply": {"voltage": {"L1-L2": "401 V", "L2-L3": "399 V", "L3-L1": "400 V"},
                   "frequency": "50.0 Hz"},
        "windings": {"resistance": {"main": {"value": "1.22 Ω", "instrument": "ohm-1",
                                             "temperature": "21 °C"}}},
        "capacitors": {"capacitance": {"run": {"value": "19.8 µF", "instrument": "lcr-1"}}},
        "current": {"load_current": {
            "L1": {"value": "9.8 A", "instrument": "clamp-trms", "note": "clamp on L1",
                   "capture": {"file": "captures/c.csv",
                               "channels": {"CH1": "x100", "CH2": "10 mV/A"},
                               "voltage": "CH1", "current": "CH2"}},
            "L2": "9.9 A RMS"}},
    },
    "notes": "Checked with the *panel* open. [Site rules](https://example.invalid/rules)",
    "attachments": [{"path": "captures/c.csv", "title": "Line capture"}],
    "sign_off": [{"name": "Test person", "role": "installer", "date": "2026-03-10"}],
}


def _dump(data: Any) -> bytes:
    return yaml.safe_dump(data, sort_keys=False, allow_unicode=True).encode("utf-8")


def base_files() -> dict[str, bytes]:
    """The valid job, relative path → bytes."""
    return {
        "job.yaml": _dump(DEFAULT_JOB),
        "instruments.yaml": _dump(DEFAULT_INSTRUMENTS),
        "machines/m1/machine.yaml": _dump(MACHINE),
        "machines/m1/visits/v1.yaml": _dump(VISIT),
        "machines/m1/captures/c.csv": CAPTURE.read_bytes(),
    }


# ------------------------------------------------------------------ mutations

_JUNK_VALUES: tuple[Any, ...] = (
    None, "", " ", 0, -1, 3.5, 1e308, 2**70, True, False, [], {}, ["x"], {"a": 1},
    {"value": None}, "nan", ".inf", "NaN V", "1e999 V", "-1e999 Ω", "1,5 V", "1,000 V", "yes",
    "no", "n/a", "maybe", "2026-02-30", "10/03/2026", "-300 °C", "20 K", "20 °C", "400 V",
    "10 A", "50 Hz", "5 %", "x" * 5000, "<script>alert(1)</script>", "../../etc/passwd",
    "/etc/passwd", "captures/c.csv", "\u202e\u0000\ufeff", "µF", "CAT III 600 V", "J",
    "L1-L2", "dmm-1", "{a: b}", "- x", "*alias", "&anchor x", "!!python/object x",
)

_JUNK_TEXT: tuple[str, ...] = (
    ":", ": ", "- ", "{", "}", "[", "]", ",", "&a ", "*a", "!!str ", "!tag ", "\t", "\ufeff",
    "'", '"', "#", "---\n", "...\n", "? ", "|", ">", "%YAML 1.1\n", "<<: ", "\n  ", "\x00",
    "nan", "1e999", "~", "\r", "\u2028",
)


def _paths(node: Any, prefix: tuple[Any, ...] = ()) -> list[tuple[Any, ...]]:
    found = [prefix] if prefix else []
    if isinstance(node, dict):
        for key, value in node.items():
            found += _paths(value, (*prefix, key))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            found += _paths(value, (*prefix, index))
    return found


def _parent(data: Any, path: tuple[Any, ...]) -> Any:
    for part in path[:-1]:
        data = data[part]
    return data


def _near_miss(rng: random.Random, word: str) -> str:
    if not word:
        return "x"
    position = rng.randrange(len(word))
    choice = rng.randrange(3)
    if choice == 0:
        return word[:position] + word[position + 1:]
    if choice == 1:
        return word[:position] + word[position] * 2 + word[position + 1:]
    return word.upper()


def _structural(rng: random.Random, content: bytes) -> bytes:
    data = yaml.safe_load(content.decode("utf-8"))
    paths = _paths(data)
    if not paths:
        return content
    path = rng.choice(paths)
    parent = _parent(data, path)
    key = path[-1]
    operation = rng.randrange(5)
    if operation == 0:  # replace by another value, often of another type
        parent[key] = rng.choice(_JUNK_VALUES)
    elif operation == 1:  # delete the key or entry
        del parent[key]
    elif operation == 2 and isinstance(parent, dict):  # misspelt or junk key beside it
        parent[_near_miss(rng, str(key)) if rng.random() < 0.7 else "junk"] = parent[key]
        if rng.random() < 0.5:
            del parent[key]
    elif operation == 3:  # wrap or flatten the value
        value = parent[key]
        parent[key] = rng.choice([[value], {"value": value}, str(value), {str(value): value}])
    else:  # duplicate an entry of a list
        if isinstance(parent, list):
            parent.insert(key, parent[key])
        else:
            parent[key] = rng.choice(_JUNK_VALUES)
    return _dump(data)


def _textual(rng: random.Random, content: bytes) -> bytes:
    operation = rng.randrange(6)
    position = rng.randrange(len(content) + 1)
    if operation == 0:
        return content[:position]
    if operation == 1:
        return content[:position] + rng.randbytes(rng.randint(1, 8)) + content[position:]
    if operation == 2:
        token = rng.choice(_JUNK_TEXT).encode("utf-8")
        return content[:position] + token + content[position:]
    lines = content.split(b"\n")
    index = rng.randrange(len(lines))
    if operation == 3:
        del lines[index]
    elif operation == 4:
        lines.insert(index, lines[index])
    else:
        lines[index] = b" " * rng.randint(1, 4) + lines[index]
    return b"\n".join(lines)


def mutate(rng: random.Random, files: dict[str, bytes]) -> dict[str, bytes]:
    """One to three mutations of ``files`` (a new mapping; ``files`` is left as it is)."""
    result = dict(files)
    for _ in range(rng.randint(1, 3)):
        name = rng.choice(sorted(result))
        content = result[name]
        kind = rng.random()
        if name.endswith(".yaml") and kind < 0.55:
            try:
                result[name] = _structural(rng, content)
            except (yaml.YAMLError, UnicodeDecodeError, TypeError, KeyError, IndexError):
                result[name] = _textual(rng, content)  # already not YAML we can read
        elif kind < 0.92:
            result[name] = _textual(rng, content)
        elif kind < 0.97:
            result[name] = rng.randbytes(rng.randint(0, 64))
        else:
            del result[name]
    return result


def write_files(root: Path, files: dict[str, bytes]) -> Path:
    for name, content in files.items():
        path = root / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(content)
    return root


# ------------------------------------------------------------------ outcomes


def outcome(root: Path) -> str:
    """'valid' or 'refused'; any other exception escapes (and is a crash)."""
    try:
        job = load_job(root)
    except InputError as error:
        assert error.problems
        for problem in error.problems:
            assert problem.file and problem.line >= 1 and problem.column >= 1, problem
            assert problem.message and "Traceback" not in problem.message
        return "refused"
    result = evaluate_job(job)
    for visit in result.visits:
        for item in visit.items:
            for element in item.elements:
                if isinstance(element.value, float):
                    assert math.isfinite(element.value), (item.key, element)
    to_json(result)
    return "valid"


def check_through_cli(root: Path) -> int:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["check", str(root)])
    assert code in (0, 1, 2), code
    assert "Traceback" not in err.getvalue()
    if code == 2:
        assert out.getvalue() == ""
        assert err.getvalue().strip()
    return code


def in_job(files: dict[str, bytes], action: Callable[[Path], Any]) -> Any:
    folder = Path(tempfile.mkdtemp(prefix="fuzz-"))
    try:
        return action(write_files(folder / "job", files))
    finally:
        shutil.rmtree(folder, ignore_errors=True)


BASE = base_files()
# Kept short for CI (a few seconds each); benchmarks/fuzz_long.py runs the same mutations
# for as long as it is given.
FUZZ = settings(max_examples=60, deadline=None, derandomize=True,
                suppress_health_check=[HealthCheck.too_slow])


def test_the_unmutated_job_is_valid():
    assert in_job(BASE, outcome) == "valid"
    assert in_job(BASE, check_through_cli) in (0, 1)


@FUZZ
@given(st.randoms(use_true_random=False))
def test_mutated_job_loads_or_is_refused_cleanly(rng):
    in_job(mutate(rng, BASE), outcome)


@FUZZ
@given(st.randoms(use_true_random=False))
def test_mutated_job_through_check_never_shows_a_traceback(rng):
    in_job(mutate(rng, BASE), check_through_cli)
