"""Geometry of the plots: a few cycles of a capture, its harmonic spectrum, and trends over visits.

Python computes coordinates, ticks and labels only; the SVG markup is in
``site_templates/plots/waveform.svg.j2``, ``site_templates/plots/spectrum.svg.j2`` and
``site_templates/plots/trend.svg.j2``.
Traces differ by dash pattern as well as by grey level, so a plot reads in grey-scale
print. Long captures are reduced to the minimum and maximum per pixel column before they
become polylines, which keeps an SVG small without hiding peaks.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Sequence
from dataclasses import dataclass

import jinja2
import numpy as np
from markupsafe import Markup
from numpy.typing import ArrayLike, NDArray

from ..results import MachineResult
from ..units import Dimension, UnitError, parse_quantity

__all__ = [
    "Bar",
    "Legend",
    "Panel",
    "PlotTrace",
    "SpectrumPlot",
    "Tick",
    "TracePath",
    "TrendInput",
    "TrendLine",
    "TrendMarker",
    "TrendPlot",
    "WaveformPlot",
    "decimate_min_max",
    "format_tick",
    "nice_step",
    "nice_ticks",
    "render_spectrum_svg",
    "render_machine_trends",
    "render_trend_svg",
    "render_waveform_svg",
    "spectrum_plot",
    "trend_plot",
    "waveform_plot",
]

WAVEFORM_TEMPLATE = "plots/waveform.svg.j2"
SPECTRUM_TEMPLATE = "plots/spectrum.svg.j2"

# Solid, dashed, dotted, dash-dot: distinct in grey-scale print and for colour-blind readers.
_DASHES = ("", "7 4", "2 3", "9 3 2 3")
_GREYS = ("#000000", "#404040", "#000000", "#606060")
_QUANTITY = {"V": "Voltage", "A": "Current"}
_MINUS = "\u2212"

_MARGIN_LEFT = 64.0
_MARGIN_RIGHT = 16.0
_MARGIN_TOP = 34.0
_PANEL_GAP = 22.0
_AXIS_SPACE = 40.0


@dataclass(frozen=True)
class PlotTrace:
    """One channel to plot: legend label, physical unit and values [unit]."""

    label: str
    unit: str
    values: ArrayLike


@dataclass(frozen=True)
class Tick:
    """A tick: its position along the axis [px] and its label."""

    position: float
    label: str


@dataclass(frozen=True)
class TracePath:
    """A polyline: ``points`` is the SVG ``points`` attribute."""

    label: str
    points: str
    dash: str
    stroke: str
    point_count: int


@dataclass(frozen=True)
class Legend:
    """A legend entry: a short line sample from (x1, y) to (x2, y) and its text at x2 + 6."""

    label: str
    x1: float
    x2: float
    y: float
    dash: str
    stroke: str


@dataclass(frozen=True)
class Panel:
    """One plotting area with its own y axis."""

    x: float
    y: float
    width: float
    height: float
    y_label: str
    y_ticks: tuple[Tick, ...]
    zero: float | None
    traces: tuple[TracePath, ...]
    legend: tuple[Legend, ...]


@dataclass(frozen=True)
class WaveformPlot:
    """Stacked panels sharing a time axis, one panel per physical unit."""

    width: float
    height: float
    title: str
    panels: tuple[Panel, ...]
    x_label: str
    x_ticks: tuple[Tick, ...]
    x_axis_y: float


@dataclass(frozen=True)
class Bar:
    """One harmonic bar: rectangle [px], order and its percentage text."""

    order: int
    x: float
    y: float
    width: float
    height: float
    value_label: str
    show_value: bool


@dataclass(frozen=True)
class SpectrumPlot:
    """Bar chart of harmonics in percent of the fundamental."""

    width: float
    height: float
    title: str
    x: float
    y: float
    plot_width: float
    plot_height: float
    x_label: str
    y_label: str
    x_ticks: tuple[Tick, ...]
    y_ticks: tuple[Tick, ...]
    bars: tuple[Bar, ...]
    note: str


# --------------------------------------------------------------------------- ticks


def nice_step(span: float, target_count: int = 5) -> float:
    """A 1-2-5 step giving about ``target_count`` intervals over ``span``."""
    if not (math.isfinite(span) and span > 0.0):
        return 1.0
    raw = span / max(1, target_count)
    magnitude = 10.0 ** math.floor(math.log10(raw))
    for multiple in (1.0, 2.0, 5.0, 10.0):
        if raw <= multiple * magnitude * (1.0 + 1e-9):
            return multiple * magnitude
    return 10.0 * magnitude


def nice_ticks(low: float, high: float,
               target_count: int = 5) -> tuple[float, float, tuple[float, ...]]:
    """Axis limits widened to whole steps, and the tick values between them."""
    if not (math.isfinite(low) and math.isfinite(high)):
        low, high = 0.0, 1.0
    if high < low:
        low, high = high, low
    if high == low:
        pad = abs(low) * 0.1 or 1.0
        low, high = low - pad, high + pad
    # A slightly finer step often bounds the data much more tightly (±53 → ±60, not ±100).
    best: tuple[float, int, int] | None = None
    for count in (target_count, target_count + 1, target_count + 2):
        candidate = nice_step(high - low, count)
        start = math.floor(low / candidate + 1e-9)
        stop = math.ceil(high / candidate - 1e-9)
        if best is None or (stop - start) * candidate < (best[2] - best[1]) * best[0] - 1e-12:
            best = (candidate, start, stop)
    assert best is not None  # the loop runs at least once
    step, first, last = best
    values = tuple(round(k * step, 12) + 0.0 for k in range(first, last + 1))
    return values[0], values[-1], values


def format_tick(value: float, step: float) -> str:
    """Tick text with as many decimals as the step needs and a true minus sign."""
    decimals = max(0, -math.floor(math.log10(step) + 1e-9)) if step > 0 else 0
    text = f"{abs(value):.{decimals}f}"
    if value < 0 and float(text) != 0.0:
        return _MINUS + text
    return text


# --------------------------------------------------------------------------- decimation


def decimate_min_max(time: ArrayLike, values: ArrayLike,
                     columns: int) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Keep the minimum and maximum of each of ``columns`` equal time slices.

    Parameters
    ----------
    time : array_like
        Increasing sample times [s].
    values : array_like
        Samples [unit].
    columns : int
        Pixel columns across the plot [unitless].

    Returns
    -------
    tuple of numpy.ndarray
        Times and values, at most ``2·columns`` points, in time order; within a column the
        extreme reached first comes first, so edges keep their direction.
    """
    t = np.asarray(time, dtype=np.float64)
    y = np.asarray(values, dtype=np.float64)
    if t.size <= 2 * columns or t.size < 2:
        return t, y
    span = t[-1] - t[0]
    index = np.minimum(((t - t[0]) / span * columns).astype(np.int64), columns - 1)
    starts = np.flatnonzero(np.diff(index, prepend=-1))
    ends = np.append(starts[1:], t.size) - 1
    lows = np.minimum.reduceat(y, starts)
    highs = np.maximum.reduceat(y, starts)
    rising = y[starts] <= y[ends]
    first = np.where(rising, lows, highs)
    second = np.where(rising, highs, lows)
    out_y = np.column_stack((first, second)).ravel()
    out_t = np.column_stack((t[starts], t[ends])).ravel()
    return out_t, out_y


