"""Robust input: every file read stays inside the job, impossible values and hostile
characters are refused with their place, and no step's cost outgrows its input.

The exact messages of each refusal are cases of the bad-input corpus
(``tests/bad_inputs/``); these tests hold what a corpus case cannot say.
"""

from __future__ import annotations

import ast
import contextlib
import datetime
import io
import shutil
import tracemalloc
from pathlib import Path

import pytest

from acceptance import clock, text
from acceptance.build import build_site
from acceptance.cli import main
from acceptance.errors import InputError
from acceptance.integrity import visit_inputs
from acceptance.loading import load_job, loaded
from acceptance.rendering.plots import TrendInput, trend_plot
from tests.test_bad_inputs import CASES, build_case

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


# ------------------------------------------------------------------ dates and the clock


@pytest.mark.parametrize("value", ["yesterday", "1.5e9", "-1", "99999999999999999999", "١٢٣"])
def test_a_malformed_source_date_epoch_is_one_clear_error(make_job, tmp_path, monkeypatch,
                                                          capsys, value):
    root = make_job()
    monkeypatch.setenv("SOURCE_DATE_EPOCH", value)
    code = main(["build", "--no-pdf", str(root), "--output", str(tmp_path / "site")])
    err = capsys.readouterr().err
    assert code == 2
    assert "Traceback" not in err
    assert "SOURCE_DATE_EPOCH=" in err and "whole number of seconds since 1970-01-01 UTC" in err
    assert not (tmp_path / "site").exists()


def test_the_reproducible_builds_epoch_names_its_day(monkeypatch):
    # [S] reproducible-builds.org, SOURCE_DATE_EPOCH specification: seconds since
    # 1970-01-01 00:00:00 UTC; 1773100800 s = 20 521 days = 2026-03-10.
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1773100800")
    assert clock.today() == datetime.date(2026, 3, 10)


@pytest.mark.parametrize("day", [datetime.date(9999, 12, 20), datetime.date(1, 1, 3)])
def test_a_trend_near_the_ends_of_the_calendar_is_drawn(day):
    points = [(datetime.date(2026, 3, 10), 10.0), (day, 11.0)]
    plot = trend_plot([TrendInput("L1", points)], quantity="current", unit="A")
    assert plot.x_ticks


# ------------------------------------------------------------------ text that acts


def test_the_format_character_table_matches_unicode():
    # [S] The Unicode Standard, UnicodeData.txt: general category Cf ("format"); the
    # table in acceptance/text.py must hold every one the running Python knows.
    import sys
    import unicodedata
    known = {c for c in range(sys.maxunicode + 1) if unicodedata.category(chr(c)) == "Cf"}
    table = {c for low, high in text.FORMAT_RANGES for c in range(low, high + 1)}
    assert known <= table
    assert {c for c in table - known if unicodedata.category(chr(c)) != "Cn"} == set()


def test_names_and_notes_show_direction_overrides_visibly(make_job, tmp_path):
    root = make_job(machine={"name": "Press \u202eevil"},
                    visit={"notes": "Checked by A.\u200bB."})
    build_site(root, tmp_path / "site", with_pdf=False)
    pages = "".join(p.read_text(encoding="utf-8") for p in (tmp_path / "site").rglob("*.html"))
    assert "\u202e" not in pages and "\u200b" not in pages
    assert "Press [U+202E]evil" in pages
    assert "A.[U+200B]B." in pages


# ------------------------------------------------------------------ no traceback, ever


def _run(argv: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


@pytest.mark.parametrize("case", CASES, ids=[f"{c['kind']}/{c['id']}" for c in CASES])
def test_the_build_refuses_every_corpus_case_without_a_traceback(case, tmp_path):
    """``check`` is run over the corpus by tests/test_bad_inputs.py; ``build`` must give
    the same lines and exit code and write nothing."""
    root = build_case(case, tmp_path / "job")
    expected = [line.replace("{root}", str(root)) for line in case["expect"]]
    code, out, err = _run(["build", "--no-pdf", str(root), "--output",
                           str(tmp_path / "site")])
    assert "Traceback" not in err
    assert code == 2
    assert err.splitlines() == expected
    assert not (tmp_path / "site").exists()


# ------------------------------------------------------------------ bounded cost


def test_an_attachment_above_its_limit_is_refused_with_its_size(make_job, monkeypatch):
    monkeypatch.setattr(loaded, "MAX_ATTACHMENT_BYTES", 1000)
    root = make_job(visit={"attachments": [{"path": "photos/panel.jpg", "title": "Panel"}]},
                    files={"machines/m1/photos/panel.jpg": "x" * 1001})
    assert _messages(root) == [
        "job/machines/m1/visits/v1.yaml: attachment 'photos/panel.jpg' is 1001 bytes; the "
        "limit is 1000 bytes: attach a smaller copy (a reduced photo, the pages that matter)"]


def test_an_attachment_is_hashed_in_blocks(make_job, tmp_path):
    """Doubling an attachment does not double the memory its digest takes."""
    peaks = []
    for size in (8 << 20, 16 << 20):
        root = make_job(visit={"attachments": [{"path": "photos/big.bin", "title": "Big"}]})
        (root / "machines" / "m1" / "photos").mkdir(parents=True, exist_ok=True)
        (root / "machines" / "m1" / "photos" / "big.bin").write_bytes(b"x" * size)
        job = load_job(root)
        machine = job.machines[0]
        tracemalloc.start()
        visit_inputs(job, machine, machine.visits[0])
        peaks.append(tracemalloc.get_traced_memory()[1])
        tracemalloc.stop()
    assert peaks[1] < 2 << 20 and peaks[1] < 1.2 * peaks[0] + (256 << 10)
