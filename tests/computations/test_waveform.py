"""Waveform computations against reference values §9, closed forms, numpy.fft and a model."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from acceptance.computations import ComputationError
from acceptance.computations.waveform import (
    AVERAGE_RESPONDING_SCALE,
    fundamental_frequency,
    harmonic_spectrum,
    iec_window_cycles,
    power_quantities,
    thd_r_from_thd_f,
    waveform_metrics,
)
from tests.rectifier_model import simulate_bridge_rectifier

SAMPLES_PER_CYCLE = 2000
FREQUENCY = 50.0
INTERVAL = 1.0 / (FREQUENCY * SAMPLES_PER_CYCLE)


def _phase(cycles: int = 10) -> np.ndarray:
    # Samples fall on the peaks (a quarter cycle is 500 samples), as a peak reading assumes.
    return 2.0 * math.pi * np.arange(cycles * SAMPLES_PER_CYCLE) / SAMPLES_PER_CYCLE


def _square(phase: np.ndarray) -> np.ndarray:
    # Half a sample off the edges, which sign() would otherwise sample as zero.
    return np.sign(np.sin(phase + math.pi / SAMPLES_PER_CYCLE))


def _triangle(phase: np.ndarray) -> np.ndarray:
    return 2.0 / math.pi * np.arcsin(np.sin(phase))


WAVES = {
    "sine": np.sin,
    "square": _square,
    "triangle": _triangle,
    "half-wave rectified": lambda p: np.maximum(np.sin(p), 0.0),
    "full-wave rectified": lambda p: np.abs(np.sin(p)),
}

# Form factor, crest factor, average-responding reading / true rms, peak 1, d.c.-coupled.
# reference values §9, meter tables [S]; the full-wave row follows because |sin| has the same
# distribution of |x| as the sine [S: identity]. Exact closed forms beside the table figures.
TABLE = {
    "sine": ((1.1107, 1.4142, 1.000),
             (math.pi / (2 * math.sqrt(2)), math.sqrt(2), 1.0)),
    "square": ((1.000, 1.000, 1.111),
               (1.0, 1.0, math.pi / (2 * math.sqrt(2)))),
    "triangle": ((1.1547, 1.7321, 0.962),
                 (2 / math.sqrt(3), math.sqrt(3), math.pi / (2 * math.sqrt(2)) * math.sqrt(3) / 2)),
    "half-wave rectified": ((1.5708, 2.000, 0.707),
                            (math.pi / 2, 2.0, 1 / math.sqrt(2))),
    "full-wave rectified": ((1.1107, 1.4142, 1.000),
                            (math.pi / (2 * math.sqrt(2)), math.sqrt(2), 1.0)),
}


@pytest.mark.parametrize("name", list(WAVES))
def test_form_crest_and_meter_factors_match_the_meter_tables(name: str) -> None:
    metrics = waveform_metrics(WAVES[name](_phase()), INTERVAL)
    measured = (metrics.form_factor, metrics.crest_factor,
                metrics.average_responding_dc / metrics.rms)
    table, exact = TABLE[name]
    # 2000 samples per cycle integrate these shapes to better than 1e-5 relative; the
    # closed forms are exact, so 2e-5 tells 1.1107 from 1.1111 and 1.1547 from 1.1557.
    assert_allclose(measured, exact, rtol=2e-5)
    # The table prints 4-5 significant figures: agree to half a unit of the last one.
    assert_allclose(measured, table, atol=5.1e-4)


def test_average_responding_scale_is_the_sine_form_factor() -> None:
    # reference values §9: π/(2√2) = 1.1107 [S]
    assert AVERAGE_RESPONDING_SCALE == pytest.approx(1.1107207345, rel=1e-10)


def test_half_wave_rectified_a_c_coupled_reading_removes_the_d_c_component() -> None:
    metrics = waveform_metrics(WAVES["half-wave rectified"](_phase()), INTERVAL)
    # Half-wave rectified sine of peak 1: d.c. = 1/π, rms = 1/2 (closed form) [S]
    assert metrics.dc == pytest.approx(1 / math.pi, rel=1e-5)
    assert metrics.rms == pytest.approx(0.5, rel=1e-5)
    assert metrics.ac_rms == pytest.approx(math.sqrt(0.25 - 1 / math.pi**2), rel=1e-5)
    # Reference: mean|x − 1/π| integrated independently on 2·10⁶ points per cycle.
    fine = np.maximum(np.sin(np.linspace(0, 2 * math.pi, 2_000_001)[:-1]), 0.0)
    expected = AVERAGE_RESPONDING_SCALE * float(np.mean(np.abs(fine - 1 / math.pi)))
    assert metrics.average_responding_ac == pytest.approx(expected, rel=1e-5)


# --------------------------------------------------------------------------- harmonics


def _published_example(phase_shift_degrees: float) -> tuple[np.ndarray, np.ndarray, float]:
    """reference values §9 example: I3/I1 0.85, I5 0.60, I7 0.35, I9 0.15, I11 0.10."""
    fs = 12_800.0
    t = np.arange(int(0.2 * fs)) / fs
    omega = 2 * math.pi * 50.0
    voltage = 230 * math.sqrt(2) * np.sin(omega * t)
    current = 10 * math.sqrt(2) * np.sin(omega * t - math.radians(phase_shift_degrees))
    for order, ratio, phase in ((3, 0.85, 0.4), (5, 0.60, 1.3), (7, 0.35, 2.2),
                                (9, 0.15, 0.7), (11, 0.10, 2.9)):
        current += ratio * 10 * math.sqrt(2) * np.sin(order * omega * t + phase)
    return voltage, current, 1 / fs


def test_published_harmonic_example_gives_thd_f_thd_r_and_power_factor() -> None:
    dpf = 0.98
    voltage, current, interval = _published_example(math.degrees(math.acos(dpf)))
    spectrum = harmonic_spectrum(current, interval)
    thd_f = math.sqrt(0.85**2 + 0.60**2 + 0.35**2 + 0.15**2 + 0.10**2)
    # reference values §9: THD-F 111.2 %, THD-R 74.4 % [S]; the window holds 10 whole cycles, so
    # the DFT is exact and agrees with the closed form to rounding.
    assert spectrum.thd_f == pytest.approx(thd_f, rel=1e-9)
    assert 100 * spectrum.thd_f == pytest.approx(111.2, abs=0.05)
    assert 100 * spectrum.thd_r == pytest.approx(74.4, abs=0.05)
    assert spectrum.percent_of_fundamental[2] == pytest.approx(85.0, rel=1e-9)
    assert spectrum.window_cycles == 10 and spectrum.iec_window
    power = power_quantities(voltage, current, interval)
    # reference values §9: PF = DPF/sqrt(1 + THD-F²) = 0.655 with DPF 0.98 [S]
    assert power.displacement_power_factor == pytest.approx(dpf, rel=1e-9)
    assert power.power_factor == pytest.approx(dpf / math.sqrt(1 + thd_f**2), rel=1e-9)
    assert power.power_factor == pytest.approx(0.655, abs=5e-4)
    assert power.distortion_factor == pytest.approx(1 / math.sqrt(1 + thd_f**2), rel=1e-9)
    assert power.fundamental_phase_angle > 0  # the current lags


def test_thd_r_follows_from_thd_f() -> None:
    # reference values §9: THD-R = THD-F/sqrt(1 + THD-F²) [S]; 1.112 → 0.744
    assert thd_r_from_thd_f(1.1124) == pytest.approx(0.7437, abs=1e-4)
    assert thd_r_from_thd_f(0.0) == 0.0
    with pytest.raises(ComputationError, match="thd_f -0.1 must be a finite ratio"):
        thd_r_from_thd_f(-0.1)


@pytest.mark.parametrize(("frequency", "cycles"), [(50.0, 10), (60.0, 12), (400.0, 80)])
def test_iec_window_is_about_200_ms(frequency: float, cycles: int) -> None:
    # IEC 61000-4-7: 10 cycles at 50 Hz, 12 at 60 Hz, ≈ 200 ms [M]
    assert iec_window_cycles(frequency) == cycles


@pytest.mark.parametrize("seed", [1, 2, 3, 4, 5])
def test_spectrum_matches_numpy_fft_on_random_multitone_signals(seed: int) -> None:
    rng = np.random.default_rng(seed)
    per_cycle, cycles = 256, 20
    count = per_cycle * cycles
    interval = 1 / (50.0 * per_cycle)
    n = np.arange(count)
    signal = 3.0 * np.cos(2 * math.pi * n / per_cycle + rng.uniform(0, 2 * math.pi)) + 0.4
    for order in rng.choice(np.arange(2, 41), size=8, replace=False):
        signal += rng.uniform(0.01, 1.5) * np.cos(2 * math.pi * order * n / per_cycle
                                                  + rng.uniform(0, 2 * math.pi))
    # Interharmonics 2 bins (10 Hz) and 5 bins (25 Hz) off a harmonic, in 10-cycle windows.
    for offset in (2 / 10, 5 / 10):
        order = int(rng.integers(2, 30)) + offset
        signal += rng.uniform(0.05, 0.5) * np.cos(2 * math.pi * order * n / per_cycle)
    spectrum = harmonic_spectrum(signal, interval, basis="group")
    assert spectrum.windows == 2 and spectrum.window_cycles == 10
    # Reference: numpy.fft on each 10-cycle window, bin rms √2·|X_k|/N, aggregated as rms.
    windows = signal.reshape(2, -1)
    bins = np.sqrt(2) * np.abs(np.fft.rfft(windows, axis=1)) / windows.shape[1]
    squares = bins**2
    orders = np.arange(1, 41)
    components = np.sqrt(np.mean(squares[:, orders * 10], axis=0))
    subgroups = np.sqrt(np.mean(sum(squares[:, orders * 10 + i] for i in (-1, 0, 1)), axis=0))
    groups = np.sqrt(np.mean(
        sum(squares[:, orders * 10 + i] for i in range(-4, 5))
        + 0.5 * (squares[:, orders * 10 - 5] + squares[:, orders * 10 + 5]), axis=0))
    # Same transform evaluated two ways: agreement to float rounding, scaled by the largest.
    assert_allclose(spectrum.components, components, rtol=1e-9, atol=1e-11)
    assert_allclose(spectrum.subgroups, subgroups, rtol=1e-9, atol=1e-11)
    assert_allclose(spectrum.groups, groups, rtol=1e-9, atol=1e-11)
    assert spectrum.dc == pytest.approx(0.4, rel=1e-9)
    assert spectrum.thd_f == pytest.approx(math.sqrt(np.sum(groups[1:] ** 2)) / groups[0],
                                           rel=1e-9)


def test_sampling_rate_unrelated_to_the_line_frequency_still_puts_bins_on_harmonics() -> None:
    fs = 7_777.7  # 155.55 samples per cycle: no whole number of samples per cycle
    t = np.arange(int(0.25 * fs)) / fs
    omega = 2 * math.pi * 50.0
    signal = np.sin(omega * t) + 0.2 * np.sin(23 * omega * t + 1.0)
    spectrum = harmonic_spectrum(signal, 1 / fs, fundamental_frequency=50.0,
                                 basis="component")
    # Closed form: rms 1/√2 and 0.2/√2. The last sample weighted by its fraction of the
    # window leaves a leakage of order one sample in 1555, so 1e-3 relative.
    assert spectrum.components[0] == pytest.approx(1 / math.sqrt(2), rel=1e-3)
    assert spectrum.percent_of_fundamental[22] == pytest.approx(20.0, rel=1e-3)
    assert spectrum.percent_of_fundamental[21] < 0.2


# --------------------------------------------------------------------------- fundamental


def test_non_integer_cycles_with_noise_and_offset() -> None:
    rng = np.random.default_rng(20260311)
    fs, frequency, duration = 12_500.0, 49.87, 0.337
    t = np.arange(int(duration * fs)) / fs
    omega = 2 * math.pi * frequency
    clean = 2.0 + 10.0 * np.sin(omega * t + 0.7) + 0.5 * np.sin(5 * omega * t + 0.2)
    noise_rms = 0.05
    signal = clean + rng.normal(0.0, noise_rms, t.size)
    estimate = fundamental_frequency(signal, 1 / fs)
    # Cramér–Rao bound for this SNR and length is ~1e-4 Hz; allow 2e-3 Hz.
    assert estimate.frequency == pytest.approx(frequency, abs=2e-3)
    assert estimate.cycles_used == math.floor(duration * frequency) == 16
    metrics = waveform_metrics(signal, 1 / fs)
    # Closed form: rms² = dc² + A1²/2 + A5²/2 + σ². Over 4000 samples the signal × noise
    # cross term scatters the mean square by 2σ·rms/√N ≈ 2e-4 relative (1e-4 on the rms);
    # allow 5e-4.
    expected_rms = math.sqrt(2.0**2 + 10.0**2 / 2 + 0.5**2 / 2 + noise_rms**2)
    assert metrics.rms == pytest.approx(expected_rms, rel=5e-4)
    assert metrics.dc == pytest.approx(2.0, abs=2e-3)
    # A.c.-coupled meter sees the sine + 5th: reference from the noiseless wave on a fine grid.
    fine = np.linspace(0, 1 / frequency, 1_000_001)[:-1]
    ac = 10.0 * np.sin(omega * fine + 0.7) + 0.5 * np.sin(5 * omega * fine + 0.2)
    expected = AVERAGE_RESPONDING_SCALE * float(np.mean(np.abs(ac)))
    assert metrics.average_responding_ac == pytest.approx(expected, rel=1e-3)
    assert metrics.average_responding_dc > metrics.average_responding_ac
    spectrum = harmonic_spectrum(signal, 1 / fs)
    assert spectrum.thd_f == pytest.approx(0.05, abs=1e-3)


def test_strong_harmonic_is_not_taken_for_the_fundamental() -> None:
    t = np.arange(4000) / 10_000.0
    omega = 2 * math.pi * 50.0
    signal = 0.5 * np.sin(omega * t) + 1.0 * np.sin(3 * omega * t)
    assert fundamental_frequency(signal, 1e-4).frequency == pytest.approx(50.0, rel=1e-6)


def test_fewer_than_two_cycles_is_refused() -> None:
    t = np.arange(150) / 10_000.0  # 15 ms: 0.75 cycle of 50 Hz
    with pytest.raises(ComputationError, match="at least two full cycles are needed"):
        waveform_metrics(np.sin(2 * math.pi * 50 * t), 1e-4, fundamental_frequency=50.0)


def test_nan_is_refused_with_its_index() -> None:
    signal = np.sin(np.linspace(0, 20 * math.pi, 1000))
    signal[17] = np.nan
    with pytest.raises(ComputationError) as caught:
        waveform_metrics(signal, 1e-4)
    assert str(caught.value) == ("samples holds 1 non-finite value(s) (NaN or infinite), the "
                                 "first at index 17; every sample must be a finite number")


def test_constant_and_noise_have_no_fundamental() -> None:
    with pytest.raises(ComputationError, match="no detectable fundamental: the samples are "
                                               "constant"):
        fundamental_frequency(np.full(1000, 3.0), 1e-4)
    noise = np.random.default_rng(5).normal(size=20_000)
    with pytest.raises(ComputationError, match="no detectable fundamental"):
        fundamental_frequency(noise, 1e-4)


def test_bad_interval_names_the_parameter() -> None:
    with pytest.raises(ComputationError, match=r"sample_interval -1.0 s must be a finite number"):
        waveform_metrics(np.zeros(100), -1.0)


# --------------------------------------------------------------------------- rectifier


def test_capacitor_input_rectifier_line_current() -> None:
    # 230 V, 28 Ω coil, 2200 µF, supply 0.5 Ω + 0.5 mH (tests/rectifier_model.py).
    run = simulate_bridge_rectifier(supply_rms=230.0, source_resistance=0.5,
                                    source_inductance=0.5e-3, capacitance=2200e-6,
                                    load_resistance=28.0)
    metrics = waveform_metrics(run.line_current, run.sample_interval)
    power = power_quantities(run.terminal_voltage, run.line_current, run.sample_interval)
    # reference values §9 [P, common practice]: crest factor roughly 2.5–4.5; an average-responding
    # clamp under-reads by 30–45 %; PF roughly 0.4–0.7.
    assert 2.5 <= metrics.crest_factor <= 4.5
    under_reading = 1 - metrics.average_responding_ac / metrics.rms
    assert 0.30 <= under_reading <= 0.45
    assert 0.4 <= power.power_factor <= 0.7
    # Charge balance in steady state [S: Kirchhoff]: the rectified line current's mean is the
    # coil's d.c. current; 1 % for the start-up residue and the time step.
    assert metrics.rectified_mean == pytest.approx(float(np.mean(run.coil_current)), rel=0.01)
    # Only odd harmonics in a half-wave symmetric current [S: Fourier symmetry].
    spectrum = harmonic_spectrum(run.line_current, run.sample_interval)
    assert max(spectrum.percent_of_fundamental[1::2]) < 1.0
    assert spectrum.percent_of_fundamental[2] > 50.0


def test_field_observation_of_a_clamping_magnet() -> None:
    # [P, no source] A d.c. clamping magnet of about 28 Ω fed from about 220 V through a
    # bridge and filter capacitor drew about 17.4 A true RMS at the line while an
    # average-responding clamp read about 10.4 A; the coil current is near V_peak/R.
    # Model: 2200 µF, supply impedance 1.1 Ω + 0.3 mH (not measured in the field).
    run = simulate_bridge_rectifier(supply_rms=220.0, source_resistance=1.1,
                                    source_inductance=0.3e-3, capacitance=2200e-6,
                                    load_resistance=28.0)
    metrics = waveform_metrics(run.line_current, run.sample_interval)
    # 5 %: the readings were taken with a clamp meter (a few % of reading) on a supply whose
    # voltage and impedance were known only roughly.
    assert metrics.rms == pytest.approx(17.4, rel=0.05)
    assert metrics.average_responding_ac == pytest.approx(10.4, rel=0.05)
    # "Near": within 20 % of V_peak/R, the supply drop and ripple taking the rest.
    coil = float(np.mean(run.coil_current))
    assert coil == pytest.approx(220.0 * math.sqrt(2) / 28.0, rel=0.20)
    assert coil < 220.0 * math.sqrt(2) / 28.0
