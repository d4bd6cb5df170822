"""Uncertainty budgets from specification limits and resolution (JCGM 100:2008)."""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass
from enum import StrEnum

from .._errors import ComputationError
from ._format import _require_non_negative, _require_positive
from .specification import AccuracySpec

# --------------------------------------------------------------------------------------------
# Uncertainty budget


class Distribution(StrEnum):
    """Probability distribution assumed for an input quantity (JCGM 100:2008 clause 4.3)."""

    RECTANGULAR = "rectangular"
    TRIANGULAR = "triangular"
    NORMAL = "normal"


@dataclass(frozen=True)
class UncertaintyContribution:
    """One line of an uncertainty budget.

    Parameters
    ----------
    name : str
        What the contribution is, e.g. ``"instrument specification ±1 % of range"``.
    half_width : float
        Half-width a of the limits, or the expanded uncertainty quoted for a normal
        distribution. [reading unit]
    distribution : Distribution
        Assumed distribution.
    divisor : float
        half_width / divisor = standard uncertainty (√3 rectangular, √6 triangular,
        the quoted coverage factor for normal). [unitless]
    standard_uncertainty : float
        u(x_i). [reading unit]
    """

    name: str
    half_width: float
    distribution: Distribution
    divisor: float
    standard_uncertainty: float


@dataclass(frozen=True)
class UncertaintyBudget:
    """Contributions, their combination and the expanded uncertainty.

    Parameters
    ----------
    contributions : tuple of UncertaintyContribution
        Every input, in the order given.
    combined_standard_uncertainty : float
        u_c. [reading unit]
    coverage_factor : float
        k. [unitless]
    expanded_uncertainty : float
        U = k · u_c. [reading unit]
    """

    contributions: tuple[UncertaintyContribution, ...]
    combined_standard_uncertainty: float
    coverage_factor: float
    expanded_uncertainty: float


def rectangular_contribution(name: str, half_width: float) -> UncertaintyContribution:
    """Standard uncertainty of a quantity known only to lie within ±a.

    Parameters
    ----------
    name : str
        Label of the contribution.
    half_width : float
        a. [reading unit]

    Returns
    -------
    UncertaintyContribution

    Notes
    -----
    u = a / √3

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 4.3.7, equation (7) [S].
    """
    _require_non_negative("half_width", half_width)
    divisor = math.sqrt(3.0)
    return UncertaintyContribution(
        name, half_width, Distribution.RECTANGULAR, divisor, half_width / divisor
    )


def resolution_contribution(
    resolution: float, name: str = "display resolution"
) -> UncertaintyContribution:
    """Standard uncertainty from the resolution of a digital indication.

    Parameters
    ----------
    resolution : float
        δx, the value of one count of the least significant digit. [reading unit]
    name : str, optional
        Label of the contribution.

    Returns
    -------
    UncertaintyContribution
        Half-width δx/2, rectangular.

    Notes
    -----
    u = (δx / 2) / √3 = δx / (2√3) ≈ 0.29 δx

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause F.2.2.1 [S].
    """
    _require_positive("resolution", resolution)
    half_width = resolution / 2.0
    divisor = math.sqrt(3.0)
    return UncertaintyContribution(
        name, half_width, Distribution.RECTANGULAR, divisor, half_width / divisor
    )


def normal_contribution(
    name: str, quoted_uncertainty: float, coverage_factor: float
) -> UncertaintyContribution:
    """Standard uncertainty from an uncertainty quoted with a coverage factor.

    Parameters
    ----------
    name : str
        Label, e.g. ``"calibration certificate"``.
    quoted_uncertainty : float
        The expanded uncertainty as quoted, e.g. on a calibration certificate. [reading unit]
    coverage_factor : float
        The coverage factor it was quoted with. [unitless]

    Returns
    -------
    UncertaintyContribution

    Notes
    -----
    u = U_quoted / k

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 4.3.3 [S].
    """
    _require_non_negative("quoted_uncertainty", quoted_uncertainty)
    _require_positive("coverage_factor", coverage_factor)
    return UncertaintyContribution(
        name,
        quoted_uncertainty,
        Distribution.NORMAL,
        coverage_factor,
        quoted_uncertainty / coverage_factor,
    )


