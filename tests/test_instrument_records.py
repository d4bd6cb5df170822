"""The instrument in every verdict: uncertainty, decision rules, calibration, category, captures.

Sources: JCGM 100:2008 cl. 4.3.7 (a/√3) and cl. 6.2 (U = k·u) [S]; ILAC-G8:09/2019 cl. 4.2.1
(simple acceptance) and cl. 4.2.3 (guarded acceptance, non-binary statements) [S]; the worked
example of reference values §11 (230.4 V, ±(0.5 % of reading + 2 digits), 0.1 V → U = 1.561 V) [S].
"""

from __future__ import annotations

import copy
import math

import pytest

from acceptance.errors import InputError
from acceptance.loading import load_job
from acceptance.results import Verdict, VisitState
from tests.conftest import DEFAULT_INSTRUMENTS, PASSING_SUPPLY, REPO
from tests.rectifier_model import DEMO_CAPTURE

DMM_ACCURACY = [{"measures": "V", "range": "600 V", "accuracy": "±(0.5 % of reading + 2 digits)",
                 "resolution": "0.1 V"},
                {"measures": "V", "range": "60 V", "accuracy": "±(0.5 % of reading + 2 digits)",
                 "resolution": "0.01 V"}]


def _instruments(**changes):
    register = copy.deepcopy(DEFAULT_INSTRUMENTS)  # the defaults are shared between tests
    for entry in register["instruments"]:
        entry.update(changes.get(entry["id"], {}))
    return register


SINGLE_PHASE = {"nameplate": {"rated_voltage": "230 V", "phases": 1, "frequency": "50 Hz"}}


def _supply(voltage: str) -> dict:
    return {"readings": {"supply": {"voltage": {"L-N": voltage}, "frequency": "50.0 Hz",
                                    "voltage_under_load": {"L-N": "229 V"}}}}


def test_published_example_uncertainty_is_shown_beside_the_reading(make_job, evaluate):
    # reference values §11 [S]: a = 0.5 % × 230.4 V + 2 × 0.1 V = 1.352 V, u = 0.781 V, U = 1.561 V.
    root = make_job(instruments=_instruments(**{"dmm-1": {"functions": DMM_ACCURACY}}),
                    machine=SINGLE_PHASE, visit=_supply("230.4 V"))
    element = evaluate(root).element("supply.voltage", "L-N")
    assert element.uncertainty.startswith("U = 1.6 V (k = 2), from ±(0.5 % of reading + 2 digits)")
    assert element.verdict is Verdict.PASS


@pytest.mark.parametrize(("rule", "reading", "expected"), [
    # 207 V lower limit (IEC 60204-1 cl. 4.3.2, 0.9 × 230 V [M]); U ≈ 1.43 V at 207.9 V.
    ("simple acceptance", "207.9 V", Verdict.PASS),
    ("guarded acceptance", "207.9 V", Verdict.CONDITIONAL_PASS),
    ("simple acceptance", "206.5 V", Verdict.FAIL),
    ("guarded acceptance", "206.5 V", Verdict.CONDITIONAL_FAIL),
    ("guarded acceptance", "212.0 V", Verdict.PASS),
    ("guarded acceptance", "200.0 V", Verdict.FAIL),
])
def test_decision_rule_near_a_limit(make_job, evaluate, rule, reading, expected):
    # ILAC-G8:09/2019 cl. 4.2.1 and 4.2.3 [S]
    root = make_job(job={"decision_rule": rule},
                    instruments=_instruments(**{"dmm-1": {"functions": DMM_ACCURACY}}),
                    machine=SINGLE_PHASE, visit=_supply(reading))
    check = evaluate(root).check("supply.voltage", "L-N")
    assert check.verdict is expected
    assert check.decision.startswith(rule)


def test_conformance_probability_shown_near_a_limit(make_job, evaluate):
    # JCGM 106:2012 cl. 7.3 [M]: pc = Φ((y − TL)/u) for a reading near the lower limit only.
    root = make_job(job={"decision_rule": "guarded acceptance"},
                    instruments=_instruments(**{"dmm-1": {"functions": DMM_ACCURACY}}),
                    machine=SINGLE_PHASE, visit=_supply("207.9 V"))
    check = evaluate(root).check("supply.voltage", "L-N")
    assert check.conformance is not None and 0.5 < check.conformance < 1.0


def test_range_change_between_readings_changes_the_uncertainty(make_job, evaluate):
    # The digits term scales with the range's resolution (0.1 V on 600 V, 0.01 V on 60 V).
    root = make_job(instruments=_instruments(**{"dmm-1": {"functions": DMM_ACCURACY}}),
                    machine=SINGLE_PHASE | {"checklists": ["lockout"]},
                    visit={"readings": {"lockout": {"absence_of_voltage": {
                        "L-N": {"value": "0.4 V", "range": "600 V"},
                        "L-PE": {"value": "0.4 V", "range": "60 V"}}}}})
    evaluated = evaluate(root)
    on_600 = evaluated.element("lockout.absence_of_voltage", "L-N").uncertainty
    on_60 = evaluated.element("lockout.absence_of_voltage", "L-PE").uncertainty
    assert "range 600 V" in on_600 and "range 60 V" in on_60
    assert on_600 != on_60


