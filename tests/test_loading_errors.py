"""Every problem in a job folder, reported as ``file:line:column: key.path: message``."""

from __future__ import annotations

import os

import pytest

from acceptance.errors import InputError
from acceptance.loading import load_job

MACHINE = "job/machines/m1/machine.yaml"
VISIT = "job/machines/m1/visits/v1.yaml"

# A three-phase machine with a winding, a capacitor and lockout, supply and windings
# checklists; written out so each test's line numbers can be read off the text.
MACHINE_YAML = """\
name: Test machine
kind: test rig
nameplate:
  rated_voltage: 400 V
  phases: 3
  frequency: 50 Hz
  windings:
    - {id: main, name: Main winding, material: copper, thermal_class: F}
checklists: [lockout, supply, windings]
"""

VISIT_HEAD = """\
kind: commissioning
date: 2026-03-10
performed_by: [Test person]
default_instrument: dmm-1
"""


def problems_of(root) -> list[str]:
    with pytest.raises(InputError) as caught:
        load_job(root)
    return [str(p) for p in caught.value.problems]


def test_misspelt_field_suggests_the_right_one(make_job):
    machine = MACHINE_YAML.replace("  frequency: 50 Hz\n", "  frequncy: 50 Hz\n")
    assert problems_of(make_job(machine=machine)) == [
        f"{MACHINE}:6:3: nameplate.frequncy: unknown field 'frequncy'; did you mean 'frequency'?"
    ]


def test_unknown_field_in_a_reading(make_job):
    visit = VISIT_HEAD + "readings:\n  supply:\n    frequency: {value: 50 Hz, instrumnet: dmm-1}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:31: readings.supply.frequency.instrumnet: unknown field 'instrumnet'; "
        "did you mean 'instrument'?"
    ]


def test_missing_required_field(make_job):
    visit = VISIT_HEAD.replace("performed_by: [Test person]\n", "") + "readings: {}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:1:1: performed_by: required field 'performed_by' is missing; add it"
    ]


def test_missing_nested_field_points_at_its_parent(make_job):
    machine = MACHINE_YAML.replace("  phases: 3\n", "")
    assert problems_of(make_job(machine=machine)) == [
        f"{MACHINE}:3:1: nameplate.phases: required field 'phases' is missing; add it"
    ]


def test_unknown_instrument(make_job):
    visit = VISIT_HEAD + "readings:\n  supply:\n    frequency: {value: 50 Hz, instrument: dmm-2}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:31: readings.supply.frequency.instrument: instrument 'dmm-2' is not in "
        "instruments.yaml; did you mean 'dmm-1'?"
    ]


def test_unknown_default_instrument(make_job):
    visit = VISIT_HEAD.replace("dmm-1", "dmm-9") + "readings: {}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:4:1: default_instrument: instrument 'dmm-9' is not in instruments.yaml; "
        "did you mean 'dmm-1'?"
    ]


def test_unknown_checklist_item(make_job):
    visit = VISIT_HEAD + "readings:\n  supply:\n    frequecny: 50 Hz\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:5: readings.supply.frequecny: checklist 'supply' has no item 'frequecny'; "
        "did you mean 'frequency'?"
    ]


def test_checklist_not_listed_for_the_machine(make_job):
    visit = VISIT_HEAD + "readings:\n  capacitors:\n    capacitance: {}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:6:3: readings.capacitors: checklist 'capacitors' is not listed for this "
        "machine; known: lockout, supply, windings"
    ]


def test_per_element_item_given_a_single_value(make_job):
    visit = VISIT_HEAD + "readings:\n  supply:\n    voltage: 400 V\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:5: readings.supply.voltage: 'voltage' is recorded per line; give one "
        "reading for each of: L1-L2, L2-L3, L3-L1"
    ]


def test_element_not_on_the_machine(make_job):
    visit = (VISIT_HEAD + "readings:\n  windings:\n    resistance:\n"
             "      aux: {value: 1.2 Ω, temperature: 20 °C}\n")
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:8:7: readings.windings.resistance.aux: 'aux' is not a winding of this "
        "machine; known: main"
    ]


def test_bad_unit_on_a_reading(make_job):
    visit = VISIT_HEAD + "readings:\n  supply:\n    frequency: {value: 50 hz}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:17: readings.supply.frequency.value: '50 hz': unknown unit 'hz'; "
        "did you mean 'Hz'?"
    ]


def test_wrong_dimension_on_a_reading(make_job):
    visit = VISIT_HEAD + "readings:\n  supply:\n    frequency: 50 V\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:5: readings.supply.frequency: '50 V' is a voltage, but a frequency is "
        "expected here (Hz, kHz)"
    ]


def test_safety_critical_item_cannot_be_not_applicable(make_job):
    visit = VISIT_HEAD + "readings:\n  lockout:\n    tester_proven_before: n/a\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:5: readings.lockout.tester_proven_before: a safety-critical item cannot "
        "be marked not applicable; record the reading, or leave it blank and the visit stays "
        "incomplete"
    ]


def test_confirmation_that_is_not_yes_or_no(make_job):
    visit = VISIT_HEAD + "readings:\n  lockout:\n    energy_sources: maybe\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:5: readings.lockout.energy_sources: 'maybe' is not a confirmation; "
        "write yes or no"
    ]


@pytest.mark.parametrize("written", ["done", "true", "Y", "confirmed", "n", "not done"])
def test_confirmation_takes_only_the_documented_words(make_job, written):
    # README: a confirmation is yes or no; any other word is refused with that advice.
    visit = VISIT_HEAD + f"readings:\n  lockout:\n    energy_sources: {written}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:5: readings.lockout.energy_sources: '{written}' is not a confirmation; "
        "write yes or no"
    ]


