"""Scope captures in CSV: import, probe scaling, checks and analysis.

A capture file holds optional ``#`` comment lines, one header row naming the columns, then
one row per sample: a time column and one or more channels, separated by commas or
semicolons, with a decimal point. The time unit is read from the time column's name
(``time_s``, ``Time (ms)``, ``t_us``); seconds when none is given.

Channels are scaled as people set their probes: a voltage probe ratio (``x100``,
``×10``, ``500:1``), a current probe sensitivity (``10 mV/A``, ``1 mV per 100 mA``), or the
physical unit alone when the recorder already applied the probe (``V``, ``A``). An offset in
the physical unit, such as the reading of a current probe at rest, is subtracted after
scaling.

Every problem names the file and its 1-based line number. Library code only raises
:class:`acceptance.errors.InputError`; clipping is a warning carried in the analysis.
"""

from __future__ import annotations

import codecs
import difflib
import math
import re
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray

from .computations import ComputationError
from .computations.waveform import (
    HarmonicSpectrum,
    PowerQuantities,
    WaveformMetrics,
    fundamental_frequency,
    harmonic_spectrum,
    power_quantities,
    waveform_metrics,
)
from .errors import InputError, Problem

__all__ = [
    "CAPTURE_SCHEMA",
    "MAX_CAPTURE_BYTES",
    "MAX_CAPTURE_ROWS",
    "CaptureAnalysis",
    "CaptureData",
    "ChannelAnalysis",
    "ChannelScaling",
    "analyse_capture",
    "capture_to_json",
    "parse_scaling",
    "read_capture",
]

CAPTURE_SCHEMA = "acceptance-capture/1"

#: A capture is read whole into memory (8 bytes per sample and column, twice over while
#: scaling): 200 MiB of CSV is about ten million rows of three columns, beyond any record
#: a commissioning check needs (a few cycles are plotted; a few seconds are analysed).
MAX_CAPTURE_BYTES = 200 * 1024 * 1024
MAX_CAPTURE_ROWS = 5_000_000

# Problems past this many are summarised in one line; a file with a systematic fault
# would otherwise bury the first, most useful messages.
_MAXIMUM_PROBLEMS = 20
# A flat run at the extreme recorded value longer than this share of a cycle, recurring in
# at least half of the cycles, is taken as clipping: a sine flattened for 5 % of its cycle
# has lost 1.2 % of its peak [P].
_CLIP_RUN_SHARE = 0.05
# Sampling intervals further than this share from the mean interval mean missing samples or
# a changed time base, not timing jitter [P].
_INTERVAL_TOLERANCE = 0.5

_TIME_NAMES = re.compile(r"^\s*(time|t|zeit|temps|tiempo|x)\b", re.IGNORECASE)
_TIME_UNIT = re.compile(r"(?:^|[\s_(\[/])(s|ms|us|µs|μs|ns)[)\]]?\s*$", re.IGNORECASE)
_TIME_SCALE = {"s": 1.0, "ms": 1e-3, "us": 1e-6, "µs": 1e-6, "μs": 1e-6, "ns": 1e-9}

_NUMBER = r"[0-9]+(?:\.[0-9]*)?(?:[eE][-+]?[0-9]+)?|\.[0-9]+(?:[eE][-+]?[0-9]+)?"
_RATIO = re.compile(rf"^\s*(?:[x×*]\s*({_NUMBER})|({_NUMBER})\s*[x×]|({_NUMBER})\s*:\s*1)\s*$",
                    re.IGNORECASE)
_SENSITIVITY = re.compile(
    rf"^\s*({_NUMBER})\s*(µV|μV|uV|mV|V)\s*(?:/|per)\s*({_NUMBER})?\s*(mA|A|kA)\s*$",
    re.IGNORECASE)
_VOLT_PREFIX = {"µv": 1e-6, "μv": 1e-6, "uv": 1e-6, "mv": 1e-3, "v": 1.0}
_AMP_PREFIX = {"ma": 1e-3, "a": 1.0, "ka": 1e3}


# --------------------------------------------------------------------------- scaling


