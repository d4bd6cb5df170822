"""The demo's ``results.json`` against a golden copy, byte for byte.

The golden copy was written by ``acceptance build demo_job`` before the results model was
reshaped; a change to the model may add fields (the commit that adds them says which) but
must not move, rename or reformat what is there. When the demo data changes, regenerate it
with ``python -m tests.test_results_golden``.
"""

from __future__ import annotations

import io
import json
from pathlib import Path

from acceptance import __version__
from acceptance.evaluation import evaluate_job
from acceptance.loading import load_job
from acceptance.results import to_json

from .conftest import DEMO_JOB

GOLDEN = Path(__file__).with_name("golden") / "demo_results.json"


def demo_results_json() -> bytes:
    """``results.json`` of the demo job, serialised as ``acceptance build`` writes it."""
    text = io.StringIO(newline="\n")
    json.dump(to_json(evaluate_job(load_job(DEMO_JOB))), text, ensure_ascii=False, indent=2)
    text.write("\n")
    return text.getvalue().encode()


def _without_version(data: bytes, version: str) -> bytes:
    # The tool's version is the one field that changes with a release, not with the model.
    line = f'"tool_version": "{version}"'.encode()
    assert data.count(line) == 1
    return data.replace(line, b'"tool_version": "<version>"')


def test_demo_results_json_is_byte_identical_to_the_golden_copy():
    golden = GOLDEN.read_bytes()
    golden_version = json.loads(golden)["tool_version"]
    assert _without_version(demo_results_json(), __version__) == \
        _without_version(golden, golden_version)


if __name__ == "__main__":
    GOLDEN.write_bytes(demo_results_json())
