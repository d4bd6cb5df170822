"""``acceptance check JOB``: evaluate and print a summary; exit 0 only when no deficiency is
open (each closed by a later pass or accepted as an exception) and no sign-off was altered.

Each machine's section of the output is kept while its inputs are unchanged (see
:mod:`acceptance.check_cache`): after an edit only the machines whose files changed are
loaded and evaluated again, and while nothing changed the model and the evaluation are not
even imported.
"""

from __future__ import annotations

import argparse
import dataclasses
import io
import json
import os
import sys
import textwrap
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .. import check_cache
from ..text import terminal_text
from ..verdicts import VisitState, count_states
from ..wording import counted

if TYPE_CHECKING:
    from ..loading import Job, LoadedMachine
    from ..results import MachineResult

# json.dumps(indent=2) puts the top-level keys two spaces in and the items of their lists four.
_JSON_KEY_INDENT = "  "
_JSON_ITEM_INDENT = "    "


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("--json", action="store_true",
                        help="print the results as JSON (schema acceptance-results/1)")
    parser.add_argument("--all", action="store_true",
                        help="list every item, not only those that need attention")


def machine_lines(machine: MachineResult, show_all: bool = False) -> list[str]:
    """One machine's section of the summary: its visits and what needs attention (the
    punch list evaluation made: as left for the items re-measured, else as found)."""
    lines = ["", f"{machine.name} [{machine.id}]"]
    if not machine.visits:
        lines.append("  no visits recorded")
    for visit in machine.visits:
        lines.append(f"  {visit.state.mark} {visit.id} ({visit.kind}, "
                     f"{visit.date.isoformat()}): {visit.state.value.upper()}"
                     + (f" as left (as found: {visit.as_found_state.value})"
                        if visit.as_found_state is not None else ""))
        left = {item.key: item for item in visit.as_left}
        points = {(d.item, d.element) for d in visit.deficiencies if d.item not in left}
        points |= {(d.item, d.element) for d in visit.as_left_deficiencies}
        for found in visit.items:
            item = left.get(found.key, found)
            label = "as left: " if found.key in left else ""
            for element in item.elements or ():
                if not show_all and (item.key, element.element) not in points:
                    continue
                where = f"{label}{item.key}" + (f"[{element.element}]" if element.element
                                                 else "")
                reading = element.reading or "—"
                lines.append(f"      {element.verdict.mark} {element.verdict.word:<16} "
                             f"{where}: {reading}")
                for check in element.checks:
                    if check.verdict.is_open or show_all:
                        detail = f"{check.verdict.mark} {check.limit}"
                        if check.compared:
                            detail = f"{check.verdict.mark} {check.compared}: {check.limit}"
                        if check.message:
                            detail += f" — {check.message}"
                        lines.append(f"          {detail}  ({check.source})")
                for finding in element.findings:
                    lines.append(f"          ⚠ {finding}")
                if element.line:
                    lines.append(f"          at {visit.source_file}:{element.line}")
            if not item.elements and show_all:
                lines.append(f"      {item.verdict.mark} {item.verdict.word:<16} "
                             f"{item.key}")
    lines.extend(punch_lines(machine))
    return lines


def punch_lines(machine: MachineResult) -> list[str]:
    """The machine's deficiencies still open (not closed, not accepted), and its handover."""
    lines = []
    for item in machine.punch_list:
        if not item.blocking:
            continue
        who = f", owner {item.owner}" if item.owner else ", no owner"
        due = (f", due {item.due.isoformat()}" + (" OVERDUE" if item.overdue else "")
               if item.due else "")
        lines.append(f"  {item.state.mark} open deficiency {item.key}: {item.latest.word}, "
                     f"raised by {item.raised.visit}{who}{due}")
    accepted = sum(1 for item in machine.punch_list if item.acceptance and not item.blocking
                   and item.closed_by is None)
    if accepted:
        lines.append(f"  {accepted} accepted exception{'s' if accepted > 1 else ''}")
    if machine.handover is not None:
        lines.append("  handover: ready" if machine.handover.ready else
                     "  handover: not ready — " + "; ".join(machine.handover.reasons))
    return lines


def totals_line(states: list[str]) -> str:
    """The last line of the summary: how many visits are in each state."""
    counts = count_states(VisitState(state) for state in states)
    return counted(len(states), "visit") + ": " + ", ".join(
        f"{count} {state.word}" for state, count in counts if count)


