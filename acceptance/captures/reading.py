"""Reading a capture CSV into scaled arrays, every problem named with its line."""

from __future__ import annotations

import codecs
import difflib
import math
import re
import warnings
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from ..errors import InputError, Problem

#: A capture is read whole into memory (8 bytes per sample and column, twice over while
#: scaling): 200 MiB of CSV is about ten million rows of three columns, beyond any record
#: a commissioning check needs (a few cycles are plotted; a few seconds are analysed).
MAX_CAPTURE_BYTES = 200 * 1024 * 1024
MAX_CAPTURE_ROWS = 5_000_000

# Problems past this many are summarised in one line; a file with a systematic fault
# would otherwise bury the first, most useful messages.
_MAXIMUM_PROBLEMS = 20
# Sampling intervals further than this share from the mean interval mean missing samples or
# a changed time base, not timing jitter [P].
_INTERVAL_TOLERANCE = 0.5

_TIME_NAMES = re.compile(r"^\s*(time|t|zeit|temps|tiempo|x)\b", re.IGNORECASE)
_TIME_UNIT = re.compile(r"(?:^|[\s_(\[/])(s|ms|us|µs|μs|ns)[)\]]?\s*$", re.IGNORECASE)
_TIME_SCALE = {"s": 1.0, "ms": 1e-3, "us": 1e-6, "µs": 1e-6, "μs": 1e-6, "ns": 1e-9}


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
