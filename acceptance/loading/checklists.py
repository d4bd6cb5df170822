"""Built-in and job checklists: loaded, their rules and comparisons checked."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from ..errors import Problem
from ..model import (
    Checklist,
)
from ..resources import checklists_dir
from ..rule_specs import SPECS
from ..units import Dimension, UnitError, parse_quantity
from ..yamlfile import Document, KeyPath
from .loaded import LoadedChecklist, _suggest, unit_dimension
from .validation import _display, _load_document, _validate

# ------------------------------------------------------------------ checklists


def _load_checklists(root: Path, problems: list[Problem]) -> dict[str, LoadedChecklist]:
    result: dict[str, LoadedChecklist] = {}
    sources = [(p, "built-in") for p in sorted(checklists_dir().glob("*.yaml"))]
    local = root / "checklists"
    if local.is_dir():
        sources += [(p, _display(p, root)) for p in sorted(local.glob("*.yaml"))]
    for path, origin in sources:
        document = (_load_document(path, path.parent, problems, "built-in checklists folder")
                    if origin == "built-in" else _load_document(path, root, problems))
        if document is None:
            continue
        model = _validate(Checklist, document, problems)
        if model is None:
            continue
        seen: set[str] = set()
        for index, item in enumerate(model.items):
            if item.id in seen:
                problems.append(document.problem(("items", index, "id"),
                                                 f"item id '{item.id}' is used twice; give "
                                                 "each item its own id"))
            seen.add(item.id)
            if item.record == "quantity":
                if not item.unit:
                    problems.append(document.problem(("items", index),
                                                     "a quantity item needs a 'unit', e.g. "
                                                     "unit: V"))
                else:
                    try:
                        unit_dimension(item.unit)
                    except UnitError as error:
                        problems.append(document.problem(("items", index, "unit"), str(error)))
            for name, unit in item.also_record.items():
                try:
                    unit_dimension(unit)
                except UnitError as error:
                    problems.append(
                        document.problem(("items", index, "also_record", name), str(error)))
        _check_rules(model, document, problems)
        earlier = result.get(model.checklist)
        if earlier is not None and earlier.origin != "built-in":
            # A job checklist may replace a built-in one of the same id (a local version);
            # two of the job's own with one id would leave it to file order which one counts.
            problems.append(document.problem(
                ("checklist",), f"checklist id '{model.checklist}' is already used by "
                                f"{earlier.origin}; give each checklist its own id"))
            continue
        result[model.checklist] = LoadedChecklist(model, document, origin)
    for loaded in result.values():
        _check_compare_specs(loaded, result, problems)
    return result


def _voltage_item_problem(key: str, checklists: dict[str, LoadedChecklist]) -> str | None:
    """Why ``key`` cannot name the supply voltage a current is normalised to, or None."""
    checklist_id, _, item_id = key.partition(".")
    loaded = checklists.get(checklist_id)
    target = loaded.item(item_id) if loaded else None
    if target is None:
        known = [f"{c}.{i.id}" for c, lc in checklists.items() for i in lc.model.items
                 if i.unit and _is_voltage(i.unit)]
        return f"no checklist item '{key}'{_suggest(key, known)}"
    if not (target.unit and _is_voltage(target.unit)):
        return f"'{key}' does not record a voltage"
    return None


def _is_voltage(unit: str) -> bool:
    try:
        return unit_dimension(unit) is Dimension.VOLTAGE
    except UnitError:
        return False


def _check_compare_specs(loaded: LoadedChecklist, checklists: dict[str, LoadedChecklist],
                         problems: list[Problem]) -> None:
    for index, item in enumerate(loaded.model.items):
        spec = item.compare
        if spec is None:
            continue
        path: KeyPath = ("items", index, "compare")
        if item.record != "quantity":
            problems.append(loaded.document.problem(
                path, "only a quantity item can be compared between visits"))
            continue
        if spec.check is not None and spec.check not in [c.id for c in item.checks]:
            problems.append(loaded.document.problem(
                (*path, "check"), f"item '{item.id}' has no check '{spec.check}'"
                                  f"{_suggest(spec.check, [c.id for c in item.checks])}"))
        if spec.quantity == "corrected" and not item.checks:
            problems.append(loaded.document.problem(
                (*path, "quantity"), "'corrected' needs a check that computes the value; "
                                     "use quantity: reading"))
        if spec.quantity == "reading" and spec.watch.dimension is not Dimension.RATIO:
            try:
                dimension = unit_dimension(item.unit or "")
            except UnitError:
                dimension = None
            allowed = (Dimension.TEMPERATURE_DIFFERENCE if dimension is Dimension.TEMPERATURE
                       else dimension)
            if spec.watch.dimension is not allowed:
                problems.append(loaded.document.problem(
                    (*path, "watch"), f"a change of this reading is a percentage or a "
                                      f"{allowed.value if allowed else 'quantity'}, not "
                                      f"{spec.watch.text!r}"))
        if spec.normalise_to_voltage is not None:
            message = _voltage_item_problem(spec.normalise_to_voltage, checklists)
            if message:
                problems.append(loaded.document.problem((*path, "normalise_to_voltage"),
                                                        message))


def _check_rules(model: Checklist, document: Document, problems: list[Problem]) -> None:
    for index, item in enumerate(model.items):
        for check_index, check in enumerate(item.checks):
            rule = SPECS.get(check.rule)
            path: KeyPath = ("items", index, "checks", check_index)
            if rule is None:
                problems.append(document.problem(
                    (*path, "rule"),
                    f"unknown rule '{check.rule}'{_suggest(check.rule, sorted(SPECS))}"))
                continue
            for message in [*rule.validate_params(check.params, item),
                            *_bounds_order(check.params)]:
                problems.append(document.problem((*path, "params"), message))
            fixed = _FIXED_ELEMENTS.get(item.per)
            if check.element is not None and fixed is not None and check.element not in fixed:
                problems.append(document.problem(
                    (*path, "element"),
                    f"'{check.element}' is not a {item.per.replace('_', ' ')}"
                    f"{_suggest(check.element, list(fixed))}"))


def _bounds_order(params: dict[str, Any]) -> list[str]:
    """A window whose lower bound lies above its upper bound passes nothing; say so."""
    if "lower" not in params or "upper" not in params:
        return []
    try:
        lower = parse_quantity(params["lower"], *Dimension)
        upper = parse_quantity(params["upper"], *Dimension)
    except UnitError:
        return []  # reported by the rule's own parameter checks
    if lower.dimension is upper.dimension and lower.value > upper.value:
        return [f"lower ({lower.text}) is above upper ({upper.text}); swap them"]
    return []


# Element names that do not depend on the machine, for checking a check's 'element'.
_FIXED_ELEMENTS: dict[str, tuple[str, ...]] = {
    "single": (),
    "line": ("L1-L2", "L2-L3", "L3-L1", "L-N"),
    "phase": ("L1", "L2", "L3", "L"),
    "isolation_point": ("L1-L2", "L2-L3", "L3-L1", "L1-PE", "L2-PE", "L3-PE", "N-PE", "L-N",
                        "L-PE"),
}
