"""A blank visit file for a machine: every item of its checklists, with prompts and units.

The text is written by hand rather than by a YAML dumper so that each blank carries
its prompt as a comment and the file reads like the form it replaces.
"""

from __future__ import annotations

import datetime as _dt
import json

from .loading import Job, LoadedMachine, element_names
from .model import ChecklistItem

__all__ = ["visit_template"]


def _comment(text: str | None, indent: str) -> list[str]:
    if not text:
        return []
    words, lines, line = text.split(), [], ""
    for word in words:
        if len(line) + len(word) + 1 > 88 - len(indent):
            lines.append(line)
            line = word
        else:
            line = f"{line} {word}".strip()
    if line:
        lines.append(line)
    return [f"{indent}# {chunk}" for chunk in lines]


def _key(name: str) -> str:
    # Element names such as L1-L2 are plain YAML keys; quote anything unusual.
    return name if name.replace("-", "").replace("_", "").isalnum() else json.dumps(name)


def _blank(item: ChecklistItem) -> str:
    if item.record == "confirmation":
        return "      # yes or no"
    return f"      # {item.unit}"


def _item_lines(item: ChecklistItem, machine: LoadedMachine) -> list[str]:
    survey = [p.id for p in machine.model.survey_points]
    bonding = [p.id for p in machine.model.bonding_points]
    lines = [""]
    header = f"{item.title}" + (f" [{item.unit}]" if item.unit else "")
    flags = []
    if item.safety_critical:
        flags.append("SAFETY-CRITICAL")
    if not item.required:
        flags.append("optional")
    if flags:
        header += " — " + ", ".join(flags)
    lines += _comment(header, "    ")
    lines += _comment(f"Caution: {item.caution}" if item.caution else None, "    ")
    lines += _comment(item.guidance, "    ")
    names = element_names(item.per, machine.model.nameplate, survey, bonding)
    mapping = bool(item.also_record)
    if item.per == "single":
        if mapping:
            lines.append(f"    {item.id}:")
            lines += _value_block(item, "      ")
        else:
            lines.append(f"    {item.id}:{_blank(item)}")
        return lines
    if not names:
        lines.append(f"    # {item.id}: no {item.per.replace('_', ' ')} on this machine")
        return lines
    lines.append(f"    {item.id}:")
    for name in names:
        if mapping:
            lines.append(f"      {_key(str(name))}:")
            lines += _value_block(item, "        ")
        else:
            lines.append(f"      {_key(str(name))}:{_blank(item)}")
    return lines


def _value_block(item: ChecklistItem, indent: str) -> list[str]:
    lines = [f"{indent}value:{'      # ' + (item.unit or 'yes or no')}"]
    for name, unit in item.also_record.items():
        lines.append(f"{indent}{name}:      # {unit}")
    lines.append(f"{indent}instrument:")
    return lines


def visit_template(job: Job, machine: LoadedMachine, kind: str, date: _dt.date,
                   schema_reference: str) -> str:
    """The text of a blank visit file for ``machine``."""
    lines = [
        f"# yaml-language-server: $schema={schema_reference}",
        f"# {kind.capitalize()} visit of {machine.model.name} ({machine.id}).",
        "# Fill in each reading with its unit as you read it (e.g. 232.6 V, 34.6 Ω, 31.7 µF).",
        "# Leave a blank where an item was not tested; write n/a where it does not apply",
        "# (never for a safety-critical item). Qualified persons only; local codes govern.",
        f"kind: {kind}",
        f"date: {date.isoformat()}",
        "performed_by: []          # names of the people who did the tests",
        "default_instrument:       # id from instruments.yaml, used where a reading names none",
        "conditions:",
        "  ambient:                # °C",
        "readings:",
    ]
    for checklist_id in machine.model.checklists:
        checklist = job.checklists[checklist_id]
        lines.append("")
        lines.append(f"  # ---- {checklist.model.title}")
        lines += _comment(f"Caution: {checklist.model.caution}" if checklist.model.caution
                          else None, "  ")
        lines.append(f"  {checklist_id}:")
        for item in checklist.model.items:
            lines += _item_lines(item, machine)
    lines += [
        "",
        "notes: |",
        "  ",
        "attachments: []",
        "sign_off: []",
        "",
    ]
    return "\n".join(lines)
