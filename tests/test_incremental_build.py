"""Incremental builds: what a rebuild renders again, what it keeps, and that the site it
leaves is the one a build from nothing gives.

The reference for every rebuild is a clean build of the same inputs into an empty folder:
the two manifests (SHA-256 of every file, package.pdf included) must be equal.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

import acceptance.build.pdfs as pdfs
import acceptance.rendering.package as package
from acceptance.build import MANIFEST_NAME, build_site
from tests.conftest import PASSING_SUPPLY, write_job

pytestmark = pytest.mark.slow

KEPT = ".acceptance-package"


def _job(root: Path) -> Path:
    write_job(root, visits={"v1": {"readings": {"supply": PASSING_SUPPLY}},
                            "v2": {"date": "2026-03-11",
                                   "readings": {"supply": PASSING_SUPPLY}}})
    return write_job(root, machine_id="m2", visits={
        "v1": {"readings": {"supply": PASSING_SUPPLY}}})


def _edit(job: Path, visit: str, old: str, new: str) -> None:
    path = job / "machines" / "m1" / "visits" / f"{visit}.yaml"
    text = path.read_text(encoding="utf-8")
    assert old in text
    path.write_text(text.replace(old, new), encoding="utf-8")


def _snapshot(site: Path) -> dict[str, tuple[bytes, int, int]]:
    return {p.relative_to(site).as_posix(): (p.read_bytes(), p.stat().st_ino,
                                             p.stat().st_mtime_ns)
            for p in sorted(site.rglob("*")) if p.is_file()}


class Spy:
    """Records what a build renders and lays out (builds run in this process: jobs=1)."""

    def __init__(self, monkeypatch: pytest.MonkeyPatch) -> None:
        self.rendered: list[str] = []
        self.laid_out: list[str] = []
        render_one, lay_out = pdfs._render_one, package.lay_out_part

        def spy_render(task, staging):
            self.rendered.append(task.pdf)
            return render_one(task, staging)

        def spy_lay_out(html, target, *arguments):
            self.laid_out.append(Path(target).name)
            return lay_out(html, target, *arguments)

        monkeypatch.setattr(pdfs, "_render_one", spy_render)
        monkeypatch.setattr(package, "lay_out_part", spy_lay_out)


@pytest.fixture
def built(tmp_path):
    job = _job(tmp_path / "job")
    site = tmp_path / "site"
    report = build_site(job, site, jobs=1)
    assert report.rendered == report.pdfs == 4  # three records and the package
    return job, site


def _same_as_a_clean_build(job: Path, site: Path, tmp_path: Path) -> None:
    clean = tmp_path / "clean"
    build_site(job, clean, jobs=1)
    assert (site / MANIFEST_NAME).read_text(encoding="utf-8") == \
        (clean / MANIFEST_NAME).read_text(encoding="utf-8")


def test_a_rebuild_with_nothing_changed_writes_nothing(built):
    job, site = built
    before = _snapshot(site)
    assert {name for name in before if name.startswith(KEPT)} == {
        f"{KEPT}/deficiencies.pdf", f"{KEPT}/instruments.pdf", f"{KEPT}/front.pdf"}
    report = build_site(job, site, jobs=1)
    assert report.unchanged and report.rendered == 0 and report.pdfs == 4
    assert _snapshot(site) == before  # same bytes, same files, not even touched


def test_an_edited_reading_renders_its_record_and_joins_the_package_again(
        built, tmp_path, monkeypatch):
    job, site = built
    before = _snapshot(site)
    _edit(job, "v1", "frequency: 50.0 Hz", "frequency: 50.1 Hz")  # inside the same window
    spy = Spy(monkeypatch)
    report = build_site(job, site, jobs=1)
    # The contents, deficiencies and register read the same: none is laid out again.
    assert spy.rendered == ["machines/m1/v1.pdf"] and spy.laid_out == []
    assert report.rendered == 2  # the record and package.pdf, joined from kept parts
    after = _snapshot(site)
    assert after["machines/m1/v1.pdf"][0] != before["machines/m1/v1.pdf"][0]
    for name in ("machines/m1/v2.pdf", "machines/m2/v1.pdf", f"{KEPT}/front.pdf"):
        assert after[name][0] == before[name][0], name
    assert after["package.pdf"][0] != before["package.pdf"][0]  # results.json inside changed
    _same_as_a_clean_build(job, site, tmp_path)


def test_a_new_deficiency_lays_out_the_deficiencies_and_the_contents_again(
        built, tmp_path, monkeypatch):
    job, site = built
    # Outside the 49.5–50.5 Hz window of the built-in supply checklist for a 50 Hz machine
    # (IEC 60204-1 cl. 4.3.2, ±1 % continuous; tests/reference_values.md §3) [M].
    _edit(job, "v2", "frequency: 50.0 Hz", "frequency: 51.0 Hz")
    spy = Spy(monkeypatch)
    build_site(job, site, jobs=1)
    assert sorted(spy.rendered) == [f"{KEPT}/deficiencies.pdf", "machines/m1/v2.pdf"]
    assert spy.laid_out == ["front.pdf"]  # the contents show the visit's new state
    _same_as_a_clean_build(job, site, tmp_path)


@pytest.mark.parametrize("part", ["instruments.pdf", "front.pdf"])
def test_a_replaced_kept_part_is_laid_out_again_not_carried_forward(
        built, tmp_path, monkeypatch, part):
    job, site = built
    kept = site / KEPT / part
    kept.unlink()
    kept.write_bytes(b"%PDF-1.7 not the part that was built\n")
    # The kept parts are not in the manifest: the site itself is still the one built.
    assert build_site(job, site, jobs=1).unchanged
    _edit(job, "v1", "frequency: 50.0 Hz", "frequency: 50.1 Hz")
    spy = Spy(monkeypatch)
    build_site(job, site, jobs=1)
    assert part in [Path(name).name for name in spy.rendered + spy.laid_out]
    _same_as_a_clean_build(job, site, tmp_path)


def test_a_site_whose_state_has_no_page_counts_is_rebuilt_correctly(built, tmp_path):
    job, site = built
    state_path = site / ".acceptance-build.json"
    state = json.loads(state_path.read_text(encoding="utf-8"))
    del state["pages"], state["kept"]  # as a build that recorded neither left it
    state_path.write_text(json.dumps(state), encoding="utf-8")
    _edit(job, "v1", "frequency: 50.0 Hz", "frequency: 50.1 Hz")
    build_site(job, site, jobs=1)
    _same_as_a_clean_build(job, site, tmp_path)


def test_kept_parts_are_not_listed_and_verify_ignores_them(built):
    from acceptance.integrity import verify_site

    _, site = built
    listed = (site / MANIFEST_NAME).read_text(encoding="utf-8")
    assert KEPT not in listed
    report = verify_site(site)
    assert not report.problems, report.problems
    os.remove(site / KEPT / "front.pdf")  # bookkeeping, not part of what was signed off
    assert not verify_site(site).problems
