"""``acceptance capture FILE``: analyse one scope capture and print a summary or JSON."""

from __future__ import annotations

import argparse
import json
import math
import re
from pathlib import Path

from ..captures import (
    CaptureAnalysis,
    ChannelAnalysis,
    ChannelScaling,
    analyse_capture,
    capture_to_json,
    parse_scaling,
)
from ..errors import AcceptanceError

__all__ = ["register", "run", "summary"]

_OFFSET = re.compile(
    r"^\s*([-+]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][-+]?[0-9]+)?)\s*(mV|V|mA|A)?\s*$")
_UNIT_OF = {"mV": ("V", 1e-3), "V": ("V", 1.0), "mA": ("A", 1e-3), "A": ("A", 1.0)}
_TOP_HARMONICS = 5


def _channel_option(text: str) -> tuple[str, ChannelScaling]:
    name, separator, scaling = text.partition("=")
    if not separator or not name.strip():
        raise argparse.ArgumentTypeError(
            f"{text!r} should be NAME=SCALING, e.g. CH1=x100 or CH2='10 mV/A'")
    try:
        return name.strip(), parse_scaling(scaling)
    except ValueError as error:
        raise argparse.ArgumentTypeError(str(error)) from None


def _offset_option(text: str) -> tuple[str, float, str | None]:
    name, separator, value = text.partition("=")
    match = _OFFSET.match(value)
    if not separator or not name.strip() or not match:
        raise argparse.ArgumentTypeError(
            f"{text!r} should be NAME=VALUE with an optional unit, e.g. CH2=0.05 or "
            "CH2='-50 mA'")
    number = float(match.group(1))
    if match.group(2) is None:
        return name.strip(), number, None
    unit, scale = _UNIT_OF[match.group(2)]
    return name.strip(), number * scale, unit


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", metavar="FILE", type=Path,
                        help="capture CSV: a time column and one or more channels")
    parser.add_argument("--channel", action="append", default=[], type=_channel_option,
                        metavar="NAME=SCALING",
                        help="channel and probe scaling: x100, 500:1, '10 mV/A', "
                             "'1 mV per 100 mA', V or A (repeatable; when no channel, "
                             "voltage or current is named, every column is analysed as "
                             "recorded, in V)")
    parser.add_argument("--time-column", metavar="NAME",
                        help="name of the time column (default: the column named like "
                             "'time', else the first)")
    parser.add_argument("--voltage", metavar="CH", help="voltage channel of a v-i pair")
    parser.add_argument("--current", metavar="CH", help="current channel of a v-i pair")
    parser.add_argument("--offset", action="append", default=[], type=_offset_option,
                        metavar="NAME=VALUE",
                        help="subtract VALUE (in the channel's unit) after scaling "
                             "(repeatable)")
    parser.add_argument("--json", action="store_true",
                        help="print the analysis as JSON (schema acceptance-capture/1)")


def _scalings(args: argparse.Namespace) -> dict[str, ChannelScaling]:
    scalings: dict[str, ChannelScaling] = {}
    for name, scaling in args.channel:
        if name in scalings:
            raise AcceptanceError(f"--channel {name} is given twice")
        scalings[name] = scaling
    for name, unit in ((args.voltage, "V"), (args.current, "A")):
        if name is not None and name not in scalings:
            scalings[name] = ChannelScaling(1.0, unit, 0.0, unit)
    for name, value, unit in args.offset:
        base = scalings.get(name, ChannelScaling())
        if unit is not None and unit != base.unit:
            raise AcceptanceError(
                f"--offset {name}: the offset is in {unit} but channel {name} is scaled to "
                f"{base.unit} ({base.text})")
        scalings[name] = base.with_offset(value)
    return scalings


def _number(value: float) -> str:
    if value == 0.0 or not math.isfinite(value):
        return f"{value:g}"
    if abs(value) >= 1e4:
        return f"{value:.0f}"
    return f"{value:.4g}"


