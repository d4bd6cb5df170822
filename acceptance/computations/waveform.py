"""Sampled waveforms: fundamental frequency, true RMS, meter readings, harmonics, power factor.

Every function takes a 1-D array of equally spaced samples and the sampling interval; the
samples carry whatever physical unit the caller scaled them to (V or A), and every result
in that unit is documented as ``[unit of samples]``.

All averages are taken over an integer number of cycles of the fundamental. The last sample
of such a window is weighted by the fraction of its interval that falls inside the window,
so the integral of a periodic quantity is exact to second order in the sampling interval
even when the sampling rate is not a multiple of the line frequency.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._errors import ComputationError
from .sine import AVERAGE_RESPONDING_SCALE

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


IEC_WINDOW_DURATION = 0.2
"""Nominal duration of the IEC 61000-4-7 harmonic analysis window [s] (10 cycles at 50 Hz)."""

HarmonicBasis = Literal["subgroup", "group", "component"]

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


@dataclass(frozen=True)
class PowerQuantities:
    """Power of a voltage–current pair over an integer number of cycles.

    Attributes
    ----------
    frequency : float
        [Hz].
    cycles_used : int
        [unitless].
    voltage_rms, current_rms : float
        True rms [V], [A].
    voltage_fundamental_rms, current_fundamental_rms : float
        Rms of the fundamental components [V], [A].
    real_power : float
        P = mean(v·i) [W].
    apparent_power : float
        S = V_rms·I_rms [VA].
    power_factor : float
        True power factor P/S; negative when the current channel is reversed [unitless].
    fundamental_phase_angle : float
        φ1, voltage fundamental phase minus current fundamental phase, in (−180, 180];
        positive when the current lags [°].
    displacement_power_factor : float
        cos φ1 [unitless].
    distortion_factor : float
        I1/I_rms; equals PF/DPF when the voltage is sinusoidal [unitless].
    fundamental_real_power : float
        P1 = V1·I1·cos φ1 [W].
    fundamental_reactive_power : float
        Q1 = V1·I1·sin φ1, positive when the current lags [var].
    """

    frequency: float
    cycles_used: int
    voltage_rms: float
    current_rms: float
    voltage_fundamental_rms: float
    current_fundamental_rms: float
    real_power: float
    apparent_power: float
    power_factor: float
    fundamental_phase_angle: float
    displacement_power_factor: float
    distortion_factor: float
    fundamental_real_power: float
    fundamental_reactive_power: float


# --------------------------------------------------------------------------- validation


def _checked_samples(samples: ArrayLike, name: str) -> NDArray[np.float64]:
    array = np.asarray(samples, dtype=np.float64)
    if array.ndim != 1:
        raise ComputationError(f"{name} must be one-dimensional; got shape {array.shape}")
    if array.size < 8:
        raise ComputationError(f"{name} holds {array.size} samples; at least 8 are needed")
    # A finite sum proves every sample finite (NaN and ±inf propagate); only a non-finite sum,
    # or an overflow of huge values, needs the sample-by-sample look.
    if math.isfinite(float(np.add.reduce(array))):
        return array
    bad = np.flatnonzero(~np.isfinite(array))
    if bad.size:
        raise ComputationError(
            f"{name} holds {bad.size} non-finite value(s) (NaN or infinite), the first at "
            f"index {int(bad[0])}; every sample must be a finite number")
    return array


def _checked_interval(sample_interval: float) -> float:
    if not (math.isfinite(sample_interval) and sample_interval > 0.0):
        raise ComputationError(
            f"sample_interval {sample_interval!r} s must be a finite number above zero")
    return float(sample_interval)


def _checked_frequency(frequency: float, sample_interval: float) -> float:
    nyquist = 0.5 / sample_interval
    if not (math.isfinite(frequency) and 0.0 < frequency < nyquist):
        raise ComputationError(
            f"fundamental_frequency {frequency!r} Hz must lie above zero and below the "
            f"Nyquist frequency {nyquist:.6g} Hz")
    return float(frequency)


def _whole_cycles(count: int, sample_interval: float, frequency: float) -> int:
    available = count * sample_interval * frequency
    cycles = int(math.floor(available + 1e-9))
    if cycles < 2:
        raise ComputationError(
            f"the capture of {count * sample_interval:.6g} s holds {available:.3g} cycles of "
            f"{frequency:.6g} Hz; at least two full cycles are needed")
    return cycles


# --------------------------------------------------------------------------- window sums

_DETECTION_POINTS = 1 << 16
# Harmonic and phasor analysis keep at least this many samples per cycle: the block-mean
# response at the 40th harmonic is then ≥ 0.99 and is divided out exactly, and a component
# near the reduced sampling rate aliases onto a harmonic at no more than ~2 % of its size,
# since it falls by a null of that response.
_HARMONIC_SAMPLES_PER_CYCLE = 2048


def _block_means(values: NDArray[np.float64], limit: int) -> tuple[NDArray[np.float64], int]:
    factor = max(1, -(-values.size // limit))
    if factor == 1:
        return values, 1
    usable = (values.size // factor) * factor
    return values[:usable].reshape(-1, factor).mean(axis=1), factor


def _block_mean_response(frequencies: NDArray[np.float64], factor: int,
                         sample_interval: float) -> NDArray[np.float64]:
    """|H(f)| of a mean over ``factor`` consecutive samples."""
    if factor == 1:
        return np.ones_like(frequencies)
    argument = math.pi * frequencies * sample_interval
    response = np.ones_like(frequencies)
    nonzero = argument != 0.0
    response[nonzero] = np.abs(np.sin(factor * argument[nonzero])
                               / (factor * np.sin(argument[nonzero])))
    return response


def _window_weights(window_samples: float) -> tuple[int, float]:
    """Whole samples inside a window of ``window_samples`` intervals, and the last one's weight."""
    whole = int(math.floor(window_samples + 1e-9))
    fraction = window_samples - whole
    if fraction < 1e-9:
        fraction = 0.0
    return whole, fraction