@dataclass(frozen=True)
class ChannelScaling:
    """How a recorded channel becomes a physical quantity.

    physical = recorded · factor − offset

    Attributes
    ----------
    factor : float
        Physical units per recorded volt: 100 for a x100 voltage probe [V/V]; 100 for a
        10 mV/A current probe [A/V].
    unit : str
        Physical unit, ``"V"`` or ``"A"``.
    offset : float
        Subtracted after scaling, e.g. the reading with the probe at rest [unit].
    text : str
        The scaling as written, for the record (``"x100"``, ``"10 mV/A"``).
    """

    factor: float = 1.0
    unit: str = "V"
    offset: float = 0.0
    text: str = "V"

    def __post_init__(self) -> None:
        if self.unit not in ("V", "A"):
            raise ValueError(f"unit {self.unit!r} must be 'V' or 'A'")
        if not (math.isfinite(self.factor) and self.factor > 0.0):
            raise ValueError(f"scaling factor {self.factor!r} must be a finite number above zero")
        if not math.isfinite(self.offset):
            raise ValueError(f"offset {self.offset!r} must be a finite number")

    def apply(self, recorded: NDArray[np.float64]) -> NDArray[np.float64]:
        """Recorded volts to the physical unit."""
        scaled = recorded * self.factor
        if self.offset:
            scaled -= self.offset
        return scaled

    def with_offset(self, offset: float) -> ChannelScaling:
        return ChannelScaling(self.factor, self.unit, offset, self.text)


def parse_scaling(text: str) -> ChannelScaling:
    """Read a probe setting as people write it.

    Parameters
    ----------
    text : str
        ``"x100"``, ``"×10"``, ``"100x"``, ``"500:1"`` (voltage probe ratio);
        ``"10 mV/A"``, ``"100 mV/A"``, ``"1 mV per 100 mA"``, ``"0.1 V/A"`` (current probe
        sensitivity); ``"V"`` or ``"A"`` (already in the physical unit).

    Returns
    -------
    ChannelScaling

    Raises
    ------
    ValueError
        When the text is none of these, with the accepted forms in the message.
    """
    written = text.strip()
    if written.upper() in ("V", "A"):
        return ChannelScaling(1.0, written.upper(), 0.0, written.upper())
    ratio = _RATIO.match(written)
    if ratio:
        value = float(next(group for group in ratio.groups() if group is not None))
        if value <= 0.0:
            raise ValueError(f"probe ratio {text!r} must be above zero")
        return ChannelScaling(value, "V", 0.0, written)
    sensitivity = _SENSITIVITY.match(written)
    if sensitivity:
        volts = float(sensitivity.group(1)) * _VOLT_PREFIX[sensitivity.group(2).lower()]
        per = float(sensitivity.group(3)) if sensitivity.group(3) else 1.0
        amperes = per * _AMP_PREFIX[sensitivity.group(4).lower()]
        if volts <= 0.0 or amperes <= 0.0:
            raise ValueError(f"probe sensitivity {text!r} must be above zero")
        return ChannelScaling(amperes / volts, "A", 0.0, written)
    raise ValueError(
        f"probe scaling {text!r} is not understood; write a voltage probe ratio "
        "('x100', '500:1'), a current probe sensitivity ('10 mV/A', '1 mV per 100 mA'), "
        "or 'V' / 'A' when the recorder already applied the probe")


# --------------------------------------------------------------------------- reading


@dataclass(frozen=True)
class CaptureData:
    """Columns of a capture file as recorded, checked for timing.

    Attributes
    ----------
    source : str
        The file as given.
    time_column : str
        Name of the time column.
    header_line : int
        1-based line number of the header row.
    header : tuple of str
        Every column name, in file order.
    line_numbers : numpy.ndarray or None
        1-based line number of each sample's row; None when the rows follow the header
        without a gap, line ``header_line + 1 + index``.
    time : numpy.ndarray
        Sample times [s].
    recorded : dict of str to numpy.ndarray
        Channel values as recorded, before scaling [recorded unit].
    sample_interval : float
        Mean interval between samples [s].
    jitter : float
        Largest departure of one sampling interval from the mean interval, over the mean
        interval; includes the rounding of the printed times [unitless].
    """

    source: str
    time_column: str
    header_line: int
    header: tuple[str, ...]
    line_numbers: NDArray[np.int64] | None = field(repr=False, compare=False)
    time: NDArray[np.float64] = field(repr=False, compare=False)
    recorded: dict[str, NDArray[np.float64]] = field(repr=False, compare=False)
    sample_interval: float = 0.0
    jitter: float = 0.0

    @property
    def rows(self) -> int:
        return int(self.time.size)

    def line_of(self, index: int) -> int:
        if self.line_numbers is None:
            return self.header_line + 1 + index
        return int(self.line_numbers[index])


