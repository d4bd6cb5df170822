"""Nothing lost: a build killed at any point leaves the previous site or the new one, whole.

``acceptance build`` runs in a subprocess and is killed with SIGKILL (no handler runs, no
``finally``) at points spread over its phases: while loading, while rendering into the
staging folder, just as the staging manifest is written, and just after the exchange.
After each kill the output folder must verify against its own manifest, hold no file
the manifest does not list, and be exactly the previous site or exactly the new one
(builds are deterministic, so the new site's manifest is known from a reference build).
Staging folders a kill leaves beside the output are removed by the next build.
"""

from __future__ import annotations

import fcntl
import hashlib
import io
import os
import random
import shutil
import signal
import subprocess
import sys
import time
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import pytest

from acceptance.build import build_site
from acceptance.cli import main
from tests.conftest import PASSING_SUPPLY, write_job

pytestmark = pytest.mark.slow

# Files the manifest leaves out by design: itself, and the build's bookkeeping (the marker,
# the build state and the package's kept parts, all named .acceptance-*).
_UNLISTED = {"MANIFEST.sha256"}
KILL_POINTS = 10


def _build_command(job: Path, output: Path) -> list[str]:
    return [sys.executable, "-m", "acceptance.cli", "build", str(job), "-o", str(output),
            "-j", "1", "-q"]


def _build(job: Path, output: Path) -> None:
    build_site(job, output, jobs=1)  # in this process: the builds that are not killed


def site_state(output: Path) -> str:
    """The manifest text of a complete site at ``output``; fails on anything half-written."""
    manifest = (output / "MANIFEST.sha256").read_text(encoding="utf-8")
    listed = {}
    for line in manifest.splitlines():
        digest, _, name = line.partition("  ")
        listed[name] = digest
    present = {p.relative_to(output).as_posix() for p in output.rglob("*") if p.is_file()
               and not p.relative_to(output).parts[0].startswith(".acceptance-")}
    assert present - _UNLISTED == set(listed), present ^ set(listed)
    for name, digest in listed.items():
        assert hashlib.sha256((output / name).read_bytes()).hexdigest() == digest, name
    return manifest


def _leftovers(output: Path) -> list[str]:
    return sorted(p.name for p in output.parent.iterdir()
                  if p.name.startswith((f".{output.name}.staging-",
                                        f".{output.name}.previous-")))


def _wait_for(predicate, process: subprocess.Popen, timeout: float = 60.0) -> None:
    deadline = time.monotonic() + timeout
    while process.poll() is None and time.monotonic() < deadline:
        if predicate():
            return
        time.sleep(0.002)


def _staging(output: Path) -> list[Path]:
    return list(output.parent.glob(f".{output.name}.staging-*"))


@pytest.fixture(scope="module")
def two_sites(tmp_path_factory):
    """A job, its site A, the job changed, the manifest of its site B and how long B's
    build works in its staging folder."""
    base = tmp_path_factory.mktemp("interrupted")
    job = write_job(base / "job", visits={
        "v1": {"readings": {"supply": PASSING_SUPPLY}},
        "v2": {"date": "2026-04-01", "kind": "periodic",
               "readings": {"supply": {**PASSING_SUPPLY, "frequency": "50.1 Hz"}}}})
    snapshot = base / "site-a"
    _build(job, snapshot)
    manifest_a = site_state(snapshot)
    visit = job / "machines" / "m1" / "visits" / "v1.yaml"
    visit.write_text(visit.read_text(encoding="utf-8").replace("401 V", "402 V"),
                     encoding="utf-8")
    reference = base / "site-b"
    process = subprocess.Popen(_build_command(job, reference))
    _wait_for(lambda: bool(_staging(reference)), process)
    staged = time.monotonic()
    assert process.wait(timeout=120) == 0
    duration = time.monotonic() - staged  # from the staging folder's appearance to the end
    manifest_b = site_state(reference)
    assert manifest_a != manifest_b
    return job, snapshot, manifest_a, manifest_b, duration


def _restore(snapshot: Path, output: Path) -> None:
    if output.exists():
        shutil.rmtree(output)
    shutil.copytree(snapshot, output, symlinks=True)


