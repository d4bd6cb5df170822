"""Every rule a checklist can name: its specification joined with its evaluate function.

The one table of rules, built here from the specifications in :mod:`acceptance.rule_specs`
and the evaluate functions of :mod:`.rules` and :mod:`.derived`, listed by name. A rule
without both halves is a programming error and stops the import.
"""

from __future__ import annotations

from ..rule_specs import SPECS
from . import derived, rules
from .rules import Evaluate, Rule

__all__ = ["RULES"]


def _join(*tables: dict[str, Evaluate]) -> dict[str, Rule]:
    evaluators: dict[str, Evaluate] = {}
    for table in tables:
        twice = evaluators.keys() & table.keys()
        if twice:
            raise RuntimeError(f"rules evaluated twice: {', '.join(sorted(twice))}")
        evaluators.update(table)
    if evaluators.keys() != SPECS.keys():
        missing = sorted(SPECS.keys() - evaluators.keys())
        unknown = sorted(evaluators.keys() - SPECS.keys())
        raise RuntimeError(f"rules without an evaluate function: {missing}; "
                           f"evaluate functions without a specification: {unknown}")
    return {name: Rule(spec, evaluators[name]) for name, spec in SPECS.items()}


RULES: dict[str, Rule] = _join(rules.EVALUATORS, derived.EVALUATORS)
