"""Robust input: every file read stays inside the job, impossible values and hostile
characters are refused with their place, and no step's cost outgrows its input.

The exact messages of each refusal are cases of the bad-input corpus
(``tests/bad_inputs/``); these tests hold what a corpus case cannot say.
"""

from __future__ import annotations

import ast
import shutil
from pathlib import Path

import pytest

from acceptance.errors import InputError
from acceptance.loading import load_job

PACKAGE = Path(__file__).resolve().parent.parent / "acceptance"


def _messages(root: Path) -> list[str]:
    with pytest.raises(InputError) as caught:
        load_job(root)
    return [f"{p.file}: {p.message}" for p in caught.value.problems]


# ------------------------------------------------------------------ confinement


def test_links_that_stay_inside_the_job_are_followed(make_job):
    root = make_job()
    visits = root / "machines" / "m1" / "visits"
    kept = root / "drafts"
    kept.mkdir()
    shutil.move(visits / "v1.yaml", kept / "v1.yaml")
    (visits / "v1.yaml").symlink_to(kept / "v1.yaml")
    shutil.move(root / "machines" / "m1", root / "m1-folder")
    (root / "machines" / "m1").symlink_to(Path("..", "m1-folder"), target_is_directory=True)
    job = load_job(root)
    assert [v.id for v in job.machines[0].visits] == ["v1"]


@pytest.mark.parametrize("link", ["job.yaml", "instruments.yaml", "checklists/extra.yaml",
                                  "machines/m1/machine.yaml", "machines/m1/visits/v1.yaml",
                                  "machines/m1/signatures/v1.yaml"])
def test_every_yaml_input_linked_out_of_the_job_is_refused_alike(make_job, tmp_path, link):
    root = make_job()
    outside = tmp_path / "outside.yaml"
    shutil.copy(root / "machines" / "m1" / "visits" / "v1.yaml", outside)
    path = root / link
    path.parent.mkdir(parents=True, exist_ok=True)
    path.unlink(missing_ok=True)
    path.symlink_to(outside)
    assert _messages(root) == [f"job/{link}: resolves outside the job folder (a link?); copy "
                               "the file into the job folder"]


def test_a_machine_folder_linked_out_of_the_job_is_refused(make_job, tmp_path):
    root = make_job()
    shutil.copytree(root / "machines" / "m1", tmp_path / "elsewhere")
    (root / "machines" / "m2").symlink_to(tmp_path / "elsewhere", target_is_directory=True)
    assert _messages(root) == ["job/machines/m2: resolves outside the job folder (a link?); "
                               "copy the file into the job folder"]


def test_loading_resolves_paths_only_through_the_one_gate():
    """Every reader of loading confines through ``confine``: no other ``.resolve()``."""
    found = []
    for module in sorted((PACKAGE / "loading").glob("*.py")):
        tree = ast.parse(module.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.FunctionDef):
                for call in ast.walk(node):
                    if (isinstance(call, ast.Call) and isinstance(call.func, ast.Attribute)
                            and call.func.attr == "resolve" and node.name != "confine"):
                        found.append(f"{module.name}:{node.name}")
    assert found == []