def run(args: argparse.Namespace) -> int:
    variant = "json" if args.json else ("all" if args.all else "summary")
    cache = (check_cache.open_cache(args.job, variant)
             if not os.environ.get("ACCEPTANCE_NO_CACHE") else None)
    if cache is not None and cache.complete:
        # Nothing changed: print again without importing the model or the evaluation.
        head, sections = cache.head, cache.sections({})
    else:
        head, fresh = _evaluate(args.job, variant, cache.stale if cache else None)
        sections = cache.sections(fresh) if cache else [fresh[m] for m in fresh]
        if cache is not None:
            cache.store(head, fresh)
    return _print(variant, head, sections)


def _evaluate(root: Path, variant: str, machines: list[str] | None
              ) -> tuple[Any, dict[str, dict[str, Any]]]:
    """Load and evaluate ``machines`` (all when None): the variant's head and a section per
    machine, each with its printed text, its visits' states and its sign-off report."""
    from ..evaluation import evaluate_job
    from ..loading import load_job
    from ..results import machine_to_json, to_json

    job = load_job(root, machines=machines)  # raises InputError: nothing is cached then
    result = evaluate_job(job)
    loaded = {machine.id: machine for machine in job.machines}
    if variant == "json":
        head: Any = to_json(dataclasses.replace(result, machines=()))
    else:
        head = f"{result.title} — {result.site}"
    sections = {}
    for machine in result.machines:
        signatures = io.StringIO()
        altered = _report_signatures(job, loaded[machine.id], signatures,
                                     {v.id: v for v in machine.visits})
        section: dict[str, Any] = {
            "states": [visit.state.value for visit in machine.visits],
            "open_deficiencies": sum(1 for item in machine.punch_list if item.blocking),
            "signatures": signatures.getvalue(), "altered": altered}
        if variant == "json":
            # Kept as text, indented as it stands in the whole document: reprinting a large
            # job's JSON then costs no parsing and no encoding.
            section["json"] = textwrap.indent(
                json.dumps(machine_to_json(machine), ensure_ascii=False, indent=2),
                _JSON_ITEM_INDENT)
        else:
            section["text"] = "\n".join(machine_lines(machine, variant == "all"))
        sections[machine.id] = section
    return head, sections


def _print(variant: str, head: Any, sections: list[dict[str, Any]]) -> int:
    states = [state for section in sections for state in section["states"]]
    signatures = "".join(section["signatures"] for section in sections)
    if variant == "json":
        # The head was encoded with an empty machine list; the machines' texts go in its
        # place. Inside strings JSON escapes every quote, so the key matches only itself.
        items = ",\n".join(section["json"] for section in sections)
        machines = f"[\n{items}\n{_JSON_KEY_INDENT}]" if sections else "[]"
        document = json.dumps(head, ensure_ascii=False, indent=2).replace(
            f'\n{_JSON_KEY_INDENT}"machines": []', f'\n{_JSON_KEY_INDENT}"machines": {machines}', 1)
        sys.stdout.write(terminal_text(document) + "\n")
        sys.stderr.write(terminal_text(signatures))
    else:
        body = "\n".join([head, *(section["text"] for section in sections), ""])
        # The sign-off states come after every machine, and the totals stay the last line.
        sys.stdout.write(terminal_text(f"{body}\n{signatures}{totals_line(states)}\n"))
    # The punch list decides: every fail, undetermined point and required point not tested
    # raises a deficiency, so the job is done when each is closed by a later pass or accepted
    # as an exception, whatever the state of the visit that first found it.
    open_deficiencies = sum(section["open_deficiencies"] for section in sections)
    return 0 if not open_deficiencies and not any(
        section["altered"] for section in sections) else 1


def _report_signatures(job: Job, machine: LoadedMachine, stream: io.StringIO,
                       results: dict[str, Any]) -> int:
    """Print each signed visit's sign-off state; return how many were altered after it."""
    from ..integrity import check_visit_signatures, visit_verdicts

    altered = 0
    for visit in machine.visits:
        result = results.get(visit.id)
        status = check_visit_signatures(job, machine, visit, verdicts=(
            visit_verdicts(result) if result is not None else None))
        if status.state == "unsigned":
            continue
        who = ", ".join(f"{c.name} ({c.role})" for c in status.checks)
        print(f"{machine.id}/{visit.id}: "
              f"{status.phrase.upper() if status.state != 'signed' else status.phrase}"
              f" — {who}", file=stream)
        for reason in status.reasons:
            print(f"    {reason}", file=stream)
        for note in status.upgrade_notes:
            print(f"    {note}", file=stream)
        altered += status.state != "signed"
    return altered
