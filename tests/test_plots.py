"""Plot geometry: 1-2-5 ticks, min/max decimation, and the SVG the templates make of it."""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ElementTree
from pathlib import Path

import jinja2
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.rendering.plots import (
    PlotTrace,
    decimate_min_max,
    format_tick,
    nice_step,
    nice_ticks,
    render_spectrum_svg,
    render_waveform_svg,
    spectrum_plot,
    waveform_plot,
)

ROOT = Path(__file__).resolve().parents[1]
SVG = "{http://www.w3.org/2000/svg}"

REPO_ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def env() -> jinja2.Environment:
    return jinja2.Environment(loader=jinja2.FileSystemLoader(ROOT / "site_templates"),
                              undefined=jinja2.StrictUndefined)


@pytest.mark.parametrize(("low", "high", "target", "expected"), [
    (0.0, 7.3, 5, (0.0, 2.0, 4.0, 6.0, 8.0)),
    (-327.0, 327.0, 5, (-400.0, -200.0, 0.0, 200.0, 400.0)),
    (0.0, 60.0, 6, (0.0, 10.0, 20.0, 30.0, 40.0, 50.0, 60.0)),
    (0.0, 0.0042, 5, (0.0, 0.001, 0.002, 0.003, 0.004, 0.005)),
    # A finer 1-2-5 step bounds ±53 A at ±60 rather than leaving half the panel empty.
    (-53.2, 53.2, 4, (-60.0, -40.0, -20.0, 0.0, 20.0, 40.0, 60.0)),
])
def test_ticks_are_whole_1_2_5_steps(low: float, high: float, target: int,
                                     expected: tuple[float, ...]) -> None:
    first, last, values = nice_ticks(low, high, target)
    assert values == pytest.approx(expected, abs=1e-12)
    assert (first, last) == (values[0], values[-1])


@given(st.floats(min_value=1e-9, max_value=1e9), st.integers(min_value=2, max_value=10))
def test_step_mantissa_is_1_2_or_5(span: float, target: int) -> None:
    # 1-2-5 series of "nice" scale steps [P, plotting practice]
    step = nice_step(span, target)
    mantissa = step / 10 ** math.floor(math.log10(step) + 1e-12)
    assert min(abs(mantissa - m) for m in (1.0, 2.0, 5.0)) < 1e-9
    assert span / step <= target * (1 + 1e-9)


def test_tick_labels_use_the_step_decimals_and_a_true_minus() -> None:
    assert format_tick(-200.0, 200.0) == "\u2212200"
    assert format_tick(0.0015, 0.0005) == "0.0015"
    assert format_tick(-0.0, 0.5) == "0.0"


def test_decimation_keeps_every_extreme_in_time_order() -> None:
    rng = np.random.default_rng(3)
    t = np.arange(1_000_000) * 1e-6
    y = np.sin(2 * math.pi * 50 * t) + rng.normal(0, 0.01, t.size)
    y[123_457] = 5.0  # a one-sample spike must survive
    ts, ys = decimate_min_max(t, y, 656)
    assert ts.size <= 2 * 656
    assert ys.max() == 5.0 and ys.min() == y.min()
    assert np.all(np.diff(ts) >= 0)


def test_short_traces_are_not_decimated() -> None:
    t = np.arange(100.0)
    ts, ys = decimate_min_max(t, t * 2, 600)
    assert ts is t or np.array_equal(ts, t)
    assert np.array_equal(ys, t * 2)


def _capture(count: int = 200_000, rate: float = 1e6) -> tuple[np.ndarray, list[PlotTrace]]:
    t = np.arange(count) / rate
    omega = 2 * math.pi * 50
    return t, [PlotTrace("CH1 supply <L1>", "V", 325 * np.sin(omega * t)),
               PlotTrace("CH2 line current", "A", 40 * np.sin(omega * t) ** 15)]