@pytest.mark.parametrize("written", ["yes", "Yes", "NO"])
def test_confirmation_in_any_letter_case(make_job, written):
    visit = VISIT_HEAD + f"readings:\n  lockout:\n    energy_sources: {written}\n"
    load_job(make_job(machine=MACHINE_YAML, visit=visit))  # no InputError


def test_several_problems_across_files_all_reported_sorted(make_job):
    instruments = ("instruments:\n"
                   "  - {id: dmm-1, kind: multimeter, response: true-rms}\n"
                   "  - {id: ohm-1, kind: ohmmeter, respons: not applicable}\n")
    machine = MACHINE_YAML.replace("checklists: [lockout, supply, windings]",
                                   "checklists: [lockout, suply, windings]")
    visit = (VISIT_HEAD.replace("default_instrument: dmm-1\n", "")
             + "readings:\n  lockout:\n    tester_proven_before: n/a\n"
             "  windings:\n    resistance:\n      main: {value: '1,2 Ω', temperature: 20 °C}\n")
    job = "title: Test job\nsite: {name: Test site}\n"
    root = make_job(job=job, instruments=instruments, machine=machine, visit=visit)
    # Sorted by file, then line, then column (numerically: 3:5 before 3:33).
    assert problems_of(root) == [
        "job/instruments.yaml:3:5: instruments[1].response: required field 'response' is "
        "missing; add it",
        "job/instruments.yaml:3:33: instruments[1].respons: unknown field 'respons'; "
        "did you mean 'response'?",
        "job/job.yaml:1:1: contractor: required field 'contractor' is missing; add it",
        f"{MACHINE}:9:23: checklists[1]: no checklist 'suply'; did you mean 'supply'?",
        f"{VISIT}:6:5: readings.lockout.tester_proven_before: a safety-critical item cannot "
        "be marked not applicable; record the reading, or leave it blank and the visit stays "
        "incomplete",
        f"{VISIT}:9:14: readings.windings.resistance.main.value: '1,2 Ω' uses a comma; write "
        "the decimal separator as a point (e.g. '1.2 Ω') and no thousands separator",
    ]


def test_invalid_register_does_not_hide_its_instruments(make_job):
    instruments = ("instruments:\n"
                   "  - {id: dmm-1, kind: multimeter, response: true-rms}\n"
                   "  - {id: ohm-1, kind: ohmmeter, respons: not applicable}\n")
    visit = VISIT_HEAD + "readings: {}\n"
    root = make_job(instruments=instruments, machine=MACHINE_YAML, visit=visit)
    assert not [p for p in problems_of(root) if p.startswith(VISIT)]


def test_attachment_leaving_the_machine_folder(make_job):
    visit = (VISIT_HEAD + "readings: {}\nattachments:\n"
             "  - {path: ../../job.yaml, title: Job file}\n"
             "  - {path: /etc/hostname, title: Host}\n")
    root = make_job(machine=MACHINE_YAML, visit=visit)
    assert problems_of(root) == [
        f"{VISIT}:7:6: attachments[0].path: '../../job.yaml' leaves the machine folder; "
        "attachments must sit inside it (write a path relative to the machine folder)",
        f"{VISIT}:8:6: attachments[1].path: '/etc/hostname' leaves the machine folder; "
        "attachments must sit inside it (write a path relative to the machine folder)",
    ]


def test_attachment_through_a_link_leaving_the_machine_folder(make_job, tmp_path):
    outside = tmp_path / "outside.txt"
    outside.write_text("not part of the job\n", encoding="utf-8")
    visit = VISIT_HEAD + "readings: {}\nattachments:\n  - {path: notes.txt, title: Notes}\n"
    root = make_job(machine=MACHINE_YAML, visit=visit)
    os.symlink(outside, root / "machines" / "m1" / "notes.txt")
    assert problems_of(root) == [
        f"{VISIT}:7:6: attachments[0].path: 'notes.txt' resolves outside the machine folder "
        "(a link?); copy the file into the machine folder"
    ]


def test_missing_attachment(make_job):
    visit = VISIT_HEAD + "readings: {}\nattachments:\n  - {path: capture.csv, title: Capture}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:7:6: attachments[0].path: attachment 'capture.csv' not found in m1/"
    ]


def test_bad_date(make_job):
    visit = VISIT_HEAD.replace("2026-03-10", "2026-02-30") + "readings: {}\n"
    assert problems_of(make_job(machine=MACHINE_YAML, visit=visit)) == [
        f"{VISIT}:2:1: date: '2026-02-30' is not a calendar date; check the month and day"
    ]


def test_no_job_file(tmp_path):
    (tmp_path / "empty").mkdir()
    assert problems_of(tmp_path / "empty") == [
        f"{tmp_path / 'empty' / 'job.yaml'}:1:1: not found; a job folder starts with job.yaml "
        "(see README)"
    ]


def test_a_job_checklist_replaces_the_built_in_one_of_its_id(make_job):
    # A local version of a built-in checklist is the documented way to adopt local rules
    # (README, Checklists); the record names where each checklist came from.
    from acceptance.resources import checklists_dir

    local = (checklists_dir() / "supply.yaml").read_text(encoding="utf-8")
    local = local.replace("\ntitle: ", "\ntitle: Local supply checks — was ", 1)
    job = load_job(make_job(checklists={"supply.yaml": local}))
    assert job.checklists["supply"].origin == "job/checklists/supply.yaml"
    assert job.checklists["supply"].model.title.startswith("Local supply checks")
