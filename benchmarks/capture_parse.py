"""Parse and analyse a 1,000,000-row capture; compare with general-purpose CSV readers.

Run: ``python benchmarks/capture_parse.py``. Writes a three-column capture (time and two
channels, 1 MS/s for 1 s of a distorted 50 Hz supply) to a temporary folder, then times,
in the same run and on the same file, our importer end to end (read, check, scale, analyse
both channels and the pair) and each general-purpose reader that imports (pyarrow.csv,
polars, pandas with the C engine, numpy.loadtxt), parse only. Prints the ratio of ours to the
fastest reader; the target is ≤ 2×.
"""

from __future__ import annotations

import math
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from acceptance.captures import analyse_capture, parse_scaling

ROWS = 1_000_000
REPEATS = 7


def write_capture(path: Path) -> None:
    rate = 1e6
    t = np.arange(ROWS) / rate
    omega = 2 * math.pi * 50.0
    rng = np.random.default_rng(1)
    voltage = 3.25 * np.sin(omega * t) + 0.1 * np.sin(5 * omega * t) + rng.normal(0, 2e-3, ROWS)
    current = (0.4 * np.sin(omega * t - 0.2) ** 9 + 0.05 * np.sin(omega * t)
               + rng.normal(0, 1e-3, ROWS))
    columns = np.char.add(np.char.add(np.char.mod("%.6f,", t), np.char.mod("%.5f,", voltage)),
                          np.char.mod("%.5f", current))
    path.write_text("time_s,CH1,CH2\n" + "\n".join(columns.tolist()) + "\n", encoding="utf-8")


def readers() -> dict[str, Callable[[Path], object]]:
    found: dict[str, Callable[[Path], object]] = {}
    try:
        import pyarrow.csv as arrow_csv

        found["pyarrow.csv"] = lambda p: arrow_csv.read_csv(p)
    except ImportError:
        pass
    try:
        import polars

        found["polars"] = lambda p: polars.read_csv(p)
    except ImportError:
        pass
    try:
        import pandas

        found["pandas (C engine)"] = lambda p: pandas.read_csv(p, engine="c")
    except ImportError:
        pass
    found["numpy.loadtxt"] = lambda p: np.loadtxt(p, delimiter=",", skiprows=1)
    # comments=None skips numpy's comment scan: its fastest setting for plain numeric CSV.
    found["numpy.loadtxt (comments=None)"] = lambda p: np.loadtxt(p, delimiter=",", skiprows=1,
                                                                   comments=None)
    return found


def interleaved_best(functions: dict[str, Callable[[], object]]) -> dict[str, float]:
    """Best of REPEATS for each, taking turns so that machine load falls on all alike."""
    best = dict.fromkeys(functions, math.inf)
    for _ in range(REPEATS):
        for name, function in functions.items():
            start = time.perf_counter()
            function()
            best[name] = min(best[name], time.perf_counter() - start)
    return best


def main() -> int:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "capture.csv"
        write_capture(path)
        size = path.stat().st_size
        scalings = {"CH1": parse_scaling("x100"), "CH2": parse_scaling("10 mV/A")}
        ours_name = "acceptance parse + analyse"
        candidates: dict[str, Callable[[], object]] = {
            ours_name: lambda: analyse_capture(path, scalings, "CH1", "CH2")}
        for name, reader in readers().items():
            candidates[name] = lambda r=reader: r(path)
        figures = interleaved_best(candidates)
        ours = figures.pop(ours_name)
        analysis = analyse_capture(path, scalings, "CH1", "CH2")
    print(f"capture: {ROWS} rows x 3 columns, {size / 1e6:.1f} MB; best of {REPEATS}")
    print(f"  {ours_name:<32} {ours:7.3f} s   "
          f"(f = {analysis.frequency:.4f} Hz, {analysis.channels[0].metrics.cycles_used} cycles)")
    for name, seconds in figures.items():
        print(f"  {name:<32} {seconds:7.3f} s   (parse only)")
    fastest_name = min(figures, key=figures.__getitem__)
    ratio = ours / figures[fastest_name]
    verdict = "meets" if ratio <= 2.0 else "misses"
    print(f"ratio to the fastest reader ({fastest_name}): {ratio:.2f}x — {verdict} the 2x target")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