def expanded_uncertainty(standard_uncertainty: float, coverage_factor: float = 2.0) -> float:
    """Expanded uncertainty from a combined standard uncertainty.

    Parameters
    ----------
    standard_uncertainty : float
        u_c. [reading unit]
    coverage_factor : float, optional
        k; 2 gives a coverage probability of about 95 % for a normal distribution. [unitless]

    Returns
    -------
    float
        U. [reading unit]

    Notes
    -----
    U = k · u_c

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clauses 6.2.1 and 6.3.3 [S].
    """
    _require_non_negative("standard_uncertainty", standard_uncertainty)
    _require_positive("coverage_factor", coverage_factor)
    return coverage_factor * standard_uncertainty


def combine_contributions(
    contributions: Iterable[UncertaintyContribution], coverage_factor: float = 2.0
) -> UncertaintyBudget:
    """Combine uncorrelated contributions in quadrature and expand.

    Parameters
    ----------
    contributions : iterable of UncertaintyContribution
        At least one; each with sensitivity coefficient 1 (a direct reading).
    coverage_factor : float, optional
        k. [unitless]

    Returns
    -------
    UncertaintyBudget

    Notes
    -----
    u_c = √(Σ u_i²),  U = k · u_c

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 5.1.2, equation (10), uncorrelated inputs [S].
    .. [2] JCGM 100:2008 (GUM), clauses 6.2.1 and 6.3.3 [S].
    """
    items = tuple(contributions)
    if not items:
        raise ComputationError("contributions is empty; an uncertainty budget needs at least one")
    combined = math.sqrt(math.fsum(item.standard_uncertainty**2 for item in items))
    return UncertaintyBudget(
        items, combined, coverage_factor, expanded_uncertainty(combined, coverage_factor)
    )


def instrument_uncertainty(
    reading: float,
    specification: AccuracySpec,
    resolution: float | None = None,
    range_full_scale: float | None = None,
    coverage_factor: float = 2.0,
    include_resolution: bool | None = None,
    reading_unit: str | None = None,
) -> UncertaintyBudget:
    """Uncertainty budget of a single reading from the instrument's specification.

    Parameters
    ----------
    reading : float
        The displayed value. [reading unit]
    specification : AccuracySpec
        The accuracy for the function and range used.
    resolution : float, optional
        Value of one count on the range used. [reading unit]
    range_full_scale : float, optional
        Full-scale value of the range used. [reading unit]
    coverage_factor : float, optional
        k. [unitless]
    include_resolution : bool, optional
        Whether to add the resolution contribution. ``None`` (default) adds it
        only when the specification has no digits term and a resolution is
        given: a digits term already bounds the display's quantisation, so
        counting it again would double it [P]. The example of reference values §11
        follows this (U = 1.561 V, not 1.562 V).
    reading_unit : str, optional
        Checked against the specification's fixed-term unit. [unitless]

    Returns
    -------
    UncertaintyBudget

    Notes
    -----
    a = specification.limit(reading, resolution, range_full_scale);
    u_spec = a/√3; u_res = δx/(2√3); u_c = √(u_spec² + u_res²); U = k·u_c.

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clauses 4.3.7, F.2.2.1, 5.1.2, 6.2.1, 6.3.3 [S].
    """
    half_width = specification.limit(reading, resolution, range_full_scale, reading_unit)
    contributions = [
        rectangular_contribution(f"instrument specification {specification.describe()}", half_width)
    ]
    if include_resolution is None:
        include_resolution = resolution is not None and specification.digits == 0
    if include_resolution:
        if resolution is None:
            raise ComputationError(
                "resolution is missing; include_resolution is True, so the value of one count"
                " on the range used is needed"
            )
        contributions.append(resolution_contribution(resolution))
    return combine_contributions(contributions, coverage_factor)
