"""Every fact the outputs show is decided once, in evaluation, and read as it stands.

The punch list follows common practice for handover [P]: a failed safety-critical item is
safety-critical, any other failure or a required item still open blocks acceptance, and a
reading an optional item leaves out is not a point to close. An instrument used after its
calibration due date is out of calibration on that visit (common practice for traceable
measurements [P]). Conditional statements are those of ILAC-G8:09/2019 cl. 4.2 [S]; their marks
are ours, a word and a shape so that a record reads without colour (WCAG 2.2 SC 1.4.1, use of
colour [S]).
"""

from __future__ import annotations

import dataclasses

from acceptance.cli import main
from acceptance.commands.check import machine_lines
from acceptance.commands.compare import comparisons
from acceptance.evaluation import evaluate_job
from acceptance.history import compare_visits, trend_series
from acceptance.loading import load_job
from acceptance.rendering.html import make_environment
from acceptance.rendering.review import index_options
from acceptance.results import ChangeClass, Severity, Verdict, VisitState

from .conftest import DEMO_JOB
from .test_evaluation import PASSING_SUPPLY, rollup_job
from .test_history import MACHINE, _visit, _winding


def test_the_punch_list_weighs_each_open_point(make_job, evaluate):
    result = evaluate(rollup_job(make_job, lockout={"tester_proven_after": "no"},
                                 supply={"frequency": "51 Hz"}))
    visit = result.visit()
    severities = {d.item: d.severity for d in visit.deficiencies}
    assert severities["lockout.tester_proven_after"] is Severity.SAFETY_CRITICAL
    assert severities["supply.frequency"] is Severity.BLOCKS_ACCEPTANCE  # failed, not safety
    # The optional d.c. component left out is not a point to close.
    assert result.item("supply.dc_component").verdict is Verdict.NOT_TESTED
    assert "supply.dc_component" not in severities
    assert [d.visit for d in result.result.deficiencies] == ["v1"] * len(visit.deficiencies)


def test_a_required_item_not_tested_blocks_acceptance_and_counts_as_open(make_job, evaluate):
    result = evaluate(rollup_job(make_job, supply={"frequency": None}))
    visit = result.visit()
    assert [(d.item, d.verdict, d.severity) for d in visit.deficiencies] == [
        ("supply.frequency", Verdict.NOT_TESTED, Severity.BLOCKS_ACCEPTANCE)]
    assert visit.open_required == 1
    assert result.result.state_counts == ((VisitState.PASS, 0),
                                          (VisitState.PASS_WITH_DEFICIENCIES, 0),
                                          (VisitState.INCOMPLETE, 1), (VisitState.FAIL, 0))


def test_calibration_on_each_visit_is_judged_in_evaluation(make_job, evaluate):
    lapsed = {"instruments": [{"id": "dmm-1", "kind": "multimeter", "response": "true-rms",
                               "category": "CAT III 600 V", "calibrated": "2025-01-01",
                               "calibration_due": "2026-01-01"}]}
    result = evaluate(make_job(instruments=lapsed,
                               visit={"readings": {"supply": PASSING_SUPPLY}}))
    (use,) = result.visit().instrument_uses
    assert (use.instrument, use.valid, use.validity) == ("dmm-1", False, "lapsed")
    assert use.state == "calibration due before the visit (expired)"
    (entry,) = result.result.instruments
    assert entry.uses == (use,) and entry.lapsed_uses == 1