def _points(xs: NDArray[np.float64], ys: NDArray[np.float64]) -> str:
    return " ".join(f"{x:.1f},{y:.1f}" for x, y in zip(xs.tolist(), ys.tolist(), strict=True))


# --------------------------------------------------------------------------- waveform


def _time_unit(span: float) -> tuple[str, float]:
    if span < 2e-3:
        return "µs", 1e6
    if span < 2.0:
        return "ms", 1e3
    return "s", 1.0


def waveform_plot(time: ArrayLike, traces: Sequence[PlotTrace], *,
                  frequency: float | None = None, cycles: float = 3.0,
                  title: str = "", width: float = 720.0,
                  panel_height: float = 170.0) -> WaveformPlot:
    """Lay out a few cycles of each trace in stacked panels, one per unit.

    Parameters
    ----------
    time : array_like
        Sample times [s].
    traces : sequence of PlotTrace
        Channels to draw; traces with the same unit share a panel.
    frequency : float, optional
        Fundamental; with it, ``cycles`` cycles from the first sample are shown, otherwise
        the whole capture [Hz].
    cycles : float, optional
        Cycles shown [unitless].
    title : str, optional
    width, panel_height : float, optional
        Overall width and height of each panel [px].
    """
    t = np.asarray(time, dtype=np.float64)
    if not traces:
        raise ValueError("waveform_plot needs at least one trace")
    stop = t.size
    if frequency and frequency > 0:
        stop = int(np.searchsorted(t, t[0] + cycles / frequency, side="right"))
        stop = max(2, min(t.size, stop))
    shown = t[:stop] - t[0]
    span = float(shown[-1]) if shown.size > 1 else 1.0
    unit_name, unit_scale = _time_unit(span)
    plot_width = width - _MARGIN_LEFT - _MARGIN_RIGHT
    _, x_high, x_values = nice_ticks(0.0, span * unit_scale, 6)
    x_high = max(x_high, 1e-300)
    columns = max(2, int(plot_width))

    units = list(dict.fromkeys(trace.unit for trace in traces))
    panels = []
    for panel_index, unit in enumerate(units):
        top = _MARGIN_TOP + panel_index * (panel_height + _PANEL_GAP)
        members = [(k, trace) for k, trace in enumerate(traces) if trace.unit == unit]
        decimated = [decimate_min_max(shown, np.asarray(trace.values, dtype=np.float64)[:stop],
                                      columns) for _, trace in members]
        low = min(float(np.min(v)) for _, v in decimated)
        high = max(float(np.max(v)) for _, v in decimated)
        y_low, y_high, y_values = nice_ticks(low, high, 4)
        y_step = y_values[1] - y_values[0] if len(y_values) > 1 else 1.0

        def to_y(values: NDArray[np.float64], top: float = top, y_low: float = y_low,
                 y_high: float = y_high) -> NDArray[np.float64]:
            return top + panel_height * (1.0 - (values - y_low) / (y_high - y_low))

        paths = []
        legend = []
        for position, ((index, trace), (ts, vs)) in enumerate(zip(members, decimated,
                                                                 strict=True)):
            xs = _MARGIN_LEFT + ts * unit_scale / x_high * plot_width
            dash, stroke = _DASHES[index % len(_DASHES)], _GREYS[index % len(_GREYS)]
            paths.append(TracePath(trace.label, _points(xs, to_y(vs)), dash, stroke, xs.size))
            legend_x = _MARGIN_LEFT + plot_width - 150.0
            legend.append(Legend(trace.label, legend_x, legend_x + 28.0,
                                 top + 14.0 + 14.0 * position, dash, stroke))
        zero = float(to_y(np.array([0.0]))[0]) if y_low < 0.0 < y_high else None
        y_ticks = tuple(Tick(float(to_y(np.array([v]))[0]), format_tick(v, y_step))
                        for v in y_values)
        panels.append(Panel(
            x=_MARGIN_LEFT, y=top, width=plot_width, height=panel_height,
            y_label=f"{_QUANTITY.get(unit, unit)} [{unit}]", y_ticks=y_ticks, zero=zero,
            traces=tuple(paths), legend=tuple(legend)))

    x_step = x_values[1] - x_values[0] if len(x_values) > 1 else 1.0
    x_ticks = tuple(Tick(_MARGIN_LEFT + v / x_high * plot_width, format_tick(v, x_step))
                    for v in x_values)
    axis_y = _MARGIN_TOP + len(units) * panel_height + (len(units) - 1) * _PANEL_GAP
    return WaveformPlot(
        width=width, height=axis_y + _AXIS_SPACE, title=title, panels=tuple(panels),
        x_label=f"Time [{unit_name}]", x_ticks=x_ticks, x_axis_y=axis_y)


