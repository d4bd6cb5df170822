"""Decision rules (ILAC-G8:09/2019) and conformance probability (JCGM 106:2012)."""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

from .._errors import ComputationError
from ._format import (
    _format_number,
    _format_significant,
    _require_finite,
    _require_non_negative,
    _require_positive,
    _with_unit,
)

# --------------------------------------------------------------------------------------------
# Decision rules


class DecisionRule(StrEnum):
    """How a reading's uncertainty enters the verdict (ILAC-G8:09/2019 clause 4.2).

    ``SIMPLE``: simple acceptance, guard band w = 0, binary (pass / fail),
    clause 4.2.1 [S]. ``GUARDED``: guarded acceptance, w = U, reported as the
    non-binary statement of clause 4.2.3 (pass / conditional pass / conditional
    fail / fail) [S]; only *pass* is an acceptance, which is the binary
    statement with guard band of clause 4.2.2 [S].
    """

    SIMPLE = "simple acceptance"
    GUARDED = "guarded acceptance"


class Statement(StrEnum):
    """Statement of conformity (ILAC-G8:09/2019 clause 4.2) [S]."""

    PASS = "pass"
    CONDITIONAL_PASS = "conditional pass"
    CONDITIONAL_FAIL = "conditional fail"
    FAIL = "fail"


@dataclass(frozen=True)
class Decision:
    """Verdict on one reading against a tolerance.

    Parameters
    ----------
    statement : Statement
        Pass, conditional pass, conditional fail or fail.
    rule : DecisionRule
        The decision rule applied.
    accepted : bool
        True only for ``Statement.PASS``. [unitless]
    reading : float
        [reading unit]
    expanded_uncertainty : float
        U of the reading. [reading unit]
    lower_limit, upper_limit : float or None
        Tolerance limits TL; ``None`` for the open side. [reading unit]
    acceptance_lower, acceptance_upper : float or None
        Acceptance limits AL = TL ∓ w. [reading unit]
    guard_band : float
        w: 0 for simple acceptance, U for guarded acceptance. [reading unit]
    description : str
        One phrase, e.g. ``"pass: 230.4 V meets 207 V to 253 V (simple acceptance)"``.
    """

    statement: Statement
    rule: DecisionRule
    accepted: bool
    reading: float
    expanded_uncertainty: float
    lower_limit: float | None
    upper_limit: float | None
    acceptance_lower: float | None
    acceptance_upper: float | None
    guard_band: float
    description: str


def _limits_phrase(lower: float | None, upper: float | None, unit: str) -> str:
    if lower is not None and upper is not None:
        lower_text = _with_unit(_format_number(lower), unit)
        return f"{lower_text} to {_with_unit(_format_number(upper), unit)}"
    if upper is not None:
        return f"at most {_with_unit(_format_number(upper), unit)}"
    if lower is not None:
        return f"at least {_with_unit(_format_number(lower), unit)}"
    raise ComputationError("lower_limit and upper_limit are both missing; give at least one")


