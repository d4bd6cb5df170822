"""The punch list's lifecycle: raised, closed by a later pass (as found or as left), kept
open by a later fail, accepted as an exception, overdue; the file's entries; the CSV; check.

The readings are the small job's 400 V 50 Hz machine against the built-in supply
checklist: IEC 60204-1:2016 cl. 4.3.2 allows 0.99–1.01 × nominal frequency, 49.5–50.5 Hz
(reference values §3) [M]; 48.0 Hz fails and 50.0 Hz passes.
"""

from __future__ import annotations

import contextlib
import csv
import datetime as _dt
import io
from pathlib import Path
from typing import Any

import pytest

from acceptance.cli import main
from acceptance.errors import InputError
from acceptance.evaluation import evaluate_job
from acceptance.evaluation.punch_list import build_date
from acceptance.loading import load_job
from acceptance.rendering.review import deficiencies_csv
from acceptance.results import DeficiencyState, JobResult, PunchItem

from .conftest import PASSING_SUPPLY, merge, write_job

FAILING_FREQUENCY = merge(PASSING_SUPPLY, {"frequency": "48.0 Hz"})  # below 49.5 Hz [M]
TODAY = _dt.date(2026, 6, 1)


def _visit(date: str, supply: dict[str, Any], **more: Any) -> dict[str, Any]:
    return {"date": date, "readings": {"supply": supply}, **more}


def _evaluate(root: Path, visits: dict[str, Any], punch: Any = None,
              today: _dt.date = TODAY) -> JobResult:
    write_job(root, visits=visits,
              files={"punch_list.yaml": punch} if punch is not None else None)
    return evaluate_job(load_job(root), today=today)


def _only(result: JobResult) -> PunchItem:
    [item] = result.punch_list
    return item


def test_a_fail_raises_an_open_deficiency(tmp_path):
    result = _evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", FAILING_FREQUENCY)})
    item = _only(result)
    assert (item.key, item.state, item.raised.visit, item.closed_by) == (
        "m1/supply.frequency", DeficiencyState.OPEN, "v1", None)
    assert result.machines[0].visits[0].open_deficiencies == 1
    assert not result.machines[0].handover.ready
    assert "1 open deficiency" in result.machines[0].handover.reasons


def test_a_later_pass_closes_it_and_names_the_visit(tmp_path):
    result = _evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", FAILING_FREQUENCY),
                                          "v2": _visit("2026-03-20", PASSING_SUPPLY)})
    item = _only(result)
    assert (item.state, item.closed_by, item.closed_as_left, item.closed_reading) == (
        DeficiencyState.CLOSED, "v2", False, "50.0 Hz")
    # The index counts open deficiencies only: v1 raised one, and it is closed.
    assert [v.open_deficiencies for v in result.machines[0].visits] == [0, 0]
    assert result.machines[0].handover.ready


def test_the_same_visits_as_left_pass_closes_it(tmp_path):
    visit = _visit("2026-03-10", FAILING_FREQUENCY,
                   as_left={"supply": {"frequency": "50.1 Hz"}})
    item = _only(_evaluate(tmp_path / "job", {"v1": visit}))
    assert (item.state, item.closed_by, item.closed_as_left) == (
        DeficiencyState.CLOSED, "v1", True)


def test_a_later_fail_keeps_it_open_and_says_so(tmp_path):
    result = _evaluate(tmp_path / "job", {
        "v1": _visit("2026-03-10", FAILING_FREQUENCY),
        "v2": _visit("2026-03-20", merge(PASSING_SUPPLY, {"frequency": "51.0 Hz"})),
        "v3": _visit("2026-04-01", PASSING_SUPPLY)})
    item = _only(result)
    assert (item.state, item.failed_again, item.closed_by) == (
        DeficiencyState.CLOSED, ("v2",), "v3")
    open_still = _only(_evaluate(tmp_path / "job2", {
        "v1": _visit("2026-03-10", FAILING_FREQUENCY),
        "v2": _visit("2026-03-20", merge(PASSING_SUPPLY, {"frequency": "51.0 Hz"}))}))
    assert (open_still.state, open_still.failed_again, open_still.raised.visit) == (
        DeficiencyState.OPEN, ("v2",), "v1")


def test_a_conditional_pass_and_an_optional_point_left_out_raise_nothing(tmp_path):
    # supply.dc_component is optional and left out of PASSING_SUPPLY.
    result = _evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", PASSING_SUPPLY)})
    assert result.punch_list == []


def test_a_required_point_not_tested_raises_one(tmp_path):
    supply = {key: value for key, value in PASSING_SUPPLY.items() if key != "frequency"}
    item = _only(_evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", supply)}))
    assert (item.item, item.raised.verdict.word) == ("supply.frequency", "not tested")


ACCEPTED = {"entries": [{"machine": "m1", "item": "supply.frequency", "owner": "A. Fitter",
                         "accepted": {"by": "B. Client", "date": "2026-03-15",
                                      "reason": "the generator set runs at 48 Hz by design",
                                      "until": "2026-12-31"}}]}


def test_an_accepted_exception_is_accepted_never_a_pass(tmp_path):
    result = _evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", FAILING_FREQUENCY)},
                       punch=ACCEPTED)
    item = _only(result)
    assert item.state is DeficiencyState.ACCEPTED
    assert item.acceptance is not None and item.acceptance.by == "B. Client"
    assert item.latest.word == "fail"  # the reading still fails; it is accepted, not passed
    handover = result.machines[0].handover
    # The visit is "pass with deficiencies": the accepted exception alone lets it hand over.
    assert (handover.ready, handover.accepted, handover.open) == (True, 1, 0)