def _suggest(name: str, known: Sequence[str]) -> str:
    close = difflib.get_close_matches(name, list(known), n=1, cutoff=0.5)
    if not close:
        close = [k for k in known if k.lower() == name.lower()]
    return f"; did you mean {close[0]!r}?" if close else ""


def _split_header(line: str, source: str, line_number: int) -> tuple[str, list[str]]:
    counts = {";": line.count(";"), ",": line.count(","), "\t": line.count("\t")}
    delimiter = max(counts, key=lambda d: (counts[d], d == ";"))
    if counts[delimiter] == 0:
        raise InputError.single(
            source, f"the header row {line.strip()!r} names one column; a capture needs a "
                    "time column and at least one channel, separated by ',' or ';'",
            line=line_number)
    names = [cell.strip().strip('"').strip("'").strip() for cell in line.split(delimiter)]
    problems = []
    seen: dict[str, int] = {}
    for position, name in enumerate(names, start=1):
        if not name:
            problems.append(Problem(source, line_number, position, "",
                                    f"column {position} of the header row has no name"))
        elif name in seen:
            problems.append(Problem(source, line_number, position, name,
                                    f"column name {name!r} is used twice "
                                    f"(columns {seen[name]} and {position})"))
        seen.setdefault(name, position)
    if problems:
        raise InputError(problems)
    return delimiter, names


def _time_column(names: list[str], requested: str | None, source: str, line: int) -> int:
    if requested is not None:
        if requested in names:
            return names.index(requested)
        raise InputError.single(
            source, f"no time column named {requested!r}; the header names "
                    f"{', '.join(names)}{_suggest(requested, names)}", line=line)
    for index, name in enumerate(names):
        if _TIME_NAMES.match(name):
            return index
    return 0


def _time_scale(name: str) -> float:
    unit = _TIME_UNIT.search(name)
    if not unit:
        return 1.0
    token = unit.group(1)
    return _TIME_SCALE.get(token, _TIME_SCALE.get(token.lower(), 1.0))


def _slow_parse(body_lines: list[str], first_line: int, delimiter: str, names: list[str],
                wanted: list[int], source: str) -> tuple[NDArray[np.float64], NDArray[np.int64]]:
    """Line-by-line parse that tells exactly which row and cell is wrong."""
    rows: list[list[float]] = []
    line_numbers: list[int] = []
    problems: list[Problem] = []
    extra = 0
    for offset, text in enumerate(body_lines):
        line = first_line + offset
        if not text.strip():
            continue
        cells = text.rstrip("\r\n").split(delimiter)
        if len(cells) != len(names):
            message = (f"the row has {len(cells)} fields; the header names {len(names)} "
                       f"({', '.join(names)})")
            if len(problems) < _MAXIMUM_PROBLEMS:
                problems.append(Problem(source, line, 1, "", message))
            else:
                extra += 1
            continue
        values = []
        for index in wanted:
            cell = cells[index].strip().strip('"').strip()
            try:
                values.append(float(cell))
            except ValueError:
                values.append(math.nan)
                if len(problems) < _MAXIMUM_PROBLEMS:
                    shown = cell if cell else "an empty cell"
                    problems.append(Problem(
                        source, line, index + 1, names[index],
                        f"{shown!r} in column {names[index]} is not a number"
                        if cell else f"{shown} in column {names[index]}; a number is needed"))
                else:
                    extra += 1
        rows.append(values)
        line_numbers.append(line)
    if problems:
        if extra:
            problems.append(Problem(source, problems[-1].line + 1, 1, "",
                                    f"… and {extra} more problems of the same kind"))
        raise InputError(problems)
    if not rows:
        return np.empty((0, len(wanted))), np.empty(0, dtype=np.int64)
    return np.array(rows, dtype=np.float64), np.array(line_numbers, dtype=np.int64)


