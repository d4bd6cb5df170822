"""A capture's channels analysed: true RMS, meter readings, harmonics, power, clipping."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from ..computations import ComputationError
from ..computations.waveform import (
    HarmonicSpectrum,
    PowerQuantities,
    WaveformMetrics,
    fundamental_frequency,
    harmonic_spectrum,
    power_quantities,
    waveform_metrics,
)
from ..errors import InputError, Problem
from .reading import CaptureData, read_capture
from .scaling import ChannelScaling

# A flat run at the extreme recorded value longer than this share of a cycle, recurring in
# at least half of the cycles, is taken as clipping: a sine flattened for 5 % of its cycle
# has lost 1.2 % of its peak [P].
_CLIP_RUN_SHARE = 0.05


@dataclass(frozen=True)
class ChannelAnalysis:
    """Results for one channel.

    Attributes
    ----------
    name : str
        Column name.
    unit : str
        ``"V"`` or ``"A"``.
    scaling : ChannelScaling
    metrics : WaveformMetrics
        Rms, mean, peak, factors and average-responding readings [unit].
    spectrum : HarmonicSpectrum
        Harmonics to order 40 [unit], THD.
    clipped : bool
        True when flat tops at the recorder's limit were found.
    """

    name: str
    unit: str
    scaling: ChannelScaling
    metrics: WaveformMetrics
    spectrum: HarmonicSpectrum
    clipped: bool


@dataclass(frozen=True)
class CaptureAnalysis:
    """A capture, analysed.

    Attributes
    ----------
    source : str
        The file as given.
    rows : int
        Data rows [unitless].
    time_column : str
    sample_interval : float
        [s].
    sample_rate : float
        [Hz].
    duration : float
        rows · sample_interval [s].
    jitter : float
        Largest departure of one sampling interval from the mean, over the mean [unitless].
    frequency : float
        Fundamental frequency, from the voltage channel when one is named [Hz].
    frequency_channel : str
        The channel the frequency was detected on.
    channels : tuple of ChannelAnalysis
        In the order requested.
    voltage_channel, current_channel : str or None
    power : PowerQuantities or None
        When both a voltage and a current channel are named.
    warnings : tuple of Problem
        Clipping and other conditions that leave results usable but biased.
    time : numpy.ndarray
        Sample times [s] (not compared).
    signals : dict of str to numpy.ndarray
        Scaled channel values [unit] (not compared).
    """

    source: str
    rows: int
    time_column: str
    sample_interval: float
    sample_rate: float
    duration: float
    jitter: float
    frequency: float
    frequency_channel: str
    channels: tuple[ChannelAnalysis, ...]
    voltage_channel: str | None
    current_channel: str | None
    power: PowerQuantities | None
    warnings: tuple[Problem, ...]
    time: NDArray[np.float64] = field(repr=False, compare=False)
    signals: dict[str, NDArray[np.float64]] = field(repr=False, compare=False)

    def channel(self, name: str) -> ChannelAnalysis:
        for item in self.channels:
            if item.name == name:
                return item
        raise KeyError(name)


def _clipping(recorded: NDArray[np.float64], samples_per_cycle: float,
              cycles: int) -> tuple[str, float, int, float] | None:
    """Which extreme is held flat, at what value, from which sample, for what share."""
    high, low = float(recorded.max()), float(recorded.min())
    span = high - low
    if span <= 0.0:
        return None
    shortest_clip = max(3.0, _CLIP_RUN_SHARE * samples_per_cycle)
    needed = max(1, cycles // 2)
    for side, limit in (("largest", high), ("smallest", low)):
        tolerance = 1e-9 * span
        at_limit = (recorded >= limit - tolerance) if side == "largest" else (
            recorded <= limit + tolerance)
        if int(np.count_nonzero(at_limit)) < needed * shortest_clip:
            continue
        edges = np.diff(np.concatenate(([0], at_limit.view(np.int8), [0])))
        starts = np.flatnonzero(edges == 1)
        lengths = np.flatnonzero(edges == -1) - starts
        long_runs = lengths >= shortest_clip
        if int(np.count_nonzero(long_runs)) >= needed:
            share = float(np.median(lengths[long_runs])) / samples_per_cycle
            return side, limit, int(starts[np.argmax(long_runs)]), share
    return None


def _as_input_error(error: ComputationError, data: CaptureData, channel: str) -> InputError:
    return InputError.single(data.source, str(error), line=data.line_of(0), key_path=channel)


def analyse_capture(path: str | Path, channels: Mapping[str, ChannelScaling],
                    voltage_channel: str | None = None, current_channel: str | None = None,
                    time_column: str | None = None) -> CaptureAnalysis:
    """Read, scale and analyse a capture.

    Parameters
    ----------
    path : str or Path
        The CSV file.
    channels : mapping of str to ChannelScaling
        Channels to analyse and their scaling; every non-time column, as recorded in volts,
        when empty. A named voltage or current channel missing here is added unscaled
        (``V`` or ``A``).
    voltage_channel, current_channel : str, optional
        The pair for power and power factor; the fundamental is taken from the voltage.
    time_column : str, optional
        See :func:`read_capture`.

    Returns
    -------
    CaptureAnalysis

    Raises
    ------
    InputError
        For anything :func:`read_capture` rejects, a voltage channel not in V or a current
        channel not in A, fewer than two full cycles, or no detectable fundamental.
    """
    scalings: dict[str, ChannelScaling] = dict(channels)
    for name, unit in ((voltage_channel, "V"), (current_channel, "A")):
        if name is not None and name not in scalings:
            scalings[name] = ChannelScaling(1.0, unit, 0.0, unit)
    data = read_capture(path, list(scalings) or None, time_column)
    if not scalings:
        scalings = {name: ChannelScaling() for name in data.recorded}
    for name, unit, role in ((voltage_channel, "V", "voltage"),
                             (current_channel, "A", "current")):
        if name is not None and scalings[name].unit != unit:
            raise InputError.single(
                data.source, f"channel {name} is scaled to {scalings[name].unit} "
                             f"({scalings[name].text}) but is named as the {role} channel, "
                             f"which must be in {unit}", line=data.header_line, key_path=name)
    signals = {name: scalings[name].apply(data.recorded[name]) for name in data.recorded}
    interval = data.sample_interval
    frequency_channel = voltage_channel or current_channel or next(iter(signals))
    try:
        frequency = fundamental_frequency(signals[frequency_channel], interval).frequency
    except ComputationError as error:
        raise _as_input_error(error, data, frequency_channel) from None

    results = []
    problems = []
    for name, values in signals.items():
        try:
            metrics = waveform_metrics(values, interval, frequency)
            spectrum = harmonic_spectrum(values, interval, frequency)
        except ComputationError as error:
            raise _as_input_error(error, data, name) from None
        clip = _clipping(data.recorded[name], 1.0 / (frequency * interval), metrics.cycles_used)
        if clip:
            side, limit, start, share = clip
            problems.append(Problem(
                data.source, data.line_of(start), data.header.index(name) + 1, name,
                f"warning: {name} stays at its {side} recorded value {limit:.6g} for "
                f"{100 * share:.0f} % of each cycle from this line on: the recorder clipped, "
                f"so true RMS and peak are under-estimated; record again on a wider range"))
        results.append(ChannelAnalysis(name, scalings[name].unit, scalings[name], metrics,
                                       spectrum, clip is not None))

    power = None
    if voltage_channel is not None and current_channel is not None:
        try:
            power = power_quantities(signals[voltage_channel], signals[current_channel],
                                     interval, frequency)
        except ComputationError as error:
            raise _as_input_error(error, data, current_channel) from None

    return CaptureAnalysis(
        source=data.source,
        rows=data.rows,
        time_column=data.time_column,
        sample_interval=interval,
        sample_rate=1.0 / interval,
        duration=data.rows * interval,
        jitter=data.jitter,
        frequency=frequency,
        frequency_channel=frequency_channel,
        channels=tuple(results),
        voltage_channel=voltage_channel,
        current_channel=current_channel,
        power=power,
        warnings=tuple(problems),
        time=data.time,
        signals=signals,
    )