def _window_mean(values: NDArray[np.float64], window_samples: float) -> float:
    whole, fraction = _window_weights(window_samples)
    total = float(np.sum(values[:whole]))
    if fraction and whole < values.size:
        total += fraction * float(values[whole])
    return total / window_samples


def _window_dot(first: NDArray[np.float64], second: NDArray[np.float64],
                window_samples: float) -> float:
    """Window mean of first·second without forming the product array."""
    whole, fraction = _window_weights(window_samples)
    total = float(np.dot(first[:whole], second[:whole]))
    if fraction and whole < first.size:
        total += fraction * float(first[whole]) * float(second[whole])
    return total / window_samples


def _window_slice(values: NDArray[np.float64], start: int,
                  window_samples: float) -> NDArray[np.float64]:
    """Samples of one window with the last one pre-multiplied by its fractional weight."""
    whole, fraction = _window_weights(window_samples)
    if fraction and start + whole < values.size:
        segment = values[start:start + whole + 1].copy()
        segment[-1] *= fraction
    else:
        segment = values[start:start + whole]
    return segment


def _phasors(arrays: tuple[NDArray[np.float64], ...], sample_interval: float,
             frequency: float, window_samples: float) -> list[complex]:
    """Complex rms phasors of ``frequency`` over the window (rectangular, fractional end)."""
    segments = [_window_slice(values, 0, window_samples) for values in arrays]
    phase = np.arange(segments[0].size) * (-2.0 * math.pi * frequency * sample_interval)
    cosine, sine = np.cos(phase), np.sin(phase)
    return [math.sqrt(2.0) * complex(np.dot(s, cosine), np.dot(s, sine)) / window_samples
            for s in segments]


def _phasor(values: NDArray[np.float64], sample_interval: float, frequency: float,
            window_samples: float) -> complex:
    return _phasors((values,), sample_interval, frequency, window_samples)[0]


def _chirp_z(segment: NDArray[np.float64], window_samples: float,
             bin_count: int) -> NDArray[np.complex128]:
    """Σ_n x_n·exp(−2πj·m·n/window_samples) for m = 0 … bin_count−1 (Bluestein).

    The bins are spaced 1/window_samples apart, which is a non-integer fraction of the
    sampling rate in general, so they fall exactly on the harmonics of a window holding a
    whole number of cycles.
    """
    count = segment.size
    length = 1 << int(math.ceil(math.log2(count + bin_count - 1)))
    span = np.arange(max(count, bin_count), dtype=np.float64)
    # Reduce n²/K modulo 2 before scaling by π to keep the phase accurate for long windows.
    chirp = np.exp(-1j * math.pi * np.mod(span * span / window_samples, 2.0))
    weighted = np.zeros(length, dtype=np.complex128)
    weighted[:count] = segment * chirp[:count]
    kernel = np.zeros(length, dtype=np.complex128)
    kernel[:bin_count] = np.conj(chirp[:bin_count])
    kernel[length - count + 1:] = np.conj(chirp[1:count])[::-1]
    convolved = np.fft.ifft(np.fft.fft(weighted) * np.fft.fft(kernel))[:bin_count]
    return convolved * chirp[:bin_count]


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
        np.arange(bin_count) * (frequency / cycles), factor, interval)
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


