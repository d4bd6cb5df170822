"""Fast feedback while filling in: scaffold, schemas, live preview, a light check."""

from __future__ import annotations

import ast
import json
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

from acceptance.cli import main
from acceptance.evaluation import evaluate_job
from acceptance.loading import load_job
from acceptance.results import Verdict
from acceptance.schemas import schema_documents, schema_text

REPO = Path(__file__).resolve().parents[1]


def test_committed_schemas_match_the_model():
    # A changed model field must come with regenerated schemas (acceptance schema).
    for name, document in schema_documents().items():
        committed = (REPO / "schemas" / name).read_text(encoding="utf-8")
        assert committed == schema_text(document), (
            f"schemas/{name} is stale; run: acceptance schema")


def test_schema_check_reports_drift(tmp_path, capsys):
    assert main(["schema", "-o", str(tmp_path)]) == 0
    assert main(["schema", "-o", str(tmp_path), "--check"]) == 0
    (tmp_path / "visit.schema.json").write_text("{}\n", encoding="utf-8")
    assert main(["schema", "-o", str(tmp_path), "--check"]) == 1
    assert "visit.schema.json" in capsys.readouterr().out


def test_new_writes_every_item_with_a_schema_line(make_job, capsys):
    machine = {"nameplate": {"windings": [
        {"id": "coil", "name": "Coil", "material": "copper", "thermal_class": "F"}]},
        "checklists": ["lockout", "supply", "windings"]}
    root = make_job(machine=machine)
    assert main(["new", str(root), "m1", "--kind", "periodic", "--date", "2026-12-01"]) == 0
    target = root / "machines" / "m1" / "visits" / "2026-12-01-periodic.yaml"
    text = target.read_text(encoding="utf-8")
    assert text.startswith("# yaml-language-server: $schema=../../../.schemas/visit.schema.json")
    assert (root / ".schemas" / "visit.schema.json").is_file()
    for checklist in ("lockout", "supply", "windings"):
        items = load_job(root, include_visits=False).checklists[checklist].model.items
        for item in items:
            # an item with no element on this machine stays as a comment saying so
            assert f"    {item.id}:" in text or f"    # {item.id}: no " in text, item.id
    # three-phase lines and the winding's element appear as blanks with their units
    assert "      L1-L2:      # V" in text
    assert "      coil:\n        value:      # Ω\n        temperature:      # °C" in text


def test_new_scaffold_once_named_loads_as_not_tested(make_job):
    root = make_job()
    main(["new", str(root), "m1", "--kind", "periodic", "--date", "2026-12-01"])
    target = root / "machines" / "m1" / "visits" / "2026-12-01-periodic.yaml"
    target.write_text(target.read_text(encoding="utf-8").replace(
        "performed_by: []", "performed_by: [A. Tester]"), encoding="utf-8")
    result = evaluate_job(load_job(root))
    visit = next(v for v in result.visits if v.id == "2026-12-01-periodic")
    assert {i.verdict for i in visit.items} <= {Verdict.NOT_TESTED, Verdict.NOT_APPLICABLE}


def test_new_on_a_machine_with_a_baseline_and_signed_visits(tmp_path, capsys):
    # README's own example: the demo's machines name a baseline visit and hold signature
    # records, both of which name visits that `new` does not load.
    job = tmp_path / "demo_job"
    shutil.copytree(REPO / "demo_job", job)
    for machine in ("compressor-1", "press-brake-1"):
        assert main(["new", str(job), machine, "--kind", "periodic",
                     "--date", "2026-12-01"]) == 0, capsys.readouterr().err


