"""The foundation checked against reference values §1 and §3, through the whole evaluation path.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import pytest

from acceptance.evaluation import engineering
from acceptance.results import Verdict, VisitState
from tests.conftest import DEFAULT_MACHINE

# The four results are quoted to 4 decimals (about 3e-5 relative); 1e-4 relative keeps the
# nearest competing constants (234.5 vs 235: 3.0166 vs 3.0156 Ω, 3.3e-4 apart) distinct.
RELATIVE = 1e-4

# reference values §1: R2 = R1 · (k + T2) / (k + T1), 2.500 Ω at 22 °C corrected to 75 °C.
CORRECTION_EXAMPLES = [
    # material, standard named in the checklist, k [°C], R at 75 °C [Ω]
    pytest.param("copper", "IEC 60228", 234.5, 3.0166,
                 id="Cu-234.5-IEC60228"),  # IEC 60228 Annex B [S]
    pytest.param("copper", "IEEE 112", 234.5, 3.0166,
                 id="Cu-234.5-IEEE112"),  # IEEE 112 [S]
    pytest.param("copper", "IEC 60034-1", 235.0, 3.0156,
                 id="Cu-235-IEC60034-1"),  # IEC 60034-1 cl. 8.6.2 [S]
    pytest.param("aluminium", "IEC 60034-1", 225.0, 3.0364,
                 id="Al-225-IEC60034-1"),  # IEC 60034-1 [M]
    pytest.param("aluminium", "IEC 60228", 228.0, 3.0300,
                 id="Al-228-IEC60228"),  # IEC 60228 Annex B [S]
]


def correction_job(make_job, material, standard):
    machine = {
        "nameplate": {"rated_voltage": "400 V", "phases": 3, "frequency": "50 Hz",
                      "windings": [{"id": "u1-u2", "name": "Winding U1–U2",
                                    "material": material, "thermal_class": "B"}]},
        "checklists": ["windings"],
    }
    job = {
        "reference_temperature": "75 °C",
        "overrides": [{"item": "windings.resistance",
                       "params": {"constant": standard},
                       "reason": f"Corrected with the constant of {standard}.",
                       "source": {"kind": "standard", "document": standard}}],
    }
    visit = {"readings": {"windings": {"resistance": {
        "u1-u2": {"value": "2.500 Ω", "instrument": "ohm-1", "temperature": "22 °C"}}}}}
    return make_job(job=job, machine=machine, visit=visit)


@pytest.mark.parametrize(("material", "standard", "k", "expected"), CORRECTION_EXAMPLES)
def test_correction_through_a_winding_resistance_check(make_job, evaluate, step, material,
                                                       standard, k, expected):
    check = evaluate(correction_job(make_job, material, standard)).check(
        "windings.resistance", "u1-u2")
    assert step(check, "conductor constant") == k
    assert step(check, "R at 75") == pytest.approx(expected, rel=RELATIVE)
    # No nameplate resistance: the corrected value is kept as the baseline.
    assert check.verdict is Verdict.RECORDED
    assert check.compared == "R at 75 °C"


@pytest.mark.parametrize(("material", "standard", "k", "expected"), CORRECTION_EXAMPLES)
def test_correction_through_engineering(material, standard, k, expected):
    constant = engineering.temperature_constant(material, standard)
    corrected = engineering.resistance_at_temperature(2.500, 22.0, 75.0, constant)
    assert corrected == pytest.approx(expected, rel=RELATIVE)
    # The formula itself, in full precision: only float rounding separates the two.
    assert corrected == pytest.approx(2.500 * (k + 75.0) / (k + 22.0), rel=1e-12)


def test_the_constants_are_told_apart():
    # reference values §1: the four constants give four distinct results at 1e-4 relative.
    results = sorted(
        engineering.resistance_at_temperature(
            2.500, 22.0, 75.0, engineering.temperature_constant(material, standard))
        for material, standard in (("copper", "IEC 60228"), ("copper", "IEC 60034-1"),
                                   ("aluminium", "IEC 60034-1"), ("aluminium", "IEC 60228")))
    gaps = [b / a - 1 for a, b in zip(results, results[1:], strict=False)]
    assert min(gaps) > 3 * RELATIVE


def supply_job(make_job, voltage, frequency):
    readings = {"supply": {
        "voltage": {"L1-L2": voltage, "L2-L3": voltage, "L3-L1": voltage},
        "frequency": frequency,
        "voltage_under_load": {"L1-L2": voltage, "L2-L3": voltage, "L3-L1": voltage},
    }}
    # The default machine: 400 V, three-phase, 50 Hz, with the built-in supply checklist.
    assert DEFAULT_MACHINE["nameplate"] == {"rated_voltage": "400 V", "phases": 3,
                                            "frequency": "50 Hz"}
    return make_job(visit={"readings": readings})


def test_supply_window_400_v_50_hz(make_job, evaluate, step):
    # reference values §3 example; IEC 60204-1 cl. 4.3.2: 0.9–1.1 Un steady state, 0.99–1.01 fn
    # continuous [M] → 360.0–440.0 V and 49.50–50.50 Hz; 432 V at 50.2 Hz passes.
    result = evaluate(supply_job(make_job, "432 V", "50.2 Hz"))
    for key in ("supply.voltage", "supply.voltage_under_load"):
        for line in ("L1-L2", "L2-L3", "L3-L1"):
            check = result.check(key, line)
            assert check.limit == "360 V ≤ U ≤ 440 V"
            assert check.verdict is Verdict.PASS
            assert step(check, "nameplate rated voltage") == 400.0
            # (432 − 400)/400 = +8 % exactly.
            assert step(check, "deviation") == pytest.approx(8.0, rel=1e-12)
            assert check.source.startswith("IEC 60204-1:2016, clause 4.3.2")
    frequency = result.check("supply.frequency")
    assert frequency.limit == "49.5 Hz ≤ f ≤ 50.5 Hz"
    assert frequency.verdict is Verdict.PASS
    assert step(frequency, "deviation") == pytest.approx(0.4, rel=1e-9)  # 0.2/50
    assert result.visit().state is VisitState.PASS


@pytest.mark.parametrize(
    ("frequency", "verdict"),
    [
        # IEC 60204-1 cl. 4.3.2: 0.99–1.01 fn, i.e. 49.50–50.50 Hz at 50 Hz [M]
        ("49.50 Hz", Verdict.PASS),
        ("49.49 Hz", Verdict.FAIL),
        ("50.50 Hz", Verdict.PASS),
        ("50.51 Hz", Verdict.FAIL),
    ],
)
def test_supply_frequency_boundaries(make_job, evaluate, frequency, verdict):
    result = evaluate(supply_job(make_job, "400 V", frequency))
    assert result.check("supply.frequency").verdict is verdict


@pytest.mark.parametrize(
    ("voltage", "verdict"),
    [
        # IEC 60204-1 cl. 4.3.2: 0.9–1.1 Un, i.e. 360.0–440.0 V at 400 V [M]
        ("360.0 V", Verdict.PASS),
        ("359.9 V", Verdict.FAIL),
        ("440.0 V", Verdict.PASS),
        ("440.1 V", Verdict.FAIL),
        ("0.44 kV", Verdict.PASS),
    ],
)
def test_supply_voltage_boundaries(make_job, evaluate, voltage, verdict):
    result = evaluate(supply_job(make_job, voltage, "50 Hz"))
    assert result.check("supply.voltage", "L3-L1").verdict is verdict
