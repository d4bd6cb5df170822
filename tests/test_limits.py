"""The documented bounds (README, "Limits"): each refused with the message a user sees.

The limits are lowered here so that a test reaches them with a few small files; the
messages name the number found, the limit and what to do.
"""

from __future__ import annotations

import pytest

from acceptance import captures, loading
from acceptance.errors import InputError
from acceptance.loading import load_job
from acceptance.yamlfile import MAX_DEPTH, MAX_FILE_BYTES, load_yaml
from tests.conftest import DEFAULT_MACHINE

CAPTURE = {"file": "captures/c.csv", "channels": {"CH1": "x100"}}


def problems_of(root) -> list[str]:
    with pytest.raises(InputError) as caught:
        load_job(root)
    return [str(p) for p in caught.value.problems]


def test_documented_values():
    # The figures the README's Limits section gives.
    assert MAX_FILE_BYTES == 2 * 1024 * 1024
    assert MAX_DEPTH == 40
    assert loading.MAX_MACHINES == 2000
    assert loading.MAX_VISITS_PER_MACHINE == 200
    assert captures.MAX_CAPTURE_BYTES == 200 * 1024 * 1024
    assert captures.MAX_CAPTURE_ROWS == 5_000_000


def test_too_many_machines(make_job, monkeypatch):
    monkeypatch.setattr(loading.job, "MAX_MACHINES", 2)
    root = make_job(files={f"machines/m{n}/machine.yaml": DEFAULT_MACHINE for n in (2, 3)})
    assert problems_of(root) == [
        "job/machines:1:1: 3 machines; the limit is 2: split the site into several job "
        "folders"]


def test_too_many_visits(make_job, monkeypatch):
    monkeypatch.setattr(loading.job, "MAX_VISITS_PER_MACHINE", 2)
    root = make_job(visits={"v1": {}, "v2": {}, "v3": {}})
    assert problems_of(root) == [
        "job/machines/m1/visits:1:1: 3 visits; the limit is 2 per machine: split the record, "
        "or move old visits out of the job"]


def _capture_job(make_job, rows: int):
    body = "".join(f"{n * 1e-4:.4f},{(n % 7) / 7:.3f}\n" for n in range(rows))
    return make_job(machine={"checklists": ["supply", "current"]},
                    visit={"readings": {"current": {"load_current": {
                        "L1": {"value": "1 A", "capture": CAPTURE}}}}},
                    files={"machines/m1/captures/c.csv": "time_s,CH1\n" + body})


def test_capture_above_the_byte_limit(make_job, monkeypatch):
    monkeypatch.setattr(captures.reading, "MAX_CAPTURE_BYTES", 100)
    root = _capture_job(make_job, 20)
    size = (root / "machines/m1/captures/c.csv").stat().st_size
    assert problems_of(root) == [
        f"job/machines/m1/captures/c.csv:1:1: the capture is {size} bytes; the limit is 100 "
        "bytes: export a shorter span or a lower sample rate"]


def test_capture_above_the_row_limit(make_job, monkeypatch):
    monkeypatch.setattr(captures.reading, "MAX_CAPTURE_ROWS", 10)
    assert problems_of(_capture_job(make_job, 11)) == [
        "job/machines/m1/captures/c.csv:1:1: the capture has 11 data rows; the limit is 10: "
        "export a shorter span or a lower sample rate"]


def test_yaml_file_above_the_byte_limit(tmp_path):
    path = tmp_path / "visit.yaml"
    path.write_text("notes: " + "x" * 100 + "\n", encoding="utf-8")
    with pytest.raises(InputError) as caught:
        load_yaml(path, display_name="visit.yaml", max_bytes=64)
    assert str(caught.value) == (
        "visit.yaml:1:1: file is 108 bytes; the limit is 64 bytes for a YAML file: split it "
        "(one file per visit) and keep bulk data in captures")


def test_nesting_at_the_limit_loads_and_one_deeper_is_refused(tmp_path):
    # Levels are counted below the file's top mapping: 'a: [[…]]' with 40 brackets is 40.
    path = tmp_path / "deep.yaml"
    path.write_text("a: " + "[" * MAX_DEPTH + "]" * MAX_DEPTH + "\n", encoding="utf-8")
    load_yaml(path)
    path.write_text("a: " + "[" * (MAX_DEPTH + 1) + "]" * (MAX_DEPTH + 1) + "\n",
                    encoding="utf-8")
    with pytest.raises(InputError, match=f"nesting deeper than {MAX_DEPTH} levels"):
        load_yaml(path)