def test_waveform_geometry_stacks_one_panel_per_unit() -> None:
    t, traces = _capture()
    plot = waveform_plot(t, traces, frequency=50.0, cycles=3)
    assert [p.y_label for p in plot.panels] == ["Voltage [V]", "Current [A]"]
    assert plot.x_label == "Time [ms]"
    assert [tick.label for tick in plot.x_ticks] == ["0", "10", "20", "30", "40", "50", "60"]
    assert plot.panels[0].y_ticks[0].label == "\u2212400"
    dashes = [trace.dash for panel in plot.panels for trace in panel.traces]
    assert len(set(dashes)) == 2
    # Every trace fits under ~2000 points however long the capture.
    assert all(trace.point_count <= 2000 for p in plot.panels for trace in p.traces)


def test_waveform_svg_is_escaped_self_contained_xml(env: jinja2.Environment) -> None:
    t, traces = _capture()
    svg = render_waveform_svg(env, t, traces, frequency=50.0, cycles=3,
                              title="mag-table-1 & supply <test>")
    root = ElementTree.fromstring(svg)
    assert root.tag == f"{SVG}svg"
    assert root.find(f"{SVG}title").text == "mag-table-1 & supply <test>"
    polylines = root.findall(f".//{SVG}polyline")
    assert len(polylines) == 2
    assert all(len(p.get("points").split()) <= 2000 for p in polylines)
    assert [p.get("stroke-dasharray") for p in polylines] == [None, "7 4"]
    texts = [element.text for element in root.iter(f"{SVG}text")]
    assert "CH1 supply <L1>" in texts and "Time [ms]" in texts
    # Nothing fetched: the only URL is the SVG namespace; no web fonts.
    assert svg.count("http") == 1 and "@font-face" not in svg and "url(" not in svg
    assert len(svg) < 120_000


def test_spectrum_bars_are_percent_of_fundamental(env: jinja2.Environment) -> None:
    orders = list(range(1, 41))
    percent = [100.0] + [100.0 / n if n % 2 else 0.0 for n in orders[1:]]
    plot = spectrum_plot(orders, percent, note="harmonic subgroups, 10-cycle window")
    assert len(plot.bars) == 40
    assert plot.y_label == "% of fundamental"
    assert plot.y_ticks[-1].label == "100"
    third = plot.bars[2]
    assert third.height == pytest.approx(plot.plot_height / 3, rel=1e-12)
    svg = render_spectrum_svg(env, orders, percent, title="CH2 line current",
                              note="harmonic subgroups, 10-cycle window")
    root = ElementTree.fromstring(svg)
    bars = [r for r in root.iter(f"{SVG}rect") if r.get("class") == "bar"]
    assert len(bars) == 40
    assert "harmonic subgroups, 10-cycle window" in [e.text for e in root.iter(f"{SVG}text")]


def test_spectrum_without_the_fundamental_rescales_to_the_harmonics() -> None:
    plot = spectrum_plot([1, 2, 3], [100.0, 0.0, 33.0], include_fundamental=False)
    assert [bar.order for bar in plot.bars] == [2, 3]
    assert plot.y_ticks[-1].label == "35"


@pytest.mark.parametrize("name", ["spectrum", "trend", "waveform"])
def test_inline_plot_styles_stay_inside_their_plot(name):
    # A <style> inside inline SVG applies to the whole HTML page (CSS has no SVG scope), so a
    # bare ".value" rule once shrank every reading on a page that showed a spectrum.
    text = (REPO_ROOT / "site_templates" / "plots" / f"{name}.svg.j2").read_text(encoding="utf-8")
    sheet = text[text.index("<style>") + len("<style>"):text.index("</style>")]
    selectors = [s.strip() for rule in re.findall(r"^([^\s/][^{]*)\{", sheet, re.M)
                 for s in rule.split(",")]
    assert selectors
    assert all(s.startswith(f".plot-{name} ") for s in selectors), selectors