def _check_decimal_comma(first_row: str, delimiter: str, source: str, line: int) -> None:
    if delimiter != ";" or "," not in first_row:
        return
    cell = next(c for c in first_row.split(";") if "," in c).strip()
    raise InputError.single(
        source, f"decimal comma in {cell!r}: this reader takes a decimal point only; export "
                "the capture with '.' as the decimal separator (the column separator may "
                "stay ';')", line=line)


def _check_values(columns: dict[str, NDArray[np.float64]], line_numbers: NDArray[np.int64],
                  source: str, positions: dict[str, int]) -> None:
    problems = []
    for name, values in columns.items():
        bad = np.flatnonzero(~np.isfinite(values))
        for index in bad[:_MAXIMUM_PROBLEMS]:
            word = "NaN" if math.isnan(values[index]) else "an infinite value"
            problems.append(Problem(source, int(line_numbers[index]), positions[name] + 1, name,
                                    f"{word} in column {name}; every sample must be a "
                                    "finite number"))
        if bad.size > _MAXIMUM_PROBLEMS:
            problems.append(Problem(source, int(line_numbers[bad[_MAXIMUM_PROBLEMS]]),
                                    positions[name] + 1, name,
                                    f"… and {bad.size - _MAXIMUM_PROBLEMS} more non-finite "
                                    f"values in column {name}"))
    if problems:
        raise InputError(problems)


def _check_time(time: NDArray[np.float64], line_numbers: NDArray[np.int64] | None,
                first_data_line: int, source: str, name: str,
                column: int) -> tuple[float, float]:
    def line(index: int) -> int:
        return first_data_line + index if line_numbers is None else int(line_numbers[index])

    if time.size < 8:
        raise InputError.single(
            source, f"the capture has {time.size} data rows; at least 8 are needed",
            line=line(time.size - 1) if time.size else 1)
    steps = np.diff(time)
    shortest, longest = float(steps.min()), float(steps.max())
    if shortest <= 0.0:
        index = int(np.argmax(steps <= 0.0)) + 1
        raise InputError.single(
            source, f"time {time[index]:.9g} s is not after {time[index - 1]:.9g} s on line "
                    f"{line(index - 1)}; the time column must increase",
            line=line(index), column=column, key_path=name)
    interval = float(time[-1] - time[0]) / (time.size - 1)
    jitter = max(longest - interval, interval - shortest) / interval
    if jitter > _INTERVAL_TOLERANCE:
        index = int(np.argmax(np.abs(steps - interval) > _INTERVAL_TOLERANCE * interval)) + 1
        raise InputError.single(
            source, f"sampling is not uniform: the step to {time[index]:.9g} s is "
                    f"{steps[index - 1]:.6g} s against a mean interval of {interval:.6g} s "
                    "(samples missing or the time base changed)",
            line=line(index), column=column, key_path=name)
    return interval, jitter


def _line_end(raw: bytes, position: int) -> int:
    """Index of the end of the line starting at ``position`` (before CR LF, LF or CR)."""
    newline = raw.find(b"\n", position)
    end = len(raw) if newline < 0 else newline
    carriage = raw.find(b"\r", position, end)
    return end if carriage < 0 else carriage


def _next_line(raw: bytes, end: int) -> int:
    if raw[end:end + 2] == b"\r\n":
        return end + 2
    return min(len(raw), end + 1)


