"""Sampled waveforms: fundamental frequency, true RMS, meter readings, harmonics, power factor.

Every function takes a 1-D array of equally spaced samples and the sampling interval; the
samples carry whatever physical unit the caller scaled them to (V or A), and every result
in that unit is documented as ``[unit of samples]``.

All averages are taken over an integer number of cycles of the fundamental. The last sample
of such a window is weighted by the fraction of its interval that falls inside the window,
so the integral of a periodic quantity is exact to second order in the sampling interval
even when the sampling rate is not a multiple of the line frequency.

The analyses live in one module each (``fundamental``, ``amplitude``, ``harmonics``,
``power``) over the shared window sums of ``_windows``; this package re-exports them.
"""

from __future__ import annotations

from ..sine import AVERAGE_RESPONDING_SCALE
from .amplitude import WaveformMetrics, waveform_metrics
from .fundamental import FundamentalEstimate, fundamental_frequency
from .harmonics import (
    IEC_WINDOW_DURATION,
    HarmonicSpectrum,
    harmonic_spectrum,
    iec_window_cycles,
    thd_r_from_thd_f,
)
from .power import PowerQuantities, power_quantities

__all__ = [
    "AVERAGE_RESPONDING_SCALE",
    "IEC_WINDOW_DURATION",
    "FundamentalEstimate",
    "HarmonicSpectrum",
    "PowerQuantities",
    "WaveformMetrics",
    "fundamental_frequency",
    "harmonic_spectrum",
    "iec_window_cycles",
    "power_quantities",
    "thd_r_from_thd_f",
    "waveform_metrics",
]
