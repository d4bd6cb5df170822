"""Reference values of a pure sine wave, against which distorted waveforms are judged.

Kept apart from :mod:`acceptance.computations.waveform` (which needs numpy for sampled
arrays) so that the uncertainty and instrument checks can use them without importing numpy.
"""

from __future__ import annotations

import math

__all__ = ["AVERAGE_RESPONDING_SCALE", "SINE_CREST_FACTOR"]

AVERAGE_RESPONDING_SCALE = math.pi / (2.0 * math.sqrt(2.0))
"""π/(2√2) ≈ 1.1107: the form factor of a sine, by which a mean-sensing meter scales mean|x|."""

SINE_CREST_FACTOR = math.sqrt(2.0)
"""Peak ÷ rms of a sine wave (reference values §9) [S]."""