def read_capture(path: str | Path, channels: Sequence[str] | None = None,
                 time_column: str | None = None) -> CaptureData:
    """Read a capture CSV and check its columns and timing.

    Parameters
    ----------
    path : str or Path
        The CSV file.
    channels : sequence of str, optional
        Columns to read; every column other than time when omitted.
    time_column : str, optional
        Name of the time column; the first column named like ``time``/``t`` (else the first
        column) when omitted.

    Returns
    -------
    CaptureData

    Raises
    ------
    InputError
        Naming the file and the 1-based line: unreadable file, no header, decimal comma,
        unknown column (with the closest name), a non-numeric or empty cell, a ragged row,
        NaN, time not increasing, non-uniform sampling, too few rows.
    """
    source = str(path)
    try:
        size = Path(path).stat().st_size
        if size > MAX_CAPTURE_BYTES:
            raise InputError.single(
                source, f"the capture is {size} bytes; the limit is {MAX_CAPTURE_BYTES} bytes: "
                        "export a shorter span or a lower sample rate")
        raw = Path(path).read_bytes()
    except OSError as error:
        raise InputError.single(source, f"cannot read the capture: {error.strerror}") from None
    if raw.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        raise InputError.single(source, "the capture is saved as UTF-16; export it as UTF-8 "
                                        "(or ASCII) CSV")
    # Only the header is decoded here; the body goes to numpy's C parser untouched, and is
    # decoded in Python only when that parser refuses it and a precise message is needed.
    position = len(codecs.BOM_UTF8) if raw.startswith(codecs.BOM_UTF8) else 0
    line_number = 1
    while True:
        end = _line_end(raw, position)
        try:
            header = raw[position:end].decode("utf-8")
        except UnicodeDecodeError:
            raise InputError.single(source, "the capture is not UTF-8 text; export it as "
                                            "CSV text with a header row",
                                    line=line_number) from None
        if header.strip() and not header.lstrip().startswith("#"):
            break
        if end >= len(raw):
            raise InputError.single(source, "the capture has no header row; the first line "
                                            "that is not a '#' comment must name the columns, "
                                            "e.g. time_s,CH1,CH2", line=line_number)
        position = _next_line(raw, end)
        line_number += 1
    header_line = line_number
    delimiter, names = _split_header(header, source, header_line)
    body_start = _next_line(raw, end)
    first_data_line = header_line + 1

    time_index = _time_column(names, time_column, source, header_line)
    time_name = names[time_index]
    if channels is None:
        wanted_names = [n for n in names if n != time_name]
    else:
        missing = [n for n in channels if n not in names]
        if missing:
            raise InputError([Problem(
                source, header_line, 1, name,
                f"no column named {name!r}; the header names "
                f"{', '.join(names)}{_suggest(name, names)}") for name in missing])
        wanted_names = [n for n in dict.fromkeys(channels) if n != time_name]
    if not wanted_names:
        raise InputError.single(source, "the capture has no channel besides the time column",
                                line=header_line)
    wanted = [time_index] + [names.index(n) for n in wanted_names]

    first_row = raw[body_start:_line_end(raw, body_start)].decode("utf-8", errors="replace")
    _check_decimal_comma(first_row, delimiter, source, first_data_line)

    content_end = len(raw)
    while content_end > body_start and raw[content_end - 1] in b" \t\r\n":
        content_end -= 1
    expected_rows = raw.count(b"\n", body_start, content_end) + 1 if content_end > body_start else 0
    if expected_rows > MAX_CAPTURE_ROWS:
        raise InputError.single(
            source, f"the capture has {expected_rows} data rows; the limit is "
                    f"{MAX_CAPTURE_ROWS}: export a shorter span or a lower sample rate",
            line=header_line)
    data: NDArray[np.float64] | None = None
    # Blank lines are skipped by numpy and not counted towards max_rows, so a file holding
    # any reads short here and goes to the line-by-line parse, which keeps true line numbers.
    if expected_rows:
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                data = np.loadtxt(path, delimiter=delimiter, usecols=wanted, ndmin=2,
                                  dtype=np.float64, comments=None, skiprows=header_line,
                                  max_rows=expected_rows, encoding="utf-8-sig")
        except ValueError:
            data = None
        if data is not None and data.shape[0] != expected_rows:
            data = None
    line_numbers: NDArray[np.int64] | None = None
    if data is None:
        body = raw[body_start:].decode("utf-8", errors="replace")
        body = body.replace("\r\n", "\n").replace("\r", "\n")
        data, line_numbers = _slow_parse(body.split("\n"), first_data_line, delimiter,
                                         names, wanted, source)
    if data.shape[0] == 0:
        raise InputError.single(source, "the capture has a header row but no data rows",
                                line=header_line)

    if line_numbers is None and data.shape[0] >= 1 and not np.isfinite(data).all():
        line_numbers = np.arange(first_data_line, first_data_line + data.shape[0])
    columns = {names[index]: data[:, k] for k, index in enumerate(wanted)}
    positions = {names[index]: index for index in wanted}
    if line_numbers is not None:
        _check_values(columns, line_numbers, source, positions)
    time_scale = _time_scale(time_name)
    time = columns.pop(time_name)
    if time_scale != 1.0:
        time = time * time_scale
    interval, jitter = _check_time(time, line_numbers, first_data_line, source, time_name,
                                   time_index + 1)
    return CaptureData(
        source=source,
        time_column=time_name,
        header_line=header_line,
        header=tuple(names),
        line_numbers=line_numbers,
        time=time,
        recorded={name: columns[name] for name in wanted_names},
        sample_interval=interval,
        jitter=jitter,
    )