def _quantity(value: float, unit: str) -> str:
    return f"{_number(value)} {unit}"


def _channel_lines(item: ChannelAnalysis) -> list[str]:
    metrics, spectrum, unit = item.metrics, item.spectrum, item.unit
    role = "voltage" if unit == "V" else "current"
    under = 100.0 * (metrics.average_responding_ac / metrics.rms - 1.0)
    window = (f"{spectrum.windows} window{'s' if spectrum.windows != 1 else ''} of "
              f"{spectrum.window_cycles} cycles"
              + ("" if spectrum.iec_window else ", shorter than the IEC 61000-4-7 window"))
    ranked = sorted(zip(spectrum.orders[1:], spectrum.percent_of_fundamental[1:],
                        strict=True), key=lambda pair: -pair[1])[:_TOP_HARMONICS]
    return [
        f"{item.name}  {role}, scaling {item.scaling.text}"
        + (f", offset {_quantity(item.scaling.offset, unit)}" if item.scaling.offset else ""),
        f"  true RMS             {_quantity(metrics.rms, unit)}"
        f"   (d.c. {_quantity(metrics.dc, unit)}, a.c. RMS {_quantity(metrics.ac_rms, unit)})",
        f"  rectified mean       {_quantity(metrics.rectified_mean, unit)}",
        f"  peak                 {_quantity(metrics.peak, unit)}"
        f"   crest factor {metrics.crest_factor:.3f}   form factor {metrics.form_factor:.3f}",
        f"  average-responding   {_quantity(metrics.average_responding_ac, unit)} a.c.-coupled"
        f" ({under:+.1f} % of true RMS), {_quantity(metrics.average_responding_dc, unit)}"
        " d.c.-coupled",
        f"  THD-F {100 * spectrum.thd_f:.1f} %   THD-R {100 * spectrum.thd_r:.1f} %"
        f"   (harmonic {spectrum.basis}s to order {spectrum.highest_order}, {window})",
        "  largest harmonics    "
        + "   ".join(f"h{order}: {percent:.1f} %" for order, percent in ranked),
    ]


def summary(analysis: CaptureAnalysis) -> str:
    """The terminal summary of an analysis."""
    lines = [
        f"{analysis.source}: {analysis.rows} rows, {analysis.sample_rate / 1e3:.4g} kS/s, "
        f"{analysis.duration:.4g} s, timing jitter {100 * analysis.jitter:.3f} % of the interval",
        f"fundamental {analysis.frequency:.3f} Hz (from {analysis.frequency_channel}), "
        f"{analysis.channels[0].metrics.cycles_used} whole cycles used",
        "",
    ]
    for item in analysis.channels:
        lines.extend(_channel_lines(item))
        lines.append("")
    power = analysis.power
    if power is not None:
        lag = "lagging" if power.fundamental_phase_angle >= 0 else "leading"
        lines.extend([
            f"power ({analysis.voltage_channel} × {analysis.current_channel})",
            f"  real power P         {_quantity(power.real_power, 'W')}"
            f"   apparent power S {_quantity(power.apparent_power, 'VA')}",
            f"  power factor         {power.power_factor:.3f}"
            f"   displacement PF cos φ1 {power.displacement_power_factor:.3f}"
            f" (φ1 {abs(power.fundamental_phase_angle):.1f}°, current {lag})",
            f"  distortion factor    {power.distortion_factor:.3f} (I1/I)",
            "",
        ])
    lines.extend(str(problem) for problem in analysis.warnings)
    return "\n".join(lines).rstrip() + "\n"


def run(args: argparse.Namespace) -> int:
    analysis = analyse_capture(args.file, _scalings(args), voltage_channel=args.voltage,
                               current_channel=args.current, time_column=args.time_column)
    if args.json:
        print(json.dumps(capture_to_json(analysis), indent=2, ensure_ascii=False))
    else:
        print(summary(analysis), end="")
    return 0