def render_waveform_svg(env: jinja2.Environment, time: ArrayLike,
                        traces: Sequence[PlotTrace], **layout: object) -> str:
    """SVG of :func:`waveform_plot` (keyword arguments pass through) from its template."""
    plot = waveform_plot(time, traces, **layout)  # type: ignore[arg-type]
    return env.get_template(WAVEFORM_TEMPLATE).render(plot=plot)


# --------------------------------------------------------------------------- spectrum


def spectrum_plot(orders: Sequence[int], percent_of_fundamental: Sequence[float], *,
                  title: str = "", include_fundamental: bool = True,
                  width: float = 720.0, height: float = 280.0,
                  note: str = "") -> SpectrumPlot:
    """Lay out a bar per harmonic order, height in percent of the fundamental.

    Parameters
    ----------
    orders : sequence of int
        Harmonic orders, 1 first.
    percent_of_fundamental : sequence of float
        Magnitude of each order over the fundamental [%].
    title : str, optional
    include_fundamental : bool, optional
        Draw the 100 % bar of order 1.
    width, height : float, optional
        [px].
    note : str, optional
        A line under the chart, e.g. the window and basis used.
    """
    pairs = [(int(o), float(p)) for o, p in zip(orders, percent_of_fundamental, strict=True)
             if include_fundamental or int(o) != 1]
    if not pairs:
        raise ValueError("spectrum_plot needs at least one harmonic order")
    left, top = _MARGIN_LEFT, _MARGIN_TOP
    plot_width = width - _MARGIN_LEFT - _MARGIN_RIGHT
    plot_height = height - _MARGIN_TOP - _AXIS_SPACE - (14.0 if note else 0.0)
    highest = max(p for _, p in pairs)
    _, y_high, y_values = nice_ticks(0.0, max(highest, 1e-9), 5)
    y_step = y_values[1] - y_values[0] if len(y_values) > 1 else 1.0
    first_order = pairs[0][0]
    last_order = pairs[-1][0]
    slot = plot_width / (last_order - first_order + 1)
    bars = []
    for order, percent in pairs:
        bar_height = plot_height * percent / y_high
        bars.append(Bar(
            order=order, x=left + (order - first_order + 0.15) * slot,
            y=top + plot_height - bar_height, width=0.7 * slot, height=bar_height,
            value_label=f"{percent:.0f}" if percent >= 10 else f"{percent:.1f}",
            show_value=percent >= 0.05 * y_high and slot >= 12.0))
    label_every = 1 if slot >= 18 else 5
    x_ticks = tuple(Tick(left + (order - first_order + 0.5) * slot, str(order))
                    for order, _ in pairs
                    if order == first_order or order % label_every == 0)
    y_ticks = tuple(Tick(top + plot_height * (1.0 - v / y_high), format_tick(v, y_step))
                    for v in y_values)
    return SpectrumPlot(
        width=width, height=height, title=title, x=left, y=top, plot_width=plot_width,
        plot_height=plot_height, x_label="Harmonic order", y_label="% of fundamental",
        x_ticks=x_ticks, y_ticks=y_ticks, bars=tuple(bars), note=note)