# --------------------------------------------------------------------------- analysis


@dataclass(frozen=True)
class ChannelAnalysis:
    """Results for one channel.

    Attributes
    ----------
    name : str
        Column name.
    unit : str
        ``"V"`` or ``"A"``.
    scaling : ChannelScaling
    metrics : WaveformMetrics
        Rms, mean, peak, factors and average-responding readings [unit].
    spectrum : HarmonicSpectrum
        Harmonics to order 40 [unit], THD.
    clipped : bool
        True when flat tops at the recorder's limit were found.
    """

    name: str
    unit: str
    scaling: ChannelScaling
    metrics: WaveformMetrics
    spectrum: HarmonicSpectrum
    clipped: bool


@dataclass(frozen=True)
class CaptureAnalysis:
    """A capture, analysed.

    Attributes
    ----------
    source : str
        The file as given.
    rows : int
        Data rows [unitless].
    time_column : str
    sample_interval : float
        [s].
    sample_rate : float
        [Hz].
    duration : float
        rows · sample_interval [s].
    jitter : float
        Largest departure of one sampling interval from the mean, over the mean [unitless].
    frequency : float
        Fundamental frequency, from the voltage channel when one is named [Hz].
    frequency_channel : str
        The channel the frequency was detected on.
    channels : tuple of ChannelAnalysis
        In the order requested.
    voltage_channel, current_channel : str or None
    power : PowerQuantities or None
        When both a voltage and a current channel are named.
    warnings : tuple of Problem
        Clipping and other conditions that leave results usable but biased.
    time : numpy.ndarray
        Sample times [s] (not compared).
    signals : dict of str to numpy.ndarray
        Scaled channel values [unit] (not compared).
    """

    source: str
    rows: int
    time_column: str
    sample_interval: float
    sample_rate: float
    duration: float
    jitter: float
    frequency: float
    frequency_channel: str
    channels: tuple[ChannelAnalysis, ...]
    voltage_channel: str | None
    current_channel: str | None
    power: PowerQuantities | None
    warnings: tuple[Problem, ...]
    time: NDArray[np.float64] = field(repr=False, compare=False)
    signals: dict[str, NDArray[np.float64]] = field(repr=False, compare=False)

    def channel(self, name: str) -> ChannelAnalysis:
        for item in self.channels:
            if item.name == name:
                return item
        raise KeyError(name)


