"""A capture analysis in the results file (schema ``acceptance-capture/1``)."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from .analysis import CaptureAnalysis, ChannelAnalysis

CAPTURE_SCHEMA = "acceptance-capture/1"


def _quantity(value: float, unit: str) -> dict[str, Any]:
    return {"value": float(value), "unit": unit}


def _series(values: Sequence[float], unit: str) -> dict[str, Any]:
    return {"values": [float(v) for v in values], "unit": unit}


def _channel_json(item: ChannelAnalysis) -> dict[str, Any]:
    unit = item.unit
    metrics, spectrum = item.metrics, item.spectrum
    factor_unit = "V/V" if unit == "V" else "A/V"
    return {
        "unit": unit,
        "scaling": {"text": item.scaling.text,
                    "factor": _quantity(item.scaling.factor, factor_unit),
                    "offset": _quantity(item.scaling.offset, unit)},
        "cycles_used": _quantity(metrics.cycles_used, "1"),
        "window_duration": _quantity(metrics.window_duration, "s"),
        "rms": _quantity(metrics.rms, unit),
        "dc": _quantity(metrics.dc, unit),
        "ac_rms": _quantity(metrics.ac_rms, unit),
        "rectified_mean": _quantity(metrics.rectified_mean, unit),
        "peak": _quantity(metrics.peak, unit),
        "crest_factor": _quantity(metrics.crest_factor, "1"),
        "form_factor": _quantity(metrics.form_factor, "1"),
        "average_responding_ac": _quantity(metrics.average_responding_ac, unit),
        "average_responding_dc": _quantity(metrics.average_responding_dc, unit),
        "clipped": item.clipped,
        "harmonics": {
            "basis": spectrum.basis,
            "window_cycles": _quantity(spectrum.window_cycles, "1"),
            "window_duration": _quantity(spectrum.window_duration, "s"),
            "windows": _quantity(spectrum.windows, "1"),
            "iec_window": spectrum.iec_window,
            "orders": list(spectrum.orders),
            "magnitude": _series(spectrum.selected, unit),
            "percent_of_fundamental": _series(spectrum.percent_of_fundamental, "%"),
            "thd_f": _quantity(100.0 * spectrum.thd_f, "%"),
            "thd_r": _quantity(100.0 * spectrum.thd_r, "%"),
        },
    }


def capture_to_json(analysis: CaptureAnalysis) -> dict[str, Any]:
    """The analysis as plain data, schema ``acceptance-capture/1``.

    Every number is an object ``{"value": x, "unit": u}`` (``"1"`` for ratios and counts,
    ``"%"`` for percentages); lists of numbers are ``{"values": [...], "unit": u}``.
    Top-level keys: ``schema``, ``source``, ``rows``, ``time_column``, ``sampling``
    (``interval`` s, ``rate`` Hz, ``duration`` s, ``jitter`` 1), ``frequency`` Hz,
    ``frequency_channel``, ``voltage_channel``, ``current_channel``, ``channels`` (name →
    unit, scaling, cycles_used, window_duration, rms, dc, ac_rms, rectified_mean, peak,
    crest_factor, form_factor, average_responding_ac, average_responding_dc, clipped,
    harmonics), ``power`` (null without a voltage–current pair) and ``warnings`` (strings
    ``file:line:column: key: message``).
    """
    power = analysis.power
    return {
        "schema": CAPTURE_SCHEMA,
        "source": analysis.source,
        "rows": _quantity(analysis.rows, "1"),
        "time_column": analysis.time_column,
        "sampling": {
            "interval": _quantity(analysis.sample_interval, "s"),
            "rate": _quantity(analysis.sample_rate, "Hz"),
            "duration": _quantity(analysis.duration, "s"),
            "jitter": _quantity(analysis.jitter, "1"),
        },
        "frequency": _quantity(analysis.frequency, "Hz"),
        "frequency_channel": analysis.frequency_channel,
        "voltage_channel": analysis.voltage_channel,
        "current_channel": analysis.current_channel,
        "channels": {item.name: _channel_json(item) for item in analysis.channels},
        "power": None if power is None else {
            "cycles_used": _quantity(power.cycles_used, "1"),
            "voltage_rms": _quantity(power.voltage_rms, "V"),
            "current_rms": _quantity(power.current_rms, "A"),
            "voltage_fundamental_rms": _quantity(power.voltage_fundamental_rms, "V"),
            "current_fundamental_rms": _quantity(power.current_fundamental_rms, "A"),
            "real_power": _quantity(power.real_power, "W"),
            "apparent_power": _quantity(power.apparent_power, "VA"),
            "power_factor": _quantity(power.power_factor, "1"),
            "fundamental_phase_angle": _quantity(power.fundamental_phase_angle, "°"),
            "displacement_power_factor": _quantity(power.displacement_power_factor, "1"),
            "distortion_factor": _quantity(power.distortion_factor, "1"),
            "fundamental_real_power": _quantity(power.fundamental_real_power, "W"),
            "fundamental_reactive_power": _quantity(power.fundamental_reactive_power, "var"),
        },
        "warnings": [str(problem) for problem in analysis.warnings],
    }
