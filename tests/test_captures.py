"""Capture import: probe scaling, CSV dialects, every bad-input message, model round trip."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest

from acceptance.captures import (
    CAPTURE_SCHEMA,
    ChannelScaling,
    analyse_capture,
    capture_to_json,
    parse_scaling,
    read_capture,
)
from acceptance.computations.waveform import waveform_metrics
from acceptance.errors import InputError
from tests.rectifier_model import DEMO_CAPTURE, simulate_bridge_rectifier, write_demo_capture

ROOT = Path(__file__).resolve().parents[1]

# --------------------------------------------------------------------------- scaling


@pytest.mark.parametrize(("text", "factor", "unit"), [
    # A probe ratio N:1 divides the voltage by N, so the recorded volts are multiplied
    # by N; a sensitivity of s V/A multiplies by 1/s [P, probe markings].
    ("x10", 10.0, "V"),
    ("×100", 100.0, "V"),
    ("X100", 100.0, "V"),
    ("100x", 100.0, "V"),
    ("500:1", 500.0, "V"),
    ("10 mV/A", 100.0, "A"),
    ("100 mV/A", 10.0, "A"),
    ("100mV/A", 10.0, "A"),
    ("1 mV per 100 mA", 100.0, "A"),
    ("0.1 V/A", 10.0, "A"),
    ("V", 1.0, "V"),
    ("A", 1.0, "A"),
])
def test_probe_settings_as_people_write_them(text: str, factor: float, unit: str) -> None:
    scaling = parse_scaling(text)
    assert scaling.factor == pytest.approx(factor, rel=1e-12)
    assert scaling.unit == unit
    assert scaling.text == text


@pytest.mark.parametrize("text", ["x0", "ten", "10 mV/V", "mV/A", "1:10:1"])
def test_unreadable_probe_setting_says_what_is_accepted(text: str) -> None:
    with pytest.raises(ValueError, match="must be above zero|is not understood"):
        parse_scaling(text)


def test_offset_is_subtracted_after_scaling() -> None:
    scaling = parse_scaling("10 mV/A").with_offset(0.2)
    assert scaling.apply(np.array([0.01, 0.0])).tolist() == pytest.approx([0.8, -0.2])


# --------------------------------------------------------------------------- files


def _rows(count: int = 400, separator: str = ",", rate: float = 10_000.0,
          frequency: float = 50.0) -> list[str]:
    rows = []
    for k in range(count):
        t = k / rate
        rows.append(f"{t:.6f}{separator}{math.sin(2 * math.pi * frequency * t):.5f}"
                    f"{separator}{0.1 * math.sin(2 * math.pi * frequency * t - 0.3):.5f}")
    return rows


def _write(tmp_path: Path, rows: list[str], header: str = "time_s,CH1,CH2",
           name: str = "capture.csv", newline: str = "\n") -> Path:
    path = tmp_path / name
    path.write_bytes(newline.join([header, *rows, ""]).encode("utf-8"))
    return path


SCALINGS = {"CH1": parse_scaling("x100"), "CH2": parse_scaling("10 mV/A")}


def _error(path: Path, **options: object) -> str:
    with pytest.raises(InputError) as caught:
        analyse_capture(path, **{"channels": SCALINGS, **options})  # type: ignore[arg-type]
    return str(caught.value)


@pytest.mark.parametrize(("separator", "newline"), [(",", "\n"), (";", "\n"), (",", "\r\n")])
def test_comma_semicolon_and_crlf_files_read_alike(tmp_path: Path, separator: str,
                                                   newline: str) -> None:
    header = separator.join(["time_s", "CH1", "CH2"])
    path = _write(tmp_path, _rows(separator=separator), header=header, newline=newline)
    analysis = analyse_capture(path, SCALINGS, "CH1", "CH2")
    # 8 whole cycles of a 100 V-peak sine through x100 and 10 A peak through 10 mV/A.
    assert analysis.rows == 400
    assert analysis.frequency == pytest.approx(50.0, rel=1e-6)
    # Rms of a sine is peak/√2 [S]; values printed to 5 decimals leave 1e-5 relative.
    assert analysis.channel("CH1").metrics.rms == pytest.approx(100 / math.sqrt(2), rel=1e-4)
    assert analysis.channel("CH2").metrics.rms == pytest.approx(10 / math.sqrt(2), rel=1e-4)
    assert analysis.channel("CH2").unit == "A"
    assert analysis.power is not None
    # cos 0.3 rad: the current was written 0.3 rad behind the voltage [S: definition]
    assert analysis.power.displacement_power_factor == pytest.approx(math.cos(0.3), rel=1e-4)


def test_comments_bom_and_time_in_milliseconds(tmp_path: Path) -> None:
    rows = [f"{k / 10:.1f},{math.sin(2 * math.pi * 50 * k / 10_000):.5f}" for k in range(400)]
    path = tmp_path / "ms.csv"
    path.write_bytes(("# recorder export\n# second note\n" + "Time (ms),CH1\n"
                      + "\n".join(rows) + "\n").encode("utf-8-sig"))
    data = read_capture(path)
    assert data.header_line == 3
    assert data.line_of(0) == 4
    assert data.sample_interval == pytest.approx(1e-4, rel=1e-9)
    assert list(data.recorded) == ["CH1"]


def test_decimal_comma_is_refused(tmp_path: Path) -> None:
    rows = [row.replace(".", ",") for row in _rows(separator=";")]
    path = _write(tmp_path, rows, header="time_s;CH1;CH2")
    assert _error(path) == (
        f"{path}:2:1: decimal comma in '0,000000': this reader takes a decimal point only; "
        "export the capture with '.' as the decimal separator (the column separator may "
        "stay ';')")


def test_non_numeric_cell_names_line_and_column(tmp_path: Path) -> None:
    rows = _rows()
    rows[4] = "0.000400,abc,0.01"
    path = _write(tmp_path, rows)
    assert _error(path) == f"{path}:6:2: CH1: 'abc' in column CH1 is not a number"


def test_empty_cell_and_ragged_row_are_all_reported(tmp_path: Path) -> None:
    rows = _rows()
    rows[5] = "0.000500,,0.01"
    rows[9] = "0.000900,0.1"
    path = _write(tmp_path, rows)
    assert _error(path) == (
        f"{path}:7:2: CH1: an empty cell in column CH1; a number is needed\n"
        f"{path}:11:1: the row has 2 fields; the header names 3 (time_s, CH1, CH2)")


def test_missing_column_suggests_the_closest_header(tmp_path: Path) -> None:
    path = _write(tmp_path, _rows())
    message = _error(path, channels={"CH3": parse_scaling("x10"), "ch2": parse_scaling("A")})
    assert message == (
        f"{path}:1:1: CH3: no column named 'CH3'; the header names time_s, CH1, CH2; did you "
        "mean 'CH2'?\n"
        f"{path}:1:1: ch2: no column named 'ch2'; the header names time_s, CH1, CH2; did you "
        "mean 'CH2'?")


def test_misnamed_time_column(tmp_path: Path) -> None:
    path = _write(tmp_path, _rows())
    assert _error(path, time_column="time") == (
        f"{path}:1:1: no time column named 'time'; the header names time_s, CH1, CH2; did "
        "you mean 'time_s'?")


def test_nan_names_its_line(tmp_path: Path) -> None:
    rows = _rows()
    rows[5] = "0.000500,nan,0.01"
    path = _write(tmp_path, rows)
    assert _error(path) == (
        f"{path}:7:2: CH1: NaN in column CH1; every sample must be a finite number")


def test_time_not_increasing(tmp_path: Path) -> None:
    rows = _rows()
    rows[5] = "0.000300,0.1,0.01"
    path = _write(tmp_path, rows)
    assert _error(path) == (
        f"{path}:7:1: time_s: time 0.0003 s is not after 0.0004 s on line 6; the time "
        "column must increase")


def test_missing_samples_break_uniform_sampling(tmp_path: Path) -> None:
    rows = _rows()
    path = _write(tmp_path, rows[:5] + rows[7:])
    assert _error(path) == (
        f"{path}:7:1: time_s: sampling is not uniform: the step to 0.0007 s is 0.0003 s "
        "against a mean interval of 0.000100504 s (samples missing or the time base changed)")


def test_fewer_than_two_cycles(tmp_path: Path) -> None:
    path = _write(tmp_path, _rows(count=150))  # 15 ms of 50 Hz
    message = _error(path, voltage_channel="CH1")
    assert message.startswith(f"{path}:2:1: CH1: ")
    assert message.endswith("; at least two full cycles are needed")


def test_no_data_rows(tmp_path: Path) -> None:
    path = _write(tmp_path, [])
    assert _error(path) == f"{path}:1:1: the capture has a header row but no data rows"


def test_voltage_channel_must_be_in_volts(tmp_path: Path) -> None:
    path = _write(tmp_path, _rows())
    assert _error(path, voltage_channel="CH2") == (
        f"{path}:1:1: CH2: channel CH2 is scaled to A (10 mV/A) but is named as the voltage "
        "channel, which must be in V")


def test_clipping_is_a_warning_with_its_line(tmp_path: Path) -> None:
    t = np.arange(2000) / 10_000.0
    clipped = np.clip(1.3 * np.sin(2 * math.pi * 50 * t), -1.0, 1.0)
    path = _write(tmp_path, [f"{a:.6f},{b:.5f}" for a, b in zip(t, clipped, strict=True)],
                  header="time_s,CH1")
    analysis = analyse_capture(path, {"CH1": parse_scaling("x10")})
    # The sine crosses 1/1.3 at asin(1/1.3) = 0.877 rad; flat for (π − 2·0.877)/2π = 22 %.
    assert [str(w) for w in analysis.warnings] == [
        f"{path}:30:2: CH1: warning: CH1 stays at its largest recorded value 1 for 22 % of "
        "each cycle from this line on: the recorder clipped, so true RMS and peak are "
        "under-estimated; record again on a wider range"]
    assert analysis.channel("CH1").clipped


def test_unclipped_capture_has_no_warning(tmp_path: Path) -> None:
    path = _write(tmp_path, _rows())
    assert analyse_capture(path, SCALINGS).warnings == ()


# --------------------------------------------------------------------------- round trip


def test_model_capture_reads_back_to_the_model_values(tmp_path: Path) -> None:
    run = simulate_bridge_rectifier(supply_rms=230.0, duration=0.24)
    path = write_demo_capture(tmp_path / "model.csv", run, noise=0.0)
    analysis = analyse_capture(path, SCALINGS, "CH1", "CH2")
    assert analysis.rows == run.time.size
    assert analysis.sample_interval == pytest.approx(run.sample_interval, rel=1e-9)
    direct = waveform_metrics(run.line_current, run.sample_interval)
    read = analysis.channel("CH2").metrics
    # Values were written to 10 µV at the probe output (1 mA here); 1e-4 relative.
    assert read.rms == pytest.approx(direct.rms, rel=1e-4)
    assert read.peak == pytest.approx(direct.peak, abs=1.1e-3)
    assert read.average_responding_ac == pytest.approx(direct.average_responding_ac, rel=1e-4)
    assert read.cycles_used == direct.cycles_used == 12


def test_demo_capture_shows_a_rectifier_current() -> None:
    analysis = analyse_capture(ROOT / DEMO_CAPTURE, SCALINGS, "CH1", "CH2")
    current = analysis.channel("CH2").metrics
    # reference values §9 [P]: crest factor 2.5–4.5; average-responding reads 30–45 % low.
    assert 2.5 <= current.crest_factor <= 4.5
    assert 0.30 <= 1 - current.average_responding_ac / current.rms <= 0.45
    assert analysis.channel("CH1").metrics.rms == pytest.approx(230.0, rel=0.05)
    assert analysis.frequency == pytest.approx(50.0, abs=0.01)
    assert analysis.warnings == ()


def _leaves_have_units(node: object, path: str = "") -> list[str]:
    bad = []
    if isinstance(node, dict):
        if "value" in node or "values" in node:
            if "unit" not in node:
                bad.append(path)
            return bad
        for key, value in node.items():
            bad.extend(_leaves_have_units(value, f"{path}.{key}"))
    elif isinstance(node, list):
        if any(isinstance(v, float) for v in node) and not path.endswith("orders"):
            bad.append(path)
    elif isinstance(node, float):
        bad.append(path)
    return bad


def test_json_is_versioned_and_every_value_has_a_unit() -> None:
    analysis = analyse_capture(ROOT / DEMO_CAPTURE, SCALINGS, "CH1", "CH2")
    document = json.loads(json.dumps(capture_to_json(analysis)))
    assert document["schema"] == CAPTURE_SCHEMA == "acceptance-capture/1"
    assert _leaves_have_units(document) == []
    channel = document["channels"]["CH2"]
    assert channel["rms"]["unit"] == "A"
    assert channel["scaling"] == {"text": "10 mV/A", "factor": {"value": 100.0, "unit": "A/V"},
                                  "offset": {"value": 0.0, "unit": "A"}}
    assert channel["harmonics"]["thd_f"]["unit"] == "%"
    assert len(channel["harmonics"]["orders"]) == 40
    assert document["power"]["power_factor"]["unit"] == "1"


def test_channel_scaling_rejects_an_unknown_unit() -> None:
    with pytest.raises(ValueError, match="unit 'W' must be 'V' or 'A'"):
        ChannelScaling(1.0, "W")
