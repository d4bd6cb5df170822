"""Harmonic spectra by the IEC 61000-4-7 grouping, THD-F and THD-R."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._errors import ComputationError
from ._windows import (
    _HARMONIC_SAMPLES_PER_CYCLE,
    _block_mean_response,
    _block_means,
    _checked_interval,
    _checked_samples,
    _chirp_z,
    _whole_cycles,
    _window_slice,
)
from .fundamental import _resolve_frequency

IEC_WINDOW_DURATION = 0.2
"""Nominal duration of the IEC 61000-4-7 harmonic analysis window [s] (10 cycles at 50 Hz)."""

HarmonicBasis = Literal["subgroup", "group", "component"]


@dataclass(frozen=True)
class HarmonicSpectrum:
    """Harmonic content of one channel, IEC 61000-4-7 style.

    Attributes
    ----------
    fundamental_frequency : float
        [Hz].
    window_cycles : int
        Cycles per analysis window (10 at 50 Hz, 12 at 60 Hz when the capture allows) [unitless].
    window_duration : float
        [s].
    windows : int
        Consecutive non-overlapping windows analysed; values are their rms aggregate [unitless].
    iec_window : bool
        True when the window has the IEC 61000-4-7 length (≈ 200 ms); False when the capture
        was shorter and all its whole cycles formed one window.
    basis : str
        Which values THD and ``percent_of_fundamental`` use: ``"subgroup"`` (harmonic subgroups,
        the harmonic bin and its two neighbours), ``"group"`` (harmonic groups, every bin
        half-way to the next harmonic) or ``"component"`` (the harmonic bin alone).
    orders : tuple of int
        Harmonic orders 1 … highest_order.
    components : tuple of float
        Rms of the harmonic bin of each order [unit of samples].
    subgroups : tuple of float
        Rms of each harmonic subgroup [unit of samples].
    groups : tuple of float
        Rms of each harmonic group [unit of samples].
    percent_of_fundamental : tuple of float
        Selected basis values over the fundamental, ×100 [%].
    dc : float
        D.c. component [unit of samples].
    highest_order : int
        40, or lower when the sampling rate does not reach it [unitless].
    thd_f : float
        THD referred to the fundamental, a ratio [unitless].
    thd_r : float
        THD referred to the rms of all harmonics 1 … highest_order, a ratio [unitless].
    """

    fundamental_frequency: float
    window_cycles: int
    window_duration: float
    windows: int
    iec_window: bool
    basis: str
    orders: tuple[int, ...]
    components: tuple[float, ...]
    subgroups: tuple[float, ...]
    groups: tuple[float, ...]
    percent_of_fundamental: tuple[float, ...]
    dc: float
    highest_order: int
    thd_f: float
    thd_r: float

    @property
    def selected(self) -> tuple[float, ...]:
        """The values of the chosen basis [unit of samples]."""
        return {"subgroup": self.subgroups, "group": self.groups,
                "component": self.components}[self.basis]



# --------------------------------------------------------------------------- harmonics


def iec_window_cycles(fundamental_frequency: float) -> int:
    """Cycles in the IEC 61000-4-7 analysis window for a fundamental.

    Parameters
    ----------
    fundamental_frequency : float
        [Hz].

    Returns
    -------
    int
        round(0.2 s · f): 10 at 50 Hz, 12 at 60 Hz [unitless].

    References
    ----------
    .. [1] IEC 61000-4-7, window width of 10 (50 Hz) or 12 (60 Hz) cycles, ≈ 200 ms. [M]
    """
    if not (math.isfinite(fundamental_frequency) and fundamental_frequency > 0.0):
        raise ComputationError(
            f"fundamental_frequency {fundamental_frequency!r} Hz must be above zero")
    return max(1, round(IEC_WINDOW_DURATION * fundamental_frequency))


def thd_r_from_thd_f(thd_f: float) -> float:
    """THD referred to the total rms from THD referred to the fundamental.

    Parameters
    ----------
    thd_f : float
        THD-F as a ratio [unitless].

    Returns
    -------
    float
        THD-R = THD-F / sqrt(1 + THD-F²) [unitless].

    References
    ----------
    .. [1] reference values §9: THD-R = THD-F / sqrt(1 + THD-F²). [S]
    """
    if not (math.isfinite(thd_f) and thd_f >= 0.0):
        raise ComputationError(f"thd_f {thd_f!r} must be a finite ratio of zero or more")
    return thd_f / math.sqrt(1.0 + thd_f * thd_f)


def _group_values(bins: NDArray[np.float64], cycles: int, orders: int,
                  kind: str) -> NDArray[np.float64]:
    squares = bins * bins
    result = np.empty(orders)
    half = cycles // 2
    for index in range(orders):
        centre = (index + 1) * cycles
        if kind == "subgroup":
            total = squares[centre - 1:centre + 2].sum()
        elif cycles % 2 == 0:
            total = (squares[centre - half + 1:centre + half].sum()
                     + 0.5 * (squares[centre - half] + squares[centre + half]))
        else:
            total = squares[centre - half:centre + half + 1].sum()
        result[index] = math.sqrt(total)
    return result


def harmonic_spectrum(samples: ArrayLike, sample_interval: float,
                      fundamental_frequency: float | None = None,
                      highest_order: int = 40,
                      basis: HarmonicBasis = "subgroup") -> HarmonicSpectrum:
    """Harmonics 1 … 40 over IEC 61000-4-7 windows, with subgroups, groups and THD.

    Parameters
    ----------
    samples : array_like
        Equally spaced samples [unit of samples].
    sample_interval : float
        Time between samples [s].
    fundamental_frequency : float, optional
        Known fundamental; detected when omitted [Hz].
    highest_order : int, optional
        Highest harmonic order; lowered to what the sampling rate reaches [unitless].
    basis : {"subgroup", "group", "component"}, optional
        Values used for THD and percentages.

    Returns
    -------
    HarmonicSpectrum

    Notes
    -----
    Each window holds exactly N cycles, N = round(0.2 s·f) (10 at 50 Hz, 12 at 60 Hz), or
    every whole cycle of a shorter capture. A rectangular DFT over a window of exactly N
    cycles puts bin k at k·f/N, so bin n·N is harmonic n. The bins are evaluated at those
    exact frequencies with the chirp-z transform, the last sample weighted by its fraction
    inside the window, so no resampling is needed. With C_k the rms of bin k:

    - component: C_{nN};
    - subgroup:  sqrt(Σ_{i=−1}^{1} C²_{nN+i});
    - group:     sqrt(½C²_{nN−N/2} + Σ_{i=−N/2+1}^{N/2−1} C²_{nN+i} + ½C²_{nN+N/2}) for even N
      (every bin half-way to the neighbouring harmonics for odd N).

    Several windows are aggregated as the rms of the per-window values.
    THD-F = sqrt(Σ_{n=2}^{40} G_n²)/G_1; THD-R = THD-F/sqrt(1 + THD-F²).

    References
    ----------
    .. [1] IEC 61000-4-7, window width and harmonic groups and subgroups. [M]
    .. [2] IEC 61000-2-4 / IEC 61000-4-7, THD to order 40 referred to the fundamental. [S]
    """
    values = _checked_samples(samples, "samples")
    interval = _checked_interval(sample_interval)
    if basis not in ("subgroup", "group", "component"):
        raise ComputationError(
            f"basis {basis!r} must be one of 'subgroup', 'group', 'component'")
    if highest_order < 2:
        raise ComputationError(f"highest_order {highest_order!r} must be 2 or more")
    frequency = _resolve_frequency(values, interval, fundamental_frequency)
    available = _whole_cycles(values.size, interval, frequency)
    nominal = iec_window_cycles(frequency)
    cycles = min(nominal, available)
    windows = available // cycles
    reachable = int(math.floor(0.5 / (interval * frequency) - 0.5))
    orders = min(highest_order, reachable)
    if orders < 1:
        raise ComputationError(
            f"sample_interval {interval:.6g} s is too long to resolve {frequency:.6g} Hz")
    factor = max(1, int(1.0 / (frequency * interval)) // _HARMONIC_SAMPLES_PER_CYCLE)
    reduced, factor = (values, 1) if factor == 1 else _block_means(values, values.size // factor)
    reduced_interval = interval * factor
    window_samples = cycles / (frequency * reduced_interval)
    while (windows > 1
           and int(round((windows - 1) * window_samples)) + window_samples > reduced.size):
        windows -= 1
    bin_count = orders * cycles + cycles // 2 + 2
    correction = 1.0 / _block_mean_response(
        np.arange(bin_count, dtype=np.float64) * np.float64(frequency / cycles), factor,
        interval)
    squares_components = np.zeros(orders)
    squares_subgroups = np.zeros(orders)
    squares_groups = np.zeros(orders)
    dc_total = 0.0
    for window in range(windows):
        start = int(round(window * window_samples))
        segment = _window_slice(reduced, start, window_samples)
        bins = np.abs(_chirp_z(segment, window_samples, bin_count)) * correction / window_samples
        dc_total += float(np.sum(segment)) / window_samples
        bins[1:] *= math.sqrt(2.0)
        component = bins[cycles:orders * cycles + 1:cycles]
        squares_components += component * component
        squares_subgroups += _group_values(bins, cycles, orders, "subgroup") ** 2
        squares_groups += _group_values(bins, cycles, orders, "group") ** 2
    components = np.sqrt(squares_components / windows)
    subgroups = np.sqrt(squares_subgroups / windows)
    groups = np.sqrt(squares_groups / windows)
    selected = {"subgroup": subgroups, "group": groups, "component": components}[basis]
    if selected[0] <= 0.0:
        raise ComputationError("no detectable fundamental: the fundamental component is zero")
    thd_f = float(math.sqrt(float(np.sum(selected[1:] ** 2))) / selected[0])
    return HarmonicSpectrum(
        fundamental_frequency=frequency,
        window_cycles=cycles,
        window_duration=cycles / frequency,
        windows=windows,
        iec_window=cycles == nominal,
        basis=basis,
        orders=tuple(range(1, orders + 1)),
        components=tuple(float(v) for v in components),
        subgroups=tuple(float(v) for v in subgroups),
        groups=tuple(float(v) for v in groups),
        percent_of_fundamental=tuple(float(v) for v in 100.0 * selected / selected[0]),
        dc=dc_total / windows,
        highest_order=orders,
        thd_f=thd_f,
        thd_r=thd_r_from_thd_f(thd_f),
    )
