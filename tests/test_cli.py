"""The command line: exit codes, messages on stderr, the JSON results and every --help."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from acceptance import cli
from acceptance.results import RESULTS_SCHEMA, Severity, Verdict, VisitState
from tests.conftest import DEMO_JOB, PASSING_SUPPLY

SCRIPT = Path(sys.executable).with_name("acceptance")


def run_cli(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    command = [str(SCRIPT)] if SCRIPT.exists() else [sys.executable, "-m", "acceptance.cli"]
    return subprocess.run([*command, *args], capture_output=True, text=True, cwd=cwd,
                          timeout=120, check=False)


def passing_job(make_job) -> Path:
    return make_job(visit={"readings": {"supply": PASSING_SUPPLY}})


def test_check_exits_0_when_every_visit_passes(make_job, capsys):
    assert cli.main(["check", str(passing_job(make_job))]) == 0
    out = capsys.readouterr().out
    assert "v1 (commissioning, 2026-03-10): PASS" in out
    assert out.rstrip().endswith("1 visit: 1 pass")


@pytest.mark.parametrize(
    "supply",
    [
        {**PASSING_SUPPLY, "frequency": "51 Hz"},  # a failure: pass with deficiencies
        {key: value for key, value in PASSING_SUPPLY.items() if key != "frequency"},  # missing
    ],
    ids=["fail", "incomplete"],
)
def test_check_exits_1_when_any_visit_does_not_pass(make_job, capsys, supply):
    assert cli.main(["check", str(make_job(visit={"readings": {"supply": supply}}))]) == 1
    assert "supply.frequency" in capsys.readouterr().out


def test_check_exits_1_on_the_demo(capsys):
    # The demo job shows deficiencies on purpose, so not every visit passes.
    assert cli.main(["check", str(DEMO_JOB)]) == 1
    visits = len(list(DEMO_JOB.glob("machines/*/visits/*.yaml")))
    assert capsys.readouterr().out.rstrip().splitlines()[-1].startswith(f"{visits} visits: ")


def test_check_exits_2_on_input_errors_with_every_message(make_job, tmp_path):
    job = "title: Test job\nsite: {name: Test site}\ncontractor: {name: C, phone: 1}\n"
    visit = ("kind: commissioning\ndate: 2026-03-10\nperformed_by: [Test person]\n"
             "default_instrument: dmm-2\nreadings:\n  supply:\n    frequency: 50,0 Hz\n"
             "    voltag: {L1-L2: 400 V}\n")
    completed = run_cli("check", str(make_job(job=job, visit=visit)), cwd=tmp_path)
    assert completed.returncode == 2
    assert completed.stdout == ""
    assert "Traceback" not in completed.stderr
    prefix = "job/machines/m1/visits/v1.yaml"
    # All of them, from both files, sorted by file, line and column.
    assert completed.stderr.splitlines() == [
        "job/job.yaml:3:23: contractor.phone: unknown field 'phone'; known: name, contact",
        f"{prefix}:4:1: default_instrument: instrument 'dmm-2' is not in instruments.yaml; "
        "did you mean 'dmm-1'?",
        f"{prefix}:7:5: readings.supply.frequency: '50,0 Hz' uses a comma; write the decimal "
        "separator as a point (e.g. '50.0 Hz') and no thousands separator",
        f"{prefix}:8:5: readings.supply.voltag: checklist 'supply' has no item 'voltag'; "
        "did you mean 'voltage'?",
    ]


def test_check_on_a_missing_folder_exits_2(tmp_path):
    completed = run_cli("check", str(tmp_path / "nowhere"))
    assert completed.returncode == 2
    assert completed.stderr == (f"{tmp_path / 'nowhere'}:1:1: is not a job folder "
                                "(no such directory)\n")
    assert "Traceback" not in completed.stderr


# The documented shape of results.json / check --json (README, "Results file").
DOCUMENTED = {
    "job": {"schema", "title", "site", "contractor", "reference_temperature", "standards",
            "overrides", "tool_version", "instruments", "machines"},
    "instrument": {"id", "kind", "model", "serial", "response", "category", "calibrated",
                   "calibration_due"},
    "override": {"item", "check", "reason", "source", "params"},
    "machine": {"id", "name", "kind", "area", "nameplate", "latest_state", "visits"},
    "visit": {"id", "machine", "kind", "date", "performed_by", "state", "counts", "conditions",
              "notes", "attachments", "sign_off", "source_file", "checklists", "open_required",
              "deficiencies", "instrument_uses"},
    "deficiency": {"item", "title", "element", "reading", "verdict", "severity"},
    "instrument_use": {"instrument", "calibration", "valid"},
    "checklist": {"id", "title", "purpose", "version", "origin", "caution", "verdict", "items"},
    "item": {"checklist", "id", "title", "unit", "safety_critical", "required", "verdict",
             "guidance", "caution", "elements"},
    "element": {"element", "verdict", "reading", "value", "unit", "basis", "instrument",
                "extras", "note", "line", "checks"},
    "check": {"id", "rule", "verdict", "limit", "source", "message", "override", "compared",
              "steps"},
    "step": {"label", "text", "value", "unit", "formula"},
}

VERDICTS = {v.value for v in Verdict}
STATES = {s.value for s in VisitState}
SEVERITIES = {s.value for s in Severity}


def assert_documented_shape(data: dict) -> int:
    """Check every level against the README; return how many numeric values were seen."""
    assert data["schema"] == RESULTS_SCHEMA == "acceptance-results/1"
    assert DOCUMENTED["job"] <= data.keys()
    for instrument in data["instruments"]:
        assert DOCUMENTED["instrument"] <= instrument.keys()
    for override in data["overrides"]:
        assert DOCUMENTED["override"] <= override.keys()
    values = 0
    for machine in data["machines"]:
        assert DOCUMENTED["machine"] <= machine.keys()
        assert all(isinstance(v, str) for v in machine["nameplate"].values())
        for visit in machine["visits"]:
            assert DOCUMENTED["visit"] <= visit.keys()
            assert visit["state"] in STATES
            assert set(visit["counts"]) == VERDICTS
            assert isinstance(visit["open_required"], int)
            for point in visit["deficiencies"]:
                assert DOCUMENTED["deficiency"] <= point.keys()
                assert point["verdict"] in VERDICTS and point["severity"] in SEVERITIES
            for use in visit["instrument_uses"]:
                assert DOCUMENTED["instrument_use"] <= use.keys()
                assert isinstance(use["valid"], bool) and use["calibration"]
            for checklist in visit["checklists"]:
                assert DOCUMENTED["checklist"] <= checklist.keys()
                assert checklist["verdict"] in VERDICTS
                for item in checklist["items"]:
                    assert DOCUMENTED["item"] <= item.keys()
                    assert item["verdict"] in VERDICTS
                    for element in item["elements"]:
                        assert DOCUMENTED["element"] <= element.keys()
                        assert element["verdict"] in VERDICTS
                        if element["value"] is not None:
                            # Every reading carries its unit.
                            assert isinstance(element["value"], int | float)
                            assert element["unit"], element
                            values += 1
                        for check in element["checks"]:
                            assert DOCUMENTED["check"] <= check.keys()
                            assert check["verdict"] in VERDICTS
                            assert check["limit"] and check["source"]
                            for step in check["steps"]:
                                assert DOCUMENTED["step"] <= step.keys()
                                assert isinstance(step["unit"], str)
                                if step["value"] is not None:
                                    # A pure number names its unit too: "1".
                                    assert step["unit"], step
                                    values += 1
        if machine["visits"]:
            assert machine["latest_state"] == machine["visits"][-1]["state"]
    return values


def test_check_json_has_the_documented_shape(capsys):
    assert cli.main(["check", "--json", str(DEMO_JOB)]) == 1
    data = json.loads(capsys.readouterr().out)
    assert assert_documented_shape(data) > 50
    assert len([v for m in data["machines"] for v in m["visits"]]) == len(
        list(DEMO_JOB.glob("machines/*/visits/*.yaml")))


def test_check_json_on_a_small_job(make_job, capsys):
    assert cli.main(["check", "--json", str(passing_job(make_job))]) == 0
    data = json.loads(capsys.readouterr().out)
    assert_documented_shape(data)
    (visit,) = data["machines"][0]["visits"]
    assert visit["date"] == "2026-03-10"
    voltage = next(i for c in visit["checklists"] for i in c["items"] if i["id"] == "voltage")
    first = voltage["elements"][0]
    assert (first["element"], first["reading"], first["value"], first["unit"]) == (
        "L1-L2", "401 V", 401.0, "V")


@pytest.mark.parametrize("command", [name for name, _ in cli.COMMANDS])
def test_help_on_every_command(command, capsys):
    with pytest.raises(SystemExit) as caught:
        cli.main([command, "--help"])
    assert caught.value.code == 0
    assert f"acceptance {command}" in capsys.readouterr().out


def test_top_level_help_lists_every_command(capsys):
    with pytest.raises(SystemExit) as caught:
        cli.main(["--help"])
    assert caught.value.code == 0
    out = capsys.readouterr().out
    for name, _ in cli.COMMANDS:
        assert name in out


def test_help_through_the_installed_script():
    completed = run_cli("check", "--help")
    assert completed.returncode == 0
    assert "--json" in completed.stdout


# ------------------------------------------------ computations that cannot be done


def test_a_refused_correction_is_an_undetermined_check_not_a_crash(make_job, capsys):
    # R₂ = R₁ · (k + θ₂)/(k + θ₁) has no meaning at or below θ₁ = −k: k = 235 °C for copper
    # (IEC 60034-1 cl. 8.6.2, the inferred zero-resistance temperature) [M]. A typed
    # winding temperature of −240 °C must leave that one check undetermined, with the reason,
    # and every other check of the visit evaluated.
    machine = {"nameplate": {"windings": [{"id": "w", "name": "W", "material": "copper",
                                           "thermal_class": "F"}]},
               "checklists": ["supply", "windings"]}
    root = make_job(machine=machine, visit={"readings": {
        "supply": PASSING_SUPPLY,
        "windings": {"resistance": {"w": {"value": "2.500 Ω", "temperature": "-240 °C"}}}}})
    assert cli.main(["check", str(root), "--all"]) == 1  # a visit that did not pass, no crash
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err + captured.out
    assert "INCOMPLETE" in captured.out
    line = next(text for text in captured.out.splitlines()
                if "cannot be computed from these values" in text)
    assert "-240 °C is at or below -k (-235 °C)" in line
    assert "✓ pass             supply.frequency" in captured.out

    assert cli.main(["check", str(root), "--json"]) == 1
    document = json.loads(capsys.readouterr().out)
    items = document["machines"][0]["visits"][0]["checklists"][1]["items"]
    resistance = next(item for item in items if item["id"] == "resistance")
    check = resistance["elements"][0]["checks"][0]
    assert check["verdict"] == Verdict.UNDETERMINED.value
    assert "at or below -k" in check["message"]


def _raise_inside(monkeypatch) -> None:
    from acceptance.commands import check

    def broken(args):
        raise RuntimeError("a fault of the tool")

    monkeypatch.setattr(check, "run", broken)


def test_an_internal_error_has_its_own_exit_code_and_asks_for_a_report(
        make_job, monkeypatch, capsys):
    _raise_inside(monkeypatch)
    root = passing_job(make_job)
    assert cli.main(["check", str(root)]) == cli.INTERNAL_ERROR_EXIT == 4
    err = capsys.readouterr().err
    assert "Traceback" not in err
    assert "internal error: RuntimeError: a fault of the tool" in err
    assert "Please report it with the command line (acceptance check " in err
    assert "acceptance 0." in err  # the version, for the report


def test_debug_shows_the_traceback_of_an_internal_error(make_job, monkeypatch, capsys):
    _raise_inside(monkeypatch)
    assert cli.main(["--debug", "check", str(passing_job(make_job))]) == 4
    err = capsys.readouterr().err
    assert err.startswith("Traceback (most recent call last):")
    assert "RuntimeError: a fault of the tool" in err


def test_debug_changes_nothing_when_nothing_fails(make_job, capsys):
    assert cli.main(["--debug", "check", str(passing_job(make_job))]) == 0
    assert capsys.readouterr().err == ""


# Bugs found by trying the tool (issue "every verdict on its basis", item 12).

def test_a_closed_stdout_ends_quietly_without_a_traceback():
    """`acceptance compare JOB --json | head`: the reader goes away before the output ends."""
    read_end, write_end = os.pipe()
    os.close(read_end)  # every write now fails with EPIPE, whatever the output's length
    try:
        command = [str(SCRIPT)] if SCRIPT.exists() else [sys.executable, "-m", "acceptance.cli"]
        done = subprocess.run([*command, "compare", str(DEMO_JOB), "--json"], stdout=write_end,
                              stderr=subprocess.PIPE, text=True, timeout=120, check=False)
    finally:
        os.close(write_end)
    assert "Traceback" not in done.stderr
    assert "BrokenPipeError" not in done.stderr
    assert done.stderr == ""
    assert done.returncode == cli.BROKEN_PIPE_EXIT


@pytest.mark.parametrize(("count", "text"), [(0, "0 visits"), (1, "1 visit"), (2, "2 visits")])
def test_counts_agree_with_their_noun(count, text):
    from acceptance.wording import counted
    assert counted(count, "visit") == text
    assert counted(1, "mismatch", "mismatches") == "1 mismatch"
    assert counted(3, "mismatch", "mismatches") == "3 mismatches"


def test_compare_one_machine_with_one_visit_speaks_of_that_machine(capsys):
    assert cli.main(["compare", str(DEMO_JOB), "mag-table-1"]) == 0
    out = capsys.readouterr().out
    assert "no machine has a visit after its baseline" not in out
    assert out.strip() == ("mag-table-1 has 1 visit (2026-03-09-commissioning); a comparison "
                           "needs a later visit")


def test_compare_one_machine_with_later_visits_compares_them(capsys):
    assert cli.main(["compare", str(DEMO_JOB), "press-brake-1"]) in (0, 1)
    out = capsys.readouterr().out
    assert out.startswith("press-brake-1: 2026-09-09-periodic")
