"""The fundamental frequency of a capture and the integer-cycle window it allows."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._errors import ComputationError
from ._windows import (
    _DETECTION_POINTS,
    _block_means,
    _checked_frequency,
    _checked_interval,
    _checked_samples,
    _phasor,
    _whole_cycles,
    _window_dot,
    _window_mean,
)

# A fundamental whose rms is below this share of the a.c. rms is not taken as a fundamental:
# even a rectifier's peaky line current keeps well above one half [P].
_MINIMUM_FUNDAMENTAL_SHARE = 0.1
# A lower candidate found below the strongest spectral line is the fundamental when it holds
# at least this share of the strongest line's amplitude [P].
_SUBHARMONIC_SHARE = 0.2


@dataclass(frozen=True)
class FundamentalEstimate:
    """The fundamental of a capture and the integer-cycle window it allows.

    Attributes
    ----------
    frequency : float
        Fundamental frequency [Hz].
    cycles_available : float
        Capture duration times frequency; not an integer in general [unitless].
    cycles_used : int
        Largest whole number of cycles in the capture [unitless].
    window_duration : float
        ``cycles_used / frequency`` [s].
    fundamental_share : float
        Fundamental rms over a.c. rms in the window; 1 for a sine [unitless].
    """

    frequency: float
    cycles_available: float
    cycles_used: int
    window_duration: float
    fundamental_share: float



# --------------------------------------------------------------------------- fundamental


def _coarse_peak(ac: NDArray[np.float64], sample_interval: float) -> float:
    count = ac.size
    padded = 1 << int(math.ceil(math.log2(count)))
    spectrum = np.abs(np.fft.rfft(ac * np.hanning(count), padded))
    bin_width = 1.0 / (padded * sample_interval)
    lowest_bin = max(1, int(math.ceil(2.0 / (count * sample_interval) / bin_width * 0.9)))
    if lowest_bin >= spectrum.size - 2:
        raise ComputationError(
            "no detectable fundamental: the capture is too short for two cycles of any "
            "frequency below the Nyquist frequency")
    search = spectrum[lowest_bin:-1]
    peak_bin = lowest_bin + int(np.argmax(search))
    peak_value = float(spectrum[peak_bin])
    below = float(spectrum[1:lowest_bin].max()) if lowest_bin > 1 else 0.0
    if below > peak_value:
        # The strongest line is slower than two cycles per capture: a fundamental with fewer
        # than two whole cycles, which no window can hold.
        duration = count * sample_interval
        raise ComputationError(
            f"the capture of {duration:.6g} s holds fewer than two cycles of its strongest "
            f"line (below {2.0 / duration:.6g} Hz); at least two full cycles are needed")
    # Distorted waveforms can hold a harmonic stronger than the fundamental; prefer the lowest
    # line that is a whole fraction of the peak and still clearly present.
    for divisor in range(8, 1, -1):
        candidate = peak_bin / divisor
        if candidate < lowest_bin:
            continue
        low, high = int(math.floor(candidate)) - 1, int(math.ceil(candidate)) + 1
        local = spectrum[max(low, lowest_bin):high + 1]
        if local.size and float(local.max()) >= _SUBHARMONIC_SHARE * peak_value:
            peak_bin = max(low, lowest_bin) + int(np.argmax(local))
            break
    left, centre, right = (math.log(max(float(v), 1e-300))
                           for v in spectrum[peak_bin - 1:peak_bin + 2])
    curvature = left - 2.0 * centre + right
    offset = 0.5 * (left - right) / curvature if curvature < 0 else 0.0
    return (peak_bin + max(-0.5, min(0.5, offset))) * bin_width


def _refine_by_phase(ac: NDArray[np.float64], sample_interval: float, frequency: float) -> float:
    """Correct a frequency estimate from the phase advance between the two halves."""
    count = ac.size
    length = count // 2
    taper = np.hanning(length)
    phase = np.arange(length) * (-2.0 * math.pi * frequency * sample_interval)
    kernel = taper * np.exp(1j * phase)
    first = complex(np.dot(ac[:length], kernel))
    second = complex(np.dot(ac[count - length:], kernel))
    delay = (count - length) * sample_interval
    if abs(first) == 0.0 or abs(second) == 0.0:
        return frequency
    advance = math.atan2((second * first.conjugate()).imag, (second * first.conjugate()).real)
    expected = 2.0 * math.pi * frequency * delay
    residual = math.remainder(advance - expected, 2.0 * math.pi)
    return frequency + residual / (2.0 * math.pi * delay)


def fundamental_frequency(samples: ArrayLike, sample_interval: float) -> FundamentalEstimate:
    """Estimate the fundamental frequency of a sampled periodic waveform.

    Parameters
    ----------
    samples : array_like
        Equally spaced samples; any d.c. offset is allowed [unit of samples].
    sample_interval : float
        Time between samples [s].

    Returns
    -------
    FundamentalEstimate

    Raises
    ------
    ComputationError
        On non-finite samples, a constant signal, a fundamental holding less than 10 % of the
        a.c. rms, or fewer than two full cycles.

    Notes
    -----
    A Hann-windowed, zero-padded FFT of the signal less its mean gives the strongest line;
    a line at a whole fraction of it holding at least 20 % of its amplitude is preferred, so
    a strong harmonic is not mistaken for the fundamental. The peak is interpolated on a
    parabola through the log-magnitudes of three bins, then corrected twice from the phase
    advance of that frequency between the first and second halves of the capture,
    f ← f + wrap(Δφ − 2πf·D) / (2πD), with D the delay between the halves. This is
    unaffected by noise, d.c. offset or a non-integer number of cycles in the capture.

    References
    ----------
    .. [1] E. Jacobsen, P. Kootsookos, "Fast, accurate frequency estimators", IEEE Signal
       Processing Magazine 24(3), 2007 — spectral peak interpolation.
    """
    values = _checked_samples(samples, "samples")
    interval = _checked_interval(sample_interval)
    # Detection needs no more than ~2^16 points: block means keep the fundamental and the
    # phase advance between halves while making long captures cheap.
    reduced, factor = _block_means(values, _DETECTION_POINTS)
    reduced_interval = interval * factor
    ac = reduced - reduced.mean()
    scale = float(np.max(np.abs(ac)))
    if scale <= 1e-12 * max(1.0, abs(float(values.mean()))):
        raise ComputationError("no detectable fundamental: the samples are constant")
    frequency = _coarse_peak(ac, reduced_interval)
    for _ in range(2):
        frequency = _refine_by_phase(ac, reduced_interval, frequency)
    frequency = _checked_frequency(frequency, interval)
    cycles = _whole_cycles(values.size, interval, frequency)
    reduced_cycles = max(1, int(math.floor(reduced.size * reduced_interval * frequency + 1e-9)))
    window_samples = reduced_cycles / (frequency * reduced_interval)
    windowed_ac = reduced - _window_mean(reduced, window_samples)
    ac_rms = math.sqrt(_window_dot(windowed_ac, windowed_ac, window_samples))
    share = abs(_phasor(windowed_ac, reduced_interval, frequency, window_samples)) / ac_rms
    if share < _MINIMUM_FUNDAMENTAL_SHARE:
        raise ComputationError(
            f"no detectable fundamental: the strongest line, {frequency:.6g} Hz, holds "
            f"{100 * share:.3g} % of the a.c. rms (at least "
            f"{100 * _MINIMUM_FUNDAMENTAL_SHARE:.0f} % is needed)")
    return FundamentalEstimate(
        frequency=frequency,
        cycles_available=values.size * interval * frequency,
        cycles_used=cycles,
        window_duration=cycles / frequency,
        fundamental_share=share,
    )


def _resolve_frequency(values: NDArray[np.float64], interval: float,
                       frequency: float | None) -> float:
    if frequency is None:
        return fundamental_frequency(values, interval).frequency
    return _checked_frequency(float(frequency), interval)
