"""The bad-input corpus: every broken input gives exit 2 and exactly its expected messages.

Each manifest under ``tests/bad_inputs/`` lists cases for one file kind. A case names the
files it changes in the small valid job of :func:`tests.conftest.write_job` — ``job``,
``instruments``, ``machine``, ``visit`` (a mapping is merged into the default, the string
``<drop>`` removing a key; a string is written verbatim), ``checklists`` and ``files``
(relative path → content), ``bytes`` (target → a string whose code points 0–255 are the
bytes written), ``pad`` (target → bytes of comment lines appended), ``symlinks`` (relative
path → ``outside`` or a path), ``remove`` (paths deleted), ``valid_capture`` (paths that
get a copy of ``bad_inputs/valid_capture.csv``) — and ``expect``, the
exact lines ``acceptance check`` writes on stderr. Nothing may appear on stdout: a verdict
printed for a job with input problems would be a verdict computed from a guess.
"""

from __future__ import annotations

import contextlib
import io
from pathlib import Path
from typing import Any

import pytest
import yaml

from acceptance.cli import main
from tests.conftest import DROP, write_job

CORPUS = Path(__file__).resolve().parent / "bad_inputs"
_NAMED = ("job", "instruments", "machine", "visit")
_FILES = {"job": "job.yaml", "instruments": "instruments.yaml",
          "machine": "machines/m1/machine.yaml", "visit": "machines/m1/visits/v1.yaml"}


def load_cases() -> list[dict[str, Any]]:
    cases = []
    for manifest in sorted(CORPUS.glob("*.yaml")):
        document = yaml.safe_load(manifest.read_text(encoding="utf-8"))
        for case in document["cases"]:
            case["kind"] = manifest.stem
            cases.append(case)
    return cases


def _dropped(value: Any) -> Any:
    if value == "<drop>":
        return DROP
    if isinstance(value, dict):
        return {key: _dropped(item) for key, item in value.items()}
    if isinstance(value, list):
        return [_dropped(item) for item in value]
    return value


def build_case(case: dict[str, Any], root: Path) -> Path:
    """Write the job folder of ``case`` at ``root`` (whose name the messages show)."""
    parts = {name: _dropped(case[name]) for name in _NAMED if name in case}
    if "visits" in case:
        parts["visits"] = {name: _dropped(visit) for name, visit in case["visits"].items()}
    # _dropped also rebuilds every mapping, so a manifest's own anchors never reach the
    # written files as shared objects (which the YAML writer would turn into aliases).
    write_job(root, **parts, checklists=_dropped(case.get("checklists")),
              files=_dropped(case.get("files")))
    for target in case.get("valid_capture") or ():
        (root / target).parent.mkdir(parents=True, exist_ok=True)
        (root / target).write_bytes((CORPUS / "valid_capture.csv").read_bytes())
    for target, text in (case.get("bytes") or {}).items():
        path = root / _FILES.get(target, target)
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(text.encode("latin-1"))
    for link, target in (case.get("symlinks") or {}).items():
        path = root / link
        path.parent.mkdir(parents=True, exist_ok=True)
        if target == "outside":
            outside = root.parent / "outside.txt"
            outside.write_text("not part of the job\n", encoding="utf-8")
            target = str(outside)
        path.unlink(missing_ok=True)  # a link may replace a file of the small job
        path.symlink_to(target)
    for target, size in (case.get("pad") or {}).items():
        path = root / _FILES.get(target, target)
        with path.open("ab") as handle:
            handle.write((b"#" * 99 + b"\n") * (size // 100 + 1))
    for removed in case.get("remove") or ():
        (root / removed).unlink()
    return root


def run_check(root: Path) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["check", str(root)])
    return code, out.getvalue(), err.getvalue()


CASES = load_cases()


def test_the_corpus_is_large_and_ids_are_unique():
    ids = [f"{case['kind']}/{case['id']}" for case in CASES]
    assert len(ids) == len(set(ids))
    assert len(ids) >= 150
    kinds = {case["kind"] for case in CASES}
    assert kinds >= {"job", "instruments", "machine", "visit", "checklist", "capture"}


@pytest.mark.parametrize("case", CASES, ids=[f"{c['kind']}/{c['id']}" for c in CASES])
def test_bad_input(case, tmp_path):
    root = build_case(case, tmp_path / "job")
    code, out, err = run_check(root)
    expected = [line.replace("{root}", str(root)) for line in case["expect"]]
    assert "Traceback" not in err
    assert out == ""
    assert err.splitlines() == expected
    assert code == 2
