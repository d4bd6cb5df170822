"""True RMS, d.c., rectified mean, peak, crest and form factors, and meter readings."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from .._errors import ComputationError
from ..sine import AVERAGE_RESPONDING_SCALE
from ._windows import (
    _checked_interval,
    _checked_samples,
    _whole_cycles,
    _window_dot,
    _window_mean,
    _window_weights,
)
from .fundamental import _resolve_frequency


@dataclass(frozen=True)
class WaveformMetrics:
    """Amplitude quantities of one channel over an integer number of cycles.

    Attributes
    ----------
    frequency : float
        Fundamental frequency used to choose the window [Hz].
    cycles_used : int
        Whole cycles averaged [unitless].
    window_duration : float
        Duration of those cycles [s].
    rms : float
        True rms, d.c. included [unit of samples].
    dc : float
        Mean value (d.c. component) [unit of samples].
    ac_rms : float
        Rms with the d.c. component removed, sqrt(rms² − dc²) [unit of samples].
    rectified_mean : float
        Mean of the absolute value, mean|x| [unit of samples].
    peak : float
        Largest absolute sample in the window [unit of samples].
    crest_factor : float
        peak / rms [unitless].
    form_factor : float
        rms / rectified_mean [unitless].
    average_responding_ac : float
        Reading of a mean-sensing, rms-calibrated meter on an a.c.-coupled input,
        π/(2√2)·mean|x − dc| [unit of samples].
    average_responding_dc : float
        The same meter d.c.-coupled, π/(2√2)·mean|x| [unit of samples].
    """

    frequency: float
    cycles_used: int
    window_duration: float
    rms: float
    dc: float
    ac_rms: float
    rectified_mean: float
    peak: float
    crest_factor: float
    form_factor: float
    average_responding_ac: float
    average_responding_dc: float



# --------------------------------------------------------------------------- amplitude


def waveform_metrics(samples: ArrayLike, sample_interval: float,
                     fundamental_frequency: float | None = None) -> WaveformMetrics:
    """True rms, d.c., rectified mean, peak, crest and form factors, meter readings.

    Parameters
    ----------
    samples : array_like
        Equally spaced samples [unit of samples].
    sample_interval : float
        Time between samples [s].
    fundamental_frequency : float, optional
        Known fundamental; detected with :func:`fundamental_frequency` when omitted [Hz].

    Returns
    -------
    WaveformMetrics

    Notes
    -----
    Over the largest whole number of cycles, from the first sample:
    rms = sqrt(mean(x²)); dc = mean(x); mean|x|; peak = max|x|;
    crest factor = peak/rms; form factor = rms/mean|x|.
    A mean-sensing meter calibrated to read the rms of a sine displays
    π/(2√2)·mean|x| ≈ 1.1107·mean|x|; a.c.-coupled it sees x − dc.

    References
    ----------
    .. [1] Crest and form factors of the sine, square, triangle and rectified waves, and the
       reading of an average-responding meter relative to the true rms — standard meter
       tables; see the project's reference values §9.
    """
    values = _checked_samples(samples, "samples")
    interval = _checked_interval(sample_interval)
    frequency = _resolve_frequency(values, interval, fundamental_frequency)
    cycles = _whole_cycles(values.size, interval, frequency)
    window_samples = cycles / (frequency * interval)
    whole, fraction = _window_weights(window_samples)
    dc = _window_mean(values, window_samples)
    rms = math.sqrt(_window_dot(values, values, window_samples))
    magnitude = np.abs(values)
    rectified_mean = _window_mean(magnitude, window_samples)
    shifted = np.subtract(values, dc)
    ac_rectified_mean = _window_mean(np.abs(shifted, out=shifted), window_samples)
    last = min(values.size, whole + (1 if fraction else 0))
    peak = float(np.max(magnitude[:last]))
    ac_rms = math.sqrt(max(rms * rms - dc * dc, 0.0))
    if rms == 0.0:
        raise ComputationError("samples are all zero; rms, crest and form factors are undefined")
    return WaveformMetrics(
        frequency=frequency,
        cycles_used=cycles,
        window_duration=cycles / frequency,
        rms=rms,
        dc=dc,
        ac_rms=ac_rms,
        rectified_mean=rectified_mean,
        peak=peak,
        crest_factor=peak / rms,
        form_factor=rms / rectified_mean,
        average_responding_ac=AVERAGE_RESPONDING_SCALE * ac_rectified_mean,
        average_responding_dc=AVERAGE_RESPONDING_SCALE * rectified_mean,
    )
