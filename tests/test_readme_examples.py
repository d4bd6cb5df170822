"""Every example in README.md works as shown.

Each ``acceptance …`` line of the README's shell blocks runs, in order, on a fresh copy of the
demo job (keys and sites that earlier lines wrote beside it are kept); none may exit 2 (input
or usage error) or print a traceback. Each YAML example is put where the README says it goes,
in a copy of the demo job, and loaded with the tool's own loader: no problem may be located
in the file that holds it.
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
import signal
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from acceptance.errors import InputError
from acceptance.loading import load_job

ROOT = Path(__file__).resolve().parents[1]
README = ROOT / "README.md"
ACCEPTANCE = [sys.executable, "-m", "acceptance.cli"]


def _blocks(language: str) -> list[tuple[int, str, str]]:
    """(line, heading above, text) of every fenced block in ``language``."""
    blocks, heading, inside, start, lines = [], "", False, 0, []
    for number, line in enumerate(README.read_text(encoding="utf-8").splitlines(), start=1):
        if not inside and line.startswith("#"):
            heading = line.lstrip("#").strip()
        if not inside and line.strip() == f"```{language}":
            inside, start, lines = True, number + 1, []
        elif inside and line.strip() == "```":
            inside = False
            blocks.append((start, heading, "\n".join(lines) + "\n"))
        elif inside:
            lines.append(line)
    return blocks


def _commands() -> list[tuple[int, list[str]]]:
    commands = []
    for start, _heading, text in _blocks("sh"):
        for offset, line in enumerate(text.splitlines()):
            if line.startswith("acceptance "):
                commands.append((start + offset, shlex.split(line, comments=True)))
    return commands


def test_the_readme_has_commands_and_yaml_examples() -> None:
    # A change to the README's fences must not make the tests below pass on nothing.
    assert len(_commands()) >= 10
    assert len(_blocks("yaml")) >= 6


@pytest.fixture(scope="module")
def workspace(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("readme")
    shutil.copytree(ROOT / "demo_job", folder / "demo_job")
    return folder


def _run(arguments: list[str], cwd: Path) -> subprocess.CompletedProcess[str]:
    environment = {**os.environ, "SOURCE_DATE_EPOCH": "1773163800",
                   "ACCEPTANCE_NO_CACHE": "1"}
    if arguments[0] == "serve":
        return _run_server(arguments, cwd, environment)
    return subprocess.run([*ACCEPTANCE, *arguments], cwd=cwd, env=environment,
                          capture_output=True, text=True, timeout=600)


def _run_server(arguments: list[str], cwd: Path, environment: dict[str, str]
                ) -> subprocess.CompletedProcess[str]:
    """Start ``serve`` on a free port, wait until it serves, then stop it as a user would."""
    process = subprocess.Popen([*ACCEPTANCE, *arguments, "--port", "0"], cwd=cwd,
                               env=environment, stdout=subprocess.PIPE,
                               stderr=subprocess.PIPE, text=True)
    first_line = serving_line(process)
    if process.poll() is None:
        process.send_signal(signal.SIGINT)
    stdout, stderr = process.communicate(timeout=120)
    # Stopped by the test with Ctrl-C, the way out the README gives.
    code = 0 if first_line.startswith("serving http") else process.returncode
    return subprocess.CompletedProcess(arguments, code, first_line + stdout, stderr)


def serving_line(process: subprocess.Popen[str], seconds: float = 300) -> str:
    """The first line ``serve`` prints (its address), or '' if it printed none in time."""
    lines: list[str] = []
    reader = threading.Thread(target=lambda: lines.append(process.stdout.readline()),
                              daemon=True)
    reader.start()
    reader.join(seconds)
    return lines[0] if lines else ""


@pytest.mark.slow
def test_every_readme_command_runs_as_written(workspace: Path) -> None:
    failures = []
    for line, arguments in _commands():
        assert arguments[0] == "acceptance"
        # Each command starts from the demo job as shipped (a blank visit from `new` is not
        # filled in here); what commands write beside it (keys, the site) is kept for the next.
        shutil.rmtree(workspace / "demo_job")
        shutil.copytree(ROOT / "demo_job", workspace / "demo_job")
        result = _run(arguments[1:], workspace)
        output = result.stdout + result.stderr
        if result.returncode == 2 or "Traceback" in output:
            failures.append(f"README.md:{line}: {shlex.join(arguments)} exited "
                            f"{result.returncode}:\n{output[-1500:]}")
    assert failures == [], "\n\n".join(failures)


# Where each YAML example goes, by the heading above it: the file it is, or how a fragment
# is completed into one. The heading names the file kind in the README itself.
VISIT_HEAD = ("kind: commissioning\ndate: 2026-03-09\nperformed_by: [A. Tester]\n"
              "default_instrument: dmm-1\n")
CHECKLIST_HEAD = ("checklist: readme_example\ntitle: README example\nversion: 1\n"
                  "items:\n")


def _placed(start: int, heading: str, text: str, blocks: list[tuple[int, str, str]]
            ) -> tuple[str, str]:
    """(path inside the job, file text) for the example at ``start``."""
    machine = "machines/mag-table-1"
    if heading == "`job.yaml`":
        return "job.yaml", text
    if heading == "The punch list":
        return "punch_list.yaml", text
    if heading == "`instruments.yaml`":
        return "instruments.yaml", text
    if heading == "`machines/<id>/machine.yaml`":
        return f"{machine}/machine.yaml", text
    if heading == "`machines/<id>/visits/<visit>.yaml`":
        path = f"{machine}/visits/2026-03-09-commissioning.yaml"
        if text.startswith("kind:"):
            return path, text
        if text.startswith(" "):  # readings of one checklist, indented as under readings:
            return path, VISIT_HEAD + "readings:\n" + text
        # A repair's as-left readings and parts: the demo's compressor has the run capacitor.
        return "machines/compressor-1/visits/2026-03-18-after-repair.yaml", VISIT_HEAD + text
    if heading == "Checklists":
        if text.lstrip().startswith("- id:"):
            return "checklists/readme_example.yaml", CHECKLIST_HEAD + text
        # An item's compare block: completed with the item example before it.
        item = next(t for s, h, t in reversed(blocks) if s < start and h == "Checklists"
                    and t.lstrip().startswith("- id:"))
        return "checklists/readme_example.yaml", CHECKLIST_HEAD + item + text
    raise AssertionError(f"README.md:{start}: a YAML example under '{heading}'; say in "
                         "this test where such an example goes")


@pytest.mark.parametrize("start", [start for start, _h, _t in _blocks("yaml")])
def test_yaml_example_is_accepted_by_the_loader(start: int, tmp_path: Path) -> None:
    blocks = _blocks("yaml")
    _start, heading, text = next(b for b in blocks if b[0] == start)
    job = tmp_path / "job"
    shutil.copytree(ROOT / "demo_job", job)
    relative, content = _placed(start, heading, text, blocks)
    (job / relative).parent.mkdir(parents=True, exist_ok=True)
    (job / relative).write_text(content, encoding="utf-8")
    try:
        load_job(job)
    except InputError as error:
        name = re.escape(Path(relative).name)
        here = [str(p) for p in error.problems if re.search(rf"(^|/){name}:", str(p))]
        assert here == [], f"README.md:{start}: the example is refused:\n" + "\n".join(here)


@pytest.mark.slow
def test_serve_stopped_with_sigterm_leaves_no_preview_folder(tmp_path: Path) -> None:
    temporary = tmp_path / "tmp"
    temporary.mkdir()
    shutil.copytree(ROOT / "demo_job", tmp_path / "job")
    process = subprocess.Popen([*ACCEPTANCE, "serve", "job", "--port", "0"], cwd=tmp_path,
                               env={**os.environ, "TMPDIR": str(temporary)},
                               stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    assert serving_line(process).startswith("serving http://127.0.0.1:")
    assert [p.name for p in temporary.iterdir()][0].startswith("acceptance-preview-")
    process.terminate()
    _stdout, stderr = process.communicate(timeout=60)
    assert "Traceback" not in stderr
    assert list(temporary.iterdir()) == []