def test_new_writes_a_blank_for_every_bonding_point(make_job):
    machine = {"bonding_points": [
        {"id": "frame", "name": "Machine frame", "material": "copper",
         "cross_section": "2.5 mm²", "length": "3 m"},
        {"id": "door", "name": "Guard door", "material": "copper",
         "cross_section": "2.5 mm²", "length": "2 m"}],
        "checklists": ["bonding"]}
    root = make_job(machine=machine)
    assert main(["new", str(root), "m1", "--kind", "periodic", "--date", "2026-12-01"]) == 0
    text = (root / "machines" / "m1" / "visits" / "2026-12-01-periodic.yaml").read_text(
        encoding="utf-8")
    assert "no bonding point on this machine" not in text
    assert "      frame:\n        value:      # Ω" in text
    assert "      door:\n        value:      # Ω" in text


def test_new_never_overwrites_without_saying_so(make_job, capsys):
    root = make_job()
    args = ["new", str(root), "m1", "--kind", "periodic", "--date", "2026-12-01"]
    assert main(args) == 0
    target = root / "machines" / "m1" / "visits" / "2026-12-01-periodic.yaml"
    target.write_text("kept: true\n", encoding="utf-8")
    assert main(args) == 2
    assert "already exists and was left untouched" in capsys.readouterr().err
    assert target.read_text(encoding="utf-8") == "kept: true\n"
    assert main([*args, "--force"]) == 0
    assert "replaced" in capsys.readouterr().out


def test_new_names_an_unknown_machine(make_job, capsys):
    root = make_job()
    assert main(["new", str(root), "m2", "--kind", "periodic"]) == 2
    assert "no machine 'm2' in this job (machines: m1)" in capsys.readouterr().err


def _modules_after(argv: list[str], *names: str) -> list[str]:
    """Run ``acceptance *argv`` in a new interpreter; which of ``names`` it imported."""
    code = (f"import sys; sys.argv = ['acceptance', *{argv!r}]\n"
            "from acceptance.cli import main\n"
            "main()\n"
            f"print('LOADED', [m for m in {names!r} if m in sys.modules])")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert "LOADED" in out.stdout, out.stdout + out.stderr
    return ast.literal_eval(out.stdout.split("LOADED", 1)[1].strip())


def _modules_after_check(root: Path, *names: str) -> list[str]:
    """Run check on ``root`` in a new interpreter; which of ``names`` it imported."""
    return _modules_after(["check", str(root)], *names)


def test_check_does_not_import_the_pdf_stack(make_job):
    # Start-up: check must stay light (WeasyPrint, Jinja2 and the capture importer are for
    # the build and the capture command only; numpy for jobs with captures).
    root = make_job()
    heavy = ("weasyprint", "pydyf", "jinja2", "markdown_it", "numpy", "acceptance.captures",
             "acceptance.build")
    assert _modules_after_check(root, *heavy) == []
    # Nothing changed since: the output is reprinted without the model or the evaluation.
    assert _modules_after_check(root, "pydantic", "acceptance.evaluation", "yaml") == []


def test_a_build_without_pdfs_does_not_import_the_pdf_stack(make_job, tmp_path):
    # The live preview builds without PDFs on every save: WeasyPrint and pypdf are loaded
    # only by the build stages that render PDFs.
    root = make_job()
    site = tmp_path / "site"
    pdf_stack = ("weasyprint", "pydyf", "pypdf", "acceptance.rendering.pdf",
                 "acceptance.rendering.package")
    assert _modules_after(["build", str(root), "-o", str(site), "--no-pdf", "-q"],
                          *pdf_stack) == []
    assert (site / "index.html").is_file() and not list(site.rglob("*.pdf"))


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def _get(url: str) -> str:
    with urllib.request.urlopen(url, timeout=5) as response:  # loopback only
        return response.read().decode("utf-8")


def _wait_for(predicate, timeout: float = 20.0) -> None:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        try:
            if predicate():
                return
        except OSError:
            pass
        time.sleep(0.2)
    raise AssertionError("timed out")


