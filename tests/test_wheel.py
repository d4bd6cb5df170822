"""The wheel carries everything a build needs: installed into a fresh environment, it builds
the demo site from outside the source tree."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import sysconfig
from pathlib import Path

import pytest

from tests.conftest import DEMO_JOB, REPO


def _run(command: list[str], cwd: Path, env: dict[str, str]) -> subprocess.CompletedProcess[str]:
    completed = subprocess.run(command, cwd=cwd, env=env, capture_output=True, text=True,
                               timeout=300, check=False)
    assert completed.returncode == 0, (command, completed.stdout, completed.stderr)
    return completed


def _clean_env() -> dict[str, str]:
    return {key: value for key, value in os.environ.items()
            if key not in ("PYTHONPATH", "PYTHONHOME", "VIRTUAL_ENV", "PYTHONSTARTUP")}


@pytest.fixture(scope="module")
def installed(tmp_path_factory) -> Path:
    """A fresh virtual environment with only the wheel installed into it."""
    base = tmp_path_factory.mktemp("wheel")
    env = _clean_env()
    _run([sys.executable, "-m", "build", "--wheel", "--no-isolation", "--outdir",
          str(base / "dist"), str(REPO)], cwd=base, env=env)
    (wheel,) = (base / "dist").glob("acceptance-*.whl")
    venv = base / "venv"
    _run([sys.executable, "-m", "venv", str(venv)], cwd=base, env=env)
    python = venv / "bin" / "python"
    _run([str(venv / "bin" / "pip"), "install", "--quiet", "--no-deps", "--no-index",
          str(wheel)], cwd=base, env=env)
    # The dependencies come from this environment's site-packages, seen after the new
    # environment's own, so the package itself can only come from the wheel.
    site_packages = Path(_run([str(python), "-c", "import sysconfig; "
                               "print(sysconfig.get_paths()['purelib'])"],
                              cwd=base, env=env).stdout.strip())
    paths = dict.fromkeys([sysconfig.get_paths()["purelib"], sysconfig.get_paths()["platlib"]])
    (site_packages / "deps.pth").write_text("\n".join(paths) + "\n", encoding="utf-8")
    return venv


def test_package_is_imported_from_the_wheel(installed, tmp_path):
    completed = _run([str(installed / "bin" / "python"), "-c",
                      "import acceptance, acceptance.resources as r; print(acceptance.__file__); "
                      "print(r.checklists_dir()); print(r.templates_dir())"],
                     cwd=tmp_path, env=_clean_env())
    module, checklists, templates = (Path(line) for line in completed.stdout.splitlines())
    assert module.resolve().is_relative_to(installed.resolve())
    assert not module.resolve().is_relative_to(REPO)
    # The built-in checklists and templates travel inside the wheel as package data.
    for folder in (checklists, templates):
        assert not folder.resolve().is_relative_to(REPO)
        assert folder.resolve().is_relative_to(installed.resolve())
    assert sorted(p.name for p in checklists.glob("*.yaml")) == sorted(
        p.name for p in (REPO / "checklists").glob("*.yaml"))


@pytest.mark.slow
def test_installed_command_builds_the_demo(installed, tmp_path):
    job = tmp_path / "demo_job"
    shutil.copytree(DEMO_JOB, job)
    _run([str(installed / "bin" / "acceptance"), "build", str(job), "-o", "out", "-q"],
         cwd=tmp_path, env=_clean_env())
    site = tmp_path / "out"
    assert (site / "index.html").is_file()
    assert (site / "results.json").is_file()
    pdfs = sorted(p.relative_to(site).as_posix() for p in site.rglob("*.pdf")
                  if not p.relative_to(site).parts[0].startswith("."))
    visits = sorted(p.relative_to(job).with_suffix(".pdf").as_posix().replace("/visits/", "/")
                    for p in job.glob("machines/*/visits/*.yaml"))
    assert pdfs == sorted([*visits, "package.pdf"])
    for pdf in pdfs:
        assert (site / pdf).read_bytes().startswith(b"%PDF-")
