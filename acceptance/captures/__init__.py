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

One module a step: ``scaling`` (probe settings), ``reading`` (CSV to arrays), ``analysis``
(the waveform computations on each channel) and ``to_json`` (the results file's form).
"""

from __future__ import annotations

from .analysis import CaptureAnalysis, ChannelAnalysis, analyse_capture
from .reading import MAX_CAPTURE_BYTES, MAX_CAPTURE_ROWS, CaptureData, read_capture
from .scaling import ChannelScaling, parse_scaling
from .to_json import CAPTURE_SCHEMA, capture_to_json

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
