"""Time-step model of a capacitor-input bridge rectifier feeding a resistive d.c. coil.

Used by the tests as an independent source of distorted line currents, and to write the
demo capture. The circuit: a sinusoidal source behind a series resistance and inductance
(the supply and cable impedance), a single-phase diode bridge whose two conducting diodes
each drop a fixed forward voltage, a filter capacitor, and the coil as a resistance.

While the bridge conducts, with polarity p = ±1 fixed at the start of each conduction
interval and i ≥ 0 the rectified current::

    L_s·di/dt = p·v_s − 2·V_f − v_C − R_s·i
    C·dv_C/dt = i − v_C/R

Conduction starts when p·v_s − 2·V_f exceeds v_C and ends when i returns to zero. The
line current is p·i; the voltage at the machine terminals is v_s − R_s·p·i − L_s·p·di/dt.
Integration is semi-implicit Euler at ten steps per recorded sample.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "DEMO_CAPTURE",
    "RectifierRun",
    "simulate_bridge_rectifier",
    "write_demo_capture",
    "write_mag_table_demo",
]


@dataclass(frozen=True)
class RectifierRun:
    """Recorded waveforms of one simulation, steady state only."""

    sample_interval: float
    time: NDArray[np.float64]
    terminal_voltage: NDArray[np.float64]
    line_current: NDArray[np.float64]
    coil_current: NDArray[np.float64]
    capacitor_voltage: NDArray[np.float64]


def simulate_bridge_rectifier(
    supply_rms: float = 230.0,
    frequency: float = 50.0,
    source_resistance: float = 0.5,
    source_inductance: float = 1.0e-3,
    capacitance: float = 2200e-6,
    load_resistance: float = 28.0,
    diode_drop: float = 0.8,
    sample_rate: float = 20_000.0,
    duration: float = 0.3,
    settle: float = 0.8,
    steps_per_sample: int = 10,
) -> RectifierRun:
    """Simulate and return ``duration`` seconds after ``settle`` seconds of start-up."""
    step = 1.0 / (sample_rate * steps_per_sample)
    peak = math.sqrt(2.0) * supply_rms
    omega = 2.0 * math.pi * frequency
    recorded = int(round(duration * sample_rate))
    skip = int(round(settle * sample_rate)) * steps_per_sample
    total = skip + recorded * steps_per_sample
    terminal = np.empty(recorded)
    line = np.empty(recorded)
    capacitor = np.empty(recorded)
    # Starting near the running level shortens start-up; the settle time removes the rest.
    v_c = 0.9 * peak
    current = 0.0
    polarity = 1.0
    slope = 0.0
    for n in range(total):
        v_s = peak * math.sin(omega * n * step)
        if current <= 0.0:
            current = 0.0
            polarity = 1.0 if v_s >= 0.0 else -1.0
            if polarity * v_s - 2.0 * diode_drop <= v_c:
                slope = 0.0
            else:
                slope = 1.0
        if current > 0.0 or slope:
            drive = polarity * v_s - 2.0 * diode_drop - v_c
            new_current = ((current + step / source_inductance * drive)
                           / (1.0 + step * source_resistance / source_inductance))
            slope = (max(new_current, 0.0) - current) / step
            current = max(new_current, 0.0)
        else:
            slope = 0.0
        v_c += step * (current - v_c / load_resistance) / capacitance
        if n >= skip and (n - skip) % steps_per_sample == 0:
            k = (n - skip) // steps_per_sample
            line[k] = polarity * current
            terminal[k] = v_s - polarity * (source_resistance * current
                                            + source_inductance * slope)
            capacitor[k] = v_c
        if current == 0.0:
            slope = 0.0
    interval = 1.0 / sample_rate
    return RectifierRun(
        sample_interval=interval,
        time=np.arange(recorded) * interval,
        terminal_voltage=terminal,
        line_current=line,
        coil_current=capacitor / load_resistance,
        capacitor_voltage=capacitor,
    )


def write_demo_capture(path: str | Path, run: RectifierRun, voltage_probe_ratio: float = 100.0,
                       current_probe_sensitivity: float = 0.010, noise: float = 0.0005,
                       seed: int = 7, comments: tuple[str, ...] = ()) -> Path:
    """Write a scope-style CSV: ``time_s,CH1,CH2`` in probe-output volts.

    CH1 is the terminal voltage through a voltage probe of ``voltage_probe_ratio``;
    CH2 the line current through a current probe of ``current_probe_sensitivity`` [V/A].
    ``noise`` is the rms of added recorder noise [V at the probe output].
    """
    rng = np.random.default_rng(seed)
    channel_1 = run.terminal_voltage / voltage_probe_ratio + rng.normal(0, noise, run.time.size)
    channel_2 = (run.line_current * current_probe_sensitivity
                 + rng.normal(0, noise, run.time.size))
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    lines = [f"# {text}" for text in comments]
    lines.append("time_s,CH1,CH2")
    lines.extend(f"{t:.7f},{a:.5f},{b:.5f}"
                 for t, a, b in zip(run.time, channel_1, channel_2, strict=True))
    target.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return target


DEMO_CAPTURE = Path("demo_job/machines/mag-table-1/captures/line-current.csv")


def write_mag_table_demo(path: str | Path = DEMO_CAPTURE) -> Path:
    """The demo job's capture: an invented magnetic table's 34.6 Ω coil (as measured cold)
    behind a 1000 µF filter, on a 232 V 50 Hz supply of 0.7 Ω + 0.8 mH."""
    run = simulate_bridge_rectifier(supply_rms=232.0, frequency=50.0, source_resistance=0.7,
                                    source_inductance=0.8e-3, capacitance=1000e-6,
                                    load_resistance=34.6, sample_rate=20_000.0, duration=0.3)
    return write_demo_capture(path, run, comments=(
        "Demo capture (simulated): mag-table-1 coil supply, line side of the rectifier",
        "CH1 supply voltage through a x100 differential probe; CH2 line current through a "
        "10 mV/A current probe",
        "20 kS/s, 0.3 s; values in volts at the probe outputs",
    ))


if __name__ == "__main__":
    print(write_mag_table_demo())
