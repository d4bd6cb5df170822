"""Visits compared with the machine's baseline: arithmetic, like for like, baseline choice.

Expected numbers are worked by hand beside each check from the formula named there:
copper resistance correction R₂ = R₁·(k + θ₂)/(k + θ₁) with k = 235 (IEC 60034-1, as
reference values §1 gives it [S]); insulation resistance halving per 10 K to 40 °C (IEEE 43-2013,
reference values §5 [S]); the average-responding display of a square wave, 1.1107 × its RMS
(reference values §9 [S]); a constant-impedance load's current proportional to its voltage (Ohm's
law [S]). The change is 100·(value/baseline − 1) % of the baseline, and the thresholds are the
checklists' own (common practice [P]); a class on a threshold is the closed-boundary rule the
module documents.
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from acceptance.cli import main
from acceptance.errors import InputError
from acceptance.evaluation import evaluate_job
from acceptance.history import (
    COMPARISON_SCHEMA,
    CompareRule,
    classify_change,
    compare_visits,
    relative_change,
    repair_class,
    select_baseline,
    trend_series,
)
from acceptance.loading import load_job
from acceptance.rendering.plots import TrendInput, trend_plot
from acceptance.results import Change, ChangeClass, MachineResult

# Copper, IEC 60034-1 [S]: the constant the windings checklist names.
K_COPPER = 235.0

MACHINE: dict[str, Any] = {
    "nameplate": {
        "rated_voltage": "230 V", "phases": 1, "frequency": "50 Hz", "rated_current": "12 A",
        "windings": [{"id": "coil", "name": "Coil", "material": "copper", "thermal_class": "F",
                      "resistance": "28.0 Ω", "resistance_tolerance": "5 %",
                      "resistance_temperature": "20 °C"}],
        "capacitors": [{"id": "run", "name": "Run capacitor", "nominal": "30 µF",
                        "tolerance": "J"}],
    },
    "checklists": ["supply", "windings", "capacitors", "current", "insulation"],
}


def _visit(kind: str, date: str, readings: dict[str, Any], **more: Any) -> dict[str, Any]:
    return {"kind": kind, "date": date, "readings": readings, **more}


def _winding(value: str, temperature: str) -> dict[str, Any]:
    return {"windings": {"resistance": {"coil": {"value": value, "instrument": "ohm-1",
                                                 "temperature": temperature}}}}


def _machine(root: Path, machine: str = "m1") -> MachineResult:
    result = evaluate_job(load_job(root))
    return next(m for m in result.machines if m.id == machine)


def _change(machine: MachineResult, visit: str, item: str,
            element: str | None = None) -> Change:
    found = next(v for v in machine.visits if v.id == visit)
    return next(c for c in found.changes if c.item == item and c.element == element)


# ------------------------------------------------------------------ arithmetic


def test_relative_change_is_a_percentage_of_the_baseline() -> None:
    # 100·(11.4/11.1 − 1) = 2.7027 % [P: change as a share of the baseline value]
    assert relative_change(11.1, 11.4) == pytest.approx(2.702703, rel=1e-6)  # exact arithmetic
    assert relative_change(30.4e-6, 29.7e-6) == pytest.approx(-2.302632, rel=1e-6)
    with pytest.raises(ValueError, match="baseline_value = 0"):
        relative_change(0.0, 1.0)


RULE = CompareRule(quantity="reading", watch=5.0, act=10.0, relative=True, threshold_unit="%")


@pytest.mark.parametrize(("change", "direction", "expected"), [
    (4.99, "both", ChangeClass.STEADY),
    (5.0, "both", ChangeClass.WATCH),   # closed at watch [P: the module's boundary rule]
    (-7.0, "both", ChangeClass.WATCH),
    (10.0, "both", ChangeClass.ACT),    # closed at act
    (-12.0, "both", ChangeClass.ACT),
    (-20.0, "up", ChangeClass.STEADY),  # a fall where only rises count
    (20.0, "down", ChangeClass.STEADY),
    (-20.0, "down", ChangeClass.ACT),
])
def test_classification_against_the_thresholds(change: float, direction: str,
                                               expected: ChangeClass) -> None:
    rule = CompareRule(quantity="reading", watch=5.0, act=10.0, relative=True,
                       threshold_unit="%", direction=direction)
    assert classify_change(change, rule) is expected


def test_capacitance_and_current_changes_on_a_small_history(make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", {
            "capacitors": {"capacitance": {"run": {"value": "30.0 µF", "instrument": "lcr-1"}}},
            "current": {"load_current": {"L": {"value": "10.0 A", "instrument": "clamp-trms"}}},
        }),
        "v2": _visit("periodic", "2026-09-10", {
            "capacitors": {"capacitance": {"run": {"value": "26.7 µF", "instrument": "lcr-1"}}},
            "current": {"load_current": {"L": {"value": "10.3 A", "instrument": "clamp-trms"}}},
        }),
    })
    machine = _machine(root)
    capacitance = _change(machine, "v2", "capacitors.capacitance", "run")
    # 100·(26.7/30.0 − 1) = −11.0 % ≥ act 10 % (capacitors checklist [P]) → act, falling
    assert capacitance.change == pytest.approx(-11.0, rel=1e-9)  # exact arithmetic
    assert capacitance.classification is ChangeClass.ACT
    assert capacitance.change_text == "−11.0 %"
    assert "losing capacitance" in (capacitance.note or "")
    current = _change(machine, "v2", "current.load_current", "L")
    # 100·(10.3/10.0 − 1) = +3.0 % < watch 5 % (current checklist [P]) → steady
    assert current.change == pytest.approx(3.0, rel=1e-9)
    assert current.classification is ChangeClass.STEADY
    assert current.note is None
    assert next(v for v in machine.visits if v.id == "v2").baseline == "v1"
    comparison = compare_visits(machine, "v1", "v2")
    assert comparison.counts == {"steady": 1, "watch": 0, "act": 1, "not comparable": 0}


# ------------------------------------------------------------------ temperature correction


def _r20(resistance: float, temperature: float) -> float:
    # IEC 60034-1 correction to 20 °C, k = 235 for copper [S] (reference values §1)
    return resistance * (K_COPPER + 20.0) / (K_COPPER + temperature)


def test_a_warm_reading_that_looks_changed_is_steady_once_corrected(make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "21.0 °C")),
        "v2": _visit("periodic", "2026-09-10", _winding("29.4 Ω", "28.0 °C")),
    })
    change = _change(_machine(root), "v2", "windings.resistance", "coil")
    # As read: 100·(29.4/28.6 − 1) = +2.80 %, past the 2 % watch threshold [P].
    assert relative_change(28.6, 29.4) > 2.0
    # Corrected: 28.6·255/256 = 28.48828 Ω, 29.4·255/263 = 28.50570 Ω → +0.0612 % [S]
    assert change.baseline_value == pytest.approx(_r20(28.6, 21.0), rel=1e-9)
    assert change.value == pytest.approx(_r20(29.4, 28.0), rel=1e-9)
    assert change.baseline_value == pytest.approx(28.48828, rel=1e-6)  # hand-worked
    assert change.change == pytest.approx(0.06115, rel=1e-3)  # 4 figures of the hand value
    assert change.classification is ChangeClass.STEADY
    assert change.quantity == "R at 20 °C"
    assert any("28.0 °C" in text for text in change.adjustments)


def test_an_unchanged_reading_at_a_higher_temperature_is_a_fall_once_corrected(
        make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "21.0 °C")),
        "v2": _visit("periodic", "2026-09-10", _winding("28.6 Ω", "31.0 °C")),
    })
    change = _change(_machine(root), "v2", "windings.resistance", "coil")
    # Same reading, 10 K warmer: 28.6·255/266 = 27.41729 Ω against 28.48828 Ω → −3.759 %,
    # between watch 2 % and act 5 % (windings checklist [P]); a fall suggests shorted turns.
    expected = relative_change(_r20(28.6, 21.0), _r20(28.6, 31.0))
    assert expected == pytest.approx(-3.7594, rel=1e-4)  # hand-worked: 256/266 − 1
    assert change.change == pytest.approx(expected, rel=1e-9)
    assert change.classification is ChangeClass.WATCH
    assert change.note == "suggests shorted turns"


def test_insulation_resistance_is_compared_at_40_degrees(make_job) -> None:
    def insulation(value: str, temperature: str) -> dict[str, Any]:
        return {"insulation": {"power_circuits": {"value": value, "test_voltage": "500 V",
                                                  "temperature": temperature}}}

    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", insulation("180 MΩ", "30 °C")),
        "v2": _visit("periodic", "2026-09-10", insulation("100 MΩ", "40 °C")),
    })
    change = _change(_machine(root), "v2", "insulation.power_circuits")
    # IEEE 43 halving per 10 K [S] (reference values §5): 180 MΩ at 30 °C → 90 MΩ at 40 °C.
    # As read the fall is 44 % (watch at 30 % [P]); at 40 °C it is a rise of 11.1 %.
    assert change.baseline_value == pytest.approx(90e6, rel=1e-9)
    assert change.value == pytest.approx(100e6, rel=1e-9)
    assert change.change == pytest.approx(100 * (100 / 90 - 1), rel=1e-9)
    assert change.classification is ChangeClass.STEADY


# ------------------------------------------------------------------ baseline selection


def test_the_default_baseline_is_the_earliest_commissioning_visit(make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "a-periodic": _visit("periodic", "2026-02-01", _winding("28.6 Ω", "20 °C")),
        "b-commissioning": _visit("commissioning", "2026-03-01", _winding("28.6 Ω", "20 °C")),
        "c-commissioning": _visit("commissioning", "2026-04-01", _winding("28.6 Ω", "20 °C")),
        "d-periodic": _visit("periodic", "2026-09-01", _winding("28.6 Ω", "20 °C")),
    })
    machine = _machine(root)
    assert machine.baseline == "b-commissioning"
    compared = {v.id: v.baseline for v in machine.visits}
    # Visits after the baseline are compared with it; the one before it is not.
    assert compared == {"a-periodic": None, "b-commissioning": None,
                        "c-commissioning": "b-commissioning", "d-periodic": "b-commissioning"}
    assert select_baseline(machine.visits[:1]) == "a-periodic"  # no commissioning on record


def test_a_named_baseline_wins(make_job) -> None:
    root = make_job(machine={**MACHINE, "baseline": "v2"}, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "20 °C")),
        "v2": _visit("after-repair", "2026-03-20", _winding("28.0 Ω", "20 °C")),
        "v3": _visit("periodic", "2026-09-10", _winding("28.0 Ω", "20 °C")),
    })
    machine = _machine(root)
    assert machine.baseline == "v2"
    change = _change(machine, "v3", "windings.resistance", "coil")
    assert change.change == pytest.approx(0.0, abs=1e-12)  # 28.0 against 28.0 Ω
    assert next(v for v in machine.visits if v.id == "v1").changes == ()


def test_a_named_baseline_that_does_not_exist_is_an_input_error(make_job) -> None:
    machine_text = (
        "name: Test machine\n"
        "kind: test rig\n"
        "nameplate: {rated_voltage: 400 V, phases: 3, frequency: 50 Hz}\n"
        "checklists: [supply]\n"
        "baseline: 2026-03-11-comissioning\n"
    )
    root = make_job(machine=machine_text, visit_id="2026-03-11-commissioning")
    with pytest.raises(InputError) as raised:
        load_job(root)
    assert str(raised.value) == (
        "job/machines/m1/machine.yaml:5:1: baseline: no visit '2026-03-11-comissioning' in "
        "m1/visits/; did you mean '2026-03-11-commissioning'?")


def test_visits_out_of_date_order_in_the_folder_are_compared_by_date(make_job) -> None:
    # File names sort the other way round from the dates; loading orders by date, then id.
    root = make_job(machine=MACHINE, visits={
        "a-later": _visit("periodic", "2026-09-10", _winding("29.4 Ω", "28.0 °C")),
        "z-first": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "21.0 °C")),
    })
    machine = _machine(root)
    assert [v.id for v in machine.visits] == ["z-first", "a-later"]
    assert machine.baseline == "z-first"
    change = _change(machine, "a-later", "windings.resistance", "coil")
    assert change.value == pytest.approx(_r20(29.4, 28.0), rel=1e-9)  # IEC 60034-1 [S]
    series = trend_series(machine)
    trace = next(s for s in series if s.item == "windings.resistance").traces[0]
    assert [p.visit for p in trace.points] == ["z-first", "a-later"]


# ------------------------------------------------------------------ missing items


def test_an_item_missing_from_either_visit_is_not_comparable(make_job) -> None:
    capacitance = {"capacitors": {"capacitance": {"run": {"value": "30.0 µF",
                                                          "instrument": "lcr-1"}}}}
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", {**capacitance,
                                                      **_winding("28.6 Ω", "20 °C")}),
        "v2": _visit("periodic", "2026-06-10", _winding("28.6 Ω", "20 °C")),
        "v3": _visit("periodic", "2026-09-10", {**capacitance}),
    })
    machine = _machine(root)
    missing_now = _change(machine, "v2", "capacitors.capacitance", "run")
    assert missing_now.classification is ChangeClass.NOT_COMPARABLE
    assert missing_now.reason == "not recorded on this visit (v2)"
    assert missing_now.baseline_text == "30 µF"
    missing_then = _change(machine, "v3", "windings.resistance", "coil")
    assert missing_then.reason == "not recorded on this visit (v3)"
    # Recorded on neither visit: nothing to say about it.
    v2 = next(v for v in machine.visits if v.id == "v2")
    assert not any(c.item == "current.load_current" for c in v2.changes)


def test_an_item_missing_from_the_baseline_is_not_comparable(make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "20 °C")),
        "v2": _visit("periodic", "2026-09-10", {
            "capacitors": {"capacitance": {"run": {"value": "29.0 µF", "instrument": "lcr-1"}}}}),
    })
    change = _change(_machine(root), "v2", "capacitors.capacitance", "run")
    assert change.classification is ChangeClass.NOT_COMPARABLE
    assert change.reason == "not recorded on the baseline (v1)"
    assert change.text == "29 µF"


# ------------------------------------------------------------------ as found and as left


def test_later_visits_compare_with_the_as_left_value(make_job) -> None:
    def capacitance(value: str) -> dict[str, Any]:
        return {"capacitors": {"capacitance": {"run": {"value": value, "instrument": "lcr-1"}}}}

    # Only the capacitors checklist, so the visit's state rests on the capacitance alone.
    root = make_job(machine={**MACHINE, "baseline": "v1", "checklists": ["capacitors"]}, visits={
        "v1": _visit("after-repair", "2026-03-10", capacitance("26.1 µF"),
                     as_left=capacitance("30.4 µF"),
                     parts_replaced=[{"part": "run capacitor", "element": "run",
                                      "reason": "low", "old": "26.1 µF", "new": "30 µF J"}]),
        "v2": _visit("periodic", "2026-09-10", capacitance("29.7 µF")),
    })
    machine = _machine(root)
    v1 = machine.visits[0]
    # As found 26.1 µF is outside 28.5–31.5 µF (IEC 60062 J, ±5 % [M], reference values §13);
    # as left 30.4 µF is inside: the record keeps both, the state is the machine as left.
    found = next(i for i in v1.items if i.key == "capacitors.capacitance")
    left = next(i for i in v1.as_left if i.key == "capacitors.capacitance")
    assert found.elements[0].verdict.value == "fail"
    assert left.elements[0].verdict.value == "pass"
    assert v1.as_found_state is not None and v1.as_found_state.value == "pass with deficiencies"
    assert v1.state.value == "pass"
    change = _change(machine, "v2", "capacitors.capacitance", "run")
    # 100·(29.7/30.4 − 1) = −2.30 % against the as-left value, not +13.8 % against 26.1 µF
    assert change.baseline_value == pytest.approx(30.4e-6, rel=1e-12)
    assert change.change == pytest.approx(-2.302632, rel=1e-6)
    assert change.classification is ChangeClass.STEADY
    assert "baseline value as left on v1" in change.adjustments
    part = v1.parts_replaced[0]
    assert part.before == "as found"
    swap = part.behaviour[0]
    # The swap itself: 26.1 → 30.4 µF, +16.48 %, past act 10 % [P] by size; but 26.1 µF was
    # outside 28.5–31.5 µF and 30.4 µF is inside (IEC 60062 J [M]): a repair that worked.
    assert swap.change == pytest.approx(100 * (30.4 / 26.1 - 1), rel=1e-9)
    assert swap.classification is ChangeClass.REPAIRED
    assert swap.note is not None and swap.note.startswith("restored: outside its limit")
    assert part.repaired and not part.steady


# Direction of repair: a 30 µF J capacitor, limits 28.5–31.5 µF (IEC 60062 J = ±5 % [M]).
@pytest.mark.parametrize(("before", "after", "by_size", "expected"), [
    (26.1, 30.4, ChangeClass.ACT, ChangeClass.REPAIRED),     # back inside its limit
    (28.6, 30.1, ChangeClass.WATCH, ChangeClass.REPAIRED),   # inside, toward nominal
    (30.0, 31.4, ChangeClass.WATCH, ChangeClass.WATCH),      # inside, away from nominal
    (30.0, 32.0, ChangeClass.WATCH, ChangeClass.ACT),        # outside after the swap
    (26.1, 27.0, ChangeClass.STEADY, ChangeClass.ACT),       # still outside: act
    (30.0, 30.1, ChangeClass.STEADY, ChangeClass.STEADY),    # a fresh part much the same
])
def test_a_replaced_part_is_judged_by_the_direction_of_its_repair(before, after, by_size,
                                                                  expected) -> None:
    classification, _ = repair_class(before, after, 28.5, 31.5, 30.0, by_size)
    assert classification is expected


def test_with_no_nominal_the_middle_of_the_limit_stands_for_it() -> None:
    assert repair_class(5.0, 9.0, 0.0, 20.0, None, ChangeClass.ACT)[0] is ChangeClass.REPAIRED
    # A one-sided limit has no middle: inside before and after keeps the class by size.
    assert repair_class(5.0, 9.0, None, 20.0, None, ChangeClass.ACT)[0] is ChangeClass.ACT


# ------------------------------------------------------------------ voltage normalisation


def _current_and_voltage(current: str, voltage: str) -> dict[str, Any]:
    return {"current": {"load_current": {"L": {"value": current, "instrument": "clamp-trms"}}},
            "supply": {"voltage_under_load": {"L-N": voltage}}}


def test_current_is_normalised_to_the_supply_voltage_only_where_asked(make_job) -> None:
    visits = {
        "v1": _visit("commissioning", "2026-03-10", _current_and_voltage("10.0 A", "230.0 V")),
        "v2": _visit("periodic", "2026-09-10", _current_and_voltage("10.5 A", "241.5 V")),
    }
    # A motor: the checklist does not scale, +5.0 % reaches watch [P].
    plain = _change(_machine(make_job(machine=MACHINE, visits=visits)), "v2",
                    "current.load_current", "L")
    assert plain.change == pytest.approx(5.0, rel=1e-9)
    assert plain.classification is ChangeClass.WATCH
    # A constant-impedance load (a heater, a coil): I ∝ U (Ohm's law [S]), so
    # 10.5 A × 230.0 V / 241.5 V = 10.0 A exactly → 0.0 %, steady.
    resistive = {**MACHINE, "compare": {"current.load_current": {
        "normalise_to_voltage": "supply.voltage_under_load",
        "reason": "resistive heater: the current follows the supply voltage"}}}
    scaled = _change(_machine(make_job(machine=resistive, visits=visits)), "v2",
                     "current.load_current", "L")
    assert scaled.value == pytest.approx(10.0, rel=1e-12)
    assert scaled.change == pytest.approx(0.0, abs=1e-9)
    assert scaled.classification is ChangeClass.STEADY
    assert any("normalised to the baseline supply voltage" in a
               and "resistive or constant-impedance" in a for a in scaled.adjustments)


def test_a_machine_adjustment_must_name_a_voltage_item(make_job) -> None:
    machine = {**MACHINE, "compare": {"current.load_current": {
        "normalise_to_voltage": "windings.resistance", "reason": "heater"}}}
    with pytest.raises(InputError, match="'windings.resistance' does not record a voltage"):
        load_job(make_job(machine=machine))


# ------------------------------------------------------------------ bases


def test_readings_of_different_bases_without_a_capture_are_not_comparable(make_job) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", {"current": {"load_current": {
            "L": {"value": "10.0 A", "instrument": "clamp-avg"}}}}),
        "v2": _visit("periodic", "2026-09-10", {"current": {"load_current": {
            "L": {"value": "10.2 A", "instrument": "clamp-trms"}}}}),
    })
    change = _change(_machine(root), "v2", "current.load_current", "L")
    assert change.classification is ChangeClass.NOT_COMPARABLE
    assert change.change is None
    assert change.reason == (
        "the baseline reads average-responding and this visit RMS; no capture on the "
        "baseline converts its average-responding reading to RMS; measure both on one basis "
        "(a true-RMS meter) or attach a capture")


def _square_wave_capture() -> str:
    # 50 Hz, 20 kS/s, 10 cycles; samples between the edges so every current sample is ±10 A.
    # Probes: voltage ×100 (325 V peak sine), current 10 mV/A (±0.1 V).
    rate, frequency = 20_000, 50.0
    time = (np.arange(4000) + 0.5) / rate
    voltage = 3.25 * np.sin(2 * math.pi * frequency * time)
    current = np.where(np.sin(2 * math.pi * frequency * time) >= 0, 0.1, -0.1)
    rows = "\n".join(f"{t:.7f},{v:.5f},{i:.5f}" for t, v, i in zip(time, voltage, current,
                                                                    strict=True))
    return "time_s,CH1,CH2\n" + rows + "\n"


def test_a_capture_converts_an_average_responding_baseline_to_rms(make_job) -> None:
    capture = {"file": "captures/line.csv", "channels": {"CH1": "x100", "CH2": "10 mV/A"},
               "voltage": "CH1", "current": "CH2"}
    root = make_job(machine=MACHINE, files={"machines/m1/captures/line.csv":
                                            _square_wave_capture()}, visits={
        # A square wave of 10 A RMS reads 11.107 A on an average-responding meter
        # (form factor 1.000 against the sine's 1.1107, reference values §9 [S]).
        "v1": _visit("commissioning", "2026-03-10", {"current": {"load_current": {
            "L": {"value": "11.1 A", "instrument": "clamp-avg", "capture": capture}}}}),
        "v2": _visit("periodic", "2026-09-10", {"current": {"load_current": {
            "L": {"value": "10.2 A RMS", "instrument": "clamp-avg"}}}}),
    })
    change = _change(_machine(root), "v2", "current.load_current", "L")
    # Baseline on RMS from its capture: 10.000 A (samples exactly ±10 A; tolerance for the
    # 5-decimal CSV values only); 100·(10.2/10.0 − 1) = +2.0 % → steady [P].
    assert change.baseline_value == pytest.approx(10.0, rel=1e-6)
    assert change.change == pytest.approx(2.0, rel=1e-4)
    assert change.classification is ChangeClass.STEADY
    assert change.quantity == "reading"
    assert any("average-responding reading 11.1 A converted to RMS 10 A from the capture"
               in a for a in change.adjustments)


# ------------------------------------------------------------------ command and plot


def test_compare_command_prints_the_documented_json(make_job, capsys) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "21.0 °C")),
        "v2": _visit("periodic", "2026-09-10", _winding("28.6 Ω", "31.0 °C")),
    })
    assert main(["compare", str(root), "--json"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert document["schema"] == COMPARISON_SCHEMA == "acceptance-comparison/1"
    [comparison] = document["comparisons"]
    assert set(comparison) == {"machine", "baseline", "visit", "baseline_date", "visit_date",
                               "counts", "changes"}
    assert comparison["counts"] == {"steady": 0, "watch": 1, "act": 0, "not comparable": 0}
    [change] = comparison["changes"]
    assert change["class"] == "watch"
    assert change["change"] == pytest.approx(-3.7594, rel=1e-4)  # 256/266 − 1, as above
    assert main(["compare", str(root), "m1", "--visit", "v9"]) == 2
    assert "--visit: m1 has no visit 'v9'" in capsys.readouterr().err


def test_compare_command_exits_1_when_a_change_calls_for_action(make_job, capsys) -> None:
    root = make_job(machine=MACHINE, visits={
        "v1": _visit("commissioning", "2026-03-10", _winding("28.6 Ω", "20.0 °C")),
        "v2": _visit("periodic", "2026-09-10", _winding("27.0 Ω", "20.0 °C")),
    })
    # 100·(27.0/28.6 − 1) = −5.59 % ≥ act 5 % (windings checklist [P])
    assert main(["compare", str(root)]) == 1
    assert "act" in capsys.readouterr().out


def test_compare_against_the_built_demo(capsys) -> None:
    demo = Path(__file__).resolve().parents[1] / "demo_job"
    assert main(["compare", str(demo), "pump-set-1"]) == 0
    out = capsys.readouterr().out
    # The contactor swap changed nothing: every compared value steady (demo story).
    assert "2026-06-02-after-repair" in out and "watch" not in out and "act " not in out


def test_trend_plot_marks_the_band_and_the_baseline_on_nice_ticks() -> None:
    import datetime as dt

    plot = trend_plot([TrendInput("L1", [(dt.date(2026, 3, 10), 12.9),
                                         (dt.date(2026, 9, 9), 13.7)])],
                      quantity="reading", unit="A", upper=14.8,
                      baseline=dt.date(2026, 3, 10))
    labels = [t.label for t in plot.y_ticks]
    assert labels == ["12.5", "13.0", "13.5", "14.0", "14.5", "15.0"]  # 1-2-5 steps of 0.5
    assert plot.band is not None and plot.band[1] == pytest.approx(plot.y + plot.plot_height)
    assert plot.limits[0].label == "upper limit 14.80 A"
    assert plot.baseline_x == pytest.approx(plot.lines[0].markers[0].x)
    # Seven months across: a two-month step keeps the labels apart (at most 7 ticks).
    assert [t.label for t in plot.x_ticks] == ["Mar 2026", "May 2026", "Jul 2026", "Sep 2026"]
    assert plot.y_label == "reading [A]"
