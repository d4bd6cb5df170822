"""Verdicts, visit states, change classes and severities: each one's word and mark.

The one definition the terminal (``check``, ``compare``), the pages, the PDF records and the
index filters read. Kept apart from :mod:`acceptance.results` so that ``check``, reprinting
cached sections, loads only this.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from enum import Enum
from typing import Any

__all__ = ["ChangeClass", "DeficiencyState", "Severity", "Verdict", "VisitState",
           "count_states", "worst"]


class _Shown(str, Enum):
    """A value shown as a word and a mark (the shape before the word), so a record reads in
    grey-scale print and for readers who do not tell colours apart (never colour alone)."""

    @property
    def slug(self) -> str:
        return self.value.replace(" ", "-")

    @property
    def word(self) -> str:
        return self.value

    @property
    def mark(self) -> str:
        # One table per kind: str-valued members of two kinds compare equal ('pass').
        return _MARKS[type(self)][self]


class Verdict(_Shown):
    """Outcome of one check or item. Conditional statements follow ILAC-G8:09/2019 cl. 4.2."""

    PASS = "pass"
    CONDITIONAL_PASS = "conditional pass"
    CONDITIONAL_FAIL = "conditional fail"
    FAIL = "fail"
    UNDETERMINED = "undetermined"  # the data cannot decide (e.g. no nameplate value)
    NOT_TESTED = "not tested"
    NOT_APPLICABLE = "not applicable"
    RECORDED = "recorded"  # value kept for the record; no criterion applies

    @property
    def is_failure(self) -> bool:
        return self in (Verdict.FAIL, Verdict.CONDITIONAL_FAIL)

    @property
    def is_open(self) -> bool:
        """Needs someone's attention before the item can be closed."""
        return self in (Verdict.FAIL, Verdict.CONDITIONAL_FAIL, Verdict.UNDETERMINED,
                        Verdict.NOT_TESTED, Verdict.CONDITIONAL_PASS)



# Each verdict has a word and a shape, so a record reads in grey-scale print and for readers
# who do not tell colours apart (never colour alone). A conditional statement is the plain
# verdict's shape with a question mark: the decision sits inside the guard band (ILAC-G8).
_VERDICT_MARKS: dict[Verdict, str] = {
    Verdict.PASS: "✓",
    Verdict.CONDITIONAL_PASS: "✓?",
    Verdict.CONDITIONAL_FAIL: "✗?",
    Verdict.FAIL: "✗",
    Verdict.UNDETERMINED: "?",
    Verdict.NOT_TESTED: "○",
    Verdict.NOT_APPLICABLE: "–",
    Verdict.RECORDED: "·",
}

# Worst first: a list of verdicts rolls up to the earliest that occurs.
_ORDER = [Verdict.FAIL, Verdict.CONDITIONAL_FAIL, Verdict.UNDETERMINED, Verdict.NOT_TESTED,
          Verdict.CONDITIONAL_PASS, Verdict.PASS, Verdict.RECORDED, Verdict.NOT_APPLICABLE]


def worst(verdicts: list[Verdict], empty: Verdict = Verdict.NOT_APPLICABLE) -> Verdict:
    if not verdicts:
        return empty
    return min(verdicts, key=_ORDER.index)


class VisitState(_Shown):
    """A visit as a whole."""

    PASS = "pass"
    PASS_WITH_DEFICIENCIES = "pass with deficiencies"
    INCOMPLETE = "incomplete"
    FAIL = "fail"



_STATE_MARKS: dict[VisitState, str] = {
    VisitState.PASS: "✓",
    VisitState.PASS_WITH_DEFICIENCIES: "!",
    VisitState.INCOMPLETE: "○",
    VisitState.FAIL: "✗",
}


def count_states(states: Iterable[VisitState]) -> tuple[tuple[VisitState, int], ...]:
    """How many visits are in each state, every state in its order (zeros included)."""
    listed = list(states)
    return tuple((state, listed.count(state)) for state in VisitState)


class Severity(str, Enum):
    """How much an open point weighs on handover."""

    SAFETY_CRITICAL = "safety-critical"  # a safety-critical item failed
    BLOCKS_ACCEPTANCE = "blocks acceptance"  # a failure, or a required item still open
    ADVISORY = "advisory"  # open, but neither required nor failed


class ChangeClass(_Shown):
    """How far a value has moved from the baseline, against the item's thresholds."""

    STEADY = "steady"
    WATCH = "watch"
    ACT = "act"
    NOT_COMPARABLE = "not comparable"
    # Only for a part replaced: the value moved back inside its limit or toward its nominal.
    REPAIRED = "repaired"



# Hollow, then filled, as a change grows: distinct in grey-scale and beside its word.
_CHANGE_MARKS: dict[ChangeClass, str] = {
    ChangeClass.STEADY: "=",
    ChangeClass.WATCH: "△",
    ChangeClass.ACT: "▲",
    ChangeClass.NOT_COMPARABLE: "?",
    ChangeClass.REPAIRED: "+",
}


class DeficiencyState(_Shown):
    """Where a deficiency stands on the punch list, followed over the machine's visits."""

    OPEN = "open"  # raised and neither re-tested as a pass nor accepted
    ACCEPTED = "accepted"  # open, but accepted by the client as an exception (a concession)
    CLOSED = "closed"  # a later pass of the same item and point, as found or as left

    @property
    def word(self) -> str:
        return "accepted exception" if self is DeficiencyState.ACCEPTED else self.value


# Open first, then accepted, then closed: the order of the punch list.
_DEFICIENCY_MARKS: dict[DeficiencyState, str] = {
    DeficiencyState.OPEN: "☐",
    DeficiencyState.ACCEPTED: "◩",
    DeficiencyState.CLOSED: "☑",
}

_MARKS: dict[type[_Shown], Mapping[Any, str]] = {
    Verdict: _VERDICT_MARKS, VisitState: _STATE_MARKS, ChangeClass: _CHANGE_MARKS,
    DeficiencyState: _DEFICIENCY_MARKS,
}