def test_killed_builds_leave_one_whole_site(two_sites, tmp_path):
    job, snapshot, manifest_a, manifest_b, duration = two_sites
    output = tmp_path / "site"
    rng = random.Random(20260310)
    # Where to kill: early (loading), in staging at spread fractions of the build, as the
    # staging manifest appears (just before the exchange), and just after the exchange.
    points = ([("start", rng.uniform(0.2, 1.2)) for _ in range(2)]
              + [("staging", (n + rng.random()) / 6) for n in range(6)]
              + [("manifest", 0.0), ("swapped", 0.0)])
    assert len(points) == KILL_POINTS
    outcomes = []
    for trigger, delay in points:
        _restore(snapshot, output)
        process = subprocess.Popen(_build_command(job, output), stdout=subprocess.DEVNULL,
                                   stderr=subprocess.DEVNULL, start_new_session=True)
        if trigger == "start":
            time.sleep(delay)
        elif trigger == "staging":
            _wait_for(lambda: bool(_staging(output)), process)
            time.sleep(delay * duration)
        elif trigger == "manifest":
            _wait_for(lambda: any((s / "MANIFEST.sha256").exists() for s in _staging(output)),
                      process)
        else:
            _wait_for(lambda: (output / "MANIFEST.sha256").exists() and
                      (output / "MANIFEST.sha256").read_text(encoding="utf-8") != manifest_a,
                      process)
        with_pdf_workers = os.getpgid(process.pid)
        os.killpg(with_pdf_workers, signal.SIGKILL)
        process.wait(timeout=30)
        state = site_state(output)
        assert state in (manifest_a, manifest_b), (trigger, delay)
        outcomes.append("previous" if state == manifest_a else "new")
    assert "previous" in outcomes  # the harness did interrupt builds
    print(f"kill points: {len(outcomes)}, left the previous site: "
          f"{outcomes.count('previous')}, the new one: {outcomes.count('new')}")
    # What the kills left beside the output goes with the next build, with a stale
    # staging folder of a process long gone.
    stale = output.parent / f".{output.name}.staging-999999999"
    (stale / "machines").mkdir(parents=True)
    (stale / "machines" / "half.pdf").write_bytes(b"%PDF-1.7 half")
    _build(job, output)
    assert site_state(output) == manifest_b
    assert _leftovers(output) == []


def test_a_second_build_at_the_same_time_is_refused_clearly(two_sites, tmp_path):
    job, snapshot, manifest_a, _manifest_b, _duration = two_sites
    output = tmp_path / "site"
    _restore(snapshot, output)
    lock = output.with_name(f".{output.name}.lock")
    with open(lock, "w") as handle:
        fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)  # as a running build holds it
        err = io.StringIO()
        with redirect_stdout(io.StringIO()), redirect_stderr(err):
            code = main(["build", str(job), "-o", str(output), "--no-pdf"])
    assert code == 3
    assert err.getvalue() == (f"error: another build is writing {output} right now; wait for "
                              "it to finish and run the build again\n")
    assert site_state(output) == manifest_a  # untouched


def test_two_builds_started_together_do_not_corrupt_each_other(two_sites, tmp_path):
    job, snapshot, _manifest_a, _manifest_b, _duration = two_sites
    output = tmp_path / "site"
    _restore(snapshot, output)
    # Without PDFs: the race is over the staging folder, the lock and the exchange.
    processes = [subprocess.Popen([*_build_command(job, output), "--no-pdf"],
                                  stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
                 for _ in range(2)]
    results = [(p.wait(timeout=120), p.stderr.read()) for p in processes]
    for process in processes:
        process.stderr.close()
    codes = sorted(code for code, _ in results)
    # Either one waited for nothing (refused, exit 3) or they ran one after the other.
    assert codes in ([0, 0], [0, 3]), results
    for code, err in results:
        if code == 3:
            assert "another build is writing" in err
    site_state(output)
    assert "402 V" in (output / "results.json").read_text(encoding="utf-8")
    assert not (output / "machines" / "m1" / "v1.pdf").exists()  # the site of a finished build
    assert _leftovers(output) == []