def test_an_acceptance_that_ran_out_leaves_it_open(tmp_path):
    item = _only(_evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", FAILING_FREQUENCY)},
                           punch=ACCEPTED, today=_dt.date(2027, 1, 1)))
    assert item.state is DeficiencyState.OPEN


def test_overdue_is_judged_against_the_build_date(tmp_path):
    punch = {"entries": [{"machine": "m1", "item": "supply.frequency",
                          "owner": "A. Fitter", "due": "2026-04-01"}]}
    visits = {"v1": _visit("2026-03-10", FAILING_FREQUENCY)}
    before = _only(_evaluate(tmp_path / "a", visits, punch, today=_dt.date(2026, 4, 1)))
    after = _only(_evaluate(tmp_path / "b", visits, punch, today=_dt.date(2026, 4, 2)))
    assert (before.owner, before.due, before.overdue) == ("A. Fitter", _dt.date(2026, 4, 1),
                                                          False)
    assert after.overdue


def test_the_build_date_follows_source_date_epoch(monkeypatch):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1775001600")  # 2026-04-01T00:00:00Z
    assert build_date() == _dt.date(2026, 4, 1)


def test_an_entry_that_matches_no_deficiency_is_an_input_error(tmp_path):
    punch = {"entries": [{"machine": "m1", "item": "supply.frequency", "owner": "A. Fitter"}]}
    with pytest.raises(InputError) as caught:
        _evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", PASSING_SUPPLY)}, punch)
    assert [str(p) for p in caught.value.problems] == [
        "job/punch_list.yaml:3:3: entries[0].item: matches no deficiency of m1; m1 has no "
        "deficiency on supply.frequency; correct the entry or remove it"]


def test_the_list_runs_open_then_accepted_then_closed(tmp_path):
    supply = merge(FAILING_FREQUENCY, {"voltage": {"L1-L2": "300 V", "L2-L3": "300 V"}})
    later = merge(PASSING_SUPPLY, {"frequency": "48.0 Hz", "voltage": {"L2-L3": "300 V"}})
    result = _evaluate(tmp_path / "job", {"v1": _visit("2026-03-10", supply),
                                          "v2": _visit("2026-03-20", later)}, punch=ACCEPTED)
    # The voltage unbalance check sits on L3-L1 (checklist `element:`), so it fails there.
    assert [(p.key, p.state.value) for p in result.punch_list] == [
        ("m1/supply.voltage[L2-L3]", "open"),
        ("m1/supply.voltage[L3-L1]", "open"),
        ("m1/supply.frequency", "accepted"),
        ("m1/supply.voltage[L1-L2]", "closed")]
    rows = list(csv.DictReader(io.StringIO(deficiencies_csv(result.punch_list, result))))
    assert [(r["state"], r["item"], r["point"], r["visit"], r["closed_by"], r["owner"],
             r["accepted_by"]) for r in rows] == [
        ("open", "supply.voltage", "L2-L3", "v1", "", "", ""),
        ("open", "supply.voltage", "L3-L1", "v1", "", "", ""),
        ("accepted", "supply.frequency", "", "v1", "", "A. Fitter", "B. Client"),
        ("closed", "supply.voltage", "L1-L2", "v1", "v2", "", "")]
    assert rows[0]["link"] == "machines/m1/v1.html#supply-voltage"


def _check(root: Path) -> tuple[int, str]:
    out = io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(io.StringIO()):
        code = main(["check", str(root)])
    return code, out.getvalue()


def test_check_prints_the_open_ones_and_exits_1_until_closed_or_accepted(tmp_path,
                                                                         monkeypatch):
    monkeypatch.setenv("ACCEPTANCE_NO_CACHE", "1")
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1775001600")  # 2026-04-01
    root = tmp_path / "job"
    write_job(root, visits={"v1": _visit("2026-03-10", FAILING_FREQUENCY)},
              files={"punch_list.yaml": {"entries": [
                  {"machine": "m1", "item": "supply.frequency", "owner": "A. Fitter",
                   "due": "2026-03-31"}]}})
    code, out = _check(root)
    assert code == 1
    assert ("☐ open deficiency m1/supply.frequency: fail, raised by v1, owner A. Fitter, "
            "due 2026-03-31 OVERDUE") in out
    write_job(root, visits={"v1": _visit("2026-03-10", FAILING_FREQUENCY)},
              files={"punch_list.yaml": ACCEPTED})
    code, out = _check(root)
    assert code == 0  # v1 is still "pass with deficiencies"; its one deficiency is accepted
    assert "open deficiency" not in out and "1 accepted exception" in out
    assert "handover: ready" in out
    write_job(root, visits={"v1": _visit("2026-03-10", FAILING_FREQUENCY),
                            "v2": _visit("2026-03-20", PASSING_SUPPLY)})
    (root / "punch_list.yaml").unlink()
    code, out = _check(root)
    assert code == 0 and "PASS WITH DEFICIENCIES" in out  # closed by v2