def test_expired_calibration_cannot_give_a_plain_pass(make_job, evaluate):
    root = make_job(instruments=_instruments(**{"dmm-1": {"calibrated": "2025-01-01",
                                                          "calibration_due": "2026-01-01"}}),
                    visit={"readings": {"supply": PASSING_SUPPLY}})
    evaluated = evaluate(root)
    check = evaluated.check("supply.voltage", "L1-L2")
    assert check.verdict is Verdict.UNDETERMINED
    assert "dmm-1: calibration due before the visit (expired) on the visit date" in check.message
    assert evaluated.visit().state is VisitState.INCOMPLETE


def test_category_below_the_point_is_a_safety_finding(make_job, evaluate):
    # IEC 61010-1 / reference values §14 [S]: a CAT II instrument at a CAT III point.
    root = make_job(instruments=_instruments(**{"dmm-1": {"category": "CAT II 600 V"}}),
                    visit={"readings": {"supply": PASSING_SUPPLY}})
    element = evaluate(root).element("supply.voltage", "L1-L2")
    assert any(f.startswith("safety:") for f in element.findings)


def test_unreadable_accuracy_names_the_instrument_and_the_forms(make_job):
    root = make_job(instruments=_instruments(**{"dmm-1": {"functions": [
        {"measures": "V", "accuracy": "about one percent"}]}}))
    with pytest.raises(InputError) as caught:
        load_job(root)
    message = str(caught.value)
    assert "instruments[0].functions[0].accuracy: instrument 'dmm-1':" in message
    assert "accepted forms: ±(0.5 % of reading + 2 digits)" in message


def test_capture_settles_the_rms_comparison_and_flags_the_meter(make_job, evaluate):
    # Common practice [P]: an average-responding clamp under-reads a capacitor-input
    # rectifier's line current by 30-45 %; the protective device heats with the RMS value.
    capture = (REPO / DEMO_CAPTURE).read_bytes()
    machine = {"nameplate": {"rated_voltage": "230 V", "phases": 1, "frequency": "50 Hz",
                             "rated_current": "11 A", "rated_current_basis": "dc",
                             "protective_device": {"description": "MCB", "rating": "16 A"}},
               "checklists": ["current"]}
    visit = {"readings": {"current": {"load_current": {"L": {
        "value": "11.7 A", "instrument": "clamp-avg",
        "capture": {"file": "captures/line.csv", "channels": {"CH1": "x100", "CH2": "10 mV/A"},
                    "voltage": "CH1", "current": "CH2"}}}}}}
    root = make_job(machine=machine, visit=visit,
                    files={"machines/m1/captures/line.csv": capture})
    element = evaluate(root).element("current.load_current", "L")
    protection = next(c for c in element.checks if c.id == "protection")
    assert protection.compared == "true RMS from the capture"
    assert protection.verdict is Verdict.FAIL
    flagged = [f for f in element.findings if "not sinusoidal" in f]
    assert flagged and "this meter would show" in flagged[0]
    nameplate = next(c for c in element.checks if c.id == "nameplate")
    assert nameplate.verdict is Verdict.UNDETERMINED


def test_capture_outside_the_machine_folder_is_refused(make_job):
    visit = {"readings": {"current": {"load_current": {"L": {
        "value": "11.7 A",
        "capture": {"file": "../../../etc/passwd", "channels": {"CH1": "x10"}}}}}}}
    machine = {"nameplate": {"rated_voltage": "230 V", "phases": 1, "frequency": "50 Hz",
                             "rated_current": "11 A"}, "checklists": ["current"]}
    root = make_job(machine=machine, visit=visit)
    with pytest.raises(InputError) as caught:
        load_job(root)
    assert "'../../../etc/passwd' leaves the machine folder" in str(caught.value)


def test_guarded_acceptance_records_its_guard_band_and_acceptance_limits(make_job, evaluate):
    """results.json carries the acceptance limits beside the tolerance limits, and w."""
    from acceptance.results import check_to_json
    root = make_job(job={"decision_rule": "guarded acceptance"},
                    instruments=_instruments(**{"dmm-1": {"functions": DMM_ACCURACY}}),
                    machine=SINGLE_PHASE, visit=_supply("207.9 V"))
    check = evaluate(root).check("supply.voltage", "L-N")
    data = check_to_json(check)
    # ILAC-G8:09/2019 cl. 4.2.2 [S]: under guarded acceptance w = U and the acceptance limit
    # is the tolerance limit moved inward by w, A_L = T_L + w. U at 207.9 V: a = 0.5 % ×
    # 207.9 V + 2 × 0.1 V = 1.2395 V, u = a/√3 combined with the resolution's 0.1/√12 V,
    # U = 2u (reference values §11) [S].
    u_spec, u_resolution = 1.2395 / math.sqrt(3), 0.1 / math.sqrt(12)
    expected_u = 2 * math.sqrt(u_spec**2 + u_resolution**2)
    assert data["guard_band"] == pytest.approx(expected_u, rel=1e-3)
    assert data["acceptance_lower"] == pytest.approx(data["limit_lower"] + data["guard_band"],
                                                     rel=1e-12)
    assert data["acceptance_upper"] == pytest.approx(data["limit_upper"] - data["guard_band"],
                                                     rel=1e-12)
    # JCGM 106:2012 cl. 9.2 [M]: the probability assumes a normal distribution with the
    # standard uncertainty u = U/2, and the record and the JSON say so in one phrase.
    assert data["conformance"] is not None
    assert data["conformance_basis"].startswith("normal distribution with the standard "
                                                "uncertainty u = 0.7")
    assert "JCGM 106:2012" in data["conformance_basis"]


