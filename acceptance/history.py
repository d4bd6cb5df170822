"""A machine's visits compared with its baseline: like for like, classed steady, watch or act.

The commissioning record is the reference later re-tests are measured against. Here,
pure functions of evaluated results (no I/O) pick the baseline, take from each visit the
value an item's ``compare`` block names — the reading itself, or the value its check
computed (a resistance corrected to the reference temperature, an insulation resistance
corrected to 40 °C, a temperature rise) — bring both values onto one footing, and class the
change against the item's thresholds.

Like for like means:

- temperature-dependent values are compared after correction (``quantity: corrected``);
- readings of different bases (RMS, average-responding, d.c.) are converted with a capture of
  the same visit, and said so, or the change is *not comparable* with the reason;
- a current is scaled to the baseline's supply voltage only where the item (or the machine
  file, for its own load) asks for it, because only a resistive or constant-impedance load
  draws a current proportional to the voltage (I × U_baseline / U_visit); an induction motor
  at constant load draws *more* current at a lower voltage, so its current is not scaled.

Where a visit holds as-found and as-left readings, the as-left value is what later visits
are compared with.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Iterable
from dataclasses import dataclass, replace

from .results import (
    Change,
    ChangeClass,
    CompareRule,
    ElementResult,
    ItemResult,
    MachineResult,
    PartReplacement,
    TrendPoint,
    TrendSeries,
    TrendTrace,
    VisitResult,
)
from .units import Dimension, UnitError, format_value, parse_quantity

__all__ = [
    "COMPARISON_SCHEMA",
    "CompareRule",
    "TrendPoint",
    "TrendSeries",
    "TrendTrace",
    "VisitComparison",
    "classify_change",
    "compare_rule",
    "compare_visits",
    "visit_comparison",
    "comparison_to_json",
    "effective_element",
    "part_behaviour",
    "relative_change",
    "select_baseline",
    "trend_series",
]

COMPARISON_SCHEMA = "acceptance-comparison/1"

_MINUS = "\u2212"
_BASIS_PHRASE = {"rms": "RMS", "average": "average-responding", "dc": "d.c.", "peak": "peak"}
# Relative slack on the thresholds: a change written exactly on a threshold reaches it.
_SLACK = 1e-9


def compare_rule(spec: object, adjustment: object | None = None) -> CompareRule:
    """Resolve a checklist item's ``compare`` block and a machine's adjustment of it.

    Parameters
    ----------
    spec : acceptance.model.CompareSpec
        The checklist's comparison.
    adjustment : acceptance.model.CompareAdjustment, optional
        The machine file's change to it, for its own load.
    """
    watch = getattr(adjustment, "watch", None) or spec.watch  # type: ignore[attr-defined]
    act = getattr(adjustment, "act", None) or spec.act  # type: ignore[attr-defined]
    relative = watch.dimension is Dimension.RATIO
    return CompareRule(
        quantity=spec.quantity,  # type: ignore[attr-defined]
        watch=watch.value, act=act.value, relative=relative,
        threshold_unit="%" if relative else watch.base_unit,
        direction=getattr(adjustment, "direction", None) or spec.direction,  # type: ignore[attr-defined]
        check=spec.check, step=spec.step,  # type: ignore[attr-defined]
        note_up=spec.note_up, note_down=spec.note_down,  # type: ignore[attr-defined]
        normalise_to_voltage=(getattr(adjustment, "normalise_to_voltage", None)
                              or spec.normalise_to_voltage),  # type: ignore[attr-defined]
        source=spec.source.describe(),  # type: ignore[attr-defined]
        adjusted=getattr(adjustment, "reason", None))


# ------------------------------------------------------------------ arithmetic


def relative_change(baseline_value: float, value: float) -> float:
    """Change from the baseline in percent of the baseline.

    Parameters
    ----------
    baseline_value : float
        Value at the baseline visit [unit]; not zero.
    value : float
        Value at the later visit [unit].

    Returns
    -------
    float
        Δ = 100 · (value / baseline_value − 1) [%].
    """
    if baseline_value == 0 or not math.isfinite(baseline_value):
        raise ValueError(f"baseline_value = {baseline_value!r}: a percentage change needs a "
                         "finite, non-zero baseline")
    return 100.0 * (value / baseline_value - 1.0)


def classify_change(change: float, rule: CompareRule) -> ChangeClass:
    """Class a signed change (in the rule's threshold unit) as steady, watch or act.

    Both thresholds are closed: a change equal to ``watch`` is *watch*, equal to ``act``
    is *act*. A change against the rule's direction (a fall where only rises count) is
    *steady*.
    """
    if rule.direction == "up":
        size = max(change, 0.0)
    elif rule.direction == "down":
        size = max(-change, 0.0)
    else:
        size = abs(change)
    if size >= rule.act * (1 - _SLACK):
        return ChangeClass.ACT
    if size >= rule.watch * (1 - _SLACK):
        return ChangeClass.WATCH
    return ChangeClass.STEADY


# ------------------------------------------------------------------ baseline and values


def select_baseline(visits: Iterable[VisitResult], named: str | None = None) -> str | None:
    """The id of the baseline visit.

    ``named`` (the machine file's ``baseline``) wins; otherwise the earliest commissioning
    visit; a machine with no commissioning visit on record uses its earliest visit. Visits
    are taken in date order, then by id, as loading sorts them.
    """
    ordered = sorted(visits, key=lambda v: (v.date, v.id))
    if named is not None:
        if not any(v.id == named for v in ordered):
            raise ValueError(f"no visit {named!r} to use as the baseline")
        return named
    commissioning = [v for v in ordered if v.kind == "commissioning"]
    if commissioning:
        return commissioning[0].id
    return ordered[0].id if ordered else None


def effective_element(visit: VisitResult, key: str,
                      element: str | None) -> tuple[ItemResult, ElementResult, bool] | None:
    """The item and element a later comparison uses: as-left where re-measured, else as-found.

    Returns ``(item, element, is_as_left)`` or None when the visit has no such item.
    """
    for item in visit.as_left:
        if item.key == key:
            for candidate in item.elements:
                if candidate.element == element:
                    return item, candidate, True
    for item in visit.items:
        if item.key == key:
            for candidate in item.elements:
                if candidate.element == element:
                    return item, candidate, False
    return None


def _dimension_of(unit: str) -> Dimension | None:
    if not unit:
        return Dimension.NUMBER
    try:
        return parse_quantity(f"1 {unit}", *Dimension).dimension
    except UnitError:
        return None


def _format(value: float, base_unit: str, display_unit: str | None) -> str:
    dimension = _dimension_of(base_unit)
    if dimension is None:
        return f"{value:.4g} {base_unit}".strip()
    shown = display_unit if display_unit and _dimension_of(display_unit) is dimension \
        else base_unit
    return format_value(value, dimension, shown or None)


@dataclass(frozen=True)
class _Value:
    value: float
    unit: str  # base unit
    label: str
    basis: str | None
    adjustments: tuple[str, ...] = ()


def _value_of(element: ElementResult, rule: CompareRule) -> _Value | str:
    """The value ``rule`` compares, or why there is none."""
    if element.value is None:
        return "not recorded" if element.verdict.value in ("not tested", "not applicable") \
            else "no value"
    if rule.quantity == "reading":
        return _Value(element.value, element.unit, "reading", element.effective_basis)
    checks = [c for c in element.checks if rule.check is None or c.id == rule.check]
    for check in checks:
        if rule.step is not None:
            step = next((s for s in check.steps if s.label.startswith(rule.step)
                         and s.value is not None), None)
            if step is None:
                continue
            value, unit, label = step.value, step.unit, step.label
        elif check.compared_value is not None:
            value, unit, label = check.compared_value, check.compared_unit, (
                check.compared or "compared value")
        else:
            continue
        assert value is not None
        extras = ", ".join(f"{k} {v}" for k, v in element.extras.items() if k != "range")
        origin = f"{label} from {element.reading}" + (f" ({extras})" if extras else "")
        return _Value(value, unit, label, None, (origin,))
    wanted = rule.step or "corrected value"
    messages = "; ".join(c.message for c in checks if c.message)
    return f"the check computed no {wanted}" + (f" ({messages})" if messages else "")


def _captured(element: ElementResult, basis: str) -> float | None:
    capture = element.capture
    if capture is None:
        return None
    wanted = capture.current_channel if element.unit == "A" else capture.voltage_channel
    for channel in capture.channels:
        if channel.name == wanted:
            if basis == "rms":
                return float(channel.metrics.rms)
            if basis == "average":
                return float(channel.metrics.average_responding_ac)
    return None


def _common_basis(before: _Value, before_element: ElementResult, after: _Value,
                  after_element: ElementResult,
                  display_unit: str | None) -> tuple[_Value, _Value] | str:
    """Both values on one basis, converting with a capture of the same visit, or why not."""
    if before.basis == after.basis:
        return before, after
    phrase: dict[str | None, str] = {None: "an unknown basis"}
    phrase.update(_BASIS_PHRASE)
    if before.basis is None or after.basis is None:
        return (f"the baseline reads on {phrase[before.basis]} and this visit on "
                f"{phrase[after.basis]}; write 'RMS', 'avg' or 'd.c.' after the value or "
                "name the instrument")
    target = "rms" if "rms" in (before.basis, after.basis) else before.basis
    converted = []
    for side, value, element in (("the baseline", before, before_element),
                                 ("this visit", after, after_element)):
        if value.basis == target:
            converted.append(value)
            continue
        on_target = _captured(element, target)
        if on_target is None:
            return (f"the baseline reads {phrase[before.basis]} and this visit "
                    f"{phrase[after.basis]}; no capture on {side} converts its "
                    f"{phrase[value.basis]} reading to {phrase[target]}; measure both on one "
                    "basis (a true-RMS meter) or attach a capture")
        note = (f"{side}: {phrase[value.basis]} reading "
                f"{_format(value.value, value.unit, display_unit)} converted to "
                f"{phrase[target]} {_format(on_target, value.unit, display_unit)} from the "
                "capture of that visit")
        converted.append(replace(value, value=on_target, basis=target,
                                 label=f"{value.label} ({phrase[target]})",
                                 adjustments=(*value.adjustments, note)))
    return converted[0], converted[1]


def _mean_voltage(visit: VisitResult, key: str) -> tuple[float, str] | None:
    for item in (*visit.as_left, *visit.items):
        if item.key == key:
            values = [e.value for e in item.elements if e.value is not None]
            if values:
                return sum(values) / len(values), ", ".join(
                    e.reading for e in item.elements if e.reading and e.value is not None)
    return None


def _change(item_key: str, title: str, element: str | None, rule: CompareRule,
            before_visit: VisitResult, after_visit: VisitResult,
            display_unit: str | None) -> Change | None:
    found_before = effective_element(before_visit, item_key, element)
    found_after = effective_element(after_visit, item_key, element)
    thresholds = rule.describe()

    def not_comparable(reason: str, before: _Value | None = None,
                       after: _Value | None = None) -> Change:
        known = before or after
        unit = known.unit if known else ""
        return Change(
            item=item_key, title=title, element=element,
            quantity=known.label if known else rule.quantity,
            unit=unit, baseline_value=before.value if before else None,
            value=after.value if after else None,
            baseline_text=_format(before.value, unit, display_unit) if before else "—",
            text=_format(after.value, unit, display_unit) if after else "—",
            change=None, change_unit="", change_text="—",
            classification=ChangeClass.NOT_COMPARABLE, thresholds=thresholds,
            source=rule.source, reason=reason)

    before = _value_of(found_before[1], rule) if found_before else "not recorded"
    after = _value_of(found_after[1], rule) if found_after else "not recorded"
    if isinstance(before, str) and isinstance(after, str):
        return None  # on neither visit: nothing to say
    if isinstance(before, str):
        return not_comparable(f"{before} on the baseline ({before_visit.id})",
                              after=after if isinstance(after, _Value) else None)
    if isinstance(after, str):
        return not_comparable(f"{after} on this visit ({after_visit.id})", before=before)
    assert found_before is not None and found_after is not None
    adjustments: list[str] = []
    if found_before[2]:
        adjustments.append(f"baseline value as left on {before_visit.id}")
    if found_after[2]:
        adjustments.append("this visit's value as left")
    if rule.quantity == "reading":
        common = _common_basis(before, found_before[1], after, found_after[1], display_unit)
        if isinstance(common, str):
            return not_comparable(common, before, after)
        before, after = common
    if before.unit != after.unit:
        return not_comparable(f"the baseline's {before.label} is in {before.unit or 'no unit'}"
                              f" and this visit's in {after.unit or 'no unit'}", before, after)
    if rule.normalise_to_voltage is not None:
        base_voltage = _mean_voltage(before_visit, rule.normalise_to_voltage)
        visit_voltage = _mean_voltage(after_visit, rule.normalise_to_voltage)
        if base_voltage is None or visit_voltage is None:
            missing = before_visit.id if base_voltage is None else after_visit.id
            adjustments.append(f"not normalised to the supply voltage: no "
                               f"{rule.normalise_to_voltage} on {missing}")
        else:
            scaled = after.value * base_voltage[0] / visit_voltage[0]
            adjustments.append(
                f"normalised to the baseline supply voltage ({rule.normalise_to_voltage}; a "
                f"resistive or constant-impedance load): "
                f"{_format(after.value, after.unit, display_unit)} × "
                f"{_format(base_voltage[0], 'V', 'V')} / {_format(visit_voltage[0], 'V', 'V')}"
                f" = {_format(scaled, after.unit, display_unit)}")
            after = replace(after, value=scaled, label=f"{after.label}, normalised to "
                                                       f"{_format(base_voltage[0], 'V', 'V')}")
    if rule.relative:
        if before.value == 0:
            return not_comparable("the baseline value is zero; a percentage change is "
                                  "undefined", before, after)
        change = relative_change(before.value, after.value)
        change_unit = "%"
    else:
        change = after.value - before.value
        change_unit = rule.threshold_unit
    classification = classify_change(change, rule)
    note = None
    if classification in (ChangeClass.WATCH, ChangeClass.ACT):
        note = rule.note_up if change > 0 else rule.note_down
    sign = "+" if change >= 0 else _MINUS
    return Change(
        item=item_key, title=title, element=element, quantity=after.label,
        unit=after.unit, baseline_value=before.value, value=after.value,
        baseline_text=_format(before.value, before.unit, display_unit),
        text=_format(after.value, after.unit, display_unit),
        change=change, change_unit=change_unit,
        change_text=f"{sign}{abs(change):.1f} {change_unit}",
        classification=classification, thresholds=thresholds, source=rule.source,
        note=note, adjustments=(*(f"baseline: {a}" for a in before.adjustments),
                                *(f"this visit: {a}" for a in after.adjustments),
                                *adjustments))


def _compared_items(*visits: VisitResult) -> list[ItemResult]:
    seen: dict[str, ItemResult] = {}
    for visit in visits:
        for item in visit.items:
            if item.compare is not None and item.key not in seen:
                seen[item.key] = item
    return list(seen.values())


def _changes(before_visit: VisitResult, after_visit: VisitResult,
             keys: Iterable[str] | None = None) -> tuple[Change, ...]:
    wanted = set(keys) if keys is not None else None
    changes: list[Change] = []
    for item in _compared_items(after_visit, before_visit):
        if (wanted is not None and item.key not in wanted) or item.compare is None:
            continue
        names: list[str | None] = []
        for visit in (after_visit, before_visit):
            for candidate in (*visit.items, *visit.as_left):
                if candidate.key == item.key:
                    names += [e.element for e in candidate.elements if e.element not in names]
        for name in names:
            change = _change(item.key, item.title, name, item.compare, before_visit,
                             after_visit, item.unit)
            if change is not None:
                changes.append(change)
    return tuple(changes)


# ------------------------------------------------------------------ comparisons


@dataclass(frozen=True)
class VisitComparison:
    """A later visit against the baseline: every compared value and its class."""

    machine: str
    baseline: str
    visit: str
    baseline_date: _dt.date
    visit_date: _dt.date
    changes: tuple[Change, ...]

    @property
    def counts(self) -> dict[str, int]:
        return {c.value: sum(1 for ch in self.changes if ch.classification is c)
                for c in ChangeClass if c is not ChangeClass.REPAIRED}


def _visit(machine: MachineResult, visit: VisitResult | str) -> VisitResult:
    if isinstance(visit, VisitResult):
        return visit
    found = next((v for v in machine.visits if v.id == visit), None)
    if found is None:
        raise ValueError(f"machine {machine.id!r} has no visit {visit!r}")
    return found


def compare_visits(machine_result: MachineResult, baseline: VisitResult | str,
                   visit: VisitResult | str) -> VisitComparison:
    """Compare ``visit`` with ``baseline``, item by item and element by element.

    Every item whose checklist declares ``compare`` is taken, with its value as left where
    the visit re-measured it. A value recorded on only one of the two visits is *not
    comparable*, with the reason.
    """
    base = _visit(machine_result, baseline)
    later = _visit(machine_result, visit)
    return VisitComparison(machine=machine_result.id, baseline=base.id, visit=later.id,
                           baseline_date=base.date, visit_date=later.date,
                           changes=_changes(base, later))


def visit_comparison(machine_result: MachineResult, baseline: VisitResult | str,
               visit: VisitResult | str) -> VisitComparison:
    """``visit`` against ``baseline``: the changes evaluation attached to the visit when it
    compared the two, else :func:`compare_visits` (another baseline, or an earlier visit)."""
    base = _visit(machine_result, baseline)
    later = _visit(machine_result, visit)
    if later.baseline != base.id:
        return compare_visits(machine_result, base, later)
    return VisitComparison(machine=machine_result.id, baseline=base.id, visit=later.id,
                           baseline_date=base.date, visit_date=later.date,
                           changes=later.changes)


def part_behaviour(machine_result: MachineResult, visit: VisitResult | str,
                   elements: dict[str, str] | None = None) -> tuple[PartReplacement, ...]:
    """Each part replaced on ``visit`` with its element's values before and after the swap.

    *Before* is the visit's as-found reading where it re-measured the item as left, else
    the visit before it; *after* is the as-left reading, else the visit's own.
    """
    later = _visit(machine_result, visit)
    index = [v.id for v in machine_result.visits].index(later.id)
    previous = machine_result.visits[index - 1] if index > 0 else None
    found: list[PartReplacement] = []
    as_found = replace(later, as_left=())
    for part in later.parts_replaced:
        keys = list(part.items)
        if not keys and part.element is not None:
            keys = [i.key for i in _compared_items(later)
                    if any(e.element == part.element for e in i.elements)]
        behaviour: list[Change] = []
        before_label = None
        for key in keys:
            re_measured = any(i.key == key for i in later.as_left)
            before_visit = as_found if re_measured else previous
            if before_visit is None:
                continue
            changes = _changes(before_visit, later, [key])
            # An item measured on the part's own element shows that element; an item of the
            # whole machine (a line current behind a new contactor) shows every element.
            own = [c for c in changes if c.element == part.element]
            # The cause of this change is known (the swap): no suggestion of another. Its
            # class says whether the swap repaired the part, not only how far it moved.
            behaviour.extend(_judged_repair(replace(c, note=None), later)
                             for c in (own or changes))
            before_label = "as found" if re_measured else before_visit.id
        found.append(replace(part, before=before_label, behaviour=tuple(behaviour),
                             steady=all(c.classification is ChangeClass.STEADY
                                        for c in behaviour),
                             repaired=any(c.classification is ChangeClass.REPAIRED
                                          for c in behaviour)
                             and not any(c.classification is ChangeClass.ACT
                                         for c in behaviour)))
    return tuple(found)


def repair_class(before: float, after: float, lower: float | None, upper: float | None,
                 nominal: float | None, by_size: ChangeClass) -> tuple[ChangeClass, str | None]:
    """Class a value before and after a part was replaced by the direction of the repair.

    A value brought back inside its limit, or moved toward its nominal while inside, is a
    repair that worked (*repaired*), however large the step; a value left outside its limit
    is a change to *act* on; otherwise the change keeps its class by size (``by_size``). With
    no nominal, the middle of a two-sided limit stands for it. Returns the class and why.
    """
    def inside(value: float) -> bool:
        return (lower is None or value >= lower) and (upper is None or value <= upper)

    if nominal is None and lower is not None and upper is not None:
        nominal = (lower + upper) / 2
    if not inside(after):
        return ChangeClass.ACT, "still outside its limit after the swap"
    if not inside(before):
        return ChangeClass.REPAIRED, "restored: outside its limit before the swap, inside after"
    if nominal is not None and abs(after - nominal) < abs(before - nominal):
        return ChangeClass.REPAIRED, "restored toward its nominal value, inside its limit"
    return by_size, None


def _judged_repair(change: Change, visit: VisitResult) -> Change:
    if (change.baseline_value is None or change.value is None
            or change.classification is ChangeClass.NOT_COMPARABLE):
        return change
    found = effective_element(visit, change.item, change.element)
    if found is None:
        return change
    element = found[1]
    for check in element.checks:
        if check.limit_lower is None and check.limit_upper is None:
            continue
        if (check.compared_unit or element.unit) != change.unit:
            continue
        nominal = next((s.value for s in check.steps if s.label == "nominal"
                        and s.value is not None), None)
        classification, why = repair_class(change.baseline_value, change.value,
                                           check.limit_lower, check.limit_upper, nominal,
                                           change.classification)
        if why is None:
            return change
        return replace(change, classification=classification,
                       note=f"{why} ({check.limit}); judged by the direction of the repair, "
                            f"not by the size of the change")
    return change


# ------------------------------------------------------------------ trends


def _limits(item: ItemResult, rule: CompareRule, unit: str,
            element_id: str | None) -> tuple[float | None, float | None]:
    bands = set()
    for element in item.elements:
        if element.element != element_id:
            continue
        for check in element.checks:
            if rule.check is not None and check.id != rule.check:
                continue
            if check.limit_lower is None and check.limit_upper is None:
                continue
            if (check.compared_unit or element.unit) != unit:
                continue
            bands.add((check.limit_lower, check.limit_upper))
            break
    return bands.pop() if len(bands) == 1 else (None, None)


def _evaluated_change(visit: VisitResult, base: VisitResult, item: ItemResult,
                      element: str | None, rule: CompareRule) -> Change | None:
    """The change evaluation attached to ``visit``; computed only for a visit it did not
    compare with ``base``."""
    if visit.baseline == base.id:
        return next((c for c in visit.changes if c.item == item.key and c.element == element),
                    None)
    return _change(item.key, item.title, element, rule, base, visit, item.unit)


def trend_series(machine_result: MachineResult) -> tuple[TrendSeries, ...]:
    """Every compared item of a machine over its visits, for trend plots.

    A point is the value the comparison used: corrected, converted to the baseline's basis
    and normalised to its supply voltage where the rule says so. Visits before the
    baseline appear with their own value, unclassed.
    """
    if len(machine_result.visits) < 2 or machine_result.baseline is None:
        return ()
    base = _visit(machine_result, machine_result.baseline)
    series: list[TrendSeries] = []
    for item in _compared_items(*machine_result.visits):
        rule = item.compare
        assert rule is not None  # _compared_items keeps only the compared items
        traces: list[TrendTrace] = []
        unit, quantity = "", ""
        order = [v.id for v in machine_result.visits]
        for element in [e.element for e in item.elements]:
            points: list[TrendPoint] = []
            baseline_point: TrendPoint | None = None
            for visit in machine_result.visits:
                if visit.id == base.id:
                    continue
                if order.index(visit.id) < order.index(base.id):
                    found = effective_element(visit, item.key, element)
                    value = _value_of(found[1], rule) if found else None
                    if isinstance(value, _Value):
                        points.append(TrendPoint(visit.id, visit.date, value.value,
                                                 _format(value.value, value.unit, item.unit),
                                                 None))
                    continue
                change = _evaluated_change(visit, base, item, element, rule)
                if (change is None or change.classification is ChangeClass.NOT_COMPARABLE
                        or change.value is None):
                    continue
                unit, quantity = change.unit, quantity or change.quantity
                assert change.baseline_value is not None
                if baseline_point is None:
                    baseline_point = TrendPoint(base.id, base.date, change.baseline_value,
                                                change.baseline_text, None, True)
                points.append(TrendPoint(visit.id, visit.date, change.value, change.text,
                                         change.classification))
            if baseline_point is not None:
                points.append(baseline_point)
                points.sort(key=lambda p: order.index(p.visit))
                traces.append(TrendTrace(element, tuple(points)))
        # Elements with the same limits share a plot; others (a main and an auxiliary
        # winding of different nominal resistance) get one each, so each keeps its band.
        groups: dict[tuple[float | None, float | None], list[TrendTrace]] = {}
        for trace in traces:
            groups.setdefault(_limits(item, rule, unit, trace.element), []).append(trace)
        for (lower, upper), members in groups.items():
            title = item.title if len(groups) == 1 else \
                f"{item.title} ({', '.join(str(t.element) for t in members)})"
            series.append(TrendSeries(
                item=item.key, title=title, quantity=quantity, unit=unit,
                display_unit=item.unit, baseline=base.id, traces=tuple(members),
                limit_lower=lower, limit_upper=upper))
    return tuple(series)


# ------------------------------------------------------------------ JSON


def comparison_to_json(comparison: VisitComparison) -> dict[str, object]:
    """One comparison as the ``acceptance-comparison/1`` schema's entry (see README)."""
    return {
        "machine": comparison.machine, "baseline": comparison.baseline,
        "visit": comparison.visit, "baseline_date": comparison.baseline_date.isoformat(),
        "visit_date": comparison.visit_date.isoformat(), "counts": comparison.counts,
        "changes": [{
            "item": c.item, "title": c.title, "element": c.element, "quantity": c.quantity,
            "unit": c.unit, "baseline_value": c.baseline_value, "value": c.value,
            "baseline_text": c.baseline_text, "text": c.text, "change": c.change,
            "change_unit": c.change_unit, "change_text": c.change_text,
            "class": c.classification.value, "thresholds": c.thresholds, "source": c.source,
            "note": c.note, "adjustments": list(c.adjustments), "reason": c.reason,
        } for c in comparison.changes],
    }