def test_serve_rebuilds_shows_errors_and_keeps_the_last_good_build(make_job, tmp_path):
    root = make_job(visit={"readings": {"supply": {"frequency": "50.0 Hz"}}})
    port = _free_port()
    process = subprocess.Popen(
        [sys.executable, "-m", "acceptance.cli", "serve", str(root), "--port", str(port),
         "--interval", "0.2", "-o", str(tmp_path / "preview")],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    base = f"http://127.0.0.1:{port}"
    try:
        _wait_for(lambda: "Test machine" in _get(f"{base}/index.html"))
        status = json.loads(_get(f"{base}/__acceptance/status"))
        visit = root / "machines" / "m1" / "visits" / "v1.yaml"
        visit.write_text(visit.read_text(encoding="utf-8").replace("50.0 Hz", "50,0 Hz"),
                         encoding="utf-8")
        _wait_for(lambda: json.loads(_get(f"{base}/__acceptance/status"))["generation"]
                  > status["generation"])
        page = _get(f"{base}/index.html")
        assert "The last change has input problems; this is the last good build." in page
        assert "uses a comma" in page
        assert "Test machine" in page  # the last good build is still served
        visit.write_text(visit.read_text(encoding="utf-8").replace("50,0 Hz", "50.0 Hz"),
                         encoding="utf-8")
        _wait_for(lambda: not json.loads(_get(f"{base}/__acceptance/status"))["problems"])
        assert "input problems" not in _get(f"{base}/index.html")
    finally:
        process.terminate()
        process.wait(timeout=10)


@pytest.mark.parametrize("command", ["new", "serve", "schema"])
def test_help(command, capsys):
    with pytest.raises(SystemExit) as caught:
        main([command, "--help"])
    assert caught.value.code == 0


def test_check_reprints_its_output_until_an_input_changes(make_job, capsys):
    root = make_job(visit={"readings": {"supply": {"frequency": "50.0 Hz"}}})
    first = main(["check", str(root)]), capsys.readouterr()
    again = main(["check", str(root)]), capsys.readouterr()
    assert again[0] == first[0] and again[1].out == first[1].out
    visit = root / "machines" / "m1" / "visits" / "v1.yaml"
    visit.write_text(visit.read_text(encoding="utf-8").replace("50.0 Hz", "55.0 Hz"),
                     encoding="utf-8")
    changed = main(["check", str(root)]), capsys.readouterr()
    assert changed[1].out != first[1].out
    assert "55.0 Hz" in changed[1].out  # the new reading, now failing, is listed


def _copy_machine(root: Path, source: str, target: str, replace: tuple[str, str] = ("", "")
                  ) -> None:
    shutil.copytree(root / "machines" / source, root / "machines" / target)
    visit = root / "machines" / target / "visits" / "v1.yaml"
    visit.write_text(visit.read_text(encoding="utf-8").replace(*replace), encoding="utf-8")


def _check_twice(root: Path, options: list[str], capsys, monkeypatch
                 ) -> tuple[tuple[int, str, str], tuple[int, str, str]]:
    """check with its cache, then with none: (code, out, err) of each."""
    cached = main(["check", str(root), *options]), *capsys.readouterr()
    monkeypatch.setenv("ACCEPTANCE_NO_CACHE", "1")
    fresh = main(["check", str(root), *options]), *capsys.readouterr()
    monkeypatch.delenv("ACCEPTANCE_NO_CACHE")
    return cached, fresh


@pytest.mark.parametrize("options", [[], ["--all"], ["--json"]])
def test_check_evaluates_only_the_machines_whose_files_changed(make_job, capsys, monkeypatch,
                                                                options):
    import acceptance.loading

    root = make_job(visit={"readings": {"supply": {"frequency": "50.0 Hz"}}})
    _copy_machine(root, "m1", "m2", ("50.0 Hz", "50.2 Hz"))
    _copy_machine(root, "m1", "m3", ("50.0 Hz", "49.9 Hz"))
    loaded: list[object] = []
    real_load_job = acceptance.loading.load_job

    def recording_load_job(*args, **kwargs):
        loaded.append(kwargs.get("machines"))
        return real_load_job(*args, **kwargs)

    monkeypatch.setattr(acceptance.loading, "load_job", recording_load_job)
    cached, fresh = _check_twice(root, options, capsys, monkeypatch)
    assert cached == fresh and loaded == [["m1", "m2", "m3"], None]

    # One visit edited: only its machine is loaded, and the output is the whole job's.
    loaded.clear()
    visit = root / "machines" / "m2" / "visits" / "v1.yaml"
    visit.write_text(visit.read_text(encoding="utf-8").replace("50.2 Hz", "57.0 Hz"),
                     encoding="utf-8")
    cached, fresh = _check_twice(root, options, capsys, monkeypatch)
    assert loaded == [["m2"], None]
    assert cached == fresh and "57.0" in cached[1] and cached[0] == 1

    # Nothing changed: nothing is loaded at all.
    loaded.clear()
    again = main(["check", str(root), *options]), *capsys.readouterr()
    assert again == cached and loaded == []

    # A job-level file changed: every machine is evaluated again.
    job_file = root / "job.yaml"
    job_file.write_text(job_file.read_text(encoding="utf-8") + "\n# a comment\n",
                        encoding="utf-8")
    loaded.clear()
    cached, fresh = _check_twice(root, options, capsys, monkeypatch)
    assert cached == fresh and loaded == [["m1", "m2", "m3"], None]

    # A machine added and one removed: the sections follow the folders.
    _copy_machine(root, "m1", "m0")
    shutil.rmtree(root / "machines" / "m3")
    loaded.clear()
    cached, fresh = _check_twice(root, options, capsys, monkeypatch)
    assert cached == fresh and loaded == [["m0"], None]
    assert "m3" not in cached[1] and "m0" in cached[1]


def test_check_reports_an_edited_machine_problem_and_recovers(make_job, capsys):
    root = make_job(visit={"readings": {"supply": {"frequency": "50.0 Hz"}}})
    _copy_machine(root, "m1", "m2")
    first = main(["check", str(root)]), capsys.readouterr().out
    visit = root / "machines" / "m2" / "visits" / "v1.yaml"
    visit.write_text(visit.read_text(encoding="utf-8").replace("50.0 Hz", "50,0 Hz"),
                     encoding="utf-8")
    assert main(["check", str(root)]) == 2
    err = capsys.readouterr().err
    assert "machines/m2/visits/v1.yaml" in err and "uses a comma" in err
    visit.write_text(visit.read_text(encoding="utf-8").replace("50,0 Hz", "50.0 Hz"),
                     encoding="utf-8")
    assert (main(["check", str(root)]), capsys.readouterr().out) == first


def test_check_keeps_the_sign_off_states_of_unchanged_machines(tmp_path, capsys, monkeypatch):
    root = tmp_path / "demo"
    shutil.copytree(REPO / "demo_job", root)
    first = main(["check", str(root)]), capsys.readouterr().out
    assert "press-brake-1/2026-03-10-commissioning: signed, unchanged since sign-off" in first[1]
    visit = next((root / "machines" / "compressor-1" / "visits").glob("*periodic.yaml"))
    visit.write_text(visit.read_text(encoding="utf-8") + "\n# edited\n", encoding="utf-8")
    cached, fresh = _check_twice(root, [], capsys, monkeypatch)
    assert cached == fresh and cached[:2] == first
    signed = root / "machines" / "press-brake-1" / "visits" / "2026-03-10-commissioning.yaml"
    signed.write_text(signed.read_text(encoding="utf-8").replace(
        "L3-L1: {value: 0.3 V", "L3-L1: {value: 0.4 V"), encoding="utf-8")
    cached, fresh = _check_twice(root, [], capsys, monkeypatch)
    assert cached == fresh and "ALTERED AFTER SIGN-OFF" in cached[1].upper()


def test_check_cache_is_not_consulted_on_input_errors(make_job, capsys):
    root = make_job(visit={"readings": {"supply": {"frequency": "50,0 Hz"}}})
    assert main(["check", str(root)]) == 2
    assert main(["check", str(root)]) == 2
    assert capsys.readouterr().err.count("uses a comma") == 2