# --------------------------------------------------------------------------- power


def power_quantities(voltage_samples: ArrayLike, current_samples: ArrayLike,
                     sample_interval: float,
                     fundamental_frequency: float | None = None) -> PowerQuantities:
    """Real and apparent power, true and displacement power factor of a v–i pair.

    Parameters
    ----------
    voltage_samples : array_like
        Voltage samples [V].
    current_samples : array_like
        Current samples taken at the same instants [A].
    sample_interval : float
        Time between samples [s].
    fundamental_frequency : float, optional
        Known fundamental; detected from the voltage when omitted [Hz].

    Returns
    -------
    PowerQuantities

    Notes
    -----
    Over the largest whole number of cycles: P = mean(v·i); S = V·I (true rms values);
    PF = P/S; V1, I1 and φ1 from the fundamental phasors; DPF = cos φ1;
    distortion factor = I1/I. With a sinusoidal voltage PF = DPF·I1/I = DPF/sqrt(1 + THD-F²).

    References
    ----------
    .. [1] IEEE 1459, definitions of true and displacement power factor. [M]
    .. [2] reference values §9: PF = P/S; DPF = cos φ1; PF = DPF/sqrt(1 + THD-F²). [S]
    """
    voltage = _checked_samples(voltage_samples, "voltage_samples")
    current = _checked_samples(current_samples, "current_samples")
    if voltage.size != current.size:
        raise ComputationError(
            f"voltage_samples ({voltage.size}) and current_samples ({current.size}) must "
            "hold the same number of samples")
    interval = _checked_interval(sample_interval)
    frequency = _resolve_frequency(voltage, interval, fundamental_frequency)
    cycles = _whole_cycles(voltage.size, interval, frequency)
    window_samples = cycles / (frequency * interval)
    voltage_rms = math.sqrt(_window_dot(voltage, voltage, window_samples))
    current_rms = math.sqrt(_window_dot(current, current, window_samples))
    if voltage_rms == 0.0 or current_rms == 0.0:
        raise ComputationError(
            "voltage_samples or current_samples are all zero; power factor is undefined")
    real_power = _window_dot(voltage, current, window_samples)
    apparent_power = voltage_rms * current_rms
    # Block means shift both fundamentals alike, so φ1 is unchanged; |H(f1)| is divided out.
    factor = max(1, int(1.0 / (frequency * interval)) // _HARMONIC_SAMPLES_PER_CYCLE)
    reduced_voltage, factor = _block_means(voltage, voltage.size // factor)
    reduced_current, _ = _block_means(current, current.size // factor)
    reduced_window = min(window_samples / factor, float(reduced_voltage.size))
    gain = float(_block_mean_response(np.array([frequency]), factor, interval)[0])
    voltage_phasor, current_phasor = (
        phasor / gain for phasor in _phasors((reduced_voltage, reduced_current),
                                             interval * factor, frequency, reduced_window))
    product = voltage_phasor * current_phasor.conjugate()
    angle = math.degrees(math.atan2(product.imag, product.real))
    voltage_fundamental = abs(voltage_phasor)
    current_fundamental = abs(current_phasor)
    return PowerQuantities(
        frequency=frequency,
        cycles_used=cycles,
        voltage_rms=voltage_rms,
        current_rms=current_rms,
        voltage_fundamental_rms=voltage_fundamental,
        current_fundamental_rms=current_fundamental,
        real_power=real_power,
        apparent_power=apparent_power,
        power_factor=real_power / apparent_power,
        fundamental_phase_angle=angle,
        displacement_power_factor=math.cos(math.radians(angle)),
        distortion_factor=current_fundamental / current_rms,
        fundamental_real_power=product.real,
        fundamental_reactive_power=product.imag,
    )
