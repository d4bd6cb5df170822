"""``acceptance compare JOB [MACHINE]``: each visit against the machine's baseline.

Exit 0 when nothing calls for action, 1 when any change is classed *act*, 2 on bad input.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from ..errors import AcceptanceError
from ..evaluation import (
    COMPARISON_SCHEMA,
    VisitComparison,
    comparison_to_json,
    evaluate_job,
    select_baseline,
    visit_comparison,
)
from ..loading import load_job
from ..results import ChangeClass, JobResult, MachineResult
from ..text import terminal_text
from ..wording import counted


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("machine", nargs="?",
                        help="machine id (its folder name); default: every machine with more "
                             "than one visit")
    parser.add_argument("--baseline", metavar="VISIT",
                        help="compare with this visit instead of the machine's baseline")
    parser.add_argument("--visit", metavar="VISIT",
                        help="compare only this visit (default: every visit after the baseline)")
    parser.add_argument("--json", action="store_true",
                        help=f"print the comparisons as JSON (schema {COMPARISON_SCHEMA})")


def _machines(result: JobResult, wanted: str | None) -> list[MachineResult]:
    if wanted is None:
        return [m for m in result.machines if len(m.visits) > 1]
    found = [m for m in result.machines if m.id == wanted]
    if not found:
        known = ", ".join(m.id for m in result.machines)
        raise AcceptanceError(f"no machine '{wanted}' in the job; known: {known}")
    return found


def comparisons(result: JobResult, machine_id: str | None = None, baseline: str | None = None,
                visit: str | None = None) -> list[VisitComparison]:
    """The comparisons the command prints, in machine and visit order."""
    found: list[VisitComparison] = []
    for machine in _machines(result, machine_id):
        ids = [v.id for v in machine.visits]
        for name, given in (("--baseline", baseline), ("--visit", visit)):
            if given is not None and given not in ids:
                raise AcceptanceError(f"{name}: {machine.id} has no visit '{given}'; its "
                                      f"visits: {', '.join(ids)}")
        base = baseline or machine.baseline or select_baseline(machine.visits)
        if base is None:
            continue
        targets = [visit] if visit else ids[ids.index(base) + 1:]
        # The changes against the machine's baseline are those evaluation attached to each
        # visit; another baseline (--baseline, or --visit before it) is compared here.
        found.extend(visit_comparison(machine, base, target) for target in targets
                     if target != base)
    return found


def nothing_to_compare(result: JobResult, machine_id: str | None = None,
                       baseline: str | None = None) -> str:
    """Why no comparison was printed: about the machine asked for, or about the job."""
    if machine_id is None:
        return "no machine has a visit after its baseline"
    machine = _machines(result, machine_id)[0]
    if len(machine.visits) < 2:
        only = machine.visits[0].id if machine.visits else "none"
        return (f"{machine.id} has {counted(len(machine.visits), 'visit')} ({only}); a "
                f"comparison needs a later visit")
    base = baseline or machine.baseline or select_baseline(machine.visits)
    if base is None:
        return f"{machine.id} has no visit that can serve as its baseline"
    return f"{machine.id} has no visit after its baseline {base}"


def lines(found: list[VisitComparison], empty: str = "no machine has a visit after its baseline"
          ) -> list[str]:
    out: list[str] = []
    for comparison in found:
        out.append(f"{comparison.machine}: {comparison.visit} ({comparison.visit_date}) "
                   f"against baseline {comparison.baseline} ({comparison.baseline_date})")
        for change in comparison.changes:
            where = change.item + (f"[{change.element}]" if change.element else "")
            text = (f"  {change.classification.mark:<2} {change.classification.word:<14} "
                    f"{where}: {change.quantity} {change.baseline_text} → {change.text}")
            if change.classification is not ChangeClass.NOT_COMPARABLE:
                text += f" ({change.change_text})"
            out.append(text)
            if change.reason:
                out.append(f"       {change.reason}")
            if change.note:
                out.append(f"       {change.note}")
            for adjustment in change.adjustments:
                if "normalised" in adjustment or "converted" in adjustment:
                    out.append(f"       {adjustment}")
        counts = ", ".join(f"{n} {word}" for word, n in comparison.counts.items() if n)
        out.append(f"  {counts or 'nothing compared'}")
        out.append("")
    if not found:
        out.append(empty)
    return out


def run(args: argparse.Namespace) -> int:
    result = evaluate_job(load_job(args.job))
    found = comparisons(result, args.machine, args.baseline, args.visit)
    if args.json:
        document = {"schema": COMPARISON_SCHEMA, "title": result.title, "site": result.site,
                    "comparisons": [comparison_to_json(c) for c in found]}
        sys.stdout.write(terminal_text(json.dumps(document, ensure_ascii=False, indent=2)))
        sys.stdout.write("\n")
    else:
        empty = nothing_to_compare(result, args.machine, args.baseline)
        print(terminal_text("\n".join(lines(found, empty)).rstrip("\n")))
    acted = any(c.classification is ChangeClass.ACT for f in found for c in f.changes)
    return 1 if acted else 0
