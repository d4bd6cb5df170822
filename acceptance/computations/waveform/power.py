"""Real and apparent power, true and displacement power factor of a voltage–current pair."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from .._errors import ComputationError
from ._windows import (
    _HARMONIC_SAMPLES_PER_CYCLE,
    _block_mean_response,
    _block_means,
    _checked_interval,
    _checked_samples,
    _phasors,
    _whole_cycles,
    _window_dot,
)
from .fundamental import _resolve_frequency


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
