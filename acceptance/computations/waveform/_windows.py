"""Checks of sampled arrays and sums over integer-cycle windows, shared by the analyses."""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._errors import ComputationError

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