def _clipping(recorded: NDArray[np.float64], samples_per_cycle: float,
              cycles: int) -> tuple[str, float, int, float] | None:
    """Which extreme is held flat, at what value, from which sample, for what share."""
    high, low = float(recorded.max()), float(recorded.min())
    span = high - low
    if span <= 0.0:
        return None
    shortest_clip = max(3.0, _CLIP_RUN_SHARE * samples_per_cycle)
    needed = max(1, cycles // 2)
    for side, limit in (("largest", high), ("smallest", low)):
        tolerance = 1e-9 * span
        at_limit = (recorded >= limit - tolerance) if side == "largest" else (
            recorded <= limit + tolerance)
        if int(np.count_nonzero(at_limit)) < needed * shortest_clip:
            continue
        edges = np.diff(np.concatenate(([0], at_limit.view(np.int8), [0])))
        starts = np.flatnonzero(edges == 1)
        lengths = np.flatnonzero(edges == -1) - starts
        long_runs = lengths >= shortest_clip
        if int(np.count_nonzero(long_runs)) >= needed:
            share = float(np.median(lengths[long_runs])) / samples_per_cycle
            return side, limit, int(starts[np.argmax(long_runs)]), share
    return None


def _as_input_error(error: ComputationError, data: CaptureData, channel: str) -> InputError:
    return InputError.single(data.source, str(error), line=data.line_of(0), key_path=channel)


def analyse_capture(path: str | Path, channels: Mapping[str, ChannelScaling],
                    voltage_channel: str | None = None, current_channel: str | None = None,
                    time_column: str | None = None) -> CaptureAnalysis:
    """Read, scale and analyse a capture.

    Parameters
    ----------
    path : str or Path
        The CSV file.
    channels : mapping of str to ChannelScaling
        Channels to analyse and their scaling; every non-time column, as recorded in volts,
        when empty. A named voltage or current channel missing here is added unscaled
        (``V`` or ``A``).
    voltage_channel, current_channel : str, optional
        The pair for power and power factor; the fundamental is taken from the voltage.
    time_column : str, optional
        See :func:`read_capture`.

    Returns
    -------
    CaptureAnalysis

    Raises
    ------
    InputError
        For anything :func:`read_capture` rejects, a voltage channel not in V or a current
        channel not in A, fewer than two full cycles, or no detectable fundamental.
    """
    scalings: dict[str, ChannelScaling] = dict(channels)
    for name, unit in ((voltage_channel, "V"), (current_channel, "A")):
        if name is not None and name not in scalings:
            scalings[name] = ChannelScaling(1.0, unit, 0.0, unit)
    data = read_capture(path, list(scalings) or None, time_column)
    if not scalings:
        scalings = {name: ChannelScaling() for name in data.recorded}
    for name, unit, role in ((voltage_channel, "V", "voltage"),
                             (current_channel, "A", "current")):
        if name is not None and scalings[name].unit != unit:
            raise InputError.single(
                data.source, f"channel {name} is scaled to {scalings[name].unit} "
                             f"({scalings[name].text}) but is named as the {role} channel, "
                             f"which must be in {unit}", line=data.header_line, key_path=name)
    signals = {name: scalings[name].apply(data.recorded[name]) for name in data.recorded}
    interval = data.sample_interval
    frequency_channel = voltage_channel or current_channel or next(iter(signals))
    try:
        frequency = fundamental_frequency(signals[frequency_channel], interval).frequency
    except ComputationError as error:
        raise _as_input_error(error, data, frequency_channel) from None

    results = []
    problems = []
    for name, values in signals.items():
        try:
            metrics = waveform_metrics(values, interval, frequency)
            spectrum = harmonic_spectrum(values, interval, frequency)
        except ComputationError as error:
            raise _as_input_error(error, data, name) from None
        clip = _clipping(data.recorded[name], 1.0 / (frequency * interval), metrics.cycles_used)
        if clip:
            side, limit, start, share = clip
            problems.append(Problem(
                data.source, data.line_of(start), data.header.index(name) + 1, name,
                f"warning: {name} stays at its {side} recorded value {limit:.6g} for "
                f"{100 * share:.0f} % of each cycle from this line on: the recorder clipped, "
                f"so true RMS and peak are under-estimated; record again on a wider range"))
        results.append(ChannelAnalysis(name, scalings[name].unit, scalings[name], metrics,
                                       spectrum, clip is not None))

    power = None
    if voltage_channel is not None and current_channel is not None:
        try:
            power = power_quantities(signals[voltage_channel], signals[current_channel],
                                     interval, frequency)
        except ComputationError as error:
            raise _as_input_error(error, data, current_channel) from None

    return CaptureAnalysis(
        source=data.source,
        rows=data.rows,
        time_column=data.time_column,
        sample_interval=interval,
        sample_rate=1.0 / interval,
        duration=data.rows * interval,
        jitter=data.jitter,
        frequency=frequency,
        frequency_channel=frequency_channel,
        channels=tuple(results),
        voltage_channel=voltage_channel,
        current_channel=current_channel,
        power=power,
        warnings=tuple(problems),
        time=data.time,
        signals=signals,
    )


# --------------------------------------------------------------------------- JSON


def _quantity(value: float, unit: str) -> dict[str, Any]:
    return {"value": float(value), "unit": unit}


def _series(values: Sequence[float], unit: str) -> dict[str, Any]:
    return {"values": [float(v) for v in values], "unit": unit}


def _channel_json(item: ChannelAnalysis) -> dict[str, Any]:
    unit = item.unit
    metrics, spectrum = item.metrics, item.spectrum
    factor_unit = "V/V" if unit == "V" else "A/V"
    return {
        "unit": unit,
        "scaling": {"text": item.scaling.text,
                    "factor": _quantity(item.scaling.factor, factor_unit),
                    "offset": _quantity(item.scaling.offset, unit)},
        "cycles_used": _quantity(metrics.cycles_used, "1"),
        "window_duration": _quantity(metrics.window_duration, "s"),
        "rms": _quantity(metrics.rms, unit),
        "dc": _quantity(metrics.dc, unit),
        "ac_rms": _quantity(metrics.ac_rms, unit),
        "rectified_mean": _quantity(metrics.rectified_mean, unit),
        "peak": _quantity(metrics.peak, unit),
        "crest_factor": _quantity(metrics.crest_factor, "1"),
        "form_factor": _quantity(metrics.form_factor, "1"),
        "average_responding_ac": _quantity(metrics.average_responding_ac, unit),
        "average_responding_dc": _quantity(metrics.average_responding_dc, unit),
        "clipped": item.clipped,
        "harmonics": {
            "basis": spectrum.basis,
            "window_cycles": _quantity(spectrum.window_cycles, "1"),
            "window_duration": _quantity(spectrum.window_duration, "s"),
            "windows": _quantity(spectrum.windows, "1"),
            "iec_window": spectrum.iec_window,
            "orders": list(spectrum.orders),
            "magnitude": _series(spectrum.selected, unit),
            "percent_of_fundamental": _series(spectrum.percent_of_fundamental, "%"),
            "thd_f": _quantity(100.0 * spectrum.thd_f, "%"),
            "thd_r": _quantity(100.0 * spectrum.thd_r, "%"),
        },
    }


def capture_to_json(analysis: CaptureAnalysis) -> dict[str, Any]:
    """The analysis as plain data, schema ``acceptance-capture/1``.

    Every number is an object ``{"value": x, "unit": u}`` (``"1"`` for ratios and counts,
    ``"%"`` for percentages); lists of numbers are ``{"values": [...], "unit": u}``.
    Top-level keys: ``schema``, ``source``, ``rows``, ``time_column``, ``sampling``
    (``interval`` s, ``rate`` Hz, ``duration`` s, ``jitter`` 1), ``frequency`` Hz,
    ``frequency_channel``, ``voltage_channel``, ``current_channel``, ``channels`` (name →
    unit, scaling, cycles_used, window_duration, rms, dc, ac_rms, rectified_mean, peak,
    crest_factor, form_factor, average_responding_ac, average_responding_dc, clipped,
    harmonics), ``power`` (null without a voltage–current pair) and ``warnings`` (strings
    ``file:line:column: key: message``).
    """
    power = analysis.power
    return {
        "schema": CAPTURE_SCHEMA,
        "source": analysis.source,
        "rows": _quantity(analysis.rows, "1"),
        "time_column": analysis.time_column,
        "sampling": {
            "interval": _quantity(analysis.sample_interval, "s"),
            "rate": _quantity(analysis.sample_rate, "Hz"),
            "duration": _quantity(analysis.duration, "s"),
            "jitter": _quantity(analysis.jitter, "1"),
        },
        "frequency": _quantity(analysis.frequency, "Hz"),
        "frequency_channel": analysis.frequency_channel,
        "voltage_channel": analysis.voltage_channel,
        "current_channel": analysis.current_channel,
        "channels": {item.name: _channel_json(item) for item in analysis.channels},
        "power": None if power is None else {
            "cycles_used": _quantity(power.cycles_used, "1"),
            "voltage_rms": _quantity(power.voltage_rms, "V"),
            "current_rms": _quantity(power.current_rms, "A"),
            "voltage_fundamental_rms": _quantity(power.voltage_fundamental_rms, "V"),
            "current_fundamental_rms": _quantity(power.current_fundamental_rms, "A"),
            "real_power": _quantity(power.real_power, "W"),
            "apparent_power": _quantity(power.apparent_power, "VA"),
            "power_factor": _quantity(power.power_factor, "1"),
            "fundamental_phase_angle": _quantity(power.fundamental_phase_angle, "°"),
            "displacement_power_factor": _quantity(power.displacement_power_factor, "1"),
            "distortion_factor": _quantity(power.distortion_factor, "1"),
            "fundamental_real_power": _quantity(power.fundamental_real_power, "W"),
            "fundamental_reactive_power": _quantity(power.fundamental_reactive_power, "var"),
        },
        "warnings": [str(problem) for problem in analysis.warnings],
    }