def test_each_mark_has_one_definition_for_the_terminal_the_pages_and_the_filters(
        make_job, evaluate):
    marks = {verdict: verdict.mark for verdict in Verdict}
    # A conditional statement keeps the shape of its plain verdict and adds a question mark.
    assert marks[Verdict.CONDITIONAL_PASS] == marks[Verdict.PASS] + "?"
    assert marks[Verdict.CONDITIONAL_FAIL] == marks[Verdict.FAIL] + "?"
    assert len(set(marks.values())) == len(Verdict)
    env = make_environment()
    for verdict in (*Verdict, *VisitState):
        badge = env.from_string("{{ v | badge }}").render(v=verdict)
        assert f">{verdict.mark}</span> {verdict.word}</span>" in badge
    result = evaluate(rollup_job(make_job, supply={"frequency": "51 Hz"}))
    lines = "\n".join(machine_lines(result.result.machines[0]))
    assert f"{Verdict.FAIL.mark} {Verdict.FAIL.word}" in lines
    assert f"  {VisitState.PASS_WITH_DEFICIENCIES.mark} v1 " in lines
    states = index_options(result.result)["states"]
    assert [(s["label"], s["mark"]) for s in states] == [(s.word, s.mark) for s in VisitState]


def test_change_classes_have_one_mark_for_compare_and_the_pages(make_job, capsys) -> None:
    assert len({c.mark for c in ChangeClass}) == len(ChangeClass)
    env = make_environment()
    for classification in ChangeClass:
        badge = env.from_string('{% from "_changes.html" import change_badge %}'
                                "{{ change_badge(c) }}").render(c=classification)
        assert f">{classification.mark}</span> {classification.word}</span>" in badge
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "20.0 °C")),
        "v2": _visit("periodic", "2026-09-10", _winding("27.0 Ω", "20.0 °C")),
    })
    # 100·(27.0/28.6 − 1) = −5.59 % ≥ act 5 % (windings checklist [P])
    assert main(["compare", str(root)]) == 1
    assert f"  {ChangeClass.ACT.mark:<2} {ChangeClass.ACT.word:<14} windings.resistance" in \
        capsys.readouterr().out


def test_changes_and_trends_are_computed_once_and_read_after(make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "21.0 °C")),
        "v2": _visit("periodic", "2026-06-10", _winding("29.0 Ω", "24.0 °C")),
        "v3": _visit("periodic", "2026-09-10", _winding("29.4 Ω", "28.0 °C")),
    })
    result = evaluate_job(load_job(root))
    (machine,) = result.machines
    assert machine.trends and machine.trends == trend_series(machine)
    found = comparisons(result)
    # compare reads the changes evaluation attached, the very same records ...
    assert [c.changes for c in found] == [machine.visits[1].changes, machine.visits[2].changes]
    assert all(a is b.changes for a, b in zip([c.changes for c in found], machine.visits[1:],
                                              strict=True))
    # ... and compares afresh only against another baseline.
    (other,) = comparisons(result, baseline="v2", visit="v3")
    assert other.baseline == "v2"
    assert other.changes == compare_visits(machine, "v2", "v3").changes
    assert other.changes != machine.visits[2].changes


def test_the_demo_nameplate_and_sign_off_rows_are_typed() -> None:
    result = evaluate_job(load_job(DEMO_JOB))
    machine = result.machines[0]
    assert machine.nameplate[0].label == "rated voltage"
    signed = next(v for v in result.visits if v.sign_off)
    assert all(isinstance(s.date, str) and s.name for s in signed.sign_off)


def test_the_demo_shows_every_kind_of_fact() -> None:
    # The demo exercises what the records show: deficiencies, a lapsed or valid calibration,
    # trends over visits; otherwise the golden copy would guard little.
    result = evaluate_job(load_job(DEMO_JOB))
    assert result.deficiencies
    assert any(use for v in result.visits for use in v.instrument_uses)
    assert any(m.trends for m in result.machines)


def test_check_lists_the_punch_list_evaluation_made() -> None:
    # The demo has a visit re-measured as left: check shows those items as left.
    result = evaluate_job(load_job(DEMO_JOB))
    assert any(v.as_left for v in result.visits)
    for machine in result.machines:
        for visit in machine.visits:
            text = "\n".join(machine_lines(dataclasses.replace(machine, visits=(visit,))))
            left = {item.key for item in visit.as_left}
            for point in visit.deficiencies:
                where = point.item + (f"[{point.element}]" if point.element else "")
                assert (f"{where}: " in text) is (point.item not in left)
            for point in visit.as_left_deficiencies:
                assert f"as left: {point.item}" in text