def test_simple_acceptance_has_no_guard_band(make_job, evaluate):
    root = make_job(job={"decision_rule": "simple acceptance"},
                    instruments=_instruments(**{"dmm-1": {"functions": DMM_ACCURACY}}),
                    machine=SINGLE_PHASE, visit=_supply("230.0 V"))
    check = evaluate(root).check("supply.voltage", "L-N")
    assert check.guard_band == 0.0
    assert (check.acceptance_lower, check.acceptance_upper) == (check.limit_lower,
                                                                check.limit_upper)


def test_a_value_from_a_capture_carries_the_scope_and_probe_uncertainty(make_job, evaluate):
    """A check judged on a capture's true RMS no longer shows U = 0."""
    from tests.test_history import _square_wave_capture  # ±10 A square wave, 10 mV/A

    register = _instruments()
    register["instruments"] += [
        {"id": "scope-1", "kind": "oscilloscope", "response": "true-rms",
         "calibrated": "2026-01-01", "calibration_due": "2027-01-01",
         "functions": [{"measures": "V", "accuracy": "±2 % of reading"}]},
        {"id": "probe-1", "kind": "current probe", "response": "not applicable",
         "calibrated": "2026-01-01", "calibration_due": "2027-01-01",
         "functions": [{"measures": "A", "accuracy": "±1 % of reading"}]},
    ]
    capture = {"file": "captures/line.csv", "channels": {"CH1": "x100", "CH2": "10 mV/A"},
               "voltage": "CH1", "current": "CH2", "instrument": "scope-1",
               "probes": {"CH2": "probe-1"}}
    machine = {"nameplate": {"rated_voltage": "230 V", "phases": 1, "frequency": "50 Hz",
                             "rated_current": "12 A"}, "checklists": ["current"]}
    root = make_job(job={"decision_rule": "guarded acceptance"}, instruments=register,
                    machine=machine,
                    files={"machines/m1/captures/line.csv": _square_wave_capture()},
                    visit={"readings": {"current": {"load_current": {
                        "L": {"value": "11.1 A", "instrument": "clamp-avg",
                              "capture": capture}}}}})
    check = evaluate(root).check("current.load_current", "L", "nameplate")
    assert check.compared == "true RMS from the capture"
    # 10 A RMS is 0.1 V at the scope's input: a = 2 % → u = 0.002 V/√3 × 100 A/V = 0.11547 A;
    # the probe's 1 % of 10 A → u = 0.1 A/√3 = 0.05774 A (rectangular, JCGM 100:2008 4.3.7
    # [S]); combined in quadrature and U = 2u = 0.2582 A (JCGM 100:2008 5.1.2, 6.2 [S]).
    expected = 2 * math.hypot(0.002 / math.sqrt(3) * 100, 0.1 / math.sqrt(3))
    assert check.guard_band == pytest.approx(expected, rel=1e-6)
    assert "U = 0.26 A (k = 2) of the capture's CH2" in check.decision
    assert "U = 0 A" not in check.decision
    # 10 A against 12 A with more than U to spare: pass under guarded acceptance [S].
    assert check.verdict is Verdict.PASS


def test_a_capture_with_no_scope_named_has_an_unknown_uncertainty(make_job, evaluate):
    from tests.test_history import _square_wave_capture

    capture = {"file": "captures/line.csv", "channels": {"CH1": "x100", "CH2": "10 mV/A"},
               "voltage": "CH1", "current": "CH2"}
    machine = {"nameplate": {"rated_voltage": "230 V", "phases": 1, "frequency": "50 Hz",
                             "rated_current": "12 A"}, "checklists": ["current"]}
    root = make_job(job={"decision_rule": "guarded acceptance"}, machine=machine,
                    files={"machines/m1/captures/line.csv": _square_wave_capture()},
                    visit={"readings": {"current": {"load_current": {
                        "L": {"value": "11.1 A", "instrument": "clamp-avg",
                              "capture": capture}}}}})
    check = evaluate(root).check("current.load_current", "L", "nameplate")
    assert "names no scope" in check.decision
    assert check.verdict is Verdict.CONDITIONAL_PASS
