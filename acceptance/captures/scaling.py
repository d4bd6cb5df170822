"""Probe scaling of a capture channel: a voltage ratio, a current sensitivity or a unit."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

_NUMBER = r"[0-9]+(?:\.[0-9]*)?(?:[eE][-+]?[0-9]+)?|\.[0-9]+(?:[eE][-+]?[0-9]+)?"
_RATIO = re.compile(rf"^\s*(?:[x×*]\s*({_NUMBER})|({_NUMBER})\s*[x×]|({_NUMBER})\s*:\s*1)\s*$",
                    re.IGNORECASE)
_SENSITIVITY = re.compile(
    rf"^\s*({_NUMBER})\s*(µV|μV|uV|mV|V)\s*(?:/|per)\s*({_NUMBER})?\s*(mA|A|kA)\s*$",
    re.IGNORECASE)
_VOLT_PREFIX = {"µv": 1e-6, "μv": 1e-6, "uv": 1e-6, "mv": 1e-3, "v": 1.0}
_AMP_PREFIX = {"ma": 1e-3, "a": 1.0, "ka": 1e3}


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