def render_spectrum_svg(env: jinja2.Environment, orders: Sequence[int],
                        percent_of_fundamental: Sequence[float], **layout: object) -> str:
    """SVG of :func:`spectrum_plot` (keyword arguments pass through) from its template."""
    plot = spectrum_plot(orders, percent_of_fundamental, **layout)  # type: ignore[arg-type]
    return env.get_template(SPECTRUM_TEMPLATE).render(plot=plot)


# --------------------------------------------------------------------------- trends

TREND_TEMPLATE = "plots/trend.svg.j2"

# Marker shapes per trace, as well as dash patterns, so traces read in grey-scale print.
_SHAPES = ("circle", "square", "triangle", "diamond")


@dataclass(frozen=True)
class TrendInput:
    """One trace of a trend: legend label and its (date, value) points [display unit]."""

    label: str
    points: Sequence[tuple[_dt.date, float]]


@dataclass(frozen=True)
class TrendMarker:
    """A point of a trend: centre [px], marker shape and its hover text."""

    x: float
    y: float
    shape: str
    label: str


@dataclass(frozen=True)
class TrendLine:
    label: str
    points: str
    dash: str
    stroke: str
    shape: str
    markers: tuple[TrendMarker, ...]


@dataclass(frozen=True)
class TrendPlot:
    """A quantity over the visits: one line per element, the limit band and the baseline."""

    width: float
    height: float
    title: str
    x: float
    y: float
    plot_width: float
    plot_height: float
    y_label: str
    x_ticks: tuple[Tick, ...]
    y_ticks: tuple[Tick, ...]
    lines: tuple[TrendLine, ...]
    legend: tuple[Legend, ...]
    band: tuple[float, float] | None  # top and bottom of the acceptable band [px]
    limits: tuple[Tick, ...]  # each finite limit: its y [px] and label
    baseline_x: float | None
    baseline_label: str


_MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def _day_at(ordinal: float) -> _dt.date:
    """The day of ``ordinal``, kept inside the calendar: the padding around a visit dated
    near year 1 or 9999 would otherwise leave it."""
    return _dt.date.fromordinal(min(max(int(ordinal), 1), _dt.date.max.toordinal()))


def _month_ticks(first: _dt.date, last: _dt.date) -> list[_dt.date]:
    """First days of months at a 1, 2, 3, 6 or 12-month step, about six across the span."""
    months = (last.year - first.year) * 12 + last.month - first.month + 1
    step = next((s for s in (1, 2, 3, 6, 12) if months / s <= 7), 12 * math.ceil(months / 84))
    start = first.year * 12 + first.month - 1
    start -= start % step
    ticks = []
    index = max(start, _dt.MINYEAR * 12)
    while index // 12 <= _dt.MAXYEAR:
        day = _dt.date(index // 12, index % 12 + 1, 1)
        if day > last:
            break
        if day >= first:
            ticks.append(day)
        index += step
    return ticks


def trend_plot(traces: Sequence[TrendInput], *, quantity: str, unit: str,
               lower: float | None = None, upper: float | None = None,
               baseline: _dt.date | None = None, baseline_label: str = "baseline",
               title: str = "", width: float = 720.0, height: float = 300.0) -> TrendPlot:
    """Lay out a quantity over visit dates with its limit band and the baseline marked.

    Parameters
    ----------
    traces : sequence of TrendInput
        One per element; values in ``unit`` [unit].
    quantity : str
        What is plotted, for the y label (e.g. ``R at 20 °C``).
    unit : str
        Display unit of the values and limits.
    lower, upper : float, optional
        Limits of the acceptable band; either may be absent [unit].
    baseline : datetime.date, optional
        Date of the baseline visit, drawn as a vertical line.
    title : str, optional
    width, height : float, optional
        [px].
    """
    points = [(day, value) for trace in traces for day, value in trace.points]
    if not points:
        raise ValueError("trend_plot needs at least one point")
    left, top = _MARGIN_LEFT + 12.0, _MARGIN_TOP
    legend_rows = len(traces) + (1 if lower is not None or upper is not None else 0) \
        + (1 if baseline is not None else 0)
    plot_width = width - left - _MARGIN_RIGHT
    plot_height = height - top - _AXIS_SPACE - 14.0 * ((legend_rows + 2) // 3)
    days = [day.toordinal() for day, _ in points]
    if baseline is not None:
        days.append(baseline.toordinal())
    first_day, last_day = min(days), max(days)
    pad = max(7.0, 0.06 * (last_day - first_day))
    x_low, x_high = first_day - pad, last_day + pad
    values = [value for _, value in points]
    values += [v for v in (lower, upper) if v is not None]
    y_low, y_high, y_values = nice_ticks(min(values), max(values), 5)
    y_step = y_values[1] - y_values[0] if len(y_values) > 1 else 1.0

    def to_x(day: float) -> float:
        return left + plot_width * (day - x_low) / (x_high - x_low)

    def to_y(value: float) -> float:
        return top + plot_height * (1.0 - (value - y_low) / (y_high - y_low))

    lines = []
    for index, trace in enumerate(traces):
        dash, stroke = _DASHES[index % len(_DASHES)], _GREYS[index % len(_GREYS)]
        shape = _SHAPES[index % len(_SHAPES)]
        ordered = sorted(trace.points)
        markers = tuple(TrendMarker(to_x(day.toordinal()), to_y(value), shape,
                                    f"{trace.label}: {day.isoformat()}, "
                                    f"{format_tick(value, y_step / 100)} {unit}")
                        for day, value in ordered)
        lines.append(TrendLine(trace.label, " ".join(f"{m.x:.1f},{m.y:.1f}" for m in markers),
                               dash, stroke, shape, markers))
    band = None
    if lower is not None or upper is not None:
        band = (to_y(upper) if upper is not None else top,
                to_y(lower) if lower is not None else top + plot_height)
    limits = tuple(Tick(to_y(v), f"{label} {format_tick(v, y_step / 10)} {unit}")
                   for label, v in (("upper limit", upper), ("lower limit", lower))
                   if v is not None)
    entries: list[tuple[str, str, str]] = [(line.label, line.dash, line.stroke)
                                           for line in lines]
    if band is not None:
        entries.append(("acceptable band", "band", "#000000"))
    if baseline is not None:
        entries.append((baseline_label, "baseline", "#000000"))
    legend_top = top + plot_height + 32.0
    column = plot_width / 3
    legend = tuple(Legend(label, left + column * (k % 3), left + column * (k % 3) + 26.0,
                          legend_top + 14.0 * (k // 3), dash, stroke)
                   for k, (label, dash, stroke) in enumerate(entries))
    x_ticks = tuple(Tick(to_x(day.toordinal()), f"{_MONTHS[day.month - 1]} {day.year}")
                    for day in _month_ticks(_day_at(math.ceil(x_low)), _day_at(x_high)))
    y_ticks = tuple(Tick(to_y(v), format_tick(v, y_step)) for v in y_values)
    return TrendPlot(
        width=width, height=height, title=title, x=left, y=top, plot_width=plot_width,
        plot_height=plot_height, y_label=f"{quantity} [{unit}]", x_ticks=x_ticks,
        y_ticks=y_ticks, lines=tuple(lines), legend=legend, band=band, limits=limits,
        baseline_x=to_x(baseline.toordinal()) if baseline is not None else None,
        baseline_label=baseline_label)


def render_trend_svg(env: jinja2.Environment, traces: Sequence[TrendInput],
                     **layout: object) -> str:
    """SVG of :func:`trend_plot` (keyword arguments pass through) from its template."""
    plot = trend_plot(traces, **layout)  # type: ignore[arg-type]
    return env.get_template(TREND_TEMPLATE).render(plot=plot)


def _display_factor(base_unit: str, display_unit: str | None) -> tuple[str, float]:
    """The unit to show a trend in and the base-unit value of one of it."""
    try:
        base = parse_quantity(f"1 {base_unit}", *Dimension) if base_unit else None
        shown = parse_quantity(f"1 {display_unit}", *Dimension) if display_unit else None
    except UnitError:
        return base_unit, 1.0
    if base is not None and shown is not None and shown.dimension is base.dimension:
        return shown.unit, shown.value
    return base_unit, 1.0


def render_machine_trends(env: jinja2.Environment,
                          machine: MachineResult) -> list[dict[str, object]]:
    """One trend SVG per compared item of a machine, drawn from the trends evaluation
    attached to it (:func:`acceptance.history.trend_series`).

    Returns a list of ``{"item", "title", "quantity", "svg"}``, in checklist order.
    """
    dates = {visit.id: visit.date for visit in machine.visits}
    plots: list[dict[str, object]] = []
    trend_series_of = machine.trends
    for series in trend_series_of:
        unit, factor = _display_factor(series.unit, series.display_unit)
        split = sum(1 for other in trend_series_of if other.item == series.item) > 1
        elements = [str(t.element) for t in series.traces] if split else []
        traces = [TrendInput(trace.element or series.quantity,
                             [(p.date, p.value / factor) for p in trace.points])
                  for trace in series.traces]
        svg = render_trend_svg(
            env, traces, quantity=series.quantity, unit=unit,
            lower=None if series.limit_lower is None else series.limit_lower / factor,
            upper=None if series.limit_upper is None else series.limit_upper / factor,
            baseline=dates.get(series.baseline), baseline_label=f"baseline {series.baseline}",
            title=f"{series.item}" + (f" ({', '.join(elements)})" if elements else ""))
        plots.append({"item": series.item, "title": series.title,
                      "anchor": f"{series.item}-{'-'.join(str(t.element) for t in series.traces)}",
                      "quantity": series.quantity, "svg": Markup(svg)})
    return plots
