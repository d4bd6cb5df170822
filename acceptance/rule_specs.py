"""What each checklist rule is called and which parameters it takes.

A checklist names a rule and gives its parameters; loading validates both against
the specifications here when the checklist is read, and evaluation attaches each
rule's evaluate function to its specification (:mod:`acceptance.evaluation.registry`).
This module sits below both, so neither has to import the other for it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from .computations.insulation import WindingInsulationKind
from .units import Dimension, UnitError, parse_quantity, unit_dimension

if TYPE_CHECKING:
    from .model import ChecklistItem

__all__ = ["REFERENCES", "SPECS", "Param", "RuleSpec"]


@dataclass(frozen=True)
class Param:
    kind: str  # "quantity" (item's dimension), "ratio", "reference", "number", "text",
    #            "temperature", "temperature difference", "flag", "checklist item"
    required: bool = True
    choices: tuple[str, ...] = ()


@dataclass(frozen=True)
class RuleSpec:
    name: str
    summary: str
    params: dict[str, Param]
    record: str = "quantity"  # what kind of item it applies to
    groups: tuple[tuple[str, ...], ...] = field(default=())  # at least one of each group

    def validate_params(self, params: dict[str, Any], item: ChecklistItem) -> list[str]:
        problems: list[str] = []
        if item.record != self.record:
            problems.append(f"rule '{self.name}' applies to {self.record} items, "
                            f"but this item records a {item.record}")
            return problems
        for name in params:
            if name not in self.params:
                allowed = ", ".join(self.params) or "none"
                problems.append(f"rule '{self.name}' has no parameter '{name}' "
                                f"(its parameters: {allowed})")
        for name, spec in self.params.items():
            if name not in params:
                if spec.required:
                    problems.append(f"rule '{self.name}' needs parameter '{name}'")
                continue
            problems.extend(_check_param(self.name, name, spec, params[name], item))
        for group in self.groups:
            if not any(name in params for name in group):
                problems.append(f"rule '{self.name}' needs one of: {', '.join(group)}")
        return problems


def _check_param(rule: str, name: str, spec: Param, value: Any,
                 item: ChecklistItem) -> list[str]:
    try:
        if spec.kind == "quantity":
            parse_quantity(value, unit_dimension(item.unit or ""))
        elif spec.kind == "ratio":
            parse_quantity(value, Dimension.RATIO)
        elif spec.kind == "temperature difference":
            parse_quantity(value, Dimension.TEMPERATURE_DIFFERENCE)
        elif spec.kind == "temperature":
            parse_quantity(value, Dimension.TEMPERATURE)
        elif spec.kind == "flag" and not isinstance(value, bool):
            return [f"parameter '{name}' of rule '{rule}' must be true or false"]
        elif spec.kind == "number":
            if isinstance(value, bool) or not isinstance(value, int | float) or value <= 0:
                return [f"parameter '{name}' of rule '{rule}' must be a positive number"]
        elif spec.kind in ("reference", "text", "checklist item") and spec.choices:
            if value not in spec.choices:
                return [f"parameter '{name}' of rule '{rule}' is {value!r}; "
                        f"use one of {', '.join(spec.choices)}"]
    except UnitError as error:
        return [f"parameter '{name}' of rule '{rule}': {error}"]
    return []


# The nameplate values a rule's 'reference' parameter may name: what each is called in a
# record and its dimension.
REFERENCES: dict[str, tuple[str, Dimension]] = {
    "rated_voltage": ("rated voltage", Dimension.VOLTAGE),
    "rated_frequency": ("rated frequency", Dimension.FREQUENCY),
    "rated_current": ("rated current", Dimension.CURRENT),
    "protective_device": ("protective device rating", Dimension.CURRENT),
    "conductor": ("current-carrying capacity of the supply cable", Dimension.CURRENT),
}

_CONSTANTS = ("IEC 60034-1", "IEC 60228", "IEEE 112")
_IEEE_KINDS = tuple(kind.value for kind in WindingInsulationKind)

SPECS: dict[str, RuleSpec] = {spec.name: spec for spec in (
    # generic rules
    RuleSpec("confirmed", "the step was done (yes)", {}, record="confirmation"),
    RuleSpec("at_most", "reading ≤ limit", {"limit": Param("quantity")}),
    RuleSpec("at_least", "reading ≥ limit", {"limit": Param("quantity")}),
    RuleSpec("absence_of_voltage", "no voltage at the isolated point: zero, or a reading "
             "within the limit explained in its note",
             {"limit": Param("quantity", False)}),
    RuleSpec("window", "lower ≤ reading ≤ upper",
             {"lower": Param("quantity"), "upper": Param("quantity")}),
    RuleSpec("relative_to", "reading within a percentage window of a nameplate value",
             {"reference": Param("reference", choices=tuple(REFERENCES)),
              "lower": Param("ratio", False), "upper": Param("ratio", False)},
             groups=(("lower", "upper"),)),
    RuleSpec("current_against", "current ≤ factor × a rating, on the rating's basis",
             {"reference": Param("reference",
                                 choices=("rated_current", "protective_device", "conductor")),
              "factor": Param("number", False)}),
    RuleSpec("winding_resistance", "resistance corrected to the reference temperature within "
             "the nameplate tolerance",
             {"default_tolerance": Param("ratio"),
              "constant": Param("text", False, _CONSTANTS)}),
    RuleSpec("capacitance_tolerance", "capacitance within the nominal's tolerance code", {}),
    RuleSpec("rise_by_resistance", "winding temperature rise by the resistance method within "
             "the limit for its thermal class",
             {"cold_item": Param("checklist item"),
              "standard": Param("text", False, ("IEC 60034-1", "NEMA MG 1")),
              "constant": Param("text", False, _CONSTANTS)}),
    RuleSpec("rise_over_ambient", "surface temperature or its rise within the survey point's "
             "limit", {}),
    # rules on a value derived from the reading and the nameplate
    RuleSpec("stored_energy_discharge", "capacitor discharge to 60 V within the time limit, "
             "with stored energy, charge and the largest bleeder",
             {"limit": Param("quantity", False)}),
    RuleSpec("voltage_unbalance", "three-phase voltage unbalance by both definitions within "
             "the limit (check the last line, L3-L1)",
             {"limit": Param("ratio", False)}),
    RuleSpec("insulation_resistance", "insulation resistance at least the standard's minimum, "
             "as measured (IEC 60204-1, IEC 60364-6) or at 40 °C (IEEE 43)",
             {"standard": Param("text", False, ("IEC 60204-1", "IEC 60364-6", "IEEE 43")),
              "winding_kind": Param("text", False, _IEEE_KINDS),
              "minimum": Param("quantity", False), "reduced_section": Param("flag", False),
              "selv_or_pelv": Param("flag", False),
              "edition": Param("text", False, ("current", "earlier")),
              "halving_interval": Param("temperature difference", False)}),
    RuleSpec("polarization_index", "IR₁₀/IR₁ at least the minimum for the thermal class",
             {"one_minute_item": Param("checklist item")}),
    RuleSpec("absorption_ratio", "IR₆₀ₛ/IR₃₀ₛ recorded with its trade-practice band",
             {"one_minute_item": Param("checklist item")}),
    RuleSpec("bonding_resistance", "bonding resistance within a margin of the value expected "
             "from length, cross-section and material",
             {"margin": Param("ratio", False)}),
    RuleSpec("cable_voltage_drop", "supply cable voltage drop at the measured current within "
             "the recommended limit",
             {"limit": Param("ratio", False),
              "conductor_temperature": Param("temperature", False)}),
    RuleSpec("source_impedance", "source impedance from the no-load to under-load sag "
             "(recorded)",
             {"no_load_item": Param("checklist item"), "current_item": Param("checklist item")}),
    RuleSpec("intermittent_duty", "equivalent thermal current at the duty cycle within the "
             "protective device and the conductor", {}),
)}