def decide_conformity(
    reading: float,
    *,
    lower_limit: float | None = None,
    upper_limit: float | None = None,
    expanded_uncertainty: float = 0.0,
    rule: DecisionRule = DecisionRule.SIMPLE,
    unit: str = "",
) -> Decision:
    """State whether a reading conforms to a one- or two-sided tolerance.

    Parameters
    ----------
    reading : float
        Measured value y. [reading unit]
    lower_limit : float, optional
        Lower tolerance limit T_L (reading ≥ T_L); omit for an upper limit only. [reading unit]
    upper_limit : float, optional
        Upper tolerance limit T_U (reading ≤ T_U); omit for a lower limit only. [reading unit]
    expanded_uncertainty : float, optional
        U of the reading; the guard band under guarded acceptance. [reading unit]
    rule : DecisionRule, optional
        Simple (default) or guarded acceptance.
    unit : str, optional
        Unit written in the description. [unitless]

    Returns
    -------
    Decision

    Notes
    -----
    Tolerance limits are inclusive: a reading equal to a limit is inside.

    Simple acceptance (w = 0) is binary: pass when T_L ≤ y ≤ T_U, else fail.

    Guarded acceptance (w = U) is non-binary. With the margin m = min(y − T_L,
    T_U − y) taken over the limits present:

    - pass: m > U (inside the acceptance limits A_L = T_L + U, A_U = T_U − U);
    - conditional pass: 0 ≤ m ≤ U;
    - conditional fail: −U ≤ m < 0;
    - fail: m < −U.

    The intervals of ILAC-G8 clause 4.2.3 are closed, [T_U − w, T_U] and
    [T_U, T_U + w]; a reading exactly on an acceptance limit is therefore a
    conditional pass, and one exactly at T_U + U a conditional fail — the less
    favourable reading of each shared boundary, except at T_U itself, which stays
    inside as under simple acceptance. A window narrower than 2U has no pass zone.

    References
    ----------
    .. [1] ILAC-G8:09/2019, Guidelines on Decision Rules and Statements of
       Conformity, clause 4.2.1 (simple acceptance, Figure 3), clause 4.2.2
       (binary statement with guard band, Figure 4), clause 4.2.3 (non-binary
       statement with guard band, Figure 5) [S].
    """
    _require_finite("reading", reading)
    _require_non_negative("expanded_uncertainty", expanded_uncertainty)
    if lower_limit is None and upper_limit is None:
        raise ComputationError("lower_limit and upper_limit are both missing; give at least one")
    if lower_limit is not None:
        _require_finite("lower_limit", lower_limit)
    if upper_limit is not None:
        _require_finite("upper_limit", upper_limit)
    if lower_limit is not None and upper_limit is not None and lower_limit > upper_limit:
        raise ComputationError(
            f"lower_limit {_format_number(lower_limit)} is above upper_limit "
            f"{_format_number(upper_limit)}; the lower limit must not exceed the upper"
        )
    rule = DecisionRule(rule)

    margins: list[tuple[float, str, float]] = []
    if lower_limit is not None:
        margins.append((reading - lower_limit, "lower", lower_limit))
    if upper_limit is not None:
        margins.append((upper_limit - reading, "upper", upper_limit))
    margin, side, nearest_limit = min(margins, key=lambda item: item[0])

    guard_band = expanded_uncertainty if rule is DecisionRule.GUARDED else 0.0
    uncertainty_text = _with_unit(_format_significant(expanded_uncertainty), unit)
    reading_text = _with_unit(_format_number(reading), unit)
    limits_text = _limits_phrase(lower_limit, upper_limit, unit)
    limit_text = _with_unit(_format_number(nearest_limit), unit)
    direction = "below" if side == "lower" else "above"
    rule_text = f"({rule.value})"

    if rule is DecisionRule.SIMPLE:
        if margin >= 0:
            statement = Statement.PASS
            description = f"pass: {reading_text} meets {limits_text} {rule_text}"
        else:
            statement = Statement.FAIL
            description = (
                f"fail: {reading_text} is {direction} the {side} limit {limit_text} {rule_text}"
            )
    elif margin > guard_band:
        statement = Statement.PASS
        description = (
            f"pass: {reading_text} meets {limits_text} with a margin of more than"
            f" U = {uncertainty_text} {rule_text}"
        )
    elif margin >= 0:
        statement = Statement.CONDITIONAL_PASS
        near_both = len(margins) == 2 and max(item[0] for item in margins) <= guard_band
        which = "both limits" if near_both else f"the {side} limit"
        description = (
            f"conditional pass: {reading_text} meets {limits_text} but lies within"
            f" U = {uncertainty_text} of {which} {rule_text}"
        )
    elif margin >= -guard_band:
        statement = Statement.CONDITIONAL_FAIL
        description = (
            f"conditional fail: {reading_text} is {direction} the {side} limit {limit_text}"
            f" by no more than U = {uncertainty_text} {rule_text}"
        )
    else:
        statement = Statement.FAIL
        description = (
            f"fail: {reading_text} is {direction} the {side} limit {limit_text}"
            f" by more than U = {uncertainty_text} {rule_text}"
        )

    return Decision(
        statement=statement,
        rule=rule,
        accepted=statement is Statement.PASS,
        reading=reading,
        expanded_uncertainty=expanded_uncertainty,
        lower_limit=None if lower_limit is None else float(lower_limit),
        upper_limit=None if upper_limit is None else float(upper_limit),
        acceptance_lower=None if lower_limit is None else lower_limit + guard_band,
        acceptance_upper=None if upper_limit is None else upper_limit - guard_band,
        guard_band=guard_band,
        description=description,
    )


def _standard_normal_cdf(z: float) -> float:
    return 0.5 * (1.0 + math.erf(z / math.sqrt(2.0)))


def conformance_probability(
    reading: float,
    standard_uncertainty: float,
    lower_limit: float | None = None,
    upper_limit: float | None = None,
) -> float:
    """Probability that the measurand lies inside the tolerance, for a normal PDF.

    Parameters
    ----------
    reading : float
        Best estimate y. [reading unit]
    standard_uncertainty : float
        u(y), greater than zero. [reading unit]
    lower_limit : float, optional
        T_L. [reading unit]
    upper_limit : float, optional
        T_U. [reading unit]

    Returns
    -------
    float
        p_c in [0, 1]. [unitless]

    Notes
    -----
    Two-sided: p_c = Φ((T_U − y)/u) − Φ((T_L − y)/u).
    Upper limit only: p_c = Φ((T_U − y)/u). Lower limit only: p_c = 1 − Φ((T_L − y)/u).
    Φ(z) = ½ (1 + erf(z/√2)).

    References
    ----------
    .. [1] JCGM 106:2012, Evaluation of measurement data — The role of
       measurement uncertainty in conformity assessment, clause 7.3 (normal PDFs,
       one- and two-sided tolerance intervals) [M].
    """
    _require_finite("reading", reading)
    _require_positive("standard_uncertainty", standard_uncertainty)
    if lower_limit is None and upper_limit is None:
        raise ComputationError("lower_limit and upper_limit are both missing; give at least one")
    if lower_limit is not None and upper_limit is not None and lower_limit > upper_limit:
        raise ComputationError(
            f"lower_limit {_format_number(lower_limit)} is above upper_limit "
            f"{_format_number(upper_limit)}; the lower limit must not exceed the upper"
        )
    upper_part = (
        1.0
        if upper_limit is None
        else _standard_normal_cdf((upper_limit - reading) / standard_uncertainty)
    )
    lower_part = (
        0.0
        if lower_limit is None
        else _standard_normal_cdf((lower_limit - reading) / standard_uncertainty)
    )
    return min(max(upper_part - lower_part, 0.0), 1.0)
